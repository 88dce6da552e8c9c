"""What fit, export and firmware say about the set they write or read (new-user trial 7,
findings 4, 6, 10 and 11's bench items).

The sweep is the trial's invented rotor re-created in tests/test_fit_glitch_trial7.py (DC
motor 1300 Kv on a 7 in propeller, supply 25.2 V behind 0.05 ohm), the vehicle the trial's
invented 7 in long-range quad at a 2200 m site: on its nominal pack full command sags the
bus below the loaded cutoff, so the thrust-to-weight judged is the one reachable at the
cutoff. Every command runs through click's CliRunner in tmp_path; exit code, stdout and
stderr are checked apart.
"""

import json
import os
import re

import pytest

from test_fit_glitch_trial7 import G0, _trial_csv
from trial_helpers import ok, refused, run

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
VEHICLE = {"name": "INVENTED 7in long-range quad 6S", "mass": "950g", "rotors": {"count": 4},
           "propeller": {"size": "7x3.5in", "blades": 2},
           "motor": {"kv_rpm_per_V": 1300, "resistance_ohm": 0.065, "no_load_current_A": 1.1,
                     "max_current_A": 35},
           "battery": {"cells": 6, "capacity": "1800mAh", "resistance": "30mohm", "full_cell_V": 4.2,
                       "nominal_cell_V": 3.7, "empty_cell_V": 3.5, "max_discharge_C": 80},
           "esc": {"efficiency": 0.95},
           "site": {"altitude": "2200m", "temperature": "30C", "humidity": "20%"}}


@pytest.fixture(scope="module")
def fitted(tmp_path_factory):
    """(folder, bench CSV, vehicle file, sealed parameter set, the fit's text output)."""
    d = tmp_path_factory.mktemp("trial7")
    csv = _trial_csv(d / "bench.csv")
    vehicle = d / "v7lr.json"
    vehicle.write_text(json.dumps(VEHICLE))
    return d, csv, vehicle, d / "p.json", ok("fit", csv, "--vehicle", vehicle, "--out", d / "p.json")


def _edited(fitted, tmp_path):
    """A copy of the sealed set with thrust_max_N changed by hand (the trial's p01 file)."""
    text = fitted[3].read_text()
    edited = re.sub(r'"thrust_max_N": [0-9.]+', '"thrust_max_N": 30.0', text, count=1)
    assert edited != text
    path = tmp_path / "p_edited.json"
    path.write_text(edited)
    assert "EDITED" in run("check", path)[1]  # check flags it (the loudness to match)
    return path


def _words(text):
    return " ".join(text.split())


def test_fit_summary_gives_the_hover_sheets_judged_thrust_to_weight(fitted):
    d, _, vehicle, params, fit_text = fitted
    code, sheet, err = run("hover", vehicle, "--params", params)
    assert code == 0, err
    judged = re.search(r"thrust-to-weight\s+(\S+)\s+\(judged", sheet).group(1)
    assert judged.endswith("*")  # this pack cannot reach full command: the reachable value
    # before: the fit said 'thrust-to-weight 5.91 (motor model at the sagged bus 21.98 V)'
    assert "thrust-to-weight %s (*: reachable at command" % judged in _words(fit_text)
    full = re.search(r"full command would give (\S+) but", _words(sheet)).group(1)
    assert "full command would give %s but is NOT REACHABLE" % full in _words(fit_text)


def test_export_says_the_top_thrust_is_at_the_reference_voltage_above_what_was_measured(fitted, tmp_path):
    d, csv, _, params, _ = fitted
    exported = ok("export", params)
    top_g = int(re.search(r"liftcurve\.top_grams\s+(\d+) gf", exported).group(1))
    # the highest thrust measured, from the CSV itself: the mean of the four rows at full
    # command (2000 us), the top of the sweep (grams-force column)
    rows = [line.split(",") for line in csv.read_text().splitlines()[5:]]
    top_rows = [float(r[4]) for r in rows if r[1] == "2000"]
    measured = sum(top_rows) / len(top_rows)
    assert top_g > max(float(r[4]) for r in rows)  # the curve at the reference voltage: above every reading
    ref = json.loads(params.read_text())["thrust_curve"]["reference_voltage_V"]
    text = _words(exported)
    assert ("liftcurve.top_grams %d gf is the curve's full-command thrust at supply.reference_volts = %.2f V, "
            "ABOVE the highest thrust the sweep measured" % (top_g, ref)) in text
    # and the fit's own warnings about it, carried along (before: none of them)
    assert "! fit: full-command thrust %d g is the curve at the reference voltage" % top_g in text
    assert "above the highest thrust measured (%d g)" % round(measured) in text
    # under --json stdout holds the settings object only; the notes go to stderr
    code, js, notes = run("export", params, "--json")
    assert code == 0
    assert json.loads(js)["liftcurve.top_grams"] == top_g
    assert "ABOVE the highest thrust the sweep measured" in _words(notes)
    # a settings file written with --json carries them too
    out = tmp_path / "s.json"
    assert run("export", params, "--json", "--out", out)[0] == 0
    assert any("ABOVE the highest thrust" in w for w in json.loads(out.read_text())["warnings"])
    assert G0 * top_g / 1000.0 == pytest.approx(json.loads(params.read_text())["thrust_curve"]["thrust_max_N"],
                                                rel=2e-3)  # 1 gf = 9.80665 mN (CGPM 1901); 0-decimal rounding


