"""A steel from its heat analysis and grain size: ferrite, pearlite and bainite of a published
empirical model, critical temperatures and martensite, for one heat or a batch of heats.

Two kinetic models are offered, their coefficients as data: Kirkaldy & Venugopalan (1984)
(:mod:`~isokin.products.kirkaldy1984`, the default) and Li et al. (1998)
(:mod:`~isokin.products.li1998`). Where each product may form follows Kirkaldy's scheme,
on which both build, as recalled (not checked against the papers' text): ferrite below Ae3 and
pearlite below Ae1, both only above the model's own Bs; bainite only below that Bs (never above
Ae1); none below Ms. Ferrite is given an empty window wherever carbon is at or above the
eutectoid content of :func:`~isokin.relations.steel_critical.eutectoid_carbon_andrews_1965`.
Critical temperatures come from :mod:`isokin.products.critical`; martensite below Ms from
Koistinen-Marburger (1959).
"""

from __future__ import annotations

import dataclasses
from collections.abc import Mapping
from dataclasses import dataclass, field

import numpy as np

from ..constants import CALORIE_J, celsius_to_kelvin, kelvin_to_celsius
from ..errors import InputError, number, numbers, text
from ..relations.composition import ELEMENTS, Composition, range_warnings
from ..relations.steel_critical import (
    CALIBRATED_RANGES,
    FERRITE_CARBON_MASS_PERCENT,
    KOISTINEN_MARBURGER_ALPHA_PER_K,
    austenite_carbon_mass_balance,
    lever_rule_ferrite_fraction,
)
from .alloy import UPPER_MARGIN_K, Alloy
from .base import as_query, batch_leading, plain, record
from .critical import BS_METHODS, DEFAULT_BS_METHOD, DEFAULT_MS_METHOD, MS_METHODS, critical_temperatures, heats_text
from .kirkaldy1984 import KV1984
from .li1998 import LI1998
from .martensite import Martensite
from .steel_kinetics import PRODUCT_SIGN, SQRT_PREFIX, Coefficients, SteelProduct, term_elements

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
#: Carbon above this (mass %) is cast iron, not steel: the eutectic point of Fe-C.
MAX_STEEL_CARBON = 2.1

#: The kinetic models by the name an alloy file, ``isokin.steel`` and ``--kinetics`` give.
KINETICS_MODELS = {model.key: model for model in (KV1984, LI1998)}
#: The default, chosen by the checks of the kinetics against facts of the trade (README, "How
#: accurate is it"): Kirkaldy & Venugopalan's reaction term gives the measured shape of the
#: pearlite reaction and their bainite finishes at low temperatures in the time practice sees.
DEFAULT_KINETICS = KV1984.key
#: Where each product may form, as the record states it.
DOMAINS = ("Kirkaldy's scheme as recalled (not checked against the papers' text): ferrite below Ae3 and pearlite "
           "below Ae1, both only above the kinetic model's own Bs; bainite only below that Bs and never above Ae1; "
           "none below Ms")
#: The keys of a kinetics override, per product (besides composition terms); energies in either unit.
KINETIC_KEYS = ("constant", "undercooling_exponent", "activation_energy_cal_mol", "activation_energy_J_mol",
                "grain_size_coefficient", "grain_size_offset", "reaction_exponent", "factor",
                "drag_activation_energy_cal_mol", "drag_activation_energy_J_mol", "retardation_constant")
#: Prefixes of the terms of the pearlite drag weight and the bainite retardation in an override.
TERM_PREFIXES = {"drag_": "drag_terms", "retardation_": "retardation_terms"}


