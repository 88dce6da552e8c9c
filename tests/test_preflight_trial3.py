"""Third new-user trial, pre-flight items: a sea-level pressure given as station pressure, values
written with a unit that usually mean a unit slip, cold packs, compare's margins, payload plot.

Every command runs through click's CliRunner in tmp_path (exit code, stdout and stderr apart).
External references are named beside each check: US Standard Atmosphere 1976 through the
`ambiance` package; weather ranges of sea-level pressure (common practice, from memory).
"""

import json

import ambiance
import pytest
from click.testing import CliRunner

from estimator.cli import cli
from estimator.core.atmosphere import site_air, station_pressure_problem
from estimator.demo.scenario import DEMO_VEHICLE


def run(*args):
    result = CliRunner().invoke(cli, [str(a) for a in args])
    return result.exit_code, result.stdout, result.stderr


def refused(*args):
    code, out, err = run(*args)
    lines = err.strip().splitlines()
    assert code == 2 and out == "" and len(lines) == 1 and lines[0].startswith("error: "), (code, out, err)
    assert "Traceback" not in err
    return lines[0]


def _standard_hPa(altitude_m):
    # US Standard Atmosphere 1976, geometric altitude (ambiance takes geometric heights)
    return float(ambiance.Atmosphere(altitude_m).pressure[0]) / 100.0


def _vehicle_file(tmp_path, name="v.json", **changes):
    doc = json.loads(json.dumps(DEMO_VEHICLE))
    for path, value in changes.items():
        node = doc
        parts = path.split("__")
        for part in parts[:-1]:
            node = node.setdefault(part, {})
        node[parts[-1]] = value
    path = tmp_path / name
    path.write_text(json.dumps(doc))
    return path


# --- item 1: sea-level pressure (QNH) entered as the station pressure -------------------------

def test_qnh_at_altitude_is_refused_by_air_naming_the_station_pressure(tmp_path):
    line = refused("air", "--altitude", "2000m", "--pressure", "1013hPa")
    assert "--pressure" in line and "QNH" in line
    # the station pressure it suggests is the standard one at 2000 m: 795.0 hPa (ICAO table)
    assert "about %.0f hPa" % _standard_hPa(2000.0) in line and "795 hPa" in line


def test_qnh_is_refused_in_static_a_vehicle_site_and_a_bench_comment(tmp_path):
    refused("static", "--diameter", "5in", "--thrust", "2N", "--altitude", "2000m", "--pressure", "1013hPa")
    vehicle = _vehicle_file(tmp_path, site={"altitude": "2000m", "temperature": "30C", "pressure": "1013hPa"})
    line = refused("hover", vehicle)
    assert "$.site.pressure_Pa" in line and "QNH" in line
    bench = tmp_path / "b.csv"
    rows = "".join("%.2f,15.0,%.3f,%.4f\n" % (u, 0.3 + 25 * u ** 3, 12 * u * u)
                   for u in [i / 20 for i in range(21)])
    bench.write_text("# altitude: 1400m\n# pressure: 1013hPa\n# diameter: 10in\n"
                     "command[-],voltage[V],current[A],thrust[N]\n" + rows)
    line = refused("fit", bench, "--out", tmp_path / "p.json")
    assert "# pressure" in line and "QNH" in line and "about %.0f hPa" % _standard_hPa(1400.0) in line
    assert not (tmp_path / "p.json").exists()


@pytest.mark.parametrize("altitude_m", [0.0, 300.0, 1000.0, 2000.0, 3500.0])
def test_weather_highs_and_lows_at_the_site_pass(altitude_m):
    # sea-level pressure in strong highs reaches about 1050 hPa and in deep lows about 950 hPa
    # (common practice, from memory): the same shares of the standard station pressure pass
    p_std_Pa = _standard_hPa(altitude_m) * 100.0
    for share in (950.0 / 1013.25, 1.0, 1050.0 / 1013.25):
        assert station_pressure_problem(altitude_m, p_std_Pa * share) is None
        site_air(altitude_m, 20.0, p_std_Pa * share)
    # a sea-level reading of 1013 hPa at 1000 m or more is 12 % or more above the standard
    if altitude_m >= 1000.0:
        assert "QNH" in station_pressure_problem(altitude_m, 101300.0)


def test_a_pressure_below_the_standard_is_not_questioned():
    # 795 hPa measured at a 2000 m site whose file leaves the altitude at 0 m: the density from
    # pressure and temperature is right, and thinner air errs on the safe side
    air = site_air(0.0, 2.0, 79500.0)
    # ideal-gas dry air rho = p / (R_d T), R_d = 287.05 J/(kg K) (from memory)
    assert air["density_kg_m3"] == pytest.approx(79500.0 / (287.05 * 275.15), rel=1e-3)
