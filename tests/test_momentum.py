"""Static momentum theory identities and the coaxial factor (estimator.core.momentum, propulsion)."""

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from estimator.core import momentum
from estimator.core.propulsion import coaxial_propeller

RHO = 1.225
AREA = momentum.disk_area_m2(0.254)


def test_figure_of_merit_from_coefficients_equals_ideal_over_actual_power():
    # Identity (Leishman 2006 eq. 2.x, from memory): FM = P_ideal / P with
    # P_ideal = T^1.5 / sqrt(2 rho A); in the rev/s coefficient convention this is
    # sqrt(2/pi) CT^1.5 / CP. Checked on dimensional numbers; 1e-12 is round-off.
    ct, cp, d, n = 0.11, 0.045, 0.254, 110.0
    thrust = ct * RHO * n ** 2 * d ** 4
    power = cp * RHO * n ** 3 * d ** 5
    p_ideal = momentum.ideal_power_W(thrust, RHO, momentum.disk_area_m2(d))
    assert momentum.figure_of_merit(ct, cp) == pytest.approx(p_ideal / power, rel=1e-12)


def test_cp_at_unit_figure_of_merit_is_the_ideal_power_coefficient():
    # CP_ideal = sqrt(2/pi) CT^1.5 gives FM = 1 exactly (definition).
    ct = 0.1
    assert momentum.figure_of_merit(ct, math.sqrt(2.0 / math.pi) * ct ** 1.5) == pytest.approx(1.0, rel=1e-12)


@settings(max_examples=60, deadline=None)
@given(thrust=st.floats(0.1, 500.0), rho=st.floats(0.3, 1.5), d=st.floats(0.05, 2.0))
def test_thrust_power_round_trip_and_three_halves_law(thrust, rho, d):
    # Momentum theory: P = T^1.5 / sqrt(2 rho A) and T = (2 rho A P^2)^(1/3) are inverses
    # (exact algebra, 1e-9 relative is round-off); doubling thrust costs 2^1.5 the power.
    a = momentum.disk_area_m2(d)
    p = momentum.ideal_power_W(thrust, rho, a)
    assert momentum.ideal_thrust_N(p, rho, a) == pytest.approx(thrust, rel=1e-9)
    assert momentum.ideal_power_W(2.0 * thrust, rho, a) == pytest.approx(2.0 ** 1.5 * p, rel=1e-9)
    # induced velocity: P_ideal = T v (actuator disk, Leishman 2006 eq. 2.14, from memory)
    assert p == pytest.approx(thrust * momentum.induced_velocity_m_s(thrust, rho, a), rel=1e-9)


def test_static_factor_and_efficiency():
    # Design notes sec. 3: T = k (2 rho A P^2)^(1/3) is equivalent to eta = k^(3/2); a k of
    # 0.3 means only about 16 % of the power does ideal work (sec. 3a). Exact algebra.
    power = 150.0
    for k in (0.3, 0.5, 0.7, 1.0):
        thrust = momentum.thrust_from_power_N(power, k, RHO, AREA)
        eta = momentum.ideal_power_W(thrust, RHO, AREA) / power
        assert eta == pytest.approx(k ** 1.5, rel=1e-12)
        assert momentum.static_factor(thrust, power, RHO, AREA) == pytest.approx(k, rel=1e-12)
        assert momentum.power_from_thrust_W(thrust, k, RHO, AREA) == pytest.approx(power, rel=1e-12)
    assert 0.3 ** 1.5 == pytest.approx(0.16, abs=0.005)


def test_hover_power_handbook_order_of_magnitude():
    # Worked example by hand (published formula, Leishman 2006 eq. 2.15): a 2 kg quad,
    # 10 in props, sea level: each rotor 4.90 N, ideal power 4.90^1.5 / sqrt(2 * 1.225 *
    # 0.05067) = 30.8 W. Tolerance 0.3 %: hand rounding to 3 digits.
    t = 2.0 * 9.80665 / 4.0
    assert momentum.ideal_power_W(t, RHO, AREA) == pytest.approx(30.8, rel=3e-3)


def test_coaxial_induced_power_factor_from_momentum_theory():
    # Derivation (Leishman 2006 ch. 6, lower rotor in the fully developed slipstream of the
    # upper, equal thrusts; from memory): per rho A = 1 and v_u = 1, the upper rotor makes
    # T_u = 2 and its slipstream (area A/2, speed 2) carries mass flow 1. The lower rotor adds
    # v_l across its whole disk: mass flow m = 1 + v_l. Momentum: T_u + T_l = m w (far-wake
    # speed w). Energy: P_u + P_l = m w^2 / 2 with P_u = T_u v_u, P_l = T_l (v_u + v_l).
    # Solved with scipy's bracketed root finder, independently of our constant.
    brentq = pytest.importorskip("scipy.optimize").brentq
    t_u = 2.0

    def energy_gap(v_l):
        m = 1.0 + v_l
        w = 2.0 * t_u / m  # T_l = T_u
        return t_u * 1.0 + t_u * (1.0 + v_l) - 0.5 * m * w * w

    v_l = brentq(energy_gap, 1e-6, 10.0, xtol=1e-14)
    factor = (t_u * 1.0 + t_u * (1.0 + v_l)) / (2.0 * t_u * 1.0)  # over two isolated rotors
    assert factor == pytest.approx((1.0 + math.sqrt(17.0)) / 4.0, rel=1e-10)  # closed form
    # momentum.COAXIAL_INDUCED_POWER_FACTOR is quoted to 5 digits: 1e-4 relative
    assert momentum.COAXIAL_INDUCED_POWER_FACTOR == pytest.approx(factor, rel=1e-4)


def test_coaxial_propeller_adds_the_extra_ideal_induced_power():
    # Power basis (propulsion.coaxial_propeller): CP grows by (kappa - 1) times the ideal
    # power coefficient, CT unchanged, so the ideal-power shortfall is (kappa - 1) P_ideal.
    prop = {"diameter_m": 0.254, "ct": 0.11, "cp": 0.045}
    coax = coaxial_propeller(prop)
    ideal_cp = math.sqrt(2.0 / math.pi) * 0.11 ** 1.5
    assert coax["ct"] == prop["ct"]
    assert coax["cp"] - prop["cp"] == pytest.approx((momentum.COAXIAL_INDUCED_POWER_FACTOR - 1.0) * ideal_cp,
                                                    rel=1e-12)
    assert momentum.figure_of_merit(coax["ct"], coax["cp"]) < momentum.figure_of_merit(prop["ct"], prop["cp"])
    assert prop["cp"] == 0.045  # input not modified
