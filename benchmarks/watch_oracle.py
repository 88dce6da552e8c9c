"""The oracle predictor of benchmarks/watch_bound.py: logged bus power from what a flight log
holds (command, voltage, their history at the log's own rate, the sample gaps), least squares
on block energy; and the log-only choice of settled blocks. See watch_bound's docstring."""

import math

import numpy as np

TAUS_S = (0.03, 0.06, 0.12, 0.25, 0.5, 1.0, 2.0, 5.0)   # command filters' time constants [s]
GRID_S = 0.005                  # grid of the filters [s] (the simulator's physics step)
SETTLE_S = 4.0                  # settled: this long after the last unsettled block [s]
STEADY_SHARE = 0.05             # block command within this share of its slow mean [-]
RICH = False                    # watch_bound --rich: about 60 more terms (a check that the class is not the limit)


def _filters(t, g, taus, g_grid=None):
    """First-order filters (time constants taus [s]) of the logged series g (time t [s]) read at
    each sample instant, with g linear between samples (first-order hold): only samples up to
    the instant enter its value. A regular log: the exact discrete filter on the samples,
    y_i = a y_(i-1) + (1 - c) g_i + (c - a) g_(i-1), a = exp(-h / tau), c = tau (1 - a) / h;
    irregular: on a GRID_S grid (scipy.signal.lfilter either way). g_grid: the series itself
    on the GRID_S grid from t = 0 instead (the diagnostic with the simulator's full command)."""
    from scipy.signal import lfilter
    gaps = np.diff(t)
    out = []
    if g_grid is None and len(gaps) and np.ptp(gaps) < 0.0015:
        h = float(np.mean(gaps))
        for tau in taus:
            a = math.exp(-h / tau)
            c = tau * (1.0 - a) / h
            y, _ = lfilter([1.0 - c, c - a], [1.0, -a], g, zi=[c * g[0]])
            out.append(y)
        return out
    if g_grid is None:
        t0 = t[0]
        gg = np.interp(np.arange(t0, t[-1] + GRID_S, GRID_S), t, g)
    else:
        t0, gg = 0.0, g_grid
    idx = np.minimum(np.floor((t - t0) / GRID_S + 1e-6).astype(int), len(gg) - 1)
    for tau in taus:
        a = 1.0 - math.exp(-GRID_S / tau)
        y, _ = lfilter([a], [1.0, a - 1.0], gg, zi=[(1.0 - a) * gg[0]])
        out.append(y[idx])
    return out


def features(t, u, v, v_ref, u_grid=None):
    """Per-sample terms (list of p arrays) of the oracle predictor from the logged t [s], u [-], V [V].
    u_grid: the command on the GRID_S grid (diagnostic only: NOT in a log)."""
    v = v / v_ref
    uv = u * v
    dt = np.diff(t, prepend=t[0] - 0.1)
    u1, u2 = np.roll(u, 1), np.roll(u, 2)
    u1[:1], u2[:2] = u[0], u[0]
    cols = [np.ones_like(u), u, u * u, u ** 3, v, uv, uv * u, uv * uv, v * v, uv ** 3,
            u1, u2, uv * u1, uv * u2, dt, dt * uv, uv * (u - u1) * np.minimum(dt, 0.2)]
    if u_grid is None:
        fu, fuv = _filters(t, u, TAUS_S), _filters(t, uv, TAUS_S)
    else:
        vg = np.interp(np.arange(len(u_grid)) * GRID_S, t, v)
        fu, fuv = _filters(t, u, TAUS_S, u_grid), _filters(t, uv, TAUS_S, u_grid * vg)
    fv = _filters(t, v, (0.05, 5.0))
    for a, b in zip(fu, fuv):
        cols += [u - a, uv * b, v * b, uv * (u - a)]
    cols += [uv * (v - fv[0]), v - fv[1], uv * (v - fv[1])]
    if RICH:
        # five lagged samples, squares and products of the lead terms
        for k in range(1, 6):
            uk = np.roll(u, k)
            uk[:k] = u[0]
            cols += [uk, uk * u * v * v, uk * uk]
        leads = [u - a for a in fu]
        for j, a in enumerate(leads):
            cols += [a * a, a * uv] + [a * b for b in leads[j + 1:]]
    return cols


