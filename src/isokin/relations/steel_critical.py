"""Critical temperatures of steels from published composition correlations.

One function per correlation, named for its authors and year. The published formulas are
in degrees Celsius; every function here returns kelvin (the published value + 273.15), so
the rest of the program stays in SI. Each takes a :class:`~isokin.relations.composition.Composition`
(one steel or a batch) and broadcasts over it.

Where a coefficient was checked against a published or secondary source with the search
tool, the docstring says so; otherwise it says "from memory".
"""

from __future__ import annotations

import numpy as np

from ..constants import celsius_to_kelvin, kelvin_to_celsius
from .composition import Composition

#: Rate constant of Koistinen and Marburger (1959), 1/K (their 0.011 per degree C).
KOISTINEN_MARBURGER_ALPHA_PER_K = 0.011

#: Composition ranges (mass %) of the steels each correlation was fitted to, for the
#: validity warnings; every element a correlation uses has one.  Andrews (1965): below
#: 0.6 C for Ae1/Ae3 (confirmed, see the docstrings); his Ms data set about 0.11-0.6 C, up
#: to 4.9 Mn, 5 Ni, 4.6 Cr, 5.4 Mo (from memory).  For the other elements of his Ae1/Ae3
#: the limits are assumptions, the levels of the low-alloy and microalloyed steels such
#: formulas are used for (his own limits could not be checked).  Steven & Haynes (1956):
#: about 0.1-0.55 C, 0.2-1.7 Mn, up to 5 Ni, 3.5 Cr, 1 Mo (from memory).
#: The low-alloy heat-treatable steels (SAE 10xx-94xx) the empirical kinetic models were built
#: for, mass %: an assumption (their papers' own ranges could not be confirmed).
LOW_ALLOY_STEELS_MASS_PERCENT = {"C": (0.1, 0.8), "Mn": (0.2, 2.0), "Si": (0.0, 1.0), "Ni": (0.0, 3.5),
                                 "Cr": (0.0, 1.5), "Mo": (0.0, 0.6)}
_ANDREWS_MS_RANGE = {"C": (0.11, 0.6), "Mn": (0.0, 4.9), "Ni": (0.0, 5.0), "Cr": (0.0, 4.6), "Mo": (0.0, 5.4)}
CALIBRATED_RANGES = {
    "Andrews (1965), Ae1/Ae3": {"C": (0.0, 0.6), "Mn": (0.0, 2.0), "Si": (0.0, 2.0), "Ni": (0.0, 5.0),
                                "Cr": (0.0, 5.0), "Mo": (0.0, 1.5), "V": (0.0, 0.5), "W": (0.0, 2.0),
                                "Cu": (0.0, 1.0), "P": (0.0, 0.1), "Al": (0.0, 0.1), "As": (0.0, 0.05),
                                "Ti": (0.0, 0.1)},
    "Andrews (1965), linear Ms": _ANDREWS_MS_RANGE,
    "Andrews (1965), product Ms": _ANDREWS_MS_RANGE,
    "Steven & Haynes (1956)": {"C": (0.1, 0.55), "Mn": (0.2, 1.7), "Ni": (0.0, 5.0), "Cr": (0.0, 3.5),
                               "Mo": (0.0, 1.0)},
    # van Bohemen (2012) fitted large compilations of low-alloy steels; the limits are from
    # memory of his data (Ms to about 2 % C, Bs to about 1 % C)
    "van Bohemen (2012), Ms": {"C": (0.0, 2.0), "Mn": (0.0, 3.0), "Si": (0.0, 2.0), "Ni": (0.0, 5.0),
                               "Cr": (0.0, 3.0), "Mo": (0.0, 2.0)},
    "van Bohemen (2012), Bs": {"C": (0.1, 1.0), "Mn": (0.0, 2.0), "Si": (0.0, 2.0), "Ni": (0.0, 4.0),
                               "Cr": (0.0, 3.5), "Mo": (0.0, 1.5)},
    # the low-alloy steels of the kinetic models (an assumption, as for their kinetics)
    "Kirkaldy & Venugopalan (1984), Bs": LOW_ALLOY_STEELS_MASS_PERCENT,
    "Li et al. (1998), Bs": {e: r for e, r in LOW_ALLOY_STEELS_MASS_PERCENT.items() if e != "Si"},
}


