"""DC motor + propeller + ESC operating point and the shared pack sag, against scipy's brentq."""

import math

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from estimator.core.motor import motor_input_for_thrust, rotor_operating_point
from estimator.core.propulsion import shared_operating_point, shared_point_for_thrust

brentq = pytest.importorskip("scipy.optimize").brentq

# the (invented) demo motor and propeller of design notes sec. 4, SI keys
MOTOR = {"kv_rpm_per_V": 880.0, "resistance_ohm": 0.09, "no_load_current_A": 0.7}
PROP = {"diameter_m": 0.254, "ct": 0.110, "cp": 0.045}
RHO = 1.10


def _reference_rotor(duty, bus_V, rho, esc_eff=1.0):
    """The design-notes equations written out again, solved with scipy.optimize.brentq."""
    kv = MOTOR["kv_rpm_per_V"] * 2.0 * math.pi / 60.0
    d_m = PROP["diameter_m"]

    def torque(omega):
        n = omega / (2.0 * math.pi)
        return PROP["cp"] * rho * n * n * d_m ** 5 / (2.0 * math.pi)

    def voltage_gap(omega):  # Vm - (E + I Rm), I = I0 + Q Kt^-1, Kt = 1 / Kv
        current = MOTOR["no_load_current_A"] + torque(omega) * kv
        return duty * bus_V - (omega / kv + current * MOTOR["resistance_ohm"])

    omega = brentq(voltage_gap, 0.0, kv * bus_V + 1.0, xtol=1e-12, rtol=1e-14)
    n = omega / (2.0 * math.pi)
    current = MOTOR["no_load_current_A"] + torque(omega) * kv
    return omega, PROP["ct"] * rho * n * n * d_m ** 4, current, duty * current / esc_eff


@pytest.mark.parametrize("duty", [0.2, 0.45, 0.7, 1.0])
def test_single_rotor_against_brentq(duty):
    # Source: scipy.optimize.brentq (bracketed root) on the same equations (design notes
    # sec. 3). Our closed-form quadratic root must agree to round-off: 1e-9 relative.
    op = rotor_operating_point(duty, 14.8, RHO, MOTOR, PROP, 0.95)
    omega, thrust, current, bus_current = _reference_rotor(duty, 14.8, RHO, 0.95)
    assert op["omega_rad_s"] == pytest.approx(omega, rel=1e-9)
    assert op["thrust_N"] == pytest.approx(thrust, rel=1e-9)
    assert op["motor_current_A"] == pytest.approx(current, rel=1e-9)
    assert op["bus_current_A"] == pytest.approx(bus_current, rel=1e-9)


def test_energy_balance_of_the_motor():
    # Conservation: Vm I = P_shaft + I^2 Rm + E I0 (E = omega / Kv). Exact algebra; 1e-9.
    op = rotor_operating_point(0.6, 14.8, RHO, MOTOR, PROP)
    kv = MOTOR["kv_rpm_per_V"] * 2.0 * math.pi / 60.0
    i = op["motor_current_A"]
    losses = i * i * MOTOR["resistance_ohm"] + op["omega_rad_s"] / kv * MOTOR["no_load_current_A"]
    assert op["motor_voltage_V"] * i == pytest.approx(op["shaft_power_W"] + losses, rel=1e-9)
    assert op["electrical_power_W"] == pytest.approx(op["motor_voltage_V"] * i, rel=1e-12)  # ideal ESC


def test_zero_resistance_motor_spins_at_kv_times_voltage():
    # With Rm = 0 the back-EMF equals the terminal voltage: omega = Kv Vm (definition of Kv).
    motor = dict(MOTOR, resistance_ohm=0.0)
    op = rotor_operating_point(0.5, 12.0, RHO, motor, PROP)
    assert op["omega_rad_s"] == pytest.approx(880.0 * 2.0 * math.pi / 60.0 * 6.0, rel=1e-12)


@pytest.mark.parametrize("duty, pack_ohm, rotors", [(1.0, 0.02, 4), (0.6, 0.05, 6), (0.8, 0.3, 8)])
def test_shared_pack_sag_against_brentq(duty, pack_ohm, rotors):
    # Source: scipy.optimize.brentq on V_bus = V_oc - R_pack N I_bus(V_bus) with the
    # reference rotor above. Bisection (60 halvings) ends below 1e-12 V: 1e-9 relative.
    v_oc = 16.8

    def gap(v):
        return v + pack_ohm * rotors * _reference_rotor(duty, v, RHO, 0.95)[3] - v_oc

    v_ref = brentq(gap, 2.0, v_oc, xtol=1e-13)  # at 2 V the rotors draw almost nothing: gap < 0
    op = shared_operating_point(duty, v_oc, pack_ohm, rotors, RHO, MOTOR, PROP, 0.95)
    assert op["bus_V"] == pytest.approx(v_ref, rel=1e-9)
    assert op["pack_current_A"] == pytest.approx((v_oc - v_ref) / pack_ohm, rel=1e-6)
    assert op["bus_V"] < v_oc  # sag is real


