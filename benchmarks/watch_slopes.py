"""How close are the watch kernel's in-flight slopes to the best the same regressors allow? (a
diagnosis aid, not a timed test)

Replays fault-free flights of the detection matrix (the same cached simulated flights and logs as
benchmarks/watch_detection.py) through the kernel and sets the spread of the kernel's block
deviation beside the spread a least-squares fit on the same regressors and blocks leaves
(tests/watch_slope_check.py says how). Since the CUSUM's h k grows with the noise squared, a
ratio of 2 between the two spreads is about 4x in detection delay for the same false-alarm rate
(Siegmund 1985; benchmarks/watch_bound.py).

Usage: python benchmarks/watch_slopes.py [--flights N] [CELL ...]
  CELL: "VEHICLE|JITTER_INDEX|LAG_INDEX|RATE" (RATE 5, 10, 25, 50, 100 or irr); default: every
  vehicle at jitter 0 and 1 %, lag 0 and 150 ms, 10 and 50 Hz. --flights: fault-free flights
  per cell (default 4). LIFTCAL_SIM_CACHE as for watch_detection.py; LIFTCAL_TRACE_KERNEL=path
  replays another kernel file (e.g. a candidate rule).
"""

import statistics
import sys

import _watch_common  # noqa: F401  (paths)
from watch_slope_check import JUDGED_AFTER_S, slope_spreads
from watch_trace import Watch, flight
from estimator.demo import sim_vehicles


def default_cells():
    return ["%s|%d|%d|%s" % (v, j, k, r) for v in sim_vehicles.names() for j in (0, 2) for k in (0, 2)
            for r in ("10", "50")]


def main(argv):
    n_flights = 4
    if "--flights" in argv:
        i = argv.index("--flights")
        n_flights = int(argv[i + 1])
        argv = argv[:i] + argv[i + 2:]
    cells = argv or default_cells()
    print("watch slopes: the kernel's block deviation p against least-squares slopes on the same regressors "
          "(x, g), fault-free flights of the detection matrix, blocks judged at full weight after %.0f s"
          % JUDGED_AFTER_S)
    print("%-32s %s" % ("cell (vehicle|jitter idx|lag idx|rate)", "per flight: sd p [permille] kernel / least squares "
                                                                  "(cx, cd kernel -> least squares)"))
    ratios = []
    for cell in cells:
        vehicle, j, k, rate = cell.split("|")
        rate = None if rate == "irr" else int(rate)
        parts = []
        for n in range(n_flights):
            cfg, fl, _, _ = flight(vehicle, int(j), int(k), rate, "clean", n)
            s = slope_spreads(cfg, fl, Watch)
            if s is None:
                parts.append("too few judged blocks")
                continue
            ratios.append((s["sd_kernel"] / s["sd_lsq"], cell, n))
            parts.append("%.1f/%.1f (%.2f,%.1f -> %.2f,%.1f)" % (1000 * s["sd_kernel"], 1000 * s["sd_lsq"], s["cx"],
                                                                 s["cd"], s["lsq_cx"], s["lsq_cd"]))
        print("%-32s %s" % (cell, "; ".join(parts)))
        sys.stdout.flush()
    if ratios:
        ratios.sort()
        print()
        print("SUMMARY: kernel p spread / least-squares spread over %d flights: median %.2f, worst %.2f (%s flight %d); "
              "above 1.5 in %d" % (len(ratios), statistics.median(r for r, _, _ in ratios), ratios[-1][0],
                                   ratios[-1][1], ratios[-1][2], sum(1 for r, _, _ in ratios if r > 1.5)))


if __name__ == "__main__":
    main(sys.argv[1:])
