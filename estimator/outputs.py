"""Where liftcal may write, and writing there without ever losing a person's file.

Design notes sec. 4: a file liftcal did not write is never replaced. An output path is
refused (one InputError naming the path, saying another path can be named) when it is one
of the command's inputs, a folder, a device or other special file, a symbolic link, an
existing file liftcal did not write, or a file liftcal wrote of another kind.

How liftcal knows its own files (marks written into every file it writes):
  kind "params"    JSON parameter set: "model": "liftcal.rotor/..." and provenance.tool_version
  kind "settings"  export file: first line "# liftcal settings ..." or JSON with
                   "model": "liftcal.settings/..."
                   (both kinds also carry a content seal, estimator.seal: a file edited after
                   liftcal wrote it, or one without a seal, is treated as the person's)
  kind "png"       PNG figure whose tEXt "Software" chunk starts with "liftcal"; its tEXt
                   "liftcal-drawn-at" chunk holds the SHA-256 of the path liftcal drew it at
                   (FIGURE_PATH_KEY): a figure is replaced only there, never as a copy or a
                   renamed file a person kept (new-user trial 9, finding 10)
  folders          (board bundle, demo): estimator.folders

Writes go to a temporary file in the target folder, then os.replace: never a partial file;
any failure (permission, full disk, missing folder) is one InputError and the temporary file
is removed.

API: check_output(path, kind, inputs, option) -> absolute path; check_outputs(list of
(path, kind, option), inputs); write_text(path, text, kind), write_json(path, document, kind),
save_figure(fig, path); own_file(path); file_sha256(path);
write_error(path, exc) -> InputError for an OSError met while writing.
"""

import hashlib
import json
import os
import stat
import tempfile

from estimator.names import shown
from estimator import __version__
from estimator.errors import InputError
from estimator.safepath import special_kind
from estimator.seal import SETTINGS_MARK  # noqa: F401 (used here and by the export command)

SOFTWARE = "liftcal %s" % __version__
KIND_NAMES = {"params": "a liftcal parameter set", "settings": "a liftcal settings file",
              "png": "a liftcal figure (PNG)", "bundle": "a liftcal board bundle",
              "demo": "a liftcal demo folder"}
# kinds whose files carry a content seal (estimator.seal): an edited one is never replaced
SEALED_KINDS = ("params", "settings")
_PNG_SIGNATURE = b"\x89PNG\r\n\x1a\n"
# the PNG tEXt keyword of the drawn-at mark (module docstring)
FIGURE_PATH_KEY = "liftcal-drawn-at"
_ANOTHER = "name another path"


def write_error(path, exc):
    """InputError for an OSError met while writing ``path``: one line, the cause in words."""
    import errno

    why = {errno.ENOSPC: "the disk is full", errno.EDQUOT: "the disk quota is used up",
           errno.EFBIG: "the file is larger than this system allows",
           errno.EROFS: "the file system is read-only", errno.EACCES: "permission denied",
           errno.EPERM: "not permitted", errno.ENOENT: "the folder does not exist",
           errno.ENOTDIR: "a part of the path is a file, not a folder"}.get(
        getattr(exc, "errno", None), getattr(exc, "strerror", None) or str(exc))
    if getattr(exc, "errno", None) == errno.ENOENT and os.path.isdir(os.path.dirname(os.path.abspath(path))):
        why = "the folder exists but takes no new files: a system folder such as /proc or /sys?"
    return InputError("%s: cannot write (%s); nothing was written: %s" % (shown(path), why, _ANOTHER))


def _lstat(path, where):
    try:
        return os.lstat(path)
    except FileNotFoundError:
        return None
    except NotADirectoryError:
        raise InputError("%s: a part of the path is a file, not a folder: %s" % (where, _ANOTHER)) from None
    except OSError as exc:
        raise InputError("%s: cannot look at this path (%s): %s" % (where, exc.strerror, _ANOTHER)) from None


