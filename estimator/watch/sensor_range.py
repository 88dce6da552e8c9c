"""The watch's sensor ranges for one vehicle: bus voltage and current beyond them are a sensor
fault. Every kernel intermediate stays below 2^30 within 0-60 V and 0-300 A (the bounds in
estimator/core/watch_layout.py), so those are the most the watch reads."""

from estimator.core import watch_layout as layout
from estimator.errors import InputError

# the highest bounds CONFIG takes (watch_layout.SCALARS, the one place they are written)
_BOUND = {name: hi for name, lo, hi in layout.SCALARS}
V_SENSOR_MAX_V = _BOUND["v_max_mV"] / 1000.0
I_SENSOR_MAX_A = _BOUND["i_max_mA"] / 1000.0


def pack_voltages(facts, curve):
    """(full, empty) open-circuit pack voltage [V] the watch and the log checks judge against: the
    vehicle's (facts: vehicle_facts; a parameter set's vehicle block always has them), else the
    set's reference voltage curve["reference_voltage_V"] [V] x 1.15 and x 0.85 (a lithium pack's
    4.2 V full and 3.1 V empty a cell around 3.7 V nominal, common practice)."""
    v_ref = curve["reference_voltage_V"]
    return (float(facts.get("full_voltage_V") or v_ref * 1.15), float(facts.get("empty_voltage_V") or v_ref * 0.85))


def voltage_range_mV(v_full, v_empty):
    """(v_min_mV, v_max_mV, notes) for a pack of v_full / v_empty [V]: half the empty voltage to
    1.2 x the full one, at most 60 V; raises InputError when a full pack leaves less than 5 %."""
    if 1.05 * v_full > V_SENSOR_MAX_V:
        raise InputError("vehicle: full pack voltage %.1f V: the watch reads bus voltages up to %.0f V and needs "
                         "5 %% above a full pack, so it runs on packs of at most %.1f V full (13S LiPo at 4.2 V a "
                         "cell: 54.6 V); this pack is beyond the watch, not beyond the vehicle"
                         % (v_full, V_SENSOR_MAX_V, V_SENSOR_MAX_V / 1.05))
    v_min_mV = int(round(0.5 * v_empty * 1000.0))
    v_max_mV = min(int(V_SENSOR_MAX_V * 1000), int(round(1.2 * v_full * 1000.0)))
    return v_min_mV, v_max_mV, (
        "below half the empty-pack voltage %.2f V: sensor fault" % v_empty,
        "above %.2f V (1.2 x full pack %.2f V, at most the watch's %.0f V): sensor fault"
        % (v_max_mV / 1000.0, v_full, V_SENSOR_MAX_V))


def current_range_mA(i_full, motors_max_A=None, max_A=None, min_A=None, upper=True):
    """(i_min_mA, i_max_mA, notes, warning or None): the current range [mA] for a vehicle whose full
    command on a full pack draws i_full [A]: max_A (an option) or 1.5 x the motors' limit
    motors_max_A [A], else 1.5 x i_full, at most 300 A; min_A or -max(0.2 A, 1 % of the range)
    (a sensor's zero offset and noise). The warning says when i_full is beyond the range, and
    where i_full comes from: upper True, the power model without pack sag (an upper figure),
    else the pre-flight sheet's (the set's motor model on the vehicle's sagging pack)."""
    wanted = max_A or max(1.0, 1.5 * (motors_max_A or i_full))
    i_max = min(wanted, I_SENSOR_MAX_A)
    i_min = min_A if min_A is not None else -max(0.2, 0.01 * i_max)
    basis = (FULL_CURRENT_UPPER if upper else FULL_CURRENT_PREFLIGHT) % i_full
    notes = ("current below %.2f A is a sensor fault%s" % (
        i_min, "" if min_A is not None else " (1 %% of the %.0f A range, at least 0.2 A: zero "
        "offset and noise of the sensor)" % i_max),
        "current above %.1f A is a sensor fault [mA] (%s%s)" % (
        i_max, "the option current_max_A" if max_A else
        "1.5 x the motors' limit %.1f A" % motors_max_A if motors_max_A else
        "1.5 x the full-command current: %s" % basis,
        " = %.0f A, capped at the watch's %.0f A" % (wanted, I_SENSOR_MAX_A) if wanted > I_SENSOR_MAX_A else ""))
    i_max_mA = int(round(i_max * 1000.0))
    warning = None
    if i_full > i_max_mA / 1000.0:
        warning = ("full command on a full pack draws %sabout %.0f A, beyond the watch's current-sensor range (%.0f A%s): "
                   "a full-throttle climb reads as a sensor_fault and the alarms pause until the current is back in "
                   "range; %s" % ("up to " if upper else "", i_full, i_max,
                                  "" if i_max < I_SENSOR_MAX_A else ", the most it reads", basis))
    return int(round(i_min * 1000.0)), i_max_mA, notes, warning


# where the full-command current on a full pack comes from (current_range_mA's words)
FULL_CURRENT_PREFLIGHT = ("%.0f A is the pre-flight sheet's figure (liftcal hover VEHICLE --params SET: the set's motor "
                          "model on the vehicle's sagging pack)")
FULL_CURRENT_UPPER = ("%.0f A is an upper figure (the set's power model at the full pack voltage, without the pack's "
                      "sag; give --vehicle for the pre-flight sheet's figure on the sagging pack)")
