"""Hostile and odd JSON inputs: one clean refusal (or acceptance) with the path or position.

Design notes sec. 4: NaN and Infinity are refused wherever a number is read; duplicate keys
are refused with both positions; a size and a nesting limit, stated in the error; error lines
echo a shortened piece, never a whole document; byte-order marks accepted; null explained.
"""

import codecs
import json
import os

import pytest

from estimator import jsonread
from io_helpers import MAP, PARAMS, VEHICLE, refused, run


def _vehicle():
    with open(VEHICLE, encoding="utf-8") as fh:
        return json.load(fh)


def _write(tmp_path, text, name="v.json"):
    path = tmp_path / name
    path.write_bytes(text.encode("utf-8") if isinstance(text, str) else text)
    return str(path)


@pytest.mark.parametrize("token", ["NaN", "Infinity", "-Infinity"])
@pytest.mark.parametrize("key", ["mass_kg", "battery.capacity_Ah", "site.temperature_C"])
def test_nan_and_infinity_in_a_vehicle_are_refused_with_the_path(tmp_path, token, key):
    head, _, last = key.rpartition(".")
    doc = _vehicle()
    node = doc
    for part in head.split(".") if head else []:
        node = node[part]
    node[last] = 12345.678
    text = json.dumps(doc, indent=1).replace("12345.678", token)
    path = _write(tmp_path, text)
    for args in (["hover", path], ["hover", path, "--json"], ["hover", path, "--params", PARAMS],
                 ["firmware", PARAMS, "--vehicle", path, "--out", str(tmp_path / "board")]):
        refused(args, "$." + key, token, "not a number JSON allows")


def test_number_too_large_for_a_float_is_refused(tmp_path):
    text = json.dumps(_vehicle()).replace('"mass_kg": 2.05', '"mass_kg": 1e999')
    refused(["hover", _write(tmp_path, text)], "$.mass_kg", "too large")


def test_nan_in_a_parameter_set_is_refused_by_every_reader(tmp_path):
    with open(PARAMS, encoding="utf-8") as fh:
        text = fh.read()
    doc = json.loads(text)
    value = doc["thrust_curve"]["thrust_max_N"]
    bad = _write(tmp_path, text.replace('"thrust_max_N": %s' % json.dumps(value), '"thrust_max_N": NaN', 1),
                 "p.json")
    assert "NaN" in open(bad).read()
    for args in (["check", bad], ["check", bad, "--json"], ["export", bad], ["hover", VEHICLE, "--params", bad],
                 ["firmware", bad, "--out", str(tmp_path / "board")],
                 ["replay", VEHICLE, "--params", bad]):
        refused(args, "$.thrust_curve.thrust_max_N")
    assert not os.path.exists(tmp_path / "board")


def test_duplicate_key_is_refused_with_both_positions(tmp_path):
    text = '{\n  "name": "x",\n  "mass_kg": 0.65,\n  "rotors": {"count": 4},\n  "mass_kg": 650\n}\n'
    line = refused(["hover", _write(tmp_path, text)], "'mass_kg' appears twice",
                   "line 3 column 3", "line 5 column 3")
    assert "remove one" in line


def test_duplicate_key_inside_a_nested_object(tmp_path):
    doc = json.dumps(_vehicle(), indent=1).replace('"cells": 4', '"cells": 4, "cells": 6')
    refused(["hover", _write(tmp_path, doc)], "'cells' appears twice", "line")


@pytest.mark.parametrize("bom,encoding", [(codecs.BOM_UTF8, "utf-8"), (codecs.BOM_UTF16_LE, "utf-16-le"),
                                          (codecs.BOM_UTF16_BE, "utf-16-be")])
def test_byte_order_marks_are_accepted(tmp_path, bom, encoding):
    path = _write(tmp_path, bom + json.dumps(_vehicle()).encode(encoding))
    code, out, err = run(["hover", path, "--json"])
    assert code == 0, err
    assert json.loads(out)["hover_command"] > 0


def test_deep_nesting_is_refused_without_recursion_error(tmp_path):
    path = _write(tmp_path, "[" * 100000 + "]" * 100000)
    refused(["hover", path], "nested deeper than the %d levels" % jsonread.MAX_DEPTH)
    path = _write(tmp_path, '{"a":' * 200 + "1" + "}" * 200, "d.json")
    refused(["check", path], "nested deeper than the %d levels" % jsonread.MAX_DEPTH)


