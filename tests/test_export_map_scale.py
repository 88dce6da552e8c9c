"""An export map whose scale does not convert its source to the unit it names is refused (new-user
trial finding: a thrust in N exported with scale 1000 and unit "g" printed 'my.thr  22472 g', 22 kg
of thrust for a 10-inch propeller).

Conversions used here, worked out in this file, not read from liftcal:
- 1 gram-force = 1e-3 kg x 9.80665 m/s^2 = 9.80665e-3 N exactly (standard gravity declared by the
  3rd CGPM, 1901; NIST SP 330 (2019) and NIST SP 811 appendix B), so 1 N = 101.97 gf;
- 1 in = 0.0254 m exactly (NIST SP 811 appendix B);
- 1 V = 1000 mV, 1 N = 1000 mN (SI prefixes, NIST SP 330).
The tolerance, 0.5 %, lets a map write a conversion to three or more significant digits (101.97,
102) and is far below any slip (a factor of 9.8 or 10): common practice.
"""

import json

from io_helpers import PARAMS, refused, run, tree_digest

import pytest

STANDARD_GRAVITY = 9.80665           # m/s^2, exact (3rd CGPM 1901; NIST SP 330)
N_TO_GF = 1.0 / (1e-3 * STANDARD_GRAVITY)   # 101.9716... gf per N
INCH_M = 0.0254                      # exact (NIST SP 811)
SET = json.load(open(PARAMS))
THRUST_N = SET["thrust_curve"]["thrust_max_N"]


def _map(tmp_path, entry, name="my-map.json"):
    path = tmp_path / name
    path.write_text(json.dumps({"schema_version": 1, "model": "liftcal.map/1",
                                "settings": [{"name": "other.bend", "source": "thrust_curve.quadratic_share",
                                              "decimals": 3}, dict({"name": "my.thr"}, **entry)]}))
    return path


def test_a_thrust_in_newtons_scaled_as_grams_of_mass_is_refused(tmp_path):
    # the trial's map: scale 1000 (grams per kilogram) on a thrust in N, labelled g (gram-force)
    path = _map(tmp_path, {"source": "thrust_curve.thrust_max_N", "scale": 1000, "unit": "g", "decimals": 0})
    before = tree_digest(tmp_path)
    line = refused(["export", PARAMS, "--map", path, "--out", tmp_path / "s.txt"],
                   str(path), "$.settings[1] (my.thr)",             # the map file and the entry's JSON path
                   "scale 1000 ",                                   # the scale given
                   "needs %.6g" % N_TO_GF,                          # 101.972: CGPM 1901 standard gravity
                   "standard gravity (9.80665 m/s^2) left out")     # the slip: 1000 / 101.97 = 9.81 = g0
    assert "%.4g x" % (1000.0 / N_TO_GF) in line                    # 9.807 x the conversion
    assert tree_digest(tmp_path) == before                          # nothing written


@pytest.mark.parametrize("scale, unit", [
    (101.97, "g"),              # 1 N = 101.97 gf (CGPM 1901 g0), to 5 digits
    (102, "gf"),                # 3 digits: 0.03 % off, inside 0.5 %
    (0.10197, "kgf"),           # 1 N = 0.10197 kgf (same source)
    (1000, "mN"),               # SI prefix (NIST SP 330)
])
def test_a_thrust_scaled_by_its_unit_s_conversion_is_exported(tmp_path, scale, unit):
    path = _map(tmp_path, {"source": "thrust_curve.thrust_max_N", "scale": scale, "unit": unit, "decimals": 3})
    code, out, err = run(["export", PARAMS, "--map", path, "--json"])
    assert code == 0, err
    # the value is the arithmetic of the map, done here (round(value x scale, 3))
    assert json.loads(out)["my.thr"] == round(THRUST_N * scale, 3)


@pytest.mark.parametrize("entry, needles", [
    # 1 in = 0.0254 m (NIST SP 811): the diameter in inches needs 1 / 0.0254 = 39.37, not 0.0254
    ({"source": "rotor.diameter_m", "scale": INCH_M, "unit": "in"},
     ["needs %.6g" % (1.0 / INCH_M), "turned upside down"]),
    # 1 V = 1000 mV (SI prefix): no scale keeps volts under the label mV
    ({"source": "thrust_curve.reference_voltage_V", "unit": "mV"}, ["needs 1000", "no scale given (1)"]),
    # 1 N = 1000 mN: a million is 1000 x that, a prefix slip
    ({"source": "thrust_curve.thrust_max_N", "scale": 1e6, "unit": "mN"}, ["needs 1000", "1000 x that"]),
    # a negative scale: the right size, the wrong sign (101.97 gf per N, CGPM 1901 g0)
    ({"source": "thrust_curve.thrust_max_N", "scale": -101.97, "unit": "gf"}, ["needs 101.972", "negative scale"]),
])
def test_other_scales_that_miss_their_unit_are_refused_with_the_slip(tmp_path, entry, needles):
    refused(["export", PARAMS, "--map", _map(tmp_path, entry)], "$.settings[1] (my.thr)", *needles)


@pytest.mark.parametrize("entry", [
    {"source": "thrust_curve.thrust_max_N", "scale": 1000, "unit": "counts"},   # a unit liftcal does not know
    {"source": "thrust_curve.thrust_max_N", "scale": 1000},                      # no unit named
    {"source": "motor_model.thrust_per_V2_N", "scale": 1000, "unit": "g"},       # N/V^2: not a force
])
def test_a_unit_liftcal_cannot_judge_is_left_as_before(tmp_path, entry):
    # common practice: only a conversion liftcal knows for certain is judged
    code, out, err = run(["export", PARAMS, "--map", _map(tmp_path, dict(entry, decimals=3)), "--json"])
    assert code == 0, err
    group, key = entry["source"].split(".")
    assert json.loads(out)["my.thr"] == round(SET[group][key] * 1000, 3)    # the map's arithmetic, as before
