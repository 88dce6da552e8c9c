"""A file of another kind passed where a JSON file belongs is named as that kind (new-user
trial 3, item 14: a PNG was called "UTF-16 or UTF-32 text", a bench CSV "malformed JSON").
The signatures are the formats' own: PNG (ISO/IEC 15948 sec. 5.2), JPEG (ITU-T T.81 SOI
marker), PDF (ISO 32000-1 sec. 7.5.2), ZIP (PKWARE APPNOTE local file header); section numbers
from memory."""

import pytest
from click.testing import CliRunner

from estimator.cli import cli


@pytest.mark.parametrize("name,data,kind", [
    ("plot.png", b"\x89PNG\r\n\x1a\n\x00\x00\x00\rIHDR" + bytes(40), "a PNG image"),
    ("photo.jpg", b"\xff\xd8\xff\xe0\x00\x10JFIF\x00" + bytes(40), "a JPEG image"),
    ("manual.pdf", b"%PDF-1.7\n%\xe2\xe3\xcf\xd3\n", "a PDF document"),
    ("sheet.xlsx", b"PK\x03\x04\x14\x00\x06\x00" + bytes(40), "a ZIP archive"),
    ("sweep.csv", b"# altitude: 300\ncommand[-],voltage[V],current[A],thrust[N]\n0.5,16,4,5\n",
     "looks like a CSV file"),
    ("log.csv", b"time[s],command[-],voltage[V],current[A]\n0.0,0.1,16.4,0.5\n", "looks like a CSV file"),
])
@pytest.mark.parametrize("command", [["hover"], ["check"]])
def test_a_file_of_another_kind_is_named(tmp_path, name, data, kind, command):
    path = tmp_path / name
    path.write_bytes(data)
    result = CliRunner().invoke(cli, command + [str(path)])
    assert result.exit_code == 2
    assert result.stdout == ""
    lines = result.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("error: ") and name in lines[0], result.stderr
    assert kind in lines[0], lines[0]


def test_json_with_a_real_syntax_error_still_says_where(tmp_path):
    path = tmp_path / "v.json"
    path.write_text('{"mass": "1.2kg",\n "rotors": 4,,\n}')
    result = CliRunner().invoke(cli, ["hover", str(path)])
    assert result.exit_code == 2 and "line 2 column" in result.stderr and "malformed JSON" in result.stderr


@pytest.mark.parametrize("command", [["fit", "{path}", "--out", "{out}"],
                                     ["replay", "{path}", "--params", "{path}"]])
def test_a_json_file_where_a_csv_belongs_is_named_json(tmp_path, params_file, command):
    # the reverse of the cases above (new-user trial, session 23): a parameter set given as the
    # bench sweep or the flight log read "2 header problems ... column 1 '{': not name[unit]"
    out = tmp_path / "new.json"
    args = [a.format(path=params_file, out=out) for a in command]
    result = CliRunner().invoke(cli, args)
    assert result.exit_code == 2
    lines = result.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("error: "), result.stderr
    assert "looks like a JSON file" in lines[0] and "not a CSV file" in lines[0], lines[0]
    assert "header" not in lines[0], lines[0]
    assert not out.exists()
