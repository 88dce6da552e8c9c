"""How the bench fit speaks: commands and thrusts in the units of the user's CSV (grams in,
grams out; microseconds logged, microseconds shown), values with their standard errors in
matching digits, plain decimals rather than exponent forms."""

import math

from estimator.units import COMMAND_SHOWN, command_text, plain_number


def command_with_error(u, se, unit):
    """A command [-] and its standard error [-] in the CSV's command unit, in matching digits
    (value_and_error): '1200.0 us +- 2.3 us', '18.6 % +- 1.3 %', '0.186 +- 0.013'."""
    scale, offset, suffix, _ = COMMAND_SHOWN.get(unit, COMMAND_SHOWN["-"])
    tail = " " + unit if suffix else ""
    value, error = value_and_error(offset + scale * u, scale * se)
    if not error:
        return command_text(u, unit)
    if u - se < 0.0 <= u:  # a command is never below zero: the bound, not '70 +- 180'
        return "%s (%s..%s within one standard error)" % (
            command_text(u, unit), command_text(0.0, unit).split(" ")[0], command_text(u + se, unit))
    return "%s%s +- %s%s" % (value, tail, error, tail)


def value_and_error(value, se, digits=4, max_digits=None):
    """(value text, error text): the error to two significant digits and the value rounded to
    the same decimal place (1873 +- 7.0, 15410 +- 120), the usual way of quoting a result
    with its standard error (e.g. NIST Technical Note 1297, sec. 7, from memory); without an
    error (se 0), the value to ``digits`` significant digits and an empty error text.
    max_digits: the value never gets more significant digits than this; an error below its
    last place is then written as a bound ('2.000', 'below 0.001')."""
    if not se > 0.0 or not math.isfinite(se):
        return plain_number(value, digits), ""
    place = int(math.floor(math.log10(se))) - 1  # the error's second significant digit
    if max_digits and value != 0.0 and math.isfinite(value):
        coarsest = int(math.floor(math.log10(abs(value)))) - (max_digits - 1)
        if se < 0.5 * 10.0 ** coarsest:  # rounds to zero at the value's last place
            decimals = max(0, -coarsest)
            return ("%.*f" % (decimals, round(value, -coarsest)),
                    "below %s" % ("%.*f" % (decimals, 10.0 ** coarsest)))
        place = max(place, coarsest)
    decimals = max(0, -place)
    return ("%.*f" % (decimals, round(value, -place)), "%.*f" % (decimals, round(se, -place)))


def thrust_text(thrust_N, unit, se_N=None):
    """A thrust [N] written in the unit of the CSV's thrust column (grams in, grams out);
    with se_N [N], 'value unit +- error unit' in matching digits (value_and_error)."""
    from estimator.bench.columns import UNITS

    scale = UNITS["thrust"].get(unit, (1.0, 0.0))[0]
    if se_N is None:
        return "%s %s" % (plain_number(thrust_N / scale), unit)
    value, error = value_and_error(thrust_N / scale, se_N / scale)
    return "%s %s +- %s %s" % (value, unit, error, unit) if error else "%s %s" % (value, unit)


# a spin-up command whose standard error exceeds this (a 95 % interval wider than +-0.05) is
# called poorly determined: the sweep cannot tell where the ESC's duty starts from the shape
# of its duty curve (the duty exponent) [-]
START_POORLY_DETERMINED = 0.025


def fit_warnings(curve, motor, lv, command_unit="-", thrust_unit="N"):
    """The fit's own warnings, with numbers, in the CSV's units: full command beyond the sweep
    or at the ESC's top end point, the full-command thrust quoted above every thrust measured,
    a poorly determined spin-up command. curve: estimator.bench.curve_fit.fit_curve's dict;
    motor: the parameter set's motor_model block; lv: the levels. Returns a list of texts."""
    return (_range_warnings(curve, motor["command_top"], motor["top_end_found"], command_unit, thrust_unit)
            + _reference_warning(curve, lv, command_unit, thrust_unit) + _start_warning(motor, command_unit))