def andrews_ae3_without_carbon_C(c: Composition):
    """Andrews' Ae3 less its carbon term, in degrees C."""
    return (
        910.0
        - 15.2 * c.Ni
        + 44.7 * c.Si
        + 104.0 * c.V
        + 31.5 * c.Mo
        + 13.1 * c.W
        - 30.0 * c.Mn
        - 11.0 * c.Cr
        - 20.0 * c.Cu
        + 700.0 * c.P
        + 400.0 * c.Al
        + 120.0 * c.As
        + 400.0 * c.Ti
    )


def andrews_ae1_C(c: Composition):
    return 723.0 - 10.7 * c.Mn - 16.9 * c.Ni + 29.1 * c.Si + 16.9 * c.Cr + 290.0 * c.As + 6.38 * c.W


def ae1_andrews_1965(composition: Composition):
    """Lower critical (eutectoid) temperature Ae1 of Andrews (1965), in K.

    .. math:: Ae_1\\,[^\\circ C] = 723 - 10.7\\,Mn - 16.9\\,Ni + 29.1\\,Si + 16.9\\,Cr
              + 290\\,As + 6.38\\,W

    Parameters
    ----------
    composition : Composition
        Mass percent of Mn, Ni, Si, Cr, As, W (others do not enter).

    Returns
    -------
    float ndarray
        Ae1 in kelvin, of the composition's batch shape.

    Notes
    -----
    Validity: low-alloy steels with less than 0.6 mass % C (Andrews' own range; the
    formula has no carbon term). Coefficients confirmed against the compilation of
    A. A. Gorni, *Steel Forming and Heat Treating Handbook* (2009 and 2012 editions),
    which quotes Andrews (1965).

    Reference: K. W. Andrews, "Empirical formulae for the calculation of some
    transformation temperatures", J. Iron Steel Inst. 203 (1965) 721-727.

    Examples
    --------
    >>> from .composition import Composition
    >>> steel = Composition.from_dict({"C": 0.4, "Mn": 0.8, "Si": 0.25})
    >>> round(float(ae1_andrews_1965(steel)) - 273.15, 2)
    721.72
    """
    return celsius_to_kelvin(andrews_ae1_C(composition))


def ae3_andrews_1965(composition: Composition):
    """Upper critical temperature Ae3 of Andrews (1965), in K.

    .. math:: Ae_3\\,[^\\circ C] = 910 - 203\\sqrt{C} - 15.2\\,Ni + 44.7\\,Si + 104\\,V
              + 31.5\\,Mo + 13.1\\,W - 30\\,Mn - 11\\,Cr - 20\\,Cu + 700\\,P + 400\\,Al
              + 120\\,As + 400\\,Ti

    (Andrews writes the last seven terms as -(30 Mn + 11 Cr + 20 Cu - 700 P - 400 Al -
    120 As - 400 Ti).)

    Parameters
    ----------
    composition : Composition
        Mass percent of C, Ni, Si, V, Mo, W, Mn, Cr, Cu, P, Al, As, Ti.

    Returns
    -------
    float ndarray
        Ae3 in kelvin. Beyond the eutectoid carbon content
        (:func:`eutectoid_carbon_andrews_1965`) the value falls below Ae1 and has no
        physical meaning: there is no proeutectoid ferrite field.

    Notes
    -----
    Validity: low-alloy steels with less than 0.6 mass % C. Coefficients confirmed against
    Gorni, *Steel Forming and Heat Treating Handbook* (2012 edition), quoting Andrews.

    Reference: K. W. Andrews, J. Iron Steel Inst. 203 (1965) 721-727.

    Examples
    --------
    >>> from .composition import Composition
    >>> round(float(ae3_andrews_1965(Composition.from_dict({"C": 0.25}))) - 273.15, 2)
    808.5
    """
    return celsius_to_kelvin(andrews_ae3_C(andrews_ae3_without_carbon_C(composition), composition.C))


def andrews_ae3_C(ae3_without_carbon_C, carbon):
    """Andrews' Ae3 (degrees C) from its carbon-free part and the carbon (mass %)."""
    return ae3_without_carbon_C - 203.0 * np.sqrt(carbon)


