"""Goals: no false alarm in 100 simulated flight hours; a sustained 15 % excess or deficit
flagged within 2 s median, 3 s worst. Demo bench fit's CONFIG, flight-sim current noise equal to
the fit's residual_rel_std. Prints the measured rates and delays as ratios to the goals.

Usage: python benchmarks/watch_detection.py [HOURS]   (default 100)
"""

import statistics
import sys
import time

from _watch_common import demo_fit_params
from estimator.demo.flight_sim import flight_arrays
from estimator.watch.config import make_config, siegmund_arl_two_sided
from watch_helpers import run_flight


def main(hours=100.0):
    params = demo_fit_params()
    cfg, _ = make_config(params)
    sigma = params["power_model"]["residual_rel_std"]
    flight_s = 600.0
    n_flights = int(round(hours * 3600.0 / flight_s))
    t0 = time.perf_counter()
    false_events = []
    samples = 0
    for seed in range(n_flights):
        fl = flight_arrays(fault=None, seed=50000 + seed, duration_s=flight_s, current_noise=(0.05, sigma))
        _, events, _ = run_flight(cfg, fl)
        samples += len(fl["time_s"])
        false_events += [(seed, t, b) for t, b in events]
    wall = time.perf_counter() - t0
    per_100h = len(false_events) * 100.0 / hours
    k = cfg["cusum_k_permille"] / (1000.0 * sigma)
    h = cfg["cusum_h_permille"] / (1000.0 * sigma)
    design = 100.0 * 3600.0 * 10.0 / siegmund_arl_two_sided(k, h)
    print("fault-free flights: %d x %.0f s = %.1f h, %d samples in %.0f s; events: %d -> %.2f per 100 h "
          "(design %.3g per 100 h by Siegmund, goal 0)" % (n_flights, flight_s, hours, samples, wall,
                                                            len(false_events), per_100h, design))
    if false_events:
        print("  first events:", false_events[:5])
    delays = {}
    for fault, bit in (("power_high", 1), ("power_low", 2)):
        d = []
        for seed in range(100):
            onset = 30.0 + (seed * 7.3) % 500.0
            fl = flight_arrays(fault=fault, seed=60000 + seed, duration_s=flight_s, fault_at_s=onset,
                               current_noise=(0.05, sigma))
            _, events, _ = run_flight(cfg, fl)
            hits = [t - onset for t, b in events if b & bit and t >= onset]
            d.append(hits[0] if hits else float("inf"))
        delays[fault] = d
        med, worst = statistics.median(d), max(d)
        print("%s +-15 %%: 100 onsets, median delay %.2f s (/2 s = %.2f), worst %.2f s (/3 s = %.2f), missed %d"
              % (fault, med, med / 2.0, worst, worst / 3.0, sum(1 for x in d if x == float("inf"))))
    ok = (not false_events and all(statistics.median(d) <= 2.0 and max(d) <= 3.0 for d in delays.values()))
    print("goals:", "met" if ok else "NOT met")


if __name__ == "__main__":
    main(float(sys.argv[1]) if len(sys.argv) > 1 else 100.0)
