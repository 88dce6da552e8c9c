"""Text output that fits an 80-column terminal: long lines wrapped under their own text.

Only the human text goes through here (sheets, tables, fit summaries); ``--json`` output keeps
every string whole. A wrapped line continues under the text it belongs to:
- a bullet line (``! ``, ``- ``, ``* ``) continues under the text after the bullet;
- a label line (``motor current      8.4 A ...``: a label, then a run of two or more spaces
  within the first LABEL_COLUMNS columns) continues under the value;
- any other line continues under its own first character, two columns in.
Words are never broken, nor at their hyphens (``thrust-to-weight`` stays whole), and a number
stays on the line of the unit after it (``43.7 s``, ``0.958 kg/m^3``), so joining the pieces with
one space gives the original words back.
"""

import re
import textwrap

WIDTH = 79  # characters per line: an 80-column terminal without its last column [-]
LABEL_COLUMNS = 28  # a label's value starts within this many columns [-]
_BULLET = re.compile(r"^(\s*)([!\-*] )")
_LABEL = re.compile(r"^(\s*\S.*?\S\s{2,})\S")
# a number, one space, then a unit liftcal prints (SI and the trade's own): the space is held
# while wrapping (new-user trial 26: lines broke as "43.7" / "s" and "2229" / "m")
_UNITS = ("s", "ms", "min", "h", "Hz", "m", "mm", "cm", "km", "in", "ft", "m/s", "km/h", "V", "mV", "A", "mA",
          "Ah", "mAh", "Wh", "W", "kW", "N", "mN", "g", "gf", "kg", "kgf", "lbf", "lb", "oz", "C", "K", "Pa", "hPa",
          "kPa", "%", "permille", "rpm", "rpm/V", "ohm", "mohm", "kg/m^3", "g/W", "N/W", "W/kg", "us")
_NUMBER_UNIT = re.compile(r"(?<=\d) (?=(?:%s)(?![\w/^]))" % "|".join(
    re.escape(u) for u in sorted(_UNITS, key=len, reverse=True)))
_HELD = "\x00"


def hanging_indent(line):
    """The column where a wrapped ``line`` continues (module docstring), as a number of spaces."""
    bullet = _BULLET.match(line)
    if bullet:
        return len(bullet.group(0))
    label = _LABEL.match(line)
    if label and len(label.group(1)) <= LABEL_COLUMNS:
        return len(label.group(1))
    return len(line) - len(line.lstrip(" ")) + 2


def wrap_line(line, indent=None, width=WIDTH):
    """One line as a list of lines of at most ``width`` characters (a longer word stays whole).

    indent: columns of the continuation lines; default hanging_indent(line).
    """
    if len(line) <= width:
        return [line]
    lead = len(line) - len(line.lstrip(" "))
    indent = hanging_indent(line) if indent is None else indent
    if indent >= width // 2:  # too deep to hold much text: fall back to the line's own indent + 2
        indent = min(lead + 2, width // 2)
    held = _NUMBER_UNIT.sub(_HELD, line.strip(" "))
    pieces = textwrap.wrap(held, width=width, initial_indent=" " * lead, subsequent_indent=" " * indent,
                           break_long_words=False, break_on_hyphens=False, drop_whitespace=True)
    return [p.replace(_HELD, " ") for p in pieces] or [line]


def fit_width(text, width=WIDTH):
    """Every line of ``text`` wrapped by wrap_line; a final newline is kept."""
    end = "\n" if text.endswith("\n") else ""
    body = text[:-1] if end else text
    out = []
    for line in body.split("\n"):
        out.extend(wrap_line(line, width=width))
    return "\n".join(out) + end
