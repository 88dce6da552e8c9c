"""Values inside the vehicle schema's limits that usually mean a unit slip, and a parameter set
fitted on another propeller.

The schema refuses what no vehicle can have (a 300 kg quad); these checks warn about numbers
that are possible on their own but not together: a 150 kg vehicle on four 10-inch propellers
(grams meant), a 150 Ah pack on a 0.65 kg frame (mAh meant), a 1.3 m propeller on a 0.65 kg
quad. Each warning names the JSON key, the value and the likely unit. A value written with a
unit ("150kg", "11Ah") gets the same physics check as a bare number: the slip is then in the
unit prefix or the decimal point, and the warning names the values that would make it ordinary.
"""

import math
import re

from estimator.core.constants import STANDARD_GRAVITY_M_S2
from estimator.core.momentum import disk_area_m2, figure_of_merit
from estimator.preflight.slip_diagnosis import (cells_slip, cells_warning, ordinary_pack, pack_share_warning,
                                               too_heavy_warning, whole_vehicle_slip, whole_vehicle_warning)
from estimator.units import INCH_M, counted
from estimator.vehicle import given_text
# the typical ranges live with the vehicle file's unit reading (one home)
from estimator.vehicle_units import DISK_LOADING_TYPICAL_N_M2, PACK_MASS_SHARE_USUAL, pack_energy_range

# below this a propeller is far too large for the mass (a 0.25 kg frame on 10-inch propellers
# still has 12 N/m^2) [N/m^2]
DISK_LOADING_FLOOR_N_M2 = 5.0
# Specific energy of the best lithium cells [Wh/kg], about 260 (from memory; packs are lower):
# a pack can weigh no less than its energy over this.
CELL_SPECIFIC_ENERGY_MAX_WH_KG = 260.0
# Pack resistance per cell times capacity [ohm Ah]: about 0.01 to 0.05 for lithium packs of
# any size (a 5 Ah cell near 5 milliohm, a 0.3 Ah cell near 80 milliohm; from memory); 0.5
# is ten times the worst of them.
CELL_RESISTANCE_CAPACITY_MAX_OHM_AH = 0.5
# figures of merit measured on real rotors in hover, from micro rotors at low Reynolds numbers
# (about 0.3: Kroo and Kunz 2001) to good propellers and helicopter rotors (about 0.8: Leishman,
# Principles of Helicopter Aerodynamics, ch. 2); all from memory [-]
FIGURE_OF_MERIT_MEASURED = (0.3, 0.8)
# measured ct and cp below this figure of merit (half the lowest measured) are a slip, not a rotor [-]
FIGURE_OF_MERIT_FLOOR = 0.15
# slips of a value written with its unit: the prefix (g for kg, mAh for Ah) or the decimal point
WRITTEN_SLIPS = ((1e-3, "the unit prefix"), (0.1, "a misplaced decimal point"))


def _disk_loading(mass_kg, count, diameter_m):
    return mass_kg * STANDARD_GRAVITY_M_S2 / (count * disk_area_m2(diameter_m))


def _typical(loading):
    lo, hi = DISK_LOADING_TYPICAL_N_M2
    return lo <= loading <= hi


def _as_written(vehicle, path):
    """' (written "150kg")' when the file gave the value at ``path`` with a unit, else ''."""
    text = given_text(vehicle, path)
    return "" if text is None else ' (written "%s")' % text


_JSON_PATH = re.compile(r"\$\.[A-Za-z_]+(?:\.[A-Za-z_]+)?")


def _paths_as_written(vehicle, text):
    """``text`` with each key the file wrote under another name named as written ($.mass_kg as
    $.mass for "mass": "5kg"; new-user trial 14, finding 10)."""
    written = (vehicle.get("checked") or {}).get("written") or {}
    return _JSON_PATH.sub(lambda m: written.get(m.group(0), m.group(0)), text)