def eutectoid_carbon_andrews_1965(composition: Composition):
    """Carbon content (mass %) at which Andrews' Ae3 meets his Ae1 for the other elements.

    Andrews' Ae3 falls with the square root of carbon while his Ae1 has no carbon term, so
    Ae3(C) = Ae1 solves in closed form:

    .. math:: C_e = \\left(\\frac{Ae_3^{(C=0)} - Ae_1}{203}\\right)^2

    with both temperatures in degrees C and :math:`Ae_3^{(C=0)}` Andrews' Ae3 without its
    carbon term. Proeutectoid ferrite cannot form at or above :math:`C_e`: the steel is
    then eutectoid or hypereutectoid and austenite decomposes to pearlite (or bainite)
    directly. Where the other elements already put Ae3 below Ae1 at zero carbon,
    :math:`C_e` is 0.

    Parameters
    ----------
    composition : Composition
        Mass percent of the elements of :func:`ae1_andrews_1965` and
        :func:`ae3_andrews_1965` (carbon itself does not enter).

    Returns
    -------
    float ndarray
        Eutectoid carbon content in mass percent.

    Notes
    -----
    For plain Fe-C it gives (187/203)**2 = 0.849 mass %, against 0.77 % of the Fe-Fe3C
    diagram: Andrews fitted steels below 0.6 % C, and this is an extrapolation of his Ae3.

    Examples
    --------
    >>> from .composition import Composition
    >>> round(float(eutectoid_carbon_andrews_1965(Composition.from_dict({}))), 4)
    0.8486
    """
    return andrews_eutectoid_carbon(andrews_ae3_without_carbon_C(composition), andrews_ae1_C(composition))


def andrews_eutectoid_carbon(ae3_without_carbon_C, ae1_C):
    """The eutectoid carbon (mass %) of :func:`eutectoid_carbon_andrews_1965` from Andrews'
    carbon-free Ae3 and his Ae1 (degrees C)."""
    return (np.maximum(ae3_without_carbon_C - ae1_C, 0.0) / 203.0) ** 2


#: Carbon in ferrite at the eutectoid temperature, mass % (about 0.02 %: the Fe-C diagram,
#: common practice).
FERRITE_CARBON_MASS_PERCENT = 0.02


def ferrite_fraction_lever_rule_andrews(T_K, composition: Composition, ferrite_carbon=FERRITE_CARBON_MASS_PERCENT):
    """Equilibrium share of proeutectoid ferrite at T by the lever rule on Andrews' Ae3 line.

    Between Ae1 and Ae3 the austenite in equilibrium with ferrite holds the carbon at which
    Andrews' Ae3 equals T,

    .. math:: c_\\gamma(T) = \\left(\\frac{Ae_3^{(C=0)} - T}{203}\\right)^2 \\quad (^\\circ C),

    and the lever rule gives :math:`f_\\alpha = (c_\\gamma - c_0) / (c_\\gamma - c_\\alpha)`. At
    and below Ae1 the austenite is eutectoid (:func:`eutectoid_carbon_andrews_1965`), so the
    proeutectoid share stays at its Ae1 value and the rest becomes pearlite or bainite.

    Parameters
    ----------
    T_K : float or array_like
        Hold temperature, K (broadcasts against the composition's batch).
    composition : Composition
        The steel (mass %).
    ferrite_carbon : float, optional
        Carbon in ferrite, mass % (default 0.02, common practice).

    Returns
    -------
    float ndarray
        Share of the austenite that becomes proeutectoid ferrite, 0 at and above Ae3 and
        for carbon at or above the eutectoid content.

    Examples
    --------
    >>> steel = Composition.from_dict({"C": 0.4})
    >>> round(float(ferrite_fraction_lever_rule_andrews(celsius_to_kelvin(700.0), steel)), 3)
    0.541
    """
    return lever_rule_ferrite_fraction(
        kelvin_to_celsius(np.asarray(T_K, dtype=float)), andrews_ae3_without_carbon_C(composition), andrews_ae1_C(composition),
        composition.C, eutectoid_carbon_andrews_1965(composition), ferrite_carbon)


