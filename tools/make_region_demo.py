#!/usr/bin/env python3
"""Write an invented regional study: three invented sites, each with its own invented rain record,
and the sites file that names them (README, "Regional studies").

Every record is drawn by tools/make_demo_rain.py's storm model (same season, 5-minute steps,
0.01 mm tips), each with its own fixed seed and a wetness factor that scales its storm depths, so
every run writes the same files. No gauge recorded them and no site is real.

Writes into OUT (default build/region): <site>.csv for each site and sites.csv:
    site,rain.file,roof.area_m2
Paths in sites.csv are relative to sites.csv, as gutterwatt sweep --sites reads them.

Usage: tools/make_region_demo.py [--out DIR]
"""

import argparse
import datetime as dt
import os
import random
import sys

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import make_demo_rain  # noqa: E402  (the storm model of the demo record)

# (name, file stem, seed, wetness factor on storm depths, roof area m2). Invented, all of it.
SITES = [
    ("Harrowmere croft (invented)", "harrowmere-croft", 101, 1.0, 40),
    ("Lowfen boathouse (invented)", "lowfen-boathouse", 102, 0.7, 60),
    ("Scarth hill hut (invented)", "scarth-hill-hut", 103, 1.4, 25),
]


def write_record(path, seed, wetness):
    step = dt.timedelta(minutes=make_demo_rain.STEP_MIN)
    first, last = make_demo_rain.FIRST_STAMP, make_demo_rain.LAST_STAMP
    n_steps = (last - first) // step + 1
    depth, _ = make_demo_rain.make_storms(random.Random(seed), n_steps)
    tips = make_demo_rain.tip_counts([d * wetness for d in depth])
    temporary = path + ".tmp"
    with open(temporary, "w", encoding="ascii", newline="\n") as out:
        out.write("time,rain_mm\n")
        for k, n in enumerate(tips):
            out.write(f"{first + k * step:%Y-%m-%dT%H:%M},{n // 100}.{n % 100:02d}\n")
    os.replace(temporary, path)
    return sum(tips) / 100.0


def main():
    root = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--out", default=os.path.join(root, "build", "region"))
    args = parser.parse_args()
    os.makedirs(args.out, exist_ok=True)
    lines = ["site,rain.file,roof.area_m2"]
    for name, stem, seed, wetness, roof in SITES:
        total = write_record(os.path.join(args.out, stem + ".csv"), seed, wetness)
        lines.append(f"{name},{stem}.csv,{roof}")
        print(f"{stem}.csv: seed {seed}, wetness {wetness}, season total {total:.1f} mm")
    sites = os.path.join(args.out, "sites.csv")
    with open(sites + ".tmp", "w", encoding="ascii", newline="\n") as out:
        out.write("\n".join(lines) + "\n")
    os.replace(sites + ".tmp", sites)
    print(f"wrote {sites}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
