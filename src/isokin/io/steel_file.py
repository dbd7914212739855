"""Alloy files with ``model = "steel"``: ``[composition]`` (mass %) and ``[steel]``.

``[steel] kinetics_model`` picks the kinetic model; ``[steel.kinetics.<product>]`` tables
override its coefficients of ferrite, pearlite or bainite.
"""

from __future__ import annotations

import difflib
from pathlib import Path

from ..compute.section import hardness_band
from ..compute.spread import check_ranges
from ..errors import InputError
from ..products.critical import BS_METHODS, MS_METHODS
from ..products.steel import (
    DEFAULT_KINETICS,
    GRAIN_SIZE_RANGE,
    KINETICS_MODELS,
    TERM_PREFIXES,
    Calibration,
    steel,
)
from ..products.steel_kinetics import PRODUCT_SIGN, SQRT_PREFIX
from ..relations.composition import ELEMENTS
from .alloy_file import load_alloy
from .schema import Key, read_table

TABLES = ("composition", "steel", "composition_range", "hardenability_band")

STEEL_KEYS = {
    "grain_size_astm": Key(float, required=True, low=GRAIN_SIZE_RANGE[0], high=GRAIN_SIZE_RANGE[1]),
    "austenitizing_temperature_C": Key(float, low=600.0, high=1350.0, unit="°C"),
    "ms_method": Key(str, choices=tuple(MS_METHODS)),
    "bs_method": Key(str, choices=tuple(BS_METHODS)),
    "kinetics_model": Key(str, choices=tuple(KINETICS_MODELS)),
}
COMPOSITION_KEYS = {symbol: Key(float, low=0.0, high=100.0, unit="mass %") for symbol in ELEMENTS}
_TERM = Key(float, low=-100.0, high=1000.0, unit="per mass %")
_TERMS = ([*ELEMENTS, *(SQRT_PREFIX + e for e in ELEMENTS),
           *(f"{a}{PRODUCT_SIGN}{b}" for a in ELEMENTS for b in ELEMENTS if a != b)]
          + [prefix + e for prefix in TERM_PREFIXES for e in ELEMENTS])
_SCALARS = {
    "constant": Key(float, low=-100.0, high=1000.0),
    "undercooling_exponent": Key(float, low=0.0, low_open=True, high=10.0),
    "activation_energy_cal_mol": Key(float, low=0.0, low_open=True, high=200_000.0, unit="cal/mol"),
    "activation_energy_J_mol": Key(float, low=0.0, low_open=True, high=840_000.0, unit="J/mol"),
    "drag_activation_energy_cal_mol": Key(float, low=0.0, high=200_000.0, unit="cal/mol"),
    "drag_activation_energy_J_mol": Key(float, low=0.0, high=840_000.0, unit="J/mol"),
    "grain_size_coefficient": Key(float, low=-2.0, high=2.0),
    "grain_size_offset": Key(float, low=-2.0, high=15.0),
    "reaction_exponent": Key(float, low=0.0, low_open=True, high=0.95),
    "retardation_constant": Key(float, low=-100.0, high=100.0),
    "factor": Key(float, low=0.0, low_open=True, high=1e12),
}
KINETICS_KEYS = {**_SCALARS, **{term: _TERM for term in _TERMS}}


def read_kinetics(source, table) -> dict:
    """The ``[steel.kinetics]`` overrides, by product, checked key by key."""
    if not isinstance(table, dict):
        raise InputError(source, "steel.kinetics", "must be a table of products, e.g. [steel.kinetics.ferrite]")
    products = ("ferrite", "pearlite", "bainite")
    out = {}
    for product, values in table.items():
        where = f"steel.kinetics.{product}"
        if product not in products:
            raise InputError(source, where, f"unknown product; one of {', '.join(products)}")
        if not isinstance(values, dict):
            raise InputError(source, where, "must be a table of coefficients")
        for key in values:
            if key not in KINETICS_KEYS:
                near = difflib.get_close_matches(key, list(KINETICS_KEYS), n=1, cutoff=0.6)
                hint = (f"did you mean '{near[0]}'?" if near else
                        f"one of {', '.join(_SCALARS)} or a composition term such as C, sqrt_Mo, \"Mo*Ni\", drag_Mo "
                        "or retardation_C")
                raise InputError(source, f"{where}.{key}", f"unknown key; {hint}")
        out[product] = read_table(source, where + ".", values, KINETICS_KEYS)
    return out


