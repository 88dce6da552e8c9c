"""Small wording slips of new-user trial 12, finding 14 (common practice: English number
agreement; a tool names what it replaces and what it wrote):
- one row where time does not rise was called '(lines 1502)';
- export of an edited set said 'the settings carries';
- firmware said '13 files' of a folder holding 14 (its hidden record);
- replacing a bundle named no source;
- '"cells": "4S2P"' got no hint; '10000mah' no word that units are case-sensitive.
"""

import json

from estimator.errors import InputError
from estimator.units import parse_quantity
from io_helpers import PARAMS, VEHICLE, refused, run
from watch_helpers import demo_flight_rows, write_log_rows

import pytest


def test_one_row_going_back_is_one_line(tmp_path, params_file):
    rows = demo_flight_rows(7)
    rows[50][0] = rows[48][0]   # one row whose time goes back: line 52 (the header is line 1)
    f = write_log_rows(tmp_path, "time[s],command[-],voltage[V],current[A]", rows, lambda *r: r)
    line = refused(["replay", str(f), "--params", str(params_file)], "1 row where time does not rise (line 52)",
                   "to drop that row")
    assert "lines" not in line


def test_an_edited_set_s_settings_file_carries_the_edited_values(tmp_path):
    # a set liftcal wrote (sealed), then edited by hand
    from estimator.params import write_params
    share = json.load(open(PARAMS))["thrust_curve"]["quadratic_share"]
    sealed = tmp_path / "sealed.json"
    write_params(str(sealed), json.load(open(PARAMS)))
    text = sealed.read_text().replace('"quadratic_share": %s' % share, '"quadratic_share": %s' % (share + 0.01), 1)
    assert text != sealed.read_text()
    sealed.write_text(text)
    code, out, err = run(["export", sealed, "--from-edited"])
    assert code == 0, err
    assert "the settings file carries the edited values" in " ".join((out + err).split())


def test_firmware_names_its_folder_record_and_the_source_it_replaces(tmp_path):
    code, out, err = run(["firmware", PARAMS, "--out", tmp_path / "b", "--vehicle", VEHICLE])
    assert code == 0, err
    flat = " ".join(out.split())
    assert "(13 files, .mpy total" in flat and "and .liftcal-folder.json, liftcal's record of them)" in flat
    code, out, err = run(["firmware", PARAMS, "--out", tmp_path / "b", "--vehicle", VEHICLE])
    assert "replaced %s: a power-watch bundle liftcal wrote from %s" % (tmp_path / "b", PARAMS) in \
        " ".join(out.split())


def test_a_series_parallel_cell_count_gets_a_hint(tmp_path):
    doc = json.load(open(VEHICLE))
    doc["battery"]["cells"] = "4S2P"
    path = tmp_path / "v.json"
    path.write_text(json.dumps(doc))
    refused(["hover", path], "$.battery.cells", "a 4S2P pack: write the cells in series, 4",
            "capacity (2 x one cell's)")


def test_a_unit_in_another_case_is_named():
    with pytest.raises(InputError) as info:
        parse_quantity("10000mah", "capacity", "$.battery.capacity")
    assert "units are case-sensitive: did you mean 10000mAh?" in str(info.value)
