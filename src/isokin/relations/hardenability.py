"""The ideal critical diameter by Grossmann's method: a base for carbon and grain size, times a
multiplying factor per alloying element.

DI = DI_base(C, G) * f_Mn * f_Si * f_Ni * f_Cr * f_Mo * f_Cu * f_V, in inches: the diameter of
a bar that an ideal quench (H = infinity) hardens to 50 % martensite at its centre.

All numbers here are recalled from memory of ASTM A255 ("Standard Test Methods for
Determining Hardenability of Steel", its calculation of DI from composition) and of
Grossmann's carbon chart; check them against the standard before relying on them. The carbon
base is given for ASTM grain size 7; other grain sizes scale it by :data:`GRAIN_SIZE_STEP`
per grain-size number (finer grain, lower hardenability: common practice).
"""

from __future__ import annotations

import numpy as np

#: Carbon base DI at ASTM grain size 7, (C mass %, DI in): ASTM A255's carbon factors as
#: recalled (about 0.364 sqrt(C)).
CARBON_BASE_GRAIN_7_IN = ((0.05, 0.0814), (0.10, 0.1153), (0.15, 0.1413), (0.20, 0.1623), (0.25, 0.1820),
                          (0.30, 0.1991), (0.35, 0.2154), (0.40, 0.2300), (0.45, 0.2440), (0.50, 0.2570),
                          (0.55, 0.2678), (0.60, 0.2803), (0.65, 0.2912), (0.70, 0.3020), (0.75, 0.3118))
#: Ratio of the base DI per grain-size number coarser than 7 (Grossmann's chart, from memory).
GRAIN_SIZE_STEP = 1.08

#: Linear multiplying factors f = 1 + a * X (X mass %) and the range each holds for (ASTM A255,
#: from memory). Manganese above 1.20 % follows 5.10 Mn - 1.12.
ALLOY_FACTORS = {"Mn": (3.3333, 1.20), "Si": (0.70, 2.00), "Ni": (0.3633, 2.00), "Cr": (2.16, 1.75),
                 "Mo": (3.00, 0.55), "Cu": (0.365, 0.55), "V": (1.73, 0.20)}


def base_di_grossmann_in(carbon, grain_size_astm=7.0):
    """The base ideal critical diameter for carbon and grain size, in.

    >>> round(float(base_di_grossmann_in(0.40)), 4)
    0.23
    """
    c_tab, di_tab = np.asarray(CARBON_BASE_GRAIN_7_IN).T
    base = np.interp(np.asarray(carbon, dtype=float), c_tab, di_tab)
    return base * GRAIN_SIZE_STEP ** (7.0 - np.asarray(grain_size_astm, dtype=float))


def alloy_factor_astm_a255(element, mass_percent):
    """One element's multiplying factor (ASTM A255, from memory).

    >>> round(float(alloy_factor_astm_a255("Cr", 1.0)), 2)
    3.16
    """
    x = np.asarray(mass_percent, dtype=float)
    slope, _ = ALLOY_FACTORS[element]
    if element == "Mn":
        return np.where(x <= 1.20, 1.0 + slope * x, 5.10 * x - 1.12)
    return 1.0 + slope * x


def ideal_critical_diameter_grossmann_in(composition, grain_size_astm=7.0):
    """DI by Grossmann's method, in, and the elements outside the range of their factor.

    Parameters
    ----------
    composition : Composition
        Mass percent.
    grain_size_astm : float
        ASTM E112 austenite grain size number.

    Returns
    -------
    (DI in inches, list of element names outside their factor's range)

    Examples
    --------
    >>> from isokin.relations.composition import Composition
    >>> di, outside = ideal_critical_diameter_grossmann_in(Composition.from_dict({"C": 0.4, "Mn": 0.8, "Cr": 1.0}))
    >>> round(float(di), 2), outside
    (2.66, [])
    """
    di = base_di_grossmann_in(composition.C, grain_size_astm)
    outside = []
    for element, (_, top) in ALLOY_FACTORS.items():
        x = np.asarray(getattr(composition, element), dtype=float)
        di = di * alloy_factor_astm_a255(element, x)
        if np.any(x > (1.95 if element == "Mn" else top)):
            outside.append(element)
    if np.any(np.asarray(composition.C) > CARBON_BASE_GRAIN_7_IN[-1][0]):
        outside.insert(0, "C")
    return di, outside
