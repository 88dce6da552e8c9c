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
