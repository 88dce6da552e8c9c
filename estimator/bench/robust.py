"""Robust least squares: Huber M-estimation by iteratively reweighted least squares (IRLS).

Huber's loss is quadratic for |r| <= c s and linear beyond, so a few outliers (load-cell
spikes, a row logged mid-step) pull the fit much less than in ordinary least squares.
c = 1.345 gives 95 % efficiency at Gaussian noise. The scale s is re-estimated each pass
as the normalised median absolute deviation, s = 1.4826 median(|r - median(r)|).
Standard errors come from the sandwich (heteroscedasticity-robust) covariance
cov = A^-1 B A^-1 n / (n - p), A = J^T diag(psi'(r)) J, B = J^T diag(psi(r)^2) J with
psi(r) = w r, or its cluster-robust form when rows come in groups.
Sources: P. J. Huber, *Robust Statistics* (1981), ch. 7; P. W. Holland and R. E. Welsch,
"Robust regression using iteratively reweighted least-squares" (1977); H. White (1980)
for the sandwich; K.-Y. Liang and S. L. Zeger (1986) for the cluster form; P. J. Bickel,
"One-step Huber estimates in the linear model", JASA 70 (1975) for finishing a very large
fit with one full-data Newton step from a consistent start (all from memory).

Very large sweeps: the iterations run on a systematic subsample of at most ``work_rows``
rows (every k-th row): IRLS on a coarse part of it, then Newton steps (matrix
J^T diag(psi') J, the same fixed point) on all of it; the robust scale and the spike edge
come from a larger systematic sample (SCALE_ROWS); then the full data is passed once in
cache-sized blocks (bounded memory) for the spike mask, the one-step update and the
covariance. Rows can be excluded in place (weight 0) instead of copied out. Small sweeps
iterate on all rows (the reference path).
"""

import numpy as np

HUBER_C = 1.345          # tuning constant [-]: 95 % Gaussian efficiency (Huber 1981)
MAD_TO_SIGMA = 1.4826    # 1 / Phi^-1(3/4) [-]: MAD of a normal sample -> its sigma
WORK_ROWS = 10000        # rows the iterations of a very large fit use [-]
COARSE_ROWS = 2000       # rows of the first (IRLS) iterations of a very large fit [-]
SCALE_ROWS = 50000      # rows that fix a very large fit's robust scale and spike edge [-]
BLOCK_ROWS = 16384       # rows per block of a full-data pass (arrays stay in the CPU cache) [-]
CHUNK_BLOCKS = 16        # blocks per matrix product of a full-data pass [-]


def fast_median(values):
    """Median [unit of values] by one O(n) selection (np.partition) instead of np.median's
    two-point selection: the same value (mean of the two middle values for an even count)."""
    v = np.asarray(values, dtype=float)
    n = v.size
    if n < 1000 or not np.isfinite(np.sum(v)):
        return float(np.median(v))
    k = n // 2
    part = np.partition(v, k)
    if n % 2:
        return float(part[k])
    return float(0.5 * (part[k] + np.max(part[:k])))


def mad_scale(residuals):
    """Robust scale s = 1.4826 median(|r - median(r)|) [same unit as r]; 0 for a constant r."""
    r = np.asarray(residuals, dtype=float)
    med = fast_median(r)
    dev = r - med
    np.abs(dev, out=dev)
    return float(MAD_TO_SIGMA * fast_median(dev))


def huber_weights(residuals, scale, c=HUBER_C):
    """IRLS weights w = min(1, c s / |r|) [-] for residuals r and scale s (> 0)."""
    a = np.abs(residuals)
    limit = c * scale
    return np.minimum(1.0, limit / np.maximum(a, 1e-300))


def huber_loss(residuals, scale, c=HUBER_C):
    """Huber objective sum rho(r) with rho = r^2 / 2 inside c s and c s |r| - (c s)^2 / 2 outside."""
    a = np.abs(residuals)
    limit = c * scale
    return float(np.sum(np.where(a <= limit, 0.5 * a * a, limit * a - 0.5 * limit * limit)))


def _require_finite(*arrays):
    """Raise FloatingPointError before non-finite numbers reach LAPACK."""
    for a in arrays:
        if not np.all(np.isfinite(a)):
            raise FloatingPointError("non-finite values in the fit")


