"""What an output replaces: one line naming the file liftcal replaces, and a parameter set of
another bench file or rotor replaced only when the person asks.

Design notes sec. 4: no user file is ever replaced without the user asking. estimator.outputs
already refuses every file liftcal did not write and every sealed file a person edited; the
files left are liftcal's own, untouched. Of those, a parameter set is the result of a bench
session (hours of work on a stand): a fit of the same bench file for the same rotor (again,
with --vehicle, another bench air...) may replace it, with a line that says so; a fit of
another bench file, or for another propeller diameter, replaces it only with ``--replace``.
Any other file liftcal replaces (a settings file, a figure) is named in one line too.

API: existing_set(path) -> the set's provenance summary or None; check_set_replacement(path,
params, replace, option) -> the "replaced ..." line or None (InputError when refused);
replaced_line(path, kind) -> the "replaced ..." line for a file about to be replaced, or None.
"""

import os

from estimator.names import shown
from estimator.errors import InputError

REPLACE_OPTION = "--replace"


def existing_set(path):
    """{input_file, input_sha256, diameter_m, created_utc} of the liftcal parameter set at
    ``path`` (read leniently: only for the words of a message), or None when there is none."""
    import json

    try:
        with open(path, "rb") as fh:
            doc = json.loads(fh.read().decode("utf-8-sig"))
    except (OSError, ValueError, RecursionError):
        return None
    if not isinstance(doc, dict):
        return None
    prov = doc.get("provenance") if isinstance(doc.get("provenance"), dict) else {}
    rotor = doc.get("rotor") if isinstance(doc.get("rotor"), dict) else {}
    vehicle = doc.get("vehicle") if isinstance(doc.get("vehicle"), dict) else None
    return {"input_file": prov.get("input_file"), "input_sha256": prov.get("input_sha256"),
            "diameter_m": rotor.get("diameter_m"), "created_utc": prov.get("created_utc"),
            "hover_for": (str(vehicle.get("name") or "a vehicle") if vehicle is not None and "hover" in doc
                          else None)}


def _dropped_hover(old, params):
    """'; the old set had hover values for NAME; this one has none (...)' when the replaced set had
    hover values and the new one has none, else '' (new-user trial 12, finding 11: a re-fit
    without --vehicle dropped them without a word, and the next firmware failed on $.vehicle)."""
    if not old.get("hover_for") or "hover" in params:
        return ""
    return ("; the old set had hover values for %s, this one has none (fit with --vehicle to keep them: "
            "firmware without --vehicle needs them)" % shown(old["hover_for"]))


def _set_words(info):
    """'the set fitted from bench1.csv (0.254 m propeller, 2026-12-02 14:05 UTC)'."""
    bits = []
    if isinstance(info.get("diameter_m"), (int, float)):
        bits.append("%.4g m propeller" % info["diameter_m"])
    created = info.get("created_utc")
    if isinstance(created, str) and len(created) >= 16:
        bits.append("%s %s UTC" % (created[:10], created[11:16]))
    return "the parameter set fitted from %s%s" % (shown(info.get("input_file") or "an unnamed bench file"),
                                                  " (%s)" % ", ".join(bits) if bits else "")


def _same_rotor(old_m, new_m):
    """True when two stored diameters [m] are the same rotor (equal to the 4 digits a set
    stores them with; a re-fit of one sweep gives the identical value)."""
    if not isinstance(old_m, (int, float)) or not isinstance(new_m, (int, float)):
        return False
    return abs(old_m - new_m) <= 5e-5 * max(abs(old_m), abs(new_m))


def check_set_replacement(path, params, replace=False, option="--out"):
    """Before writing the parameter set ``params`` at ``path`` (already passed by
    estimator.outputs.check_output): None when nothing is there; the line to print when a set
    is replaced; InputError when the set there came from another bench file (its SHA-256)
    or another propeller diameter and ``replace`` is not set."""
    if not os.path.lexists(path):
        return None
    old = existing_set(path)
    if old is None:
        return replaced_line(path, "params")
    prov, rotor = params.get("provenance", {}), params.get("rotor", {})
    differs = []
    if old.get("input_sha256") != prov.get("input_sha256"):
        differs.append("another bench file (%s%s)" % (
            prov.get("input_file"), ", same name, other content" if old.get("input_file") == prov.get("input_file")
            else ""))
    if not _same_rotor(old.get("diameter_m"), rotor.get("diameter_m")):
        differs.append("another propeller (%.4g m)" % rotor.get("diameter_m", float("nan")))
    if differs and not replace:
        raise InputError("%s %s: holds %s; this fit is of %s: liftcal does not replace a set of another "
                         "bench or rotor unless asked: name another path, or add %s to replace it"
                         % (option, path, _set_words(old), " and ".join(differs), REPLACE_OPTION))
    return "replaced %s: %s%s" % (path, _set_words(old), _dropped_hover(old, params))


def replaced_line(path, kind):
    """'replaced PATH: what it was' for a liftcal file about to be replaced at ``path``, or
    None when nothing is there (estimator.outputs.check_output has refused every other case)."""
    if not os.path.lexists(path):
        return None
    if kind == "params":
        old = existing_set(path)
        if old is not None:
            return "replaced %s: %s" % (path, _set_words(old))
    words = {"params": "a liftcal parameter set", "settings": "a settings file liftcal wrote",
             "png": "a figure liftcal drew"}.get(kind, "a file liftcal wrote")
    return "replaced %s: %s" % (path, words)
