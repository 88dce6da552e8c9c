"""Sixth new-user trial, item 5: `compare` gives each row the caveats `hover` gives the same
vehicle: a value that looks like a unit slip, the small-rotor note, the cold pack. Both come from
estimator/preflight/caveats.py.

Reference: `liftcal hover` on the vehicle file with the row's values written in (the single run
the row stands for); the cold-pack sentence is estimator.cautions.COLD_PACK (its one home). The
vehicle is the trial's invented 5-inch racer at 3500 m and -10 C; `90x4.5in` is the trial's typo
(2.29 m read as inches: a unit or decimal slip). Through the command: io_helpers.run (exit code,
stdout, stderr apart).
"""

import json

from trial_helpers import ok
from test_endurance_lead_trial6 import RACER


def test_compare_rows_carry_the_caveats_hover_gives(tmp_path):
    path = tmp_path / "racer.json"
    path.write_text(json.dumps(RACER))
    vary = ["--vary", "propeller.size=5.1x3.6in,90x4.5in", "--vary", "battery.capacity=1100mAh,1500mAh"]
    result = json.loads(ok(*["compare", path] + vary + ["--json"]))
    kinds_seen = set()
    for row in result["rows"]:
        doc = dict(RACER, propeller=dict(RACER["propeller"], size=row["values"]["propeller.size"]),
                   battery=dict(RACER["battery"], capacity=row["values"]["battery.capacity"]))
        single = tmp_path / "single.json"
        single.write_text(json.dumps(doc))
        report = json.loads(ok("hover", single, "--json"))
        assert row["caveats"] == report["caveats"] and row["caveats"]
        for caveat in row["caveats"]:
            assert caveat["text"] in report["warnings"]       # the sheet prints the same words
            kinds_seen.add(caveat["kind"])
        kinds = [c["kind"] for c in row["caveats"]]
        assert "cold_pack" in kinds                            # -10 C for every row
        assert ("unit_slip" in kinds) == (row["values"]["propeller.size"] == "90x4.5in")
    # the full-command sag is a caveat beside the row since the seventh trial (finding 5), not a margin
    assert kinds_seen == {"unit_slip", "small_rotor", "cold_pack", "full_command_sag"}
    table = ok(*["compare", path] + vary)
    flat = " ".join(table.split())
    slip = [r for r in result["rows"] if r["values"]["propeller.size"] == "90x4.5in"][0]
    assert "$.propeller.size: 2.29 m (written \"90x4.5in\")" in flat and " meant" in flat and slip["caveats"][0]["short"] in flat
    assert "SMALL ROTOR: endurance at the figure of merit" in flat
    from estimator.cautions import COLD_PACK
    assert COLD_PACK.split("(")[0] in flat and "warm it to room temperature" in flat
