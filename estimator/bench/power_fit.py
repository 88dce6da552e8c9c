"""Electrical power model and static thrust factor fitted to a bench sweep.

Power (DEVELOPERS.md, per rotor): P = P_idle + c_i T^1.5 sqrt(rho_ref / rho) + c_c T^2 [W],
T in N. The T^1.5 term has the shape of momentum-theory induced power
P_ideal = T^1.5 / sqrt(2 rho A) (Leishman 2006, eq. 2.14, from memory), the T^2 term the
shape of copper loss (I^2 R with I roughly proportional to torque, i.e. to T), P_idle the
no-load draw. At the bench rho = rho_ref, so the fit is linear in the three coefficients
and done by Huber IRLS (estimator.bench.robust).

Static factor (design notes sec. 3): k = T / (2 rho A P^2)^(1/3) per row; k <= 1 always.
k(T) = k0 + slope T is a Huber line through the rows above 10 % of T_max.
"""

import math

import numpy as np

from estimator.errors import InputError
from estimator.bench.robust import WORK_ROWS, _cross, fast_median, huber_fit, huber_lstsq, mad_scale, working_rows

# rows below this share of T_max are left out of k and of the watch residual: there the
# power is mostly idle draw and k means little [-]
K_MIN_THRUST_SHARE = 0.1
# k below this is far under any working rotor (0.3 is the conservative rule of thumb,
# common practice) and almost surely a unit slip [-]
K_IMPLAUSIBLY_LOW = 0.05
# medians of a very large sweep are taken over a systematic subsample of this many rows [-]
MAD_ROWS = 200000
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
    """Unit slips that would bring a too-high k back into 0.1..1, as readable phrases."""
    from estimator.bench.reader import UNITS

    out = []
    scales = UNITS["thrust"]
    if thrust_unit in scales:
        for true_unit, (scale, _) in scales.items():
            ratio = scales[thrust_unit][0] / scale
            if true_unit != thrust_unit and ratio > 1.5 and 0.1 <= k_value / ratio <= 1.0:
                out.append("thrust in %s labelled as %s (k would be %.2f)"
                           % (true_unit, thrust_unit, k_value / ratio))
    if current_unit == "mA" and 0.1 <= k_value / 100.0 <= 1.0:
        out.append("current in A labelled as mA (k would be %.2f)" % (k_value / 100.0))
    return out


