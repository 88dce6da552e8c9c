"""Speed of `liftcal compare` over 100 combinations against one `liftcal hover` run.

Both commands run on the same (invented) demo vehicle in the same run, alternating, as the
median of several runs each, so the ratio means something on a noisy machine (absolute
times do not). Two cases: the propeller given by ct and cp, and the propeller given by size
and pitch (the blade-element estimate runs for every combination and for the one hover).
Goal (issue 11): compare over 100 combinations at most 20 times one hover run.
Usage: .venv/bin/python benchmarks/compare_speed.py [--runs N]
"""

import argparse
import json
import os
import statistics
import subprocess
import sys
import tempfile
import time

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
sys.path.insert(0, ROOT)
GOAL = 20.0
# 5 x 5 x 4 = 100 combinations
VARY = ["--vary", "battery.capacity=3000mAh,4000mAh,5000mAh,6000mAh,7000mAh",
        "--vary", "mass_kg=1.6,1.8,2.0,2.2,2.4",
        "--vary", "motor.kv_rpm_per_V=700,800,880,960"]


def wall_time_s(argv):
    start = time.perf_counter()
    subprocess.run(argv, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, check=True, cwd=ROOT)
    return time.perf_counter() - start


def main():
    from estimator.demo.scenario import DEMO_VEHICLE

    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--runs", type=int, default=5, help="runs of each command (default 5)")
    args = parser.parse_args()
    script = os.path.join(os.path.dirname(sys.executable), "liftcal")
    entry = [script] if os.path.exists(script) else [sys.executable, "-m", "estimator"]
    folder = tempfile.mkdtemp(prefix="liftcal-compare-bench-")
    sized = json.loads(json.dumps(DEMO_VEHICLE))
    sized["propeller"] = {"size": "10x4.5in", "blades": 2}
    worst = 0.0
    for label, doc in (("ct/cp given", DEMO_VEHICLE), ("size and pitch", sized)):
        path = os.path.join(folder, "vehicle-%d.json" % len(label))
        with open(path, "w", encoding="utf-8") as fh:
            json.dump(doc, fh)
        hover_cmd = entry + ["hover", path, "--json"]
        compare_cmd = entry + ["compare", path, "--json"] + VARY
        for cmd in (hover_cmd, compare_cmd):  # warm the file cache and .pyc files
            wall_time_s(cmd)
        hovers, compares = [], []
        for _ in range(args.runs):
            hovers.append(wall_time_s(hover_cmd))
            compares.append(wall_time_s(compare_cmd))
        h, c = statistics.median(hovers), statistics.median(compares)
        ratio = c / h
        worst = max(worst, ratio)
        print("%-15s hover median %.0f ms, compare (100 combinations) median %.0f ms, ratio %.1f"
              % (label, 1e3 * h, 1e3 * c, ratio))
    print("worst ratio compare / hover %.1f  (goal <= %.0f: %s)" % (worst, GOAL, "met" if worst <= GOAL else "NOT met"))


if __name__ == "__main__":
    main()
