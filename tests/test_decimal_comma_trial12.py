"""A single decimal comma in a comma-separated file is named as such, not blamed on a "truncated or
merged row" (new-user trial 12, finding 7: '12.2,1500,24,92,4.45,...' for 24.92 V). Common
practice: many locales write the decimal mark as a comma (ISO 80000-1 allows both, from memory);
a CSV's comma then splits the number in two.
"""

from io_helpers import refused
from test_bench_air_inputs import _sweep


def _with_line(tmp_path, line_index, replace):
    path = _sweep(tmp_path, "")
    lines = open(path).read().splitlines()
    lines[line_index] = replace(lines[line_index])
    with open(path, "w") as fh:
        fh.write("\n".join(lines) + "\n")
    return path, line_index + 1


def test_a_decimal_comma_in_one_cell_is_named_with_its_column_and_the_fix(tmp_path):
    # line 3 onward are readings 'command,voltage,current,thrust' (test_bench_air_inputs' sweep)
    def comma_in_voltage(line):
        cells = line.split(",")
        cells[1] = cells[1].replace(".", ",")
        return ",".join(cells)
    path, line_no = _with_line(tmp_path, 20, comma_in_voltage)
    volts = open(path).read().splitlines()[20].split(",")[1:3]
    line = refused(["fit", path, "--out", tmp_path / "p.json"], "line %d: 5 cells where the header has 4" % line_no,
                   "'%s,%s' in column voltage[V] looks like a decimal comma: write %s.%s" % (volts[0], volts[1],
                                                                                         volts[0], volts[1]))
    assert "truncated" not in line
    assert not (tmp_path / "p.json").exists()


def test_a_short_row_is_still_called_truncated(tmp_path):
    path, line_no = _with_line(tmp_path, 20, lambda line: line.rsplit(",", 1)[0])
    refused(["fit", path, "--out", tmp_path / "p.json"], "line %d" % line_no, "truncated or merged row?")
