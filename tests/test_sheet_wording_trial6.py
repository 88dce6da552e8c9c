"""Sixth new-user trial, items 11 and 12: the coaxial penalty is shown on the sheet with its source,
and wording that read like a glitch.

References: the coaxial induced-power factor (1 + sqrt(17)) / 4 = 1.2808 on a power basis
(momentum theory with the lower rotor in the upper's fully developed slipstream; Leishman,
Principles of Helicopter Aerodynamics (2006), coaxial rotors; from memory; re-derived in
tests/test_momentum.py). It multiplies the ideal induced power only, so with FM = sqrt(2/pi)
CT^1.5 / CP (momentum theory) the pair's figure of merit is 1 / (1/FM + kappa - 1). The vehicles
are the trial's invented X8 and whoop. 1 in = 0.0254 m (NIST SP 811). Through the command:
io_helpers.run (exit code, stdout, stderr apart).
"""

import copy
import json
import math

import pytest

from invented_vehicles import HEXA
from io_helpers import PARAMS, refused
from trial_helpers import ok
from test_endurance_lead_trial6 import WHOOP65

X8 = {"name": "trial coaxial X8", "mass": "14kg", "rotors": {"count": 8, "layout": "coaxial"},
      "propeller": {"size": "15x5.5in", "blades": 2},
      "motor": {"kv_rpm_per_V": 250, "resistance_ohm": 0.12, "no_load_current_A": 0.5, "max_current_A": 30},
      "battery": {"cells": 12, "capacity": "22000mAh", "resistance": "30mohm",
                  "full_cell_V": 4.2, "nominal_cell_V": 3.7, "empty_cell_V": 3.5},
      "esc": {"efficiency": 0.95}, "site": {"altitude": "800m", "temperature": "10C"}}
KAPPA = (1.0 + math.sqrt(17.0)) / 4.0


def _write(tmp_path, doc, name="v.json"):
    path = tmp_path / name
    path.write_text(json.dumps(doc))
    return path


def test_the_coaxial_penalty_is_on_the_sheet_with_its_source(tmp_path):
    path = _write(tmp_path, X8)
    report = json.loads(ok("hover", path, "--json"))
    fm_isolated = math.sqrt(2.0 / math.pi) * report["propeller_ct"] ** 1.5 / report["propeller_cp"]
    assert report["figure_of_merit"] == pytest.approx(1.0 / (1.0 / fm_isolated + KAPPA - 1.0), rel=1e-6)
    sheet = " ".join(ok("hover", path).split())
    assert "coaxial pairs: ideal induced power x%.4g" % KAPPA in sheet and "power basis" in sheet
    assert "Leishman 2006" in sheet and "from memory" in sheet
    assert "figure of merit %.2f (with the coaxial penalty)" % report["figure_of_merit"] in sheet
    assert "figure of merit %.2f for an isolated rotor" % fm_isolated in sheet
    flat = " ".join(ok("hover", _write(tmp_path, HEXA, "flat.json")).split())
    assert "coaxial" not in flat


def test_an_inch_slip_reads_as_inches(tmp_path):
    doc = copy.deepcopy(HEXA)
    doc["propeller"] = {"diameter_m": 15, "pitch_m": 0.14, "blades": 2}
    refused(["hover", _write(tmp_path, doc)], "given in inches instead of m? 15 in = 0.381 m")


def test_the_duct_note_names_the_download_effect(tmp_path):
    sheet = " ".join(ok("hover", _write(tmp_path, WHOOP65)).split())
    assert "Leishman on the download of a body under a rotor" in sheet and "Leishman, download" not in sheet


def test_a_one_row_log_is_one_sample(tmp_path, params_file):
    log = tmp_path / "one.csv"
    log.write_text("time[s],command[-],voltage[V],current[A]\n0.0,0.0,16.4,0.3\n")
    out = " ".join(ok("replay", log, "--params", params_file).split())
    assert ": 1 sample, 0 alarms" in out and "1 samples" not in out


def test_export_of_an_edited_set_says_so(tmp_path):
    from estimator.demo.ramp_sweep import ramp_sweep_rows, write_ramp_csv

    sweep, params = tmp_path / "s.csv", tmp_path / "p.json"
    write_ramp_csv(str(sweep), ramp_sweep_rows(3000, seed=5), "invented sweep for the export note")
    ok("fit", sweep, "--out", params)
    clean = ok("export", params, "--map", _write(tmp_path, {"schema_version": 1, "model": "liftcal.map/1",
                 "settings": [{"name": "my.top", "unit": "N", "source": "thrust_curve.thrust_max_N"}]}, "m.json"))
    assert "was edited" not in clean
    params.write_text(params.read_text().replace('"thrust_max_N": ', '"thrust_max_N": 1', 1))  # a person's edit
    # refused unless asked, then said first (new-user trial 7, finding 6; tests/test_bench_outputs_trial7.py)
    refused(["export", params, "--map", tmp_path / "m.json"], "was EDITED since liftcal wrote it", "--from-edited")
    edited = " ".join(ok("export", params, "--map", tmp_path / "m.json", "--from-edited").split())
    assert edited.startswith("WARNING: %s was EDITED since liftcal wrote it" % params)
    assert PARAMS  # the shipped example set (no seal) is not called edited:
    assert "EDITED" not in ok("export", PARAMS)


def test_static_answers_in_the_unit_it_was_asked_in():
    # 500 g of thrust = 0.5 kg x 9.80665 m/s^2 = 4.90 N (standard gravity, NIST SP 811)
    text = " ".join(ok("static", "--diameter", "10in", "--thrust", "500g").split())
    assert "500g (%.1f N) of thrust needs" % (0.5 * 9.80665) in text
    plain = " ".join(ok("static", "--diameter", "10in", "--thrust", "4.9N").split())
    assert "4.9 N of thrust needs" in plain and "(4.9 N)" not in plain