class LeverRuleFerrite:
    """Equilibrium share of proeutectoid ferrite at T (lever rule on Andrews' Ae3), for one
    steel or a batch, with the batch leading the query as every product's methods do."""

    method = "lever rule on the Ae3 line of Andrews (1965), eutectoid carbon of the same, 0.02 % C in ferrite"

    def __init__(self, critical, carbon):
        self._arrays = (kelvin_to_celsius(critical.ae3_without_carbon_K), kelvin_to_celsius(critical.ae1_K),
                        np.asarray(carbon, dtype=float), critical.eutectoid_carbon)
        self._batch_ndim = max(np.ndim(a) for a in self._arrays)

    def __call__(self, T_K):
        T, q = as_query(T_K)
        arrays = [batch_leading(a, self._batch_ndim, q) for a in self._arrays]
        return lever_rule_ferrite_fraction(kelvin_to_celsius(T), *arrays)


#: Silicon plus aluminium (mass %) from which bainite forms without carbides, its ferrite
#: rejecting carbon into the austenite as proeutectoid ferrite does: about 1.5 % suppresses
#: cementite in bainite (common practice, from memory: the carbide-free bainitic and TRIP
#: steels carry 1.5 % Si or more).
CARBIDE_FREE_SI_AL = 1.5


@dataclass(frozen=True)
class CarbonBalance:
    """The carbon of the austenite left as products form, by mass balance (one steel or a batch).

    Ferrite rejects its carbon into the austenite (it keeps ``ferrite_carbon``); so does the
    ferrite of carbide-free bainite (``carbide_free``: Si + Al at least
    :data:`CARBIDE_FREE_SI_AL`). Pearlite and bainite with carbides take the austenite's own
    carbon and leave it unchanged. The incomplete bainite reaction of silicon-rich steels
    (which stops where the austenite reaches the T0 carbon) is not modelled.
    """

    carbon: np.ndarray
    carbide_free: np.ndarray
    ferrite_carbon: float = FERRITE_CARBON_MASS_PERCENT
    method: str = ("mass balance: ferrite (and the ferrite of carbide-free bainite, Si + Al >= 1.5 %) keeps 0.02 % C "
                   "and rejects the rest into the austenite; pearlite and bainite with carbides leave it unchanged; "
                   "the incomplete bainite reaction (T0 limit) is not modelled")

    def austenite_carbon(self, shares, ndim):
        """Carbon (mass %) of the austenite left where the products make up ``shares`` of the
        part (product name -> array with the batch leading, ``ndim`` dimensions)."""
        b = len(np.shape(self.carbon))
        rejecting = shares.get("ferrite", 0.0) + shares.get("bainite", 0.0) * batch_leading(self.carbide_free, b, ndim)
        return austenite_carbon_mass_balance(batch_leading(self.carbon, b, ndim), rejecting, self.ferrite_carbon)


class MsOfCarbon:
    """Ms (K) by one correlation for the steel's analysis with another carbon (the enriched
    austenite's), the carbon laid out with the batch leading."""

    def __init__(self, composition: Composition, function):
        self.composition, self.function = composition, function

    def __call__(self, carbon):
        carbon = np.asarray(carbon, dtype=float)
        b, q = len(self.composition.shape), carbon.ndim
        fields = {e: batch_leading(v, b, q) for e, v in self.composition.as_dict().items()}
        fields["C"] = np.clip(carbon, 0.0, MAX_STEEL_CARBON)
        return self.function(Composition(**fields))


@dataclass(frozen=True)
class Calibration:
    """Kinetics fitted to measurements of one steel, to apply to another (the model's own
    composition terms carry the difference): the kinetic model, its coefficient overrides by
    product, and the record of the fit (data file, its hash, the reference analysis, ...)."""

    kinetics_model: str
    kinetics: dict
    record: dict = field(default_factory=dict)


def _valid_term(key: str) -> bool:
    return all(symbol in ELEMENTS for symbol in term_elements(key)) and key.count(PRODUCT_SIGN) <= 1 and \
        not (key.startswith(SQRT_PREFIX) and PRODUCT_SIGN in key)