def test_size_limit_is_stated(tmp_path):
    path = _write(tmp_path, b" " * (jsonread.MAX_BYTES + 1))
    refused(["hover", path], "16 MiB")


@pytest.mark.parametrize("device", ["/dev/zero", "/dev/urandom", "/dev/null"])
def test_endless_or_empty_devices_are_refused_not_read(tmp_path, device):
    if not os.path.exists(device):
        pytest.skip("no %s here" % device)
    for args in (["hover", device], ["check", device], ["export", PARAMS, "--map", device],
                 ["fit", device, "--out", tmp_path / "p.json"], ["replay", device, "--params", PARAMS]):
        refused(args, device, "a device, not a regular file")


def test_a_pipe_is_refused_not_waited_on(tmp_path):
    fifo = str(tmp_path / "fifo")
    os.mkfifo(fifo)
    refused(["hover", fifo], "a pipe (FIFO)")


def test_huge_string_is_shortened_in_the_error(tmp_path):
    doc = _vehicle()
    doc["mass_kg"] = "x" * (5 << 20)
    line = refused(["hover", _write(tmp_path, json.dumps(doc))], "$.mass_kg", "xxx...")
    assert len(line) < 400
    doc = _vehicle()
    doc["mass_kg"] = list(range(1000000))
    line = refused(["hover", _write(tmp_path, json.dumps(doc), "a.json")], "$.mass_kg")
    assert len(line) < 400
    doc = _vehicle()
    doc["y" * 1000000] = 1
    line = refused(["hover", _write(tmp_path, json.dumps(doc), "k.json")])
    assert len(line) < 600


def test_top_level_array_or_scalar_is_explained(tmp_path):
    line = refused(["hover", _write(tmp_path, json.dumps(list(range(100000))))], "$")
    assert len(line) < 300
    refused(["check", _write(tmp_path, "null", "n.json")], "null (no value) where an object")


def test_null_where_an_object_is_expected_in_plain_words(tmp_path):
    doc = _vehicle()
    doc["site"] = None
    line = refused(["hover", _write(tmp_path, json.dumps(doc))], "$.site", "null (no value) where an object")
    assert "None" not in line


@pytest.mark.parametrize("content,needle", [
    (b"", "the file is empty"),  # trial 10, finding 14: was "malformed JSON (Expecting value)"
    (b"\xff\xfe\xfd", "not"),
    (b"{\"a\": \"\\ud800\"}", "unpaired surrogate"),
    (b"{\"mass_kg\": 1" + b"0" * 5000 + b"}", "thousands of digits"),
    (b"{\"mass_kg\": 1" + b"0" * 30 + b"}", "larger than any quantity"),
    (b"{,}", "line 1 column 2"),
])
def test_broken_bytes(tmp_path, content, needle):
    refused(["hover", _write(tmp_path, content)], needle)
    refused(["export", PARAMS, "--map", _write(tmp_path, content, "m.json")], needle)


def test_check_json_prints_one_object_for_an_invalid_file_too(tmp_path):
    path = _write(tmp_path, '{"schema_version": 1, "model": "liftcal.rotor/1"}', "p.json")
    code, out, err = run(["check", path, "--json"])
    assert code == 2 and err.startswith("error: ") and len(err.strip().splitlines()) == 1
    doc = json.loads(out)
    assert doc["valid"] is False and doc["file"] == path and doc["error"] in err
    code, out, err = run(["check", PARAMS, "--json"])
    assert code == 0 and json.loads(out)["valid"] is True


@pytest.mark.parametrize("value", ["5e-324", "1e-300", "-1e-150", "1e300", "-1e101"])
def test_numbers_of_absurd_magnitude_are_refused_with_the_path(tmp_path, value):
    # a subnormal or astronomically large number is no quantity in any unit; it would reach
    # the models as a division by almost zero (found by benchmarks/numeric_extremes.py)
    text = json.dumps(_vehicle()).replace('"empty_cell_V": 3.5', '"empty_cell_V": %s' % value)
    assert value in text
    refused(["hover", _write(tmp_path, text)], "$.battery.empty_cell_V", "far outside any quantity")