def test_firmware_refuses_an_edited_set_unless_asked_and_then_says_so_first(fitted, tmp_path):
    edited = _edited(fitted, tmp_path)
    line = refused("firmware", edited, "--out", tmp_path / "board")  # one error: line, exit 2, no traceback
    assert line.startswith("error: %s was EDITED since liftcal wrote it" % edited)
    assert "--from-edited" in line
    assert not (tmp_path / "board").exists()  # no bundle, not half a bundle
    said = _words(ok("firmware", edited, "--out", tmp_path / "board", "--from-edited"))
    assert said.startswith("WARNING: %s was EDITED since liftcal wrote it" % edited)
    assert "the board bundle carries the edited values" in said
    code, js, _ = run("firmware", edited, "--out", tmp_path / "board2", "--from-edited", "--json")
    assert code == 0
    assert "EDITED" in json.loads(js)["warnings"][0]
    # an untouched set: no word about edits
    code, clean, _ = run("firmware", fitted[3], "--out", tmp_path / "board3")
    assert code == 0 and "EDITED" not in clean


def test_the_bundles_own_files_say_the_set_was_edited(fitted, tmp_path):
    # the command said WARNING, but the bundle itself (what is flashed and kept) did not: its
    # generated CONFIG module and its README now carry the same line, the untouched set's do not
    edited = _edited(fitted, tmp_path)
    ok("firmware", edited, "--out", tmp_path / "board", "--from-edited")
    config = (tmp_path / "board" / "liftwatch_config.py").read_text().splitlines()
    assert config[1] == ("# WARNING: %s was EDITED since liftcal wrote it (its content seal no longer matches): "
                         "the board bundle carries the edited values, not the fit's (--from-edited)" % edited)
    readme = _words((tmp_path / "board" / "README.md").read_text())
    assert readme.startswith("# liftwatch: the onboard power watch bundle **WARNING:** %s was EDITED since "
                             "liftcal wrote it" % edited)
    ok("firmware", fitted[3], "--out", tmp_path / "clean")
    for name in ("liftwatch_config.py", "README.md"):
        assert "EDITED" not in (tmp_path / "clean" / name).read_text()
    # a line break in the file's name stays inside the comments: the module still holds CONFIG only
    # (Python language reference, 2.1.3: a comment ends at the end of the physical line)
    odd = tmp_path / "p_ed\nited.json"
    odd.write_text(edited.read_text())
    ok("firmware", odd, "--out", tmp_path / "odd", "--from-edited")
    text = (tmp_path / "odd" / "liftwatch_config.py").read_text()
    assert "# WARNING: %r was EDITED" % str(odd) in text  # escaped as every printed name (estimator.names)
    names = {}
    exec(compile(text, "liftwatch_config.py", "exec"), names)
    assert sorted(k for k in names if k != "__builtins__") == ["CONFIG"]


def test_the_voltage_warning_names_full_command_on_a_full_pack(fitted):
    # the fitted route warned of bus voltages beyond the sweep at the hovers and at full command on
    # a nominal pack, but not at full command on a full pack, where the current limits are judged
    d, _, vehicle, params, fit_text = fitted
    from test_preflight_trial7 import QUAD, hand_full_command

    report = json.loads(ok("hover", vehicle, "--params", params, "--json"))
    swept = json.loads(params.read_text())["thrust_curve"]
    lo, hi = swept["voltage_min_V"], swept["voltage_max_V"]
    full_bus = report["current_judged_bus_V"]
    # the full pack's full-command bus against the independent solve of the sweep's own rotor (the
    # DC motor and propeller of tests/test_fit_glitch_trial7.py: CT 0.105, CP 0.046, ESC 96 %, on
    # this 6S 30 mohm pack at 2200 m, 30 C): the fit extrapolates it within 1 %
    truth = dict(QUAD, propeller={"ct": 0.105, "cp": 0.046}, esc={"efficiency": 0.96})
    assert full_bus == pytest.approx(hand_full_command(4.2, truth)[3], rel=0.01)
    assert full_bus < 0.98 * lo  # beyond the sweep by more than range_warnings' 2 % tolerance
    entry = "%.1f V (full command, full pack: %.0f %% below)" % (full_bus, 100.0 * (1.0 - full_bus / lo))
    swept_text = "the bench sweep ran at %.1f..%.1f V" % (lo, hi)
    # one warning line, in hover --params and in the fit's vehicle summary
    warned = [w for w in report["warnings"] if w.startswith("bus voltage beyond the bench sweep")]
    assert len(warned) == 1 and entry in warned[0] and swept_text in warned[0]
    assert "%.1f V (full command, nominal pack: %.0f %% below)" % (
        report["full_bus_V"], 100.0 * (1.0 - report["full_bus_V"] / lo)) in warned[0]
    printed = [" ".join(w.split()) for w in ("\n" + fit_text).split("\n! ")[1:]]
    in_fit = [w for w in printed if w.startswith("bus voltage beyond the bench sweep")]
    assert len(in_fit) == 1 and entry in in_fit[0]
    # the fit's vehicle line names the pack state of its hover bus voltage too
    assert "(motor model at the sagged hover bus %.2f V, nominal pack)" % report["hover_bus_V"] in _words(fit_text)
    assert "where a nominal pack reaches its loaded cutoff" in _words(fit_text)


