"""`liftcal air`, `liftcal static`, `liftcal hover`: output keys, bad input, and light imports."""

import json
import os
import subprocess
import sys

import pytest

from estimator.core.atmosphere import site_air
from estimator.demo_data import DEMO_VEHICLE

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
DEMO_FILE = os.path.join(ROOT, "schemas", "examples", "valid", "vehicle-demo-quad.json")


def run(*args):
    return subprocess.run([sys.executable, "-m", "estimator", *args], capture_output=True, text=True, cwd=ROOT)


def run_json(*args):
    out = run(*args, "--json")
    assert out.returncode == 0, out.stderr
    return json.loads(out.stdout)


def assert_one_error_line(out, *needles):
    assert out.returncode == 2, (out.stdout, out.stderr)
    lines = out.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("error:"), out.stderr
    assert "Traceback" not in out.stderr
    for needle in needles:
        assert needle in lines[0], (needle, lines[0])
    return lines[0]


def test_air_json_keys_and_unit_suffixes():
    res = run_json("air", "--altitude", "4593ft", "--temperature", "28C", "--humidity", "40%")
    for key in ("density_kg_m3", "temperature_K", "pressure_Pa", "density_altitude_m"):
        assert key in res
    # 4593 ft = 1399.9 m (NIST exact foot); must equal the core at that altitude (1e-12)
    ref = site_air(4593 * 0.3048, 28.0, None, 40.0)
    assert res["density_kg_m3"] == pytest.approx(ref["density_kg_m3"], rel=1e-12)
    assert res["temperature_K"] == pytest.approx(301.15, abs=1e-9)


def test_air_text_output():
    out = run("air", "--altitude", "1400m")
    assert out.returncode == 0 and "kg/m^3" in out.stdout and "density altitude" in out.stdout


def test_static_thrust_from_power_and_power_from_thrust():
    fwd = run_json("static", "--diameter", "10in", "--power", "200W", "--factor", "0.5", "--density", "1.225")
    for key in ("ideal_thrust_N", "thrust_N", "induced_velocity_m_s", "disk_loading_N_m2", "density_kg_m3"):
        assert key in fwd
    # momentum theory by hand (Leishman 2006 eq. 2.15, from memory): A = pi 0.254^2 / 4 =
    # 0.050671 m^2, T_ideal = (2 * 1.225 * 0.050671 * 200^2)^(1/3) = 17.06 N; k = 0.5 -> 8.53 N.
    # 1e-3 relative: hand rounding to 4 digits.
    assert fwd["ideal_thrust_N"] == pytest.approx(17.06, rel=1e-3)
    assert fwd["thrust_N"] == pytest.approx(8.53, rel=1e-3)
    back = run_json("static", "--diameter", "0.254m", "--thrust", "%.12gN" % fwd["thrust_N"],
                    "--factor", "0.5", "--density", "1.225")
    for key in ("ideal_power_W", "power_W"):
        assert key in back
    assert back["power_W"] == pytest.approx(200.0, rel=1e-9)  # round trip, exact algebra


def test_static_defaults_to_the_rule_of_thumb_factor():
    res = run_json("static", "--diameter", "254mm", "--thrust", "500gf")
    assert res["static_factor"] == 0.3 and "common practice" in res["static_factor_source"]
    assert res["thrust_N"] == pytest.approx(0.5 * 9.80665, rel=1e-12)


def test_hover_json_and_sheet():
    res = run_json("hover", DEMO_FILE)
    for key in ("hover_command", "hover_command_full", "hover_command_empty", "hover_thrust_fraction",
                "thrust_to_weight", "hover_current_A", "hover_power_W", "flight_time_min", "warnings"):
        assert key in res
    assert isinstance(res["warnings"], list)
    sheet = run("hover", DEMO_FILE)
    assert sheet.returncode == 0 and "Will it hover?" in sheet.stdout and "Props off" in sheet.stdout


def test_vehicle_that_cannot_hover_exits_0_with_null_command(tmp_path):
    doc = dict(DEMO_VEHICLE, mass_kg=8.0)
    path = tmp_path / "heavy.json"
    path.write_text(json.dumps(doc))
    res = run_json("hover", str(path))
    assert res["hover_command"] is None
    out = run("hover", str(path))
    assert out.returncode == 0 and "cannot hover" in out.stdout


