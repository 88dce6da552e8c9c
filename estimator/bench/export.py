"""Export a parameter set through a user mapping (``schemas/map.schema.json``, ``liftcal.map/1``).

Each mapped setting is round(value * scale + offset, decimals) for a number found at a
dotted path of the parameter set. A value outside the setting's [min, max] is refused,
never clipped: a clipped hover command or curve would fly differently from the fit.

The text layout is liftcal's own: one line per setting with its value and unit, then an
arrow back to the parameter-set key it came from, that key's value and unit, and the
arithmetic applied, so a reader can check every number by hand.
"""

import math
import os
import re

from estimator.core.constants import STANDARD_GRAVITY_M_S2
from estimator.errors import InputError
from estimator.jsonio import load_json, validate
from estimator.units import unit_conversion, unit_spelling

MAP_SCHEMA = "map.schema.json"
EXAMPLE_MAP = os.path.join(os.path.dirname(os.path.dirname(os.path.abspath(__file__))), "data", "example-map.json")


def load_map(path):
    """Read and validate a mapping file; raises InputError with the JSON path."""
    mapping = load_json(path)
    validate(mapping, MAP_SCHEMA, path)
    for i, entry in enumerate(mapping["settings"]):
        if "min" in entry and "max" in entry and entry["min"] > entry["max"]:
            raise InputError("%s: $.settings[%d]: min %g is above max %g"
                             % (path, i, entry["min"], entry["max"]))
    for i, entry in enumerate(mapping["settings"]):
        wrong = scale_mismatch(entry)
        if wrong:
            raise InputError("%s: $.settings[%d] (%s): %s" % (path, i, entry["name"], wrong))
    names = [e["name"] for e in mapping["settings"]]
    dup = sorted({n for n in names if names.count(n) > 1})
    if dup:
        raise InputError("%s: $.settings: name %r appears more than once" % (path, dup[0]))
    return mapping


def lookup(params, source):
    """The number at dotted path ``source`` (list items by index) or None when absent."""
    node = params
    for part in source.split("."):
        if isinstance(node, dict) and part in node:
            node = node[part]
        elif isinstance(node, list) and part.isdigit() and int(part) < len(node):
            node = node[int(part)]
        else:
            return None
    return node


# unit of a parameter-set key from its suffix (the project's naming rule: names carry units);
# a compound key names a quotient: linear_W_per_N W/N, sqrt_W_per_N0_5 W/N^0.5, slope_per_N 1/N,
# thrust_per_V2_N N/V^2 (a in T = a s^2); "per rotor" is no unit, nor a command's "_min"
_UNIT = r"(kg_m3|N|V|W|A|m|Pa|s|kg|ohm)"
_POWER = r"(\d+(?:_\d+)?)?"
_UNIT_SPELLING = {"kg_m3": "kg/m^3"}


def _unit_power(unit, power):
    """A unit to a power written in a key (N, "0_5" -> N^0.5), as text."""
    unit = _UNIT_SPELLING.get(unit, unit)
    return unit + "^" + power.replace("_", ".") if power and power != "1" else unit


def source_unit(source):
    """Unit of the number at a dotted parameter-set path, read from its key's suffix ("-" if none)."""
    key = [part for part in source.split(".") if not part.isdigit()][-1]
    m = re.search(r"_%s_per_%s%s$" % (_UNIT, _UNIT, _POWER), key)          # linear_W_per_N
    if m:
        return "%s/%s" % (_UNIT_SPELLING.get(m.group(1), m.group(1)), _unit_power(m.group(2), m.group(3)))
    m = re.search(r"_per_%s%s_%s$" % (_UNIT, _POWER, _UNIT), key)          # thrust_per_V2_N
    if m:
        return "%s/%s" % (_UNIT_SPELLING.get(m.group(3), m.group(3)), _unit_power(m.group(1), m.group(2)))
    m = re.search(r"(?:^|_)per_%s%s$" % (_UNIT, _POWER), key)              # slope_per_N
    if m:
        return "1/" + _unit_power(m.group(1), m.group(2))
    if "time" in key and key.endswith("_min"):                            # flight_time_min
        return "min"
    m = re.search(r"_%s$" % _UNIT, key)
    return _UNIT_SPELLING.get(m.group(1), m.group(1)) if m else "-"


# the kind of quantity (estimator.units' tables) of each source unit a key's suffix names
# (source_unit); a compound key (thrust_per_V2_N, slope_per_N) is in another unit than its
# suffix, so a map entry taking one is not judged
_SOURCE_KINDS = {"N": "force", "V": "voltage", "W": "power", "A": "current", "m": "length",
                 "Pa": "pressure", "s": "time", "kg/m^3": "density"}
