"""Hardness of steel microstructures, and HV to HRC.

Maynier, Jungmann and Dollet give the Vickers hardness of martensite, bainite and
ferrite-pearlite as linear functions of composition (mass %) and of log10 of the cooling
rate Vr at 700 °C in °C/h; a mixture is taken as the volume-fraction average (common
practice). The coefficients below are from memory: the paper could not be reached here.
Their martensite hardness rises linearly with carbon without limit; the hardness of
as-quenched martensite that practice measures levels off above about 0.6 % C (common
practice, from memory), as the
carbon polynomial of ASTM A255 does (:func:`hrc_martensite_astm_a255`), which the mixture
uses for martensite of the carbon it formed from.

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


#: Hardness counted for retained austenite in a mixture, HV: metastable austenite of quenched
#: carbon steels is soft, about 200 HV (common practice, from memory).
RETAINED_AUSTENITE_HV = 200.0


def hardness_of_mixture(composition: Composition, fractions, rate_C_per_h, martensite_carbon=None):
    """Vickers hardness of a martensite / bainite / ferrite + pearlite / retained austenite
    mixture, HV.

    The volume-fraction average (common practice) of the Maynier et al. (1978) relations for
    bainite and ferrite + pearlite, of as-quenched martensite by ASTM A255's carbon relation
    (:func:`hrc_martensite_astm_a255`, of ``martensite_carbon`` where the martensite formed
    from austenite enriched in carbon, else the steel's), and of retained austenite counted
    soft (:data:`RETAINED_AUSTENITE_HV`). NaN where no share is given.

    Parameters
    ----------
    fractions : mapping
        Phase name to volume fraction (``"martensite"``, ``"bainite"``, ``"ferrite"``,
        ``"pearlite"``, ``"retained austenite"``; other names are ignored), floats or arrays
        broadcasting with the rate.
    martensite_carbon : float or array_like, optional
        Carbon of the austenite the martensite formed from, mass %.

    Examples
    --------
    >>> steel = Composition.from_dict({"C": 0.4, "Mn": 0.8, "Si": 0.25, "Cr": 1.0})
    >>> round(float(hardness_of_mixture(steel, {"martensite": 1.0}, 3.6e5)), 1)
    616.5
    """
    carbon = composition.C if martensite_carbon is None else martensite_carbon
    parts = [
        (fractions.get("martensite", 0.0), hv_from_hrc_astm_e140(hrc_martensite_astm_a255(carbon))),
        (fractions.get("bainite", 0.0), hardness_bainite_maynier_1978(composition, rate_C_per_h)),
        (fractions.get("ferrite", 0.0) + fractions.get("pearlite", 0.0),
         hardness_ferrite_pearlite_maynier_1978(composition, rate_C_per_h)),
        (fractions.get("retained austenite", 0.0), RETAINED_AUSTENITE_HV),
    ]
    weight = sum(share for share, _ in parts)
    with np.errstate(invalid="ignore", divide="ignore"):
        return sum(share * hv for share, hv in parts) / weight


#: ASTM A255's carbon polynomial for the hardness of the quenched end (as-quenched
#: martensite), HRC, from memory of the standard; fitted to about 0.7 % C. It peaks at about
#: 0.67 % C and is held at its peak above (the hardness of martensite levels off there).
A255_MARTENSITE_HRC = (35.395, 6.990, 312.330, -821.744, 1015.479, -538.346)
A255_PEAK_CARBON = 0.6658


def hrc_martensite_astm_a255(carbon):
    """Rockwell C hardness of as-quenched martensite from its carbon, ASTM A255.

    .. math:: HRC = 35.395 + 6.990\\,C + 312.330\\,C^2 - 821.744\\,C^3 + 1015.479\\,C^4
              - 538.346\\,C^5

    held at its maximum (about 65 HRC at 0.67 % C) above that carbon.

    Parameters
    ----------
    carbon : float or array_like
        Carbon of the martensite, mass %.

    Notes
    -----
    The polynomial for the hardness of the quenched end of the end-quench test, which is
    as-quenched martensite; depends on carbon alone (alloying moves the hardenability, not
    the hardness of martensite: common practice). Coefficients from memory of the standard;
    the levelling off above about 0.6 % C is the measured behaviour of martensite with some
    retained austenite (common practice, from memory).

    Reference: ASTM A255, "Standard Test Methods for Determining Hardenability of Steel".

    Examples
    --------
    >>> [round(float(hrc_martensite_astm_a255(c)), 1) for c in (0.2, 0.4, 0.6, 0.9)]
    [44.2, 56.1, 64.3, 65.1]
    """
    c = np.minimum(np.asarray(carbon, dtype=float), A255_PEAK_CARBON)
    return np.polynomial.polynomial.polyval(c, A255_MARTENSITE_HRC)


#: ASTM E140, Table 1 (non-austenitic steels): Rockwell C against Vickers, a few rows typed
#: from memory of the standard for interpolation; check against the standard before use.
E140_HRC = np.array([20.0, 25.0, 30.0, 35.0, 40.0, 45.0, 50.0, 55.0, 60.0, 65.0, 68.0])
E140_HV = np.array([238.0, 266.0, 302.0, 345.0, 392.0, 446.0, 513.0, 595.0, 697.0, 832.0, 940.0])


def hv_from_hrc_astm_e140(hrc):
    """Vickers hardness from Rockwell C by ASTM E140 (interpolated on the same rows).

    >>> float(hv_from_hrc_astm_e140(50.0))
    513.0
    """
    return np.interp(np.asarray(hrc, dtype=float), E140_HRC, E140_HV)


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