def _scale_floor(r, y):
    s = mad_scale(r)
    if s > 0.0:
        return s
    fallback = float(np.std(r))
    return fallback if fallback > 0.0 else 1e-12 * max(1.0, float(np.max(np.abs(y))))


def _solve(a, g):
    return np.linalg.lstsq(a, g, rcond=None)[0]


def _cross(a, b):
    """a^T b for tall a (n x p) and b (n x q or n) by numpy's own loops: many small BLAS
    calls cost more than they save (thread hand-offs), above all on a busy machine."""
    return np.einsum("ij,i...->j...", a, b)


def sandwich_cov(jac, weights, residuals, groups=None):
    """Sandwich covariance of the parameters of a weighted fit (see module docstring).

    jac: n x p Jacobian of the model; weights: n IRLS weights (0 leaves a row out);
    residuals: n residuals; groups: optional n non-negative integer labels of rows whose
    errors may be correlated (cluster-robust B = sum_g s_g s_g^T, s_g = sum over the group
    of J^T w r). Returns a p x p array (products of the parameter units).
    """
    acc = _Accumulator(jac.shape[1], groups is not None)
    acc.add(jac, weights, residuals, groups)
    return acc.covariance(int(np.count_nonzero(weights)))


class _Accumulator:
    """Running sums A = J^T W J, g = J^T W r, B (plain or per-group scores) over row blocks."""

    def __init__(self, p, grouped):
        self.a = np.zeros((p, p))
        self.g = np.zeros(p)
        self.b = np.zeros((p, p))
        self.grouped = grouped
        self.scores = None

    def add(self, jac, w, r, groups=None, slope=None):
        # A uses psi'(r) (1 inside c s, 0 outside) when given: the Newton matrix of Huber's
        # objective and the "bread" of its sandwich (Huber 1981); else the IRLS weights
        jw = jac * (w if slope is None else slope)[:, None]
        self.a += jw.T @ jac
        wr = w * r
        self.g += jac.T @ wr
        if self.grouped:
            s = np.column_stack([np.bincount(groups, weights=jac[:, j] * wr, minlength=1)
                                 for j in range(jac.shape[1])])
            if self.scores is None:
                self.scores = s
            else:
                if s.shape[0] > self.scores.shape[0]:
                    s, self.scores = self.scores, s
                self.scores[: s.shape[0]] += s
        else:
            jr = jac * wr[:, None]
            self.b += jr.T @ jr

    def covariance(self, n):
        p = self.a.shape[0]
        b = self.scores.T @ self.scores if self.grouped else self.b
        a_inv = np.linalg.pinv(self.a)
        return a_inv @ b @ a_inv * (n / max(n - p, 1))


