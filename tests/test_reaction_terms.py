"""The reaction terms S(X; p, c) of Kirkaldy's family against reference integrators.

The family (Kirkaldy & Venugopalan 1984, p = 2/3 with a retardation exp(c x**2) in their
bainite; Li et al. 1998, p = 0.4, c = 0; definitions from memory) is

    S(X; p, c) = integral from 0 to X of exp(c x**2) dx / (x**(p (1 - x)) (1 - x)**(p x)).

References: J. S. Kirkaldy and D. Venugopalan, in Phase Transformations in Ferrous Alloys,
A. R. Marder and J. I. Goldstein (eds.), TMS-AIME (1984) 125-148; M. V. Li, D. V. Niebuhr,
L. L. Meekisho and D. G. Atteridge, Metall. Mater. Trans. B 29 (1998) 661-672.

Reference integrator: mpmath.quad (tanh-sinh) at 30 digits, after the substitution
x = u**(1/(1 - p)) that removes the x**-p end singularity (plain quad at 30 digits is not
accurate enough at tiny X for p = 2/3). The x = 1 end is reached the same way from the
mirrored side, 1 - x = u**(1/(1 - p)). Reference root finder: scipy.optimize.brentq.
p = 0.55 stands for a general exponent; c = -2.6 is the smallest bainite retardation of
Kirkaldy & Venugopalan (no alloying), c = 12 beyond the largest of their low-alloy range.
"""

import math
import warnings
from functools import lru_cache

import mpmath
import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.optimize import brentq

from isokin.relations.reaction_terms import (
    ReactionTerm,
    inverse_values,
    rate_shape,
    reaction_term,
    values,
)

EXPONENTS = [2.0 / 3.0, 0.55]
RETARDATIONS = [-2.6, 0.0, 1.5, 4.0, 12.0]
#: Fractions crowding both singular ends, the middle and completion.
END_FRACTIONS = np.unique(np.concatenate([
    np.logspace(-9, -1, 5), [0.3, 0.5],
    1.0 - np.logspace(-9, -1, 5), [1.0],
]))


def tolerance(c):
    """Relative tolerance against mpmath: 1e-12, and 1e-11 where |c| >= 5 (a steep exponential
    asks more of the fixed rule)."""
    return 1e-11 if abs(c) >= 5 else 1e-12


# ---------------------------------------------------------------------------------------
# mpmath reference
# ---------------------------------------------------------------------------------------

def _mp_piece(y, p, c, mirrored):
    """integral from 0 to y of exp(c x**2) f(x) dx (mirrored: exp(c (1 - x)**2) f(x)), with
    f(x) = x**(-p (1 - x)) (1 - x)**(-p x) = f(1 - x), after x = u**e, e = 1/(1 - p):
    dx = e u**(e - 1) du and x**(-p (1 - x)) = u**(-p e (1 - x)), so the integrand is
    e u**(p e x) (1 - x)**(-p x) exp(...), finite at u = 0."""
    e = 1 / (1 - p)

    def g(u):
        x = u**e
        return e * u ** (p * e * x) * (1 - x) ** (-p * x) * mpmath.exp(c * ((1 - x) if mirrored else x) ** 2)

    return mpmath.quad(g, [0, y ** (1 - p)])


@lru_cache(maxsize=None)
def _mp_halves(p, c):
    with mpmath.workdps(30):
        half = mpmath.mpf(1) / 2
        return _mp_piece(half, mpmath.mpf(p), mpmath.mpf(c), False), _mp_piece(half, mpmath.mpf(p), mpmath.mpf(c), True)


def mp_S(X, p, c):
    """S(X; p, c) by mpmath at 30 digits (p, c and X taken exactly as the doubles given)."""
    with mpmath.workdps(30):
        X, P, C = mpmath.mpf(X), mpmath.mpf(p), mpmath.mpf(c)
        if X <= 0.5:
            return float(_mp_piece(X, P, C, False))
        lower, upper = _mp_halves(p, c)
        # S(X) = S(1/2) + integral from 1/2 to X = L(1/2) + G(1/2) - G(1 - X), 1 - X exact here
        return float(lower + upper - _mp_piece(1 - X, P, C, True))


