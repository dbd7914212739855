"""The diagram as a figure: C-curves, noses, reference lines and a footer.

Reads a computed Diagram; computes no physics.  The style is meant to survive a grey-scale
printer: each fraction has its own line pattern and each product its own marker, so colour
is a help, never the only cue.
"""

from __future__ import annotations

import matplotlib

matplotlib.use("Agg")
import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402

from .constants import kelvin_to_celsius  # noqa: E402
from .diagram import PRACTICAL_HORIZON_S, Diagram  # noqa: E402
from .export import atomic_path  # noqa: E402

CAUTION = (
    "Estimate only: confirm by dilatometry or trial heat treatment before production; "
    "follow the applicable specifications and local codes."
)
#: Dark, well-separated hues whose grey levels also differ.
PRODUCT_COLOURS = ("#17324d", "#a8431a", "#2e6b3c", "#5b3a7a", "#7a6a12")
PRODUCT_MARKERS = ("D", "o", "s", "^", "v")
FRACTION_STYLES = {0.01: (0, (5, 2.5)), 0.5: "-", 0.99: (0, (1.2, 1.6))}
OTHER_FRACTION_STYLE = (0, (6, 2, 1.2, 2))
LINE_STYLE = {"color": "#555555", "linewidth": 0.8, "linestyle": (0, (8, 3))}
TIME_MARKS_S = {"1 min": 60.0, "1 h": 3600.0, "1 day": 86400.0, "1 week": 604800.0}


def _format_time(t_s):
    if t_s < 1e-3:
        return f"{t_s:.2g} s"
    if t_s < 100:
        return f"{t_s:.3g} s"
    if t_s < 5400:
        return f"{t_s / 60:.3g} min"
    if t_s < 172800:
        return f"{t_s / 3600:.3g} h"
    return f"{t_s / 86400:.3g} d"


def draw_diagram(diagram: Diagram, alloy, footer_extra=""):
    """Build the figure; returns the matplotlib Figure."""
    fig, ax = plt.subplots(figsize=(8.6, 6.4), layout="constrained")
    t_c = kelvin_to_celsius(diagram.temperatures_K)
    shown_times = []
    for i, product in enumerate(diagram.products):
        colour = PRODUCT_COLOURS[i % len(PRODUCT_COLOURS)]
        marker = PRODUCT_MARKERS[i % len(PRODUCT_MARKERS)]
        ok = diagram.practical(product.name)
        for k, x in enumerate(diagram.fractions):
            if not ok[k].any():
                continue
            times = np.where(ok[k], diagram.times_s[product.name][k], np.nan)
            shown_times.append(times[ok[k]])
            style = FRACTION_STYLES.get(round(float(x), 6), OTHER_FRACTION_STYLE)
            ax.plot(times, t_c, color=colour, linestyle=style, linewidth=1.6, label=f"{product.name} {x * 100:g} %")
        _mark_noses(ax, [n for n in diagram.noses if n.product == product.name], colour, marker,
                    0.035 * (t_c[-1] - t_c[0]))
    if not shown_times:
        ax.text(0.5, 0.5, "no product forms within the practical horizon in this range",
                transform=ax.transAxes, ha="center")
        lo, hi = 1e-1, 1e3
    else:
        every = np.concatenate(shown_times)
        lo, hi = every.min() / 200.0, min(every.max() * 4.0, PRACTICAL_HORIZON_S)
    ax.set_xscale("log")
    ax.set_xlim(lo, hi)
    ax.set_ylim(t_c[0] - 0.03 * (t_c[-1] - t_c[0]), max(t_c[-1], *_line_c(alloy)) + 0.06 * (t_c[-1] - t_c[0]))
    for t_s in TIME_MARKS_S.values():
        if lo < t_s < hi:
            ax.axvline(t_s, color="#c8c8c8", linewidth=0.7, zorder=0)
    marks = {k: v for k, v in TIME_MARKS_S.items() if lo < v < hi}
    top = ax.secondary_xaxis("top")
    top.set_xticks(list(marks.values()), list(marks.keys()), fontsize=8, color="#555555")
    top.tick_params(which="minor", top=False)
    x_text = lo * 1.15
    for name, t_k in alloy.lines_K.items():
        y = float(kelvin_to_celsius(t_k))
        ax.axhline(y, **LINE_STYLE, zorder=1)
        ax.text(x_text, y, f"{name} {y:.0f} °C", va="bottom", ha="left", fontsize=7.5, color="#333333")
    ax.set_xlabel("hold time, s (log scale)")
    ax.set_ylabel("hold temperature, °C")
    ax.set_title(f"Isothermal transformation: {alloy.name}", fontsize=11, loc="left")
    ax.grid(True, which="major", color="#e4e4e4", linewidth=0.6)
    ax.legend(loc="upper right", fontsize=7.5, frameon=True, framealpha=0.92, ncols=1 if len(diagram.products) < 2 else 2)
    footer = " · ".join(s for s in (alloy.footer, footer_extra) if s)
    fig.text(0.01, 0.005, f"{footer}\n{CAUTION} isokin estimate.", fontsize=6.8, color="#444444",
             ha="left", va="bottom")
    fig.get_layout_engine().set(rect=(0, 0.05, 1, 0.95))
    return fig


def _mark_noses(ax, noses, colour, marker, spacing_C):
    """Mark each nose; the labels stack in the empty region left of the earliest curve."""
    shown = [n for n in noses if n.inside and n.time_s <= PRACTICAL_HORIZON_S]
    if not shown:
        return
    x_label = min(n.time_s for n in shown) / 1.8
    middle = (len(shown) - 1) / 2.0
    for k, nose in enumerate(shown):
        ax.plot(nose.time_s, nose.temperature_C, marker=marker, color=colour, markersize=6.5,
                markerfacecolor="white", markeredgewidth=1.4, zorder=5)
        ax.annotate(
            f"{nose.fraction * 100:g} % nose {nose.temperature_C:.0f} °C, {_format_time(nose.time_s)}",
            (nose.time_s, nose.temperature_C), xytext=(x_label, nose.temperature_C + (middle - k) * spacing_C),
            fontsize=7.5, color=colour, ha="right", va="center",
            bbox={"boxstyle": "square,pad=0.15", "facecolor": "white", "edgecolor": "none", "alpha": 0.85},
            arrowprops={"arrowstyle": "-", "color": colour, "linewidth": 0.6, "shrinkA": 0, "shrinkB": 4},
        )


def _line_c(alloy):
    return [float(kelvin_to_celsius(t)) for t in alloy.lines_K.values()] or [-np.inf]


def save_figure(fig, target):
    """Write the figure atomically; the format follows the extension (png, svg, pdf)."""
    with atomic_path(target) as tmp:
        fig.savefig(tmp, dpi=150, format=str(target).rsplit(".", 1)[-1])
    plt.close(fig)
