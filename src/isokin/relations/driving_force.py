"""Chemical driving force for a transformation, per unit volume of the new phase.

Sign convention: dGv < 0 where the transformation is favoured (below the equilibrium
temperature), in J/m^3.  An elastic strain energy (J/m^3, positive) opposes it.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np


def driving_force_turnbull_linear(T_K, equilibrium_K, latent_heat_J_m3):
    r"""Turnbull's linear undercooling form of the driving force per volume.

    .. math:: \Delta G_v = -\Delta H_v \, \frac{T_e - T}{T_e}

    Parameters
    ----------
    T_K : array_like
        Temperature, K.
    equilibrium_K : array_like
        Equilibrium temperature T_e (melting point, solvus), K.
    latent_heat_J_m3 : array_like
        Magnitude of the latent heat of the transformation per volume of product, J/m^3.

    Returns
    -------
    ndarray
        dGv in J/m^3 (negative below T_e).

    Notes
    -----
    Valid for small undercooling, where the entropy difference is constant and the heat
    capacity difference negligible.  Reference: D. Turnbull, J. Appl. Phys. 21 (1950)
    1022-1028.

    Examples
    --------
    >>> float(driving_force_turnbull_linear(900.0, 1000.0, 1.0e9))
    -100000000.0
    """
    return -latent_heat_J_m3 * (equilibrium_K - T_K) / equilibrium_K


def driving_force_hoffman(T_K, equilibrium_K, latent_heat_J_m3):
    r"""Hoffman's form of the driving force per volume.

    .. math:: \Delta G_v = -\Delta H_v \, \frac{(T_e - T)\,T}{T_e^2}

    Parameters as for :func:`driving_force_turnbull_linear`.

    Notes
    -----
    Accounts approximately for the heat capacity difference between the phases at large
    undercooling; it lies below Turnbull's linear form by the factor T/T_e.
    Reference: J. D. Hoffman, J. Chem. Phys. 29 (1958) 1192-1193.

    Examples
    --------
    >>> float(driving_force_hoffman(900.0, 1000.0, 1.0e9))
    -90000000.0
    """
    return -latent_heat_J_m3 * (equilibrium_K - T_K) * T_K / equilibrium_K**2


@dataclass(frozen=True)
class DrivingForceTable:
    """A tabulated molar driving force dGm(T) in J/mol (from any thermodynamic package).

    Linear interpolation in T; outside the table the end values are held, which keeps the
    equilibrium crossing where the table puts it.
    """

    temperature_K: np.ndarray
    dGm_J_mol: np.ndarray

    def __post_init__(self):
        t = np.asarray(self.temperature_K, dtype=float)
        g = np.asarray(self.dGm_J_mol, dtype=float)
        if t.ndim != 1 or t.shape != g.shape or t.size < 2:
            raise ValueError("the table needs at least two rows of temperature and dGm")
        order = np.argsort(t)
        t, g = t[order], g[order]
        if np.any(np.diff(t) <= 0):
            raise ValueError("the table's temperatures must be distinct")
        object.__setattr__(self, "temperature_K", t)
        object.__setattr__(self, "dGm_J_mol", g)

    def molar(self, T_K):
        return np.interp(T_K, self.temperature_K, self.dGm_J_mol)

    def crossing_K(self, offset_J_mol=0.0):
        """Highest temperature where dGm + offset changes sign from negative (below) to >= 0.

        Returns the table's top temperature when dGm + offset is negative everywhere, and its
        bottom temperature when it is nowhere negative.
        """
        g = self.dGm_J_mol + offset_J_mol
        t = self.temperature_K
        negative = g < 0
        if negative.all():
            return float(t[-1])
        if not negative.any():
            return float(t[0])
        # last negative row followed by a non-negative one, searched from the top
        idx = np.nonzero(negative[:-1] & ~negative[1:])[0]
        if idx.size == 0:
            return float(t[0])
        i = idx[-1]
        return float(t[i] + (t[i + 1] - t[i]) * (-g[i]) / (g[i + 1] - g[i]))


def driving_force_table(T_K, table: DrivingForceTable, molar_volume_m3_mol):
    """Driving force per volume from a tabulated dGm(T): dGv = dGm / Vm, in J/m^3.

    Parameters
    ----------
    T_K : array_like
        Temperature, K.
    table : DrivingForceTable
        dGm(T) in J/mol, negative where the product is favoured.
    molar_volume_m3_mol : array_like
        Molar volume of the product, m^3/mol.

    Examples
    --------
    >>> tab = DrivingForceTable(np.array([800.0, 1000.0]), np.array([-2000.0, 0.0]))
    >>> round(float(driving_force_table(900.0, tab, 1.0e-5)))
    -100000000
    """
    return table.molar(T_K) / molar_volume_m3_mol
