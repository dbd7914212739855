"""A steel from its heat analysis and grain size: Li et al. (1998) products, critical
temperatures and martensite, for one heat or a batch of heats.

Ae1 and Ae3 come from Andrews (1965), Bs from Steven & Haynes (1956), Ms from the chosen
correlation, martensite below Ms from Koistinen-Marburger (1959). Ferrite is given an
empty window (upper = lower = Ms) wherever carbon is at or above the eutectoid content of
:func:`~isokin.relations.steel_critical.eutectoid_carbon_andrews_1965`.
"""

from __future__ import annotations

from collections.abc import Mapping
from typing import NamedTuple

import numpy as np

from ..constants import CALORIE_J, celsius_to_kelvin, kelvin_to_celsius
from ..errors import InputError
from ..relations.composition import ELEMENTS, Composition, range_warnings
from ..relations.steel_critical import (
    CALIBRATED_RANGES,
    KOISTINEN_MARBURGER_ALPHA_PER_K,
    ae1_andrews_1965,
    andrews_ae1_C,
    andrews_ae3_without_carbon_C,
    lever_rule_ferrite_fraction,
    ae3_andrews_1965,
    bs_steven_haynes_1956,
    eutectoid_carbon_andrews_1965,
    ms_andrews_1965_linear,
    ms_andrews_1965_product,
    ms_steven_haynes_1956,
)
from .alloy import UPPER_MARGIN_K, Alloy
from .base import as_query, batch_leading, plain
from .li1998 import LI1998_KINETICS, LI1998_PROVENANCE, LiCoefficients, Li1998Product
from .martensite import Martensite

#: ASTM E112 grain size numbers run from 00 (written -1 here) to about 14.
GRAIN_SIZE_RANGE = (-1.0, 14.0)
#: A medium grain size, common for forged and normalised steels, used when none is given.
DEFAULT_GRAIN_SIZE_ASTM = 7.0
#: Austenitizing temperatures a steel file may give, °C.
AUSTENITIZING_RANGE_C = (600.0, 1350.0)
#: The diagram's default lower end lies this far below M90, K, so the martensite lines show.
BELOW_M90_K = 25.0
#: ...but not below this, °C: sub-zero treatment goes no colder in common practice.
LOWEST_DEFAULT_C = -196.0

#: Ms correlations by the name an alloy file gives as ``ms_method``: function, label and
#: the calibrated range used for warnings.
MS_METHODS = {
    "andrews_1965": (ms_andrews_1965_linear, "Andrews (1965), linear", "Andrews (1965), linear Ms"),
    "andrews_1965_product": (ms_andrews_1965_product, "Andrews (1965), product form", "Andrews (1965), product Ms"),
    "steven_haynes_1956": (ms_steven_haynes_1956, "Steven & Haynes (1956)", "Steven & Haynes (1956)"),
}
#: With no ms_method given, Andrews' linear form up to this carbon (mass %, the end of its
#: data set) and his product form above, which holds up better at high carbon.
LINEAR_MS_CARBON_LIMIT = 0.6
#: Andrews' product-form Ms is a parabola in carbon with its minimum near 453 / (2 x 217) %.
ANDREWS_PRODUCT_MS_TURN_C = 1.0
#: Carbon above this (mass %) is cast iron, not steel: the eutectic point of Fe-C.
MAX_STEEL_CARBON = 2.1
#: Critical temperatures at or above this, °C, lie above the solidus of steels.
HIGHEST_CRITICAL_C = 1400.0
#: Elements the Li et al. (1998) kinetics reads; the others move at most the critical
#: temperatures (Andrews' Ae1/Ae3 read V, W, Cu, Al, P, As, Ti) or nothing at all.
LI1998_ELEMENTS = ("C", "Mn", "Si", "Ni", "Cr", "Mo")
CRITICAL_ONLY_ELEMENTS = ("V", "W", "Cu", "Al", "P", "As", "Ti")
#: The keys of a kinetics override, per product; activation energy in either unit.
KINETIC_KEYS = ("constant", "undercooling_exponent", "activation_energy_cal_mol", "activation_energy_J_mol",
                "grain_size_coefficient")


