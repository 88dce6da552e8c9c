"""Vehicle files: load, validate against schemas/vehicle.schema.json, check physics, fill defaults.

Numbers may be written as text with a unit suffix (``"mass_kg": "650g"``, ``"capacity":
"5000mAh"``, ``"propeller": {"size": "10x4.5in", "blades": 2}``): normalise() turns them into
the SI keys of the schema with estimator.units, the one parser the command line uses too. A
bare number keeps the unit its key names; a key without a unit (``mass``) needs a suffix. Checks that JSON Schema cannot express (cell voltages in order,
figure of merit at most 1) are done here and reported with the JSON path and the reason.
The same schema keeps the sensible bounds of the quantities typed on the command line
(``liftcal air/static``): check_quantity refuses a value outside them, naming the bound, its unit and the likely unit slip.
"""

import copy
import math
import re

from estimator.core.atmosphere import station_pressure_warning
from estimator.errors import InputError
from estimator.jsonio import load_json, load_schema, unit_slip, validate, within
from estimator.mass_slip import slip_hints
from estimator.units import INCH_M, altitude_feet_note, humidity_fraction_note
from estimator.vehicle_units import (BARE_NUMBER as _BARE_NUMBER, UNIT_KEYS as _UNIT_KEYS, cutoff_above_nominal,
                                     normalise, propeller_notes, written_unit_slip)  # noqa: F401 (normalise: API)

SCHEMA = "vehicle.schema.json"

# defaults for optional keys (documented in the schema descriptions)
DEFAULT_LAYOUT = "flat"
DEFAULT_USABLE_FRACTION = 0.8  # common practice: keep a 20 % reserve on lithium packs
DEFAULT_ESC_EFFICIENCY = 1.0  # ideal ESC
DEFAULT_ALTITUDE_M, DEFAULT_HUMIDITY_PCT, DEFAULT_BLADES = 0.0, 0.0, 2
# pitch / diameter of propellers that the blade-element estimate covers (multirotor and sport
# propellers run from about 0.3 to 1.0; common practice)
PITCH_RATIO_MIN, PITCH_RATIO_MAX = 0.2, 1.5
# the flight ends at this loaded cell voltage below the usable-empty open-circuit voltage [V]
# (3.5 V -> 3.3 V on a lithium-polymer cell; common practice)
CUTOFF_BELOW_EMPTY_V = 0.2

NO_SITE_WARNING = ("the vehicle file has no site: sea level, standard atmosphere (15 C, 1013.25 hPa, "
                   "1.225 kg/m^3) and dry air assumed; add \"site\": {\"altitude_m\": ..., "
                   "\"temperature_C\": ...} for the field you will fly at")
# an ESC left out of the vehicle file is taken as lossless (the schema's default), and the sheet says so
NO_ESC_EFFICIENCY_WARNING = (  # the datasheet route's words; a bench fit's: preflight.measured_rotor
    "the vehicle file gives no esc.efficiency: the ESC is taken as lossless (efficiency 1), so on the "
    "datasheet model the pack current comes out a few per cent low and the endurance a few per cent long; "
    "multirotor ESCs are about 0.9-0.95 efficient (common practice, from memory): add \"esc\": "
    "{\"efficiency\": %.2f} or the maker's figure" % 0.95)
NO_ALTITUDE_WARNING = "the vehicle file's site has no altitude_m: sea level assumed; add the field's altitude above sea level"

