"""Physical constants in SI units and the kelvin/Celsius conversions.

Exact values of the 2019 SI redefinition (k, h, N_A exact; R = k N_A), written out so that
reading an alloy file does not import scipy; a test checks them against scipy.constants.
"""

BOLTZMANN_J_K = 1.380649e-23
PLANCK_J_S = 6.62607015e-34
AVOGADRO_PER_MOL = 6.02214076e23
GAS_CONSTANT_J_MOL_K = BOLTZMANN_J_K * AVOGADRO_PER_MOL
ZERO_CELSIUS_K = 273.15
#: The hottest temperature any input may give, °C: above the melting range of steels (pure iron
#: melts at 1538 °C), so no heat treatment meets a hotter one.
MAX_TEMPERATURE_C = 1600.0
CALORIE_J = 4.184  # thermochemical calorie


def celsius_to_kelvin(t_c):
    return t_c + ZERO_CELSIUS_K


def kelvin_to_celsius(t_k):
    return t_k - ZERO_CELSIUS_K


def celsius_to_fahrenheit(t_c):
    """Degrees Celsius to Fahrenheit, for figures and printed tables in °F.

    >>> celsius_to_fahrenheit(100.0)
    212.0
    """
    return t_c * 1.8 + 32.0
