"""`liftcal export`: mapping arithmetic, bounds refused (not clipped), invented example names.

The arithmetic is checked against hand-computed values from the shipped valid example
(value * scale + offset, rounded half-to-even by Python's round, PEP 3141 / IEEE 754).
"""

import json
import os
import re

import pytest

from estimator.cli import main
from estimator.errors import InputError
from estimator.bench.export import EXAMPLE_MAP, as_mapping, export_settings, format_lines, load_map
from estimator.params import load_params

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
WITH_HOVER = os.path.join(ROOT, "schemas", "examples", "valid", "params-demo-with-hover.json")
NO_HOVER = os.path.join(ROOT, "schemas", "examples", "valid", "params-demo-no-vehicle.json")


def _map(tmp_path, settings):
    path = tmp_path / "map.json"
    path.write_text(json.dumps({"schema_version": 1, "model": "liftcal.map/1", "settings": settings}))
    return str(path)


def test_scale_offset_and_rounding(tmp_path):
    params = load_params(WITH_HOVER)
    mapping = load_map(_map(tmp_path, [
        {"name": "A_PULSE", "source": "thrust_curve.command_min", "scale": 1000, "offset": 1000, "decimals": 0},
        {"name": "B_QUAD", "source": "thrust_curve.quadratic_share", "decimals": 2},
        {"name": "C_LOW", "source": "hover.hover_command_interval_95.0", "decimals": 4},
    ]))
    out = as_mapping(export_settings(params, mapping))
    c, h = params["thrust_curve"], params["hover"]
    # hand arithmetic: 1000 + 1000 u_min rounded to an integer pulse, a to two decimals
    assert out["A_PULSE"] == int(round(1000 + 1000 * c["command_min"])) and isinstance(out["A_PULSE"], int)
    assert out["B_QUAD"] == round(c["quadratic_share"], 2)
    assert out["C_LOW"] == round(h["hover_command_interval_95"][0], 4)


def test_out_of_bounds_is_refused_not_clipped(tmp_path):
    params = load_params(WITH_HOVER)
    path = _map(tmp_path, [{"name": "X_HOVER", "source": "hover.hover_command", "scale": 1000,
                            "decimals": 0, "min": 0, "max": 300}])
    with pytest.raises(InputError, match=r"X_HOVER.*outside the setting's bounds.*not clipped"):
        export_settings(params, load_map(path), path)


def test_missing_hover_values_point_to_fit_with_vehicle(tmp_path):
    params = load_params(NO_HOVER)
    path = _map(tmp_path, [{"name": "X_HOVER", "source": "hover.hover_command"}])
    with pytest.raises(InputError, match=r"\$\.settings\[0\].*--vehicle"):
        export_settings(params, load_map(path), path)


def test_source_that_is_not_a_number(tmp_path):
    params = load_params(WITH_HOVER)
    path = _map(tmp_path, [{"name": "X", "source": "provenance.input_file"}])
    with pytest.raises(InputError, match="not a number"):
        export_settings(params, load_map(path), path)


def test_example_map_uses_invented_names_only():
    # project rule: the shipped example never uses a real firmware's parameter names; ours are
    # dotted lower-case names of our own (group.setting), unlike the upper-case names such
    # firmware uses, and the file says it is invented
    mapping = load_map(EXAMPLE_MAP)
    assert all(re.fullmatch(r"[a-z]+\.[a-z_]+", s["name"]) for s in mapping["settings"])
    assert "INVENTED" in mapping["description"]


