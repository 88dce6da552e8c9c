"""The command line's contract (design notes sec. 4): one `error:` line, exit 2, no traceback."""

import subprocess
import sys


def run(*args):
    return subprocess.run([sys.executable, "-m", "estimator", *args], capture_output=True, text=True)


def test_help_lists_every_flow():
    out = run("--help")
    assert out.returncode == 0
    for name in ("air", "static", "hover", "fit", "check", "export", "firmware", "replay", "demo"):
        assert name in out.stdout


def test_unknown_command_is_one_error_line():
    out = run("no-such-command")
    assert out.returncode == 2
    lines = out.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("error:")
    assert "Traceback" not in out.stderr
