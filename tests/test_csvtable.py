"""The one name[unit] CSV reader: bench sweeps and flight logs accept and refuse alike.

Each quirk is written into a bench sweep and into a flight log; both files must be read
(same numbers) or refused with the same words, through `liftcal fit` and `liftcal replay`.
"""

import json

import pytest

from estimator import csvtable
from estimator.errors import InputError
from estimator.watch.replay import read_flight
from watch_helpers import demo_fit_params
from io_helpers import run

BENCH_HEAD = "# density: 1.2\n# diameter: 0.254\n"


def _bench_rows(n=20):
    """A sweep of the thrust-curve form T = T_max ((1 - a) x + a x^2), x = (u - u_min) / (1 - u_min),
    at two bus voltages (invented numbers; only the reading is under test here)."""
    rows = []
    for k in range(n):
        u = 0.05 + 0.95 * (k // 2) / (n // 2 - 1)
        volts = 15.0 if k % 2 else 16.0
        x = max(0.0, (u - 0.08) / 0.92)
        thrust = 12.0 * (volts / 15.0) ** 2 * (0.4 * x + 0.6 * x * x) + 0.01 * ((k * 7) % 5 - 2)
        amps = 0.5 + 1.8 * abs(thrust) ** 1.5
        rows.append("%.4f,%.2f,%.4f,%.5f" % (u, volts, amps, thrust))
    return rows


def _flight_rows(n=20):
    return ["%.2f,0.5,15.0,%.3f" % (0.1 * k, 20.0 + 0.01 * k) for k in range(n)]


def _files(tmp_path, header_bench, header_flight, rows_edit=None, prefix="", sep="\n"):
    bench, flight = _bench_rows(), _flight_rows()
    if rows_edit:
        bench, flight = rows_edit(bench), rows_edit(flight)
    b = tmp_path / "sweep.csv"
    f = tmp_path / "flight.csv"
    b.write_bytes((prefix + BENCH_HEAD.replace("\n", sep) + header_bench + sep + sep.join(bench) + sep).encode("utf-8"))
    f.write_bytes((prefix + header_flight + sep + sep.join(flight) + sep).encode("utf-8"))
    return str(b), str(f)


@pytest.fixture(scope="module")
def params_file(tmp_path_factory):
    p = tmp_path_factory.mktemp("params") / "params.json"
    p.write_text(json.dumps(demo_fit_params()))
    return str(p)


ACCEPTED = {
    "spaces in header cells": ("Command [-], Voltage [V], Current [A], Thrust [N]",
                               "Time [s], Command [-], Voltage [V], Current [A]", None, "", "\n"),
    "byte-order mark": ("command[-],voltage[V],current[A],thrust[N]",
                        "time[s],command[-],voltage[V],current[A]", None, "\ufeff", "\n"),
    "CRLF line ends": ("command[-],voltage[V],current[A],thrust[N]",
                       "time[s],command[-],voltage[V],current[A]", None, "", "\r\n"),
    "quoted header cells": ('"command[-]","voltage[V]","current[A]","thrust[N]"',
                            '"time[s]","command[-]","voltage[V]","current[A]"', None, "", "\n"),
    "comment lines in the data": ("command[-],voltage[V],current[A],thrust[N]",
                                  "time[s],command[-],voltage[V],current[A]",
                                  lambda r: r[:5] + ["# note", ""] + r[5:], "", "\n"),
}


@pytest.mark.parametrize("case", sorted(ACCEPTED))
def test_quirks_both_readers_accept(tmp_path, params_file, case):
    hb, hf, edit, prefix, sep = ACCEPTED[case]
    b, f = _files(tmp_path, hb, hf, edit, prefix, sep)
    code, out, err = run(["fit", b, "--out", str(tmp_path / "p.json"), "--json"])
    assert code == 0, err
    assert json.loads(out)["rows_used"] == 20
    code, out, err = run(["replay", f, "--params", params_file, "--json"])
    assert code == 0, err
    assert json.loads(out)["samples"] == 20


def _set_cell(col, text):
    def edit(rows):
        cells = rows[7].split(",")
        cells[col] = text
        return rows[:7] + [",".join(cells)] + rows[8:]
    return edit


REFUSED = {
    # case: (bench header, flight header, edit, prefix, sep, words both errors hold)
    "semicolons": ("command[-];voltage[V];current[A];thrust[N]", "time[s];command[-];voltage[V];current[A]",
                   None, "", "\n", "the header is separated by semicolons"),
    "tabs": ("command[-]\tvoltage[V]\tcurrent[A]\tthrust[N]", "time[s]\tcommand[-]\tvoltage[V]\tcurrent[A]",
             None, "", "\n", "the header is separated by tabs"),
    "CR alone": ("command[-],voltage[V],current[A],thrust[N]", "time[s],command[-],voltage[V],current[A]",
                 None, "", "\r", "carriage return alone"),
    "not a number": ("command[-],voltage[V],current[A],thrust[N]", "time[s],command[-],voltage[V],current[A]",
                     _set_cell(2, "12,5"), "", "\n", "5 cells where the header has 4"),
    "text": ("command[-],voltage[V],current[A],thrust[N]", "time[s],command[-],voltage[V],current[A]",
             _set_cell(2, "twelve"), "", "\n", "column 3: cannot read 'twelve' as a number"),
    # 'NaN' is a missed reading in a bench sweep, dropped like an empty cell (new-user trial 7,
    # finding 10: tests/test_bench_outputs_trial7.py); a flight log refuses it (benchmarks/bad_inputs.py)
    "infinity": ("command[-],voltage[V],current[A],thrust[N]", "time[s],command[-],voltage[V],current[A]",
                 _set_cell(2, "-inf"), "", "\n", "column 3: '-inf' is not a finite number"),
    "overflow": ("command[-],voltage[V],current[A],thrust[N]", "time[s],command[-],voltage[V],current[A]",
                 _set_cell(2, "1e999"), "", "\n", "column 3: '1e999' is not a finite number"),
    "unit missing": ("command[-],voltage,current[A],thrust[N]", "time[s],command[-],voltage,current[A]",
                     None, "", "\n", "column 'voltage' has no unit"),
    "unit unknown": ("command[-],voltage[kV],current[A],thrust[N]", "time[s],command[-],voltage[kV],current[A]",
                     None, "", "\n", "unit 'kV' of column 'voltage' is not one of"),
    "column twice": ("command[-],voltage[V],voltage[V],current[A],thrust[N]",
                     "time[s],command[-],voltage[V],voltage[V],current[A]",
                     None, "", "\n", "column 'voltage' appears twice"),
    "bad header cell": ("command[-],voltage[V],current[A],thrust[N],[x]",
                        "time[s],command[-],voltage[V],current[A],[x]",
                        None, "", "\n", "column 5 '[x]': not name[unit], not used by liftcal"),
}


@pytest.mark.parametrize("case", sorted(REFUSED))
def test_quirks_both_readers_refuse_with_the_same_words(tmp_path, params_file, case):
    hb, hf, edit, prefix, sep, words = REFUSED[case]
    b, f = _files(tmp_path, hb, hf, edit, prefix, sep)
    for args, name in ((["fit", b, "--out", str(tmp_path / "p.json")], b),
                       (["replay", f, "--params", params_file], f)):
        code, out, err = run(args)
        lines = err.strip().splitlines()
        assert code == 2 and len(lines) == 1 and lines[0].startswith("error: " + name), err
        assert words in lines[0], lines[0]
        assert "Traceback" not in err
    assert not (tmp_path / "p.json").exists()


def test_flight_log_reads_time_header_with_spaces_and_units(tmp_path):
    f = tmp_path / "f.csv"
    f.write_text("Time [s],Command [%],Voltage [mV],Current [mA],mode\n0.0,50,15000,20000,hover\n"
                 "0.1,50.5,14990,20100,hover\n")
    flight = read_flight(str(f))
    # 50 % = 500 permille, 15000 mV, 20000 mA: integers as the kernel takes them
    assert flight["command_permille"] == [500, 505] and flight["bus_mV"] == [15000, 14990]
    assert flight["bus_mA"] == [20000, 20100] and flight["time_s"] == [0.0, 0.1]


def test_long_cells_are_shortened_in_the_error(tmp_path):
    f = tmp_path / "f.csv"
    f.write_text("time[s],command[-],voltage[V],current[A]\n0,0.5,15," + "x" * 100000 + "\n")
    with pytest.raises(InputError) as err:
        read_flight(str(f))
    assert len(str(err.value)) < 300 and "(100000 characters)" in str(err.value)


def test_head_of_a_csv_with_comments(tmp_path):
    f = tmp_path / "c.csv"
    f.write_text("\ufeff# Density: 1.19\n\n# plain note\ntime[s] ,command[-]\n1,2\n")
    head = csvtable.read_head(str(f), "a CSV", "time[s]")
    assert head.comments == {"density": ("1.19", 1)} and head.cells == ["time[s]", "command[-]"]
    assert head.line == 4


@pytest.mark.parametrize("content,words", [
    (b"", "no header row found"),
    (b"# only a comment\n", "no header row found"),
    (b"\xff\xfe t\x00i\x00", "UTF-16 text"),
    (b"time[s]\xff\xfe\n", "not UTF-8 text"),
    (b"x" * (csvtable.MAX_HEAD_LINE + 10), "longer than 1 MiB"),
])
def test_files_without_a_header(tmp_path, content, words):
    f = tmp_path / "h.csv"
    f.write_bytes(content)
    with pytest.raises(InputError, match=words):
        csvtable.read_head(str(f), "a CSV", "time[s]")


def test_text_or_nan_in_a_column_not_used_is_read_past_by_both(tmp_path, params_file):
    # a notes column (text, even 'nan') beside the numbers: both readers read past it alike
    def add_note(rows):
        return [r + ",%s" % ("nan" if k == 3 else "motor A") for k, r in enumerate(rows)]
    b, f = _files(tmp_path, "command[-],voltage[V],current[A],thrust[N],note",
                  "time[s],command[-],voltage[V],current[A],note", add_note)
    code, out, err = run(["fit", b, "--out", str(tmp_path / "p.json"), "--json"])
    assert code == 0, err
    assert json.loads(out)["rows_used"] == 20
    code, out, err = run(["replay", f, "--params", params_file, "--json"])
    assert code == 0, err


def test_text_in_a_bench_cell_says_an_empty_cell_would_be_left_out(tmp_path):
    # a bench sweep drops rows with an empty reading (counted as empty_or_nan_cell); text in the
    # cell stops the fit, so the error says what to do instead
    b, _ = _files(tmp_path, "command[-],voltage[V],current[A],thrust[N]",
                  "time[s],command[-],voltage[V],current[A]", _set_cell(2, "abc"))
    code, _, err = run(["fit", b, "--out", str(tmp_path / "p.json")])
    assert code == 2 and "cannot read 'abc' as a number in 'current[A]'; leave a missing reading empty" in err