class LeverRuleFerrite:
    """Equilibrium share of proeutectoid ferrite at T (lever rule on Andrews' Ae3), for one
    steel or a batch, with the batch leading the query as every product's methods do."""

    method = "lever rule on the Ae3 line of Andrews (1965), eutectoid carbon of the same, 0.02 % C in ferrite"

    def __init__(self, composition: Composition):
        self._arrays = (andrews_ae3_without_carbon_C(composition), andrews_ae1_C(composition),
                        np.asarray(composition.C), eutectoid_carbon_andrews_1965(composition))
        self._batch_ndim = len(composition.shape)

    def __call__(self, T_K):
        T, q = as_query(T_K)
        arrays = [batch_leading(a, self._batch_ndim, q) for a in self._arrays]
        return lever_rule_ferrite_fraction(T - 273.15, *arrays)


class CriticalTemperature(NamedTuple):
    """A critical temperature and the method that gave it."""

    value_K: float | np.ndarray
    method: str


def _ms(composition: Composition, ms_method: str | None):
    """The Ms correlation to use: (function of a composition, label, method name, range keys)."""
    if ms_method is not None:
        function, label, ranges = MS_METHODS[ms_method]
        return function, label, ms_method, [ranges]
    high = composition.C > LINEAR_MS_CARBON_LIMIT
    linear = MS_METHODS["andrews_1965"]
    product = MS_METHODS["andrews_1965_product"]
    if not np.any(high):
        return linear[0], linear[1], "andrews_1965", [linear[2]]
    if np.all(high):
        return (product[0], f"{product[1]} (chosen above {LINEAR_MS_CARBON_LIMIT:g} % C)", "andrews_1965_product",
                [product[2]])

    def by_carbon(c):
        return np.where(c.C > LINEAR_MS_CARBON_LIMIT, product[0](c), linear[0](c))

    return (by_carbon, f"Andrews (1965): linear up to {LINEAR_MS_CARBON_LIMIT:g} % C, product form above",
            "andrews_1965 / andrews_1965_product by carbon", [linear[2]])


def _member(composition: Composition, index: int) -> Composition:
    return Composition.from_dict({e: np.ravel(np.broadcast_to(v, composition.shape))[index]
                                  for e, v in composition.as_dict().items()})


def _driving_elements(function, composition: Composition) -> str:
    """The elements that move a correlation most for one steel: 'C 2 (-846 K), Mn 1 (-30 K)'."""
    value = float(function(composition))
    moves = []
    for element, content in composition.as_dict().items():
        if float(content) > 0:
            without = Composition.from_dict({**composition.as_dict(), element: 0.0})
            moves.append((value - float(function(without)), element, float(content)))
    moves.sort(key=lambda m: -abs(m[0]))
    return ", ".join(f"{e} {c:g} % ({d:+.0f} K)" for d, e, c in moves[:3] if abs(d) >= 0.5) or "the base value"


def _ae3_hypo(c):
    return np.where(c.C < eutectoid_carbon_andrews_1965(c), ae3_andrews_1965(c), ae1_andrews_1965(c))


