"""Figures whose legends or labels hid data (new-user trial 9, finding 15): the fit plot's legend
covered the thrust curve, the payload plot's legend hid the first points and the command line,
and two labels of a compare plot overlapped. Every legend now sits outside every data area, inside
the figure, and no two point labels of a compare plot overlap.

Checked on the drawn figure itself (matplotlib's window extents, in pixels), captured where the
plot is saved. The vehicles, the sweep and the set are INVENTED (tests/invented_vehicles.py, the
demo's bench simulator); nothing here is physics.
"""

import json

import pytest
from click.testing import CliRunner

from estimator.cli import cli
from estimator.demo.bench_sim import simulate_sweep
from invented_vehicles import HEXA, WHOOP

# an INVENTED coaxial Y6 whose 27 combinations crowd the compare plot (the trial's case)
Y6 = {"name": "INVENTED Y6 coaxial", "mass_kg": 3.2, "rotors": {"count": 6, "layout": "coaxial"},
      "propeller": {"diameter": "13in", "pitch": "4.4in", "blades": 2},
      "motor": {"kv_rpm_per_V": 400, "resistance_ohm": 0.11, "no_load_current_A": 0.4},
      "battery": {"cells": 6, "capacity_Ah": 10, "resistance_ohm": 0.015,
                  "full_cell_V": 4.2, "nominal_cell_V": 3.7, "empty_cell_V": 3.5},
      "esc": {"efficiency": 0.95}, "site": {"altitude_m": 0, "temperature_C": 15}}


def _capture(monkeypatch, module, name):
    """Replace ``module.name`` (the save call) by one that records each figure's boxes."""
    seen = []

    def save(fig, path, *args, **kwargs):
        renderer = fig.canvas.get_renderer()
        fig.draw(renderer)
        data = [ax.get_window_extent(renderer) for ax in fig.axes]
        legends = [leg.get_window_extent(renderer) for leg in fig.legends]
        legends += [ax.get_legend().get_window_extent(renderer) for ax in fig.axes if ax.get_legend()]
        labels = [t.get_window_extent(renderer) for ax in fig.axes for t in ax.texts
                  if t.get_text().startswith("#")]
        seen.append({"figure": fig.bbox, "data": data, "legends": legends, "labels": labels})
    monkeypatch.setattr(module, name, save)
    return seen


def _check(figure):
    assert figure["legends"], "no legend drawn"
    for legend in figure["legends"]:
        for axes in figure["data"]:
            assert not legend.overlaps(axes), (legend, axes)
        f = figure["figure"]
        assert f.x0 <= legend.x0 and legend.x1 <= f.x1 and f.y0 <= legend.y0 and legend.y1 <= f.y1, legend
    for i, a in enumerate(figure["legends"]):
        for b in figure["legends"][i + 1:]:
            assert not a.overlaps(b), (a, b)


def _run(*args):
    result = CliRunner().invoke(cli, [str(a) for a in args])
    assert result.exit_code == 0, result.output


def test_the_fit_plot_legends_are_below_the_panels(tmp_path, monkeypatch):
    import estimator.bench.plots as plots

    seen = _capture(monkeypatch, plots, "save_figure_atomic")
    bench = tmp_path / "bench.csv"
    bench.write_text(simulate_sweep(seed=3))
    vehicle = tmp_path / "v.json"
    vehicle.write_text(json.dumps(dict(HEXA, propeller={"size": "10x4.5in"}, mass="2.1kg",
                                       battery=dict(HEXA["battery"], cells=4, capacity="5000mAh"),
                                       rotors={"count": 4}, motor=dict(HEXA["motor"], kv_rpm_per_V=900))))
    _run("fit", bench, "--vehicle", vehicle, "--out", tmp_path / "p.json", "--plot", tmp_path / "fit.png")
    assert len(seen) == 1 and len(seen[0]["legends"]) == 2   # one per panel column
    _check(seen[0])


@pytest.mark.parametrize("vehicle, payload", [(WHOOP, "0..30g"), (HEXA, "0..6kg")])
def test_the_payload_plot_legend_is_below_the_axes(tmp_path, monkeypatch, vehicle, payload):
    import estimator.preflight.plots as plots

    seen = _capture(monkeypatch, plots, "save_figure")
    path = tmp_path / "v.json"
    path.write_text(json.dumps(vehicle))
    _run("hover", path, "--payload", payload, "--job-time", "5min", "--plot", tmp_path / "pay.png")
    _check(seen[0])


def test_the_compare_plot_labels_do_not_overlap(tmp_path, monkeypatch):
    import estimator.preflight.plots as plots

    seen = _capture(monkeypatch, plots, "save_figure")
    path = tmp_path / "y6.json"
    path.write_text(json.dumps(Y6))
    _run("compare", path, "--vary", "propeller.size=13x4.4in,14x4.7in,15x5in", "--vary",
         "battery.capacity=8Ah,10Ah,12Ah", "--vary", "mass=3.0kg,3.2kg,3.4kg", "--plot", tmp_path / "c.png")
    figure = seen[0]
    _check(figure)
    labels = figure["labels"]
    assert len(labels) == 8                                   # LABEL_ALL ranks labelled
    for i, a in enumerate(labels):
        for b in labels[i + 1:]:
            assert not a.overlaps(b), (i, a, b)