# a map's scale within this share of its unit's conversion is that conversion, written to three
# or more significant digits (101.97 or 102 for 101.9716 gf per N) [-]
SCALE_TOLERANCE = 0.005


def _near(x, target):
    return abs(x / target - 1.0) <= SCALE_TOLERANCE


def _slip(given, needed, kind, frm, to):
    """The likely slip behind a scale ``given`` where ``needed`` converts frm to to, in words."""
    ratio = given / needed
    if ratio < 0.0:
        return "a negative scale turns the value's sign"
    if kind == "force" and _near(ratio, STANDARD_GRAVITY_M_S2):
        return ("%g is %.4g x that, standard gravity (%g m/s^2) left out: the value in %s converted as if it "
                "were a mass in kg" % (given, ratio, STANDARD_GRAVITY_M_S2, frm))
    if kind == "force" and _near(ratio, 1.0 / STANDARD_GRAVITY_M_S2):
        return "%g is that divided by standard gravity (%g m/s^2) once too often" % (given, STANDARD_GRAVITY_M_S2)
    if given == 1.0:
        return "no scale given (1): the value would stay in %s under the label %s" % (frm, to)
    if _near(given * needed, 1.0):
        return "%g is the conversion turned upside down (from %s to %s)" % (given, to, frm)
    power = round(math.log10(ratio))
    if power and _near(ratio, 10.0 ** power):
        return "%g is %s that: a unit prefix slip (milli, kilo)" % (
            given, "%g x" % 10.0 ** power if power > 0 else "1/%g of" % 10.0 ** -power)
    return "no common slip gives %g" % given


def scale_mismatch(entry):
    """None, or why a map entry's scale does not convert its source to the unit it names (a unit
    liftcal knows for the source's kind of quantity, estimator.units: 'g' on a thrust in N is gram-force,
    1 N = 1 / (9.80665e-3 N per gf) = 101.97 gf, standard gravity exact by CGPM 1901) within
    SCALE_TOLERANCE: the scale given, the scale the unit needs and the likely slip. An entry
    without a unit, or with one liftcal does not know for that kind, is not judged."""
    key = [part for part in entry["source"].split(".") if not part.isdigit()][-1]
    frm = source_unit(entry["source"])
    kind = _SOURCE_KINDS.get(frm)
    factor = unit_conversion(kind, entry.get("unit", "")) if kind and "_per_" not in key else None
    if factor is None or factor[1] != 0.0:
        return None
    needed, given = 1.0 / factor[0], entry.get("scale", 1.0)
    if _near(given, needed):
        return None
    to = unit_spelling(entry["unit"])
    named = "%s (gram-force)" % to if (kind, to) == ("force", "g") else to
    return ("scale %g does not convert %s from %s to %s: that unit needs %.6g (1 %s = %.6g %s); %s; "
            "fix the scale or the unit" % (given, entry["source"], frm, named, needed, frm, needed, to,
                                          _slip(given, needed, kind, frm, to)))


def number_paths(node, prefix=""):
    """Every dotted path to a number in a parameter set (list items by index)."""
    if isinstance(node, dict):
        items = node.items()
    elif isinstance(node, list):
        items = ((str(i), v) for i, v in enumerate(node))
    else:
        return [prefix] if isinstance(node, (int, float)) and not isinstance(node, bool) else []
    out = []
    for key, value in items:
        out += number_paths(value, "%s.%s" % (prefix, key) if prefix else str(key))
    return out


def _missing_hint(params, source):
    """Why a map source is not in the set: the nearest number's path (a typo, difflib), else for
    a hover value on a set without one, how to get it."""
    import difflib

    near = difflib.get_close_matches(source, number_paths(params), 1, 0.8)
    if near:
        return "; did you mean %r?" % near[0]
    if source.startswith("hover.") and "hover" not in params:
        return " (this set has no hover values: fit with --vehicle to get them)"
    return ""


