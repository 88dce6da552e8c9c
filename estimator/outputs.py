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
  kind "png"       PNG figure whose tEXt "Software" chunk starts with "liftcal"
  folders          (board bundle, demo) hold a manifest FOLDER_MANIFEST listing every file
                   with its SHA-256; a folder is liftcal's own only when every file in it is
                   listed and unchanged (a file the person edited or added keeps it theirs)

Writes go to a temporary file in the target folder, then os.replace: never a partial file;
any failure (permission, full disk, missing folder) is one InputError and the temporary file
is removed.

API: check_output(path, kind, inputs, option) -> absolute path; check_outputs(list of
(path, kind, option), inputs); check_folder(path, kind, inputs, option) -> "new" | "empty" |
"own"; write_text(path, text, kind), write_json(path, document, kind),
save_figure(fig, path); write_manifest(folder, kind); replace_folder(staged, target);
write_error(path, exc) -> InputError for an OSError met while writing.
"""

import hashlib
import json
import os
import shutil
import stat
import tempfile

from estimator import __version__
from estimator.errors import InputError
from estimator.safepath import special_kind

FOLDER_MANIFEST = ".liftcal-folder.json"
SOFTWARE = "liftcal %s" % __version__
SETTINGS_MARK = "# liftcal settings"
KIND_NAMES = {"params": "a liftcal parameter set", "settings": "a liftcal settings file",
              "png": "a liftcal figure (PNG)", "bundle": "a liftcal board bundle",
              "demo": "a liftcal demo folder"}
# kinds whose files carry a content seal (estimator.seal): an edited one is never replaced
SEALED_KINDS = ("params", "settings")
_PNG_SIGNATURE = b"\x89PNG\r\n\x1a\n"
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
    return InputError("%s: cannot write (%s); nothing was written: %s" % (path, why, _ANOTHER))


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
            if os.path.realpath(path) == os.path.realpath(str(given)):
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
    import struct

    pos = len(_PNG_SIGNATURE)
    while pos + 8 <= len(head):
        length, ctype = struct.unpack(">I4s", head[pos:pos + 8])
        body = head[pos + 8:pos + 8 + length]
        if ctype == b"IDAT" or len(body) < length:
            break
        if ctype == b"tEXt" and body.startswith(b"Software\0"):
            return body[9:].decode("latin-1")
        pos += 12 + length
    return ""


def check_output(path, kind, inputs=(), option="--out"):
    """Refuse an output file path liftcal must not write (module docstring); return it absolute.

    path: the path given; kind: what will be written ("params", "settings", "png"; None for
    a file in a folder liftcal is building, which must not exist yet);
    inputs: the command's input paths; option: the option that gave the path, for the message.
    """
    if path is None or str(path) == "":
        raise InputError("%s: an empty path was given; name a file to write" % option)
    path = os.fspath(path)
    where = "%s %s" % (option, path)
    if path.endswith(os.sep) or os.path.basename(path) in ("", ".", ".."):
        raise InputError("%s: is a folder; give a file name for the output" % where)
    directory = os.path.dirname(os.path.abspath(path))
    st_dir = _lstat(directory, where)
    if st_dir is None:
        raise InputError("%s: folder %s does not exist; create it first or %s" % (where, directory, _ANOTHER))
    if not os.path.isdir(directory):
        raise InputError("%s: %s is a file, not a folder: %s" % (where, directory, _ANOTHER))
    st = _lstat(path, where)
    png_only = kind == "png" and not path.lower().endswith(".png")
    if st is None:
        if png_only:
            raise InputError("%s: liftcal draws figures as PNG only; name a file ending in .png" % where)
        return os.path.abspath(path)
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
        raise InputError("%s: liftcal draws figures as PNG only; name a file ending in .png" % where)
    found = file_kind(path) if kind is not None else None
    if found is None:
        raise InputError("%s: a file liftcal did not write is already there; liftcal never "
                         "replaces such a file: %s (or move that file away)" % (where, _ANOTHER))
    if found != kind:
        raise InputError("%s: is %s, and this would write %s over it: %s"
                         % (where, KIND_NAMES[found], KIND_NAMES[kind].replace("liftcal ", ""), _ANOTHER))
    if kind in SEALED_KINDS:
        _check_seal(path, where)
    return os.path.abspath(path)


def _check_seal(path, where):
    """Refuse a liftcal file whose content seal (estimator.seal) is missing or broken."""
    from estimator.seal import seal_state

    try:
        with open(path, "rb") as fh:
            state = seal_state(fh.read().decode("utf-8"))[0]
    except (OSError, UnicodeDecodeError):
        state = "broken"
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
    for path, kind, option in outputs:
        if path is None:
            continue
        full = check_output(path, kind, inputs, option)
        if full in seen:
            raise InputError("%s %s: the same path as %s; each output needs its own path"
                             % (option, path, seen[full]))
        seen[full] = option


def file_sha256(path):
    """SHA-256 of a file's bytes (hex), read in blocks; the one file hash of liftcal."""
    return _digest(path)