def kinetics_with(model_key: str = DEFAULT_KINETICS, overrides: Mapping | None = None) -> dict:
    """A kinetic model's coefficients with overrides applied, by product.

    ``overrides`` maps a product name to a :class:`Coefficients` or to a mapping of changes:
    any of :data:`KINETIC_KEYS` and composition terms (``C``, ``sqrt_Mo``, ``Mo*Ni``, and
    ``drag_Mo`` or ``retardation_C`` for the pearlite drag weight and the bainite retardation).

    >>> kinetics_with("li_1998", {"ferrite": {"activation_energy_cal_mol": 27500}})["ferrite"].activation_energy_cal_mol
    27500.0
    """
    kinetics = dict(KINETICS_MODELS[model_key].products)
    for product, change in (overrides or {}).items():
        if product not in kinetics:
            raise InputError(None, "steel.kinetics", f"unknown product '{product}'; one of {', '.join(kinetics)}")
        if isinstance(change, Coefficients):
            kinetics[product] = change
            continue
        change = dict(change)
        for energy in ("activation_energy", "drag_activation_energy"):
            if f"{energy}_cal_mol" in change and f"{energy}_J_mol" in change:
                raise InputError(None, f"steel.kinetics.{product}.{energy}_J_mol",
                                 "give the activation energy once, in cal/mol or in J/mol")
            if f"{energy}_cal_mol" in change:
                change[f"{energy}_J_mol"] = np.asarray(change.pop(f"{energy}_cal_mol"), float) * CALORIE_J
        groups = {"terms": {}, "drag_terms": {}, "retardation_terms": {}}
        for key in list(change):
            if key in KINETIC_KEYS or key.endswith("_J_mol"):
                continue
            prefix = next((p for p in TERM_PREFIXES if key.startswith(p)), None)
            term = key.removeprefix(prefix) if prefix else key
            if not _valid_term(term):
                raise InputError(None, f"steel.kinetics.{product}.{key}",
                                 f"unknown coefficient; one of {', '.join(KINETIC_KEYS)} or a composition term "
                                 "such as C, sqrt_Mo, Mo*Ni, drag_Mo or retardation_C")
            groups[TERM_PREFIXES[prefix] if prefix else "terms"][term] = change.pop(key)
        kinetics[product] = kinetics[product].replace(**change, **{k: v for k, v in groups.items() if v})
    return kinetics


def steel_products(composition: Composition, grain, critical, model, coefficients):
    """Ferrite, pearlite and bainite within their domains (see the module docstring)."""
    ms, start, ae1 = critical.ms_K, critical.bainite_start_K, critical.ae1_K
    reconstructive_low = np.maximum(start, ms)
    empty = ~critical.valid
    windows = {
        "ferrite": (np.where(critical.hypoeutectoid, critical.ae3_K, reconstructive_low), reconstructive_low),
        "pearlite": (ae1, reconstructive_low),
        "bainite": (np.minimum(start, ae1), ms),
    }
    lever = LeverRuleFerrite(critical, composition.C)
    products = []
    for name, (upper, lower) in windows.items():
        upper = np.where(empty, 0.0, upper)
        lower = np.where(empty, 0.0, np.minimum(lower, np.maximum(upper, 0.0)))
        products.append(SteelProduct(name, coefficients[name], composition, grain, upper, lower,
                                     equilibrium=lever if name == "ferrite" else None,
                                     model=f"{model.label}, {model.reference}", calibrated_ranges=model.ranges))
    return products


def element_warnings(model, composition: Composition, critical_elements) -> list[str]:
    """Warnings for elements present that the kinetics, or every model, leaves out."""
    present = [e for e in composition.as_dict() if np.any(getattr(composition, e) > 0)]
    kinetic = model.elements()
    critical_only = [e for e in present if e not in kinetic and e in critical_elements]
    ignored = [e for e in present if e not in kinetic and e not in critical_elements]
    warnings = []
    if critical_only:
        verb = "moves" if len(critical_only) == 1 else "move"
        warnings.append(f"{', '.join(critical_only)} {verb} only the critical temperatures, not the {model.label} "
                        "kinetics, which has no term for them")
    if ignored:
        verb = "enters" if len(ignored) == 1 else "enter"
        they = "it changes" if len(ignored) == 1 else "they change"
        warnings.append(f"{', '.join(ignored)} {verb} none of the models, so {they} nothing in this diagram")
    if "B" in present:
        warnings.append("boron raises hardenability strongly even at 0.001-0.003 %: the real ferrite and pearlite "
                        "curves lie at longer times than drawn")
    return warnings


