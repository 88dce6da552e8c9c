"""Wording within one output (trial 5, item 10), through the commands (io_helpers.run: exit
code, stdout and stderr apart): the fit's warnings speak the sweep's command unit, a start
command's error bar never reaches below zero, one cell is "1 cell", and the replay's mass
event reads as one sentence. The sweep and vehicles are invented (see tests/test_csv_header_hints).
"""

import json
import re

import pytest

from estimator.bench.wording import command_with_error
from estimator.preflight.warnings import command_words, margin_warnings
from io_helpers import VEHICLE, run
from test_csv_header_hints import AIR, _rows


def _vehicle(tmp_path, name="v.json", **edits):
    doc = json.loads(open(VEHICLE, encoding="utf-8").read())
    for key, value in edits.items():
        node = doc
        *path, last = key.split("__")
        for part in path:
            node = node[part]
        node[last] = value
    path = tmp_path / name
    path.write_text(json.dumps(doc))
    return path


def test_fit_warnings_speak_the_sweeps_command_unit(tmp_path):
    sweep = tmp_path / "s.csv"
    sweep.write_text(AIR + "command[us],voltage[V],current[A],thrust[gf]\n" + "\n".join(_rows(40)) + "\n")
    # 2.0 kg on this invented rotor hovers near 0.8 of full command: the margin warnings fire
    code, out, err = run(["fit", sweep, "--vehicle", _vehicle(tmp_path, mass_kg=2.0), "--out", tmp_path / "p.json"])
    assert code == 0, err
    warnings = " ".join(" ".join(out.split()).split(" ! ")[1:])
    assert re.search(r"hover command 1\d\d\d us at (empty|nominal|full) pack is above 1600 us", warnings), warnings
    assert not re.search(r"command \d?\.\d", warnings), warnings  # no fraction of full command left


@pytest.mark.parametrize("unit,text", [
    ("permille", "hover command 620 permille at empty pack is above 600 permille: little left"),
    ("%", "hover command 62.0 % at empty pack is above 60.0 %: little left"),
    ("us", "hover command 1620 us at empty pack is above 1600 us: little left"),
    ("-", "hover command 0.62 at empty pack is above 0.6 of full command: little left"),
])
def test_preflight_warnings_write_commands_in_the_sweeps_unit(unit, text):
    # the warnings take the unit and write it themselves (no rewriting of their English after
    # the fact): 0.62 of full command is 1620 us of a 1000..2000 us pulse, 62.0 %, 620 permille
    report = {"hover_command": 0.55, "hover_command_empty": 0.62, "hover_command_full": 0.5,
              "thrust_to_weight": 2.5, "density_ratio": 1.0}
    warned = [w for w in margin_warnings(report, unit) if w.startswith("hover command")]
    assert len(warned) == 1 and warned[0].startswith(text), warned
    assert command_words("0.950", "permille") == "950 permille" and command_words("0.950", "-") == "0.950"


def test_the_fits_own_warnings_are_not_rewritten_twice(tmp_path):
    # a % sweep that stops at 90 %: the fit's own warning is written in % once; the pre-flight
    # rewriting read its '90.0' as a fraction and printed 'command 9000.0 % %'
    sweep = tmp_path / "s.csv"
    cells = [r.split(",", 1) for r in _rows(40)]  # command in us of a 1000..2000 us pulse
    rows = ["%.1f,%s" % (0.1 * (float(us) - 1000.0), rest) for us, rest in cells if float(us) <= 1900.0]
    sweep.write_text(AIR + "command[%],voltage[V],current[A],thrust[gf]\n" + "\n".join(rows) + "\n")
    code, out, err = run(["fit", sweep, "--out", tmp_path / "p.json"])
    assert code == 0, err
    text = " ".join(out.split())
    # (full command is extrapolated from the sweep's top by the motor model: tests/test_fit_short_sweep.py)
    assert "the sweep stops at command 90.0 %: full-command thrust" in text and "to 100.0 %" in text, text
    assert "% %" not in text, text


def test_a_start_command_error_bar_is_bounded_at_zero():
    # 0.070 +- 0.180 would reach -0.110: a command is never below zero, so the bound is shown
    assert command_with_error(0.070, 0.180, "permille") == "70 permille (0..250 permille within one standard error)"
    assert command_with_error(0.070, 0.180, "us") == "1070 us (1000..1250 us within one standard error)"
    assert command_with_error(0.300, 0.012, "permille") == "300 permille +- 12 permille"


def test_one_cell_is_a_cell(tmp_path):
    path = _vehicle(tmp_path, mass_kg=0.1, battery__cells=1, battery__resistance_ohm=0.2,
                    motor__kv_rpm_per_V=3000, propeller={"diameter_m": 0.1, "ct": 0.11, "cp": 0.045})
    code, out, err = run(["hover", path])
    assert code == 0, err
    text = " ".join(out.split())
    assert "V on 1 cell)" in text and "1 cells" not in text, text


def test_replay_mass_event_is_one_sentence(tmp_path, params_file):
    from watch_helpers import flight_csv_once

    flight = tmp_path / "heavy.csv"
    flight.write_text(flight_csv_once(fault="heavy", seed=1))
    code, out, err = run(["replay", flight, "--params", params_file])
    assert code == 0, err
    text = " ".join(out.split())
    assert re.search(r"mass_high implied mass \d\.\d{3} kg against 2\.050 kg planned \(alarm above 2\.214 kg "
                     r"plus the estimate's margin\): a heavier payload, or a rotor or motor drawing more power "
                     r"than the bench fit since take-off\? check both", text), text
    # was: "...margin)  implied" / "all-up mass above plan (payload heavier than planned?)"
    assert "margin)  " not in out and "implied all-up" not in text, out
