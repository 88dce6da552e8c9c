"""README items of new-user trial 9 (findings 14 and 16), each checked against the program itself:

- the tour names files (vehicle.json, bench.csv, params.json, the flights) that exist only in the
  demo's folder: the README says to `cd liftcal-demo` before it, and every flight file the tour
  replays is one the demo writes (estimator.commands.demo.FLIGHTS);
- the stand-export example is an INVENTED header in our own words (it read like one tool's export
  quoted verbatim), and doing what the README says with it gives what liftcal's own refusal asks for;
- --payload's help says that a list's bare numbers take its last unit (the demo's own
  0,0.25,0.5,0.75,1kg), and the list is read that way.
"""

import os
import re

from estimator.commands.demo import FLIGHTS
from io_helpers import ROOT
from trial_helpers import ok, refused, report


def _readme():
    with open(os.path.join(ROOT, "README.md"), encoding="utf-8") as fh:
        return fh.read()


def test_the_tour_starts_in_the_demo_folder():
    text = _readme()
    tour = text.index("## A short tour")
    assert "`cd liftcal-demo` first" in text[:tour]
    demo_files = {stem + ".csv" for stem, _, _ in FLIGHTS}
    replayed = re.findall(r"\$ liftcal replay (\S+\.csv)", text)
    assert replayed and set(replayed) <= demo_files, replayed


def _spans_after(text, words):
    part = text[text.index(words):]
    return re.findall(r"`([^`]+)`", part)


def test_the_stand_export_example_is_our_own_and_its_fix_is_what_liftcal_asks(tmp_path):
    text = " ".join(_readme().split())
    assert "ESC signal" not in text and "Motor speed" not in text      # finding 16: no tool's own header
    spans = _spans_after(text, "A stand's or logger's own export.")
    header = next(s for s in spans if "(" in s and "," in s)           # the invented export header
    ours = next(s for s in spans if s.startswith("command[") and "," in s)
    assert "invented header" in text[text.index("A stand's or logger's own export."):][:300]
    rows = ["%d,16.0,%.3f,%.4f,%d" % (1000 + 50 * k, 0.2 + 0.02 * k * k, 0.0005 * k * k, 400 * k) for k in range(21)]
    csv = tmp_path / "export.csv"
    csv.write_text("# density: 1.2\n# diameter: 10in\n" + header + "\n" + "\n".join(rows) + "\n", encoding="utf-8")
    line = refused("fit", csv, "--out", tmp_path / "p.json")
    asked = ",".join(re.findall(r": write (\S+?)(?:;|$)", line))
    assert asked == ours, (asked, ours, line)


def test_a_payload_lists_bare_numbers_take_its_last_unit():
    from estimator.commands.preflight import hover

    help_text = " ".join(next(p for p in hover.params if p.name == "payload_text").help.split())
    assert "a number without a unit takes the list's last unit" in help_text
    from estimator.preflight.payload import parse_payloads

    # 1 g = 1e-3 kg (NIST SP 811): "0,250,500g" is 0, 0.25 and 0.5 kg
    assert parse_payloads("0,250,500g") == ([0.0, 0.25, 0.5], "g")
    out = report("hover", os.path.join(ROOT, "schemas", "examples", "valid", "vehicle-demo-quad.json"),
                 "--payload", "0,0.25,0.5kg")
    assert [round(r["payload_kg"], 6) for r in out["payload"]["rows"]] == [0.0, 0.25, 0.5]
    assert ok("hover", "--help")
