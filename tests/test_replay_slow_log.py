"""A log far below the rates the watch is built for says so (the session-21 trial: a 0.5 Hz cut of
the demo's flight replayed without a word). The watch's detection study (benchmarks/
watch_detection.py) covers 5-100 Hz; below 4 Hz replay warns. Flights: the demo's closed-loop
simulator (an INVENTED vehicle), 10 Hz, and every 20th row of it (0.5 Hz)."""

import json

from click.testing import CliRunner

from estimator.cli import cli
from estimator.watch.log_checks import slow_log_warning
from watch_helpers import demo_fit_params, flight_csv_once


def _replay(tmp_path, every):
    lines = flight_csv_once(seed=1).splitlines()
    at = [i for i, line in enumerate(lines) if line.startswith("time[")][0]
    log = tmp_path / ("every%d.csv" % every)
    log.write_text("\n".join(lines[:at + 1] + lines[at + 1::every]) + "\n")
    params = tmp_path / "p.json"
    params.write_text(json.dumps(demo_fit_params()))
    runs = [CliRunner().invoke(cli, ["replay", str(log), "--params", str(params)] + j) for j in ([], ["--json"])]
    assert all(r.exit_code == 0 for r in runs), runs[0].output
    return " ".join(runs[0].stdout.split()), json.loads(runs[1].stdout)


def test_a_half_hertz_log_is_told_it_is_below_the_watchs_rates(tmp_path):
    text, out = _replay(tmp_path, 20)
    said = "! this log has a sample every 2 s (median, 0.5 Hz): the watch is built for logs at 5-100 Hz"
    assert said in text
    assert any(w.startswith("this log has a sample every 2 s") for w in out["warnings"])


def test_a_10_hz_log_gets_no_such_warning(tmp_path):
    text, out = _replay(tmp_path, 1)
    assert "sample every" not in text and not any("sample every" in w for w in out["warnings"])


def test_the_rate_is_the_median_one():
    # a 5 Hz log with a few long pauses (landed, or a logger's hiccups) is not slow
    times = [0.2 * i for i in range(100)] + [30.0 + 0.2 * i for i in range(100)]
    assert slow_log_warning(times) is None
    assert slow_log_warning([0.5 * i for i in range(50)]) is not None
    assert slow_log_warning([0.0]) is None
