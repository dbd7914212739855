"""Continuous cooling as figures: the CCT diagram, and cooling paths over the isothermal diagram.

Reads computed results; computes no physics; never switches the matplotlib backend.
"""

from __future__ import annotations


import matplotlib.pyplot as plt
import numpy as np
from matplotlib.lines import Line2D

from ..constants import celsius_to_fahrenheit, kelvin_to_celsius
from ..results import OVERALL, CCTResult, CoolingResult
from .labels import finish, movable
from .ttt import LINE_STYLE, OVERALL_COLOUR, PRODUCT_COLOURS, literal, log_time_axis, plot_ttt, to_units

PATH_COLOUR = "#6a3d9a"
COOLING_STYLE = {"color": "#b5b5b5", "linewidth": 0.7, "zorder": 1}


def _times(t):
    """Times for a log axis: the first point of a path (t = 0) is left out."""
    return np.where(t > 0, t, np.nan)


#: Columns of the log-time axis a long path is thinned to: more than a figure's pixels across.
DRAWN_COLUMNS = 2000


def _drawn(t, T):
    """A path's times (for a log axis, see :func:`_times`) and temperatures as drawn: all points of
    a short path; of a long one (a log of many rows), per column of the log-time axis its first
    and last point and its lowest and highest temperature, which is all a figure can show."""
    x = _times(t)
    if t.size <= 4 * DRAWN_COLUMNS or not np.isfinite(x).any():
        return x, T
    log_t = np.log10(np.where(np.isfinite(x), x, np.nanmin(x)))
    span = max(float(log_t[-1] - log_t[0]), 1e-12)
    column = np.minimum(((log_t - log_t[0]) / span * DRAWN_COLUMNS).astype(int), DRAWN_COLUMNS - 1)
    edges = np.flatnonzero(np.diff(column)) + 1
    by_temperature = np.lexsort((T, column))
    firsts = np.concatenate([[0], edges])
    lasts = np.concatenate([edges - 1, [t.size - 1]])
    keep = np.unique(np.concatenate([firsts, lasts, by_temperature[firsts], by_temperature[lasts]]))
    return x[keep], T[keep]


def plot_cct(result: CCTResult, ax=None, units="C"):
    """Draw the CCT diagram: cooling curves faintly, each product's start and finish, the start
    and finish of all products together in bold, the critical lines, and the hardness at the
    end of each cooling curve.

    Returns
    -------
    matplotlib Axes
    """
    if units not in ("C", "F"):
        raise ValueError("units must be 'C' or 'F'")
    if ax is None:
        _, ax = plt.subplots(figsize=(8.6, 6.4), layout="constrained")
    cooling = result.cooling
    T_plot = to_units(kelvin_to_celsius(cooling.temperature_K), units)
    for k in range(T_plot.shape[0]):
        ax.plot(*_drawn(cooling.time_s[k], T_plot[k]), **COOLING_STYLE)
    handles = []
    for i, (name, edges) in enumerate(result.curves.items()):
        bold = name == OVERALL
        colour = OVERALL_COLOUR if bold else PRODUCT_COLOURS[i % len(PRODUCT_COLOURS)]
        drawn = False
        for edge, style in (("start", "-"), ("finish", (0, (5, 2.5)))):
            times, temps = edges[edge]
            if np.isfinite(times).sum() < 1:
                continue
            ax.plot(times, to_units(kelvin_to_celsius(temps), units), color=colour, linestyle=style,
                    linewidth=2.6 if bold else 1.5, zorder=3)
            drawn = True
        if drawn:
            handles.append(Line2D([], [], color=colour, linewidth=2.6 if bold else 1.8,
                                  label="all products together" if bold else literal(name)))
    handles += [Line2D([], [], color="#333333", linestyle="-", label="start (1 % of the part)"),
                Line2D([], [], color="#333333", linestyle=(0, (5, 2.5)), label="finish (99 % of its final share)"),
                Line2D([], [], label="constant cooling rates", **COOLING_STYLE)]
    log_time_axis(ax)
    finite = cooling.time_s[cooling.time_s > 0]
    ax.set_xlim(max(finite.min(), 1e-2), finite.max() * 1.5)
    lines = {name: float(to_units(kelvin_to_celsius(t), units)) for name, t in result.critical_K.items()}
    for name, y in lines.items():
        ax.axhline(y, **LINE_STYLE, zorder=1)
        movable(ax.text(0.995, y, f"{literal(name)} {y:.0f} °{units}", transform=ax.get_yaxis_transform(),
                        va="bottom", ha="right", fontsize=7.5, color="#333333"))
    low = float(np.nanmin(T_plot))
    top = max(float(np.nanmax(T_plot)), *lines.values()) if lines else float(np.nanmax(T_plot))
    ax.set_ylim(low - 0.10 * (top - low), top + 0.05 * (top - low))
    hardness = cooling.hardness_HV
    for k, rate in enumerate(result.rates_K_s):
        if k % 2 == (result.rates_K_s.size - 1) % 2:  # every other curve, the fastest always
            text = (f"{hardness[k]:.0f} HV\n" if hardness is not None and np.isfinite(hardness[k]) else "") \
                + f"{rate:g} K/s"
            ax.text(cooling.time_s[k, -1], low - 0.012 * (top - low), text, ha="center", va="top", fontsize=6.5,
                    color="#333333", linespacing=1.1)
    handles.append(Line2D([], [], color="none", label=("hardness and rate" if hardness is not None else "rate")
                          + " below every other curve"))
    ax.set_xlabel(f"time since {result.start_C:.0f} °C, s (log scale)" if units == "C"
                  else f"time since {celsius_to_fahrenheit(result.start_C):.0f} °F, s (log scale)")
    ax.set_ylabel(f"temperature, °{units}")
    ax.set_title(f"Continuous cooling: {literal(result.alloy)}", fontsize=11, loc="left")
    ax.grid(True, which="major", color="#e4e4e4", linewidth=0.6)
    ax.legend(handles=handles, loc="lower left", bbox_to_anchor=(0.0, 0.11), fontsize=7.5, framealpha=0.92)
    return ax


