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
rows (every k-th row); then the full data is passed once in blocks (bounded memory) for
the spike mask, the one-step update and the covariance. Small sweeps iterate on all rows.
"""

import numpy as np

HUBER_C = 1.345          # tuning constant [-]: 95 % Gaussian efficiency (Huber 1981)
MAD_TO_SIGMA = 1.4826    # 1 / Phi^-1(3/4) [-]: MAD of a normal sample -> its sigma
WORK_ROWS = 20000        # rows the iterations of a very large fit use [-]
BLOCK_ROWS = 65536       # rows per block of a full-data pass [-]


def mad_scale(residuals):
    """Robust scale s = 1.4826 median(|r - median(r)|) [same unit as r]; 0 for a constant r."""
    r = np.asarray(residuals, dtype=float)
    med = np.median(r)
    return float(MAD_TO_SIGMA * np.median(np.abs(r - med)))


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
        step = _solve(jw.T @ jac, jw.T @ r)
        base = huber_loss(r, scale, c)
        lam = 1.0
        for _ in range(30):
            ft, _ = model(theta + lam * step, index)
            if huber_loss(yy - ft, scale, c) <= base * (1 + 1e-12):
                break
            lam *= 0.5
        theta = theta + lam * step
        if np.all(np.abs(lam * step) <= tol * (np.abs(theta) + 1e-9)):
            break
    f, _ = model(theta, index)
    return theta, _scale_floor(yy - f, yy)


def huber_fit(model, theta0, y, c=HUBER_C, groups=None, spike_sigmas=None, relative_spikes=False,
              max_iter=60, tol=1e-8, work_rows=WORK_ROWS, block_rows=BLOCK_ROWS):
    """Huber fit y ~ f(theta) (linear or not) with spike rejection; see the module docstring.

    model(theta, rows) -> (f, J) for the rows ``rows`` (a slice); theta0: start (p);
    y: n observations; groups: n integer labels for the cluster-robust covariance;
    spike_sigmas: rows whose residual exceeds this many robust scales are left out
    (weight 0) and flagged; relative_spikes: judge spikes on r / |f| instead of r (for
    noise that grows with the signal). Returns dict: coef (p), cov (p x p), scale,
    residuals (n, at the start of the last pass for very large fits), spikes (n bools).
    """
    y = np.asarray(y, dtype=float)
    n = y.size
    theta = np.asarray(theta0, dtype=float).copy()
    step = max(1, n // work_rows)
    work = slice(None, None, step)
    # a very large fit is finished by a full-data step, so its working set needs less polish
    theta, scale = _iterate(model, theta, y, work, c, max_iter, tol if step == 1 else 1e-5)
    # spike threshold from the working set
    f_w, _ = model(theta, work)
    if relative_spikes:
        rel_w = (y[work] - f_w) / np.maximum(np.abs(f_w), 0.05 * float(np.max(np.abs(f_w))) + 1e-300)
        rel_floor = 0.05 * float(np.max(np.abs(f_w))) + 1e-300
        rel_center, rel_scale = float(np.median(rel_w)), max(mad_scale(rel_w), 1e-12)
    passes = 1 if step > 1 else 30
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
        if k == 0:
            cov = acc.covariance(n - int(np.count_nonzero(spikes)))
        delta = _solve(acc.a, acc.g)
        if step > 1:
            theta = theta + delta  # one-step Newton estimate (Bickel 1975) from the working set
            break
        cov = acc.covariance(n - int(np.count_nonzero(spikes)))
        theta = theta + delta
        keep = ~spikes
        scale = _scale_floor(residuals[keep], y[keep])
        if np.all(np.abs(delta) <= tol * (np.abs(theta) + 1e-9)):
            break
    return {"coef": theta, "cov": cov, "scale": scale, "residuals": residuals, "spikes": spikes}


def huber_lstsq(design, y, c=HUBER_C, groups=None, spike_sigmas=None, relative_spikes=False):
    """Linear Huber regression y ~ design @ beta (design: n x p) by IRLS; see huber_fit.

    Returns dict: coef (p), cov (p x p), scale (unit of y), residuals (n), spikes (n).
    """
    design = np.asarray(design, dtype=float)
    y = np.asarray(y, dtype=float)
    _require_finite(design, y)
    work = slice(None, None, max(1, y.size // WORK_ROWS))
    beta0 = _solve(design[work].T @ design[work], design[work].T @ y[work])

    def model(beta, rows):
        x = design[rows]
        return x @ beta, x

    return huber_fit(model, beta0, y, c=c, groups=groups, spike_sigmas=spike_sigmas,
                     relative_spikes=relative_spikes)
