"""Reading a JSON file strictly: what liftcal accepts as JSON and how it says what is wrong.

Accepted: UTF-8 text with or without a byte-order mark (UTF-16 and UTF-32 with a mark too),
at most MAX_BYTES, nested at most MAX_DEPTH levels. Refused with the file and the line and
column or the JSON path: malformed JSON; NaN, Infinity and numbers too large for a float
(1e999), which JSON itself does not allow; a key given twice in one object (JSON would keep
only the last silently), with both positions; text with an unpaired surrogate escape.
"""

import codecs
import json
import json.decoder
import json.scanner
import math

from estimator.errors import InputError, shorten
from estimator.safepath import MiB, read_limited, size_text
from estimator.seal import SETTINGS_MARK

# the largest JSON file read [bytes]: a parameter set is some kilobytes
MAX_BYTES = 16 * MiB
# the deepest nesting of arrays and objects [levels]: our files use 4
MAX_DEPTH = 64
# integers beyond this are no quantity of a multirotor (and no longer exact as floats) [-]
MAX_INT = 10 ** 15
# numbers of a magnitude outside these (other than 0) are no quantity liftcal reads in any
# unit: 5e-324 or 1e300 is a typo or a test of the reader, and would reach the models as a
# division by almost zero [-]
MAGNITUDE = (1e-100, 1e100)

_BOMS = ((codecs.BOM_UTF32_LE, "utf-32"), (codecs.BOM_UTF32_BE, "utf-32"),
         (codecs.BOM_UTF8, "utf-8-sig"), (codecs.BOM_UTF16_LE, "utf-16"),
         (codecs.BOM_UTF16_BE, "utf-16"))


class _Constant:
    """Stands in for NaN, Infinity or -Infinity while parsing, so the walk can name its path."""

    def __init__(self, text):
        self.text = text


class _Duplicate(Exception):
    pass


def _no_duplicates(pairs):
    seen = set()
    for key, _ in pairs:
        if key in seen:
            raise _Duplicate(key)
        seen.add(key)
    return dict(pairs)


# the first bytes of files a person may pass by mistake (the formats' own signatures)
_NOT_TEXT = ((b"\x89PNG\r\n\x1a\n", "a PNG image"), (b"\xff\xd8\xff", "a JPEG image"),
             (b"%PDF-", "a PDF document"), (b"PK\x03\x04", "a ZIP archive (or a spreadsheet)"),
             (b"\x1f\x8b", "a gzip archive"), (b"SQLite format 3\x00", "an SQLite database"))


def _looks_like_csv(text):
    """True when the text's first lines read as a CSV (a comment line, or cells with commas
    and no JSON brace) rather than JSON."""
    head = [line.strip() for line in text.splitlines()[:5] if line.strip()]
    return bool(head) and not head[0].startswith(("{", "[")) and (
        head[0].startswith("#") or "," in head[0])


def decode_text(data, path):
    """The text of a JSON file's bytes (BOM-aware); InputError on bytes that are not text."""
    for magic, kind in _NOT_TEXT:
        if data.startswith(magic):
            raise InputError("%s: is %s, not a JSON file; is it the right file?" % (path, kind))
    encoding = "utf-8"
    for bom, name in _BOMS:
        if data.startswith(bom):
            encoding = name
            break
    if encoding == "utf-8" and b"\x00" in data[:64]:
        raise InputError("%s: looks like UTF-16 or UTF-32 text without a byte-order mark; save the "
                         "file as UTF-8" % path)
    try:
        return data.decode(encoding)
    except UnicodeDecodeError as exc:
        line = data.count(b"\n", 0, exc.start) + 1
        raise InputError("%s: line %d: not %s text (byte %d); save the file as UTF-8"
                         % (path, line, "UTF-8" if encoding.startswith("utf-8") else encoding.upper(),
                            exc.start)) from None


def _trailing_comma(text, pos):
    """'; a trailing comma ...' when the error sits at a } or ] right after a comma (JSON, unlike
    JavaScript and Python, allows none: RFC 8259 sec. 4 and 5), else ''."""
    before = text[:pos].rstrip()
    if before.endswith(",") and text[pos:pos + 1] in ("}", "]"):
        line = text.count("\n", 0, len(before) - 1) + 1
        return ("; a trailing comma before the closing %s (line %d): remove that comma, JSON "
                "allows none" % (text[pos], line))
    return ""


def loads(text, path):
    """Parse JSON text strictly (module docstring); returns the document or raises InputError."""
    try:
        document = json.loads(text, parse_constant=_Constant, object_pairs_hook=_no_duplicates)
    except json.JSONDecodeError as exc:
        if text.lstrip("\ufeff").startswith(SETTINGS_MARK):
            raise InputError("%s: is a settings file that liftcal export wrote (lines for the flight "
                             "controller), not a JSON file; is it the right file? (the parameter set it "
                             "came from is the JSON that liftcal fit wrote)" % path) from None
        if not text.lstrip("\ufeff").strip():
            raise InputError("%s: the file is empty (or white space only); is it the right file, "
                             "or was it not saved?" % path) from None
        if _looks_like_csv(text):
            raise InputError("%s: looks like a CSV file (a bench sweep or a flight log?), not a JSON "
                             "file; is it the right file?" % path) from None
        raise InputError("%s: line %d column %d: malformed JSON (%s)%s%s"
                         % (path, exc.lineno, exc.colno, exc.msg, _near(text, exc.pos),
                            _trailing_comma(text, exc.pos))) from None
    except _Duplicate as exc:
        raise InputError(_duplicate_message(text, path, exc.args[0])) from None
    except RecursionError:
        raise InputError("%s: nested deeper than the %d levels liftcal reads (arrays or objects "
                         "inside one another); is it the right file?" % (path, MAX_DEPTH)) from None
    except ValueError:  # an integer of more than 4300 digits
        raise InputError("%s: a number of thousands of digits; is it the right file?" % path) from None
    check_values(document, path)
    return document


