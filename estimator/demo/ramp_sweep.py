"""Large continuous bench sweeps (a slow ramp logged fast) for benchmarks and tests.

INVENTED data: the bench simulator's noise-free physics (estimator.benchsim.true_point) at
its three supply voltages, interpolated on a fine command grid, with sensor noise and a few
gross spikes. numpy, so a million rows take well under a second to make.
"""

import numpy as np

from estimator.demo.bench_sim import SUPPLY_VOLTAGES_V, bench_density_kg_m3, true_point

HEADER = "time[s],command[-],voltage[V],current[A],thrust[N]\n"


def ramp_sweep_rows(rows, seed=1, sample_s=0.001, thrust_spikes=None, current_spikes=0):
    """Array rows x 5 (time [s], command [-], voltage [V], current [A], thrust [N]).

    thrust_spikes: rows with +3 N load-cell spikes (default rows // 10000);
    current_spikes: rows with +8 A current-sensor spikes.
    """
    rng = np.random.default_rng(seed)
    rho = bench_density_kg_m3()
    grid = np.linspace(0.0, 1.0, 201)
    tables = [np.array([[p["bus_V"], p["bus_current_A"], p["thrust_N"]]
                        for p in (true_point(u, vs, rho) for u in grid)]) for vs in SUPPLY_VOLTAGES_V]
    u = rng.uniform(0.0, 1.0, rows)
    which = rng.integers(0, len(SUPPLY_VOLTAGES_V), rows)
    out = np.empty((rows, 5))
    out[:, 0] = np.arange(rows) * sample_s
    out[:, 1] = u
    for k, table in enumerate(tables):
        sel = which == k
        for col in range(3):
            out[sel, 2 + col] = np.interp(u[sel], grid, table[:, col])
    out[:, 2] += rng.normal(0.0, 0.005, rows)
    out[:, 3] += rng.normal(0.0, 0.03, rows) + 0.005 * out[:, 3] * rng.normal(0.0, 1.0, rows)
    out[:, 4] += rng.normal(0.0, 0.02, rows) + 0.004 * out[:, 4] * rng.normal(0.0, 1.0, rows)
    out[rng.integers(0, rows, rows // 10000 if thrust_spikes is None else thrust_spikes), 4] += 3.0
    if current_spikes:
        out[rng.integers(0, rows, current_spikes), 3] += 8.0
    return out


def write_ramp_csv(path, out, note, time_format="%.3f"):
    """Write ``out`` (from ramp_sweep_rows) as a bench CSV with the demo's bench-air comments."""
    with open(path, "w") as fh:
        fh.write("# %s (simulated, not measured)\n# altitude: 300m\n# temperature: 21C\n"
                 "# diameter: 10in\n" % note + HEADER)
        np.savetxt(fh, out, fmt=[time_format, "%.5f", "%.4f", "%.4f", "%.4f"], delimiter=",")
    return out.nbytes
