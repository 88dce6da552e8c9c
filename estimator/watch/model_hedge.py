"""The hedge on a replay's power event beyond the sweep's bus voltages when the voltage exponent
was not measured: how much of the event's residual the extrapolation could explain, and the
"may be the model, not the rotor" caution only when that is a fair share of it (new-user trial
12, finding 5: a +12.8 % power_high 0.5 % below the sweep's lowest voltage was hedged away,
though the gap moves the expected power by about 1 %)."""

import math

# events whose verdict rests on the expected power at the present bus voltage
POWER_KINDS = ("power_high", "power_low", "baseline_off")
# expected power grows as thrust^1.5 at a hover (momentum theory: P = T^1.5 / sqrt(2 rho A),
# Rankine-Froude actuator disk, e.g. Leishman, Principles of Helicopter Aerodynamics, ch. 2, from
# memory); real rotors grow a little slower, so 1.5 bounds the power error of a thrust error [-]
POWER_PER_THRUST_EXPONENT = 1.5
# the gap explains a fair share of a residual from this part of it on: then the residual may be
# the model's, and the full hedge is given [-] (a judgement: half)
FAIR_SHARE = 0.5


def exponent_not_measured(params):
    """True when the parameter set's voltage exponent was not measured: its sweep ran from one
    supply voltage, and n comes from the fitted motor model with the ESC's duty held near
    linear (thrust_curve.voltage_exponent_source "motor model", estimator.bench.motor_fit)."""
    return params["thrust_curve"].get("voltage_exponent_source") == "motor model"


def exponent_span():
    """(lowest, highest) voltage exponent a parameter set may hold [-] (schemas/params.schema.json)."""
    from estimator.jsonio import load_schema

    node = load_schema("params.schema.json")["properties"]["thrust_curve"]["properties"]["voltage_exponent"]
    return float(node["minimum"]), float(node["maximum"])


def gap_effect(bus_V, edge_V, n):
    """The largest change of the expected power [-] that a wrong voltage exponent can make at a bus
    voltage beyond the sweep: |(V / V_e)^(1.5 dn) - 1|, dn the exponent's largest distance to
    either end of the parameter set's bounds (exponent_span), V_e the sweep's nearest voltage.

    The thrust factor extrapolates as (V / V_e)^n from the sweep's edge, so an exponent off by dn
    moves the expected thrust by (V / V_e)^dn and the expected power by that to the 1.5
    (POWER_PER_THRUST_EXPONENT, momentum theory). bus_V, edge_V [V]; n [-] the set's exponent.
    """
    lo, hi = exponent_span()
    dn = max(n - lo, hi - n, 0.0)
    return abs(math.exp(POWER_PER_THRUST_EXPONENT * dn * abs(math.log(bus_V / edge_V))) - 1.0)


def exponent_note(event, params):
    """A note for a power event whose bus voltage lies outside the sweep's when the voltage
    exponent was not measured, else None. It names the bus voltage and the gap, and how much of
    the residual the gap could explain at most (gap_effect). When that is at least FAIR_SHARE of
    the residual (or the event has no residual), the expected power there is extrapolated with an
    n known only to its standard error, so the residual may be the model's, not the rotor's: the
    note says so and asks for a sweep at two or three voltages; else it says the gap cannot
    explain the residual. event: a run_kernel event (bus_V [V], residual [-]); params: the set."""
    bus = event.get("bus_V")
    if event["kind"] not in POWER_KINDS or bus is None or not exponent_not_measured(params):
        return None
    c = params["thrust_curve"]
    lo, hi = c.get("voltage_min_V"), c.get("voltage_max_V")
    if lo is None or hi is None or lo <= bus <= hi:
        return None
    where = ("%.1f %% below the sweep's lowest (%.2f V)" % (100.0 * (1.0 - bus / lo), lo) if bus < lo
             else "%.1f %% above the sweep's highest (%.2f V)" % (100.0 * (bus / hi - 1.0), hi))
    se = params.get("standard_errors", {}).get("voltage_exponent", 0.0)
    n = "%.2f +- %.2f" % (c["voltage_exponent"], se) if se > 0.0 else "%.2f, no error bar" % c["voltage_exponent"]
    effect = gap_effect(bus, lo if bus < lo else hi, c["voltage_exponent"])
    residual = event.get("residual")
    span = "%g..%g" % exponent_span()
    if residual is not None and effect < FAIR_SHARE * abs(residual):
        return ("bus %.2f V at the alarm, %s; the voltage exponent was not measured (n = %s), but even "
                "with n anywhere in %s the gap moves the expected power by at most %.1f %%, not the %+.1f %% "
                "of this alarm: the voltage gap does not explain it" % (bus, where, n, span, 100.0 * effect,
                                                                      100.0 * residual))
    return ("bus %.2f V at the alarm, %s; the voltage exponent was not measured (one supply voltage; n = %s "
            "from the motor model), and with n anywhere in %s the gap alone can move the expected power by "
            "up to %.1f %%: this may be the model, not the rotor. Sweep the rotor at two or three supply "
            "voltages, refit and replay" % (bus, where, n, span, 100.0 * effect))