def lever_rule_ferrite_fraction(T_C, ae3_without_carbon_C, ae1_C, carbon, eutectoid_carbon,
                                ferrite_carbon=FERRITE_CARBON_MASS_PERCENT):
    """The lever rule of :func:`ferrite_fraction_lever_rule_andrews` from its ingredients (°C, mass %).

    Everything broadcasts; a product holding a batch passes its arrays with the batch leading.
    """
    c_gamma = np.where(T_C > ae1_C, (np.maximum(ae3_without_carbon_C - T_C, 0.0) / 203.0) ** 2, eutectoid_carbon)
    with np.errstate(divide="ignore", invalid="ignore"):
        share = (c_gamma - carbon) / (c_gamma - ferrite_carbon)
    return np.where((carbon < eutectoid_carbon) & (c_gamma > carbon), np.clip(np.nan_to_num(share), 0.0, 1.0), 0.0)


def austenite_carbon_mass_balance(carbon, rejecting_share, ferrite_carbon=FERRITE_CARBON_MASS_PERCENT):
    """Carbon of the austenite left after ferrite (or carbide-free bainitic ferrite) has formed,
    by mass balance, mass %.

    .. math:: c_\\gamma = \\frac{C - f\\,c_\\alpha}{1 - f}

    with f the share of the part that is carbon-rejecting ferrite and c_alpha its carbon.
    Products that take the austenite's own carbon with them (pearlite, bainite with
    carbides) leave it unchanged, so they do not enter.

    Parameters
    ----------
    carbon : float or array_like
        The steel's carbon, mass %.
    rejecting_share : float or array_like
        Share of the part that is ferrite rejecting its carbon into the austenite, 0 to 1.
    ferrite_carbon : float, optional
        Carbon the ferrite keeps, mass % (default 0.02, common practice).

    Returns
    -------
    float ndarray
        Carbon of the remaining austenite, mass %; where no austenite remains, the limit of
        the last austenite is taken as the steel's own carbon (nothing is left to hold it).

    Examples
    --------
    >>> round(float(austenite_carbon_mass_balance(0.40, 0.45)), 4)
    0.7109
    """
    carbon = np.asarray(carbon, dtype=float)
    f = np.asarray(rejecting_share, dtype=float)
    left = 1.0 - f
    with np.errstate(divide="ignore", invalid="ignore"):
        enriched = (carbon - f * ferrite_carbon) / left
    return np.where(left > 0.0, enriched, carbon)


def ms_andrews_1965_linear(composition: Composition):
    """Martensite start temperature Ms, linear formula of Andrews (1965), in K.

    .. math:: M_s\\,[^\\circ C] = 539 - 423\\,C - 30.4\\,Mn - 17.7\\,Ni - 12.1\\,Cr - 7.5\\,Mo

    Parameters
    ----------
    composition : Composition
        Mass percent of C, Mn, Ni, Cr, Mo.

    Returns
    -------
    float ndarray
        Ms in kelvin.

    Notes
    -----
    Validity (from memory, Andrews' data set): about 0.11-0.6 C, up to ~4.9 Mn, ~5 Ni,
    ~4.6 Cr, ~5.4 Mo mass %. Past 0.6 % C it runs low: about 170 C for a plain 0.8 % C
    steel against roughly 220 C measured (measured value from memory). Coefficients
    confirmed against the list of empirical Ms
    equations of the University of Cambridge Materials Algorithms Project, which quotes
    Andrews (1965).

    Reference: K. W. Andrews, J. Iron Steel Inst. 203 (1965) 721-727.

    Examples
    --------
    >>> from .composition import Composition
    >>> steel = Composition.from_dict({"C": 0.4, "Mn": 0.8, "Cr": 1.0})
    >>> round(float(ms_andrews_1965_linear(steel)) - 273.15, 2)
    333.38
    """
    c = composition
    return celsius_to_kelvin(
        539.0 - 423.0 * c.C - 30.4 * c.Mn - 17.7 * c.Ni - 12.1 * c.Cr - 7.5 * c.Mo
    )


