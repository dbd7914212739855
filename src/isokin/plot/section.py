"""Sections and the end-quench test as figures: the hardness profile, the cooling curves of
surface, mid-radius and centre over the CCT diagram, and the Jominy curve with its band.

Reads computed results; computes no physics; never switches the matplotlib backend. Curves
are named in legends, never by text on the lines, so no label can collide.
"""

from __future__ import annotations


import matplotlib.pyplot as plt
import numpy as np

from ..constants import kelvin_to_celsius
from ..relations.hardness import E140_HRC, E140_HV
from .cct import plot_cct
from .labels import finish
from .ttt import literal, to_units

LOCATION_STYLES = {"surface": ("#b2182b", "-"), "mid-radius": ("#ef8a62", (0, (6, 2))), "centre": ("#2166ac", "-")}
BAND_COLOUR = "#9ecae1"


def _hrc_axis(ax):
    """A right-hand axis in HRC (ASTM E140 rows) for a Vickers axis."""
    right = ax.secondary_yaxis("right", functions=(lambda hv: np.interp(hv, E140_HV, E140_HRC),
                                                   lambda hrc: np.interp(hrc, E140_HRC, E140_HV)))
    right.set_ylabel("HRC (ASTM E140; 20 and below read 20)")
    return right


def plot_hardness_profile(result, ax=None, index=0):
    """Hardness and martensite against depth below the surface, for section ``index`` of the batch."""
    if ax is None:
        _, ax = plt.subplots(figsize=(6.0, 4.5), layout="constrained")
    depth_mm = result.depth_m[index] * 1e3
    ax.plot(depth_mm, result.hardness_HV[index], color="#222222", linewidth=2.0, marker="o", markersize=3,
            label="hardness, HV")
    ax.set_xlabel("depth below the surface, mm")
    ax.set_ylabel("hardness, HV")
    ax.set_xlim(0.0, depth_mm.max())
    ax.set_ylim(150.0, max(750.0, float(np.nanmax(result.hardness_HV[index])) + 50.0))
    share = ax.twinx()
    share.plot(depth_mm, result.final["martensite"][index] * 100, color="#7b3294", linestyle=(0, (4, 2)),
               label="martensite, % of the part")
    share.set_ylim(0, 105)
    share.set_ylabel("martensite, %")
    share.spines["right"].set_position(("outward", 52))
    _hrc_axis(ax)
    for level, depth in result.martensite_depth_m.items():
        ax.axvline(depth[index] * 1e3, color="#7b3294", linewidth=0.7, alpha=0.6)
    lines = ax.get_lines()[:1] + share.get_lines()
    ax.legend(lines, [line.get_label() for line in lines], loc="lower left", fontsize=7.5, framealpha=0.9)
    size = result.size_m[index] * 1e3
    depths = ", ".join(f"{level * 100:.0f} % martensite to {d[index] * 1e3:.1f} mm"
                       for level, d in result.martensite_depth_m.items())
    ax.set_title(f"{result.shape} {size:g} mm, {literal(result.surface)}\n{depths}", fontsize=9, loc="left")
    return ax


def plot_section_curves(result, cct, ax=None, units="C", index=0):
    """The surface, mid-radius and centre cooling curves over the CCT diagram."""
    if ax is None:
        _, ax = plt.subplots(figsize=(7.0, 5.0), layout="constrained")
    plot_cct(cct, ax=ax, units=units)
    t = np.where(result.time_s > 0, result.time_s, np.nan)
    extra = []
    for name, values in result.curves_K.items():
        colour, style = LOCATION_STYLES[name]
        (line,) = ax.plot(t, to_units(kelvin_to_celsius(values[index]), units), color=colour, linestyle=style,
                          linewidth=2.4, zorder=8, label=f"{name} of the section")
        extra.append(line)
    handles, _ = ax.get_legend_handles_labels()
    legend = ax.get_legend()
    old = list(legend.legend_handles) if legend is not None else []
    ax.legend(handles=old + extra, loc="lower left", bbox_to_anchor=(0.0, 0.11), fontsize=7, framealpha=0.92)
    ax.set_xlim(right=max(ax.get_xlim()[1], float(np.nanmax(t)) * 1.5))
    ax.set_title(f"Cooling of the section over the CCT diagram: {literal(result.alloy)}", fontsize=10, loc="left")
    return ax


def section_figure(result, cct, footer="", units="C"):
    """The whole figure: the hardness profile beside the cooling curves over the CCT diagram."""
    fig, (left, right) = plt.subplots(1, 2, figsize=(14.0, 6.2), layout="constrained",
                                      gridspec_kw={"width_ratios": [1, 1.35]})
    plot_hardness_profile(result, ax=left)
    plot_section_curves(result, cct, ax=right, units=units)
    return finish(fig, footer, width=170)


def plot_jominy(result, ax=None):
    """The end-quench curve (HRC against the distance from the quenched end), with its band."""
    if ax is None:
        _, ax = plt.subplots(figsize=(7.0, 4.8), layout="constrained")
    d_mm = result.distance_m * 1e3
    inside = d_mm <= 60.0
    hrc = np.interp(result.hardness_HV, E140_HV, E140_HRC)
    if result.band is not None:
        b = result.band
        ax.fill_between(b["distance_m"] * 1e3, b["hrc_min"], b["hrc_max"], color=BAND_COLOUR, alpha=0.6,
                        step=None, label="hardenability band")
        out = b["outside"]
        if out.any():
            ax.plot(b["distance_m"][out] * 1e3, b["predicted_HRC"][out], linestyle="none", marker="x",
                    color="#b2182b", markersize=7, label="predicted, outside the band")
    ax.plot(d_mm[inside], hrc[inside], color="#222222", linewidth=2.0, label="predicted")
    sixteenths_mm = result.sixteenths * 25.4 / 16.0
    ax.plot(sixteenths_mm, np.interp(result.hardness_sixteenths_HV, E140_HV, E140_HRC), linestyle="none",
            marker="o", markersize=3.5, color="#222222")
    half = result.half_martensite_m * 1e3
    ax.axvline(half, color="#7b3294", linewidth=0.8, linestyle=(0, (4, 2)),
               label=f"50 % martensite at {half:.1f} mm")
    ax.set_xlim(0, 55)
    ax.set_ylim(15, 70)
    ax.set_xlabel("distance from the quenched end, mm (points at each 1/16 in)")
    ax.set_ylabel("HRC (ASTM E140; 20 and below read 20)")
    ax.grid(True, color="#e4e4e4", linewidth=0.6)
    ax.legend(loc="upper right", fontsize=8, framealpha=0.92)
    ax.set_title(f"End-quench curve: {literal(result.alloy)}; DI {result.ideal_diameter_in:.2f} in "
                 f"({result.ideal_diameter_in * 25.4:.0f} mm) by Grossmann", fontsize=10, loc="left")
    return ax


def jominy_figure(result, footer=""):
    fig, ax = plt.subplots(figsize=(8.6, 5.6), layout="constrained")
    plot_jominy(result, ax=ax)
    return finish(fig, footer, width=170)
