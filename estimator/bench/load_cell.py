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


def tare_warning(levels, thrust_unit="N"):
    """A warning (str) when the levels where the rotor stands (the lowest commands, their power
    at the sweep's idle value) read thrust: the load cell was not zeroed. None otherwise.
    levels: estimator.bench.levels.command_levels output (command, thrust_N, power_W)."""
    u, t, p = levels["command"], levels["thrust_N"], levels["power_W"]
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
    t_top = float(np.max(t))
    if standing.size < 2 or not t_top > 0.0:
        return None
    offset = float(np.median(t[standing]))
    if abs(offset) <= TARE_SHARE * t_top:
        return None
    return ("thrust reads about %s at the lowest commands, where the power stays at its idle value (%.3g W): "
            "if the rotor stood still there, the load cell was not zeroed; tare it with the propeller on "
            "and the motor off, and sweep again (the fit takes the offset for thrust)"
            % (_in_unit(offset, thrust_unit), float(np.median(p[standing]))))
