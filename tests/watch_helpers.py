"""Test helpers for the power watch: parameter sets and vehicles to run the kernel on.

``motor_model_params`` builds a parameter set (DEVELOPERS.md layout) by least squares on
points of the project's DC motor model for the invented demo vehicle (scipy curve_fit and
numpy lstsq, test-only) -- the same physics the flight simulator uses, so the watch's
expected power and thrust estimates can be judged against it.
"""


import numpy as np

from estimator.core import momentum
from estimator.core.motor import rotor_operating_point
from estimator.demo.scenario import DEMO_VEHICLE
from estimator.params import vehicle_block
from estimator.vehicle import check_vehicle


def demo_vehicle():
    """The invented demo vehicle, checked and with defaults filled."""
    return check_vehicle(DEMO_VEHICLE, "demo")


def motor_model_params(vehicle=None, residual_rel_std=0.02, bench_density=1.20):
    """Parameter set fitted to noise-free motor-model points at the bench density [kg/m^3]."""
    from scipy.optimize import curve_fit

    veh = vehicle or demo_vehicle()
    motor, prop = veh["motor"], veh["propeller"]
    eff = veh.get("esc", {}).get("efficiency", 1.0)
    cells = veh["battery"]["cells"]
    v_ref = cells * veh["battery"]["nominal_cell_V"]
    rows = []
    for v in (cells * 3.5, v_ref, cells * 4.2):
        for u in np.linspace(0.1, 1.0, 19):
            op = rotor_operating_point(float(u), v, bench_density, motor, prop, eff)
            rows.append((u, v, op["thrust_N"], op["electrical_power_W"]))
    a = np.array(rows)
    u, volt, thr, pw = a.T

    def model(X, tmax, share, n_exp):
        uu, vv = X
        return tmax * (vv / v_ref) ** n_exp * ((1 - share) * uu + share * uu * uu)

    (tmax, share, n_exp), _ = curve_fit(model, (u, volt), thr, p0=(thr.max(), 0.9, 1.8))
    design = np.column_stack([np.ones_like(thr), thr ** 1.5, thr ** 2])
    coef = np.linalg.lstsq(design, pw, rcond=None)[0]
    area = momentum.disk_area_m2(prop["diameter_m"])
    k = thr / (2.0 * bench_density * area * pw ** 2) ** (1.0 / 3.0)
    sel = thr > 0.1 * tmax
    slope, k0 = np.polyfit(thr[sel], k[sel], 1)
    params = {
        "schema_version": 1, "model": "liftcal.rotor/1",
        "rotor": {"diameter_m": prop["diameter_m"]},
        "bench_air": {"density_kg_m3": bench_density, "source": "test helper"},
        "thrust_curve": {"command_min": 0.0, "command_max": 1.0, "quadratic_share": float(share),
                         "thrust_max_N": float(tmax), "reference_voltage_V": v_ref,
                         "voltage_exponent": float(n_exp), "density_exponent": float(n_exp - 1.0),
                         "reference_density_kg_m3": bench_density},
        "power_model": {"form": "idle+induced+copper", "idle_power_W": float(coef[0]),
                        "induced_W_per_N1_5": float(coef[1]), "copper_W_per_N2": float(coef[2]),
                        "reference_density_kg_m3": bench_density, "residual_rel_std": residual_rel_std},
        "static_factor": {"value": float(k0 + slope * np.median(thr[sel])), "k0": float(k0),
                          "slope_per_N": float(slope)},
        "vehicle": vehicle_block(veh),
    }
    return params


_DEMO_FIT = {}


def demo_fit_params():
    """The real fitted demo parameter set: the demo bench sweep (benchsim, seed 1) through the fit
    (fitted once per worker, a fresh copy per call)."""
    if "p" not in _DEMO_FIT:
        import os
        import tempfile

        from estimator.demo.bench_sim import simulate_sweep
        from estimator.commands.bench import fit_for_vehicle
        folder = tempfile.mkdtemp(prefix="liftwatch-fit-")
        path = os.path.join(folder, "bench.csv")
        with open(path, "w", encoding="utf-8") as fh:
            fh.write(simulate_sweep(seed=1))
        params = fit_for_vehicle(path, demo_vehicle())
        _DEMO_FIT["p"] = params
    import copy
    return copy.deepcopy(_DEMO_FIT["p"])   # a copy: a test that edits its set leaves the others' alone


