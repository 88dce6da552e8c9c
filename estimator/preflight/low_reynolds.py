"""Small rotors at low Reynolds numbers: the one home of the threshold, the fallback figure of merit,
and what the hover sheet and ``liftcal static`` say about them.

Below about 7e4 laminar separation costs a blade section much of its lift-to-drag ratio (Lissaman
1983, Annu. Rev. Fluid Mech. 15: 223-239; Mueller and DeLaurier 2003, Annu. Rev. Fluid Mech. 35:
89-111; from memory), and it grows as the Reynolds number falls. Published hover tests of small
rotors (all from memory, values rounded):
- rotors of about 10-15 cm with blades at chord Reynolds numbers of about 1e4..3e4: figures of merit
  about 0.4-0.55, optimised blades near 0.6 (Bohorquez and Pines 2003, AHS Forum 59; Hein and Chopra
  2007, J. AHS 52(3): 254-262; Ramasamy, Johnson and Leishman 2008, J. AHS 53(4): 412-428);
- rotors of a few centimetres at Reynolds numbers of a few thousand: about 0.3-0.4 (Kroo and Kunz
  2001, in Mueller (ed.), Fixed and Flapping Wing Aerodynamics for Micro Air Vehicle Applications,
  AIAA Progress in Astronautics and Aeronautics 195; Kunz 2003, PhD thesis, Stanford University).
The fallback takes the LOW end of those ranges (a check that should not itself be optimistic):
FALLBACK_FM_LOW at and below FALLBACK_RE_LOW, FALLBACK_FM_HIGH at LOW_REYNOLDS_75, log-linear in Re
between; measured rotors reach up to FALLBACK_FM_SPREAD above it. Hobby propellers are thin flat
plates, not the tested rotors' optimised sections, so they sit nearer the low end.

Ducted craft: liftcal models open rotors. A whoop's short duct with its tip gap gives little of a
shroud's gain (that needs a tip gap under about 1 % of the radius and a shaped inlet and diffuser:
Pereira 2008, PhD thesis, University of Maryland; from memory), and the duct's struts, the frame
and the guard under the rotor block part of the slipstream (download: a few % of thrust under a
helicopter fuselage, Leishman, Principles of Helicopter Aerodynamics, 2nd ed., ch. 6, from memory;
more for a guard close under a small rotor).
"""

import math
import re

from estimator.core.propeller_bemt import chord_ratio
from estimator.units import rounded

LOW_REYNOLDS_75 = 3e4  # below this chord Reynolds number at 75 % radius the sheet adds the check [-]
FALLBACK_RE_LOW = 5e3  # rotors of a few cm (Kroo and Kunz 2001; Kunz 2003) [-]
FALLBACK_FM_LOW = 0.35  # low end of their measured 0.3-0.4, kept above the very lowest [-] (from memory)
FALLBACK_FM_HIGH = 0.45  # low end of 0.4-0.55 at 1e4..3e4 (Bohorquez and Pines; Hein and Chopra) [-]
FALLBACK_FM_SPREAD = 0.1  # measured rotors reach up to this above the fallback [-] (same sources)
# rotors at or below this diameter are nearly always ducted whoops or guarded (common practice) [m]
DUCTED_CLASS_DIAMETER_M = 0.0635
# a small brushless motor and its ESC pass about this share of the electrical power to the shaft
# near hover (from memory): with the figure of merit it bounds the static factor k of a small set
SMALL_MOTOR_EFFICIENCY = (0.4, 0.7)
TYPICAL_CT = 0.1  # a small propeller's static CT, n in rev/s (from memory)
SEA_LEVEL_VISCOSITY_PA_S = 1.7894e-5  # at 288.15 K (US Standard Atmosphere 1976, Sutherland's law)
# under a compare table with small-rotor rows (their own lines give each row's numbers)
TABLE_NOTE = ("SMALL ROTOR rows: below a blade Reynolds number of about %.0f the generic blade's figure of "
              "merit is likely optimistic; their endurance is at the low end of what measured micro rotors "
              "reach (Kroo and Kunz 2001; Bohorquez and Pines 2003; Hein and Chopra 2007; from memory); "
              "liftcal hover on one of them gives the full note" % LOW_REYNOLDS_75)


