"""The controller's thrust curve T(u, V) = T_max (V / V_ref)^n t(x) fitted to the command levels.

x = (u - u_min) / (u_max - u_min) clipped to 0..1, t(x) = (1 - a) x + a x^2 (design notes
sec. 3, the form of estimator.core.thrust_curve). u_max is the ESC's top end point found by
the motor fit (1 unless the sweep levels off below its highest command). The parameters
(T_max [N], a [-], u_min [-], n [-]) are fitted by scipy.optimize.least_squares (trust
region reflective, bounds T_max > 0, 0 <= a <= 1, 0 <= u_min <= 0.6, 0.5 <= n <= 3, soft_l1
loss with f_scale = LOSS_SCALE robust residual scales) on the level means (estimator.bench.
levels), from a start that profiles u_min with the model linear in the rest. Without a
voltage spread, n comes from the fitted motor model instead (its d ln T / d ln V at full
command). u_min is an intercept of this curve, not where the rotor starts (the motor fit
gives that, command_start). Covariance: s^2 (J^T J)^-1 from the level residuals, which
hold noise and the curve form's own error alike, inflated by FORM_INFLATION for the
correlation of that error between neighbouring levels.
"""

import math

import numpy as np

from estimator import solvers
from estimator.errors import InputError

PARAM_NAMES = ("thrust_max_N", "quadratic_share", "command_min", "voltage_exponent")
# below this relative voltage spread at equal command the exponent is not fitted [-]
MIN_VOLTAGE_SPREAD = 0.03
LOSS_SCALE = 2.5
# the curve form's error is smooth in u, so neighbouring levels' residuals are correlated;
# about 4 levels per independent error is what the study measures (benchmarks/fit_study.py) [-]
FORM_INFLATION = 2.0
# levels that stop this far below the top end point u_max leave the curve's end to the motor
# model, which extrapolates full command (motor_fit.full_thrust_extrapolation) [-]
SHORT_OF_TOP = 0.02
# a full-command thrust extrapolated beyond the sweep with a standard error above this share
# of it is not credible: its 95 % interval would span more than +-40 % [-]
EXTRAPOLATION_MAX_SE = 0.2
# a quadratic share this close to 0 or 1 is at its bound: held there for the covariance [-]
SHARE_AT_BOUND = 0.005


def voltage_spread(levels):
    """Median over command bins (width 0.05) of the relative spread of the level voltages [-].

    (p90 - p10) / median in bins of 10 levels or more, (max - min) / median in smaller ones,
    bins of one level left out: several supplies show, the sag of one supply (which follows
    the command) hardly does, also on a short sweep of one row per step and supply.
    """
    u, v = levels["command"], levels["voltage_V"]
    bins = np.minimum((np.clip(u, 0.0, 1.0) * 20).astype(int), 19)
    spreads = []
    for b in np.unique(bins):
        vb = v[bins == b]
        if vb.size >= 10:
            p10, p50, p90 = np.percentile(vb, [10.0, 50.0, 90.0])
            spreads.append((p90 - p10) / p50)
        elif vb.size >= 2:
            spreads.append(float(np.ptp(vb) / np.median(vb)))
    return float(np.median(spreads)) if spreads else 0.0


def _inside(theta, lo, hi):
    """theta moved strictly inside the bounds lo..hi by a millionth of each range (least_squares
    refuses a start on a bound; an absolute margin would cross a range smaller than itself)."""
    margin = 1e-6 * (np.asarray(hi) - np.asarray(lo))
    return np.clip(theta, lo + margin, hi - margin)


def curve_thrust(theta, u, log_v, u_max):
    """T [N] of the curve at commands u [-] and ln(V / V_ref) [-]; theta = (T_max, a, u_min, n)."""
    t_max, a, u_min, n = theta
    x = np.clip((u - u_min) / (u_max - u_min), 0.0, 1.0)
    return t_max * ((1.0 - a) * x + a * x * x) * np.exp(n * log_v)


