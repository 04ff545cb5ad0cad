#!/usr/bin/env python3
"""Write an invented ten-year, 1-minute rain record for the speed benchmark (tools/bench).

The record is made up. No gauge recorded it and it describes no real place: it exists so that the
benchmark reads a file of the size and texture of a long minute record (5.26 million rows, a few
percent of them wet, storms with short intense bursts). Every run with the same seed writes the
same file. The file is hundreds of megabytes: write it under build/ or /tmp, never commit it.

Storm arrivals, storm kinds and storm depths and durations come from the demo rain model
(tools/make_demo_rain.py: seasonal Poisson arrivals, frontal or convective storms, exponential
durations and depths tied by a Gaussian copula), run over whole years. What is new here is the
shape of a storm at 1-minute resolution, with time constants in minutes rather than in steps:
- a trapezoidal envelope (rise over the first 15 %, fall over the last 15 %);
- AR(1) log-normal noise with a memory of about 20 minutes;
- dry breaks (a per-minute chance, lengths 1 + Exp(mean 8 min));
- Gaussian bursts 2-8 min wide (convective, 65-90 % of the depth) or 5-20 min wide (about one
  frontal storm in three, 10-30 % of the depth).
A 0.01 mm resolution gauge turns the depth into whole hundredths of a millimetre per minute; what
is left in the gauge evaporates after 12 dry hours.

The file starts with a `#` line saying it is invented, then the header `time,rain_mm`. Rows are
period-ending, with naive stamps: the first row, 2015-01-01T00:01, holds the rain of the first
minute and the last row, 2025-01-01T00:00, the rain of the last. The first 525 600 rows are the
first (non-leap) year on its own, for a one-year record (`head -n 525602`).

Usage: tools/make_long_rain.py --out build/bench/rain-1min-10y.csv [--seed N] [--years N]
"""

import argparse
import array
import datetime as dt
import math
import os
import random
import statistics
import sys

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
import make_demo_rain as demo  # noqa: E402  (the storm arrival and size model)

SEED = 10
FIRST_DAY = dt.date(2015, 1, 1)
YEARS = 10
MINUTES_PER_DAY = 1440
TIP_MM = 0.01
EVAPORATES_AFTER_MIN = 12 * 60
SITE = "Harrowmere tool store (invented)"

NOISE_MEMORY_MIN = 20.0
NOISE_SD = 0.35
BREAK_CHANCE_PER_MIN = {"convective": 0.02, "frontal": 0.006}
BREAK_MEAN_MIN = 8.0


def storm_weights(rng, minutes, convective):
    """Relative weights of a storm's minutes (sum 1)."""
    phi = math.exp(-1.0 / NOISE_MEMORY_MIN)
    innovation_sd = NOISE_SD * math.sqrt(1.0 - phi * phi)
    break_chance = BREAK_CHANCE_PER_MIN["convective" if convective else "frontal"]
    log_noise = rng.gauss(0.0, NOISE_SD)
    dry_left = 0
    weights = []
    for k in range(minutes):
        phase = (k + 0.5) / minutes
        envelope = min(1.0, phase / 0.15, (1.0 - phase) / 0.15)
        log_noise = phi * log_noise + rng.gauss(0.0, innovation_sd)
        if dry_left > 0:
            dry_left -= 1
            weights.append(0.0)
            continue
        if k > 0 and rng.random() < break_chance:
            dry_left = 1 + int(rng.expovariate(1.0 / BREAK_MEAN_MIN))
        weights.append(envelope * math.exp(log_noise))
    total = sum(weights)
    weights = [w / total for w in weights] if total > 0.0 else [1.0 / minutes] * minutes

    if convective:
        bursts = 1 + int(rng.random() < 0.5) + int(rng.random() < 0.2)
        share = rng.uniform(0.65, 0.9)
        width_min = (2.0, 8.0)
    else:
        bursts = int(rng.random() < 0.3) + int(rng.random() < 0.1)
        share = rng.uniform(0.1, 0.3)
        width_min = (5.0, 20.0)
    if bursts == 0:
        return weights
    cells = [0.0] * minutes
    for _ in range(bursts):
        centre = rng.uniform(0.15, 0.7) * minutes
        width = rng.uniform(*width_min)
        strength = rng.uniform(0.5, 1.5)
        for k in range(minutes):
            cells[k] += strength * math.exp(-0.5 * ((k + 0.5 - centre) / width) ** 2)
    cell_total = sum(cells)
    return [(1.0 - share) * w + share * c / cell_total for w, c in zip(weights, cells)]


# The demo climate (tools/make_demo_rain.py); tools/accuracy passes others of the same form:
# the largest daily storm rate, the rate and the convective share by day of the year, and the
# two storm kinds.
DEMO_CLIMATE = {
    "max_storms_per_day": demo.RATE_MEAN_PER_DAY + demo.RATE_SWING_PER_DAY,
    "storms_per_day": demo.storms_per_day,
    "convective_share": demo.convective_share,
    "frontal": demo.FRONTAL,
    "convective": demo.CONVECTIVE,
}


