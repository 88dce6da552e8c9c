"""A figure liftcal drew is replaced only at the path it drew it at (new-user trial 9, finding
10: `cp ramp5.png holiday_copy.png; liftcal fit ... --plot holiday_copy.png` replaced the kept copy
of a fault flight's figure with a bench-fit figure, "replaced holiday_copy.png: a figure liftcal
drew"). A copy or a renamed figure is the person's: refused in one line, the file unchanged; a
re-run at the same path still replaces it and says so. The vehicle, sweep and flight are INVENTED
(tests/invented_vehicles.py, the demo's simulators); nothing here is physics.
"""

import shutil

import pytest
from click.testing import CliRunner

from estimator.cli import cli
from estimator.demo.bench_sim import simulate_sweep
from trial_helpers import plot_commands, refused


def _commands(tmp_path):
    commands = plot_commands(tmp_path)
    bench = tmp_path / "bench.csv"
    bench.write_text(simulate_sweep(seed=3))
    commands["fit"] = ["fit", str(bench), "--out", str(tmp_path / "fitted.json")]
    return commands


def _invoke(argv):
    result = CliRunner().invoke(cli, argv)
    assert result.exit_code == 0, result.output
    return result


@pytest.mark.parametrize("command", ["hover", "compare", "replay", "fit"])
def test_a_copied_or_renamed_figure_is_never_replaced(tmp_path, command):
    argv = _commands(tmp_path)
    drawn = tmp_path / "drawn.png"
    _invoke(argv[command] + ["--plot", str(drawn)])
    kept = tmp_path / "holiday_copy.png"
    shutil.copyfile(drawn, kept)                       # cp: a copy the person keeps
    (tmp_path / "old").mkdir()
    moved = tmp_path / "old" / "drawn.png"
    shutil.copyfile(drawn, moved)                      # the same name in another folder
    for other in ("replay", "fit"):                    # the trial: another command's figure over it
        for target in (kept, moved):
            before = target.read_bytes()
            if other == "fit":
                (tmp_path / "fitted.json").unlink(missing_ok=True)
            line = refused(*(argv[other] + ["--plot", str(target)]))
            assert "--plot %s: a figure liftcal drew, but liftcal drew it under another name or in another " \
                   "folder" % target in line, line
            assert "name another path" in line
            assert target.read_bytes() == before       # untouched
    assert not (tmp_path / "fitted.json").exists()     # refused before any work: no half output
    # a re-run at the path it was drawn at still replaces it, and says so
    if command == "fit":
        (tmp_path / "fitted.json").unlink(missing_ok=True)
    again = _invoke(argv[command] + ["--plot", str(drawn)])
    assert "replaced %s: a figure liftcal drew" % drawn in " ".join(again.stdout.split())


def test_a_liftcal_figure_without_the_drawn_at_mark_is_kept(tmp_path):
    # a figure an older liftcal drew (Software: liftcal, no drawn-at mark) cannot tell where it
    # was drawn: it is kept, not replaced
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    old = tmp_path / "old.png"
    fig = plt.figure()
    fig.savefig(old, format="png", metadata={"Software": "liftcal 0.0.9"})
    plt.close(fig)
    before = old.read_bytes()
    line = refused(*(_commands(tmp_path)["compare"] + ["--plot", str(old)]))
    assert "carries no record of where liftcal drew it" in line, line
    assert old.read_bytes() == before
