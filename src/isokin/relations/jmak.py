"""Johnson-Mehl-Avrami-Kolmogorov kinetics: X = 1 - exp(-K t^n).

K is handed around as ln K: the rate constants of classical nucleation span hundreds of
decades between the nose and the equilibrium temperature.
"""

from __future__ import annotations

import numpy as np

#: Avrami exponent and ln of the geometric constant for each nucleation mode in 3-D with a
#: constant growth velocity u.  Continuous nucleation: K = (pi/3) I u^3, n = 4;
#: site saturation: K = (4 pi/3) N u^3, n = 3 (Avrami, J. Chem. Phys. 7 (1939) 1103;
#: 8 (1940) 212; 9 (1941) 177; Johnson and Mehl, Trans. AIME 135 (1939) 416).
GROWTH_DIMENSIONS = 3
MODES = {
    "continuous": (4.0, np.log(np.pi / 3.0)),
    "site-saturation": (3.0, np.log(4.0 * np.pi / 3.0)),
}


def log_rate_constant(mode, log_source, growth_velocity_m_s):
    """ln K of JMAK for a nucleation mode.

    Parameters
    ----------
    mode : {"continuous", "site-saturation"}
        Continuous nucleation at a constant rate (log_source = ln I, I in 1/(m^3 s)) or
        growth from pre-existing sites (log_source = ln N, N in 1/m^3).
    log_source : array_like
        ln I or ln N as the mode requires.
    growth_velocity_m_s : array_like
        Growth velocity u, m/s.

    Returns
    -------
    ndarray
        ln(K / s^-n); ``-inf`` where nothing grows or nucleates.

    Examples
    --------
    >>> round(float(np.exp(log_rate_constant("continuous", 0.0, 1.0))), 6)  # pi/3
    1.047198
    """
    _, log_geometry = MODES[mode]
    with np.errstate(divide="ignore"):
        return log_geometry + log_source + GROWTH_DIMENSIONS * np.log(growth_velocity_m_s)


def fraction(t_s, log_K, n, incubation_s=0.0):
    """Transformed fraction X = 1 - exp(-K (t - tau)^n) for t > tau, else 0.

    Examples
    --------
    >>> round(float(fraction(1.0, 0.0, 4.0)), 6)
    0.632121
    """
    t_eff = np.maximum(np.asarray(t_s, dtype=float) - incubation_s, 0.0)
    with np.errstate(divide="ignore", over="ignore"):
        return -np.expm1(-np.exp(log_K + n * np.log(t_eff)))


def time_to_fraction(X, log_K, n, incubation_s=0.0):
    """Closed-form inverse of JMAK: t = tau + (-ln(1 - X) / K)^(1/n), in s.

    ``inf`` where K = 0 (log_K = -inf).

    Examples
    --------
    >>> round(float(time_to_fraction(0.5, 0.0, 1.0)), 6)  # ln 2
    0.693147
    """
    X = np.asarray(X, dtype=float)
    with np.errstate(over="ignore", divide="ignore"):  # X = 0 gives t = tau
        return incubation_s + np.exp((np.log(-np.log1p(-X)) - log_K) / n)


def rate(X, log_K, n):
    """dX/dt of JMAK written in the fraction (the isokinetic form), in 1/s.

    dX/dt = n K^(1/n) (1 - X) (-ln(1 - X))^((n - 1)/n)

    Examples
    --------
    >>> round(float(rate(0.5, 0.0, 1.0)), 6)
    0.5
    """
    X = np.asarray(X, dtype=float)
    with np.errstate(divide="ignore", over="ignore", invalid="ignore"):
        r = n * np.exp(log_K / n) * (1.0 - X) * (-np.log1p(-X)) ** ((n - 1.0) / n)
    return np.where(np.isfinite(r), r, 0.0)


def reaction_term(X, n):
    """S(X) = (-ln(1 - X))^(1/n): JMAK's time to X in units of the time scale K^(-1/n).

    With a constant exponent JMAK separates as t = K^(-1/n) S(X), the form that makes
    additivity along a cooling path a sum of dt / K^(-1/n).

    Examples
    --------
    >>> round(float(reaction_term(1.0 - np.exp(-1.0), 4.0)), 12)
    1.0
    """
    X = np.asarray(X, dtype=float)
    with np.errstate(divide="ignore"):
        return (-np.log1p(-X)) ** (1.0 / n)


def reaction_term_inverse(S, n):
    """X = 1 - exp(-S^n), the inverse of :func:`reaction_term`.

    Examples
    --------
    >>> round(float(reaction_term_inverse(reaction_term(0.37, 2.5), 2.5)), 12)
    0.37
    """
    return -np.expm1(-np.asarray(S, dtype=float) ** n)