def check_physical(composition: Composition, ms_method: str | None = None):
    """Refuse a steel whose correlations give temperatures that cannot be.

    Outside its calibrated range a correlation only warns; but Ms or Bs at or below 0 K,
    Ae1 or Ae3 above :data:`HIGHEST_CRITICAL_C` (the solidus of steels) or at 0 K, Ms at or
    above Ae1, or Bs at or above Ae3 are no steel at all. The InputError names the
    correlation and the elements that drive it (for a batch, the first such heat).
    """
    ms_function, ms_label, _, _ = _ms(composition, ms_method)
    ae1, ae3 = ae1_andrews_1965(composition), _ae3_hypo(composition)
    ms, bs = ms_function(composition), bs_steven_haynes_1956(composition)
    hot = celsius_to_kelvin(HIGHEST_CRITICAL_C)
    checks = [
        (ms <= 0.0, ms_function, None, f"Ms from {ms_label}", "is below absolute zero"),
        (bs <= 0.0, bs_steven_haynes_1956, None, "Bs from Steven & Haynes (1956)", "is below absolute zero"),
        ((ae1 >= hot) | (ae1 <= 0.0), ae1_andrews_1965, None, "Ae1 from Andrews (1965)",
         f"lies outside 0 K to {HIGHEST_CRITICAL_C:g} °C (above the solidus of steels)"),
        ((ae3 >= hot) | (ae3 <= 0.0), _ae3_hypo, None, "Ae3 from Andrews (1965)",
         f"lies outside 0 K to {HIGHEST_CRITICAL_C:g} °C (above the solidus of steels)"),
        (ms >= ae1, ms_function, ae1_andrews_1965, f"Ms from {ms_label}", "lies at or above Ae1 (Andrews 1965)"),
        (bs >= ae3, bs_steven_haynes_1956, _ae3_hypo, "Bs from Steven & Haynes (1956)",
         "lies at or above Ae3 (Andrews 1965)"),
    ]
    for bad, function, other, what, problem in checks:
        bad = np.broadcast_to(bad, composition.shape)
        if not np.any(bad):
            continue
        i = int(np.argmax(np.ravel(bad)))
        one = _member(composition, i) if composition.shape else composition
        value = kelvin_to_celsius(float(function(one)))
        if other is None:
            driver = function
        else:
            problem += f", {kelvin_to_celsius(float(other(one))):.0f} °C"
            driver = lambda c, f=function, g=other: f(c) - g(c)  # noqa: E731  the gap between the two
        where = "" if not composition.shape else f" in {np.count_nonzero(bad)} of {bad.size} heats (first: heat {i})"
        raise InputError(None, "composition",
                         f"{what} is {value:.0f} °C and {problem}{where}: the correlations are extrapolated past "
                         f"anything physical, driven by {_driving_elements(driver, one)}; this analysis cannot "
                         "be modelled")


def kinetics_with(overrides: Mapping | None = None) -> dict:
    """Li et al. (1998) coefficients with overrides applied, by product.

    ``overrides`` maps a product name to a :class:`LiCoefficients` or to a mapping of
    changes: any of :data:`KINETIC_KEYS` and composition terms (``C``, ``sqrt_Mo``, ...).

    >>> kinetics_with({"ferrite": {"activation_energy_cal_mol": 27500}})["ferrite"].activation_energy_cal_mol
    27500.0
    """
    kinetics = dict(LI1998_KINETICS)
    for product, change in (overrides or {}).items():
        if product not in kinetics:
            raise InputError(None, "steel.kinetics", f"unknown product '{product}'; one of {', '.join(kinetics)}")
        if isinstance(change, LiCoefficients):
            kinetics[product] = change
            continue
        change = dict(change)
        if "activation_energy_cal_mol" in change and "activation_energy_J_mol" in change:
            raise InputError(None, f"steel.kinetics.{product}.activation_energy_J_mol",
                             "give the activation energy once, in cal/mol or in J/mol")
        if "activation_energy_cal_mol" in change:
            change["activation_energy_J_mol"] = np.asarray(change.pop("activation_energy_cal_mol"), float) * CALORIE_J
        terms = {}
        for key in list(change):
            if key in KINETIC_KEYS:
                continue
            symbol = key.removeprefix("sqrt_")
            if symbol not in ELEMENTS:
                raise InputError(None, f"steel.kinetics.{product}.{key}",
                                 f"unknown coefficient; one of {', '.join(KINETIC_KEYS)} or an element term "
                                 "such as C or sqrt_Mo")
            terms[key] = change.pop(key)
        kinetics[product] = kinetics[product].replace(**change, **({"terms": terms} if terms else {}))
    return kinetics


