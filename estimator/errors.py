"""The one exception type the command line turns into a single ``error:`` line (exit 2)."""


class InputError(Exception):
    """Bad input from a person or a file.

    The message names the file, row/column or JSON path and the likely cause.
    The command line prints ``error: <message>`` on stderr and exits with code 2.
    """


# the longest piece of a person's input echoed into an error line [characters]
ECHO_LIMIT = 40


def shorten(value, limit=ECHO_LIMIT):
    """``repr`` of ``value`` cut to about ``limit`` characters, saying how long it was.

    Error lines echo what was given so the person can find it, never a whole document:
    ``'aaaaaaaa...' (5000000 characters)``. Non-text values are shown by their repr, cut
    the same way (``[1, 2, 3, ...] (a list of 100000 items)``).
    """
    if isinstance(value, (bytes, bytearray)):
        value = value.decode("utf-8", "replace")
    if isinstance(value, str):
        if len(value) <= limit:
            return repr(value)
        return "%s... (%d characters)" % (repr(value[:limit])[:-1], len(value))
    if isinstance(value, (list, dict)):
        kind = "a list of %d items" % len(value) if isinstance(value, list) else \
            "an object of %d keys" % len(value)
        text = _brief_repr(value, limit)
        return text if len(text) <= limit else "%s... (%s)" % (text[:limit], kind)
    text = repr(value)
    return text if len(text) <= limit else "%s... (%d characters)" % (text[:limit], len(text))


def _brief_repr(value, limit):
    """repr of a list or dict without building the whole text of a huge or deep one."""
    if isinstance(value, list):
        parts, size = [], 1
        for item in value:
            piece = _brief_repr(item, limit) if isinstance(item, (list, dict)) else repr(item)[:limit + 1]
            parts.append(piece)
            size += len(piece) + 2
            if size > limit:
                break
        return "[" + ", ".join(parts) + ("]" if len(parts) == len(value) else "")
    if isinstance(value, dict):
        parts, size = [], 1
        for key, item in value.items():
            piece = "%r: %s" % (str(key)[:limit], _brief_repr(item, limit) if isinstance(item, (list, dict))
                                else repr(item)[:limit + 1])
            parts.append(piece)
            size += len(piece) + 2
            if size > limit:
                break
        return "{" + ", ".join(parts) + ("}" if len(parts) == len(value) else "")
    return repr(value)[:limit + 1]
