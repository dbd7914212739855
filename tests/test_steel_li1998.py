"""Ferrite, pearlite and bainite of Li et al. (1998) against the paper and the trade.

Model coefficients: M. V. Li, D. V. Niebuhr, L. L. Meekisho and D. G. Atteridge,
Metall. Mater. Trans. B 29 (1998) 661-672; every coefficient below is from memory (the
paper's equation pages could not be reached with the search tool).
"""

import math

import numpy as np
import pytest
from hypothesis import example, given, settings
from hypothesis import strategies as st
from scipy.integrate import quad

from isokin.constants import CALORIE_J, GAS_CONSTANT_J_MOL_K, celsius_to_kelvin, kelvin_to_celsius
import isokin
from isokin.products.base import Product
from isokin.products.li1998 import LI1998, LI1998_KINETICS, LI1998_REFERENCE
from isokin.products.steel_kinetics import SteelProduct
from isokin.relations.composition import Composition, range_warnings
from isokin.relations.li_reaction import reaction_integral

BASE = {"C": 0.3, "Mn": 0.7, "Si": 0.25, "Ni": 0.5, "Cr": 0.5, "Mo": 0.2}
# Fixed critical temperatures, so that a composition change moves only the factor F.
UPPER_K, LOWER_K = 1000.0, 550.0

# Li et al. (1998), from memory: constant and per-mass-% terms of ln F, n, Q, grain term.
LI = {
    "ferrite": dict(
        constant=1.00,
        terms={"C": 6.31, "Mn": 1.78, "Si": 0.31, "Ni": 1.12, "Cr": 2.70, "Mo": 4.06},
        n=3, Q_cal=23500.0, grain=0.41,
    ),
    "pearlite": dict(
        constant=-4.25, terms={"C": 4.12, "Mn": 4.36, "Si": 0.44, "Ni": 1.71, "Cr": 3.33},
        n=3, Q_cal=27500.0, grain=0.32,
    ),
    "bainite": dict(
        constant=-10.23,
        terms={"C": 10.18, "Mn": 0.85, "Si": 0.0, "Ni": 0.55, "Cr": 0.90, "Mo": 0.36},
        n=2, Q_cal=27500.0, grain=0.29,
    ),
}
PRODUCTS = list(LI)


def Li1998Product(cls, coefficients, composition, grain, upper, lower):
    return SteelProduct(cls, coefficients, composition, grain, upper, lower, model=f"{LI1998.label}, {LI1998.reference}",
                        calibrated_ranges=LI1998.ranges)


def li_steel(composition, grain, **options):
    """A steel with Li's kinetics: (products, martensite, critical lines in K)."""
    alloy = isokin.steel(composition if isinstance(composition, dict) else composition.as_dict(), grain,
                         kinetics_model="li_1998", **options)
    return alloy.products, alloy.martensite, alloy.critical_K


def _make(cls, grain=7.0, upper=UPPER_K, lower=LOWER_K, **changes):
    return Li1998Product(cls, LI1998_KINETICS[cls], Composition.from_dict({**BASE, **changes}), grain, upper, lower)


def _log_time_ratio(cls, **changes):
    T, X = 800.0, 0.3
    changed = _make(cls, **changes).time_to_fraction(T, X)
    return math.log(changed / _make(cls).time_to_fraction(T, X))


steels = st.fixed_dictionaries(
    {
        "C": st.floats(0.1, 0.6), "Mn": st.floats(0.3, 1.6), "Si": st.floats(0.0, 0.6),
        "Ni": st.floats(0.0, 2.0), "Cr": st.floats(0.0, 1.2), "Mo": st.floats(0.0, 0.4),
    }
)
grains = st.floats(3.0, 11.0)


@pytest.mark.parametrize("cls", PRODUCTS)
def test_products_meet_the_common_interface(cls):
    product = _make(cls)
    assert isinstance(product, Product)
    assert product.name in ("ferrite", "pearlite", "bainite")
    assert "Li" in product.model and "1998" in product.model
    assert product.upper_K == UPPER_K and product.lower_K == LOWER_K
    assert "661-672" in LI1998_REFERENCE and product.separable


@pytest.mark.parametrize("cls", PRODUCTS)
def test_coefficients_as_data_are_the_recalled_ones(cls):
    # The shipped data object holds the table above (from memory), term for term.
    c, p = LI1998_KINETICS[cls], LI[cls]
    expected_terms = {k: v for k, v in p["terms"].items() if v}
    if cls == "pearlite":
        expected_terms["sqrt_Mo"] = 5.19
    assert c.constant == p["constant"] and dict(c.terms) == expected_terms and not c.linear
    assert c.reaction_exponent == 0.4 and c.grain_size_offset == 0.0 and not c.drag_terms and not c.retardation_terms
    assert c.undercooling_exponent == p["n"] and c.grain_size_coefficient == p["grain"]
    assert c.activation_energy_cal_mol == pytest.approx(p["Q_cal"], rel=1e-15)


