"""Honest error bars of the bench fit on independent truths (tests/truth_rotor.py: DC motor
equivalent model, propeller coefficients drifting with speed, ESC dead zone and duty
exponent; Drela 2007, Brandt and Selig 2011, McCormick, from memory).

- T_max: its standard error now carries the curve form's error at full command (the gap to
  the fitted motor model there), which does not shrink as levels are added. A dense sweep
  (three supplies, both legs, 25+ steps) made the old error bar overconfident: T_max +- 1.96
  standard errors held the truth in 8 of 16 truths.
- The fitted spin-up command (where the ESC's duty starts) drifts with the duty exponent; it
  now has a standard error (the motor fit's covariance, the command resolution h / sqrt(12)
  of a rectangular distribution, GUM JCGM 100:2008 sec. 4.3.7, from memory, and a one-way
  sweep's lag) and is called poorly determined beyond START_POORLY_DETERMINED.
A 95 % interval should hold the truth in at least 90 % of the truths (issue 8's goal for
the hover interval, applied to these two).
"""

import numpy as np
import pytest

from io_helpers import run
from truth_rotor import random_truth, sweep_rows, write_csv
from truth_study import run_one, spin_up_command

Z_95 = 1.959964  # two-sided 95 % point of the standard normal


def _dense(truth):
    truth["supplies"] = [truth["v_supply"] * f for f in (1.0, 0.93, 0.86)]
    truth["both_legs"] = True
    truth["steps"] = max(truth["steps"], 25)


def test_dense_sweeps_keep_honest_error_bars_on_thrust_max_and_spin_up():
    results = [run_one(seed, rows=600, tweak=_dense) for seed in range(700, 716)]
    assert all("failed" not in r for r in results), [r.get("failed") for r in results]
    t_max = sum(r["thrust_max_covered"] for r in results) / len(results)
    spin = sum(abs(r["spin_up"]) <= Z_95 * r["spin_up_se"] for r in results) / len(results)
    assert t_max >= 0.9, t_max
    assert spin >= 0.9, spin
    # still error bars, not a blanket: the errors stay inside the study's bounds
    assert max(r["thrust_max"] for r in results) < 0.03


def test_a_coarse_one_way_sweep_says_its_spin_up_is_poorly_determined(tmp_path):
    # finding: the spin-up came out 0.04-0.06 low on coarse sweeps where the duty exponent
    # drifted, printed without an error bar ("rotor starts at 0.021 (motor model)")
    rng = np.random.default_rng(31)
    truth = random_truth(rng, rows=600)
    truth.update(steps=10, both_legs=False, supplies=[truth["v_supply"]], command_unit="-", e_lo=0.0, e_hi=1.0)
    csv = tmp_path / "coarse.csv"
    write_csv(truth, sweep_rows(truth, rng), str(csv))
    code, text, err = run(["fit", csv, "--out", tmp_path / "p.json"])
    assert code == 0, err
    import json
    mm = json.load(open(tmp_path / "p.json"))["motor_model"]
    se = mm["command_start_standard_error"]
    assert se > 0.025  # a step of 0.1 alone is 0.1 / sqrt(12) = 0.029
    assert abs(mm["command_start"] - spin_up_command(truth)) <= Z_95 * se
    flat = " ".join(text.split())  # the text is wrapped for an 80-column terminal
    line = flat.split("rotor starts at")[1].split("voltage exponent")[0]
    # an error bar: '+- se', or the bound '(0..u+se within one standard error)' when u - se < 0
    assert ("+-" in line or "within one standard error" in line) and "poorly determined" in line, line
    assert "! the rotor's start command" in flat, text
    code, js, err = run(["fit", csv, "--out", tmp_path / "q.json", "--json"])
    out = json.loads(js)
    assert out["command_start_standard_error"] == pytest.approx(se) and out["command_start"] == mm["command_start"]
    assert any("start command" in w and "poorly determined" in w for w in out["warnings"])


@pytest.mark.parametrize("seed", [41, 42])
def test_a_fine_sweep_gives_a_narrow_spin_up_that_holds_the_truth(seed):
    def fine(truth):
        truth.update(steps=40, both_legs=True)
    r = run_one(seed, rows=2000, tweak=fine, keep=True)
    assert "failed" not in r
    assert r["spin_up_se"] < 0.025  # 40 steps: resolution 0.025 / sqrt(12) = 0.007
    assert abs(r["spin_up"]) <= Z_95 * r["spin_up_se"]
    assert not any("start command" in w for w in r["params"]["warnings"])
