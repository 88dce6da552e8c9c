"""Every command through click's CliRunner in tmp_path: exit code, stdout and stderr apart.

The group itself turns a user error into one ``error:`` line and exit 2 (estimator.cli), so
these runs go through the same path as the console script, without a subprocess.
Expected numbers come from outside the project where the command computes one (named beside
each check); elsewhere the checks are on the contract of design notes sec. 4.
"""

import json
import math
import os

import pytest
from click.testing import CliRunner

from estimator.cli import cli

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
EXAMPLES = os.path.join(ROOT, "schemas", "examples")
# the design notes' example vehicle (sec. 4), accepted as is
EXAMPLE_VEHICLE = {
    "name": "demo survey quad", "mass_kg": 2.05, "rotors": {"count": 4, "layout": "flat"},
    "propeller": {"diameter_m": 0.254, "ct": 0.110, "cp": 0.045},
    "motor": {"kv_rpm_per_V": 880, "resistance_ohm": 0.09, "no_load_current_A": 0.7, "max_current_A": 30},
    "battery": {"cells": 4, "capacity_Ah": 5.0, "resistance_ohm": 0.02, "full_cell_V": 4.2,
                "nominal_cell_V": 3.7, "empty_cell_V": 3.5, "usable_fraction": 0.8},
    "esc": {"efficiency": 0.95},
    "site": {"altitude_m": 1400, "temperature_C": 28, "humidity_pct": 40},
}


def invoke(tmp_path, *args):
    # every path given is absolute (under tmp_path or the repository's examples)
    return CliRunner().invoke(cli, list(args), catch_exceptions=False)


def one_json(res):
    assert res.exit_code == 0, res.stderr
    return json.loads(res.stdout)  # exactly one JSON object: json.loads refuses trailing text


def test_air_json_matches_the_1976_standard_at_sea_level(tmp_path):
    res = invoke(tmp_path, "air", "--altitude", "0m", "--json")
    out = one_json(res)
    # US Standard Atmosphere 1976, sea level: 1.225 kg/m^3, 288.15 K, 101325 Pa (table values)
    assert out["density_kg_m3"] == pytest.approx(1.225, rel=1e-4)
    assert out["temperature_K"] == pytest.approx(288.15, abs=1e-9)
    assert out["pressure_Pa"] == pytest.approx(101325.0, rel=1e-9)
    assert res.stderr == ""


def test_static_json_is_momentum_theory_and_text_ranges_read_low_to_high(tmp_path):
    out = one_json(invoke(tmp_path, "static", "--diameter", "0.3m", "--power", "100", "--density",
                          "1.2", "--json"))
    # actuator disk, hand formula: T_ideal = (2 rho A P^2)^(1/3) (Glauert / Leishman ch. 2, from memory)
    area = math.pi * 0.15 ** 2
    assert out["ideal_thrust_N"] == pytest.approx((2 * 1.2 * area * 100.0 ** 2) ** (1 / 3), rel=1e-12)
    text = invoke(tmp_path, "static", "--diameter", "10in", "--thrust", "5N").stdout
    line = [l for l in text.splitlines() if "good small sets" in l][0]
    lo, hi = (part.split(" W")[0] for part in line.split(": ")[1].split(" .. "))
    assert float(lo) < float(hi), line  # issue 9: was printed "31..19 W"
    assert "W (k 0.7) .. " in line and "W (k 0.5)" in line  # each factor beside the power it needs


def test_hover_on_the_design_notes_example(tmp_path):
    path = tmp_path / "vehicle.json"
    path.write_text(json.dumps(EXAMPLE_VEHICLE))
    out = one_json(invoke(tmp_path, "hover", str(path), "--json"))
    for key in ("hover_command", "hover_command_full", "hover_command_empty", "hover_thrust_fraction",
                "thrust_to_weight", "hover_current_A", "hover_power_W", "flight_time_min", "warnings"):
        assert key in out, key
    assert out["hover_command_full"] <= out["hover_command"] <= out["hover_command_empty"]
    text = invoke(tmp_path, "hover", str(path))
    assert text.exit_code == 0 and "tethered" in text.stdout and text.stderr == ""


@pytest.mark.parametrize("name", sorted(n for n in os.listdir(os.path.join(EXAMPLES, "invalid"))
                                        if n.startswith("params-")))
def test_check_refuses_each_invalid_example_with_one_line(tmp_path, name):
    res = invoke(tmp_path, "check", os.path.join(EXAMPLES, "invalid", name))
    assert res.exit_code == 2 and res.stdout == ""
    assert res.stderr.startswith("error: ") and res.stderr.count("\n") == 1, res.stderr
    assert name in res.stderr  # names the file


