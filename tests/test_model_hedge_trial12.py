"""The "may be the model, not the rotor" hedge on a replay alarm beyond the sweep's bus voltages
is proportionate to how much of the residual the voltage gap can explain (new-user trial 12,
finding 5: a +12.8 % power_high 0.5 % below the sweep's lowest voltage carried it, though such a
gap moves the expected power by about 1 %, and a real +15 % fault was hedged away).

Reference for the bound: thrust extrapolates as (V / V_e)^n (the parameter set's controller
curve); power at a hover grows as thrust^1.5 (momentum theory, Rankine-Froude actuator disk, e.g.
Leishman, Principles of Helicopter Aerodynamics, ch. 2, from memory); n anywhere in the parameter
set's bounds 0.5..3 (schemas/params.schema.json).
"""

import math

import pytest

from estimator.watch.replay import exponent_note

# the tester's one-voltage hex sweep: 24.47..25.03 V, n = 1.73 +- 0.11 from the motor model
PARAMS = {"thrust_curve": {"voltage_exponent_source": "motor model", "voltage_min_V": 24.47,
                           "voltage_max_V": 25.03, "voltage_exponent": 1.73},
          "standard_errors": {"voltage_exponent": 0.11}}


def _bound(bus, edge, n=1.73):
    # the exponent off by dn either way: the larger of the two changes of (bus / edge)^(1.5 n)
    dn = max(n - 0.5, 3.0 - n)
    return max(abs((bus / edge) ** (1.5 * s * dn) - 1.0) for s in (1, -1))


def test_a_small_gap_does_not_hedge_a_large_residual_and_says_how_much_it_could_explain():
    event = {"t_s": 151.0, "kind": "power_high", "residual": 0.128, "bus_V": 24.36}
    note = exponent_note(event, PARAMS)
    assert "may be the model" not in note and "Sweep the rotor" not in note, note
    bound = _bound(24.36, 24.47)
    assert bound == pytest.approx(0.0086, abs=0.001)  # about 1 %, the tester's hand estimate
    assert "at most %.1f %%" % (100 * bound) in note and "+12.8 %" in note
    assert note.startswith("bus 24.36 V at the alarm, 0.4 % below the sweep's lowest (24.47 V)")


@pytest.mark.parametrize("bus, residual", [
    (24.36, 0.012),                    # 0.5 % below: 0.85 % of a 1.2 % residual is most of it
    (0.95 * 24.47, -0.07),             # 5 % below: up to 10 % against 7 %
    (1.04 * 25.03, 0.06),              # 4 % above the highest: up to 7.6 % against 6 %
])
def test_a_gap_that_can_explain_the_residual_keeps_the_full_hedge(bus, residual):
    event = {"t_s": 200.0, "kind": "power_low" if residual < 0 else "power_high", "residual": residual,
             "bus_V": bus}
    note = exponent_note(event, PARAMS)
    edge = 24.47 if bus < 24.47 else 25.03
    assert _bound(bus, edge) >= 0.5 * abs(residual)
    assert "may be the model, not the rotor" in note and "Sweep the rotor at two or three" in note
    assert "up to %.1f %%" % (100 * _bound(bus, edge)) in note


def test_inside_the_sweep_or_measured_no_note():
    event = {"t_s": 1.0, "kind": "power_high", "residual": 0.2, "bus_V": 24.8}
    assert exponent_note(event, PARAMS) is None
    measured = dict(PARAMS, thrust_curve=dict(PARAMS["thrust_curve"], voltage_exponent_source="fitted"))
    assert exponent_note(dict(event, bus_V=20.0), measured) is None
    assert math.isfinite(_bound(20.0, 24.47))
