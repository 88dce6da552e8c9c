"""Sensor and column setup checks on a bench sweep that other checks would refuse with the
wrong cause (sixth new-user trial, item 4): a current sensor reading backwards, the voltage
and current columns swapped, percent data labelled permille; and the unit checks of every column
(check_units: values that do not fit their unit label, e.g. mV labelled V). Also the thrust and
current columns swapped (ninth new-user trial, finding 3: check_power_convex, judged on the
command levels: power concave in thrust).

Each is judged from the data alone, from what a real sweep cannot do (common practice on any
bench): the bus voltage never rises several-fold as the command rises (a supply sags under
load), a motor's current never falls as the command rises, and a motor's current is not
negative. Every function raises InputError naming the likely cause, or returns None.
"""

import numpy as np

from estimator.errors import InputError
from estimator.units import COMMAND_SHOWN, COMMAND_UNIT_WORDS, likely_command_unit
from estimator.bench.columns import BUS_VOLTAGE_RANGE_V, COMMAND_OUTSIDE_SHARE, MAX_CURRENT_A, MEDIAN_ROWS, UNITS

# judged on a systematic subsample of at most this many rows [-]
SAMPLE_ROWS = 20000
# a "voltage" column whose median in the top quarter of commands is this many times its median in
# the bottom quarter rises like a current [-]
RISE_LIKE_CURRENT = 2.0
# ... while a "current" column that rises by less than this share is not a motor's current [-]
CURRENT_RISE_MIN = 1.2
# a current column negative in more than this share of rows reads backwards [-]
NEGATIVE_SHARE = 0.5
# a command[permille] column that never exceeds this many permille is likely percent [permille]
PERMILLE_AS_PERCENT_MAX = 100.0
# the power-per-thrust slopes are taken between the median points of three thrust bands, shares of
# the sweep's top thrust (levels.confirmed_top): (0.1, 0.4], (0.4, 0.7], (0.7, ...) [-]
CONVEX_BANDS = (0.1, 0.4, 0.7)
# power is judged concave in thrust when the upper slope is below this share of the lower one:
# at 1 the two slopes are equal (a straight line). A rotor's power rises as thrust^1.5 (momentum
# theory) or faster (copper losses), a ratio of 1.2..1.5 on the randomised truths of
# tests/truth_rotor.py (150 seeds: lowest 1.23); thrust and current swapped make power go as
# "thrust"^(2/3) or slower, a ratio of about 0.73 (the trial's octo sweep) [-]
CONVEX_SLOPE_RATIO = 1.0
# levels with fewer rows than this share of the median level's rows are left out of that judgement [-]
CONVEX_LEVEL_ROWS_SHARE = 0.5