def mp_rate_shape(X, p, c):
    with mpmath.workdps(30):
        x, P, C = mpmath.mpf(X), mpmath.mpf(p), mpmath.mpf(c)
        return float(x ** (P * (1 - x)) * (1 - x) ** (P * x) * mpmath.exp(-C * x * x))


# ---------------------------------------------------------------------------------------
# S against mpmath
# ---------------------------------------------------------------------------------------

@pytest.mark.parametrize("c", RETARDATIONS)
@pytest.mark.parametrize("p", EXPONENTS)
def test_tabulated_and_direct_paths_match_mpmath_at_fractions_crowding_both_ends(p, c):
    # Reference: mpmath.quad, 30 digits, with the end-regularising substitution.
    X = END_FRACTIONS
    reference = np.array([mp_S(x, p, c) for x in X])
    tabulated = reaction_term(p, c)(X)
    np.testing.assert_allclose(tabulated, reference, rtol=tolerance(c), atol=0.0)
    # The array-c path (each value its own c): give every value the same c but one, so the
    # direct quadrature (not the table) is taken; the odd one out is checked on its own.
    cs = np.full(X.shape, c)
    cs[0] = c + 0.5
    direct = values(X, p, cs)
    np.testing.assert_allclose(direct[1:], reference[1:], rtol=tolerance(c), atol=0.0)
    assert direct[0] == pytest.approx(mp_S(X[0], p, c + 0.5), rel=tolerance(c + 0.5))
    # completion and half-way, as the tabulated term reports them
    term = reaction_term(p, c)
    assert term.complete == pytest.approx(mp_S(1.0, p, c), rel=tolerance(c))
    assert term.half == pytest.approx(mp_S(0.5, p, c), rel=tolerance(c))


JUST_ABOVE_HALF = [0.5 + 2.0**-20, 0.51, 0.55, 0.6, 0.7]


#: Relative precision of the table just above X = 1/2, where exp(c (1 - x)**2) is steepest
#: against the spacing of the nodes (the bound the module docstring states).
ABOVE_HALF_PRECISION = {4.0: 1e-12, 12.0: 1e-10}


@pytest.mark.parametrize("c", RETARDATIONS)
@pytest.mark.parametrize("p", EXPONENTS)
def test_fractions_just_above_one_half_match_mpmath(p, c):
    # Reference: mpmath.quad. Where exp(c x**2) grows strongly (c > 0), S(1) is far larger
    # than S just above 1/2, and the documented loss of digits is held to its bound.
    X = np.array(JUST_ABOVE_HALF)
    reference = np.array([mp_S(x, p, c) for x in X])
    rtol = max(tolerance(c), ABOVE_HALF_PRECISION.get(c, 0.0))
    np.testing.assert_allclose(reaction_term(p, c)(X), reference, rtol=rtol, atol=0.0)
    cs = np.full(X.shape, c)
    cs[-1] = c + 0.5
    direct = values(X, p, cs)
    np.testing.assert_allclose(direct[:-1], reference[:-1], rtol=rtol, atol=0.0)


@pytest.mark.parametrize("c", RETARDATIONS)
def test_li_exponent_with_retardation_and_grid_of_p(c):
    # A third exponent (Li's 0.4) with the retardations, at a few fractions: mpmath.
    for X in (1e-7, 0.2, 0.5, 0.95, 1.0 - 1e-7, 1.0):
        assert reaction_term(0.4, c)(X) == pytest.approx(mp_S(X, 0.4, c), rel=tolerance(c)), X


@pytest.mark.parametrize("p", EXPONENTS)
def test_array_c_path_matches_the_tabulated_path_member_by_member(p):
    # Each value its own c: values() by direct quadrature equals the tabulated term of that
    # c, and broadcasting (fractions down, retardations across) keeps the layout.
    X = END_FRACTIONS[:, np.newaxis]
    c = np.array(RETARDATIONS)[np.newaxis, :]
    direct = values(X, p, c)
    assert direct.shape == (END_FRACTIONS.size, len(RETARDATIONS))
    for j, cj in enumerate(RETARDATIONS):
        np.testing.assert_allclose(direct[:, j], reaction_term(p, cj)(END_FRACTIONS), rtol=tolerance(cj), atol=0.0)


