"""How liftcal prints a file name: on one line, control characters escaped.

A file name may hold any character but "/" and NUL: a line break, a carriage return or a
terminal escape in one would, printed raw, break a WARNING or error line in two or rewrite
the terminal. shown() is the one place a name is formatted for a person to read; FileName
(the type every file argument of the command line gets, estimator.commands.options.FILE_NAME)
formats itself through it, so every message that names a given file with ``%s`` or ``{}``
shows it so, while the file is still opened by its real name. JSON output keeps the real
name (JSON escapes control characters itself).
"""


def shown(name):
    """``name`` (a str or os.PathLike) as printed: as given when every character is printable,
    else Python's repr of it (quoted, ``\\n``, ``\\x1b``; Python language reference 2.4.1)."""
    text = str.__str__(name) if isinstance(name, str) else str(name)
    return text if text.isprintable() else repr(text)


class FileName(str):
    """A file name as the person gave it (the str value: what is opened) that prints itself
    through shown() (``"%s" % name``, ``"{}".format(name)``, ``str(name)``).

    Names derived from it (os.path.join, abspath) are plain str again: print those through
    shown() explicitly.
    """

    def __str__(self):
        return shown(self)

    def __format__(self, spec):
        return format(shown(self), spec)
