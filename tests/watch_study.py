"""Detection study of the power watch on the closed-loop flight simulator (estimator/demo/
flight_sim.py), shared by benchmarks/watch_detection.py (the full matrix) and
tests/test_watch_detection.py (a small randomised version).

One "cell" is a vehicle, a collective jitter and a sensor lag: a batch of flights is simulated
once and every flight is logged at each rate (5 to 100 Hz and irregular) and replayed through
the integer kernel, configured from the project's bench fit of that vehicle (sim_vehicles) with
the lag a builder would enter (--lag-ms: the default rotor part plus the sensor's filter).

Flights of a cell: fault-free ones (planned mass), power steps of +-5/10/15/30 % at a random
onset, a 0 -> 15 % ramp over 5 minutes, payloads of +10/+15/+30 % and a lighter one (-10 %).
Counted as false: on fault-free flights any event; on step and ramp flights an event of the
other side or before the onset, and mass_high; on payload flights any power event or
baseline_off; mass_high on the lighter flight. Delays: from the onset (steps, ramps) or from
the take-off (payloads, which are there from the start).
"""

import os

import numpy as np
from scipy.stats import chi2

from estimator.demo import flight_sim, sim_vehicles
from estimator.watch.config import make_config
from estimator.core.watch import Watch
from estimator.watch.config import as_tuple

RATES = (5, 10, 25, 50, 100, None)          # None: irregular intervals of 10-150 ms
STEPS = (0.05, 0.10, 0.15, 0.30, -0.05, -0.10, -0.15, -0.30)
PAYLOADS = (0.10, 0.15, 0.30)
LIGHT = -0.10
RAMP = (0.15, 300.0)                         # final share, ramp time [s]
TAKEOFF_S = 2.0                              # the simulator arms at 2 s


def rate_name(rate):
    return "irr" if rate is None else "%dHz" % rate


def kernel_inputs(fl):
    """A logged flight as the kernel's integer inputs: lists dt [ms] (the first 100), command
    [permille], bus voltage [mV], current [mA]."""
    ms = np.round(fl["time_s"] * 1000.0).astype(np.int64)
    dts = np.diff(ms, prepend=ms[0] - 100).tolist()
    u = np.round(fl["command"] * 1000.0).astype(np.int64).tolist()
    mv = np.round(fl["voltage_V"] * 1000.0).astype(np.int64).tolist()
    ma = np.round(fl["current_A"] * 1000.0).astype(np.int64).tolist()
    return dts, u, mv, ma


def replay(cfg_tuple, fl):
    """Run the kernel over one logged flight; returns list of (t_s, new flag bits)."""
    w = Watch(cfg_tuple)
    up = w.update
    t = fl["time_s"]
    dts, u, mv, ma = kernel_inputs(fl)
    tl = t.tolist()
    prev = 0
    events = []
    for i in range(len(u)):
        f = up(dts[i], u[i], mv[i], ma[i])
        if f != prev:
            new = f & ~prev
            if new:
                events.append((tl[i], new))
            prev = f
    return events


def cell_plan(rng, n_clean, duration_s):
    """Per-flight fault sizes, onsets, ramps and payloads of one cell, and each flight's kind."""
    kinds, size, at, ramp, payload = [], [], [], [], []
    for _ in range(n_clean):
        kinds.append(("clean", 0.0))
        size.append(0.0), at.append(1e9), ramp.append(0.0), payload.append(0.0)
    for s in STEPS:
        kinds.append(("step", s))
        size.append(s), at.append(rng.uniform(60.0, duration_s - 120.0)), ramp.append(0.0), payload.append(0.0)
    kinds.append(("ramp", RAMP[0]))
    size.append(RAMP[0]), at.append(rng.uniform(40.0, 60.0)), ramp.append(RAMP[1]), payload.append(0.0)
    for p in PAYLOADS + (LIGHT,):
        kinds.append(("payload", p))
        size.append(0.0), at.append(1e9), ramp.append(0.0), payload.append(p)
    return kinds, size, at, ramp, payload