def test_check_accepts_the_valid_examples(tmp_path):
    for name in sorted(os.listdir(os.path.join(EXAMPLES, "valid"))):
        if name.startswith("params-"):
            res = invoke(tmp_path, "check", os.path.join(EXAMPLES, "valid", name))
            assert res.exit_code == 0, (name, res.stderr)


def test_export_text_and_json(tmp_path):
    params = os.path.join(EXAMPLES, "valid", "params-demo-with-hover.json")
    text = invoke(tmp_path, "export", params)
    assert text.exit_code == 0 and text.stderr == ""
    lines = text.stdout.splitlines()
    # one line per setting (a line too long for 80 columns continues indented at its arrow)
    settings = [l for l in lines if not l.startswith((" ", "#", "!"))]  # '! ' notes follow them
    assert lines[0].startswith("# ") and text.stdout.count("<- ") == len(settings)
    mapping = one_json(invoke(tmp_path, "export", params, "--json"))
    assert len(mapping) == len(settings)


def test_unknown_command_and_missing_file_are_one_error_line(tmp_path):
    res = invoke(tmp_path, "hover", str(tmp_path / "nope.json"))
    assert res.exit_code == 2 and res.stdout == "" and res.stderr.startswith("error: ")
    assert res.stderr.count("\n") == 1


def test_help_is_each_commands_docstring(tmp_path):
    # issue 10: help written once; the group's list shows each command's own first sentence
    from estimator.cli import COMMANDS
    import importlib
    res = invoke(tmp_path, "--help")
    assert res.exit_code == 0
    for name, (module, attr) in COMMANDS.items():
        first = getattr(importlib.import_module(module), attr).help.strip().splitlines()[0]
        assert first.split()[0] in res.stdout, name


@pytest.mark.parametrize("command", ["replay", "firmware"])
@pytest.mark.parametrize("bad", ["nan", "inf", "-5", "1e999"])
def test_lag_option_refuses_non_finite_and_negative(tmp_path, capsys, command, bad):
    # found by a new-user trial: --lag-ms nan ended in a ValueError traceback
    params = os.path.join(EXAMPLES, "valid", "params-demo-with-hover.json")
    flight = tmp_path / "f.csv"
    flight.write_text("time[s],command[-],voltage[V],current[A]\n0,0.5,15,10\n0.1,0.5,15,10\n")
    args = (["replay", str(flight), "--params", params] if command == "replay"
            else ["firmware", params, "--out", str(tmp_path / "b")])
    from estimator.cli import main  # the console entry: option errors as one line too
    with pytest.raises(SystemExit) as exc:
        main(args + ["--lag-ms", bad])
    out, err = capsys.readouterr()
    assert exc.value.code == 2 and out == "" and "--lag-ms" in err
    assert err.startswith("error: ") and err.count("\n") == 1


def _vehicle_with(tmp_path, name, **changes):
    doc = json.loads(json.dumps(EXAMPLE_VEHICLE))
    for dotted, value in changes.items():
        node = doc
        keys = dotted.split("__")
        for key in keys[:-1]:
            node = node[key]
        node[keys[-1]] = value
    path = tmp_path / name
    path.write_text(json.dumps(doc))
    return str(path)


def test_a_vehicle_that_barely_holds_its_weight_is_not_called_flyable(tmp_path):
    # found by a new-user trial: thrust-to-weight 1.05 at command 0.95 was printed "YES"
    heavy = _vehicle_with(tmp_path, "heavy.json", mass_kg=4.6)
    out = one_json(invoke(tmp_path, "hover", heavy, "--json"))
    assert out["hover_command"] is not None and out["thrust_to_weight"] < 1.3, out["thrust_to_weight"]
    assert out["flyable"] is False and out["not_flyable_because"]
    text = invoke(tmp_path, "hover", heavy).stdout
    assert "ONLY JUST" in text and "YES" not in text
    fine = one_json(invoke(tmp_path, "hover", _vehicle_with(tmp_path, "fine.json"), "--json"))
    assert fine["flyable"] is True and fine["not_flyable_because"] == []


def test_a_vehicle_that_cannot_hover_gets_its_cause_not_control_margin_advice(tmp_path):
    out = one_json(invoke(tmp_path, "hover", _vehicle_with(tmp_path, "brick.json", mass_kg=6.5), "--json"))
    assert out["hover_command"] is None and out["flyable"] is False
    assert not any("little left for control" in w for w in out["warnings"]), out["warnings"]