def li1998_products(composition: Composition, grain_size_astm, ms_method: str | None = None, kinetics=None):
    """Ferrite, pearlite and bainite of Li et al. (1998), martensite, and the critical temperatures.

    Parameters
    ----------
    composition : Composition
        One steel or a batch (mass %).
    grain_size_astm : float or array_like
        ASTM E112 austenite grain size number.
    ms_method : str, optional
        A key of :data:`MS_METHODS`; by default Andrews' linear form up to 0.6 % C and his
        product form above.
    kinetics : mapping, optional
        Overrides of the kinetic coefficients (see :func:`kinetics_with`).

    Returns
    -------
    products : list of Li1998Product
        Ferrite, pearlite, bainite, in that order.
    martensite : Martensite
    critical : dict of str to CriticalTemperature
        Keys "Ae3", "Ae1", "Bs", "Ms", "M50", "M90"; values in K with the method name.
        Ae3 equals Ae1 at or above the eutectoid carbon.

    Examples
    --------
    >>> steel = Composition.from_dict({"C": 0.405, "Mn": 0.875, "Si": 0.25, "Cr": 0.95, "Mo": 0.2})
    >>> products, martensite, critical = li1998_products(steel, 7.0)
    >>> [p.name for p in products], martensite.name
    (['ferrite', 'pearlite', 'bainite'], 'martensite')
    >>> round(float(critical["Ms"].value_K) - 273.15, 1), critical["Ms"].method
    (328.1, 'Andrews (1965), linear')
    """
    if ms_method is not None and ms_method not in MS_METHODS:
        raise ValueError(f"unknown ms_method '{ms_method}'; choose one of: {', '.join(MS_METHODS)}")
    coefficients = kinetics_with(kinetics)
    ms_function, ms_label, _, _ = _ms(composition, ms_method)
    ms = ms_function(composition)
    ae1 = ae1_andrews_1965(composition)
    hypoeutectoid = composition.C < eutectoid_carbon_andrews_1965(composition)
    ae3 = np.where(hypoeutectoid, ae3_andrews_1965(composition), ae1)
    bs = bs_steven_haynes_1956(composition)
    uppers = {"ferrite": np.where(hypoeutectoid, ae3, ms), "pearlite": ae1, "bainite": bs}
    lever = LeverRuleFerrite(composition)
    # every product of one steel shares one batch: that of the composition, the grain size and
    # any coefficient given as an array (a calibration's parameter sets)
    shapes = [np.shape(v) for c in coefficients.values() for v in
              (c.constant, c.undercooling_exponent, c.activation_energy_J_mol, c.grain_size_coefficient,
               *c.terms.values())]
    batch = np.broadcast_shapes(composition.shape, np.shape(grain_size_astm), *shapes)
    grain = np.broadcast_to(np.asarray(grain_size_astm, dtype=float), batch)
    products = [Li1998Product(name, coefficients[name], composition, grain, upper, ms,
                              equilibrium=lever if name == "ferrite" else None)
                for name, upper in uppers.items()]
    martensite = Martensite(ms, ms_method=ms_label)
    km = f"Koistinen-Marburger (1959), alpha = {KOISTINEN_MARBURGER_ALPHA_PER_K} /K, from Ms of {ms_label}"
    critical = {
        "Ae3": CriticalTemperature(plain(ae3), "Andrews (1965); equals Ae1 at or above eutectoid C"),
        "Ae1": CriticalTemperature(plain(ae1), "Andrews (1965)"),
        "Bs": CriticalTemperature(plain(bs), "Steven & Haynes (1956)"),
        "Ms": CriticalTemperature(plain(ms), ms_label),
        "M50": CriticalTemperature(plain(martensite.temperature_for_fraction(0.5)), km),
        "M90": CriticalTemperature(plain(martensite.temperature_for_fraction(0.9)), km),
    }
    return products, martensite, critical


