"""Alloy files (TOML) read, checked and turned into products.

Two models share one file family: ``model = "nucleation-growth"`` with physical parameters
per product, and ``model = "steel"`` with a composition and austenite grain size.  Checking
is done here, once, so that the physics never sees a bad value.
"""

from __future__ import annotations

import difflib
import math
import tomllib
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pandas as pd

from .constants import celsius_to_kelvin
from .driving_force import DrivingForceTable
from .diagram import UPPER_MARGIN_K
from .errors import InputError
from .nucleation_growth import DRIVING_FORCE_FORMS, NucleationGrowthParameters, NucleationGrowthProduct
from .jmak import MODES

MODELS = ("nucleation-growth", "steel")


@dataclass
class AlloyModel:
    """What every later step needs from an alloy: its products and its reference lines.

    ``lines_K`` holds labelled horizontal lines for the figure (an equilibrium temperature,
    or Ae3, Ae1, Bs, Ms, M50, M90), ``line_methods`` the method behind each one.
    """

    name: str
    model: str
    products: list
    lines_K: dict
    line_methods: dict
    default_range_K: tuple
    inputs: dict
    footer: str
    warnings: list = field(default_factory=list)
    default_points: int | None = None


# ---------------------------------------------------------------- key checking


@dataclass(frozen=True)
class Key:
    """One key of a table: its type, whether it is required, and its allowed range."""

    kind: type
    required: bool = False
    low: float | None = None
    high: float | None = None
    low_open: bool = False  # True: the value must be strictly greater than low
    choices: tuple = ()
    unit: str = ""


def _check_value(source, where, name, key: Key, value):
    label = f"{where}{name}"
    if key.kind is float:
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            raise InputError(source, label, f"must be a number{' in ' + key.unit if key.unit else ''}, got {value!r}")
        value = float(value)
        if not math.isfinite(value):
            raise InputError(source, label, f"must be a finite number, got {value!r}")
    elif key.kind is int:
        if isinstance(value, bool) or not isinstance(value, int):
            raise InputError(source, label, f"must be a whole number, got {value!r}")
    elif key.kind is str:
        if not isinstance(value, str) or not value.strip():
            raise InputError(source, label, f"must be a non-empty text, got {value!r}")
    if key.choices and value not in key.choices:
        raise InputError(source, label, f"must be one of {', '.join(map(repr, key.choices))}, got {value!r}")
    unit = f" {key.unit}" if key.unit else ""
    if key.low is not None and (value <= key.low if key.low_open else value < key.low):
        rel = ">" if key.low_open else ">="
        raise InputError(source, label, f"must be {rel} {key.low:g}{unit}, got {value:g}")
    if key.high is not None and value > key.high:
        raise InputError(source, label, f"must be <= {key.high:g}{unit}, got {value:g}")
    return value


def read_table(source, where, table, schema: dict):
    """Check one TOML table against its schema; return the values, typed, with defaults absent."""
    if not isinstance(table, dict):
        raise InputError(source, where.rstrip(". "), "must be a table")
    for name in table:
        if name not in schema:
            near = difflib.get_close_matches(name, list(schema), n=1, cutoff=0.5)
            hint = f"did you mean '{near[0]}'?" if near else f"valid keys are {', '.join(schema)}"
            raise InputError(source, f"{where}{name}", f"unknown key; {hint}")
    out = {}
    for name, key in schema.items():
        if name in table:
            out[name] = _check_value(source, where, name, key, table[name])
        elif key.required:
            raise InputError(source, f"{where}{name}", "required key is missing")
    return out


def parse_toml(path: Path):
    try:
        text = path.read_text(encoding="utf-8")
    except FileNotFoundError:
        raise InputError(path, None, "no such file") from None
    except (OSError, UnicodeDecodeError) as exc:
        raise InputError(path, None, f"cannot be read ({exc.__class__.__name__})") from None
    try:
        return tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise InputError(path, None, f"is not valid TOML ({exc})") from None


# ---------------------------------------------------------------- common tables

ALLOY_KEYS = {
    "name": Key(str, required=True),
    "model": Key(str, required=True, choices=MODELS),
    "note": Key(str),
}
DIAGRAM_KEYS = {
    "lower_temperature_C": Key(float, low=-273.15, low_open=True, unit="°C"),
    "upper_temperature_C": Key(float, low=-273.15, low_open=True, unit="°C"),
    "points": Key(int, low=3, high=100_000),
}
TOP_LEVEL = ("alloy", "diagram", "product", "composition", "steel")


