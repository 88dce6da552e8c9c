"""The unit slip behind a vehicle file's mass outside the schema, judged by the rest of the vehicle.

The schema's hint (estimator.jsonio.unit_slip) knows the number only: it names the slip nearest a
typical mass, so 240 "kg" got "240 lb = 108.9 kg" even on 3-inch propellers (new-user trial 11,
finding 4). Here the slip is the one that gives an ordinary hover disk loading m g / (N A) on the
file's own propellers (vehicle_units.DISK_LOADING_TYPICAL_N_M2, the band likely_unit judges a
bare mass by): 240 g on four 3-inch propellers, 240 lb on eight 30-inch ones.

A cell voltage above the schema is judged by the pack too (cell_voltage_hint): "full_cell_V": 25.2
on 6 cells is the pack's 6 x 4.2 V, not 25.2 mV (new-user trial 26).
"""

import math
import re

from estimator.core.constants import STANDARD_GRAVITY_M_S2
from estimator.core.momentum import disk_area_m2
from estimator.jsonio import _KEY_UNITS
from estimator.units import parse_quantity
from estimator.vehicle_units import DISK_LOADING_TYPICAL_N_M2, _si, in_vehicle_schema

_MASS_MESSAGE = re.compile(r": \$\.mass(?:_kg)?: ")
_MASS_SLIP_HINT = re.compile(r"; given in (\w+) instead of kg\? [^;]*$")


def mass_slips_by_loading(value, slips, document):
    """The mass slips that fit the rest of the vehicle: [(unit, disk loading [N/m^2], mass [kg])]
    for each unit of ``slips`` ("g", "lb") in which ``value`` (a mass as read, in kg) gives a hover
    disk loading m g / (N A) within DISK_LOADING_TYPICAL_N_M2 on the file's propellers (A = pi D^2 / 4,
    momentum theory) and lies inside the schema, nearest the band's geometric middle first; None
    when the file lacks the propeller's diameter or the rotor count."""
    if not isinstance(document, dict):
        return None
    diameter = _si(document, "propeller", "diameter", "diameter_m", "length")
    rotors = document.get("rotors")
    count = rotors.get("count") if isinstance(rotors, dict) else None
    if not diameter or diameter <= 0 or not isinstance(count, int) or isinstance(count, bool) or count <= 0:
        return None
    lo, hi = DISK_LOADING_TYPICAL_N_M2
    fits = []
    for unit in slips:
        kg = parse_quantity("%r%s" % (float(value), unit), "mass")
        loading = kg * STANDARD_GRAVITY_M_S2 / (count * disk_area_m2(diameter))  # hover: T = m g
        if lo <= loading <= hi and in_vehicle_schema("$.mass_kg", kg):
            fits.append((abs(math.log(loading / math.sqrt(lo * hi))), unit, loading, kg))
    return [f[1:] for f in sorted(fits)]


def mass_hint(message, document):
    """A schema message about the mass (``$.mass_kg`` or ``$.mass`` as written) whose unit-slip
    hint is replaced by the slip that fits the rest of the vehicle (mass_slips_by_loading).
    Unchanged when the message is about another key or has no such hint, when the file lacks
    the sizes, or when no slip fits them either (the schema's guess then stands).

    document: the normalised vehicle document (``mass_kg`` in kg)."""
    if not isinstance(document, dict):  # a list or a number where the vehicle belongs: no mass to judge
        return message
    hint = _MASS_SLIP_HINT.search(message)
    value = document.get("mass_kg")
    if not _MASS_MESSAGE.search(message) or hint is None or isinstance(value, bool) \
            or not isinstance(value, (int, float)):
        return message
    fits = mass_slips_by_loading(value, _KEY_UNITS["kg"][1], document)
    if not fits:
        return message
    unit, loading, kg = fits[0]
    return "%s; given in %s instead of kg? %g %s = %.4g kg, an ordinary hover disk loading (%.3g N/m^2) on its " \
        "propellers" % (message[:hint.start()], unit, value, unit, kg, loading)


_CELL_MESSAGE = re.compile(r": \$\.battery\.((?:full|nominal|empty|cutoff)_cell)(?:_V)?: ")
_MILLIVOLT_HINT = re.compile(r"; given in mV instead of V\? [^;]*$")
# the lowest voltage a cell of a common chemistry shows in use: a nickel cell's end of discharge,
# about 1.0 V (from memory; a lithium cell's is 2.5..3.5 V) [V]
CELL_V_LOWEST = 1.0


def cell_voltage_hint(message, document):
    """A schema message about a cell voltage ($.battery.full_cell_V, ... as written) whose
    millivolt hint is replaced by the pack's voltage per cell when that lies within CELL_V_LOWEST
    and the schema (25.2 V / 6 cells = 4.2 V), or dropped when its millivolts are below
    CELL_V_LOWEST (no cell's voltage). Unchanged otherwise. document: the normalised vehicle."""
    m, hint = _CELL_MESSAGE.search(message), _MILLIVOLT_HINT.search(message)
    battery = document.get("battery") if isinstance(document, dict) else None
    if m is None or hint is None or not isinstance(battery, dict):
        return message
    key, value, cells = m.group(1) + "_V", battery.get(m.group(1) + "_V"), battery.get("cells")
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        return message
    if isinstance(cells, int) and not isinstance(cells, bool) and cells > 1 \
            and value / cells >= CELL_V_LOWEST and in_vehicle_schema("$.battery." + key, value / cells):
        return "%s; the whole pack's voltage? %s is one cell's: %g V / %d cells = %.3g V" % (
            message[:hint.start()], key, value, cells, value / cells)
    return message[:hint.start()] if value * 1e-3 < CELL_V_LOWEST else message


def slip_hints(message, document):
    """A vehicle schema message with its unit-slip hint judged by the rest of the vehicle: the
    mass (mass_hint), then a cell voltage (cell_voltage_hint)."""
    return cell_voltage_hint(mass_hint(message, document), document)
