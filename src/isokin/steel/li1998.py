"""Ferrite, pearlite and bainite kinetics of Li, Niebuhr, Meekisho and Atteridge (1998).

The model gives the isothermal time to reach a fraction X of each product as

    tau(X, T) = F(composition, G) / (2**(a G) * dT**n * exp(-Q / (R T))) * S(X)

with dT the undercooling below the product's upper critical temperature (Ae3 for ferrite,
Ae1 for pearlite, Bs for bainite), G the ASTM austenite grain size number and S(X) the
reaction term of :mod:`isokin.steel.reaction_integral`:

=========  =====================================================================  ===  ==========  ======
product    F (composition in mass %)                                              n    Q (cal/mol) a
=========  =====================================================================  ===  ==========  ======
ferrite    exp(1.00 + 6.31 C + 1.78 Mn + 0.31 Si + 1.12 Ni + 2.70 Cr + 4.06 Mo)   3    23 500      0.41
pearlite   exp(-4.25 + 4.12 C + 4.36 Mn + 0.44 Si + 1.71 Ni + 3.33 Cr + 5.19 √Mo) 3    27 500      0.32
bainite    exp(-10.23 + 10.18 C + 0.85 Mn + 0.55 Ni + 0.90 Cr + 0.36 Mo)          2    27 500      0.29
=========  =====================================================================  ===  ==========  ======

All coefficients in this table are from memory: the search tool found the paper itself
(title page and abstract) but not the pages with its equations, nor another publication
quoting them. The tests pin each coefficient, so a correction is a one-line change here
and a failing test names it.

Reference: M. V. Li, D. V. Niebuhr, L. L. Meekisho and D. G. Atteridge, "A computational
model for the prediction of steel hardenability", Metall. Mater. Trans. B 29 (1998)
661-672.
"""

from __future__ import annotations

from abc import ABC, abstractmethod
from typing import NamedTuple

import numpy as np

from isokin.constants import CALORIE_J, GAS_CONSTANT_J_MOL_K
from isokin.steel.composition import Composition
from isokin.steel.critical import (
    KOISTINEN_MARBURGER_ALPHA_PER_K,
    ae1_andrews_1965,
    ae3_andrews_1965,
    bs_steven_haynes_1956,
    eutectoid_carbon_andrews_1965,
    m50_koistinen_marburger_1959,
    m90_koistinen_marburger_1959,
    ms_andrews_1965_linear,
    ms_steven_haynes_1956,
)
from isokin.steel.reaction_integral import reaction_integral, reaction_rate_shape

LI1998_REFERENCE = (
    "M. V. Li, D. V. Niebuhr, L. L. Meekisho and D. G. Atteridge, "
    "Metall. Mater. Trans. B 29 (1998) 661-672"
)

#: Composition range (mass %) inside which no warning is given. The paper's own stated
#: range could not be confirmed (see the module docstring); this is an assumption: the
#: low-alloy heat-treatable steels of the SAE 10xx-94xx families the model was built for.
LI1998_RANGES_MASS_PERCENT = {
    "C": (0.1, 0.8),
    "Mn": (0.2, 2.0),
    "Si": (0.0, 1.0),
    "Ni": (0.0, 3.5),
    "Cr": (0.0, 1.5),
    "Mo": (0.0, 0.6),
}


