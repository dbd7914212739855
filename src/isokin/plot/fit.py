"""A calibration as a figure: measured points over the fitted curves with their band, and the residuals."""

from __future__ import annotations

import matplotlib.pyplot as plt
import numpy as np

from ..constants import kelvin_to_celsius
from ..results import PRACTICAL_HORIZON_S
from .labels import finish
from .ttt import OVERALL_COLOUR, fraction_styles, literal, log_time_axis, to_units


#: Measured fractions are drawn as their own curves up to this many distinct values (start and
#: finish times); fraction curves (many values) get the diagrams' 1, 50 and 99 %.
MAX_MEASURED_FRACTIONS = 4


def shown_fractions(measured):
    """The fractions whose fitted curves the figure draws: the measured ones where there are
    few (start and finish times), else 1, 50 and 99 % as on the diagrams.

    >>> shown_fractions([0.05, 0.5, 0.05, 0.5])
    (0.05, 0.5)
    """
    distinct = sorted({round(float(x), 6) for x in measured})
    return tuple(distinct) if len(distinct) <= MAX_MEASURED_FRACTIONS else (0.01, 0.5, 0.99)


def fit_figure(result, curves, fractions=(0.01, 0.5, 0.99), units="C"):
    """``curves`` = (T_K, times, lo, hi) of :func:`isokin.compute.fit.band` at ``fractions``, drawn
    in the diagrams' line patterns, with the measured points over them."""
    # times beyond the practical horizon are left out, as in every figure
    T, centre, lo, hi = (curves[0], *(np.where(np.asarray(c) <= PRACTICAL_HORIZON_S, c, np.nan) for c in curves[1:]))
    def to(t_c):
        return to_units(t_c, units)

    fig, (ax, res) = plt.subplots(1, 2, figsize=(10.5, 5.8), layout="constrained", width_ratios=(3, 1.3))
    y = to(kelvin_to_celsius(T))
    for k, (x, style) in enumerate(zip(fractions, fraction_styles(fractions))):
        ok = np.isfinite(centre[k])
        ax.plot(np.where(ok, centre[k], np.nan), y, color=OVERALL_COLOUR, linestyle=style, linewidth=1.8,
                label=f"fitted, {x * 100:g} %")
        band = np.isfinite(lo[k]) & np.isfinite(hi[k])
        if band.any():
            ax.fill_betweenx(y, np.where(band, lo[k], np.nan), np.where(band, hi[k], np.nan), color="#7fa7c9",
                             alpha=0.35, linewidth=0)
    d = result.data
    points = ax.scatter(d.time_s, to(kelvin_to_celsius(d.temperature_K)), c=d.fraction, cmap="viridis", vmin=0,
                        vmax=1, s=18, edgecolors="black", linewidths=0.4, zorder=5, label="measured")
    fig.colorbar(points, ax=ax, label="measured fraction", shrink=0.8)
    log_time_axis(ax)
    ax.set_xlabel("hold time, s (log scale)")
    ax.set_ylabel(f"hold temperature, °{units}")
    ax.set_title(f"Calibration: {literal(result.alloy.name)}", fontsize=11, loc="left")
    ax.grid(True, color="#e4e4e4", linewidth=0.6)
    ax.legend(fontsize=7.5, loc="upper right")
    res.axvline(0.0, color="#777777", linewidth=0.8)
    res.scatter(result.residuals_ln_t, to(kelvin_to_celsius(d.temperature_K)), s=14, color="#a8431a")
    res.set_xlabel("ln(model / measured time)")
    res.set_title(f"residuals, rms {result.rms_ln_t:.3f}", fontsize=9, loc="left")
    res.grid(True, color="#e4e4e4", linewidth=0.6)
    return finish(fig, "band: 95 % of 100 parameter sets from the fit's covariance.")
