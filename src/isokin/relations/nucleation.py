"""Classical nucleation theory: critical nucleus, barrier, and the steady-state rate."""

from __future__ import annotations

import numpy as np

from ..constants import BOLTZMANN_J_K, GAS_CONSTANT_J_MOL_K, PLANCK_J_S


def critical_radius(interface_energy_J_m2, dGv_J_m3):
    r"""Radius of the critical spherical nucleus, r* = -2 gamma / dGv.

    Parameters
    ----------
    interface_energy_J_m2 : array_like
        Interface energy gamma between nucleus and parent, J/m^2.
    dGv_J_m3 : array_like
        Driving force per volume including any strain energy, J/m^3 (negative when the
        nucleus is favoured).

    Returns
    -------
    ndarray
        r* in m; ``inf`` where dGv >= 0 (no nucleus is stable).

    Notes
    -----
    Gibbs' result for an isotropic spherical nucleus; see D. Turnbull and J. C. Fisher,
    J. Chem. Phys. 17 (1949) 71-73, and J. W. Christian, The Theory of Transformations in
    Metals and Alloys, 3rd ed. (2002), ch. 10.

    Examples
    --------
    >>> float(critical_radius(0.2, -1.0e8))
    4e-09
    """
    g = np.asarray(dGv_J_m3, dtype=float)
    with np.errstate(divide="ignore"):
        return np.where(g < 0, -2.0 * np.asarray(interface_energy_J_m2) / np.where(g < 0, g, -1.0), np.inf)


def nucleation_barrier_homogeneous(interface_energy_J_m2, dGv_J_m3):
    r"""Free energy barrier of the critical spherical nucleus, dG* = 16 pi gamma^3 / (3 dGv^2).

    Parameters as for :func:`critical_radius`.

    Returns
    -------
    ndarray
        dG* in J; ``inf`` where dGv >= 0.

    Notes
    -----
    Turnbull and Fisher (1949); Christian (2002), ch. 10.  Equivalently
    dG* = (4/3) pi r*^2 gamma.

    Examples
    --------
    >>> round(float(nucleation_barrier_homogeneous(0.2, -1.0e8)) * 1e17, 6)
    1.340413
    """
    g = np.asarray(dGv_J_m3, dtype=float)
    gamma = np.asarray(interface_energy_J_m2, dtype=float)
    with np.errstate(divide="ignore"):
        return np.where(g < 0, 16.0 * np.pi * gamma**3 / (3.0 * np.where(g < 0, g, 1.0) ** 2), np.inf)


def shape_factor_spherical_cap(wetting_angle_rad):
    r"""Heterogeneous shape factor of a spherical-cap nucleus on a flat substrate.

    .. math:: S(\theta) = \frac{(2 + \cos\theta)(1 - \cos\theta)^2}{4}

    Parameters
    ----------
    wetting_angle_rad : array_like
        Contact (wetting) angle theta of the nucleus on the substrate, rad, in [0, pi].

    Returns
    -------
    ndarray
        S in [0, 1]: 0 for complete wetting, 1/2 at 90 degrees, 1 (homogeneous) at 180.

    Notes
    -----
    Volmer's spherical-cap result; see Christian (2002), ch. 10, and D. Turnbull,
    J. Chem. Phys. 18 (1950) 198-203.

    Examples
    --------
    >>> round(float(shape_factor_spherical_cap(np.pi / 2)), 12)
    0.5
    """
    c = np.cos(wetting_angle_rad)
    return (2.0 + c) * (1.0 - c) ** 2 / 4.0


def log_nucleation_rate_turnbull_fisher(T_K, site_density_m3, activation_J_mol, barrier_J):
    r"""Natural log of the steady-state nucleation rate of Turnbull and Fisher.

    .. math:: I = N \, \frac{k T}{h} \, \exp\!\left(-\frac{Q}{R T}\right)
                  \exp\!\left(-\frac{\Delta G^*}{k T}\right)

    Working with ln I keeps the very small rates near equilibrium representable.

    Parameters
    ----------
    T_K : array_like
        Temperature, K.
    site_density_m3 : array_like
        Number of nucleation sites per volume N, 1/m^3 (all atoms for homogeneous nucleation).
    activation_J_mol : array_like
        Activation energy Q for an atom to join the nucleus, J/mol.
    barrier_J : array_like
        Barrier dG* (already multiplied by the heterogeneous shape factor), J.

    Returns
    -------
    ndarray
        ln(I / (m^-3 s^-1)); ``-inf`` where the barrier is infinite.

    Notes
    -----
    D. Turnbull and J. C. Fisher, J. Chem. Phys. 17 (1949) 71-73.

    Examples
    --------
    >>> round(float(log_nucleation_rate_turnbull_fisher(1000.0, 1e29, 0.0, 0.0)), 4)
    97.4427
    """
    kT = BOLTZMANN_J_K * np.asarray(T_K, dtype=float)
    return (
        np.log(site_density_m3)
        + np.log(kT / PLANCK_J_S)
        - np.asarray(activation_J_mol) / (GAS_CONSTANT_J_MOL_K * T_K)
        - np.asarray(barrier_J) / kT
    )