#: Elements that move Andrews' Ae1/Ae3 (the Ms and Bs correlations read fewer).
CRITICAL_ELEMENTS = ("C", "Mn", "Si", "Ni", "Cr", "Mo", "V", "W", "Cu", "P", "Al", "As", "Ti")


def _as_mapping(composition):
    """A mapping of element to contents from a mapping or a table with one row per heat."""
    if hasattr(composition, "columns") and hasattr(composition, "to_numpy"):
        # each column through the shared check: a text cell is named by its column, not converted
        return {str(c): numbers(f"composition.{c}" if str(c) != "grain_size_astm" else "steel.grain_size_astm",
                                composition[c].to_numpy()) for c in composition.columns}
    if not isinstance(composition, Mapping):
        raise InputError(None, "composition", "must map element symbols to mass %, e.g. {'C': 0.4, 'Mn': 0.8}")
    return dict(composition)


def _choice(key, value, choices, default):
    if value is None:
        return default
    if value not in choices:
        raise InputError(None, key, f"must be one of {', '.join(map(repr, choices))}, got {value!r}")
    return value


def _composition(mass_percent):
    try:
        comp = Composition.from_dict(mass_percent)
    except ValueError as exc:
        raise InputError(None, "composition", str(exc)) from None
    if "C" not in mass_percent:
        raise InputError(None, "composition", "carbon (C) is required: the steel models depend on it")
    if np.any(comp.C > MAX_STEEL_CARBON):
        raise InputError(None, "composition", f"carbon above {MAX_STEEL_CARBON:g} mass % is cast iron, not steel "
                         f"(got {float(np.max(comp.C)):g}); the steel models do not apply")
    return comp


def _grain(grain_size_astm, shape):
    low, high = GRAIN_SIZE_RANGE
    grain = numbers("steel.grain_size_astm", DEFAULT_GRAIN_SIZE_ASTM if grain_size_astm is None else grain_size_astm,
                    low, high, unit="(ASTM E112 numbers; -1 is 00)")
    try:
        np.broadcast_shapes(shape, grain.shape)
    except ValueError:
        raise InputError(None, "steel.grain_size_astm",
                         f"has shape {grain.shape}, which does not match the {shape} heats") from None
    return grain


def _lines(critical, martensite):
    """The labelled temperatures a diagram draws, K: NaN where a heat lacks one, left out where all do."""
    valid = critical.valid
    lines = {"Ae3": np.where(critical.hypoeutectoid & valid, critical.ae3_K, np.nan),
             "Ae1": np.where(valid, critical.ae1_K, np.nan),
             "Bs": np.where((critical.bs_K > 0.0) & valid, critical.bs_K, np.nan),
             "Ms": np.where((critical.ms_K > 0.0) & valid, critical.ms_K, np.nan),
             "M50": martensite.temperature_for_fraction(0.5), "M90": martensite.temperature_for_fraction(0.9)}
    warnings = []
    for key in ("M50", "M90"):
        never = (lines[key] <= 0.0) & (critical.ms_K > 0.0) & valid
        if np.any(never):
            warnings.append(f"{key} by Koistinen-Marburger lies below absolute zero{heats_text(never)}: that much "
                            "martensite is never reached on cooling, and the line is left out")
        lines[key] = np.where((lines[key] > 0.0) & np.isfinite(lines["Ms"]), lines[key], np.nan)
    return {k: plain(v) for k, v in lines.items() if np.any(np.isfinite(v))}, warnings


