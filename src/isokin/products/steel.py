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
    ae3_andrews_1965,
    bs_steven_haynes_1956,
    eutectoid_carbon_andrews_1965,
    ms_andrews_1965_linear,
    ms_andrews_1965_product,
    ms_steven_haynes_1956,
)
from .alloy import UPPER_MARGIN_K, Alloy
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
#: The keys of a kinetics override, per product; activation energy in either unit.
KINETIC_KEYS = ("constant", "undercooling_exponent", "activation_energy_cal_mol", "activation_energy_J_mol",
                "grain_size_coefficient")


class CriticalTemperature(NamedTuple):
    """A critical temperature and the method that gave it."""

    value_K: float | np.ndarray
    method: str


def _plain(value):
    value = np.asarray(value)
    return float(value) if value.ndim == 0 else value


def _ms(composition: Composition, ms_method: str | None):
    """Ms (K), its label, the name of the method and the calibrated-range keys it used."""
    if ms_method is not None:
        function, label, ranges = MS_METHODS[ms_method]
        return function(composition), label, ms_method, [ranges]
    high = composition.C > LINEAR_MS_CARBON_LIMIT
    linear = MS_METHODS["andrews_1965"]
    product = MS_METHODS["andrews_1965_product"]
    if not np.any(high):
        return linear[0](composition), linear[1], "andrews_1965", [linear[2]]
    if np.all(high):
        return (product[0](composition), f"{product[1]} (chosen above {LINEAR_MS_CARBON_LIMIT:g} % C)",
                "andrews_1965_product", [product[2]])
    ms = np.where(high, product[0](composition), linear[0](composition))
    return (ms, f"Andrews (1965): linear up to {LINEAR_MS_CARBON_LIMIT:g} % C, product form above",
            "andrews_1965 / andrews_1965_product by carbon", [linear[2]])


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
    ms, ms_label, _, _ = _ms(composition, ms_method)
    ae1 = ae1_andrews_1965(composition)
    hypoeutectoid = composition.C < eutectoid_carbon_andrews_1965(composition)
    ae3 = np.where(hypoeutectoid, ae3_andrews_1965(composition), ae1)
    bs = bs_steven_haynes_1956(composition)
    uppers = {"ferrite": np.where(hypoeutectoid, ae3, ms), "pearlite": ae1, "bainite": bs}
    products = [Li1998Product(name, coefficients[name], composition, grain_size_astm, upper, ms)
                for name, upper in uppers.items()]
    martensite = Martensite(ms, ms_method=ms_label)
    km = f"Koistinen-Marburger (1959), alpha = {KOISTINEN_MARBURGER_ALPHA_PER_K} /K, from Ms of {ms_label}"
    critical = {
        "Ae3": CriticalTemperature(_plain(ae3), "Andrews (1965); equals Ae1 at or above eutectoid C"),
        "Ae1": CriticalTemperature(_plain(ae1), "Andrews (1965)"),
        "Bs": CriticalTemperature(_plain(bs), "Steven & Haynes (1956)"),
        "Ms": CriticalTemperature(_plain(ms), ms_label),
        "M50": CriticalTemperature(_plain(martensite.temperature_for_fraction(0.5)), km),
        "M90": CriticalTemperature(_plain(martensite.temperature_for_fraction(0.9)), km),
    }
    return products, martensite, critical


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

    products, martensite, critical = li1998_products(comp, grain, ms_method, kinetics)
    _, _, ms_key, ms_ranges = _ms(comp, ms_method)
    hypereutectoid = critical["Ae3"].value_K <= critical["Ae1"].value_K
    lines = {k: np.where(hypereutectoid, np.nan, v.value_K) if k == "Ae3" else v.value_K
             for k, v in critical.items()}
    if np.all(hypereutectoid):
        del lines["Ae3"]
    lines = {k: _plain(v) for k, v in lines.items()}
    methods = {k: critical[k].method for k in lines}

    warnings = range_warnings(comp, products[0].calibrated_ranges, "Li et al. (1998)")
    for source in dict.fromkeys(["Andrews (1965), Ae1/Ae3", "Steven & Haynes (1956)", *ms_ranges]):
        warnings += range_warnings(comp, CALIBRATED_RANGES[source], source)
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
    lower = max(float(np.min(lines["M90"])) - BELOW_M90_K, celsius_to_kelvin(LOWEST_DEFAULT_C))
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
    )
