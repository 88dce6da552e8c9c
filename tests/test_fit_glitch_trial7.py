"""One load-cell glitch row never breaks a bench fit, and no numerical library prints a word
(new-user trial 7, finding 3).

The trial's sweep (a 2.5 kg rotor) with one row `20.00,1500,24.5,6.0,9999.0` was refused with
LAPACK's ' ** On entry to DLASCL ...' lines on stdout: the glitch row's 24.5 V put it in a
supply band of its own, a level of one row that only the model screen judges, after the motor
fit; the fit's bounds took that level's 98 N as the sweep's top thrust (a >= 0.5 T_top /
V_max^2), held the model above every real level, and it walked to a degenerate corner whose
NaNs reached LAPACK. The same row at 7000 or 20000 g was dropped: the window was about
8000..11000 g, chaotic inside (9900 g passed, 9950 g failed).

Every sweep here is invented. The trial's is re-created by a DC motor + propeller written in
this file (Kv 1300 rpm/V, R 0.065 ohm, I0 1.1 A; CT 0.105, CP 0.046 with n in rev/s on a 7 in
disk; ESC 4 % dead band, 96 % efficient; supply 25.2 V behind 0.05 ohm; DC motor equivalent
model, Drela 2007, from memory; thrust and torque coefficients, e.g. McCormick, Aerodynamics
of V/STOL Flight, from memory). The randomised sweeps come from tests/truth_rotor.py (its own
physics). Output is checked at the file descriptors (pytest's capfd): LAPACK writes to fd 1
itself, past Python's sys.stdout.
"""

import json
import math

import numpy as np
import pytest
from click.testing import CliRunner

from estimator.cli import cli

G0 = 9.80665  # standard gravity [m/s^2] (CGPM 1901)


def _air_density(altitude_m, temperature_C):
    """Dry air density [kg/m^3]: ICAO standard pressure at altitude_m, ideal gas at temperature_C
    (ICAO Doc 7488, R = 287.053 J/(kg K), from memory)."""
    p = 101325.0 * (1.0 - 2.25577e-5 * altitude_m) ** 5.25588
    return p / (287.053 * (temperature_C + 273.15))


def _trial_rows(seed=7):
    """(time [s], command [us], bus voltage [V], current [A], thrust [g]) of the trial's sweep:
    1000..2000 us in 25 us steps, four rows of 0.25 s each, with noise."""
    kv = 1300.0 * 2.0 * math.pi / 60.0  # [rad/(s V)]
    ke, r, i0 = 1.0 / kv, 0.065, 1.1
    ct, cp, d = 0.105, 0.046, 7 * 0.0254
    rho = _air_density(120.0, 19.0)
    kq = cp * rho * d ** 5 / (2.0 * math.pi) ** 3  # torque = kq omega^2 [N m s^2]
    rng = np.random.default_rng(seed)
    rows, time = [], 0.0
    for c in np.arange(0.0, 1.0001, 0.025):
        duty = max(0.0, (c - 0.04) / 0.96)
        v, i_bus, thrust = 25.2, 0.0, 0.0
        for _ in range(60):  # the supply's sag: a fixed point, 0.05 ohm against ~25 V converges fast
            vm = duty * v
            # torque balance ke ((Vm - ke w) / R - I0) = kq w^2, a quadratic in w
            qa, qb, qc = kq, ke * ke / r, -ke * (vm / r - i0)
            w = max(0.0, (-qb + math.sqrt(qb * qb - 4.0 * qa * qc)) / (2.0 * qa)) if qc < 0 else 0.0
            i_m = (vm - ke * w) / r if w > 0 else 0.0
            i_bus = vm * i_m / (0.96 * v)
            v = 25.2 - 0.05 * i_bus
            n = w / (2.0 * math.pi)
            thrust = ct * rho * n * n * d ** 4
        for _ in range(4):
            rows.append((time, 1000 + 1000 * c, v + rng.normal(0, 0.01), i_bus + rng.normal(0, 0.03),
                         thrust / G0 * 1000.0 + rng.normal(0, 3.0)))
            time += 0.25
    return rows


def _trial_csv(path, glitch_g=None):
    lines = ["# INVENTED bench sweep (test), DC motor 1300 Kv + 7x3.5in prop", "# altitude: 120m",
             "# temperature: 19C", "# diameter: 7in", "time[s],command[us],voltage[V],current[A],thrust[g]"]
    rows = ["%.2f,%.0f,%.3f,%.3f,%.1f" % row for row in _trial_rows()]
    if glitch_g is not None:
        rows[80] = "20.00,1500,24.5,6.0,%s" % glitch_g  # the trial's row: 24.5 V, 6.0 A, a saturated count
    path.write_text("\n".join(lines + rows) + "\n")
    return path