def curve_jacobian(theta, u, log_v, u_max):
    """d T / d theta [N per unit of each parameter] of curve_thrust, rows x 4:
    dT/dT_max = t(x) e, dT/da = T_max (x^2 - x) e, dT/du_min = -T_max e t'(x) / (u_max - u_min)
    (inside 0 < x < 1), dT/dn = T ln(V / V_ref), with e = (V / V_ref)^n."""
    t_max, a, u_min, n = theta
    span = u_max - u_min
    x = (u - u_min) / span
    inside = (x > 0.0) & (x < 1.0)
    x = np.clip(x, 0.0, 1.0)
    e = np.exp(n * log_v)
    shape = (1.0 - a) * x + a * x * x
    slope = np.where(inside, (1.0 - a) + 2.0 * a * x, 0.0)
    return np.column_stack([shape * e, t_max * (x * x - x) * e, t_max * e * slope * (x - 1.0) / span,
                            t_max * shape * e * log_v])


def _start(u, log_v, t, n, u_max):
    """Start values: u_min profiled on a grid (0.05 apart over 0..0.55, then 0.01 apart
    around the best), the curve linear in T_max (1 - a) and T_max a at each."""
    s = np.exp(n * log_v)

    def profile(grid, best=None):
        for u_min in grid:
            x = np.clip((u - u_min) / (u_max - u_min), 0.0, 1.0)
            design = np.column_stack([s * x, s * x * x])
            coef, *_ = solvers.lstsq(design, t, "thrust curve's start values")
            r = t - design @ coef
            score = float(np.sum(np.minimum(r * r, 9.0 * np.median(r * r) + 1e-30)))
            if best is None or score < best[0]:
                best = (score, float(u_min), coef)
        return best

    coarse = profile(np.arange(0.0, 0.6, 0.05))
    fine = np.arange(max(coarse[1] - 0.04, 0.0), min(coarse[1] + 0.045, 0.595), 0.01)
    _, u_min, (b1, b2) = profile(fine, coarse)
    t_max = b1 + b2
    a = b2 / t_max if t_max > 0 else 0.5
    return np.array([max(t_max, 1e-9 * max(float(np.max(t)), 1e-12)), min(max(a, 0.0), 1.0), u_min, n])


def project(command, thrust_N, u_max, n):
    """The quadratic closest (least squares) to a smooth thrust curve at V_ref: the projection
    of the fitted motor model over the flying range. command [-], thrust_N [N]: the model on a
    grid from its spin-up to u_max [-]; n: voltage exponent carried along [-]. Returns theta."""
    zero = np.zeros_like(command)
    theta0 = _start(command, zero, thrust_N, n, u_max)
    t_top = float(np.max(thrust_N))
    if not t_top > 0.0:
        raise ValueError("the motor model gives no thrust over the flying range")
    lo, hi = np.array([1e-12 * t_top, 0.0, 0.0]), np.array([10.0 * t_top, 1.0, 0.6])
    res = solvers.least_squares(lambda p: curve_thrust((p[0], p[1], p[2], n), command, zero, u_max) - thrust_N,
                                _inside(theta0[:3], lo, hi),
                                lambda p: curve_jacobian((p[0], p[1], p[2], n), command, zero, u_max)[:, :3],
                                "thrust curve", bounds=(lo, hi), x_scale="jac", method="trf", max_nfev=300)
    return np.append(res.x, n)


def fit_curve(lv, motor, v_ref, voltage_exponent, both_ways, density_kg_m3, voltage_span_V):
    """The controller's curve for a sweep, with all the fit says: one call.

    fit_quadratic on the levels lv (after the motor fit's spike screen) from the fitted motor
    model (estimator.bench.motor_fit.fit_motor_model: its top end point, voltage exponent and
    projection), with the covariance widened by the rotor's lag for a one-way sweep
    (both_ways False) and by the curve form's own error at full command; the density exponent
    and its error from the motor model. v_ref [V]; voltage_exponent: fix n [-] or None;
    density_kg_m3: bench air [kg/m^3]; voltage_span_V: the rows' lowest and highest bus
    voltage [V]. Returns fit_quadratic's dict plus reference_voltage_V,
    reference_density_kg_m3, voltage_min_V, voltage_max_V, density_exponent,
    command_swept_min, command_swept_max, extrapolation (the motor model's, when the sweep
    stops short of full command, judged by _add_extrapolation), and a warning when n comes from
    the motor model.
    """
    theta = motor["theta"]
    n_motor, se_n = motor["voltage_exponent"], motor["voltage_exponent_se"]
    curve = fit_quadratic(lv, v_ref, float(theta[5]), n_motor, voltage_exponent,
                          projection=motor["projection"], motor_n_se=se_n)
    curve["standard_errors"]["density_exponent"] = motor["density_exponent_se"]
    if not both_ways:
        _add_lag(curve)
    _add_form_gap(curve, motor["thrust_top_N"])
    curve["extrapolation"] = motor.get("extrapolation")
    if curve["extrapolation"] is not None:
        _add_extrapolation(curve)
    curve.update({"reference_voltage_V": v_ref, "reference_density_kg_m3": density_kg_m3,
                  "voltage_min_V": voltage_span_V[0], "voltage_max_V": voltage_span_V[1],
                  "density_exponent": motor["density_exponent"], "command_swept_max": motor["command_swept_max"],
                  "command_swept_min": float(np.min(lv["command"]))})
    if curve["voltage_exponent_source"] == "motor model":
        curve["warnings"].append(
            "the sweep's voltage spread at equal command is only %.1f %%: voltage exponent n = %.2f +- %.2f "
            "taken from the motor model fitted to thrust and current, with the ESC's duty held near linear in "
            "command (one voltage cannot tell the duty law from the motor's resistance); beyond %.1f..%.1f V "
            "thrust and power are extrapolated. Sweep at two or three supply voltages to measure it"
            % (100.0 * curve["voltage_spread"], n_motor, se_n, voltage_span_V[0], voltage_span_V[1]))
    return curve


