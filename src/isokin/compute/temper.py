"""Tempering: the hardness a temper gives, and the temper that gives a hardness.

Every temper is carried to the Hollomon-Jaffe (1945) parameter
(:mod:`isokin.relations.tempering`), so equal parameters give equal hardness, and the
hardness at a parameter is read from the grade's measured tempering curve (a datasheet's or
the shop's own: hardness after a fixed time at several temperatures). The curve is
interpolated linearly in the parameter and never extrapolated: outside its span the
hardness is NaN and a warning says so. It stands for a fully hardened part, as the curve's
specimens were.

Not built: the hardness after tempering from the composition alone. The per-element
relation of Grange, Hribal and Porter (1977) could not be read here; Maynier et al.'s
(1978) tempered-martensite relation, as recalled, reads 40 to 110 HV high against published
4340 data and about 150 HV high for plain-carbon 1045 and 1080 tempered at 540-650 °C, so
it is not offered as an estimate.
"""

from __future__ import annotations

import numpy as np

from ..constants import celsius_to_kelvin, kelvin_to_celsius
from ..errors import InputError, number, numbers
from ..products.alloy import check_alloy
from ..relations.tempering import (SECONDS_PER_HOUR, hollomon_jaffe_constant_1945, hollomon_jaffe_parameter_1945,
                                   temperature_for_parameter, time_for_parameter)
from ..results import TemperingCurve, TemperResult

#: Tempering in about this range embrittles martensite (tempered-martensite embrittlement,
#: "350 °C embrittlement"), °C: common practice, from memory.
EMBRITTLEMENT_RANGE_C = (250.0, 400.0)
EMBRITTLEMENT_CAUTION = (
    "Tempering between 250 and 400 °C can embrittle martensite (tempered-martensite embrittlement; common practice): "
    "where toughness matters, temper below or above that range and check the part's specification.")
#: Tempers are carbon and low-alloy steel tempers: above freezing and below Ae1 in practice,
#: and from a minute to a month of soaking.
TEMPER_RANGE_C = (0.0, 800.0)
TIME_RANGE_S = (1.0, 31 * 24 * SECONDS_PER_HOUR)
#: Hardness a curve may hold, HV: from soft ferrite to the hardest martensite.
HARDNESS_RANGE_HV = (50.0, 1200.0)
#: The curve's time where none is given: datasheets temper for 1 h (common practice).
DEFAULT_CURVE_TIME_S = SECONDS_PER_HOUR
def tempering_curve(temperature_C, hardness_HV, time_s=DEFAULT_CURVE_TIME_S, source="tempering curve"):
    """A tempering curve from its points, checked: at least two tempers, temperatures in
    0-800 °C, hardness in 50-1200 HV, times from 1 s to a month (one for all, or one each).

    >>> curve = tempering_curve([400, 500, 600], [480, 400, 320])
    >>> curve.time_s.tolist()
    [3600.0, 3600.0, 3600.0]
    """
    T_C = np.atleast_1d(_within(source, "temperature_C", temperature_C, TEMPER_RANGE_C, "°C"))
    hv = np.atleast_1d(_within(source, "hardness_HV", hardness_HV, HARDNESS_RANGE_HV, "HV"))
    if T_C.ndim != 1 or hv.shape != T_C.shape or T_C.size < 2:
        raise InputError(source, None, "a tempering curve needs two or more tempers, each a temperature and a hardness")
    try:
        t = np.broadcast_to(_within(source, "time_s", time_s, TIME_RANGE_S, "s"), T_C.shape).copy()
    except ValueError:
        raise InputError(source, "time_s", "give one time for the curve or one per temper") from None
    return TemperingCurve(celsius_to_kelvin(T_C), hv, t, source)


def _within(source, key, values, span, unit=""):
    return numbers(key, values, span[0], span[1], unit=unit, source=source)


def _constant(alloy, constant):
    check_alloy(alloy)
    if constant is not None:
        return number("constant", constant, 5.0, 40.0)
    if alloy.model != "steel" or alloy.batch_shape:
        raise InputError(None, "alloy", "tempering needs one steel (its carbon sets the Hollomon-Jaffe constant)")
    return float(hollomon_jaffe_constant_1945(alloy.composition.C))


def _curve_in_parameter(curve, constant):
    """The curve's (parameter, hardness) sorted by parameter; two tempers with one parameter
    are refused (the curve would not be a function of it)."""
    P = hollomon_jaffe_parameter_1945(curve.temperature_K, curve.time_s, constant)
    order = np.argsort(P)
    P, hv = P[order], curve.hardness_HV[order]
    if np.any(np.diff(P) <= 0.0):
        raise InputError(curve.source, None, "two tempers of the curve have the same Hollomon-Jaffe parameter; "
                         "keep one")
    return P, hv


