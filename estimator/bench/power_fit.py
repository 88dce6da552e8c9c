"""Electrical power model and static thrust factor fitted to a bench sweep.

Power per rotor (estimator.core.power_model, the one copy of the form):
P = p0 + p_h T^0.5 + p_1 T + p_15 T^1.5 + p_2 T^2 at the bench density, every coefficient
>= 0, fitted by non-negative least squares (scipy.optimize.nnls, Lawson and Hanson 1974) on
the command levels' mean thrust and power (estimator.bench.levels), columns scaled to unit
size; levels beyond SPIKE_SIGMAS robust scales (relative to their power) are left out in a
second pass.

Static factor (design notes sec. 3): k = T / (2 rho A P^2)^(1/3) per row; k <= 1 always.
k(T) = k0 + slope T is a line through the levels above 10 % of T_max.
"""


import numpy as np

from estimator import solvers
from estimator.errors import InputError
from estimator.bench.levels import confirmed_top, robust_scale as mad_scale

# rows below this share of T_max are left out of k and of the watch residual: there the
# power is mostly idle draw and k means little [-]
K_MIN_THRUST_SHARE = 0.1
# k below this is far under any working rotor (0.3 is the conservative rule of thumb,
# common practice) and almost surely a unit slip [-]
K_IMPLAUSIBLY_LOW = 0.1
# k of working rotors, micro rotors at low Reynolds number to the best large sets (design
# notes sec. 3a; common practice): below the lower end a unit slip is named in a warning [-]
K_PLAUSIBLE = (0.25, 1.0)
# medians of a very large sweep are taken over a systematic subsample of this many rows [-]
MAD_ROWS = 5000
# relative power residuals beyond this many robust sigmas are counted as spikes, left out [-]
SPIKE_SIGMAS = 6.0


def static_factors(thrust_N, power_W, density_kg_m3, area_m2):
    """k = T / (2 rho A P^2)^(1/3) [-] per row (arrays); NaN where P <= 0.

    thrust_N [N]; power_W: electrical input power [W]; density_kg_m3 [kg/m^3]; area_m2 [m^2].
    Source: momentum theory, design notes sec. 3.
    """
    p = np.asarray(power_W, dtype=float)
    with np.errstate(invalid="ignore", divide="ignore"):
        ideal = np.cbrt(2.0 * density_kg_m3 * area_m2 * p * p)
        return np.where(p > 0.0, np.asarray(thrust_N, dtype=float) / ideal, np.nan)


def _unit_slips(k_value, thrust_unit, current_unit):
    """Unit slips that would bring k into K_PLAUSIBLE, as readable phrases (k too high or too low).

    A thrust column in unit X labelled as Y is read Y/X times too large, so k is that factor
    off; k goes as current^(-2/3), so amps labelled mA make k 100 times too high and
    milliamps labelled A 100 times too low.
    """
    from estimator.bench.columns import UNITS

    lo, hi = K_PLAUSIBLE
    out = []
    scales = UNITS["thrust"]
    if thrust_unit in scales:
        seen = set()
        for true_unit, (scale, _) in scales.items():
            ratio = scales[thrust_unit][0] / scale  # k read / k true
            if true_unit == thrust_unit or abs(ratio - 1.0) < 0.2 or scale in seen:
                continue
            if lo <= k_value / ratio <= hi:
                seen.add(scale)
                out.append("thrust in %s labelled as %s (k would be %.2f)" % (true_unit, thrust_unit, k_value / ratio))
    if current_unit == "mA" and lo <= k_value / 100.0 <= hi:
        out.append("current in A labelled as mA (k would be %.2f)" % (k_value / 100.0))
    if current_unit == "A" and lo <= k_value * 100.0 <= hi:
        out.append("current in mA labelled as A (k would be %.2f)" % (k_value * 100.0))
    return out


