"""Safe paths: which inputs liftcal reads and which outputs it may write.

Inputs (check_input): a regular file below a size limit; a folder, a device (an endless
``/dev/zero``), a pipe or a socket is refused with one clear line, never hung on.

Outputs (check_output, check_folder): liftcal never replaces a file it did not write
(design notes sec. 4). See estimator/outputs.py for the marks that tell liftcal's files.
"""

import os
import stat

from estimator.errors import InputError

MiB = 1 << 20


def size_text(n_bytes):
    """``16 MiB`` / ``512 KiB`` / ``900 bytes``: a size as a person reads it."""
    if n_bytes >= MiB and n_bytes % MiB == 0:
        return "%d MiB" % (n_bytes // MiB)
    if n_bytes >= MiB:
        return "%.1f MiB" % (n_bytes / MiB)
    if n_bytes >= 1024:
        return "%d KiB" % (n_bytes // 1024)
    return "%d bytes" % n_bytes


def check_input(path, expected, limit_bytes):
    """Refuse an input path that is not a readable regular file of at most ``limit_bytes``.

    path: the path as the person gave it; expected: what it should be, for the message
    ("a JSON file", "a bench CSV"); limit_bytes: the largest file read [bytes]. Returns the
    os.stat result. Raises InputError naming the path and the cause.
    """
    path = os.fspath(path)
    if not path:
        raise InputError("an empty file name was given where %s belongs" % expected)
    try:
        st = os.stat(path)
    except FileNotFoundError:
        raise InputError("%s: no such file" % path) from None
    except NotADirectoryError:
        raise InputError("%s: no such file (a part of the path is a file, not a folder)" % path) from None
    except PermissionError:
        raise InputError("%s: cannot read (permission denied)" % path) from None
    except (OSError, ValueError) as exc:
        raise InputError("%s: cannot read (%s)" % (path, getattr(exc, "strerror", None) or exc)) from None
    if stat.S_ISDIR(st.st_mode):
        raise InputError("%s: is a folder, expected %s" % (path, expected))
    if not stat.S_ISREG(st.st_mode):
        raise InputError("%s: is %s, not a regular file; expected %s (save the data to a file first)"
                         % (path, special_kind(st.st_mode), expected))
    if st.st_size > limit_bytes:
        raise InputError("%s: is %s, above the %s liftcal reads as %s; is it the right file?"
                         % (path, size_text(st.st_size), size_text(limit_bytes), expected))
    return st


def special_kind(mode):
    """'a device', 'a pipe (FIFO)', 'a socket' ... for a file mode that is not a regular file."""
    if stat.S_ISCHR(mode) or stat.S_ISBLK(mode):
        return "a device"
    if stat.S_ISFIFO(mode):
        return "a pipe (FIFO)"
    if stat.S_ISSOCK(mode):
        return "a socket"
    if stat.S_ISDIR(mode):
        return "a folder"
    return "a special file"


def open_checked(path, expected, limit_bytes):
    """check_input, then open the file in binary mode; returns the open file."""
    check_input(path, expected, limit_bytes)
    try:
        return open(path, "rb")
    except OSError as exc:
        raise InputError("%s: cannot read (%s)" % (path, exc.strerror or exc)) from None


def read_limited(path, expected, limit_bytes):
    """The bytes of an input file, refusing one that grows past ``limit_bytes`` while read."""
    with open_checked(path, expected, limit_bytes) as fh:
        try:
            data = fh.read(limit_bytes + 1)
        except OSError as exc:
            raise InputError("%s: cannot read (%s)" % (path, exc.strerror or exc)) from None
    if len(data) > limit_bytes:
        raise InputError("%s: is larger than the %s liftcal reads as %s"
                         % (path, size_text(limit_bytes), expected))
    return data