def ms_andrews_1965_product(composition: Composition):
    """Martensite start temperature Ms, product (non-linear) formula of Andrews (1965), in K.

    .. math:: M_s\\,[^\\circ C] = 512 - 453\\,C - 16.9\\,Ni + 15\\,Cr - 9.5\\,Mo
              + 217\\,C^2 - 71.5\\,C\\,Mn - 67.6\\,C\\,Cr

    Parameters
    ----------
    composition : Composition
        Mass percent of C, Mn, Ni, Cr, Mo.

    Returns
    -------
    float ndarray
        Ms in kelvin.

    Notes
    -----
    Andrews fitted it to the same data set as his linear form (from memory: up to about
    0.6 % C). Its carbon term flattens as carbon rises, so it extrapolates to high carbon
    far better than the linear form: for a plain 0.79 C, 0.76 Mn steel it gives 247 C,
    the linear form 182 C, against roughly 220 C measured (the measured value from
    memory). Coefficients confirmed against an implementation published with the study
    of Ms in high-carbon steels by Ingber and Kunert, steel research int. 93 (2022)
    2100576 (their code, which quotes Andrews); the 1965 paper itself was not reachable.

    Reference: K. W. Andrews, J. Iron Steel Inst. 203 (1965) 721-727.

    Examples
    --------
    >>> from isokin.relations.composition import Composition
    >>> steel = Composition.from_dict({"C": 0.79, "Mn": 0.76})
    >>> round(float(ms_andrews_1965_product(steel)) - 273.15, 1)
    246.6
    """
    c = composition
    return celsius_to_kelvin(
        512.0 - 453.0 * c.C - 16.9 * c.Ni + 15.0 * c.Cr - 9.5 * c.Mo
        + 217.0 * c.C**2 - 71.5 * c.C * c.Mn - 67.6 * c.C * c.Cr
    )


def ms_steven_haynes_1956(composition: Composition):
    """Martensite start temperature Ms of Steven and Haynes (1956), in K.

    .. math:: M_s\\,[^\\circ C] = 561 - 474\\,C - 33\\,Mn - 17\\,Ni - 17\\,Cr - 21\\,Mo

    Parameters
    ----------
    composition : Composition
        Mass percent of C, Mn, Ni, Cr, Mo.

    Returns
    -------
    float ndarray
        Ms in kelvin.

    Notes
    -----
    Validity (from memory): low-alloy steels of about 0.1-0.55 C, up to ~1.7 Mn, ~5 Ni,
    ~3.5 Cr, ~1 Mo mass %. The carbon coefficient 474 is from memory; one secondary
    listing found by search prints 476, which moves Ms by under 1 K for 0.4 % C.

    Reference: W. Steven and A. G. Haynes, "The temperature of formation of martensite
    and bainite in low-alloy steels", J. Iron Steel Inst. 183 (1956) 349-359.

    Examples
    --------
    >>> from .composition import Composition
    >>> steel = Composition.from_dict({"C": 0.4, "Mn": 0.8, "Cr": 1.0})
    >>> round(float(ms_steven_haynes_1956(steel)) - 273.15, 2)
    328.0
    """
    c = composition
    return celsius_to_kelvin(
        561.0 - 474.0 * c.C - 33.0 * c.Mn - 17.0 * c.Ni - 17.0 * c.Cr - 21.0 * c.Mo
    )


def bs_steven_haynes_1956(composition: Composition):
    """Bainite start temperature Bs of Steven and Haynes (1956), in K.

    .. math:: B_s\\,[^\\circ C] = 830 - 270\\,C - 90\\,Mn - 37\\,Ni - 70\\,Cr - 83\\,Mo

    Parameters
    ----------
    composition : Composition
        Mass percent of C, Mn, Ni, Cr, Mo.

    Returns
    -------
    float ndarray
        Bs in kelvin.

    Notes
    -----
    Validity (from memory): the 65 low-alloy steels of Steven and Haynes, about
    0.1-0.55 C mass %. Coefficients confirmed against Eq. (1) of a 2019 review of Bs
    equations in Metall. Mater. Trans. A (doi 10.1007/s11661-019-05371-1), which quotes
    Steven and Haynes.

    Reference: W. Steven and A. G. Haynes, J. Iron Steel Inst. 183 (1956) 349-359.

    Examples
    --------
    >>> from .composition import Composition
    >>> steel = Composition.from_dict({"C": 0.4, "Mn": 0.8, "Cr": 1.0})
    >>> round(float(bs_steven_haynes_1956(steel)) - 273.15, 2)
    580.0
    """
    c = composition
    return celsius_to_kelvin(
        830.0 - 270.0 * c.C - 90.0 * c.Mn - 37.0 * c.Ni - 70.0 * c.Cr - 83.0 * c.Mo
    )