def _fit(tmp_path, csv, name, capfd, *extra):
    """Run fit --json in this process; (exit code, stdout, stderr, the parameter set) with
    nothing written to the file descriptors behind Python's back."""
    capfd.readouterr()
    out = tmp_path / name
    res = CliRunner().invoke(cli, ["fit", str(csv), "--out", str(out), "--json", *extra])
    leaked = capfd.readouterr()
    assert leaked.out == "" and leaked.err == "", (leaked.out[:300], leaked.err[:300])
    params = json.loads(out.read_text()) if res.exit_code == 0 else None
    return res.exit_code, res.stdout, res.stderr, params


@pytest.mark.parametrize("glitch_g", ["9998.0", "9999.0", "10000.0", "10001", "10100", "11000"])
def test_the_trials_glitch_row_is_dropped_as_a_spike(tmp_path, capfd, glitch_g):
    clean = _fit(tmp_path, _trial_csv(tmp_path / "clean.csv"), "clean.json", capfd)
    code, stdout, stderr, params = _fit(tmp_path, _trial_csv(tmp_path / "g.csv", glitch_g), "g.json", capfd)
    assert code == 0 and stderr == "", (code, stdout[:300], stderr)
    json.loads(stdout)  # exactly one JSON object (json.loads refuses any text beside it)
    assert params["fit_quality"]["rejected"] == {"thrust_spike": 1}
    # the glitch leaves no trace beyond one lost reading: the curve's top within a tenth of the
    # clean fit's standard error (3 of 164 readings at that level kept)
    t_clean, t_glitch = clean[3]["thrust_curve"]["thrust_max_N"], params["thrust_curve"]["thrust_max_N"]
    se = clean[3]["standard_errors"]["thrust_max_N"]
    assert abs(t_glitch - t_clean) < 0.1 * se, (t_glitch, t_clean, se)


# logger counts a saturating or wrapping load cell writes (9999 on four digits, 2^15 - 1, 2^16 - 1)
SATURATED = (9999.0, 10000.0, 32767.0, 65535.0)


def _glitched_sweeps(seed):
    """(truth, rows, [(glitch value [N], its row, the glitched rows)]) for an invented motor: one row at a random
    command given a random value (saturated counts in the CSV's thrust unit, or 0.1..30 times the
    top thrust, or zero or negative) and, half the time, a voltage off its supply's band."""
    from truth_rotor import THRUST_UNITS, random_truth, sweep_rows

    rng = np.random.default_rng(seed)
    truth = random_truth(rng, rows=int(rng.integers(60, 400)))
    truth["outliers"] = 0.0
    rows = sweep_rows(truth, rng)
    top = float(np.max(rows[:, 3]))
    per_unit = THRUST_UNITS[truth["thrust_unit"]]
    values = [x / per_unit for x in SATURATED]
    values += list(top * np.exp(rng.uniform(math.log(0.1), math.log(30.0), 6))) + [0.0, -0.5 * top]
    out = []
    for value in values:
        glitched = rows.copy()
        # a row where the rotor turns: the levels above 20 % of the top thrust
        k = int(rng.choice(np.flatnonzero(rows[:, 3] > 0.2 * top)))
        glitched[k, 3] = value
        if rng.random() < 0.5:
            glitched[k, 1] *= rng.uniform(0.95, 0.985)  # a voltage reading off its band too
        out.append((value, k, glitched))
    return truth, rows, out


# seeds 27 and 31 found two more ways a glitch broke a fit: the static-factor check's 99th
# percentile of 80 rows raised by one 98 N row (no row left above 10 % of it), and a glitch in a
# level of 20 rows hidden by that level's own rms, then all 20 rows dropped against the spiked mean
@pytest.mark.parametrize("seed", list(range(6)) + [27, 31])
def test_one_glitch_row_at_any_value_never_breaks_a_fit_nor_prints(tmp_path, capfd, seed):
    from truth_rotor import write_csv

    truth, rows, glitched = _glitched_sweeps(seed)
    clean_csv = tmp_path / "clean.csv"
    write_csv(truth, rows, str(clean_csv))
    code, stdout, stderr, clean = _fit(tmp_path, clean_csv, "clean.json", capfd)
    assert code == 0, stderr
    top = float(np.max(rows[:, 3]))
    for j, (value, k, table) in enumerate(glitched):
        csv = tmp_path / ("g%d.csv" % j)
        write_csv(truth, table, str(csv))
        code, stdout, stderr, params = _fit(tmp_path, csv, "g%d.json" % j, capfd)
        assert code == 0 and stderr == "", (value, stderr)
        json.loads(stdout)  # one JSON object, nothing beside it
        # a glitch 30 % of the top thrust off its row is dropped, as a spike or beyond the load
        # cell's range (one within the noise may stay)
        far = abs(value - rows[k, 3]) > 0.3 * top
        dropped = params["fit_quality"]["rows_rejected"] - clean["fit_quality"]["rows_rejected"]
        assert dropped >= (1 if far else 0), (value, params["fit_quality"]["rejected"])
        # and the curve's top stays within 3 of the clean fit's standard errors
        t_clean = clean["thrust_curve"]["thrust_max_N"]
        se = clean["standard_errors"]["thrust_max_N"]
        assert abs(params["thrust_curve"]["thrust_max_N"] - t_clean) <= 3.0 * se, (value, t_clean, se)