def load(source: Path, head: dict, data: dict):
    if "composition" not in data:
        raise InputError(source, "composition", "required table [composition] (mass %, e.g. C = 0.40) is missing")
    if "steel" not in data:
        raise InputError(source, "steel", "required table [steel] with grain_size_astm is missing")
    composition = read_table(source, "composition.", data["composition"], COMPOSITION_KEYS)
    raw = data["steel"]
    if isinstance(raw, dict) and "kinetics" in raw:
        kinetics = read_kinetics(source, raw["kinetics"])
        raw = {k: v for k, v in raw.items() if k != "kinetics"}
    else:
        kinetics = None
    options = read_table(source, "steel.", raw, STEEL_KEYS)
    inputs = {"alloy": data["alloy"], "composition": data["composition"], "steel": data["steel"]}
    if "composition_range" in data:
        read_ranges(source, data["composition_range"])  # checked now, used by spread and worst-case plans
        inputs["composition_range"] = data["composition_range"]
    if "hardenability_band" in data:
        try:
            hardness_band(data["hardenability_band"])  # checked now, used by the end-quench test
        except InputError as exc:
            raise exc.relocated(source) from None
        inputs["hardenability_band"] = data["hardenability_band"]
    try:
        return steel(composition, options["grain_size_astm"], name=head["name"],
                     austenitizing_temperature_C=options.get("austenitizing_temperature_C"),
                     ms_method=options.get("ms_method"), bs_method=options.get("bs_method"),
                     kinetics_model=options.get("kinetics_model"), kinetics=kinetics, inputs=inputs)
    except InputError as exc:
        raise exc.relocated(source) from None


def read_ranges(source, table) -> dict:
    """[composition_range]: element = [min, max] (a standard's range), or element = { nominal = x,
    uncertainty = s } (a heat analysis with one standard deviation), mass %."""
    if not isinstance(table, dict):
        raise InputError(source, "composition_range", "must be a table of elements")
    out = {}
    for element, spec in table.items():
        where = f"composition_range.{element}"
        if element not in ELEMENTS:
            raise InputError(source, where, f"unknown element; one of {', '.join(ELEMENTS)}")
        if isinstance(spec, list):
            if len(spec) != 2 or not all(isinstance(v, (int, float)) and not isinstance(v, bool) for v in spec):
                raise InputError(source, where, "must be [min, max] in mass %, e.g. [0.38, 0.43]")
            out[element] = ("range", float(spec[0]), float(spec[1]))
        elif isinstance(spec, dict):
            values = read_table(source, where + ".", spec, {"nominal": Key(float, required=True, low=0.0, high=100.0),
                                                             "uncertainty": Key(float, required=True, low=0.0,
                                                                                high=100.0)})
            out[element] = ("normal", values["nominal"], values["uncertainty"])
        else:
            raise InputError(source, where, "must be [min, max] or { nominal = ..., uncertainty = ... }")
    try:
        return check_ranges(out)
    except InputError as exc:
        raise exc.relocated(source) from None


def load_calibration(path) -> Calibration:
    """The fitted kinetics of a calibrated steel file (one ``isokin fit`` wrote), to apply to
    another analysis: its kinetic model, its ``[steel.kinetics]`` overrides and the record of
    the fit with the reference analysis and the file it came from."""
    path = Path(path)
    alloy = load_alloy(path)  # checks every table as an alloy file, and keeps them as read
    data = alloy.inputs
    if alloy.model != "steel":
        raise InputError(path, "alloy.model", "a calibration to apply to a steel heat comes from a steel file")
    if "calibration" not in data:
        raise InputError(path, "calibration", "no [calibration] record: give the calibrated file that isokin fit wrote")
    steel_table = data["steel"]
    kinetics = read_kinetics(path, steel_table["kinetics"]) if "kinetics" in steel_table else {}
    record = {"file": str(path), "reference_alloy": alloy.name, "reference_composition": dict(data["composition"]),
              **data["calibration"]}
    return Calibration(kinetics_model=steel_table.get("kinetics_model", DEFAULT_KINETICS), kinetics=kinetics,
                       record=record)
