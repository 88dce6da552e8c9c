"""Commands in the sweep's own unit beside the 0..1 values: `fit --json` and `hover --params`
(text and --json) carry hover_command_us (or _pct, _permille) as the fit's text does; the
parameter set keeps 0..1 only (schemas/params.schema.json: hover allows no other keys). A
1000..2000 us pulse is 0..1 of full command (the usual ESC pulse range, common practice)."""

import json

from io_helpers import VEHICLE, run
from test_csv_header_hints import AIR, _rows


def _fit(tmp_path, header="command[us]", convert=lambda us: us):
    sweep = tmp_path / "s.csv"
    cells = [r.split(",", 1) for r in _rows(40)]  # an invented sweep, command in us
    sweep.write_text(AIR + header + ",voltage[V],current[A],thrust[gf]\n"
                     + "\n".join("%s,%s" % (convert(float(us)), rest) for us, rest in cells) + "\n")
    params = tmp_path / "p.json"
    code, out, err = run(["fit", sweep, "--vehicle", VEHICLE, "--out", params, "--json"])
    assert code == 0, err
    return json.loads(out), params


def test_fit_json_gives_commands_in_the_sweeps_unit(tmp_path):
    out, params = _fit(tmp_path)
    # 1000 + 1000 u; 7 significant digits of a value stored to 6 (params._r): exact to 1e-3 us
    for key in ("command_min", "command_start", "hover_command"):
        assert abs(out[key + "_us"] - (1000.0 + 1000.0 * out[key])) < 1e-3, key
    assert [abs(a - (1000.0 + 1000.0 * b)) < 1e-3 for a, b in zip(out["hover_command_interval_95_us"],
                                                                     out["hover_command_interval_95"])] == [True] * 2
    stored = json.loads(params.read_text())
    assert not [k for k in stored["hover"] if k.endswith("_us")]  # the set itself stays 0..1 (its schema)
    code, _, err = run(["check", params])
    assert code == 0, err


def test_fit_json_in_percent(tmp_path):
    out, _ = _fit(tmp_path, "command[%]", lambda us: "%.2f" % (0.1 * (us - 1000.0)))
    assert abs(out["hover_command_pct"] - 100.0 * out["hover_command"]) < 1e-4
    assert "hover_command_us" not in out


def test_hover_params_sheet_and_json_give_the_sweeps_unit(tmp_path):
    _, params = _fit(tmp_path)
    code, out, err = run(["hover", VEHICLE, "--params", params, "--json"])
    assert code == 0, err
    report = json.loads(out)
    assert report["command_unit"] == "us"
    for key in ("hover_command", "hover_command_full", "hover_command_start"):
        assert abs(report[key + "_us"] - (1000.0 + 1000.0 * report[key])) < 1e-3, key
    code, out, err = run(["hover", VEHICLE, "--params", params])
    assert code == 0, err
    text = " ".join(out.split())
    assert "command %.2f (%.0f us) on a nominal pack" % (report["hover_command"],
                                                         1000.0 + 1000.0 * report["hover_command"]) in text, text
