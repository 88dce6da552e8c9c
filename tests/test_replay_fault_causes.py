"""A replayed sensor_fault says which check it was, with the value and the limit (new-user trial 4
item 9: an 8 s logging pause showed only "reading out of range, stuck current or a bad sample
gap"), and a log on which the watch did not finish learning says why: "too short to learn" only
when no flight was long enough (trial 4 item 3: "too short to learn: 359.6 s of flight").

Each fault is put into the simulated demo flight by hand; the expected figures are read from the
written log itself (the pause, the value), and the limits are the watch's defaults
(estimator/watch/config.py DEFAULTS: sample gap limit, stuck-current time)."""

import json

import pytest

from estimator.cli import main
from estimator.watch.config import DEFAULTS
from watch_helpers import demo_flight_rows

HEADER = "time[s],command[-],voltage[V],current[A]"


@pytest.fixture(scope="module")
def rows():
    return demo_flight_rows(7)


def _replay(tmp_path, params_file, capsys, rows, name="log.csv", as_json=True):
    f = tmp_path / name
    f.write_text(HEADER + "\n" + "\n".join("%.3f,%.4f,%.4f,%.4f" % tuple(r) for r in rows) + "\n")
    with pytest.raises(SystemExit) as exc:
        main(["replay", str(f), "--params", str(params_file)] + (["--json"] if as_json else []))
    cap = capsys.readouterr()
    assert exc.value.code == 0, cap.err
    return json.loads(cap.out) if as_json else cap.out


def _at(rows, t_s):
    return next(i for i, r in enumerate(rows) if r[0] >= t_s)


def _faults(doc):
    return [e for e in doc["events"] if e["kind"] == "sensor_fault"]


def test_a_logging_pause_is_named_with_its_length_and_the_limit(tmp_path, params_file, capsys, rows):
    i = _at(rows, 150.0)
    pause = [list(r) for r in rows]
    for r in pause[i:]:
        r[0] += 8.0                      # the logger stopped for 8 s
    gap = pause[i][0] - pause[i - 1][0]
    doc = _replay(tmp_path, params_file, capsys, pause)
    (e,) = _faults(doc)
    assert e["cause"] == "gap" and e["t_s"] == pytest.approx(pause[i][0] - pause[0][0], abs=1e-3)
    assert gap > DEFAULTS["dt_max_s"]
    assert "logging gap of %.1f s (the watch's limit %.1f s)" % (gap, DEFAULTS["dt_max_s"]) in e["detail"], e
    text = _replay(tmp_path, params_file, capsys, pause, as_json=False)
    assert "logging gap of %.1f s" % gap in text and "stuck current or a bad sample gap" not in text, text


@pytest.mark.parametrize("col,value,cause,needle", [
    (2, 40.0, "voltage", "bus voltage 40.00 V outside the watch's range"),
    (3, 900.0, "current", "current 900.00 A outside the watch's current-sensor range"),
])
def test_a_reading_out_of_range_is_named_with_its_value(tmp_path, params_file, capsys, rows, col, value, cause,
                                                         needle):
    bad = [list(r) for r in rows]
    bad[_at(rows, 200.0)][col] = value
    (e,) = _faults(_replay(tmp_path, params_file, capsys, bad))
    assert e["cause"] == cause and needle in e["detail"], e


def test_a_stuck_current_is_named_with_how_long_it_stuck(tmp_path, params_file, capsys, rows):
    bad = [list(r) for r in rows]
    i, j = _at(rows, 200.0), _at(rows, 210.0)
    for r in bad[i:j]:
        r[3] = bad[i][3]                 # the current sensor froze for 10 s in flight
    stuck_s = bad[j - 1][0] - bad[i][0]
    (e,) = _faults(_replay(tmp_path, params_file, capsys, bad))
    assert e["cause"] == "stuck_current", e
    assert "current stuck at %.2f A for %.1f s" % (bad[i][3], stuck_s) in e["detail"], e
    assert stuck_s > DEFAULTS["stuck_s"] and "limit %.1f s" % DEFAULTS["stuck_s"] in e["detail"]


def test_a_long_flight_with_a_frozen_sensor_is_never_called_too_short(tmp_path, params_file, capsys, rows):
    bad = [list(r) for r in rows]
    i = _at(rows, 5.0)
    for r in bad[i:]:
        r[3] = bad[i][3]                 # frozen from the start: every flying sample is a fault
    doc = _replay(tmp_path, params_file, capsys, bad)
    assert doc["learned"] is False
    assert "too short" not in doc["note"] and "learning did not complete" in doc["note"], doc["note"]
    assert "sensor faults" in doc["note"] and "current stuck at" in doc["note"], doc["note"]


def test_hops_too_short_to_learn_say_the_longest_flight(tmp_path, params_file, capsys, rows):
    # four hops of 25 s with 10 s on the ground between: 100 s of flight in all, but the watch
    # learns anew after each landing and needs take-off plus the learning window in one flight
    assert 25.0 < DEFAULTS["takeoff_s"] + DEFAULTS["learn_s"] and DEFAULTS["landed_s"] < 10.0
    i = _at(rows, 100.0)
    hop = rows[i:i + 250]                 # 25 s at 10 Hz, in flight
    hops, t = [], 0.0
    for _ in range(4):
        for k in range(100):              # 10 s on the ground, rotors stopped
            hops.append([t, 0.0, hop[0][2], 0.1])
            t += 0.1
        for r in hop:
            hops.append([t, r[1], r[2], r[3]])
            t += 0.1
    doc = _replay(tmp_path, params_file, capsys, hops)
    assert doc["learned"] is False and len(doc["flights_s"]) == 4
    assert doc["note"].startswith("too short to learn: the longest of 4 flights"), doc["note"]
    assert max(doc["flights_s"]) < 26.0
