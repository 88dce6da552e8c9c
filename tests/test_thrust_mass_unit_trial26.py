"""A bench sweep whose thrust column names a mass unit (new-user trial 26).

A load cell's display often reads "kg" (or "lb"): the number is the weight of that mass, a
force in kgf (lbf). `liftcal static --thrust 0.5kg` already says "kg is a mass: its weight is
0.5kgf"; a bench header `thrust[kg]` was refused with the list of units and no word why, and a
spreadsheet cell `Lift (kg)` was told to "convert the column" where only the label is wrong.
Now both name liftcal's cell, thrust[kgf], and say the numbers stay as they are
(1 kgf = 9.80665 N, standard gravity exact by CGPM 1901). The sweep is invented.
"""

from io_helpers import run

HEAD = "# density: 1.2\n# diameter: 10in\n"


def _sweep(tmp_path, header):
    rows = []
    for k in range(24):
        x = (k // 2) / 11.0
        volts = 15.0 if k % 2 else 16.0
        kgf = 1.2 * (volts / 15.0) ** 2 * (0.4 * x + 0.6 * x * x)
        rows.append("%.1f,%.2f,%.3f,%.4f" % (1050.0 + 950.0 * x, volts, 0.5 + 18.0 * kgf ** 1.5, kgf))
    path = tmp_path / "sweep.csv"
    path.write_text(HEAD + header + "\n" + "\n".join(rows) + "\n", encoding="utf-8")
    return path


def _error(args):
    code, out, err = run(args)
    lines = err.strip().splitlines()
    assert code == 2 and out == "" and len(lines) == 1 and lines[0].startswith("error: "), (code, out, err)
    assert "Traceback" not in err
    return lines[0]


def test_thrust_in_kg_names_kgf(tmp_path):
    path = _sweep(tmp_path, "command[us],voltage[V],current[A],thrust[kg]")
    line = _error(["fit", path, "--out", tmp_path / "p.json"])
    assert "did you mean thrust[kgf]?" in line, line
    assert "kg is a mass" in line, line
    assert not (tmp_path / "p.json").exists()


def test_thrust_in_lb_names_lbf(tmp_path):
    path = _sweep(tmp_path, "command[us],voltage[V],current[A],thrust[lb]")
    line = _error(["fit", path, "--out", tmp_path / "p.json"])
    assert "did you mean thrust[lbf]?" in line and "lb is a mass" in line, line


def test_spreadsheet_cell_in_kg_is_not_told_to_convert(tmp_path):
    path = _sweep(tmp_path, "command[us],voltage[V],current[A],Lift (kg)")
    line = _error(["fit", path, "--out", tmp_path / "p.json"])
    assert "write thrust[kgf]" in line and "convert the column" not in line, line


def test_doing_what_the_hint_says_fits(tmp_path):
    path = _sweep(tmp_path, "command[us],voltage[V],current[A],thrust[kgf]")
    code, out, err = run(["fit", path, "--out", tmp_path / "p.json"])
    assert code == 0 and (tmp_path / "p.json").exists(), err
