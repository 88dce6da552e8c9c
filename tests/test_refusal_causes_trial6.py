"""Sixth new-user trial, item 4: refusals that named the wrong likely cause now name the right one,
in one `error:` line, exit 2, nothing written.

Each bad file is a good one changed the way the trial's tester changed theirs: the simulated demo
sweep (estimator.demo.ramp_sweep, invented) with its voltage and current data swapped, its command
in percent labelled [permille], its current negated (a sensor mounted the other way round); the
simulated demo flight (tests/watch_helpers) with amps labelled [mA]; the shipped example map with
a typo in a source key. What a real sweep cannot do (common practice on any bench): its bus voltage
never rises several-fold with the command (a supply sags under load), a motor's current rises with
the command and is not negative. Checked through the command: io_helpers.run (exit code, stdout,
stderr apart).
"""

import json
import os

import pytest

from estimator.demo.ramp_sweep import ramp_sweep_rows, write_ramp_csv
from io_helpers import PARAMS, refused, run
from watch_helpers import demo_flight_rows


@pytest.fixture(scope="module")
def sweep_lines(tmp_path_factory):
    path = tmp_path_factory.mktemp("sweep") / "sweep.csv"
    write_ramp_csv(str(path), ramp_sweep_rows(3000, seed=5), "invented sweep for the refusal test")
    lines = path.read_text().splitlines()
    header = [i for i, line in enumerate(lines) if not line.startswith("#")][0]
    assert lines[header] == "time[s],command[-],voltage[V],current[A],thrust[N]"
    return lines[:header], lines[header], [line.split(",") for line in lines[header + 1:]]


def _write(tmp_path, comments, header, rows):
    path = tmp_path / "bad.csv"
    path.write_text("\n".join(comments + [header] + [",".join(r) for r in rows]) + "\n")
    return path


def _refused_fit(tmp_path, path, *needles):
    out = tmp_path / "p.json"
    line = refused(["fit", path, "--diameter", "10in", "--out", out], *needles)
    assert not os.path.exists(out)
    return line


def test_voltage_and_current_swapped_are_named(tmp_path, sweep_lines):
    comments, header, rows = sweep_lines
    swapped = [[t, u, i, v, f] for t, u, v, i, f in rows]          # data swapped, header kept
    line = _refused_fit(tmp_path, _write(tmp_path, comments, header, swapped), "look swapped")
    assert "spans commands" not in line
    # the header swapped with the data kept: the same words (the trial's first file)
    line = _refused_fit(tmp_path, _write(tmp_path, comments, "time[s],command[-],current[A],voltage[V],thrust[N]",
                                         rows), "voltage and current columns look swapped")


def test_percent_labelled_permille_is_named(tmp_path, sweep_lines):
    comments, header, rows = sweep_lines
    percent = [[t, "%.3f" % (100.0 * float(u)), v, i, f] for t, u, v, i, f in rows]
    line = _refused_fit(tmp_path, _write(tmp_path, comments, header.replace("[-]", "[permille]"), percent),
                        "command[permille] never exceeds 100 permille", "command[%]")
    assert "spans commands" not in line


def test_a_current_sensor_reading_backwards_is_named(tmp_path, sweep_lines):
    comments, header, rows = sweep_lines
    negated = [[t, u, v, "%.4f" % -float(i), f] for t, u, v, i, f in rows]
    line = _refused_fit(tmp_path, _write(tmp_path, comments, header, negated),
                        "current sensor reads backwards", "negate the current column")
    assert "fewer than" not in line


def test_amps_labelled_milliamps_in_a_flight_log_are_named(tmp_path, params_file):
    log = tmp_path / "log.csv"
    log.write_text("time[s],command[-],voltage[V],current[mA]\n" + "\n".join(
        "%.3f,%.4f,%.4f,%.4f" % tuple(row) for row in demo_flight_rows(7)) + "\n")
    line = refused(["replay", log, "--params", params_file],
                   "column current[mA]", "1000 times too small", "label it current[A]")
    assert "another vehicle or pack" not in line
    # the same log written in mA passes these checks (the label fits the numbers)
    log.write_text("time[s],command[-],voltage[V],current[mA]\n" + "\n".join(
        "%.3f,%.4f,%.4f,%.1f" % (t, u, v, 1000.0 * a) for t, u, v, a in demo_flight_rows(7)) + "\n")
    code, out, err = run(["replay", log, "--params", params_file])
    assert code == 0 and err == "", err


def test_a_typo_in_a_map_source_gets_the_nearest_key(tmp_path):
    mapping = {"schema_version": 1, "model": "liftcal.map/1", "settings": [
        {"name": "my.hover", "unit": "-", "source": "hover.hover_comand", "decimals": 3, "min": 0.1, "max": 0.9}]}
    path = tmp_path / "map.json"
    path.write_text(json.dumps(mapping))
    line = refused(["export", PARAMS, "--map", path], "did you mean 'hover.hover_command'?")
    assert "fit with --vehicle" not in line