def flight_blocks(fl, v_ref, block_s, end_s, u_grid=None):
    """Per 0.5 s block of one logged flight: feature sums x weight, measured energy, block
    time, mean command, steady mask (log-only rules, module docstring)."""
    t, u, v, i = fl["time_s"], fl["command"], fl["voltage_V"], fl["current_A"]
    keep = t < end_s
    t, u, v, i = t[keep], u[keep], v[keep], i[keep]
    phi = features(t, u, v, v_ref, u_grid)
    w = np.minimum(np.diff(t, prepend=t[0] - 0.1), block_s)
    b = np.floor(t / block_s).astype(int)
    nb = b[-1] + 1
    starts = np.flatnonzero(np.diff(b, prepend=-1))      # t rises: each block's samples are contiguous

    def bsum(values):
        out = np.zeros(nb)
        out[b[starts]] = np.add.reduceat(values * w, starts)
        return out

    wsum = bsum(np.ones_like(w))
    e = bsum(v * i)
    x = np.stack([bsum(col) for col in phi], axis=1)
    ub = bsum(u) / np.maximum(wsum, 1e-9)
    # settled flight, from the log alone
    spin = u > 0.5 * np.median(u)
    t_on, t_off = t[spin][0], t[spin][-1]
    tb = (np.arange(nb) + 0.5) * block_s
    # slow mean of the block command (64 s), started from the climb-out's last 15 s (those
    # blocks are never judged: settled flight starts 25 s after spin-up)
    ref = np.empty(nb)
    start = (tb > t_on + 10.0) & (tb < t_on + 25.0) & (wsum > 0)
    acc = float(np.median(ub[start])) if start.any() else float(np.median(ub[wsum > 0]))
    a = 1.0 - math.exp(-block_s / 64.0)
    for k in range(nb):
        if wsum[k] > 0 and tb[k] > t_on + 25.0:
            acc += (ub[k] - acc) * a
        ref[k] = acc
    off = np.abs(ub - ref) > STEADY_SHARE * np.maximum(ref, 1e-6)
    last_off = np.maximum.accumulate(np.where(off, tb, -1e9))
    airborne = (tb > t_on + 25.0) & (tb < t_off - 35.0) & (wsum > 0)
    steady = (~off) & (tb - last_off > SETTLE_S) & airborne
    return {"x": x, "e": e, "w": wsum, "steady": steady, "airborne": airborne, "t": tb}


def fit(blocks, mask="steady"):
    """Least squares of block mean power on block mean terms over settled blocks (mask
    "airborne": every block of the flight's middle; rows scaled by the block time: relative
    errors); columns standardised; tiny ridge."""
    x = np.concatenate([bl["x"][bl[mask]] / bl["w"][bl[mask], None] for bl in blocks])
    y = np.concatenate([bl["e"][bl[mask]] / bl["w"][bl[mask]] for bl in blocks])
    mu, sd = x.mean(0), x.std(0)
    sd[sd < 1e-12] = 1.0
    mu[0] = 0.0
    z = (x - mu) / sd
    lam = 1e-6 * len(y)
    coef = np.linalg.solve(z.T @ z + lam * np.eye(z.shape[1]), z.T @ y)
    return mu, sd, coef


def residuals(blocks, model, per, mask="steady"):
    """Relative residual of settled blocks of `per` base blocks each: (flights x blocks) array,
    NaN where a block is not settled."""
    mu, sd, coef = model
    rows = []
    n = max(len(bl["e"]) for bl in blocks) // per
    for bl in blocks:
        pred = ((bl["x"] / np.maximum(bl["w"], 1e-9)[:, None] - mu) / sd @ coef) * bl["w"]
        m = len(bl["e"]) // per * per
        e = bl["e"][:m].reshape(-1, per).sum(1)
        p = pred[:m].reshape(-1, per).sum(1)
        ok = bl[mask][:m].reshape(-1, per).all(1)
        r = np.full(n, np.nan)
        r[:len(e)] = np.where(ok, (e - p) / p, np.nan)
        rows.append(r)
    return np.array(rows)
