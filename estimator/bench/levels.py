"""Bench rows gathered per command level and supply: the fits iterate over levels, not rows.

A level is the rows logged at one command step (command rounded to LEVEL_STEP) and one
supply (bus voltage in a band row_sums.VOLTAGE_BAND x the sweep's lowest voltage wide). Each
level keeps its mean command, voltage, thrust and power and its row count; rows far from
their own level's mean (a load-cell knock, a current glitch) are counted as spikes and left
out of the mean, judged only in levels of at least three rows (two rows cannot say which one
is wrong). The grouping works over integer keys (estimator.bench.row_sums: sums in row
order, in blocks that stay in cache): linear in the rows, no sort. Rows of levels too small
to judge so are screened against the fitted motor model instead (drop_model_spikes).
"""

import math

import numpy as np

from estimator.bench import row_sums

# command step of a level [-]: 0.001 is a 1 us step of a 1000..2000 us pulse
LEVEL_STEP = 0.001
# more levels than this (a ramp logged at every command) are merged by widening the command
# step, up to MAX_LEVEL_STEP: the fits' cost follows the levels, not the rows [-]
MAX_LEVELS = 200
# a ramp whose levels at LEVEL_STEP hold this many rows on average is screened at that step
# and merged for the fits afterwards: at 1 us a level's own thrust trend spreads its rows by
# about 0.06 % of full thrust (uniform over 0.2 %), far below load-cell noise; and a level
# of n rows judged by its own rms still catches a lone spike of k sigmas when
# k^2 (1 - SPIKE_SIGMAS^2 / n) > SPIKE_SIGMAS^2, i.e. from 6.6 sigmas at n = 200 [-]
ROWS_PER_LEVEL = 200
# a sweep with more distinct commands (at LEVEL_STEP) than this is a ramp; a stepped sweep
# keeps its own steps whatever their number [-]
RAMP_COMMANDS = 300
MAX_LEVEL_STEP = 0.02
# rows this many robust sigmas from their level's mean are spikes [-]
SPIKE_SIGMAS = 6.0
# levels with fewer rows are judged against their median, larger ones against the mean of
# their unflagged rows [-]
SMALL_LEVEL = 20
# rows of the systematic subsample that fixes the robust scales and noise profiles of the
# deviations: each of the NOISE_BINS thrust bins then holds up to about 1,600 rows, whose normalised
# MAD is good to about 3 % (its asymptotic relative standard error is about 1.17 / sqrt(n),
# e.g. Rousseeuw and Croux 1993, from memory) [-]
SCALE_ROWS = 10000
# rows of the systematic subsample that tells a ramp from a stepped sweep and sizes its levels [-]
WIDTH_ROWS = 20000
# the thrust noise profile: at most this many thrust bins, each of at least NOISE_BIN_ROWS
# rows of turning levels; 12 rows let two spikes in one bin (six spoiled deviations) mask
# each other, 24 coarsen the profile: measured by benchmarks/spike_screen.py [-]
NOISE_BINS = 6
NOISE_BIN_ROWS = 18


def robust_scale(x):
    """Normalised median absolute deviation 1.4826 median(|x - median(x)|) [unit of x]."""
    x = np.asarray(x, dtype=float)
    if x.size == 0:
        return 0.0
    return float(1.4826 * np.median(np.abs(x - np.median(x))))


def confirmed_top(x):
    """The third largest of the values x (the largest of fewer than three): a top that two
    glitches cannot raise, where a sweep's rows or levels are too few for a percentile to
    resist one [unit of x]."""
    x = np.asarray(x, dtype=float)
    if x.size == 0:
        return 0.0
    k = min(3, x.size)
    return float(np.partition(x, x.size - k)[x.size - k])


