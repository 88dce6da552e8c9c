"""How close the watch runs to a false power alarm on the detection matrix's fault-free flight (not a
timed test): the largest CUSUM sum against its threshold, max(s_hi, s_lo) / h, over every judged block
after the learning window, per cell and logging rate. Fault-free flight here is every fault-free
flight whole, every step and ramp flight before its onset and every payload flight (no power fault).
A ratio of 1 is an alarm; a change that speeds detection by lowering the sums' headroom shows here
first (the matrix counts only the crossings). The flights and the kernel are those of
benchmarks/watch_detection.py (the same cells, seeds and CONFIG; LIFTCAL_SIM_CACHE and
LIFTCAL_WATCH_OPTIONS as there).

Usage: python benchmarks/watch_headroom.py [CLEAN_FLIGHTS_PER_CELL]   (runs on 2 processes)
"""

import json
import os
import sys
import time
from concurrent.futures import ProcessPoolExecutor

import numpy as np

import _watch_common  # noqa: F401  (paths)
import watch_study as ws
from estimator.core.watch import Watch
from estimator.demo import flight_sim, sim_vehicles
from estimator.watch.config import ROTOR_LAG_S_PER_M, as_tuple, make_config

JITTERS = (0.0, 0.004, 0.01)
LAGS = (0.0, 0.05, 0.15)
DURATION_S = 600.0


class Headroom(Watch):
    """The kernel, noting after each judged block the larger CUSUM sum over the threshold and its time."""

    def __init__(self, c, until_ms):
        super().__init__(c)
        self.until_ms = until_ms
        self.worst = (0.0, 0.0)

    def _block(self, c, flags, e, p, b, v, t, f, l):
        out = Watch._block(self, c, flags, e, p, b, v, t, f, l)
        sb = self.data
        if not sb[0] and t < self.until_ms and sb[8] > 0:
            ratio = max(sb[9], sb[10]) / sb[8]
            if ratio > self.worst[0]:
                self.worst = (ratio, t / 1000.0)
        return out


def cell_headroom(args):
    name, jitter, lag, n_clean, seed = args
    d = sim_vehicles.spec(name)["vehicle"]["propeller"]["diameter_m"]
    options = {"lag_ms": 1000.0 * (ROTOR_LAG_S_PER_M * d + lag)}
    if os.environ.get("LIFTCAL_WATCH_OPTIONS"):
        options = dict(options, **json.loads(os.environ["LIFTCAL_WATCH_OPTIONS"]))
    rng = np.random.default_rng(seed)
    kinds, size, at, ramp, payload = ws.cell_plan(rng, n_clean, DURATION_S)
    sim = ws._simulate_cached(name, len(kinds), seed, DURATION_S, jitter, lag, size, at, ramp, payload)
    cfg = as_tuple(make_config(sim_vehicles.fitted_params(name), sim_vehicles.checked_vehicle(name), options)[0])
    out = []
    for rate in ws.RATES:
        for k, (kind, value) in enumerate(kinds):
            end = min(ws.pack_cutoff_s(sim, k, name), DURATION_S)
            # flight time [ms] up to which the flight is fault-free (the simulator arms at TAKEOFF_S)
            until = 1e12 if kind in ("clean", "payload") else 1000.0 * (at[k] - ws.TAKEOFF_S)
            fl = flight_sim.logged(sim, k, np.random.default_rng(seed * 1000 + k), rate)
            keep = fl["time_s"] < end
            fl = {key: v[keep] for key, v in fl.items()}
            w = Headroom(cfg, until)
            dts, u, mv, ma = ws.kernel_inputs(fl)
            for i in range(len(u)):
                w.update(dts[i], u[i], mv[i], ma[i])
            out.append((name, jitter, lag, ws.rate_name(rate), kind, value, w.worst[0], w.worst[1], k))
    return out


def main(n_clean=20):
    names = sim_vehicles.names()
    jobs = [(name, jit, lag, n_clean, 90000 + 100 * i + 10 * j + k)
            for i, name in enumerate(names) for j, jit in enumerate(JITTERS) for k, lag in enumerate(LAGS)]
    t0 = time.perf_counter()
    with ProcessPoolExecutor(2) as ex:
        rows = [r for cell in ex.map(cell_headroom, jobs) for r in cell]
    print("headroom to a false power alarm: max(s_hi, s_lo) / h after learning on fault-free flight, %d flights "
          "x %d rates; %.0f s" % (len(rows) // len(ws.RATES), len(ws.RATES), time.perf_counter() - t0))
    ratios = np.array([r[6] for r in rows])
    for q in (0.5, 0.9, 0.99):
        print("  quantile %.2f of the flights' worst ratio: %.2f" % (q, np.quantile(ratios, q)))
    for lim in (0.5, 0.7, 0.9, 1.0):
        print("  flights whose sums reached %.1f h: %d of %d" % (lim, int((ratios >= lim).sum()), len(ratios)))
    by_cell = {}
    for r in rows:
        key = r[:4]
        by_cell[key] = max(by_cell.get(key, 0.0), r[6])
    print("the 12 closest flights (vehicle, jitter, lag [s], rate, flight kind and size, worst ratio at flight "
          "time, flight number in its cell):")
    for r in sorted(rows, key=lambda r: -r[6])[:12]:
        print("  %-13s jit %.3f lag %.2f %-5s %-7s %+.2f  %.2f at %.1f s  #%d" % r)
    print("cell-rates (of %d) whose worst flight reached 0.9 h: %d" % (len(by_cell), sum(v >= 0.9 for v in by_cell.values())))


if __name__ == "__main__":
    args = [a for a in sys.argv[1:] if not a.startswith("--")]
    main(int(args[0]) if args else 20)
