"""Alloy files with ``model = "steel"``: ``[composition]`` (mass %) and ``[steel]``.

``[steel.kinetics.<product>]`` tables override Li et al. (1998) coefficients of ferrite,
pearlite or bainite.
"""

from __future__ import annotations

from pathlib import Path

from ..errors import InputError
from ..products.li1998 import LI1998_KINETICS
from ..products.steel import GRAIN_SIZE_RANGE, MS_METHODS, steel
from ..relations.composition import ELEMENTS
from .schema import Key, read_table

TABLES = ("composition", "steel", "composition_range")

STEEL_KEYS = {
    "grain_size_astm": Key(float, required=True, low=GRAIN_SIZE_RANGE[0], high=GRAIN_SIZE_RANGE[1]),
    "austenitizing_temperature_C": Key(float, low=600.0, high=1350.0, unit="°C"),
    "ms_method": Key(str, choices=tuple(MS_METHODS)),
}
COMPOSITION_KEYS = {symbol: Key(float, low=0.0, high=100.0, unit="mass %") for symbol in ELEMENTS}
_TERM = Key(float, low=-100.0, high=100.0, unit="per mass %")
KINETICS_KEYS = {
    "constant": Key(float, low=-100.0, high=100.0),
    "undercooling_exponent": Key(float, low=0.0, low_open=True, high=10.0),
    "activation_energy_cal_mol": Key(float, low=0.0, low_open=True, high=200_000.0, unit="cal/mol"),
    "activation_energy_J_mol": Key(float, low=0.0, low_open=True, high=840_000.0, unit="J/mol"),
    "grain_size_coefficient": Key(float, low=-2.0, high=2.0),
    **{symbol: _TERM for symbol in ELEMENTS},
    **{f"sqrt_{symbol}": _TERM for symbol in ELEMENTS},
}


def read_kinetics(source, table) -> dict:
    """The ``[steel.kinetics]`` overrides, by product, checked key by key."""
    if not isinstance(table, dict):
        raise InputError(source, "steel.kinetics", "must be a table of products, e.g. [steel.kinetics.ferrite]")
    out = {}
    for product, values in table.items():
        if product not in LI1998_KINETICS:
            raise InputError(source, f"steel.kinetics.{product}",
                             f"unknown product; one of {', '.join(LI1998_KINETICS)}")
        out[product] = read_table(source, f"steel.kinetics.{product}.", values, KINETICS_KEYS)
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
    try:
        return steel(composition, options["grain_size_astm"], name=head["name"],
                     austenitizing_temperature_C=options.get("austenitizing_temperature_C"),
                     ms_method=options.get("ms_method"), kinetics=kinetics, inputs=inputs)
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
    from ..compute.spread import check_ranges

    try:
        return check_ranges({}, out)
    except InputError as exc:
        raise exc.relocated(source) from None