def test_an_overridden_activation_energy_moves_the_times_by_the_arrhenius_factor():
    # The other recollection of ferrite's Q (27 500 cal/mol) is one override away; at fixed
    # T, F(T) changes by exp(dQ / RT) exactly.
    steel = Composition.from_dict(BASE)
    other = LI1998_KINETICS["ferrite"].replace(activation_energy_J_mol=27500.0 * CALORIE_J)
    T = 850.0
    a = Li1998Product("ferrite", LI1998_KINETICS["ferrite"], steel, 7.0, UPPER_K, LOWER_K).time_to_fraction(T, 0.5)
    b = Li1998Product("ferrite", other, steel, 7.0, UPPER_K, LOWER_K).time_to_fraction(T, 0.5)
    assert b / a == pytest.approx(math.exp(4000.0 * CALORIE_J / (GAS_CONSTANT_J_MOL_K * T)), rel=1e-12)


def test_separable_factors_rebuild_the_time_and_the_inverse_undoes_s():
    product = _make("bainite")
    T, X = np.array([650.0, 700.0, 760.0]), np.array([0.01, 0.3, 0.99])
    np.testing.assert_allclose(product.time_factor(T) * product.reaction_term(X), product.time_to_fraction(T, X),
                               rtol=1e-14)
    np.testing.assert_allclose(product.reaction_term_inverse(product.reaction_term(X)), X, rtol=1e-11)


@pytest.mark.parametrize("cls", PRODUCTS)
def test_composition_coefficients(cls):
    for element, coefficient in LI[cls]["terms"].items():
        assert _log_time_ratio(cls, **{element: BASE[element] + 0.1}) == pytest.approx(
            0.1 * coefficient, abs=1e-12
        ), element


def test_pearlite_molybdenum_enters_as_its_square_root():
    # Li et al. (1998): 5.19 sqrt(Mo) in ln F of pearlite.
    expected = 5.19 * (math.sqrt(0.5) - math.sqrt(0.2))
    assert _log_time_ratio("pearlite", Mo=0.5) == pytest.approx(expected, abs=1e-12)


@pytest.mark.parametrize("cls", PRODUCTS)
def test_absolute_time_from_the_published_expression(cls):
    # tau = F / (2**(aG) dT**n exp(-Q/RT)) S(X), evaluated here term by term.
    p = LI[cls]
    steel = {"C": 0.35, "Mn": 0.9, "Si": 0.3, "Ni": 1.0, "Cr": 0.8, "Mo": 0.25}
    ln_F = p["constant"] + sum(p["terms"][e] * steel[e] for e in p["terms"])
    if cls == "pearlite":
        ln_F += 5.19 * math.sqrt(steel["Mo"])
    G, T, X = 6.5, 780.0, 0.2
    Q = p["Q_cal"] * CALORIE_J
    expected = (
        math.exp(ln_F) / (2 ** (p["grain"] * G) * (UPPER_K - T) ** p["n"]
                          * math.exp(-Q / (GAS_CONSTANT_J_MOL_K * T)))
        * reaction_integral(X)
    )
    product = Li1998Product(cls, LI1998_KINETICS[cls], Composition.from_dict(steel), G, UPPER_K, LOWER_K)
    assert product.time_to_fraction(T, X) == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize("cls", PRODUCTS)
def test_undercooling_exponent_and_activation_energy(cls):
    p = LI[cls]
    T, X = 800.0, 0.5
    # Undercooling doubled at fixed T: time falls by 2**n.
    near = _make(cls, upper=T + 50.0).time_to_fraction(T, X)
    far = _make(cls, upper=T + 100.0).time_to_fraction(T, X)
    assert near / far == pytest.approx(2.0 ** p["n"], rel=1e-12)
    # Same undercooling at two temperatures: the ratio is the Arrhenius term alone.
    T1, T2 = 700.0, 900.0
    t1 = _make(cls, upper=T1 + 60.0).time_to_fraction(T1, X)
    t2 = _make(cls, upper=T2 + 60.0).time_to_fraction(T2, X)
    Q = p["Q_cal"] * CALORIE_J
    arrhenius = math.exp(Q / GAS_CONSTANT_J_MOL_K * (1 / T1 - 1 / T2))
    assert t1 / t2 == pytest.approx(arrhenius, rel=1e-12)


