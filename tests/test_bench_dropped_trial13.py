"""A bench sweep with many rows dropped (new-user trial 13, finding 6): every other row with a
'nan' current, 41 of 82, was fitted with only '(41 dropped: ...)' on the first line. Under about
5 % missing readings are commonly taken as harmless and above about 10 % as likely to bias a fit
(common practice, from memory), so more than 10 % dropped is warned about, in the fit's text, its
JSON and the parameter set; the fit still runs (a flight log is refused above 5 %: its rows are
time steps).
"""

import json

from estimator.demo.bench_sim import simulate_sweep
from io_helpers import run


def _spoil_current(text, every):
    """The sweep with the current cell of every ``every``-th data row made 'nan'; (text, rows
    spoiled, data rows)."""
    lines = text.splitlines()
    head = next(i for i, line in enumerate(lines) if not line.startswith("#"))
    column = [c.split("[")[0] for c in lines[head].split(",")].index("current")
    spoiled = 0
    for k, i in enumerate(range(head + 1, len(lines))):
        if k % every == 0:
            cells = lines[i].split(",")
            cells[column] = "nan"
            lines[i] = ",".join(cells)
            spoiled += 1
    return "\n".join(lines) + "\n", spoiled, len(lines) - head - 1


def _fit(tmp_path, text):
    sweep = tmp_path / "sweep.csv"
    sweep.write_text(text)
    code, out, err = run(["fit", sweep, "--diameter", "10in", "--out", tmp_path / "p.json", "--json"])
    assert code == 0, err
    return json.loads(out), json.loads((tmp_path / "p.json").read_text())


def test_half_the_rows_dropped_is_warned_about(tmp_path):
    text, spoiled, rows = _spoil_current(simulate_sweep(seed=5, outliers=False), 2)
    out, params = _fit(tmp_path, text)
    said = [w for w in out["warnings"] if "rows (" in w and "were dropped" in w]
    assert len(said) == 1 and said[0].startswith("%d of %d rows (50 %%) were dropped (empty_or_nan_cell %d)"
                                                 % (spoiled, rows, spoiled)), out["warnings"]
    assert "more than 10 %" in said[0] and said[0] in params["warnings"]
    code, text_out, _ = run(["fit", tmp_path / "sweep.csv", "--diameter", "10in", "--out", tmp_path / "p.json"])
    assert code == 0 and "! %d of %d rows (50 %%) were dropped" % (spoiled, rows) in " ".join(text_out.split())


def test_a_few_rows_dropped_are_only_counted(tmp_path):
    # one row in 25 (4 %): below the 10 % line, no warning
    text, spoiled, rows = _spoil_current(simulate_sweep(seed=5, outliers=False), 25)
    assert spoiled <= 0.1 * rows
    out, _ = _fit(tmp_path, text)
    assert out["rows_rejected"] >= spoiled and not any("were dropped" in w for w in out["warnings"])