def fallback_figure_of_merit(reynolds_75):
    """The figure of merit measured small rotors reach at this Reynolds number, low end [-].

    reynolds_75: chord Reynolds number at 75 % radius [-]. FALLBACK_FM_LOW at and below
    FALLBACK_RE_LOW, FALLBACK_FM_HIGH at and above LOW_REYNOLDS_75, linear in log10(Re) between.
    Sources: module docstring (published micro-rotor hover tests, from memory).
    """
    if reynolds_75 <= FALLBACK_RE_LOW:
        return FALLBACK_FM_LOW
    if reynolds_75 >= LOW_REYNOLDS_75:
        return FALLBACK_FM_HIGH
    share = math.log(reynolds_75 / FALLBACK_RE_LOW) / math.log(LOW_REYNOLDS_75 / FALLBACK_RE_LOW)
    return FALLBACK_FM_LOW + share * (FALLBACK_FM_HIGH - FALLBACK_FM_LOW)


def reynolds_75_from_thrust(thrust_N, diameter_m, density_kg_m3, viscosity_Pa_s=SEA_LEVEL_VISCOSITY_PA_S):
    """The chord Reynolds number at 75 % radius of a rotor giving this thrust at a typical CT [-].

    Rotor speed from T = CT rho n^2 D^4 (n in rev/s, CT = TYPICAL_CT); section speed 0.75 pi n D
    (the rotational part; the inflow adds a few %); chord that of the generic blade at 75 % radius
    (core.propeller_bemt.chord_ratio); Re = rho V c / mu. thrust_N [N], diameter_m [m],
    density_kg_m3 [kg/m^3], viscosity_Pa_s [Pa s].
    """
    n = math.sqrt(thrust_N / (TYPICAL_CT * density_kg_m3 * diameter_m ** 4))
    chord = chord_ratio(0.75) * diameter_m / 2.0
    return density_kg_m3 * 0.75 * math.pi * n * diameter_m * chord / viscosity_Pa_s


# words in a vehicle's name or notes that say its rotors run in ducts or guards (trial 8, item 9)
_DUCT_WORDS = re.compile(r"duct|whoop|shroud|guard", re.IGNORECASE)


def described_ducted(vehicle):
    """True when the vehicle's name or notes describe it as ducted, guarded or a whoop."""
    text = " ".join(str(vehicle.get(k) or "") for k in ("name", "notes"))
    return bool(_DUCT_WORDS.search(text))


def duct_note(diameter_m, expect="more power and a shorter flight than even this", described=False):
    """The duct and frame-blockage note for a rotor of a whoop's size (DUCTED_CLASS_DIAMETER_M) or one
    the vehicle's own description calls ducted or a whoop (described), or ''. One rule for every
    small-rotor sheet: decided by size and by the description, never by one alone for some sheets."""
    if diameter_m > DUCTED_CLASS_DIAMETER_M and not described:
        return ""
    return ("%s: liftcal models open rotors; a short duct with a " % (
                "the vehicle is described as ducted, guarded or a whoop" if described
                else "if the rotors run in ducts or guards (whoops)") +
            "whoop's tip gap gives little of a shroud's gain and its struts and the frame under the rotor "
            "block part of the slipstream (Pereira 2008; Leishman on the download of a body under a rotor; from "
            "memory): expect %s" % expect)


