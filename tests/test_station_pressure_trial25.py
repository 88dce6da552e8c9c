"""A sea-level pressure (QNH) given as the station pressure at a low site is said, not taken
silently (new-user trial 25, finding 1): `air --altitude 600m --pressure 1013hPa` gave a density
7 % high with no word, where the same slip at 1400 m is refused (more than 8 % above the standard).

References: the ISO 2533 / ICAO standard atmosphere (US Standard Atmosphere 1976 below 32 km) has
943.2 hPa at 600 m (the `ambiance` package, an independent implementation, gives 94322 Pa), so
1013 hPa there is 7.4 % above it; weather keeps a station pressure within about +-3 % of the
standard (from memory; record highs near +7 %), so a warning, not a refusal, between 3 and 8 %.
"""

import copy
import json
import os

from io_helpers import ROOT
from trial_helpers import json_file, ok, refused, report

AT_600M = ["--altitude", "600m", "--pressure", "1013hPa"]


def _vehicle(tmp_path, pressure):
    with open(os.path.join(ROOT, "schemas", "examples", "valid", "vehicle-demo-quad.json"), encoding="utf-8") as fh:
        doc = json.load(fh)
    doc = copy.deepcopy(doc)
    doc["site"] = {"altitude": "600m", "temperature": "15C", "pressure": pressure}
    return json_file(tmp_path, doc)


def _qnh_warnings(warnings):
    return [w for w in warnings if "QNH" in w and "943 hPa" in w]


def test_a_qnh_at_600_m_is_warned_about_in_air_text_and_json():
    # before: exit 0, no warning at all
    text = " ".join(ok("air", *AT_600M).split())
    # the slip named and the ISA station pressure there (943.2 hPa, ISO 2533 / ICAO; ambiance)
    assert "! --pressure:" in text and "sea-level pressure (QNH" in text and "943 hPa" in text, text
    assert "7.4 % above" in text, text  # 1013 / 943.2 - 1 = 7.4 % (ISO 2533 / ICAO)
    doc = report("air", *AT_600M)
    assert len(_qnh_warnings(doc["warnings"])) == 1, doc["warnings"]
    # taken as given, not refused: 101300 Pa / (287.05 J/(kg K) x 284.25 K) = 1.2415 kg/m^3 (ideal gas)
    assert abs(doc["density_kg_m3"] - 1.2415) < 5e-4, doc["density_kg_m3"]


def test_a_qnh_in_a_vehicle_file_at_600_m_is_warned_about_on_the_sheet(tmp_path):
    path = _vehicle(tmp_path, "1013hPa")
    sheet = " ".join(ok("hover", path).split())
    assert "sea-level pressure (QNH" in sheet and "943 hPa" in sheet, sheet  # ISO 2533 / ICAO at 600 m
    assert len(_qnh_warnings(report("hover", path)["warnings"])) == 1


def test_a_station_pressure_within_the_weather_range_is_not_warned_about(tmp_path):
    # 960 hPa at 600 m is 1.8 % above the standard 943.2 hPa: weather (about +-3 %, from memory)
    doc = report("air", "--altitude", "600m", "--pressure", "960hPa")
    assert not [w for w in doc["warnings"] if "--pressure" in w], doc["warnings"]
    assert not [w for w in report("hover", _vehicle(tmp_path, "960hPa"))["warnings"] if "QNH" in w]


def test_the_refusal_beyond_8_percent_stays():
    # 1013 hPa at 1400 m is 18 % above the standard 856 hPa (ISO 2533 / ICAO): refused as before
    line = refused("air", "--altitude", "1400m", "--pressure", "1013hPa")
    assert "sea-level pressure (QNH" in line and "856 hPa" in line, line


def test_static_says_it_too():
    # static takes the same site options (common practice: one check for both commands)
    doc = report("static", "--diameter", "10in", "--power", "100W", *AT_600M)
    assert len(_qnh_warnings(doc["warnings"])) == 1, doc["warnings"]


def test_a_bench_sweep_says_it_too():
    # the bench's air takes the same check (one core function); 101300 Pa at 600 m as above
    from estimator.bench.bench_air import bench_air

    warnings = []
    bench_air("bench.csv", {}, None, 600.0, 20.0, 101300.0, None, warnings)
    assert [w for w in warnings if w.startswith("--pressure: bench air:") and "QNH" in w], warnings
