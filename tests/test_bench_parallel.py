"""The two-process parse of large bench files gives the single-process table bit for bit.

Reference everywhere: numpy.loadtxt of the whole file in one process with the reader's own
arguments (estimator.bench._load_single), the path every file took before. The expected
tolerance is zero (compared as raw bytes, so NaN and -0.0 count too): both parts are read
by the same parser, field by field, so any difference at all is a wrong split (a line
parsed twice or lost) or a wrong copy, never round-off. The size threshold is lowered to
0 through the reader's parameter so that small files take the two-process path.
"""

import os
import sys
import threading

import numpy as np
import pytest

from estimator.bench import reader as bench
from estimator.bench.reader import read_bench
from estimator.errors import InputError

pytestmark = pytest.mark.skipif(not (hasattr(os, "fork") and hasattr(os, "memfd_create")),
                                reason="the two-process parse needs os.fork and os.memfd_create")

HEAD = "# density: 1.2\n# diameter: 0.254\ncommand[-],voltage[V],current[A],thrust[N]\n"
SKIP = 3  # lines before the data in HEAD


def _sweep_rows(n, seed=5):
    rng = np.random.default_rng(seed)
    u = rng.uniform(0.05, 1.0, n)
    v = 15.0 + rng.normal(0.0, 0.05, n)
    return ["%.5f,%.4f,%.4f,%.5f" % (a, b, 25.0 * a ** 3 + 0.3, 10.0 * a * a) for a, b in zip(u, v)]


def _write(tmp_path, text, name="b.csv"):
    path = tmp_path / name
    path.write_bytes(text.encode("utf-8"))
    return str(path)


def _same(parts, reference):
    table = np.concatenate(parts)
    return table.shape == reference.shape and table.tobytes() == reference.tobytes()


def test_every_split_of_a_clean_file_gives_the_single_table(tmp_path):
    rows = _sweep_rows(60)
    path = _write(tmp_path, HEAD + "\n".join(rows) + "\n")
    reference = bench._load_single(path, SKIP, 4)
    assert reference.shape == (60, 4)
    for lines in range(1, 60):
        parts = bench._parallel_load(path, SKIP, 4, parallel_min_bytes=0, helper_lines=lines)
        assert parts is not None and len(parts) == 2, lines  # both processes took part
        assert parts[0].shape[0] == lines
        assert _same(parts, reference), lines
    # the helper given every line leaves this process nothing to read: refused, not wrong
    assert bench._parallel_load(path, SKIP, 4, parallel_min_bytes=0, helper_lines=60) is None


AWKWARD = [
    # comment and blank lines anywhere in the data, inline comments, no final newline
    HEAD + "\n".join(["# bench restarted", ""] + _sweep_rows(8)[:4] + ["", "# note"]
              + _sweep_rows(8)[4:] + ["0.5,15.0,3.4,2.5 # trailing note"]),
    # spreadsheet export: byte-order mark and CRLF line ends
    "\ufeff" + HEAD.replace("\n", "\r\n") + "\r\n".join(_sweep_rows(12)) + "\r\n",
    # old Mac line ends inside the data (universal newlines read them as line ends)
    HEAD + "\r".join(_sweep_rows(12)) + "\n",
    # characters str.splitlines would split at, in comment lines: text files end lines only
    # at \n and \r, on both sides
    HEAD + "\n".join(_sweep_rows(12)[:5] + ["# vt\x0bff\x0cfs\x1cnel\x85ls\u2028ps\u2029"] * 3
                      + _sweep_rows(12)[5:]) + "\n",
    # signs, exponents, spaces around cells (NaN and infinity are refused: test_bench_reader)
    HEAD + "\n".join(["-0.0,15,1,2", "-0.0,15,+1e0,-2", " 0.5 , 1.5e1 ,2E0,+3"] + _sweep_rows(9)) + "\n",
]


@pytest.mark.parametrize("case", range(len(AWKWARD)))
def test_comment_blank_and_line_end_quirks_split_like_one_read(tmp_path, case):
    path = _write(tmp_path, AWKWARD[case])
    reference = bench._load_single(path, SKIP, 4)
    assert reference.shape[0] >= 9
    taken = 0
    for lines in range(1, 40):
        parts = bench._parallel_load(path, SKIP, 4, parallel_min_bytes=0, helper_lines=lines)
        if parts is not None:  # None only when a part holds no data row (then one process reads)
            taken += 1
            assert _same(parts, reference), lines
    assert taken >= 8  # the two-process path really ran on most splits


@pytest.mark.parametrize("odd", ["  # indented note", "0.5,15.0,,2.0"])
def test_lines_only_the_slow_parse_reads_take_the_single_path(tmp_path, odd):
    # numpy.loadtxt refuses an indented comment and an empty cell; the slow parse skips the
    # one and reads the other as NaN. Whichever part holds the line fails, so one process
    # reads the file, as before
    rows = _sweep_rows(40)
    rows[25] = odd
    path = _write(tmp_path, HEAD + "\n".join(rows) + "\n")
    reference = bench._slow_parse(path, SKIP, 4)
    assert reference.shape[0] == (39 if odd.strip().startswith("#") else 40)
    for lines in (5, 25, 26, 35):
        assert bench._parallel_load(path, SKIP, 4, parallel_min_bytes=0, helper_lines=lines) is None
    parts = bench._load_numbers(path, SKIP, 4, parallel_min_bytes=0)
    assert len(parts) == 1 and _same(parts, reference)


