"""Reading JSON files, validating them against our schemas, and writing files atomically."""

import json
import os
import re
import sys

from estimator.errors import InputError

SCHEMA_DIR = os.path.join(os.path.dirname(os.path.dirname(os.path.abspath(__file__))), "schemas")
if not os.path.isdir(SCHEMA_DIR):  # a non-editable install: the copy under <prefix>/share
    SCHEMA_DIR = os.path.join(sys.prefix, "share", "liftcal", "schemas")


def load_json(path):
    """Read a JSON file strictly (estimator.jsonread: BOM accepted; size, depth, NaN,
    Infinity and duplicate keys refused); raise InputError with the line and column or the
    JSON path on failure."""
    from estimator.jsonread import load

    document = load(path)
    if isinstance(document, dict) and str(document.get("model", "")).startswith("liftcal.settings/"):
        # the JSON twin of jsonread's settings-lines refusal (new-user trial 13, finding 9)
        raise InputError("%s: is a settings file that liftcal export wrote (a JSON document for the flight "
                         "controller); is it the right file? (the parameter set it came from is the JSON "
                         "that liftcal fit wrote)" % path)
    return document


def load_schema(name):
    """Load ``schemas/<name>`` shipped with the project."""
    with open(os.path.join(SCHEMA_DIR, name), "r", encoding="utf-8") as fh:
        return json.load(fh)


def json_path(error_path):
    """Render a jsonschema error path as ``$.a.b[0]``."""
    out = "$"
    for part in error_path:
        out += "[%d]" % part if isinstance(part, int) else "." + str(part)
    return out


def validate(document, schema_name, source, text_keys=None):
    """Validate ``document`` against ``schemas/<schema_name>`` (draft 2020-12); text_keys: the
    keys that also take text with a unit, {block: {short key: (key, kind)}} (key_hints).

    Raises InputError naming ``source`` and the JSON path of the first (deepest) problem,
    with the likely cause where one can be told from the document itself: a missing key
    next to an unknown key spelled like it (a typo), an unknown key spelled like an allowed
    one, a number outside its bounds that a unit slip (g for kg, mm for m, mAh for Ah, hPa
    for Pa ...) would bring inside.
    """
    import jsonschema  # imported here: keeps `liftcal --help` light

    schema = load_schema(schema_name)
    validator = jsonschema.Draft202012Validator(schema)
    errors = sorted(validator.iter_errors(document), key=lambda e: (len(list(e.absolute_path)), str(e.message)))
    if errors:
        err = errors[-1] if len(errors) == 1 else _best(errors)
        other = _other_kind(document, schema_name, schema) if not list(err.absolute_path) else None
        if other:
            raise InputError("%s: $: this is %s, not %s: wrong file for this place?" % (source, other[0], other[1]))
        foreign = _not_ours(document, schema) if not list(err.absolute_path) else None
        if foreign:
            raise InputError("%s: $: %s" % (source, foreign))
        raise InputError("%s: %s: %s%s" % (source, json_path(err.absolute_path), _message(err), _likely_cause(err, text_keys)))


def _message(err):
    """jsonschema's message in plain words, echoing at most a short piece of the value."""
    from estimator.errors import shorten

    value = err.instance
    if err.validator == "type":
        expected = err.validator_value
        expected = " or ".join(expected) if isinstance(expected, list) else str(expected)
        expected = {"object": "an object {...}", "array": "a list [...]", "number": "a number",
                    "integer": "a whole number", "string": "a text in quotes",
                    "boolean": "true or false"}.get(expected, expected)
        if value is None:
            return "null (no value) where %s is expected" % expected
        return "%s is %s, expected %s" % (_shown(value), _json_kind(value), expected)
    if err.validator == "const":
        return "%s is given where %s belongs" % (_shown(value), _shown(err.validator_value))
    if err.validator == "enum":
        return "%s is not one of %s" % (_shown(value), ", ".join(_shown(v) for v in err.validator_value[:12]))
    if err.validator == "additionalProperties" and isinstance(value, dict):
        allowed = list(err.schema.get("properties", {})) if isinstance(err.schema, dict) else []
        unknown = [k for k in value if k not in allowed]
        return "unknown key%s %s%s" % ("s" if len(unknown) > 1 else "", ", ".join(shorten(k) for k in unknown[:3]),
                                        " (and %d more)" % (len(unknown) - 3) if len(unknown) > 3 else "")
    if err.validator == "not" and isinstance(err.schema, dict) and err.schema.get("description"):
        return "%s is not allowed here: %s" % (json.dumps(value)[:40], err.schema["description"])  # map scale 0
    choice = _key_choice(err)
    if choice:
        return choice
    text = str(err.message)
    whole = repr(value)[:10001] if isinstance(value, (str, int, float)) or value is None else None
    if whole is not None and len(whole) > 60 and whole in text:
        text = text.replace(whole, shorten(value))
    if len(text) > 300:
        text = "%s (%s)" % (err.validator, shorten(value))
    return text


