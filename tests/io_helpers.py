"""Helpers for the bad-input tests: run a command in this process, check one clean refusal."""

import contextlib
import hashlib
import io
import os

from estimator.cli import main

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
EXAMPLES = os.path.join(ROOT, "schemas", "examples", "valid")
VEHICLE = os.path.join(EXAMPLES, "vehicle-demo-quad.json")
PARAMS = os.path.join(EXAMPLES, "params-demo-with-hover.json")
MAP = os.path.join(EXAMPLES, "map-example.json")


def run(args):
    """(exit code, stdout, stderr) of ``liftcal ARGS`` run in this process."""
    out, err = io.StringIO(), io.StringIO()
    code = 0
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        try:
            main([str(a) for a in args])
        except SystemExit as exc:
            code = exc.code if isinstance(exc.code, int) else (0 if exc.code is None else 1)
    return code, out.getvalue(), err.getvalue()


def refused(args, *needles):
    """Run ``args``; assert one ``error:`` line, exit 2, holding every needle; return the line."""
    code, out, err = run(args)
    lines = err.strip().splitlines()
    assert code == 2 and len(lines) == 1 and lines[0].startswith("error: "), (code, out, err)
    assert "Traceback" not in err
    for needle in needles:
        assert needle in lines[0], (needle, lines[0])
    return lines[0]


def tree_digest(folder):
    """{relative path: sha256} of every file under ``folder`` (to prove nothing changed)."""
    out = {}
    for base, dirs, files in os.walk(folder):
        for name in files:
            path = os.path.join(base, name)
            if os.path.islink(path) or not os.path.isfile(path):
                out[os.path.relpath(path, folder)] = "special"
                continue
            with open(path, "rb") as fh:
                out[os.path.relpath(path, folder)] = hashlib.sha256(fh.read()).hexdigest()
        for name in dirs:
            out[os.path.relpath(os.path.join(base, name), folder) + "/"] = "dir"
    return out


def bad_inputs_module():
    """benchmarks/bad_inputs.py as a module (its cases, folder set-up and runners)."""
    import importlib.util

    spec = importlib.util.spec_from_file_location("bad_inputs", os.path.join(ROOT, "benchmarks", "bad_inputs.py"))
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module
