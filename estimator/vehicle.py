"""Vehicle files: load, validate against schemas/vehicle.schema.json, check physics, fill defaults.

The file is already in SI (every key names its unit), so no conversion happens here beyond
filling documented defaults. Checks that JSON Schema cannot express (cell voltages in order,
figure of merit at most 1) are done here and reported with the JSON path and the reason.

The same schema keeps the sensible bounds of the quantities typed on the command line
(``liftcal air/static``): check_quantity refuses a value outside them, naming the bound,
its unit and the likely unit slip ("10 m: did you mean 10in?").
"""

import copy
import math
import re

from estimator.errors import InputError
from estimator.jsonio import load_json, load_schema, unit_slip, validate, within

SCHEMA = "vehicle.schema.json"

# defaults for optional keys (documented in the schema descriptions)
DEFAULT_LAYOUT = "flat"
DEFAULT_USABLE_FRACTION = 0.8  # common practice: keep a 20 % reserve on lithium packs
DEFAULT_ESC_EFFICIENCY = 1.0  # ideal ESC
DEFAULT_ALTITUDE_M = 0.0
DEFAULT_HUMIDITY_PCT = 0.0

NO_SITE_WARNING = ("the vehicle file has no site: sea level, standard atmosphere (15 C, 1013.25 hPa, "
                   "1.225 kg/m^3) and dry air assumed; add \"site\": {\"altitude_m\": ..., "
                   "\"temperature_C\": ...} for the field you will fly at")
NO_ALTITUDE_WARNING = ("the vehicle file's site has no altitude_m: sea level assumed; add the field's "
                       "altitude above sea level")

# quantity typed on the command line -> (where vehicle.schema.json keeps its bounds, kind in
# estimator.units, unit shown, unit slips to try on a bare number, what it is)
QUANTITIES = {
    "diameter": (("properties", "propeller", "properties", "diameter_m"), "length", "m",
                 ("in", "cm", "mm"), "a rotor diameter"),
    "altitude": (("properties", "site", "properties", "altitude_m"), "altitude", "m", ("ft", "km"),
                 "a site altitude above sea level"),
    "temperature": (("properties", "site", "properties", "temperature_C"), "temperature", "C",
                    ("K", "F"), "an outside air temperature"),
    "pressure": (("properties", "site", "properties", "pressure_Pa"), "pressure", "Pa",
                 ("hPa", "kPa", "bar"), "a station pressure"),
    "humidity": (("properties", "site", "properties", "humidity_pct"), "percent", "%", (),
                 "a relative humidity"),
    "power": (("$defs", "limits", "properties", "rotor_power_W"), "power", "W", ("kW", "mW"),
              "one rotor's electrical power"),
    "thrust": (("$defs", "limits", "properties", "rotor_thrust_N"), "force", "N", ("g", "kgf", "lbf"),
               "one rotor's thrust"),
    "disk_loading": (("$defs", "limits", "properties", "disk_loading_N_m2"), "force", "N/m^2", (),
                     "a disk loading"),
    "density": (("$defs", "limits", "properties", "air_density_kg_m3"), "density", "kg/m^3", (),
                "an air density"),
    "factor": (("$defs", "limits", "properties", "static_factor"), "ratio", "", (),
               "the static thrust factor k"),
}
_BARE_NUMBER = re.compile(r"^\s*[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?\s*$")
_LEADING_NUMBER = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)")
_SCHEMA_CACHE = []


def quantity_schema(name):
    """The number schema (bounds, typical value) of a command-line quantity (QUANTITIES)."""
    if not _SCHEMA_CACHE:
        _SCHEMA_CACHE.append(load_schema(SCHEMA))
    node = _SCHEMA_CACHE[0]
    for part in QUANTITIES[name][0]:
        node = node[part]
    return node


def range_text(name):
    """The sensible range of a quantity as a person reads it, e.g. ``0.01..3 m``."""
    sub, unit = quantity_schema(name), QUANTITIES[name][2]
    lo, hi = sub.get("exclusiveMinimum", sub.get("minimum")), sub.get("maximum")
    tail = (" " + unit) if unit else ""
    if "exclusiveMinimum" in sub:
        return "above %g and at most %g%s" % (lo, hi, tail)
    return "%g..%g%s" % (lo, hi, tail)