def publish_folder(staged, target, kind):
    """Write the manifest into a staged folder and rename it into place; a failed write is one
    InputError naming the target (the caller removes the staged folder on any failure)."""
    try:
        write_manifest(staged, kind)
    except OSError as exc:
        raise write_error(target, exc) from None
    replace_folder(staged, target)


def _digest(path):
    h = hashlib.sha256()
    with open(path, "rb") as fh:
        for block in iter(lambda: fh.read(1 << 20), b""):
            h.update(block)
    return h.hexdigest()


def _tree(folder):
    """{relative path: sha256, or None for what is no regular file} of everything in folder."""
    out = {}
    for base, dirs, files in os.walk(folder):
        for name in dirs + files:
            full = os.path.join(base, name)
            rel = os.path.relpath(full, folder).replace(os.sep, "/")
            st = os.lstat(full)
            if stat.S_ISDIR(st.st_mode):
                continue
            out[rel] = _digest(full) if stat.S_ISREG(st.st_mode) else None
    return out


def folder_files(folder):
    """{relative path: sha256} of the files in a folder liftcal writes (manifest excluded)."""
    return {rel: digest for rel, digest in _tree(folder).items() if rel != FOLDER_MANIFEST}


def write_manifest(folder, kind):
    """Write FOLDER_MANIFEST into ``folder`` listing every file now in it (call it last)."""
    doc = {"written_by": SOFTWARE, "kind": kind,
           "note": "liftcal replaces this folder only while every file is listed here unchanged",
           "files": folder_files(folder)}
    with open(os.path.join(folder, FOLDER_MANIFEST), "w", encoding="utf-8") as fh:
        fh.write(json.dumps(doc, indent=1, sort_keys=True) + "\n")


def _foreign(folder, kind):
    """The first entry of ``folder`` that makes it not liftcal's own of ``kind``, or None."""
    try:
        with open(os.path.join(folder, FOLDER_MANIFEST), "r", encoding="utf-8") as fh:
            manifest = json.load(fh)
    except (OSError, ValueError):
        manifest = None
    tree = _tree(folder)
    if not isinstance(manifest, dict) or manifest.get("kind") != kind \
            or not isinstance(manifest.get("files"), dict):
        others = sorted(rel for rel in tree if rel != FOLDER_MANIFEST)
        return others[0] if others else FOLDER_MANIFEST
    listed = manifest["files"]
    vouched = _own_subfolders(folder, tree)
    foreign = []
    for rel, digest in sorted(tree.items()):
        if rel == FOLDER_MANIFEST or rel.endswith("/" + FOLDER_MANIFEST) \
                or any(rel.startswith(sub + "/") for sub in vouched):
            continue  # manifests are liftcal's; a vouched subfolder's files too
        if rel in listed and digest is not None and listed[rel] == digest:
            continue
        if digest is not None and file_kind(os.path.join(folder, rel)) is not None:
            continue  # rewritten by a liftcal command since (fit --out, --plot, export --out)
        foreign.append(rel)
    # name a file liftcal never listed before one it listed and that changed
    unknown = [rel for rel in foreign if rel not in listed]
    return (unknown or foreign or [None])[0]


