"""The critical temperatures of a steel (one heat or a batch), computed once, with what they mean.

Ae1 and Ae3 come from Andrews (1965), Ms and Bs from the chosen correlations, and the Bs of
the kinetic model (the one its bainite is measured from) from that model's own correlation.
Temperatures that cannot be are answers, not errors, where they have a meaning: Bs below
absolute zero means no bainite, Ms below it no martensite, Bs above Ae1 is capped at Ae1
(bainite never forms above the eutectoid temperature: common practice). Only Ae1 or Ae3 outside 0 K to
1400 °C (a correlation extrapolated past the solidus of steels) leave a heat that cannot be
computed: a single heat is refused with one line naming the correlation and the elements that
drive it; in a batch that heat is marked invalid and named in a warning, and the others stand.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..constants import celsius_to_kelvin, kelvin_to_celsius
from ..errors import InputError
from ..relations.composition import Composition
from ..relations.steel_critical import (
    ae1_andrews_1965,
    ae3_andrews_1965,
    andrews_ae1_C,
    andrews_ae3_C,
    andrews_ae3_without_carbon_C,
    andrews_eutectoid_carbon,
    bs_kirkaldy_venugopalan_1984,
    bs_li_1998,
    bs_steven_haynes_1956,
    bs_van_bohemen_2012,
    eutectoid_carbon_andrews_1965,
    ms_andrews_1965_linear,
    ms_andrews_1965_product,
    ms_steven_haynes_1956,
    ms_van_bohemen_2012,
)

#: Ms correlations by the name an alloy file gives as ``ms_method``: function, label and the
#: key of its calibrated range.
MS_METHODS = {
    "van_bohemen_2012": (ms_van_bohemen_2012, "van Bohemen (2012)", "van Bohemen (2012), Ms"),
    "andrews_1965": (ms_andrews_1965_linear, "Andrews (1965), linear", "Andrews (1965), linear Ms"),
    "andrews_1965_product": (ms_andrews_1965_product, "Andrews (1965), product form", "Andrews (1965), product Ms"),
    "steven_haynes_1956": (ms_steven_haynes_1956, "Steven & Haynes (1956)", "Steven & Haynes (1956)"),
}
#: Bs correlations by the name an alloy file gives as ``bs_method``.
BS_METHODS = {
    "van_bohemen_2012": (bs_van_bohemen_2012, "van Bohemen (2012)", "van Bohemen (2012), Bs"),
    "steven_haynes_1956": (bs_steven_haynes_1956, "Steven & Haynes (1956)", "Steven & Haynes (1956)"),
    "kirkaldy_venugopalan_1984": (bs_kirkaldy_venugopalan_1984, "Kirkaldy & Venugopalan (1984)",
                                  "Kirkaldy & Venugopalan (1984), Bs"),
    "li_1998": (bs_li_1998, "Li et al. (1998)", "Li et al. (1998), Bs"),
}
#: The defaults, chosen by the shared open measurements (``benchmarks/validate.py``): van
#: Bohemen's Ms has the smallest error over all about 2,900 records and by far the smallest
#: above 0.6 % C, where the linear forms run low; his Bs the smallest over the 154 measured Bs.
DEFAULT_MS_METHOD = "van_bohemen_2012"
DEFAULT_BS_METHOD = "van_bohemen_2012"
#: Andrews' product-form Ms is a parabola in carbon with its minimum near 453 / (2 x 217) %.
ANDREWS_PRODUCT_MS_TURN_C = 1.0
#: Critical temperatures at or above this, °C, lie above the solidus of steels.
HIGHEST_CRITICAL_C = 1400.0


def _member(composition: Composition, index: int) -> Composition:
    return Composition.from_dict({e: np.ravel(np.broadcast_to(v, composition.shape))[index]
                                  for e, v in composition.as_dict().items()})


def _driving_elements(function, composition: Composition) -> str:
    """The elements that move a correlation most for one steel: 'C 2 % (-846 K), Mn 1 % (-30 K)'."""
    value = float(function(composition))
    moves = []
    for element, content in composition.as_dict().items():
        if float(content) > 0:
            without = Composition.from_dict({**composition.as_dict(), element: 0.0})
            moves.append((value - float(function(without)), element, float(content)))
    moves.sort(key=lambda m: -abs(m[0]))
    return ", ".join(f"{e} {c:g} % ({d:+.0f} K)" for d, e, c in moves[:3] if abs(d) >= 0.5) or "the base value"


def heats_text(mask) -> str:
    """' (heats 3, 17 and 2 more of 40)': which members of a batch a warning is about; '' for one."""
    mask = np.asarray(mask)
    if mask.ndim == 0:
        return ""
    where = np.flatnonzero(np.ravel(mask))
    shown = ", ".join(str(i) for i in where[:5])
    more = f" and {where.size - 5} more" if where.size > 5 else ""
    return f" (heat{'s' if where.size > 1 else ''} {shown}{more} of {mask.size})"


def _hypoeutectoid_ae3(c):
    return np.where(c.C < eutectoid_carbon_andrews_1965(c), ae3_andrews_1965(c), ae1_andrews_1965(c))


@dataclass(frozen=True)
class SteelCritical:
    """A steel's critical temperatures (K, of the batch shape), the method of each, and doubts.

    ``ae3_K`` equals ``ae1_K`` at or above the eutectoid carbon (no proeutectoid ferrite);
    ``bs_K`` is the Bs line (the chosen correlation, capped at Ae1), ``bainite_start_K`` the
    Bs of the kinetic model (capped the same way); either is 0 where it falls below absolute
    zero (no bainite), and ``ms_K`` 0 where Ms does (no martensite). ``valid`` is False for
    heats whose Ae1 or Ae3 cannot be. ``ae3_without_carbon_K`` (Andrews' Ae3 less its carbon
    term) and ``eutectoid_carbon`` (mass %) are what the lever rule reads.
    """

    ae1_K: np.ndarray
    ae3_K: np.ndarray
    hypoeutectoid: np.ndarray
    ae3_without_carbon_K: np.ndarray
    eutectoid_carbon: np.ndarray
    ms_K: np.ndarray
    bs_K: np.ndarray
    bainite_start_K: np.ndarray
    valid: np.ndarray
    methods: dict
    range_keys: tuple
    warnings: tuple


def critical_temperatures(composition: Composition, ms_method=DEFAULT_MS_METHOD, bs_method=DEFAULT_BS_METHOD,
                          kinetic_bs_method=None) -> SteelCritical:
    """Ae1, Ae3, Ms, Bs and the kinetic model's Bs of one steel or a batch (see the module docstring).

    Examples
    --------
    >>> steel = Composition.from_dict({"C": 0.10, "Mn": 0.5})
    >>> critical = critical_temperatures(steel)
    >>> bool(critical.bs_K == critical.ae1_K), critical.warnings[0][:41]
    (True, 'Bs by van Bohemen (2012) is 762 °C, above')
    """
    c = composition
    ms_function, ms_label, ms_range = MS_METHODS[ms_method]
    bs_function, bs_label, bs_range = BS_METHODS[bs_method]
    kinetic = kinetic_bs_method or bs_method
    kinetic_function, kinetic_label, _ = BS_METHODS[kinetic]
    ae3_base_C, ae1_C = (np.asarray(f(c), dtype=float) for f in (andrews_ae3_without_carbon_C, andrews_ae1_C))
    eutectoid = np.asarray(andrews_eutectoid_carbon(ae3_base_C, ae1_C))
    ae1 = celsius_to_kelvin(ae1_C)
    hypo = np.asarray(c.C < eutectoid)
    ae3 = np.where(hypo, celsius_to_kelvin(andrews_ae3_C(ae3_base_C, c.C)), ae1)
    warnings = []
    hot = celsius_to_kelvin(HIGHEST_CRITICAL_C)
    invalid = np.zeros(c.shape, dtype=bool)
    for value, function, name in ((ae1, ae1_andrews_1965, "Ae1"), (ae3, _hypoeutectoid_ae3, "Ae3")):
        bad = (value >= hot) | (value <= 0.0)
        if not np.any(bad):
            continue
        i = int(np.argmax(np.ravel(bad)))
        one = _member(c, i) if c.shape else c
        text = (f"{name} from Andrews (1965){f' of heat {i}' if c.shape else ''} is "
                f"{kelvin_to_celsius(float(function(one))):.0f} °C, outside 0 K to {HIGHEST_CRITICAL_C:g} °C (above "
                "the solidus of steels): the correlation is extrapolated past anything physical, driven by "
                f"{_driving_elements(function, one)}")
        if not c.shape:
            raise InputError(None, "composition", text + "; this analysis cannot be modelled")
        warnings.append(f"{text}; such heats are left out{heats_text(bad)}")
        invalid |= bad

    def below_zero(value, what, meaning):
        value = np.asarray(value, dtype=float)
        never = value <= 0.0
        if np.any(never):
            warnings.append(f"{what} lies below absolute zero{heats_text(never)}: {meaning}")
        return np.where(never, 0.0, value)

    ms = below_zero(ms_function(c), f"Ms by {ms_label}", "no martensite forms on cooling")
    bs = below_zero(bs_function(c), f"Bs by {bs_label}", "no bainite forms")
    start = bs if kinetic == bs_method else below_zero(kinetic_function(c), f"the kinetic model's Bs ({kinetic_label})",
                                                       "its bainite does not form")
    for value, label in ((bs, f"Bs by {bs_label}"),) + (((start, f"the kinetic model's Bs ({kinetic_label})"),)
                                                         if kinetic != bs_method else ()):
        above = (value > ae1) & ~invalid
        if np.any(above):
            first = int(np.argmax(np.ravel(above)))
            hottest = kelvin_to_celsius(float(np.ravel(value)[first]))
            warnings.append(f"{label} is {hottest:.0f} °C, above Ae1 (Andrews 1965) "
                            f"{kelvin_to_celsius(float(np.ravel(ae1)[first])):.0f} °C{heats_text(above)}: bainite does "
                            "not form above the eutectoid temperature, so it is capped at Ae1")
    bs_uncapped = bs
    bs, start = np.minimum(bs, ae1), np.minimum(start, ae1)
    high_ms = (ms >= ae1) & ~invalid
    if np.any(high_ms):
        warnings.append(f"Ms by {ms_label} lies at or above Ae1{heats_text(high_ms)}: no ferrite, pearlite or bainite "
                        "can form below Ae1 before martensite")
    if ms_method == "andrews_1965_product" and np.any(c.C > ANDREWS_PRODUCT_MS_TURN_C):
        warnings.append(f"above {ANDREWS_PRODUCT_MS_TURN_C:g} % C Andrews' product-form Ms rises with carbon, "
                        "which real steels do not: Ms and the martensite lines are unreliable here")
    methods = {"Ae3": "Andrews (1965)" + (" (equals Ae1: no proeutectoid ferrite at this carbon)"
                                           if not np.any(hypo) else ""),
               "Ae1": "Andrews (1965)", "Bs": bs_label + (" (capped at Ae1)" if np.any(bs_uncapped > ae1) else ""),
               "Ms": ms_label, "bainite_start": f"{kinetic_label}, the kinetic model's own"}
    ranges = ("Andrews (1965), Ae1/Ae3", ms_range, bs_range) + ((BS_METHODS[kinetic][2],) if kinetic != bs_method
                                                                  else ())
    return SteelCritical(ae1_K=ae1, ae3_K=ae3, hypoeutectoid=hypo, ae3_without_carbon_K=celsius_to_kelvin(ae3_base_C),
                         eutectoid_carbon=eutectoid, ms_K=ms, bs_K=bs, bainite_start_K=start,
                         valid=~invalid, methods=methods, range_keys=ranges, warnings=tuple(warnings))
