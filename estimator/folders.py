"""liftcal's own folders (board bundle, demo): a manifest, the check before replacing, the swap.

Design notes sec. 4. A folder liftcal writes holds a manifest FOLDER_MANIFEST listing every
file with its SHA-256; a folder is liftcal's own only when every file in it is listed and
unchanged, or is a liftcal file rewritten since by a liftcal command (its mark on, its content
seal intact: estimator.outputs.own_file); a file the person edited or added keeps it theirs.
A new folder is built beside the target (staging_folder), its manifest written last, then
renamed into place (publish_folder / replace_folder).

API: check_folder(path, kind, inputs, option) -> "new" | "empty" | "own";
staging_folder(target); publish_folder(staged, target, kind, record) -> the files kept (made_since);
write_manifest(folder, kind, record); kept_words(kept); source_record(given); recorded_source(folder);
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


def publish_folder(staged, target, kind, record=None):
    """Write the manifest into a staged folder and rename it into place; a failed write is one
    InputError naming the target (the caller removes the staged folder on any failure).

    Files in an earlier folder at ``target`` that its manifest does not list as they are (a
    liftcal command wrote them there since: a figure, a settings file, a re-fit; check_folder let
    only such files pass) are carried over, unlisted, so they stay the person's (new-user trial 14,
    finding 2: re-running the demo deleted them), also where the new folder writes a file of that
    name: the person's version is kept, not liftcal's new one (new-user trial 25, finding 1: a
    re-fit params.json was replaced by the demo's). ``record``: more keys for the manifest
    (write_manifest). Returns made_since's Kept list."""
    try:
        kept = made_since(target, staged)
        for rel in kept:
            _remove(os.path.join(staged, *rel.rstrip("/").split("/")))
        write_manifest(staged, kind, record)   # liftcal's files only: the kept ones stay unlisted
        for rel in kept:
            src = os.path.join(target, *rel.rstrip("/").split("/"))
            dest = os.path.join(staged, *rel.rstrip("/").split("/"))
            os.makedirs(os.path.dirname(dest), exist_ok=True)
            if rel.endswith("/"):
                shutil.copytree(src, dest, symlinks=True)
            else:
                shutil.copy2(src, dest)
    except OSError as exc:
        raise write_error(target, exc) from None
    replace_folder(staged, target)
    return kept


class Kept(list):
    """made_since's sorted relative paths (a folder kept whole as 'sub/'), with ``changed``: those
    that liftcal wrote there before or writes there now, where the person's version is kept."""

    changed = ()


def made_since(target, staged):
    """The relative paths in the folder ``target`` (if any) that its manifest does not list
    unchanged: what was made or rewritten there after liftcal wrote it, whether or not ``staged``
    holds a file of that name. A liftcal folder in it (a bundle: its own manifest) rewritten since
    (that manifest changed) is one entry 'sub/', kept whole: never half its files mixed with the
    new folder's. Returns a Kept list; its ``changed`` are the entries the manifest lists or
    ``staged`` holds (under)."""
    if not os.path.isdir(target) or os.path.islink(target):
        return Kept()
    try:
        with open(os.path.join(target, FOLDER_MANIFEST), "r", encoding="utf-8") as fh:
            listed = json.load(fh).get("files")
    except (OSError, ValueError, AttributeError):
        listed = None
    listed = listed if isinstance(listed, dict) else {}
    rels = [rel for rel, digest in _tree(target).items() if rel != FOLDER_MANIFEST and listed.get(rel) != digest]
    subs = [rel[: -len(FOLDER_MANIFEST)] for rel in rels if rel.endswith("/" + FOLDER_MANIFEST)]
    subs = [sub for sub in subs if not any(sub != other and sub.startswith(other) for other in subs)]
    kept = Kept(sorted([rel for rel in rels if not any(rel.startswith(sub) for sub in subs)] + subs))
    liftcals = list(listed) + list(_tree(staged))
    kept.changed = [rel for rel in kept if any(name == rel or (rel.endswith("/") and name.startswith(rel))
                                               for name in liftcals)]
    return kept


def _remove(path):
    """Remove a file or a folder from a staged folder, if there."""
    if os.path.isdir(path) and not os.path.islink(path):
        shutil.rmtree(path)
    elif os.path.lexists(path):
        os.remove(path)


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


def write_manifest(folder, kind, record=None):
    """Write FOLDER_MANIFEST into ``folder`` listing every file now in it (call it last);
    ``record``: more keys to keep there (a bundle's source: source_record)."""
    doc = dict(record or {})
    doc.update({"written_by": SOFTWARE, "kind": kind,
                "note": "liftcal replaces this folder only while every file is listed here unchanged",
                "files": folder_files(folder)})
    with open(os.path.join(folder, FOLDER_MANIFEST), "w", encoding="utf-8") as fh:
        fh.write(json.dumps(doc, indent=1, sort_keys=True) + "\n")


def _manifest(folder, kind):
    """The FOLDER_MANIFEST of ``folder`` when liftcal wrote it as a folder of ``kind`` (a dict with
    its files' digests), else None."""
    try:
        with open(os.path.join(folder, FOLDER_MANIFEST), "r", encoding="utf-8") as fh:
            manifest = json.load(fh)
    except (OSError, ValueError):
        return None
    if not isinstance(manifest, dict) or manifest.get("kind") != kind or not isinstance(manifest.get("files"), dict):
        return None
    return manifest


def _foreign(folder, kind):
    """The entries of ``folder`` that make it not liftcal's own of ``kind`` (files liftcal never
    listed first, then listed ones that changed; each group sorted), or [] when it is its own."""
    manifest = _manifest(folder, kind)
    tree = _tree(folder)
    if manifest is None:
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
    # a folder liftcal wrote, edited since (a bundle's board_loop.py, as its README invites, or an
    # added main.py): say how to keep the edits (new-user trial 26: the builder was left not knowing)
    what = KIND_NAMES[kind].replace("liftcal ", "")
    keep = " for the new %s, then carry your files over by hand (%s)" % (what.split(" ", 1)[1], _some(foreign)) \
        if _manifest(full, kind) is not None else ""
    raise InputError("%s: holds files liftcal did not write or that were changed since (%s); "
                     "liftcal writes %s into a new or empty folder, or replaces one it wrote: "
                     "name another folder%s" % (where, _some(foreign), what, keep))


FOREIGN_SHOWN = 5  # files a refusal names before "and N more" (one error line stays readable)


def _some(names):
    """'notes.md, vehicle.json.bak' or, past FOREIGN_SHOWN, the first ones 'and 7 more'; each
    name cut at 60 characters."""
    shown_names = ", ".join(name[:60] for name in names[:FOREIGN_SHOWN])
    return shown_names + (" and %d more" % (len(names) - FOREIGN_SHOWN) if len(names) > FOREIGN_SHOWN else "")


def kept_words(kept):
    """'' or '; kept the 2 files made there since, as they were: a.png, b.txt', then '; kept the 1
    file changed there since, as they were: params.json' for those liftcal wrote there too
    (publish_folder's Kept; a plain list is all made there since)."""
    changed = getattr(kept, "changed", ())
    return (_kept_clause([rel for rel in kept if rel not in changed], "made")
            + _kept_clause([rel for rel in kept if rel in changed], "changed"))


def _kept_clause(names, how):
    if not names:
        return ""
    folders = sum(1 for name in names if name.endswith("/"))
    counts = ["%d %s%s" % (n, what, "" if n == 1 else "s")
              for n, what in ((len(names) - folders, "file"), (folders, "folder")) if n]
    return "; kept the %s %s there since, as they were: %s" % (" and ".join(counts), how, _some(names))


def source_record(given):
    """The manifest keys naming the file a folder was made from (``given``, a path as the person
    gave it): its absolute path, and whether it was given relative (recorded_source)."""
    return {"source": {"path": os.path.abspath(given), "given": "absolute" if os.path.isabs(given) else "relative"}}


def recorded_source(folder):
    """The file the liftcal folder ``folder`` was made from (source_record), as seen from the
    current folder: relative when it was given relative and that is shorter, else absolute;
    None when its manifest records none (new-user trial 25, finding 2: the path as given then was
    relative to the folder that command ran in)."""
    try:
        with open(os.path.join(folder, FOLDER_MANIFEST), "r", encoding="utf-8") as fh:
            source = json.load(fh).get("source")
        path = source["path"]
        given = source.get("given")
    except (OSError, ValueError, AttributeError, KeyError, TypeError):
        return None
    if not isinstance(path, str) or not os.path.isabs(path):
        return None
    if given == "relative":
        try:
            here = os.path.relpath(path)
        except (ValueError, OSError):   # another drive, or the current folder is gone
            return path
        return here if len(here) < len(path) else path
    return path


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