@pytest.mark.parametrize("args, needles", [
    (("static", "--diameter", "0in", "--power", "100"), ("--diameter", "above zero")),
    (("static", "--diameter", "-10in", "--power", "100"), ("--diameter",)),
    (("static", "--diameter", "10parsec", "--power", "100"), ("--diameter", "unknown unit")),
    (("static", "--diameter", "10in"), ("--power or --thrust",)),
    (("static", "--diameter", "10in", "--power", "100", "--factor", "1.3"), ("--factor", "above 1")),
    (("air", "--altitude", "1400furlong"), ("--altitude", "unknown unit")),
    (("air", "--humidity", "130%"), ("--humidity",)),
    (("air", "--altitude", "40km"), ("20000 m",)),
])
def test_bad_options_give_one_error_line(args, needles):
    assert_one_error_line(run(*args), *needles)


def test_bad_vehicle_files_give_one_error_line(tmp_path):
    assert_one_error_line(run("hover", str(tmp_path / "missing.json")), "missing.json", "no such file")
    broken = tmp_path / "broken.json"
    broken.write_text('{"mass_kg": 2.0,,}')
    assert_one_error_line(run("hover", str(broken)), "broken.json", "line 1", "malformed JSON")
    for field, value, path in (("mass_kg", -1.0, "$.mass_kg"), ("mass_kg", 0, "$.mass_kg")):
        bad = tmp_path / "bad.json"
        bad.write_text(json.dumps(dict(DEMO_VEHICLE, **{field: value})))
        assert_one_error_line(run("hover", str(bad)), "bad.json", path)
    for block, key, path in (("propeller", "diameter_m", "$.propeller.diameter_m"),
                             ("battery", "capacity_Ah", "$.battery.capacity_Ah")):
        doc = json.loads(json.dumps(DEMO_VEHICLE))
        doc[block][key] = 0
        bad = tmp_path / "zero.json"
        bad.write_text(json.dumps(doc))
        assert_one_error_line(run("hover", str(bad)), "zero.json", path)


def _heavy_modules_after(argv):
    code = ("import sys\n"
            "sys.argv = %r\n"
            "from estimator.cli import main\n"
            "try:\n    main()\nexcept SystemExit:\n    pass\n"
            "print('HEAVY', sorted(m for m in sys.modules if m.split('.')[0] in ('numpy', 'matplotlib')))\n"
            % (["liftcal"] + list(argv)))
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, cwd=ROOT)
    line = [l for l in out.stdout.splitlines() if l.startswith("HEAVY")][0]
    return line


@pytest.mark.parametrize("argv", [("--help",), ("air", "--altitude", "1400m"), ("air", "--json")])
def test_help_and_air_do_not_import_numpy_or_matplotlib(argv):
    assert _heavy_modules_after(argv) == "HEAVY []"


def test_importtime_of_air_lists_no_numpy():
    # second view of the same contract, through the interpreter's own import log
    out = subprocess.run([sys.executable, "-X", "importtime", "-m", "estimator", "air", "--json"],
                         capture_output=True, text=True, cwd=ROOT)
    assert out.returncode == 0
    imported = [l.rsplit("|", 1)[-1].strip() for l in out.stderr.splitlines() if l.startswith("import time:")]
    assert "estimator.core.atmosphere" in imported  # the log is real
    assert not any(m.split(".")[0] in ("numpy", "matplotlib") for m in imported)


def test_hover_with_params_uses_the_fitted_flow():
    # --params hands the parameter set to estimator.fitted_hover (the bench flow); its
    # report carries the hover-command interval, which the physics-only report does not.
    params = os.path.join(ROOT, "schemas", "examples", "valid", "params-demo-with-hover.json")
    res = run_json("hover", DEMO_FILE, "--params", params)
    assert "hover_command_interval_95" in res and isinstance(res["warnings"], list)
    sheet = run("hover", DEMO_FILE, "--params", params)
    assert sheet.returncode == 0 and "95 % interval" in sheet.stdout and "n/a" not in sheet.stdout
    assert_one_error_line(run("hover", DEMO_FILE, "--params", os.path.join(ROOT, "nope.json")), "nope.json")
