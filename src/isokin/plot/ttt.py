"""The isothermal diagram as a figure: C-curves, noses, reference lines and a footer.

Reads a computed TTTResult; computes no physics and never switches the matplotlib backend
(the command line picks a non-interactive one itself; a notebook keeps its own). The style
is meant to survive a grey-scale printer: each fraction has its own line pattern and each
product its own marker, so colour is a help, never the only cue.
"""

from __future__ import annotations

import textwrap

import matplotlib.pyplot as plt
import numpy as np
from matplotlib.lines import Line2D
from matplotlib.ticker import FuncFormatter

from ..constants import celsius_to_fahrenheit, kelvin_to_celsius
from ..readout import format_duration
from ..results import PRACTICAL_HORIZON_S, TTTResult
from .labels import finish, literal, movable

#: Dark, well-separated hues whose grey levels also differ.
PRODUCT_COLOURS = ("#17324d", "#a8431a", "#2e6b3c", "#5b3a7a", "#7a6a12", "#0f6b73", "#7a2e4d", "#4d4d4d")
PRODUCT_MARKERS = ("D", "o", "s", "^", "v", "P", "X", "h")
FRACTION_STYLES = {0.01: (0, (5, 2.5)), 0.5: "-", 0.99: (0, (1.2, 1.6))}
#: Patterns for further fractions, in order: each extra fraction has one of its own.
OTHER_FRACTION_STYLES = ((0, (6, 2, 1.2, 2)), (0, (10, 2)), (0, (3, 1.5, 1, 1.5, 1, 1.5)), (0, (8, 2, 2, 2)),
                         (0, (2, 3)), (0, (12, 2, 1, 2)), (0, (4, 4)), (0, (1, 1)), (0, (7, 1.5, 1.5, 1.5, 1.5, 1.5)))
#: Points drawn per curve at most (the grid's own points are thinned to this).
MAX_DRAWN_POINTS = 800
LINE_STYLE = {"color": "#555555", "linewidth": 0.8, "linestyle": (0, (8, 3))}
TIME_MARKS_S = {"1 min": 60.0, "1 h": 3600.0, "1 day": 86400.0, "1 week": 604800.0}


_SUPERSCRIPTS = str.maketrans("-0123456789", "⁻⁰¹²³⁴⁵⁶⁷⁸⁹")


def _power_of_ten(value, _position=None):
    """A log-axis tick as plain text: 1, 10, 10², 10⁻¹ (Unicode superscripts, not the maths
    renderer, which costs a parser on every figure)."""
    exponent = int(np.round(np.log10(value))) if value > 0 else 0
    return {0: "1", 1: "10"}.get(exponent, f"10{str(exponent).translate(_SUPERSCRIPTS)}")


def log_time_axis(ax):
    """A logarithmic time axis (x) with plain-text powers of ten."""
    ax.set_xscale("log")
    ax.xaxis.set_major_formatter(FuncFormatter(_power_of_ten))


def to_units(t_c, units="C"):
    """Temperatures in °C as the figure's units: "C" or "F"."""
    return celsius_to_fahrenheit(np.asarray(t_c)) if units == "F" else np.asarray(t_c)