def _result(alloy, curve, constant, T_C, t, P, hv, target=None, warnings=()):
    with np.errstate(invalid="ignore"):
        embrittle = (T_C >= EMBRITTLEMENT_RANGE_C[0]) & (T_C <= EMBRITTLEMENT_RANGE_C[1])
    equivalent = kelvin_to_celsius(temperature_for_parameter(P, SECONDS_PER_HOUR, constant))
    return TemperResult(alloy=alloy.name, temperatures_C=T_C, times_s=t, parameter=P, equivalent_1h_C=equivalent,
                        hardness_HV=hv, constant=constant, curve=curve, target_HV=target, embrittlement=embrittle,
                        warnings=tuple(warnings), inputs=alloy.inputs,
                        provenance=dict(alloy.provenance))


def temper(alloy, temperature_C, time_s, curve, constant=None):
    """The hardness after tempering at ``temperature_C`` for ``time_s`` (broadcast), read from
    the tempering curve at the same Hollomon-Jaffe parameter.

    Parameters
    ----------
    alloy : Alloy
        One steel: its carbon gives the constant C = 21.3 - 5.8 %C unless ``constant`` is given.
    curve : TemperingCurve
        The grade's measured curve, from :func:`tempering_curve` or
        :func:`isokin.read_tempering_curve`.

    Returns
    -------
    TemperResult
        One row per temper; hardness NaN (with a warning) outside the curve's span; the rows in
        the tempered-martensite-embrittlement range flagged.

    Examples
    --------
    >>> import isokin
    >>> steel = isokin.steel({"C": 0.4, "Mn": 0.8}, 7.0)
    >>> curve = tempering_curve([400, 500, 600, 700], [480, 400, 320, 250])
    >>> round(float(temper(steel, 500.0, 3600.0, curve).hardness_HV[0]), 1)
    400.0
    """
    C = _constant(alloy, constant)
    _is_curve(curve)
    warnings = ()
    T_C, t = _pairs(_within(None, "temperature_C", temperature_C, TEMPER_RANGE_C, "°C"),
                    _within(None, "time_s", time_s, TIME_RANGE_S, "s"))
    P_curve, hv_curve = _curve_in_parameter(curve, C)
    P = hollomon_jaffe_parameter_1945(celsius_to_kelvin(T_C), t, C)
    hv = np.interp(P, P_curve, hv_curve, left=np.nan, right=np.nan)
    if np.isnan(hv).any():
        warnings += (f"{int(np.isnan(hv).sum())} temper(s) lie outside the tempering curve's span (equivalent 1 h "
                    f"tempers {_span_C(P_curve, C)}): no hardness is given there (the curve is not extrapolated)",)
    return _result(alloy, curve, C, T_C, t, P, hv, warnings=warnings)


#: Most tempers in one call (a million take well under a second and 100 MB).
MAX_TEMPERS = 1_000_000


def _pairs(first, second):
    """Two arrays broadcast against each other (1-D at least), at most :data:`MAX_TEMPERS`."""
    try:
        a, b = np.broadcast_arrays(np.atleast_1d(first), np.atleast_1d(second))
    except ValueError:
        raise InputError(None, "time_s", f"temperatures and times of shapes {np.shape(first)} and {np.shape(second)} "
                         "do not pair up; give one of each per temper, or one for all") from None
    if a.size > MAX_TEMPERS:
        raise InputError(None, "time_s", f"at most {MAX_TEMPERS:,} tempers in one call, got {a.size:,}")
    return a.astype(float), b.astype(float)


def _span_C(P_curve, C):
    low, high = kelvin_to_celsius(temperature_for_parameter(P_curve[[0, -1]], SECONDS_PER_HOUR, C))
    return f"{low:.0f} to {high:.0f} °C"


def _is_curve(curve):
    try:
        curve.temperature_K, curve.hardness_HV, curve.time_s, curve.source
    except AttributeError:
        raise InputError(None, "curve", "give the grade's measured tempering curve (isokin.tempering_curve or "
                         "isokin.read_tempering_curve): the hardness after tempering is read from it") from None


