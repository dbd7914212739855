"""Ferrite, pearlite and bainite of the empirical steel models of Kirkaldy's family.

Kirkaldy & Venugopalan (1984) and Li et al. (1998) give the isothermal time to reach a
fraction X of each product in one form,

    tau(X, T) = factor * F(composition) / (2**(a (G - G0)) * dT**n * D(T)) * S(X),

with dT the undercooling below the product's upper temperature, G the ASTM austenite grain
size number, D(T) an effective diffusivity,

    1 / D(T) = exp(Q / (R T)) + w(composition) * exp(Q_drag / (R T)),

(the second, solute-drag term only in Kirkaldy & Venugopalan's pearlite), and S(X) the
sigmoidal reaction term of :mod:`isokin.relations.reaction_terms`, with exponent p and a
retardation exp(c X**2) whose c may depend on the composition (Kirkaldy & Venugopalan's
bainite). F is exp(constant + sum of terms) in Li's model and constant + sum of terms in
Kirkaldy & Venugopalan's; a term is an element (linear in mass %), ``sqrt_`` and an element,
or the product of two (``Mo*Ni``). ``factor`` is 1 as published; a calibration fits it.

The coefficients are data (:class:`Coefficients`, one per product), so an alloy file can
override any of them and a calibration can vary them; a :class:`KineticsModel` holds one
model's three products, the Bs its bainite is measured from and the text of its provenance.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass, field
from types import MappingProxyType

import numpy as np

from ..constants import CALORIE_J, GAS_CONSTANT_J_MOL_K
from ..relations import reaction_terms
from ..relations.composition import Composition
from .base import answer_shape, as_query, batch_leading, plain, record

#: A term of a composition sum: an element symbol, ``sqrt_`` and a symbol, or ``A*B``.
SQRT_PREFIX = "sqrt_"
PRODUCT_SIGN = "*"


def term_value(term: str, composition: Composition):
    """The value of one term of a composition sum (mass %, or its square root, or a product).

    >>> float(term_value("Mo*Ni", Composition.from_dict({"Mo": 0.25, "Ni": 2.0})))
    0.5
    """
    if PRODUCT_SIGN in term:
        first, second = term.split(PRODUCT_SIGN)
        return getattr(composition, first) * getattr(composition, second)
    if term.startswith(SQRT_PREFIX):
        return np.sqrt(getattr(composition, term.removeprefix(SQRT_PREFIX)))
    return getattr(composition, term)


def term_elements(term: str) -> tuple:
    """The element symbols a term reads.

    >>> term_elements("Mo*Ni"), term_elements("sqrt_Mo")
    (('Mo', 'Ni'), ('Mo',))
    """
    return tuple(term.removeprefix(SQRT_PREFIX).split(PRODUCT_SIGN))


def composition_sum(constant, terms, composition: Composition):
    """constant + sum of coefficient * term (each may be an array of a batch of parameter sets)."""
    total = np.asarray(constant, dtype=float)
    for term, coefficient in terms.items():
        total = total + np.asarray(coefficient) * term_value(term, composition)
    return total


@dataclass(frozen=True)
class Coefficients:
    """The kinetic coefficients of one product of an empirical steel model.

    Attributes
    ----------
    constant : float
        The constant of F (``linear``) or of ln F.
    terms : mapping of str to float
        Coefficient of each composition term of F or ln F, per mass %.
    undercooling_exponent : float
        n of dT**n.
    activation_energy_J_mol : float
        Q of exp(Q / RT) in 1 / D, J/mol (the papers give cal/mol; see
        :attr:`activation_energy_cal_mol`).
    grain_size_coefficient : float
        a of 2**(a (G - G0)).
    grain_size_offset : float
        G0 of 2**(a (G - G0)).
    linear : bool
        F = constant + terms (Kirkaldy & Venugopalan) rather than ln F (Li et al.).
    drag_activation_energy_J_mol : float
        Q_drag of the second term of 1 / D, J/mol (0: no such term).
    drag_terms : mapping of str to float
        Its weight w = sum of coefficient * term (mass %).
    reaction_exponent : float
        p of the reaction term S(X).
    retardation_constant, retardation_terms
        c = constant + sum of coefficient * term of exp(c X**2) in S(X).
    factor : float
        A multiplier on the time, 1 as published (a calibration fits it).

    Any number may be an array: it broadcasts into the product's batch, so a calibration can
    vary a coefficient across parameter sets.

    Examples
    --------
    >>> c = Coefficients(constant=1.0, activation_energy_J_mol=23500 * 4.184)
    >>> c.replace(activation_energy_J_mol=27500 * 4.184).activation_energy_cal_mol
    27500.0
    """

    constant: float
    terms: dict = field(default_factory=dict)
    undercooling_exponent: float = 3.0
    activation_energy_J_mol: float = 27500.0 * CALORIE_J
    grain_size_coefficient: float = 0.5
    grain_size_offset: float = 0.0
    linear: bool = False
    drag_activation_energy_J_mol: float = 0.0
    drag_terms: dict = field(default_factory=dict)
    reaction_exponent: float = 0.4
    retardation_constant: float = 0.0
    retardation_terms: dict = field(default_factory=dict)
    factor: float = 1.0

    def __post_init__(self):
        for name in ("terms", "drag_terms", "retardation_terms"):
            object.__setattr__(self, name, MappingProxyType(dict(getattr(self, name))))

    @property
    def activation_energy_cal_mol(self):
        return plain(np.asarray(self.activation_energy_J_mol) / CALORIE_J)

    def replace(self, **changes) -> Coefficients:
        """A copy with some values changed; term mappings given are merged into the existing ones."""
        for name in ("terms", "drag_terms", "retardation_terms"):
            if name in changes:
                changes[name] = {**getattr(self, name), **changes[name]}
        return dataclasses.replace(self, **changes)

    def log_composition_factor(self, composition: Composition):
        """ln F for the composition (its batch shape); -inf where a linear F is not positive."""
        total = composition_sum(self.constant, self.terms, composition)
        if not self.linear:
            return total
        with np.errstate(divide="ignore", invalid="ignore"):
            return np.where(total > 0.0, np.log(np.where(total > 0.0, total, 1.0)), -np.inf)

    def retardation(self, composition: Composition):
        """c of exp(c X**2) for the composition."""
        return composition_sum(self.retardation_constant, self.retardation_terms, composition)

    def batch_values(self) -> tuple:
        """The coefficients that may hold one value per heat (a fitted batch of parameters)."""
        return (self.constant, self.undercooling_exponent, self.activation_energy_J_mol, self.grain_size_coefficient,
                self.factor, *self.terms.values())

    def elements(self) -> set:
        """Every element the coefficients read."""
        return {e for terms in (self.terms, self.drag_terms, self.retardation_terms) for t in terms
                for e in term_elements(t)}

    def as_dict(self) -> dict:
        """Plain numbers (or lists for a batch) for the JSON summary."""
        out = {"form": "F = constant + terms" if self.linear else "ln F = constant + terms",
               "constant": record(self.constant),
               "terms": {k: record(v) for k, v in self.terms.items()},
               "undercooling_exponent": record(self.undercooling_exponent),
               "activation_energy_cal_mol": record(self.activation_energy_cal_mol),
               "grain_size_coefficient": record(self.grain_size_coefficient),
               "grain_size_offset": record(self.grain_size_offset),
               "reaction_exponent": record(self.reaction_exponent),
               "factor": record(self.factor)}
        if self.drag_terms:
            out["drag_activation_energy_cal_mol"] = record(np.asarray(self.drag_activation_energy_J_mol)
                                                                  / CALORIE_J)
            out["drag_terms"] = {k: record(v) for k, v in self.drag_terms.items()}
        if self.retardation_terms or np.any(np.asarray(self.retardation_constant) != 0.0):
            out["retardation_constant"] = record(self.retardation_constant)
            out["retardation_terms"] = {k: record(v) for k, v in self.retardation_terms.items()}
        return out


@dataclass(frozen=True)
class KineticsModel:
    """One published empirical model: its products' coefficients and what goes with them.

    Attributes
    ----------
    key : str
        The name an alloy file, ``isokin.steel`` and the command line give (``"li_1998"``).
    label : str
        Authors and year, for tables and figure footers.
    reference : str
        The full reference.
    products : mapping of str to Coefficients
        Ferrite, pearlite and bainite.
    bainite_start : str
        The Bs correlation (a key of the steel's Bs methods) from which its bainite's
        undercooling is measured, and below which its ferrite and pearlite do not form.
    ranges : dict
        Composition ranges (mass %) inside which no warning is given.
    provenance : str
        What the JSON summary says of the coefficients' origin.
    """

    key: str
    label: str
    reference: str
    products: dict
    bainite_start: str
    ranges: dict
    provenance: str

    def elements(self) -> set:
        return set().union(*(c.elements() for c in self.products.values()))


class SteelProduct:
    """One product (ferrite, pearlite or bainite) of an empirical steel model.

    Parameters
    ----------
    name : str
        "ferrite", "pearlite" or "bainite".
    coefficients : Coefficients
        Its kinetics.
    composition : Composition
        One steel or a batch (mass %).
    grain_size_astm : float or array_like
        ASTM E112 austenite grain size number G (dimensionless; larger is finer).
    upper_K : float or array_like
        Temperature (K) from which the undercooling is measured (Ae3 for ferrite, Ae1 for
        pearlite, Bs for bainite); the product forms below it and not at it.
    lower_K : float or array_like
        Temperature (K) below which the product is not formed. A value at or above
        ``upper_K`` means the product cannot form at all.
    equilibrium : callable, optional
        ``equilibrium(T_K)``: the share of austenite the product reaches at completion
        (the lever rule, for proeutectoid ferrite); None where it takes all the austenite.
    model : str, optional
        The model's label for figures and the JSON summary.
    calibrated_ranges : dict, optional
        Composition ranges of the model, for warnings.

    Everything broadcasts into one batch shape. The activation energies are divided by R in
    J/(mol K); against the papers' R = 1.987 cal/(mol K) this moves times by under
    0.4 % (0.2-0.3 % at 500-700 K for 27,500 cal/mol, up to 0.4 % for the 37,500 cal/mol drag term).

    Examples
    --------
    >>> from isokin.relations.composition import Composition
    >>> from isokin.products.li1998 import LI1998
    >>> steel = Composition.from_dict({"C": 0.2, "Mn": 0.8})
    >>> ferrite = SteelProduct("ferrite", LI1998.products["ferrite"], steel, 7.0, 1100.0, 700.0)
    >>> float(ferrite.time_to_fraction(1150.0, 0.5)), float(ferrite.rate(650.0, 0.5))
    (inf, 0.0)
    >>> t = ferrite.time_to_fraction(950.0, [0.01, 0.5, 0.99])
    >>> bool(0 < t[0] < t[1] < t[2] < float("inf"))
    True
    """

    def __init__(self, name, coefficients: Coefficients, composition: Composition, grain_size_astm, upper_K,
                 lower_K, equilibrium=None, model="", calibrated_ranges=None):
        self.name = name
        self.model = model
        self.calibrated_ranges = calibrated_ranges or {}
        self.equilibrium = equilibrium
        self.coefficients = coefficients
        self.composition = composition
        grain = np.asarray(grain_size_astm, dtype=float)
        upper = np.asarray(upper_K, dtype=float)
        lower = np.asarray(lower_K, dtype=float)
        self._given = (grain, upper, lower)
        for label, value in (("grain_size_astm", grain), ("upper_K", upper), ("lower_K", lower)):
            if not np.all(np.isfinite(value)):
                raise ValueError(f"{label} of {name} must be finite")
        if np.any(lower < 0.0):
            raise ValueError(f"lower_K of {name} must not be negative (it is in kelvin)")
        c = coefficients
        # ln of factor F / 2**(a (G - G0)): everything that depends on neither T nor X, kept as
        # a log so that strongly alloyed steels cannot overflow before the temperature enters.
        log_prefactor = (c.log_composition_factor(composition) + np.log(np.asarray(c.factor, dtype=float))
                         - np.asarray(c.grain_size_coefficient) * (grain - np.asarray(c.grain_size_offset))
                         * np.log(2.0))
        drag = composition_sum(0.0, c.drag_terms, composition)
        with np.errstate(divide="ignore"):
            log_drag = np.where(drag > 0.0, np.log(np.where(drag > 0.0, drag, 1.0)), -np.inf)
        values = {"upper": upper, "lower": lower, "log_prefactor": log_prefactor,
                  "n": np.asarray(c.undercooling_exponent, dtype=float),
                  "Q": np.asarray(c.activation_energy_J_mol, dtype=float),
                  "Q_drag": np.asarray(c.drag_activation_energy_J_mol, dtype=float), "log_drag": log_drag,
                  "retardation": np.asarray(c.retardation(composition), dtype=float),
                  "p": np.asarray(c.reaction_exponent, dtype=float)}
        self._batch_shape = np.broadcast_shapes(*(v.shape for v in values.values()))
        self._values = {k: np.broadcast_to(v, self._batch_shape) for k, v in values.items()}
        self._has_drag = bool(np.any(np.isfinite(log_drag)))
        p = np.unique(self._values["p"])
        if p.size > 1:
            raise ValueError(f"the reaction exponent of {name} must be one number for the whole batch")
        self._p = float(p[0]) if p.size else 0.4
        retardation = self._values["retardation"]
        #: One reaction term for the whole batch (then t = F(T) S(X) with a shared S).
        self.separable = retardation.size == 0 or bool(np.all(retardation == retardation.flat[0]))
        self._term = reaction_terms.reaction_term(self._p, float(retardation.flat[0]) if retardation.size else 0.0) \
            if self.separable else None
        self._S_memo = {}

    @property
    def batch_shape(self):
        return self._batch_shape

    @property
    def capped(self):
        """Whether the product stops at an equilibrium share (proeutectoid ferrite)."""
        return self.equilibrium is not None

    #: What a calibration varies unless told otherwise.
    default_calibration = ("factor",)

    #: What a calibration may vary: a factor on the time (relative), Q and n.
    @property
    def calibration_parameters(self):
        c = self.coefficients
        return {"factor": 1.0, "activation_energy_cal_mol": float(np.mean(c.activation_energy_cal_mol)),
                "undercooling_exponent": float(np.mean(c.undercooling_exponent))}

    def varied(self, values, batch_shape=()):
        """A copy with ``factor`` (a multiplier on the present one), ``activation_energy_cal_mol``
        or ``undercooling_exponent`` set (arrays give a batch of parameter sets), broadcast to
        ``batch_shape``."""
        changes = {}
        for name, value in values.items():
            value = np.asarray(value, dtype=float)
            if name == "factor":
                changes["factor"] = np.asarray(self.coefficients.factor) * value
            elif name == "activation_energy_cal_mol":
                changes["activation_energy_J_mol"] = value * CALORIE_J
            elif name == "undercooling_exponent":
                changes["undercooling_exponent"] = value
            else:
                raise KeyError(name)
        grain, upper, lower = (np.broadcast_to(a, np.broadcast_shapes(a.shape, batch_shape)) for a in self._given)
        return SteelProduct(self.name, self.coefficients.replace(**changes), self.composition, grain, upper, lower,
                            self.equilibrium, self.model, self.calibrated_ranges)

    @property
    def upper_K(self):
        """Upper temperature (K) of the undercooling; float or batch array."""
        return plain(self._values["upper"])

    @property
    def lower_K(self):
        """Lowest temperature (K) at which the product forms; float or batch array."""
        return plain(self._values["lower"])

    @property
    def valid(self):
        """Where the composition gives the model a time scale (a linear F that is positive)."""
        return np.isfinite(self._values["log_prefactor"])

    def _leading(self, key, ndim):
        return batch_leading(self._values[key], len(self._batch_shape), ndim)

    def _log_time_factor(self, T, ndim):
        """ln F(T) in ln(s), and where the product can form, with the batch leading."""
        v = {k: self._leading(k, ndim) for k in ("upper", "lower", "log_prefactor", "n", "Q")}
        forms = (T >= v["lower"]) & (T < v["upper"]) & np.isfinite(v["log_prefactor"])
        RT = GAS_CONSTANT_J_MOL_K * T
        # Outside the window the values are discarded by the callers (nan or inf there is
        # never read), so they are computed without masks: fewer passes over large batches.
        with np.errstate(divide="ignore", invalid="ignore"):
            inverse_diffusivity = v["Q"] / RT
            if self._has_drag:
                inverse_diffusivity = np.logaddexp(
                    inverse_diffusivity, self._leading("log_drag", ndim) + self._leading("Q_drag", ndim) / RT)
            log_factor = v["log_prefactor"] - v["n"] * np.log(v["upper"] - T) + inverse_diffusivity
        return log_factor, forms

    def time_factor(self, T_K):
        """F(T) = factor F / (2**(a (G - G0)) dT**n D(T)), s; ``inf`` where the product cannot form."""
        T, q = as_query(T_K)
        log_factor, forms = self._log_time_factor(T, q)
        with np.errstate(over="ignore"):
            return np.where(forms, np.exp(log_factor), np.inf)

    def incubation_s(self, T_K):
        """None in these models: S(X) starts at X = 0 (0 everywhere)."""
        T, q = as_query(T_K)
        return np.zeros(answer_shape(self._batch_shape, T, q))

    def _retardation(self, ndim):
        return self._leading("retardation", ndim)

    def reaction_term(self, X):
        """S(X), shared by the batch (only where :attr:`separable`)."""
        return self._term(X)

    def reaction_term_inverse(self, S):
        return self._term.inverse(S)

    def reaction_rate_shape(self, X):
        """dX/dS of the shared reaction term (only where :attr:`separable`)."""
        return self._term.rate_shape(X)

    #: Distinct fraction arrays whose S(X) a batch with its own retardation per member keeps:
    #: a diagram asks for the same few fractions on every block of temperatures.
    _S_MEMORY = 16

    def _S(self, X, ndim):
        if self.separable:
            return np.asarray(self._term(X))
        small = X.size <= 64
        key = (ndim, X.shape, X.tobytes()) if small else None
        if key in self._S_memo:
            return self._S_memo[key]
        S = reaction_terms.values(X, self._p, self._retardation(ndim))
        if small:
            if len(self._S_memo) >= self._S_MEMORY:
                self._S_memo.pop(next(iter(self._S_memo)))
            S.flags.writeable = False  # shared by later calls
            self._S_memo[key] = S
        return S

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
        S = self._S(X, q)
        if np.all(S > 0.0):
            return factor * S
        # X = 0: no time where the product forms, never where it does not
        return np.where(S > 0.0, factor * np.where(S > 0.0, S, 1.0), np.where(forms, 0.0, np.inf))

    def equilibrium_fraction(self, T_K):
        """Share of the austenite the product reaches at completion: the lever rule where one
        was given (proeutectoid ferrite), else all of it."""
        if self.equilibrium is None:
            T, q = as_query(T_K)
            return np.ones(answer_shape(self._batch_shape, T, q))
        return self.equilibrium(T_K)

    def fraction_after(self, T_K, t_s):
        """Fraction of its own completion after t_s seconds at T_K: S^-1(t / F(T)), 1 once
        S(1) F(T) has passed (the model completes in finite time); 0 where it cannot form."""
        T, t, q = as_query(T_K, t_s)
        log_factor, forms = self._log_time_factor(T, q)
        with np.errstate(over="ignore", under="ignore", invalid="ignore"):
            S = np.maximum(t, 0.0) * np.exp(-log_factor)
        if self.separable:
            complete = self._term.complete
            S = np.where(forms & (t > 0.0), np.where(np.isnan(S), complete, S), 0.0)  # inf * 0: an infinite hold
            return self._term.inverse(np.minimum(S, complete))
        c = self._retardation(q)
        complete = self._S(np.ones((1,) * q), q)
        S = np.where(forms & (t > 0.0), np.where(np.isnan(S), complete, S), 0.0)
        return reaction_terms.inverse_values(np.minimum(S, complete), self._p, c)

    def rate(self, T_K, X):
        """dX/dt in 1/s at temperature T_K and fraction X.

        The rate form of the model, dX/dt = X**(p(1-X)) (1-X)**(pX) exp(-c X**2) / F(T): the
        derivative of X(t) along the isothermal curve t = F(T) S(X). It is 0 where the
        product cannot form, and 0 at X = 0 and X = 1 (and outside [0, 1]). Because it is
        0 at X = 0, an integration along a cooling path must start from the incubation
        found by additivity, not from X = 0.
        """
        T, X, q = as_query(T_K, X)
        log_factor, forms = self._log_time_factor(T, q)
        with np.errstate(under="ignore"):
            r = reaction_terms.rate_shape(X, self._p, self._retardation(q)) * np.exp(-log_factor)
        return np.where(forms, r, 0.0)
