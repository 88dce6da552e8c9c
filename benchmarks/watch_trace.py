"""Trace the watch kernel's block state around a fault in one flight of the detection matrix (a
diagnosis aid, not a benchmark): which cell, rate and flight, and per block what the residual,
CUSUM sums, noise, reference, threshold, drift, hold and learning were doing.

Usage: python benchmarks/watch_trace.py VEHICLE JITTER_INDEX LAG_INDEX RATE KIND VALUE [BEFORE_S AFTER_S]
  RATE: 5, 10, 25, 50, 100 or irr; KIND: step, ramp, payload or clean (VALUE: the size, or the
  fault-free flight's number); e.g. python benchmarks/watch_trace.py "octo 12S" 0 0 5 step 0.10
Set LIFTCAL_SIM_CACHE as for watch_detection.py (the same flights); LIFTCAL_TRACE_KERNEL=path/watch.py
traces another kernel file. --diagnose DUMP.json [GOAL_S]: one line per +-10 % step slower than GOAL_S
(default 5) in a matrix dump (watch_detection.py with LIFTCAL_WATCH_DUMP=DUMP.json).
"""

import importlib.util
import os
import sys

import numpy as np

import _watch_common  # noqa: F401  (paths)
import watch_study as ws
from watch_helpers import block_state_names
from estimator.core.watch import Watch

if os.environ.get("LIFTCAL_TRACE_KERNEL"):           # another kernel file to trace (e.g. main's)
    _spec = importlib.util.spec_from_file_location("traced_watch", os.environ["LIFTCAL_TRACE_KERNEL"])
    _mod = importlib.util.module_from_spec(_spec)
    _spec.loader.exec_module(_mod)
    Watch = _mod.Watch  # noqa: F811
from estimator.demo import flight_sim, sim_vehicles
from estimator.core.watch_layout import INDEX
from estimator.watch.config import ROTOR_LAG_S_PER_M, as_tuple, make_config

NAMES = block_state_names()      # the block state's names, read from the kernel's own unpacking in _block