# quantity typed on the command line -> (where vehicle.schema.json keeps its bounds, kind in
# estimator.units, unit shown, unit slips to try on a bare number, what it is)
QUANTITIES = {
    "diameter": (("properties", "propeller", "properties", "diameter_m"), "length", "m",
                 ("in", "cm", "mm"), "a rotor diameter"),  # inches first when they fit (props are sized in inches)
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


def check_quantity(name, value, text=None, what=None, typical=None, unit_required=False):
    """Refuse a typed quantity outside its sensible bounds; return ``value`` when inside.

    name: a key of QUANTITIES; value: the quantity in SI (temperature in C); text: what the
    person typed, or None; what: the option to name (default ``--<name>``). A bare number
    (no unit suffix) outside the bounds is most often a unit slip, so the message names the
    slip that would bring it inside: ``--diameter: 10 m: did you mean 10in? (a rotor
    diameter must be 0.01..3 m)``; the one nearest ``typical`` [SI] when the context expects a
    value (a bench's diameter: the vehicle's, 76 -> 76mm on 3 in; trial 11). unit_required: a
    bare number is called unitless, never given a unit it was not written with ('82' has no unit:
    did you mean 82F?; trial 12, finding 9). Raises InputError.
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
    unitless = unit_required and bare
    shown = "'%s' has no unit" % str(text).strip() if unitless else shown
    if name == "factor":
        side = "above 1, which momentum theory forbids" if value > 1.0 else "not above 0"
        hint = ""
        if bare and 2.0 <= value <= 100.0:
            hint = ": did you mean %g (a fraction, not %g %%)?" % (value / 100.0, value)
        raise InputError("%s: %s is %s (0 < k <= 1)%s" % (what, shown, side, hint))
    first = ("in",) if name == "diameter" and typical is None else ()  # props are sized in inches
    slip = bare and (first and unit_slip(value, kind, first, sub) or unit_slip(
        value, kind, slips, sub if typical is None else dict(sub, examples=[typical])))
    if slip:
        raise InputError("%s: %s: did you mean %s%s? (%s must be %s)"
                         % (what, shown, str(text).strip(), slip[0], label, range_text(name)))
    raise InputError("%s: %s%s %s (%s)" % (what, shown, ", and no unit brings it inside" if unitless else " is outside",
                                             range_text(name), label))


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
    document, given = normalise(document, source)
    try:
        validate(document, SCHEMA, source, _UNIT_KEYS)
    except InputError as exc:  # name the key as the file wrote it
        raise InputError(slip_hints(_schema_hint(_as_written(str(exc), given), document), document)) from None
    vehicle = copy.deepcopy(document)
    _check_physics(vehicle, source)
    assumed = propeller_notes(document, given)
    if "site" not in document:
        assumed.append(NO_SITE_WARNING)
    elif "altitude_m" not in document["site"]:
        assumed.append(NO_ALTITUDE_WARNING)
    if "efficiency" not in (document.get("esc") or {}):
        assumed.append(NO_ESC_EFFICIENCY_WARNING)
    site = document.get("site") or {}  # a temperature or pressure odd for the altitude; a humidity in 0..1; bare feet?
    assumed += [w for w in (site_temperature_warning(site.get("altitude_m", DEFAULT_ALTITUDE_M), site.get("temperature_C")),
                station_pressure_warning(site.get("altitude_m", DEFAULT_ALTITUDE_M), site.get("pressure_Pa")),  # a QNH?
                humidity_fraction_note(site.get("humidity_pct"), "$.site.humidity_pct"), "$.site.altitude_m" not in given
                and altitude_feet_note(site.get("altitude_m"), "$.site.altitude_m")) if w]
    vehicle["checked"] = {"source": source, "assumed": assumed, "given": {p: t for p, (_, t) in given.items()},
                          "written": {p: w for p, (w, _) in given.items() if w != p}}  # its key as written
    vehicle["rotors"].setdefault("layout", DEFAULT_LAYOUT)
    vehicle["battery"].setdefault("usable_fraction", DEFAULT_USABLE_FRACTION)
    empty = vehicle["battery"]["empty_cell_V"]
    vehicle["battery"].setdefault("cutoff_cell_V", max(empty - CUTOFF_BELOW_EMPTY_V, 0.8 * empty))
    if "pitch_m" in vehicle["propeller"]:
        vehicle["propeller"].setdefault("blades", DEFAULT_BLADES)
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


_SITE_KEYS = {"altitude": "altitude_m", "temperature": "temperature_C", "pressure": "pressure_Pa", "humidity": "humidity_pct"}


def vehicle_air(vehicle):
    """Site air of a checked vehicle (core.atmosphere.site_air, keys and units there).

    Raises InputError naming the file and the site's JSON key when the air model refuses an input
    (e.g. a sea-level QNH given as the station pressure; one a little too high: check_vehicle warns).
    """
    from estimator.core.atmosphere import AirInputError, site_air

    site = vehicle.get("site", {})
    try:
        return site_air(site.get("altitude_m", 0.0), site.get("temperature_C"),
                        site.get("pressure_Pa"), site.get("humidity_pct", 0.0))
    except AirInputError as exc:
        raise InputError("%s: $.site.%s: %s" % (vehicle_source(vehicle), _SITE_KEYS[exc.quantity], exc)) from None


# How far a site's air temperature may sit from the standard atmosphere's at its altitude before
# it is questioned [K]. The standard (ICAO Doc 7488 / ISO 2533, the US Standard Atmosphere 1976 in
# the troposphere) falls 6.5 K per km; real surface air strays far from it, so the band is
# generous: the hottest surface air on record, 56.7 C at -86 m (Death Valley, 1913), is about
# 42 K above the standard, and the coldest, -89.2 C at 3488 m (Vostok, 1983), about 82 K below
# it (WMO archive of weather extremes, from memory). Outside the band a typing slip (the
# altitude in feet, the temperature at home) is likelier than the weather.
SITE_TEMPERATURE_ABOVE_STANDARD_K = 45.0
SITE_TEMPERATURE_BELOW_STANDARD_K = 85.0


def site_temperature_warning(altitude_m, temperature_C):
    """A warning when a site temperature is implausible for its altitude, else None.

    altitude_m: geometric altitude [m]; temperature_C: outside air temperature [C] (None: none).
    Compared with the standard atmosphere's temperature at the altitude
    (core.atmosphere.standard_atmosphere: 288.15 K - 6.5 K/km x geopotential height, 216.65 K
    above 11 km; ICAO Doc 7488, ISO 2533); the band SITE_TEMPERATURE_ABOVE/BELOW_STANDARD_K.
    """
    from estimator.core.atmosphere import standard_atmosphere
    from estimator.core.constants import CELSIUS_ZERO_K

    if temperature_C is None:
        return None
    try:
        t_std = standard_atmosphere(altitude_m)[0] - CELSIUS_ZERO_K
    except ValueError:
        return None  # the air model refuses the altitude itself, naming it
    off = temperature_C - t_std
    if -SITE_TEMPERATURE_BELOW_STANDARD_K <= off <= SITE_TEMPERATURE_ABOVE_STANDARD_K:
        return None
    return ("site temperature %.1f C at %.0f m is %.0f K %s the standard atmosphere's %.1f C there "
            "(ICAO standard atmosphere, 6.5 K per km), beyond the %.0f K that surface air reaches (records: "
            "about 42 K above, 82 K below; from memory): check the altitude (feet given as metres?) and "
            "the temperature; the density uses them as given"
            % (temperature_C, altitude_m, abs(off), "above" if off > 0 else "below", t_std,
               SITE_TEMPERATURE_ABOVE_STANDARD_K if off > 0 else SITE_TEMPERATURE_BELOW_STANDARD_K))


def assumed_warnings(vehicle):
    """Warnings about defaults check_vehicle filled that change the answer (no site...)."""
    return list((vehicle.get("checked") or {}).get("assumed") or [])


def _check_physics(vehicle, source):
    bat = vehicle["battery"]
    if not bat["empty_cell_V"] <= bat["nominal_cell_V"] <= bat["full_cell_V"]:
        raise InputError("%s: $.battery: cell voltages must satisfy empty_cell_V <= nominal_cell_V <= "
                         "full_cell_V, got %g, %g, %g V (swapped values?)"
                         % (source, bat["empty_cell_V"], bat["nominal_cell_V"], bat["full_cell_V"]))
    if "cutoff_cell_V" in bat and not bat["cutoff_cell_V"] < bat["nominal_cell_V"]:  # nominal <= full
        raise InputError(cutoff_above_nominal(bat, source, CUTOFF_BELOW_EMPTY_V))
    prop = vehicle["propeller"]
    if "blades" in prop and "pitch_m" not in prop:
        raise InputError("%s: $.propeller.blades: the blade count is used with the pitch (pitch_m or "
                         "size); coefficients ct and cp already hold it: give the size and blades "
                         "instead of ct and cp, or leave blades out" % source)
    if "ct" not in prop or "cp" not in prop:
        pitch, diameter = prop["pitch_m"], prop["diameter_m"]
        if pitch > PITCH_RATIO_MAX * diameter:
            inches = pitch * INCH_M
            hint = ("inches meant? (%g in = %.4g m)" % (pitch, inches)
                    if PITCH_RATIO_MIN <= inches / diameter <= PITCH_RATIO_MAX
                    else "diameter and pitch swapped?")
            raise InputError("%s: $.propeller.pitch_m: %.4g m is %.1f times the diameter %.4g m; "
                             "propellers have pitch/diameter %.1f..%.1f: %s"
                             % (source, pitch, pitch / diameter, diameter, PITCH_RATIO_MIN,
                                PITCH_RATIO_MAX, hint))
        return
    fm = math.sqrt(2.0 / math.pi) * prop["ct"] ** 1.5 / prop["cp"]
    if fm > 1.0:
        raise InputError("%s: $.propeller.cp: ct = %g and cp = %g give a figure of merit of %.2f, above the "
                         "momentum-theory limit of 1 (cp too small, or coefficients on a rad/s basis "
                         "instead of rev/s?)" % (source, prop["ct"], prop["cp"], fm))


# fraction keys (0..1) a person may write in percent (trial 5, item 9): (the least share that reads
# as a likely percent, the key's meaning otherwise); ESCs pass about 0.85..0.98 of the bus power, a
# flight uses about 0.5..0.9 of a pack (common practice): 1.5 is not "1.5 %" (trial 9, finding 11).
# An example of each short key written with its unit text, for a schema message that misses it.
_FRACTION_KEYS = {"$.esc.efficiency": (0.5, "it is the share of the bus power an ESC passes on, 1 at most; "
                                            "ESCs reach about 0.85..0.98 (common practice)"),
                  "$.battery.usable_fraction": (0.3, "it is the share of the capacity a flight may use, 1 at "
                                                     "most (the whole pack); 0.8 is common practice")}
_SHORT_KEY_EXAMPLES = {"mass": "1.05kg", "capacity": "4200mAh", "resistance": "20mohm", "diameter": "254mm",
                       "pitch": "4.5in", "no_load_current": "0.8A", "max_current": "30A", "full_cell": "4.2V",
                       "nominal_cell": "3.7V", "empty_cell": "3.5V"}
_REQUIRED = re.compile(r"^(.*?: (\$[.\w]*)): '(\w+)' is a required property")
_ABOVE_ONE = re.compile(r"^.*?: (\$\.[.\w]+): ([-+0-9.eE]+) is greater than the maximum of 1\b")


def _schema_hint(message, document):
    """A schema message with the likely cause added: a fraction written in percent (``95`` for
    0.95, 1 % = 0.01), a required SI key that the unit-text style names differently
    (``capacity_Ah`` -> ``"capacity": "4200mAh"``)."""
    m = _ABOVE_ONE.match(message)
    if m and m.group(1) in _FRACTION_KEYS:
        value = float(m.group(2))
        least, words = _FRACTION_KEYS[m.group(1)]
        if least * 100.0 <= value <= 100.0:
            return message + ": percent meant? %g %% is %g (a fraction of 1)" % (value, value / 100.0)
        return message + ": " + words
    # the propeller's coefficients or its pitch (jsonio._key_choice), the pitch as a builder writes
    # it (vehicle_units): liftcal then estimates ct and cp by blade element momentum theory
    pitch = 'the pitch ("size": "10x4.5in", or "pitch": "4.5in"), from which liftcal estimates both'
    if ": $.propeller: " in message and message.endswith(", or pitch_m instead"):
        return message[:-len("pitch_m instead")] + pitch
    if message.endswith(": $.propeller: needs one of: ct and cp; pitch_m"):
        return message[:-len("needs one of: ct and cp; pitch_m")] + "give ct and cp (the propeller's " \
            "static coefficients), or " + pitch
    m = _REQUIRED.match(message)
    if m:
        block = m.group(2)[2:]
        for short, (key, _kind) in _UNIT_KEYS.get(block, {}).items():
            if key == m.group(3) and short in _SHORT_KEY_EXAMPLES:
                return message + ' (or "%s": "%s", with its unit)' % (short, _SHORT_KEY_EXAMPLES[short])
    return message


def _as_written(message, given):
    """A schema message about an SI key, with the key's path and value as the file wrote them:
    ``$.mass: "-320g" = -0.32 kg is less than ...`` (the unit the person used stays in sight);
    a unit-slip hint for a value written with a unit is about that unit (vehicle_units.written_unit_slip)."""
    for si_path, (written, text) in sorted(given.items(), key=lambda item: -len(item[0])):
        if (si_path + ":") not in message:
            continue
        rewritten = written_unit_slip(si_path, text, written, message.replace(si_path + ":", written + ":", 1))
        if rewritten is not None:
            return rewritten
        head, tail = message.split(si_path + ": ", 1) if (si_path + ": ") in message else (None, None)
        unit = si_path.rsplit("_", 1)[-1] if "_" in si_path.rsplit(".", 1)[-1] else ""
        value = tail.split(" ", 1) if tail else None
        if isinstance(text, str) and value and len(value) == 2 and _LEADING_NUMBER.match(value[0]) \
                and written in (si_path, si_path.replace("_" + unit, "")) and unit:
            return "%s%s: \"%s\" = %s %s %s" % (head, written, text, value[0], unit, value[1])
        if written != si_path:
            return message.replace(si_path + ":", written + ":", 1)
    return message


def given_text(vehicle, path):
    """What the file wrote for an SI key (``"650g"``), or None when it wrote a bare number."""
    return ((vehicle.get("checked") or {}).get("given") or {}).get(path)


def vehicle_keys():
    """Every key path a vehicle file may hold, as tuples (("battery", "capacity_Ah"), ...).

    The schema's keys (top level and one block deep), the keys without a unit that take text
    with a unit (("battery", "capacity")), and ("propeller", "size").
    """
    schema = load_schema(SCHEMA)
    keys = set()
    for key, sub in schema["properties"].items():
        if sub.get("type") == "object":
            keys.update((key, leaf) for leaf in sub.get("properties", {}))
        else:
            keys.add((key,))
    for block, table in _UNIT_KEYS.items():
        keys.update(((block, short) if block else (short,)) for short in table)
    keys.add(("propeller", "size"))
    return keys


def unit_key_aliases(path):
    """The other names of the quantity at ``path`` in its block (("mass",) -> ["mass_kg"])."""
    block, leaf = (path[0], path[-1]) if len(path) > 1 else ("", path[0])
    out = []
    for short, (key, _) in _UNIT_KEYS.get(block, {}).items():
        if leaf == short:
            out.append(key)
        elif leaf == key:
            out.append(short)
    return out
