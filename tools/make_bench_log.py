#!/usr/bin/env python3
"""Write the invented bench log data/demo/bench-demo.csv.

The log is made up: ten hose tests of an invented bell-siphon build on the demo system
(scenarios/demo.yaml: a 125 mm half-round gutter 8 m long, lip 50 mm, bell rim 8 mm, a 19 mm
standpipe, a 19 mm drop pipe 4.5 m long falling 4 m into a head column 3 m tall). No bench
recorded it. The invented build primes at 1.6 L/min and its running loss sum is 3.5; the tests
are "measured" with the errors of a hose, a bucket and a stopwatch, drawn with a fixed seed, so
every run writes the same file.

Model (plain textbook relations, independent of gutterwatt's code):
- the gutter's plan width at level h is 2 sqrt(h (D - h)) (a circle of diameter D);
- from the bell rim to the lip the gutter only fills; above the lip water enters the standpipe
  as the smaller of a weir over the lip (1.77 pi d h^1.5) and an orifice of its bore
  (0.61 pi d^2/4 sqrt(2 g h)); the siphon primes when that flow reaches the priming flow;
- running, the drop pipe discharges freely into the head column's top:
  level + drop - column = (1 + f L/D + K) V^2 / 2g, f by Colebrook-White at 12 C;
- it breaks when the gutter can no longer feed it: a long level gutter delivers to its outlet at
  most the critical flow sqrt(g A^3 / T) of the water-surface profile that holds its volume, the
  outlet at critical depth y_c and y = y_c eta(s) along it, eta^3 - 3 eta + 2 s^2 = 0 (Beij
  1934), scaled by 0.9184 (BS EN 12056-3's rating of a half-round) and the standard's length
  factor F_L; once the siphon draws more, its outlet empties and air enters the bell;
- the nozzle container catches one whole discharge: its volume is the water that left the gutter
  from priming to the break, its time the drain time.

Measurement errors: inflows read from a hose meter to 0.1 L/min or timed with a 10 L bucket
(+-0.3 s reaction), stopwatch times +-1 s, the nozzle container read to 0.1 L.

Usage: tools/make_bench_log.py [--seed N] [--out PATH]
"""

import argparse
import math
import os
import random

G = 9.80665
NU_12C = 1.2347e-6  # m2/s, water at 12 C: IAPWS 2008 viscosity 1.2340 mPa s (no critical term)
# over density 999.497 kg/m3 (IAPWS-95, from memory); REFERENCES.md section 2 gives the method

GUTTER_D, GUTTER_L, GUTTER_RIM = 0.125, 8.0, 0.062
LIP, RIM = 0.050, 0.008
STANDPIPE = 0.019
PIPE_D, PIPE_L, ROUGH = 0.019, 4.5, 0.0015e-3
DROP, COLUMN = 4.0, 3.0

PRIMING_L_PER_MIN = 1.6  # the invented build
LOSS_K = 3.5

# (inflow L/min, measured by: "meter" or "bucket", nozzle container caught?)
TESTS = [
    (0.8, "meter", False), (1.2, "meter", False), (1.5, "meter", False),
    (1.7, "meter", False), (2.0, "bucket", False), (3.0, "meter", True),
    (4.5, "bucket", False), (6.0, "meter", True), (9.0, "bucket", False),
    (12.0, "meter", True),
]


def plan_area(h):
    return 2.0 * math.sqrt(max(h * (GUTTER_D - h), 0.0)) * GUTTER_L


def section_area(y):
    """Circular segment of depth y in the half-round (walls vertical above its radius)."""
    r = GUTTER_D / 2
    if y >= r:
        return math.pi * r * r / 2 + (y - r) * GUTTER_D
    theta = 2 * math.acos((r - y) / r)
    return r * r * (theta - math.sin(theta)) / 2


def delivery(h):
    """The most the level gutter holding a level pool's volume at h delivers to its outlet."""
    eta = lambda s: 2 * math.cos(math.acos(-s * s) / 3)
    n = 200
    profile = lambda yc: sum(section_area(yc * eta((i + 0.5) / n)) for i in range(n)) / n
    lo, hi = 0.0, GUTTER_D
    for _ in range(60):
        mid = 0.5 * (lo + hi)
        lo, hi = (mid, hi) if profile(mid) < section_area(h) else (lo, mid)
    yc = 0.5 * (lo + hi)
    top = 2 * math.sqrt(yc * (GUTTER_D - yc))
    ratio = GUTTER_L / GUTTER_RIM
    f_l = 1.0 if ratio <= 50 else 0.93 + (ratio - 100) / 50 * (0.86 - 0.93)  # 100 < L/d < 150
    return 0.9184 * f_l * math.sqrt(G * section_area(yc) ** 3 / top)