class Traced(Watch):
    def __init__(self, c):
        super().__init__(c)
        self.rows = []

    def _block(self, c, flags, e, p, b, v, t, f, l):
        out = Watch._block(self, c, flags, e, p, b, v, t, f, l)
        row = dict(zip(NAMES, self.data))
        row.update(t_s=t / 1000.0, r=row["residual_permille"], flags=out, fb=f // b)   # mass_g: in the row
        self.rows.append(row)
        return out


def flight(vehicle, j, k, rate, kind, value, n_clean=20, duration_s=600.0):
    i = sim_vehicles.names().index(vehicle)
    seed = 90000 + 100 * i + 10 * j + k
    jitter, lag = (0.0, 0.004, 0.01)[j], (0.0, 0.05, 0.15)[k]
    rng = np.random.default_rng(seed)
    kinds, size, at, ramp, payload = ws.cell_plan(rng, n_clean, duration_s)
    sim = ws._simulate_cached(vehicle, len(kinds), seed, duration_s, jitter, lag, size, at, ramp, payload)
    d = sim_vehicles.spec(vehicle)["vehicle"]["propeller"]["diameter_m"]
    cfg = as_tuple(make_config(sim_vehicles.fitted_params(vehicle), sim_vehicles.checked_vehicle(vehicle),
                               {"lag_ms": 1000.0 * (ROTOR_LAG_S_PER_M * d + lag)})[0])
    if kind == "clean":
        n = int(value)
    else:
        n = [m for m, kv in enumerate(kinds) if kv == (kind, value)][0]
    end = min(ws.pack_cutoff_s(sim, n, vehicle), duration_s)
    fl = flight_sim.logged(sim, n, np.random.default_rng(seed * 1000 + n), rate)
    keep = fl["time_s"] < end
    fl = {key: v[keep] for key, v in fl.items()}
    return cfg, fl, at[n], end


def config_line(cfg):
    """The CONFIG values the trace's columns depend on, read by name (watch_layout.INDEX)."""
    return "floor %d permille, k_max %d permille, settle %d ms, block %d ms" % (
        cfg[INDEX["noise_floor_permille"]], cfg[INDEX["cusum_k_max_permille"]], cfg[INDEX["settle_ms"]],
        cfg[INDEX["block_ms"]])


def run(cfg, fl):
    w = Traced(cfg)
    dts, u, mv, ma = ws.kernel_inputs(fl)
    for i in range(len(u)):
        w.update(dts[i], u[i], mv[i], ma[i])
    return w.rows


def main():
    a = sys.argv[1:]
    vehicle, j, k = a[0], int(a[1]), int(a[2])
    rate = None if a[3] == "irr" else int(a[3])
    kind, value = a[4], float(a[5])
    before, after = (float(a[6]), float(a[7])) if len(a) > 7 else (20.0, 40.0)
    cfg, fl, onset, end = flight(vehicle, j, k, rate, kind, value)
    rows = run(cfg, fl)
    t0 = ws.TAKEOFF_S
    print("%s jit idx %d lag idx %d rate %s %s %+.2f: onset %.1f s (flight time %.1f s), end %.1f s; %s"
          % (vehicle, j, k, a[3], kind, value, onset, onset - t0, end, config_line(cfg)))
    first = [rw for rw in rows if rw["learning"] == 0]
    if first:
        rw = first[0]
        print("learning ended at flight time %.1f s: scale %d, sigma %d, l_n %d, k_min(2SE) %d"
              % (rw["t_s"], rw["scale"], rw["sig"] >> 6, rw["l_n"], rw["l_ms"]))
    print("  t_s    r  fb   hold lrn  sig   k    h  s_hi  s_lo drift  cx  cd flags")
    for rw in rows:
        ts = rw["t_s"] + t0     # flight time counts from the take-off at ~2 s
        if onset - before <= ts <= onset + after or (kind == "payload" and ts < after) or kind == "clean":
            print("%6.1f %5d %4d %5d %2d %5d %4d %5d %5d %5d %5d %4d %4d %3d%s"
                  % (ts, rw["r"], rw["fb"], rw["hold"], rw["learning"], rw["sig"] >> 6, rw["k"], rw["h"],
                     rw["s_hi"], rw["s_lo"], rw["drift"] >> 8, rw["cx"], rw["cd"], rw["flags"],
                     " <- onset" if abs(ts - onset) < 0.25 else ""))




def diagnose(dump_path, delay_goal=5.0, keys=("step+10%", "step-10%")):
    """One line per fault flight of the matrix dump (LIFTCAL_WATCH_DUMP) slower than delay_goal:
    what the kernel was doing from the onset to the alarm (or 60 s)."""
    import json
    cells = json.load(open(dump_path))
    vehicles = sim_vehicles.names()
    print("vehicle       jit  lag  rate  fault    delay | onset lrn_end  r_pre r_post  sig0 sig1   k0  k1   h0   h1 "
          "drift0 drift1 steady% near% maxS  cause")
    for c in cells:
        j = (0.0, 0.004, 0.01).index(c["jitter"])
        k = (0.0, 0.05, 0.15).index(c["lag_s"])
        for rate, r in c["rates"].items():
            for key in keys:
                for d in r["delays"].get(key, []):
                    if d <= delay_goal:
                        continue
                    value = float(key[4:-1]) / 100.0 if key.startswith("step") else 0.15
                    kind = "step" if key.startswith("step") else "ramp"
                    rr = None if rate == "irr" else int(rate[:-2])
                    cfg, fl, onset, end = flight(c["vehicle"], j, k, rr, kind, value)
                    rows = run(cfg, fl)
                    on = onset - ws.TAKEOFF_S
                    stop = on + (d if d != float("inf") else 60.0)
                    lrn = [rw["t_s"] for rw in rows if rw["learning"] == 0]
                    pre = [rw for rw in rows if on - 30.0 <= rw["t_s"] < on]
                    post = [rw for rw in rows if on + 1.0 <= rw["t_s"] <= max(stop, on + 5.0)]
                    if not pre or not post:
                        print(c["vehicle"], rate, key, "no blocks around onset", on, len(rows))
                        continue
                    a, b = pre[-1], post[-1]
                    rpre = sum(x["r"] for x in pre) / len(pre)
                    rpost = sum(x["r"] for x in post) / len(post)
                    steady = sum(x["hold"] <= 0 for x in post) / len(post)
                    near = sum(abs(x["fb"] * 1000 // max(1, x["fsl"] >> 7) - 1000) <= 250 for x in post) / len(post)
                    maxs = max(max(x["s_hi"], x["s_lo"]) for x in post)
                    cause = []
                    if lrn and lrn[0] > on:
                        cause.append("step-in-learning")
                    if steady < 0.5:
                        cause.append("held")
                    if (b["sig"] >> 6) > 1.2 * (a["sig"] >> 6):
                        cause.append("sig-up")
                    if abs((b["drift"] - a["drift"]) >> 8) > 10:
                        cause.append("drift")
                    if (a["k"] >= 50):
                        cause.append("k-capped")
                    print("%-13s %.3f %3.0f %-5s %-8s %6.1f | %5.1f %7.1f %6.0f %6.0f %5d %4d %4d %4d %4d %5d %6d %6d "
                          "%6.0f %5.0f %5d  %s"
                          % (c["vehicle"], c["jitter"], 1000 * c["lag_s"], rate, key, d, on, lrn[0] if lrn else -1,
                             rpre, rpost, a["sig"] >> 6, b["sig"] >> 6, a["k"], b["k"], a["h"], b["h"],
                             a["drift"] >> 8, b["drift"] >> 8, 100 * steady, 100 * near, maxs, " ".join(cause)))


if __name__ == "__main__":
    if sys.argv[1] == "--diagnose":
        diagnose(sys.argv[2], *( [float(sys.argv[3])] if len(sys.argv) > 3 else []))
    else:
        main()
