"""A bench CSV's '# altitude:' and '# temperature:' need their unit, as the `fit --altitude` and
`--temperature` options and a vehicle file's site do (new-user trial 12, finding 1: '# altitude:
5280', meant in feet, was read as 5280 m: bench air 0.614 instead of 0.985 kg/m^3 and a hover
100 us too low, without a word).

References: US Standard Atmosphere 1976 through the `ambiance` package (pressure at altitude);
1 ft = 0.3048 m exactly (NIST SP 811, appendix B); the ideal-gas density of dry air
rho = p / (R_d T), R_d = 287.05 J/(kg K) (from memory, as in test_bench_air_inputs).
The sweep is test_bench_air_inputs' INVENTED square-law sweep.
"""

import ambiance
import pytest

from io_helpers import refused
from test_bench_air_inputs import R_D, _fit_json, _sweep


@pytest.mark.parametrize("comment, line_no, needles", [
    ("# altitude: 5280\n", 1, ("# altitude", "5280", "has no unit", "'# altitude: 5280ft'", "'# altitude: 5280m'")),
    ("# altitude: 5280ft\n# temperature: 22\n", 2, ("# temperature", "has no unit", "'# temperature: 22C'",
                                                     "'# temperature: 22F'")),
])
def test_a_bare_altitude_or_temperature_comment_is_refused_naming_file_line_and_fix(tmp_path, comment, line_no,
                                                                                   needles):
    csv = _sweep(tmp_path, comment)
    line = refused(["fit", csv, "--out", tmp_path / "p.json"], "%s: line %d" % (csv, line_no), *needles)
    assert not (tmp_path / "p.json").exists(), line
    # the command line refuses the same bare number the same way
    option, bare = "--" + needles[0][2:], comment.splitlines()[-1].split(": ")[1]
    refused(["fit", _sweep(tmp_path, "", "o.csv"), "--out", tmp_path / "p.json", option, bare], option,
            "has no unit")


def test_the_comment_with_its_unit_gives_the_air_at_that_altitude(tmp_path):
    # 5280 ft = 1609.344 m (NIST SP 811, exact); US Standard Atmosphere 1976 pressure there
    # (ambiance, about 83.4 kPa) at 22 C: about 0.985 kg/m^3, not the 0.614 of 5280 m
    _, params = _fit_json(tmp_path, _sweep(tmp_path, "# altitude: 5280ft\n# temperature: 22C\n"))
    p = float(ambiance.Atmosphere(5280 * 0.3048).pressure[0])
    assert params["bench_air"]["density_kg_m3"] == pytest.approx(p / (R_D * (22.0 + 273.15)), rel=2e-3)


def test_an_implausible_bare_comment_names_the_unit_slip_first_as_the_option_does(tmp_path):
    # 12000 m is above the 9000 m bound; 12000 ft = 3658 m is inside it (as `air --altitude 12000`)
    refused(["fit", _sweep(tmp_path, "# altitude: 12000\n"), "--out", tmp_path / "p.json"],
            "line 1", "did you mean 12000ft?")
