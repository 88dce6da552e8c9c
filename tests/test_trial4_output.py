"""Fourth new-user trial, output items: a bare --diameter read as metres, rounding that changes
what the numbers say, the decimals an export map asks for, 80-column text, cautions in the
settings and replay JSON, the cold-pack wording, the bench header hints and the fit help.

Commands run in this process (tests/io_helpers.refused, tests/trial_helpers.ok). Sources are named beside each check.
"""

import copy
import json
import os
import re
import shutil
import tempfile
from decimal import Decimal

import pytest

from estimator.cautions import cautions
from io_helpers import MAP, PARAMS, refused
from trial_helpers import ok, run
from invented_vehicles import HEXA
from test_preflight_trial4 import WHOOP_1S
from watch_helpers import demo_fit_params, flight_csv_once

COLUMNS = 79  # an 80-column terminal without its last column (common practice; estimator.textwidth)


def _write(tmp_path, doc, name="v.json"):
    path = tmp_path / name
    path.write_text(json.dumps(doc))
    return path


# --- item 6: static --diameter 3 -----------------------------------------------------------------
# a bare --diameter is refused since trial 10 (finding 10): tests/test_small_fixes_trial10.py

@pytest.mark.parametrize("args", [["--diameter", "3in", "--power", "20W"],
                                  ["--diameter", "0.254m", "--power", "100W"],
                                  ["--diameter", "0.254m", "--thrust", "5N"]])
def test_static_ordinary_diameters_get_no_warning(args):
    assert "meant?" not in ok(*["static"] + args)
    assert json.loads(ok(*["static"] + args + ["--json"]))["warnings"] == []


# --- item 8: rounding ------------------------------------------------------------------------------

def test_whoop_sheet_totals_agree_with_per_rotor_values(tmp_path):
    out = " ".join(ok("hover", _write(tmp_path, WHOOP_1S)).split())
    per, total = re.search(r"full-command thrust ([0-9.]+) N per rotor, ([0-9.]+) N total", out).groups()
    # 4 rotors: the total is 4 x the per-rotor value within the rounding of 3 significant digits
    assert abs(float(total) - 4 * float(per)) <= 0.005 * float(total), (per, total)
    assert "vehicle 0.021 kg" in out   # 21 g = 0.021 kg (NIST SP 811), not "0.02 kg"
    current = re.search(r"pack current ([0-9.]+) A at hover, ([0-9.]+) A at full", out).groups()
    for text in current:   # three significant digits on a small craft's amps (at least 2 shown)
        assert len(text.replace(".", "").lstrip("0")) >= 2, text


def test_payload_table_prints_each_mass_exactly(tmp_path):
    # all-up = vehicle + payload, exact in decimal arithmetic: 9.5 kg + 1.125 kg = 10.625 kg
    hexa = copy.deepcopy(HEXA)
    hexa["mass"] = "9.5kg"
    out = ok("hover", _write(tmp_path, hexa), "--payload", "0,0.375,1.125,3kg")
    rows = re.findall(r"^\s+([0-9.]+) kg\s+([0-9.]+) kg", out, re.M)
    assert len(rows) == 4
    for payload, all_up in rows:
        assert Decimal(all_up) == Decimal("9.5") + Decimal(payload), (payload, all_up)


def test_export_prints_the_decimals_the_map_asks_for():
    mapping = json.load(open(MAP))
    out = ok("export", PARAMS, "--map", MAP)
    for entry in mapping["settings"]:
        value = re.search(r"^%s\s+(-?[0-9.]+)" % re.escape(entry["name"]), out, re.M).group(1)
        shown = len(value.split(".")[1]) if "." in value else 0
        assert shown == entry.get("decimals", shown), (entry["name"], value)


# --- item 13: 80 columns -------------------------------------------------------------------------