def element_warnings(composition: Composition) -> list[str]:
    """Warnings for elements present that the kinetics, or every model, leaves out."""
    present = [e for e in composition.as_dict() if np.any(getattr(composition, e) > 0)]
    critical_only = [e for e in present if e in CRITICAL_ONLY_ELEMENTS]
    ignored = [e for e in present if e not in LI1998_ELEMENTS and e not in CRITICAL_ONLY_ELEMENTS]
    warnings = []
    if critical_only:
        verb = "moves" if len(critical_only) == 1 else "move"
        warnings.append(f"{', '.join(critical_only)} {verb} only the critical temperatures (Andrews' Ae1/Ae3), not "
                        "the Li et al. (1998) kinetics, which has no term for them")
    if ignored:
        verb = "enters" if len(ignored) == 1 else "enter"
        they = "it changes" if len(ignored) == 1 else "they change"
        warnings.append(f"{', '.join(ignored)} {verb} none of the models, so {they} nothing in this diagram")
    if "B" in present:
        warnings.append("boron raises hardenability strongly even at 0.001-0.003 %: the real ferrite and pearlite "
                        "curves lie at longer times than drawn")
    return warnings


def _as_mapping(composition):
    """A mapping of element to contents from a mapping or a table with one row per heat."""
    if hasattr(composition, "columns") and hasattr(composition, "to_numpy"):
        return {str(c): composition[c].to_numpy(dtype=float) for c in composition.columns}
    if not isinstance(composition, Mapping):
        raise InputError(None, "composition", "must map element symbols to mass %, e.g. {'C': 0.4, 'Mn': 0.8}")
    return dict(composition)


def _record(value):
    value = np.asarray(value, dtype=float)
    return float(value) if value.ndim == 0 else value.tolist()