def judge(kind, value, onset, events):
    """(false events, delay [s] or None) of one flight; delay inf when missed."""
    false = 0
    delay = None
    if kind == "clean":
        return len(events), None
    if kind in ("step", "ramp"):
        want = 1 if value > 0 else 2
        for t, bits in events:
            if bits & want and t >= onset and delay is None:
                delay = t - onset
            other = bits & ~want & ~4
            if bits & want and t < onset:
                false += 1
            false += bin(other & (3 | 8 | 16)).count("1")
        return false, (delay if delay is not None else float("inf"))
    # payload
    for t, bits in events:
        false += bin(bits & (1 | 2 | 8)).count("1")
        if bits & 16:
            if value > 0:
                if delay is None:
                    delay = t - TAKEOFF_S
            else:
                false += 1
    if value > 0:
        return false, (delay if delay is not None else float("inf"))
    return false, None


def pack_cutoff_s(sim, k, name):
    """Time [s] at which flight k's loaded pack voltage (mean over 1 s) first falls below the pack's
    cutoff (cells x empty cell voltage), inf when it never does. A builder lands there (or the
    controller's low-voltage failsafe does); the simulated pack beyond it is off its discharge
    curve, so the study judges a flight only up to this time (common practice: land at the cutoff)."""
    b = sim_vehicles.spec(name)["vehicle"]["battery"]
    n = int(round(1.0 / flight_sim.PHYSICS_DT))
    mean = np.convolve(sim["bus_V"][k].astype(float), np.ones(n) / n, mode="valid")
    t = sim["t_s"][n - 1:]
    below = np.nonzero((mean < b["cells"] * b["empty_cell_V"]) & (t > 10.0))[0]
    return float(t[below[0]]) if len(below) else float("inf")


def run_cell(args):
    """One cell: (vehicle, jitter, lag_s, n_clean, duration_s, seed, rates[, CONFIG options]) -> dict."""
    name, jitter, lag, n_clean, duration_s, seed, rates = args[:7]
    # the builder enters the current sensor's filter time constant (datasheet) on top of the
    # default rotor lag (liftcal firmware --lag-ms); the rotor's own lag is not told
    if len(args) > 7:
        options = args[7]
    else:
        from estimator.watch.config import ROTOR_LAG_S_PER_M
        d = sim_vehicles.spec(name)["vehicle"]["propeller"]["diameter_m"]
        options = {"lag_ms": 1000.0 * (ROTOR_LAG_S_PER_M * d + lag)}
    if os.environ.get("LIFTCAL_WATCH_OPTIONS"):        # CONFIG options to try (JSON), for tuning runs
        import json
        options = dict(options, **json.loads(os.environ["LIFTCAL_WATCH_OPTIONS"]))
    rng = np.random.default_rng(seed)
    kinds, size, at, ramp, payload = cell_plan(rng, n_clean, duration_s)
    sim = _simulate_cached(name, len(kinds), seed, duration_s, jitter, lag, size, at, ramp, payload)
    cfg = as_tuple(make_config(sim_vehicles.fitted_params(name), sim_vehicles.checked_vehicle(name),
                                 options)[0])
    # flights end at the pack's cutoff; a fault that starts less than 30 s before it (a ramp: that
    # does not reach its end before it) is not judged, and counted apart
    ends = [min(pack_cutoff_s(sim, k, name), duration_s) for k in range(len(kinds))]
    flown = [kind == "clean" or (kind == "payload" and ends[k] > 90.0) or
             (kind == "step" and ends[k] > at[k] + 30.0) or (kind == "ramp" and ends[k] > at[k] + ramp[k])
             for k, (kind, _) in enumerate(kinds)]
    out = {"vehicle": name, "jitter": jitter, "lag_s": lag, "rates": {}, "cut_short": sum(e < duration_s for e in ends),
           "clean_hours": sum(ends[k] for k, (kind, _) in enumerate(kinds) if kind == "clean") / 3600.0,
           "unjudged": sum(not f for f in flown)}
    for rate in rates:
        r = {"false": 0, "false_clean": 0, "false_sensor": 0, "false_mass": 0, "delays": {}}
        for k, (kind, value) in enumerate(kinds):
            if not flown[k]:
                continue
            fl = flight_sim.logged(sim, k, np.random.default_rng(seed * 1000 + k), rate)
            if ends[k] < duration_s:
                keep = fl["time_s"] < ends[k]
                fl = {key: v[keep] for key, v in fl.items()}
            events = replay(cfg, fl)
            r["false_sensor"] += sum(1 for _, b in events if b & 4)
            events = [(t, b & ~4) for t, b in events if b & ~4]
            false, delay = judge(kind, value, at[k], events)
            r["false"] += false
            if kind == "clean":
                r["false_clean"] += false
            r["false_mass"] += sum(1 for _, b in events if b & 16) if (kind != "payload" or value < 0) else 0
            if delay is not None:
                key = "%s%+.0f%%" % (kind, 100 * value) if kind != "ramp" else "ramp"
                if kind == "ramp" and delay != float("inf"):
                    delay_share = RAMP[0] * min(delay / RAMP[1], 1.0)
                    r.setdefault("ramp_share", []).append(delay_share)
                r["delays"].setdefault(key, []).append(delay)
        out["rates"][rate_name(rate)] = r
    return out


