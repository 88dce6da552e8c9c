"""Tenth new-user trial, finding 5 leftovers: a bench sweep whose current column reads zero got
'fewer than 5 rows with thrust and power above idle' with no cause.

The sweep is tests/test_fit_tare_trial8._sweep (an INVENTED 10-inch 6S rotor from a DC motor and
fixed-coefficient propeller model written there, not any product) with its current column set to
zero, as a current sensor that is not connected reads. A turning rotor draws current (a DC
motor's torque is Kt I: any electric-machines text, from memory).
"""

from test_fit_tare_trial8 import _sweep
from trial_helpers import refused


def _zero_current(text, value="0.000"):
    out = []
    for line in text.splitlines():
        if line[:1].isdigit():
            cells = line.split(",")
            cells[2] = value
            line = ",".join(cells)
        out.append(line)
    return "\n".join(out) + "\n"


def test_a_sweep_whose_current_reads_zero_names_the_sensor(tmp_path):
    csv = tmp_path / "sweep.csv"
    csv.write_text(_zero_current(_sweep(0.0)))
    line = refused("fit", csv, "--out", tmp_path / "p.json")
    assert "sweep.csv" in line and "the current reads zero" in line
    assert "current sensor connected" in line and "current[A]" in line
    assert not (tmp_path / "p.json").exists()


def test_the_same_sweep_with_its_current_fits(tmp_path):
    # the control: the sweep as the model wrote it is fitted (exit 0), so the cause above is the zero
    from trial_helpers import run

    csv = tmp_path / "sweep.csv"
    csv.write_text(_sweep(0.0))
    code, out, err = run("fit", csv, "--out", tmp_path / "p.json")
    assert code == 0, err
