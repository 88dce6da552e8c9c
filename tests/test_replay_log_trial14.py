"""Flight-log hints of new-user trial 14 (findings 5, 6 and 7), on a flight of the demo's
closed-loop simulator (an INVENTED vehicle) with one column spoiled as a logger spoils it:

- 5: a voltage column with its sign reversed was called "another vehicle or pack" (like the
  reversed current sensor, it is named: the bus voltage is never negative);
- 6: 0..1 commands under command[us] read "0..0 as written" with no unit named: the values as
  written fit command[-];
- 7: a command column stuck at 0 while the hover current flows was blamed on avionics: 14.6 A of
  avionics on a 6S hexa is not plausible; half a hover's current or more with the command at rest
  means the rotors turn (Kirchhoff: with the rotors stopped only the avionics draw).
"""

import json

from estimator.demo.flight_sim import to_csv
from io_helpers import PARAMS, refused, run
from watch_helpers import flight_arrays_once


def _log(tmp_path, edit, header=None):
    flight = flight_arrays_once(duration_s=120.0)
    edit(flight)
    text = to_csv(flight)
    if header:
        text = text.replace("time[s],command[-],voltage[V],current[A]", header)
    path = tmp_path / "f.csv"
    path.write_text(text)
    return path


def test_a_reversed_voltage_column_is_named_as_a_reversed_sensor(tmp_path):
    def negate(f):
        f["voltage_V"] = [-v for v in f["voltage_V"]]
    line = refused(["replay", _log(tmp_path, negate), "--params", PARAMS],
                   "column voltage[V]: the voltage is negative in 100 % of the rows",
                   "the voltage sensor reads reversed; flip its sign")
    assert "another vehicle" not in line


def test_fractions_under_command_us_are_shown_as_written_and_given_their_label(tmp_path):
    log = _log(tmp_path, lambda f: None, "time[s],command[us],voltage[V],current[A]")
    high = max(flight_arrays_once(duration_s=120.0)["command"])
    line = refused(["replay", log, "--params", PARAMS], "column command[us]",
                   "0..%.4g as written" % round(high, 4), "likely a 0..1 fraction labelled [us]; label it command[-]")
    assert "0..0 as" not in line


def test_a_command_stuck_at_rest_while_the_hover_current_flows_is_not_blamed_on_avionics(tmp_path):
    def stuck(f):
        f["command"] = [0.0] * len(f["command"])
    code, out, err = run(["replay", _log(tmp_path, stuck), "--params", PARAMS, "--json"])
    assert code == 0, err
    note = json.loads(out)["ground_current_note"]
    assert "where the command column says the rotors stand still" in note
    assert "check the logger's command field" in note and "avionics_current_A" not in note, note