def _add_extrapolation(curve):
    """Add the motor model's extrapolation error from the sweep's top command to full command
    (curve["extrapolation"], motor_errors.full_thrust_extrapolation) to the variance of T_max, in
    quadrature, and judge it: extrapolation["credible"] is False for a full-command thrust whose
    standard error exceeds EXTRAPOLATION_MAX_SE of it, or one not above the model's thrust at
    the sweep's top (the fit refuses it: wording.extrapolation_refusal)."""
    ex = curve["extrapolation"]
    m = np.array(curve["covariance"]["matrix"])
    m[0, 0] += ex["standard_error_N"] ** 2
    curve["covariance"]["matrix"] = m.tolist()
    se = float(np.sqrt(m[0, 0]))
    curve["standard_errors"]["thrust_max_N"] = se
    t_max = curve["thrust_max_N"]
    ex["credible"] = bool(math.isfinite(se) and t_max > ex["thrust_top_N"] and se <= EXTRAPOLATION_MAX_SE * t_max)


def _add_lag(curve):
    """Widen the curve's covariance for a one-way sweep by the rotor's unknown lag behind the
    command (core.constants.ONE_WAY_LAG_COMMAND_SE): on u_min and, through dT/du at full
    command, on T_max."""
    from estimator.core.constants import ONE_WAY_LAG_COMMAND_SE as ONE_WAY_LAG_SE

    m = np.array(curve["covariance"]["matrix"])
    slope = curve["thrust_max_N"] * (1.0 + curve["quadratic_share"]) / (curve["command_max"] - curve["command_min"])
    m[0, 0] += (slope * ONE_WAY_LAG_SE) ** 2
    m[2, 2] += ONE_WAY_LAG_SE ** 2
    curve["covariance"]["matrix"] = m.tolist()
    curve["standard_errors"]["thrust_max_N"] = float(np.sqrt(m[0, 0]))
    curve["standard_errors"]["command_min"] = float(np.sqrt(m[2, 2]))


def _add_form_gap(curve, motor_thrust_N):
    """Add the curve form's own error at full command to the variance of T_max: the gap
    between the quadratic's T_max and the fitted motor model's thrust at the same command
    and voltage (motor_thrust_N [N]), in quadrature.

    The level residuals measure the form's misfit on average, but the standard error made
    from them shrinks as levels are added (more supplies, both legs, more steps) while the
    quadratic's error at its end point does not; the motor model, which follows real motors
    and extrapolates by physics, shows that error directly. The difference between two
    fitted models at the point of interest as the model-form term is common practice
    (model discrepancy); on the randomised truths (benchmarks/fit_study.py) it raises the
    coverage of T_max +- 1.96 standard errors from 86 % to about 98 %.
    """
    m = np.array(curve["covariance"]["matrix"])
    m[0, 0] += (curve["thrust_max_N"] - motor_thrust_N) ** 2
    curve["covariance"]["matrix"] = m.tolist()
    curve["standard_errors"]["thrust_max_N"] = float(np.sqrt(m[0, 0]))


