"""liftcal replay refuses logs it cannot judge: time that does not rise (named by row), values
implausible for the parameter set (the likely unit slip named), and says when a log is too short
to learn the baseline instead of reporting health. Each case is built from a simulated demo
flight by the one slip a logger or a person makes."""

import json

import pytest

from watch_helpers import demo_flight_rows
from io_helpers import run


@pytest.fixture(scope="module")
def rows():
    return [",".join("%.6g" % x for x in r) for r in demo_flight_rows(7)]


def _write(tmp_path, header, rows, name="log.csv"):
    f = tmp_path / name
    f.write_text(header + "\n" + "\n".join(rows) + "\n")
    return f


def _one_error(code, err):
    lines = err.strip().splitlines()
    assert code == 2 and len(lines) == 1 and lines[0].startswith("error:"), err
    return lines[0]


def _map(rows, fn):
    out = []
    for r in rows:
        t, u, v, a = (float(x) for x in r.split(","))
        out.append(",".join("%.6g" % x for x in fn(t, u, v, a)))
    return out


def test_time_that_goes_back_or_repeats_is_named_by_row(tmp_path, params_file, rows):
    bad = list(rows)
    bad[100] = bad[99]                     # a repeated row (line 102 of the file: header is line 1)
    t, rest = bad[500].split(",", 1)
    bad[500] = "%.2f,%s" % (float(t) - 30.0, rest)   # a jump back
    f = _write(tmp_path, "time[s],command[-],voltage[V],current[A]", bad)
    code, _, err = run(["replay", str(f), "--params", str(params_file)])
    line = _one_error(code, err)
    # named by the file's line number, in the CSV reader's words ("line N")
    assert "line 102" in line and "repeats" in line and "502" in line and "2 rows" in line, line
    code, out, err = run(["replay", str(f), "--params", str(params_file), "--drop-bad-time", "--json"])
    assert code == 0 and err == ""
    doc = json.loads(out)
    assert doc["dropped_rows"] == 2 and doc["samples"] == len(rows) - 2


@pytest.mark.parametrize("header,fn,needle", [
    ("time[s],command[%],voltage[V],current[A]", lambda t, u, v, a: (t, u, v, a), "0..1 command labelled %"),
    ("time[s],command[-],voltage[V],current[A]", lambda t, u, v, a: (t, u, 1000 * v, a), "millivolts"),
    ("time[s],command[-],voltage[mV],current[A]", lambda t, u, v, a: (t, u, v, a), "volts in a column labelled [mV]"),
    ("time[s],command[-],voltage[V],current[A]", lambda t, u, v, a: (t, u, v, -a), "reversed"),
    # one cell's voltage logged instead of the pack's (new-user trial 3 item 8: replay said
    # "too short to learn", exit 0); the demo pack has 4 cells
    ("time[s],command[-],voltage[V],current[A]", lambda t, u, v, a: (t, u, v / 4.0, a),
     "likely one cell's voltage on this 4-cell pack"),
    ("time[s],command[-],voltage[V],current[A]", lambda t, u, v, a: (t, u, v, 1000 * a), "milliamps"),
    ("time[s],command[-],voltage[V],current[A]", lambda t, u, v, a: (t, 100 * u, v, a), "percent"),
    # milliseconds labelled [s] (new-user trial 2 item 4: replay said "too short to learn:
    # 5942 s of flight", exit 0), and seconds labelled [ms]
    ("time[s],command[-],voltage[V],current[A]", lambda t, u, v, a: (1000 * t, u, v, a),
     "likely milliseconds in a column labelled [s]; label it time[ms]"),
    ("time[ms],command[-],voltage[V],current[A]", lambda t, u, v, a: (t, u, v, a),
     "likely seconds in a column labelled [ms]; label it time[s]"),
])
def test_unit_slips_are_refused_with_the_likely_cause(tmp_path, params_file, rows, header, fn, needle):
    f = _write(tmp_path, header, _map(rows, fn))
    code, _, err = run(["replay", str(f), "--params", str(params_file)])
    line = _one_error(code, err)
    assert needle in line and "log.csv" in line, line


def test_the_unchanged_log_passes_the_checks(tmp_path, params_file, rows):
    f = _write(tmp_path, "time[s],command[-],voltage[V],current[A]", rows)
    code, out, err = run(["replay", str(f), "--params", str(params_file), "--json"])
    assert code == 0 and json.loads(out)["learned"] is True


def test_a_log_too_short_to_learn_says_so(tmp_path, params_file, rows):
    # three rows, and 9 s of a flight: no verdict, never "power stayed within"
    for n in (3, 90):
        f = _write(tmp_path, "time[s],command[-],voltage[V],current[A]", rows[300:300 + n], "short%d.csv" % n)
        code, out, err = run(["replay", str(f), "--params", str(params_file)])
        assert code == 0, err
        assert "too short to learn" in out and "stayed within" not in out, out
        code, out, _ = run(["replay", str(f), "--params", str(params_file), "--json"])
        assert json.loads(out)["learned"] is False
