"""A parameter set liftcal wrote, then edited by hand so that it no longer agrees with itself, is
refused with the edit named first (new-user trial finding: hover.hover_command set to 0.45 by a
json load / modify / dump got 'error: edited.json: $.hover.hover_command_interval_95: [0.549035,
0.564456] does not contain hover_command 0.45' from check, export, export --from-edited and hover
--params, as if the fit had contradicted itself).

Expectations (common practice: a tool that finds a file changed since it wrote it says so before
what the change broke, and says how to go on; one error line, exit 2, no file written):
- check, export, hover --params: the edit first, then the inconsistency, then what to do;
- export and firmware --from-edited take the hand-set hover command (the option is for hand
  edits; the hover block is the fit's summary, which no liftcal computation reads) and say it
  lies outside the fit's interval;
- an edit that breaks values liftcal computes with stays refused, also with --from-edited, saying why;
- a set without a seal (made by hand or by an older liftcal) keeps its old message.
"""

import json

from estimator.params import write_params
from io_helpers import PARAMS, VEHICLE, refused, run, tree_digest

import pytest

SET = json.load(open(PARAMS))
LO, HI = SET["hover"]["hover_command_interval_95"]
HAND_SET = 0.45        # the trial's hand-set hover command, below the fit's interval
assert not LO <= HAND_SET <= HI


def _edited(tmp_path, group, key, value, name="edited.json"):
    """A set liftcal wrote (sealed), then one value changed by json load / modify / dump."""
    path = tmp_path / name
    write_params(str(path), json.load(open(PARAMS)))
    doc = json.loads(path.read_text())
    doc[group][key] = value
    path.write_text(json.dumps(doc, indent=2))
    return path


def _edit_first(line, path, problem):
    # the edit is said before the inconsistency (common practice, module docstring)
    said = "%s was EDITED since liftcal wrote it" % path
    assert said in line and problem in line and line.index(said) < line.index(problem), line


@pytest.mark.parametrize("command", [["check"], ["export"], ["hover", VEHICLE, "--params"]])
def test_a_hand_set_hover_command_is_refused_as_an_edit(tmp_path, command):
    path = _edited(tmp_path, "hover", "hover_command", HAND_SET)
    before = tree_digest(tmp_path)
    line = refused(command + [path], "fit the bench sweep again with --vehicle", "--from-edited")
    _edit_first(line, path, "does not contain hover_command 0.45")
    assert tree_digest(tmp_path) == before                     # no user file replaced


def test_export_from_edited_takes_the_hand_set_hover_command(tmp_path):
    path = _edited(tmp_path, "hover", "hover_command", HAND_SET)
    code, out, err = run(["export", path, "--from-edited", "--json"])
    assert code == 0, err
    # the shipped example map exports it in permille: 0.45 x 1000 = 450 (the map's arithmetic)
    assert json.loads(out)["hoverpoint.command_permille"] == 450
    flat = " ".join(err.split())
    assert "carries the edited values" in flat
    assert "hover.hover_command 0.45 lies outside the fit's 95 %% interval [%g, %g]" % (LO, HI) in flat


def test_firmware_from_edited_takes_it_and_refuses_it_without(tmp_path):
    path = _edited(tmp_path, "hover", "hover_command", HAND_SET)
    line = refused(["firmware", path, "--out", tmp_path / "b", "--vehicle", VEHICLE],
                   "add --from-edited to use the edited hover command")
    _edit_first(line, path, "does not contain hover_command 0.45")
    assert not (tmp_path / "b").exists()
    code, out, err = run(["firmware", path, "--out", tmp_path / "b", "--vehicle", VEHICLE, "--from-edited"])
    assert code == 0, err
    assert "outside the fit's 95 % interval" in " ".join(out.split())


def test_an_edit_of_what_liftcal_computes_with_stays_refused_and_says_why(tmp_path):
    # full-command thrust below the thrust measured mid-sweep: a curve no rotor has
    low = 0.5 * SET["static_factor"]["thrust_at_value_N"]
    path = _edited(tmp_path, "thrust_curve", "thrust_max_N", low)
    line = refused(["export", path, "--from-edited"], "--from-edited does not take this edit")
    _edit_first(line, path, "$.thrust_curve.thrust_max_N")
    assert line.count("fit the sweep again") + line.count("fit the bench sweep again") == 1   # said once
    line = refused(["check", path], "fit the bench sweep again")
    _edit_first(line, path, "$.thrust_curve.thrust_max_N")
    assert "--from-edited" not in line          # check has no such option


def test_a_set_without_a_seal_keeps_its_message(tmp_path):
    doc = json.load(open(PARAMS))                # the schema's example: no seal
    doc["hover"]["hover_command"] = HAND_SET
    path = tmp_path / "by-hand.json"
    path.write_text(json.dumps(doc))
    line = refused(["check", path], "%s: $.hover.hover_command_interval_95" % path)
    assert "EDITED" not in line                  # liftcal cannot tell whether it wrote it