def steel(composition, grain_size_astm=None, *, name=None, austenitizing_temperature_C=None, ms_method=None,
          bs_method=None, kinetics_model=None, kinetics=None, calibration: Calibration | None = None,
          inputs=None) -> Alloy:
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
    ms_method, bs_method : str, optional
        Keys of :data:`~isokin.products.critical.MS_METHODS` and ``BS_METHODS``; default van
        Bohemen (2012) for both (chosen by the shared measured data).
    kinetics_model : str, optional
        A key of :data:`KINETICS_MODELS`; default :data:`DEFAULT_KINETICS`.
    kinetics : mapping, optional
        Overrides of the kinetic coefficients by product, e.g.
        ``{"ferrite": {"activation_energy_cal_mol": 27500}}`` (see :func:`kinetics_with`).
    calibration : Calibration, optional
        Kinetics fitted to another heat (:func:`isokin.load_calibration`), applied to this
        analysis; ``kinetics`` given as well apply on top.
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
    name = None if name is None else text("name", name)
    mass_percent = _as_mapping(composition)
    if "grain_size_astm" in mass_percent:
        if grain_size_astm is not None:
            raise InputError(None, "steel.grain_size_astm", "is given both as a column and as an argument; give it once")
        grain_size_astm = mass_percent.pop("grain_size_astm")
    comp = _composition(mass_percent)
    grain = _grain(grain_size_astm, comp.shape)
    ms_method = _choice("steel.ms_method", ms_method, MS_METHODS, DEFAULT_MS_METHOD)
    bs_method = _choice("steel.bs_method", bs_method, BS_METHODS, DEFAULT_BS_METHOD)
    model_key, overrides, coefficients = _kinetics(kinetics_model, kinetics, calibration)
    model = KINETICS_MODELS[model_key]
    _check_austenitizing(austenitizing_temperature_C)

    critical = critical_temperatures(comp, ms_method, bs_method, model.bainite_start)
    batch = np.broadcast_shapes(comp.shape, grain.shape, *(np.shape(v) for c in coefficients.values()
                                                            for v in c.batch_values()))
    grain = np.broadcast_to(grain, batch)
    products = steel_products(comp, grain, critical, model, coefficients)
    martensite = Martensite(np.where(critical.valid, critical.ms_K, 0.0), ms_method=MS_METHODS[ms_method][1],
                            ms_of_carbon=MsOfCarbon(comp, MS_METHODS[ms_method][0]))
    lines, line_warnings = _lines(critical, martensite)
    valid = critical.valid & np.all([p.valid for p in products], axis=0)
    if np.any(~valid & critical.valid):
        line_warnings.append(_no_time_scale(model, ~valid & critical.valid, single=batch == ()))
        products = steel_products(comp, grain, dataclasses.replace(critical, valid=valid), model, coefficients)
    assumed = [] if grain_size_astm is not None else [f"no grain size given; taking ASTM {DEFAULT_GRAIN_SIZE_ASTM:g}"]
    warnings = [*assumed, *critical.warnings, *line_warnings,
                *_analysis_warnings(comp, critical, model, austenitizing_temperature_C)]

    options = {"grain_size_astm": record(grain if batch != () else float(grain)), "ms_method": ms_method,
               "bs_method": bs_method, "kinetics_model": model_key}
    if austenitizing_temperature_C is not None:
        options["austenitizing_temperature_C"] = austenitizing_temperature_C
    if inputs is None:
        inputs = {"composition": {k: record(v) for k, v in mass_percent.items()}, "steel": dict(options)}
    carbon_balance = CarbonBalance(np.asarray(comp.C), np.asarray(comp.Si + comp.Al >= CARBIDE_FREE_SI_AL))
    methods = {k: critical.methods[k] for k in lines if k in critical.methods}
    km = f"Koistinen-Marburger (1959), alpha = {KOISTINEN_MARBURGER_ALPHA_PER_K} /K, from Ms of {MS_METHODS[ms_method][1]}"
    methods.update({k: km for k in ("M50", "M90") if k in lines})
    provenance = {"ms_method": ms_method, "bs_method": bs_method, "kinetics_model": model_key,
                  **_kinetics_provenance(model, critical, products, overrides), "austenite_carbon": carbon_balance.method}
    if calibration is not None:
        provenance["calibration"] = dict(calibration.record)
    described, default_name = _described(mass_percent, grain, batch)
    footer = (described + (f", austenitized {austenitizing_temperature_C:g} °C" if austenitizing_temperature_C
                           is not None else "")
              + f"; {model.label}, Andrews (1965), Ms {MS_METHODS[ms_method][1]}, Bs {BS_METHODS[bs_method][1]}, "
                "Koistinen-Marburger (1959)" + ("; calibrated" if calibration is not None else ""))
    return Alloy(
        name=name or default_name,
        model="steel",
        products=tuple(products),
        critical_K=lines,
        critical_methods=methods,
        default_range_K=_default_range(products, valid, lines),
        martensite=martensite,
        inputs=inputs,
        footer=footer,
        warnings=tuple(dict.fromkeys(warnings)),
        provenance=provenance,
        sequence={"pearlite": "ferrite"},
        parent="austenite",
        composition=comp,
        options={**options, "kinetics": coefficients, "calibration": calibration},
        builder=rebuild,
        carbon_balance=carbon_balance,
        valid=None if batch == () else np.broadcast_to(valid, batch),
    )


