"""New-user trial 8, finding 9: a bench thermocouple column above a common-practice motor limit
gets a caution line from the fit (its words in estimator/cautions.py), and the fit plot's
hover lines each have a legend label and a style of their own. The sweep is the INVENTED
10-inch rotor of test_fit_tare_trial8 (its own DC motor model)."""

import json

import pytest
from click.testing import CliRunner

from estimator.cautions import HOT_MOTOR_C
from estimator.cli import cli
from test_fit_tare_trial8 import VEHICLE, _sweep


def _with_temperature(text, top_C):
    """The sweep with a temperature[C] column rising from 20 C to top_C over the rows."""
    lines = text.splitlines()
    head = next(i for i, line in enumerate(lines) if line.startswith("command"))
    rows = len(lines) - head - 1
    out = lines[:head] + [lines[head] + ",temperature[C]"]
    for k, line in enumerate(lines[head + 1:]):
        out.append("%s,%.1f" % (line, 20.0 + (top_C - 20.0) * k / (rows - 1)))
    return "\n".join(out) + "\n"


@pytest.mark.parametrize("top_C,cautioned", [(88.0, True), (70.0, False)])
def test_a_hot_motor_on_the_bench_gets_a_caution(tmp_path, top_C, cautioned):
    # 80 C on the bell of an ordinary hobby motor: common practice, from memory (magnets and
    # winding enamel); 88 C is the trial's reading, 70 C stays below it
    assert HOT_MOTOR_C == 80.0
    csv = tmp_path / "hot.csv"
    csv.write_text(_with_temperature(_sweep(0.0), top_C))
    result = CliRunner().invoke(cli, ["fit", str(csv), "--out", str(tmp_path / "p.json")])
    assert result.exit_code == 0, result.output
    text = " ".join(result.stdout.split())
    said = "temperature[C] read up to %.0f C, above about 80 C" % top_C
    assert (said in text) is cautioned, text
    assert ("common practice, from memory" in text) is cautioned


def test_the_fit_plot_labels_every_hover_line_in_its_own_style(tmp_path, monkeypatch):
    import estimator.bench.plots as bench_plots

    captured = {}
    monkeypatch.setattr(bench_plots, "save_figure_atomic", lambda fig, path: captured.setdefault("fig", fig))
    (tmp_path / "s.csv").write_text(_sweep(0.0))
    (tmp_path / "v.json").write_text(json.dumps(VEHICLE))
    result = CliRunner().invoke(cli, ["fit", str(tmp_path / "s.csv"), "--vehicle", str(tmp_path / "v.json"),
                                      "--out", str(tmp_path / "p.json"), "--plot", str(tmp_path / "p.png")])
    assert result.exit_code == 0, result.output
    ax = captured["fig"].axes[0]
    lines = ax.get_lines()
    assert all(not line.get_label().startswith("_") for line in lines), [l.get_label() for l in lines]
    legend = [t.get_text() for t in ax.get_legend().get_texts()]
    hover = [l for l in lines if "hover" in l.get_label()]
    assert len(hover) == 3 and all(l.get_label() in legend for l in hover)
    styles = {(l.get_linestyle(), l.get_color()) for l in hover}
    assert len(styles) == 3  # the dashed curve, the dotted thrust, the hover command: told apart
    assert any("hover thrust per rotor moved to bench air" in t and "(400 g in the site's air)" in t
               for t in legend), legend  # 1.6 kg / 4 rotors = 400 g (the test's vehicle)
