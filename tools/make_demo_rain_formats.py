#!/usr/bin/env python3
"""Write the invented demo records data/demo/tips-demo.csv and data/demo/daily-demo.csv.

Both are made from the invented 5-minute record data/demo/rain-5min.csv (written by
tools/make_demo_rain.py with its fixed seed 9), so the three demo scenarios see the same invented
season through three kinds of gauge:

- tips-demo.csv: the log of an invented 0.2 mm tipping bucket. Within each 5-minute step the rain
  is taken to fall at a constant rate; a tip is logged, to the second, when the water in the
  bucket reaches 0.2 mm. What is left in the bucket at the end (under 0.2 mm) is never logged.
- daily-demo.csv: the depth of each local day (UTC+00:00, as the 5-minute record), in mm.

No random numbers are drawn here: running the script again writes the same files byte for byte.
Depths are handled as whole hundredths of a millimetre, the resolution of the 5-minute record.

Usage: tools/make_demo_rain_formats.py [--source PATH] [--out-dir DIR]
"""

import argparse
import datetime as dt
import os

TIP_HUNDREDTHS = 20  # 0.2 mm
STEP = dt.timedelta(minutes=5)
FIRST_DAY = dt.date(2025, 3, 1)
LAST_DAY = dt.date(2025, 11, 30)


def read_steps(path):
    """(step start, depth in hundredths of a mm) for every row of the 5-minute record."""
    steps = []
    with open(path, encoding="utf-8") as f:
        header = f.readline().strip().split(",")
        time_index, value_index = header.index("time"), header.index("rain_mm")
        for line in f:
            fields = line.strip().split(",")
            end = dt.datetime.fromisoformat(fields[time_index])
            hundredths = round(float(fields[value_index]) * 100)
            steps.append((end - STEP, hundredths))
    return steps


def tip_times(steps):
    tips = []
    bucket = 0
    for start, depth in steps:
        if depth == 0:
            continue
        # Tips fall where bucket + depth * s / 300 crosses a multiple of one tip (s in seconds).
        filled = bucket + depth
        k = 1
        while k * TIP_HUNDREDTHS <= filled:
            if k * TIP_HUNDREDTHS > bucket:
                seconds = round(300 * (k * TIP_HUNDREDTHS - bucket) / depth)
                tips.append(start + dt.timedelta(seconds=seconds))
            k += 1
        bucket = filled - (k - 1) * TIP_HUNDREDTHS
    return tips


def daily_totals(steps):
    days = {}
    for start, depth in steps:
        day = start.date()
        if FIRST_DAY <= day <= LAST_DAY:
            days[day] = days.get(day, 0) + depth
    return days


def main():
    here = os.path.dirname(os.path.abspath(__file__))
    demo = os.path.join(here, os.pardir, "data", "demo")
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--source", default=os.path.join(demo, "rain-5min.csv"))
    parser.add_argument("--out-dir", default=demo)
    args = parser.parse_args()

    steps = read_steps(args.source)
    tips = tip_times(steps)
    with open(os.path.join(args.out_dir, "tips-demo.csv"), "w", encoding="utf-8", newline="\n") as f:
        f.write("# Invented data: the log of an invented 0.2 mm tipping bucket, made by\n")
        f.write("# tools/make_demo_rain_formats.py from the invented record rain-5min.csv.\n")
        f.write("time\n")
        for t in tips:
            f.write(t.strftime("%Y-%m-%dT%H:%M:%S") + "\n")

    days = daily_totals(steps)
    with open(os.path.join(args.out_dir, "daily-demo.csv"), "w", encoding="utf-8", newline="\n") as f:
        f.write("# Invented data: daily totals of the invented record rain-5min.csv, made by\n")
        f.write("# tools/make_demo_rain_formats.py.\n")
        f.write("date,rain_mm\n")
        day = FIRST_DAY
        while day <= LAST_DAY:
            hundredths = days.get(day, 0)
            f.write(f"{day.isoformat()},{hundredths // 100}.{hundredths % 100:02d}\n")
            day += dt.timedelta(days=1)

    total = sum(d for _, d in steps)
    print(f"{len(tips)} tips ({len(tips) * TIP_HUNDREDTHS / 100:.2f} mm) and {len(days)} days "
          f"from {total / 100:.2f} mm")


if __name__ == "__main__":
    main()
