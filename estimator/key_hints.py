"""The likely cause of an unknown key in a JSON file (a schema's additionalProperties error): the
key it misspells, the key it repeats, or where free words go.

A misspelt key is matched against the keys the object may still take; in a vehicle file, a value
written as text with its unit is matched against the keys that take such text first
(vehicle_units.UNIT_KEYS, handed in: "avionic_current": "600mA" -> avionics_current). A key counts as
repeating a key already given only when they share their first word or are nearly the same
('kv_rpm' beside 'kv_rpm_per_V'; not 'frame' beside 'name'). A key like no other, in an object
that takes free text ('notes'), is pointed there (new-user trial 14, finding 9).
"""

import difflib

CLOSE = 0.6  # difflib similarity above which two keys count as the same word misspelt
# words of the trade for a key that no spelling distance finds (new-user trial, session 23: a pack's
# "c_rating" got no hint; the README says "C-rating"): the word, squeezed (lower case, no '_', '-'
# or space), -> the key that takes it
TRADE_WORDS = {"crating": "max_discharge_C", "crate": "max_discharge_C", "dischargec": "max_discharge_C",
               "dischargerate": "max_discharge_C", "dischargerating": "max_discharge_C", "maxc": "max_discharge_C",
               "continuousc": "max_discharge_C"}
SAME = 0.8   # ... above which a key given beside another counts as the same key written twice


def _first_word(key):
    return key.lower().split("_", 1)[0]


def _with_unit(value):
    """True for a text that is not a bare number ("600mA")."""
    if not isinstance(value, str):
        return False
    try:
        float(value)
    except ValueError:
        return True
    return False


def unknown_key_hints(err, text_keys=None):
    """The hints for each unknown key of an additionalProperties error, as one "; ..." text or "";
    text_keys: {block ("" the top level): {short key: (key, kind)}} of the keys that take text with
    a unit (vehicle_units.UNIT_KEYS for a vehicle file), or None."""
    props = list(err.schema.get("properties", {}))
    given = [k for k in props if k in err.instance]
    free = [k for k in props if k not in err.instance]
    path = [p for p in err.absolute_path]
    block = path[0] if len(path) == 1 and isinstance(path[0], str) else "" if not path else None
    short = [s for s, (si, _) in ((text_keys or {}).get(block) or {}).items() if si in free and s not in err.instance]
    unknown = [k for k in err.instance if k not in props and isinstance(k, str)]
    hints, loose = [], False
    for key in unknown:
        close = difflib.get_close_matches(key, short, 1, CLOSE) if _with_unit(err.instance[key]) else []
        close = close or difflib.get_close_matches(key, free, 1, CLOSE)
        trade = TRADE_WORDS.get("".join(c for c in key.lower() if c not in "_- "))
        close = close or ([trade] if trade in free else [])
        if close:
            hints.append("did you mean %r%s?" % (close[0], " for %r" % key if len(unknown) > 1 else ""))
            continue
        close = [k for k in difflib.get_close_matches(key, given, 3, CLOSE)
                 if _first_word(k) == _first_word(key) or difflib.SequenceMatcher(None, key, k).ratio() >= SAME]
        if close:
            hints.append("%r repeats %r, which is already given: remove it" % (key, close[0]))
        elif "notes" in props and block == "":
            loose = True
    if loose:
        hints.append("free words belong in \"notes\" (a text liftcal ignores)")
    return ("; " + "; ".join(hints)) if hints else ""