def _quarters(command, column):
    """Medians of ``column`` over the rows in the bottom and in the top quarter of command."""
    step = max(1, command.size // SAMPLE_ROWS)
    u, x = command[::step], column[::step]
    ok = np.isfinite(u) & np.isfinite(x)
    u, x = u[ok], x[ok]
    if u.size < 8:
        return None
    lo, hi = np.percentile(u, [25.0, 75.0])
    if not hi > lo:
        return None
    return float(np.median(x[u <= lo])), float(np.median(x[u >= hi]))


def check_voltage_current_swapped(path, command, voltage_V, current_A):
    """Refuse a sweep whose voltage rises like a motor's current with the command while its
    current does not (command [-], voltage_V [V], current_A [A]: the columns as read)."""
    v = _quarters(command, voltage_V)
    i = _quarters(command, current_A)
    if v is None or i is None:
        return
    if v[1] > RISE_LIKE_CURRENT * max(v[0], 1e-9) and i[1] < CURRENT_RISE_MIN * i[0]:
        raise InputError("%s: voltage rises with the command (median %.3g V in the lowest quarter of "
                         "commands, %.3g V in the highest) while current does not (%.3g A, %.3g A): the "
                         "voltage and current columns look swapped; check the header's order against the "
                         "data" % (path, v[0], v[1], i[0], i[1]))


def power_slope_ratio(levels):
    """(upper slope / lower slope, the three bands' median (thrust [N], power [W])) of power
    against thrust over the command levels (dict thrust_N [N], power_W [W], count): the slopes between
    the median points of the CONVEX_BANDS thrust bands; None when a band is empty or the lower
    slope is not positive (too short a sweep to judge)."""
    from estimator.bench.levels import confirmed_top

    t, p = np.asarray(levels["thrust_N"], dtype=float), np.asarray(levels["power_W"], dtype=float)
    count = np.asarray(levels["count"], dtype=float)
    # a level of far fewer rows than the others is a glitch row off its supply's voltage band
    # (tests/test_fit_glitch_trial7.py: one 10 mN row on a 0.065 mN rotor), not a step
    full = count >= CONVEX_LEVEL_ROWS_SHARE * float(np.median(count)) if count.size else count > 0
    t, p = t[full], p[full]
    if t.size < 3:
        return None
    top = confirmed_top(t)
    if not top > 0.0:
        return None
    x = t / top
    lo, mid, hi = CONVEX_BANDS
    points = []
    for band in ((x > lo) & (x <= mid), (x > mid) & (x <= hi), x > hi):
        if not np.any(band):
            return None
        points.append((float(np.median(t[band])), float(np.median(p[band]))))
    (t1, p1), (t2, p2), (t3, p3) = points
    if not (t2 > t1 and t3 > t2):
        return None
    lower, upper = (p2 - p1) / (t2 - t1), (p3 - p2) / (t3 - t2)
    if not lower > 0.0:
        return None
    return upper / lower, points


def check_power_convex(path, levels, thrust_unit="N"):
    """Refuse a sweep whose power is concave in thrust: the slope of power against thrust in the
    upper band of thrust below CONVEX_SLOPE_RATIO times the slope in the lower band
    (power_slope_ratio). A rotor's power grows as thrust^1.5 by momentum theory (ideal
    induced power P = T^1.5 / sqrt(2 rho A); Glauert; Leishman, Principles of Helicopter
    Aerodynamics, 2006, ch. 2, from memory), faster with the motor's copper losses (I^2 R);
    thrust and current columns swapped give power as "thrust"^(2/3) or slower.
    levels: estimator.bench.levels.command_levels output (thrust_N [N], power_W [W])."""
    from estimator.bench.wording import thrust_text

    found = power_slope_ratio(levels)
    if found is None or found[0] >= CONVEX_SLOPE_RATIO:
        return
    ratio, ((t1, p1), (t2, p2), (t3, p3)) = found
    raise InputError("%s: power is concave in thrust over the sweep, rising ever more slowly (%.4g W at %s, %.4g W at %s, "
                     "%.4g W at %s: %.2f times the power per unit thrust in the upper band as in the "
                     "lower one), which no rotor does (power grows as thrust^1.5 by momentum theory, "
                     "faster with motor losses): thrust and current columns swapped? check the "
                     "header's order against the data"
                     % (path, p1, thrust_text(t1, thrust_unit), p2, thrust_text(t2, thrust_unit), p3,
                        thrust_text(t3, thrust_unit), ratio))


def check_current_sign(path, negative_rows, finite_rows, current_A):
    """Refuse a sweep whose current is negative in most rows: a sensor reading backwards.
    negative_rows / finite_rows: counts of clearly negative / all finite rows; current_A [A]."""
    if finite_rows and negative_rows > NEGATIVE_SHARE * finite_rows:
        low = float(np.nanmin(current_A))
        raise InputError("%s: current is negative in %d of %d rows (down to %.3g A): the current sensor "
                         "reads backwards (mounted the other way round, or its sign reversed in the "
                         "logger); negate the current column" % (path, negative_rows, finite_rows, low))


def check_permille_as_percent(path, unit, command_max):
    """Refuse command[permille] data that never exceeds 100 permille: percent labelled permille.
    unit: the command column's unit; command_max: its largest value [-] (0..1)."""
    if unit == "permille" and 1000.0 * command_max <= PERMILLE_AS_PERCENT_MAX * 1.005:
        raise InputError("%s: command[permille] never exceeds %.4g permille (%.3g of full command): is "
                         "it command[%%] (0..100)? label it command[%%]" % (path, 1000.0 * command_max,
                                                                           command_max))


def check_units(path, data, v_med=None, extremes=None):
    """Refuse columns whose values do not fit their unit label: a voltage in mV labelled V (or
    V labelled mV), a command in % or us labelled [-] (and the other ways round), a command in
    [-] labelled % or permille, percent labelled permille, a current in mA labelled A; the
    voltage and current columns swapped first (data: the reader's columns in SI and units).

    v_med, extremes: the subsample median of the voltage [V] and the (min, max) of command,
    voltage, current and thrust when every value is finite (estimator.bench.reader's clean case); they
    spare passes over the columns and give the same answers.
    """
    import numpy as np

    check_voltage_current_swapped(path, data["command"], data["voltage"], data["current"])
    with np.errstate(invalid="ignore"):
        if v_med is None:
            v = data["voltage"]
            v = v[:: max(1, v.size // MEDIAN_ROWS)]
            v_med = float(np.nanmedian(v)) if np.any(np.isfinite(v)) else float("nan")
        if not np.isfinite(v_med):
            raise InputError("%s: column voltage holds no numbers" % path)
        if v_med > BUS_VOLTAGE_RANGE_V[1]:
            raise InputError("%s: voltage median %.4g V is above %g V for a small multirotor "
                             "bus; is the column in mV but labelled [V]?"
                             % (path, v_med, BUS_VOLTAGE_RANGE_V[1]))
        if v_med < BUS_VOLTAGE_RANGE_V[0]:
            raise InputError("%s: voltage median %.4g V is below %g V; is the column in V but "
                             "labelled [mV], or is the supply off?" % (path, v_med, BUS_VOLTAGE_RANGE_V[0]))
        u = data["command"]
        if extremes is not None:
            finite_u = u
            u_max = extremes[1]
            if extremes[0] >= -0.01 and u_max <= 1.01:
                outside = 0
            else:
                outside = np.count_nonzero((u < -0.01) | (u > 1.01))
        else:
            finite_u = u[np.isfinite(u)]
            if finite_u.size == 0:
                raise InputError("%s: column command holds no numbers" % path)
            outside = np.count_nonzero((finite_u < -0.01) | (finite_u > 1.01))
            u_max = float(np.max(finite_u))
        if outside > COMMAND_OUTSIDE_SHARE * finite_u.size:
            unit = data["command_unit"]
            scale, offset = COMMAND_SHOWN[unit][:2]
            low, high = offset + scale * float(np.min(finite_u)), offset + scale * u_max
            likely = likely_command_unit(low, high, unit)
            hint = ("likely %s labelled [%s]; label it command[%s]" % (COMMAND_UNIT_WORDS[likely], unit, likely)
                    if likely else
                    {"-": "is it command[%] (0..100) or command[us] (1000..2000)?",
                     "%": "is it command[us] (1000..2000) or command[-] (0..1)?",
                     "permille": "is it command[us] (1000..2000)?",
                     "us": "is it command[%] or command[-]?"}[unit])
            raise InputError("%s: column command[%s]: %d of %d values fall outside 0..1 of full command "
                             "(%.6g..%.6g as written); %s" % (path, unit, outside, finite_u.size, low, high, hint))
        if data["command_unit"] in ("%", "permille") and u_max <= 1.01 * UNITS["command"][data["command_unit"]][0]:
            raise InputError("%s: command[%s] never exceeds 1 %s; is it command[-] (0..1)?"
                             % (path, data["command_unit"], data["command_unit"]))
        check_permille_as_percent(path, data["command_unit"], u_max)
        # the median can only exceed the limit when the largest value does (the clean case
        # knows it already: no pass over the column then)
        i_big = data["current_unit"] == "A" and (extremes is None or extremes[5] > MAX_CURRENT_A)
        i = data["current"][:: max(1, data["current"].size // MEDIAN_ROWS)] if i_big else None
        i_med = float(np.nanmedian(i)) if i_big and np.any(np.isfinite(i)) else float("nan")
        if i_med > MAX_CURRENT_A:
            raise InputError("%s: current median %.4g A is above %g A for one rotor's supply; is the "
                             "column in mA but labelled [A]? label it current[mA]"
                             % (path, i_med, MAX_CURRENT_A))
