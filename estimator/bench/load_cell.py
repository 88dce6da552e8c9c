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
# a standing rotor's thrust beyond this share of the hover thrust is a tare offset that matters:
# the hover power, current and endurance rest on the hover thrust, not on the top thrust (new-user
# trial 9, finding 2: 140 gf was 1.4 % of an octo rotor's top thrust, 8 % of its hover thrust and
# +11 % endurance) [-]
TARE_SHARE = 0.015
# without a vehicle the hover thrust is not known: taken as this share of the sweep's top thrust,
# the hover of a vehicle with thrust-to-weight 5 (a high-T/W heavy lifter or racer; most hover
# nearer 1/2..1/3 of full thrust, common practice), so the offset is judged against the smallest
# hover thrust likely [-]
HOVER_SHARE_LOW = 0.2
# and the offset must stand clear of the load cell's own scatter where the rotor stands: beyond
# this many standard errors of the standing rows' mean (robust row scatter / sqrt(rows)) [-]
TARE_SIGMAS = 5.0
# below this many standing rows the scatter is not judged; the offset must then exceed
# TARE_SHARE of the top thrust (the rule before trial 9) [-]
TARE_MIN_ROWS = 4
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
    # the lowest third of them: a rotor just starting still draws about its idle power (new-user
    # trial 9: on an 18in octo rotor the idle band, 1 % of an 8 kW range, reached 14 % command,
    # where the rotor turned at 600 rpm and thrust had risen by 0.04 kgf; the lower half took
    # in 10 % command at 400 rpm, and the offset read 0.071 kgf for 0.080)
    standing = standing[:max(2, standing.size // 3)]
    if standing.size < 2:
        return None
    return standing, float(np.median(p[standing]))


def tare_offset(levels, thrust_N=None, hover_thrust_N=None):
    """The load cell's zero offset [N] read where the rotor stands, as (offset_N, idle_power_W,
    unambiguous, judged), or None when there is none to speak of.

    The offset is the median thrust of the standing levels. It is spoken of when it stands clear
    of the cell's scatter there (beyond TARE_SIGMAS standard errors of the standing rows' mean,
    the scatter a robust one of those rows of thrust_N [N]; with fewer than TARE_MIN_ROWS rows,
    or no rows given, beyond TARE_SHARE of the top level thrust instead) and, when positive, it
    matters for the hover: beyond TARE_SHARE of hover_thrust_N [N] (the vehicle's weight per
    rotor), or of HOVER_SHARE_LOW x the top level thrust without one. A negative thrust at rest
    clear of the scatter is always spoken of: no rotor pulls the stand backwards standing still.
    unambiguous: the standing levels read the same thrust (their spread at most TARE_FLAT_SHARE
    of the offset, or within the scatter): a rotor that stands makes no thrust whatever the
    command, while one that turns slowly at about idle power makes thrust that grows with it; only
    a flat offset is the cell's zero and may be subtracted.
    judged: {scatter_N, rows, hover_thrust_N, hover_known} the offset was judged against.
    levels: estimator.bench.levels.command_levels output (command, thrust_N, power_W, and
    row_key, key_level when thrust_N is given)."""
    from estimator.bench.levels import robust_scale, row_levels

    found = _standing(levels)
    t = levels["thrust_N"]
    if found is None or t.size == 0 or not float(np.max(t)) > 0.0:
        return None
    standing, idle_W = found
    offset = float(np.median(t[standing]))
    top = float(np.max(t))
    scatter, rows = float("inf"), 0
    if thrust_N is not None and "row_key" in levels:
        at_rest = np.isin(row_levels(levels), standing)
        rows = int(np.count_nonzero(at_rest))
        if rows >= TARE_MIN_ROWS:
            scatter = robust_scale(np.asarray(thrust_N, dtype=float)[at_rest])
    if rows >= TARE_MIN_ROWS:
        clear = abs(offset) > TARE_SIGMAS * scatter / np.sqrt(rows)
    else:
        clear = abs(offset) > TARE_SHARE * top
    hover = hover_thrust_N if hover_thrust_N and hover_thrust_N > 0.0 else HOVER_SHARE_LOW * top
    matters = offset < 0.0 or abs(offset) > TARE_SHARE * hover
    if not (clear and matters):
        return None
    spread = float(np.max(t[standing]) - np.min(t[standing]))
    per_level = max(1.0, rows / float(standing.size))
    allowed = max(TARE_FLAT_SHARE * abs(offset),
                  TARE_SIGMAS * scatter / np.sqrt(per_level) if np.isfinite(scatter) else 0.0)
    judged = {"scatter_N": scatter if np.isfinite(scatter) else None, "rows": rows,
              "hover_thrust_N": hover, "hover_known": bool(hover_thrust_N and hover_thrust_N > 0.0)}
    return offset, idle_W, spread <= allowed, judged


def tare_context(offset_N, judged, thrust_unit="N"):
    """Why an offset [N] was spoken of, in words: its share of the hover thrust and its size
    against the cell's scatter at rest (judged: tare_offset's dict); '' when there is nothing
    to add."""
    words = []
    if offset_N < 0.0:
        words.append("the cell read negative thrust with the rotor at rest")
    share = 100.0 * abs(offset_N) / judged["hover_thrust_N"]
    words.append("%.1f %% of the %s (%s)" % (share, "hover thrust per rotor" if judged["hover_known"]
                                             else "hover thrust of a vehicle at thrust-to-weight 5",
                                             _in_unit(judged["hover_thrust_N"], thrust_unit)))
    if judged["scatter_N"]:
        words.append("%.0f times the cell's scatter at rest (%s over %d rows)"
                     % (abs(offset_N) / judged["scatter_N"], _in_unit(judged["scatter_N"], thrust_unit),
                        judged["rows"]))
    return "; ".join(words)


def tare_note(offset_N, thrust_unit="N", context=""):
    """The one line that says a zero offset [N] was subtracted from the thrust (the fit's
    summary, the set's warnings, `hover --params` and `firmware` all say it in these words);
    context: why it matters (tare_context), added in brackets when given."""
    return ("thrust zero offset %s subtracted from every row%s: thrust read that much where the rotor "
            "stood (power at its idle value), so the load cell was not zeroed; tare it with the "
            "propeller on and the motor off next time"
            % (_in_unit(offset_N, thrust_unit), " (%s)" % context if context else ""))


def tare_warning(levels, thrust_unit="N", thrust_N=None, hover_thrust_N=None):
    """A warning (str) when the levels where the rotor stands read thrust but not flat enough
    to subtract (tare_offset: ambiguous): the load cell may not be zeroed. None otherwise."""
    found = tare_offset(levels, thrust_N, hover_thrust_N)
    if found is None:
        return None
    offset, idle_W, _, judged = found
    return ("thrust reads about %s at the lowest commands, where the power stays at its idle value (%.3g W; %s): "
            "if the rotor stood still there, the load cell was not zeroed; tare it with the propeller on "
            "and the motor off, and sweep again (the fit takes the offset for thrust)"
            % (_in_unit(offset, thrust_unit), idle_W, tare_context(offset, judged, thrust_unit)))
