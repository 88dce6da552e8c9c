"""Three ordinary log slips refused with the right likely cause (new-user trial 9, finding 7):
the voltage and current columns swapped, a current sensor unplugged (every current 0 while the
rotors turn) and a command in permille labelled %. Before, replay blamed "another vehicle or
pack" for the first two and the bench reader offered only us or [-] for the third.

Each case is the simulated demo flight (tests/watch_helpers.demo_flight_rows) or the demo bench
sweep (estimator.demo.bench_sim) changed by the one slip. What tells the slips apart is common
practice on any log: a motor's current rises with the command while the pack's voltage sags
under it (a Thevenin pack, V = V_oc - R I); a current sensor that reads nothing reads about 0 A
however hard the rotors work; a command in permille runs 0..1000, in % 0..100.
"""

import pytest

from estimator.demo.bench_sim import simulate_sweep
from io_helpers import refused, run
from watch_helpers import demo_flight_rows, write_log_rows


@pytest.fixture(scope="module")
def rows():
    return demo_flight_rows(7)


def _replay_refused(f, params_file, *needles):
    line = refused(["replay", str(f), "--params", str(params_file)], "error: %s: " % f, *needles)
    assert "another vehicle or pack" not in line, line
    return line


def test_voltage_and_current_labels_swapped_are_named(tmp_path, params_file, rows):
    # the header names current before voltage, the data keep voltage before current
    f = write_log_rows(tmp_path, "time[s],command[-],current[A],voltage[V]", rows, lambda t, u, v, a: (t, u, v, a))
    _replay_refused(f, params_file, "columns voltage[V] and current[A]",
                    "likely the voltage and current columns swapped")


def test_another_pack_whose_current_falls_in_the_pack_range_is_not_called_a_swap(tmp_path, params_file, rows):
    # a 3-cell log (voltage x 3/4: below the 4-cell pack) whose current (x 0.8, about 14.6 A) lies
    # within the 4-cell pack's 12.6..17.6 V by chance: its voltage sags and its current rises with
    # the command, so it is another pack, as before
    f = write_log_rows(tmp_path, "time[s],command[-],voltage[V],current[A]", rows,
               lambda t, u, v, a: (t, u, 0.75 * v, 0.8 * a))
    line = refused(["replay", str(f), "--params", str(params_file)], "another vehicle or pack",
                   "below its empty pack")
    assert "swapped" not in line, line


@pytest.mark.parametrize("unit", ["A", "mA"])
def test_a_current_that_reads_zero_in_flight_names_the_sensor(tmp_path, params_file, rows, unit):
    f = write_log_rows(tmp_path, "time[s],command[-],voltage[V],current[%s]" % unit, rows,
               lambda t, u, v, a: (t, u, v, 0.0))
    _replay_refused(f, params_file, "column current[%s]: median 0 A over" % unit,
                    "the current reads zero in flight; is the current sensor connected")


def test_amps_labelled_milliamps_are_still_named_as_such(tmp_path, params_file, rows):
    # a current 1000 times too small is not a zero current: the [mA] slip keeps its own words
    f = write_log_rows(tmp_path, "time[s],command[-],voltage[V],current[mA]", rows, lambda t, u, v, a: (t, u, v, a))
    line = _replay_refused(f, params_file, "likely amps in a column labelled [mA]")
    assert "reads zero" not in line, line


@pytest.mark.parametrize("scale,offset,likely", [
    (1000.0, 0.0, "likely permille (0..1000) labelled [%]; label it command[permille]"),
    (1000.0, 1000.0, "likely microseconds (1000..2000) labelled [%]; label it command[us]"),
])
def test_a_flight_command_in_another_unit_labelled_percent_is_named(tmp_path, params_file, rows, scale, offset,
                                                                     likely):
    # before: exit 0, every sample a sensor_fault ("command 2.400 outside 0..1"), no verdict
    f = write_log_rows(tmp_path, "time[s],command[%],voltage[V],current[A]", rows,
               lambda t, u, v, a: (t, offset + scale * u, v, a))
    _replay_refused(f, params_file, "column command[%]", likely)


def test_a_bench_command_in_permille_labelled_percent_is_named(tmp_path):
    lines = simulate_sweep(seed=1).splitlines()
    head = lines.index(next(x for x in lines if x.startswith("time[s]")))
    out = lines[:head] + [lines[head].replace("command[us]", "command[%]")]
    for row in lines[head + 1:]:
        cells = row.split(",")
        cells[1] = "%.1f" % (float(cells[1]) - 1000.0)       # 1000..2000 us -> 0..1000 permille
        out.append(",".join(cells))
    f = tmp_path / "bench.csv"
    f.write_text("\n".join(out) + "\n")
    refused(["fit", str(f), "--out", str(tmp_path / "p.json")], "error: %s: column command[%%]" % f,
            "likely permille (0..1000) labelled [%]; label it command[permille]")
    assert not (tmp_path / "p.json").exists()


def test_a_13_cell_pack_is_judged_on_its_own_full_voltage(tmp_path):
    # 13 cells x 4.2 V = 54.6 V full, 13 x 3.5 V = 45.5 V empty (LiPo cell voltages, common
    # practice): 1.2 x full is 65.5 V, beyond the watch's 60 V sensor, so the CONFIG's v_max is
    # clamped at 60 V and v_max / 1.2 (50.0 V, "12 cells") is not this pack
    from invented_vehicles import HEXA
    from estimator.errors import InputError
    from estimator.vehicle import check_vehicle
    from estimator.watch.replay import replay_file
    from watch_helpers import motor_model_params

    doc = dict(HEXA, battery=dict(HEXA["battery"], cells=13),
               propeller={"diameter": "15in", "ct": 0.105, "cp": 0.040})    # invented coefficients
    params = motor_model_params(check_vehicle(doc, "13s.json"))
    assert params["vehicle"]["full_voltage_V"] == pytest.approx(54.6)
    # one cell's voltage logged (3.9 V) while 6 rotors draw 30 A at half command, 60 s at 5 Hz
    rows = [(0.2 * i, 0.5, 3.9, 30.0) for i in range(300)]
    f = write_log_rows(tmp_path, "time[s],command[-],voltage[V],current[A]", rows, lambda t, u, v, a: (t, u, v, a))
    with pytest.raises(InputError) as err:
        replay_file(str(f), params)
    assert "(45.5 V)" in str(err.value) and "likely one cell's voltage on this 13-cell pack" in str(err.value)
    # millivolts labelled V: compared with the full pack itself, 54.6 V
    f = write_log_rows(tmp_path, "time[s],command[-],voltage[V],current[A]", rows, lambda t, u, v, a: (t, u, 13000 * v, a),
               name="mv.csv")
    with pytest.raises(InputError) as err:
        replay_file(str(f), params)
    assert "likely millivolts" in str(err.value) and "the full pack (54.6 V)" in str(err.value), str(err.value)