def _same_as_input(path, inputs):
    for given in inputs:
        if given is None:
            continue
        try:
            if os.path.samefile(path, given):
                return given
        except (OSError, ValueError):
            if os.path.realpath(path) == os.path.realpath(os.fspath(given)):
                return given
    return None


def file_kind(path):
    """The kind of liftcal file at ``path`` by its mark (module docstring), or None."""
    try:
        with open(path, "rb") as fh:
            head = fh.read(1 << 16)
            if head.startswith(_PNG_SIGNATURE):
                return "png" if _png_software(head).startswith("liftcal") else None
            text_head = head.lstrip(b"\xef\xbb\xbf")
            if text_head.startswith(SETTINGS_MARK.encode()):
                return "settings"
            if text_head.lstrip()[:1] != b"{":
                return None
            from estimator.jsonread import MAX_BYTES

            data = head + fh.read(MAX_BYTES)
    except OSError:
        return None
    try:
        doc = json.loads(data.decode("utf-8-sig"))
    except (ValueError, RecursionError):
        return None
    if not isinstance(doc, dict):
        return None
    model = str(doc.get("model", ""))
    if model.startswith("liftcal.rotor/") and isinstance(doc.get("provenance"), dict) \
            and "tool_version" in doc["provenance"]:
        return "params"
    if model.startswith("liftcal.settings/"):
        return "settings"
    return None


def _png_software(head):
    """The tEXt "Software" value among the PNG chunks before the image data, or ""."""
    return _png_text(head, "Software")


def _png_text(head, keyword):
    """The tEXt value of ``keyword`` among the PNG chunks before the image data, or ""."""
    import struct

    key = keyword.encode("latin-1") + b"\0"
    pos = len(_PNG_SIGNATURE)
    while pos + 8 <= len(head):
        length, ctype = struct.unpack(">I4s", head[pos:pos + 8])
        body = head[pos + 8:pos + 8 + length]
        if ctype == b"IDAT" or len(body) < length:
            break
        if ctype == b"tEXt" and body.startswith(key):
            return body[len(key):].decode("latin-1")
        pos += 12 + length
    return ""


def figure_path_mark(path):
    """The drawn-at mark of a figure written at ``path``: "sha256:" and the SHA-256 of its
    absolute, link-free path (the path itself stays out of a figure a person may share)."""
    full = os.path.realpath(os.path.abspath(os.fspath(path)))
    return "sha256:" + hashlib.sha256(os.fsencode(full)).hexdigest()


def _check_figure_place(path, where):
    """Refuse a liftcal figure that was not drawn at ``path``: a copy or a renamed figure a
    person kept, or one an older liftcal drew without the mark (FIGURE_PATH_KEY)."""
    try:
        with open(path, "rb") as fh:
            mark = _png_text(fh.read(1 << 16), FIGURE_PATH_KEY)
    except OSError:
        mark = ""
    if mark == figure_path_mark(path):
        return
    why = ("liftcal drew it under another name or in another folder: a copy or a renamed figure someone "
           "kept" if mark else "it carries no record of where liftcal drew it (an older liftcal drew it)")
    raise InputError("%s: a figure liftcal drew, but %s; liftcal replaces a figure only at the path it "
                     "drew it at: %s (or move that file away)" % (where, why, _ANOTHER))


def _suffix_refusal(path, kind, where):
    """The InputError for an output name whose ending says another format than ``kind`` writes
    (a figure is PNG; a parameter set is JSON: "params_out.csv" would hold JSON under a name that
    reads as a bench sweep or a flight log, trial 9, finding 12), or None."""
    name = path.lower()
    if kind == "png" and not name.endswith(".png"):
        return InputError("%s: liftcal draws figures as PNG only; name a file ending in .png" % where)
    if kind == "params" and not name.endswith(".json"):
        ending = os.path.splitext(name)[1]
        why = {".csv": " (a .csv name reads as a bench sweep or a flight log)", "": ""}.get(
            ending, " (a %s name reads as another kind of file)" % ending)
        return InputError("%s: a parameter set is a JSON file%s; name a file ending in .json (e.g. params.json)"
                          % (where, why))
    return None


