"""How the bench fit speaks: commands and thrusts in the units of the user's CSV (grams in,
grams out; microseconds logged, microseconds shown), values with their standard errors in
matching digits, plain decimals rather than exponent forms."""

import math
import re

from estimator.units import plain_number


def command_text(u, unit, span=False):
    """A command [-] written in the unit of the CSV's command column (us, %, permille or -);
    span=True for a difference of commands (no 1000 us offset)."""
    if unit == "us":
        return "%.0f us" % ((0.0 if span else 1000.0) + 1000.0 * u)
    if unit == "permille":
        return "%.0f permille" % (1000.0 * u)
    if unit == "%":
        return "%.1f %%" % (100.0 * u)
    return "%.3f" % u


def command_with_error(u, se, unit):
    """A command [-] and its standard error [-] in the CSV's command unit, in matching digits
    (value_and_error): '1200.0 us +- 2.3 us', '18.6 % +- 1.3 %', '0.186 +- 0.013'."""
    scale, offset, tail = {"us": (1000.0, 1000.0, " us"), "%": (100.0, 0.0, " %"),
                           "permille": (1000.0, 0.0, " permille")}.get(unit, (1.0, 0.0, ""))
    value, error = value_and_error(offset + scale * u, scale * se)
    if not error:
        return command_text(u, unit)
    if u - se < 0.0 <= u:  # a command is never below zero: the bound, not '70 +- 180'
        return "%s (%s..%s within one standard error)" % (
            command_text(u, unit), command_text(0.0, unit).split(" ")[0], command_text(u + se, unit))
    return "%s%s +- %s%s" % (value, tail, error, tail)


# commands written as fractions of full command by the pre-flight warnings (estimator.preflight
# .warnings, range_warnings), which the fit shows for its vehicle: 'command 0.62', 'above 0.6 of
# full command', 'command swept (0.950)', '... to 1.000 by the motor model'
_FRACTION = r"(\d*\.\d+)(?![\d.])"
_COMMAND_FRACTIONS = (
    (re.compile(r"\babove %s of full command" % _FRACTION), "above %s"),
    (re.compile(r"\bcommand swept \(%s\)" % _FRACTION), "command swept (%s)"),
    (re.compile(r"\bto %s by the motor model" % _FRACTION), "to %s by the motor model"),
    (re.compile(r"\bcommand %s" % _FRACTION), "command %s"),
)


def in_sweep_units(text, unit):
    """A warning of the pre-flight flow with its commands (fractions of full command) written in
    the sweep's command unit (us, %, permille), as the rest of the fit speaks; unchanged for [-]."""
    if unit not in ("us", "%", "permille"):
        return text
    for pattern, form in _COMMAND_FRACTIONS:
        text = pattern.sub(lambda m: form % command_text(float(m.group(1)), unit), text)
    return text


def value_and_error(value, se, digits=4):
    """(value text, error text): the error to two significant digits and the value rounded to
    the same decimal place (1873 +- 7.0, 15410 +- 120), the usual way of quoting a result
    with its standard error (e.g. NIST Technical Note 1297, sec. 7, from memory); without an
    error (se 0), the value to ``digits`` significant digits and an empty error text."""
    if not se > 0.0 or not math.isfinite(se):
        return plain_number(value, digits), ""
    place = int(math.floor(math.log10(se))) - 1  # the error's second significant digit
    decimals = max(0, -place)
    return ("%.*f" % (decimals, round(value, -place)), "%.*f" % (decimals, round(se, -place)))


def thrust_text(thrust_N, unit, se_N=None):
    """A thrust [N] written in the unit of the CSV's thrust column (grams in, grams out);
    with se_N [N], 'value unit +- error unit' in matching digits (value_and_error)."""
    from estimator.bench.reader import UNITS

    scale = UNITS["thrust"].get(unit, (1.0, 0.0))[0]
    if se_N is None:
        return "%s %s" % (plain_number(thrust_N / scale), unit)
    value, error = value_and_error(thrust_N / scale, se_N / scale)
    return "%s %s +- %s %s" % (value, unit, error, unit) if error else "%s %s" % (value, unit)


# why the optional columns of a sweep are read (checked as numbers) but not used
OPTIONAL_WHY = ("the fit takes each row's command, voltage, current and thrust; its motor model "
                "needs neither rotor speed nor torque, and it does not correct for time or temperature")


def column_use(columns):
    """Which columns of the bench CSV the fit used, from the reader's ``columns``: {"fitted":
    ["command[us]", ...], "read_not_used": ["rpm[rpm]", ...] (the optional columns,
    estimator.bench.reader.OPTIONAL, read and checked as numbers), "why_not_used": text}."""
    return dict(columns, why_not_used=OPTIONAL_WHY)


def columns_note(use):
    """The fit summary's one line from column_use(columns)."""
    from estimator.bench.reader import OPTIONAL

    fitted = ", ".join(use["fitted"])
    if not use["read_not_used"]:
        return "columns fitted: %s; no optional column (%s: read and checked, not used)" % (
            fitted, ", ".join("%s[%s]" % (n, next(iter(u))) for n, u in OPTIONAL.items()))
    return "columns fitted: %s; read and checked, not used: %s (%s)" % (
        fitted, ", ".join(use["read_not_used"]), use["why_not_used"])