def temper_for_hardness(alloy, hardness_HV, curve, time_s=None, temperature_C=None, constant=None):
    """The temper that reaches a hardness: the temperature for a given time, or the time at a
    given temperature, for each target hardness (a value, or the two ends of a range).

    The curve must soften steadily (hardness falling as the parameter rises), as carbon and
    low-alloy steels do; a curve with a secondary-hardening rise is refused for this inverse.
    A target outside the curve's hardness span, or a time outside 1 s to a month, has no
    temper: its row is NaN and a warning gives the nearest reachable hardness.

    Examples
    --------
    >>> import isokin
    >>> steel = isokin.steel({"C": 0.4, "Mn": 0.8}, 7.0)
    >>> curve = tempering_curve([400, 500, 600, 700], [480, 400, 320, 250])
    >>> round(float(temper_for_hardness(steel, 400.0, curve, time_s=3600.0).temperatures_C[0]), 1)
    500.0
    """
    if (time_s is None) == (temperature_C is None):
        raise InputError(None, "time_s", "give either the tempering time (to find the temperature) or the "
                         "temperature (to find the time), not both")
    C = _constant(alloy, constant)
    _is_curve(curve)
    target = np.atleast_1d(_within(None, "hardness_HV", hardness_HV, HARDNESS_RANGE_HV, "HV"))
    if target.size > MAX_TEMPERS:
        raise InputError(None, "hardness_HV", f"at most {MAX_TEMPERS:,} target hardnesses in one call")
    P_curve, hv_curve = _curve_in_parameter(curve, C)
    if np.any(np.diff(hv_curve) > 0.0):
        raise InputError(curve.source, None, "the curve's hardness rises somewhere as the temper gets hotter or "
                         "longer (secondary hardening): the temper for a hardness would not be unique; read the "
                         "curve directly")
    lowest, highest = hv_curve[-1], hv_curve[0]
    inside = (target >= lowest) & (target <= highest)
    P = np.where(inside, np.interp(-target, -hv_curve, P_curve), np.nan)
    warnings = []
    if not inside.all():
        warnings.append(f"the tempering curve spans {lowest:.0f} to {highest:.0f} HV: no temper on it reaches "
                        + ", ".join(f"{v:.0f} HV" for v in target[~inside])
                        + f"; the nearest reachable is {highest:.0f} HV (the mildest temper) or {lowest:.0f} HV "
                        "(the hottest)")
    if time_s is not None:
        target, t = _pairs(target, _within(None, "time_s", time_s, TIME_RANGE_S, "s"))
        T_C = kelvin_to_celsius(temperature_for_parameter(P, t, C))
        outside = np.isfinite(T_C) & ((T_C < TEMPER_RANGE_C[0]) | (T_C > TEMPER_RANGE_C[1]))
        T_C = np.where(outside, np.nan, T_C)
        if outside.any():
            warnings.append(f"in {_duration_text(t)} the temper would lie outside {TEMPER_RANGE_C[0]:g} to "
                            f"{TEMPER_RANGE_C[1]:g} °C; choose another time")
    else:
        target, T_C = _pairs(target, _within(None, "temperature_C", temperature_C, TEMPER_RANGE_C, "°C"))
        # beyond 10^4 h the answer is "over a month" whatever it is: capped before the power
        t = SECONDS_PER_HOUR * 10.0 ** np.minimum(P / celsius_to_kelvin(T_C) - C, 4.0)
        outside = np.isfinite(P) & ~((t >= TIME_RANGE_S[0]) & (t <= TIME_RANGE_S[1]))
        t = np.where(outside, np.nan, t)
        if outside.any():
            warnings.append(f"at {T_C.flat[0]:g} °C the temper would take under {TIME_RANGE_S[0]:g} s or over a "
                            "month; choose another temperature")
    return _result(alloy, curve, C, T_C, t, P, np.where(np.isfinite(P), target, np.nan), target=target,
                   warnings=tuple(warnings))


def _duration_text(t):
    from ..readout import format_duration  # display text only

    return format_duration(float(np.ravel(t)[0]))


def equivalent_time(alloy, from_C, from_s, to_C, constant=None):
    """The time at ``to_C`` that tempers as much as ``from_s`` at ``from_C`` (equal
    Hollomon-Jaffe parameter), s.

    >>> import isokin
    >>> steel = isokin.steel({"C": 0.4, "Mn": 0.8}, 7.0)
    >>> round(float(equivalent_time(steel, 600.0, 3600.0, 600.0)), 6)
    3600.0
    """
    C = _constant(alloy, constant)
    P = hollomon_jaffe_parameter_1945(celsius_to_kelvin(np.asarray(from_C, dtype=float)), from_s, C)
    with np.errstate(over="ignore"):  # a far colder temper takes longer than floats hold: inf
        return time_for_parameter(P, celsius_to_kelvin(np.asarray(to_C, dtype=float)), C)


#: Tempering temperatures of a figure's lines, °C apart.
LINE_STEP_C = 2.0


def tempering_lines(alloy, curve, times_s, constant=None):
    """Hardness against tempering temperature for each tempering time, for a figure:
    (temperatures °C, hardness HV of shape (times, temperatures), NaN outside the curve).

    >>> import isokin
    >>> steel = isokin.steel({"C": 0.4, "Mn": 0.8}, 7.0)
    >>> T, hv = tempering_lines(steel, tempering_curve([400, 600], [480, 320]), [3600.0, 7200.0])
    >>> hv.shape == (2, T.size)
    True
    """
    T_C = np.arange(TEMPER_RANGE_C[0], TEMPER_RANGE_C[1] + 0.5 * LINE_STEP_C, LINE_STEP_C)
    t = np.atleast_1d(np.asarray(times_s, dtype=float))
    grid_T, grid_t = np.meshgrid(T_C, t)
    result = temper(alloy, grid_T.ravel(), grid_t.ravel(), curve, constant)
    return T_C, result.hardness_HV.reshape(grid_T.shape)
