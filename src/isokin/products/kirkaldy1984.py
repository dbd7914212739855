"""Ferrite, pearlite and bainite kinetics of Kirkaldy and Venugopalan (1984), as data.

In the form of :mod:`isokin.products.steel_kinetics`, with the grain size as
2**((G - 1) / 2) and the reaction term S(X) with p = 2/3 (composition in mass %):

=========  ==========================================  ===  ========================================
product    F                                           n    1 / D
=========  ==========================================  ===  ========================================
ferrite    59.6 Mn + 1.45 Ni + 67.7 Cr + 244 Mo         3    exp(23 500 / RT)
pearlite   1.79 + 5.42 (Cr + Mo + 4 Mo Ni)               3    exp(27 500 / RT)
                                                             + (0.01 Cr + 0.52 Mo) exp(37 500 / RT)
bainite    (2.34 + 10.1 C + 3.8 Cr + 19 Mo) 1e-4         2    exp(27 500 / RT)
=========  ==========================================  ===  ========================================

(activation energies in cal/mol). The bainite reaction term carries a retardation
exp(c X**2) with c = 1.9 C + 2.5 Mn + 0.9 Ni + 1.7 Cr + 4 Mo - 2.6, so its later stages slow
with alloying. Pearlite's second, solute-drag term at the higher activation energy is what
moves its nose up with Cr and Mo. Undercooling below Ae3 (ferrite), Ae1 (pearlite) and
Bs (bainite), Bs being Kirkaldy & Venugopalan's own,
656 - 58 C - 35 Mn - 75 Si - 15 Ni - 34 Cr - 41 Mo (°C).

All coefficients are from memory (the proceedings could not be reached here); the Bs
correlation was confirmed against Eq. (2) of a 2019 review of Bs equations in Metall. Mater.
Trans. A (doi 10.1007/s11661-019-05371-1), which quotes 656 - 57.7 C - 75 Si - 35 Mn -
15.3 Ni - 34 Cr - 41.2 Mo.

Reference: J. S. Kirkaldy and D. Venugopalan, "Prediction of microstructure and
hardenability in low alloy steels", in Phase Transformations in Ferrous Alloys, A. R. Marder
and J. I. Goldstein (eds.), TMS-AIME, Warrendale (1984) 125-148.
"""

from __future__ import annotations

from types import MappingProxyType

from ..constants import CALORIE_J
from .li1998 import LI1998_RANGES_MASS_PERCENT
from .steel_kinetics import Coefficients, KineticsModel

KV1984_REFERENCE = (
    "J. S. Kirkaldy and D. Venugopalan, in Phase Transformations in Ferrous Alloys, A. R. Marder and "
    "J. I. Goldstein (eds.), TMS-AIME (1984) 125-148"
)
KV1984_LABEL = "Kirkaldy & Venugopalan (1984)"

_KV = dict(linear=True, reaction_exponent=2.0 / 3.0, grain_size_coefficient=0.5, grain_size_offset=1.0)
KV1984_KINETICS = MappingProxyType({
    "ferrite": Coefficients(
        constant=0.0, terms={"Mn": 59.6, "Ni": 1.45, "Cr": 67.7, "Mo": 244.0},
        undercooling_exponent=3.0, activation_energy_J_mol=23500.0 * CALORIE_J, **_KV),
    "pearlite": Coefficients(
        constant=1.79, terms={"Cr": 5.42, "Mo": 5.42, "Mo*Ni": 21.68},
        undercooling_exponent=3.0, activation_energy_J_mol=27500.0 * CALORIE_J,
        drag_activation_energy_J_mol=37500.0 * CALORIE_J, drag_terms={"Cr": 0.01, "Mo": 0.52}, **_KV),
    "bainite": Coefficients(
        constant=2.34e-4, terms={"C": 10.1e-4, "Cr": 3.8e-4, "Mo": 19.0e-4},
        undercooling_exponent=2.0, activation_energy_J_mol=27500.0 * CALORIE_J,
        retardation_constant=-2.6, retardation_terms={"C": 1.9, "Mn": 2.5, "Ni": 0.9, "Cr": 1.7, "Mo": 4.0}, **_KV),
})

KV1984 = KineticsModel(
    key="kirkaldy_venugopalan_1984",
    label=KV1984_LABEL,
    reference=KV1984_REFERENCE,
    products=KV1984_KINETICS,
    bainite_start="kirkaldy_venugopalan_1984",
    # the low-alloy steels both models were built for; the authors' own limits could not be
    # checked (an assumption, as for Li et al.)
    ranges=LI1998_RANGES_MASS_PERCENT,
    provenance=("Kirkaldy & Venugopalan (1984) coefficients recalled from memory, not checked against the "
                "proceedings; their Bs confirmed against a 2019 review quoting it"),
)
