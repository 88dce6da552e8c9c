"""The bench fit's path reads top-down: the fit returns what the later steps take as named
values (no private keys in the parameter set), and each step's module is entered once or twice."""

from estimator.bench.sweep import fit_sweep
from estimator.demo.bench_sim import simulate_sweep


def _demo_csv(tmp_path):
    path = tmp_path / "demo.csv"
    path.write_text(simulate_sweep(seed=1))
    return str(path)


def test_fit_returns_rows_and_columns_as_named_values(tmp_path):
    fitted = fit_sweep(_demo_csv(tmp_path))
    # the parameter set is only the set: the plot's rows travel beside it, not in a private key
    assert [k for k in fitted.params if k.startswith("_")] == []
    # every row the fit used is marked used: rows_used counts them (the simulator's 6 spoiled
    # rows are dropped by the reader or marked spikes)
    assert int(fitted.rows.used.sum()) == fitted.params["fit_quality"]["rows_used"]
    assert fitted.rows.command.size == fitted.rows.used.size
    # the simulator writes time[s],command[us],voltage[V],current[A],thrust[g] (demo/bench_sim.py)
    assert fitted.columns == {"fitted": ["command[us]", "voltage[V]", "current[A]", "thrust[g]"],
                              "read_not_used": ["time[s]"]}


def _entries(run, caller):
    """{module: calls} from the module ``caller`` into other modules of estimator/ while run()
    runs (sys.setprofile; the import of a module is not a call)."""
    import collections
    import sys

    counts = collections.Counter()

    def profile(frame, event, arg):
        if event == "call" and frame.f_code.co_name != "<module>" and frame.f_back is not None:
            callee = frame.f_globals.get("__name__", "")
            if callee.startswith("estimator") and callee != caller \
                    and frame.f_back.f_globals.get("__name__") == caller:
                counts[callee] += 1

    sys.setprofile(profile)
    try:
        run()
    finally:
        sys.setprofile(None)
    return counts


def test_the_pipeline_enters_each_step_once_or_twice(tmp_path):
    # the fit reads top-down (issue 10's "done when"): reader, checks, levels, each model's
    # fitter (one call returns all it knows), wording, parameter set; a check before a fit
    # (k <= 1 before the levels, a rising sweep before the motor fit) is the second entry
    path = _demo_csv(tmp_path)
    fit_sweep(path)  # imports happen here, outside the count
    counts = _entries(lambda: fit_sweep(path), "estimator.bench.sweep")
    assert set(counts) >= {"estimator.bench.reader", "estimator.bench.motor_fit", "estimator.bench.curve_fit",
                           "estimator.bench.power_fit", "estimator.params"}
    assert max(counts.values()) <= 2, counts


def test_the_fit_command_calls_the_pipeline_and_the_summary_once(tmp_path):
    # `liftcal fit --vehicle`: the command chains the flows (fit, the vehicle's hover report,
    # write, summary) and enters each bench module once: it no longer assembles the summary
    # from the wording's parts (11 calls before), and the hover report is computed once (its
    # block and the margins shown come from the same report; twice before)
    import json

    from click.testing import CliRunner

    from estimator.cli import cli
    from estimator.demo.scenario import DEMO_VEHICLE
    import estimator.preflight.measured_rotor as measured_rotor

    csv, vehicle = _demo_csv(tmp_path), tmp_path / "vehicle.json"
    vehicle.write_text(json.dumps(DEMO_VEHICLE))
    runner = CliRunner()

    def run(name):
        result = runner.invoke(cli, ["fit", csv, "--vehicle", str(vehicle), "--out", str(tmp_path / name)])
        assert result.exit_code == 0, result.output

    run("warm.json")
    reports = []
    original = measured_rotor.hover_from_params
    measured_rotor.hover_from_params = lambda *a: reports.append(1) or original(*a)
    try:
        counts = _entries(lambda: run("p.json"), "estimator.commands.bench")
    finally:
        measured_rotor.hover_from_params = original
    bench = {m: n for m, n in counts.items() if m.startswith("estimator.bench.")}
    assert bench == {"estimator.bench.sweep": 1, "estimator.bench.summary": 1}, counts
    assert len(reports) == 1
    # the parameter set: one call builds the complete, checked set (vehicle match, hover block,
    # k at hover, schema), one writes it (4 calls before: match, add, check, write)
    assert counts["estimator.params"] == 2, counts