def test_closed_form_hover_point_matches_the_bisection():
    # The closed-form inverse (thrust -> duty) must reproduce the forward solver:
    # at its duty, the shared solve gives back the same thrust, voltage and current (1e-8).
    target = 5.0
    hov = shared_point_for_thrust(target, 14.8, 0.02, 4, RHO, MOTOR, PROP, 0.95)
    fwd = shared_operating_point(hov["duty"], 14.8, 0.02, 4, RHO, MOTOR, PROP, 0.95)
    assert fwd["thrust_N"] == pytest.approx(target, rel=1e-8)
    assert fwd["bus_V"] == pytest.approx(hov["bus_V"], rel=1e-8)
    assert fwd["pack_current_A"] == pytest.approx(hov["pack_current_A"], rel=1e-8)
    vm, i, omega = motor_input_for_thrust(target, RHO, MOTOR, PROP)
    assert fwd["omega_rad_s"] == pytest.approx(omega, rel=1e-8)


def test_pack_that_cannot_deliver_is_reported_not_solved():
    # Maximum power from a Thevenin source is V_oc^2 / (4 R) (textbook circuit theory);
    # asking for more leaves no real bus voltage: limited_by == "pack", duty None.
    hov = shared_point_for_thrust(5.0, 14.8, 5.0, 4, RHO, MOTOR, PROP)
    assert hov["limited_by"] == "pack" and hov["duty"] is None
    assert hov["total_power_W"] > 14.8 ** 2 / (4.0 * 5.0)


def test_thrust_grows_about_as_command_to_the_1_8_common_practice():
    # Rule of thumb (common practice, design notes sec. 3a): thrust ~ command^1.8 for a
    # typical set. Fit the exponent over command 0.3..1 with numpy.polyfit in log-log on
    # our model; accept 1.5..2.0 (pure square without losses would give 2).
    np = pytest.importorskip("numpy")
    duties = np.linspace(0.3, 1.0, 15)
    thrusts = [shared_operating_point(float(d), 14.8, 0.02, 4, RHO, MOTOR, PROP, 0.95)["thrust_N"]
               for d in duties]
    slope = np.polyfit(np.log(duties), np.log(thrusts), 1)[0]
    assert 1.5 < slope < 2.0


def test_duty_outside_0_1_is_refused():
    with pytest.raises(ValueError, match="0..1"):
        rotor_operating_point(1.2, 14.8, RHO, MOTOR, PROP)


@settings(max_examples=80, deadline=None)
@given(kv=st.floats(100.0, 3000.0), rm=st.floats(0.0, 0.5), i0=st.floats(0.0, 3.0),
       d=st.floats(0.1, 0.8), ct=st.floats(0.05, 0.15), duty=st.floats(0.05, 1.0),
       volts=st.floats(6.0, 50.0))
def test_closed_form_root_satisfies_the_motor_equation(kv, rm, i0, d, ct, duty, volts):
    # Property: the returned omega solves Vm = omega / Kv + (I0 + Kv Q) Rm (design notes
    # sec. 3) to round-off (1e-9 of Vm), or the motor stalls because Vm <= Rm I0.
    motor = {"kv_rpm_per_V": kv, "resistance_ohm": rm, "no_load_current_A": i0}
    prop = {"diameter_m": d, "ct": ct, "cp": 0.5 * ct}
    op = rotor_operating_point(duty, volts, 1.2, motor, prop)
    vm = duty * volts
    if vm <= rm * i0:
        assert op["omega_rad_s"] == 0.0 and op["thrust_N"] == 0.0
        return
    kv_si = kv * 2.0 * math.pi / 60.0
    rebuilt = op["omega_rad_s"] / kv_si + op["motor_current_A"] * rm
    assert rebuilt == pytest.approx(vm, rel=1e-9, abs=1e-12)
    # more duty never gives less thrust (monotonic: the hover inverse is unique); a step of
    # 0.01 so that the comparison is not between two duties equal to round-off
    if duty <= 0.99:
        assert rotor_operating_point(duty + 0.01, volts, 1.2, motor, prop)["thrust_N"] >= op["thrust_N"]


def test_more_rotors_on_one_pack_sag_it_more():
    # Shared pack: the same duty with more rotors draws more current, so V_bus drops.
    v = [shared_operating_point(0.8, 14.8, 0.05, n, RHO, MOTOR, PROP)["bus_V"] for n in (1, 4, 8)]
    assert v[0] > v[1] > v[2]
