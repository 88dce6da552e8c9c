"""Sixth new-user trial, item 12: the fit plot's legend gives command values with their unit.

References: 1 kgf = 1000 gf = 9.80665 N, 1 N = 1000 mN (standard gravity, NIST SP 811). The sweep
is the simulated demo sweep (estimator.demo.ramp_sweep, invented), rewritten in kgf and in
percent the way a stand's log writes them; the vehicle is the invented demo quad. Through the
command: io_helpers.run (exit code, stdout, stderr apart).
"""

from estimator.demo.ramp_sweep import ramp_sweep_rows, write_ramp_csv
from io_helpers import VEHICLE, run

G = 9.80665  # m/s^2, standard gravity (NIST SP 811)


def _sweep(tmp_path, thrust_unit="N", command_unit="-"):
    path = tmp_path / "ramp.csv"
    write_ramp_csv(str(path), ramp_sweep_rows(3000, seed=5), "invented sweep for the wording test")
    lines = path.read_text().splitlines()
    at = [i for i, line in enumerate(lines) if not line.startswith("#")][0]
    assert lines[at] == "time[s],command[-],voltage[V],current[A],thrust[N]"
    t_scale = {"N": 1.0, "kgf": 1.0 / G}[thrust_unit]
    u_scale = {"-": 1.0, "%": 100.0}[command_unit]
    rows = []
    for line in lines[at + 1:]:
        t, u, v, i, f = line.split(",")
        rows.append("%s,%.4f,%s,%s,%.6g" % (t, float(u) * u_scale, v, i, float(f) * t_scale))
    out = tmp_path / "sweep.csv"
    out.write_text("\n".join(lines[:at] + ["time[s],command[%s],voltage[V],current[A],thrust[%s]"
                                           % (command_unit, thrust_unit)] + rows) + "\n")
    return out


def test_the_plot_legend_gives_commands_with_their_unit(tmp_path, monkeypatch):
    import estimator.bench.plots as plots

    seen = []
    monkeypatch.setattr(plots, "save_figure_atomic", lambda fig, path: seen.append(
        [t.get_text() for ax in fig.axes if ax.get_legend() for t in ax.get_legend().get_texts()]))
    code, text, err = run(["fit", _sweep(tmp_path, "N", "%"), "--vehicle", VEHICLE, "--out",
                           tmp_path / "p.json", "--plot", tmp_path / "fit.png"])
    assert code == 0 and err == "" and seen
    labels = seen[0]
    hover = [x for x in labels if x.startswith("hover command ")][0]
    assert hover.split()[3] == "%", hover                     # "hover command 57.8 % (demo survey quad)"
    curve = [x for x in labels if x.startswith("controller curve")][0]
    assert " %," in curve.split("intercept")[1], curve
