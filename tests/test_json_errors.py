"""Every command with --json prints exactly one JSON object on stdout, also when it refuses
(trial 5, item 9): {"error": the same text as the stderr `error:` line}, exit 2, no traceback,
nothing written. And `--lag-ms` is bounded for firmware and replay.

Run through the command line in this process (io_helpers.run: exit code, stdout and stderr
apart) and through click's CliRunner (the path tests and embedders take).
"""

import json
import os

import pytest
from click.testing import CliRunner

from estimator.cli import COMMANDS, cli
from io_helpers import MAP, PARAMS, VEHICLE, run


def _bad_runs(tmp_path):
    """One refused command line per command (every entry of the command table), --json given."""
    user = tmp_path / "notes.txt"
    user.write_text("my own notes\n")
    flight = tmp_path / "flight.csv"
    flight.write_text("time[s],command[-],voltage[V],current[A]\n" + "".join(
        "%.1f,0.5,15.0,abc\n" % (0.1 * k) for k in range(5)))
    return {
        "air": ["air", "--altitude", "20000m", "--json"],                         # outside the bounds
        "static": ["static", "--diameter", "10in", "--json"],                     # neither power nor thrust
        "hover": ["hover", tmp_path / "missing.json", "--json"],
        "compare": ["compare", VEHICLE, "--vary", "nokey=1,2", "--json"],
        "fit": ["fit", tmp_path / "missing.csv", "--out", tmp_path / "p.json", "--json"],
        "check": ["check", tmp_path / "missing.json", "--json"],
        "export": ["export", PARAMS, "--map", user, "--json"],                    # not JSON
        "firmware": ["firmware", PARAMS, "--out", tmp_path / "board", "--lag-ms", "5000", "--json"],
        "replay": ["replay", flight, "--params", PARAMS, "--json"],               # text in a cell
        "demo": ["demo", "--out", user, "--json"],                                # a user's file
    }


def test_every_command_is_covered(tmp_path):
    assert sorted(_bad_runs(tmp_path)) == sorted(COMMANDS)


@pytest.mark.parametrize("command", sorted(COMMANDS))
def test_a_refusal_under_json_is_one_json_object_and_one_error_line(tmp_path, command):
    args = _bad_runs(tmp_path)[command]
    before = sorted(os.listdir(tmp_path))
    code, out, err = run(args)
    assert code == 2, (code, out, err)
    lines = err.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("error: ") and "Traceback" not in err, err
    doc = json.loads(out)  # the whole of stdout is one JSON document
    assert isinstance(doc, dict) and doc["error"] == lines[0][len("error: "):], (doc, lines)
    assert sorted(os.listdir(tmp_path)) == before  # nothing written
    # the same command without --json: the error line alone, stdout empty
    code, out, err = run([a for a in args if a != "--json"])
    assert code == 2 and out == "" and err.startswith("error: "), (code, out, err)


def test_check_keeps_its_validity_keys_in_the_one_object(tmp_path):
    bad = tmp_path / "p.json"
    bad.write_text("[1, 2]")
    code, out, err = run(["check", bad, "--json"])
    doc = json.loads(out)
    assert code == 2 and doc["valid"] is False and doc["file"] == str(bad)
    assert doc["error"] == err.strip()[len("error: "):]


def test_click_runner_gets_the_json_object_too(tmp_path):
    result = CliRunner().invoke(cli, ["hover", str(tmp_path / "missing.json"), "--json"])
    assert result.exit_code == 2
    assert json.loads(result.stdout)["error"].endswith("no such file"), result.stdout
    assert result.stderr.startswith("error: ") and len(result.stderr.strip().splitlines()) == 1


def test_json_as_an_option_value_after_the_end_of_options_is_not_a_flag(tmp_path):
    # '--' ends the options: a file named --json is a file, so the error is plain text
    code, out, err = run(["hover", "--", "--json"])
    assert code == 2 and out == "" and err.startswith("error: --json"), (out, err)


@pytest.mark.parametrize("lag", ["5000", "501", "-1"])
@pytest.mark.parametrize("command", ["firmware", "replay"])
def test_lag_beyond_what_a_small_multirotor_has_is_refused(tmp_path, params_file, command, lag):
    # rotor spin-up plus current-sensor response of small multirotors: tens of ms, about 0.3 s on
    # the largest rotors (common practice, from memory); 0..500 ms is accepted
    flight = tmp_path / "flight.csv"
    flight.write_text("time[s],command[-],voltage[V],current[A]\n" + "".join(
        "%.1f,0.5,15.0,20.0\n" % (0.1 * k) for k in range(50)))
    args = {"firmware": ["firmware", params_file, "--out", tmp_path / "board"],
            "replay": ["replay", flight, "--params", params_file]}[command]
    code, out, err = run(args + ["--lag-ms", lag])
    lines = err.strip().splitlines()
    assert code == 2 and out == "" and len(lines) == 1, (code, out, err)
    assert "--lag-ms" in lines[0] and "outside 0..500" in lines[0] and "common practice" in lines[0], lines[0]
    assert not (tmp_path / "board").exists()
    code, out, err = run(args + ["--lag-ms", "120", "--json"])
    assert code == 0, err
    if command == "firmware":
        assert json.loads(out)["lag_ms"] == 120


def test_export_map_example_still_prints_one_object(tmp_path):
    code, out, err = run(["export", PARAMS, "--map", MAP, "--json"])
    assert code == 0 and isinstance(json.loads(out), dict), err
