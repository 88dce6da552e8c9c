"""`liftcal` run without a command (new-user trial 9, finding 15: it printed the usage and exited 0,
as if a command had run). It now behaves as click's own standard for a group called without a
command (click 8.2 and later): the help on stderr, nothing on stdout, exit code 2, so a script that
forgot the command stops. `liftcal --help` still prints the help on stdout with exit 0."""

import subprocess
import sys

from click.testing import CliRunner

from estimator.cli import cli


def _liftcal(*args):
    return subprocess.run([sys.executable, "-m", "estimator"] + list(args), capture_output=True, text=True,
                          timeout=120)


def test_no_command_prints_the_help_on_stderr_and_exits_2():
    done = _liftcal()
    assert done.returncode == 2 and done.stdout == "", (done.returncode, done.stdout[:200])
    assert done.stderr.startswith("Usage: liftcal [OPTIONS] COMMAND") and "Commands:" in done.stderr
    assert "Traceback" not in done.stderr
    # click's test runner (the group called directly) gives the same exit code
    assert CliRunner().invoke(cli, []).exit_code == 2


def test_help_is_still_a_success():
    done = _liftcal("--help")
    assert done.returncode == 0 and done.stderr == ""
    assert done.stdout.startswith("Usage: liftcal [OPTIONS] COMMAND") and "Commands:" in done.stdout
