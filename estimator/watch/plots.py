"""Replay plot: measured against expected bus power, alarms shaded (matplotlib imported inside)."""

from estimator.cautions import SHORT
from estimator.jsonio import save_figure_atomic


SHADES = ((1, "power_high", "tab:red"), (2, "power_low", "tab:blue"), (4, "sensor_fault", "tab:gray"),
          (8, "baseline_off", "tab:olive"), (16, "mass_high", "tab:purple"))


def plot_replay(path, arrays, events, title="flight"):
    """Write a PNG of measured and expected power [W] against time [s] with flag spans shaded."""
    import os

    import matplotlib
    matplotlib.use("Agg")
    import matplotlib.pyplot as plt
    import numpy as np

    t = np.asarray(arrays["time_s"])
    flags = np.asarray(arrays["flags"], dtype=int)
    fig, ax = plt.subplots(figsize=(10, 4.5))
    ax.plot(t, arrays["power_W"], lw=0.6, color="black", label="measured bus power")
    ax.plot(t, arrays["expected_W"], lw=0.9, color="tab:green", label="expected (parameter set x learned scale)")
    for bit, name, color in SHADES:
        on = (flags & bit) != 0
        if on.any():
            ax.fill_between(t, 0, 1, where=on, transform=ax.get_xaxis_transform(), color=color, alpha=0.2,
                            step="post", label=name)
    ax.set_xlabel("time [s]")
    ax.set_ylabel("bus power [W]")
    ax.set_title("%s: %d events (%s)" % (os.path.basename(str(title)), len(events), SHORT))
    ax.legend(loc="upper right", fontsize=8)
    fig.tight_layout()
    try:
        save_figure_atomic(fig, path)
    finally:
        plt.close(fig)
