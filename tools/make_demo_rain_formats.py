#!/usr/bin/env python3
"""Write the invented demo records data/demo/tips-demo.csv, tips-us.csv and daily-demo.csv.

All are made from the invented 5-minute record data/demo/rain-5min.csv (written by
tools/make_demo_rain.py with its fixed seed 9), so the demo scenarios see the same invented
season through several kinds of gauge:

- tips-demo.csv: the log of an invented 0.2 mm tipping bucket. Within each 5-minute step the rain
  is taken to fall at a constant rate; a tip is logged, to the second, when the water in the
  bucket reaches 0.2 mm. What is left in the bucket at the end (under 0.2 mm) is never logged.
- tips-us.csv: the same season through an invented 0.01 in tipping bucket, logged the way a US
  data logger might write it: two title lines above the header, a record number, stamps such as
  `06/01/2025 01:05:09 PM` in local civil time of America/Chicago with its daylight saving (the
  5-minute record's naive stamps taken as Central Standard Time, UTC-06:00). For
  scenarios/us-demo.yaml; the site it stands for is invented.
- daily-demo.csv: the depth of each local day (UTC+00:00, as the 5-minute record), in mm.

No random numbers are drawn here: running the script again writes the same files byte for byte.
Depths are handled as whole thousandths of a millimetre (the 5-minute record has hundredths; one
0.01 in tip is 254 thousandths, NIST Handbook 44: 1 in = 25.4 mm).

Usage: tools/make_demo_rain_formats.py [--source PATH] [--out-dir DIR]
"""

import argparse
import datetime as dt
import os
import zoneinfo

TIP_THOUSANDTHS = 200  # 0.2 mm
US_TIP_THOUSANDTHS = 254  # 0.01 in
US_STANDARD_TIME = dt.timezone(dt.timedelta(hours=-6))  # Central Standard Time
US_ZONE = "America/Chicago"
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


def tip_times(steps, tip):
    """Tip times of a bucket of `tip` thousandths of a mm (step depths in hundredths)."""
    tips = []
    bucket = 0
    for start, hundredths in steps:
        if hundredths == 0:
            continue
        depth = hundredths * 10
        # Tips fall where bucket + depth * s / 300 crosses a multiple of one tip (s in seconds).
        filled = bucket + depth
        k = 1
        while k * tip <= filled:
            if k * tip > bucket:
                seconds = round(300 * (k * tip - bucket) / depth)
                tips.append(start + dt.timedelta(seconds=seconds))
            k += 1
        bucket = filled - (k - 1) * tip
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
    tips = tip_times(steps, TIP_THOUSANDTHS)
    with open(os.path.join(args.out_dir, "tips-demo.csv"), "w", encoding="utf-8", newline="\n") as f:
        f.write("# Invented data: the log of an invented 0.2 mm tipping bucket, made by\n")
        f.write("# tools/make_demo_rain_formats.py from the invented record rain-5min.csv.\n")
        f.write("time\n")
        for t in tips:
            f.write(t.strftime("%Y-%m-%dT%H:%M:%S") + "\n")

    us_tips = tip_times(steps, US_TIP_THOUSANDTHS)
    zone = zoneinfo.ZoneInfo(US_ZONE)
    with open(os.path.join(args.out_dir, "tips-us.csv"), "w", encoding="utf-8", newline="\n") as f:
        f.write("INVENTED DATA - 0.01 in tipping bucket, Prairie Bend tool shed (invented site)\n")
        f.write("Made by tools/make_demo_rain_formats.py from rain-5min.csv; local time, " + US_ZONE + "\n")
        f.write("Record,Date Time,Tips\n")
        for n, t in enumerate(us_tips, start=1):
            local = t.replace(tzinfo=US_STANDARD_TIME).astimezone(zone)
            f.write(f"{n},{local.strftime('%m/%d/%Y %I:%M:%S %p')},1\n")

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
    print(f"{len(tips)} tips ({len(tips) * TIP_THOUSANDTHS / 1000:.2f} mm), {len(us_tips)} tips of "
          f"0.01 in ({len(us_tips) / 100:.2f} in) and {len(days)} days from {total / 100:.2f} mm")


if __name__ == "__main__":
    main()
