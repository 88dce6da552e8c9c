"""Bench rows gathered per command level and supply: the fits iterate over levels, not rows.

A level is the rows logged at one command step (command rounded to LEVEL_STEP) and one
supply (bus voltage in a LOG_VOLTAGE_STEP band of ln V). Each level keeps its mean
command, voltage, thrust and power and its row count; rows far from their own level's mean
(a load-cell knock, a current glitch) are counted as spikes and left out of the mean,
judged only in levels of at least three rows (two rows cannot say which one is wrong). The
grouping is two bincounts over integer keys: linear in the rows, no sort.
"""

import numpy as np

# command step of a level [-]: 0.001 is a 1 us step of a 1000..2000 us pulse
LEVEL_STEP = 0.001
# width of a supply band in ln(V) [-]: 1 % of the bus voltage
LOG_VOLTAGE_STEP = 0.01
# rows this many robust sigmas from their level's mean are spikes [-]
SPIKE_SIGMAS = 6.0
# rows of the systematic subsample that fixes the robust scale of deviations [-]
SCALE_ROWS = 100000


def robust_scale(x):
    """Normalised median absolute deviation 1.4826 median(|x - median(x)|) [unit of x]."""
    x = np.asarray(x, dtype=float)
    if x.size == 0:
        return 0.0
    return float(1.4826 * np.median(np.abs(x - np.median(x))))


def _means(key, n_keys, weights, columns):
    count = np.bincount(key, weights=weights, minlength=n_keys)
    safe = np.where(count > 0, count, 1.0)
    return count, [np.bincount(key, weights=c * weights if weights is not None else c,
                               minlength=n_keys) / safe for c in columns]


def _against_median(key, n_keys, flagged, x, ref, limit):
    """Flags recomputed as |x - level median| / ref > limit within the levels holding a flag."""
    if not np.any(flagged):
        return flagged
    suspect = np.zeros(n_keys, dtype=bool)
    suspect[key[flagged]] = True
    rows = np.flatnonzero(suspect[key])
    k, xs = key[rows], x[rows]
    order = np.lexsort((xs, k))
    k_sorted = k[order]
    starts = np.flatnonzero(np.r_[True, k_sorted[1:] != k_sorted[:-1]])
    ends = np.r_[starts[1:], k_sorted.size]
    xs_sorted = xs[order]
    med = np.empty(n_keys)
    med[k_sorted[starts]] = 0.5 * (xs_sorted[(starts + ends - 1) // 2] + xs_sorted[(starts + ends) // 2])
    ref_rows = ref[k] if np.ndim(ref) else ref
    out = flagged.copy()
    out[rows] = np.abs(xs - med[k]) / ref_rows > limit
    return out


def command_levels(command, voltage_V, thrust_N, power_W):
    """Gather rows (SI arrays of equal length) into levels (module docstring).

    Returns dict: command, voltage_V, thrust_N, power_W (level means of the rows kept),
    count (rows kept per level), row_level (level index of every row), thrust_spike,
    power_spike (bool per row: far from its level's mean; power judged relative to the
    level's power and only where the rotor turns, i.e. the level's thrust is above 2 % of
    the largest level thrust).
    """
    u = np.asarray(command, dtype=float)
    v = np.asarray(voltage_V, dtype=float)
    ci = np.rint(u / LEVEL_STEP).astype(np.int64)
    vi = np.rint(np.log(v) / LOG_VOLTAGE_STEP).astype(np.int64)
    vi -= int(vi.min())
    width = int(vi.max()) + 1
    raw = ci * width + vi
    present = np.bincount(raw)
    index = np.cumsum(present > 0) - 1  # dense level numbers in command order
    key = index[raw]
    n_keys = int(index[-1]) + 1
    count, (t_mean, p_mean) = _means(key, n_keys, None, [thrust_N, power_W])
    # spikes: deviation from the level's mean against the robust scale of such deviations
    big = count[key] >= 3
    dev_t = thrust_N - t_mean[key]
    ref_p = np.maximum(np.abs(p_mean), 1e-9)
    dev_p = (power_W - p_mean[key]) / ref_p[key]
    step = max(1, u.size // SCALE_ROWS)
    sel = big[::step]
    s_t = robust_scale(dev_t[::step][sel]) if np.any(sel) else 0.0
    s_p = robust_scale(dev_p[::step][sel]) if np.any(sel) else 0.0
    t_top = float(np.max(np.abs(t_mean))) if t_mean.size else 0.0
    spinning = (np.abs(t_mean) > 0.02 * t_top)[key]
    thrust_spike = big & (np.abs(dev_t) > SPIKE_SIGMAS * max(s_t, 1e-6 * t_top))
    power_spike = big & spinning & (np.abs(dev_p) > SPIKE_SIGMAS * max(s_p, 1e-6))
    # a spike pulls its level's mean, so its neighbours look off too: in the levels that hold a
    # flagged row, judge again against the level's median (a sort of those rows only)
    thrust_spike = _against_median(key, n_keys, thrust_spike, thrust_N, 1.0, SPIKE_SIGMAS * max(s_t, 1e-6 * t_top))
    power_spike = _against_median(key, n_keys, power_spike, power_W, ref_p,
                                  SPIKE_SIGMAS * max(s_p, 1e-6)) & spinning
    keep = ~(thrust_spike | power_spike)
    if not np.all(keep):
        w = keep.astype(float)
        count, (u_m, v_m, t_mean, p_mean) = _means(key, n_keys, w, [u, v, thrust_N, power_W])
    else:
        _, (u_m, v_m) = _means(key, n_keys, None, [u, v])
    has = count > 0
    return {"command": u_m[has], "voltage_V": v_m[has], "thrust_N": t_mean[has], "power_W": p_mean[has],
            "count": count[has], "row_level": (np.cumsum(has) - 1)[key],
            "thrust_spike": thrust_spike, "power_spike": power_spike}