def _simulate_cached(name, n, seed, duration_s, jitter, lag, size, at, ramp, payload):
    """flight_sim.simulate, kept in $LIFTCAL_SIM_CACHE (a folder) when that is set: the simulator
    does not depend on the kernel, so repeated benchmark runs while tuning replay the same flights."""
    kw = dict(jitter=jitter, sensor_lag_s=lag, fault_size=size, fault_at_s=at, fault_ramp_s=ramp, payload=payload)
    folder = os.environ.get("LIFTCAL_SIM_CACHE")
    if not folder:
        return flight_sim.simulate(name, n, seed, duration_s, **kw)
    path = os.path.join(folder, "%s-%d-%d-%g-%g-%g.npz" % (name.replace(" ", "_"), n, seed, duration_s, jitter, lag))
    if os.path.exists(path):
        with np.load(path) as z:
            sim = {k: z[k] for k in z.files}
        for k in ("sensor_range_A", "full_V"):
            sim[k] = float(sim[k])
        sim["name"] = name
        return sim
    sim = flight_sim.simulate(name, n, seed, duration_s, **kw)
    os.makedirs(folder, exist_ok=True)
    np.savez(path + ".tmp.npz", **{k: v for k, v in sim.items() if k != "name"})
    os.replace(path + ".tmp.npz", path)
    return sim


def mass_high_delays(name, payload, rates, seed, duration_s, n=6, jitter=0.01):
    """{rate: [time of the first mass_high after take-off [s], inf when none] of n flights} of a
    vehicle flown payload [-] over its planned mass (closed-loop simulator, no sensor lag beyond
    the rotor's, collective jitter [-]), each logged at every rate of rates [Hz] (None: irregular)
    and replayed through the kernel with the default CONFIG and the rotor's lag."""
    from estimator.watch.config import ROTOR_LAG_S_PER_M
    d = sim_vehicles.spec(name)["vehicle"]["propeller"]["diameter_m"]
    cfg = as_tuple(make_config(sim_vehicles.fitted_params(name), sim_vehicles.checked_vehicle(name),
                               {"lag_ms": 1000.0 * ROTOR_LAG_S_PER_M * d})[0])
    sim = flight_sim.simulate(name, n, seed, duration_s, jitter=jitter, sensor_lag_s=0.0, fault_size=[0.0] * n,
                              fault_at_s=[1e9] * n, fault_ramp_s=[0.0] * n, payload=[payload] * n)
    out = {}
    for rate in rates:
        out[rate] = []
        for k in range(n):
            events = replay(cfg, flight_sim.logged(sim, k, np.random.default_rng(k), rate))
            hits = [t for t, bits in events if bits & 16]
            out[rate].append(hits[0] - TAKEOFF_S if hits else float("inf"))
    return out


def poisson_upper(k, hours):
    """95 % upper confidence bound of a Poisson rate with k events in ``hours`` [1/h]."""
    return chi2.ppf(0.95, 2 * (k + 1)) / 2.0 / hours
