"""The isothermal diagram: times to each fraction over a temperature grid, and the noses."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd
from scipy.optimize import minimize_scalar

from .constants import kelvin_to_celsius
from .product import Product

DEFAULT_FRACTIONS = (0.01, 0.5, 0.99)
DEFAULT_POINTS = 200
#: Times beyond this (about 32 years) are reported as "does not form in practice": they are
#: left out of the curves, the figure and the exports rather than shown as huge numbers.
PRACTICAL_HORIZON_S = 1.0e9
#: How close to the upper temperature the default grid ends, K: the times diverge there.
UPPER_MARGIN_K = 0.5
#: The nose temperature is refined to this, K.
NOSE_TOLERANCE_K = 1.0e-3


@dataclass(frozen=True)
class Nose:
    """The shortest time to one fraction of one product over the grid's range.

    ``inside`` is False when the minimum lies on a bound of the grid, that is the curve's
    true nose is outside the range asked for.
    """

    product: str
    fraction: float
    temperature_K: float
    time_s: float
    inside: bool

    @property
    def temperature_C(self):
        return float(kelvin_to_celsius(self.temperature_K))


@dataclass(frozen=True)
class Diagram:
    """Times t(X, T) for every product, as arrays of shape (fractions, temperatures).

    ``times_s[name]`` holds ``inf`` where the product cannot form at that temperature.
    """

    temperatures_K: np.ndarray
    fractions: np.ndarray
    products: tuple
    times_s: dict
    noses: tuple

    def practical(self, name):
        """Mask of the points where the product forms within the practical horizon."""
        t = self.times_s[name]
        return np.isfinite(t) & (t <= PRACTICAL_HORIZON_S)

    def curves(self) -> pd.DataFrame:
        """Tidy table: product, fraction, temperature_C, time_s; practical times only."""
        frames = []
        t_c = kelvin_to_celsius(self.temperatures_K)
        for product in self.products:
            t = self.times_s[product.name]
            f_idx, t_idx = np.nonzero(self.practical(product.name))
            frames.append(
                pd.DataFrame(
                    {
                        "product": product.name,
                        "fraction": self.fractions[f_idx],
                        "temperature_C": t_c[t_idx],
                        "time_s": t[f_idx, t_idx],
                    }
                )
            )
        return pd.concat(frames, ignore_index=True)

    def forming_range_C(self, name, fraction_index):
        """(lowest, highest) grid temperature in °C where the curve exists, or None."""
        ok = self.practical(name)[fraction_index]
        if not ok.any():
            return None
        t_c = kelvin_to_celsius(self.temperatures_K[ok])
        return float(t_c.min()), float(t_c.max())


def default_fractions(extra=()):
    """The default 1 %, 50 %, 99 % plus any the user adds, sorted and unique."""
    return np.unique(np.concatenate([DEFAULT_FRACTIONS, np.asarray(extra, dtype=float)]))


def temperature_grid(tmin_K, tmax_K, points=DEFAULT_POINTS):
    """Evenly spaced hold temperatures from tmin_K to tmax_K inclusive, K."""
    if not tmin_K < tmax_K:
        raise ValueError(f"the lower temperature ({tmin_K:.2f} K) must lie below the upper ({tmax_K:.2f} K)")
    if points < 3:
        raise ValueError("the grid needs at least 3 temperatures")
    return np.linspace(tmin_K, tmax_K, int(points))


def _refine_nose(product, fraction, grid, row):
    finite = np.isfinite(row)
    if not finite.any():
        return None
    i = int(np.argmin(np.where(finite, row, np.inf)))
    if i == 0 or i == grid.size - 1 or not (finite[i - 1] and finite[i + 1]):
        return Nose(product.name, float(fraction), float(grid[i]), float(row[i]), False)

    def log_time(T):
        return float(np.log(product.time_to_fraction(T, fraction)))

    res = minimize_scalar(
        log_time, bounds=(grid[i - 1], grid[i + 1]), method="bounded", options={"xatol": NOSE_TOLERANCE_K}
    )
    T, t = (float(res.x), float(np.exp(res.fun))) if res.fun < np.log(row[i]) else (float(grid[i]), float(row[i]))
    return Nose(product.name, float(fraction), T, t, True)


def compute_diagram(products: list[Product], temperatures_K, fractions=DEFAULT_FRACTIONS) -> Diagram:
    """Times to each fraction for each product on the grid, and each curve's nose.

    Parameters
    ----------
    products : list of Product
        The products to draw; each must hold a single parameter set.
    temperatures_K : array_like
        Hold temperatures, K, ascending.
    fractions : array_like
        Transformed fractions, each in (0, 1).
    """
    grid = np.asarray(temperatures_K, dtype=float)
    fr = np.asarray(fractions, dtype=float)
    if np.any((fr <= 0) | (fr >= 1)):
        raise ValueError("fractions must lie strictly between 0 and 1")
    times, noses = {}, []
    for product in products:
        t = np.broadcast_to(product.time_to_fraction(grid[None, :], fr[:, None]), (fr.size, grid.size)).copy()
        t[~(t > 0)] = np.inf  # guards against a model returning 0 or NaN where nothing forms
        times[product.name] = t
        for k, x in enumerate(fr):
            nose = _refine_nose(product, x, grid, t[k])
            if nose is not None:
                noses.append(nose)
    return Diagram(grid, fr, tuple(products), times, tuple(noses))
