"""Physical constants in SI units (CODATA values as shipped by scipy)."""

from scipy import constants as _c

BOLTZMANN_J_K = _c.k
PLANCK_J_S = _c.h
GAS_CONSTANT_J_MOL_K = _c.R
AVOGADRO_PER_MOL = _c.N_A
ZERO_CELSIUS_K = _c.zero_Celsius
CALORIE_J = _c.calorie  # thermochemical calorie, 4.184 J


def celsius_to_kelvin(t_c):
    return t_c + ZERO_CELSIUS_K


def kelvin_to_celsius(t_k):
    return t_k - ZERO_CELSIUS_K
