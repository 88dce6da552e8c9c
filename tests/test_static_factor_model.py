"""The static thrust factor and the watch's thrust-from-power come from the fitted power model
itself, not from a second model of it (new-user trials 3 item 15 and 4 items 4 and 14).

The fit used to print k from a straight line k0 + slope T through the power model; the watch
turned power into thrust through the same line. Where the idle terms bend k(T) the line strays:
on randomised truths (tests/truth_rotor.py, written independently of estimator) it missed the
true k at hover by up to 18 % (measured on seeds 20000-20039; the new way: 0.4 % worst), and
the watch's implied mass by up to 19 % (new: 0.5 % worst).

References: k = T / (2 rho A P^2)^(1/3), momentum theory (Leishman, Principles of Helicopter
Aerodynamics, 2nd ed., ch. 2); the truth's own DC motor + propeller physics gives T and P.
"""

import math

import numpy as np
import pytest

from truth_rotor import G0, at_supply, rotor_at
from truth_study import run_one

SEEDS = range(20023, 20027)  # 20024 and 20025 were 18 % and 15 % off with the line


@pytest.fixture(scope="module")
def fitted():
    return [r for r in (run_one(seed, keep=True) for seed in SEEDS) if "failed" not in r]


def _duty_for(f, target):
    lo, hi = 0.0, 1.0
    for _ in range(60):  # f rises with duty
        mid = 0.5 * (lo + hi)
        lo, hi = (mid, hi) if f(mid) < target else (lo, mid)
    return 0.5 * (lo + hi)


def test_the_printed_static_factor_is_the_truths_within_1_percent(fitted):
    assert len(fitted) == len(SEEDS)
    for r in fitted:
        truth, params = r["truth"], r["params"]
        sf = params["static_factor"]
        thrust = sf["thrust_at_value_N"]
        v_ref, rho = params["thrust_curve"]["reference_voltage_V"], truth["rho"]
        d = _duty_for(lambda x: rotor_at(truth, np.array([x]), v_ref, rho)[0][0], thrust)
        power = v_ref * rotor_at(truth, np.array([d]), v_ref, rho)[1][0]
        area = math.pi * truth["diameter_m"] ** 2 / 4.0
        k_true = thrust / (2.0 * rho * area * power * power) ** (1.0 / 3.0)
        assert sf["value"] == pytest.approx(k_true, rel=0.01), r["seed"]


def test_the_watch_reads_the_hover_thrust_from_hover_power_within_1_percent(fitted):
    from estimator.watch.thrust_table import thrust_from_power_total_N

    for r in fitted:
        truth, params = r["truth"], r["params"]
        vh = truth["vehicle"]
        n, rho = vh["rotors"], truth["rho"]
        v_oc, weight = vh["cells"] * vh["nominal_cell_V"], vh["mass_kg"] * G0

        def total(x):
            return n * at_supply(truth, np.array([x]), v_oc, vh["r_pack"], rho, n)[0][0]
        d = _duty_for(total, weight)
        _, bus, current = at_supply(truth, np.array([d]), v_oc, vh["r_pack"], rho, n)
        implied = thrust_from_power_total_N(bus[0] * current[0], params, n, rho)
        assert implied == pytest.approx(weight, rel=0.01), r["seed"]


def test_static_factor_at_refuses_k_above_one_and_gives_the_line_error():
    from estimator.errors import InputError
    from estimator.params import static_factor_at

    rho, area = 1.2, math.pi * 0.127 ** 2
    # ideal power P = T^1.5 / sqrt(2 rho A) (momentum theory) gives k = 1: a rotor drawing 5 % more
    # has k = 1.05^(-2/3); one drawing 10 % less is impossible (k = 0.9^(-2/3) > 1)
    ideal = {"idle_power_W": 0.0, "sqrt_W_per_N0_5": 0.0, "linear_W_per_N": 0.0, "copper_W_per_N2": 0.0,
             "induced_W_per_N1_5": 1.0 / math.sqrt(2.0 * rho * area), "reference_density_kg_m3": rho}
    cov = [[4e-4, -1e-5], [-1e-5, 9e-7]]
    real = dict(ideal, induced_W_per_N1_5=1.05 * ideal["induced_W_per_N1_5"])
    k, se = static_factor_at(real, 5.0, rho, area, cov, "s.csv", "hover")
    assert k == pytest.approx(1.05 ** (-2.0 / 3.0), rel=1e-9)
    # the error of k0 + slope T at T = 5 N: sqrt(g C g') with g = (1, T) (variance of a linear form)
    g = np.array([1.0, 5.0])
    assert se == pytest.approx(math.sqrt(g @ np.array(cov) @ g), rel=1e-12)
    under = dict(ideal, induced_W_per_N1_5=0.9 * ideal["induced_W_per_N1_5"])
    with pytest.raises(InputError, match=r"s.csv: static thrust factor 1.07 at hover is above 1"):
        static_factor_at(under, 5.0, rho, area, cov, "s.csv", "hover")
