"""The unit slip behind a vehicle file's mass outside the schema, judged by the rest of the vehicle.

The schema's hint (estimator.jsonio.unit_slip) knows the number only: it names the slip nearest a
typical mass, so 240 "kg" got "240 lb = 108.9 kg" even on 3-inch propellers (new-user trial 11,
finding 4). Here the slip is the one that gives an ordinary hover disk loading m g / (N A) on the
file's own propellers (vehicle_units.DISK_LOADING_TYPICAL_N_M2, the band likely_unit judges a
bare mass by): 240 g on four 3-inch propellers, 240 lb on eight 30-inch ones.
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
