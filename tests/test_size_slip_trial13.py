"""A propeller size written with a unit whose diameter no propeller has (new-user trial 13,
finding 10): "22x7.4m" was blamed on its pitch, "7.4 is greater than the maximum of 3; given in
cm instead of m?". The whole size is the slip; the trade writes propeller sizes in inches
(common practice), so inches are tried first. 1 in = 0.0254 m (NIST SP 811, exact):
22 in = 0.5588 m, 7.4 in = 0.18796 m.
"""

import copy
import json

from io_helpers import refused
from test_preflight_trial7_inputs import QUAD

import pytest


def _vehicle(tmp_path, size):
    doc = copy.deepcopy(QUAD)
    doc["propeller"] = {"size": size, "blades": 2}
    path = tmp_path / "v.json"
    path.write_text(json.dumps(doc))
    return path


def test_a_size_in_metres_meant_in_inches_names_inches_for_the_whole_size(tmp_path):
    line = refused(["hover", _vehicle(tmp_path, "22x7.4m")], "$.propeller.size", '"22x7.4m" gives a diameter of 22 m',
                   "0.01..3 m", 'written in metres: inches meant? "22x7.4in" = 0.5588 m x 0.188 m')
    assert "7.4 is greater" not in line and "cm instead of m" not in line


@pytest.mark.parametrize("size, meant", [("5x3mm", '"5x3in" = 0.127 m x 0.0762 m'),       # 5 mm: below 1 cm
                                         ("178x89in", '"178x89mm" = 0.178 m x 0.089 m')])  # trial 7, item 8
def test_other_sizes_outside_the_bounds_name_the_unit_that_makes_a_propeller(tmp_path, size, meant):
    refused(["hover", _vehicle(tmp_path, size)], "meant? " + meant)


def test_an_ordinary_size_in_any_unit_is_read(tmp_path):
    from estimator.units import parse_propeller_size

    # 56 cm x 19 cm and 22 in x 7.4 in: both ordinary large propellers
    assert parse_propeller_size("56x19cm") == pytest.approx((0.56, 0.19))
    assert parse_propeller_size("22x7.4in") == pytest.approx((0.5588, 0.18796))
