"""Tenth new-user trial: a bench sweep whose current column reads zero got 'fewer than 5 rows
with thrust and power above idle' with no cause, a flight log current of 1e12 A was called
'likely milliamps' (1e12 mA is still 1e9 A) (finding 5), and a flight log command in permille
labelled [us] exited 0 with every sample a sensor fault (finding 1).

The flight logs are the simulated demo flight (tests/watch_helpers.demo_flight_rows) changed by
the one slip, as tests/test_replay_slip_causes_trial9.py does; a command in permille runs
0..1000, in % 0..100, in microseconds 1000..2000 (common practice).

The sweep is tests/test_fit_tare_trial8._sweep (an INVENTED 10-inch 6S rotor from a DC motor and
fixed-coefficient propeller model written there, not any product) with its current column set to
zero, as a current sensor that is not connected reads. A turning rotor draws current (a DC
motor's torque is Kt I: any electric-machines text, from memory).
"""

import pytest

from io_helpers import refused as refused_in_main
from test_fit_tare_trial8 import _sweep
from watch_helpers import write_log_rows
from trial_helpers import refused
from watch_helpers import demo_flight_rows


def _zero_current(text, value="0.000"):
    out = []
    for line in text.splitlines():
        if line[:1].isdigit():
            cells = line.split(",")
            cells[2] = value
            line = ",".join(cells)
        out.append(line)
    return "\n".join(out) + "\n"


def test_a_sweep_whose_current_reads_zero_names_the_sensor(tmp_path):
    csv = tmp_path / "sweep.csv"
    csv.write_text(_zero_current(_sweep(0.0)))
    line = refused("fit", csv, "--out", tmp_path / "p.json")
    assert "sweep.csv" in line and "the current reads zero" in line
    assert "current sensor connected" in line and "current[A]" in line
    assert not (tmp_path / "p.json").exists()


def test_the_same_sweep_with_its_current_fits(tmp_path):
    # the control: the sweep as the model wrote it is fitted (exit 0), so the cause above is the zero
    from trial_helpers import run

    csv = tmp_path / "sweep.csv"
    csv.write_text(_sweep(0.0))
    code, out, err = run("fit", csv, "--out", tmp_path / "p.json")
    assert code == 0, err


@pytest.fixture(scope="module")
def rows():
    return demo_flight_rows(7)


@pytest.mark.parametrize("scale", [1e12, 1e9])
def test_a_current_no_unit_makes_plausible_gets_no_milliamp_hint(tmp_path, params_file, rows, scale):
    # 1e12 (or 1e9) times the demo's flight current: as milliamps still a million amps and more,
    # far beyond the watch's sensor range: not a current of this vehicle in either unit
    f = write_log_rows(tmp_path, "time[s],command[-],voltage[V],current[A]", rows,
               lambda t, u, v, a: (t, u, v, scale * a))
    line = refused_in_main(["replay", f, "--params", params_file], "column current[A]",
                           "not a current of this vehicle")
    assert "likely milliamps" not in line


def test_milliamps_labelled_amps_keep_their_hint(tmp_path, params_file, rows):
    # the control: the demo's current written in mA under [A] fits the range as milliamps
    f = write_log_rows(tmp_path, "time[s],command[-],voltage[V],current[A]", rows,
               lambda t, u, v, a: (t, u, v, 1000.0 * a))
    refused_in_main(["replay", f, "--params", params_file], "likely milliamps in a column labelled [A]")


@pytest.mark.parametrize("scale,likely", [
    (1000.0, "likely permille (0..1000) labelled [us]; label it command[permille]"),
    (100.0, "likely percent (0..100) labelled [us]; label it command[%]"),
])
def test_a_flight_command_labelled_microseconds_in_another_unit_is_named(tmp_path, params_file, rows, scale,
                                                                          likely):
    # before: exit 0, 'too short to learn: 0.0 s of flight', a sensor_fault 'command -0.878'
    f = write_log_rows(tmp_path, "time[s],command[us],voltage[V],current[A]", rows,
               lambda t, u, v, a: (t, scale * u, v, a))
    refused_in_main(["replay", f, "--params", params_file], "column command[us]", "below zero command", likely)


def test_a_microsecond_log_idling_at_988_us_is_no_slip(tmp_path, params_file, rows):
    # an ESC low end point of 988 us (common practice) is 12 permille below zero: no refusal, also
    # when the log idles there for its first 30 s (10 % of it, beyond the 5 % share a slip needs)
    idle = [(t, -0.012, v, 0.05 * a) if t < 30.0 else (t, u, v, a) for t, u, v, a in rows]
    f = write_log_rows(tmp_path, "time[s],command[us],voltage[V],current[A]", idle,
               lambda t, u, v, a: (t, 1000.0 + 1000.0 * u, v, a))
    code, out, err = run_main(["replay", f, "--params", params_file])
    assert code == 0 and "below zero command" not in err, err


def run_main(args):
    from io_helpers import run

    return run([str(a) for a in args])
