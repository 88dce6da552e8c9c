"""The board bundle is made for one site's air, and the `firmware` output and the bundle's
README say so, with the air and what to do at another field (new-user trial 12, finding 2: a
healthy sea-level flight replayed against a 2400 m bundle read baseline_off and power_high, and
nothing but a comment in liftwatch_config.py named the site).

References: the demo vehicle's site is 1400 m, 28 C (schemas/examples/valid); the density
altitude of the printed density through the `ambiance` package (US Standard Atmosphere 1976,
Atmosphere.from_density; its height is geopotential, which differs from liftcal's geometric one
by about h^2 / r0, under 1 m at the demo's 2.2 km, well inside the 5 m tolerance).
"""

import json
import re

import ambiance
import pytest

from io_helpers import PARAMS, VEHICLE, run


def _firmware(tmp_path, *extra):
    code, out, err = run(["firmware", PARAMS, "--out", tmp_path / "b"] + list(extra))
    assert code == 0, err
    return " ".join(out.split())


def test_the_firmware_output_names_the_site_air_and_how_to_rebuild_for_another_field(tmp_path):
    text = _firmware(tmp_path, "--vehicle", VEHICLE)
    m = re.search(r"made for one site's air, ([0-9.]+) kg/m\^3 \(1400 m, 28 C; density altitude ([0-9]+) m\)", text)
    assert m, text
    rho, density_altitude = float(m.group(1)), float(m.group(2))
    assert density_altitude == pytest.approx(float(ambiance.Atmosphere.from_density(rho).h[0]), abs=5.0)
    assert "baseline_off" in text and "liftcal firmware %s --vehicle VEHICLE.json" % PARAMS in text
    readme = " ".join((tmp_path / "b" / "README.md").read_text().split())
    assert "## Made for one site" in readme
    assert "%.3f kg/m^3 (1400 m, 28 C; density altitude" % rho in readme
    assert "liftcal firmware PARAMS.json --vehicle VEHICLE.json --out DIR" in readme


def test_without_a_vehicle_file_the_set_s_site_density_is_named(tmp_path):
    code, out, err = run(["firmware", PARAMS, "--out", tmp_path / "j", "--json"])
    assert code == 0, err
    site = json.loads(out)["site"]
    with open(PARAMS) as fh:
        assert site["density_kg_m3"] == pytest.approx(json.load(fh)["vehicle"]["site_density_kg_m3"], abs=1e-4)
    assert "made for one site's air, %.3f kg/m^3 (density altitude" % site["density_kg_m3"] in \
        _firmware(tmp_path)
