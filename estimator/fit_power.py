"""Electrical power model and static thrust factor fitted to a bench sweep.

Power (DEVELOPERS.md, per rotor): P = P_idle + c_i T^1.5 sqrt(rho_ref / rho) + c_c T^2 [W],
T in N. The T^1.5 term has the shape of momentum-theory induced power
P_ideal = T^1.5 / sqrt(2 rho A) (Leishman 2006, eq. 2.14, from memory), the T^2 term the
shape of copper loss (I^2 R with I roughly proportional to torque, i.e. to T), P_idle the
no-load draw. At the bench rho = rho_ref, so the fit is linear in the three coefficients
and done by Huber IRLS (estimator.robust).

Static factor (design notes sec. 3): k = T / (2 rho A P^2)^(1/3) per row; k <= 1 always.
k(T) = k0 + slope T is a Huber line through the rows above 10 % of T_max.
"""

import math

import numpy as np

from estimator.errors import InputError
from estimator.robust import huber_lstsq, mad_scale

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
    from estimator.bench import UNITS

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
    t = np.asarray(thrust_N, dtype=float)[::step]
    power_W = np.asarray(power_W)[::step]
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
    bins = np.array_split(k[np.argsort(ts)], min(10, k.size // 5))
    worst = max(float(np.median(b)) for b in bins)
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
    if k_med < K_IMPLAUSIBLY_LOW:
        raise InputError("%s: static thrust factor k = %.3g is far below any working rotor "
                         "(about 0.3 is a conservative rule of thumb). Likely cause: a thrust unit "
                         "too small in the header (newtons labelled as grams, grams as kgf), "
                         "current in mA labelled as A, or a wrong propeller diameter"
                         % (source, k_med))
    return k_med


def fit_power_model(thrust_N, power_W, groups=None):
    """Huber fit of P = P_idle + c_i T^1.5 + c_c T^2 at the bench density.

    thrust_N: measured thrust [N] (negative values from load-cell zero drift count as 0);
    power_W: electrical power [W]; groups: row labels for the cluster-robust covariance
    (estimator.robust.sandwich_cov). Returns dict: idle_power_W [W], induced_W_per_N1_5
    [W/N^1.5], copper_W_per_N2 [W/N^2], standard_errors, spikes (mask), residuals_W,
    power_rms_residual_W [W].
    """
    t = np.clip(np.asarray(thrust_N, dtype=float), 0.0, None)
    p = np.asarray(power_W, dtype=float)
    design = np.empty((t.size, 3))
    design[:, 0] = 1.0
    np.sqrt(t, out=design[:, 1])
    design[:, 1] *= t
    np.multiply(t, t, out=design[:, 2])
    # power noise grows with power (sensor gain error), so spikes are judged relative
    fit = huber_lstsq(design, p, groups=groups, spike_sigmas=SPIKE_SIGMAS, relative_spikes=True)
    spikes = fit["spikes"]
    coef = fit["coef"]
    se = np.sqrt(np.maximum(np.diag(fit["cov"]), 0.0))
    residuals = fit["residuals"]
    kept = residuals[~spikes]
    if not coef[1] + coef[2] * 10.0 > 0.0:
        raise InputError("power does not rise with thrust in this sweep (fitted induced term "
                         "%.4g W/N^1.5); check the current column" % coef[1])
    return {
        "idle_power_W": float(coef[0]), "induced_W_per_N1_5": float(coef[1]),
        "copper_W_per_N2": float(coef[2]),
        "standard_errors": {"idle_power_W": float(se[0]), "induced_W_per_N1_5": float(se[1]),
                            "copper_W_per_N2": float(se[2])},
        "spikes": spikes, "residuals_W": residuals,
        "power_rms_residual_W": float(np.sqrt(np.mean(kept * kept))),
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


def fit_static_factor(thrust_N, power_W, density_kg_m3, area_m2, thrust_max_N, groups=None):
    """Huber line k(T) = k0 + slope T through rows above 10 % of T_max.

    Returns dict: k0 [-], slope_per_N [1/N], standard_errors, median_thrust_N [N], cov.
    """
    t = np.asarray(thrust_N, dtype=float)
    sel = t > K_MIN_THRUST_SHARE * thrust_max_N
    ts = t[sel]
    k = static_factors(ts, np.asarray(power_W)[sel], density_kg_m3, area_m2)
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
    fit = huber_lstsq(design, k, groups=gs)
    se = np.sqrt(np.maximum(np.diag(fit["cov"]), 0.0))
    return {"k0": float(fit["coef"][0]), "slope_per_N": float(fit["coef"][1]),
            "standard_errors": {"k0": float(se[0]), "slope_per_N": float(se[1])},
            "cov": fit["cov"], "median_thrust_N": float(np.median(ts[:: max(1, ts.size // MAD_ROWS)]))}


def static_factor_at(sf, thrust_N):
    """k(T) = k0 + slope T [-] and its standard error at thrust_N [N] from fit_static_factor."""
    g = np.array([1.0, thrust_N])
    return sf["k0"] + sf["slope_per_N"] * thrust_N, float(math.sqrt(max(g @ sf["cov"] @ g, 0.0)))