def steel(composition, grain_size_astm=None, *, name=None, austenitizing_temperature_C=None, ms_method=None,
          kinetics=None, inputs=None) -> Alloy:
    """A steel (or a batch of heats) from its heat analysis and austenite grain size.

    Parameters
    ----------
    composition : mapping or DataFrame
        Element symbol to mass % (iron the balance), each a number or an array with one
        value per heat; or a table with one row per heat and a column per element (a
        ``grain_size_astm`` column gives each heat its own grain size).
    grain_size_astm : float or array_like, optional
        ASTM E112 austenite grain size number, -1 (00) to 14; default 7, per heat or one
        for all.
    name : str, optional
        Shown on the figure; default from the analysis.
    austenitizing_temperature_C : float, optional
        Warns where it is not above Ae3 (Ae1 past the eutectoid).
    ms_method : str, optional
        A key of :data:`MS_METHODS`; default Andrews' linear form up to 0.6 % C, his product
        form above.
    kinetics : mapping, optional
        Overrides of the Li et al. (1998) coefficients by product, e.g.
        ``{"ferrite": {"activation_energy_cal_mol": 27500}}``.
    inputs : dict, optional
        The input as read, for the record; default the arguments.

    Raises
    ------
    InputError
        One line naming the key (as an alloy file names it) and what would be right.

    Examples
    --------
    >>> heats = steel({"C": [0.38, 0.42], "Mn": 0.85, "Cr": 0.95, "Mo": 0.2}, 7.0)
    >>> heats.batch_shape, [p.name for p in heats.products]
    ((2,), ['ferrite', 'pearlite', 'bainite'])
    """
    mass_percent = _as_mapping(composition)
    if "grain_size_astm" in mass_percent:
        if grain_size_astm is not None:
            raise InputError(None, "steel.grain_size_astm", "is given both as a column and as an argument; give it once")
        grain_size_astm = mass_percent.pop("grain_size_astm")
    try:
        comp = Composition.from_dict(mass_percent)
    except ValueError as exc:
        raise InputError(None, "composition", str(exc)) from None
    if "C" not in mass_percent:
        raise InputError(None, "composition", "carbon (C) is required: the steel models depend on it")
    if np.any(comp.C > MAX_STEEL_CARBON):
        raise InputError(None, "composition", f"carbon above {MAX_STEEL_CARBON:g} mass % is cast iron, not steel "
                         f"(got {float(np.max(comp.C)):g}); the steel models do not apply")
    grain = np.asarray(DEFAULT_GRAIN_SIZE_ASTM if grain_size_astm is None else grain_size_astm, dtype=float)
    low, high = GRAIN_SIZE_RANGE
    if not np.all((grain >= low) & (grain <= high)):
        raise InputError(None, "steel.grain_size_astm",
                         f"must be an ASTM E112 number from {low:g} (00) to {high:g}, got {np.ravel(grain)[0]:g}"
                         if grain.size == 1 else f"must be ASTM E112 numbers from {low:g} (00) to {high:g}")
    try:
        batch = np.broadcast_shapes(comp.shape, grain.shape)
    except ValueError:
        raise InputError(None, "steel.grain_size_astm",
                         f"has shape {grain.shape}, which does not match the {comp.shape} heats") from None
    if ms_method is not None and ms_method not in MS_METHODS:
        raise InputError(None, "steel.ms_method", f"must be one of {', '.join(map(repr, MS_METHODS))}, got {ms_method!r}")
    if austenitizing_temperature_C is not None:
        lo, hi = AUSTENITIZING_RANGE_C
        if not lo <= austenitizing_temperature_C <= hi:
            raise InputError(None, "steel.austenitizing_temperature_C",
                             f"must lie from {lo:g} to {hi:g} °C, got {austenitizing_temperature_C:g}")

    check_physical(comp, ms_method)
    products, martensite, critical = li1998_products(comp, grain, ms_method, kinetics)
    _, _, ms_key, ms_ranges = _ms(comp, ms_method)
    hypereutectoid = critical["Ae3"].value_K <= critical["Ae1"].value_K
    lines = {k: np.where(hypereutectoid, np.nan, v.value_K) if k == "Ae3" else v.value_K
             for k, v in critical.items()}
    if np.all(hypereutectoid):
        del lines["Ae3"]
    warnings = []
    for key in ("M50", "M90"):
        never = lines[key] <= 0.0
        if np.any(never):
            which = "" if comp.shape == () else f" in {np.count_nonzero(never)} of {never.size} heats"
            warnings.append(f"{key} by Koistinen-Marburger lies below absolute zero{which}: that much martensite is "
                            "never reached on cooling, and the line is left out")
            lines[key] = np.where(never, np.nan, lines[key])
            if np.all(never):
                del lines[key]
    lines = {k: plain(v) for k, v in lines.items()}
    methods = {k: critical[k].method for k in lines}

    warnings += range_warnings(comp, products[0].calibrated_ranges, "Li et al. (1998)")
    for source in dict.fromkeys(["Andrews (1965), Ae1/Ae3", "Steven & Haynes (1956)", *ms_ranges]):
        warnings += range_warnings(comp, CALIBRATED_RANGES[source], source)
    warnings += element_warnings(comp)
    if ms_key.startswith("andrews_1965_product") and np.any(comp.C > ANDREWS_PRODUCT_MS_TURN_C):
        warnings.append(f"above {ANDREWS_PRODUCT_MS_TURN_C:g} % C Andrews' product-form Ms rises with carbon, "
                        "which real steels do not: Ms and the martensite lines are unreliable here")
    if np.any(hypereutectoid):
        which = "" if comp.shape == () else f" in {np.count_nonzero(hypereutectoid)} of {hypereutectoid.size} heats"
        warnings.append(f"carbon is at or above the eutectoid content{which}: no proeutectoid ferrite; "
                        "proeutectoid cementite (Acm) is not modelled")
    if austenitizing_temperature_C is not None:
        full = np.maximum(np.nan_to_num(lines.get("Ae3", 0.0), nan=0.0), lines["Ae1"])
        cold = celsius_to_kelvin(austenitizing_temperature_C) <= full
        if np.any(cold):
            label = "Ae3" if "Ae3" in lines else "Ae1"
            at = (f"{label} ({kelvin_to_celsius(float(full)):.0f} °C)" if np.ndim(full) == 0
                  else f"the full-austenite temperature of {np.count_nonzero(cold)} of {cold.size} heats")
            warnings.append(f"austenitizing at {austenitizing_temperature_C:g} °C is not above {at}: the models "
                            "assume fully austenitized steel, so the diagram does not describe this treatment")

    upper = max(float(np.max(p.upper_K)) for p in products)
    lowest_line = np.nanmin(lines["M90"]) if "M90" in lines else np.nanmin(lines.get("M50", lines["Ms"]))
    lower = max(float(lowest_line) - BELOW_M90_K, celsius_to_kelvin(LOWEST_DEFAULT_C))
    if batch == ():
        analysis = ", ".join(f"{k} {float(v):g}" for k, v in mass_percent.items() if float(v) > 0)
        described = f"{analysis} mass %, ASTM grain size {float(grain):g}"
        default_name = "heat analysis " + ", ".join(f"{k} {float(v):g}" for k, v in mass_percent.items())
    else:
        described = f"{int(np.prod(batch))} heats"
        default_name = f"batch of {int(np.prod(batch))} heats"
    footer = (described + (f", austenitized {austenitizing_temperature_C:g} °C" if austenitizing_temperature_C
                           is not None else "")
              + "; Li et al. (1998), Andrews (1965), Steven & Haynes (1956), Koistinen-Marburger (1959)")
    if inputs is None:
        given = {"grain_size_astm": _record(grain)}
        for key, value in (("austenitizing_temperature_C", austenitizing_temperature_C), ("ms_method", ms_method)):
            if value is not None:
                given[key] = value
        inputs = {"composition": {k: _record(v) for k, v in mass_percent.items()}, "steel": given}
    provenance = {
        "ms_method": ms_key,
        "ferrite_equilibrium": LeverRuleFerrite.method,
        "kinetics": {p.name: p.coefficients.as_dict() for p in products},
        "kinetics_overridden": sorted(kinetics or {}),
        "kinetics_note": LI1998_PROVENANCE,
    }
    return Alloy(
        name=name or default_name,
        model="steel",
        products=tuple(products),
        critical_K=lines,
        critical_methods=methods,
        default_range_K=(lower, upper - UPPER_MARGIN_K),
        martensite=martensite,
        inputs=inputs,
        footer=footer,
        warnings=tuple(warnings),
        provenance=provenance,
        sequence={"pearlite": "ferrite"},
        parent="austenite",
    )


def rebuild(alloy: Alloy, mass_percent=None, kinetics=None) -> Alloy:
    """The steel ``alloy`` built again with its own grain size and options, with another
    analysis (``mass_percent``, e.g. a batch of sampled heats) and/or other kinetics (full
    coefficient sets by product); default the alloy's own. The input record is kept where
    the analysis is."""
    options = alloy.inputs.get("steel", {})
    own = mass_percent is None
    return steel({k: float(v) for k, v in alloy.inputs["composition"].items()} if own else mass_percent,
                 options.get("grain_size_astm"), name=alloy.name,
                 austenitizing_temperature_C=options.get("austenitizing_temperature_C"),
                 ms_method=options.get("ms_method"),
                 kinetics={p.name: p.coefficients for p in alloy.products} if kinetics is None else kinetics,
                 inputs=alloy.inputs if own else None)
