"""Robust fit of the thrust curve T(u, V) = T_max (V / V_ref)^n t(x) to a bench sweep.

x = (u - u_min) / (1 - u_min) clipped at 0, t(x) = (1 - a) x + a x^2 (design notes sec. 3,
the form of estimator.core.thrust_curve). The four parameters theta = (T_max [N], a [-],
u_min [-], n [-]) are fitted together by Huber Gauss-Newton IRLS (estimator.bench.robust): rows
below u_min stay in the fit with model thrust 0, so the spin-up command is located by the
data on both sides. An up/down sweep with hysteresis is fitted through its middle, since
the lag has opposite signs on the two legs. The start comes from a coarse profile over
u_min with the model linear in (T_max (1 - a), T_max a) for each u_min.
The density exponent follows from the DC motor model, m = n - 1 (DEVELOPERS.md glossary):
one bench sweep holds one air density, so the data cannot say otherwise.
"""

import numpy as np

from estimator.errors import InputError
from estimator.bench.robust import HUBER_C, WORK_ROWS, huber_fit, working_rows
from estimator.bench.robust import fast_median as exact_median  # O(n), equal to np.median

# Voltage exponent used when the sweep holds no voltage spread: the DC motor model with a
# resistive drop of 1/8 of the back-EMF, n = 2 (1 + r) / (1 + 2 r) = 1.8 at r = 0.125
# (design notes sec. 3; r = 0.1..0.2 is common practice for small outrunners).
DEFAULT_VOLTAGE_EXPONENT = 1.8
# below this relative voltage spread at equal command (see voltage_spread_at_equal_command)
# the exponent is not fitted: the sag of one supply alone moves with the command and cannot
# be told apart from the curve's shape [-]
MIN_VOLTAGE_SPREAD = 0.03
# residuals beyond this many robust sigmas are counted as spikes and left out [-]
SPIKE_SIGMAS = 6.0
# rows of the coarse profile that starts a very large fit [-]
START_ROWS = 2000
PARAM_NAMES = ("thrust_max_N", "quadratic_share", "command_min", "voltage_exponent")


def command_groups(command):
    """Row labels for the cluster-robust covariance: the command rounded to 0.001 [-].

    Rows logged at one command step (both sweep legs, every supply voltage) share the
    hysteresis and model-form error, so their residuals are not independent.
    """
    return np.rint(np.clip(np.asarray(command), 0.0, 1.0) * 1000.0).astype(np.int16)


