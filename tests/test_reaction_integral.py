"""The reaction term S(X) of Li et al. (1998) against reference integrators.

Source of the definition: Li, Niebuhr, Meekisho and Atteridge, Metall. Mater. Trans. B 29
(1998) 661-672 (definition from memory). mpmath.quad (tanh-sinh,
30 digits) is the reference integrator.
"""

import mpmath
import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from isokin.relations.li_reaction import (
    reaction_integral_inverse,
    reaction_integral,
    reaction_integrand,
    reaction_rate_shape,
)

fractions = st.floats(min_value=0.0, max_value=1.0, allow_nan=False)


def _mpmath_reference(X):
    """S(X) by mpmath's adaptive tanh-sinh at 30 digits, split at 1/2 so both singular
    ends are interval ends."""
    with mpmath.workdps(30):
        f = lambda x: 1 / (x ** (mpmath.mpf("0.4") * (1 - x)) * (1 - x) ** (mpmath.mpf("0.4") * x))
        X = mpmath.mpf(X)
        if X <= 0.5:
            return float(mpmath.quad(f, [0, X]))
        return float(mpmath.quad(f, [0, 0.5]) + mpmath.quad(f, [0.5, X]))


@pytest.mark.parametrize("X", [0.001, 0.01, 0.5, 0.99, 0.999, 1.0])
def test_matches_mpmath_at_the_named_fractions(X):
    # Reference: mpmath.quad. The brief asks for 1e-8; the rule reaches ~1e-15.
    assert reaction_integral(X) == pytest.approx(_mpmath_reference(X), rel=1e-12)


def test_matches_mpmath_over_a_fine_spread():
    # Reference: mpmath.quad; the spread crowds both singular ends.
    X = np.unique(
        np.concatenate(
            [np.logspace(-9, -1, 9), np.linspace(0.02, 0.98, 25), 1.0 - np.logspace(-9, -1, 9)]
        )
    )
    computed = reaction_integral(X)
    reference = np.array([_mpmath_reference(x) for x in X])
    np.testing.assert_allclose(computed, reference, rtol=1e-12, atol=0.0)


def test_small_fraction_follows_the_leading_power_law():
    # Analytic: near 0 the integrand is x**-0.4 (1 + O(x ln x)), so S(X) -> X**0.6 / 0.6.
    X = 1e-10
    assert reaction_integral(X) == pytest.approx(X**0.6 / 0.6, rel=1e-7)


@settings(max_examples=60, deadline=None)
@given(st.floats(min_value=0.0, max_value=0.5, allow_nan=False))
def test_symmetry_of_the_integrand_splits_the_total(X):
    # Analytic: f(1 - x) = f(x), so S(X) + S(1 - X) = S(1). The pair is formed so that
    # both members are exact binary numbers (1 - Y is exact for Y in [1/2, 1]).
    Y = 1.0 - X
    X = 1.0 - Y
    total = reaction_integral(1.0)
    assert reaction_integral(X) + reaction_integral(Y) == pytest.approx(total, rel=1e-13)


@settings(max_examples=40, deadline=None)
@given(fractions, fractions)
def test_integrand_integrates_to_the_difference_of_s(a, b):
    # Reference: mpmath's tanh-sinh quadrature of the integrand up to each fraction
    # (scipy's quad loses accuracy at the singular ends, e.g. from 1e-9 to 1).
    a, b = sorted((a, b))
    reference = _mpmath_reference(b) - _mpmath_reference(a)
    difference = reaction_integral(b) - reaction_integral(a)
    assert difference == pytest.approx(reference, rel=1e-8, abs=1e-12)


@settings(max_examples=60, deadline=None)
@given(fractions, fractions)
def test_s_increases_with_fraction(a, b):
    a, b = sorted((a, b))
    assert reaction_integral(a) <= reaction_integral(b)


