"""Tempering as a figure: hardness against tempering temperature for each tempering time, the
measured curve's points, the embrittlement range, and a plan's target and recommendation."""

from __future__ import annotations

import matplotlib.pyplot as plt
import numpy as np

from ..relations.hardness import E140_HRC, E140_HV
from .labels import finish
from .ttt import literal, to_units

#: One colour per tempering time, dark to light (the first is the plan's or the first asked).
TIME_COLOURS = ("#1f4e79", "#b5651d", "#4b7f52", "#7a4f9a", "#8c8c8c")
EMBRITTLEMENT_FILL = "#d9d9d9"
TARGET_FILL = "#f3d9a4"


def tempering_figure(lines, points, title, units="C", target_HV=None, marks=None, embrittlement_C=None, footer=""):
    """A whole figure for a report.

    Parameters
    ----------
    lines : list of (label, temperature_C, hardness_HV)
        Hardness after each tempering time against the tempering temperature.
    points : (temperature_C, hardness_HV, label)
        The measured tempers the lines are read from.
    target_HV : (low, high), optional
        The hardness range a plan aims at, shaded.
    marks : (label, [(temperature_C, hardness_HV), ...]), optional
        Tempers to mark: a plan's recommendation, or the tempers found for a target.
    embrittlement_C : (low, high), optional
        The tempered-martensite embrittlement range, shaded.
    """
    fig, ax = plt.subplots(figsize=(8.6, 6.0), layout="constrained")
    if embrittlement_C is not None:
        lo, hi = (to_units(v, units) for v in embrittlement_C)
        ax.axvspan(lo, hi, color=EMBRITTLEMENT_FILL, alpha=0.6, linewidth=0, label="embrittlement range")
    if target_HV is not None:
        ax.axhspan(target_HV[0], target_HV[1], color=TARGET_FILL, alpha=0.7, linewidth=0,
                   label=f"target {target_HV[0]:.0f}-{target_HV[1]:.0f} HV")
    for k, (label, T_C, hv) in enumerate(lines):
        ax.plot(to_units(np.asarray(T_C), units), hv, color=TIME_COLOURS[k % len(TIME_COLOURS)], linewidth=1.8,
                label=label)
    T_pts, hv_pts, pts_label = points
    ax.scatter(to_units(np.asarray(T_pts), units), hv_pts, s=26, color="white", edgecolors="black", linewidths=0.9,
               zorder=5, label=pts_label)
    if marks is not None and marks[1]:
        label, where = marks
        T_mark, hv_mark = np.array(where, dtype=float).T
        T_mark = to_units(T_mark, units)
        ax.scatter(T_mark, hv_mark, marker="D", s=46, color="#a8431a", zorder=6,
                   label=f"{label}: " + ", ".join(f"{v:.0f} °{units}" for v in T_mark))
    ax.set_xlabel(f"tempering temperature, °{units}")
    ax.set_ylabel("hardness after tempering, HV")
    hrc = ax.secondary_yaxis("right", functions=(lambda hv: np.interp(hv, E140_HV, E140_HRC),
                                                 lambda r: np.interp(r, E140_HRC, E140_HV)))
    hrc.set_ylabel("HRC (ASTM E140)")
    ax.set_title(literal(title), fontsize=11, loc="left")
    ax.grid(True, color="#e4e4e4", linewidth=0.6)
    ax.legend(fontsize=7.5, loc="upper right", framealpha=0.9)
    return finish(fig, footer)
