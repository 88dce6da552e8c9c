"""A content seal in the text files liftcal writes, so that a later run can tell an edited file.

Design notes sec. 4: a file that may hold a person's edits is never replaced. Files of the
kinds "params" and "settings" carry the SHA-256 (FIPS 180-4, Python's hashlib) of their own
text taken with the seal's 64 hex digits set to 0:
  JSON (parameter set, settings as JSON): the first key, "content_sha256": "<64 hex>";
  settings lines: the last line, "# content sha256: <64 hex>".
Any change after liftcal wrote the file (a value, a space, a line ending, a byte-order mark)
breaks the seal; estimator.outputs then refuses to replace the file.
"""

import hashlib
import re

SEAL_KEY = "content_sha256"
SETTINGS_MARK = "# liftcal settings"  # the first line of the settings lines liftcal export writes
_ZERO = "0" * 64
_JSON_SEAL = re.compile(r'\A\{\s*"content_sha256": "([0-9a-f]{64})"')
_LINE_SEAL = re.compile(r'\n# content sha256: ([0-9a-f]{64})\s*\Z')
_ANY_LINE_SEAL = re.compile(r'(?m)^# content sha256: [0-9a-f]{64}\s*$')


def _digest(text):
    return hashlib.sha256(text.encode("utf-8")).hexdigest()


def seal_text(text):
    """``text`` with its seal added (module docstring); a JSON object with no keys or text
    that is neither a JSON object nor lines is returned unchanged."""
    if text.startswith("{"):
        rest = text[1:]
        if rest.lstrip().startswith("}"):
            return text
        body = '{\n  "%s": "%s",%s' % (SEAL_KEY, _ZERO, rest if rest.startswith("\n") else " " + rest)
    else:
        body = (text if text.endswith("\n") else text + "\n") + "# content sha256: %s\n" % _ZERO
    return seal_state(body)[1]


def seal_state(text):
    """(state, sealed text) of ``text``: state "intact" when its seal matches, "broken" when
    the text changed after sealing, None when it carries no seal. The sealed text is ``text``
    with the seal filled in (for a text carrying a zero seal: how seal_text fills it)."""
    match = _JSON_SEAL.match(text) or _LINE_SEAL.search(text)
    if match is None:
        if _ANY_LINE_SEAL.search(text):
            return "broken", text                 # lines added after the seal line
        return None, text
    start, end = match.span(1)
    digest = _digest(text[:start] + _ZERO + text[end:])
    state = "intact" if match.group(1) == digest else "broken"
    return state, text[:start] + digest + text[end:]
