"""Load-cell setup checks on a bench sweep: a reversed sign, and a cell not zeroed (tare).

Both are setup slips a builder makes on the bench (common practice: tare the cell with the
propeller mounted and the motor off; mount it so that thrust reads positive). They are
judged from the data alone: thrust must grow with the power the motor takes, and a rotor
that stands still (the power at its idle value) makes no thrust.
"""

import numpy as np

from estimator.errors import InputError
from estimator.bench.columns import UNITS
from estimator.units import plain_number

# rows judged for the sign: a systematic subsample of at most this many [-]
SIGN_ROWS = 20000
# levels whose power is within this share of the power range above the lowest level power
# are taken as the rotor standing (the ESC's own idle current only) [-]
STANDING_POWER_SHARE = 0.01
# a standing rotor's mean thrust beyond this share of the largest level thrust is a tare
# offset; honest idle readings scatter around zero far below it [-]
TARE_SHARE = 0.015
# the standing levels' thrusts may spread by at most this share of the offset for the offset to
# be subtracted (a rotor turning slowly at idle power makes thrust that rises with command) [-]
TARE_FLAT_SHARE = 0.25


def _in_unit(thrust_N, unit):
    """A thrust [N] in the CSV's unit, three significant digits, never in exponent form."""
    return "%s %s" % (plain_number(thrust_N / UNITS["thrust"][unit][0], 3), unit)


def check_thrust_sign(source, thrust_N, power_W, thrust_unit="N"):
    """Refuse a sweep whose thrust falls as the power rises: the median thrust of the rows in
    the top quarter of power is negative and larger in size than the 99th percentile of all
    thrust readings (a reversed cell reads small positive noise at idle only)."""
    step = max(1, thrust_N.size // SIGN_ROWS)
    t, p = np.asarray(thrust_N)[::step], np.asarray(power_W)[::step]
    if t.size < 4:
        return
    top = p >= np.percentile(p, 75.0)
    t_top = float(np.median(t[top]))
    if t_top < 0.0 and -t_top > float(np.percentile(t, 99.0)):
        raise InputError("%s: thrust falls as the motor's power rises (median %s in the rows of "
                         "highest power): the load cell is mounted the other way round or its sign "
                         "is reversed in the logger; negate the thrust column"
                         % (source, _in_unit(t_top, thrust_unit)))


def _standing(levels):
    """(standing level indices, idle power [W]) of the levels where the rotor stands (the lowest
    commands, their power at the sweep's idle value), or None when fewer than two."""
    u, p = levels["command"], levels["power_W"]
    if u.size < 3:
        return None
    p_lo, p_hi = float(np.min(p)), float(np.max(p))
    idle = p <= p_lo + STANDING_POWER_SHARE * (p_hi - p_lo)
    # only the idle levels below the first level that takes more power (not idle dips later)
    order = np.argsort(u, kind="stable")
    first_busy = np.flatnonzero(~idle[order])
    standing = order[:first_busy[0]] if first_busy.size else order
    # the lower half of them: a rotor just starting still draws about its idle power
    standing = standing[:max(2, standing.size // 2)]
    if standing.size < 2:
        return None
    return standing, float(np.median(p[standing]))


def tare_offset(levels):
    """The load cell's zero offset [N] read where the rotor stands, as (offset_N, idle_power_W,
    unambiguous), or None when there is none to speak of (within TARE_SHARE of the largest
    level thrust). unambiguous: the standing levels read the same thrust (their spread at most
    TARE_FLAT_SHARE of the offset): a rotor that stands makes no thrust whatever the command,
    while one that turns slowly at about idle power makes thrust that grows with it; only a flat
    offset is the cell's zero and may be subtracted.
    levels: estimator.bench.levels.command_levels output (command, thrust_N, power_W)."""
    found = _standing(levels)
    t = levels["thrust_N"]
    if found is None or t.size == 0 or not float(np.max(t)) > 0.0:
        return None
    standing, idle_W = found
    offset = float(np.median(t[standing]))
    if abs(offset) <= TARE_SHARE * float(np.max(t)):
        return None
    spread = float(np.max(t[standing]) - np.min(t[standing]))
    return offset, idle_W, spread <= TARE_FLAT_SHARE * abs(offset)


def tare_note(offset_N, thrust_unit="N"):
    """The one line that says a zero offset [N] was subtracted from the thrust (the fit's
    summary, the set's warnings, `hover --params` and `firmware` all say it in these words)."""
    return ("thrust zero offset %s subtracted from every row: thrust read that much where the rotor "
            "stood (power at its idle value), so the load cell was not zeroed; tare it with the "
            "propeller on and the motor off next time" % _in_unit(offset_N, thrust_unit))


def tare_warning(levels, thrust_unit="N"):
    """A warning (str) when the levels where the rotor stands read thrust but not flat enough
    to subtract (tare_offset: ambiguous): the load cell may not be zeroed. None otherwise."""
    found = tare_offset(levels)
    if found is None:
        return None
    offset, idle_W, _ = found
    return ("thrust reads about %s at the lowest commands, where the power stays at its idle value (%.3g W): "
            "if the rotor stood still there, the load cell was not zeroed; tare it with the propeller on "
            "and the motor off, and sweep again (the fit takes the offset for thrust)"
            % (_in_unit(offset, thrust_unit), idle_W))