class Li1998Product(ABC):
    """One product of the Li et al. (1998) model; use a subclass.

    Parameters
    ----------
    composition : Composition
        One steel or a batch (mass %).
    grain_size_astm : float or array_like
        ASTM E112 austenite grain size number G (dimensionless; larger is finer). Broadcasts
        against the batch.
    upper_K : float or array_like
        Temperature (K) at and above which the product cannot form: Ae3 for ferrite, Ae1
        for pearlite, Bs for bainite. The undercooling is measured from it. Pass a value
        at or below ``lower_K`` where the product cannot form at all (ferrite at or above
        the eutectoid carbon content).
    lower_K : float or array_like
        Temperature (K) below which the product is not formed (Ms for all three).

    Notes
    -----
    Critical temperatures are inputs so that the caller chooses how they are computed;
    :func:`li1998_products` makes the usual choice. The activation energies are converted
    from cal/mol with the thermochemical calorie and divided by R in J/(mol K); against
    Li's R = 1.987 cal/(mol K) this moves times by less than 0.2 %.
    """

    name: str
    model = "Li et al. (1998), Metall. Mater. Trans. B 29, 661-672"
    undercooling_exponent: float
    activation_energy_J_mol: float
    grain_size_coefficient: float
    #: Composition range used for validity warnings (see LI1998_RANGES_MASS_PERCENT).
    calibrated_ranges = LI1998_RANGES_MASS_PERCENT

    def __init__(self, composition: Composition, grain_size_astm, upper_K, lower_K):
        grain = np.asarray(grain_size_astm, dtype=float)
        upper = np.asarray(upper_K, dtype=float)
        lower = np.asarray(lower_K, dtype=float)
        for label, value in (("grain_size_astm", grain), ("upper_K", upper), ("lower_K", lower)):
            if not np.all(np.isfinite(value)):
                raise ValueError(f"{label} of {self.name} must be finite")
        if np.any(lower < 0.0):
            raise ValueError(f"lower_K of {self.name} must not be negative (it is in kelvin)")
        shape = np.broadcast_shapes(composition.shape, grain.shape, upper.shape, lower.shape)
        self._upper = np.broadcast_to(upper, shape)
        self._lower = np.broadcast_to(lower, shape)
        # ln of F / 2**(aG): everything that does not depend on T or X, kept as a log so
        # that strongly alloyed steels cannot overflow before the temperature terms enter.
        self._log_prefactor = np.broadcast_to(
            self._log_composition_factor(composition)
            - self.grain_size_coefficient * grain * np.log(2.0),
            shape,
        )

    @staticmethod
    @abstractmethod
    def _log_composition_factor(c: Composition):
        """ln F of the product for the composition (batch shape)."""

    @property
    def upper_K(self):
        """Upper critical temperature (K) of the undercooling; float or batch array."""
        return float(self._upper) if self._upper.ndim == 0 else self._upper

    @property
    def lower_K(self):
        """Lowest temperature (K) at which the product forms (Ms); float or batch array."""
        return float(self._lower) if self._lower.ndim == 0 else self._lower

    def _log_time_factor(self, T_K):
        """ln F(T) in ln(s) and where the product can form, broadcast over T and the batch."""
        T = np.asarray(T_K, dtype=float)
        forms = (T >= self._lower) & (T < self._upper)
        # Outside the window the values are discarded; placeholders keep log and
        # division free of warnings there.
        undercooling = np.where(forms, self._upper - T, 1.0)
        T_safe = np.where(forms, T, 1.0)
        log_factor = (
            self._log_prefactor
            - self.undercooling_exponent * np.log(undercooling)
            + self.activation_energy_J_mol / (GAS_CONSTANT_J_MOL_K * T_safe)
        )
        return log_factor, forms

    def time_to_fraction(self, T_K, X):
        """Seconds of isothermal hold at T_K to reach fraction X of this product.

        Broadcasts T_K against X and against the batch with numpy's rules; ``inf`` where
        the product cannot form (T >= upper_K or T < lower_K). X = 0 gives 0 inside the
        window; X must lie in [0, 1].
        """
        log_factor, forms = self._log_time_factor(T_K)
        S = reaction_integral(X)
        with np.errstate(over="ignore"):
            t = np.where(S > 0.0, np.exp(log_factor) * S, 0.0)
        return np.where(forms, t, np.inf)

    def rate(self, X, T_K):
        """dX/dt in 1/s at fraction X and temperature T_K (broadcasting).

        The rate form of the model, dX/dt = X**(0.4(1-X)) (1-X)**(0.4X) / F(T): the
        derivative of X(t) along the isothermal curve t = F(T) S(X). It is 0 where the
        product cannot form, and 0 at X = 0 and X = 1 (and outside [0, 1]). Because it is
        0 at X = 0, an integration along a cooling path must start from a small seed
        fraction (or from the incubation found by additivity), not from X = 0.
        """
        log_factor, forms = self._log_time_factor(T_K)
        with np.errstate(under="ignore"):
            r = reaction_rate_shape(X) * np.exp(-log_factor)
        return np.where(forms, r, 0.0)