# ---------------------------------------------------------------------------------------
# Symmetry, end behaviour, derivative
# ---------------------------------------------------------------------------------------

@settings(max_examples=40, deadline=None)
@given(p=st.sampled_from(EXPONENTS), X=st.floats(0.0, 0.5))
def test_without_retardation_the_symmetric_integrand_splits_the_total(p, X):
    # Analytic: with c = 0, f(1 - x) = f(x), so S(X) + S(1 - X) = S(1) = 2 S(1/2). The pair
    # is formed so both members are exact doubles (1 - Y is exact for Y in [1/2, 1]).
    Y = 1.0 - X
    X = 1.0 - Y
    term = reaction_term(p, 0.0)
    assert term.complete == pytest.approx(2.0 * term.half, rel=1e-15)
    assert term(X) == pytest.approx(2.0 * term.half - term(Y), rel=1e-13, abs=1e-15)


def _mp_asymmetry(X, p, c):
    """2 S(1/2) - S(1 - X) - S(X) = integral from min(X, 1 - X) to 1/2 of
    (exp(c x**2) - exp(c (1 - x)**2)) f(x) dx, by mpmath (split on a geometric ladder so the
    nearby x**-p singularity is resolved)."""
    with mpmath.workdps(30):
        P, C = mpmath.mpf(p), mpmath.mpf(c)
        a = mpmath.mpf(min(X, 1.0 - X))

        def integrand(x):
            return (mpmath.exp(C * x * x) - mpmath.exp(C * (1 - x) ** 2)) / (x ** (P * (1 - x)) * (1 - x) ** (P * x))

        points = [a]
        while points[-1] * 10 < 0.5:
            points.append(points[-1] * 10)
        return float(mpmath.quad(integrand, points + [mpmath.mpf(1) / 2]))


@pytest.mark.parametrize("c", [30.0, 43.0])
@pytest.mark.parametrize("p", EXPONENTS)
def test_a_very_strong_retardation_stays_exact_and_rising(p, c):
    # A Kirkaldy-Venugopalan bainite term for a high-chromium steel far outside the model's
    # range (c = 43 for 27 % Cr): S(1) ~ exp(c) dwarfs S just above 1/2, which must still be
    # found without a difference of the two (once that difference gave negative S).
    # Reference: mpmath.quad; the direct path to 1e-12, the table to 2e-8 (its cubic steps in
    # w against the steep exponential, as the module docstring states).
    X = np.array(JUST_ABOVE_HALF + [0.9, 0.99, 1.0 - 1e-6])
    reference = np.array([mp_S(x, p, c) for x in X])
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        term = ReactionTerm(p, c)
        cs = np.full(X.shape, c)
        cs[0] = c + 0.5
        direct = values(X, p, cs)
        back = inverse_values(direct, p, cs)
    np.testing.assert_allclose(direct[1:], reference[1:], rtol=1e-12, atol=0.0)
    np.testing.assert_allclose(term(X), reference, rtol=2e-8, atol=0.0)
    assert np.all(np.diff(term(np.linspace(0.0, 1.0, 4001))) > 0.0)
    np.testing.assert_allclose(1.0 - back, 1.0 - X, rtol=1e-10)
    np.testing.assert_allclose(1.0 - term.inverse(term(X)), 1.0 - X, rtol=1e-7)


