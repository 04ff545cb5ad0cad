#!/usr/bin/env python3
"""Write the invented records of the decade walkthrough (README, "Walkthrough: ten years of daily
totals and two years from a nearby gauge"): data/demo/decade-daily.csv and
data/demo/nearby-gauge-5min.csv.

Both are made up: no gauge recorded them and they describe no real place. They stand for what a
user typically has:
- decade-daily.csv: ten years (2015 to 2024) of daily totals at the site, in mm, one row a day,
  dry days as 0: the daily totals of the invented 10-year 1-minute record of tools/bench
  (tools/make_long_rain.py with its seed 10), so that the run on that 1-minute record is the
  answer the daily totals should give;
- nearby-gauge-5min.csv: two years (2025 and 2026) of 5-minute depths from a gauge nearby: the
  same invented climate, each year drawn on its own with the next seeds (11 for 2025, 12 for
  2026), other storms, summed from 1 minute to 5 minutes, period-ending stamps (the first row,
  2025-01-01T00:05, holds the first five minutes).

Every run writes the same files byte for byte (fixed seeds). The 1-minute record itself is not
written here (it is hundreds of megabytes): `tools/make_long_rain.py --out
build/bench/rain-1min-10y.csv` writes it, and `gutterwatt run scenarios/bench.yaml` runs the
walkthrough's design on it.

Usage: tools/make_decade_rain.py [--out-dir DIR]
"""

import argparse
import array
import datetime as dt
import os
import sys

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import make_long_rain as long_rain  # noqa: E402  (storm model, gauge, writers)

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
DECADE_SEED = long_rain.SEED  # tools/bench's 10-year record
NEARBY_SEEDS = (long_rain.SEED + 1, long_rain.SEED + 2)  # one for each year
NEARBY_FIRST_DAY = dt.date(2025, 1, 1)
STEP_MIN = 5


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--out-dir", default=os.path.join(ROOT, "data", "demo"))
    args = parser.parse_args()
    os.makedirs(args.out_dir, exist_ok=True)
    site = long_rain.SITE
    decade, _ = long_rain.draw_years(DECADE_SEED, long_rain.YEARS)
    daily = os.path.join(args.out_dir, "decade-daily.csv")
    long_rain.write_totals(
        daily, decade, long_rain.MINUTES_PER_DAY,
        f"invented rain, not measured: {site}, daily totals of tools/make_long_rain.py seed "
        f"{DECADE_SEED} (tools/make_decade_rain.py)",
        lambda k: (long_rain.FIRST_DAY + dt.timedelta(days=k)).isoformat())
    nearby = array.array("l")
    for k, seed in enumerate(NEARBY_SEEDS):
        first_day = NEARBY_FIRST_DAY.replace(year=NEARBY_FIRST_DAY.year + k)
        nearby += long_rain.draw_years(seed, 1, first_day)[0]
    start = dt.datetime.combine(NEARBY_FIRST_DAY, dt.time())
    fine = os.path.join(args.out_dir, "nearby-gauge-5min.csv")
    long_rain.write_totals(
        fine, nearby, STEP_MIN,
        f"invented rain, not measured: a gauge near {site}, tools/make_long_rain.py's climate "
        f"with seeds {NEARBY_SEEDS[0]} (2025) and {NEARBY_SEEDS[1]} (2026), 5-minute totals "
        "(tools/make_decade_rain.py)",
        lambda k: (start + dt.timedelta(minutes=STEP_MIN * (k + 1))).strftime("%Y-%m-%dT%H:%M"))
    for path, counts, years in ((daily, decade, long_rain.YEARS),
                                (fine, nearby, len(NEARBY_SEEDS))):
        print(f"wrote {path} (invented): {sum(counts) / 100.0 / years:.0f} mm a year")
    return 0


if __name__ == "__main__":
    sys.exit(main())
