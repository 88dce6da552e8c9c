"""Replay plot: measured against expected bus power, alarms shaded, the learning window marked
(matplotlib imported inside)."""

from estimator.cautions import SHORT
from estimator.jsonio import save_figure_atomic


SHADES = ((1, "power_high", "tab:red"), (2, "power_low", "tab:blue"), (4, "sensor_fault", "tab:gray"),
          (8, "baseline_off", "tab:olive"), (16, "mass_high", "tab:purple"))


def plot_replay(path, arrays, events, title="flight"):
    """Write a PNG of measured and expected power [W] against time [s] from the log's first row,
    flag spans shaded and the learning window marked; returns the plot's title."""
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
    span = arrays.get("learn_span") or (None, None)
    if span[0] is not None and span[1] is not None:
        ax.axvspan(span[0], span[1], color="tab:cyan", alpha=0.12, lw=0, label="take-off and learning window")
    ax.set_xlabel("time from the log's first row [s]")
    ax.set_ylabel("bus power [W]")
    heading = "%s: %d event%s (%s)" % (os.path.basename(str(title)), len(events), "" if len(events) == 1 else "s", SHORT)
    ax.set_title(heading, fontsize=9)
    # the legend sits below the axes, never over the data
    ax.legend(loc="upper center", bbox_to_anchor=(0.5, -0.16), ncol=3, fontsize=8, frameon=False)
    fig.tight_layout()
    try:
        save_figure_atomic(fig, path)
    finally:
        plt.close(fig)
    return heading
