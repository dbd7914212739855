"""The sigmoidal reaction term S(X) of Li et al. (1998), its derivative and inverse.

Li, Niebuhr, Meekisho and Atteridge write the isothermal time to reach a transformed
fraction X as a temperature-and-composition factor times

    S(X) = integral from 0 to X of dx / (x**(0.4 (1 - x)) * (1 - x)**(0.4 x)),

the member p = 0.4, c = 0 of the family of :mod:`isokin.relations.reaction_terms` (an integral
with no closed form and integrable singularities at both ends). The integrand is symmetric,
f(1 - x) = f(x), so S(X) = 2 S(1/2) - S(1 - X) and only the lower half is tabulated.

Reference: M. V. Li, D. V. Niebuhr, L. L. Meekisho and D. G. Atteridge, "A computational
model for the prediction of steel hardenability", Metall. Mater. Trans. B 29 (1998)
661-672.
"""

from __future__ import annotations

import numpy as np

from .reaction_terms import rate_shape, reaction_term

#: p of Li's reaction term.
LI_EXPONENT = 0.4
LI_REACTION = reaction_term(LI_EXPONENT)


def reaction_integral(X):
    """Li et al. (1998) reaction term S(X), dimensionless.

    .. math:: S(X) = \\int_0^X \\frac{dx}{x^{0.4(1-x)}\\,(1-x)^{0.4x}}

    Parameters
    ----------
    X : float or array_like
        Transformed fraction of the product, 0 <= X <= 1 (dimensionless).

    Returns
    -------
    ndarray or float
        S(X), same shape as ``X``; S(0) = 0 and S(1) = 2 S(1/2) ~ 2.0518 is finite.

    Raises
    ------
    ValueError
        If any X lies outside [0, 1] or is not a number.

    Notes
    -----
    The part with upper limit <= 1/2 is integrated by a fixed tanh-sinh rule of 73 nodes on
    a table of 4097 fractions (clustered towards 0), and evaluated between them by cubic
    Hermite interpolation in X**0.6 with the exact slope: about 1e-14 from the rule itself,
    better than 1e-12 relative against mpmath.quad over the whole range (tested), at a few
    tens of nanoseconds a value (the interval is found by arithmetic, not by a search).

    Reference: Li, Niebuhr, Meekisho and Atteridge, Metall. Mater. Trans. B 29 (1998)
    661-672.

    Examples
    --------
    >>> round(float(reaction_integral(0.5)), 10) == round(float(reaction_integral(1.0)) / 2, 10)
    True
    >>> float(reaction_integral(0.0))
    0.0
    """
    return LI_REACTION(X)


def reaction_integrand(X):
    """dS/dX = 1 / (X**(0.4 (1 - X)) * (1 - X)**(0.4 X)) of Li et al. (1998), dimensionless.

    Parameters
    ----------
    X : float or array_like
        Transformed fraction, 0 <= X <= 1.

    Returns
    -------
    ndarray or float
        The integrand of :func:`reaction_integral`; ``inf`` at X = 0 and X = 1.

    Examples
    --------
    >>> round(float(reaction_integrand(0.5)), 12) == round(2 ** 0.4, 12)
    True
    """
    with np.errstate(divide="ignore"):
        value = 1.0 / np.asarray(reaction_rate_shape(X))
    return value if value.ndim else float(value)


def reaction_rate_shape(X):
    """X**(0.4 (1 - X)) * (1 - X)**(0.4 X) = 1 / (dS/dX), dimensionless.

    With t(X, T) = F(T) S(X) the rate form of Li et al. (1998) is
    dX/dt = reaction_rate_shape(X) / F(T). It is 0 at X = 0 and at X = 1, and 0 is
    returned outside [0, 1] too, so an integrator that overshoots stops there.

    Parameters
    ----------
    X : float or array_like
        Transformed fraction.

    Examples
    --------
    >>> float(reaction_rate_shape(0.0)), float(reaction_rate_shape(1.0))
    (0.0, 0.0)
    """
    return rate_shape(X, LI_EXPONENT)


def reaction_integral_inverse(S):
    """The fraction X at which the Li et al. (1998) reaction term reaches S, dimensionless.

    The inverse of :func:`reaction_integral`, used where a time is known and the fraction
    is wanted (X from t / F(T) during a hold or along a path). Symmetry gives
    X = 1 - X(2 S(1/2) - S) above S(1/2), so only the lower half is tabulated: cubic
    Hermite interpolation of y**0.6 against S with its exact slope, on the same table.

    Parameters
    ----------
    S : float or array_like
        Reaction term, 0 <= S <= S(1) ~ 2.0518.

    Returns
    -------
    ndarray or float
        X in [0, 1], same shape as ``S``; better than 1e-11 against scipy's brentq on
        :func:`reaction_integral` (tested).

    Raises
    ------
    ValueError
        If any S lies outside [0, S(1)] or is not a number.

    Examples
    --------
    >>> round(float(reaction_integral_inverse(reaction_integral(0.3))), 12)
    0.3
    """
    return LI_REACTION.inverse(S)
