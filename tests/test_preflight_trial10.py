"""Tenth new-user trial, pre-flight items: a loaded cutoff at or above the nominal cell voltage
is refused (finding 3), and the sheet's verdict never says "it holds its weight" beside a
thrust-to-weight below 1 reachable before the cutoff (finding 3).

Vehicles are the demo's INVENTED quad (estimator.demo.scenario) with the changes named in each
test. Commands run through click's CliRunner (trial_helpers).
"""

import json

import pytest

from estimator.demo.scenario import DEMO_VEHICLE
from trial_helpers import json_file, ok, refused, report


def _quad(**battery):
    doc = json.loads(json.dumps(DEMO_VEHICLE))
    doc["battery"].update(battery)
    return doc


# A loaded cell sits below its open-circuit voltage, and a nominal pack's open-circuit voltage is
# the nominal cell voltage: a cutoff there or above stops every flight before it starts. Common
# practice (from memory): LiPo nominal 3.7 V, loaded cutoff about 3.3..3.5 V per cell; cylindrical
# Li-ion nominal 3.6 V, cutoff about 2.8..3.2 V.
@pytest.mark.parametrize("battery, chemistry", [
    ({"cutoff_cell_V": 3.9}, "LiPo"),                       # the trial's slip: above nominal and empty
    ({"cutoff_cell_V": 3.7}, "LiPo"),                       # at the nominal voltage
    ({"full_cell_V": 4.2, "nominal_cell_V": 3.6, "empty_cell_V": 3.0, "cutoff_cell_V": 3.6}, "Li-ion"),
])
def test_a_cutoff_at_or_above_the_nominal_cell_voltage_is_refused(tmp_path, battery, chemistry):
    line = refused("hover", json_file(tmp_path, _quad(**battery)))
    assert "quad.json: $.battery.cutoff_cell_V: the loaded cutoff %g V is at or above the nominal cell voltage %g V" \
        % (battery["cutoff_cell_V"], battery.get("nominal_cell_V", 3.7)) in line, line
    assert "common practice for a %s pack" % chemistry in line, line
    if battery["cutoff_cell_V"] > battery.get("empty_cell_V", 3.5):
        assert "(and the empty %g V)" % battery.get("empty_cell_V", 3.5) in line


def test_an_ordinary_cutoff_is_still_accepted(tmp_path):
    # common practice: 3.3 V per cell under load on a LiPo
    r = report("hover", json_file(tmp_path, _quad(cutoff_cell_V=3.3)))
    assert r["cutoff_cell_V"] == 3.3 and r["can_hover"]


def _verdict(text):
    return " ".join(text.split("1. Will it hover?")[1].split("2. With what margin?")[0].split())


def test_the_verdict_never_holds_the_weight_beside_a_reachable_thrust_to_weight_below_1(tmp_path):
    # cutoffs from an ordinary 3.3 V up to just below the nominal 3.7 V: where holding the weight
    # sags the nominal pack below the cutoff, the thrust-to-weight reachable before the cutoff is
    # below 1 and the verdict must say it does not hold it (trial 10: "it holds its weight at
    # command 0.49 ... thrust-to-weight 0.00 (reachable before the pack's cutoff)")
    seen_below = 0
    for i, cutoff in enumerate([3.3, 3.5, 3.6, 3.62, 3.64, 3.66, 3.68, 3.69]):
        path = json_file(tmp_path, _quad(cutoff_cell_V=cutoff), "q%d.json" % i)
        r = report("hover", path)
        verdict = _verdict(ok("hover", path))
        tw = r["reachable_thrust_to_weight"] if r["thrust_to_weight_reachable"] is False else r["thrust_to_weight"]
        if tw < 1.0:
            seen_below += 1
            assert "holds its weight" not in verdict and "YES" not in verdict, (cutoff, verdict)
            assert verdict.startswith("NOT ON A NOMINAL PACK - holding its weight takes command"), verdict
            assert "below its %.2f V loaded cutoff" % cutoff in verdict and "$.battery.cutoff_cell_V" in verdict
        else:
            assert "NOT ON A NOMINAL PACK" not in verdict, (cutoff, verdict)
            assert r["hover_bus_V"] / r["cells"] >= cutoff
    assert seen_below >= 2  # the grid reaches the case it guards


# common practice (from memory): makers' short-burst discharge ratings are about twice the
# continuous one, so a draw beyond twice the C-rating x capacity is beyond even a burst rating
BURST_OVER_CONTINUOUS = 2.0


@pytest.mark.parametrize("c_rating, far", [(6.8, True), (13.5, False)])
def test_a_pack_drawn_far_beyond_its_rating_gets_the_caution(tmp_path, c_rating, far):
    # trial 10: a 6S Li-ion pack drawn at 3 x its rating got only "will sag and heat"; here the
    # demo quad on Li-ion cells (4.2 / 3.6 / 3.0 V, common practice) with a low C-rating
    from estimator.cautions import PACK_FAR_OVER_RATING, PACK_FAR_OVER_RATING_FACTOR, PACK_OVER_RATING

    assert PACK_FAR_OVER_RATING_FACTOR == BURST_OVER_CONTINUOUS
    path = json_file(tmp_path, _quad(full_cell_V=4.2, nominal_cell_V=3.6, empty_cell_V=3.0, max_discharge_C=c_rating))
    r = report("hover", path)
    ratio = r["pack_current_judged_A"] / r["pack_current_limit_A"]
    assert r["pack_current_limit_A"] == pytest.approx(5.0 * c_rating)  # C-rating x capacity (5 Ah)
    assert (ratio >= BURST_OVER_CONTINUOUS) is far
    section4 = " ".join(ok("hover", path).split()).split("4. What to watch out for")[1]
    line = [w for w in section4.split("! ") if "from the pack, above its rating of" in w]
    assert len(line) == 1, section4
    if far:
        assert "%.1f times its discharge rating, beyond even a burst rating" % ratio in line[0]
        assert "can overheat, swell or vent" in line[0] and "let it cool" in line[0]
        assert " ".join((PACK_FAR_OVER_RATING % ratio).split()) in line[0]
    else:
        assert "beyond its discharge rating the pack will sag and heat" in line[0] and "vent" not in line[0]
        assert PACK_OVER_RATING in line[0]
