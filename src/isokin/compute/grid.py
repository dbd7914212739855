"""Hold-temperature grids and transformed fractions for a diagram."""

from __future__ import annotations

import numpy as np

from ..constants import celsius_to_kelvin, kelvin_to_celsius
from ..errors import InputError, number, numbers, whole_number
from ..results import PRACTICAL_HORIZON_S

DEFAULT_FRACTIONS = (0.01, 0.5, 0.99)
DEFAULT_POINTS = 200
#: Grids larger than this are refused: they add nothing a reader can see, and a run within
#: the limits stays within seconds and well under 1 GB.
MAX_POINTS = 5_000
#: Most transformed fractions in one diagram (the default three and nine more).
MAX_FRACTIONS = 12


def default_fractions(extra=()):
    """The default 1 %, 50 %, 99 % plus any the user adds, sorted and unique.

    >>> default_fractions([0.05]).tolist()
    [0.01, 0.05, 0.5, 0.99]
    """
    return np.unique(np.concatenate([DEFAULT_FRACTIONS, np.asarray(extra, dtype=float)]))


def check_fractions(fractions, key="fractions"):
    """The fractions as a sorted 1-D array; InputError unless each lies strictly in (0, 1)."""
    fr = np.atleast_1d(numbers(key, fractions))
    bad = fr[~((fr > 0) & (fr < 1))]
    if fr.ndim != 1 or fr.size == 0:
        raise InputError(None, key, "give one or more fractions, e.g. (0.01, 0.5, 0.99)")
    if bad.size:
        raise InputError(None, key, f"must lie strictly between 0 and 1 (0.05 for 5 %), got {bad[0]:g}")
    fr = np.unique(fr)
    if fr.size > MAX_FRACTIONS:
        raise InputError(None, key, f"at most {MAX_FRACTIONS} distinct fractions in one diagram, got {fr.size}")
    return fr


def temperature_grid(tmin_K, tmax_K, points=DEFAULT_POINTS):
    """Evenly spaced hold temperatures from tmin_K to tmax_K inclusive, K.

    >>> temperature_grid(500.0, 700.0, 3).tolist()
    [500.0, 600.0, 700.0]
    """
    if not tmin_K < tmax_K:
        raise ValueError(f"the lower temperature ({tmin_K:.2f} K) must lie below the upper ({tmax_K:.2f} K)")
    if points < 3:
        raise ValueError("the grid needs at least 3 temperatures")
    return np.linspace(tmin_K, tmax_K, int(points))


def alloy_grid(alloy, tmin_C=None, tmax_C=None, points=None):
    """The hold-temperature grid of an alloy, K: its default range unless bounds are given.

    ``points`` defaults to the alloy file's, else :data:`DEFAULT_POINTS`. Raises
    InputError naming ``tmin_C``, ``tmax_C`` or ``points`` for a bound that cannot be.
    """
    lo, hi = alloy.default_range_K
    for key, value in (("tmin_C", tmin_C), ("tmax_C", tmax_C)):
        if value is not None:
            number(key, value, -273.15, low_open=True, unit="°C (absolute zero)")
    lo = celsius_to_kelvin(tmin_C) if tmin_C is not None else lo
    hi = celsius_to_kelvin(tmax_C) if tmax_C is not None else hi
    if not lo < hi:
        if tmax_C is not None and tmin_C is None:
            raise InputError(None, "tmax_C", f"must lie above the lower temperature ({kelvin_to_celsius(lo):.1f} °C)")
        raise InputError(None, "tmin_C", f"must lie below the upper temperature ({kelvin_to_celsius(hi):.1f} °C)")
    n = points if points is not None else (alloy.default_points or DEFAULT_POINTS)
    whole_number("points", n, 3, MAX_POINTS)
    return temperature_grid(lo, hi, n)


#: Most hold times in one log-spaced grid.
MAX_LOG_TIMES = 200


def log_times(start_s, end_s, count, key="times_s"):
    """``count`` hold times from ``start_s`` to ``end_s``, evenly spaced in ln t, s; each end
    above 0 and at most the practical horizon (about 32 years), the end above the start.

    >>> log_times(10.0, 1000.0, 3).tolist()
    [10.0, 100.0, 1000.0]
    """
    start = number(key, start_s, 0.0, PRACTICAL_HORIZON_S, low_open=True, unit="s")
    end = number(key, end_s, start, PRACTICAL_HORIZON_S, low_open=True, unit="s")
    return np.geomspace(start, end, whole_number(key, count, 2, MAX_LOG_TIMES))
