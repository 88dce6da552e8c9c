"""Plots of the pre-flight choices (``compare --plot``, ``hover --payload ... --plot``).

matplotlib is imported only in here, inside the functions. Figures are written atomically
(estimator.outputs.save_figure).
"""

from estimator.cautions import SHORT
from estimator.outputs import save_figure
from estimator.preflight.report import HOVER_COMMAND_LIMIT
from estimator.units import parse_quantity


# up to this many points of a compare plot carry their rank and values
LABEL_ALL = 8


def _pyplot():
    import matplotlib
    matplotlib.use("Agg")
    import matplotlib.pyplot as plt
    return plt


def plot_compare(path, result, name):
    """Endurance against hover command, one point per combination, kept margins in green.

    The trade-off at a glance: up and to the left is a longer hover at a lower command. The
    best combination that keeps every margin is labelled; so are the next ones, every point
    when there are at most LABEL_ALL of them, else the first LABEL_ALL by rank.
    """
    plt = _pyplot()
    fig, ax = plt.subplots(figsize=(8.0, 6.2))
    rows = [r for r in result["rows"] if r["hover_command"] is not None and r["flight_time_lead_min"] is not None]
    # a row whose values look like a unit or decimal slip is never drawn as keeping every margin
    kinds = (("keeps", "tab:green", "o", "keeps every margin"),
             ("slip", "tab:orange", "x", "keeps the margins, but a value looks like a slip: left out"),
             ("breaks", "tab:red", "o", "breaks a margin"))
    kind = {id(r): "breaks" if not r["keeps_margins"] else "slip" if r.get("looks_like_slip") else "keeps"
            for r in rows}
    for which, colour, marker, label in kinds:
        pts = [r for r in rows if kind[id(r)] == which]
        if pts:
            ax.scatter([r["hover_command"] for r in pts], [r["flight_time_lead_min"] for r in pts],
                       c=colour, marker=marker, label=label, s=30, alpha=0.8)
    labels = []
    for r in sorted(rows, key=lambda r: r["rank"])[:LABEL_ALL]:
        short = ", ".join(str(v) for v in r["values"].values())
        labels.append(ax.annotate("#%d %s" % (r["rank"], short), (r["hover_command"], r["flight_time_lead_min"]),
                                  fontsize=7, xytext=(4, 4), textcoords="offset points"))
    ax.margins(x=0.25, y=0.1)
    ax.axvline(HOVER_COMMAND_LIMIT, color="grey", ls="--", lw=1)
    ax.text(HOVER_COMMAND_LIMIT, ax.get_ylim()[0], " command limit %.1f" % HOVER_COMMAND_LIMIT,
            fontsize=8, color="grey", va="bottom")
    ax.set_xlabel("hover command, nominal pack [-]")
    ax.set_ylabel("hover endurance to cutoff or reserve [min]")
    n = len(result["rows"])
    ax.set_title("%s: %d combination%s\nvaried: %s" % (name, n, "" if n == 1 else "s", ", ".join(result["varied"])),
                 fontsize=9)
    ax.grid(True, alpha=0.3)
    fig.tight_layout(rect=(0.0, 0.1, 1.0, 1.0))
    _legend_below(fig, ax, ax.get_legend_handles_labels(), ncol=2)
    fig.text(0.01, 0.01, SHORT, fontsize=7, color="grey")
    _spread_labels(fig, labels, [(r["hover_command"], r["flight_time_lead_min"]) for r in rows])
    save_figure(fig, path)
    plt.close(fig)


# offsets [points] a point's label tries, in order, until it overlaps no label placed before it
_LABEL_OFFSETS = ((4, 4), (4, -11), (-4, 4), (-4, -11), (4, 14), (4, -21), (-4, 14), (-4, -21),
                  (4, 24), (4, -31))


def _spread_labels(fig, labels, points=()):
    """Move each point label (in rank order) to the first of _LABEL_OFFSETS where its box overlaps
    no earlier label's and no point's marker (``points``: (x, y) in data coordinates) (trial 9,
    finding 15: labels #6 and #7 of a compare plot overlapped); a label that finds none keeps its
    first place."""
    from matplotlib.transforms import Bbox

    renderer = fig.canvas.get_renderer()
    half = 3.0 * fig.dpi / 72.0               # a marker's half width [pixels]: 3 points
    placed = []
    for label in labels:
        x, y = label.axes.transData.transform(label.xy)
        placed.append(Bbox([[x - half, y - half], [x + half, y + half]]))
    for x, y in points:
        x, y = labels[0].axes.transData.transform((x, y)) if labels else (x, y)
        placed.append(Bbox([[x - half, y - half], [x + half, y + half]]))
    for label in labels:
        for dx, dy in _LABEL_OFFSETS:
            label.set_position((dx, dy))       # the offset, in points (textcoords)
            label.set_horizontalalignment("left" if dx >= 0 else "right")
            label.set_verticalalignment("bottom" if dy >= 0 else "top")
            box = label.get_window_extent(renderer)
            if not any(box.overlaps(other) for other in placed):
                break
        else:
            label.set_position(_LABEL_OFFSETS[0])
            label.set_horizontalalignment("left")
            label.set_verticalalignment("bottom")
            box = label.get_window_extent(renderer)
        placed.append(box)


