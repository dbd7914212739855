"""Alloy files with ``model = "nucleation-growth"``: one ``[[product]]`` table per product."""

from __future__ import annotations

import re
from pathlib import Path

from ..constants import AVOGADRO_PER_MOL, ZERO_CELSIUS_K, celsius_to_kelvin, kelvin_to_celsius
from ..errors import InputError
from ..products.nucleation_growth import (
    DRIVING_FORCE_FORMS,
    NucleationGrowthParameters,
    NucleationGrowthProduct,
    nucleation_growth_alloy,
)
from ..relations.jmak import MODES
from ..results import OVERALL
from .schema import Key, read_table
from .tables import read_driving_force_table

TABLES = ("product",)
#: Most products in one file: more would not be readable in one diagram.
MAX_PRODUCTS = 8

#: Each physical key with a plausible range for metals (common practice, no single source):
#: outside it a value is a typing slip, not an alloy, and is refused before it reaches the
#: physics (a diffusion distance of 1e-300 m would give times of 1e-219 s).
PRODUCT_KEYS = {
    "name": Key(str, required=True),
    "driving_force": Key(str, choices=DRIVING_FORCE_FORMS),
    "equilibrium_temperature_C": Key(float, low=-273.15, low_open=True, high=4000.0, unit="°C"),
    "latent_heat_J_mol": Key(float, low=0.0, low_open=True, high=1e6, unit="J/mol"),
    "driving_force_table": Key(str, limit=1000),
    "molar_volume_m3_mol": Key(float, required=True, low=1e-6, high=1e-4, unit="m^3/mol"),
    "strain_energy_J_m3": Key(float, low=0.0, high=1e10, unit="J/m^3"),
    "interface_energy_J_m2": Key(float, required=True, low=1e-3, high=5.0, unit="J/m^2"),
    "wetting_angle_deg": Key(float, low=0.0, low_open=True, high=180.0, unit="degrees"),
    "site_density_m3": Key(float, low=1e6, unit="1/m^3"),
    "nucleation_activation_J_mol": Key(float, required=True, low=0.0, high=1e6, unit="J/mol"),
    "diffusion_prefactor_m2_s": Key(float, required=True, low=1e-12, high=0.1, unit="m^2/s"),
    "diffusion_activation_J_mol": Key(float, required=True, low=0.0, high=1e6, unit="J/mol"),
    "diffusion_distance_m": Key(float, required=True, low=1e-11, high=1e-3, unit="m"),
    "mode": Key(str, choices=tuple(MODES)),
    "avrami_exponent": Key(float, low=0.5, high=4.0, unit=""),
    "incubation_time_s": Key(float, low=0.0, high=1e9, unit="s"),
    "lower_temperature_C": Key(float, low=-273.15, high=4000.0, unit="°C"),
}

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
    if "site_density_m3" in v and v["site_density_m3"] > AVOGADRO_PER_MOL / v["molar_volume_m3_mol"]:
        raise InputError(source, where + "site_density_m3",
                         f"exceeds one site per atom ({AVOGADRO_PER_MOL / v['molar_volume_m3_mol']:.3g} /m^3 for this "
                         "molar volume); leave it out for homogeneous nucleation")
    if form == "table":
        for name in ("equilibrium_temperature_C", "latent_heat_J_mol"):
            if name in v:
                raise InputError(source, where + name, "is not used with driving_force = 'table' (the table sets it); remove it")
        if "driving_force_table" not in v:
            raise InputError(source, where + "driving_force_table", "required with driving_force = 'table': a CSV with temperature_C, dGm_J_mol")
        name = v["driving_force_table"]
        if re.match(r"[A-Za-z][A-Za-z0-9+.-]*://", name):
            raise InputError(source, where + "driving_force_table", f"{name} looks like a URL; give a local file, "
                             "relative to the alloy file's folder")
        params["table"] = read_driving_force_table(source, where + "driving_force_table", source.parent / name)
    else:
        for name in ("equilibrium_temperature_C", "latent_heat_J_mol"):
            if name not in v:
                raise InputError(source, where + name, f"required with driving_force = '{form}'")
        if "driving_force_table" in v:
            raise InputError(source, where + "driving_force_table", "is only used with driving_force = 'table'")
        params["equilibrium_K"] = celsius_to_kelvin(v["equilibrium_temperature_C"])
        params["latent_heat_J_mol"] = v["latent_heat_J_mol"]
    product = NucleationGrowthProduct(
        v["name"], NucleationGrowthParameters(**params), celsius_to_kelvin(v.get("lower_temperature_C", -ZERO_CELSIUS_K))
    )
    upper = float(product.upper_K)
    if upper <= 0:
        if v.get("strain_energy_J_m3", 0.0) > 0:
            raise InputError(source, where + "strain_energy_J_m3", "leaves no temperature with a net driving force; lower it")
        raise InputError(source, where + "driving_force_table", "has no temperature where dGm_J_mol is negative, so "
                         "the product never forms; dGm is negative where the product is favoured")
    if upper <= product.lower_K:
        key = "lower_temperature_C" if "lower_temperature_C" in v else "strain_energy_J_m3"
        raise InputError(source, where + key, f"leaves no temperature where the product can form: its upper "
                         f"temperature is {kelvin_to_celsius(upper):.1f} °C; the lower bound must lie below it")
    return product


def load(source: Path, head: dict, data: dict):
    tables = data.get("product")
    if not tables:
        raise InputError(source, "product", "at least one [[product]] table is required")
    if not isinstance(tables, list):
        raise InputError(source, "product", "must be written as [[product]] (an array of tables)")
    if len(tables) > MAX_PRODUCTS:
        raise InputError(source, "product", f"at most {MAX_PRODUCTS} [[product]] tables, got {len(tables)}")
    products = [_product_from_table(source, i + 1, t) for i, t in enumerate(tables)]
    for i, product in enumerate(products):
        if product.name == OVERALL:
            raise InputError(source, f"product[{i + 1}].name", f"'{OVERALL}' names the decomposition as a whole; "
                             "choose another name")
    try:
        return nucleation_growth_alloy(head["name"], products, inputs={"alloy": data["alloy"], "product": tables})
    except InputError as exc:
        raise exc.relocated(source) from None
