"""The one interface every transformation product meets.

A product is anything that can tell, at each temperature, how long an isothermal hold takes
to reach a transformed fraction, and how fast it transforms at a given fraction.  The
classical nucleation-growth model and the empirical steel models both implement it, so the
diagram solver, plotting and export never ask which one they hold.
"""

from __future__ import annotations

from typing import Protocol, runtime_checkable

import numpy as np


@runtime_checkable
class Product(Protocol):
    """A transformation product (ferrite, pearlite, bainite, precipitate, solid, ...).

    Attributes
    ----------
    name : str
        Trade name of the product.
    model : str
        Short name of the model and its source, shown in figure footers and the JSON summary.
    upper_K : float or ndarray
        The product cannot form at or above this temperature (equilibrium or start
        temperature). An array when the product holds a batch of parameter sets.
    lower_K : float or ndarray
        The product is not formed below this temperature (for example Ms); 0 when unbounded.
    """

    name: str
    model: str

    @property
    def upper_K(self) -> float | np.ndarray: ...

    @property
    def lower_K(self) -> float | np.ndarray: ...

    def time_to_fraction(self, T_K, X) -> np.ndarray:
        """Seconds of isothermal hold at T_K to reach fraction X (0 < X < 1).

        Broadcasts T_K against X (and against the product's parameter batch) with numpy's
        rules; ``inf`` where the product cannot form.
        """
        ...

    def rate(self, X, T_K) -> np.ndarray:
        """dX/dt in 1/s at fraction X and temperature T_K (broadcasting); 0 where it cannot form."""
        ...