def _why_no_power(thrust_N, power_W, sel, current_unit):
    """The likely cause when too few thrusting rows have power: the current reads zero (or below
    it) on the rows whose thrust rises above K_MIN_THRUST_SHARE of the top, while a rotor that
    thrusts draws current (new-user trial 10, finding 5: a sweep with its current sensor off got
    no cause at all); else ''."""
    thrusting = int(np.count_nonzero(sel))
    dead = int(np.count_nonzero(np.asarray(power_W)[sel] <= 0.0))
    if thrusting < 5 or dead < 0.9 * thrusting:
        return ""
    return (": the current reads zero (or below) on %d of the %d rows whose thrust rises above %.0f %% of the "
            "top, where a turning rotor draws current: is the current sensor connected and powered, or is "
            "current[%s] the wrong column?" % (dead, thrusting, 100.0 * K_MIN_THRUST_SHARE, current_unit))


def check_static_factor(source, thrust_N, power_W, density_kg_m3, area_m2, thrust_unit="N",
                        current_unit="A", warnings=None):
    """Refuse data whose static factor is robustly above 1 (impossible) or far too low.

    Rows above 10 % of the top thrust (the 99th percentile, or the third largest row when that is
    lower: levels.confirmed_top) are sorted by thrust into up to ten bins;
    if the median k of any bin (at least five rows each) exceeds 1 the data is impossible.
    One noisy row cannot trip it. A very large sweep is judged on a systematic subsample
    of at most MAD_ROWS rows. thrust_N [N]; power_W [W]; density_kg_m3 [kg/m^3];
    area_m2 [m^2]. A median k below K_IMPLAUSIBLY_LOW is refused, below K_PLAUSIBLE[0] warned
    (appended to ``warnings``), each naming the unit slips that would explain it. Raises
    InputError naming the likely cause; returns the median k [-].
    """
    step = max(1, np.asarray(thrust_N).size // MAD_ROWS)
    t = np.asarray(thrust_N, dtype=float)[::step]
    power_W = np.asarray(power_W)[::step]
    # on 80 rows the 99th percentile lies between the two largest: one 98 N glitch on a 1.4 N
    # rotor raised it to 21 N and left no row above 10 % of it (new-user trial 7, finding 3)
    top = min(float(np.percentile(t, 99.0)), confirmed_top(t))
    if not top > 0.0:
        raise InputError("%s: thrust never rises above zero (99th percentile %.4g N); is the "
                         "load cell connected, or its sign reversed?" % (source, top))
    sel = t > K_MIN_THRUST_SHARE * top
    ts = t[sel]
    k = static_factors(ts, power_W[sel], density_kg_m3, area_m2)
    good = np.isfinite(k)
    ts, k = ts[good], k[good]
    if k.size < 5:
        raise InputError("%s: fewer than 5 rows with thrust and power above idle%s" % (source, _why_no_power(
            t, power_W, sel, current_unit)))
    n_bins = min(10, k.size // 5)
    order = np.argsort(ts, kind="stable")
    worst = max(float(np.median(part)) for part in np.array_split(k[order], n_bins))
    k_med = float(np.median(k))
    if worst > 1.0:
        causes = _unit_slips(worst, thrust_unit, current_unit) or [
            "the thrust unit in the header (%s)" % thrust_unit]
        causes += ["load-cell calibration (span) off",
                   "a current-sensor scale error (k grows as current^(-2/3))",
                   "a wrong propeller diameter (k grows as D^(-2/3))"]
        raise InputError("%s: static thrust factor k = %.3g (median of a thrust band) is above 1: "
                         "more thrust than momentum theory allows for that power, which is "
                         "impossible. Likely cause: %s" % (source, worst, "; or ".join(causes)))
    if k_med < K_PLAUSIBLE[0]:
        causes = _unit_slips(k_med, thrust_unit, current_unit)
        causes += ["a wrong propeller diameter (k goes as D^(-2/3))"]
        text = ("static thrust factor k = %.3g is %s any working rotor (good small sets reach 0.5 to "
                "0.7, about 0.3 is a conservative rule of thumb, common practice). Likely cause: %s"
                % (k_med, "far below" if k_med < K_IMPLAUSIBLY_LOW else "below", "; or ".join(causes)))
        if k_med < K_IMPLAUSIBLY_LOW:
            raise InputError("%s: %s" % (source, text))
        if warnings is not None:
            warnings.append(text)
    return k_med


def fit_power(lv, rows, curve, density_kg_m3, area_m2):
    """The power model and the static factor of a sweep, with all the fit says: one call.

    fit_power_model on the levels lv; its relative noise as the watch will see it
    (watch_residual_rel_std: each row's command and voltage through the fitted curve, a dict
    of estimator.bench.curve_fit.fit_curve, to thrust, then the power model) over the rows
    (command [-], voltage [V], power [W], used: False for a spike; a systematic subsample of
    at most MAD_ROWS); the line k(T) (fit_static_factor: its summary line and covariance, and
    the median thrust, where the parameter set takes k from the power model itself,
    estimator.params.build_params, which refuses k > 1).
    density_kg_m3: bench air [kg/m^3]; area_m2: disk area [m^2].
    Returns (power dict with residual_rel_std, static-factor dict).
    """
    from estimator.bench.curve_fit import thrust_model_N

    u, v, p, used = rows
    power = fit_power_model(lv, density_kg_m3)
    step = max(1, u.size // MAD_ROWS)
    t_sub = thrust_model_N(curve, u[::step], v[::step])
    ok = used[::step]
    power["residual_rel_std"] = watch_residual_rel_std(p[::step][ok], power_model_W(power, t_sub[ok]),
                                                       t_sub[ok] / curve["thrust_max_N"])
    return power, fit_static_factor(lv, density_kg_m3, area_m2, curve["thrust_max_N"], power)


def fit_power_model(levels, density_kg_m3):
    """Non-negative fit of the power form to levels (dict thrust_N [N], power_W [W]).

    Thrust below 0 (load-cell zero drift) counts as 0. density_kg_m3: bench rho [kg/m^3].
    Returns dict: the estimator.core.power_model KEYS [W, W/N^0.5, W/N, W/N^1.5, W/N^2],
    reference_density_kg_m3, standard_errors (same keys; 0 for a coefficient held at 0),
    power_rms_residual_W [W], levels_left_out (count).
    """
    from estimator.core.power_model import KEYS

    t = np.clip(levels["thrust_N"], 0.0, None)
    p = levels["power_W"]
    root = np.sqrt(t)
    design = np.column_stack([np.ones_like(t), root, t, t * root, t * t])
    norm = np.maximum(np.max(np.abs(design), axis=0), 1e-300)
    x = design / norm
    keep = np.ones(t.size, dtype=bool)
    for _ in range(2):
        coef, _ = solvers.nnls(x[keep], p[keep], "power model", maxiter=2000)
        fitted = x @ coef
        rel = (p - fitted) / np.maximum(np.abs(fitted), 0.02 * float(np.max(np.abs(fitted))) + 1e-300)
        scale = max(mad_scale(rel[keep]), 1e-6)
        new_keep = np.abs(rel - np.median(rel[keep])) <= SPIKE_SIGMAS * scale
        if np.count_nonzero(new_keep) < 6 or np.array_equal(new_keep, keep):
            break
        keep = new_keep
    r = p[keep] - x[keep] @ coef
    active = coef > 0.0
    se = np.zeros(5)
    n_act = int(np.count_nonzero(active))
    if n_act and r.size > n_act:
        xa = x[keep][:, active]
        s2 = float(r @ r) / (r.size - n_act)
        se[active] = np.sqrt(np.maximum(np.diag(solvers.pinv(xa.T @ xa, "power model's information")) * s2, 0.0))
    coef, se = coef / norm, se / norm
    if not np.any(coef[1:] > 0.0):
        raise InputError("power does not rise with thrust in this sweep (every thrust term fits to "
                         "zero); check that the current column belongs to the thrust column")
    out = {k: float(c) for k, c in zip(KEYS, coef)}
    out["reference_density_kg_m3"] = float(density_kg_m3)
    out["standard_errors"] = {k: float(e) for k, e in zip(KEYS, se)}
    out["power_rms_residual_W"] = float(np.sqrt(np.mean(r * r))) if r.size else 0.0
    out["levels_left_out"] = int(t.size - np.count_nonzero(keep))
    return out


def power_model_W(power, thrust_N, density_kg_m3=None):
    """P(T, rho) [W] for arrays: estimator.core.power_model.rotor_power_W (operators only)."""
    from estimator.core.power_model import rotor_power_W

    rho = power["reference_density_kg_m3"] if density_kg_m3 is None else density_kg_m3
    t = np.asarray(thrust_N, dtype=float)
    return rotor_power_W(power, t, rho) if t.ndim else rotor_power_W(power, float(t), rho)


def watch_residual_rel_std(power_W, expected_W, thrust_share):
    """Robust relative std of (P_meas - P_exp) / P_exp over rows above 10 % of T_max [-].

    expected_W is what the watch would expect: the power model at the thrust the fitted
    curve gives for each row's command and voltage. Robust std = 1.4826 MAD, taken over a
    systematic subsample of at most MAD_ROWS rows of a very large sweep.
    """
    step = max(1, np.asarray(power_W).size // MAD_ROWS)
    power_W, expected_W = np.asarray(power_W)[::step], np.asarray(expected_W)[::step]
    sel = (np.asarray(thrust_share)[::step] > K_MIN_THRUST_SHARE) & (expected_W > 0.0)
    rel = (power_W[sel] - expected_W[sel]) / expected_W[sel]
    if rel.size < 5:
        raise InputError("fewer than 5 rows above 10 % of full thrust; cannot judge power noise")
    return float(mad_scale(rel))


def fit_static_factor(levels, density_kg_m3, area_m2, thrust_max_N, power):
    """Line k(T) = k0 + slope T through the static factor of the fitted power model.

    k(T) = T / (2 rho A P(T)^2)^(1/3) with P the power model (estimator.core.power_model) on
    40 thrusts over 15..80 % of T_max (where vehicles hover), a least-squares line through
    them; its standard errors from the scatter of the levels' own k about the line.
    levels: dict thrust_N [N], power_W [W], count [-]; density_kg_m3 [kg/m^3]; area_m2 [m^2];
    thrust_max_N [N]; power: the fitted power-model dict. Returns dict: k0 [-], slope_per_N
    [1/N], standard_errors, cov, median_thrust_N [N].
    """
    t, p = levels["thrust_N"], levels["power_W"]
    sel = (t > K_MIN_THRUST_SHARE * thrust_max_N) & (p > 0.0)
    ts = t[sel]
    k = static_factors(ts, p[sel], density_kg_m3, area_m2)
    w = levels["count"][sel]
    good = np.isfinite(k)
    ts, k, w = ts[good], k[good], w[good]
    if k.size < 3:
        raise InputError("fewer than 3 command levels above 10 % of full thrust with power above zero")
    grid = np.linspace(0.15, 0.8, 40) * thrust_max_N
    k_model = static_factors(grid, power_model_W(power, grid), density_kg_m3, area_m2)
    coef = solvers.polyfit(grid, k_model, 1, "static factor line")[::-1]
    design = np.column_stack([np.ones_like(ts), ts])
    r = k - design @ coef
    s2 = float(r @ r) / max(k.size - 2, 1)
    cov = solvers.pinv(design.T @ design, "static factor line's information") * s2
    se = np.sqrt(np.maximum(np.diag(cov), 0.0))
    order = np.argsort(ts)
    cum = np.cumsum(w[order])
    t_med = float(ts[order][np.searchsorted(cum, 0.5 * cum[-1])])
    return {"k0": float(coef[0]), "slope_per_N": float(coef[1]),
            "standard_errors": {"k0": float(se[0]), "slope_per_N": float(se[1])},
            "cov": cov, "median_thrust_N": t_med}