def plot_ttt(result: TTTResult, ax=None, units="C"):
    """Draw the C-curves, their noses, the regions and the critical lines of one alloy into ``ax``.

    Where the alloy has several products, the curves of the decomposition as a whole
    (``total``: the start at 1 %, and 50 %, 99 % of what can transform) are drawn boldly and
    the products' own curves lighter beneath them.

    Parameters
    ----------
    result : TTTResult
        Of a single alloy; for a batch, pass ``result.member(i)``.
    ax : matplotlib Axes, optional
        Where to draw; a new figure's Axes when not given.
    units : {"C", "F"}
        Temperature axis in degrees Celsius or Fahrenheit.

    Returns
    -------
    matplotlib Axes
    """
    if result.batch_shape:
        raise ValueError("plot_ttt draws one alloy; pass result.member(i) for a member of a batch")
    if units not in ("C", "F"):
        raise ValueError("units must be 'C' or 'F'")
    if ax is None:
        _, ax = plt.subplots(figsize=(8.6, 6.4), layout="constrained")
    t_c = to_units(result.temperatures_C, units)
    # a line needs no more points than the figure has pixels: drawing (and the legend's search
    # for room) slows with every point of a fine grid; the noses are marked at their own values
    step = max(1, -(-t_c.size // MAX_DRAWN_POINTS))
    drawn = np.unique(np.r_[np.arange(0, t_c.size, step), t_c.size - 1])
    styles = fraction_styles(result.fractions)
    shown_times, shown_products, shown_fractions = [], {}, {}
    for i, name in enumerate(result.products):
        colour = _colour(result, i)
        bold = name == result.overall
        light = result.overall is not None and not bold
        ok = result.practical(name)
        for k, x in enumerate(result.fractions):
            if not ok[k].any():
                continue
            times = np.where(ok[k], result.times_s[name][k], np.nan)
            shown_times.append(times[ok[k]])
            ax.plot(times[drawn], t_c[drawn], color=colour, linestyle=styles[k], linewidth=2.8 if bold else 1.3,
                    alpha=0.55 if light else 1.0, zorder=4 if bold else 3)
            shown_products[name] = colour
            shown_fractions[k] = styles[k]
    if not shown_times:
        ax.text(0.5, 0.5, "no product forms within the practical horizon in this range",
                transform=ax.transAxes, ha="center")
        lo, hi = 1e-1, 1e3
    else:
        every = np.concatenate(shown_times)
        lo, hi = every.min() / 400.0, min(every.max() * 4.0, PRACTICAL_HORIZON_S)
    log_time_axis(ax)
    ax.set_xlim(lo, hi)
    lines = {name: float(to_units(kelvin_to_celsius(t), units)) for name, t in result.critical_K.items()}
    bottom, top_c = min(t_c[0], *lines.values()), max(t_c[-1], *lines.values())
    ax.set_ylim(bottom - 0.03 * (top_c - bottom), top_c + 0.06 * (top_c - bottom))
    if shown_times:
        _mark_noses(ax, result, every.min() / 1.8, 0.026 * (t_c[-1] - t_c[0]), units)
        _label_regions(ax, result, units, (lo, hi))
    for t_s in TIME_MARKS_S.values():
        if lo < t_s < hi:
            ax.axvline(t_s, color="#c8c8c8", linewidth=0.7, zorder=0)
    marks = {k: v for k, v in TIME_MARKS_S.items() if lo < v < hi}
    top = ax.secondary_xaxis("top")
    top.set_xticks(list(marks.values()), list(marks.keys()), fontsize=8, color="#555555")
    top.tick_params(which="minor", top=False)
    for name, y in lines.items():
        ax.axhline(y, **LINE_STYLE, zorder=1)
        movable(ax.text(0.995, y, f"{literal(name)} {y:.0f} °{units}", transform=ax.get_yaxis_transform(),
                        va="bottom", ha="right", fontsize=7.5, color="#333333"))
    ax.set_xlabel("hold time, s (log scale)")
    ax.set_ylabel(f"hold temperature, °{units}")
    ax.set_title(f"Isothermal transformation: {literal(result.alloy)}", fontsize=11, loc="left")
    ax.grid(True, which="major", color="#e4e4e4", linewidth=0.6)
    # One entry per product (its colour) and one per fraction (its line pattern), not one per
    # curve: the key stays short however many curves there are.
    handles = [Line2D([], [], color=c, linewidth=2.8 if n == result.overall else 2.0,
                      label="all products together" if n == result.overall else literal(n))
               for n, c in shown_products.items()]
    handles += [Line2D([], [], color="#333333", linestyle=styles[k], linewidth=1.4,
                       label=f"{result.fractions[k] * 100:g} % transformed") for k in sorted(shown_fractions)]
    if result.overall is not None:
        handles.append(Line2D([], [], color="none", label="(all products: % of what can form at T)"))
    if handles:
        ax.legend(handles=handles, loc="best", fontsize=7.5, frameon=True, framealpha=0.92,
                  ncols=1 if len(handles) < 8 else 2)
    return ax


#: Noses of one product closer than this share of the temperature span share a label.
SHARED_NOSE_SHARE = 0.02
#: The decomposition as a whole is drawn in near-black.
OVERALL_COLOUR = "#111111"
REGION_STYLE = {"fontsize": 9, "fontstyle": "italic", "color": "#4a4a4a", "va": "center", "zorder": 2}
#: A region label keeps this share of the temperature range clear of the critical lines.
REGION_ROOM = 0.025
#: The parent's label sits this share of the way from the start nose to the top of the
#: grid, and region words stand this factor clear of the curve they follow (in time).
PARENT_HEIGHT = 0.55
REGION_GAP = 1.6


def _colour(result: TTTResult, index):
    name = result.products[index]
    return OVERALL_COLOUR if name == result.overall else PRODUCT_COLOURS[index % len(PRODUCT_COLOURS)]


def region_labels(result: TTTResult):
    """Where to write the phase regions of a single alloy's diagram: a tuple of (text,
    temperature K, time s or None, alignment). The parent left of the start curve above its
    nose (the text ends there: "right"); what the parent has become right of the finish curve
    (``result.regions``; the text starts there: "left"), each text once and clear of the
    critical lines; the athermal product below Ms (time None: mid-axis, "center")."""
    grid = result.temperatures_K
    labels = []
    whole = result.overall
    if whole is not None:
        start, nose = result.times_s[whole][0], result.noses[whole]
        ok = np.isfinite(start)
        if ok.sum() >= 2 and bool(nose.inside[0]):
            T_nose = float(nose.temperature_K[0])
            T_parent = T_nose + PARENT_HEIGHT * (grid[-1] - T_nose)
            t_start = np.exp(np.interp(T_parent, grid[ok], np.log(start[ok])))
            labels.append((result.parent, T_parent, t_start / REGION_GAP, "right"))
    lines = [float(v) for v in result.critical_K.values() if np.isfinite(v)]
    room = REGION_ROOM * (grid[-1] - grid[0])
    seen = set()
    for T, t_end, phases in result.regions:
        text = " + ".join(phases)
        if text not in seen and all(abs(T - line) >= room for line in lines):
            seen.add(text)
            labels.append((text, T, REGION_GAP * t_end, "left"))
    if result.athermal is not None and "Ms" in result.critical_K:
        ms = float(result.critical_K["Ms"])
        if grid[0] < ms:
            labels.append((result.athermal, 0.5 * (ms + max(grid[0], float(result.critical_K.get("M90", grid[0])))),
                           None, "center"))
    return tuple(labels)


def _label_regions(ax, result: TTTResult, units, x_range):
    """The phase regions in words, where the computed curves put them."""
    lo, hi = x_range
    for text, T_K, t_s, align in region_labels(result):
        y = float(to_units(kelvin_to_celsius(T_K), units))
        if t_s is None:
            movable(ax.text(0.5, y, literal(text), transform=ax.get_yaxis_transform(), ha=align, **REGION_STYLE))
        elif lo < t_s < hi:
            movable(ax.text(t_s, y, literal(text), ha=align, **REGION_STYLE))


def fraction_styles(fractions):
    """A line pattern per fraction: the standard ones for 1, 50, 99 %, then one each for the rest."""
    extra = iter(OTHER_FRACTION_STYLES * 2)
    return [FRACTION_STYLES.get(round(float(x), 6)) or next(extra) for x in fractions]


def ttt_figure(result: TTTResult, footer_extra="", units="C", plan=None):
    """A whole figure for a report: the diagram (with a plan's window, if given) and a footer
    with the model and the cautions."""
    fig, ax = plt.subplots(figsize=(8.6, 6.4), layout="constrained")
    if plan is None:
        plot_ttt(result, ax, units)
    else:
        plot_plan(plan, result, ax, units)
    footer = " · ".join(s for s in (result.footer, footer_extra) if s)
    if result.warnings:
        footer += (f"\n{len(result.warnings)} warning(s) for this input, such as a composition outside a model's "
                   "calibrated range: see the summary JSON.")
    return finish(fig, footer)


def _nose_labels(result: TTTResult, units):
    """One label per product nose: (product index, temperature, text, [(fraction, T, t s)]), T in the units.

    A product's noses share one label where their temperatures lie within
    :data:`SHARED_NOSE_SHARE` of the diagram's temperature span of each other.
    """
    span = float(np.ptp(to_units(result.temperatures_C, units)))
    labels = []
    for i, product in enumerate(result.products):
        n = result.noses[product]
        name = "all products" if product == result.overall else literal(product)
        keep = n.inside & n.forms
        if result.overall is not None and product != result.overall:
            # where the whole decomposition has the same nose, its label says it once
            total = result.noses[result.overall]
            same = (np.abs(total.temperature_K - n.temperature_K) < 1.0) & (np.abs(total.time_s / n.time_s - 1) < 0.05)
            keep = keep & ~(same & total.inside & total.forms)
        noses = [(float(x), float(T), float(t)) for x, T, t in
                 zip(result.fractions[keep], to_units(n.temperature_C[keep], units), n.time_s[keep])]
        if not noses:
            continue
        temps = [T for _, T, _ in noses]
        if max(temps) - min(temps) < SHARED_NOSE_SHARE * span:  # the fractions share about one nose temperature
            # with many fractions the label names the standard three (and the markers show all)
            listed = [n for n in noses if round(n[0], 6) in FRACTION_STYLES] if len(noses) > 4 else noses
            times = "\n".join(f"{x * 100:g} %: {format_duration(t)}" for x, _, t in listed or noses)
            labels.append((i, float(np.mean(temps)), f"{name} nose {np.mean(temps):.0f} °{units}\n{times}", noses))
        else:
            labels += [(i, T, f"{name} {x * 100:g} % nose\n{T:.0f} °{units}, {format_duration(t)}", [(x, T, t)])
                       for x, T, t in noses]
        if product == result.overall:
            second = _second_start_nose(result, units, span)
            if second is not None:
                x, T, t = second
                labels.append((i, T, f"{name} {x * 100:g} % nose\n{T:.0f} °{units}, {format_duration(t)}", [second]))
    return labels


#: A second nose of the whole decomposition's start curve stands at least this share of the
#: temperature span from its first (the upper nose of ferrite and pearlite, the bainite nose).
SECOND_NOSE_SHARE = 0.05


def _second_start_nose(result: TTTResult, units, span):
    """The other nose of the start curve of all products together, where it has two (a bay
    between the upper and the bainite C-curves): (fraction, T in the units, t s) at the grid
    point of the earliest other local minimum of the time, or None."""
    k = int(np.argmin(result.fractions))
    t = np.where(result.practical(result.overall)[k], result.times_s[result.overall][k], np.nan)
    T = to_units(result.temperatures_C, units)
    nose = result.noses[result.overall]
    if not (nose.inside[k] and nose.forms[k]):
        return None
    first = float(to_units(nose.temperature_C[k], units))
    inner = np.arange(1, t.size - 1)
    with np.errstate(invalid="ignore"):
        minima = inner[(t[inner] <= t[inner - 1]) & (t[inner] <= t[inner + 1])]
    minima = [i for i in minima if abs(T[i] - first) > SECOND_NOSE_SHARE * span]
    if not minima:
        return None
    i = min(minima, key=lambda j: t[j])
    return float(result.fractions[k]), float(T[i]), float(t[i])


def _spread(positions, gap):
    """Move sorted label positions apart to at least ``gap``, keeping their mean."""
    order = np.argsort(positions)
    y = np.asarray(positions, dtype=float)[order]
    for _ in range(50):
        moved = False
        for k in range(1, y.size):
            overlap = gap - (y[k] - y[k - 1])
            if overlap > 1e-9:
                y[k - 1] -= overlap / 2
                y[k] += overlap / 2
                moved = True
        if not moved:
            break
    out = np.empty_like(y)
    out[order] = y
    return out


def _mark_noses(ax, result: TTTResult, x_label, line_C, units):
    """Mark every nose; labels stack in the empty region left of the earliest curve."""
    labels = _nose_labels(result, units)
    if not labels:
        return
    heights = [line_C * (lab[2].count("\n") + 1.4) for lab in labels]
    ys = _spread([lab[1] for lab in labels], max(heights))
    for (i, _, text, noses), y in zip(labels, ys):
        colour = _colour(result, i)
        marker = "*" if result.products[i] == result.overall else PRODUCT_MARKERS[i % len(PRODUCT_MARKERS)]
        for _, T, t in noses:
            ax.plot(t, T, marker=marker, color=colour, markersize=6.5,
                    markerfacecolor="white", markeredgewidth=1.4, zorder=5)
        _, T, t = min(noses, key=lambda n: n[2])
        movable(ax.annotate(
            text, (t, T), xytext=(x_label, y), fontsize=7, color=colour, linespacing=1.15,
            ha="right", va="center", zorder=7,  # above every curve, so that the text stays legible
            bbox={"boxstyle": "square,pad=0.15", "facecolor": "white", "edgecolor": "none", "alpha": 0.85},
            arrowprops={"arrowstyle": "-", "color": colour, "linewidth": 0.6, "shrinkA": 0, "shrinkB": 4},
        ))


def plot_plan(plan, result: TTTResult, ax=None, units="C"):
    """The isothermal diagram with the plan's window shaded and the recommendation marked."""
    ax = plot_ttt(result, ax, units)
    if plan.window_C is not None:
        lo, hi = (float(to_units(t, units)) for t in plan.window_C)
        ax.axhspan(lo, hi, color="#9fd4a6", alpha=0.35, zorder=0, linewidth=0)
        movable(ax.text(0.99, lo, f"{plan.route} window {lo:.0f}-{hi:.0f} °{units} ",
                        transform=ax.get_yaxis_transform(), va="bottom", ha="right", fontsize=8, color="#1d5b28"))
    if plan.recommendation is not None:
        y = float(to_units(plan.recommendation["temperature_C"], units))
        t = plan.recommendation["hold_time_s"]
        ax.plot(t, y, marker="P", markersize=11, color="#1d5b28", markeredgecolor="white", zorder=8)
        movable(ax.annotate(f"recommended {y:.0f} °{units}, hold {format_duration(t)}", (t, y), xytext=(8, -14),
                            textcoords="offset points", fontsize=8, color="#1d5b28", zorder=8))
    heats = plan.options.get("worst_case_heats")
    kind = plan.route + (f", worst case over {heats} heats" if heats else "")
    if plan.window_C is None and plan.no_window:
        note = "\n".join(textwrap.wrap(f"No window: {plan.no_window}", 56))
        # lower right, below the curves' finish and right of the martensite label, is where a
        # diagram is emptiest
        movable(ax.text(0.98, 0.3, literal(note), transform=ax.transAxes, ha="right", va="center", fontsize=8,
                        color="#8a1c1c", zorder=9, bbox={"boxstyle": "round,pad=0.4", "facecolor": "white",
                                                         "edgecolor": "#8a1c1c", "alpha": 0.92}))
    ax.set_title(f"Plan ({kind}): {literal(result.alloy)}", fontsize=11, loc="left")
    return ax