def load_alloy(path) -> AlloyModel:
    """Read an alloy file and build its model; raises InputError with one clear line."""
    path = Path(path)
    data = parse_toml(path)
    for name in data:
        if name not in TOP_LEVEL:
            near = difflib.get_close_matches(name, TOP_LEVEL, n=1, cutoff=0.5)
            hint = f"did you mean [{near[0]}]?" if near else f"valid tables are {', '.join(TOP_LEVEL)}"
            raise InputError(path, name, f"unknown table; {hint}")
    if "alloy" not in data:
        raise InputError(path, "alloy", "required table [alloy] is missing")
    head = read_table(path, "alloy.", data["alloy"], ALLOY_KEYS)
    diagram = read_table(path, "diagram.", data.get("diagram", {}), DIAGRAM_KEYS)
    if head["model"] == "nucleation-growth":
        for name in ("composition", "steel"):
            if name in data:
                raise InputError(path, name, "belongs to model = 'steel'; a nucleation-growth alloy has [[product]] tables")
        model = _nucleation_growth_model(path, head, data)
    else:
        if "product" in data:
            raise InputError(path, "product", "belongs to model = 'nucleation-growth'; a steel has [composition] and [steel]")
        from .steel_alloy import steel_model_from_tables

        model = steel_model_from_tables(path, head, data)
    return _apply_diagram_range(path, model, diagram, data.get("diagram", {}))


def _apply_diagram_range(source, model: AlloyModel, diagram: dict, raw: dict):
    lo, hi = model.default_range_K
    if "lower_temperature_C" in diagram:
        lo = celsius_to_kelvin(diagram["lower_temperature_C"])
    if "upper_temperature_C" in diagram:
        hi = celsius_to_kelvin(diagram["upper_temperature_C"])
    if not lo < hi:
        raise InputError(source, "diagram.lower_temperature_C", "must lie below the upper temperature of the diagram")
    model.default_range_K = (lo, hi)
    model.inputs["diagram"] = dict(raw)
    model.default_points = diagram.get("points")
    return model


# ---------------------------------------------------------------- nucleation-growth

PRODUCT_KEYS = {
    "name": Key(str, required=True),
    "driving_force": Key(str, choices=DRIVING_FORCE_FORMS),
    "equilibrium_temperature_C": Key(float, low=-273.15, low_open=True, unit="°C"),
    "latent_heat_J_mol": Key(float, low=0.0, low_open=True, unit="J/mol"),
    "driving_force_table": Key(str),
    "molar_volume_m3_mol": Key(float, required=True, low=0.0, low_open=True, high=1e-3, unit="m^3/mol"),
    "strain_energy_J_m3": Key(float, low=0.0, unit="J/m^3"),
    "interface_energy_J_m2": Key(float, required=True, low=0.0, low_open=True, high=10.0, unit="J/m^2"),
    "wetting_angle_deg": Key(float, low=0.0, low_open=True, high=180.0, unit="degrees"),
    "site_density_m3": Key(float, low=0.0, low_open=True, unit="1/m^3"),
    "nucleation_activation_J_mol": Key(float, required=True, low=0.0, unit="J/mol"),
    "diffusion_prefactor_m2_s": Key(float, required=True, low=0.0, low_open=True, unit="m^2/s"),
    "diffusion_activation_J_mol": Key(float, required=True, low=0.0, unit="J/mol"),
    "diffusion_distance_m": Key(float, required=True, low=0.0, low_open=True, high=1e-3, unit="m"),
    "mode": Key(str, choices=tuple(MODES)),
    "avrami_exponent": Key(float, low=0.5, high=4.0, unit=""),
    "incubation_time_s": Key(float, low=0.0, unit="s"),
    "lower_temperature_C": Key(float, low=-273.15, unit="°C"),
}

#: Default lower end of the diagram for physical products, as a fraction of the upper
#: temperature in K: below about 0.4 of the equilibrium temperature diffusion in metals is
#: frozen on any practical time scale.
DEFAULT_LOWER_FRACTION_OF_UPPER = 0.4


