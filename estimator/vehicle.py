"""Vehicle files: load, validate against schemas/vehicle.schema.json, check physics, fill defaults.

The file is already in SI (every key names its unit), so no conversion happens here beyond
filling documented defaults. Checks that JSON Schema cannot express (cell voltages in order,
figure of merit at most 1) are done here and reported with the JSON path and the reason.
"""

import copy
import math

from estimator.errors import InputError
from estimator.jsonio import load_json, validate

SCHEMA = "vehicle.schema.json"

# defaults for optional keys (documented in the schema descriptions)
DEFAULT_LAYOUT = "flat"
DEFAULT_USABLE_FRACTION = 0.8  # common practice: keep a 20 % reserve on lithium packs
DEFAULT_ESC_EFFICIENCY = 1.0  # ideal ESC
DEFAULT_ALTITUDE_M = 0.0
DEFAULT_HUMIDITY_PCT = 0.0


def load_vehicle(path):
    """Read and check a vehicle file; return the vehicle dict with defaults filled.

    Raises InputError naming the file and the JSON path on malformed JSON, schema
    violations or physically impossible values.
    """
    return check_vehicle(load_json(path), str(path))


def check_vehicle(document, source):
    """Validate an already-loaded vehicle document; return a new dict with defaults filled.

    ``source`` names the file (or "demo") in error messages.
    """
    validate(document, SCHEMA, source)
    vehicle = copy.deepcopy(document)
    _check_physics(vehicle, source)
    vehicle["rotors"].setdefault("layout", DEFAULT_LAYOUT)
    vehicle["battery"].setdefault("usable_fraction", DEFAULT_USABLE_FRACTION)
    vehicle.setdefault("esc", {}).setdefault("efficiency", DEFAULT_ESC_EFFICIENCY)
    site = vehicle.setdefault("site", {})
    site.setdefault("altitude_m", DEFAULT_ALTITUDE_M)
    site.setdefault("humidity_pct", DEFAULT_HUMIDITY_PCT)
    vehicle.setdefault("name", "unnamed vehicle")
    return vehicle


def _check_physics(vehicle, source):
    bat = vehicle["battery"]
    if not bat["empty_cell_V"] <= bat["nominal_cell_V"] <= bat["full_cell_V"]:
        raise InputError("%s: $.battery: cell voltages must satisfy empty_cell_V <= nominal_cell_V <= "
                         "full_cell_V, got %g, %g, %g V (swapped values?)"
                         % (source, bat["empty_cell_V"], bat["nominal_cell_V"], bat["full_cell_V"]))
    prop = vehicle["propeller"]
    fm = math.sqrt(2.0 / math.pi) * prop["ct"] ** 1.5 / prop["cp"]
    if fm > 1.0:
        raise InputError("%s: $.propeller.cp: ct = %g and cp = %g give a figure of merit of %.2f, above the "
                         "momentum-theory limit of 1 (cp too small, or coefficients on a rad/s basis "
                         "instead of rev/s?)" % (source, prop["ct"], prop["cp"], fm))
