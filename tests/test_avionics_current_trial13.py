"""The vehicle key avionics_current_A (new-user trial 13, finding 1): the steady current the flight
pack gives to everything that is not a motor (flight controller, FPV transmitter, camera,
gimbal). A board's current sensor measures the whole bus, the bench one ESC: without the key a
healthy flight with 0.5 A of avionics on a 2S toothpick raised three alarms.

Checks against outside facts: Kirchhoff's current law and the Thevenin pack (V_bus = V_oc - R I,
the pack current the sum of its loads; common practice), P = V I, and t = 60 C / I for the
endurance at a constant current. Flights from the demo's closed-loop simulator (an INVENTED
vehicle) with a constant current added, as a real bus carries it.
"""

import json

import pytest

from estimator.core.hover import hover_at_pack
from estimator.demo.flight_sim import to_csv
from estimator.demo.scenario import DEMO_VEHICLE
from io_helpers import PARAMS, refused, run
from watch_helpers import flight_arrays_once

MOTOR, PROP = DEMO_VEHICLE["motor"], DEMO_VEHICLE["propeller"]


def test_the_pack_current_holds_the_avionics_and_the_bus_sags_by_all_of_it():
    v_oc, r = 14.8, 0.05
    plain = hover_at_pack(2.05, 4, v_oc, r, 1.1, MOTOR, PROP, 0.95)
    with_av = hover_at_pack(2.05, 4, v_oc, r, 1.1, MOTOR, PROP, 0.95, avionics_current_A=2.0)
    for point in (with_av["hover"], with_av["full"]):
        # Kirchhoff + Thevenin: the bus is the open-circuit voltage less R times every load's current
        assert point["bus_V"] == pytest.approx(v_oc - r * point["pack_current_A"], rel=1e-6)
    # the same rotors on a bus 2 A x 0.05 ohm lower draw a little more: at least the 2 A more
    assert with_av["hover"]["pack_current_A"] >= plain["hover"]["pack_current_A"] + 2.0
    assert with_av["hover"]["pack_current_A"] < plain["hover"]["pack_current_A"] + 2.2
    assert with_av["hover"]["bus_V"] < plain["hover"]["bus_V"]


def _vehicle(tmp_path, name, **extra):
    path = tmp_path / name
    path.write_text(json.dumps(dict(DEMO_VEHICLE, **extra)))
    return path


@pytest.mark.parametrize("route", [[], ["--params", PARAMS]], ids=["datasheet", "bench fit"])
def test_hover_adds_the_avionics_to_the_pack_current_and_the_endurance(tmp_path, route):
    plain = _vehicle(tmp_path, "plain.json")
    avionic = _vehicle(tmp_path, "av.json", avionics_current="1500mA")   # a unit suffix, as other keys take
    outs = []
    for path in (plain, avionic):
        code, text, err = run(["hover", path, "--json"] + route)
        assert code == 0, err
        outs.append(json.loads(text))
    a, b = outs
    assert b["avionics_current_A"] == 1.5 and a["avionics_current_A"] == 0.0
    assert b["hover_current_A"] == pytest.approx(a["hover_current_A"] + 1.5, abs=0.1)
    # t = 60 C_use / I at the nominal-pack hover current
    assert b["flight_time_usable_share_min"] == pytest.approx(60.0 * b["usable_Ah"] / b["hover_current_A"], rel=1e-9)
    assert b["flight_time_min"] < a["flight_time_min"] * (a["hover_current_A"] + 1.0) / (a["hover_current_A"] + 1.5)
    # the ESC's own current is the rotors' share, not the avionics'
    assert b["hover_esc_input_current_A"] == pytest.approx(a["hover_esc_input_current_A"], rel=0.02)
    code, text, err = run(["hover", avionic] + route)
    assert code == 0 and "+ 1.50 A avionics" in " ".join(text.split()), text


def test_a_negative_avionics_current_is_refused(tmp_path):
    refused(["hover", _vehicle(tmp_path, "neg.json", avionics_current_A=-0.5)], "avionics_current_A")


AVIONICS_A = 2.0   # about 12 % of the demo quad's hover current: a gimbal and a FPV transmitter


@pytest.fixture(scope="module")
def flights():
    plain = flight_arrays_once(seed=2)
    bus = flight_arrays_once(seed=2)
    bus["current_A"] = [a + AVIONICS_A for a in bus["current_A"]]
    return plain, bus


def _replay(tmp_path, flight, vehicle):
    # the example set on disk (the demo's fitted set): a shared in-memory set may have been edited by another test
    log = tmp_path / "f.csv"
    log.write_text(to_csv(flight))
    code, text, err = run(["replay", log, "--params", PARAMS, "--vehicle", vehicle, "--json"])
    assert code == 0, err
    return json.loads(text)


@pytest.fixture(scope="module")
def replays(flights, tmp_path_factory):
    """(without, ignored, given): the plain flight, the flight with the avionics on the bus replayed
    without the key, and with it."""
    plain, bus = flights
    tmp = tmp_path_factory.mktemp("av")
    return (_replay(tmp, plain, _vehicle(tmp, "v0.json")), _replay(tmp, bus, _vehicle(tmp, "v1.json")),
            _replay(tmp, bus, _vehicle(tmp, "v2.json", avionics_current_A=AVIONICS_A)))


def test_replay_takes_the_avionics_off_the_rotor_power(replays):
    without, ignored, given = replays
    assert without["alarms"] == 0
    # the same healthy flight with 2 A more on the bus: unmodelled, it reads as a fault or a payload
    assert ignored["alarms"] > 0 or ignored["mass"]["implied_kg"] > 1.05 * without["mass"]["implied_kg"]
    # given in the vehicle file: no alarm, and the implied mass within 1.5 % of the flight without it
    # (the tables take the avionics power at the nominal pack voltage; the bus moves about +-5 %)
    assert given["alarms"] == 0, given["events"]
    assert given["mass"]["implied_kg"] == pytest.approx(without["mass"]["implied_kg"], rel=0.015)


def test_replay_notes_a_steady_draw_on_the_ground_the_vehicle_does_not_give(replays):
    without, ignored, given = replays
    # Kirchhoff: with the rotors stopped the bus current is the avionics' (the simulator's ground rows
    # carry its sensor's noise around 0.3 A, below the note's floor)
    note = ignored["ground_current_note"]
    import re
    amps = float(re.search(r"with the rotors stopped the bus carries ([0-9.]+) A", note).group(1))
    assert AVIONICS_A <= amps <= AVIONICS_A + 0.5 and "avionics_current_A" in note, note
    assert "ground_current_note" not in given and "ground_current_note" not in without


def test_the_bundle_notes_name_the_avionics_power(tmp_path):
    vehicle = _vehicle(tmp_path, "v.json", avionics_current_A=AVIONICS_A)
    out = tmp_path / "B"
    code, text, err = run(["firmware", PARAMS, "--vehicle", vehicle, "--out", out])
    assert code == 0, err
    config = (out / "liftwatch_config.py").read_text()
    # P = V I at the nominal pack: 2 A x 4 x 3.7 V = 29.6 W
    assert "avionics 2 A = 29.6 W" in config