@pytest.fixture(scope="module")
def flight(tmp_path_factory):
    folder = tmp_path_factory.mktemp("t4")
    params = folder / "params.json"
    params.write_text(json.dumps(demo_fit_params()))
    log = folder / "heavy.csv"
    log.write_text(flight_csv_once(fault="heavy", seed=5))
    return folder, params, log


def test_replay_firmware_export_compare_check_fit_80_columns(tmp_path, flight):
    folder, params, log = flight
    vehicle = _write(tmp_path, HEXA)
    # firmware prints its folder's full path on a line of its own (a path is not broken): a short
    # folder, so the check does not depend on the length of pytest's temporary folder names
    # (longer under pytest-xdist, or with a longer user name)
    short = tempfile.mkdtemp(prefix="t4-")
    outputs = [ok("replay", log, "--params", params),
               ok("firmware", params, "--out", os.path.join(short, "board")),
               ok("export", PARAMS),
               ok("compare", vehicle, "--vary", "propeller.size=15x5.5in,16x5.5in",
                    "--vary", "motor.kv_rpm_per_V=380,420", "--vary", "battery.capacity=12000mAh,16000mAh"),
               ok("check", PARAMS)]
    shutil.rmtree(short)
    for out in outputs:
        assert max(len(line) for line in out.splitlines()) <= COLUMNS, out


# --- item 15: cautions in machine-readable settings and replay ------------------------------------

def test_settings_json_file_and_replay_json_carry_the_cautions(tmp_path, flight):
    folder, params, log = flight
    target = tmp_path / "set.json"
    code, _, notes = run("export", PARAMS, "--json", "--out", target)
    assert code == 0 and "top_grams" in notes  # under --json the fit's notes go to stderr
    assert json.loads(target.read_text())["cautions"] == cautions("settings")
    assert json.loads(ok("replay", log, "--params", params, "--json"))["cautions"] == cautions("board")


# --- item 16: the cold-pack note -----------------------------------------------------------------

@pytest.mark.parametrize("temperature,cold", [("22C", False), ("15C", False), ("5C", True), ("-5C", True)])
def test_cold_pack_words_only_below_the_cold_caution(tmp_path, temperature, cold):
    # lithium packs lose capacity and sag more below about 10 C (common practice, from memory),
    # the threshold of the sheet's cold-pack caution
    doc = copy.deepcopy(HEXA)
    doc["site"]["temperature"] = temperature
    out = " ".join(ok("hover", _write(tmp_path, doc)).split())
    assert ("sags more" in out) == cold   # the wording of a cold pack, not of one at room temperature
    assert ("cold pack (" in out) == cold


# --- items 10 and 11: bench header hints and the fit help ---------------------------------------

def _bench(tmp_path, header):
    path = tmp_path / "b.csv"
    path.write_text(header + "\n" + "\n".join("%g,%g,15.0,%g,%g" % (i, i * 5, 0.5 + i, 10 * i * i)
                                              for i in range(1, 12)) + "\n")
    return path


def test_spreadsheet_header_cell_gets_the_bracket_form(tmp_path):
    refused(["fit", _bench(tmp_path, "Time (s),Throttle (%),Voltage (V),Current (A),Thrust (g)"),
             "--out", tmp_path / "p.json"], "'Time (s)'", "write time[s]")


def test_throttle_column_gets_the_command_name(tmp_path):
    refused(["fit", _bench(tmp_path, "time[s],throttle[%],voltage[V],current[A],thrust[g]"),
             "--out", tmp_path / "p.json"], "column 2 'throttle[%]': did you mean command[%]?")


def test_fit_help_lists_the_units_the_reader_names(tmp_path):
    line = refused(["fit", _bench(tmp_path, "time[s],voltage[V],current[A],thrust[g]"),
                    "--out", tmp_path / "p.json"], "header lacks command")
    need = re.search(r"need (.*)$", line).group(1)
    help_text = " ".join(ok("fit", "--help").split())
    assert need in help_text, (need, help_text)
