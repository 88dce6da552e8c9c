"""Headers from a thrust stand's or a logger's export, and the bench sweep's optional columns
(trial 5, items 5 and 6), through the commands.

A header written the usual spreadsheet way (``Pulse width (µs)``, ``Lift (gf)``: invented cells) is refused
with every problem in ONE `error:` line, each named by its column, and the hint is liftcal's
own cell (``command[us]``): doing what the hints say must give a file that fits. Nothing is
renamed silently. Optional bench columns are read and checked like the others (text refused
with line and column, an empty cell drops the row, counted) and the fit says they are not
used. The sweeps are invented: the thrust-curve form on two bus voltages, not measured.
"""

import json
import re

import pytest

from estimator.bench.columns import OPTIONAL
from io_helpers import run

AIR = "# density: 1.2\n# diameter: 0.254\n"


def _rows(n=24, extra=lambda k: []):
    """Rows command (us), volts, amps, thrust (gf) of an invented sweep, plus extra cells."""
    rows = []
    for k in range(n):
        x = (k // 2) / (n // 2 - 1)
        volts = 15.0 if k % 2 else 16.0
        thrust_N = 12.0 * (volts / 15.0) ** 2 * (0.4 * x + 0.6 * x * x) + 0.01 * ((k * 7) % 5 - 2)
        amps = 0.5 + 1.8 * abs(thrust_N) ** 1.5
        cells = ["%.1f" % (1050.0 + 950.0 * x), "%.2f" % volts, "%.4f" % amps, "%.3f" % (thrust_N / 9.80665e-3)]
        rows.append(",".join(cells + [str(c) for c in extra(k)]))
    return rows


def _write(tmp_path, header, rows, name="sweep.csv", head=AIR):
    path = tmp_path / name
    path.write_text(head + header + "\n" + "\n".join(rows) + "\n", encoding="utf-8")
    return path


def _refused(args):
    """Run; assert exit 2, nothing on stdout, exactly one `error:` line, no traceback."""
    code, out, err = run(args)
    lines = err.strip().splitlines()
    assert code == 2, (code, out, err)
    assert out == "", out
    assert len(lines) == 1 and lines[0].startswith("error: ") and "Traceback" not in err, err
    return lines[0]


# an INVENTED export header in a spreadsheet's style (our own words, no tool's format)
STAND = "Pulse width (\u00b5s),Supply volts (V),Supply amps (A),Lift (gf),Shaft Speed (RPM)"


def test_stand_header_lists_every_problem_with_liftcals_cells_in_one_line(tmp_path):
    path = _write(tmp_path, STAND, _rows(extra=lambda k: [1000 * k]))
    line = _refused(["fit", path, "--out", tmp_path / "p.json"])
    assert "5 header problems" in line, line
    for col, cell, ours in ((1, "'Pulse width (\u00b5s)'", "command[us]"), (2, "'Supply volts (V)'", "voltage[V]"),
                            (3, "'Supply amps (A)'", "current[A]"), (4, "'Lift (gf)'", "thrust[gf]"),
                            (5, "'Shaft Speed (RPM)'", "rpm[rpm]")):
        assert re.search(r"column %d %s: write %s(;|$)" % (col, re.escape(cell), re.escape(ours)), line), (col, line)
    assert "pulse width[" not in line  # never a hint that liftcal then refuses (trial 5)
    assert not (tmp_path / "p.json").exists()


def test_a_wide_stand_export_fits_one_line_with_every_column_named(tmp_path):
    # an export often carries a dozen columns (powers, efficiencies) liftcal does not use; INVENTED cells
    header = ("Elapsed (s),Pulse width (\u00b5s),Lift (kgf),Shaft torque (N\u00b7m),Supply volts (V),Supply amps (A),"
              "Shaft speed (RPM),Bus power (W),Shaft power (W),Drive efficiency (%),"
              "Grams per watt (gf/W),System grams per watt (gf/W),Winding temp (\u00b0C)")
    path = _write(tmp_path, header, ["0,1000,0,0,16,0,0,0,0,0,0,0,20"] * 12)
    line = _refused(["fit", path, "--out", tmp_path / "p.json"])
    assert not line.endswith("..."), line  # not cut short
    for ours in ("time[s]", "command[us]", "thrust[kgf]", "torque[N*m]", "voltage[V]", "current[A]",
                 "rpm[rpm]", "temperature[C]"):
        assert ": write %s" % ours in line, ours
    assert "column 8 'Bus power (W)', column 9 'Shaft power (W)' and 3 more: not name[unit], " \
           "not used by liftcal: delete them or write name[unit]" in line, line


def test_doing_what_the_hints_say_gives_a_file_that_fits(tmp_path):
    rows = _rows(extra=lambda k: [1000 * k])
    line = _refused(["fit", _write(tmp_path, STAND, rows), "--out", tmp_path / "p.json"])
    fixed = ",".join(re.findall(r": write (\S+?)(?:;|$)", line))
    assert fixed == "command[us],voltage[V],current[A],thrust[gf],rpm[rpm]", fixed
    code, out, err = run(["fit", _write(tmp_path, fixed, rows, "fixed.csv"), "--out", tmp_path / "p.json", "--json"])
    assert code == 0, err
    assert json.loads(out)["rows_used"] == 24


@pytest.mark.parametrize("micro", ["\u00b5s", "\u03bcs"])  # micro sign and Greek mu
def test_micro_sign_spellings_are_us(tmp_path, micro):
    rows = _rows()
    code, out_us, err = run(["fit", _write(tmp_path, "command[us],voltage[V],current[A],thrust[gf]", rows, "a.csv"),
                             "--out", tmp_path / "a.json", "--json"])
    assert code == 0, err
    code, out_mu, err = run(["fit", _write(tmp_path, "command[%s],voltage[V],current[A],thrust[gf]" % micro, rows,
                                           "b.csv"), "--out", tmp_path / "b.json", "--json"])
    assert code == 0 and err == "", err
    a, b = json.loads(out_us), json.loads(out_mu)
    assert a["columns"]["fitted"][0] == b["columns"]["fitted"][0] == "command[us]"
    assert a["command_min"] == b["command_min"] and a["thrust_max_N"] == b["thrust_max_N"]


@pytest.mark.parametrize("cell,ours", [
    ("Throttle (%)", "command[%]"), ("PWM (us)", "command[us]"), ("Signal (\u03bcs)", "command[us]"),
    ("Load (kgf)", "thrust[kgf]"), ("Load cell (g)", "thrust[g]"), ("Force (N)", "thrust[N]"),
    ("Bus voltage (mV)", "voltage[mV]"), ("Supply current (mA)", "current[mA]"),
    ("Motor temperature (\u00b0C)", "temperature[C]"), ("Torque (N\u00b7m)", "torque[N*m]"),
    ("Thrust (oz)", "thrust[N|mN|g|gf|kgf|lbf] (unit 'oz' is not one liftcal reads"),
])
def test_trade_words_get_liftcals_column_in_the_hint(tmp_path, cell, ours):
    header = "command[us],voltage[V],current[A],thrust[gf]".split(",")
    target = ours.split("[")[0]
    if target in ("command", "voltage", "current", "thrust"):
        header = [h for h in header if not h.startswith(target)] + [cell]
    else:
        header.append(cell)
    path = _write(tmp_path, ",".join(header), _rows(extra=lambda k: [1] if len(header) > 4 else []))
    line = _refused(["fit", path, "--out", tmp_path / "p.json"])
    assert "column %d %r: write %s" % (len(header), cell, ours) in line, line


def test_a_misnamed_column_in_bracket_form_gets_the_hint_not_a_rename(tmp_path):
    path = _write(tmp_path, "esc signal[\u00b5s],voltage[V],current[A],thrust[gf]", _rows())
    line = _refused(["fit", path, "--out", tmp_path / "p.json"])
    assert "column 1 'esc signal[\u00b5s]': did you mean command[us]?" in line, line
    assert "header lacks" not in line  # the hint already names the missing column


def test_header_problems_of_every_kind_in_one_line(tmp_path):
    path = _write(tmp_path, "Command[US],voltage,current[kA],thrust[g],thrust[g]", _rows(extra=lambda k: [1]))
    line = _refused(["fit", path, "--out", tmp_path / "p.json"])
    assert "4 header problems" in line
    assert "column 1 'Command[US]': unit 'US' of column 'command' is not one of [-], [%], [permille], [us]; " \
           "did you mean command[us]?" in line
    assert "column 2 'voltage': column 'voltage' has no unit; write voltage[V|mV]" in line
    assert "column 3 'current[kA]': unit 'kA' of column 'current' is not one of [A], [mA]" in line
    assert "column 5 'thrust[g]': column 'thrust' appears twice (also column 4)" in line


def test_flight_log_header_gets_the_same_treatment(tmp_path, params_file):
    rows = ["%.1f,50,15.0,20.0" % (100.0 * k) for k in range(20)]
    path = _write(tmp_path, "Time (ms),Throttle (%),Bus voltage (V),Current (A)", rows, "flight.csv", head="")
    line = _refused(["replay", path, "--params", params_file])
    assert "4 header problems" in line
    for k, ours in enumerate(("time[ms]", "command[%]", "voltage[V]", "current[A]"), start=1):
        assert re.search(r"column %d '[^']+': write %s" % (k, re.escape(ours)), line), (ours, line)


# --- item 6: optional bench columns -------------------------------------------------------

def test_text_in_an_optional_column_is_refused_with_line_and_column(tmp_path):
    rows = _rows(extra=lambda k: ["twenty" if k == 9 else 22.0])
    path = _write(tmp_path, "command[us],voltage[V],current[A],thrust[gf],temperature[C]", rows)
    line = _refused(["fit", path, "--out", tmp_path / "p.json"])
    # the header is on line 3 (two comment lines), row k on line 4 + k
    assert "line 13 column 5: cannot read 'twenty' as a number in 'temperature[C]'" in line, line
    assert not (tmp_path / "p.json").exists()


def test_a_non_number_in_a_flight_log_names_its_column_too(tmp_path, params_file):
    rows = ["%.1f,0.5,%s,20.0" % (0.1 * k, "n/a" if k == 4 else "15.0") for k in range(20)]
    path = _write(tmp_path, "time[s],command[-],voltage[V],current[A]", rows, "flight.csv", head="")
    line = _refused(["replay", path, "--params", params_file])
    assert "line 6 column 3: cannot read 'n/a' as a number in 'voltage[V]'" in line, line


def test_an_empty_optional_cell_drops_the_row_counted_like_a_required_one(tmp_path):
    rows = _rows(extra=lambda k: ["" if k == 9 else 4000 + 100 * k])
    path = _write(tmp_path, "command[us],voltage[V],current[A],thrust[gf],rpm[rpm]", rows)
    code, out, err = run(["fit", path, "--out", tmp_path / "p.json", "--json"])
    assert code == 0, err
    doc = json.loads(out)
    assert doc["rows_used"] == 23 and doc["rows_rejected"] == 1


def test_fit_says_which_optional_columns_were_read_and_not_used(tmp_path):
    rows = _rows(extra=lambda k: [0.1 * k, 4000 + 100 * k, 0.01 * k, 25])
    path = _write(tmp_path, "command[us],voltage[V],current[A],thrust[gf],time[s],rpm[rpm],torque[N*m],"
                            "temperature[C]", rows)
    code, out, err = run(["fit", path, "--out", tmp_path / "p.json"])
    assert code == 0, err
    text = " ".join(out.split())
    assert ("columns fitted: command[us], voltage[V], current[A], thrust[gf]; read and checked, not used: "
            "time[s], rpm[rpm], torque[N*m], temperature[C] (the fit takes") in text, text
    code, out, err = run(["fit", path, "--out", tmp_path / "p.json", "--json"])
    assert code == 0, err
    columns = json.loads(out)["columns"]
    assert columns["read_not_used"] == ["time[s]", "rpm[rpm]", "torque[N*m]", "temperature[C]"]
    assert columns["why_not_used"]


def test_fit_help_lists_the_optional_columns_from_the_readers_table():
    code, out, err = run(["fit", "--help"])
    assert code == 0, err
    text = " ".join(out.split())
    for name, units in OPTIONAL.items():
        assert "%s[%s]" % (name, "|".join(units)) in text, name