def test_rate_shape_is_the_reciprocal_of_the_integrand_and_zero_at_both_ends():
    X = np.array([0.0, 1e-6, 0.3, 0.5, 0.9, 1.0])
    inside = X[1:-1]
    product = reaction_rate_shape(inside) * reaction_integrand(inside)
    np.testing.assert_allclose(product, 1.0, rtol=1e-14)
    assert reaction_rate_shape(0.0) == 0.0 and reaction_rate_shape(1.0) == 0.0
    assert np.all(np.isinf(reaction_integrand(np.array([0.0, 1.0]))))
    # The integrand at 1/2 is 1 / (0.5**0.2 * 0.5**0.2) = 2**0.4 (closed form).
    assert reaction_integrand(0.5) == pytest.approx(2**0.4, rel=1e-15)


def test_shapes_are_kept_and_scalars_stay_scalars():
    X = np.full((4, 1, 3), 0.25)
    assert reaction_integral(X).shape == (4, 1, 3)
    assert isinstance(reaction_integral(0.25), float)
    assert isinstance(reaction_integrand(0.25), float)


@pytest.mark.parametrize("bad", [-0.1, 1.0001, np.nan, [0.2, 1.5]])
def test_fraction_outside_zero_one_is_refused(bad):
    with pytest.raises(ValueError, match=r"\[0, 1\]"):
        reaction_integral(bad)


@settings(max_examples=60, deadline=None)
@given(st.floats(min_value=1e-12, max_value=1.0 - 1e-12))
def test_inverse_against_brentq(X):
    # Reference: scipy's brentq on S(y) = s for the distance y = min(X, 1 - X) to the nearer
    # end (the integrand's symmetry gives the upper half), where a fraction's precision lives.
    from scipy.optimize import brentq

    S = reaction_integral(X)
    upper = X > 0.5
    s_low = reaction_integral(1.0) - S if upper else S
    y_ref = brentq(lambda y: reaction_integral(y) - s_low, 0.0, 0.5, xtol=1e-300, rtol=1e-15)
    got = reaction_integral_inverse(S)
    y = 1.0 - got if upper else got
    assert y == pytest.approx(y_ref, rel=1e-11, abs=3e-16 if upper else 0.0)


def test_inverse_ends_and_refusal():
    assert reaction_integral_inverse(0.0) == 0.0
    assert reaction_integral_inverse(reaction_integral(1.0)) == 1.0
    with pytest.raises(ValueError):
        reaction_integral_inverse(3.0)


@pytest.mark.parametrize("p, c", [(0.4, 0.0), (2 / 3, 0.0), (2 / 3, 4.0)])
def test_intervals_found_without_search_are_the_searched_ones(p, c):
    # Reference: numpy.searchsorted on the table's own nodes. The fast lookups (arithmetic
    # for S, a bucket plus the counted comparisons for the inverse) must land in the interval
    # the search finds, or next to it only where a value sits on a node (same value either
    # side); S differs from the searched table by rounding only (v**3 for y**(1 - p)).
    from isokin.relations.reaction_terms import PieceTable, UpperTable

    table = PieceTable(p, c)
    rng = np.random.default_rng(3)
    y = np.concatenate([0.5 * rng.random(200_000), table.y, 0.5 * rng.random(1000) ** 8])
    found = np.minimum((y**table.k * table.v_scale).astype(np.intp), table.intervals - 1)
    searched = np.clip(np.searchsorted(table.w, y ** (1 - p), side="right") - 1, 0, table.intervals - 1)
    assert np.all(np.abs(found - searched) <= 1)
    np.testing.assert_allclose(table.forward(y), table.S_of_w(y ** (1 - p)), rtol=1e-14, atol=1e-300)
    if c != 0.0:  # the upper half's table reads its values the same way
        upper = UpperTable(p, c, table.half)
        np.testing.assert_allclose(upper.forward(y), upper.S_of_w(y ** (1 - p)), rtol=1e-14)
    s = np.concatenate([table.half * rng.random(200_000), table.S])
    w = np.clip(table.w_of_S(s), 0.0, None)
    np.testing.assert_allclose(table.inverse(s), w ** (1 / (1 - p)), rtol=1e-13, atol=1e-300)
