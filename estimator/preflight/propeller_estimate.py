"""Propeller coefficients for a vehicle file that gives size and pitch instead of ct and cp.

The coefficients come from estimator.core.propeller_bemt (blade element momentum theory over
a generic blade). They depend weakly on the Reynolds number, i.e. on the rotor speed, which
in turn depends on them: the speed is that of hover (each rotor carries its share of the
weight), found by a few fixed-point passes from a first guess with CT = 0.1.
"""

import math

from estimator.core.constants import STANDARD_GRAVITY_M_S2
from estimator.core.propeller_bemt import propeller_coefficients

CHECKED_PITCH_RATIOS = (0.3, 0.8)  # pitch / diameter range of tests/test_propeller_bemt.py [-]
PASSES = 3  # hover-speed passes; the Reynolds effect on CT is a few per cent, so 3 settle it
FIRST_GUESS_CT = 0.1  # a typical static CT of a small propeller (from memory)
# what the sheet says about an estimate (design notes sec. 3, "What a builder knows")
ESTIMATE_NOTE = ("propeller coefficients estimated from size and pitch (blade element momentum "
                 "theory over a generic blade); such estimates are typically 10-20 % off a "
                 "measured propeller: a bench sweep (liftcal fit, then hover --params) replaces them")


_CACHE = {}  # (diameter, pitch, blades, thrust, rho, mu) -> (ct, cp, estimate); compare repeats them
_CACHE_SIZE = 512


def estimated_propeller(propeller, mass_kg, rotor_count, air):
    """A propeller dict with ct and cp estimated for the hover speed, and what was assumed.

    propeller: dict diameter_m [m], pitch_m [m], blades [-]; mass_kg: all-up mass [kg];
    rotor_count: N [-]; air: core.atmosphere.site_air result (density_kg_m3, viscosity_Pa_s).
    Returns (propeller dict with ct, cp added, estimate dict: ct, cp, figure_of_merit [-],
    rpm [rpm] at which the Reynolds number was taken, reynolds_75 [-], stalled_share [-],
    method [text], note [text]).
    """
    rho, mu = air["density_kg_m3"], air["viscosity_Pa_s"]
    d = propeller["diameter_m"]
    thrust = mass_kg * STANDARD_GRAVITY_M_S2 / rotor_count
    key = (d, propeller["pitch_m"], propeller.get("blades", 2), thrust, rho, mu)
    if key in _CACHE:
        ct, cp, estimate = _CACHE[key]
        out = dict(propeller)
        out["ct"], out["cp"] = ct, cp
        return out, dict(estimate)
    ct = FIRST_GUESS_CT
    result = None
    for _ in range(PASSES):
        rev_s = math.sqrt(thrust / (ct * rho * d ** 4))  # T = CT rho n^2 D^4
        result = propeller_coefficients(d, propeller["pitch_m"], propeller.get("blades", 2),
                                        60.0 * rev_s, rho, mu)
        ct = result["ct"]
    out = dict(propeller)
    out["ct"], out["cp"] = result["ct"], result["cp"]
    estimate = dict(result)
    estimate.update({"rpm": 60.0 * rev_s, "blades": propeller.get("blades", 2),
                     "pitch_m": propeller["pitch_m"],
                     "method": "blade element momentum theory with Prandtl tip loss, generic blade "
                               "(estimator/core/propeller_bemt.py)",
                     "typical_error": "10-20 %", "note": ESTIMATE_NOTE})
    ratio = propeller["pitch_m"] / d
    if not CHECKED_PITCH_RATIOS[0] <= ratio <= CHECKED_PITCH_RATIOS[1]:
        estimate["note"] += ("; pitch/diameter %.2f is outside the %.1f..%.1f over which the estimate was "
                             "checked, so expect larger errors" % ((ratio,) + CHECKED_PITCH_RATIOS))
    if len(_CACHE) >= _CACHE_SIZE:
        _CACHE.clear()
    _CACHE[key] = (out["ct"], out["cp"], dict(estimate))
    return out, estimate