class Li1998Ferrite(Li1998Product):
    """Proeutectoid ferrite of Li et al. (1998); undercooling below Ae3, n = 3.

    F = exp(1.00 + 6.31 C + 1.78 Mn + 0.31 Si + 1.12 Ni + 2.70 Cr + 4.06 Mo),
    Q = 23 500 cal/mol, grain-size factor 2**(0.41 G) (all from memory).

    Examples
    --------
    >>> from isokin.steel.composition import Composition
    >>> steel = Composition.from_dict({"C": 0.2, "Mn": 0.8})
    >>> ferrite = Li1998Ferrite(steel, 7.0, upper_K=1100.0, lower_K=700.0)
    >>> float(ferrite.time_to_fraction(1150.0, 0.5)), float(ferrite.rate(0.5, 650.0))
    (inf, 0.0)
    >>> t = ferrite.time_to_fraction(950.0, [0.01, 0.5, 0.99])
    >>> bool(0 < t[0] < t[1] < t[2] < float("inf"))
    True
    """

    name = "ferrite"
    undercooling_exponent = 3.0
    activation_energy_J_mol = 23500.0 * CALORIE_J
    grain_size_coefficient = 0.41

    @staticmethod
    def _log_composition_factor(c: Composition):
        return (
            1.00 + 6.31 * c.C + 1.78 * c.Mn + 0.31 * c.Si + 1.12 * c.Ni + 2.70 * c.Cr
            + 4.06 * c.Mo
        )


class Li1998Pearlite(Li1998Product):
    """Pearlite of Li et al. (1998); undercooling below Ae1, n = 3.

    F = exp(-4.25 + 4.12 C + 4.36 Mn + 0.44 Si + 1.71 Ni + 3.33 Cr + 5.19 sqrt(Mo)),
    Q = 27 500 cal/mol, grain-size factor 2**(0.32 G) (all from memory).

    Examples
    --------
    >>> from isokin.steel.composition import Composition
    >>> steel = Composition.from_dict({"C": 0.8, "Mn": 0.76})
    >>> pearlite = Li1998Pearlite(steel, 6.0, upper_K=988.0, lower_K=460.0)
    >>> 0.3 < float(pearlite.time_to_fraction(836.0, 0.01)) < 3.0
    True
    """

    name = "pearlite"
    undercooling_exponent = 3.0
    activation_energy_J_mol = 27500.0 * CALORIE_J
    grain_size_coefficient = 0.32

    @staticmethod
    def _log_composition_factor(c: Composition):
        return (
            -4.25 + 4.12 * c.C + 4.36 * c.Mn + 0.44 * c.Si + 1.71 * c.Ni + 3.33 * c.Cr
            + 5.19 * np.sqrt(c.Mo)
        )


class Li1998Bainite(Li1998Product):
    """Bainite of Li et al. (1998); undercooling below Bs, n = 2.

    F = exp(-10.23 + 10.18 C + 0.85 Mn + 0.55 Ni + 0.90 Cr + 0.36 Mo),
    Q = 27 500 cal/mol, grain-size factor 2**(0.29 G) (all from memory).

    Examples
    --------
    >>> from isokin.steel.composition import Composition
    >>> steel = Composition.from_dict({"C": 0.4, "Mn": 0.8, "Cr": 1.0, "Mo": 0.2})
    >>> bainite = Li1998Bainite(steel, 8.0, upper_K=840.0, lower_K=600.0)
    >>> bool(bainite.time_to_fraction(700.0, 0.5) < bainite.time_to_fraction(700.0, 0.9))
    True
    """

    name = "bainite"
    undercooling_exponent = 2.0
    activation_energy_J_mol = 27500.0 * CALORIE_J
    grain_size_coefficient = 0.29

    @staticmethod
    def _log_composition_factor(c: Composition):
        return -10.23 + 10.18 * c.C + 0.85 * c.Mn + 0.55 * c.Ni + 0.90 * c.Cr + 0.36 * c.Mo


