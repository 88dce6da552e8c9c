"""A load cell mounted the other way round is refused with that cause, and a cell not zeroed
(a tare offset) is warned about (new-user trial 3, item 11). Sweeps invented in
test_fit_model_spikes (momentum-theory power, several supplies, 1 % thrust noise).
"""

import numpy as np
import pytest
from click.testing import CliRunner

from estimator.bench.reader import read_bench_text
from estimator.bench.sweep import fit_bench
from estimator.cli import cli
from estimator.errors import InputError
from test_fit_model_spikes import _sweep_csv


def _edit_thrust(text, edit):
    out = []
    for line in text.splitlines():
        if line[:1].isdigit():
            cells = line.split(",")
            cells[3] = "%.4f" % edit(float(cells[3]))
            line = ",".join(cells)
        out.append(line)
    return "\n".join(out) + "\n"


@pytest.mark.parametrize("seed", range(4))
def test_reversed_load_cell_is_refused_with_its_cause(seed):
    text, _ = _sweep_csv(np.random.default_rng(seed))
    with pytest.raises(InputError, match="mounted the other way round or its sign is reversed"):
        fit_bench(read_bench_text(_edit_thrust(text, lambda t: -t)), "reversed.csv")


def test_reversed_load_cell_on_the_command_line_is_one_error_line(tmp_path):
    text, _ = _sweep_csv(np.random.default_rng(11))
    path = tmp_path / "reversed.csv"
    path.write_text(_edit_thrust(text, lambda t: -t))
    result = CliRunner().invoke(cli, ["fit", str(path), "--out", str(tmp_path / "p.json")])
    assert result.exit_code == 2
    assert result.stdout == ""
    lines = result.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("error: ") and "negate the thrust column" in lines[0]
    assert not (tmp_path / "p.json").exists()


@pytest.mark.parametrize("seed", range(4))
def test_a_tare_offset_is_warned_and_an_honest_zero_is_not(seed):
    text, t_max = _sweep_csv(np.random.default_rng(seed))
    honest = fit_bench(read_bench_text(text), "zeroed.csv")
    assert not any("not zeroed" in w for w in honest["warnings"]), honest["warnings"]
    offset = 0.025 * t_max  # e.g. 35 g on a 1.4 kg rotor, as in the trial
    shifted = fit_bench(read_bench_text(_edit_thrust(text, lambda t: t + offset)), "tare.csv")
    said = [w for w in shifted["warnings"] if "not zeroed" in w]
    assert len(said) == 1, shifted["warnings"]
    # the rotor stood still at the lowest commands: the offset is subtracted (trial 8, finding 1)
    stated = float(said[0].split("thrust zero offset ")[1].split(" N")[0])
    assert stated == pytest.approx(offset, rel=0.25)
