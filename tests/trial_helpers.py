"""Shared setup of the new-user trial tests (tests/test_*trial*.py): a liftcal command run in this
process through click's CliRunner (exit code, stdout and stderr apart), a clean refusal, a
command's text or JSON, and a JSON input file in the test's folder.

One copy: the trial tests each carried their own (found by the duplicates tool).
"""

import json

from click.testing import CliRunner

from estimator.cli import cli
from invented_vehicles import WHOOP
from watch_helpers import demo_fit_params, flight_csv_once


def run(*args):
    """(exit code, stdout, stderr) of ``liftcal ARGS``."""
    result = CliRunner().invoke(cli, [str(a) for a in args])
    return result.exit_code, result.stdout, result.stderr


def refused(*args):
    """Run ``liftcal ARGS``; assert a clean refusal (exit 2, nothing on stdout, one ``error:`` line
    on stderr, no traceback); return that line."""
    code, out, err = run(*args)
    lines = err.strip().splitlines()
    assert code == 2 and out == "" and len(lines) == 1 and lines[0].startswith("error: "), (code, out, err)
    assert "Traceback" not in err
    return lines[0]


def ok(*args):
    """stdout of ``liftcal ARGS``, asserting exit 0 and nothing on stderr."""
    code, out, err = run(*args)
    assert code == 0 and err == "", (code, err)
    return out


def report(*args):
    """The one JSON object ``liftcal ARGS --json`` prints (exit 0, nothing on stderr)."""
    return json.loads(ok(*args, "--json"))


def words(*args):
    """ok(*args) with its white space folded: the sheets wrap at 80 columns."""
    return " ".join(ok(*args).split())


def json_file(folder, doc, name="quad.json"):
    """doc written as JSON to folder/name; the path."""
    path = folder / name
    path.write_text(json.dumps(doc))
    return path


def plot_commands(tmp_path):
    """Invented whoop vehicle, the demo fit's parameter set and a 40 s demo flight written to
    tmp_path; the hover, compare and replay command lines that draw a figure of each."""
    vehicle = tmp_path / "whoop.json"
    vehicle.write_text(json.dumps(WHOOP))
    params = tmp_path / "p.json"
    params.write_text(json.dumps(demo_fit_params()))
    flight = tmp_path / "f.csv"
    flight.write_text(flight_csv_once(seed=5, duration_s=40.0))
    return {"hover": ["hover", str(vehicle), "--payload", "0..40g"],
            "compare": ["compare", str(vehicle), "--vary", "battery.capacity=450mAh,650mAh"],
            "replay": ["replay", str(flight), "--params", str(params)]}
