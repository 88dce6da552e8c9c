"""`liftcal fit` options (new-user trial 9): a bare --altitude or --temperature is refused as
`air` and `static` refuse it (finding 8: 5000 m or 5000 ft are 30 % apart in density), and --out
must name a JSON file (finding 12: `--out params_out.csv` wrote the JSON set under a name that
reads as a bench sweep or a flight log, while --plot insisted on .png).

The sweep is test_bench_air_inputs' INVENTED square-law sweep; the references for the air are
there (US Standard Atmosphere 1976 through ambiance).
"""

import ambiance
import pytest

from io_helpers import refused, run
from test_bench_air_inputs import _fit_json, _sweep


@pytest.mark.parametrize("option, value, units", [("--altitude", "5000", "300m or 1000ft"),
                                                  ("--temperature", "30", "21C or 70F")])
def test_a_bare_bench_altitude_or_temperature_is_refused(tmp_path, option, value, units):
    line = refused(["fit", _sweep(tmp_path, ""), "--out", tmp_path / "p.json", option, value], option,
                   "has no unit", units)
    assert "Traceback" not in line
    assert not (tmp_path / "p.json").exists()
    # the same as air: both refuse the bare number
    refused(["air", option, value], option, "has no unit")


def test_the_bench_altitude_with_its_unit_is_read(tmp_path):
    # 5000 ft = 1524 m (1 ft = 0.3048 m, exact): US Standard Atmosphere 1976 density there (ambiance)
    _, params = _fit_json(tmp_path, _sweep(tmp_path, ""), "--altitude", "5000ft", "--temperature", "5.1C")
    atmosphere = ambiance.Atmosphere(1524.0)
    assert float(atmosphere.temperature_in_celsius[0]) == pytest.approx(5.094, abs=0.01)
    assert params["bench_air"]["density_kg_m3"] == pytest.approx(float(atmosphere.density[0]), rel=2e-3)


@pytest.mark.parametrize("name, why", [("params_out.csv", "a .csv name reads as a bench sweep or a flight log"),
                                       ("params", "a parameter set is a JSON file;"),
                                       ("params.txt", "a .txt name reads as another kind of file")])
def test_the_parameter_set_must_be_named_json(tmp_path, name, why):
    out = tmp_path / name
    line = refused(["fit", _sweep(tmp_path, ""), "--out", out], "--out %s" % out, why,
                   "name a file ending in .json")
    assert not out.exists() and sorted(p.name for p in tmp_path.iterdir()) == ["b.csv"]
    code, text, _ = run(["fit", _sweep(tmp_path, ""), "--out", tmp_path / "P.JSON"])
    assert code == 0 and (tmp_path / "P.JSON").exists(), line


def test_the_assumed_temperatures_altitude_is_quoted_to_the_metre(tmp_path):
    # finding 15: '# altitude: 1150ft' was quoted as '350.52 m' (1150 ft = 350.52 m, 1 ft = 0.3048 m
    # exact); the standard atmosphere's temperature there needs no centimetres
    summary, _ = _fit_json(tmp_path, _sweep(tmp_path, "# altitude: 1150ft\n"))
    text = " ".join(" ".join(summary["warnings"]).split())
    assert "temperature at 351 m is assumed" in text and "350.52" not in text, text
