"""New-user trial 26: a flight log header 'cmd[-]' got no hint while 't', 'volt' and 'amp' did, and
'time[sec]' got none either; now they get liftcal's cell ('did you mean command[-]?', 'did you
mean time[s]?'), as do other plain spellings of seconds and milliseconds. The column is never
read under the other name: the person fixes the header (still one `error:` line, exit 2)."""

import pytest

from io_helpers import PARAMS, refused

ROWS = "0,0.5,15,3\n0.01,0.5,15,3\n"


def _replay_refused(tmp_path, header):
    log = tmp_path / "log.csv"
    log.write_text(header + "\n" + ROWS, encoding="utf-8")
    return refused(["replay", log, "--params", PARAMS])


def test_cmd_gets_liftcals_name(tmp_path):
    line = _replay_refused(tmp_path, "time[s],cmd[-],voltage[V],current[A]")
    assert "column 2 'cmd[-]': did you mean command[-]? (liftcal's name for the column)" in line, line
    assert "header lacks" not in line, line


@pytest.mark.parametrize("cell", ["time[sec]", "time[secs]", "time[seconds]", "time[Sec]"])
def test_seconds_written_out_get_time_s(tmp_path, cell):
    line = _replay_refused(tmp_path, cell + ",command[-],voltage[V],current[A]")
    assert "column 1 '%s': unit '%s' of column 'time' is not one of [s], [ms]; did you mean time[s]?" \
        % (cell, cell[5:-1]) in line, line


def test_milliseconds_written_out_get_time_ms(tmp_path):
    line = _replay_refused(tmp_path, "time[msec],command[-],voltage[V],current[A]")
    assert "did you mean time[ms]?" in line, line


def test_spreadsheet_cells_get_liftcals_cells(tmp_path):
    line = _replay_refused(tmp_path, "Time (sec),Cmd (-),voltage[V],current[A]")
    assert "column 1 'Time (sec)': write time[s];" in line, line
    assert "column 2 'Cmd (-)': write command[-]" in line, line
    assert "not one liftcal reads" not in line, line


def test_seconds_as_a_column_name_still_gets_time(tmp_path):
    line = _replay_refused(tmp_path, "seconds[s],command[-],voltage[V],current[A]")
    assert "column 1 'seconds[s]': did you mean time[s]?" in line, line
