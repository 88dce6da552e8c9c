"""Unit suffixes typed by a person, converted to SI at the edge.

Expected factors: NIST Special Publication 811 (2008), Appendix B.8/B.9, exact by
definition (inch = 0.0254 m, pound = 0.45359237 kg, standard gravity 9.80665 m/s^2).
"""

import pytest

from estimator.errors import InputError
from estimator.units import parse_quantity


@pytest.mark.parametrize("text, kind, si", [
    ("850g", "mass", 0.850),            # NIST SP 811: 1 g = 1e-3 kg
    ("2.05", "mass", 2.05),             # bare number takes the SI default
    ("10in", "length", 0.254),          # NIST SP 811: 1 in = 0.0254 m exactly
    ("254mm", "length", 0.254),
    ("1400m", "altitude", 1400.0),
    ("4593ft", "altitude", 4593 * 0.3048),  # NIST SP 811: 1 ft = 0.3048 m exactly
    ("0.85kgf", "force", 0.85 * 9.80665),   # NIST SP 811: 1 kgf = 9.80665 N exactly
    ("1lbf", "force", 4.4482216152605),     # NIST SP 811 B.8: 1 lbf = 4.448 222 N
    ("8.3N", "force", 8.3),
    ("1013.25hPa", "pressure", 101325.0),   # ICAO standard sea-level pressure
    ("300K", "temperature", 26.85),         # returned in degC; 0 degC = 273.15 K
    ("212F", "temperature", 100.0),         # water boiling point at 1 atm, by definition of degF
])
def test_suffix_to_si(text, kind, si):
    assert parse_quantity(text, kind) == pytest.approx(si, rel=1e-12, abs=1e-12)


@pytest.mark.parametrize("text", ["850furlong", "ten", "", "1..2g", "g"])
def test_bad_quantity_names_the_option(text):
    with pytest.raises(InputError) as exc:
        parse_quantity(text, "mass", "--mass")
    assert "--mass" in str(exc.value)
