"""Time and temperature of tempering as one number: the Hollomon-Jaffe (1945) parameter.

Hollomon and Jaffe found that the hardness of tempered martensite depends on the tempering
temperature T (K) and time t only through

.. math:: P = T\\,(C + \\log_{10} t_h)

with t_h the time in hours and C a constant of the steel that falls with its carbon,
C = 21.3 - 5.8 %C (as the relation is usually quoted; from memory). Two tempers with one P
give one hardness, so a time at one temperature has an equivalent time at another, and a
measured tempering curve (hardness after a fixed time at several temperatures) gives the
hardness of any other time and temperature.

Reference: J. H. Hollomon and L. D. Jaffe, "Time-temperature relations in tempering steel",
Trans. AIME 162 (1945) 223-249.
"""

from __future__ import annotations

import numpy as np

SECONDS_PER_HOUR = 3600.0
#: C = a + b %C, time in hours (Hollomon and Jaffe 1945 as usually quoted; from memory).
HOLLOMON_JAFFE_CONSTANT = (21.3, -5.8)


def hollomon_jaffe_constant_1945(carbon):
    """The constant C of the tempering parameter for a steel of this carbon (mass %), with
    the time in hours: C = 21.3 - 5.8 %C.

    >>> round(float(hollomon_jaffe_constant_1945(0.4)), 2)
    18.98
    """
    a, b = HOLLOMON_JAFFE_CONSTANT
    return a + b * np.asarray(carbon, dtype=float)


def hollomon_jaffe_parameter_1945(temperature_K, time_s, constant):
    """Tempering parameter P = T (C + log10 t_h), K, of a temper at ``temperature_K`` for
    ``time_s`` seconds (broadcast), with the steel's constant C (time in hours).

    >>> round(float(hollomon_jaffe_parameter_1945(873.15, 3600.0, 20.0)), 1)
    17463.0
    """
    hours = np.asarray(time_s, dtype=float) / SECONDS_PER_HOUR
    return np.asarray(temperature_K, dtype=float) * (constant + np.log10(hours))


def temperature_for_parameter(parameter, time_s, constant):
    """The tempering temperature, K, that reaches ``parameter`` in ``time_s`` seconds.

    >>> round(float(temperature_for_parameter(17463.0, 3600.0, 20.0)), 2)
    873.15
    """
    hours = np.asarray(time_s, dtype=float) / SECONDS_PER_HOUR
    return np.asarray(parameter, dtype=float) / (constant + np.log10(hours))


def time_for_parameter(parameter, temperature_K, constant):
    """The tempering time, s, that reaches ``parameter`` at ``temperature_K``.

    >>> round(float(time_for_parameter(17463.0, 873.15, 20.0)), 6)
    3600.0
    """
    exponent = np.asarray(parameter, dtype=float) / np.asarray(temperature_K, dtype=float) - constant
    return SECONDS_PER_HOUR * 10.0 ** exponent