def _key_choice(err):
    """For an object that meets none of the schema's choices of keys (anyOf / oneOf whose
    branches each only require keys, e.g. the propeller's ct and cp, or pitch_m): which key
    of a half-given choice is missing and what the choices are, in words; else ""."""
    branches = err.validator_value if err.validator in ("anyOf", "oneOf") else None
    if not isinstance(err.instance, dict) or not isinstance(branches, list) or not branches \
            or not all(isinstance(b, dict) and set(b) == {"required"} for b in branches):
        return ""
    words = "; ".join(" and ".join(b["required"]) for b in branches)
    half = [(b["required"], [k for k in b["required"] if k not in err.instance]) for b in branches
            if any(k in err.instance for k in b["required"])]
    if half:
        keys, missing = half[0]
        given = [k for k in keys if k in err.instance]
        others = " or ".join(" and ".join(b["required"]) for b in branches if b["required"] != keys)
        return "%s given without %s: give both%s" % (
            " and ".join(given), " and ".join(missing), ", or %s instead" % others if others else "")
    return "needs one of: %s" % words


def _shown(value):
    """A value as it is written in JSON (true, null, 1.5, "text"), shortened."""
    from estimator.errors import shorten

    if value is None or isinstance(value, (bool, int, float)):
        return shorten(json.dumps(value))
    return shorten(value)


def _json_kind(value):
    if isinstance(value, bool):
        return "true/false"
    if isinstance(value, (int, float)):
        return "a number"
    if isinstance(value, str):
        return "a text"
    if isinstance(value, list):
        return "a list"
    if isinstance(value, dict):
        return "an object"
    return type(value).__name__


def _other_kind(document, schema_name, schema):
    """(what the document is, what was expected) when it is valid under another of our schemas,
    or has that schema's top-level keys (all required ones, no others): e.g. a vehicle file
    with its values still in text units, given where a parameter set belongs."""
    import glob

    import jsonschema

    if not isinstance(document, dict):
        return None
    def bases(names):  # mass_kg and mass alike: a vehicle file may give "mass": "1050g"
        return {str(k).split("_")[0] for k in names}

    keys = bases(document)
    for path in sorted(glob.glob(os.path.join(SCHEMA_DIR, "*.schema.json"))):
        if os.path.basename(path) == schema_name:
            continue
        with open(path, "r", encoding="utf-8") as fh:
            other = json.load(fh)
        required, allowed = bases(other.get("required", ())), bases(other.get("properties", {}))
        same_shape = bool(required) and required <= keys and keys <= allowed
        if same_shape or jsonschema.Draft202012Validator(other).is_valid(document):
            return ("%s (schemas/%s)" % (_kind_name(other), os.path.basename(path)), _kind_name(schema))
    return None


def _not_ours(document, schema):
    """'not a liftcal parameter set (no "model": ...)' for an object without the schema's model
    key that holds at most half of the schema's required keys (someone's own notes, another
    program's file), else None."""
    const = ((schema.get("properties") or {}).get("model") or {}).get("const")
    required = schema.get("required") or []
    if not isinstance(document, dict) or const is None or "model" in document or not required:
        return None
    if sum(1 for key in required if key in document) * 2 > len(required):
        return None
    return ("not %s: it has no \"model\": \"%s\" and none of its blocks; wrong file for this place?"
            % (_kind_name(schema).replace("a ", "a liftcal ", 1).replace("an ", "a liftcal ", 1), const)
            if not any(key in document for key in required) else
            "not %s: it has no \"model\": \"%s\" and lacks %s; wrong file for this place?"
            % (_kind_name(schema).replace("a ", "a liftcal ", 1).replace("an ", "a liftcal ", 1), const,
               ", ".join(key for key in required if key not in document)[:200]))


def _kind_name(schema):
    """'a parameter set' from the title 'liftcal parameter set (model liftcal.rotor/1)'."""
    name = str(schema.get("title", "document")).replace("liftcal ", "", 1).split(" (")[0]
    return ("an " if name[:1] in "aeiou" else "a ") + name


def _best(errors):
    from jsonschema.exceptions import best_match
    return best_match(errors)