def ms_van_bohemen_2012(composition: Composition):
    """Martensite start temperature Ms of van Bohemen (2012), in K.

    .. math:: M_s\\,[^\\circ C] = 565 - (31\\,Mn + 13\\,Si + 10\\,Cr + 18\\,Ni + 12\\,Mo)
              - 600\\,[1 - \\exp(-0.96\\,C)]

    Parameters
    ----------
    composition : Composition
        Mass percent of C, Mn, Si, Cr, Ni, Mo.

    Returns
    -------
    float ndarray
        Ms in kelvin.

    Notes
    -----
    The exponential carbon term flattens as carbon rises, as measured Ms does; the linear
    formulas run ever lower past about 0.6 % C. Validity (from memory): low-alloy steels to
    about 2 % C. Coefficients from memory; measured against the shared open Ms data (about
    2,900 records) they give the smallest error of the correlations here overall and by far
    the smallest above 0.6 % C (``benchmarks/validate.py``), which a wrong coefficient would not.

    Reference: S. M. C. van Bohemen, "Bainite and martensite start temperature calculated
    with exponential carbon dependence", Mater. Sci. Technol. 28 (2012) 487-495.

    Examples
    --------
    >>> from .composition import Composition
    >>> round(float(ms_van_bohemen_2012(Composition.from_dict({"C": 0.79, "Mn": 0.76}))) - 273.15, 1)
    222.5
    """
    c = composition
    return celsius_to_kelvin(
        565.0 - (31.0 * c.Mn + 13.0 * c.Si + 10.0 * c.Cr + 18.0 * c.Ni + 12.0 * c.Mo)
        - 600.0 * -np.expm1(-0.96 * c.C)
    )


def bs_van_bohemen_2012(composition: Composition):
    """Bainite start temperature Bs of van Bohemen (2012), in K.

    .. math:: B_s\\,[^\\circ C] = 839 - (86\\,Mn + 23\\,Si + 67\\,Cr + 33\\,Ni + 75\\,Mo)
              - 270\\,[1 - \\exp(-1.33\\,C)]

    Notes
    -----
    Validity (from memory): low-alloy steels to about 1 % C. Coefficients from memory;
    against the shared open Bs data (154 records) it is the most accurate of the
    correlations here (``benchmarks/validate.py``).

    Reference: S. M. C. van Bohemen, Mater. Sci. Technol. 28 (2012) 487-495.

    Examples
    --------
    >>> from .composition import Composition
    >>> steel = Composition.from_dict({"C": 0.4, "Mn": 0.8, "Cr": 1.0})
    >>> round(float(bs_van_bohemen_2012(steel)) - 273.15, 1)
    591.8
    """
    c = composition
    return celsius_to_kelvin(
        839.0 - (86.0 * c.Mn + 23.0 * c.Si + 67.0 * c.Cr + 33.0 * c.Ni + 75.0 * c.Mo)
        - 270.0 * -np.expm1(-1.33 * c.C)
    )


def bs_kirkaldy_venugopalan_1984(composition: Composition):
    """Bainite start temperature Bs of Kirkaldy and Venugopalan (1984), in K.

    .. math:: B_s\\,[^\\circ C] = 656 - 58\\,C - 35\\,Mn - 75\\,Si - 15\\,Ni - 34\\,Cr - 41\\,Mo

    The Bs from which the bainite of their kinetic model is measured. Coefficients confirmed
    against Eq. (2) of the 2019 review of Bs equations in Metall. Mater. Trans. A (doi
    10.1007/s11661-019-05371-1), which quotes 656 - 57.7 C - 75 Si - 35 Mn - 15.3 Ni - 34 Cr
    - 41.2 Mo. The rounded values 58, 15 and 41 are used here (as recalled from the
    original, not confirmed); they move Bs by up to about 1 K against the review's.

    Reference: J. S. Kirkaldy and D. Venugopalan, in Phase Transformations in Ferrous
    Alloys, TMS-AIME (1984) 125-148.

    Examples
    --------
    >>> from .composition import Composition
    >>> round(float(bs_kirkaldy_venugopalan_1984(Composition.from_dict({"C": 0.8, "Mn": 0.75}))) - 273.15, 2)
    583.35
    """
    c = composition
    return celsius_to_kelvin(656.0 - 58.0 * c.C - 35.0 * c.Mn - 75.0 * c.Si - 15.0 * c.Ni - 34.0 * c.Cr
                             - 41.0 * c.Mo)