@pytest.mark.parametrize("c", [c for c in RETARDATIONS if c != 0.0])
@pytest.mark.parametrize("p", EXPONENTS)
def test_with_retardation_the_symmetry_fails_by_the_expected_amount(p, c):
    # Analytic: with c != 0, exp(c x**2) is not symmetric about 1/2, and
    # 2 S(1/2) - S(1 - X) - S(X) = integral from X to 1/2 of (exp(c x^2) - exp(c (1-x)^2)) f dx,
    # of the sign of -c for X != 1/2. Reference: mpmath.quad of that integral.
    term = reaction_term(p, c)
    for X in (1e-6, 0.01, 0.1, 0.3, 0.7, 0.9, 0.99):
        Y = 1.0 - X
        defect = 2.0 * term.half - term(Y) - term(1.0 - Y)
        expected = _mp_asymmetry(1.0 - Y, p, c)
        assert np.sign(defect) == -np.sign(c)
        assert defect == pytest.approx(expected, rel=1e-9, abs=1e-13 * term.complete), X
    # and plainly: S(1) is not 2 S(1/2)
    assert abs(term.complete - 2.0 * term.half) > 1e-3 * term.complete


@pytest.mark.parametrize("c", RETARDATIONS)
@pytest.mark.parametrize("p", EXPONENTS)
def test_leading_power_laws_at_both_ends(p, c):
    # Analytic: near 0 the integrand is x**-p (1 + p x ln x + O(x**2 ln**2 x)) whatever c
    # (c enters at x**2), so
    #   S(X) = X**(1-p)/(1-p) + p X**(2-p) (ln X/(2-p) - 1/(2-p)**2) + O(X**(3-p) ln**2 X),
    # and S -> X**(1 - p)/(1 - p). Near 1, with y = 1 - X, the integrand is
    # exp(c) y**-p (1 + p y ln y - 2 c y + ...), so S(1) - S(X) -> exp(c) y**(1-p)/(1-p).
    term = reaction_term(p, c)
    for X in (1e-12, 1e-10, 1e-8):
        leading = X ** (1 - p) / (1 - p)
        second = p * X ** (2 - p) * (math.log(X) / (2 - p) - 1 / (2 - p) ** 2)
        assert term(X) == pytest.approx(leading + second, rel=1e-11)
        assert term(X) / leading == pytest.approx(1.0, abs=3 * p * X * abs(math.log(X)))
    for y in (1e-9, 1e-7):
        X = 1.0 - y
        y = 1.0 - X  # exact
        leading = math.exp(c) * y ** (1 - p) / (1 - p)
        second = math.exp(c) * y ** (2 - p) * (p * (math.log(y) / (2 - p) - 1 / (2 - p) ** 2) - 2 * c / (2 - p))
        # the difference of S(1) and S(X) carries S(1)'s rounding, eps S(1) absolute
        assert term.complete - term(X) == pytest.approx(leading + second, rel=1e-8, abs=1e-15 * term.complete)


def _power_of_two_step(X):
    """A step h = 2**k about 1e-3 of the distance to the nearer end, so X +- h, X +- 2 h are
    exact doubles."""
    return 2.0 ** math.floor(math.log2(1e-3 * min(X, 1.0 - X)))


@pytest.mark.parametrize("c", RETARDATIONS)
@pytest.mark.parametrize("p", EXPONENTS)
def test_slope_of_s_is_the_reciprocal_of_the_rate_shape(p, c):
    # Fundamental theorem of calculus: dS/dX = 1 / rate_shape(X). Reference: a fourth-order
    # central difference of S (truncation (h/y)**4 ~ 1e-12) and, for rate_shape itself,
    # x**(p (1 - x)) (1 - x)**(p x) exp(-c x**2) by mpmath.
    term = reaction_term(p, c)
    for X in (1e-6, 1e-3, 0.1, 0.3, 0.45, 0.55, 0.7, 0.9, 0.999, 1.0 - 2.0**-20):
        h = _power_of_two_step(X)
        slope = (-term(X + 2 * h) + 8 * term(X + h) - 8 * term(X - h) + term(X - 2 * h)) / (12 * h)
        shape = rate_shape(X, p, c)
        assert shape == pytest.approx(mp_rate_shape(X, p, c), rel=1e-13)
        assert term.rate_shape(X) == shape
        assert slope * shape == pytest.approx(1.0, rel=1e-7), X


