"""The rows of a bench sweep the fit may use: the merely bad ones dropped and counted.

A row is dropped, and counted by its reason, when it holds a missing reading: an empty cell
or 'nan' (also in an optional column; counted as empty_or_nan_cell, the name of what was found), a clearly negative current (idle sensor noise below zero is tolerated, see
estimator.bench.columns), a bus voltage at or below zero or off the sweep's median by more than
a factor 2, a command outside 0..1, a current above MAX_CURRENT_A or a thrust beyond
MAX_THRUST_N. A current negative in most rows is a sensor reading backwards and is refused
(estimator.bench.sensor_checks). Fewer than 10 rows left: refused; more than DROPPED_SHARE_WARN of
the rows dropped: warned about (dropped_share_warning).
"""

from estimator.errors import InputError
from estimator.bench.columns import MAX_CURRENT_A, MAX_THRUST_N, MEDIAN_ROWS, NEGATIVE_CURRENT_TOLERANCE_A
from estimator.bench.sensor_checks import check_current_sign

# more than this share of a sweep's rows dropped by the checks below is warned about: under about
# 5 % missing readings are commonly taken as harmless and above about 10 % as likely to bias a fit
# (common practice, from memory). A flight log is refused above 5 % (watch.replay.MISSING_SHARE):
# its rows are time steps the watch integrates over; a sweep's are independent steady readings
# whose fit errors widen as rows go, so it is still fitted, with the warning [-]
DROPPED_SHARE_WARN = 0.10


def keep_rows(path, data, rows_total, extremes=None, v_med=None):
    """The rows to fit: (command [-], voltage_V [V], thrust_N [N], power_W [W] (bus power, v i),
    voltage span (lowest, highest) [V], rejected {reason: count}, rows kept).

    data: the reader's columns in SI (command, voltage, current, thrust, optional); extremes:
    (min, max) of command, voltage, current and thrust flattened, when every value is finite,
    with v_med the subsample median of the voltage [V]: one min and max per column then decide
    the common case, every value inside every check, with no mask and no row dropped.
    """
    u, v, i, t = data["command"], data["voltage"], data["current"], data["thrust"]
    if extremes is not None:
        u_lo, u_hi, v_lo, v_hi, i_lo, i_hi, t_lo, t_hi = extremes
        tol_i = max(NEGATIVE_CURRENT_TOLERANCE_A, 0.01 * max(abs(i_lo), abs(i_hi)))
        if (u_lo >= 0.0 and u_hi <= 1.0 and v_lo > 0.0 and v_hi <= 2.0 * v_med
                and v_lo >= 0.5 * v_med and i_lo >= -tol_i and i_hi <= MAX_CURRENT_A
                and max(abs(t_lo), abs(t_hi)) <= MAX_THRUST_N):
            power = v * i  # electrical (bus) power [W]; the current column itself is not kept
            return u, v, t, power, (v_lo, v_hi), {}, rows_total
    import numpy as np

    u, v, t, power, rejected, n_keep = _masked_rows(path, data, rows_total)
    return u, v, t, power, (float(np.min(v)), float(np.max(v))), rejected, n_keep