def make_storms(rng, n_minutes, climate=None):
    """Continuous depth per minute (mm) and the storm count by kind."""
    climate = climate or DEMO_CLIMATE
    depth = array.array("d", bytes(8 * n_minutes))
    kinds = {"frontal": 0, "convective": 0}
    max_rate = climate["max_storms_per_day"] / MINUTES_PER_DAY
    start_doy = FIRST_DAY.timetuple().tm_yday
    minute = 0.0
    while True:
        # Thinning (Lewis & Shedler 1979) for the non-homogeneous Poisson arrivals.
        minute += rng.expovariate(max_rate)
        if minute >= n_minutes:
            break
        doy = (start_doy - 1 + minute / MINUTES_PER_DAY) % 365.25 + 1
        if rng.random() * max_rate > climate["storms_per_day"](doy) / MINUTES_PER_DAY:
            continue
        convective = rng.random() < climate["convective_share"](doy)
        kind = climate["convective" if convective else "frontal"]
        u_duration, u_depth = demo.correlated_uniforms(rng, kind["rho"])
        duration_h = kind["min_duration_h"] + demo.exponential_quantile(u_duration,
                                                                        kind["duration_h"])
        depth_mm = kind["min_depth_mm"] + demo.exponential_quantile(u_depth, kind["depth_mm"])
        minutes = max(1, round(duration_h * 60))
        first = int(minute)
        for k, w in enumerate(storm_weights(rng, minutes, convective)):
            if first + k < n_minutes:
                depth[first + k] += depth_mm * w
        kinds["convective" if convective else "frontal"] += 1
    return depth, kinds


def gauge_counts(depth_mm):
    """Whole hundredths of a millimetre per minute; the remainder waits in the gauge."""
    counts = array.array("l", bytes(8 * len(depth_mm)))
    held = 0.0
    dry = 0
    for k, d in enumerate(depth_mm):
        if d > 0.0:
            dry = 0
            held += d
        elif held > 0.0:
            dry += 1
            if dry >= EVAPORATES_AFTER_MIN:
                held = 0.0
            continue
        else:
            continue
        n = int(held / TIP_MM + 1e-9)
        held -= n * TIP_MM
        counts[k] = n
    return counts


def draw_years(seed, years, first_day=FIRST_DAY, climate=None):
    """(hundredths of a millimetre per minute, storms by kind) over `years` whole years from
    `first_day` (a 1 January), drawn with `seed` by the storm model and the gauge above."""
    last_day = dt.date(first_day.year + years, 1, 1)
    n_minutes = (last_day - first_day).days * MINUTES_PER_DAY
    depth, kinds = make_storms(random.Random(seed), n_minutes, climate)
    return gauge_counts(depth), kinds


def write_record(path, counts, first_day, comment):
    """Writes the CSV through a temporary name, one stamp-day at a time, after `comment`."""
    n = len(counts)
    clock = [f"T{m // 60:02d}:{m % 60:02d}," for m in range(MINUTES_PER_DAY)]
    temporary = path + ".tmp"
    with open(temporary, "w", encoding="ascii", newline="\n") as out:
        out.write(f"# {comment}\n")
        out.write("time,rain_mm\n")
        # Row r (1-based) is stamped r minutes after the start and holds counts[r - 1]; the rows
        # stamped on day j are r = 1440 j + m for the minutes of the day m.
        for j in range(n // MINUTES_PER_DAY + 1):
            date = (first_day + dt.timedelta(days=j)).isoformat()
            base = j * MINUTES_PER_DAY
            lines = []
            for r in range(max(1, base), min(n, base + MINUTES_PER_DAY - 1) + 1):
                c = counts[r - 1]
                lines.append(f"{date}{clock[r - base]}{c // 100}.{c % 100:02d}\n")
            out.write("".join(lines))
    os.replace(temporary, path)


def write_totals(path, counts, minutes, comment, stamp):
    """Totals of `counts` over blocks of `minutes`, one row each (dry ones too), stamped by
    stamp(k), written through a temporary name after `comment`."""
    temporary = path + ".tmp"
    with open(temporary, "w", encoding="ascii", newline="\n") as out:
        out.write(f"# {comment}\n")
        out.write(("date" if minutes == MINUTES_PER_DAY else "time") + ",rain_mm\n")
        rows = []
        for k in range(len(counts) // minutes):
            c = sum(counts[k * minutes:(k + 1) * minutes])
            rows.append(f"{stamp(k)},{c // 100}.{c % 100:02d}\n")
        out.write("".join(rows))
    os.replace(temporary, path)


def print_summary(counts, kinds, years):
    wet = [c for c in counts if c > 0]
    per_hour = sorted(c * TIP_MM * 60 for c in wet)
    total_mm = sum(wet) * TIP_MM
    print(f"site: {SITE}")
    print(f"rows: {len(counts)} (1 min, period-ending, {years} years from {FIRST_DAY})")
    print(f"storms: {kinds['frontal'] + kinds['convective']} ({kinds['frontal']} frontal, "
          f"{kinds['convective']} convective)")
    print(f"total: {total_mm:.0f} mm, {total_mm / years:.0f} mm a year")
    print(f"wet minutes: {len(wet)} ({100.0 * len(wet) / len(counts):.2f} %)")
    print(f"median wet-minute intensity: {statistics.median(per_hour):.2f} mm/h")
    for limit in (40, 80, 150):
        print(f"minutes above {limit} mm/h: {sum(1 for i in per_hour if i > limit)}")
    print(f"wettest minute: {per_hour[-1] / 60:.2f} mm ({per_hour[-1]:.0f} mm/h)")


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--out", required=True, help="CSV to write (under build/ or /tmp)")
    parser.add_argument("--seed", type=int, default=SEED)
    parser.add_argument("--years", type=int, default=YEARS)
    args = parser.parse_args()

    counts, kinds = draw_years(args.seed, args.years)
    os.makedirs(os.path.dirname(os.path.abspath(args.out)), exist_ok=True)
    write_record(args.out, counts, FIRST_DAY,
                 f"invented rain, not measured: {SITE}, tools/make_long_rain.py seed {args.seed}")
    print(f"wrote {args.out} (invented, seed {args.seed})")
    print_summary(counts, kinds, args.years)
    return 0


if __name__ == "__main__":
    sys.exit(main())
