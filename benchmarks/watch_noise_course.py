"""The watch's learned block noise over a flight (not a timed test): how far the noise it starts
flight with (at the end of the learning window) lies above the noise it settles to minutes later.

Fresh fault-free flights of the closed-loop simulator (estimator/demo/flight_sim.py; seeds the
detection matrix does not use), every vehicle at three collective-jitter levels, no sensor lag
beyond the rotor's, logged at 5 Hz, 25 Hz and at irregular intervals, replayed through the kernel
with the default CONFIG. Per case it prints the kernel's sigma_permille output at the end of
learning (1.5x the learned noise, by design an upper bound), at 150, 300 and 450 s, and the ratio
of the start to the value at 450 s, measured in the same run. A ratio well above 1 is detection
time lost early in a flight: k and h of the CUSUM scale with this noise.

Usage: python benchmarks/watch_noise_course.py [FLIGHTS]   (default 2 per case)
"""

import statistics
import sys

import numpy as np

import _watch_common  # noqa: F401  (paths)
import watch_study as ws
from estimator.core.watch import Watch
from estimator.core.watch_layout import OUTPUT_AT
from estimator.demo import flight_sim, sim_vehicles
from estimator.watch.config import ROTOR_LAG_S_PER_M, as_tuple, make_config
from watch_helpers import block_state_names

SIGMA_AT = dict(OUTPUT_AT)["sigma_permille"]
LEARNING_AT = block_state_names().index("learning")   # 1 while the learning window is open
TIMES_S = (150.0, 300.0, 450.0)
JITTERS = (0.0, 0.004, 0.01)
RATES = (5, 25, None)                # None: irregular intervals


def noise_course(cfg, fl):
    """(sigma at the end of learning, then at each of TIMES_S) [permille] of one logged flight."""
    w = Watch(cfg)
    dts, u, mv, ma = ws.kernel_inputs(fl)
    ts = fl["time_s"]
    start, later, learning = None, {}, 1
    for q in range(len(u)):
        w.update(dts[q], u[q], mv[q], ma[q])
        if learning and not w.data[LEARNING_AT]:
            start = w.data[SIGMA_AT]
        learning = w.data[LEARNING_AT]
        for t in TIMES_S:
            if t not in later and ts[q] >= t:
                later[t] = w.data[SIGMA_AT]
    return (start,) + tuple(later.get(t) for t in TIMES_S)


def main(argv):
    n = int(argv[0]) if argv else 2
    ratios = []
    print("vehicle       jitter rate | sigma [permille]: end of learning  150 s  300 s  450 s | start / 450 s")
    for vi, name in enumerate(sim_vehicles.names()):
        d = sim_vehicles.spec(name)["vehicle"]["propeller"]["diameter_m"]
        cfg = as_tuple(make_config(sim_vehicles.fitted_params(name), sim_vehicles.checked_vehicle(name),
                                   {"lag_ms": 1000.0 * ROTOR_LAG_S_PER_M * d})[0])
        for ji, jitter in enumerate(JITTERS):
            sim = flight_sim.simulate(name, n, 7000 + 10 * vi + ji, 600.0, jitter=jitter, sensor_lag_s=0.0,
                                      fault_size=[0.0] * n, fault_at_s=[1e9] * n, fault_ramp_s=[0.0] * n,
                                      payload=[0.0] * n)
            for rate in RATES:
                rows = []
                for k in range(n):
                    row = noise_course(cfg, flight_sim.logged(sim, k, np.random.default_rng(k), rate))
                    if None not in row:          # a flight cut short by the pack: not counted
                        rows.append(row)
                if not rows:
                    continue
                mean = np.mean(np.array(rows, float), axis=0)
                r = [a[0] / a[3] for a in rows]
                ratios += r
                print("%-13s %6.3f %4s | %33.1f %6.1f %6.1f %6.1f | %5.2f" % (
                    name, jitter, rate or "irr", mean[0], mean[1], mean[2], mean[3], statistics.mean(r)))
    print("start / 450 s over %d flight-rates: median %.2f, min %.2f, max %.2f (1.5 is the designed "
          "upper bound on the learned noise)" % (len(ratios), statistics.median(ratios), min(ratios), max(ratios)))


if __name__ == "__main__":
    main(sys.argv[1:])