def export_settings(params, mapping, source_name="map", params_name=None):
    """Mapped settings, in map order, as dicts: name, value (int when decimals is 0, else
    float), unit, source, source_value, source_unit, scale, offset.

    params: validated parameter set; mapping: validated map dict; source_name, params_name: the
    two files as the messages name them. Raises InputError naming the map entry when a source is
    missing, not a number, or the result is out of bounds; naming the parameter set (params_name)
    when the map asks for hover values a set fitted without a vehicle does not have (the set is
    at fault, not the map: trial 9, finding 11).
    """
    out = []
    for i, entry in enumerate(mapping["settings"]):
        where = "%s: $.settings[%d] (%s)" % (source_name, i, entry["name"])
        value = lookup(params, entry["source"])
        if value is None and params_name is not None and entry["source"].startswith("hover.") \
                and "hover" not in params:
            raise InputError("%s: this parameter set has no hover values (it was fitted without "
                             "--vehicle), and the map's setting %s takes %s (%s: $.settings[%d]): fit "
                             "the sweep again with --vehicle, or give a --map without hover settings"
                             % (params_name, entry["name"], entry["source"], source_name, i))
        if value is None:
            raise InputError("%s: source %r is not in the parameter set%s"
                             % (where, entry["source"], _missing_hint(params, entry["source"])))
        if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value):
            raise InputError("%s: source %r is not a number" % (where, entry["source"]))
        raw = value * entry.get("scale", 1.0) + entry.get("offset", 0.0)
        decimals = entry.get("decimals", 6)
        result = int(round(raw)) if decimals == 0 else round(raw, decimals)
        lo, hi = entry.get("min"), entry.get("max")
        if (lo is not None and result < lo) or (hi is not None and result > hi):
            raise InputError("%s: value %s (from %s = %.6g) is outside the setting's bounds "
                             "[%s, %s]; refused, not clipped: check the map's scale and bounds or "
                             "the parameter set" % (where, result, entry["source"], value,
                                                    "-inf" if lo is None else "%g" % lo,
                                                    "inf" if hi is None else "%g" % hi))
        scale, offset = entry.get("scale", 1.0), entry.get("offset", 0.0)
        unit = entry.get("unit") or (source_unit(entry["source"]) if (scale, offset) == (1.0, 0.0)
                                     else "(unit not in map)")
        out.append({"name": entry["name"], "value": result, "unit": unit, "source": entry["source"],
                    "source_value": value, "source_unit": source_unit(entry["source"]),
                    "scale": scale, "offset": offset, "decimals": decimals})
    return out


def format_lines(settings, header=None):
    """liftcal's settings layout, newline-terminated: an optional ``#`` header line, then per
    setting ``name  value unit  <- source = source_value source_unit [x scale] [+ offset]``."""
    lines = ["# " + header] if header else []
    width = max([len(s["name"]) for s in settings] + [0])
    shown = ["%s %s" % (s["value"], s["unit"]) for s in settings]
    vwidth = max([len(v) for v in shown] + [0])
    for s, value in zip(settings, shown):
        how = ""
        if s["scale"] != 1.0:
            how += " x %g" % s["scale"]
        if s["offset"] != 0.0:
            how += " %s %g" % ("+" if s["offset"] > 0 else "-", abs(s["offset"]))
        lines.append("%-*s  %-*s  <- %s = %.6g %s%s" % (width, s["name"], vwidth, value, s["source"],
                                                      _shown_source(s), s["source_unit"], how))
    return "\n".join(lines) + "\n"


# a source value whose scaled size is below this share of the setting's last digit is float noise [-]
SOURCE_NOISE_SHARE = 1e-6
# ... and so is one below this in its own SI unit (no value of a parameter set is that small) [-]
SOURCE_NOISE_SI = 1e-12


def _noise(setting):
    """True when a setting's source value is the float noise of a fit that ended at its bound
    (new-user trial 11, finding 12: 'command_start = 1.26587e-24'): below SOURCE_NOISE_SI and,
    scaled, below SOURCE_NOISE_SHARE of the setting's last digit (10^-decimals). The value itself
    decides, so a scale can never make a real value look like 0 (new-user trial 13, finding 8)."""
    value = setting["source_value"]
    last_digit = 10.0 ** -setting.get("decimals", 6)
    return abs(value) < SOURCE_NOISE_SI and abs(value * setting["scale"]) < SOURCE_NOISE_SHARE * last_digit


def _shown_source(setting):
    """The source value of a setting as its provenance shows it: 0 for float noise (_noise), else itself."""
    return 0.0 if _noise(setting) else setting["source_value"]


def lost_value_notes(settings):
    """A note for each setting whose source value, not noise, is lost at the map's decimals: the
    scaled value rounds to zero (0.769 x 0.001 at 2 decimals is 0.00; new-user trial 13, finding 8),
    so the setting carries nothing of it. settings: export_settings' dicts."""
    out = []
    for s in settings:
        scaled = s["source_value"] * s["scale"]
        if scaled != 0.0 and not _noise(s) and round(scaled, s["decimals"]) == 0.0:
            out.append("%s: %s = %.6g %s x %g is %.3g, which rounds to 0 at %d decimal%s: the setting "
                       "carries none of the value; check the map's scale or give it more decimals"
                       % (s["name"], s["source"], s["source_value"], s["source_unit"], s["scale"], scaled,
                          s["decimals"], "" if s["decimals"] == 1 else "s"))
    return out


def as_mapping(settings):
    """The ``--json`` object: setting name -> exported value."""
    return {s["name"]: s["value"] for s in settings}