def break_level(q):
    """Where the gutter's delivery no longer feeds the running siphon (the hose's q aside, as in
    gutterwatt's quasi-steady gutter)."""
    lo, hi = RIM, 0.06
    if delivery(lo) >= running_flow(lo):
        return RIM
    for _ in range(50):
        mid = 0.5 * (lo + hi)
        lo, hi = (mid, hi) if delivery(mid) < running_flow(mid) else (lo, mid)
    return 0.5 * (lo + hi)


def standpipe_flow(head):
    if head <= 0:
        return 0.0
    weir = 1.77 * math.pi * STANDPIPE * head ** 1.5
    orifice = 0.61 * math.pi * STANDPIPE ** 2 / 4 * math.sqrt(2 * G * head)
    return min(weir, orifice)


def colebrook(re, rel):
    f = 0.02
    for _ in range(20):
        f = (-2 * math.log10(rel / 3.7 + 2.51 / (re * math.sqrt(f)))) ** -2
    return f


def running_flow(level):
    area = math.pi * PIPE_D ** 2 / 4
    head = level + DROP - COLUMN
    q = 2e-4
    for _ in range(20):
        v = q / area
        f = colebrook(v * PIPE_D / NU_12C, ROUGH / PIPE_D)
        q = area * math.sqrt(2 * G * head / (1 + f * PIPE_L / PIPE_D + LOSS_K))
    return q


def priming_head(p):
    lo, hi = 0.0, 0.05
    for _ in range(100):
        mid = 0.5 * (lo + hi)
        lo, hi = (mid, hi) if standpipe_flow(mid) < p else (lo, mid)
    return 0.5 * (lo + hi)


def bench(q):
    """Time to prime from the rim, drain time, and the volume released, or None if it dribbles."""
    p = PRIMING_L_PER_MIN / 60000.0
    if q <= p:
        return None
    n = 20000
    t_fill = sum(plan_area(RIM + (i + 0.5) * (LIP - RIM) / n) * (LIP - RIM) / n / q for i in range(n))
    hp = priming_head(p)
    t_dribble = sum(plan_area(LIP + (i + 0.5) * hp / n) * hp / n / (q - standpipe_flow((i + 0.5) * hp / n))
                    for i in range(n))
    top = LIP + hp
    end = break_level(q)
    m = 4000
    t_drain = 0.0
    stored = 0.0
    for i in range(m):
        h = end + (i + 0.5) * (top - end) / m
        dh = (top - end) / m
        t_drain += plan_area(h) * dh / (running_flow(h) - q)
        stored += plan_area(h) * dh
    return t_fill + t_dribble, t_drain, stored + q * t_drain


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--seed", type=int, default=12)
    ap.add_argument("--out", default=os.path.join(os.path.dirname(__file__), "..", "data", "demo",
                                                  "bench-demo.csv"))
    args = ap.parse_args()
    rng = random.Random(args.seed)
    lines = [
        "# INVENTED bench log (tools/make_bench_log.py, seed %d): ten hose tests of an invented" % args.seed,
        "# bell-siphon build on the demo system. No real bench recorded it.",
        "inflow_L_per_min,fill_volume_L,fill_time_s,outcome,time_to_prime_s,drain_time_s,"
        "nozzle_volume_L,nozzle_time_s,note",
    ]
    for q_l_min, how, caught in TESTS:
        q = q_l_min / 60000.0
        if how == "meter":
            inflow = "%.1f,," % (q_l_min + rng.gauss(0, 0.03))
        else:
            fill_s = 0.010 / q + rng.gauss(0, 0.3)  # a 10 L bucket
            inflow = ",10,%.1f" % fill_s
        result = bench(q)
        if result is None:
            lines.append("%s,dribbled,,,,,level settled above the lip" % inflow)
            continue
        t_prime, t_drain, volume = result
        prime = "%.0f" % (t_prime + rng.gauss(0, 1.0))
        drain = "%.0f" % (t_drain + rng.gauss(0, 1.0))
        nozzle = "%.1f,%s," % (volume * 1000 + rng.gauss(0, 0.1), drain) if caught else ",,"
        lines.append("%s,primed,%s,%s,%s" % (inflow, prime, drain, nozzle))
    with open(args.out, "w", newline="\n") as f:
        f.write("\n".join(lines) + "\n")


if __name__ == "__main__":
    main()
