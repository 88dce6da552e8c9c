"""`compare` varying a pack's size says on screen what it held fixed (new-user trial 12, finding 3:
--vary battery.capacity=10Ah,16Ah,22Ah ranked the 22 Ah pack first at the file's 5 kg, while a
22 Ah 6S pack alone weighs about 2.4-3.3 kg at the 150-200 Wh/kg of LiPo packs (from memory), and
nothing on screen said the mass and the pack resistance were held as written).
"""

import json

import pytest

from io_helpers import VEHICLE, run


def _compare(*varies, as_json=False):
    args = ["compare", VEHICLE] + [a for v in varies for a in ("--vary", v)] + (["--json"] if as_json else [])
    code, out, err = run(args)
    assert code == 0, err
    return json.loads(out) if as_json else " ".join(out.split())


def test_varying_the_capacity_alone_names_the_mass_and_resistance_held():
    text = _compare("battery.capacity=3Ah,5Ah,8Ah")
    assert ("! battery.capacity varied with the all-up mass and the pack resistance held as written (2.05 kg)"
            in text), text
    assert "vary mass and battery.resistance too" in text
    # right under the verdict it qualifies
    assert text.index("! battery.capacity varied") > text.index("longest hover that keeps every margin")
    assert _compare("battery.capacity=3Ah,5Ah", as_json=True)["held"] == ["mass", "battery.resistance"]


@pytest.mark.parametrize("varies, held", [
    (("battery.capacity=3Ah,5Ah", "mass=2kg,2.3kg"), ["battery.resistance"]),
    (("battery.capacity_Ah=3,5", "mass_kg=2,2.3", "battery.resistance=20mohm,15mohm"), []),
    (("battery.cells=4,6",), ["mass", "battery.resistance"]),
    (("propeller.size=10x4.5in,11x5in",), []),   # no pack size varied: nothing to say
])
def test_only_what_is_held_is_named(varies, held):
    assert _compare(*varies, as_json=True)["held"] == held
    text = _compare(*varies)
    assert ("held as written" in text) == bool(held), text
