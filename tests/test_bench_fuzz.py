"""Property-based fuzzing of the bench reader and `liftcal fit` (hypothesis).

Whatever the bytes, the result is either a valid parameter set (exit 0) or exactly one
`error:` line on stderr with exit code 2, never a traceback, and never a partial output
file (the design notes' error contract, sec. 4).
"""

import contextlib
import io
import json
import os
import tempfile

import pytest
from hypothesis import HealthCheck, given, settings, strategies as st

from estimator.demo.bench_sim import simulate_sweep
from estimator.cli import main
from estimator.params import load_params

VALID = simulate_sweep(seed=21)
LINES = VALID.splitlines()
FIRST_DATA = next(i for i, line in enumerate(LINES) if line[:1].isdigit())
FUZZ = settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])


def run_fit(content):
    """Run `liftcal fit` on ``content`` (bytes) in a fresh folder; check the error contract."""
    with tempfile.TemporaryDirectory() as folder:
        src = os.path.join(folder, "bench.csv")
        out = os.path.join(folder, "params.json")
        with open(src, "wb") as fh:
            fh.write(content)
        err = io.StringIO()
        std = io.StringIO()
        with contextlib.redirect_stderr(err), contextlib.redirect_stdout(std):
            try:
                main(["fit", src, "--out", out, "--diameter", "10in", "--json"])
                code = 0
            except SystemExit as exc:
                code = exc.code
        files = sorted(os.listdir(folder))
        stderr = err.getvalue()
        if code == 0:
            assert stderr == ""
            assert files == ["bench.csv", "params.json"]
            load_params(out)  # the written set is valid against the schema
            json.loads(std.getvalue())
        else:
            assert code == 2, (code, stderr)
            lines = stderr.splitlines()
            assert len(lines) == 1 and lines[0].startswith("error: "), stderr
            assert "Traceback" not in stderr
            assert files == ["bench.csv"], files
        return code


def test_the_unspoiled_sweep_fits():
    assert run_fit(VALID.encode()) == 0


@FUZZ
@given(st.binary(max_size=400))
def test_random_bytes(blob):
    run_fit(blob)


@FUZZ
@given(st.integers(min_value=0, max_value=len(VALID)))
def test_truncated_files(cut):
    run_fit(VALID[:cut].encode())


HEADER_CELLS = st.sampled_from(["command[-]", "command[%]", "command[us]", "command", "command[V]",
                                "voltage[V]", "voltage[mV]", "voltage", "current[A]", "current[mA]",
                                "thrust[N]", "thrust[g]", "thrust[kgf]", "thrust[lbf]", "thrust[oz]",
                                "time[s]", "rpm[rpm]", "", "x[", "[N]", "thrust [ g ]", "Thrust[N]"])


@FUZZ
@given(st.lists(HEADER_CELLS, min_size=0, max_size=7))
def test_wrong_headers(cells):
    lines = list(LINES)
    lines[FIRST_DATA - 1] = ",".join(cells)
    run_fit(("\n".join(lines) + "\n").encode())


NUMBERS = st.one_of(
    st.floats(allow_nan=True, allow_infinity=True),
    st.sampled_from([1e308, -1e308, 1e-308, 5e-324, 0.0, -0.0, 1e300, 1e-300]),
).map(repr) | st.sampled_from(["", "1e999", "-1e999", "nan", "inf", "0x10", "1,5", " ", "1e"])


@FUZZ
@given(st.lists(st.tuples(st.integers(min_value=0, max_value=len(LINES) - FIRST_DATA - 1),
                          st.integers(min_value=0, max_value=4), NUMBERS), min_size=1, max_size=12))
def test_huge_tiny_and_odd_numbers(edits):
    lines = list(LINES)
    for row, col, text in edits:
        cells = lines[FIRST_DATA + row].split(",")
        cells[col] = text
        lines[FIRST_DATA + row] = ",".join(cells)
    run_fit(("\n".join(lines) + "\n").encode())


@FUZZ
@given(st.sampled_from(range(1, 5)), st.sampled_from([1e6, 1e-6, 1e30, -1.0]))
def test_whole_column_scaled(col, factor):
    # a whole column in a wildly wrong unit must be refused or fitted, never crash
    lines = list(LINES)
    for i in range(FIRST_DATA, len(lines)):
        cells = lines[i].split(",")
        try:
            cells[col] = repr(float(cells[col]) * factor)
        except ValueError:
            pass
        lines[i] = ",".join(cells)
    run_fit(("\n".join(lines) + "\n").encode())


@pytest.mark.parametrize("name", ["missing.csv", ""])
def test_missing_or_empty_path(tmp_path, name):
    err = io.StringIO()
    with contextlib.redirect_stderr(err), pytest.raises(SystemExit) as exc:
        main(["fit", str(tmp_path / name) if name else str(tmp_path), "--out", str(tmp_path / "p.json")])
    assert exc.value.code == 2 and err.getvalue().startswith("error: ")
