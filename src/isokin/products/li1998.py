"""Ferrite, pearlite and bainite kinetics of Li, Niebuhr, Meekisho and Atteridge (1998).

The model gives the isothermal time to reach a fraction X of each product as

    tau(X, T) = F(composition) / (2**(a G) * dT**n * exp(-Q / (R T))) * S(X)

with dT the undercooling below the product's upper critical temperature (Ae3 for ferrite,
Ae1 for pearlite, Bs for bainite), G the ASTM austenite grain size number and S(X) the
reaction term of :mod:`isokin.relations.li_reaction`. The coefficients are data
(:class:`LiCoefficients`), so an alloy file can override any of them and a calibration can
vary them:

=========  =====================================================================  ===  ==========  ======
product    ln F (composition in mass %)                                           n    Q (cal/mol) a
=========  =====================================================================  ===  ==========  ======
ferrite    1.00 + 6.31 C + 1.78 Mn + 0.31 Si + 1.12 Ni + 2.70 Cr + 4.06 Mo        3    23 500 (?)  0.41
pearlite   -4.25 + 4.12 C + 4.36 Mn + 0.44 Si + 1.71 Ni + 3.33 Cr + 5.19 sqrt(Mo) 3    27 500      0.32
bainite    -10.23 + 10.18 C + 0.85 Mn + 0.55 Ni + 0.90 Cr + 0.36 Mo               2    27 500      0.29
=========  =====================================================================  ===  ==========  ======

All coefficients are from memory: the search tool reached the paper's title page and
abstract but not the pages with its equations, nor another publication quoting them.

The ferrite activation energy is in doubt. Two recollections disagree: 23 500 cal/mol,
Kirkaldy's original ferrite value, kept here as the default, and 27 500 cal/mol for all
three products, as the form most often quoted is remembered. Neither could be checked
against the paper. An alloy file switches with one line::

    [steel.kinetics.ferrite]
    activation_energy_cal_mol = 27500

Reference: M. V. Li, D. V. Niebuhr, L. L. Meekisho and D. G. Atteridge, "A computational
model for the prediction of steel hardenability", Metall. Mater. Trans. B 29 (1998)
661-672.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass, field
from types import MappingProxyType

import numpy as np

from ..constants import CALORIE_J, GAS_CONSTANT_J_MOL_K
from ..relations.composition import Composition
from ..relations.li_reaction import reaction_integral, reaction_integral_inverse, reaction_rate_shape
from .base import as_query, batch_leading, plain

LI1998_REFERENCE = (
    "M. V. Li, D. V. Niebuhr, L. L. Meekisho and D. G. Atteridge, "
    "Metall. Mater. Trans. B 29 (1998) 661-672"
)
LI1998_MODEL = "Li et al. (1998), Metall. Mater. Trans. B 29, 661-672"
_S_COMPLETE = reaction_integral(1.0)

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

#: A term of ln F is an element symbol (linear in mass %) or ``sqrt_`` and a symbol.
SQRT_PREFIX = "sqrt_"


@dataclass(frozen=True)
class LiCoefficients:
    """The kinetic coefficients of one Li et al. (1998) product.

    Attributes
    ----------
    constant : float
        The constant of ln F.
    terms : mapping of str to float
        Coefficient of each composition term of ln F, per mass %: an element symbol
        (``"C"``) or the square root of one (``"sqrt_Mo"``).
    undercooling_exponent : float
        n of dT**n.
    activation_energy_J_mol : float
        Q of exp(-Q / RT), J/mol (the paper gives cal/mol; see :meth:`from_cal_mol`).
    grain_size_coefficient : float
        a of 2**(a G), G the ASTM grain size number.

    Any value may be an array: it broadcasts into the product's batch, so a calibration
    can vary a coefficient across parameter sets.

    Examples
    --------
    >>> LI1998_KINETICS["ferrite"].replace(activation_energy_J_mol=27500 * 4.184).activation_energy_cal_mol
    27500.0
    """

    constant: float
    terms: dict = field(default_factory=dict)
    undercooling_exponent: float = 3.0
    activation_energy_J_mol: float = 27500.0 * CALORIE_J
    grain_size_coefficient: float = 0.3

    def __post_init__(self):
        object.__setattr__(self, "terms", MappingProxyType(dict(self.terms)))

    @property
    def activation_energy_cal_mol(self):
        return plain(np.asarray(self.activation_energy_J_mol) / CALORIE_J)

    def replace(self, **changes) -> LiCoefficients:
        """A copy with some values changed; ``terms`` given are merged into the existing ones."""
        if "terms" in changes:
            changes["terms"] = {**self.terms, **changes["terms"]}
        return dataclasses.replace(self, **changes)

    def log_composition_factor(self, composition: Composition):
        """ln F for the composition (its batch shape, broadcast with array coefficients)."""
        total = np.asarray(self.constant, dtype=float)
        for term, coefficient in self.terms.items():
            symbol = term.removeprefix(SQRT_PREFIX)
            content = getattr(composition, symbol)
            total = total + np.asarray(coefficient) * (np.sqrt(content) if term != symbol else content)
        return total

    def as_dict(self) -> dict:
        """Plain numbers (or lists for a batch) for the JSON summary."""
        def out(v):
            v = np.asarray(v, dtype=float)
            return float(v) if v.ndim == 0 else v.tolist()

        return {
            "constant": out(self.constant),
            "terms": {k: out(v) for k, v in self.terms.items()},
            "undercooling_exponent": out(self.undercooling_exponent),
            "activation_energy_cal_mol": out(self.activation_energy_cal_mol),
            "grain_size_coefficient": out(self.grain_size_coefficient),
        }


#: Li et al. (1998) as recalled (see the module docstring for the doubt on ferrite's Q).
LI1998_KINETICS = MappingProxyType({
    "ferrite": LiCoefficients(
        constant=1.00, terms={"C": 6.31, "Mn": 1.78, "Si": 0.31, "Ni": 1.12, "Cr": 2.70, "Mo": 4.06},
        undercooling_exponent=3.0, activation_energy_J_mol=23500.0 * CALORIE_J, grain_size_coefficient=0.41,
    ),
    "pearlite": LiCoefficients(
        constant=-4.25, terms={"C": 4.12, "Mn": 4.36, "Si": 0.44, "Ni": 1.71, "Cr": 3.33, "sqrt_Mo": 5.19},
        undercooling_exponent=3.0, activation_energy_J_mol=27500.0 * CALORIE_J, grain_size_coefficient=0.32,
    ),
    "bainite": LiCoefficients(
        constant=-10.23, terms={"C": 10.18, "Mn": 0.85, "Ni": 0.55, "Cr": 0.90, "Mo": 0.36},
        undercooling_exponent=2.0, activation_energy_J_mol=27500.0 * CALORIE_J, grain_size_coefficient=0.29,
    ),
})
#: What the JSON summary says of the coefficients' provenance.
LI1998_PROVENANCE = (
    "Li et al. (1998) coefficients recalled from memory, not checked against the paper; the ferrite "
    "activation energy is in doubt (23 500 cal/mol, Kirkaldy's ferrite value, is the default; 27 500 cal/mol "
    "is the other recollection: set [steel.kinetics.ferrite] activation_energy_cal_mol to switch)"
)


class Li1998Product:
    """One product of the Li et al. (1998) model.

    Parameters
    ----------
    name : str
        "ferrite", "pearlite" or "bainite".
    coefficients : LiCoefficients
        Its kinetics (:data:`LI1998_KINETICS` holds the published ones).
    composition : Composition
        One steel or a batch (mass %).
    grain_size_astm : float or array_like
        ASTM E112 austenite grain size number G (dimensionless; larger is finer).
    upper_K : float or array_like
        Temperature (K) at and above which the product cannot form: Ae3 for ferrite, Ae1
        for pearlite, Bs for bainite. The undercooling is measured from it. A value at or
        below ``lower_K`` means the product cannot form at all.
    lower_K : float or array_like
        Temperature (K) below which the product is not formed (Ms for all three).
    equilibrium : callable, optional
        ``equilibrium(T_K)``: the share of austenite the product reaches at completion
        (the lever rule, for proeutectoid ferrite); None where it takes all the austenite.

    Everything broadcasts into one batch shape. The activation energy is divided by R in
    J/(mol K); against Li's R = 1.987 cal/(mol K) this moves times by less than 0.2 %.

    Examples
    --------
    >>> from isokin.relations.composition import Composition
    >>> steel = Composition.from_dict({"C": 0.2, "Mn": 0.8})
    >>> ferrite = Li1998Product("ferrite", LI1998_KINETICS["ferrite"], steel, 7.0, 1100.0, 700.0)
    >>> float(ferrite.time_to_fraction(1150.0, 0.5)), float(ferrite.rate(650.0, 0.5))
    (inf, 0.0)
    >>> t = ferrite.time_to_fraction(950.0, [0.01, 0.5, 0.99])
    >>> bool(0 < t[0] < t[1] < t[2] < float("inf"))
    True
    """

    model = LI1998_MODEL
    separable = True
    calibrated_ranges = LI1998_RANGES_MASS_PERCENT

    def __init__(self, name, coefficients: LiCoefficients, composition: Composition, grain_size_astm, upper_K,
                 lower_K, equilibrium=None):
        self.name = name
        self.equilibrium = equilibrium
        self.coefficients = coefficients
        grain = np.asarray(grain_size_astm, dtype=float)
        upper = np.asarray(upper_K, dtype=float)
        lower = np.asarray(lower_K, dtype=float)
        for label, value in (("grain_size_astm", grain), ("upper_K", upper), ("lower_K", lower)):
            if not np.all(np.isfinite(value)):
                raise ValueError(f"{label} of {name} must be finite")
        if np.any(lower < 0.0):
            raise ValueError(f"lower_K of {name} must not be negative (it is in kelvin)")
        c = coefficients
        # ln of F / 2**(aG): everything that does not depend on T or X, kept as a log so
        # that strongly alloyed steels cannot overflow before the temperature terms enter.
        log_prefactor = c.log_composition_factor(composition) - np.asarray(c.grain_size_coefficient) * grain * np.log(2.0)
        values = {"upper": upper, "lower": lower, "log_prefactor": log_prefactor,
                  "n": np.asarray(c.undercooling_exponent, dtype=float),
                  "Q": np.asarray(c.activation_energy_J_mol, dtype=float)}
        self._batch_shape = np.broadcast_shapes(*(v.shape for v in values.values()))
        self._values = {k: np.broadcast_to(v, self._batch_shape) for k, v in values.items()}

    @property
    def batch_shape(self):
        return self._batch_shape

    @property
    def upper_K(self):
        """Upper critical temperature (K) of the undercooling; float or batch array."""
        return plain(self._values["upper"])

    @property
    def lower_K(self):
        """Lowest temperature (K) at which the product forms (Ms); float or batch array."""
        return plain(self._values["lower"])

    def _log_time_factor(self, T, ndim):
        """ln F(T) in ln(s), and where the product can form, with the batch leading."""
        v = {k: batch_leading(a, len(self._batch_shape), ndim) for k, a in self._values.items()}
        forms = (T >= v["lower"]) & (T < v["upper"])
        # Outside the window the values are discarded by the callers (nan or inf there is
        # never read), so they are computed without masks: fewer passes over large batches.
        with np.errstate(divide="ignore", invalid="ignore"):
            log_factor = v["log_prefactor"] - v["n"] * np.log(v["upper"] - T) + v["Q"] / (GAS_CONSTANT_J_MOL_K * T)
        return log_factor, forms

    def time_factor(self, T_K):
        """F(T) = F / (2**(aG) dT**n exp(-Q/RT)), s; ``inf`` where the product cannot form."""
        T, q = as_query(T_K)
        log_factor, forms = self._log_time_factor(T, q)
        with np.errstate(over="ignore"):
            return np.where(forms, np.exp(log_factor), np.inf)

    def incubation_s(self, T_K):
        """None in Li's model: its S(X) starts at X = 0 (0 everywhere)."""
        T, q = as_query(T_K)
        return np.zeros(np.broadcast_shapes(T.shape, self._batch_shape + (1,) * max(q - len(self._batch_shape), 0)))

    def reaction_term(self, X):
        """S(X) of :func:`~isokin.relations.li_reaction.reaction_integral`."""
        return reaction_integral(X)

    def reaction_term_inverse(self, S):
        return reaction_integral_inverse(S)

    def time_to_fraction(self, T_K, X):
        """Seconds of isothermal hold at T_K to reach fraction X of this product.

        ``inf`` where the product cannot form (T >= upper_K or T < lower_K). X = 0 gives 0
        inside the window; X must lie in [0, 1]. Batch axes lead (see
        :mod:`isokin.products.base`).
        """
        T, X, q = as_query(T_K, X)
        log_factor, forms = self._log_time_factor(T, q)
        with np.errstate(over="ignore"):
            factor = np.where(forms, np.exp(log_factor), np.inf)  # on the temperatures' shape only
        S = np.asarray(reaction_integral(X))
        if np.all(S > 0.0):
            return factor * S
        # X = 0: no time where the product forms, never where it does not
        return np.where(S > 0.0, factor * np.where(S > 0.0, S, 1.0), np.where(forms, 0.0, np.inf))

    def equilibrium_fraction(self, T_K):
        """Share of the austenite the product reaches at completion: the lever rule where one
        was given (proeutectoid ferrite), else all of it."""
        if self.equilibrium is None:
            T, q = as_query(T_K)
            return np.ones(np.broadcast_shapes(T.shape, self._batch_shape + (1,) * max(q - len(self._batch_shape), 0)))
        return self.equilibrium(T_K)

    def fraction_after(self, T_K, t_s):
        """Fraction of its own completion after t_s seconds at T_K: S^-1(t / F(T)), 1 once
        S(1) F(T) has passed (the model completes in finite time); 0 where it cannot form."""
        T, t, q = as_query(T_K, t_s)
        log_factor, forms = self._log_time_factor(T, q)
        with np.errstate(over="ignore", under="ignore", invalid="ignore"):
            S = np.maximum(t, 0.0) * np.exp(-log_factor)
        # inf * 0 only for an infinite hold: complete
        S = np.where(forms & (t > 0.0), np.where(np.isnan(S), _S_COMPLETE, S), 0.0)
        return reaction_integral_inverse(np.minimum(S, _S_COMPLETE))

    def rate(self, T_K, X):
        """dX/dt in 1/s at temperature T_K and fraction X.

        The rate form of the model, dX/dt = X**(0.4(1-X)) (1-X)**(0.4X) / F(T): the
        derivative of X(t) along the isothermal curve t = F(T) S(X). It is 0 where the
        product cannot form, and 0 at X = 0 and X = 1 (and outside [0, 1]). Because it is
        0 at X = 0, an integration along a cooling path must start from the incubation
        found by additivity, not from X = 0.
        """
        T, X, q = as_query(T_K, X)
        log_factor, forms = self._log_time_factor(T, q)
        with np.errstate(under="ignore"):
            r = reaction_rate_shape(X) * np.exp(-log_factor)
        return np.where(forms, r, 0.0)
