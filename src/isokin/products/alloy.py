"""An alloy as every later step sees it: its products, its critical temperatures and its origin."""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass, field

import numpy as np

from ..errors import InputError

def check_alloy(alloy, key="alloy"):
    """``alloy`` itself if it is an :class:`Alloy`; InputError naming ``key`` otherwise."""
    if not isinstance(alloy, Alloy):
        raise InputError(None, key, f"must be an alloy from isokin.load_alloy or isokin.steel, got "
                         f"{type(alloy).__name__}")
    return alloy


#: How close to the highest upper temperature the default grid ends, K: the times diverge there.
UPPER_MARGIN_K = 0.5


@dataclass(frozen=True)
class Alloy:
    """The products of one parent phase, with the lines a diagram shows.

    Attributes
    ----------
    name : str
        Shown on the figure and in the exports.
    model : str
        ``"steel"`` or ``"nucleation-growth"``.
    products : tuple of Product
        The products that form in time (see :mod:`isokin.products.base`).
    critical_K : dict of str to float or ndarray
        Labelled temperatures, K: an equilibrium temperature, or Ae3, Ae1, Bs, Ms, M50, M90.
        In a batch, a line that some members lack (Ae3 past the eutectoid) holds NaN there.
    critical_methods : dict of str to str
        The method behind each line.
    default_range_K : (float, float)
        The hold temperatures a diagram covers unless asked otherwise.
    martensite : Martensite or None
        The athermal product below Ms, for steels.
    default_points : int or None
        Grid points asked for by the alloy file.
    inputs : dict
        The input as read, for the record.
    footer : str
        One line on the model and its inputs, for figure footers.
    warnings : tuple of str
        Extrapolations and other doubts about this input.
    provenance : dict
        Model choices and coefficients used (Ms method, kinetic coefficients), for the record.
    sequence : dict of str to str
        Product -> the product it waits for in the decomposition (pearlite -> ferrite).
    parent : str
        The phase the products form from ("austenite" for steels).
    composition : Composition or None
        The typed analysis of a steel (one heat or a batch).
    options : dict
        What builds the alloy again from its composition (a steel's grain size, methods,
        kinetic model and coefficients, calibration), for sampling and fitting.
    builder : callable or None
        ``builder(alloy, mass_percent)``: the same alloy for another analysis (or a batch of
        them), with its own options; None where the alloy has no composition (a steel has).
    carbon_balance : CarbonBalance or None
        How the carbon of the remaining austenite follows the products (steels): the
        martensite of the final quench forms from austenite of that carbon.
    valid : ndarray of bool or None
        For a batch, the members whose diagram could be computed (the others form nothing;
        a line is NaN where its correlation gives a value that cannot be); None where all could.
    """

    name: str
    model: str
    products: tuple
    critical_K: dict
    critical_methods: dict
    default_range_K: tuple
    martensite: object = None
    default_points: int | None = None
    inputs: dict = field(default_factory=dict)
    footer: str = ""
    warnings: tuple = ()
    provenance: dict = field(default_factory=dict)
    sequence: dict = field(default_factory=dict)
    parent: str = "untransformed"
    composition: object = None
    options: dict = field(default_factory=dict)
    builder: object = None
    carbon_balance: object = None
    valid: object = None

    @property
    def batch_shape(self) -> tuple:
        """Shape of the batch of parameter sets or compositions; ``()`` for one alloy."""
        return np.broadcast_shapes(*(p.batch_shape for p in self.products))

    def replace(self, **changes) -> Alloy:
        return dataclasses.replace(self, **changes)

    @property
    def calibration_parameters(self) -> dict:
        """``{"product.parameter": current value}`` of every parameter a calibration may vary."""
        return {f"{p.name}.{k}": v for p in self.products for k, v in p.calibration_parameters.items()}

    def with_parameters(self, values: dict) -> Alloy:
        """The alloy with calibration parameters set (``{"bainite.factor": 2.0}``); arrays give
        a batch of parameter sets, and every product takes that batch."""
        if not values:
            return self
        known = self.calibration_parameters
        by_product = {}
        for name, value in values.items():
            if name not in known:
                raise KeyError(name)
            product, _, parameter = name.partition(".")
            by_product.setdefault(product, {})[parameter] = value
        batch = np.broadcast_shapes(self.batch_shape, *(np.shape(v) for v in values.values()))
        return self.replace(products=tuple(p.varied(by_product.get(p.name, {}), batch) for p in self.products))

    def with_composition(self, mass_percent) -> Alloy:
        """The same alloy for another analysis or a batch of analyses (mass %, element to a
        number or an array per heat), with its own options and calibration."""
        if self.builder is None:
            raise InputError(None, "composition", f"this alloy (model = '{self.model}') has no composition to vary")
        return self.builder(self, mass_percent)