def _unpacked_names(func_name, list_name):
    import ast
    import os

    path = os.path.join(os.path.dirname(os.path.dirname(os.path.abspath(__file__))), "estimator", "core", "watch.py")
    with open(path, "r", encoding="utf-8") as fh:
        tree = ast.parse(fh.read())
    fn = [n for n in ast.walk(tree) if isinstance(n, ast.FunctionDef) and n.name == func_name][0]
    for node in ast.walk(fn):
        if (isinstance(node, ast.Assign) and isinstance(node.targets[0], ast.Tuple)
                and isinstance(node.value, ast.Name) and node.value.id == list_name):
            return [t.id for t in node.targets[0].elts]
    raise AssertionError("no (...) = %s unpacking in %s()" % (list_name, func_name))


def state_names():
    """Names of the kernel's per-sample state list ``Watch.state`` (``st`` in update) in order: the targets of the one
    unpacking ``(...) = st`` in update() (read from the source, so they cannot drift)."""
    return _unpacked_names("update", "st")


def block_state_names():
    """Names of the kernel's block state list ``Watch.data`` (``sb`` in _block) (the unpacking in _block())."""
    return _unpacked_names("_block", "sb")


def set_state(w, **values):
    """Set named entries of a Watch's state lists (tests only), e.g. set_state(w, learning=0)."""
    names, bnames = state_names(), block_state_names()
    for name, value in values.items():
        if name in bnames:
            w.data[bnames.index(name)] = value
        else:
            w.state[names.index(name)] = value


def flight_ints(flight):
    """Flight arrays -> lists of ints (command permille, mV, mA) as the replay rounds them."""
    u = [int(round(x * 1000.0)) for x in flight["command"]]
    mv = [int(round(x * 1000.0)) for x in flight["voltage_V"]]
    ma = [int(round(x * 1000.0)) for x in flight["current_A"]]
    return u, mv, ma


def run_flight(config, flight, dt_ms=100):
    """Run the kernel over a simulated flight; returns (watch, list of (t_s, new_bits), mass samples)."""
    from estimator.watch.config import new_watch

    w = new_watch(config)
    u, mv, ma = flight_ints(flight)
    prev = 0
    events = []
    masses = []
    for i in range(len(u)):
        f = w.update(dt_ms, u[i], mv[i], ma[i])
        new = f & ~prev
        prev = f
        if new:
            events.append((float(flight["time_s"][i]), new))
        if w.mass_g and w.data[0] == 0 and u[i] > 100:
            masses.append(w.mass_g)
    return w, events, masses


_DEMO_FLIGHT = {}


def demo_flight_rows(seed=7):
    """The simulated clean demo flight (estimator.demo.flight_sim, 300 s at 10 Hz) as rows of
    [time s, command -, voltage V, current A]; simulated once per seed and test run (about 4 s)."""
    if seed not in _DEMO_FLIGHT:
        from estimator.demo.flight_sim import simulate_flight

        text = simulate_flight(fault=None, seed=seed)
        _DEMO_FLIGHT[seed] = [[float(x) for x in line.split(",")] for line in text.splitlines()
                              if line and not line.startswith(("#", "time"))]
    return [list(r) for r in _DEMO_FLIGHT[seed]]


def write_log_rows(tmp_path, header, rows, fn, name="log.csv"):
    """A flight-log CSV in tmp_path: the header line, then fn(*row) of each row (e.g. of
    demo_flight_rows) written as %.6g numbers; returns its path."""
    f = tmp_path / name
    f.write_text(header + "\n" + "\n".join(",".join("%.6g" % x for x in fn(*r)) for r in rows) + "\n")
    return f


_FLIGHTS = {}


def flight_arrays_once(vehicle=None, fault=None, seed=1, duration_s=300.0, fault_at_s=120.0):
    """estimator.demo.flight_sim.flight_arrays for these arguments, simulated once per test run
    (each 300 s flight takes 8-15 s on a 2-core machine and many tests replay the same one);
    the key holds every argument and flight_sim.FAULT_SHARE (a test may patch it). Returns a
    deep copy, so a test may edit its flight."""
    import copy
    import json

    from estimator.demo import flight_sim

    key = (json.dumps(vehicle, sort_keys=True), fault, seed, duration_s, fault_at_s, flight_sim.FAULT_SHARE)
    if key not in _FLIGHTS:
        _FLIGHTS[key] = flight_sim.flight_arrays(copy.deepcopy(vehicle), fault=fault, seed=seed,
                                                 duration_s=duration_s, fault_at_s=fault_at_s)
    return copy.deepcopy(_FLIGHTS[key])


def flight_csv_once(vehicle=None, fault=None, seed=1, duration_s=300.0, fault_at_s=120.0):
    """The text of estimator.demo.flight_sim.simulate_flight for these arguments (which is
    to_csv(flight_arrays(...))), from flight_arrays_once."""
    from estimator.demo import flight_sim

    return flight_sim.to_csv(flight_arrays_once(vehicle, fault, seed, duration_s, fault_at_s))