def read_driving_force_table(source, where, path: Path) -> DrivingForceTable:
    try:
        frame = pd.read_csv(path)
    except FileNotFoundError:
        raise InputError(source, where, f"table file {path} does not exist") from None
    except (OSError, ValueError, pd.errors.ParserError) as exc:
        raise InputError(source, where, f"table file {path} cannot be read as CSV ({exc})") from None
    need = ("temperature_C", "dGm_J_mol")
    missing = [c for c in need if c not in frame.columns]
    if missing:
        raise InputError(source, where, f"table file {path} needs the columns {', '.join(need)}; missing {', '.join(missing)}")
    values = frame[list(need)].apply(pd.to_numeric, errors="coerce")
    if values.isna().any().any() or len(values) < 2:
        raise InputError(source, where, f"table file {path} needs at least two rows of numbers in {', '.join(need)}")
    try:
        return DrivingForceTable(celsius_to_kelvin(values["temperature_C"].to_numpy()), values["dGm_J_mol"].to_numpy())
    except ValueError as exc:
        raise InputError(source, where, f"table file {path}: {exc}") from None


def _product_from_table(source: Path, index: int, table) -> NucleationGrowthProduct:
    where = f"product[{index}]."
    v = read_table(source, where, table, PRODUCT_KEYS)
    form = v.get("driving_force", "turnbull")
    params = dict(
        molar_volume_m3_mol=v["molar_volume_m3_mol"],
        interface_energy_J_m2=v["interface_energy_J_m2"],
        nucleation_activation_J_mol=v["nucleation_activation_J_mol"],
        diffusion_prefactor_m2_s=v["diffusion_prefactor_m2_s"],
        diffusion_activation_J_mol=v["diffusion_activation_J_mol"],
        diffusion_distance_m=v["diffusion_distance_m"],
        driving_force=form,
        strain_energy_J_m3=v.get("strain_energy_J_m3", 0.0),
        wetting_angle_deg=v.get("wetting_angle_deg", 180.0),
        site_density_m3=v.get("site_density_m3"),
        mode=v.get("mode", "continuous"),
        avrami_exponent=v.get("avrami_exponent"),
        incubation_time_s=v.get("incubation_time_s", 0.0),
    )
    if form == "table":
        for name in ("equilibrium_temperature_C", "latent_heat_J_mol"):
            if name in v:
                raise InputError(source, where + name, "is not used with driving_force = 'table' (the table sets it); remove it")
        if "driving_force_table" not in v:
            raise InputError(source, where + "driving_force_table", "required with driving_force = 'table': a CSV with temperature_C, dGm_J_mol")
        params["table"] = read_driving_force_table(source, where + "driving_force_table", source.parent / v["driving_force_table"])
    else:
        for name in ("equilibrium_temperature_C", "latent_heat_J_mol"):
            if name not in v:
                raise InputError(source, where + name, f"required with driving_force = '{form}'")
        if "driving_force_table" in v:
            raise InputError(source, where + "driving_force_table", "is only used with driving_force = 'table'")
        params["equilibrium_K"] = celsius_to_kelvin(v["equilibrium_temperature_C"])
        params["latent_heat_J_mol"] = v["latent_heat_J_mol"]
    product = NucleationGrowthProduct(
        v["name"], NucleationGrowthParameters(**params), celsius_to_kelvin(v.get("lower_temperature_C", -273.15))
    )
    upper = float(product.upper_K)
    if upper <= product.lower_K or upper <= 0:
        raise InputError(source, where + "strain_energy_J_m3", "leaves no temperature with a net driving force; lower it")
    return product


def _nucleation_growth_model(source: Path, head: dict, data: dict) -> AlloyModel:
    tables = data.get("product")
    if not tables:
        raise InputError(source, "product", "at least one [[product]] table is required")
    if not isinstance(tables, list):
        raise InputError(source, "product", "must be written as [[product]] (an array of tables)")
    products = [_product_from_table(source, i + 1, t) for i, t in enumerate(tables)]
    names = [p.name for p in products]
    if len(set(names)) != len(names):
        raise InputError(source, "product.name", f"each product needs its own name, got {names}")
    upper = max(float(p.upper_K) for p in products)
    lower = max(min(float(p.lower_K) for p in products), DEFAULT_LOWER_FRACTION_OF_UPPER * upper)
    lines = {f"Te {p.name}" if len(products) > 1 else "Te": float(p.upper_K) for p in products}
    methods = {k: "equilibrium temperature net of strain energy (from the alloy file)" for k in lines}
    return AlloyModel(
        name=head["name"],
        model="nucleation-growth",
        products=products,
        lines_K=lines,
        line_methods=methods,
        default_range_K=(lower, upper - UPPER_MARGIN_K),
        inputs={"alloy": data["alloy"], "product": tables},
        footer=f"model: {products[0].model}",
    )
