"""Average run length of a CUSUM scheme by Siegmund's approximation, and the threshold for a target
run length: the watch's false-alarm design (estimator.watch.config).

    ARL(k, h, mu) = (exp(-2 D b) + 2 D b - 1) / (2 D^2),  D = mu - k,  b = h + 1.166
    (ARL = b^2 when D = 0), in units of the noise sigma, for one-sided CUSUM on N(mu, 1);
    two-sided: 1 / ARL2 = 1 / ARL(k, h, mu) + 1 / ARL(k, h, -mu).

Source: D. Siegmund, *Sequential Analysis* (Springer 1985), sec. X.2 (from memory); the CUSUM
itself is E. S. Page, Biometrika 41 (1954).
"""

import math

SIEGMUND_OFFSET = 1.166  # b = h + 1.166: 2 x 0.583, the overshoot correction (Siegmund 1985)


def log_siegmund_arl(k, h, mu=0.0):
    """Natural log of the one-sided CUSUM average run length by Siegmund's approximation.

    ARL = (exp(-2 D b) + 2 D b - 1) / (2 D^2), D = mu - k, b = h + 1.166 (ARL = b^2 when D = 0),
    for standardised increments N(mu, 1); k reference value [sigma], h threshold [sigma].
    Computed in logs so that no value overflows for any k, h >= 0: with x = -2 D b > 0,
    ln ARL = x + ln(1 - (1 + x) e^-x) - ln(2 D^2). Source: Siegmund (1985), sec. X.2 (from memory).
    """
    d = mu - k
    b = h + SIEGMUND_OFFSET
    x = -2.0 * d * b
    if abs(x) < 1e-6:
        return 2.0 * math.log(b)
    if x > 0.0:
        return x + math.log1p(-(1.0 + x) * math.exp(-x)) - math.log(2.0 * d * d)
    # x < 0: exp(x) <= 1, the numerator is at most 2 |D| b: no overflow either
    return math.log(math.expm1(x) - x) - math.log(2.0 * d * d)


def siegmund_arl(k, h, mu=0.0):
    """One-sided CUSUM average run length by Siegmund's approximation [samples].

    k: reference value [sigma]; h: threshold [sigma]; mu: mean of the standardised
    increments [sigma]. ARL = (exp(-2 D b) + 2 D b - 1) / (2 D^2), D = mu - k, b = h + 1.166.
    Returns inf (never raises) when the run length is beyond floating point.
    Source: Siegmund (1985), sec. X.2 (from memory).
    """
    v = log_siegmund_arl(k, h, mu)
    return math.exp(v) if v < 700.0 else float("inf")


def log_arl_two_sided(k, h, mu=0.0):
    """ln of the two-sided ARL: 1 / ARL2 = 1 / ARL+(mu) + 1 / ARL-(mu) (Siegmund 1985), in logs."""
    a, b = log_siegmund_arl(k, h, mu), log_siegmund_arl(k, h, -mu)
    lo, hi = (a, b) if a < b else (b, a)
    return lo - math.log1p(math.exp(lo - hi))


def siegmund_arl_two_sided(k, h, mu=0.0):
    """Two-sided CUSUM ARL [samples]: 1 / ARL2 = 1 / ARL+(mu) + 1 / ARL-(mu) (Siegmund 1985)."""
    v = log_arl_two_sided(k, h, mu)
    return math.exp(v) if v < 700.0 else float("inf")


def threshold_for_arl(k, arl_two_sided):
    """Threshold h [sigma] at which the two-sided in-control ARL equals ``arl_two_sided``.

    The log ARL rises monotonically with h; the bracket [0, hi] is doubled until it holds the
    target, then bisected (100 halvings), all in logs: no overflow for any k >= 0 and any target
    (a very clean bench gives a large k in sigma units; that is valid input). Returns 0 when the
    target is below the ARL at h = 0. k: reference value [sigma].
    """
    target = math.log(max(arl_two_sided, 1.0))
    if log_arl_two_sided(k, 0.0) >= target:
        return 0.0
    lo, hi = 0.0, 1.0
    while log_arl_two_sided(k, hi) < target:   # ln ARL grows at least like 2 ln(h): ends quickly
        lo, hi = hi, 2.0 * hi
    for _ in range(100):
        mid = 0.5 * (lo + hi)
        if log_arl_two_sided(k, mid) < target:
            lo = mid
        else:
            hi = mid
    return 0.5 * (lo + hi)