# unit named by the end of a key (``mass_kg``) -> (kind in estimator.units, slips to try in
# order); keys starting with "altitude" are heights (ft, km), not lengths (mm, in)
_KEY_UNITS = {
    "kg": ("mass", ("g", "lb")), "m": ("length", ("mm", "cm", "in")), "Ah": ("capacity", ("mAh",)),
    "V": ("voltage", ("mV",)), "A": ("current", ("mA",)), "W": ("power", ("mW", "kW")),
    "N": ("force", ("g", "kgf", "lbf")), "Pa": ("pressure", ("hPa", "kPa", "bar")),
    "C": ("temperature", ("K", "F")), "ohm": ("resistance", ("mohm",)),
}
_CLOSE = 0.6  # difflib similarity above which two keys count as the same word misspelt


def _unknown_keys(err):
    """Keys of the failing object that its schema does not name (None when it names none)."""
    props = err.schema.get("properties") if isinstance(err.schema, dict) else None
    if not isinstance(err.instance, dict) or props is None:
        return None
    return [k for k in err.instance if k not in props]


def _likely_cause(err, text_keys=None):
    """A short "; did you mean ..." for a schema error, or ""."""
    import difflib

    if err.validator == "required" and isinstance(err.instance, dict):
        unknown = _unknown_keys(err) or []
        for key in err.validator_value:
            if key not in err.instance:
                close = difflib.get_close_matches(key, unknown, 1, _CLOSE)
                if close:
                    return "; the file has %r where %r is expected: a typo?" % (close[0], key)
                short = [k for k in unknown if isinstance(k, str) and key.lower().startswith(k.lower() + "_")]
                if short:  # "kv" for "kv_rpm_per_V": the key's name without its unit
                    return "; the file has %r: did you mean %r? (the key names its unit)" % (short[0], key)
        return ""
    if err.validator == "additionalProperties" and isinstance(err.instance, dict):
        from estimator.key_hints import unknown_key_hints
        return unknown_key_hints(err, text_keys)
    if err.validator in ("maximum", "exclusiveMaximum", "minimum", "exclusiveMinimum"):
        path = list(err.absolute_path)
        key = path[-1] if path and isinstance(path[-1], str) else ""
        unit = key.rsplit("_", 1)[-1] if "_" in key else ""
        if unit not in _KEY_UNITS or isinstance(err.instance, bool) or "per" in key.split("_")[1:-1]:
            return ""  # kv_rpm_per_V is in rpm/V: a voltage's mV slip means nothing there
        kind, slips = _KEY_UNITS[unit]
        if key.startswith("altitude"):
            kind, slips = "altitude", ("ft", "km")
        slip = unit_slip(err.instance, kind, slips, err.schema)
        if slip is None:
            return ""
        # "given in in" reads as a typo: the inch is named in words there
        return "; given in %s instead of %s? %g %s = %.4g %s" % ("inches" if slip[0] == "in" else slip[0], unit,
                                                                err.instance, slip[0], slip[1], unit)
    if err.validator == "type" and isinstance(err.instance, str) and "number" in str(err.validator_value):
        return _text_for_number(err)
    if err.validator == "type" and isinstance(err.instance, str) and "integer" in str(err.validator_value):
        import re

        whole = re.match(r"^\s*(\d+)\s*[A-Za-z]?\s*$", err.instance)  # "6S", "4 s", "6"
        if whole:
            return "; write %d (a plain whole number, without quotes)" % int(whole.group(1))
        sp = re.match(r"^\s*(\d+)\s*[sS]\s*(\d+)\s*[pP]\s*$", err.instance)  # "4S2P" (trial 12, finding 14)
        if sp:
            return ("; a %sS%sP pack: write the cells in series, %s, and the paralleled pack's capacity "
                    "under capacity (%s x one cell's)" % (sp.group(1), sp.group(2), sp.group(1), sp.group(2)))
    return ""


