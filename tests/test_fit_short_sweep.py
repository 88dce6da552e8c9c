"""Sweeps that stop short of full command (a stand's current limit, heat, a small supply) on
independent truths, and parameter sets whose curve has collapsed.

The truths (tests/truth_rotor.py, which imports nothing from estimator) are the DC motor
equivalent model (Vm = omega / Kv + I R, I = I0 + Q Kv; Drela 2007, from memory) driving a
propeller T = CT rho n^2 D^4, Q = CP rho n^2 D^5 / (2 pi) whose coefficients drift with speed
(McCormick, Aerodynamics of V/STOL Flight, from memory), an ESC with a dead zone and a duty law,
a Thevenin supply and pack; the vehicle's hover is solved on that pack by bisection. Each sweep
is cut at a command below full, as a builder's stand stops it; the truth's values stay at full
command, so T_max is an extrapolation the fit must make and say how far it is.
"""

import json

import numpy as np

from io_helpers import PARAMS, refused
from truth_study import BOUNDS, SHORT_SWEEP_CAUSE, cut_summary, run_one

CUTS = (0.5, 0.6, 0.7, 0.8, 0.9)
# 3 truths per cut-off (the 60-truth runs are in benchmarks/fit_study.py --cuts)
SEEDS = (10000, 10002, 10003)


def test_sweeps_that_stop_short_fit_and_carry_the_extrapolation_in_their_errors(capsys):
    results = {cut: [run_one(seed, rows=2000, cut=cut) for seed in SEEDS] for cut in CUTS}
    lines = []
    for cut, group in results.items():
        s = cut_summary(group)
        lines.append("cut %.1f: fitted %d/%d, T_max worst %.2f %%, hover command worst %.4f, hover power worst "
                     "%.2f %%" % (cut, s["fitted"], s["truths"], 100.0 * s["thrust_max"][0], s["hover_command"][0],
                                  100.0 * s["hover_power"][0]))
        # every sweep fits, or is refused for the short sweep itself (never a numerical breakdown)
        assert not s["failed"], (cut, [f["failed"] for f in s["failed"]])
        for f in s["refused"]:
            assert cut <= 0.6, (cut, f["failed"])
    with capsys.disabled():
        print("\n" + "\n".join(lines))
    fitted = [r for group in results.values() for r in group if "failed" not in r]
    assert len(fitted) >= len(CUTS) * len(SEEDS) - 2
    for r in fitted:
        # hover lies inside or near the sweep: the same bounds as a full sweep (tests/truth_study.py)
        assert r["hover_command"] <= BOUNDS["hover_command"], r
        assert r["hover_power"] <= BOUNDS["hover_power"], r
        # the extrapolated full-command thrust within 4 of its standard errors (the 95 % coverage
        # is measured on 60 truths per cut-off by benchmarks/fit_study.py --cuts)
        assert r["thrust_max"] <= 4.0 * r["thrust_max_se"], r
    # 95 % intervals hold the truth in at least 90 % of the fitted truths
    assert sum(r["covered"] for r in fitted) >= 0.9 * len(fitted)
    assert sum(r["thrust_max_covered"] for r in fitted) >= 0.9 * len(fitted)


def test_a_short_sweep_says_how_far_full_command_is_extrapolated():
    r = run_one(10002, rows=2000, cut=0.6, keep=True)
    assert "failed" not in r, r
    params = r["params"]
    text = " ".join(params["warnings"])
    assert SHORT_SWEEP_CAUSE in text and "extrapolation" in text, params["warnings"]
    assert params["motor_model"]["command_top"] == 1.0
    assert abs(params["thrust_curve"]["command_swept_max"] - 0.6) < 0.01


def _collapsed(tmp_path, name, edit):
    with open(PARAMS) as fh:
        params = json.load(fh)
    params.pop("content_sha256", None)
    edit(params)
    path = tmp_path / name
    path.write_text(json.dumps(params))
    return path


def test_check_and_firmware_refuse_a_collapsed_curve(tmp_path):
    """A full-command thrust below what the bench measured mid-sweep, one whose error is as large
    as itself, and a motor model whose back-EMF could not make the measured thrust even at the
    full bus voltage (T = a s^2, s below the bus voltage: DC motor equivalent model)."""
    def tiny(p):
        p["thrust_curve"]["thrust_max_N"] = 1.89e-9

    def vague(p):
        p["standard_errors"]["thrust_max_N"] = p["thrust_curve"]["thrust_max_N"]

    def motor(p):
        p["motor_model"]["thrust_per_V2_N"] = 2.4e-12

    for name, edit, where in (("tiny.json", tiny, "$.thrust_curve.thrust_max_N"),
                              ("vague.json", vague, "$.standard_errors.thrust_max_N"),
                              ("motor.json", motor, "$.motor_model.thrust_per_V2_N")):
        path = _collapsed(tmp_path, name, edit)
        refused(["check", path], where, "fit the sweep again")
        refused(["firmware", path, "--out", tmp_path / ("fw-" + name[:-5])], where)
    assert not any(p.name.startswith("fw-") for p in tmp_path.iterdir())
    # the untouched set still passes
    code = __import__("io_helpers").run(["check", PARAMS])[0]
    assert code == 0
    assert np.isfinite(json.load(open(PARAMS))["thrust_curve"]["thrust_max_N"])


def test_a_short_sweep_that_cannot_pin_full_command_is_refused_with_its_cause(tmp_path):
    """35 rows of a 59 mm 1S rotor stopped at 1500 us: the motor model's full-command thrust
    carries a standard error of about a quarter of itself: one error line, nothing written."""
    from truth_rotor import random_truth, sweep_rows, write_csv

    rng = np.random.default_rng(10005)
    truth = random_truth(rng)
    truth.update({"sweep_top": 0.5, "e_lo": 0.0, "e_hi": 1.0})
    path = tmp_path / "short.csv"
    write_csv(truth, sweep_rows(truth, rng), str(path))
    out = tmp_path / "set.json"
    refused(["fit", path, "--out", out], "stops at command 1500 us", "not credible", "Sweep to a higher command")
    assert not out.exists()