def plot_cooling(result: CoolingResult, ttt=None, cct=None, ax=None, units="C"):
    """Cooling paths over the isothermal diagram (and the CCT start curves), with where each
    product starts along each path.

    Returns
    -------
    matplotlib Axes
    """
    if ax is None:
        _, ax = plt.subplots(figsize=(8.6, 6.4), layout="constrained")
    if ttt is not None:
        plot_ttt(ttt, ax, units)
    if cct is not None:
        for i, (name, edges) in enumerate(cct.curves.items()):
            times, temps = edges["start"]
            colour = OVERALL_COLOUR if name == OVERALL else PRODUCT_COLOURS[i % len(PRODUCT_COLOURS)]
            ax.plot(times, to_units(kelvin_to_celsius(temps), units), color=colour, linewidth=1.0,
                    linestyle=(0, (1, 1.5)), zorder=3)
    T_plot = to_units(kelvin_to_celsius(result.temperature_K), units)
    for k, label in enumerate(result.labels):
        ax.plot(*_drawn(result.time_s[k], T_plot[k]), color=PATH_COLOUR, linewidth=2.2, zorder=6)
        for name in result.start_time_s:
            t, T = result.start_time_s[name][k], result.start_temperature_K[name][k]
            if np.isfinite(t) and t > 0:
                y = float(to_units(kelvin_to_celsius(T), units))
                ax.plot(t, y, marker="o", color=PATH_COLOUR, markerfacecolor="white", zorder=7)
                movable(ax.annotate(f"{literal(name)} starts", (t, y), xytext=(6, 4), textcoords="offset points",
                                    fontsize=7, color=PATH_COLOUR))
    ax.set_title(f"Cooling path: {literal(result.alloy)}", fontsize=11, loc="left")
    starts = np.unique(np.round(to_units(kelvin_to_celsius(result.temperature_K[:, 0]), units), 1))
    zero = f"time since {starts[0]:.0f} °{units}" if starts.size == 1 else "time since each path's start"
    if ttt is None and cct is None:
        log_time_axis(ax)
        ax.set_xlabel(f"{zero}, s (log scale)")
    else:
        ax.set_xlabel(f"{zero}, s (log scale)" + ("; the CCT curves from the same start" if cct is not None else "")
                      + "; the isothermal curves as hold times")
    ax.set_ylabel(f"temperature, °{units}")
    legend = ax.get_legend()
    extra = [Line2D([], [], color=PATH_COLOUR, linewidth=2.2,
                    label="cooling path" if len(result.labels) == 1 else f"cooling paths ({len(result.labels)})")]
    if cct is not None:
        extra.append(Line2D([], [], color="#333333", linewidth=1.0, linestyle=(0, (1, 1.5)),
                            label="CCT start (1 %) at constant rates"))
    ax.legend(handles=[*(legend.legend_handles if legend is not None else []), *extra], fontsize=7.5,
              loc="best", framealpha=0.92, ncols=1 if legend is None or len(legend.legend_handles) < 7 else 2)
    return ax


def report_figure(draw, result, footer, **kwargs):
    """A whole figure: ``draw(result, ax, ...)`` and a footer with the cautions."""
    fig, ax = plt.subplots(figsize=(8.6, 6.4), layout="constrained")
    draw(result, ax=ax, **kwargs)
    return finish(fig, footer or "")
