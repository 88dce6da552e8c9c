"""Sensor and column setup checks on a bench sweep that other checks would refuse with the
wrong cause (sixth new-user trial, item 4): a current sensor reading backwards, the voltage
and current columns swapped, percent data labelled permille.

Each is judged from the data alone, from what a real sweep cannot do (common practice on any
bench): the bus voltage never rises several-fold as the command rises (a supply sags under
load), a motor's current never falls as the command rises, and a motor's current is not
negative. Every function raises InputError naming the likely cause, or returns None.
"""

import numpy as np

from estimator.errors import InputError

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
