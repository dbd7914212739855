"""Ferrite, pearlite and bainite kinetics of Li, Niebuhr, Meekisho and Atteridge (1998), as data.

The model (in the form of :mod:`isokin.products.steel_kinetics`, with D = exp(-Q/RT)) gives

=========  =====================================================================  ===  ==========  ======
product    ln F (composition in mass %)                                           n    Q (cal/mol) a
=========  =====================================================================  ===  ==========  ======
ferrite    1.00 + 6.31 C + 1.78 Mn + 0.31 Si + 1.12 Ni + 2.70 Cr + 4.06 Mo        3    23 500 (?)  0.41
pearlite   -4.25 + 4.12 C + 4.36 Mn + 0.44 Si + 1.71 Ni + 3.33 Cr + 5.19 sqrt(Mo) 3    27 500      0.32
bainite    -10.23 + 10.18 C + 0.85 Mn + 0.55 Ni + 0.90 Cr + 0.36 Mo               2    27 500      0.29
=========  =====================================================================  ===  ==========  ======

with 2**(a G) for the grain size and the reaction term S(X) with p = 0.4
(:mod:`isokin.relations.li_reaction`). Undercooling below Ae3 (ferrite), Ae1 (pearlite) and
Bs (bainite), Bs being Li's own, 637 - 58 C - 35 Mn - 15 Ni - 34 Cr - 41 Mo (°C).

All coefficients are from memory: the search tool reached the paper's title page and
abstract but not the pages with its equations, nor another publication quoting them. The
ferrite activation energy is in doubt: 23 500 cal/mol, Kirkaldy's original ferrite value,
is the default, and 27 500 cal/mol for all three products is the other recollection. An
alloy file switches with one line::

    [steel.kinetics.ferrite]
    activation_energy_cal_mol = 27500

Reference: M. V. Li, D. V. Niebuhr, L. L. Meekisho and D. G. Atteridge, "A computational
model for the prediction of steel hardenability", Metall. Mater. Trans. B 29 (1998)
661-672.
"""

from __future__ import annotations

from types import MappingProxyType

from ..constants import CALORIE_J
from ..relations.steel_critical import LOW_ALLOY_STEELS_MASS_PERCENT
from .steel_kinetics import Coefficients, KineticsModel

LI1998_REFERENCE = (
    "M. V. Li, D. V. Niebuhr, L. L. Meekisho and D. G. Atteridge, "
    "Metall. Mater. Trans. B 29 (1998) 661-672"
)
LI1998_LABEL = "Li et al. (1998)"

#: Composition range (mass %) inside which no warning is given. The paper's own stated
#: range could not be confirmed (see the module docstring); this is an assumption: the
#: low-alloy heat-treatable steels of the SAE 10xx-94xx families the model was built for.
LI1998_RANGES_MASS_PERCENT = LOW_ALLOY_STEELS_MASS_PERCENT

_LI = dict(reaction_exponent=0.4, grain_size_offset=0.0)
#: Li et al. (1998) as recalled (see the module docstring for the doubt on ferrite's Q).
LI1998_KINETICS = MappingProxyType({
    "ferrite": Coefficients(
        constant=1.00, terms={"C": 6.31, "Mn": 1.78, "Si": 0.31, "Ni": 1.12, "Cr": 2.70, "Mo": 4.06},
        undercooling_exponent=3.0, activation_energy_J_mol=23500.0 * CALORIE_J, grain_size_coefficient=0.41, **_LI),
    "pearlite": Coefficients(
        constant=-4.25, terms={"C": 4.12, "Mn": 4.36, "Si": 0.44, "Ni": 1.71, "Cr": 3.33, "sqrt_Mo": 5.19},
        undercooling_exponent=3.0, activation_energy_J_mol=27500.0 * CALORIE_J, grain_size_coefficient=0.32, **_LI),
    "bainite": Coefficients(
        constant=-10.23, terms={"C": 10.18, "Mn": 0.85, "Ni": 0.55, "Cr": 0.90, "Mo": 0.36},
        undercooling_exponent=2.0, activation_energy_J_mol=27500.0 * CALORIE_J, grain_size_coefficient=0.29, **_LI),
})

LI1998 = KineticsModel(
    key="li_1998",
    label=LI1998_LABEL,
    reference=LI1998_REFERENCE,
    products=LI1998_KINETICS,
    bainite_start="li_1998",
    ranges=LI1998_RANGES_MASS_PERCENT,
    provenance=("Li et al. (1998) coefficients and Bs recalled from memory, not checked against the paper; the "
                "ferrite activation energy is in doubt (23 500 cal/mol, Kirkaldy's ferrite value, is the default; "
                "27 500 cal/mol is the other recollection: set [steel.kinetics.ferrite] activation_energy_cal_mol to "
                "switch)"),
)
