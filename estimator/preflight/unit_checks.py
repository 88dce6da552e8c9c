"""Values inside the vehicle schema's limits that usually mean a unit slip, and a parameter set
fitted on another propeller.

The schema refuses what no vehicle can have (a 300 kg quad); these checks warn about numbers
that are possible on their own but not together: a 150 kg vehicle on four 10-inch propellers
(grams meant), a 150 Ah pack on a 0.65 kg frame (mAh meant), a 1.3 m propeller on a 0.65 kg
quad. Each warning names the JSON key, the value and the likely unit. Values the file wrote
with a unit ("650g") are taken as meant and not questioned.
"""

import math

from estimator.core.constants import STANDARD_GRAVITY_M_S2
from estimator.core.momentum import disk_area_m2
from estimator.vehicle import given_text

# Hover disk loading of small multirotor propellers [N/m^2]: about 20 to 1500 (the schema's
# disk_loading_N_m2 description; a 2 kg quad on 10-inch propellers is near 100). Common practice.
DISK_LOADING_TYPICAL_N_M2 = (20.0, 1500.0)
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


def _disk_loading(mass_kg, count, diameter_m):
    return mass_kg * STANDARD_GRAVITY_M_S2 / (count * disk_area_m2(diameter_m))


def _typical(loading):
    lo, hi = DISK_LOADING_TYPICAL_N_M2
    return lo <= loading <= hi


def suspicious_values(vehicle):
    """Warnings (strings) for values of a checked vehicle that usually mean a unit slip.

    vehicle: dict from estimator.vehicle.check_vehicle (SI keys). Each warning names the
    JSON path, the value as read, why it is odd, and the unit that would make it ordinary.
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
    if loading > hi and mass_bare:
        # 1 g = 1e-3 kg (NIST SP 811)
        hint = ("grams meant? (%g g = %g kg)" % (mass, mass * 1e-3)
                if _disk_loading(mass * 1e-3, count, diameter) <= hi
                else "check the mass (kilograms) and the diameter (metres)")
        out.append("$.mass_kg: %g kg puts %.0f N/m^2 on each propeller disk at hover, far above "
                   "the %g..%g N/m^2 of small multirotors: %s" % (mass, loading, lo, hi, hint))
    elif loading < DISK_LOADING_FLOOR_N_M2 and diameter_bare:
        hint = ""
        for unit, scale in (("in", 0.0254), ("cm", 0.01)):  # NIST SP 811, exact
            if _typical(_disk_loading(mass, count, diameter * scale)):
                hint = ": %s meant? (%g %s = %.3g m)" % ({"in": "inches", "cm": "centimetres"}[unit],
                                                          diameter, unit, diameter * scale)
                break
        out.append("$.propeller.diameter_m: %g m propellers carry only %.1f N/m^2 each for a %g kg "
                   "vehicle on %d rotors, far below the %g..%g N/m^2 of small multirotors%s"
                   % (diameter, loading, mass, count, lo, hi,
                      hint or ": check the diameter (metres) and the mass (kilograms)"))
    energy_Wh = bat["cells"] * bat["nominal_cell_V"] * bat["capacity_Ah"]
    least_pack_kg = energy_Wh / CELL_SPECIFIC_ENERGY_MAX_WH_KG
    capacity_odd = least_pack_kg > mass
    if capacity_odd and given_text(vehicle, "$.battery.capacity_Ah") is None:
        out.append("$.battery.capacity_Ah: %g Ah on %d cells is %.0f Wh, which weighs at least %.2g kg "
                   "even at %.0f Wh/kg (the best lithium cells, from memory), more than the whole "
                   "%g kg vehicle: mAh meant? (%g mAh = %g Ah)"
                   % (bat["capacity_Ah"], bat["cells"], energy_Wh, least_pack_kg,
                      CELL_SPECIFIC_ENERGY_MAX_WH_KG, mass, bat["capacity_Ah"], bat["capacity_Ah"] * 1e-3))
    r_cell_ah = bat["resistance_ohm"] / bat["cells"] * bat["capacity_Ah"]
    if (not capacity_odd and r_cell_ah > CELL_RESISTANCE_CAPACITY_MAX_OHM_AH
            and given_text(vehicle, "$.battery.resistance_ohm") is None):
        out.append("$.battery.resistance_ohm: %g ohm for a %d-cell %g Ah pack is %.0f times the "
                   "usual resistance of such a pack (about %.2g ohm, from memory): milliohm meant? "
                   "(%g mohm = %g ohm)"
                   % (bat["resistance_ohm"], bat["cells"], bat["capacity_Ah"],
                      r_cell_ah / 0.025, 0.025 * bat["cells"] / bat["capacity_Ah"],
                      bat["resistance_ohm"], bat["resistance_ohm"] * 1e-3))
    return out


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
            % (fitted, fitted / 0.0254, mine, mine / 0.0254))
