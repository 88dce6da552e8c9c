"""A flight log whose current is one ESC's, about 1/n of the bus total for n rotors, is named as
such, not "another vehicle" (new-user trial 12, finding 8: a hex log at current / 6). Common
practice: ESC telemetry reports each motor's own input current; the pack's current is their sum.
The flight is the simulated demo quad (tests/watch_helpers.demo_flight_rows, 4 rotors).
"""

from io_helpers import refused
from watch_helpers import demo_flight_rows, write_log_rows


def test_a_quarter_of_the_current_on_a_quad_is_named_one_esc(tmp_path, params_file):
    f = write_log_rows(tmp_path, "time[s],command[-],voltage[V],current[A]", demo_flight_rows(7),
                       lambda t, u, v, a: (t, u, v, a / 4.0))
    line = refused(["replay", str(f), "--params", str(params_file)], "error: %s: column current[A]" % f,
                   "4 times it (the rotor count)", "about 1/4 of the expected bus total",
                   "likely one ESC's current", "log the bus total")
    assert "another vehicle or pack" not in line, line


def test_a_current_far_below_any_share_is_still_another_vehicle(tmp_path, params_file):
    # a tenth of the current on a quad: neither the bus total nor one of four ESCs
    f = write_log_rows(tmp_path, "time[s],command[-],voltage[V],current[A]", demo_flight_rows(7),
                       lambda t, u, v, a: (t, u, v, a / 10.0))
    line = refused(["replay", str(f), "--params", str(params_file)], "another vehicle or pack")
    assert "ESC" not in line, line