def static_factor_band(reynolds_75):
    """(k low, k high) [-] for a small set: the figure of merit from the fallback to FALLBACK_FM_SPREAD
    above it, times SMALL_MOTOR_EFFICIENCY; k = eta^(2/3) (design notes sec. 3a)."""
    fm = fallback_figure_of_merit(reynolds_75)
    lo, hi = SMALL_MOTOR_EFFICIENCY
    return (fm * lo) ** (2.0 / 3.0), ((fm + FALLBACK_FM_SPREAD) * hi) ** (2.0 / 3.0)


def band_text():
    """How the measured band rises with the Reynolds number, in words (README, the sheet and
    `static` say it one way: new-user trial 12, finding 12 found 0.35-0.45, 0.40-0.50 and 0.41-0.51
    without a word that the band depends on the Reynolds number)."""
    return ("the band rises with the blade Reynolds number, from %.2f-%.2f at %.0f and below to %.2f-%.2f at "
            "%.0f" % (FALLBACK_FM_LOW, FALLBACK_FM_LOW + FALLBACK_FM_SPREAD, FALLBACK_RE_LOW, FALLBACK_FM_HIGH,
                      FALLBACK_FM_HIGH + FALLBACK_FM_SPREAD, LOW_REYNOLDS_75))


def measured_text(reynolds_75):
    """'measured rotors there reach about 0.40-0.50 (the band rises ...; from memory)': one wording
    everywhere."""
    fm = fallback_figure_of_merit(reynolds_75)
    return ("measured rotors there reach a figure of merit of about %.2f-%.2f (%s; micro-rotor hover tests: "
            "Kroo and Kunz 2001; Bohorquez and Pines 2003; Hein and Chopra 2007; from memory)"
            % (fm, fm + FALLBACK_FM_SPREAD, band_text()))


def hover_warning(check, diameter_m, described=False):
    """The hover sheet's words for report["low_reynolds_check"]: the estimate likely optimistic,
    the hover power and flight time at the fallback figure of merit, and the duct note."""
    head = ("small rotor at a blade Reynolds number of %s (below about %.0f): the estimate's figure of "
            "merit %.2f is likely optimistic; %s" % (rounded(check["reynolds_75"]), LOW_REYNOLDS_75,
                                                     check["figure_of_merit_estimated"],
                                                     measured_text(check["reynolds_75"])))
    fm = check["figure_of_merit_assumed"]
    if check.get("hover_command") is None:
        text = head + "; at %.2f this vehicle could not hover" % fm
    else:
        flight = check.get("flight_time_min")
        text = head + ("; at %.2f this vehicle would need %.3g W in hover instead of %.3g W and fly %s "
                       "instead of %.1f min" % (fm, check["hover_power_W"], check["estimate_hover_power_W"],
                                               "about %.1f min" % flight if flight is not None
                                               else "not at all (it could not hover)",
                                               check["estimate_flight_time_min"]))
    duct = duct_note(diameter_m, described=described)
    return text + ("; " + duct if duct else "")


def factor_against_band(factor, band):
    """How a static thrust factor k compares with the band [lo, hi] small sets reach, in words.

    Below the band it gives less thrust for the power (more power for the thrust) than any set
    of the band: conservative; inside it, a typical value, not a conservative one; above it,
    optimistic. The margin to the band's low end is given in thrust for a power (T ~ k) when
    under 10 %: conservative, just."""
    lo, hi = band
    if factor < lo:
        share = 1.0 - factor / lo
        return ("k = %s is below that band: conservative here%s"
                % (k_text(factor, lo), " (just: %.0f %% less thrust than its low end)" % (100.0 * share)
                   if share < 0.1 else ""))
    if factor <= hi:
        return "k = %.2f is inside that band: a typical value here, NOT a conservative one" % factor
    return "k = %.2f is above that band: NOT conservative here (optimistic)" % factor


def k_text(k, other):
    """A static factor k [-] with two decimals, or three where two would print it as the other k
    beside it (new-user trial 15, finding 6: 'expect k about 0.30-0.51 ... k = 0.30 is below that
    band' and '0.27 N at k 0.30 .. ; at the k 0.30 used: 0.268 N' for a band starting at 0.3027)."""
    return "%.2f" % k if "%.2f" % k != "%.2f" % other or k == other else "%.3f" % k


