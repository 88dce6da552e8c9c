"""Export a parameter set through a user mapping (``schemas/map.schema.json``, ``liftcal.map/1``).

Each mapped setting is round(value * scale + offset, decimals) for a number found at a
dotted path of the parameter set. A value outside the setting's [min, max] is refused,
never clipped: a clipped hover command or curve would fly differently from the fit.
"""

import math
import os

from estimator.errors import InputError
from estimator.jsonio import load_json, validate

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


def export_settings(params, mapping, source_name="map"):
    """Mapped settings as a list of (name, value) with value an int (decimals 0) or a float.

    params: validated parameter set; mapping: validated map dict. Raises InputError naming
    the map entry when a source is missing, not a number, or the result is out of bounds.
    """
    out = []
    for i, entry in enumerate(mapping["settings"]):
        where = "%s: $.settings[%d] (%s)" % (source_name, i, entry["name"])
        value = lookup(params, entry["source"])
        if value is None:
            hint = " (fit with --vehicle to get hover values)" if entry["source"].startswith("hover.") else ""
            raise InputError("%s: source %r is not in the parameter set%s" % (where, entry["source"], hint))
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
        out.append((entry["name"], result))
    return out


def format_lines(settings):
    """``name value`` lines, one per setting, newline-terminated."""
    return "".join("%s %s\n" % (name, value) for name, value in settings)