def _written_hint(value, unit, plausible, fmt="%.3g"):
    """The slips of WRITTEN_SLIPS that make a value written with its unit plausible, as text."""
    out = [("%s %s meant (%s)?" % (fmt % (value * scale), unit, why))
           for scale, why in WRITTEN_SLIPS if plausible(value * scale)]
    return " or ".join(out)


# length units tried when a diameter gives a disk loading no small multirotor has: (unit, metres
# per unit, word), 1 in = units.INCH_M, 1 cm = 0.01 m, 1 mm = 0.001 m (NIST SP 811, exact)
LENGTH_SLIPS = (("in", INCH_M, "inches"), ("cm", 0.01, "centimetres"), ("mm", 0.001, "millimetres"))


def _size_slip(vehicle, mass, count):
    """'inches meant? (5.1 in = 0.13 m)' when a propeller size written with a unit
    ("5.1x4.6cm") gives an ordinary disk loading in another length unit, else ''."""
    text = given_text(vehicle, "$.propeller.diameter_m")
    if not isinstance(text, str):
        return ""
    diameter = vehicle["propeller"]["diameter_m"]
    found = re.match(r"\s*([0-9]*\.?[0-9]+)", text)
    if not found:
        return ""
    number = float(found.group(1))
    for unit, scale, word in LENGTH_SLIPS:
        if abs(number * scale - diameter) <= 1e-9 * diameter:
            continue                                   # the unit as written
        if _typical(_disk_loading(mass, count, number * scale)):
            return "%s meant? (%g %s = %.3g m)" % (word, number, unit, number * scale)
    return ""