def _kinetics(kinetics_model, kinetics, calibration):
    """The kinetic model's key, the products overridden and the full coefficients: the
    calibration's kinetics first, ``kinetics`` on top."""
    if calibration is not None:
        if kinetics_model is not None and kinetics_model != calibration.kinetics_model:
            raise InputError(None, "steel.kinetics_model", f"is {kinetics_model!r}, but the calibration was fitted "
                             f"with {calibration.kinetics_model!r}; give that model or none")
        kinetics_model = calibration.kinetics_model
    model_key = kinetics_model_key(kinetics_model)
    overrides = {**(calibration.kinetics if calibration is not None else {})}
    for product, change in (kinetics or {}).items():
        base = overrides.get(product, {})
        overrides[product] = change if isinstance(change, Coefficients) or isinstance(base, Coefficients) \
            else {**base, **change}
    return model_key, overrides, kinetics_with(model_key, overrides)


def _kinetics_provenance(model, critical, products, overrides):
    """What the record says of the kinetics: the model, where each product forms and its coefficients."""
    return {
        "kinetics_reference": model.reference,
        "bainite_start": {"method": critical.methods["bainite_start"],
                          # none (null) where the heat is invalid or its Bs lies below absolute zero
                          "temperature_C": record(np.where(critical.valid & (critical.bainite_start_K > 0.0),
                                                            kelvin_to_celsius(critical.bainite_start_K), np.nan))},
        "product_domains": DOMAINS,
        "ferrite_equilibrium": LeverRuleFerrite.method,
        "kinetics": {p.name: p.coefficients.as_dict() for p in products},
        "kinetics_overridden": sorted(overrides),
        "kinetics_note": model.provenance,
    }


def kinetics_model_key(value=None) -> str:
    """The key of a kinetic model as given (default :data:`DEFAULT_KINETICS`); InputError unless
    it is one of :data:`KINETICS_MODELS`."""
    return _choice("steel.kinetics_model", value, KINETICS_MODELS, DEFAULT_KINETICS)


def _check_austenitizing(temperature_C):
    if temperature_C is not None:
        number("steel.austenitizing_temperature_C", temperature_C, *AUSTENITIZING_RANGE_C, unit="°C")


def _no_time_scale(model, heats, single):
    """The warning for heats the kinetics cannot time (refused outright for a single heat)."""
    text = (f"the {model.label} kinetics has no time scale for this analysis (its ferrite factor is zero without "
            "Mn, Ni, Cr and Mo): give the Mn of the heat, or choose the Li et al. (1998) kinetics "
            "(kinetics_model = 'li_1998', --kinetics li_1998)")
    if single:
        raise InputError(None, "composition", text)
    return text + f"; such heats are left out{heats_text(heats)}"