def test_cli_lines_and_json(tmp_path, capsys):
    with pytest.raises(SystemExit) as exc:
        main(["export", WITH_HOVER])
    out, _ = capsys.readouterr()
    assert exc.value.code == 0
    params = load_params(WITH_HOVER)
    expected = export_settings(params, load_map(EXAMPLE_MAP))
    # the text printed: each value in its map decimals, a line too long for 80 columns continued
    # at its arrow; joined back, the lines are format_lines' own
    from estimator.commands.bench import in_map_decimals
    # the settings and their header; the notes after them start with '! ' (the fit's warnings)
    lines = [l for l in out.replace("\n    <- ", "  <- ").splitlines()
             if l.startswith("#") or not l.startswith((" ", "!"))]
    body = format_lines(in_map_decimals(expected, load_map(EXAMPLE_MAP))).splitlines()
    assert lines[0].startswith("# liftcal settings from ")
    assert [" ".join(l.split()) for l in lines[1:]] == [" ".join(l.split()) for l in body]
    # our own layout: value with its unit, then the key it came from with its value and the arithmetic
    hover = params["hover"]["hover_command"]
    assert re.fullmatch(r"hoverpoint\.command_permille +%d permille  <- hover\.hover_command = %s - x 1000"
                        % (int(round(1000 * hover)), re.escape("%.6g" % hover)), lines[1]), lines[1]
    top = [l for l in lines if l.startswith("liftcurve.top_grams")][0]
    assert re.search(r"gf +<- thrust_curve\.thrust_max_N = ", top) and top.endswith(" N x 101.972")
    assert not any(re.fullmatch(r"\S+ \S+", l) for l in lines)  # never the bare "NAME value" layout
    assert out.split("\n! ", 1)[1]  # notes follow the settings (new-user trial 7, finding 4)
    target = tmp_path / "settings.json"
    with pytest.raises(SystemExit) as exc:
        main(["export", WITH_HOVER, "--json", "--out", str(target)])
    out, _ = capsys.readouterr()
    assert exc.value.code == 0 and json.loads(out) == as_mapping(expected)
    # the file carries its model (liftcal knows it as its own later; outputs.py)
    kept = json.loads(target.read_text())
    assert kept["model"] == "liftcal.settings/1" and kept["settings"] == as_mapping(expected)


def test_cli_refusal_is_one_error_line_and_no_file(tmp_path, capsys):
    path = _map(tmp_path, [{"name": "X_HOVER", "source": "hover.hover_command", "max": 0.1}])
    target = tmp_path / "out.txt"
    with pytest.raises(SystemExit) as exc:
        main(["export", WITH_HOVER, "--map", path, "--out", str(target)])
    out, err = capsys.readouterr()
    assert exc.value.code == 2 and out == "" and err.startswith("error: ") and err.count("\n") == 1
    assert not target.exists()


def test_source_units_come_from_key_suffixes():
    # the naming rule (DEVELOPERS.md glossary): a key's suffix is its unit
    from estimator.bench.export import source_unit
    assert source_unit("thrust_curve.thrust_max_N") == "N"
    assert source_unit("thrust_curve.reference_voltage_V") == "V"
    assert source_unit("bench_air.density_kg_m3") == "kg/m^3"
    assert source_unit("hover.hover_command_interval_95.0") == "-"
    assert source_unit("thrust_curve.quadratic_share") == "-"


def test_compound_key_units_read_as_their_quotient():
    # the naming rule (DEVELOPERS.md glossary and parameter-set layout): slope_per_N is 1/N,
    # linear_W_per_N W/N, sqrt_W_per_N0_5 W/N^0.5, thrust_per_V2_N (T = a s^2) N/V^2,
    # speed_current_A_per_V A/V; a key ending _per_N was shown as "N"
    from estimator.bench.export import source_unit
    assert source_unit("static_factor.slope_per_N") == "1/N"
    assert source_unit("standard_errors.slope_per_N") == "1/N"
    assert source_unit("power_model.linear_W_per_N") == "W/N"
    assert source_unit("power_model.sqrt_W_per_N0_5") == "W/N^0.5"
    assert source_unit("power_model.induced_W_per_N1_5") == "W/N^1.5"
    assert source_unit("power_model.copper_W_per_N2") == "W/N^2"
    assert source_unit("motor_model.thrust_per_V2_N") == "N/V^2"
    assert source_unit("motor_model.current_per_V2_A") == "A/V^2"
    assert source_unit("motor_model.speed_current_A_per_V") == "A/V"
    assert source_unit("motor_model.resistance_ohm") == "ohm"
    assert source_unit("vehicle.mass_kg") == "kg"
    assert source_unit("hover.flight_time_min") == "min"
    # per rotor is not a unit; a command's _min is its minimum, not minutes
    assert source_unit("hover.thrust_per_rotor_N") == "N"
    assert source_unit("thrust_curve.command_min") == "-"
    assert source_unit("thrust_curve.command_swept_min") == "-"


def test_export_line_shows_per_N_unit(tmp_path, capsys):
    # what the builder saw: "<- static_factor.slope_per_N = -0.000... N"
    path = _map(tmp_path, [{"name": "K_SLOPE", "source": "static_factor.slope_per_N", "unit": "1/N"}])
    with pytest.raises(SystemExit) as exc:
        main(["export", WITH_HOVER, "--map", path])
    out, _ = capsys.readouterr()
    assert exc.value.code == 0
    line = [ln for ln in out.splitlines() if "slope_per_N =" in ln][0]
    assert line.rstrip().endswith(" 1/N"), line
