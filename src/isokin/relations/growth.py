"""Diffusion-limited growth of the new phase."""

from __future__ import annotations

import numpy as np

from ..constants import GAS_CONSTANT_J_MOL_K


def diffusivity_arrhenius(T_K, prefactor_m2_s, activation_J_mol):
    r"""Arrhenius diffusion coefficient, D = D0 exp(-Q / RT).

    Parameters
    ----------
    T_K : array_like
        Temperature, K.
    prefactor_m2_s : array_like
        Pre-exponential factor D0, m^2/s.
    activation_J_mol : array_like
        Activation energy of diffusion Q, J/mol.

    Returns
    -------
    ndarray
        D in m^2/s.

    Examples
    --------
    >>> round(float(diffusivity_arrhenius(1000.0, 1e-4, 0.0)), 8)
    0.0001
    """
    return prefactor_m2_s * np.exp(-np.asarray(activation_J_mol) / (GAS_CONSTANT_J_MOL_K * np.asarray(T_K)))


def growth_velocity_diffusion_limited(T_K, diffusivity_m2_s, diffusion_distance_m, dGm_J_mol):
    r"""Growth velocity of an interface whose advance is limited by diffusion.

    .. math:: u = \frac{D}{\lambda}\left[1 - \exp\!\left(\frac{\Delta G_m}{R T}\right)\right]

    The velocity vanishes at the equilibrium temperature (dGm = 0), rises with undercooling
    as the driving force grows, and falls again at low temperature as D drops: the growth
    half of the C-curve.

    Parameters
    ----------
    T_K : array_like
        Temperature, K.
    diffusivity_m2_s : array_like
        Diffusion coefficient controlling the transfer, m^2/s.
    diffusion_distance_m : array_like
        Distance lambda over which the controlling diffusion acts (an interatomic jump for
        interface transfer, an interlamellar or solute-field distance for long-range
        diffusion), m.
    dGm_J_mol : array_like
        Molar driving force, J/mol, negative below equilibrium.

    Returns
    -------
    ndarray
        u in m/s, zero where dGm >= 0.

    Notes
    -----
    The net rate of thermally activated transfer across an interface, forward minus
    backward jumps; D. Turnbull, Trans. AIME 191 (1951) 661, and Christian (2002), ch. 10.

    Examples
    --------
    >>> round(float(growth_velocity_diffusion_limited(1000.0, 1e-12, 1e-9, -1e9)), 6)
    0.001
    """
    g = np.minimum(np.asarray(dGm_J_mol, dtype=float), 0.0)
    return diffusivity_m2_s / diffusion_distance_m * -np.expm1(g / (GAS_CONSTANT_J_MOL_K * np.asarray(T_K)))
