"""JMAK kinetics against Avrami (1939-41), Johnson & Mehl (1939) and scipy."""

import numpy as np
import pytest
from scipy.integrate import quad
from scipy.optimize import brentq

from isokin.relations import jmak

EXPONENTS = [1.0, 1.5, 2.0, 2.5, 3.0, 4.0]


@pytest.mark.parametrize("n", EXPONENTS)
def test_half_time(n):
    # Avrami: X(t50) = 0.5 with t50 = (ln 2 / K)^(1/n).
    log_k = np.log(3.7e-5)
    t50 = jmak.time_to_fraction(0.5, log_k, n)
    assert float(jmak.fraction(t50, log_k, n)) == pytest.approx(0.5, rel=1e-12)
    assert float(t50) == pytest.approx((np.log(2) / 3.7e-5) ** (1 / n), rel=1e-12)


@pytest.mark.parametrize("n", EXPONENTS)
def test_ratio_t99_over_t01_depends_on_n_only(n):
    # Avrami: t99 / t01 = (ln 100 / -ln 0.99)^(1/n), whatever K.
    for log_k in (-30.0, -5.0, 4.0):
        t01, t99 = jmak.time_to_fraction(np.array([0.01, 0.99]), log_k, n)
        assert t99 / t01 == pytest.approx((np.log(100) / -np.log(0.99)) ** (1 / n), rel=1e-12)


@pytest.mark.parametrize("n", EXPONENTS)
@pytest.mark.parametrize("x", [1e-6, 0.01, 0.3, 0.5, 0.9, 0.99, 0.999999])
def test_closed_form_inverse_against_brentq(n, x):
    # The closed-form inverse agrees with scipy's brentq on X(t) - x = 0.
    log_k = np.log(2.2e-3)
    t_ref = brentq(lambda t: float(jmak.fraction(t, log_k, n)) - x, 0.0, 1e12, xtol=1e-14, rtol=1e-14)
    assert float(jmak.time_to_fraction(x, log_k, n)) == pytest.approx(t_ref, rel=1e-9)


def test_incubation_shifts_times():
    assert float(jmak.time_to_fraction(0.5, 0.0, 2.0, incubation_s=7.0)) == pytest.approx(7.0 + np.sqrt(np.log(2)))
    assert float(jmak.fraction(6.9, 0.0, 2.0, incubation_s=7.0)) == 0.0


@pytest.mark.parametrize("n", EXPONENTS)
def test_rate_is_the_time_derivative(n):
    # d/dt [1 - exp(-K t^n)] = n K t^(n-1) exp(-K t^n), compared in the fraction form.
    k = 0.37
    t = np.array([0.2, 0.8, 1.3, 2.1])
    exact = n * k * t ** (n - 1) * np.exp(-k * t**n)
    np.testing.assert_allclose(jmak.rate(jmak.fraction(t, np.log(k), n), np.log(k), n), exact, rtol=1e-10)


def test_continuous_nucleation_constant_from_extended_volume():
    # Johnson & Mehl (1939) / Avrami (1939): nuclei born at rate I grow as spheres of radius
    # u (t - tau); the extended volume fraction is int_0^t I (4 pi/3) u^3 (t - tau)^3 dtau,
    # which must equal K t^4 with K = pi I u^3 / 3.  Integrated with scipy's quad.
    i_rate, u, t = 2.0e12, 3.0e-6, 4.0
    extended, _ = quad(lambda tau: i_rate * 4 * np.pi / 3 * (u * (t - tau)) ** 3, 0.0, t)
    log_k = jmak.log_rate_constant("continuous", np.log(i_rate), u)
    assert np.exp(log_k) * t ** jmak.MODES["continuous"][0] == pytest.approx(extended, rel=1e-10)


def test_site_saturation_constant():
    # Avrami (1940): N pre-existing nuclei growing from t = 0 give X_ext = (4 pi/3) N u^3 t^3.
    n_sites, u, t = 5.0e15, 2.0e-7, 30.0
    log_k = jmak.log_rate_constant("site-saturation", np.log(n_sites), u)
    assert np.exp(log_k) * t**3 == pytest.approx(4 * np.pi / 3 * n_sites * (u * t) ** 3, rel=1e-12)


def test_no_growth_means_never():
    assert np.isinf(jmak.time_to_fraction(0.5, jmak.log_rate_constant("continuous", 10.0, 0.0), 4.0))
    assert jmak.rate(0.5, -np.inf, 4.0) == 0.0
