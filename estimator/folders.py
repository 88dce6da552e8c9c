"""liftcal's own folders (board bundle, demo): a manifest, the check before replacing, the swap.

Design notes sec. 4. A folder liftcal writes holds a manifest FOLDER_MANIFEST listing every
file with its SHA-256; a folder is liftcal's own only when every file in it is listed and
unchanged, or is a liftcal file rewritten since by a liftcal command (its mark on, its content
seal intact: estimator.outputs.own_file); a file the person edited or added keeps it theirs.
A new folder is built beside the target (staging_folder), its manifest written last, then
renamed into place (publish_folder / replace_folder).

API: check_folder(path, kind, inputs, option) -> "new" | "empty" | "own";
staging_folder(target); publish_folder(staged, target, kind) -> the files kept (made_since);
write_manifest(folder, kind);
folder_files(folder); replace_folder(staged, target).
"""

import json
import os
import shutil
import stat
import tempfile

from estimator.names import shown
from estimator.errors import InputError
from estimator.outputs import KIND_NAMES, SOFTWARE, _ANOTHER, _lstat, file_sha256, own_file, write_error
from estimator.safepath import special_kind

FOLDER_MANIFEST = ".liftcal-folder.json"


def publish_folder(staged, target, kind):
    """Write the manifest into a staged folder and rename it into place; a failed write is one
    InputError naming the target (the caller removes the staged folder on any failure).

    Files in an earlier folder at ``target`` that its manifest does not list as they are (a
    liftcal command wrote them there since: a figure, a settings file, a re-fit; check_folder let
    only such files pass) and that the new folder does not write are carried over, unlisted, so
    they stay the person's (new-user trial 14, finding 2: re-running the demo deleted them).
    Returns their relative paths, sorted."""
    try:
        write_manifest(staged, kind)
        kept = made_since(target, staged)
        for rel in kept:
            dest = os.path.join(staged, *rel.split("/"))
            os.makedirs(os.path.dirname(dest), exist_ok=True)
            shutil.copy2(os.path.join(target, *rel.split("/")), dest)
    except OSError as exc:
        raise write_error(target, exc) from None
    replace_folder(staged, target)
    return kept


def made_since(target, staged):
    """The relative paths in the folder ``target`` (if any) that its manifest does not list
    unchanged and that ``staged`` does not hold: what was made there after liftcal wrote it."""
    if not os.path.isdir(target) or os.path.islink(target):
        return []
    try:
        with open(os.path.join(target, FOLDER_MANIFEST), "r", encoding="utf-8") as fh:
            listed = json.load(fh).get("files")
    except (OSError, ValueError, AttributeError):
        listed = None
    listed = listed if isinstance(listed, dict) else {}
    new = _tree(staged)
    return sorted(rel for rel, digest in _tree(target).items()
                  if rel != FOLDER_MANIFEST and rel not in new and listed.get(rel) != digest)


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
            out[rel] = file_sha256(full) if stat.S_ISREG(st.st_mode) else None
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
    """The entries of ``folder`` that make it not liftcal's own of ``kind`` (files liftcal never
    listed first, then listed ones that changed; each group sorted), or [] when it is its own."""
    try:
        with open(os.path.join(folder, FOLDER_MANIFEST), "r", encoding="utf-8") as fh:
            manifest = json.load(fh)
    except (OSError, ValueError):
        manifest = None
    tree = _tree(folder)
    if not isinstance(manifest, dict) or manifest.get("kind") != kind \
            or not isinstance(manifest.get("files"), dict):
        others = sorted(rel for rel in tree if rel != FOLDER_MANIFEST)
        return others or [FOLDER_MANIFEST]
    listed = manifest["files"]
    vouched = _own_subfolders(folder, tree)
    foreign = []
    for rel, digest in sorted(tree.items()):
        if rel == FOLDER_MANIFEST or rel.endswith("/" + FOLDER_MANIFEST) \
                or any(rel.startswith(sub + "/") for sub in vouched):
            continue  # manifests are liftcal's; a vouched subfolder's files too
        if rel in listed and digest is not None and listed[rel] == digest:
            continue
        if digest is not None and own_file(os.path.join(folder, rel)):
            continue  # rewritten by a liftcal command since (fit --out, --plot, export --out)
        foreign.append(rel)
    # name the files liftcal never listed before the ones it listed and that changed
    return [rel for rel in foreign if rel not in listed] + [rel for rel in foreign if rel in listed]


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
            if kind in KIND_NAMES and not _foreign(os.path.join(folder, sub), kind):
                subs.append(sub)
    return subs


def check_folder(path, kind, inputs=(), option="--out"):
    """Refuse an output folder liftcal must not replace; returns "new", "empty" or "own".

    A new folder needs its parent to exist; an existing one must be empty or liftcal's own
    of this ``kind`` ("bundle", "demo"), with every file listed unchanged in its manifest,
    and hold none of the command's inputs.
    """
    if path is None or os.fspath(path) == "":
        raise InputError("%s: an empty path was given; name a folder to write" % option)
    path = os.fspath(path)
    where = "%s %s" % (option, path)
    full = os.path.abspath(path)
    st = _lstat(full, where)
    if st is None:
        parent = os.path.dirname(full)
        if not os.path.lexists(parent):
            raise InputError("%s: folder %s does not exist; create it first or %s"
                             % (where, shown(parent), _ANOTHER))
        if not os.path.isdir(parent):
            raise InputError("%s: %s is a file, not a folder: %s" % (where, shown(parent), _ANOTHER))
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
        if given is not None and os.path.realpath(os.fspath(given)).startswith(os.path.realpath(full) + os.sep):
            raise InputError("%s: holds an input of this command (%s); name another folder" % (where, given))
    try:
        if not os.listdir(full):
            return "empty"
        foreign = _foreign(full, kind)
    except OSError as exc:
        raise InputError("%s: cannot look into this folder (%s): name another path"
                         % (where, exc.strerror)) from None
    if not foreign:
        return "own"
    raise InputError("%s: holds files liftcal did not write or that were changed since (%s); "
                     "liftcal writes %s into a new or empty folder, or replaces one it wrote: "
                     "name another folder" % (where, _some(foreign), KIND_NAMES[kind].replace("liftcal ", "")))


FOREIGN_SHOWN = 5  # files a refusal names before "and N more" (one error line stays readable)


def _some(names):
    """'notes.md, vehicle.json.bak' or, past FOREIGN_SHOWN, the first ones 'and 7 more'; each
    name cut at 60 characters."""
    shown_names = ", ".join(name[:60] for name in names[:FOREIGN_SHOWN])
    return shown_names + (" and %d more" % (len(names) - FOREIGN_SHOWN) if len(names) > FOREIGN_SHOWN else "")


def kept_words(kept):
    """'' or '; kept the 2 files made there since, as they were: a.png, b.txt' (publish_folder's list)."""
    if not kept:
        return ""
    return "; kept the %d file%s made there since, as they were: %s" % (
        len(kept), "" if len(kept) == 1 else "s", _some(kept))


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