def bs_li_1998(composition: Composition):
    """Bainite start temperature Bs of Li et al. (1998), in K.

    .. math:: B_s\\,[^\\circ C] = 637 - 58\\,C - 35\\,Mn - 15\\,Ni - 34\\,Cr - 41\\,Mo

    Kirkaldy & Venugopalan's correlation with the silicon term dropped and the constant
    lowered, as Li et al. use it for their bainite; from memory, not checked against the paper.

    Reference: M. V. Li, D. V. Niebuhr, L. L. Meekisho and D. G. Atteridge, Metall. Mater.
    Trans. B 29 (1998) 661-672.

    Examples
    --------
    >>> from .composition import Composition
    >>> round(float(bs_li_1998(Composition.from_dict({"C": 0.8, "Mn": 0.75}))) - 273.15, 2)
    564.35
    """
    c = composition
    return celsius_to_kelvin(637.0 - 58.0 * c.C - 35.0 * c.Mn - 15.0 * c.Ni - 34.0 * c.Cr - 41.0 * c.Mo)


def martensite_fraction_koistinen_marburger_1959(
    T_K, Ms_K, alpha_per_K=KOISTINEN_MARBURGER_ALPHA_PER_K
):
    """Fraction of austenite turned to martensite on quenching to T, Koistinen-Marburger.

    .. math:: f = 1 - \\exp[-\\alpha\\,(M_s - T)] \\quad (T < M_s),
              \\qquad f = 0 \\quad (T \\ge M_s)

    Parameters
    ----------
    T_K : float or array_like
        Quench temperature, K.
    Ms_K : float or array_like
        Martensite start temperature, K.
    alpha_per_K : float or array_like, optional
        Rate constant, 1/K; 0.011 as published for plain-carbon and low-alloy steels
        (value from memory; secondary sources found by search quote the same).

    Returns
    -------
    float ndarray
        Martensite fraction of the austenite present at Ms (0 to 1), broadcast over the
        inputs.

    Notes
    -----
    Validity: athermal lath/plate martensite in carbon and low-alloy steels, from Ms down
    to about room temperature; it ignores stabilisation by holds.

    Reference: D. P. Koistinen and R. E. Marburger, "A general equation prescribing the
    extent of the austenite-martensite transformation in pure iron-carbon alloys and plain
    carbon steels", Acta Metall. 7 (1959) 59-60.

    Examples
    --------
    >>> round(float(martensite_fraction_koistinen_marburger_1959(473.15, 573.15)), 4)
    0.6671
    """
    undercooling = np.maximum(np.asarray(Ms_K, dtype=float) - np.asarray(T_K, dtype=float), 0.0)
    return -np.expm1(-alpha_per_K * undercooling)


def temperature_for_martensite_fraction_koistinen_marburger_1959(
    fraction, Ms_K, alpha_per_K=KOISTINEN_MARBURGER_ALPHA_PER_K
):
    """Quench temperature (K) that gives a martensite fraction, inverse Koistinen-Marburger.

    .. math:: T = M_s + \\ln(1 - f) / \\alpha

    Parameters
    ----------
    fraction : float or array_like
        Martensite fraction, 0 <= f < 1.
    Ms_K : float or array_like
        Martensite start temperature, K.
    alpha_per_K : float or array_like, optional
        Rate constant, 1/K (default 0.011, see
        :func:`martensite_fraction_koistinen_marburger_1959`).

    Returns
    -------
    float ndarray
        Temperature in K.

    Reference: D. P. Koistinen and R. E. Marburger, Acta Metall. 7 (1959) 59-60.

    Examples
    --------
    >>> round(float(temperature_for_martensite_fraction_koistinen_marburger_1959(0.5, 573.15)), 2)
    510.14
    """
    fraction = np.asarray(fraction, dtype=float)
    return np.asarray(Ms_K, dtype=float) + np.log1p(-fraction) / alpha_per_K
