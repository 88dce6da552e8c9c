"""The fit's printed numbers are honest (new-user trial item 8), on sweeps from independent
truths (tests/truth_rotor.py: DC motor equivalent model, propeller coefficients, ESC end
points and dead zone; Drela 2007, Brandt and Selig 2011, from memory).

- quadratic share: at a = 1 the curve t(x) = (1 - a) x + a x^2, x = (u - u_min) / (u_max - u_min)
  has dt/da = x^2 - x and dt/du_min = 2 T_max (x^2 - x) / (u_max - u_min) (differentiation by
  hand), proportional columns of the Jacobian, so its inverse was meaningless ("1.000 +-
  10510.000"). Its error now rides on the intercept and every printed error is finite.
- no "+- 0" for a value that was not fitted; errors with two significant digits and the
  value to the same place (NIST Technical Note 1297 sec. 7, from memory); no "1.541e+04 g".
"""

import re

import numpy as np
import pytest

from io_helpers import run
from truth_rotor import random_truth, sweep_rows, truth_values, write_csv

# seeds of tests/truth_rotor.py whose sweeps drive the fitted share to its bound 1 (found by
# running the fit on seeds 0..39: 3, 4, 5, 6, 8, 9, 13 among others; 3 and 6 have ESC end
# points calibrated to 1100..1900 us as in the trial)
AT_BOUND_SEEDS = (3, 6, 9)


def _fit(tmp_path, seed, extra=()):
    rng = np.random.default_rng(seed)
    truth = random_truth(rng, rows=300)
    csv = str(tmp_path / ("truth-%d.csv" % seed))
    write_csv(truth, sweep_rows(truth, rng), csv)
    out = tmp_path / ("p-%d.json" % seed)
    code, text, err = run(["fit", csv, "--out", out] + list(extra))
    assert code == 0, err
    import json
    return truth, json.load(open(out)), text


def test_jacobian_columns_of_share_and_intercept_are_proportional_at_a_equal_1():
    # the cause, checked on the curve form itself: the fit's derivatives (themselves checked
    # against central differences in test_fit_jacobians.py) against the hand-derived ones above
    from estimator.bench.curve_fit import curve_jacobian
    u = np.linspace(0.1, 1.0, 30)
    jac = curve_jacobian((10.0, 1.0, 0.08, 1.8), u, np.zeros_like(u), 1.0)[:, :3]
    x = np.clip((u - 0.08) / 0.92, 0.0, 1.0)
    assert np.allclose(jac[:, 1], 10.0 * (x * x - x), atol=1e-6)
    assert np.allclose(jac[:, 2], 2.0 * 10.0 * (x * x - x) / 0.92, atol=1e-5)


@pytest.mark.parametrize("seed", AT_BOUND_SEEDS)
def test_a_share_at_its_bound_has_finite_errors_and_a_narrow_band(tmp_path, seed):
    from estimator.bench.plots import curve_band_N

    truth, p, text = _fit(tmp_path, seed)
    c, se = p["thrust_curve"], p["standard_errors"]
    assert c["quadratic_share"] > 0.99, "seed no longer reaches the bound; pick another"
    # every error bar inside the range its parameter can take (schema bounds)
    assert se["quadratic_share"] <= 1.0
    assert se["command_min"] <= 0.6
    assert se["thrust_max_N"] < 0.1 * c["thrust_max_N"]
    u = np.linspace(0.3, c["command_max"], 40)
    fit_t, half = curve_band_N(c, p["thrust_curve_covariance"]["matrix"], u)
    assert float(np.max(half)) < 0.05 * c["thrust_max_N"]
    # the band is about the truth: the curve stays within its band plus the 3 % of T_max
    # curve-form bound of issue 8 (the quadratic cannot follow every motor exactly)
    tv = truth_values(truth, c["reference_voltage_V"])
    true_t = tv["curve"](u)
    assert float(np.max(np.abs(fit_t - true_t) - half)) < 0.03 * tv["thrust_max_N"]
    share_line = [line for line in text.splitlines() if "quadratic share" in line][0]
    assert "+-" not in share_line and "not separable from the intercept" in share_line


@pytest.mark.parametrize("seed", (3, 11))
def test_no_false_zero_error_bar_and_sensible_digits(tmp_path, seed):
    truth, p, text = _fit(tmp_path, seed)
    assert not re.search(r"\+- 0(\.0*)?( |$|\))", text, re.M), text
    assert "e+" not in text and "e-0" not in text, text
    for line in text.splitlines():
        m = re.search(r"([\d.]+) (?:\S+ )?\+- ([\d.]+)", line)
        if m:
            value, error = m.groups()
            if "." in error:
                assert len(error.lstrip("0.").replace(".", "")) == 2, line  # two significant digits
            else:  # a whole number: two digits, rounded to two significant ones ("10", "120")
                assert len(error) >= 2 and float("%.2g" % float(error)) == float(error), line
            decimals = lambda s: len(s.split(".")[1]) if "." in s else 0  # noqa: E731
            assert decimals(value) == decimals(error), line  # value to the error's place
    # the density exponent comes from the motor model with the model's own error bar
    density_line = [line for line in text.splitlines() if "density exponent" in line][0]
    assert "+-" in density_line and "from the fitted motor model" in density_line, density_line
    if p["thrust_curve"]["voltage_exponent_source"] == "motor model":
        # not measured, and said so, but with the error bar of the duty law held near linear
        assert "NOT MEASURED: one supply voltage cannot measure it" in text
        assert p["standard_errors"]["voltage_exponent"] > 0.0


def test_value_and_error_rounding_examples():
    # NIST TN 1297 sec. 7 style (from memory): two significant digits in the uncertainty
    from estimator.bench.wording import value_and_error
    from estimator.units import plain_number
    assert value_and_error(1873.3, 7.019) == ("1873.3", "7.0")
    assert value_and_error(15412.0, 121.2) == ("15410", "120")
    assert value_and_error(0.6234, 0.0381) == ("0.623", "0.038")
    assert value_and_error(0.82, 0.0) == ("0.8200", "")
    assert plain_number(15412.3) == "15412" and plain_number(0.012413) == "0.01241"
