"""Parameter-set and map schemas: shipped examples both ways, `liftcal check`, atomic writes.

External reference: the JSON Schema draft 2020-12 meta-schema, through the jsonschema
library's own check_schema (a schema that breaks the standard fails here).
"""

import glob
import json
import os

import jsonschema
import pytest

from estimator.cli import main
from estimator.errors import InputError
from estimator.bench.export import load_map
from estimator.params import load_params, write_params

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
EX = os.path.join(ROOT, "schemas", "examples")


def run(argv, capsys):
    with pytest.raises(SystemExit) as exc:
        main(argv)
    out, err = capsys.readouterr()
    return exc.value.code, out, err


@pytest.mark.parametrize("name", ["params.schema.json", "map.schema.json"])
def test_schemas_follow_draft_2020_12(name):
    # jsonschema's meta-schema check is the external reference for "valid draft 2020-12"
    with open(os.path.join(ROOT, "schemas", name)) as fh:
        schema = json.load(fh)
    assert schema["$schema"] == "https://json-schema.org/draft/2020-12/schema"
    jsonschema.Draft202012Validator.check_schema(schema)


def _descriptions(node, path="$"):
    if isinstance(node, dict):
        if "properties" in node:
            for key, sub in node["properties"].items():
                yield path + "." + key, sub
                yield from _descriptions(sub, path + "." + key)
        for key in ("items", "additionalProperties"):
            if isinstance(node.get(key), dict):
                yield from _descriptions(node[key], path + "[]")


def test_every_params_key_has_a_unit_in_its_description():
    # project rule: units in every description, written as [unit] ([-] for dimensionless)
    with open(os.path.join(ROOT, "schemas", "params.schema.json")) as fh:
        schema = json.load(fh)
    for path, sub in _descriptions(schema):
        text = sub.get("description", "")
        leaf = "properties" not in sub
        if leaf and "$ref" not in sub:
            assert "[" in text and "]" in text, path


@pytest.mark.parametrize("path", sorted(glob.glob(os.path.join(EX, "valid", "params-*.json"))))
def test_valid_params_examples_pass(path, capsys):
    code, out, err = run(["check", path, "--json"], capsys)
    assert code == 0 and err == ""
    assert json.loads(out)["valid"] is True


@pytest.mark.parametrize("path", sorted(glob.glob(os.path.join(EX, "invalid", "params-*.json"))))
def test_invalid_params_examples_are_refused_with_the_json_path(path, capsys):
    code, out, err = run(["check", path], capsys)
    assert code == 2 and out == ""
    lines = err.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("error: ") and path in lines[0]
    assert "$" in lines[0], "the error names the JSON path"


@pytest.mark.parametrize("broken,where", [
    (lambda p: p["thrust_curve"].__setitem__("command_min", "0.1"), "$.thrust_curve.command_min"),
    (lambda p: p.pop("provenance"), "provenance"),
    (lambda p: p["power_model"].__setitem__("residual_rel_std", 4.0), "$.power_model.residual_rel_std"),
    (lambda p: p["thrust_curve"].__setitem__("voltage_exponent", 9.0), "$.thrust_curve.voltage_exponent"),
])
def test_check_names_the_path_of_wrong_type_missing_key_out_of_range(tmp_path, capsys, broken, where):
    with open(os.path.join(EX, "valid", "params-demo-with-hover.json")) as fh:
        doc = json.load(fh)
    broken(doc)
    path = tmp_path / "p.json"
    path.write_text(json.dumps(doc))
    code, _, err = run(["check", str(path)], capsys)
    assert code == 2 and where in err and err.count("\n") == 1


def test_write_params_refuses_invalid_and_leaves_no_file(tmp_path):
    doc = load_params(os.path.join(EX, "valid", "params-demo-no-vehicle.json"))
    doc["static_factor"]["value"] = 1.2  # impossible: k <= 1 (momentum theory)
    target = tmp_path / "out.json"
    with pytest.raises(InputError, match=r"\$\.static_factor\.value"):
        write_params(str(target), doc)
    assert list(tmp_path.iterdir()) == []


def test_write_then_load_round_trip(tmp_path):
    doc = load_params(os.path.join(EX, "valid", "params-demo-with-hover.json"))
    target = tmp_path / "p.json"
    write_params(str(target), doc)
    assert load_params(str(target)) == doc


@pytest.mark.parametrize("path", sorted(glob.glob(os.path.join(EX, "valid", "map-*.json"))))
def test_valid_map_examples(path):
    assert load_map(path)["settings"]


@pytest.mark.parametrize("path", sorted(glob.glob(os.path.join(EX, "invalid", "map-*.json"))))
def test_invalid_map_examples(path):
    with pytest.raises(InputError, match=r"\$"):
        load_map(path)