def static_note(thrust_N, diameter_m, density_kg_m3, factor=0.3):
    """For ``liftcal static``: None for a rotor at or above LOW_REYNOLDS_75, else a dict:
    reynolds_75 [-], figure_of_merit_measured [lo, hi] [-], static_factor_band [lo, hi] [-],
    text (the band and how factor [-], the k used, compares with it: factor_against_band)."""
    re75 = reynolds_75_from_thrust(thrust_N, diameter_m, density_kg_m3)
    if re75 >= LOW_REYNOLDS_75:
        return None
    fm = fallback_figure_of_merit(re75)
    k_lo, k_hi = static_factor_band(re75)
    text = ("small rotor, blade Reynolds number about %s (at a typical CT %.1f): %s and a small motor and "
            "ESC pass about %.0f-%.0f %% of the power (from memory), so expect k about %s-%s (k^1.5 = "
            "figure of merit x motor and ESC efficiency); %s"
            % (rounded(re75), TYPICAL_CT, measured_text(re75), 100 * SMALL_MOTOR_EFFICIENCY[0],
               100 * SMALL_MOTOR_EFFICIENCY[1], k_text(k_lo, factor), k_text(k_hi, factor),
               factor_against_band(factor, (k_lo, k_hi))))
    duct = duct_note(diameter_m, "more power for the thrust than even this")
    return {"reynolds_75": re75, "figure_of_merit_measured": [fm, fm + FALLBACK_FM_SPREAD],
            "static_factor_band": [k_lo, k_hi], "text": text + ("; " + duct if duct else "")}


def endurance_lead(report):
    """Which endurance a pre-flight sheet or table leads with, and the other beside it.

    For an estimated propeller below LOW_REYNOLDS_75 (report["low_reynolds_check"]) the generic
    blade's figure of merit is optimistic (module docstring: measured micro rotors reach less;
    from memory), so the conservative figure leads: the hover at fallback_figure_of_merit. Else
    the estimate leads alone. Returns {flight_time_min [min] (None: no hover), basis ("small
    rotor" or "estimate"), flight_ended_by (what ended that flight, or None), figure_of_merit [-],
    other_flight_time_min [min] or None,
    other_figure_of_merit [-] or None, reason (text, '' when there is no other)}.
    """
    check = report.get("low_reynolds_check")
    if not check or report.get("flight_time_min") is None:
        return {"flight_time_min": report.get("flight_time_min"), "basis": "estimate",
                "flight_ended_by": report.get("flight_ended_by"),
                "figure_of_merit": report.get("figure_of_merit"), "other_flight_time_min": None,
                "other_figure_of_merit": None, "reason": ""}
    return {"flight_time_min": check.get("flight_time_min"), "basis": "small rotor",
            "flight_ended_by": check.get("flight_ended_by"),
            "figure_of_merit": check["figure_of_merit_assumed"],
            "other_flight_time_min": check.get("estimate_flight_time_min", report["flight_time_min"]),
            "other_figure_of_merit": check["figure_of_merit_estimated"],
            "reason": "the generic blade's figure of merit %.2f is likely optimistic at a blade Reynolds "
                      "number of %s (below about %.0f)" % (check["figure_of_merit_estimated"],
                                                           rounded(check["reynolds_75"]), LOW_REYNOLDS_75)}


def estimate_flight_time_min(report):
    """The generic blade estimate's endurance [min] of a report (None: no hover): beside the lead
    in compare and payload rows. On a small rotor that hovers at the measured figure of merit the
    report's own numbers are at that figure (preflight.report), so the estimate's is the check's."""
    lead = endurance_lead(report)
    return lead["other_flight_time_min"] if lead["basis"] == "small rotor" else report.get("flight_time_min")