def fit_quadratic(levels, v_ref, u_max, motor_n, voltage_exponent=None, projection=None, motor_n_se=0.0):
    """Fit the curve to levels (dict command [-], voltage_V [V], thrust_N [N]).

    projection: optional (command grid [-], thrust [N] at v_ref) of the fitted motor model;
    without a voltage spread the exported curve is its projection (project), with one the
    levels fit starts there.
    v_ref: reference voltage [V]; u_max: top end point [-]; motor_n: the motor model's
    voltage exponent [-], used when the sweep has no voltage spread, and motor_n_se its
    standard error [-] (estimator.bench.motor_errors.exponent_errors), carried as n's; voltage_exponent: fix
    n [-]. Returns dict (thrust_max_N, quadratic_share, command_min, command_max,
    voltage_exponent, voltage_exponent_source, standard_errors, covariance, rms_residual_N,
    residual_scale_N, voltage_spread, warnings, quadratic_share_held: the share could not be
    told from the intercept and was held for the covariance, its standard error 0). Raises InputError when the levels do not
    rise with command.
    """
    u, v, t = levels["command"], levels["voltage_V"], levels["thrust_N"]
    log_v = np.log(v / v_ref)
    warnings = []
    spread = voltage_spread(levels)
    if voltage_exponent is not None:
        n0, source = float(voltage_exponent), "given"
    elif spread >= MIN_VOLTAGE_SPREAD:
        n0, source = min(max(motor_n, 0.6), 2.9), "fitted"
    else:
        n0, source = min(max(motor_n, 0.5), 3.0), "motor model"
    fixed = source != "fitted"
    theta0 = _start(u, log_v, t, n0, u_max) if projection is None else project(*projection, u_max, n0)
    t_top = float(np.max(t))
    lo = np.array([1e-12 * t_top, 0.0, 0.0, 0.5])
    hi = np.array([10.0 * t_top, 1.0, 0.6, 3.0])
    if fixed:
        lo[3], hi[3] = n0 - 1e-9, n0 + 1e-9
    # a sweep that stops short of full command: the levels cannot place the curve's end, the
    # motor model's physics can (design notes sec. 3): T_max is its thrust at u_max, V_ref,
    # and the levels shape the rest; its error is the motor model's (the caller adds it)
    anchored = projection is not None and not fixed and float(np.max(u)) < u_max - SHORT_OF_TOP
    if anchored:
        t_end = float(projection[1][-1])
        lo[0], hi[0] = t_end * (1.0 - 1e-9), t_end * (1.0 + 1e-9)
        theta0[0] = t_end
    theta0 = _inside(theta0, lo, hi)
    scale = max(0.01 * t_top, 1e-12)
    for _ in range(0 if fixed and projection is not None else 2):
        res = solvers.least_squares(lambda p, s=scale: (curve_thrust(p, u, log_v, u_max) - t) / s, theta0,
                                    lambda p, s=scale: curve_jacobian(p, u, log_v, u_max) / s, "thrust curve",
                                    bounds=(lo, hi), loss="soft_l1", f_scale=LOSS_SCALE, x_scale="jac",
                                    method="trf", max_nfev=300)
        theta0 = _inside(res.x, lo, hi)
        r = curve_thrust(res.x, u, log_v, u_max) - t
        from estimator.bench.levels import robust_scale
        scale = max(robust_scale(r) if r.size > 4 else float(np.sqrt(np.mean(r * r))), 1e-5 * t_top)
    if fixed and projection is not None:
        from estimator.bench.levels import robust_scale
        theta = theta0
        r = curve_thrust(theta, u, log_v, u_max) - t
        scale = max(robust_scale(r) if r.size > 4 else float(np.sqrt(np.mean(r * r))), 1e-5 * t_top)
    else:
        theta = res.x
        r = curve_thrust(theta, u, log_v, u_max) - t
    p_free = 3 if fixed else 4
    jac = curve_jacobian(theta, u, log_v, u_max)[:, :p_free]  # d r / d theta [N per unit of each]
    dof = max(r.size - p_free, 1)
    s2 = float(np.sum(np.minimum(r * r, (4.0 * scale) ** 2))) / dof
    free = [k for k in range(p_free) if not (anchored and k == 0)]
    share_held = _share_not_separable(theta[1], jac[:, free], s2, free.index(1))
    if share_held:
        free.remove(1)
    cov = np.zeros((4, 4))
    sub = jac[:, free]
    cov[np.ix_(free, free)] = solvers.pinv(sub.T @ sub, "thrust curve's information") * s2 * FORM_INFLATION ** 2
    se = np.sqrt(np.maximum(np.diag(cov), 0.0))
    if fixed:
        # n was not fitted to the levels: a given n has no error bar, the motor model's has its own
        se[3] = float(motor_n_se) if source == "motor model" else 0.0
        cov[3, 3] = se[3] ** 2
    elif se[3] > 0.25:
        warnings.append("voltage exponent %.2f is poorly determined (standard error %.2f); sweep at "
                        "supply voltages further apart" % (theta[3], se[3]))
    return {"thrust_max_N": float(theta[0]), "quadratic_share": float(theta[1]),
            "quadratic_share_held": share_held,
            "command_min": float(theta[2]), "command_max": float(u_max),
            "voltage_exponent": float(theta[3]), "voltage_exponent_source": source,
            "standard_errors": {k: float(x) for k, x in zip(PARAM_NAMES, se)},
            "covariance": {"names": list(PARAM_NAMES), "matrix": cov.tolist()},
            "rms_residual_N": float(np.sqrt(np.mean(r * r))), "residual_scale_N": float(scale),
            "voltage_spread": spread, "warnings": warnings}