def test_rate_shape_is_zero_at_and_outside_the_ends_and_takes_an_array_c():
    X = np.array([-0.2, 0.0, 1.0, 1.3])
    assert np.all(rate_shape(X, 2 / 3, 4.0) == 0.0)
    c = np.array([-2.6, 0.0, 12.0])
    got = rate_shape(0.3, 2 / 3, c)
    assert got.shape == (3,)
    np.testing.assert_allclose(got, [mp_rate_shape(0.3, 2 / 3, ci) for ci in c], rtol=1e-13)


# ---------------------------------------------------------------------------------------
# Inverse
# ---------------------------------------------------------------------------------------

def _brentq_fraction(S, p, c):
    """X with S(X; p, c) = S by scipy's brentq on the tabulated forward term, solved for the
    distance y to the nearer end (where a fraction's precision lives)."""
    term = reaction_term(p, c)
    if S <= term.half:
        return brentq(lambda y: term(y) - S, 0.0, 0.5, xtol=1e-300, rtol=1e-15), False
    # S(1 - y) = S descends with y; solve G(y) = S(1) - S(1 - y) = S(1) - S
    return brentq(lambda y: (term.complete - term(1.0 - y)) - (term.complete - S), 0.0, 0.5,
                  xtol=1e-300, rtol=1e-15), True


@pytest.mark.parametrize("c", RETARDATIONS)
@pytest.mark.parametrize("p", EXPONENTS)
def test_inverse_paths_against_brentq(p, c):
    # Reference: scipy.optimize.brentq on the forward term. The tabulated inverse (one c) and
    # the direct inverse (an array of c, safeguarded Newton) must both find the root. The
    # tolerance on y = min(X, 1 - X) is 1e-11 relative; 1e-10 for c = 12, whose upper half's
    # table carries the error of its cubic steps against exp(c (1 - x)**2) (~4e-11).
    term = reaction_term(p, c)
    X = np.array([1e-9, 1e-4, 0.02, 0.25, 0.49, 0.51, 0.75, 0.98, 1 - 1e-4, 1 - 1e-9])
    S = term(X)
    tabulated = term.inverse(S)
    cs = np.full(X.shape, c)
    cs[0] = c + 1.0  # not uniform: the direct path
    S_direct = values(X, p, cs)
    direct = inverse_values(S_direct, p, cs)
    rel = 1e-11 if abs(c) < 5 else 1e-10
    for i, s in enumerate(S):
        y_ref, upper = _brentq_fraction(s, p, c)
        assert upper == (X[i] > 0.5)
        y_tab = 1.0 - tabulated[i] if upper else tabulated[i]
        assert y_tab == pytest.approx(y_ref, rel=rel, abs=3e-16 if upper else 0.0), X[i]
        if i > 0:
            y_dir = 1.0 - direct[i] if upper else direct[i]
            assert y_dir == pytest.approx(y_ref, rel=rel, abs=3e-16 if upper else 0.0), X[i]
    y0, _ = _brentq_fraction(float(S_direct[0]), p, c + 1.0)
    assert direct[0] == pytest.approx(y0, rel=rel)


@settings(max_examples=40, deadline=None)
@given(p=st.sampled_from(EXPONENTS), c=st.sampled_from(RETARDATIONS),
       X=st.floats(0.0, 1.0, allow_nan=False))
def test_round_trip_through_the_tabulated_term(p, c, X):
    term = reaction_term(p, c)
    back = term.inverse(term(X))
    y, y_back = min(X, 1.0 - X), min(back, 1.0 - back)
    # 1e-10 on the distance to the nearer end (the c = 12 upper half loses ~4e-11, see above)
    assert y_back == pytest.approx(y, rel=1e-10, abs=3e-16 if X > 0.5 else 0.0)


@settings(max_examples=25, deadline=None)
@given(p=st.sampled_from(EXPONENTS),
       X=st.lists(st.floats(0.0, 1.0, allow_nan=False), min_size=2, max_size=8),
       c=st.lists(st.floats(-2.6, 12.0, allow_nan=False), min_size=2, max_size=8))