class CriticalTemperature(NamedTuple):
    """A critical temperature and the method that gave it."""

    value_K: float | np.ndarray
    method: str


def _plain(value):
    """A float for a single steel, the array for a batch."""
    value = np.asarray(value)
    return float(value) if value.ndim == 0 else value


#: Ms correlations :func:`li1998_products` accepts, by the name passed as ``ms_method``.
MS_METHODS = {
    "andrews_1965": (ms_andrews_1965_linear, "Andrews (1965), linear"),
    "steven_haynes_1956": (ms_steven_haynes_1956, "Steven & Haynes (1956)"),
}


def li1998_products(composition: Composition, grain_size_astm, ms_method: str = "andrews_1965"):
    """Ferrite, pearlite and bainite of Li et al. (1998) with the usual critical temperatures.

    Ae1 and Ae3 come from Andrews (1965), Bs from Steven & Haynes (1956), Ms from the
    chosen correlation, and M50/M90 from Koistinen-Marburger (1959). Ferrite is given an
    empty window (upper = lower = Ms) wherever carbon is at or above the eutectoid content
    of :func:`~isokin.steel.critical.eutectoid_carbon_andrews_1965`; there the reported
    Ae3 equals Ae1, since Andrews' Ae3 has no meaning past the eutectoid and Acm is not
    modelled.

    Parameters
    ----------
    composition : Composition
        One steel or a batch (mass %).
    grain_size_astm : float or array_like
        ASTM E112 austenite grain size number.
    ms_method : str, optional
        ``"andrews_1965"`` (linear; default) or ``"steven_haynes_1956"``.

    Returns
    -------
    products : list of Li1998Product
        Ferrite, pearlite, bainite, in that order.
    critical : dict of str to CriticalTemperature
        Keys "Ae3", "Ae1", "Bs", "Ms", "M50", "M90"; values in K with the method name.

    Raises
    ------
    ValueError
        For an unknown ``ms_method``.

    Examples
    --------
    >>> from isokin.steel.composition import Composition
    >>> steel = Composition.from_dict({"C": 0.405, "Mn": 0.875, "Si": 0.25, "Cr": 0.95, "Mo": 0.2})
    >>> products, critical = li1998_products(steel, 7.0)
    >>> [p.name for p in products]
    ['ferrite', 'pearlite', 'bainite']
    >>> round(float(critical["Ms"].value_K) - 273.15, 1), critical["Ms"].method
    (328.1, 'Andrews (1965), linear')
    """
    if ms_method not in MS_METHODS:
        raise ValueError(
            f"unknown ms_method '{ms_method}'; choose one of: {', '.join(MS_METHODS)}"
        )
    ms_function, ms_name = MS_METHODS[ms_method]
    ms = ms_function(composition)
    ae1 = ae1_andrews_1965(composition)
    hypoeutectoid = composition.C < eutectoid_carbon_andrews_1965(composition)
    ae3 = np.where(hypoeutectoid, ae3_andrews_1965(composition), ae1)
    bs = bs_steven_haynes_1956(composition)

    products = [
        Li1998Ferrite(composition, grain_size_astm, np.where(hypoeutectoid, ae3, ms), ms),
        Li1998Pearlite(composition, grain_size_astm, ae1, ms),
        Li1998Bainite(composition, grain_size_astm, bs, ms),
    ]
    km = (
        f"Koistinen-Marburger (1959), alpha = {KOISTINEN_MARBURGER_ALPHA_PER_K} /K, "
        f"from Ms of {ms_name}"
    )
    critical = {
        "Ae3": CriticalTemperature(
            _plain(ae3), "Andrews (1965); equals Ae1 at or above eutectoid C"
        ),
        "Ae1": CriticalTemperature(_plain(ae1), "Andrews (1965)"),
        "Bs": CriticalTemperature(_plain(bs), "Steven & Haynes (1956)"),
        "Ms": CriticalTemperature(_plain(ms), ms_name),
        "M50": CriticalTemperature(_plain(m50_koistinen_marburger_1959(ms)), km),
        "M90": CriticalTemperature(_plain(m90_koistinen_marburger_1959(ms)), km),
    }
    return products, critical