def _own_subfolders(folder, tree):
    """Subfolders holding a manifest that vouches for all their files (a bundle rewritten by
    ``liftcal firmware`` inside a demo folder)."""
    subs = []
    for rel in tree:
        if rel.endswith("/" + FOLDER_MANIFEST):
            sub = rel[: -len(FOLDER_MANIFEST) - 1]
            try:
                with open(os.path.join(folder, rel), "r", encoding="utf-8") as fh:
                    kind = json.load(fh).get("kind")
            except (OSError, ValueError, AttributeError):
                continue
            if kind in KIND_NAMES and _foreign(os.path.join(folder, sub), kind) is None:
                subs.append(sub)
    return subs


def check_folder(path, kind, inputs=(), option="--out"):
    """Refuse an output folder liftcal must not replace; returns "new", "empty" or "own".

    A new folder needs its parent to exist; an existing one must be empty or liftcal's own
    of this ``kind`` ("bundle", "demo"), with every file listed unchanged in its manifest,
    and hold none of the command's inputs.
    """
    if path is None or str(path) == "":
        raise InputError("%s: an empty path was given; name a folder to write" % option)
    path = os.fspath(path)
    where = "%s %s" % (option, path)
    full = os.path.abspath(path)
    st = _lstat(full, where)
    if st is None:
        parent = os.path.dirname(full)
        if not os.path.lexists(parent):
            raise InputError("%s: folder %s does not exist; create it first or %s"
                             % (where, parent, _ANOTHER))
        if not os.path.isdir(parent):
            raise InputError("%s: %s is a file, not a folder: %s" % (where, parent, _ANOTHER))
        return "new"
    if stat.S_ISLNK(st.st_mode):
        raise InputError("%s: is a symbolic link; name the folder itself or another path" % where)
    if not stat.S_ISDIR(st.st_mode):
        what = "a file" if stat.S_ISREG(st.st_mode) else special_kind(st.st_mode)
        raise InputError("%s: is %s, not a folder; liftcal writes %s into a new or empty folder: "
                         "name another path" % (where, what, KIND_NAMES[kind].replace("liftcal ", "")))
    if full == os.path.abspath(os.sep):
        raise InputError("%s: is the root folder: name a new folder" % where)
    for given in inputs:
        if given is not None and os.path.realpath(str(given)).startswith(os.path.realpath(full) + os.sep):
            raise InputError("%s: holds an input of this command (%s); name another folder" % (where, given))
    try:
        if not os.listdir(full):
            return "empty"
        foreign = _foreign(full, kind)
    except OSError as exc:
        raise InputError("%s: cannot look into this folder (%s): name another path"
                         % (where, exc.strerror)) from None
    if foreign is None:
        return "own"
    raise InputError("%s: holds files liftcal did not write or that were changed since (%s); "
                     "liftcal writes %s into a new or empty folder, or replaces one it wrote: "
                     "name another folder" % (where, foreign[:60], KIND_NAMES[kind].replace("liftcal ", "")))


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
    """Save a matplotlib figure as PNG (marked Software: liftcal) atomically after check_output."""
    def write(fd, tmp):
        with os.fdopen(fd, "wb") as fh:
            fig.savefig(fh, dpi=dpi, format="png", metadata={"Software": SOFTWARE})
            fh.flush()
            os.fsync(fh.fileno())

    _replace_atomic(path, "png", write)


def replace_folder(staged, target):
    """Put the finished folder ``staged`` at ``target`` (new, empty or liftcal's own, checked
    by the caller): rename the old one aside, rename the new one in, remove the old one."""
    old = None
    try:
        if os.path.lexists(target):
            old = target + ".old-" + os.path.basename(staged)
            os.rename(target, old)
        os.rename(staged, target)
    except OSError as exc:
        if old is not None and not os.path.exists(target):
            os.rename(old, target)
        raise write_error(target, exc) from None
    if old is not None:
        shutil.rmtree(old, ignore_errors=True)


def staging_folder(target):
    """A new temporary folder beside ``target`` to build it in (InputError when impossible)."""
    parent = os.path.dirname(os.path.abspath(target))
    try:
        tmp = tempfile.mkdtemp(prefix=".liftcal-", dir=parent)
        os.chmod(tmp, 0o755)
    except OSError as exc:
        raise write_error(target, exc) from None
    return tmp
