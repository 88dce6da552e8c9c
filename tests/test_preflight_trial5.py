"""Fifth new-user trial, pre-flight items: one thrust-to-weight rule on every route (item 2) and
one payload grid on both routes (item 10).

Through the command (click's CliRunner in tmp_path: exit code, stdout and stderr apart). The
vehicle is the invented demo quad (estimator.demo.scenario, not any product) on a pack of
40 mohm, which full command sags below its loaded cutoff; the parameter set is the demo's
simulated bench fit (tests/watch_helpers.demo_fit_params). External references: the T/W floor
of 2 is common practice (a T/W of 2 puts hover near 0.67 command, thrust ~ command^1.8);
1 g = 1e-3 kg (NIST SP 811, exact).
"""

import copy
import json
import re

import pytest

from estimator.demo.scenario import DEMO_VEHICLE
from trial_helpers import report as _json, run

FLOOR = 2.0  # thrust-to-weight floor, common practice


@pytest.fixture(scope="module")
def files(tmp_path_factory, params_file):
    folder = tmp_path_factory.mktemp("trial5")
    vehicle = copy.deepcopy(DEMO_VEHICLE)
    vehicle["name"] = "invented quad on a soft pack"
    vehicle["mass_kg"] = 1.8
    vehicle["battery"]["resistance_ohm"] = 0.04
    path = folder / "soft.json"
    path.write_text(json.dumps(vehicle))
    return str(path), str(params_file)


@pytest.mark.parametrize("route", ["datasheet", "bench fit"])
def test_the_sheet_judges_and_shows_the_reachable_thrust_to_weight(files, route):
    vehicle, params = files
    extra = ["--params", params] if route == "bench fit" else []
    report = _json("hover", vehicle, *extra)
    # the precondition of the finding: full command above the floor, but not reachable on this pack
    assert report["thrust_to_weight"] >= FLOOR and report["thrust_to_weight_reachable"] is False
    reachable = report["reachable_thrust_to_weight"]
    assert reachable < FLOOR
    assert report["thrust_to_weight_judged"] == reachable and report["thrust_to_weight_judged_at"] == "loaded cutoff"
    code, sheet, err = run("hover", vehicle, *extra)
    assert code == 0 and err == ""
    # section 2 shows the judged value, marked, and says what the mark means
    assert "thrust-to-weight   %.2f*  (judged: reachable at command" % reachable in sheet
    assert "* marks the T/W reachable on a nominal pack; full command would give %.2f" % report["thrust_to_weight"] in sheet
    # section 4 warns: the judged T/W is below the floor (before: no "!" line at all)
    section4 = sheet.split("4. What to watch out for")[1]
    assert re.search(r"! thrust-to-weight %.2f\* is below 2" % reachable, section4), section4


@pytest.mark.parametrize("route", ["datasheet", "bench fit"])
def test_payload_table_shows_the_value_it_judged(files, route):
    vehicle, params = files
    extra = ["--params", params] if route == "bench fit" else []
    code, text, err = run("hover", vehicle, *extra, "--payload", "0..200g")
    assert code == 0 and err == ""
    rows = _json("hover", vehicle, *extra, "--payload", "0..200g")["payload"]["rows"]
    table = text.split("5. How much can it carry?")[1]
    for row in rows:
        assert row["thrust_to_weight_reachable"] is False
        assert row["thrust_to_weight_judged"] == row["reachable_thrust_to_weight"]
        # the T/W column is the judged one, marked; the margin broken agrees with it
        line = next(ln for ln in table.splitlines() if ln.strip().startswith("%g g" % (row["payload_kg"] * 1e3)))
        assert " %.2f* " % row["reachable_thrust_to_weight"] in line, line
        assert ("thrust_to_weight" in row["broken"]) == (row["reachable_thrust_to_weight"] < FLOOR)
    assert "T/W*  full command sags the nominal pack below its loaded cutoff" in table


def test_compare_and_payload_and_sheet_agree_on_one_vehicle(files):
    vehicle, _ = files
    sheet = _json("hover", vehicle)
    row = _json("compare", vehicle, "--vary", "mass_kg=1.8")["rows"][0]
    pay = _json("hover", vehicle, "--payload", "0g")["payload"]["rows"][0]
    assert row["reachable_thrust_to_weight"] == pytest.approx(sheet["thrust_to_weight_judged"], rel=1e-12)
    assert pay["thrust_to_weight_judged"] == pytest.approx(sheet["thrust_to_weight_judged"], rel=1e-12)
    assert "thrust_to_weight" in row["broken"] and "thrust_to_weight" in pay["broken"]


# --- item 10: one payload grid, round steps ---------------------------------------------------

@pytest.mark.parametrize("text, grams", [
    ("0..450g", [50 * i for i in range(10)]),            # was 56.25 g steps
    ("0..600g", [100 * i for i in range(7)]),
    ("0..130g", [0, 20, 40, 60, 80, 100, 120, 130]),    # the end is always a row
])
def test_both_routes_print_the_same_round_payload_grid(files, text, grams):
    vehicle, params = files
    tables = []
    for extra in ([], ["--params", params]):
        rows = _json("hover", vehicle, *extra, "--payload", text)["payload"]["rows"]
        assert [r["payload_kg"] for r in rows] == pytest.approx([g * 1e-3 for g in grams], abs=1e-12)
        code, out, err = run("hover", vehicle, *extra, "--payload", text)
        assert code == 0 and err == ""
        tables.append(re.findall(r"^\s+(\S+ g)\s+(\S+ g)\s", out.split("5. How much")[1], re.M))
    assert tables[0] == tables[1]  # same payloads, same rounding on both routes
    assert [p for p, _ in tables[0]] == ["%d g" % g for g in grams]  # no 56.25 g, no 0.00 g
