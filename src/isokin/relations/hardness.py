"""Hardness of steel microstructures from composition and cooling rate, and HV to HRC.

Maynier, Jungmann and Dollet give the Vickers hardness of martensite, bainite and
ferrite-pearlite as linear functions of composition (mass %) and of log10 of the cooling
rate Vr at 700 °C in °C/h; a mixture is taken as the volume-fraction average (common
practice). The coefficients below are from memory: the paper could not be reached here.

Reference: P. Maynier, B. Jungmann and J. Dollet, "Creusot-Loire system for the prediction
of the mechanical properties of low alloy steels", in Hardenability Concepts with
Applications to Steel, D. V. Doane and J. S. Kirkaldy (eds.), TMS-AIME (1978) 518-545.
"""

from __future__ import annotations

import numpy as np

from .composition import Composition

#: The relations were fitted for cooling rates at 700 °C of about 1 to 100 000 °C/h (from
#: memory); rates are clipped into this range before the logarithm is taken.
MAYNIER_RATE_RANGE_C_PER_H = (1.0, 1.0e5)


def _log_rate(rate_C_per_h):
    low, high = MAYNIER_RATE_RANGE_C_PER_H
    return np.log10(np.clip(np.asarray(rate_C_per_h, dtype=float), low, high))


def hardness_martensite_maynier_1978(composition: Composition, rate_C_per_h):
    """Vickers hardness of martensite, Maynier et al. (1978), HV.

    .. math:: HV_M = 127 + 949 C + 27 Si + 11 Mn + 8 Ni + 16 Cr + 21 \\log_{10} V_r

    Parameters
    ----------
    composition : Composition
        Mass percent.
    rate_C_per_h : float or array_like
        Cooling rate at 700 °C, °C/h (clipped to 1-1e5 °C/h).

    Examples
    --------
    >>> steel = Composition.from_dict({"C": 0.4, "Mn": 0.8, "Si": 0.25, "Cr": 1.0})
    >>> round(float(hardness_martensite_maynier_1978(steel, 3.6e5)), 1)
    643.1
    """
    c = composition
    return 127.0 + 949.0 * c.C + 27.0 * c.Si + 11.0 * c.Mn + 8.0 * c.Ni + 16.0 * c.Cr + 21.0 * _log_rate(rate_C_per_h)


def hardness_bainite_maynier_1978(composition: Composition, rate_C_per_h):
    """Vickers hardness of bainite, Maynier et al. (1978), HV.

    .. math:: HV_B = -323 + 185 C + 330 Si + 153 Mn + 65 Ni + 144 Cr + 191 Mo
              + (89 + 53 C - 55 Si - 22 Mn - 10 Ni - 20 Cr - 33 Mo) \\log_{10} V_r

    Examples
    --------
    >>> steel = Composition.from_dict({"C": 0.4, "Mn": 0.8, "Si": 0.25, "Cr": 1.0})
    >>> round(float(hardness_bainite_maynier_1978(steel, 3600.0)), 1)
    309.2
    """
    c = composition
    slope = 89.0 + 53.0 * c.C - 55.0 * c.Si - 22.0 * c.Mn - 10.0 * c.Ni - 20.0 * c.Cr - 33.0 * c.Mo
    return (-323.0 + 185.0 * c.C + 330.0 * c.Si + 153.0 * c.Mn + 65.0 * c.Ni + 144.0 * c.Cr + 191.0 * c.Mo
            + slope * _log_rate(rate_C_per_h))


def hardness_ferrite_pearlite_maynier_1978(composition: Composition, rate_C_per_h):
    """Vickers hardness of ferrite-pearlite, Maynier et al. (1978), HV.

    .. math:: HV_{FP} = 42 + 223 C + 53 Si + 30 Mn + 12.6 Ni + 7 Cr + 19 Mo
              + (10 - 19 Si + 4 Ni + 8 Cr + 130 V) \\log_{10} V_r

    Examples
    --------
    >>> steel = Composition.from_dict({"C": 0.4, "Mn": 0.8, "Si": 0.25, "Cr": 1.0})
    >>> round(float(hardness_ferrite_pearlite_maynier_1978(steel, 100.0)), 1)
    201.9
    """
    c = composition
    slope = 10.0 - 19.0 * c.Si + 4.0 * c.Ni + 8.0 * c.Cr + 130.0 * c.V
    return (42.0 + 223.0 * c.C + 53.0 * c.Si + 30.0 * c.Mn + 12.6 * c.Ni + 7.0 * c.Cr + 19.0 * c.Mo
            + slope * _log_rate(rate_C_per_h))


def hardness_mixture_maynier_1978(composition: Composition, fractions, rate_C_per_h):
    """Vickers hardness of a martensite / bainite / ferrite + pearlite mixture, HV.

    The volume-fraction average of the three Maynier et al. (1978) relations (common
    practice); retained austenite is left out of the average. NaN where no share is
    given a hardness.

    Parameters
    ----------
    fractions : mapping
        Product name to volume fraction (``"martensite"``, ``"bainite"``, ``"ferrite"``,
        ``"pearlite"``; other names are ignored), floats or arrays broadcasting with the rate.

    Examples
    --------
    >>> steel = Composition.from_dict({"C": 0.4, "Mn": 0.8, "Si": 0.25, "Cr": 1.0})
    >>> round(float(hardness_mixture_maynier_1978(steel, {"martensite": 1.0}, 3.6e5)), 1)
    643.1
    """
    parts = [
        (fractions.get("martensite", 0.0), hardness_martensite_maynier_1978(composition, rate_C_per_h)),
        (fractions.get("bainite", 0.0), hardness_bainite_maynier_1978(composition, rate_C_per_h)),
        (fractions.get("ferrite", 0.0) + fractions.get("pearlite", 0.0),
         hardness_ferrite_pearlite_maynier_1978(composition, rate_C_per_h)),
    ]
    weight = sum(share for share, _ in parts)
    with np.errstate(invalid="ignore", divide="ignore"):
        return sum(share * hv for share, hv in parts) / weight


#: ASTM E140, Table 1 (non-austenitic steels): Rockwell C against Vickers, a few rows typed
#: from memory of the standard for interpolation; check against the standard before use.
E140_HRC = np.array([20.0, 25.0, 30.0, 35.0, 40.0, 45.0, 50.0, 55.0, 60.0, 65.0, 68.0])
E140_HV = np.array([238.0, 266.0, 302.0, 345.0, 392.0, 446.0, 513.0, 595.0, 697.0, 832.0, 940.0])


def hrc_from_hv_astm_e140(hv):
    """Rockwell C hardness from Vickers by ASTM E140 (interpolated), NaN outside HRC 20-68.

    Examples
    --------
    >>> float(hrc_from_hv_astm_e140(513.0)), bool(np.isnan(hrc_from_hv_astm_e140(200.0)))
    (50.0, True)
    """
    hv = np.asarray(hv, dtype=float)
    inside = (hv >= E140_HV[0]) & (hv <= E140_HV[-1])
    return np.where(inside, np.interp(hv, E140_HV, E140_HRC), np.nan)
