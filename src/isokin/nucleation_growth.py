"""The physical product model: classical nucleation + diffusion-limited growth + JMAK.

The nucleation rate rises with undercooling as the barrier falls; the growth velocity falls
at low temperature as diffusion slows; JMAK joins them into the time to each fraction.
Every parameter may be an array, so a batch of parameter sets is one numpy pass.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from . import jmak
from .constants import AVOGADRO_PER_MOL, BOLTZMANN_J_K
from .driving_force import (
    DrivingForceTable,
    driving_force_hoffman,
    driving_force_table,
    driving_force_turnbull_linear,
)
from .growth import diffusivity_arrhenius, growth_velocity_diffusion_limited
from .nucleation import (
    critical_radius,
    log_nucleation_rate_turnbull_fisher,
    nucleation_barrier_homogeneous,
    shape_factor_spherical_cap,
)

DRIVING_FORCE_FORMS = ("turnbull", "hoffman", "table")


@dataclass(frozen=True)
class NucleationGrowthParameters:
    """Physical parameters of one product (SI units; any field may be a numpy array).

    ``site_density_m3`` of None means homogeneous nucleation: every atom of the parent is a
    potential site, N = N_A / Vm.  ``avrami_exponent`` of None takes the mode's own exponent;
    a given exponent keeps the mode's characteristic time K^(-1/n) and changes only the shape
    of X(t).
    """

    molar_volume_m3_mol: float | np.ndarray
    interface_energy_J_m2: float | np.ndarray
    nucleation_activation_J_mol: float | np.ndarray
    diffusion_prefactor_m2_s: float | np.ndarray
    diffusion_activation_J_mol: float | np.ndarray
    diffusion_distance_m: float | np.ndarray
    driving_force: str = "turnbull"
    equilibrium_K: float | np.ndarray | None = None
    latent_heat_J_mol: float | np.ndarray | None = None
    table: DrivingForceTable | None = None
    strain_energy_J_m3: float | np.ndarray = 0.0
    wetting_angle_deg: float | np.ndarray = 180.0
    site_density_m3: float | np.ndarray | None = None
    mode: str = "continuous"
    avrami_exponent: float | None = None
    incubation_time_s: float | np.ndarray = 0.0

    def __post_init__(self):
        if self.driving_force not in DRIVING_FORCE_FORMS:
            raise ValueError(f"driving_force must be one of {', '.join(DRIVING_FORCE_FORMS)}")
        if self.mode not in jmak.MODES:
            raise ValueError(f"mode must be one of {', '.join(jmak.MODES)}")
        if self.driving_force == "table":
            if self.table is None:
                raise ValueError("driving_force 'table' needs a table of dGm(T)")
        elif self.equilibrium_K is None or self.latent_heat_J_mol is None:
            raise ValueError(f"driving_force '{self.driving_force}' needs equilibrium_K and latent_heat_J_mol")


@dataclass
class NucleationGrowthProduct:
    """A product formed by classical nucleation and diffusion-limited growth (JMAK kinetics)."""

    name: str
    params: NucleationGrowthParameters
    lower_bound_K: float | np.ndarray = 0.0
    model: str = field(default="classical nucleation (Turnbull-Fisher) + diffusion-limited growth + JMAK")

    @property
    def upper_K(self):
        """Temperature where the driving force, net of strain energy, reaches zero."""
        p = self.params
        strain = np.asarray(p.strain_energy_J_m3, dtype=float)
        if p.driving_force == "table":
            if strain.ndim:
                return np.vectorize(lambda s: p.table.crossing_K(s * p.molar_volume_m3_mol))(strain)
            return p.table.crossing_K(float(strain) * p.molar_volume_m3_mol)
        te = np.asarray(p.equilibrium_K, dtype=float)
        ratio = strain * p.molar_volume_m3_mol / np.asarray(p.latent_heat_J_mol)  # Gs / dHv
        if p.driving_force == "turnbull":
            return te * (1.0 - ratio)
        # Hoffman: dHv (Te - T) T / Te^2 = Gs, upper root of the quadratic in T
        return te * (1.0 + np.sqrt(np.maximum(1.0 - 4.0 * ratio, 0.0))) / 2.0

    @property
    def lower_K(self):
        return self.lower_bound_K

    @property
    def exponent(self):
        p = self.params
        return jmak.MODES[p.mode][0] if p.avrami_exponent is None else float(p.avrami_exponent)

    def chemical_driving_force(self, T_K):
        """dGv of the transformation without strain energy, J/m^3."""
        p = self.params
        if p.driving_force == "table":
            return driving_force_table(T_K, p.table, p.molar_volume_m3_mol)
        latent_J_m3 = np.asarray(p.latent_heat_J_mol) / p.molar_volume_m3_mol
        form = driving_force_turnbull_linear if p.driving_force == "turnbull" else driving_force_hoffman
        return form(T_K, p.equilibrium_K, latent_J_m3)

    def effective_driving_force(self, T_K):
        """dGv + strain energy, J/m^3: what the nucleus and the growing interface feel."""
        return self.chemical_driving_force(T_K) + self.params.strain_energy_J_m3

    def nucleus(self, T_K):
        """Critical radius (m), barrier including the shape factor (J), ln I and u (m/s)."""
        p = self.params
        T_K = np.asarray(T_K, dtype=float)
        dgv = self.effective_driving_force(T_K)
        barrier = nucleation_barrier_homogeneous(p.interface_energy_J_m2, dgv) * shape_factor_spherical_cap(
            np.deg2rad(p.wetting_angle_deg)
        )
        sites = AVOGADRO_PER_MOL / p.molar_volume_m3_mol if p.site_density_m3 is None else p.site_density_m3
        log_i = log_nucleation_rate_turnbull_fisher(T_K, sites, p.nucleation_activation_J_mol, barrier)
        d = diffusivity_arrhenius(T_K, p.diffusion_prefactor_m2_s, p.diffusion_activation_J_mol)
        u = growth_velocity_diffusion_limited(T_K, d, p.diffusion_distance_m, dgv * p.molar_volume_m3_mol)
        return critical_radius(p.interface_energy_J_m2, dgv), barrier, log_i, u, np.log(sites)

    def nucleus_table(self, undercoolings_K):
        """r* (m), dG* (J), dG*/kT and ln I at undercoolings below the upper temperature.

        Undercoolings that would fall below the product's lower bound are left out.
        """
        T = float(self.upper_K) - np.asarray(undercoolings_K, dtype=float)
        T = T[T > max(float(self.lower_K), 0.0)]
        r, barrier, log_i, _, _ = self.nucleus(T)
        return {
            "undercooling_K": float(self.upper_K) - T,
            "critical_radius_m": r,
            "barrier_J": barrier,
            "barrier_over_kT": barrier / (BOLTZMANN_J_K * T),
            "log_nucleation_rate": log_i,
        }

    def log_rate_constant(self, T_K):
        """ln K(T) of X = 1 - exp(-K t^n) with the product's exponent; -inf where it cannot form."""
        p = self.params
        T_K = np.asarray(T_K, dtype=float)
        _, _, log_i, u, log_n = self.nucleus(T_K)
        source = log_i if p.mode == "continuous" else np.broadcast_to(log_n, np.shape(log_i))
        log_k = jmak.log_rate_constant(p.mode, source, u)
        n_mode = jmak.MODES[p.mode][0]
        log_k = log_k * (self.exponent / n_mode)
        forms = (T_K < self.upper_K) & (T_K >= self.lower_K)
        return np.where(forms & np.isfinite(log_k), log_k, -np.inf)

    def time_to_fraction(self, T_K, X):
        return jmak.time_to_fraction(X, self.log_rate_constant(T_K), self.exponent, self.params.incubation_time_s)

    def rate(self, X, T_K):
        return jmak.rate(X, self.log_rate_constant(T_K), self.exponent)
