"""estimator/core must run unchanged on MicroPython: an AST walk of every module in it.

Rules (design notes sec. 2, DEVELOPERS.md conventions), checked on every ``*.py`` file in
estimator/core, including modules added later:
- imports: only ``math`` and ``estimator.core`` modules (so no dataclasses, typing,
  __future__, numpy, ...);
- no ``assert`` statements (stripped from compiled .mpy: never validate with them);
- no f-string self-documenting ``=`` specifier (``f"{x=}"``), which MicroPython lacks;
- no ``dataclass`` / ``typing`` names used as decorators or bases even through aliases;
- documented units: every public module-level function (name not starting with ``_``;
  methods of classes are exempt) has a docstring, and for each argument there is a
  mention of its name (a whole word) whose clause - the text up to the next ``;``, ``. ``,
  end of line after a period, or blank line - contains a unit in square brackets, e.g.
  ``duty: ESC duty d [-]`` or ``motor: dict kv_rpm_per_V [rpm/V], ...``. Use ``[-]`` for
  dimensionless numbers and ``[text]`` (or the allowed values) for names.
"""

import ast
import glob
import os
import re

import pytest

CORE = os.path.join(os.path.dirname(os.path.dirname(os.path.abspath(__file__))), "estimator", "core")
MODULES = sorted(glob.glob(os.path.join(CORE, "*.py")))
ALLOWED_TOP = {"math"}

_SELF_DOC = re.compile(r"\{[^{}]*?[^=!<>]=\s*(![rsa])?(:[^{}]*)?\}")
_CLAUSE_END = re.compile(r";|\.\s|\n\s*\n")
_UNIT = re.compile(r"\[[^\[\]\n]+\]")


def _tree(path):
    with open(path, encoding="utf-8") as fh:
        source = fh.read()
    return source, ast.parse(source, filename=path)


def _ids(path):
    return os.path.basename(path)


def test_core_modules_are_found():
    names = [os.path.basename(p) for p in MODULES]
    for expected in ("atmosphere.py", "humid_air.py", "motor.py", "propulsion.py", "hover.py", "momentum.py"):
        assert expected in names


def _import_problems(tree):
    problems = []
    for node in ast.walk(tree):
        if isinstance(node, ast.Import):
            for alias in node.names:
                if alias.name not in ALLOWED_TOP and not alias.name.startswith("estimator.core."):
                    problems.append("import %s (line %d)" % (alias.name, node.lineno))
        elif isinstance(node, ast.ImportFrom):
            mod = node.module or ""
            if node.level:  # relative imports stay inside the core package
                continue
            if mod not in ALLOWED_TOP and mod != "estimator.core" and not mod.startswith("estimator.core."):
                problems.append("from %s import ... (line %d)" % (mod, node.lineno))
    return problems


@pytest.mark.parametrize("path", MODULES, ids=_ids)
def test_imports_only_math_and_core(path):
    _, tree = _tree(path)
    assert _import_problems(tree) == []


def test_the_import_rule_catches_what_it_should():
    # the checker itself must fail on each forbidden form (a test that cannot fail is a defect)
    for bad in ("import dataclasses", "from typing import List", "from __future__ import annotations",
                "import numpy as np", "from estimator.units import parse_quantity", "import os.path"):
        assert _import_problems(ast.parse(bad)), bad
    for good in ("import math", "from estimator.core.momentum import disk_area_m2",
                 "from estimator.core import momentum", "from . import motor"):
        assert not _import_problems(ast.parse(good)), good


@pytest.mark.parametrize("path", MODULES, ids=_ids)
def test_no_assert_statements(path):
    _, tree = _tree(path)
    lines = [n.lineno for n in ast.walk(tree) if isinstance(n, ast.Assert)]
    assert lines == [], "assert is stripped in .mpy; raise ValueError instead (lines %s)" % lines


def _self_documenting_fstrings(source, tree):
    found = []
    for node in ast.walk(tree):
        if isinstance(node, ast.JoinedStr):
            segment = ast.get_source_segment(source, node) or ""
            if _SELF_DOC.search(segment):
                found.append(node.lineno)
    return sorted(set(found))  # a format spec is itself a JoinedStr: count lines once


@pytest.mark.parametrize("path", MODULES, ids=_ids)
def test_no_self_documenting_fstrings(path):
    source, tree = _tree(path)
    assert _self_documenting_fstrings(source, tree) == []


def test_the_fstring_rule_catches_what_it_should():
    bad = 'x = 1\ny = f"{x=}"\nz = f"{x = !r:>4}"\n'
    assert _self_documenting_fstrings(bad, ast.parse(bad)) == [2, 3]
    good = 'x = 1\ny = f"x={x}"\nz = f"{x == 1}"\nw = f"{x <= 2} {x!r}"\n'
    assert _self_documenting_fstrings(good, ast.parse(good)) == []


@pytest.mark.parametrize("path", MODULES, ids=_ids)
def test_no_dataclass_or_typing_names(path):
    _, tree = _tree(path)
    names = {n.id for n in ast.walk(tree) if isinstance(n, ast.Name)}
    names |= {n.attr for n in ast.walk(tree) if isinstance(n, ast.Attribute)}
    assert not names & {"dataclass", "dataclasses", "typing", "NamedTuple", "TypedDict", "Protocol"}


