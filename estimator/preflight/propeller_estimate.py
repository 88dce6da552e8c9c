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
propeller blade); measured micro rotors at 1e4..3e4 seldom pass a figure of merit of about 0.5.
low_reynolds_propeller gives the propeller with CP raised to that figure of merit, so the
sheet can say what the vehicle does if the estimate is that optimistic.
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


# Below about 7e4 laminar separation costs a blade section much of its lift-to-drag ratio
# (Lissaman 1983, Annu. Rev. Fluid Mech. 15: 223-239; Mueller and DeLaurier 2003, Annu. Rev.
# Fluid Mech. 35: 89-111; from memory), and it grows as the Reynolds number falls. Hover tests of
# micro rotors whose blades ran at chord Reynolds numbers of about 1e4..3e4 measured figures of
# merit of about 0.4-0.55, the best optimised blades near 0.6 (Bohorquez and Pines 2003, AHS
# Forum 59; Hein and Chopra 2007, J. AHS 52(3): 254-262; Ramasamy, Johnson and Leishman 2008,
# J. AHS 53(4): 412-428; from memory). Below LOW_REYNOLDS_75 (75 % radius) the sheet says what
# the vehicle does at LOW_REYNOLDS_FIGURE_OF_MERIT if the estimate's is higher [-]
LOW_REYNOLDS_75 = 3e4
LOW_REYNOLDS_FIGURE_OF_MERIT = 0.5


def low_reynolds_propeller(propeller, estimate):
    """The estimated propeller with CP raised to a figure of merit of LOW_REYNOLDS_FIGURE_OF_MERIT
    (same CT), or None when the estimate ran at or above LOW_REYNOLDS_75 or already at or below it.

    propeller: dict with ct, cp [-] (propeller convention); estimate: estimated_propeller's
    estimate dict (reynolds_75 [-], figure_of_merit [-]). FM = sqrt(2 / pi) CT^1.5 / CP (design
    notes sec. 3), so at equal CT the power coefficient scales as 1 / FM:
    CP' = CP FM / FM'. Returns a propeller dict (ct, cp [-] and the rest as given).
    """
    if not estimate or estimate["reynolds_75"] >= LOW_REYNOLDS_75:
        return None
    fm = estimate["figure_of_merit"]
    if fm <= LOW_REYNOLDS_FIGURE_OF_MERIT:
        return None
    out = dict(propeller)
    out["cp"] = propeller["cp"] * fm / LOW_REYNOLDS_FIGURE_OF_MERIT
    return out


def low_reynolds_warning(check):
    """The sheet's words for report["low_reynolds_check"] (report.py): the estimate likely
    optimistic, and the hover power and flight time at the lower figure of merit."""
    flight = check.get("flight_time_min")
    if check.get("hover_command") is None:
        return ("small rotor at a blade Reynolds number of %.0f (below about %.0f): the estimate's figure of "
                "merit %.2f is likely optimistic, measured rotors there seldom pass about %.1f (from memory); "
                "at %.1f this vehicle could not hover" % (
                    check["reynolds_75"], LOW_REYNOLDS_75, check["figure_of_merit_estimated"],
                    check["figure_of_merit_assumed"], check["figure_of_merit_assumed"]))
    return ("small rotor at a blade Reynolds number of %.0f (below about %.0f): the estimate's figure of "
            "merit %.2f is likely optimistic, measured rotors there seldom pass about %.1f (from memory); "
            "at %.1f this vehicle would need %.3g W in hover instead of %.3g W and fly %s instead of %.1f min"
            % (check["reynolds_75"], LOW_REYNOLDS_75, check["figure_of_merit_estimated"],
               check["figure_of_merit_assumed"], check["figure_of_merit_assumed"], check["hover_power_W"],
               check["estimate_hover_power_W"],
               "about %.1f min" % flight if flight is not None else "not at all (it could not hover)",
               check["estimate_flight_time_min"]))


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