def suspicious_values(vehicle):
    """Warnings (strings) for values of a checked vehicle that usually mean a unit slip.

    When one key, corrected by a common slip, makes the whole vehicle plausible
    (slip_diagnosis.whole_vehicle_slip), its warning replaces the pairwise ones below (which cannot
    tell which of two keys is wrong), so the sheet names that key first.

    vehicle: dict from estimator.vehicle.check_vehicle (SI keys). Each warning starts with the
    JSON path (as the file wrote the key) and names the value as read (and as written, when the file gave a unit), why it
    is odd, and the unit or value that would make it ordinary.
    """
    out = []
    mass = vehicle["mass_kg"]
    count = vehicle["rotors"]["count"]
    prop = vehicle["propeller"]
    bat = vehicle["battery"]
    diameter = prop["diameter_m"]
    loading = _disk_loading(mass, count, diameter)
    mass_bare = given_text(vehicle, "$.mass_kg") is None
    diameter_bare = given_text(vehicle, "$.propeller.diameter_m") is None
    lo, hi = DISK_LOADING_TYPICAL_N_M2
    size_hint = _size_slip(vehicle, mass, count) if loading > hi else ""
    if size_hint:
        written = given_text(vehicle, "$.propeller.diameter_m")
        out.append("$.propeller.size: \"%s\" reads as a %.3g m propeller; %g kg on %d of them puts "
                   "%.0f N/m^2 on each disk at hover, far above the %g..%g N/m^2 of small "
                   "multirotors: %s" % (written, diameter, mass, count, loading, lo, hi, size_hint))
    elif loading > hi:
        # 1 g = 1e-3 kg (NIST SP 811)
        if mass_bare:
            hint = ("grams meant? (%g g = %g kg)" % (mass, mass * 1e-3)
                    if DISK_LOADING_FLOOR_N_M2 <= _disk_loading(mass * 1e-3, count, diameter) <= hi
                    else "check the mass (kilograms) and the diameter (metres)")
        else:
            hint = _written_hint(mass, "kg", lambda m: _typical(_disk_loading(m, count, diameter)))
            hint = ("a unit or decimal slip? %s" % hint if hint
                    else "a unit or decimal slip? check the mass and the propeller diameter")
        out.append("$.mass_kg: %g kg%s puts %.0f N/m^2 on each propeller disk at hover, far above "
                   "the %g..%g N/m^2 of small multirotors: %s"
                   % (mass, _as_written(vehicle, "$.mass_kg"), loading, lo, hi, hint))
    elif loading < DISK_LOADING_FLOOR_N_M2:
        hint = ""
        for unit, scale, word in LENGTH_SLIPS[:2]:       # a bare diameter in millimetres is beyond the schema
            if diameter_bare and _typical(_disk_loading(mass, count, diameter * scale)):
                hint = ": %s meant? (%g %s = %.3g m)" % (word, diameter, unit, diameter * scale)
                break
        out.append("$.propeller.diameter_m: %g m%s propellers carry only %.1f N/m^2 each for a %g kg "
                   "vehicle on %s, far below the %g..%g N/m^2 of small multirotors%s"
                   % (diameter, _as_written(vehicle, "$.propeller.diameter_m"), loading,
                      mass, counted(count, "rotor"), lo, hi,
                      hint or ": a unit or decimal slip? check the diameter (metres) and the mass "
                      "(kilograms)"))
    pack_V = bat["cells"] * bat["nominal_cell_V"]
    energy_Wh = pack_V * bat["capacity_Ah"]
    least_pack_kg = energy_Wh / CELL_SPECIFIC_ENERGY_MAX_WH_KG
    capacity_odd = least_pack_kg > mass
    if capacity_odd:
        head = ("$.battery.capacity_Ah: %g Ah%s on %s is %.0f Wh, which weighs at least %.2g kg "
                "even at %.0f Wh/kg (the best lithium cells, from memory), more than the whole "
                "%g kg vehicle" % (bat["capacity_Ah"], _as_written(vehicle, "$.battery.capacity_Ah"),
                                   counted(bat["cells"], "cell"), energy_Wh, least_pack_kg,
                                   CELL_SPECIFIC_ENERGY_MAX_WH_KG, mass))
        if given_text(vehicle, "$.battery.capacity_Ah") is None:
            out.append(head + ": mAh meant? (%g mAh = %g Ah)" % (bat["capacity_Ah"], bat["capacity_Ah"] * 1e-3))
        else:
            share_lo, share_hi = PACK_MASS_SHARE_USUAL
            chemistry, specific_Wh_kg, best_Wh_kg = pack_energy_range(bat)
            # the least at the typical specific energy, the most at the best (pack_share_usual)
            usual = (mass * share_lo * specific_Wh_kg / pack_V, mass * share_hi * best_Wh_kg / pack_V)
            hint = _written_hint(bat["capacity_Ah"], "Ah", lambda c: usual[0] <= c <= usual[1]
                                 and ordinary_pack(vehicle, "$.battery.capacity_Ah", c))
            out.append(head + ": a unit or decimal slip? %s (packs of %.0f..%.0f %% of the all-up mass at about "
                       "%.0f..%.0f Wh/kg, %s by the cell voltages, hold %.2g..%.2g Ah on %s; common "
                       "practice, from memory)"
                       % (hint or "check the capacity",
                          100 * share_lo, 100 * share_hi, specific_Wh_kg, best_Wh_kg, chemistry, usual[0],
                          usual[1], counted(bat["cells"], "cell")))
    found = whole_vehicle_slip(vehicle)
    cells = cells_slip(vehicle)  # the cell count, which no unit or decimal slip of another key explains
    if cells is not None:  # it goes first, alone; the resistance per cell is judged on it too
        out, capacity_odd = [cells_warning(vehicle, cells)], True
    elif found is not None:  # one key explains the whole vehicle: it goes first, the pairwise checks go
        out = [whole_vehicle_warning(vehicle, found)]
        capacity_odd = found["key"] == "$.battery.capacity_Ah"
    else:
        share = None if capacity_odd or out else pack_share_warning(vehicle)  # the pack's alone
        out += [share] if share else []
        heavy = too_heavy_warning(vehicle)
        if heavy is not None and not out:
            out.append(heavy)
    r_cell_ah = bat["resistance_ohm"] / bat["cells"] * bat["capacity_Ah"]
    if not capacity_odd and r_cell_ah > CELL_RESISTANCE_CAPACITY_MAX_OHM_AH:
        out.append("$.battery.resistance_ohm: %g ohm%s for a %d-cell %g Ah pack is %.0f times the "
                   "usual resistance of such a pack (about %.2g ohm, from memory): milliohm meant? "
                   "(%g mohm = %g ohm)"
                   % (bat["resistance_ohm"], _as_written(vehicle, "$.battery.resistance_ohm"),
                      bat["cells"], bat["capacity_Ah"],
                      r_cell_ah / 0.025, 0.025 * bat["cells"] / bat["capacity_Ah"],
                      bat["resistance_ohm"], bat["resistance_ohm"] * 1e-3))
    coefficients = _coefficient_slip(prop)
    if coefficients:
        out.append(coefficients)
    return [_paths_as_written(vehicle, w) for w in out]