@pytest.mark.parametrize("cls", PRODUCTS)
def test_one_astm_number_finer_shortens_times_by_two_to_the_grain_coefficient(cls):
    # Li et al. (1998): grain-size factors 2**(0.41 G), 2**(0.32 G), 2**(0.29 G).
    T = np.linspace(600.0, 990.0, 7)
    X = np.array([[0.01], [0.5], [0.99]])
    coarse = _make(cls, grain=5.0).time_to_fraction(T, X)
    fine = _make(cls, grain=6.0).time_to_fraction(T, X)
    np.testing.assert_allclose(coarse / fine, 2.0 ** LI[cls]["grain"], rtol=1e-13)


def test_eutectoid_steel_pearlite_nose():
    # Common practice (from memory): a plain eutectoid steel (about 0.8 C, 0.76 Mn, ASTM 6) starts
    # pearlite fastest between 500 and 600 C, in about one second.
    products, _, critical = li_steel({"C": 0.80, "Mn": 0.76}, 6.0)
    pearlite = products[1]
    T = np.linspace(pearlite.lower_K, critical["Ae1"], 20001)
    t01 = pearlite.time_to_fraction(T, 0.01)
    nose = np.argmin(t01)
    assert 500.0 < kelvin_to_celsius(T[nose]) < 600.0
    assert 0.1 < t01[nose] < 10.0
    # The curve is a C: it rises on both sides of the single minimum.
    finite = np.isfinite(t01)
    assert np.all(np.diff(t01[finite][: nose + 1]) < 0) and np.all(np.diff(t01[finite][nose:]) > 0)


def test_no_proeutectoid_ferrite_at_or_above_the_eutectoid_carbon():
    T = celsius_to_kelvin(np.linspace(100.0, 900.0, 801))
    eutectoid, _, _ = li_steel({"C": 0.87, "Mn": 0.76}, 6.0)
    assert np.all(np.isinf(eutectoid[0].time_to_fraction(T, 0.01)))
    assert np.all(eutectoid[0].rate(T, 0.1) == 0.0)
    assert eutectoid[0].upper_K == eutectoid[0].lower_K
    hypo, _, _ = li_steel({"C": 0.40, "Mn": 0.76}, 6.0)
    assert np.any(np.isfinite(hypo[0].time_to_fraction(T, 0.01)))


def test_products_lie_in_their_domains_with_li_s_own_bs():
    # AISI 4340 at mid-range of SAE J404 (ranges from memory). Ferrite below Ae3, pearlite
    # below Ae1, both above Li's own Bs (from memory: 637 - 58 C - 35 Mn - 15 Ni - 34 Cr -
    # 41 Mo); bainite from that Bs to Ms.
    steel = {"C": 0.405, "Mn": 0.70, "Si": 0.25, "Ni": 1.825, "Cr": 0.80, "Mo": 0.25}
    products, martensite, critical = li_steel(steel, 7.0)
    bs_li = celsius_to_kelvin(637 - 58 * 0.405 - 35 * 0.70 - 15 * 1.825 - 34 * 0.80 - 41 * 0.25)
    assert [p.name for p in products] == ["ferrite", "pearlite", "bainite"]
    assert martensite.upper_K == critical["Ms"]
    assert list(critical) == ["Ae3", "Ae1", "Bs", "Ms", "M50", "M90"]
    assert products[0].upper_K == critical["Ae3"] and products[1].upper_K == critical["Ae1"]
    assert products[2].upper_K == pytest.approx(bs_li, abs=1e-9)
    assert products[0].lower_K == products[1].lower_K == pytest.approx(bs_li, abs=1e-9)
    assert products[2].lower_K == critical["Ms"]
    assert critical["Ae3"] > critical["Ae1"] > critical["Bs"] > critical["Ms"] > critical["M50"] > critical["M90"]
    _, _, other = li_steel(steel, 7.0, ms_method="steven_haynes_1956")
    assert other["Ms"] != critical["Ms"]
    with pytest.raises(isokin.InputError, match="andrews_1965"):
        li_steel(steel, 7.0, ms_method="andrews")


def test_validity_ranges_give_warnings_that_name_the_model():
    steel = Composition.from_dict({"C": 0.95, "Mn": 0.3, "Cr": 1.45})
    warnings = range_warnings(steel, LI1998.ranges, LI1998_REFERENCE)
    assert len(warnings) == 1 and warnings[0].startswith("C = 0.95") and "Li" in warnings[0]


@settings(max_examples=40, deadline=None)
@given(steel=steels, grain=grains)
def test_times_are_ordered_where_a_product_forms_and_infinite_elsewhere(steel, grain):
    assert_times_ordered(*li_steel(steel, grain))


