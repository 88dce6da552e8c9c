"""Start-up cost of the command line: wall time of `liftcal --help` over `python -c pass`.

Both are measured in the same run, alternating, as the median of several runs each, so the
ratio is meaningful on a noisy machine (absolute times are not). Goal: ratio under 3.
Usage: .venv/bin/python benchmarks/startup.py [--runs N]
"""

import argparse
import os
import statistics
import subprocess
import sys
import time

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
GOAL = 3.0


def wall_time_s(argv):
    start = time.perf_counter()
    subprocess.run(argv, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, check=True, cwd=ROOT)
    return time.perf_counter() - start


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--runs", type=int, default=15, help="runs of each command (default 15)")
    args = parser.parse_args()
    baseline_cmd = [sys.executable, "-c", "pass"]
    script = os.path.join(os.path.dirname(sys.executable), "liftcal")
    entry = [script] if os.path.exists(script) else [sys.executable, "-m", "estimator"]
    help_cmd = entry + ["--help"]
    air_cmd = entry + ["air", "--altitude", "1400m", "--json"]
    for cmd in (baseline_cmd, help_cmd, air_cmd):  # warm the file cache and .pyc files
        wall_time_s(cmd)
    base, helps, airs = [], [], []
    for _ in range(args.runs):
        base.append(wall_time_s(baseline_cmd))
        helps.append(wall_time_s(help_cmd))
        airs.append(wall_time_s(air_cmd))
    b, h, a = statistics.median(base), statistics.median(helps), statistics.median(airs)
    print("python -c pass        median %.1f ms (%d runs)" % (1e3 * b, args.runs))
    print("command               %s" % " ".join(os.path.basename(x) for x in entry))
    print("liftcal --help        median %.1f ms" % (1e3 * h))
    print("liftcal air --json    median %.1f ms" % (1e3 * a))
    print("ratio --help / python %.2f  (goal < %.0f: %s)" % (h / b, GOAL, "met" if h / b < GOAL else "NOT met"))
    print("ratio air / python    %.2f" % (a / b))


if __name__ == "__main__":
    main()