def _undocumented_arguments(func):
    doc = ast.get_docstring(func)
    if not doc:
        return ["(no docstring)"]
    args = [a.arg for a in func.args.posonlyargs + func.args.args + func.args.kwonlyargs]
    if func.args.vararg:
        args.append(func.args.vararg.arg)
    if func.args.kwarg:
        args.append(func.args.kwarg.arg)
    missing = []
    for name in args:
        ok = False
        for m in re.finditer(r"(?<![\w.])%s(?!\w)" % re.escape(name), doc):
            rest = doc[m.end():]
            end = _CLAUSE_END.search(rest)
            clause = rest[:end.start()] if end else rest
            if _UNIT.search(clause):
                ok = True
                break
        if not ok:
            missing.append(name)
    return missing


# Known gaps in modules owned by others, reported to their owners; each entry must still
# fail the rule (strict), so the list can only shrink: remove an entry once it is fixed.
PENDING = {}


@pytest.mark.parametrize("path", MODULES, ids=_ids)
def test_public_functions_document_a_unit_for_every_argument(path):
    _, tree = _tree(path)
    problems = {}
    for node in tree.body:  # module level only: class methods are exempt
        if isinstance(node, ast.FunctionDef) and not node.name.startswith("_"):
            missing = _undocumented_arguments(node)
            pending = PENDING.get((os.path.basename(path), node.name))
            if pending is not None:
                assert missing == pending, "PENDING entry for %s is out of date: %s" % (node.name, missing)
            elif missing:
                problems[node.name] = missing
    assert problems == {}


def test_the_unit_rule_catches_what_it_should():
    good = ast.parse('def f(a, b):\n    """Sum.\n\n    a: first [m]; b: second [m]. Returns [m]."""\n').body[0]
    assert _undocumented_arguments(good) == []
    no_unit = ast.parse('def f(a, b):\n    """Sum.\n\n    a: first [m]; b: second. Returns [m]."""\n').body[0]
    assert _undocumented_arguments(no_unit) == ["b"]
    no_doc = ast.parse("def f(a):\n    return a\n").body[0]
    assert _undocumented_arguments(no_doc) == ["(no docstring)"]


# --- the same core, run inside the real MicroPython interpreter --------------------------

_MPY_CASE = """
import json
from estimator.core.atmosphere import site_air, standard_atmosphere
from estimator.core.hover import hover_estimate
from estimator.core.motor import rotor_operating_point
from estimator.core.propulsion import shared_operating_point
from estimator.core.propeller_bemt import propeller_coefficients
V = json.loads(VEHICLE_JSON)
air = site_air(1400.0, 28.0, None, 40.0)
est = hover_estimate(V["mass_kg"], 4, "flat", air["density_kg_m3"], V["motor"], V["propeller"],
                     V["battery"], 0.95)
coax = hover_estimate(V["mass_kg"], 4, "coaxial", air["density_kg_m3"], V["motor"], V["propeller"],
                      V["battery"], 0.95)
op = rotor_operating_point(0.7, 14.8, 1.1, V["motor"], V["propeller"], 0.95)
sh = shared_operating_point(1.0, 16.8, 0.02, 4, 1.1, V["motor"], V["propeller"], 0.95)
out = [standard_atmosphere(5000.0)[2], air["density_kg_m3"], air["density_altitude_m"],
       est["hover_command"], est["hover_command_empty"], est["thrust_to_weight"], est["flight_time_min"],
       coax["hover_power_W"], op["thrust_N"], op["bus_current_A"], sh["bus_V"], sh["total_thrust_N"]]
bemt = propeller_coefficients(0.254, 0.1143, 3, 6000.0, 1.1, 1.8e-5)
out += [bemt["ct"], bemt["cp"], est["discharge"]["charge_used_Ah"]]
print("RESULT " + " ".join(repr(x) for x in out))
"""


def _run_case_here(vehicle_json):
    import contextlib
    import io
    buf = io.StringIO()
    with contextlib.redirect_stdout(buf):
        exec(compile("VEHICLE_JSON = %r\n" % vehicle_json + _MPY_CASE, "case", "exec"), {})
    return buf.getvalue()


def test_core_gives_the_same_numbers_on_micropython(tmp_path):
    # The core modules are written into the interpreter's file system as the package
    # estimator.core and the demo hover estimate is run there (MicroPython 1.27, WebAssembly
    # port from npm, double-precision floats). Same algorithm, same IEEE doubles: results
    # must agree with CPython to 1e-12 relative (libm differences in exp/log/pow only).
    import json
    import sys
    sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
    from mpy_harness import run_micropython
    from estimator.demo.scenario import DEMO_VEHICLE

    vehicle_json = json.dumps(DEMO_VEHICLE)
    writes = ["import os", "for d in ('/lib/estimator', '/lib/estimator/core'):",
              "    try:\n        os.mkdir(d)\n    except OSError:\n        pass",
              "open('/lib/estimator/__init__.py', 'w').close()"]
    for path in MODULES:
        with open(path, encoding="utf-8") as fh:
            writes.append("with open(%r, 'w') as f:\n    f.write(%r)"
                          % ("/lib/estimator/core/" + os.path.basename(path), fh.read()))
    script = "\n".join(writes) + "\nVEHICLE_JSON = %r\n" % vehicle_json + _MPY_CASE
    mpy_out = run_micropython(script, tmp_path=tmp_path, timeout=120)
    here = _run_case_here(vehicle_json)
    mpy_vals = [float(x) for x in [l for l in mpy_out.splitlines() if l.startswith("RESULT")][0].split()[1:]]
    cpy_vals = [float(x) for x in [l for l in here.splitlines() if l.startswith("RESULT")][0].split()[1:]]
    assert len(mpy_vals) == len(cpy_vals) == 15
    for a, b in zip(mpy_vals, cpy_vals):
        assert a == pytest.approx(b, rel=1e-12)