def load(path):
    """Read and parse a JSON file (module docstring); raises InputError."""
    return loads(decode_text(read_limited(path, "a JSON file", MAX_BYTES), path), path)


def _near(text, pos):
    """`` near '...'`` for a parse error past the first characters, else ""."""
    if pos is None or pos >= len(text):
        return ""
    return " near %s" % shorten(text[pos:pos + 30], 30)


def _where(parts):
    out = "$"
    if len(parts) > 12:  # a deep path: its start and its depth
        return _where(parts[:8]) + "...(%d levels)" % len(parts)
    for part in parts:
        out += "[%d]" % part if isinstance(part, int) else "." + str(part)
    return out


def check_values(document, path):
    """Walk the document without recursion: depth, NaN/Infinity, huge numbers, bad text.

    Raises InputError with the JSON path of the first value refused.
    """
    stack = [(document, ())]
    while stack:
        node, where = stack.pop()
        if len(where) > MAX_DEPTH:
            raise InputError("%s: %s: nested deeper than the %d levels liftcal reads; is it the "
                             "right file?" % (path, _where(where), MAX_DEPTH))
        if isinstance(node, dict):
            for key, value in node.items():
                _text(key, where, path)
                stack.append((value, where + (key,)))
        elif isinstance(node, list):
            for i, value in enumerate(node):
                if isinstance(value, (dict, list, str, _Constant, float)) or (
                        isinstance(value, int) and abs(value) > MAX_INT):
                    stack.append((value, where + (i,)))
        elif isinstance(node, _Constant):
            raise InputError("%s: %s: %s is not a number JSON allows (NaN and infinity are refused); "
                             "write a number, or leave the key out where it is optional"
                             % (path, _where(where), node.text))
        elif isinstance(node, float) and not math.isfinite(node):
            raise InputError("%s: %s: a number too large for liftcal to read (beyond 1e308); "
                             "write a number of a sensible size" % (path, _where(where)))
        elif isinstance(node, float) and node != 0.0 and not MAGNITUDE[0] <= abs(node) <= MAGNITUDE[1]:
            raise InputError("%s: %s: %g is far outside any quantity liftcal reads (magnitudes "
                             "%g..%g, or 0); a typo?" % (path, _where(where), node, MAGNITUDE[0],
                                                         MAGNITUDE[1]))
        elif isinstance(node, int) and not isinstance(node, bool) and abs(node) > MAX_INT:
            digits = str(abs(node))
            raise InputError("%s: %s: a whole number of %d digits (%s...) is larger than any "
                             "quantity liftcal reads (%g)" % (path, _where(where), len(digits),
                                                              digits[:8], MAX_INT))
        elif isinstance(node, str):
            _text(node, where, path)


def _text(value, where, path):
    try:
        value.encode("utf-8")
    except UnicodeEncodeError:
        raise InputError("%s: %s: text with an unpaired surrogate escape (such as \\ud800); "
                         "write the character itself" % (path, _where(where))) from None


def _duplicate_message(text, path, key):
    """The error line for a key given twice, with both positions (found by a slower scan)."""
    positions = _duplicate_positions(text)
    if positions is None:
        return "%s: key %s appears twice in one object; JSON keeps only one: remove the other" % (
            path, shorten(key))
    key, first, second = positions
    return ("%s: key %s appears twice in one object (line %d column %d and line %d column %d); "
            "JSON would keep only the second: remove one" % (path, shorten(key), first[0], first[1],
                                                             second[0], second[1]))


def _line_col(text, pos):
    line = text.count("\n", 0, pos) + 1
    return line, pos - (text.rfind("\n", 0, pos) + 1) + 1


class _Found(Exception):
    pass


def _duplicate_positions(text):
    """(key, (line, column) of the first, of the second) of the innermost duplicated key, by
    the pure-Python JSON scanner with an object parser that records where each key starts."""
    ws = json.decoder.WHITESPACE.match

    def parse_object(s_and_end, strict, scan_once, object_hook, object_pairs_hook, memo=None,
                     _w=ws):
        s, end = s_and_end
        keys, pos = {}, _w(s, end).end()
        if s[pos:pos + 1] == "}":
            return {}, pos + 1
        while True:
            pos = _w(s, pos).end()
            key_at = pos
            key, pos = json.decoder.scanstring(s, pos + 1, strict)
            if key in keys:
                raise _Found(key, _line_col(s, keys[key]), _line_col(s, key_at))
            keys[key] = key_at
            pos = _w(s, pos).end() + 1  # past ':'
            pos = _w(s, pos).end()
            _, pos = scan_once(s, pos)
            pos = _w(s, pos).end()
            if s[pos:pos + 1] == "}":
                return {}, pos + 1
            pos += 1  # past ','

    decoder = json.JSONDecoder()
    decoder.parse_object = parse_object
    decoder.parse_constant = _Constant
    decoder.scan_once = json.scanner.py_make_scanner(decoder)
    try:
        decoder.decode(text)
    except _Found as found:
        return found.args
    except (ValueError, RecursionError, IndexError):
        return None
    return None


def kind_of_null(expected):
    """Plain words for a ``null`` where ``expected`` ("object", "number" ...) belongs."""
    return "null (no value) where %s %s is expected" % ("an" if expected[:1] in "aeiou" else "a", expected)


__all__ = ["load", "loads", "decode_text", "check_values", "MAX_BYTES", "MAX_DEPTH", "size_text"]