def _masked_rows(path, data, rows_total):
    """Drop and count the merely bad rows (module docstring) with a mask per check; returns
    u, v, t, power, rejected counts and the number of rows kept."""
    import numpy as np

    u, v, i, t = data["command"], data["voltage"], data["current"], data["thrust"]
    rejected = {}
    finite = np.isfinite(u) & np.isfinite(v) & np.isfinite(i) & np.isfinite(t)
    for column in data.get("optional", ()):  # an empty optional cell: the row goes, counted
        finite &= np.isfinite(column)
    # an empty cell and a logger's 'nan' are the same missed sample: dropped alike (new-user
    # trial 7, finding 10: 'nan' refused the file while an empty cell was counted as not_a_number)
    rejected["empty_or_nan_cell"] = int(rows_total - np.count_nonzero(finite))
    if not np.any(finite):
        _no_reading(path, data, rows_total)
    with np.errstate(invalid="ignore"):
        # current sensors read a little below zero at idle; only clearly negative rows are bad
        tol_i = max(NEGATIVE_CURRENT_TOLERANCE_A, 0.01 * float(np.nanmax(np.abs(i[finite])))
                    if np.any(finite) else 0.0)
        neg_i = finite & (i < -tol_i)
        bad_v = finite & (v <= 0.0)
        out_u = finite & ((u < 0.0) | (u > 1.0))
        step = max(1, rows_total // MEDIAN_ROWS)
        v_fin = v[::step][finite[::step]]
        v_med = float(np.median(v_fin)) if v_fin.size else float(np.median(v[finite]))
        odd_v = finite & ~bad_v & ((v > 2.0 * v_med) | (v < 0.5 * v_med))
        odd_i = finite & (i > MAX_CURRENT_A)
        odd_t = finite & (np.abs(t) > MAX_THRUST_N)
    check_current_sign(path, int(np.count_nonzero(neg_i)), int(np.count_nonzero(finite)), i[finite])
    rejected["negative_current"] = int(np.count_nonzero(neg_i))
    rejected["voltage_not_positive"] = int(np.count_nonzero(bad_v))
    rejected["command_outside_0_1"] = int(np.count_nonzero(out_u))
    rejected["voltage_out_of_range"] = int(np.count_nonzero(odd_v))
    rejected["current_out_of_range"] = int(np.count_nonzero(odd_i))
    rejected["thrust_out_of_range"] = int(np.count_nonzero(odd_t))
    keep = finite & ~neg_i & ~bad_v & ~out_u & ~odd_v & ~odd_i & ~odd_t
    n_keep = int(np.count_nonzero(keep))
    if n_keep < 10:
        raise InputError("%s: only %d of %d rows %s usable (NaN, negative current, command "
                         "outside 0..1, values out of range); a sweep needs at least 10"
                         % (path, n_keep, rows_total, "is" if n_keep == 1 else "are"))
    with np.errstate(over="ignore", invalid="ignore"):
        power = v * i  # electrical (bus) power [W]; the current column itself is not kept
    if n_keep < rows_total:
        u, v, t, power = u[keep], v[keep], t[keep], power[keep]
    return u, v, t, power, {k: c for k, c in rejected.items() if c}, n_keep


def _no_reading(path, data, rows_total):
    """Refuse a sweep in which no row holds a reading in every column, naming the columns with none
    at all (new-user trial 15: a thrust column of 'nan' only ended in a numpy warning on stderr
    before the error line, which blamed the rows, not the column)."""
    import numpy as np

    empty = ["%s[%s]" % (name, data.get(name + "_unit", "?")) for name in ("command", "voltage", "current", "thrust")
             if not np.any(np.isfinite(data[name]))]
    if empty:
        raise InputError("%s: column%s %s hold%s no reading in any of the %d rows (every cell empty or 'nan'): "
                         "was that sensor logged? a sweep needs command, voltage, current and thrust in each row"
                         % (path, "s" if len(empty) > 1 else "", ", ".join(empty), "" if len(empty) > 1 else "s",
                            rows_total))
    raise InputError("%s: no row of the %d holds a reading in every column (each has an empty or 'nan' cell); "
                     "a sweep needs command, voltage, current and thrust in each row" % (path, rows_total))


def dropped_share_warning(rows_total, n_keep, rejected):
    """A warning (str) when more than DROPPED_SHARE_WARN of a sweep's rows were dropped, with the
    counts by reason, else None (new-user trial 13, finding 6: 41 of 82 rows with a 'nan' current
    were fitted with only the row count to say so). rejected: {reason: count}."""
    dropped = rows_total - n_keep
    if dropped <= DROPPED_SHARE_WARN * rows_total:
        return None
    return ("%d of %d rows (%.0f %%) were dropped (%s), more than %.0f %%: a stand or logger that loses that "
            "many readings is faulty (a sensor missing every other sample?); the fit uses the %d rows "
            "left, with wider errors: check the stand's logging and sweep again"
            % (dropped, rows_total, 100.0 * dropped / rows_total,
               ", ".join("%s %d" % kv for kv in sorted(rejected.items()) if kv[1]),
               100.0 * DROPPED_SHARE_WARN, n_keep))