def _iterate(model, theta, y, index, c, max_iter, tol):
    """Gauss-Newton IRLS with step halving on the rows ``index`` (a slice); returns theta, scale."""
    yy = y[index]
    scale = 0.0
    for _ in range(max_iter):
        f, jac = model(theta, index)
        _require_finite(jac, f)
        r = yy - f
        scale = _scale_floor(r[:: max(1, r.size // 5000)], yy)  # 5000 rows fix a scale well
        w = huber_weights(r, scale, c)
        jw = jac * w[:, None]
        step = _solve(_cross(jw, jac), _cross(jw, r))
        lam = _halving(model, theta, step, yy, index, huber_loss(r, scale, c), scale, c)
        theta = theta + lam * step
        if np.all(np.abs(lam * step) <= tol * (np.abs(theta) + 1e-9)):
            break
    f, _ = model(theta, index)
    return theta, _scale_floor(yy - f, yy)


def _halving(model, theta, step, yy, index, base, scale, c):
    """Step length 1, 1/2, 1/4 ... (at most 30 halvings) at which Huber's loss on the rows
    ``index`` does not rise above ``base``; returns the length."""
    lam = 1.0
    for _ in range(30):
        ft, _ = model(theta + lam * step, index)
        if huber_loss(yy - ft, scale, c) <= base * (1 + 1e-12):
            break
        lam *= 0.5
    return lam


def _newton(model, theta, y, index, c, max_iter, tol):
    """Newton steps for Huber's objective on the rows ``index`` with the scale re-estimated
    each step (matrix J^T diag(psi') J, gradient J^T psi(r); step halving keeps the objective
    from rising). Same fixed point as _iterate, reached in fewer steps from a near start.
    Stops when a step moves every parameter by less than ``tol`` of itself or by less than
    a thousandth of its standard error on these rows (the MAD of residuals moves in small
    jumps, which can keep a relative test from ever passing). Returns theta."""
    yy = y[index]
    scale = 0.0
    for _ in range(max_iter):
        f, jac = model(theta, index)
        _require_finite(jac, f)
        r = yy - f
        scale = _scale_floor(r[:: max(1, r.size // 5000)], yy)
        limit = c * scale
        inside = np.less_equal(np.abs(r), limit, out=np.empty(r.size))
        psi = np.clip(r, -limit, limit)
        if np.sum(inside) <= 2 * jac.shape[1]:
            break  # too few rows inside the band for a Newton matrix; IRLS already placed it
        hess = np.einsum("ij,i,ik->jk", jac, inside, jac)
        step = _solve(hess, _cross(jac, psi))
        se_rows = scale * np.sqrt(np.maximum(np.diag(np.linalg.pinv(hess)), 0.0))
        lam = _halving(model, theta, step, yy, index, huber_loss(r, scale, c), scale, c)
        theta = theta + lam * step
        moved = np.abs(lam * step)
        if np.all((moved <= tol * (np.abs(theta) + 1e-9)) | (moved <= 1e-3 * se_rows)):
            break
    return theta


def huber_fit(model, theta0, y, c=HUBER_C, groups=None, spike_sigmas=None, relative_spikes=False,
              max_iter=60, tol=1e-8, work_rows=WORK_ROWS, block_rows=BLOCK_ROWS, exclude=None,
              keep_residuals=True, work=None):
    """Huber fit y ~ f(theta) (linear or not) with spike rejection; see the module docstring.

    model(theta, rows) -> (f, J) for the rows ``rows`` (a slice or an index array); theta0:
    start (p); y: n observations; groups: n integer labels for the cluster-robust
    covariance; spike_sigmas: rows whose residual exceeds this many robust scales are left
    out (weight 0) and flagged; relative_spikes: judge spikes on r / |f| instead of r (for
    noise that grows with the signal); exclude: optional n bools, rows left out of the fit
    altogether (never spikes, not counted); keep_residuals=False saves the residual array
    of a very large fit; work: its working rows when the caller has them (working_rows).
    Returns dict: coef (p), cov (p x p), scale, residuals (n, at the
    start of the last pass for very large fits; None when not kept), spikes (n bools),
    sum_sq_kept (sum of squared residuals of the rows used, same point), rows_kept.
    """
    y = np.asarray(y, dtype=float)
    n = y.size
    theta = np.asarray(theta0, dtype=float).copy()
    n_in = n if exclude is None else n - int(np.count_nonzero(exclude))
    step = max(1, n_in // work_rows)
    if step > 1:
        return _large_fit(model, theta, y, c, groups, spike_sigmas, relative_spikes, max_iter,
                          work_rows, block_rows, exclude, keep_residuals, work)
    if exclude is not None:
        raise ValueError("exclude is for very large fits; compress the arrays of a small fit")
    work = slice(None, None, step)
    theta, scale = _iterate(model, theta, y, work, c, max_iter, tol)
    # spike threshold from the working set
    f_w, _ = model(theta, work)
    if relative_spikes:
        rel_w = (y[work] - f_w) / np.maximum(np.abs(f_w), 0.05 * float(np.max(np.abs(f_w))) + 1e-300)
        rel_floor = 0.05 * float(np.max(np.abs(f_w))) + 1e-300
        rel_center, rel_scale = float(np.median(rel_w)), max(mad_scale(rel_w), 1e-12)
    passes = 30
    residuals = np.empty(n)
    spikes = np.zeros(n, dtype=bool)
    p = theta.size
    for k in range(passes):
        acc = _Accumulator(p, groups is not None)
        for b0 in range(0, n, block_rows):
            rows = slice(b0, min(n, b0 + block_rows))
            f, jac = model(theta, rows)
            r = y[rows] - f
            _require_finite(r)
            residuals[rows] = r
            if spike_sigmas is not None and k == 0:
                if relative_spikes:
                    rel = r / np.maximum(np.abs(f), rel_floor)
                    spikes[rows] = np.abs(rel - rel_center) > spike_sigmas * rel_scale
                else:
                    spikes[rows] = np.abs(r) > spike_sigmas * scale
            w = huber_weights(r, scale, c)
            w[spikes[rows]] = 0.0
            slope = (w >= 1.0).astype(float)  # psi'(r): 1 inside c s, 0 outside and for spikes
            acc.add(jac, w, r, None if groups is None else groups[rows], slope)
        delta = _solve(acc.a, acc.g)
        cov = acc.covariance(n - int(np.count_nonzero(spikes)))
        theta = theta + delta
        keep = ~spikes
        scale = _scale_floor(residuals[keep], y[keep])
        if np.all(np.abs(delta) <= tol * (np.abs(theta) + 1e-9)):
            break
    kept = residuals[~spikes]
    return {"coef": theta, "cov": cov, "scale": scale, "residuals": residuals, "spikes": spikes,
            "sum_sq_kept": float(np.dot(kept, kept)), "rows_kept": int(kept.size)}


def working_rows(n, work_rows=WORK_ROWS, exclude=None):
    """Indices of the systematic working subsample of a very large fit: every k-th of the
    rows not excluded (n_in of them), k = n_in // work_rows; the same rows a fit of the
    compressed arrays would take."""
    if exclude is None:
        return np.arange(0, n, max(1, n // work_rows))
    out = np.flatnonzero(exclude)
    n_in = n - out.size
    if out.size > n // 8:
        rows = np.flatnonzero(~exclude)
        return rows[:: max(1, rows.size // work_rows)]
    # few rows excluded: map the ranks 0, k, 2k, ... among the kept rows to row indices
    # without listing every kept row (kept row of rank m = m + excluded rows before it)
    ranks = np.arange(0, n_in, max(1, n_in // work_rows))
    return ranks + np.searchsorted(out - np.arange(out.size), ranks, side="right")


def _large_fit(model, theta, y, c, groups, spike_sigmas, relative_spikes, max_iter, work_rows,
               block_rows, exclude, keep_residuals, work=None):
    """The very large fit (module docstring): iterate on the working subsample, then one
    full-data pass in blocks for the spike mask, the one-step update (Bickel 1975) and the
    sandwich covariance, all taken at the working-set estimate."""
    n = y.size
    ws = working_rows(n, work_rows, exclude) if work is None else work
    coarse = ws[:: max(1, ws.size // COARSE_ROWS)]
    theta, _ = _iterate(model, theta, y, coarse, c, max_iter, 1e-3)
    theta = _newton(model, theta, y, ws, c, 30, 1e-6)
    # the robust scale (Huber's threshold, the spike edge) from a larger systematic sample
    # than the working set, at the working-set estimate: the full data's own scale to about
    # 0.4 % with SCALE_ROWS rows, where the working set alone leaves about 1 % (and a few
    # tenths of a standard error in the estimates, through the threshold)
    rows_s = working_rows(n, SCALE_ROWS, exclude)
    f_w, _ = model(theta, rows_s)
    r_s = y[rows_s] - f_w
    _require_finite(r_s)
    scale = _scale_floor(r_s, y[rows_s])
    if relative_spikes:
        rel_floor = 0.05 * float(np.max(np.abs(f_w))) + 1e-300
        rel_w = r_s / np.maximum(np.abs(f_w), rel_floor)
        rel_center, rel_scale = float(np.median(rel_w)), max(mad_scale(rel_w), 1e-12)
    p = theta.size
    limit = c * scale
    spikes = np.zeros(n, dtype=bool)
    residuals = np.empty(n) if keep_residuals else None
    # slope-weighted Jacobian of CHUNK_BLOCKS blocks, gathered so that A = J^T diag(psi') J
    # takes one matrix product per chunk (few BLAS calls, not one per block) [J's units]
    chunk = CHUNK_BLOCKS * block_rows
    j_slope = np.empty((p, min(n, chunk)))
    a_mat = np.zeros((p, p))
    g_vec = np.zeros(p)
    b_mat = np.zeros((p, p))
    n_groups = int(np.max(groups)) + 1 if groups is not None else 0
    scores = np.zeros((p, n_groups))
    sum_sq = 0.0
    n_drop = 0
    with np.errstate(divide="ignore", invalid="ignore"):
        for b0 in range(0, n, block_rows):
            rows = slice(b0, min(n, b0 + block_rows))
            f, jac = model(theta, rows)
            r = y[rows] - f
            ex = None if exclude is None else exclude[rows]
            if not np.isfinite(np.sum(r)):
                if ex is not None:
                    r[ex] = 0.0  # excluded rows may hold anything, even NaN
                _require_finite(r)
            if residuals is not None:
                residuals[rows] = r
            a = np.abs(r)
            if spike_sigmas is None:
                spk = None
            elif relative_spikes:
                rel = np.abs(f)
                np.maximum(rel, rel_floor, out=rel)
                np.divide(r, rel, out=rel)
                rel -= rel_center
                np.abs(rel, out=rel)
                spk = rel > spike_sigmas * rel_scale
            else:
                spk = a > spike_sigmas * scale
            if exclude is not None:
                if spk is not None:
                    spk &= ~ex
                drop = ex if spk is None else (spk | ex)
            else:
                drop = spk
            if spk is not None:
                spikes[rows] = spk
            w = np.divide(limit, a)
            np.minimum(w, 1.0, out=w)
            slope = np.less_equal(a, limit, out=a)  # psi'(r): 1 inside c s, 0 outside (as float)
            if drop is not None and drop.any():
                keep = np.logical_not(drop, out=np.empty(r.size))  # 1.0 on the rows used
                w *= keep
                slope *= keep
                sum_sq += float(np.einsum("i,i,i->", r, r, keep))
                n_drop += int(np.count_nonzero(drop))
            else:
                sum_sq += float(np.einsum("i,i->", r, r))
            w *= r  # psi(r) = w r
            jt = jac.T
            c0 = b0 % chunk
            np.multiply(jt, slope, out=j_slope[:, c0:c0 + jt.shape[1]])
            if c0 + jt.shape[1] == chunk or rows.stop == n:
                js = j_slope[:, :c0 + jt.shape[1]]
                a_mat += js @ js.T  # psi' is 0 or 1: J^T diag(psi') J = (psi' J)^T (psi' J)
            jt_psi = jt * w
            if groups is not None:
                gb = groups[rows].astype(np.intp)
                for j in range(p):
                    scores[j] += np.bincount(gb, weights=jt_psi[j], minlength=n_groups)
            else:
                g_vec += np.sum(jt_psi, axis=1)
                b_mat += _cross(jt_psi.T, jt_psi.T)
    n_used = n - n_drop
    del j_slope
    if groups is not None:
        b_mat = scores @ scores.T
        g_vec = np.sum(scores, axis=1)  # J^T psi: the cluster scores summed
    a_inv = np.linalg.pinv(a_mat)
    cov = a_inv @ b_mat @ a_inv * (n_used / max(n_used - p, 1))
    theta = theta + _solve(a_mat, g_vec)  # one-step Newton estimate (Bickel 1975)
    return {"coef": theta, "cov": cov, "scale": scale, "residuals": residuals, "spikes": spikes,
            "sum_sq_kept": sum_sq, "rows_kept": n_used}


def huber_lstsq(design, y, c=HUBER_C, groups=None, spike_sigmas=None, relative_spikes=False,
                work_rows=WORK_ROWS):
    """Linear Huber regression y ~ design @ beta (design: n x p) by IRLS; see huber_fit.

    Returns dict: coef (p), cov (p x p), scale (unit of y), residuals (n), spikes (n).
    """
    design = np.asarray(design, dtype=float)
    y = np.asarray(y, dtype=float)
    _require_finite(design, y)
    work = slice(None, None, max(1, y.size // work_rows))
    beta0 = _solve(design[work].T @ design[work], design[work].T @ y[work])

    def model(beta, rows):
        x = design[rows]
        return x @ beta, x

    return huber_fit(model, beta0, y, c=c, groups=groups, spike_sigmas=spike_sigmas,
                     relative_spikes=relative_spikes, work_rows=work_rows)
