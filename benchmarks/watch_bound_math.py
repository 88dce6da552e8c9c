"""Pure math of benchmarks/watch_bound.py: lower bounds and the CUSUM's delay for a mean shift
in block residuals (sources in each docstring; tests/test_watch_bound_math.py checks them)."""

import math

import numpy as np
from scipy import stats


def lorden_delay_s(shift, sigma, block_s, rate_per_h):
    """Lorden's (1971) asymptotic lower bound of the worst-case mean detection delay [s]:
    ln(gamma) / I blocks, I = shift^2 / (2 sigma^2) per block (Gaussian KL information),
    gamma = blocks per hour / rate_per_h. shift, sigma [-] per block; block_s [s]."""
    gamma = 3600.0 / block_s / rate_per_h
    info = shift * shift / (2.0 * sigma * sigma)
    return block_s * math.log(gamma) / info


def ideal_delay_quantile_s(shift, sigma, block_s, rate_per_h, q):
    """q-quantile [s] of the first passage of ln(gamma) by the log-likelihood ratio (drift I,
    variance 2 I per block): inverse Gaussian with mean a / I, shape a^2 / (2 I), a = ln gamma."""
    a = math.log(3600.0 / block_s / rate_per_h)
    info = shift * shift / (2.0 * sigma * sigma)
    mean, shape = a / info, a * a / (2.0 * info)
    return block_s * float(stats.invgauss.ppf(q, mean / shape, scale=shape))


def long_run_factor(r, max_lag):
    """Long-run variance / variance of a series with gaps (NaN): 1 + 2 sum_k w_k rho_k with
    Bartlett weights w_k = 1 - k / (max_lag + 1) (Newey & West 1987), rho_k over pairs both
    present; r: 2-D array (flights x blocks). At least 0.25 (a guard against noise)."""
    m = np.nanmean(r)
    x = r - m
    var = np.nanmean(x * x)
    f = 1.0
    for k in range(1, max_lag + 1):
        prod = x[:, k:] * x[:, :-k]
        if np.isfinite(prod).sum() < 20:
            break
        f += 2.0 * (1.0 - k / (max_lag + 1.0)) * np.nanmean(prod) / var
    return max(f, 0.25)


def t_fisher_sigma(x):
    """sigma_J = J^-1/2 [units of x], J the Fisher information of location of a Student-t fitted
    by maximum likelihood (scipy.stats.t.fit, location fixed at the median): J = (nu + 1) / ((nu + 3) s^2); for Gaussian
    data sigma_J -> the standard deviation."""
    nu, _, s = stats.t.fit(x, floc=float(np.median(x)))
    return s * math.sqrt((nu + 3.0) / (nu + 1.0))


def ramp_share_bound(slope_per_s, sigma_lr2_s, rate_per_h, block_s):
    """Share b t* of a ramp of slope b [1/s] when the ideal detector's expected log-likelihood
    ratio b^2 t^3 / (6 sigma_LR^2) reaches ln(gamma); sigma_lr2_s: long-run variance [s]."""
    a = math.log(3600.0 / block_s / rate_per_h)
    t = (6.0 * sigma_lr2_s * a / slope_per_s ** 2) ** (1.0 / 3.0)
    return slope_per_s * t


def cusum_delay_s(shift, sigma, block_s, rate_per_h, k_sigma=None, k_max=None):
    """Mean delay [s] of a two-sided CUSUM on blocks of noise sigma by Siegmund's approximation
    (one-sided out-of-control ARL), plus half a block (onset within a block). Kernel rule when
    k_sigma is given: k = k_sigma sigma, at most k_max, h from the in-control ARL at the rate
    with h k kept when k is capped; else k = shift / 2 and h from the ARL."""
    from estimator.watch.config import siegmund_arl, threshold_for_arl
    arl = 3600.0 / block_s / rate_per_h
    if k_sigma is None:
        k = shift / 2.0 / sigma
        h = threshold_for_arl(k, arl)
    else:
        k, h = k_sigma, threshold_for_arl(k_sigma, arl)
        if k * sigma > k_max:
            h, k = h * k * sigma / k_max, k_max / sigma
    return block_s * (siegmund_arl(k, h, shift / sigma) + 0.5)
