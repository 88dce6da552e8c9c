"""Reading JSON files, validating them against our schemas, and writing files atomically."""

import json
import os
import sys
import tempfile

from estimator.errors import InputError

SCHEMA_DIR = os.path.join(os.path.dirname(os.path.dirname(os.path.abspath(__file__))), "schemas")
if not os.path.isdir(SCHEMA_DIR):  # a non-editable install: the copy under <prefix>/share
    SCHEMA_DIR = os.path.join(sys.prefix, "share", "liftcal", "schemas")


def load_json(path):
    """Read a JSON file; raise InputError with the file, line and column on failure."""
    try:
        with open(path, "r", encoding="utf-8") as fh:
            return json.load(fh)
    except FileNotFoundError:
        raise InputError("%s: no such file" % path) from None
    except IsADirectoryError:
        raise InputError("%s: is a directory, expected a JSON file" % path) from None
    except UnicodeDecodeError as exc:
        raise InputError("%s: not UTF-8 text (byte %d)" % (path, exc.start)) from None
    except json.JSONDecodeError as exc:
        raise InputError("%s: line %d column %d: malformed JSON (%s)"
                         % (path, exc.lineno, exc.colno, exc.msg)) from None
    except OSError as exc:
        raise InputError("%s: cannot read (%s)" % (path, exc.strerror)) from None


def load_schema(name):
    """Load ``schemas/<name>`` shipped with the project."""
    with open(os.path.join(SCHEMA_DIR, name), "r", encoding="utf-8") as fh:
        return json.load(fh)


def json_path(error_path):
    """Render a jsonschema error path as ``$.a.b[0]``."""
    out = "$"
    for part in error_path:
        out += "[%d]" % part if isinstance(part, int) else "." + str(part)
    return out


def validate(document, schema_name, source):
    """Validate ``document`` against ``schemas/<schema_name>`` (draft 2020-12).

    Raises InputError naming ``source`` and the JSON path of the first (deepest) problem.
    """
    import jsonschema  # imported here: keeps `liftcal --help` light

    schema = load_schema(schema_name)
    validator = jsonschema.Draft202012Validator(schema)
    errors = sorted(validator.iter_errors(document), key=lambda e: (len(list(e.absolute_path)), str(e.message)))
    if errors:
        err = errors[-1] if len(errors) == 1 else _best(errors)
        raise InputError("%s: %s: %s" % (source, json_path(err.absolute_path), err.message))


def _best(errors):
    from jsonschema.exceptions import best_match
    return best_match(errors)


def write_atomic(path, text):
    """Write ``text`` to ``path`` through a temporary file and a rename: never a partial file.

    The file gets the usual permissions for a new file (0666 less the umask). Raises
    InputError when the folder is missing or ``path`` is a folder.
    """
    directory = os.path.dirname(os.path.abspath(path)) or "."
    if not os.path.isdir(directory):
        raise InputError("%s: folder %s does not exist" % (path, directory))
    if os.path.isdir(path):
        raise InputError("%s: is a folder; give a file name for the output" % path)
    fd, tmp = tempfile.mkstemp(prefix=".tmp-", dir=directory)
    try:
        umask = os.umask(0)
        os.umask(umask)
        os.fchmod(fd, 0o666 & ~umask)
        with os.fdopen(fd, "w", encoding="utf-8") as fh:
            fh.write(text)
        os.replace(tmp, path)
    except BaseException:
        if os.path.exists(tmp):
            os.unlink(tmp)
        raise


def write_json_atomic(path, document):
    """Write a JSON document atomically with a stable, readable layout."""
    write_atomic(path, json.dumps(document, indent=2, sort_keys=False) + "\n")


def dumps(document):
    """The one-object JSON that every ``--json`` command prints."""
    return json.dumps(document, indent=2, allow_nan=False)