def assert_times_ordered(products, _, critical):
    """Positive, finite only inside each product's window (inf outside), and rising with the
    fraction; shared with the Kirkaldy & Venugopalan tests."""
    T = np.linspace(critical["Ms"] - 50.0, max(p.upper_K for p in products) + 50.0, 400)
    X = np.array([[0.01], [0.5], [0.99]])
    for product in products:
        t = product.time_to_fraction(T, X)
        forms = (T >= product.lower_K) & (T < product.upper_K)
        assert not np.any(np.isnan(t)) and np.all(t > 0.0)
        assert np.all(np.isfinite(t[:, forms])) and np.all(np.isinf(t[:, ~forms]))
        assert np.all(t[0, forms] < t[1, forms]) and np.all(t[1, forms] < t[2, forms])


@settings(max_examples=40, deadline=None)
@given(steel=steels, grain=grains, dmo=st.floats(0.05, 0.5), dcr=st.floats(0.1, 1.0))
def test_molybdenum_and_chromium_delay_the_pearlite_nose(steel, grain, dmo, dcr):
    # Common practice: Mo and Cr make steels more hardenable by delaying pearlite.
    def nose_time(composition):
        products, _, critical = li_steel(composition, grain)
        T = np.linspace(critical["Ms"], critical["Ae1"], 3001)
        return np.min(products[1].time_to_fraction(T, 0.01))

    base = nose_time(steel)
    assert nose_time({**steel, "Mo": steel["Mo"] + dmo}) > base
    assert nose_time({**steel, "Cr": steel["Cr"] + dcr}) > base


@settings(max_examples=25, deadline=None)
@given(
    cls=st.sampled_from(PRODUCTS), steel=steels, grain=grains,
    where=st.floats(0.05, 0.95), x1=st.floats(0.001, 0.5), x2=st.floats(0.5, 0.999),
)
# The case that failed on a fresh machine: two nearly equal times.
@example(cls="ferrite", steel={"C": 0.5, "Mn": 1.25, "Si": 0.0, "Ni": 0.0, "Cr": 1.125, "Mo": 0.0}, grain=3.0,
         where=0.25, x1=0.49999999999999994, x2=0.5)
def test_rate_integrates_back_to_the_isothermal_times(cls, steel, grain, where, x1, x2):
    # Reference: scipy.integrate.quad of dt = dX / rate from X1 to X2. The expected value is
    # a difference of two times that may nearly cancel (x1 and x2 both near 0.5), so its
    # own rounding is about eps times t(x2): the tolerance has that absolute part too.
    product = Li1998Product(cls, LI1998_KINETICS[cls], Composition.from_dict(steel), grain, UPPER_K, LOWER_K)
    T = LOWER_K + where * (UPPER_K - LOWER_K)
    elapsed, _ = quad(lambda x: 1.0 / product.rate(T, x), x1, x2, epsrel=1e-11, limit=200)
    t2 = product.time_to_fraction(T, x2)
    expected = t2 - product.time_to_fraction(T, x1)
    assert elapsed == pytest.approx(expected, rel=1e-8, abs=1e-12 * t2)


@pytest.mark.parametrize("cls", PRODUCTS)
def test_rate_is_zero_where_the_product_cannot_form(cls):
    product = _make(cls)
    assert np.all(product.rate([LOWER_K - 1.0, UPPER_K, UPPER_K + 10.0], 0.5) == 0.0)
    assert np.all(product.rate(800.0, [0.0, 1.0]) == 0.0)
    assert product.rate(800.0, 0.5) > 0.0


def test_a_batch_of_ten_thousand_steels_matches_one_by_one():
    rng = np.random.default_rng(1998)
    n = 10_000
    columns = {
        "C": rng.uniform(0.1, 0.9, n), "Mn": rng.uniform(0.3, 1.8, n),
        "Si": rng.uniform(0.0, 0.8, n), "Ni": rng.uniform(0.0, 3.0, n),
        "Cr": rng.uniform(0.0, 1.5, n), "Mo": rng.uniform(0.0, 0.5, n),
    }
    grain = rng.uniform(4.0, 10.0, n)
    T = np.linspace(450.0, 1150.0, 200)
    products, _, critical = li_steel(columns, grain)
    times = [p.time_to_fraction(T[None, :], 0.01) for p in products]
    rates = [p.rate(T[None, :], 0.3) for p in products]
    assert times[0].shape == (n, 200)
    # One by one for a random sample of the batch (all 10 000 would only repeat the check).
    for i in rng.choice(n, size=60, replace=False):
        products_i, _, critical_i = li_steel({k: v[i] for k, v in columns.items()}, grain[i])
        for key in critical_i:
            assert critical[key][i] == pytest.approx(critical_i[key], rel=1e-14)
        for k, product in enumerate(products_i):
            np.testing.assert_allclose(times[k][i], product.time_to_fraction(T, 0.01), rtol=1e-13)
            np.testing.assert_allclose(rates[k][i], product.rate(T, 0.3), rtol=1e-13)