def test_round_trip_through_the_array_path(p, X, c):
    n = min(len(X), len(c))
    X, c = np.array(X[:n]), np.array(c[:n])
    back = inverse_values(values(X, p, c), p, c)
    assert back.shape == X.shape
    y, y_back = np.minimum(X, 1.0 - X), np.minimum(back, 1.0 - back)
    np.testing.assert_allclose(y_back, y, rtol=1e-10, atol=3e-16)
    assert np.all(back[X == 0.0] == 0.0) and np.all(back[X == 1.0] == 1.0)


@pytest.mark.parametrize("p", EXPONENTS)
def test_direct_inverse_is_exact_where_s_is_well_conditioned(p):
    # Below X = 1/2 (and above it for c < 0) S carries no cancellation, so the direct inverse
    # must return X to a few rounding errors. Reference: the fractions themselves.
    Xg, cg = np.meshgrid(np.linspace(0.01, 0.49, 49), np.linspace(-2.6, 12.0, 30))
    X = np.concatenate([Xg.ravel(), [0.8, 0.36328125]])
    c = np.concatenate([cg.ravel(), [-2.1, 7.875]])
    back = inverse_values(values(X, p, c), p, c)
    y, y_back = np.minimum(X, 1.0 - X), np.minimum(back, 1.0 - back)
    np.testing.assert_allclose(y_back, y, rtol=1e-13, atol=0.0)


def test_inverse_ends():
    for c in RETARDATIONS:
        term = reaction_term(2 / 3, c)
        assert term.inverse(0.0) == 0.0 and term.inverse(term.complete) == 1.0
    c = np.array([-2.6, 4.0, 12.0])
    complete = values(np.ones(3), 2 / 3, c)
    np.testing.assert_array_equal(inverse_values(np.zeros(3), 2 / 3, c), 0.0)
    np.testing.assert_array_equal(inverse_values(complete, 2 / 3, c), 1.0)


# ---------------------------------------------------------------------------------------
# Refusals and bookkeeping
# ---------------------------------------------------------------------------------------

@pytest.mark.parametrize("bad", [-0.1, -1e-300, 1.0 + 2.0**-52, 1.5, np.nan, np.inf])
def test_fractions_outside_zero_one_are_refused(bad):
    with pytest.raises(ValueError, match=r"\[0, 1\]"):
        reaction_term(2 / 3, 4.0)(bad)
    with pytest.raises(ValueError, match=r"\[0, 1\]"):
        values(np.array([0.3, bad]), 2 / 3, np.array([0.0, 4.0]))


def test_reaction_terms_outside_zero_to_completion_are_refused():
    term = reaction_term(2 / 3, 4.0)
    for bad in (-1e-12, term.complete * (1 + 1e-9), np.nan, np.inf):
        with pytest.raises(ValueError, match="must lie in"):
            term.inverse(bad)
    c = np.array([0.0, 4.0])
    complete = values(np.ones(2), 2 / 3, c)
    for bad in ([-1e-12, 1.0], complete * (1 + 1e-9), [np.nan, 1.0]):
        with pytest.raises(ValueError, match="must lie in"):
            inverse_values(np.array(bad), 2 / 3, c)


def test_terms_are_cached_per_exponent_and_retardation():
    assert reaction_term(2 / 3, 4.0) is reaction_term(2 / 3, 4.0)
    assert reaction_term(2 / 3, 4.0) is not reaction_term(2 / 3, 1.5)
    assert isinstance(reaction_term(0.55), ReactionTerm) and reaction_term(0.55).c == 0.0


@settings(max_examples=40, deadline=None)
@given(p=st.sampled_from(EXPONENTS), c=st.sampled_from(RETARDATIONS),
       a=st.floats(0.0, 1.0), b=st.floats(0.0, 1.0))
def test_s_increases_with_fraction(p, c, a, b):
    a, b = sorted((a, b))
    term = reaction_term(p, c)
    assert term(a) <= term(b)
    assert term.inverse(term(a) * (1 - 1e-15)) <= term.inverse(term(b))
