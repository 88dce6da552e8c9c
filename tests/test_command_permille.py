"""A command column in permille (new-user trial 4 item 7): liftcal's board API
(Watch.update(dt_ms, command_permille, ...)) and its exported hover command speak permille, so a
bench sweep or a flight log that logs the board's own command is read, not refused.

Permille is 1/1000 by definition (ISO 80000-1, the per mille sign), so the same sweep written
with its command as a fraction [-] and in permille must read as the same commands and fit to the
same curve."""

import json

import pytest

from estimator.demo.bench_sim import simulate_sweep
from io_helpers import run


def _recolumn(text, old, new, scale):
    """The CSV text with column command[old] relabelled command[new] and its values times scale
    (the conversion written here, by the definition of the units, not by liftcal's table)."""
    out = []
    header_seen = False
    for line in text.splitlines():
        if line.startswith("#") or not line.strip():
            out.append(line)
            continue
        cells = line.split(",")
        if not header_seen:
            i = cells.index("command[%s]" % old)
            cells[i] = "command[%s]" % new
            header_seen = True
        else:
            cells[i] = "%.6f" % (float(cells[i]) * scale)
        out.append(",".join(cells))
    return "\n".join(out) + "\n"


def _flight_text():
    """The simulated demo flight (cached in watch_helpers) as CSV text with command[-]."""
    from watch_helpers import demo_flight_rows

    return "time[s],command[-],voltage[V],current[A]\n" + "".join(
        "%.3f,%.4f,%.4f,%.4f\n" % tuple(r) for r in demo_flight_rows(7))


@pytest.fixture(scope="module")
def sweeps(tmp_path_factory):
    d = tmp_path_factory.mktemp("permille")
    text = simulate_sweep(seed=3, command_unit="-")
    frac = d / "sweep_fraction.csv"
    frac.write_text(text)
    perm = d / "sweep_permille.csv"
    perm.write_text(_recolumn(text, "-", "permille", 1000.0))
    return d, frac, perm


def test_a_permille_sweep_reads_as_the_same_commands(sweeps):
    from estimator.bench.reader import read_bench

    _, frac, perm = sweeps
    a, b = read_bench(str(frac)), read_bench(str(perm))
    assert a["command"].size == b["command"].size > 100
    assert abs(a["command"] - b["command"]).max() < 1e-9
    assert b["command_unit"] == "permille"


def test_a_permille_sweep_fits_like_the_fraction_sweep_and_speaks_permille(sweeps):
    d, frac, perm = sweeps
    fits = {}
    for f in (frac, perm):
        out = d / (f.stem + ".json")
        code, text, err = run(["fit", str(f), "--out", str(out), "--json"])
        assert code == 0, err
        fits[f.stem] = json.loads(text)
    a, b = fits["sweep_fraction"], fits["sweep_permille"]
    for key in ("quadratic_share", "command_min", "thrust_max_N"):
        assert b[key] == pytest.approx(a[key], rel=1e-6, abs=1e-9), key
    # the parameter set records the unit, and the schema accepts it
    code, _, err = run(["check", str(d / "sweep_permille.json")])
    assert code == 0, err
    # the text gives commands in the unit of the CSV (design notes sec. 4)
    code, text, err = run(["fit", str(perm), "--out", str(d / "again.json")])
    assert code == 0, err
    assert "permille" in text


def test_a_fraction_labelled_permille_is_refused_with_the_likely_unit(tmp_path):
    text = simulate_sweep(seed=3, command_unit="-")
    f = tmp_path / "slip.csv"
    f.write_text(_recolumn(text, "-", "permille", 1.0))     # 0..1 written under [permille]
    code, _, err = run(["fit", str(f), "--out", str(tmp_path / "p.json")])
    lines = err.strip().splitlines()
    assert code == 2 and len(lines) == 1 and lines[0].startswith("error:"), err
    assert "command[permille]" in lines[0] and "command[-]" in lines[0], lines[0]
    assert not (tmp_path / "p.json").exists()


def test_a_flight_log_in_permille_replays_like_the_fraction_log(tmp_path):
    from watch_helpers import demo_fit_params

    params = tmp_path / "params.json"
    params.write_text(json.dumps(demo_fit_params()))
    text = _flight_text()
    frac = tmp_path / "fl_fraction.csv"
    frac.write_text(text)
    perm = tmp_path / "fl_permille.csv"
    perm.write_text(_recolumn(text, "-", "permille", 1000.0))
    docs = []
    for f in (frac, perm):
        code, out, err = run(["replay", str(f), "--params", str(params), "--json"])
        assert code == 0, err
        docs.append(json.loads(out))
    assert docs[0]["samples"] == docs[1]["samples"] > 100
    assert docs[0]["events"] == docs[1]["events"] and docs[0]["learned"] == docs[1]["learned"]


def test_a_fraction_flight_log_labelled_permille_is_refused(tmp_path):
    from watch_helpers import demo_fit_params

    params = tmp_path / "params.json"
    params.write_text(json.dumps(demo_fit_params()))
    f = tmp_path / "fl_slip.csv"
    f.write_text(_recolumn(_flight_text(), "-", "permille", 1.0))
    code, _, err = run(["replay", str(f), "--params", str(params)])
    lines = err.strip().splitlines()
    assert code == 2 and len(lines) == 1, err
    assert "likely a 0..1 command labelled permille; label it command[-]" in lines[0], lines[0]