def noise_profile(level_thrust, dev):
    """Thrust noise against thrust: (thrust knots [N], scale [N]) for numpy.interp, or None
    when there are too few rows. The same for power noise against power ([W]), whose
    current sensor has a floor too.

    Load-cell noise has a floor and grows with the load, so one pooled scale in newtons
    calls honest full-thrust rows spikes. The rows (deviation from their level's mean, that
    level's |thrust|) are cut into NOISE_BINS groups of equal row count by thrust; each
    group's normalised MAD is its scale, at the group's median thrust, never falling with
    thrust.
    """
    top = float(np.max(level_thrust)) if level_thrust.size else 0.0
    turning = level_thrust > 0.02 * top  # a rotor standing still shows only the floor
    level_thrust, dev = level_thrust[turning], dev[turning]
    n_bins = int(min(NOISE_BINS, dev.size // NOISE_BIN_ROWS))
    if n_bins < 1:
        return None
    order = _stable_order(level_thrust)
    sorted_thrust = level_thrust[order]
    knots, scales, start = [], [], 0
    for part in np.array_split(order, n_bins):
        lo, hi = start + (part.size - 1) // 2, start + part.size // 2
        knots.append(float((sorted_thrust[lo] + sorted_thrust[hi]) / 2.0))  # the part's median
        scales.append(robust_scale(dev[part]))
        start += part.size
    knots, scales = np.array(knots), np.array(scales)
    keep = np.r_[True, np.diff(knots) > 0.0]
    knots, scales = knots[keep], np.maximum.accumulate(scales[keep])
    if top > knots[-1] > 0.0:  # above the last bin's middle the noise keeps growing with the load
        knots, scales = np.r_[knots, top], np.r_[scales, scales[-1] * top / knots[-1]]
    return knots, scales


def _stable_order(x):
    """numpy.argsort(x, kind="stable") for finite x, in a fraction of its time: the rank of
    each value among the distinct values, then row order within equal values, make keys that
    are all different, so any sort of them gives the stable order."""
    ranks = np.unique(x, return_inverse=True)[1].reshape(-1).astype(np.int64)
    ranks *= x.size
    ranks += np.arange(x.size)
    return np.argsort(ranks)


def _screen_width(u, v, v_lo):
    """Command step [-] of the levels the spike screen judges, and whether the sweep is a ramp.

    A stepped sweep keeps its own steps. A ramp (more than RAMP_COMMANDS distinct commands)
    gets steps widened until it has at most MAX_LEVELS levels, up to MAX_LEVEL_STEP, unless
    its levels already hold ROWS_PER_LEVEL rows on average: a long ramp is screened at
    LEVEL_STEP, where a level's own thrust trend is far below the noise, and its levels are
    merged for the fits afterwards (_merge). Chosen on a systematic subsample."""
    step = max(1, u.size // WIDTH_ROWS)
    vi = row_sums.bands(v[::step], v_lo, 0.0)[0]
    width = LEVEL_STEP
    ramp = np.unique(np.rint(u[::step] / width)).size > RAMP_COMMANDS
    for _ in range(6 if ramp else 0):
        n_levels = np.unique(np.rint(u[::step] / width) * 1e6 + vi).size
        if n_levels <= MAX_LEVELS or width >= MAX_LEVEL_STEP or u.size >= ROWS_PER_LEVEL * n_levels:
            break
        width = min(MAX_LEVEL_STEP, width * max(2.0, n_levels / MAX_LEVELS))
    return width, ramp


def _merge(cmd_index, band, width, count):
    """Level numbers after merging the levels of a long ramp (command step index and supply
    band of each level, at step ``width``) into at most MAX_LEVELS by widening the command
    step, up to MAX_LEVEL_STEP; None when no merge is needed."""
    if count.size <= MAX_LEVELS:
        return None
    top = int(MAX_LEVEL_STEP / width + 1e-9)
    inverse = None
    for factor in [f for f in (2, 4, 8, 16, 32, 64) if f < top] + [top]:
        merged = np.rint(cmd_index / factor).astype(np.int64) * (int(band.max()) + 1) + band
        keys, inverse = np.unique(merged, return_inverse=True)
        if keys.size <= MAX_LEVELS:
            break
    return inverse


def _median_recheck(k, xs, limit, ref):
    """For rows (values xs, level numbers k; all rows of some levels): |x - level median| / ref > limit."""
    order = np.lexsort((xs, k))
    k_sorted, xs_sorted = k[order], xs[order]
    starts = np.flatnonzero(np.r_[True, k_sorted[1:] != k_sorted[:-1]])
    ends = np.r_[starts[1:], k_sorted.size]
    med = np.zeros(int(k.max()) + 1)
    med[k_sorted[starts]] = 0.5 * (xs_sorted[(starts + ends - 1) // 2] + xs_sorted[(starts + ends) // 2])
    return np.abs(xs - med[k]) / ref[k] > limit


def _bound2(ref, limit, allowed):
    """The squared bound of each level's squared deviations: (limit * ref)^2 where allowed."""
    return np.square(np.where(allowed, limit * ref, np.inf))


def _screen(key, n_keys, count, x, dev2_of, dev2_max, ref, limit, allowed, rows_of):
    """Rows far from their level: squared deviation > (limit * ref)^2 (the square of x minus
    the level's mean and in-level trend: dev2_of(rows) gives it for the rows asked,
    dev2_max its largest per level; ref: per level), then in small levels (one spike moves
    the mean as far as its neighbours) judged again against the level's median. Only the
    rows of levels whose largest squared deviation exceeds their bound are judged (no row
    of another level can); rows_of(levels) gives the rows of the levels marked. Returns
    (the bool mask, the flagged rows' indices in order)."""
    bound2 = _bound2(ref, limit, allowed)
    flagged = np.zeros(key.size, dtype=bool)
    beyond = dev2_max > bound2
    if not np.any(beyond):
        return flagged, np.flatnonzero(beyond)
    rows = rows_of(beyond)
    flagged[rows[dev2_of(rows) > bound2[key[rows]]]] = True
    hits = np.flatnonzero(flagged)
    if hits.size == 0:
        return flagged, hits
    k = key[hits]
    small_levels = np.zeros(n_keys, dtype=bool)
    small_levels[k[count[k] < SMALL_LEVEL]] = True
    if np.any(small_levels):
        rows = rows_of(small_levels)
        k = key[rows]
        again = _median_recheck(k, x[rows], limit, ref) & allowed[k]
        flagged[rows] = again
        hits = np.union1d(hits[~small_levels[key[hits]]], rows[again])
    return flagged, hits


def row_levels(levels):
    """The output level index of every row of a command_levels result."""
    return np.take(levels["key_level"], levels["row_key"])


def command_levels(command, voltage_V, thrust_N, power_W, voltage_span_V=None):
    """Gather rows (SI arrays of equal length) into levels (module docstring).

    voltage_span_V: (lowest, highest) bus voltage of the rows [V] when the caller knows it.
    Returns dict: command, voltage_V, thrust_N, power_W (level means of the rows kept),
    count (rows kept per level), row_key and key_level (the level index of every row is
    key_level[row_key]: row_levels(levels)), thrust_spike,
    power_spike (bool per row: far from its level; power judged relative to the level's
    power and only where the rotor turns, i.e. the level's thrust is above 2 % of the
    largest level thrust; only in levels of three rows or more).
    """
    u = np.asarray(command, dtype=float)
    v = np.asarray(voltage_V, dtype=float)
    t = np.asarray(thrust_N, dtype=float)
    p = np.asarray(power_W, dtype=float)
    if voltage_span_V is None:
        voltage_span_V = (float(np.min(v)), float(np.max(v)))
    v_lo, v_hi = voltage_span_V  # bus voltage span [V]
    width, ramp = _screen_width(u, v, v_lo)
    widened = width > LEVEL_STEP
    key, count, cmd_index, band, sums = row_sums.level_sums(u, v, t, p, width, v_lo, v_hi)
    n_keys = count.size

    def level_sums(x):
        return np.bincount(key, weights=x, minlength=n_keys)

    def to_rows(x):  # a value per level, gathered to every row
        return np.take(x, key)

    safe = np.maximum(count, 1.0)
    u_m, v_m, t_m, p_m = (x / safe for x in sums)
    big = count >= 3
    t_top = float(np.max(np.abs(t_m))) if t_m.size else 0.0
    ref_p = np.maximum(np.abs(p_m), 1e-9)
    # each row's deviation from its level's mean (and, in the widened levels of a ramp, from
    # its trend in the command); the scales come from a systematic subsample of them, the
    # screens need them squared, with their sums per level (the levels' own scales)
    step = max(1, u.size // SCALE_ROWS)
    ks = key[::step]
    if widened:
        dt = to_rows(t_m)
        np.subtract(t, dt, out=dt)
        dp = to_rows(p_m)
        np.subtract(p, dp, out=dp)
        du = u - to_rows(u_m)
        suu = level_sums(du * du)
        suu[suu <= 0.0] = np.inf
        bt = level_sums(du * dt) / suu
        bp = level_sums(du * dp) / suu
        dt -= to_rows(bt) * du
        dp -= to_rows(bp) * du
        del du
        dt_sub, dp_sub = dt[::step].copy(), dp[::step].copy()
        np.square(dt, out=dt)
        np.square(dp, out=dp)
        (sq_t, max_t), (sq_p, max_p) = ((level_sums(d), np.zeros(n_keys)) for d in (dt, dp))
        np.maximum.at(max_t, key, dt)
        np.maximum.at(max_p, key, dp)

        def dt2_of(rows):
            return dt[rows]

        def dp2_of(rows):
            return dp[rows]
    else:
        dt_sub, dp_sub = t[::step] - t_m[ks], p[::step] - p_m[ks]
        (sq_t, max_t), (sq_p, max_p) = row_sums.deviation_sums(key, n_keys, (t, p), (t_m, p_m))

        def dt2_of(rows):
            return np.square(t[rows] - t_m[key[rows]])

        def dp2_of(rows):
            return np.square(p[rows] - p_m[key[rows]])
    sel = big[ks]
    # levels of SMALL_LEVEL rows or more carry their own scale (below); the others take the
    # scale of the noise at their thrust, from the profile (none needed when every level is big)
    needs_profile = bool(np.any(sel)) and bool(np.any(count[big] < SMALL_LEVEL))
    sub = (np.abs(t_m)[ks][sel], dt_sub[sel]) if needs_profile else None
    profile_t = noise_profile(*sub) if sub is not None else None
    s_p = robust_scale((dp_sub / ref_p[ks])[sel]) if np.any(sel) else 0.0
    # power noise has a floor too (the current sensor's): small levels take the larger of the
    # pooled relative scale and the power noise at their power, from its own profile
    profile_p = noise_profile(np.abs(p_m)[ks][sel], dp_sub[sel]) if needs_profile else None
    # noise grows with thrust and power: levels of SMALL_LEVEL rows or more carry their own
    # scale (rms about the level's trend), smaller ones the subsample's robust scale
    own = count >= SMALL_LEVEL
    if profile_t is not None:  # load-cell noise grows with thrust: the scale at each level's thrust
        scale_t = np.maximum(np.interp(np.abs(t_m), *profile_t), 1e-6 * t_top)
    else:
        s_t = robust_scale(dt_sub[sel]) if np.any(sel) else 0.0
        scale_t = np.full(n_keys, max(s_t, 1e-6 * t_top))
    scale_p = ref_p * max(s_p, 1e-6)
    if profile_p is not None:
        scale_p = np.maximum(np.interp(np.abs(p_m), *profile_p), scale_p)
    if np.any(own):
        # the rms without the largest deviation: with it a lone glitch is at most (n - 1) /
        # sqrt(n) rms out, below SPIKE_SIGMAS for n < 38 (trial 7, finding 3: 9999 mN among 20
        # rows of a 6 g rotor); an honest level's scale drops about 10 % at 20 rows
        rest = np.maximum(safe - 1.0, 1.0)
        ms_t = np.maximum(sq_t - max_t, 0.0) / rest
        ms_p = np.maximum(sq_p - max_p, 0.0) / rest
        scale_t[own] = np.maximum(np.sqrt(ms_t[own]), 1e-6 * t_top)
        scale_p[own] = np.maximum(np.sqrt(ms_p[own]), 1e-6 * ref_p[own])
    spinning = big & (np.abs(t_m) > 0.02 * t_top)
    scanned = []  # the levels of the last look for their rows, and those rows

    def rows_of(levels):  # the rows of the levels marked, in order: one pass serves the screens
        if scanned and not np.any(levels & ~scanned[0]):
            return scanned[1][np.take(levels, key[scanned[1]])]
        rows = np.flatnonzero(np.take(levels, key))
        scanned[:] = [levels, rows]
        return rows

    def look():  # one look for the rows of the levels either screen may judge at today's scales
        either = (max_t > _bound2(scale_t, SPIKE_SIGMAS, big)) | (max_p > _bound2(scale_p, SPIKE_SIGMAS, spinning))
        if np.any(either):
            rows_of(either)  # a second look is free when its levels are among the first's

    look()
    thrust_spike, t_hits = _screen(key, n_keys, count, t, dt2_of, max_t, scale_t, SPIKE_SIGMAS, big, rows_of)
    if profile_t is not None and t_hits.size:
        # a spike moves its whole level's deviations: judge again with a profile made only
        # of levels without a flagged row; every level takes
        # that profile's scale here, also those that carried their own above (a spiked level's
        # own rms carries its spike; a clean one's is near the profile anyway)
        spoiled = np.zeros(n_keys, dtype=bool)
        spoiled[key[t_hits]] = True
        clean = ~spoiled[ks[sel]]
        again = noise_profile(*(x[clean] for x in sub))
        if again is not None:
            profile_scale = np.maximum(np.interp(np.abs(t_m), *again), 1e-6 * t_top)
            # a level keeps its own scale where larger: each row of a spiked level is 1 / n of
            # the spike off the mean (all 20 rows were dropped: trial 7, finding 3)
            scale_t = np.where(own, np.maximum(profile_scale, scale_t), profile_scale)
            look()
            thrust_spike, t_hits = _screen(key, n_keys, count, t, dt2_of, max_t, scale_t, SPIKE_SIGMAS, big,
                                           rows_of)
    power_spike, p_hits = _screen(key, n_keys, count, p, dp2_of, max_p, scale_p, SPIKE_SIGMAS, spinning, rows_of)
    out = np.union1d(t_hits, p_hits)  # the rows of either kind of spike
    if out.size:
        k = key[out]
        count = count - np.bincount(k, minlength=n_keys)
        safe = np.maximum(count, 1.0)
        u_m, v_m, t_m, p_m = ((total - np.bincount(k, weights=c[out], minlength=n_keys)) / safe
                              for total, c in zip(sums, (u, v, t, p)))
    sums = [m * count for m in (u_m, v_m, t_m, p_m)]
    merged = _merge(cmd_index, band, width, count) if ramp else None
    if merged is not None:
        count = np.bincount(merged, weights=count)
        safe = np.maximum(count, 1.0)
        u_m, v_m, t_m, p_m = (np.bincount(merged, weights=x) / safe for x in sums)
    has = count > 0
    out_level = np.cumsum(has) - 1  # level number in the output of each (merged) level
    if merged is not None:
        out_level = out_level[merged]
    return {"command": u_m[has], "voltage_V": v_m[has], "thrust_N": t_m[has], "power_W": p_m[has],
            "count": count[has], "row_key": key, "key_level": out_level,
            "thrust_spike": thrust_spike, "power_spike": power_spike}


def drop_model_spikes(lv, thrust_of, u, v, t, p):
    """Rows of small levels (one or two rows, where command_levels cannot judge) far from a
    fitted model, thrust_of(command [-], voltage [V]) -> thrust [N] (the motor model's,
    estimator.bench.motor_fit), among the rows u [-], v [V], t [N], p [W]. A row is a spike
    when its residual exceeds SPIKE_SIGMAS times the spread of the level residuals at its
    thrust (noise_profile of the level residuals scaled to one row: load-cell noise grows with the load, and the model's
    own misfit is part of that spread). Spikes are marked in lv["thrust_spike"] (counted and
    left out of rows_used) and taken out of their levels' means; a level left empty is
    dropped. Returns True when a level changed (the fits must run again)."""
    n = lv["count"]
    t_lv = np.abs(lv["thrust_N"])
    r_lv = thrust_of(lv["command"], lv["voltage_V"]) - lv["thrust_N"]
    r_row = r_lv * np.sqrt(n)  # a level mean's residual scaled to one row's
    profile = noise_profile(t_lv, r_row)
    row_scale = np.interp(t_lv, *profile) if profile is not None else np.full(n.size, robust_scale(r_row))
    if not np.all(row_scale > 0.0):
        return False
    bad = (np.abs(r_row) > SPIKE_SIGMAS * row_scale) & (n <= 2)
    if not np.any(bad):
        return False
    rows = np.flatnonzero(np.take(bad[lv["key_level"]], lv["row_key"]))
    r_rows = thrust_of(u[rows], v[rows]) - t[rows]
    rows = rows[np.abs(r_rows) > SPIKE_SIGMAS * row_scale[lv["key_level"][lv["row_key"][rows]]]]
    rows = rows[~lv["thrust_spike"][rows]]
    if rows.size == 0:
        return False
    lv["thrust_spike"][rows] = True
    k = lv["key_level"][lv["row_key"][rows]]
    count = n - np.bincount(k, minlength=n.size)
    for name, x in (("command", u), ("voltage_V", v), ("thrust_N", t), ("power_W", p)):
        lv[name] = (lv[name] * n - np.bincount(k, weights=x[rows], minlength=n.size)) / np.maximum(count, 1.0)
    keep = count > 0
    for name in ("command", "voltage_V", "thrust_N", "power_W"):
        lv[name] = lv[name][keep]
    lv["count"] = count[keep]
    lv["key_level"] = (np.cumsum(keep) - 1)[lv["key_level"]]
    lv["current_A"] = lv["power_W"] / lv["voltage_V"]
    return True
