"""Steel alloy files and inline heat analyses turned into an AlloyModel.

A steel is given by its heat analysis (mass %, iron the balance), its ASTM austenite grain
size and, optionally, its austenitizing temperature; the products and critical temperatures
come from the published empirical models in :mod:`isokin.steel`.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

from .alloy import AlloyModel, Key, read_table
from .constants import celsius_to_kelvin, kelvin_to_celsius
from .diagram import UPPER_MARGIN_K
from .errors import InputError
from .steel.composition import ELEMENTS, Composition, range_warnings
from .steel.critical import CALIBRATED_RANGES
from .steel.li1998 import MS_METHODS, li1998_products

#: ASTM E112 grain size numbers run from 00 (written -1 here) to about 14.
GRAIN_SIZE_RANGE = (-1.0, 14.0)
#: A medium grain size, common for forged and normalised steels, used when none is given.
DEFAULT_GRAIN_SIZE_ASTM = 7.0
#: The diagram's default lower end lies this far below M90, K, so the martensite lines show.
BELOW_M90_K = 25.0
#: ...but not below this, °C: sub-zero treatment goes no colder in common practice.
LOWEST_DEFAULT_C = -196.0

STEEL_KEYS = {
    "grain_size_astm": Key(float, required=True, low=GRAIN_SIZE_RANGE[0], high=GRAIN_SIZE_RANGE[1]),
    "austenitizing_temperature_C": Key(float, low=600.0, high=1350.0, unit="°C"),
    "ms_method": Key(str, choices=tuple(MS_METHODS)),
}
COMPOSITION_KEYS = {symbol: Key(float, low=0.0, high=100.0, unit="mass %") for symbol in ELEMENTS}


def steel_model_from_tables(source: Path, head: dict, data: dict) -> AlloyModel:
    """Build the steel model from the [composition] and [steel] tables of an alloy file."""
    if "composition" not in data:
        raise InputError(source, "composition", "required table [composition] (mass %, e.g. C = 0.40) is missing")
    if "steel" not in data:
        raise InputError(source, "steel", "required table [steel] with grain_size_astm is missing")
    composition = read_table(source, "composition.", data["composition"], COMPOSITION_KEYS)
    steel = read_table(source, "steel.", data["steel"], STEEL_KEYS)
    inputs = {"alloy": data["alloy"], "composition": data["composition"], "steel": data["steel"]}
    return build_steel_model(source, head["name"], composition, steel, inputs)


def parse_inline_composition(text: str) -> dict:
    """'C=0.79,Mn=0.76' -> {'C': 0.79, 'Mn': 0.76}; raises InputError on a malformed entry."""
    out = {}
    for item in filter(None, (s.strip() for s in text.replace(";", ",").split(","))):
        symbol, sep, value = item.partition("=")
        symbol = symbol.strip()
        try:
            number = float(value)
        except ValueError:
            number = None
        if not sep or not symbol or number is None:
            raise InputError(None, "--composition", f"'{item}' is not of the form Element=mass%, e.g. C=0.79")
        if symbol in out:
            raise InputError(None, "--composition", f"{symbol} is given twice")
        out[symbol] = number
    if not out:
        raise InputError(None, "--composition", 'is empty; give e.g. "C=0.79,Mn=0.76"')
    return out


def steel_model_inline(text: str, grain_size_astm: float | None) -> AlloyModel:
    """The steel model of a heat analysis given on the command line."""
    composition = parse_inline_composition(text)
    notes = []
    if grain_size_astm is None:
        grain_size_astm = DEFAULT_GRAIN_SIZE_ASTM
        notes.append(f"no --grain-size given; taking ASTM {DEFAULT_GRAIN_SIZE_ASTM:g}")
    low, high = GRAIN_SIZE_RANGE
    if not low <= grain_size_astm <= high:
        raise InputError(None, "--grain-size", f"must be an ASTM E112 number from {low:g} (00) to {high:g}, got {grain_size_astm:g}")
    name = "heat analysis " + ", ".join(f"{k} {v:g}" for k, v in composition.items())
    inputs = {"composition": composition, "steel": {"grain_size_astm": grain_size_astm}}
    model = build_steel_model(None, name, composition, {"grain_size_astm": grain_size_astm}, inputs)
    model.warnings[:0] = notes
    return model


def _composition(source, where, mass_percent) -> Composition:
    try:
        return Composition.from_dict(mass_percent)
    except ValueError as exc:
        raise InputError(source, where, str(exc)) from None


def build_steel_model(source, name: str, mass_percent: dict, steel: dict, inputs: dict) -> AlloyModel:
    where = "composition" if source is not None else "--composition"
    composition = _composition(source, where, mass_percent)
    if "C" not in mass_percent:
        raise InputError(source, where, "carbon (C) is required: the steel models depend on it")
    grain = steel["grain_size_astm"]
    ms_method = steel.get("ms_method", "andrews_1965")
    products, critical = li1998_products(composition, grain, ms_method)
    hypereutectoid = critical["Ae3"].value_K <= critical["Ae1"].value_K
    lines = {k: float(v.value_K) for k, v in critical.items() if not (k == "Ae3" and hypereutectoid)}
    methods = {k: v.method for k, v in critical.items() if k in lines}
    warnings = range_warnings(composition, products[0].calibrated_ranges, "Li et al. (1998)")
    used = ["Andrews (1965), Ae1/Ae3", "Steven & Haynes (1956)"]
    if ms_method == "andrews_1965":
        used.append("Andrews (1965), linear Ms")
    for source in used:
        warnings += range_warnings(composition, CALIBRATED_RANGES[source], source)
    if hypereutectoid:
        warnings.append("carbon is at or above the eutectoid content: no proeutectoid ferrite; "
                        "proeutectoid cementite (Acm) is not modelled")
    if "austenitizing_temperature_C" in steel:
        t_aus = celsius_to_kelvin(steel["austenitizing_temperature_C"])
        full = max(lines.get("Ae3", 0.0), lines["Ae1"])
        if t_aus <= full:
            warnings.append(
                f"austenitizing at {steel['austenitizing_temperature_C']:g} °C is not above "
                f"{'Ae3' if 'Ae3' in lines else 'Ae1'} ({kelvin_to_celsius(full):.0f} °C): the models assume "
                "fully austenitized steel, so the diagram does not describe this treatment"
            )
    upper = max(float(np.max(p.upper_K)) for p in products)
    lower = max(lines["M90"] - BELOW_M90_K, celsius_to_kelvin(LOWEST_DEFAULT_C))
    analysis = ", ".join(f"{k} {float(v):g}" for k, v in mass_percent.items() if float(v) > 0)
    footer = (f"{analysis} mass %, ASTM grain size {grain:g}"
              + (f", austenitized {steel['austenitizing_temperature_C']:g} °C" if "austenitizing_temperature_C" in steel else "")
              + "; Li et al. (1998), Andrews (1965), Steven & Haynes (1956), Koistinen-Marburger (1959)")
    return AlloyModel(
        name=name,
        model="steel",
        products=products,
        lines_K=lines,
        line_methods=methods,
        default_range_K=(lower, upper - UPPER_MARGIN_K),
        inputs=inputs,
        footer=footer,
        warnings=warnings,
    )
