"""One pack model and one hover computation behind every hover value liftcal prints or stores.

The hover block that ``fit --vehicle`` stores (and the export passes to the flight controller)
and the sheet of ``hover --params`` must be the same numbers, the cold pack included.

External references: the Thevenin pack V = V_oc - I R (design notes sec. 3) and the cold-pack
resistance R(T) = R_25 exp(0.03 (25 C - T)) (from memory of lithium cell data: about doubling
from 25 C to 0 C), both written out here independently of the code under test.
"""

import json
import math

import pytest

from estimator.commands.bench import fit_for_vehicle
from estimator.cli import main
from estimator.demo.bench_sim import simulate_sweep
from estimator.demo.scenario import DEMO_VEHICLE
from estimator.preflight.report import hover_report
from estimator.vehicle import check_vehicle


def _vehicle(temperature_C, **battery):
    doc = json.loads(json.dumps(DEMO_VEHICLE))
    doc["site"] = {"altitude_m": 1400, "temperature_C": temperature_C}
    doc["battery"].update(battery)
    return check_vehicle(doc, "cold.json")


@pytest.fixture(scope="module")
def sweep(tmp_path_factory):
    path = tmp_path_factory.mktemp("onepack") / "sweep.csv"
    path.write_text(simulate_sweep(seed=31))
    return str(path)


@pytest.mark.parametrize("temperature_C", [-20.0, 5.0, 25.0])
def test_fit_hover_block_is_the_sheet_of_hover_params(sweep, temperature_C):
    vehicle = _vehicle(temperature_C)
    params = fit_for_vehicle(sweep, vehicle)
    stored = params["hover"]
    sheet = hover_report(vehicle, params)
    for key in ("hover_command", "hover_command_full", "hover_command_empty", "thrust_to_weight",
                "flight_time_min"):
        assert stored[key] == pytest.approx(sheet[key], rel=1e-5), key
    assert stored["voltage_V"] == pytest.approx(sheet["hover_bus_V"], rel=1e-5)
    # the stored file keeps 6 significant digits. Thevenin pack at full command with the cold resistance written out here (from memory:
    # R_25 exp(0.03 (25 - T)) below 25 C)
    r_25 = DEMO_VEHICLE["battery"]["resistance_ohm"]
    r_cold = r_25 * math.exp(0.03 * max(0.0, 25.0 - temperature_C))
    v_oc = 4 * DEMO_VEHICLE["battery"]["nominal_cell_V"]
    assert sheet["full_bus_V"] == pytest.approx(v_oc - sheet["full_pack_current_A"] * r_cold, rel=1e-6)
    assert stored["full_bus_V"] == pytest.approx(sheet["full_bus_V"], rel=1e-5)


def test_a_cold_pack_lowers_the_stored_thrust_to_weight(sweep):
    warm = fit_for_vehicle(sweep, _vehicle(25.0))["hover"]
    cold = fit_for_vehicle(sweep, _vehicle(-20.0))["hover"]
    # a pack with ~3.9 x the resistance sags further at full command: less thrust (Thevenin)
    assert cold["full_bus_V"] < warm["full_bus_V"] - 0.2
    assert cold["thrust_to_weight"] < warm["thrust_to_weight"]


def test_fit_command_prints_what_hover_params_says(sweep, tmp_path, capsys):
    doc = json.loads(json.dumps(DEMO_VEHICLE))
    doc["site"] = {"altitude_m": 1400, "temperature_C": -15}
    vehicle_file = tmp_path / "cold.json"
    vehicle_file.write_text(json.dumps(doc))
    out = tmp_path / "p.json"
    with pytest.raises(SystemExit) as exc:
        main(["fit", sweep, "--out", str(out), "--vehicle", str(vehicle_file)])
    assert exc.value.code == 0
    fit_text = capsys.readouterr().out
    with pytest.raises(SystemExit) as exc:
        main(["hover", str(vehicle_file), "--params", str(out), "--json"])
    assert exc.value.code == 0
    sheet = json.loads(capsys.readouterr().out)
    from estimator.preflight.warnings import thrust_to_weight_text
    assert "thrust-to-weight %s " % thrust_to_weight_text(sheet["thrust_to_weight"]) in fit_text
    stored = json.loads(out.read_text())["hover"]
    assert stored["hover_command"] == pytest.approx(sheet["hover_command"], rel=1e-5)