def check_output(path, kind, inputs=(), option="--out"):
    """Refuse an output file path liftcal must not write (module docstring); return it absolute.

    path: the path given; kind: what will be written ("params", "settings", "png"; None for
    a file in a folder liftcal is building, which must not exist yet);
    inputs: the command's input paths; option: the option that gave the path, for the message.
    """
    if path is None or os.fspath(path) == "":
        raise InputError("%s: an empty path was given; name a file to write" % option)
    path = os.fspath(path)
    where = "%s %s" % (option, path)
    if path.endswith(os.sep) or os.path.basename(path) in ("", ".", ".."):
        raise InputError("%s: is a folder; give a file name for the output" % where)
    directory = os.path.dirname(os.path.abspath(path))
    st_dir = _lstat(directory, where)
    if st_dir is None:
        raise InputError("%s: folder %s does not exist; create it first or %s"
                         % (where, shown(directory), _ANOTHER))
    if not os.path.isdir(directory):
        raise InputError("%s: %s is a file, not a folder: %s" % (where, shown(directory), _ANOTHER))
    st = _lstat(path, where)
    wrong_suffix = _suffix_refusal(path, kind, where)
    if st is None:
        if wrong_suffix:
            raise wrong_suffix
        return os.path.abspath(path)
    png_only = kind == "png" and wrong_suffix   # a figure's name first; another file's kind first
    same = _same_as_input(path, inputs)
    if same is not None:
        raise InputError("%s: is also an input of this command (%s); liftcal never writes over "
                         "its input: %s" % (where, same, _ANOTHER))
    if stat.S_ISLNK(st.st_mode):
        raise InputError("%s: is a symbolic link; liftcal does not write through links: %s"
                         % (where, _ANOTHER))
    if stat.S_ISDIR(st.st_mode):
        raise InputError("%s: is a folder; give a file name for the output" % where)
    if not stat.S_ISREG(st.st_mode):
        raise InputError("%s: is %s, not a file liftcal may replace: %s"
                         % (where, special_kind(st.st_mode), _ANOTHER))
    if png_only:
        raise wrong_suffix
    found = file_kind(path) if kind is not None else None
    if found is None:
        raise InputError("%s: a file liftcal did not write is already there; liftcal never "
                         "replaces such a file: %s (or move that file away)" % (where, _ANOTHER))
    if found != kind:
        raise InputError("%s: is %s, and this would write %s over it: %s"
                         % (where, KIND_NAMES[found], KIND_NAMES[kind].replace("liftcal ", ""), _ANOTHER))
    if wrong_suffix:
        raise wrong_suffix
    if kind in SEALED_KINDS:
        _check_seal(path, where)
    if kind == "png":
        _check_figure_place(path, where)
    return os.path.abspath(path)


def seal_of(path):
    """"intact", "broken" or None (no seal) for the file at ``path`` (estimator.seal)."""
    from estimator.seal import seal_state

    try:
        with open(path, "rb") as fh:
            return seal_state(fh.read().decode("utf-8"))[0]
    except (OSError, UnicodeDecodeError):
        return "broken"


def own_file(path):
    """True when liftcal's mark is on the file and, for SEALED_KINDS, its seal is intact."""
    kind = file_kind(path)
    return kind is not None and (kind not in SEALED_KINDS or seal_of(path) == "intact")


def _check_seal(path, where):
    """Refuse a liftcal file whose content seal (estimator.seal) is missing or broken."""
    state = seal_of(path)
    if state == "broken":
        raise InputError("%s: liftcal wrote this file but it was changed since (its content seal "
                         "no longer matches); liftcal never replaces a file that holds a person's "
                         "edits: %s (or move that file away)" % (where, _ANOTHER))
    if state is None:
        raise InputError("%s: this liftcal file carries no content seal (an older liftcal wrote it, "
                         "or it was copied or made by hand), so liftcal cannot tell whether it holds "
                         "a person's edits and does not replace it: %s (or move that file away)"
                         % (where, _ANOTHER))