def check_quantity(name, value, text=None, what=None):
    """Refuse a typed quantity outside its sensible bounds; return ``value`` when inside.

    name: a key of QUANTITIES; value: the quantity in SI (temperature in C); text: what the
    person typed, or None; what: the option to name (default ``--<name>``). A bare number
    (no unit suffix) outside the bounds is most often a unit slip, so the message names the
    slip that would bring it inside: ``--diameter: 10 m: did you mean 10in? (a rotor
    diameter must be 0.01..3 m)``. Raises InputError.
    """
    sub = quantity_schema(name)
    if within(value, sub):
        return value
    _, kind, unit, slips, label = QUANTITIES[name]
    what = what or "--" + name
    bare = text is not None and _BARE_NUMBER.match(str(text)) is not None
    shown = ("%g %s" % (value, unit)).strip()
    typed = _LEADING_NUMBER.match(str(text)) if text is not None else None
    if typed is not None and not bare and float(typed.group(1)) != value:
        shown = "%s = %s" % (str(text).strip(), shown)
    if name == "factor":
        side = "above 1, which momentum theory forbids" if value > 1.0 else "not above 0"
        hint = ""
        if bare and 2.0 <= value <= 100.0:
            hint = ": did you mean %g (a fraction, not %g %%)?" % (value / 100.0, value)
        raise InputError("%s: %s is %s (0 < k <= 1)%s" % (what, shown, side, hint))
    slip = unit_slip(value, kind, slips, sub) if bare else None
    if slip is not None:
        raise InputError("%s: %s: did you mean %s%s? (%s must be %s)"
                         % (what, shown, str(text).strip(), slip[0], label, range_text(name)))
    raise InputError("%s: %s is outside %s (%s)" % (what, shown, range_text(name), label))


def load_vehicle(path):
    """Read and check a vehicle file; return the vehicle dict with defaults filled.

    Raises InputError naming the file and the JSON path on malformed JSON, schema
    violations or physically impossible values.
    """
    return check_vehicle(load_json(path), str(path))


def check_vehicle(document, source):
    """Validate an already-loaded vehicle document; return a new dict with defaults filled.

    ``source`` names the file (or "demo") in error messages. The returned dict carries
    ``checked``: {source, assumed}, where ``assumed`` lists warnings for defaults a reader
    should know about (no site: sea level).
    """
    _not_another_file(document, source)
    validate(document, SCHEMA, source)
    vehicle = copy.deepcopy(document)
    _check_physics(vehicle, source)
    assumed = []
    if "site" not in document:
        assumed.append(NO_SITE_WARNING)
    elif "altitude_m" not in document["site"]:
        assumed.append(NO_ALTITUDE_WARNING)
    vehicle["checked"] = {"source": source, "assumed": assumed}
    vehicle["rotors"].setdefault("layout", DEFAULT_LAYOUT)
    vehicle["battery"].setdefault("usable_fraction", DEFAULT_USABLE_FRACTION)
    vehicle.setdefault("esc", {}).setdefault("efficiency", DEFAULT_ESC_EFFICIENCY)
    site = vehicle.setdefault("site", {})
    site.setdefault("altitude_m", DEFAULT_ALTITUDE_M)
    site.setdefault("humidity_pct", DEFAULT_HUMIDITY_PCT)
    vehicle.setdefault("name", "unnamed vehicle")
    return vehicle


def _not_another_file(document, source):
    """Refuse a parameter set or an export map given where a vehicle file belongs."""
    if not isinstance(document, dict):
        return
    model = str(document.get("model", ""))
    if model.startswith("liftcal.rotor") or "thrust_curve" in document:
        raise InputError("%s: $.model: this is a fitted parameter set (%s), not a vehicle file; give "
                         "the vehicle file here and the parameter set with --params"
                         % (source, model or "thrust_curve"))
    if model.startswith("liftcal.map") or "settings" in document:
        raise InputError("%s: $.model: this is an export map (%s), not a vehicle file; it goes with "
                         "`liftcal export PARAMS.json --map MAP.json`" % (source, model or "settings"))


def vehicle_source(vehicle, default="vehicle"):
    """The file a checked vehicle came from (for error messages)."""
    return (vehicle.get("checked") or {}).get("source") or default


def assumed_warnings(vehicle):
    """Warnings about defaults check_vehicle filled that change the answer (no site...)."""
    return list((vehicle.get("checked") or {}).get("assumed") or [])


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