def _text_for_number(err):
    """Hint for a number written as text with a unit ("850g"): the key names the unit."""
    from estimator.units import parse_quantity

    path = list(err.absolute_path)
    key = path[-1] if path and isinstance(path[-1], str) else ""
    parts = key.split("_")
    comma = re.match(r"^\s*([-+]?\d+),(\d+)\s*$", str(err.instance))
    if comma and len(comma.group(2)) == 3:  # "3,800": a thousands separator or a decimal comma
        return "; write %s%s (a thousands separator) or %s.%s (a decimal comma), a plain number without " \
            "quotes" % (comma.group(1), comma.group(2), comma.group(1), comma.group(2))
    if comma:  # "3800,5": a decimal comma (common in many locales); JSON numbers take a point
        return "; write %s.%s, a plain number with a decimal point, without quotes" % comma.groups()
    if "per" in parts[1:-1]:  # a compound unit in the key: kv_rpm_per_V is in rpm/V
        at = parts.index("per", 1)
        unit = "%s/%s" % (parts[at - 1], "_".join(parts[at + 1:]))
        number = re.match(r"\s*([-+]?(?:\d+\.?\d*|\.\d+))", str(err.instance))
        return "; write %s a plain number in %s, without quotes (the key name gives the unit)" % (
            "%s," % number.group(1) if number else "", unit)
    unit = key.rsplit("_", 1)[-1] if "_" in key else ""
    if unit not in _KEY_UNITS:
        return "; write a plain number, without quotes"
    kind = "altitude" if key.startswith("altitude") else _KEY_UNITS[unit][0]
    try:
        value = parse_quantity(err.instance, kind)
    except (InputError, KeyError):
        return "; write a plain number in %s, without quotes (the key name gives the unit)" % unit
    # parse_quantity returns the SI unit, which is the unit every key suffix of ours names
    return "; numbers in the file are plain, in the unit the key names (%s): write %.6g" % (unit, value)


def bounds_of(schema):
    """(lo, lo_open, hi, hi_open) of a number schema; None for a side without a bound."""
    lo, lo_open = schema.get("minimum"), False
    if "exclusiveMinimum" in schema:
        lo, lo_open = schema["exclusiveMinimum"], True
    hi, hi_open = schema.get("maximum"), False
    if "exclusiveMaximum" in schema:
        hi, hi_open = schema["exclusiveMaximum"], True
    return lo, lo_open, hi, hi_open


def within(value, schema):
    """True when ``value`` satisfies the bounds of a number schema."""
    lo, lo_open, hi, hi_open = bounds_of(schema)
    if lo is not None and (value <= lo if lo_open else value < lo):
        return False
    if hi is not None and (value >= hi if hi_open else value > hi):
        return False
    return True


def unit_slip(value, kind, slips, schema):
    """The likeliest unit slip behind a number outside a number schema's bounds.

    value: the number as given (read in the schema's unit); kind: an estimator.units kind
    ("mass", "length", ...); slips: unit suffixes of that kind to try; schema: the number's
    schema (bounds, optional "examples" with a typical value). Returns (suffix, value in
    the schema's unit) for the slip that brings the number inside the bounds and nearest
    the typical value (else the middle of the bounds), or None when no slip does.
    """
    import math

    from estimator.units import parse_quantity

    if not isinstance(value, (int, float)) or not math.isfinite(value) or value == 0:
        return None
    lo, _, hi, _ = bounds_of(schema)
    typical = (schema.get("examples") or [None])[0]
    linear = kind == "temperature"  # an offset scale: compare differences, not ratios
    if typical is None and lo is not None and hi is not None:
        typical = 0.5 * (lo + hi) if linear else math.sqrt(max(lo, hi * 1e-3) * hi)
    best = None
    for suffix in slips:
        si = parse_quantity("%r%s" % (float(value), suffix), kind)
        if not within(si, schema):
            continue
        if typical is None:
            score = 0.0
        elif linear:
            score = abs(si - typical)
        else:
            score = abs(math.log(si / typical)) if si > 0 and typical > 0 else float("inf")
        if best is None or score < best[0]:
            best = (score, suffix, si)
    return None if best is None else (best[1], best[2])


def write_atomic(path, text, kind=None):
    """Write ``text`` to ``path`` through a temporary file and a rename: never a partial file.

    kind: what is written ("params", "settings"; estimator.outputs), so that only a file
    liftcal wrote of that kind is replaced; None: ``path`` must not exist yet (a file in a
    folder being built). Raises InputError on a refused path or a failed write.
    """
    from estimator.outputs import write_text

    write_text(path, text, kind)


def save_figure_atomic(fig, path, dpi=110):
    """Save a matplotlib figure as PNG at ``path`` atomically (estimator.outputs.save_figure)."""
    from estimator.outputs import save_figure

    save_figure(fig, path, dpi)


def write_json_atomic(path, document, kind=None):
    """Write a JSON document atomically with a stable, readable layout (as write_atomic);
    one liftcal would refuse to read back (jsonread.check_values) is refused instead."""
    from estimator.outputs import write_json

    write_json(path, document, kind)


def dumps(document):
    """The one-object JSON that every ``--json`` command prints."""
    return json.dumps(document, indent=2, allow_nan=False)