def check_outputs(outputs, inputs=()):
    """check_output for every (path, kind, option) given (None paths skipped); also refuses
    two outputs at the same path."""
    seen = {}
    for path, kind, option in outputs:   # the same path twice is said first: the plainest cause
        if path is None or os.fspath(path) == "":
            continue
        full = os.path.realpath(os.path.abspath(os.fspath(path)))
        if full in seen:
            raise InputError("%s %s: the same path as %s; each output needs its own path"
                             % (option, path, seen[full]))
        seen[full] = option
    for path, kind, option in outputs:
        if path is not None:
            check_output(path, kind, inputs, option)


def file_sha256(path):
    """SHA-256 of a file's bytes (hex), read in blocks; the one file hash of liftcal."""
    return _digest(path)[0]


def file_sha256_counting(path, byte):
    """(SHA-256 of a file's bytes (hex), how many times the byte ``byte`` (an int 0..255)
    occurs in the file): one read of the file serves both (a bench CSV's commas check the
    width of every row)."""
    return _digest(path, byte)


def _digest(path, byte=None):
    """Read the file into one reused buffer of 256 KiB (it stays in the processor's cache
    between the read and the hash; no new block object per read)."""
    h = hashlib.sha256()
    count = 0
    if byte is not None:
        import numpy as np
    buf = bytearray(1 << 18)
    view = memoryview(buf)
    with open(path, "rb", buffering=0) as fh:
        while True:
            n = fh.readinto(buf)
            if not n:
                break
            h.update(view[:n])
            if byte is not None:
                count += int(np.count_nonzero(np.frombuffer(buf, np.uint8, n) == byte))
    return h.hexdigest(), count


def _replace_atomic(path, kind, write):
    """Write through a temporary file in the target folder and os.replace; guard re-checked."""
    check_output(path, kind)
    directory = os.path.dirname(os.path.abspath(path))
    tmp = None
    try:
        fd, tmp = tempfile.mkstemp(prefix=".tmp-liftcal-", dir=directory)
        umask = os.umask(0)
        os.umask(umask)
        os.fchmod(fd, 0o666 & ~umask)
        write(fd, tmp)
        os.replace(tmp, path)
        tmp = None
    except OSError as exc:
        raise write_error(path, exc) from None
    finally:
        if tmp is not None:
            try:
                os.unlink(tmp)
            except OSError:
                pass


def write_text(path, text, kind):
    """Write ``text`` (UTF-8) to ``path`` atomically after check_output(path, kind); files of
    the SEALED_KINDS get their content seal (estimator.seal)."""
    if kind in SEALED_KINDS:
        from estimator.seal import seal_text

        text = seal_text(text)

    def write(fd, tmp):
        with os.fdopen(fd, "w", encoding="utf-8") as fh:
            fh.write(text)
            fh.flush()
            os.fsync(fh.fileno())

    _replace_atomic(path, kind, write)


def write_json(path, document, kind):
    """Write a JSON document atomically (indented) after check_output; a document liftcal
    would refuse to read back (NaN, a number of absurd magnitude) is refused instead."""
    from estimator.jsonread import check_values
    from estimator.seal import SEAL_KEY

    check_values(document, path)
    document = {k: v for k, v in document.items() if k != SEAL_KEY}  # a set read back: sealed anew
    write_text(path, json.dumps(document, indent=2, allow_nan=False) + "\n", kind)


def save_figure(fig, path, dpi=110):
    """Save a matplotlib figure as PNG atomically after check_output, marked Software: liftcal
    and with the path it is drawn at (figure_path_mark)."""
    metadata = {"Software": SOFTWARE, FIGURE_PATH_KEY: figure_path_mark(path)}

    def write(fd, tmp):
        with os.fdopen(fd, "wb") as fh:
            fig.savefig(fh, dpi=dpi, format="png", metadata=metadata)
            fh.flush()
            os.fsync(fh.fileno())

    _replace_atomic(path, "png", write)