def _coefficient_slip(prop):
    """A warning when measured ct and cp give a figure of merit no rotor has, or ''.

    FM = sqrt(2/pi) CT^1.5 / CP (core.momentum.figure_of_merit); the schema and
    vehicle.check_vehicle refuse FM > 1; below FIGURE_OF_MERIT_FLOOR it names the coefficient
    that, moved by one decimal place, gives a figure of merit real rotors have.
    """
    if "ct" not in prop or "cp" not in prop or prop.get("source") == "estimated":
        return ""
    ct, cp = prop["ct"], prop["cp"]
    fm = figure_of_merit(ct, cp)
    if fm >= FIGURE_OF_MERIT_FLOOR:
        return ""
    fixes = []
    for key, scale in (("ct", 10.0), ("cp", 0.1)):
        new_ct, new_cp = (ct * scale, cp) if key == "ct" else (ct, cp * scale)
        new_fm = figure_of_merit(new_ct, new_cp)
        if FIGURE_OF_MERIT_MEASURED[0] <= new_fm <= FIGURE_OF_MERIT_MEASURED[1]:
            fixes.append("%s %.4g gives %.2f" % (key, new_ct if key == "ct" else new_cp, new_fm))
    return ("$.propeller.%s: ct %g and cp %g give a figure of merit of %.3f (FM = sqrt(2/pi) ct^1.5 / cp), "
            "far below the %.1f..%.1f that measured rotors reach (micro-rotor and propeller hover tests, "
            "from memory): a decimal slip in ct or cp? %s" % (
                "ct" if not fixes or fixes[0].startswith("ct") else "cp", ct, cp, fm,
                FIGURE_OF_MERIT_MEASURED[0], FIGURE_OF_MERIT_MEASURED[1],
                "; ".join(fixes) if fixes else "check both against the propeller's data"))


def slip_keys(warnings):
    """The JSON paths that suspicious_values warnings name (the text before the first ': ')."""
    return [w.split(": ", 1)[0] for w in warnings if w.startswith("$.")]


# diameters within this share count as the same propeller [-]: makers' nominal sizes are
# rounded to about 1 %
SAME_DIAMETER_TOLERANCE = 0.02


def params_propeller_warning(vehicle, params):
    """A warning when a parameter set was fitted on another propeller than the vehicle's, or None.

    vehicle: checked vehicle; params: validated parameter set (rotor.diameter_m [m]).
    """
    fitted = (params.get("rotor") or {}).get("diameter_m")
    mine = vehicle["propeller"]["diameter_m"]
    if fitted is None or not math.isfinite(fitted):
        return None
    if abs(fitted / mine - 1.0) <= SAME_DIAMETER_TOLERANCE:
        return None
    return ("the parameter set was fitted on a %.3f m (%.1f in) propeller but the vehicle file has "
            "%.3f m (%.1f in): thrust, power and hover command below are those of the bench "
            "propeller, not this one; sweep this propeller on the bench, or correct the vehicle file"
            % (fitted, fitted / INCH_M, mine, mine / INCH_M))
