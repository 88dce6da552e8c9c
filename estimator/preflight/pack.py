"""The pack in the air: the ONE pack model of the pre-flight flow (datasheet and fitted routes).

Both the datasheet sheet (report.py) and every fitted-route hover value (measured_rotor.py: the
sheet of ``hover --params`` and the hover block ``fit --vehicle`` stores for the export) take the
vehicle's battery through pack_in_the_air, so a cold pack's resistance is applied once, the same
way, everywhere. A cold pack also delivers less of its rated capacity
(core.battery.cold_capacity_factor): that share scales the usable fraction, so the endurance
shrinks while the C-rating current limit stays on the rating.

The pack temperature is battery.temperature_C, else the site's temperature_C, else the temperature
of the air the estimate already assumed (the standard atmosphere at the site's altitude: 15 C at
sea level), so air and pack are never taken at two different assumed temperatures.
"""

from estimator.core.battery import COLD_REFERENCE_C, cold_capacity_factor, cold_resistance_factor
from estimator.core.constants import CELSIUS_ZERO_K

# the loaded cutoff when the file gives none: 0.2 V below the empty open-circuit cell voltage
# (common practice for lithium packs under load)
CUTOFF_BELOW_EMPTY_V = 0.2
# below this pack temperature the sheet cautions about a cold pack [C]: lithium packs lose
# capacity and sag more below about 10 C (common practice, from memory)
COLD_PACK_BELOW_C = 10.0
DEFAULT_USABLE_FRACTION = 0.8  # as estimator.vehicle (common practice)


def pack_in_the_air(vehicle, air):
    """The vehicle's battery dict with the resistance of a pack at its temperature.

    vehicle: checked vehicle dict; air: the site air the estimate uses (core.atmosphere.site_air,
    temperature_K [K]). Returns (battery dict [resistance_ohm times core.battery.
    cold_resistance_factor, usable_fraction times core.battery.cold_capacity_factor, cutoff_cell_V
    filled], pack temperature [C], how it was chosen: "battery", "site" or "air" [the assumed
    air's temperature]).
    """
    battery = dict(vehicle["battery"])
    site = vehicle.get("site") or {}
    if battery.get("temperature_C") is not None:
        temperature, basis = battery["temperature_C"], "battery"
    elif site.get("temperature_C") is not None:
        temperature, basis = site["temperature_C"], "site"
    else:
        temperature, basis = air["temperature_K"] - CELSIUS_ZERO_K, "air"
    battery["resistance_ohm"] = battery["resistance_ohm"] * cold_resistance_factor(temperature)
    battery["usable_fraction"] = (battery.get("usable_fraction", DEFAULT_USABLE_FRACTION)
                                  * cold_capacity_factor(temperature))
    battery.setdefault("cutoff_cell_V", battery["empty_cell_V"] - CUTOFF_BELOW_EMPTY_V)
    return battery, temperature, basis


BASIS_WORDS = {"battery": "the battery's temperature", "site": "the site temperature",
               "air": "the temperature assumed for the air"}


def pack_keys(vehicle, battery, temperature, basis):
    """The report keys that describe the pack model used (same in both routes)."""
    raw = vehicle["battery"]["resistance_ohm"]
    return {"pack_resistance_ohm": battery["resistance_ohm"], "pack_temperature_C": temperature,
            "pack_temperature_basis": basis,
            "pack_cold_factor": battery["resistance_ohm"] / raw if raw > 0.0 else 1.0,
            "pack_capacity_factor": cold_capacity_factor(temperature),
            "cutoff_cell_V": battery["cutoff_cell_V"], "cells": battery["cells"],
            "full_cell_V": vehicle["battery"]["full_cell_V"]}


def pack_temperature_text(report):
    """The sheet's words on the pack temperature behind the pack resistance ('' when unknown)."""
    temperature = report.get("pack_temperature_C")
    if temperature is None:
        return ""
    cold = report.get("pack_cold_factor") or 1.0
    basis = BASIS_WORDS.get(report.get("pack_temperature_basis"), "")
    text = " (pack at %.0f C, %s" % (temperature, basis) if basis else " (pack at %.0f C" % temperature
    if cold >= 1.005 and temperature < COLD_PACK_BELOW_C:  # shown as x1.01 or more
        text += ("; resistance x%.2f, cold factor from memory: a cold pack sags more, which can cost "
                 "more thrust-to-weight than the cold air's extra density gives" % cold)
    elif cold >= 1.005:  # a room-temperature pack: the model's small step from its 25 C reference
        text += "; resistance x%.2f against a pack at %.0f C, factor from memory" % (cold, COLD_REFERENCE_C)
    capacity = report.get("pack_capacity_factor") or 1.0
    if capacity <= 0.995:  # shown as x0.99 or less
        text += "; capacity x%.2f, from memory: a cold pack gives less of its charge" % capacity
    return text + ")"


def cold_pack_warning(report):
    """The sheet's cold-pack caution (estimator.cautions.COLD_PACK) or None above COLD_PACK_BELOW_C."""
    from estimator.cautions import COLD_PACK

    temperature = report.get("pack_temperature_C")
    if temperature is None or temperature >= COLD_PACK_BELOW_C:
        return None
    return COLD_PACK % (temperature, 100.0 * (report.get("pack_capacity_factor") or 1.0))


def hot_pack_heat(report):
    """("pack" or "site", its temperature [C]) when the pack or the site air is above
    estimator.cautions.HOT_PACK_ABOVE_C (about 40 C, common practice), the hotter of the two; else
    None. A pack kept cool on a hot site still needs shade, so the site counts too."""
    from estimator.cautions import HOT_PACK_ABOVE_C

    pack = report.get("pack_temperature_C")
    air_K = report.get("temperature_K")
    site = None if air_K is None else air_K - CELSIUS_ZERO_K
    heats = [(t, what) for t, what in ((pack, "pack"), (site, "site")) if t is not None and t > HOT_PACK_ABOVE_C]
    if not heats:
        return None
    t, what = max(heats, key=lambda h: (h[0], h[1] == "pack"))   # the pack's own on a tie
    return what, t


def hot_pack_warning(report):
    """The sheet's hot-pack caution (estimator.cautions.HOT_PACK) or None when neither the pack nor
    the site is above estimator.cautions.HOT_PACK_ABOVE_C (hot_pack_heat)."""
    from estimator.cautions import HOT_PACK, HOT_PACK_ABOVE_C

    heat = hot_pack_heat(report)
    return None if heat is None else HOT_PACK % (heat[0], heat[1], HOT_PACK_ABOVE_C)


def full_cell_warning(report):
    """(caution, short) when the pack's full-charge cell voltage is above a lithium cell's charge
    limit (estimator.cautions.LITHIUM_FULL_CELL_V, LITHIUM_HV_FULL_CELL_V), else None."""
    from estimator.cautions import (FULL_CELL_HV, FULL_CELL_OVER, FULL_CELL_SHORT, LITHIUM_FULL_CELL_V,
                                    LITHIUM_HV_FULL_CELL_V)

    full = report.get("full_cell_V")
    if full is None or full <= LITHIUM_FULL_CELL_V + 1e-9:
        return None
    if full > LITHIUM_HV_FULL_CELL_V + 1e-9:
        return FULL_CELL_OVER % full, FULL_CELL_SHORT % (full, "any lithium charge limit")
    return FULL_CELL_HV % full, FULL_CELL_SHORT % (full, "a standard cell's 4.20 V, LiHV only")