def test_export_refuses_an_edited_set_unless_asked_and_then_says_so_first(fitted, tmp_path):
    edited = _edited(fitted, tmp_path)
    line = refused("export", edited, "--out", tmp_path / "s.txt")
    assert line.startswith("error: %s was EDITED" % edited) and "--from-edited" in line
    assert not (tmp_path / "s.txt").exists()
    assert _words(ok("export", edited, "--from-edited", "--out", tmp_path / "s.txt")).startswith(
        "WARNING: %s was EDITED" % edited)
    assert "# WARNING: %s was EDITED" % edited in (tmp_path / "s.txt").read_text()  # the file says it too
    code, js, warned = run("export", edited, "--from-edited", "--json")
    assert code == 0 and json.loads(js)["liftcurve.top_grams"] == 3059  # 30 N x 101.97 gf/N
    assert warned.startswith("WARNING: %s was EDITED" % edited)


def test_firmware_says_when_it_replaces_its_own_bundle(fitted, tmp_path):
    board = tmp_path / "board"
    code, first, _ = run("firmware", fitted[3], "--out", board)
    assert code == 0 and "replaced" not in first
    again = _words(ok("firmware", fitted[3], "--out", board))
    assert again.count("replaced ") == 1
    assert "replaced %s: a power-watch bundle liftcal wrote" % board in again
    js = run("firmware", fitted[3], "--out", board, "--json")[1]
    # ... and the parameter set it was made from (new-user trial 12, finding 14)
    assert json.loads(js)["replaced"] == ["replaced %s: a power-watch bundle liftcal wrote from %s" % (board, fitted[3])]
    assert json.loads(run("firmware", fitted[3], "--out", tmp_path / "new", "--json")[1])["replaced"] == []


@pytest.mark.parametrize("missing", ["", "nan", "NaN", "-nan"])
def test_a_nan_cell_is_a_missing_reading_like_an_empty_one(fitted, tmp_path, missing):
    rows = fitted[1].read_text().splitlines()
    cells = rows[40].split(",")
    cells[3] = missing                  # current of one row
    rows[40] = ",".join(cells)
    cells = rows[60].split(",")
    cells[2] = ""                       # voltage of another, empty
    rows[60] = ",".join(cells)
    csv = tmp_path / "b.csv"
    csv.write_text("\n".join(rows) + "\n")
    said = ok("fit", csv, "--out", tmp_path / "p.json")  # before: 'nan' refused the file
    rejected = json.loads((tmp_path / "p.json").read_text())["fit_quality"]["rejected"]
    assert rejected == {"empty_or_nan_cell": 2}  # before: {"not_a_number": ...} for an empty cell
    assert "empty_or_nan_cell 2" in said


def test_readme_lists_the_units_the_reader_takes():
    from estimator.bench.columns import OPTIONAL, UNITS

    with open(os.path.join(ROOT, "README.md"), encoding="utf-8") as fh:
        readme = fh.read()
    for name, units in list(UNITS.items()) + list(OPTIONAL.items()):
        for unit in units:
            assert "`%s[%s]`" % (name, unit) in readme or "`[%s]`" % unit in readme, (name, unit)
    help_text = run("fit", "--help")[1]
    assert "torque[N*m|mN*m]" in help_text


def test_readme_states_the_python_version_beside_the_install_command():
    with open(os.path.join(ROOT, "README.md"), encoding="utf-8") as fh:
        readme = fh.read()
    with open(os.path.join(ROOT, "pyproject.toml"), encoding="utf-8") as fh:
        needs = re.search(r'requires-python\s*=\s*">=(\d+\.\d+)"', fh.read()).group(1)
    install = readme.index("pip install -q . && .venv/bin/liftcal demo")
    before = readme[readme.rindex("##", 0, install):install]  # the same section, above the command
    assert "Python %s or newer" % needs in _words(before)
    assert "couple of minutes without printing anything" in _words(before)
