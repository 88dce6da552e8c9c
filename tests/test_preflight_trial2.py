"""Second new-user trial, pre-flight items: one assumed temperature for air and pack, warnings
once and only about the vehicle asked about.

External references: US Standard Atmosphere 1976 (288.15 K at sea level, lapse rate 6.5 K per
km of geopotential altitude, earth radius 6356.766 km), the cold-pack resistance
R(T) = R_25 exp(0.03 (25 C - T)) (from memory of lithium cell data), written out here.
"""

import json
import math

import pytest

from estimator.commands.bench import fit_for_vehicle
from estimator.demo.bench_sim import simulate_sweep
from estimator.demo.scenario import DEMO_VEHICLE
from estimator.preflight.report import format_sheet, hover_report
from estimator.vehicle import check_vehicle


def _doc(site=None, **changes):
    doc = json.loads(json.dumps(DEMO_VEHICLE))
    doc.pop("site")
    if site is not None:
        doc["site"] = site
    doc.update(changes)
    return doc


def _cold(temperature_C):
    # from memory: lithium pack resistance about doubles from 25 C to 0 C
    return math.exp(0.03 * max(0.0, 25.0 - temperature_C))


def test_no_site_takes_the_pack_at_the_air_temperature():
    r_25 = DEMO_VEHICLE["battery"]["resistance_ohm"]
    bare = hover_report(check_vehicle(_doc(), "bare.json"))
    at_15 = hover_report(check_vehicle(_doc({"altitude_m": 0, "temperature_C": 15}), "15.json"))
    # US Standard Atmosphere 1976 at sea level: 288.15 K = 15 C
    assert bare["pack_temperature_C"] == pytest.approx(15.0, abs=1e-9)
    assert bare["pack_resistance_ohm"] == pytest.approx(r_25 * _cold(15.0), rel=1e-9)
    for key in ("thrust_to_weight", "hover_command", "flight_time_min", "full_bus_V"):
        assert bare[key] == pytest.approx(at_15[key], rel=1e-9), key
    sheet = " ".join(format_sheet(bare).split())  # the sheet wraps at 80 columns
    assert sheet.count("pack at 15 C, the temperature assumed for the air") == 1


def test_site_without_temperature_takes_the_pack_at_the_standard_air_there():
    r = hover_report(check_vehicle(_doc({"altitude_m": 2000}), "high.json"))
    h = 6356766.0 * 2000.0 / (6356766.0 + 2000.0)  # geopotential altitude [m]
    expected_C = 288.15 - 0.0065 * h - 273.15  # US Standard Atmosphere 1976 troposphere
    assert r["pack_temperature_C"] == pytest.approx(expected_C, abs=1e-6)
    assert r["pack_resistance_ohm"] == pytest.approx(
        DEMO_VEHICLE["battery"]["resistance_ohm"] * _cold(expected_C), rel=1e-9)


def test_a_pack_temperature_in_the_file_wins_over_the_air():
    doc = _doc({"altitude_m": 0, "temperature_C": -10})
    doc["battery"]["temperature_C"] = 20
    r = hover_report(check_vehicle(doc, "warm-pack.json"))
    assert r["pack_temperature_C"] == 20
    assert r["pack_resistance_ohm"] == pytest.approx(DEMO_VEHICLE["battery"]["resistance_ohm"] * _cold(20), rel=1e-9)


@pytest.fixture(scope="module")
def high_fit(tmp_path_factory):
    path = tmp_path_factory.mktemp("trial2") / "sweep.csv"
    path.write_text(simulate_sweep(seed=31))
    high = check_vehicle(_doc({"altitude_m": 4200, "temperature_C": -5}), "high.json")
    return high, fit_for_vehicle(str(path), high)


def test_each_warning_once_on_the_fit_vehicle(high_fit):
    high, params = high_fit
    assert any("site air" in w for w in params["warnings"])  # stored at fit time
    report = hover_report(high, params)
    assert len(report["warnings"]) == len(set(report["warnings"]))
    assert sum("site air" in w for w in report["warnings"]) == 1
    sheet = " ".join(format_sheet(report).split())  # the sheet wraps at 80 columns
    for w in report["warnings"]:
        assert sheet.count("! " + " ".join(w.split())) == 1


def test_no_stale_warning_from_the_fit_vehicle_on_another(high_fit):
    high, params = high_fit
    fit_time = [w for w in params["warnings"] if "site air" in w or "beyond the bench sweep" in w]
    assert fit_time
    low = check_vehicle(_doc({"altitude_m": 1400, "temperature_C": 28}), "low.json")
    report = hover_report(low, params)
    for w in fit_time:
        assert w not in report["warnings"]
    # the site air of this vehicle is within 15 % of the bench air: no density warning at all
    assert not any("site air" in w for w in report["warnings"])
