"""Text output that fits an 80-column terminal: long lines wrapped under their own text.

Only the human text goes through here (sheets, tables, fit summaries); ``--json`` output keeps
every string whole. A wrapped line continues under the text it belongs to:
- a bullet line (``! ``, ``- ``, ``* ``) continues under the text after the bullet;
- a label line (``motor current      8.4 A ...``: a label, then a run of two or more spaces
  within the first LABEL_COLUMNS columns) continues under the value;
- any other line continues under its own first character, two columns in.
Words are never broken, nor at their hyphens (``thrust-to-weight`` stays whole), so joining
the pieces with one space gives the original words back.
"""

import re
import textwrap

WIDTH = 79  # characters per line: an 80-column terminal without its last column [-]
LABEL_COLUMNS = 28  # a label's value starts within this many columns [-]
_BULLET = re.compile(r"^(\s*)([!\-*] )")
_LABEL = re.compile(r"^(\s*\S.*?\S\s{2,})\S")


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
    return textwrap.wrap(line.strip(" "), width=width, initial_indent=" " * lead,
                         subsequent_indent=" " * indent, break_long_words=False,
                         break_on_hyphens=False, drop_whitespace=True) or [line]


def fit_width(text, width=WIDTH):
    """Every line of ``text`` wrapped by wrap_line; a final newline is kept."""
    end = "\n" if text.endswith("\n") else ""
    body = text[:-1] if end else text
    out = []
    for line in body.split("\n"):
        out.extend(wrap_line(line, width=width))
    return "\n".join(out) + end