def voltage_spread_at_equal_command(command, voltage_V, bins=20):
    """Median over command bins of (p90 - p10) / median of the bus voltage [-].

    Measures the voltage spread that is independent of the command (sweeps at several
    supply voltages); the sag of a single supply, which follows the command, hardly counts.
    command [-]; voltage_V [V]. A very large sweep is judged on a systematic subsample.
    """
    step = max(1, command.size // 200000)
    u, v = command[::step], voltage_V[::step]
    index = np.minimum((u * bins).astype(np.intp), bins - 1)
    # one stable sort of the small bin labels groups the voltages bin by bin (same values
    # as selecting each bin in turn, in one pass)
    order = np.argsort(index.astype(np.int8 if bins < 128 else np.intp), kind="stable")
    spreads = []
    if index.size == 0 or int(np.min(index)) < 0:  # negative commands: bin by bin, plainly
        for b in range(bins):
            vb = v[index == b]
            if vb.size >= 5:
                p10, p50, p90 = np.percentile(vb, [10.0, 50.0, 90.0])
                spreads.append((p90 - p10) / p50)
        return float(np.median(spreads)) if spreads else 0.0
    v_sorted = v[order]
    edges = np.concatenate([[0], np.cumsum(np.bincount(index, minlength=bins))])
    for b in range(bins):
        vb = v_sorted[edges[b]:edges[b + 1]]
        if vb.size >= 5:
            p10, p50, p90 = np.percentile(vb, [10.0, 50.0, 90.0])
            spreads.append((p90 - p10) / p50)
    return float(np.median(spreads)) if spreads else 0.0


def _model_factory(u, log_v, fixed_n, voltage_V=None, v_ref=None):
    """Return model(theta, rows) -> (f [N], J) for estimator.robust.huber_fit (rows: a slice
    or an index array). J is n x p with contiguous columns (Fortran order). log_v: ln(V /
    V_ref) per row, or None to take it block by block from voltage_V [V] and v_ref [V]."""
    p = 3 if fixed_n is not None else 4
    log_ref = None if v_ref is None else float(np.log(v_ref))

    def model(theta, rows):
        uu = u[rows]
        if log_v is None:
            lv = np.log(voltage_V[rows])
            lv -= log_ref
        else:
            lv = log_v[rows]
        t_max, a, u_min = float(theta[0]), float(theta[1]), float(theta[2])
        n = fixed_n if fixed_n is not None else float(theta[3])
        span = 1.0 - u_min
        jt = np.empty((p, uu.size))
        x = uu - u_min
        x *= 1.0 / span
        active = x > 0.0
        np.maximum(x, 0.0, out=x)
        s = lv * n
        np.exp(s, out=s)                    # (V / V_ref)^n
        ax = a * x
        q = ax + (1.0 - a)                  # t(x) / x
        np.multiply(x, q, out=jt[0])        # t(x)
        jt[0] *= s                          # dT/dT_max = s t(x)
        f = jt[0] * t_max
        s *= t_max                          # T_max s
        xm1 = x - 1.0
        np.multiply(x, xm1, out=jt[1])
        jt[1] *= s                          # dT/da = T_max s (x^2 - x)
        q += ax                             # t'(x) = (1 - a) + 2 a x
        q *= xm1                            # dx/du_min = (x - 1) / span on the active rows
        q *= active
        np.multiply(q, s, out=jt[2])
        jt[2] *= 1.0 / span                 # dT/du_min, 0 below u_min
        if fixed_n is None:
            np.multiply(f, lv, out=jt[3])   # dT/dn = T ln(V / V_ref)
        return f, jt.T

    return model


def _start(u, log_v, thrust, n0):
    """Coarse profile over u_min: OLS in (T_max (1 - a), T_max a) for each candidate."""
    s = np.exp(n0 * log_v)
    best = None
    for u_min in np.arange(0.0, 0.5, 0.02):
        x = np.clip((u - u_min) / (1.0 - u_min), 0.0, None)
        design = np.column_stack([s * x, s * x * x])
        if not (np.all(np.isfinite(design)) and np.all(np.isfinite(thrust))):
            raise FloatingPointError("non-finite values in the start of the fit")
        coef, *_ = np.linalg.lstsq(design, thrust, rcond=None)
        r = thrust - design @ coef
        score = float(np.sum(np.minimum(r * r, 9.0 * np.median(r * r) + 1e-30)))
        if best is None or score < best[0]:
            best = (score, u_min, coef)
    _, u_min, (b1, b2) = best
    t_max = b1 + b2
    a = b2 / t_max if t_max != 0 else 0.5
    return np.array([t_max, a, u_min] + ([n0] if n0 is not None else []), dtype=float)


def fit_thrust_curve(command, voltage_V, thrust_N, voltage_exponent=None, groups=None,
                     work_rows=WORK_ROWS, keep_residuals=True):
    """Fit the thrust curve to bench rows (SI arrays of equal length).

    command: u [-]; voltage_V: bus voltage [V]; thrust_N: measured thrust [N];
    voltage_exponent: fix n [-] instead of fitting it (None = fit when the sweep holds
    voltage spread, else DEFAULT_VOLTAGE_EXPONENT with a warning); groups: row labels for
    the cluster-robust covariance (default command_groups(command)); work_rows: sweeps of
    more than twice this many rows take the very large path of estimator.robust.huber_fit;
    keep_residuals=False leaves residuals_N None on that path (saves an array).
    Returns dict: thrust_max_N [N], quadratic_share [-], command_min [-],
    reference_voltage_V [V], voltage_min_V / voltage_max_V [V] (bus voltage range of the
    rows), voltage_exponent [-], voltage_exponent_fitted (bool),
    density_exponent [-] (= n - 1), standard_errors {name: SE}, covariance {names, matrix},
    residuals_N, scale_N, spikes (bool mask), rms_residual_N [N], warnings.
    Raises InputError when the sweep does not follow the curve form.
    """
    u = np.asarray(command, dtype=float)
    v = np.asarray(voltage_V, dtype=float)
    t = np.asarray(thrust_N, dtype=float)
    warnings = []
    v_ref = float(round(exact_median(v), 2))
    large = u.size // work_rows > 1
    spread = voltage_spread_at_equal_command(u, v)
    fixed_n = voltage_exponent
    if fixed_n is None and spread < MIN_VOLTAGE_SPREAD:
        fixed_n = DEFAULT_VOLTAGE_EXPONENT
        warnings.append("the sweep's voltage spread at equal command is only %.1f %%; voltage exponent "
                        "not fitted, default n = %.1f used (DC motor model, resistive drop 1/8 of "
                        "back-EMF); sweep at two or three supply voltages to measure it"
                        % (100.0 * spread, DEFAULT_VOLTAGE_EXPONENT))
    if float(np.max(u) - np.min(u)) < 0.3:
        raise InputError("the sweep spans commands %.2f..%.2f only; sweep from idle to at least "
                         "0.3 above it" % (float(np.min(u)), float(np.max(u))))
    if large:
        # a very large sweep: the start only needs to be near; a coarse subsample places it
        idx = working_rows(u.size, work_rows)
        idx = idx[:: max(1, idx.size // START_ROWS)]
        log_v = None  # ln(V / V_ref) is taken block by block: no full-size array
        lv_start = np.log(v[idx] / v_ref)
    else:
        idx = slice(None, None, max(1, u.size // work_rows))
        log_v = np.log(v)
        log_v -= np.log(v_ref)
        lv_start = log_v[idx]
    theta0 = _start(u[idx], lv_start, t[idx], fixed_n if fixed_n is not None else DEFAULT_VOLTAGE_EXPONENT)
    if not np.all(np.isfinite(theta0)):
        raise InputError("no thrust curve can be started from this sweep (non-finite start values)")
    if fixed_n is not None:
        theta0 = theta0[:3]
    model = _model_factory(u, log_v, fixed_n, v, v_ref)
    if groups is None:
        groups = command_groups(u)
    fit = huber_fit(model, theta0, t, groups=groups, spike_sigmas=SPIKE_SIGMAS, work_rows=work_rows,
                    keep_residuals=keep_residuals)
    spikes = fit["spikes"]
    theta, cov = fit["coef"], fit["cov"]
    if fixed_n is not None:
        theta = np.append(theta, fixed_n)
        full = np.zeros((4, 4))
        full[:3, :3] = cov
        cov = full
    t_max, a, u_min, n = (float(x) for x in theta)
    if not (t_max > 0.0 and np.isfinite(t_max)):
        raise InputError("the fitted full-command thrust is %.4g N; the thrust column does not "
                         "rise with command (sign of the load cell, or columns swapped?)" % t_max)
    se = np.sqrt(np.maximum(np.diag(cov), 0.0))
    if not (-0.05 <= a <= 1.05) or not (0.0 <= u_min < 0.6):
        raise InputError("the sweep does not follow the thrust-curve form: quadratic share %.3g "
                         "(expected 0..1), spin-up command %.3g (expected 0..0.6); check the "
                         "command column and its unit" % (a, u_min))
    a = min(max(a, 0.0), 1.0) if abs(a - min(max(a, 0.0), 1.0)) <= 2.0 * se[1] else a
    if not 0.0 <= a <= 1.0:
        raise InputError("fitted quadratic share %.4g lies outside 0..1 by more than two "
                         "standard errors; the sweep does not follow the curve form" % a)
    if fixed_n is None and se[3] > 0.25:
        warnings.append("voltage exponent %.2f is poorly determined (standard error %.2f); "
                        "sweep at supply voltages further apart" % (n, se[3]))
    residuals = fit["residuals"]
    return {
        "thrust_max_N": t_max, "quadratic_share": float(a), "command_min": u_min,
        "command_max": 1.0, "reference_voltage_V": v_ref, "voltage_exponent": n,
        "voltage_min_V": float(v.min()), "voltage_max_V": float(v.max()),
        "voltage_exponent_fitted": fixed_n is None, "density_exponent": n - 1.0,
        "voltage_spread": spread,
        "standard_errors": {"thrust_max_N": float(se[0]), "quadratic_share": float(se[1]),
                            "command_min": float(se[2]),
                            "voltage_exponent": float(se[3]) if fixed_n is None else 0.0,
                            "density_exponent": float(se[3]) if fixed_n is None else 0.0},
        "covariance": {"names": list(PARAM_NAMES), "matrix": cov.tolist()},
        "residuals_N": residuals, "scale_N": fit["scale"], "spikes": spikes,
        "rms_residual_N": float(np.sqrt(fit["sum_sq_kept"] / max(fit["rows_kept"], 1))),
        "huber_c": HUBER_C, "robust_scale_N": fit["scale"],
        "warnings": warnings,
    }


def thrust_model_N(curve, command, voltage_V):
    """Vectorised T(u, V) [N] at the bench density for a fitted curve dict (arrays in SI)."""
    u = np.asarray(command, dtype=float)
    x = np.clip((u - curve["command_min"]) / (1.0 - curve["command_min"]), 0.0, 1.0)
    a = curve["quadratic_share"]
    s = np.log(np.asarray(voltage_V, dtype=float) / curve["reference_voltage_V"])
    s *= curve["voltage_exponent"]
    np.exp(s, out=s)  # (V / V_ref)^n
    return curve["thrust_max_N"] * ((1.0 - a) * x + a * x * x) * s

