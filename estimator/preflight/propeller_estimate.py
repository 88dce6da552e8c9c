"""Propeller coefficients for a vehicle file that gives size and pitch instead of ct and cp.

The coefficients come from estimator.core.propeller_bemt (blade element momentum theory over
a generic blade). They depend weakly on the Reynolds number, i.e. on the rotor speed, which
in turn depends on them: the speed is that of hover (each rotor carries its share of the
weight), found by a few fixed-point passes from a first guess with CT = 0.1.

Small rotors at low Reynolds numbers: the generic blade's section (thin-airfoil lift, a
from-memory drag polar) does not model laminar separation, so below LOW_REYNOLDS_75 its figure
of merit is optimistic. Run on NeuralFoil's NACA 4412 polars (tests/test_low_reynolds.py), the
same blade element calculation gives about 0.9-1.1 x our FM at 75 %-radius Reynolds numbers
of 1.7e5..7e4, 0.74 x at 5e4 and 0.5 x at 1.1e4 (a thick section, pessimistic for a thin
propeller blade). low_reynolds_propeller gives the propeller with CP raised to the figure of merit
measured small rotors reach (estimator/preflight/low_reynolds.py, the one home of the threshold,
the figure and the words), so the sheet can say what the vehicle does if the estimate is that
optimistic.
"""

import math

from estimator.core.constants import STANDARD_GRAVITY_M_S2
from estimator.core.propeller_bemt import propeller_coefficients
from estimator.preflight.low_reynolds import LOW_REYNOLDS_75, fallback_figure_of_merit  # noqa: F401 (API)

CHECKED_PITCH_RATIOS = (0.3, 0.8)  # pitch / diameter range of tests/test_propeller_bemt.py [-]
PASSES = 3  # hover-speed passes; the Reynolds effect on CT is a few per cent, so 3 settle it
FIRST_GUESS_CT = 0.1  # a typical static CT of a small propeller (from memory)
# what the sheet says about an estimate (design notes sec. 3, "What a builder knows")
ESTIMATE_NOTE = ("propeller coefficients estimated from size and pitch (blade element momentum "
                 "theory over a generic blade); such estimates are typically 10-20 % off a "
                 "measured propeller: a bench sweep (liftcal fit, then hover --params) replaces them")


def low_reynolds_propeller(propeller, estimate):
    """The estimated propeller with CP raised to the figure of merit measured small rotors reach at
    its Reynolds number (low_reynolds.fallback_figure_of_merit; same CT), or None when the estimate
    ran at or above LOW_REYNOLDS_75 or already at or below that figure.

    propeller: dict with ct, cp [-] (propeller convention); estimate: estimated_propeller's
    estimate dict (reynolds_75 [-], figure_of_merit [-]). FM = sqrt(2 / pi) CT^1.5 / CP (design
    notes sec. 3), so at equal CT the power coefficient scales as 1 / FM:
    CP' = CP FM / FM'. Returns a propeller dict (ct, cp [-] and the rest as given).
    """
    if not estimate or estimate["reynolds_75"] >= LOW_REYNOLDS_75:
        return None
    fm, fallback = estimate["figure_of_merit"], fallback_figure_of_merit(estimate["reynolds_75"])
    if fm <= fallback:
        return None
    out = dict(propeller)
    out["cp"] = propeller["cp"] * fm / fallback
    return out


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
