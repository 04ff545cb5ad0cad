#!/usr/bin/env python3
"""Write the invented field log of siphon cycles data/demo/cycles-demo.csv.

The log is made up: the start of every cycle an invented float switch would have logged on the
demo system (scenarios/field-demo.yaml: the demo gutter, siphon and pipe, September and October
of the invented demo rain) if its siphon were an invented build that primes at 1.3 L/min with a
running loss sum of 4.5. No float switch or camera recorded it.

How: the built gutterwatt runs the field-demo scenario with those two values set (--set), and
the cycle rows of its events.csv give the start times. That is the model describing itself, so
the log can only show that `gutterwatt fit --cycles` finds its way back; a real log also carries
everything the model leaves out. The logger's clock is then made imperfect with a fixed seed:
each stamp moves by a normal error of 20 s (standard deviation), rounded to whole seconds.

Usage: tools/make_cycle_log.py [--exe PATH] [--seed N] [--out PATH]
"""

import argparse
import csv
import datetime
import os
import random
import subprocess
import tempfile

PRIMING_L_PER_MIN = 1.3  # the invented build
LOSS_K = 4.5
CLOCK_SD_S = 20.0


def main():
    root = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..")
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--exe", default=os.path.join(root, "build", "gutterwatt"))
    ap.add_argument("--seed", type=int, default=14)
    ap.add_argument("--out", default=os.path.join(root, "data", "demo", "cycles-demo.csv"))
    args = ap.parse_args()
    rng = random.Random(args.seed)
    with tempfile.TemporaryDirectory() as tmp:
        subprocess.run(
            [args.exe, "run", os.path.join(root, "scenarios", "field-demo.yaml"), "--quiet",
             "--out", tmp,
             "--set", f"release.priming_flow_L_per_min={PRIMING_L_PER_MIN}",
             "--set", f"drop_pipe.minor_loss_k={LOSS_K}"],
            check=True)
        with open(os.path.join(tmp, "events.csv"), newline="") as f:
            starts = [row["start"] for row in csv.DictReader(f) if row["kind"] == "cycle"]
    lines = [
        f"# INVENTED field log (tools/make_cycle_log.py, seed {args.seed}): the cycle starts an",
        "# invented float switch would have logged on the demo system. No logger recorded it.",
        "time,note",
    ]
    previous = None
    for stamp in starts:
        t = datetime.datetime.fromisoformat(stamp)
        t += datetime.timedelta(seconds=round(rng.gauss(0.0, CLOCK_SD_S)))
        if previous is not None and t <= previous:
            t = previous + datetime.timedelta(seconds=1)
        previous = t
        lines.append(t.strftime("%Y-%m-%dT%H:%M:%S") + ",")
    with open(args.out, "w", newline="\n") as f:
        f.write("\n".join(lines) + "\n")
    print(f"wrote {args.out}: {len(lines) - 3} cycle starts")


if __name__ == "__main__":
    main()
