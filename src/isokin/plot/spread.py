"""Spread and comparison as figures: bands around the nominal curves, the worst case, several alloys."""

from __future__ import annotations

import matplotlib.pyplot as plt
import numpy as np
from matplotlib.lines import Line2D
from matplotlib.patches import Patch

from ..constants import kelvin_to_celsius
from .labels import movable
from .ttt import PRODUCT_COLOURS, literal, log_time_axis, plot_ttt, to_units


#: The earliest start over the range: a colour and pattern of its own, not a product's.
WORST_STYLE = {"color": "#c2187a", "linewidth": 2.4, "linestyle": (0, (7, 2, 1.5, 2)), "zorder": 6}
BAND_COLOUR = "#5a7fa6"


def plot_spread(result, ax=None, units="C"):
    """The nominal diagram with the 5-95 % band of the curves of the whole decomposition (of
    the one product where there is only one), the earliest start over the range (the worst
    case) in its own colour, and the range of Ms as a band."""
    if ax is None:
        _, ax = plt.subplots(figsize=(8.6, 6.4), layout="constrained")
    plot_ttt(result.nominal, ax, units)
    y = to_units(result.nominal.temperatures_C, units)
    whole = result.nominal.overall or next(iter(result.quantiles_s))
    q = np.where(np.isfinite(result.quantiles_s[whole]), result.quantiles_s[whole], np.nan)
    for k in range(q.shape[1]):
        ax.fill_betweenx(y, q[0, k], q[-1, k], color=BAND_COLOUR, alpha=0.22, linewidth=0, zorder=1)
    earliest = np.where(np.isfinite(result.earliest_start_s), result.earliest_start_s, np.nan)
    ax.plot(earliest, y, **WORST_STYLE)
    lo, hi = (float(to_units(kelvin_to_celsius(t), units)) for t in result.ms_range_K)
    ax.axhspan(lo, hi, color="#999999", alpha=0.2, zorder=0, linewidth=0)
    movable(ax.text(0.005, hi, f" Ms {lo:.0f}-{hi:.0f} °{units} over the range", transform=ax.get_yaxis_transform(),
                    va="bottom", ha="left", fontsize=7.5, color="#444444"))
    ax.set_title(f"Spread over the composition range ({result.samples} heats): {literal(result.alloy)}",
                 fontsize=10.5, loc="left")
    legend = ax.get_legend()
    band = "all products" if result.nominal.overall else literal(whole)
    extra = [Patch(color=BAND_COLOUR, alpha=0.35, label=f"{band}: 5-95 % of the heats"),
             Line2D([], [], label="earliest start (1 %) over the range", **WORST_STYLE)]
    ax.legend(handles=[*(legend.legend_handles if legend is not None else []), *extra], fontsize=7.5,
              loc="lower left", framealpha=0.92)
    return ax


STYLES = ("-", (0, (6, 2)), (0, (2, 1.5)), (0, (8, 2, 2, 2)), (0, (1, 1)), (0, (10, 3, 2, 3, 2, 3)))


def plot_compare(results, ax=None, units="C"):
    """The start curve (1 %, of the whole decomposition where there is one) of several alloys,
    each in its own line pattern and colour, with their Ms lines."""
    if ax is None:
        _, ax = plt.subplots(figsize=(8.6, 6.4), layout="constrained")
    for i, result in enumerate(results):
        colour = PRODUCT_COLOURS[i % len(PRODUCT_COLOURS)]
        style = STYLES[i % len(STYLES)]
        name = result.overall or result.products[0]
        t = np.where(result.practical(name)[0], result.times_s[name][0], np.nan)
        y = to_units(result.temperatures_C, units)
        label = literal(result.alloy)
        if "Ms" in result.critical_K:
            # Ms goes into the legend: close Ms lines of similar heats would overwrite their labels
            ms = float(to_units(kelvin_to_celsius(result.critical_K["Ms"]), units))
            ax.axhline(ms, color=colour, linestyle=style, linewidth=0.9, alpha=0.8)
            label += f" (Ms {ms:.0f} °{units}, thin line)"
        ax.plot(t, y, color=colour, linestyle=style, linewidth=2.0, label=label)
    log_time_axis(ax)
    ax.set_xlabel("hold time, s (log scale)")
    ax.set_ylabel(f"hold temperature, °{units}")
    ax.set_title("Transformation start (1 %) compared", fontsize=11, loc="left")
    ax.grid(True, color="#e4e4e4", linewidth=0.6)
    ax.legend(fontsize=7.5, loc="best")
    return ax
