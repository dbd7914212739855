"""Heat conduction in steel: thermal properties of austenite and of its products, the heat of
transformation, and Grossmann's quench severity.

The property tables are ballpark values for carbon and low-alloy steel, typed from memory of
the tabulations of the British Iron and Steel Research Association, "Physical constants of
some commercial steels at elevated temperatures" (BISRA, Butterworths, London, 1953), and of
the values quench simulations commonly take; they are not read from the source here. An
alloy file or :class:`isokin.compute.section.ThermalProperties` can override every one.
Density is held constant (the change with temperature and phase is under 3 %, and a fixed
grid conserves mass only with a fixed density).
"""

from __future__ import annotations

import numpy as np

#: Density of carbon and low-alloy steel, kg/m^3 (common practice).
DENSITY_KG_M3 = 7850.0

#: Thermal conductivity of austenite against temperature, (°C, W/(m K)): rising gently with
#: temperature, about 25 W/(m K) at 850 °C (BISRA 1953, from memory).
AUSTENITE_CONDUCTIVITY = ((0.0, 15.0), (400.0, 20.0), (800.0, 25.0), (1200.0, 30.0))
#: ... of the transformed products (ferrite, pearlite, bainite, martensite; BISRA's low-alloy
#: steels below Ac1, from memory): falling from about 43 W/(m K) near room temperature.
PRODUCT_CONDUCTIVITY = ((0.0, 43.0), (200.0, 41.5), (400.0, 38.0), (600.0, 33.0), (800.0, 26.0), (1200.0, 28.0))
#: Specific heat of austenite, (°C, J/(kg K)) (BISRA 1953, from memory).
AUSTENITE_HEAT_CAPACITY = ((0.0, 500.0), (400.0, 545.0), (800.0, 600.0), (1200.0, 650.0))
#: ... of the transformed products: rising toward the magnetic (Curie) peak near 750 °C, here
#: broadened and cut at 1000 J/(kg K) (BISRA 1953, from memory).
PRODUCT_HEAT_CAPACITY = ((0.0, 450.0), (200.0, 520.0), (400.0, 610.0), (500.0, 670.0), (600.0, 760.0),
                         (700.0, 900.0), (750.0, 1000.0), (800.0, 750.0), (1200.0, 650.0))


def tabulated(table, T_K):
    """A property table ((°C, value), ...) at temperatures ``T_K``, linear between the rows
    and held at the end rows outside them.

    >>> float(tabulated(AUSTENITE_CONDUCTIVITY, 873.15))
    22.5
    """
    t_c, value = np.asarray(table, dtype=float).T
    return np.interp(np.asarray(T_K, dtype=float) - 273.15, t_c, value)


def latent_heat_diffusional_J_m3(T_K):
    """Heat released by austenite turning into ferrite, pearlite or bainite, J per m^3 of
    product, as quench simulations commonly take it (from memory):

    .. math:: \\Delta H = 1.56\\times10^{9} - 1.5\\times10^{6}\\,T_{\\mathrm{C}}

    about 0.59 GJ/m^3 (75 kJ/kg) at 650 °C; never negative.

    >>> round(float(latent_heat_diffusional_J_m3(923.15)) / 1e9, 3)
    0.585
    """
    return np.maximum(1.56e9 - 1.5e6 * (np.asarray(T_K, dtype=float) - 273.15), 0.0)


#: Heat released by austenite turning into martensite, J per m^3 of product (about 82 kJ/kg),
#: as quench simulations commonly take it (from memory).
LATENT_HEAT_MARTENSITE_J_M3 = 6.44e8

#: Metres per inch: Grossmann's severity is per inch.
INCH_M = 0.0254

#: Grossmann's quench severity H (1/in) by medium and agitation: the usual table of the trade
#: (common practice, from memory), as (low, high).
GROSSMANN_SEVERITY_PER_IN = {
    "still air": (0.02, 0.02),
    "oil, none": (0.25, 0.30), "oil, mild": (0.30, 0.35), "oil, moderate": (0.35, 0.40),
    "oil, good": (0.40, 0.50), "oil, strong": (0.50, 0.80), "oil, violent": (0.80, 1.10),
    "water, none": (0.90, 1.00), "water, mild": (1.00, 1.10), "water, moderate": (1.20, 1.30),
    "water, good": (1.40, 1.50), "water, strong": (1.60, 2.00), "water, violent": (4.00, 4.00),
    "brine, none": (2.00, 2.00), "brine, mild": (2.00, 2.20), "brine, violent": (5.00, 5.00),
}


def heat_transfer_from_severity_W_m2K(severity_per_in, conductivity_W_mK):
    """The heat-transfer coefficient of a Grossmann quench severity, h = 2 H k (Grossmann's
    definition H = h / (2 k), with H per inch taken per metre).

    Parameters
    ----------
    severity_per_in : float or array_like
        H, 1/in.
    conductivity_W_mK : float or array_like
        k of the steel, W/(m K).

    >>> round(float(heat_transfer_from_severity_W_m2K(0.35, 25.0)), 1)
    689.0
    """
    return 2.0 * np.asarray(severity_per_in, dtype=float) / INCH_M * np.asarray(conductivity_W_mK, dtype=float)


def radiation_convection_W_m2K(T_K, medium_K, emissivity=0.8, convection_W_m2K=10.0):
    """Loss of a hot surface to still air, per kelvin above the air: radiation linearised,
    eps sigma (T^2 + Ta^2)(T + Ta), plus free convection (about 10 W/(m^2 K): common practice).

    >>> round(float(radiation_convection_W_m2K(1073.15, 293.15)), 1)
    86.7
    """
    sigma = 5.670374419e-8
    T, Ta = np.asarray(T_K, dtype=float), np.asarray(medium_K, dtype=float)
    return emissivity * sigma * (T * T + Ta * Ta) * (T + Ta) + convection_W_m2K