def _legend_below(fig, ax, handles_labels, ncol=1):
    """The legend in the band below the axes (figure coordinates), outside the data area
    (trial 9, finding 15: the payload legend hid the 0 g and 5 g points)."""
    handles, labels = handles_labels
    return ax.legend(handles, labels, loc="upper left", fontsize=8, frameon=False, ncol=ncol,
                      bbox_to_anchor=(ax.get_position().x0, 0.095), bbox_transform=fig.transFigure)


def plot_payload(path, result, name, unit="kg"):
    """Endurance and hover command against payload, the largest payload that keeps the margins marked.

    The hover command is drawn near an empty pack (the command the margin judges) and on a nominal
    pack, with the command limit; every line is in the legend.
    """
    plt = _pyplot()
    scale = parse_quantity("1" + unit, "mass")
    rows = result["rows"]
    fig, ax = plt.subplots(figsize=(8.0, 6.6))
    xs = [r["payload_kg"] / scale for r in rows if r["flight_time_lead_min"] is not None]
    ys = [r["flight_time_lead_min"] for r in rows if r["flight_time_lead_min"] is not None]
    ax.plot(xs, ys, "-", color="tab:blue", lw=1.5, label="endurance")
    for keeps, colour, label in ((True, "tab:green", "keeps every margin"),
                                 (False, "tab:red", "breaks a margin")):
        pts = [r for r in rows if r["flight_time_lead_min"] is not None and bool(r["keeps"]) == keeps]
        if pts:
            ax.plot([r["payload_kg"] / scale for r in pts], [r["flight_time_lead_min"] for r in pts], "o",
                    color=colour, ms=5, ls="none", label=label)
    if result["max_payload_kg"] is not None:
        ax.axvline(result["max_payload_kg"] / scale, color="tab:green", ls="--", lw=1,
                   label="largest payload keeping the margins: %.3g %s" % (result["max_payload_kg"] / scale, unit))
    elif result.get("max_payload_kg_payload_margins") is not None:
        # every payload breaks a full-command current margin; the text still gives the largest
        # payload on the margins a payload affects: the plot marks that one (trial 8, item 9)
        ax.axvline(result["max_payload_kg_payload_margins"] / scale, color="tab:olive", ls="--", lw=1,
                   label="largest payload on the margins a payload affects: %.3g %s (%s broken at every "
                         "payload)" % (result["max_payload_kg_payload_margins"] / scale, unit,
                                       ", ".join(result.get("broken_at_every_payload") or [])))
    if result["job_min"] is not None:
        ax.axhline(result["job_min"], color="grey", ls=":", lw=1, label="job %.0f min" % result["job_min"])
    ax.set_xlabel("payload [%s]" % unit)
    ax.set_ylabel("hover endurance [min]")
    ax2 = ax.twinx()
    # the command margin is judged near an empty pack (margins.hover_command): draw that command
    # against the limit, the nominal-pack command thinner beside it
    for key, style, label in (("hover_command_empty", "-", "hover command near empty pack (the margin's)"),
                              ("hover_command", ":", "hover command, nominal pack")):
        cx = [r["payload_kg"] / scale for r in rows if r[key] is not None]
        cy = [r[key] for r in rows if r[key] is not None]
        if cx:
            ax2.plot(cx, cy, style, color="tab:orange", lw=1.5 if style == "-" else 1, alpha=0.8, label=label)
    ax2.axhline(HOVER_COMMAND_LIMIT, color="tab:orange", ls="--", lw=0.8, alpha=0.6,
                label="command limit %.1f (common practice)" % HOVER_COMMAND_LIMIT)
    ax2.set_ylabel("hover command [-] (orange)")
    ax.set_title("%s: endurance and hover command against payload" % name, fontsize=10)
    ax.grid(True, alpha=0.3)
    handles, labels = ax.get_legend_handles_labels()
    more, more_labels = ax2.get_legend_handles_labels()
    fig.tight_layout(rect=(0.0, 0.26, 1.0, 1.0))
    _legend_below(fig, ax, (handles + more, labels + more_labels), ncol=1).set_bbox_to_anchor(
        (ax.get_position().x0, 0.25), transform=fig.transFigure)
    fig.text(0.01, 0.01, SHORT, fontsize=7, color="grey")
    save_figure(fig, path)
    plt.close(fig)