def test_nothing_non_finite_reaches_a_solver_and_nothing_is_printed(capfd):
    from estimator.bench.curve_fit import project
    from estimator.solvers import NotFinite

    # a motor model gone to NaN (the trial's degenerate corner) projected onto the quadratic:
    # before, numpy.linalg.lstsq got the NaNs, LAPACK printed ' ** On entry to DLASCL ...' on
    # fd 1 and numpy raised 'SVD did not converge'
    grid = np.linspace(0.05, 1.0, 161)
    thrust = 20.0 * grid ** 2
    thrust[80:] = np.nan
    capfd.readouterr()
    with pytest.raises(NotFinite, match="NaN or an infinity"):
        project(grid, thrust, 1.0, 1.7)
    leaked = capfd.readouterr()
    assert leaked.out == "" and leaked.err == ""


def test_every_flow_calls_solvers_only_through_their_finite_check():
    # every module of estimator/ that takes a user's numbers (the edge modules, the three flows,
    # the commands) calls numpy.linalg, numpy.polyfit and scipy's solvers only through
    # estimator/solvers.py. Before, the walk covered bench/ alone and the watch's thrust table
    # (watch/thrust_table.py) called numpy.linalg.lstsq itself. demo/ is left out: its flight
    # simulator factors matrices built from the invented scenario's own constants, never from a
    # file or an option.
    import ast
    import os

    import estimator

    root = os.path.dirname(estimator.__file__)
    direct, walked = [], []
    for folder, dirs, files in os.walk(root):
        dirs[:] = sorted(d for d in dirs if d not in ("demo", "__pycache__"))
        for name in sorted(files):
            path = os.path.join(folder, name)
            rel = os.path.relpath(path, root)
            if not name.endswith(".py") or rel == "solvers.py":
                continue
            walked.append(rel)
            tree = ast.parse(open(path).read())
            for node in ast.walk(tree):
                if isinstance(node, ast.Call) and ast.unparse(node.func).startswith(
                        ("np.linalg.", "numpy.linalg.", "np.polyfit", "numpy.polyfit")):
                    direct.append("%s:%d %s" % (rel, node.lineno, ast.unparse(node.func)))
                if isinstance(node, ast.ImportFrom) and (node.module or "").startswith(
                        ("scipy.optimize", "scipy.linalg", "numpy.linalg")):
                    direct.append("%s:%d %s" % (rel, node.lineno, node.module))
    # the walk reached the bench fits and the watch's table
    assert {os.path.join("bench", "motor_fit.py"), os.path.join("watch", "thrust_table.py")} <= set(walked)
    assert direct == [], direct


def test_a_thrust_table_that_is_not_finite_is_refused_before_lapack(capfd):
    from estimator.solvers import NotFinite
    from estimator.watch.thrust_table import thrust_knots_mN

    # a thrust-from-power function gone to NaN or infinity above 3 W: before, numpy's lstsq took
    # it and the table came back as 33 zeros (max(0, nan) is 0), a silent watch with no implied
    # mass; now the finite check of estimator/solvers.py refuses it, and nothing is printed
    for bad in (float("nan"), float("inf")):
        capfd.readouterr()
        with pytest.raises(NotFinite, match="NaN or an infinity in the watch's thrust-from-power table"):
            thrust_knots_mN(lambda p_W, bad=bad: bad if p_W > 3.0 else 0.5 * p_W, 1.0)
        leaked = capfd.readouterr()
        assert leaked.out == "" and leaked.err == ""
    # a finite one still gives its table: T = 0.5 N/W x P, linear, so the least-squares knots are
    # the values at the knots themselves, 500 mN per W (linear interpolation is exact on a line)
    assert thrust_knots_mN(lambda p_W: 0.5 * p_W, 1.0) == [500 * i for i in range(33)]