def check_static_factor(source, thrust_N, power_W, density_kg_m3, area_m2, thrust_unit="N",
                        current_unit="A"):
    """Refuse data whose static factor is robustly above 1 (impossible) or implausibly low.

    Rows above 10 % of the 99th-percentile thrust are sorted by thrust into up to ten bins;
    if the median k of any bin (at least five rows each) exceeds 1 the data is impossible.
    One noisy row cannot trip it. A very large sweep is judged on a systematic subsample
    of at most MAD_ROWS rows. thrust_N [N]; power_W [W]; density_kg_m3 [kg/m^3];
    area_m2 [m^2]. Raises InputError naming the likely cause; returns the median k [-].
    """
    step = max(1, np.asarray(thrust_N).size // MAD_ROWS)
    t = np.ascontiguousarray(np.asarray(thrust_N, dtype=float)[::step])
    power_W = np.ascontiguousarray(np.asarray(power_W)[::step])
    top = float(np.percentile(t, 99.0))
    if not top > 0.0:
        raise InputError("%s: thrust never rises above zero (99th percentile %.4g N); is the "
                         "load cell connected, or its sign reversed?" % (source, top))
    sel = t > K_MIN_THRUST_SHARE * top
    ts = t[sel]
    k = static_factors(ts, np.asarray(power_W)[sel], density_kg_m3, area_m2)
    good = np.isfinite(k)
    ts, k = ts[good], k[good]
    if k.size < 5:
        raise InputError("%s: fewer than 5 rows with thrust and power above idle" % source)
    # equal-count thrust bins, as np.array_split of k sorted by thrust would give; one
    # partition at the bin edges places every row in its bin without a full sort
    n_bins = min(10, k.size // 5)
    sizes = [len(b) for b in np.array_split(np.empty(k.size), n_bins)]
    edges = np.cumsum(sizes)[:-1]
    order = np.argpartition(ts, edges) if edges.size else np.arange(k.size)
    bounds = np.concatenate([[0], edges, [k.size]])
    worst = max(fast_median(k[order[bounds[i]:bounds[i + 1]]]) for i in range(n_bins))
    k_med = fast_median(k)
    if worst > 1.0:
        causes = _unit_slips(worst, thrust_unit, current_unit) or [
            "the thrust unit in the header (%s)" % thrust_unit]
        causes += ["load-cell calibration (span) off",
                   "a current-sensor scale error (k grows as current^(-2/3))",
                   "a wrong propeller diameter (k grows as D^(-2/3))"]
        raise InputError("%s: static thrust factor k = %.3g (median of a thrust band) is above 1: "
                         "more thrust than momentum theory allows for that power, which is "
                         "impossible. Likely cause: %s" % (source, worst, "; or ".join(causes)))
    if k_med < K_IMPLAUSIBLY_LOW:
        raise InputError("%s: static thrust factor k = %.3g is far below any working rotor "
                         "(about 0.3 is a conservative rule of thumb). Likely cause: a thrust unit "
                         "too small in the header (newtons labelled as grams, grams as kgf), "
                         "current in mA labelled as A, or a wrong propeller diameter"
                         % (source, k_med))
    return k_med


def _power_design_model(thrust_N):
    """model(beta, rows) -> (f [W], J) for P = b0 + b1 T^1.5 + b2 T^2 (T clipped at 0),
    J with contiguous columns (Fortran order), for estimator.robust.huber_fit."""
    def model(beta, rows):
        tt = np.maximum(thrust_N[rows], 0.0)
        jt = np.empty((3, tt.size))
        jt[0] = 1.0
        np.sqrt(tt, out=jt[1])
        jt[1] *= tt
        np.multiply(tt, tt, out=jt[2])
        f = jt[1] * float(beta[1])
        f += float(beta[0])
        np.multiply(jt[2], float(beta[2]), out=tt)
        f += tt
        return f, jt.T

    return model


def fit_power_model(thrust_N, power_W, groups=None, exclude=None, work_rows=WORK_ROWS):
    """Huber fit of P = P_idle + c_i T^1.5 + c_c T^2 at the bench density.

    thrust_N: measured thrust [N] (negative values from load-cell zero drift count as 0);
    power_W: electrical power [W]; groups: row labels for the cluster-robust covariance
    (estimator.robust.sandwich_cov); exclude: optional bools, rows left out (e.g. thrust
    spikes); work_rows: see estimator.robust.huber_fit. Returns dict: idle_power_W [W],
    induced_W_per_N1_5 [W/N^1.5], copper_W_per_N2 [W/N^2], standard_errors, spikes (mask
    over all rows given, False on excluded rows), residuals_W (None for a very large sweep),
    power_rms_residual_W [W].
    """
    t_all = np.asarray(thrust_N, dtype=float)
    p_all = np.asarray(power_W, dtype=float)
    n_in = t_all.size if exclude is None else t_all.size - int(np.count_nonzero(exclude))
    if n_in // work_rows > 1:
        # very large sweep: the design is built block by block, excluded rows stay in place
        model = _power_design_model(t_all)
        ws = working_rows(t_all.size, work_rows, exclude)
        f0, design_w = model(np.zeros(3), ws)
        beta0 = np.linalg.lstsq(_cross(design_w, design_w), _cross(design_w, p_all[ws]), rcond=None)[0]
        fit = huber_fit(model, beta0, p_all, groups=groups, spike_sigmas=SPIKE_SIGMAS,
                        relative_spikes=True, work_rows=work_rows, exclude=exclude,
                        keep_residuals=False)
        spikes = fit["spikes"]
        residuals = None
    else:
        keep = None if exclude is None else ~exclude
        t = np.clip(t_all if keep is None else t_all[keep], 0.0, None)
        p = p_all if keep is None else p_all[keep]
        design = np.empty((t.size, 3))
        design[:, 0] = 1.0
        np.sqrt(t, out=design[:, 1])
        design[:, 1] *= t
        np.multiply(t, t, out=design[:, 2])
        # power noise grows with power (sensor gain error), so spikes are judged relative
        fit = huber_lstsq(design, p, groups=groups if keep is None or groups is None else groups[keep],
                          spike_sigmas=SPIKE_SIGMAS, relative_spikes=True, work_rows=work_rows)
        spikes = fit["spikes"]
        residuals = fit["residuals"]
        if keep is not None:
            spikes = np.zeros(t_all.size, dtype=bool)
            spikes[np.flatnonzero(keep)] = fit["spikes"]
    coef = fit["coef"]
    se = np.sqrt(np.maximum(np.diag(fit["cov"]), 0.0))
    if not coef[1] + coef[2] * 10.0 > 0.0:
        raise InputError("power does not rise with thrust in this sweep (fitted induced term "
                         "%.4g W/N^1.5); check the current column" % coef[1])
    return {
        "idle_power_W": float(coef[0]), "induced_W_per_N1_5": float(coef[1]),
        "copper_W_per_N2": float(coef[2]),
        "standard_errors": {"idle_power_W": float(se[0]), "induced_W_per_N1_5": float(se[1]),
                            "copper_W_per_N2": float(se[2])},
        "spikes": spikes, "residuals_W": residuals,
        "power_rms_residual_W": float(np.sqrt(fit["sum_sq_kept"] / max(fit["rows_kept"], 1))),
    }


def power_model_W(power, thrust_N, density_kg_m3=None):
    """P(T, rho) [W] from a power-model dict; thrust_N [N] (array or float); rho [kg/m^3]."""
    t = np.clip(np.asarray(thrust_N, dtype=float), 0.0, None)
    ratio = 1.0 if density_kg_m3 is None else math.sqrt(power["reference_density_kg_m3"] / density_kg_m3)
    return power["idle_power_W"] + power["induced_W_per_N1_5"] * t * np.sqrt(t) * ratio + power["copper_W_per_N2"] * t * t


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


def _line_model(x):
    """model(beta, rows) -> (f, J) for the line f = b0 + b1 x (J in Fortran order)."""
    def model(beta, rows):
        xx = x[rows]
        jt = np.empty((2, xx.size))
        jt[0] = 1.0
        jt[1] = xx
        f = xx * float(beta[1])
        f += float(beta[0])
        return f, jt.T

    return model


def fit_static_factor(thrust_N, power_W, density_kg_m3, area_m2, thrust_max_N, groups=None,
                      exclude=None, work_rows=WORK_ROWS):
    """Huber line k(T) = k0 + slope T through rows above 10 % of T_max.

    exclude: optional bools, rows left out (spikes); work_rows: see estimator.robust.huber_fit.
    Returns dict: k0 [-], slope_per_N [1/N], standard_errors, median_thrust_N [N], cov.
    """
    t = np.asarray(thrust_N, dtype=float)
    p_all = np.asarray(power_W, dtype=float)
    if t.size // work_rows > 1:
        # very large sweep: k for every row, the unused rows excluded in place (no copies)
        with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
            k = np.multiply(p_all, p_all)
            k *= 2.0 * density_kg_m3 * area_m2
            np.cbrt(k, out=k)
            np.divide(t, k, out=k)
            sel = t > K_MIN_THRUST_SHARE * thrust_max_N
            sel &= p_all > 0.0
            sel &= np.isfinite(k)
            if exclude is not None:
                sel &= ~exclude
        n_sel = int(np.count_nonzero(sel))
        if n_sel < 5:
            raise InputError("fewer than 5 rows above 10 % of full thrust with power above zero")
        if n_sel // work_rows > 1:
            out = ~sel
            ws = working_rows(t.size, work_rows, out)
            model = _line_model(t)
            _, design_w = model(np.zeros(2), ws)
            beta0 = np.linalg.lstsq(_cross(design_w, design_w), _cross(design_w, k[ws]), rcond=None)[0]
            fit = huber_fit(model, beta0, k, groups=groups, work_rows=work_rows, exclude=out,
                            keep_residuals=False, work=ws)
            t_med = fast_median(t[working_rows(t.size, MAD_ROWS, out)])
            se = np.sqrt(np.maximum(np.diag(fit["cov"]), 0.0))
            return {"k0": float(fit["coef"][0]), "slope_per_N": float(fit["coef"][1]),
                    "standard_errors": {"k0": float(se[0]), "slope_per_N": float(se[1])},
                    "cov": fit["cov"], "median_thrust_N": t_med}
    if exclude is not None:
        keep = ~exclude
        t, p_all = t[keep], p_all[keep]
        groups = None if groups is None else groups[keep]
    sel = t > K_MIN_THRUST_SHARE * thrust_max_N
    ts = t[sel]
    k = static_factors(ts, p_all[sel], density_kg_m3, area_m2)
    gs = None if groups is None else groups[sel]
    good = np.isfinite(k)
    if not np.all(good):
        ts, k = ts[good], k[good]
        gs = None if gs is None else gs[good]
    if k.size < 5:
        raise InputError("fewer than 5 rows above 10 % of full thrust with power above zero")
    design = np.empty((ts.size, 2))
    design[:, 0] = 1.0
    design[:, 1] = ts
    fit = huber_lstsq(design, k, groups=gs, work_rows=work_rows)
    se = np.sqrt(np.maximum(np.diag(fit["cov"]), 0.0))
    return {"k0": float(fit["coef"][0]), "slope_per_N": float(fit["coef"][1]),
            "standard_errors": {"k0": float(se[0]), "slope_per_N": float(se[1])},
            "cov": fit["cov"], "median_thrust_N": float(np.median(ts[:: max(1, ts.size // MAD_ROWS)]))}


def static_factor_at(sf, thrust_N):
    """k(T) = k0 + slope T [-] and its standard error at thrust_N [N] from fit_static_factor."""
    g = np.array([1.0, thrust_N])
    return sf["k0"] + sf["slope_per_N"] * thrust_N, float(math.sqrt(max(g @ sf["cov"] @ g, 0.0)))
