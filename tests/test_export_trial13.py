"""Export findings of new-user trial 13 (8, 9 and the '(8)' of 12), each checked by arithmetic
done here, outside the exporter (common practice: a value exported through a map can be checked by
hand; a file's name ending says its format, as fit's parameter sets end in .json).

- 8: a map with scale 0 was accepted (every setting the offset alone), its trace line printed the
  source as 0, and a non-zero value rounded to 0.00 without a word;
- 9: export --out wrote the lines into 'fresh.json' and JSON into 'fresh.txt';
- 12: the settings header said '(8)' without saying what it counts.
"""

import json

from estimator.bench.export import export_settings, format_lines
from io_helpers import PARAMS, refused, run, tree_digest

import pytest

SHARE = json.load(open(PARAMS))["thrust_curve"]["quadratic_share"]


def _map(tmp_path, entries, name="m.json"):
    path = tmp_path / name
    path.write_text(json.dumps({"schema_version": 1, "model": "liftcal.map/1", "settings": entries}))
    return path


def test_a_map_with_scale_zero_is_refused_with_its_json_path(tmp_path):
    path = _map(tmp_path, [{"name": "a.bend", "source": "thrust_curve.quadratic_share", "scale": 0,
                            "decimals": 3, "min": 0, "max": 1}])
    before = tree_digest(tmp_path)
    line = refused(["export", PARAMS, "--map", path, "--out", tmp_path / "s.txt"],
                   "$.settings[0].scale: 0 is not allowed", "offset alone")
    assert "Traceback" not in line and tree_digest(tmp_path) == before      # no file written


def test_a_scaled_trace_shows_the_true_source_value():
    # 0.769 x 1e-9 = 7.7e-10: below a millionth of the last digit at 3 decimals, yet the source
    # is no float noise; the trace must say what the set holds (before: '= 0 - x 1e-09')
    mapping = {"settings": [{"name": "a.tiny", "source": "thrust_curve.quadratic_share", "scale": 1e-9,
                             "decimals": 3}]}
    line = format_lines(export_settings(json.load(open(PARAMS)), mapping)).strip()
    assert "thrust_curve.quadratic_share = %.6g - x 1e-09" % SHARE in line, line


def test_float_noise_of_a_fit_at_its_bound_still_shows_as_zero():
    # new-user trial 11, finding 12 stays fixed: 1.26587e-24 is noise, shown as 0
    params = json.load(open(PARAMS))
    params["motor_model"]["command_start"] = 1.26587e-24
    mapping = {"settings": [{"name": "a.start", "source": "motor_model.command_start", "scale": 1000,
                             "offset": 1000, "decimals": 0}]}
    assert "motor_model.command_start = 0 - x 1000 + 1000" in format_lines(export_settings(params, mapping))


def test_a_value_that_rounds_to_zero_is_warned_about(tmp_path):
    # share x 0.001 is below 0.005, half the last digit at 2 decimals: round() gives 0.00
    assert 0 < SHARE * 0.001 < 0.005
    path = _map(tmp_path, [{"name": "a.tiny", "source": "thrust_curve.quadratic_share", "scale": 0.001,
                            "decimals": 2, "unit": "-"},
                           {"name": "a.pct", "source": "thrust_curve.quadratic_share", "scale": 100,
                            "decimals": 0}])
    code, out, err = run(["export", PARAMS, "--map", path])
    said = " ".join(out.split())
    assert code == 0 and "a.tiny 0.00 -" in said
    assert "! a.tiny: thrust_curve.quadratic_share = %.6g - x 0.001 is %.3g, which rounds to 0 at 2 decimals" % (
        SHARE, SHARE * 0.001) in said
    assert "! a.pct" not in said          # 0.66 x 100 = 66 keeps the value
    code, out, err = run(["export", PARAMS, "--map", path, "--json"])
    assert code == 0 and "a.tiny: " in err and json.loads(out)["a.tiny"] == 0.0


@pytest.mark.parametrize("flag", [[], ["--json"]])
def test_out_follows_the_file_name(tmp_path, flag):
    as_json, as_lines = tmp_path / "fresh.json", tmp_path / "fresh.txt"
    for target in (as_json, as_lines):
        code, out, err = run(["export", PARAMS, "--out", target] + flag)
        assert code == 0, err
    doc = json.loads(as_json.read_text())
    assert doc["model"] == "liftcal.settings/1" and doc["settings"]["liftcurve.bend"] == round(SHARE, 3)
    assert as_lines.read_text().startswith("# liftcal settings from ")
    # a JSON settings file given where a parameter set belongs is named for what it is
    refused(["check", as_json], "is a settings file that liftcal export wrote")


def test_the_json_file_replaces_a_lines_file_of_the_same_name_and_says_what_it_wrote(tmp_path):
    target = tmp_path / "s1.json"
    assert run(["export", PARAMS, "--out", target])[0] == 0
    code, out, err = run(["export", PARAMS, "--out", target])
    assert code == 0 and "settings written to %s (a JSON document" % target in " ".join(out.split())
    assert json.loads(target.read_text())["model"] == "liftcal.settings/1"


def test_the_header_says_what_it_counts():
    code, out, _ = run(["export", PARAMS])
    header = " ".join(" ".join(out.split("\n! ")[0].split("\n")[0:3]).split())
    # the shipped example map has 8 entries (estimator/data/example-map.json)
    assert code == 0 and "example-map.json (8 settings);" in header, header