def test_read_bench_is_the_same_with_and_without_the_second_process(tmp_path):
    rows = _sweep_rows(3000)
    rows[700] = "0.5,15.0,-9.0,2.0"  # one row dropped by the row checks (negative current)
    path = _write(tmp_path, HEAD + "\n".join(rows) + "\n")
    assert os.path.getsize(path) > 50000
    two = read_bench(path, parallel_min_bytes=0, hash_in_background=True)
    one = read_bench(path, parallel_min_bytes=1 << 62)
    assert bench.bench_digest(two) == one["input_sha256"]
    for key in ("command", "voltage_V", "thrust_N", "power_W"):
        assert two[key].tobytes() == one[key].tobytes(), key
    for key in ("rows_total", "rows_rejected", "rejected", "bench_air", "diameter_m", "warnings"):
        assert two[key] == one[key], key
    assert one["rejected"] == {"negative_current": 1}  # the row planted above


@pytest.mark.parametrize("bad_row", [5, 2500])  # in the helper's part, in this process's part
def test_a_broken_row_is_reported_as_by_the_single_read(tmp_path, bad_row):
    rows = _sweep_rows(3000)
    rows[bad_row] = "0.5,15.0,abc,2.0"
    path = _write(tmp_path, HEAD + "\n".join(rows) + "\n")
    messages = []
    for threshold in (0, 1 << 62):
        with pytest.raises(InputError) as err:
            read_bench(path, parallel_min_bytes=threshold)
        messages.append(str(err.value))
    # the single read's message names the file line: 3 head lines, then row 0 on line 4
    assert messages[0] == messages[1] == ("%s: line %d column 3: cannot read 'abc' as a number"
                                          % (path, bad_row + SKIP + 1))


def test_a_failing_helper_falls_back_to_one_process(tmp_path, monkeypatch):
    path = _write(tmp_path, HEAD + "\n".join(_sweep_rows(500)) + "\n")
    reference = bench._load_single(path, SKIP, 4)

    def broken(path, skip, lines, ncols, fd):
        raise MemoryError("helper out of memory")  # the forked helper inherits this patch

    monkeypatch.setattr(bench, "_helper_part", broken)
    assert bench._parallel_load(path, SKIP, 4, parallel_min_bytes=0, helper_lines=200) is None
    parts = bench._load_numbers(path, SKIP, 4, parallel_min_bytes=0)
    assert len(parts) == 1 and _same(parts, reference)


def test_an_incomplete_part_is_not_used(tmp_path, monkeypatch):
    path = _write(tmp_path, HEAD + "\n".join(_sweep_rows(500)) + "\n")

    def half_written(path, skip, lines, ncols, fd):
        os.ftruncate(fd, bench._PART_HEADER + 8 * ncols * lines)  # numbers but no header

    monkeypatch.setattr(bench, "_helper_part", half_written)
    assert bench._parallel_load(path, SKIP, 4, parallel_min_bytes=0, helper_lines=200) is None


def test_no_fork_while_another_thread_runs(tmp_path):
    path = _write(tmp_path, HEAD + "\n".join(_sweep_rows(500)) + "\n")
    assert bench._parallel_load(path, SKIP, 4, parallel_min_bytes=0, helper_lines=200) is not None
    stop = threading.Event()
    other = threading.Thread(target=stop.wait)
    other.start()
    try:
        assert bench._parallel_load(path, SKIP, 4, parallel_min_bytes=0, helper_lines=200) is None
    finally:
        stop.set()
        other.join()


def test_small_files_stay_in_one_process(tmp_path):
    path = _write(tmp_path, HEAD + "\n".join(_sweep_rows(500)) + "\n")
    assert os.path.getsize(path) < bench.PARALLEL_MIN_BYTES
    assert bench._parallel_load(path, SKIP, 4) is None


@pytest.mark.skipif(sys.platform != "linux", reason="reads /proc")
def test_the_helper_is_reaped(tmp_path):
    path = _write(tmp_path, HEAD + "\n".join(_sweep_rows(500)) + "\n")
    for _ in range(3):
        assert bench._parallel_load(path, SKIP, 4, parallel_min_bytes=0, helper_lines=200)
    children = open("/proc/self/task/%d/children" % os.getpid()).read().split()
    assert children == []  # no zombie left behind


@pytest.mark.parametrize("threshold", [0, 1 << 62])  # with the helper, and in one process
def test_work_beside_the_parse_runs_once(tmp_path, threshold):
    path = _write(tmp_path, HEAD + "\n".join(_sweep_rows(3000)) + "\n")
    calls = []
    data = read_bench(path, parallel_min_bytes=threshold, beside=lambda: calls.append(os.getpid()))
    assert calls == [os.getpid()]  # once, in this process (never in the helper)
    assert data["rows_total"] == 3000  # the rows written above


def test_an_error_beside_the_parse_propagates_and_reaps_the_helper(tmp_path):
    path = _write(tmp_path, HEAD + "\n".join(_sweep_rows(3000)) + "\n")

    def fails():
        raise ImportError("no such validator")

    with pytest.raises(ImportError):
        read_bench(path, parallel_min_bytes=0, beside=fails)
    if sys.platform == "linux":
        assert open("/proc/self/task/%d/children" % os.getpid()).read().split() == []
