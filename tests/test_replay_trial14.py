"""replay's words of new-user trial 14 (findings 3 and 4, and its safety note), on the demo's
simulated flights (an INVENTED vehicle, estimator.demo.flight_sim, seed 1 as `liftcal demo`
writes them) and the demo's fitted set:

- 3: after a power alarm the kernel holds the implied mass (it judges no mass while a power
  fault is suspected: estimator.core.watch), yet replay said "implied mass ... at 299.8 s (the
  last window)" on a flight with +15 % power from 120 s: the time of the log's last row, not of
  the last window, and nothing said that the faulty part was never judged;
- 4: a parameter set edited since liftcal sealed it was replayed without a word (hover --params
  warns; export and firmware refuse);
- safety: the event lines gave a guess at the cause but not the action; each alarm now says
  "land and inspect before the next flight", and --json gives the sentence as after_alarm
  (estimator.cautions).
"""

import json

import pytest

from estimator.cautions import ALARM_ACTION, ALARM_ACTION_SHORT
from estimator.demo.scenario import DEMO_VEHICLE
from estimator.params import write_params
from io_helpers import run
from watch_helpers import demo_fit_params, flight_csv_once


@pytest.fixture(scope="module")
def sealed(tmp_path_factory):
    path = tmp_path_factory.mktemp("r14") / "params.json"
    write_params(str(path), demo_fit_params())
    return path


def _flight(tmp_path, fault, name="f.csv", **kw):
    path = tmp_path / name
    path.write_text(flight_csv_once(dict(DEMO_VEHICLE), fault=fault, seed=1, **kw))
    return path


def test_the_mass_held_after_a_power_alarm_says_so_and_gives_its_own_time(tmp_path, sealed):
    log = _flight(tmp_path, "power_high")
    code, out, err = run(["replay", log, "--params", sealed, "--json"])
    assert code == 0, err
    doc = json.loads(out)
    alarm = next(e for e in doc["events"] if e["kind"] == "power_high")
    mass = doc["mass"]
    # the fault starts at 120 s (flight_sim fault_at_s): the last window the kernel completed ends
    # before the alarm, not at the log's last row (299.8 s)
    assert mass["at_s"] < alarm["t_s"] and mass["held_by"] == {"kind": "power_high", "t_s": alarm["t_s"]}
    code, text, err = run(["replay", log, "--params", sealed])
    flat = " ".join(text.split())
    assert ("implied mass %s kg at %.1f s (all windows to the last before the power_high alarm at %.1f s; no mass is "
            "judged while a power alarm is up)" % ("%.3f" % mass["implied_kg"], mass["at_s"], alarm["t_s"])) in flat


def test_an_alarm_line_says_land_and_inspect_and_a_quiet_flight_carries_no_such_line(tmp_path, sealed):
    code, text, err = run(["replay", _flight(tmp_path, "power_low"), "--params", sealed])
    assert code == 0, err
    event = " ".join(text.split("power_low", 1)[1].split("\n-")[0].split())
    assert event.endswith("(chipped or loose blade?); %s" % ALARM_ACTION_SHORT), event
    code, out, err = run(["replay", tmp_path / "f.csv", "--params", sealed, "--json"])
    assert json.loads(out)["after_alarm"] == ALARM_ACTION
    clean = _flight(tmp_path, None, "clean.csv", duration_s=120.0)
    code, out, err = run(["replay", clean, "--params", sealed, "--json"])
    doc = json.loads(out)
    assert doc["alarms"] == 0 and "after_alarm" not in doc and ALARM_ACTION not in doc["cautions"]
    code, text, err = run(["replay", clean, "--params", sealed])
    assert ALARM_ACTION_SHORT not in text


def test_replay_warns_of_a_parameter_set_edited_since_liftcal_wrote_it(tmp_path, sealed):
    log = _flight(tmp_path, None, duration_s=120.0)
    code, out, err = run(["replay", log, "--params", sealed, "--json"])
    assert code == 0 and not any("edited" in w for w in json.loads(out)["warnings"]), err
    edited = tmp_path / "edited.json"
    doc = json.loads(sealed.read_text())
    doc["power_model"]["residual_rel_std"] = 0.2
    edited.write_text(json.dumps(doc, indent=1))
    code, out, err = run(["replay", log, "--params", edited, "--json"])
    assert code == 0, err
    assert json.loads(out)["warnings"][0].startswith(
        "%s was edited since liftcal wrote it (its content seal no longer matches): this replay judges the log "
        "by the edited values, not the fit's" % edited)
    code, text, err = run(["replay", log, "--params", edited])
    assert "! %s was edited since liftcal wrote it" % edited in " ".join(text.split())