def _share_not_separable(share, jac, s2, column=1):
    """True when the quadratic share cannot be told from the intercept on these levels.

    At a = 1 the curve's derivatives by a and by u_min are proportional (dt/da = x^2 - x,
    dt/du_min = 2 T_max (x^2 - x) / (u_max - u_min)), so J^T J is singular there and its
    inverse gives a meaningless standard error of thousands. Then (a within SHARE_AT_BOUND
    of 0 or 1, or a standard error beyond the whole 0..1 range) the share is held at its
    fitted value for the covariance and its error is carried by u_min: the curve's own
    band is unchanged to first order.
    """
    if share <= SHARE_AT_BOUND or share >= 1.0 - SHARE_AT_BOUND:
        return True
    with np.errstate(all="ignore"):
        var = solvers.pinv(jac.T @ jac, "thrust curve's information")[column, column] * s2 * FORM_INFLATION ** 2
    return not (np.isfinite(var) and var <= 1.0)


def check_rising(levels, source):
    """Refuse levels that do not follow a rising curve, naming the real cause (InputError)."""
    u, t = levels["command"], levels["thrust_N"]
    if u.size < 4:
        raise InputError("%s: the sweep holds %d command level(s); log at least 4 steps from idle to "
                         "full command" % (source, u.size))
    if float(np.ptp(u)) < 0.3:
        raise InputError("%s: the sweep spans commands %.2f..%.2f only; sweep from idle to at least "
                         "0.3 above it" % (source, float(np.min(u)), float(np.max(u))))
    top = float(np.max(np.abs(t)))
    if not float(np.max(t)) > 0.0:
        raise InputError("%s: thrust never rises above zero; is the load cell connected, or its sign "
                         "reversed?" % source)
    order = np.argsort(u)
    lo_half, hi_half = order[: order.size // 2], order[order.size // 2:]
    # medians: one glitch level of 200 times the top thrust (a saturated 32767 g on a 150 g
    # rotor, screened only after the motor fit) outweighed every other level in a mean
    hi, lo = float(np.median(t[hi_half])), float(np.median(t[lo_half]))
    if hi <= lo:
        if hi < -0.2 * top:
            raise InputError("%s: thrust grows more negative with command: the load cell's sign is "
                             "reversed (swap its leads or negate the column)" % source)
        raise InputError("%s: thrust does not rise with command (median thrust %.4g N in the upper half "
                         "of the commands, %.4g N in the lower half); are the command and thrust "
                         "columns from the same sweep?" % (source, hi, lo))


def thrust_model_N(curve, command, voltage_V):
    """Vectorised T(u, V) [N] at the bench density for a fitted curve dict (arrays in SI)."""
    log_v = np.log(np.asarray(voltage_V, dtype=float) / curve["reference_voltage_V"])
    theta = (curve["thrust_max_N"], curve["quadratic_share"], curve["command_min"], curve["voltage_exponent"])
    return curve_thrust(theta, np.asarray(command, dtype=float), log_v, curve.get("command_max", 1.0))