def _analysis_warnings(comp, critical, model, austenitizing_temperature_C):
    """Calibrated ranges, elements no model reads, hypereutectoid carbon and an austenitizing
    temperature below full austenite."""
    warnings = range_warnings(comp, model.ranges, model.label)
    for source in dict.fromkeys(critical.range_keys):
        warnings += range_warnings(comp, CALIBRATED_RANGES[source], source)
    warnings += element_warnings(model, comp, CRITICAL_ELEMENTS)
    hyper = ~critical.hypoeutectoid & critical.valid
    if np.any(hyper):
        warnings.append(f"carbon is at or above the eutectoid content{heats_text(hyper)}: no proeutectoid ferrite; "
                        "proeutectoid cementite (Acm) is not modelled")
    if austenitizing_temperature_C is not None:
        full = critical.ae3_K  # Ae1 at and above the eutectoid carbon
        cold = (celsius_to_kelvin(austenitizing_temperature_C) <= full) & critical.valid
        if np.any(cold):
            label = "Ae3" if np.all(critical.hypoeutectoid) else "Ae1" if not np.any(critical.hypoeutectoid) else None
            at = (f"{label} ({kelvin_to_celsius(float(full)):.0f} °C)" if np.ndim(full) == 0 and label
                  else f"the full-austenite temperature{heats_text(cold)}")
            warnings.append(f"austenitizing at {austenitizing_temperature_C:g} °C is not above {at}: the models "
                            "assume fully austenitized steel, so the diagram does not describe this treatment")
    return warnings


def _default_range(products, valid, lines):
    """The diagram's default temperature range, K: from below M90 (or M50, or Ms) to the
    highest product's upper temperature less the margin."""
    uppers = [np.max(np.where(valid, p.upper_K, -np.inf)) for p in products]
    upper = max(float(u) for u in uppers) if np.any(valid) else celsius_to_kelvin(900.0)
    line = next((lines[k] for k in ("M90", "M50", "Ms") if k in lines), None)  # each holds a finite value
    lowest = np.nan if line is None else np.nanmin(np.asarray(line, dtype=float))
    lower = max(float(lowest) - BELOW_M90_K if np.isfinite(lowest) else -np.inf, celsius_to_kelvin(LOWEST_DEFAULT_C))
    return lower, upper - UPPER_MARGIN_K


def _described(mass_percent, grain, batch):
    """The figure footer's description of the steel, and its default name."""
    if batch != ():
        return f"{int(np.prod(batch))} heats", f"batch of {int(np.prod(batch))} heats"
    analysis = ", ".join(f"{k} {float(v):g}" for k, v in mass_percent.items() if float(v) > 0)
    return (f"{analysis} mass %, ASTM grain size {float(grain):g}",
            "heat analysis " + ", ".join(f"{k} {float(v):g}" for k, v in mass_percent.items()))


def rebuild(alloy: Alloy, mass_percent=None, kinetics=None) -> Alloy:
    """The steel ``alloy`` built again with its own grain size, options and calibration, with
    another analysis (``mass_percent``, e.g. a batch of sampled heats) and/or other kinetics
    (full coefficient sets by product); default the alloy's own. The input record is kept
    where the analysis is."""
    options = alloy.options
    own = mass_percent is None
    if own:
        mass_percent = {e: np.asarray(v) for e, v in alloy.composition.as_dict().items()
                        if e == "C" or np.any(np.asarray(v) > 0)}
    rebuilt = steel(mass_percent, options["grain_size_astm"], name=alloy.name,
                    austenitizing_temperature_C=options.get("austenitizing_temperature_C"),
                    ms_method=options["ms_method"], bs_method=options["bs_method"],
                    kinetics_model=options["kinetics_model"],
                    kinetics=options["kinetics"] if kinetics is None else kinetics,
                    calibration=options.get("calibration"), inputs=alloy.inputs if own else None)
    return rebuilt