def _range_warnings(curve, command_top, top_found, unit="-", thrust_unit="N"):
    """Warnings with numbers when the parameter set's full command lies beyond the sweep."""
    out = []
    ex = curve.get("extrapolation")
    if top_found:
        out.append("thrust levels off above command %s: the ESC's top end point; thrust_max_N is the "
                   "thrust there (command_max), commands above it add nothing" % command_text(command_top, unit))
    elif ex is not None:
        out.append("the sweep stops at command %s: full-command thrust %s is the motor model's "
                   "extrapolation from there (it gives %s at the sweep's top, %.2f x the speed) to %s; "
                   "thrust-to-weight and full-command current rest on it. If the ESC's end point is below "
                   "%s (a narrower pulse range), full thrust comes earlier. Sweep to full command to "
                   "measure it" % (command_text(curve["command_swept_max"], unit),
                                   thrust_text(curve["thrust_max_N"], thrust_unit,
                                               curve["standard_errors"]["thrust_max_N"]),
                                   thrust_text(ex["thrust_top_N"], thrust_unit), ex["speed_ratio"],
                                   command_text(command_top, unit), command_text(command_top, unit)))
    return out


def extrapolation_refusal(curve, source, command_unit="-", thrust_unit="N"):
    """The refusal of a full-command thrust extrapolated beyond a sweep that stops short, when
    curve_fit judged it not credible (curve["extrapolation"]["credible"]); None otherwise."""
    ex = curve.get("extrapolation")
    if ex is None or ex["credible"]:
        return None
    t_max, se = curve["thrust_max_N"], curve["standard_errors"]["thrust_max_N"]
    why = ("not above the %s the model gives at the sweep's top" % thrust_text(ex["thrust_top_N"], thrust_unit)
           if not t_max > ex["thrust_top_N"] else "standard error %.0f %% of it" % (100.0 * se / t_max))
    return ("%s: the sweep stops at command %s, and the full-command thrust the motor model extrapolates from "
            "there, %s, is not credible (%s): the sweep's thrust and current do not pin the motor's "
            "speed and losses far enough beyond its top. Sweep to a higher command (full command if the "
            "stand allows)" % (source, command_text(curve["command_swept_max"], command_unit),
                               thrust_text(t_max, thrust_unit, se), why))


def _reference_warning(curve, lv, command_unit="-", thrust_unit="N"):
    """A warning when the full-command thrust, quoted at the reference voltage (the sweep's
    median bus voltage), lies above every thrust level measured by more than its standard
    error: the rows at full command ran at a lower bus voltage (a supply sagging under load),
    and the curve there gives less. [] otherwise."""
    import numpy as np

    from estimator.bench.curve_fit import thrust_model_N

    t_max, se = curve["thrust_max_N"], curve["standard_errors"]["thrust_max_N"]
    t_seen = float(np.max(lv["thrust_N"]))
    if curve.get("extrapolation") is not None:
        return []  # full command lies beyond the sweep: _range_warnings says so
    if not t_max > t_seen + se:
        return []
    top = lv["command"] >= curve["command_max"] - 0.005
    if not np.any(top):
        top = lv["command"] >= float(np.max(lv["command"])) - 0.005
    v_all = lv["voltage_V"][top]
    v_top = float(np.median(v_all))
    t_there = float(thrust_model_N(curve, np.array([curve["command_max"]]), np.array([v_top]))[0])
    ran = "%.2f V" % v_top
    if float(np.ptp(v_all)) > 0.01 * v_top:  # several supplies
        ran = "%.2f..%.2f V (median %.2f V)" % (float(np.min(v_all)), float(np.max(v_all)), v_top)
    return ["full-command thrust %s is the curve at the reference voltage %.2f V (the sweep's median bus "
            "voltage), above the highest thrust measured (%s): the full-command rows ran at %s, where "
            "the curve gives %s; on a pack, full command gives the thrust at the pack's own sagged voltage"
            % (thrust_text(t_max, thrust_unit), curve["reference_voltage_V"], thrust_text(t_seen, thrust_unit),
               ran, thrust_text(t_there, thrust_unit))]


def _start_warning(motor_block, unit="-"):
    """A warning when the spin-up command is poorly determined (standard error beyond
    START_POORLY_DETERMINED); [] otherwise."""
    se = motor_block["command_start_standard_error"]
    if not se > START_POORLY_DETERMINED:
        return []
    return ["the rotor's start command %s is poorly determined by this sweep: it trades off against the "
            "ESC's duty curve (duty exponent %.2f fitted); log more command steps just above idle to pin "
            "it. The hover command and current come from the fitted duty curve as a whole and do not "
            "rest on it" % (command_with_error(motor_block["command_start"], se, unit),
                            motor_block["duty_exponent"])]
