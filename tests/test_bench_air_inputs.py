"""Bench air from CSV comments and fit options (new-user trial item 3), each case failing before.

References: US Standard Atmosphere 1976 through the `ambiance` package (sea-level pressure
101325 Pa), the ideal-gas density of dry air rho = p / (R_d T) with R_d = 287.05 J/(kg K)
(design notes sec. 3, from memory); the sensible site ranges are the ones `liftcal air`
applies (schemas/vehicle.schema.json), so fit and air must refuse alike.
"""

import ambiance
import numpy as np
import pytest

from io_helpers import refused, run

R_D = 287.05  # J/(kg K), dry air


def _sweep(tmp_path, comments, name="b.csv"):
    # an invented square-law sweep: 21 commands x 2 rows, thrust ~ u^2, current ~ u^3 (momentum
    # theory: power ~ thrust^1.5), 0.5 % noise
    rng = np.random.default_rng(5)
    u = np.repeat(np.linspace(0.0, 1.0, 21), 2)
    t = 12.0 * u * u * (1.0 + rng.normal(0.0, 0.005, u.size))
    i = 0.3 + 25.0 * u ** 3 * (1.0 + rng.normal(0.0, 0.005, u.size))
    path = tmp_path / name
    with open(path, "w") as fh:
        fh.write(comments + "# diameter: 10in\ncommand[-],voltage[V],current[A],thrust[N]\n")
        for row in zip(u, 15.0 - 0.2 * u, i, t):
            fh.write("%.4f,%.4f,%.4f,%.5f\n" % row)
    return str(path)


def _fit_json(tmp_path, csv, *options):
    import json
    out = tmp_path / "p.json"
    code, text, err = run(["fit", csv, "--out", out, "--json"] + list(options))
    assert code == 0, err
    return json.loads(text), json.load(open(out))


def test_temperature_comment_alone_is_used_and_the_warning_says_what_was_assumed(tmp_path):
    summary, params = _fit_json(tmp_path, _sweep(tmp_path, "# temperature: 35C\n"))
    p0 = float(ambiance.Atmosphere(0.0).pressure[0])  # 101325 Pa, US Standard Atmosphere 1976
    expected = p0 / (R_D * (35.0 + 273.15))
    assert params["bench_air"]["density_kg_m3"] == pytest.approx(expected, rel=1e-4)
    text = " ".join(summary["warnings"])
    assert "ISA sea level 1.225" not in text  # the old, false warning
    assert "no altitude or pressure" in text and "temperature" in text


def test_a_misspelt_comment_key_is_refused_naming_the_known_keys(tmp_path):
    refused(["fit", _sweep(tmp_path, "# densty: 1.19\n"), "--out", tmp_path / "p.json"],
            "densty", "did you mean '# density'", "altitude, density, diameter")
    assert not (tmp_path / "p.json").exists()


def test_an_unknown_quantity_comment_is_named_and_a_note_is_not(tmp_path):
    summary, _ = _fit_json(tmp_path, _sweep(tmp_path, "# rho: 1.19\n# operator: Ann (bench 2)\n"))
    text = " ".join(summary["warnings"])
    assert "'# rho' (line 1) not read" in text and "operator" not in text


@pytest.mark.parametrize("comment, option, air_args", [
    ("# altitude: 1500m\n# temperature: 300\n", ["--temperature", "300"], ["--temperature", "300"]),
    ("# humidity: 150\n", ["--humidity", "150"], ["--humidity", "150"]),
    ("# altitude: 30000\n", ["--altitude", "30000"], ["--altitude", "30000"]),
])
def test_bench_air_is_range_checked_as_liftcal_air_does(tmp_path, comment, option, air_args):
    air_line = refused(["air"] + air_args)
    bound = air_line.split("(")[-1]  # the range and what it is, e.g. "an outside air temperature)"
    refused(["fit", _sweep(tmp_path, comment), "--out", tmp_path / "p.json"], "line", bound.split(")")[0][:12])
    refused(["fit", _sweep(tmp_path, ""), "--out", tmp_path / "p.json"] + option, option[0])
    assert not (tmp_path / "p.json").exists()


def test_density_with_altitude_is_refused_not_silently_preferred(tmp_path):
    refused(["fit", _sweep(tmp_path, ""), "--out", tmp_path / "p.json", "--density", "1.2",
             "--altitude", "3000m"], "--density", "--altitude", "not both")


def test_a_density_comment_contradicting_the_altitude_comment_is_refused(tmp_path):
    # 200 m in the US Standard Atmosphere 1976 is 1.2017 kg/m^3 (ambiance): 1.0 is 17 % off
    rho_200 = float(ambiance.Atmosphere(200.0).density[0])
    line = refused(["fit", _sweep(tmp_path, "# density: 1.0\n# altitude: 200m\n"), "--out", tmp_path / "p.json"],
                   "# density", "# altitude")
    assert ("%.4g" % rho_200) in line
    # agreeing within 3 %: the stated density is used
    _, params = _fit_json(tmp_path, _sweep(tmp_path, "# density: %.4f\n# altitude: 200m\n" % (rho_200 * 1.01),
                                            "ok.csv"))
    assert params["bench_air"]["density_kg_m3"] == pytest.approx(rho_200 * 1.01, rel=1e-3)


def test_bare_pressure_option_suggests_hectopascal(tmp_path):
    refused(["fit", _sweep(tmp_path, ""), "--out", tmp_path / "p.json", "--pressure", "1013"],
            "--pressure", "1013hPa")


def test_pressure_without_temperature_says_the_temperature_was_assumed(tmp_path):
    # station pressure 970 hPa at the standard sea-level 15 C (US Standard Atmosphere 1976),
    # dry air: rho = p / (R_d T)
    summary, params = _fit_json(tmp_path, _sweep(tmp_path, "# pressure: 970hPa\n"))
    assert params["bench_air"]["density_kg_m3"] == pytest.approx(97000.0 / (R_D * 288.15), rel=1e-3)
    assert any("no temperature given" in w for w in summary["warnings"])
