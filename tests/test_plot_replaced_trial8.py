"""`--plot` over a PNG liftcal drew earlier says so in one line, as a replaced parameter set or
settings file does (README: "Whenever liftcal replaces one of its own files it says so in one
line"; new-user trial 8, finding 7: hover, compare and replay replaced it silently). Vehicles
and the flight are INVENTED (tests/invented_vehicles.py, the demo's flight simulator)."""

import json

import pytest
from click.testing import CliRunner

from estimator.cli import cli
from trial_helpers import plot_commands


def _commands(tmp_path):
    return plot_commands(tmp_path)


@pytest.mark.parametrize("command", ["hover", "compare", "replay"])
def test_replacing_a_plot_liftcal_drew_is_said_in_one_line(tmp_path, command):
    argv = _commands(tmp_path)[command]
    png = tmp_path / "plot.png"
    line = "replaced %s: a figure liftcal drew" % png
    first = CliRunner().invoke(cli, argv + ["--plot", str(png)])
    assert first.exit_code == 0, first.output
    assert "replaced" not in first.stdout and png.exists()
    again = CliRunner().invoke(cli, argv + ["--plot", str(png)])
    assert again.exit_code == 0, again.output
    assert " ".join(again.stdout.split()).count(line) == 1, again.stdout  # wrapped to 80 columns
    as_json = CliRunner().invoke(cli, argv + ["--plot", str(png), "--json"])
    assert json.loads(as_json.stdout)["replaced"] == [line]
