"""The physical product model: classical nucleation + diffusion-limited growth + JMAK.

The nucleation rate rises with undercooling as the barrier falls; the growth velocity falls
at low temperature as diffusion slows; JMAK joins them into the time to each fraction.
Every parameter may be an array, so a batch of parameter sets is one numpy pass.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass
from types import SimpleNamespace

import numpy as np

from ..constants import AVOGADRO_PER_MOL, BOLTZMANN_J_K
from ..errors import InputError, choice, numbers
from ..relations import jmak
from ..relations.driving_force import (
    DrivingForceTable,
    driving_force_hoffman,
    driving_force_table,
    driving_force_turnbull_linear,
)
from ..relations.growth import diffusivity_arrhenius, growth_velocity_diffusion_limited
from ..relations.nucleation import (
    critical_radius,
    log_nucleation_rate_turnbull_fisher,
    nucleation_barrier_homogeneous,
    shape_factor_spherical_cap,
)
from .alloy import UPPER_MARGIN_K, Alloy
from .base import answer_shape, as_query, batch_leading, plain

DRIVING_FORCE_FORMS = ("turnbull", "hoffman", "table")


@dataclass(frozen=True)
class NucleationGrowthParameters:
    """Physical parameters of one product (SI units; any field may be a numpy array).

    ``site_density_m3`` of None means homogeneous nucleation: every atom of the parent is a
    potential site, N = N_A / Vm.  ``avrami_exponent`` of None takes the mode's own exponent;
    a given exponent keeps the mode's characteristic time K^(-1/n) and changes only the shape
    of X(t). Array-valued fields broadcast together into the product's batch shape.
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
    avrami_exponent: float | np.ndarray | None = None
    incubation_time_s: float | np.ndarray = 0.0

    def __post_init__(self):
        choice("driving_force", self.driving_force, DRIVING_FORCE_FORMS)
        choice("mode", self.mode, tuple(jmak.MODES))
        if self.driving_force == "table":
            if self.table is None:
                raise InputError(None, "driving_force_table", "driving_force 'table' needs a table of dGm(T)")
        else:
            for name in ("equilibrium_K", "latent_heat_J_mol"):
                if getattr(self, name) is None:
                    raise InputError(None, name, f"driving_force '{self.driving_force}' needs equilibrium_K and "
                                     "latent_heat_J_mol")
        for name, (low, high, low_open) in _PHYSICAL.items():
            if getattr(self, name) is not None or name not in _OPTIONAL:
                numbers(name, getattr(self, name), low, high, low_open=low_open)


#: What each numeric field can be physically, (low, high, low above 0): any finite value within
#: these reaches the physics (the plausible ranges for metals are the alloy file's to check).
_PHYSICAL = {
    "molar_volume_m3_mol": (0.0, None, True), "interface_energy_J_m2": (0.0, None, True),
    "nucleation_activation_J_mol": (0.0, None, False), "diffusion_prefactor_m2_s": (0.0, None, True),
    "diffusion_activation_J_mol": (0.0, None, False), "diffusion_distance_m": (0.0, None, True),
    "equilibrium_K": (0.0, None, True), "latent_heat_J_mol": (0.0, None, True),
    "strain_energy_J_m3": (0.0, None, False), "wetting_angle_deg": (0.0, 180.0, True),
    "site_density_m3": (0.0, None, True), "avrami_exponent": (0.0, None, True), "incubation_time_s": (0.0, None, False),
}

#: Numeric fields that may be None (see the class notes; the driving force's form needs the first two).
_OPTIONAL = ("equilibrium_K", "latent_heat_J_mol", "site_density_m3", "avrami_exponent")

#: Fields that hold numbers (and may hold a batch of them).
_NUMERIC = (
    "molar_volume_m3_mol", "interface_energy_J_m2", "nucleation_activation_J_mol", "diffusion_prefactor_m2_s",
    "diffusion_activation_J_mol", "diffusion_distance_m", "equilibrium_K", "latent_heat_J_mol",
    "strain_energy_J_m3", "wetting_angle_deg", "site_density_m3", "avrami_exponent", "incubation_time_s",
)


class NucleationGrowthProduct:
    """A product formed by classical nucleation and diffusion-limited growth (JMAK kinetics).

    Parameters
    ----------
    name : str
        Trade name (precipitate, ferrite, solid, ...).
    params : NucleationGrowthParameters
        The physics; any numeric field may be an array, and they broadcast into the batch.
    lower_bound_K : float or array_like
        The product does not form below this temperature, K (0: unbounded).
    """

    model = "classical nucleation (Turnbull-Fisher) + diffusion-limited growth + JMAK"

    def __init__(self, name: str, params: NucleationGrowthParameters, lower_bound_K=0.0):
        self.name = name
        self.params = params
        given = {k: np.asarray(getattr(params, k), dtype=float) for k in _NUMERIC if getattr(params, k) is not None}
        lower = np.asarray(lower_bound_K, dtype=float)
        self._batch_shape = np.broadcast_shapes(lower.shape, *(v.shape for v in given.values()))
        self._fields = {k: np.broadcast_to(v, self._batch_shape) for k, v in given.items()}
        self._lower = np.broadcast_to(lower, self._batch_shape)
        # computed once: with a tabulated driving force it is a crossing search
        self._upper = np.broadcast_to(self._upper_temperature(), self._batch_shape)

    @property
    def batch_shape(self):
        return self._batch_shape

    @property
    def upper_K(self):
        """Temperature where the driving force, net of strain energy, reaches zero; 0 K where
        no temperature has a net driving force."""
        return plain(self._upper)

    @property
    def lower_K(self):
        return plain(self._lower)

    @property
    def separable(self):
        """t = F(T) S(X) with one S for the batch: no incubation time added and one Avrami exponent."""
        n = np.asarray(self.exponent)
        return not np.any(self._fields["incubation_time_s"]) and bool(np.all(n == n.flat[0]))

    #: It takes all of the parent at completion (no equilibrium share below it).
    capped = False

    #: What a calibration may vary (the interface energy stands in for it with its shape factor).
    CALIBRATION = ("interface_energy_J_m2", "diffusion_prefactor_m2_s", "nucleation_activation_J_mol",
                   "diffusion_activation_J_mol")

    #: What a calibration varies unless told otherwise.
    default_calibration = ("interface_energy_J_m2", "diffusion_prefactor_m2_s")

    @property
    def calibration_parameters(self):
        return {name: float(np.mean(getattr(self.params, name))) for name in self.CALIBRATION}

    def varied(self, values, batch_shape=()):
        """A copy with some of :attr:`CALIBRATION` set (arrays give a batch of parameter sets),
        broadcast to ``batch_shape``."""
        unknown = set(values) - set(self.CALIBRATION)
        if unknown:
            raise KeyError(sorted(unknown)[0])
        params = dataclasses.replace(self.params, **{k: np.asarray(v, dtype=float) for k, v in values.items()})
        lower = np.broadcast_to(self._lower, np.broadcast_shapes(self._lower.shape, batch_shape))
        return NucleationGrowthProduct(self.name, params, lower)

    def equilibrium_fraction(self, T_K):
        """1: the product takes all of the parent at completion (batch axes lead)."""
        T, q = as_query(T_K)
        return np.ones(answer_shape(self._batch_shape, T, q))

    def _upper_temperature(self):
        p, f = self.params, self._fields
        strain_J_mol = f["strain_energy_J_m3"] * f["molar_volume_m3_mol"]
        if p.driving_force == "table":
            # 0 K where dGm + strain is negative nowhere in the table: no net driving force
            crossing = np.vectorize(p.table.crossing_K, otypes=[float])(strain_J_mol)
            favoured = np.vectorize(lambda s: bool(np.any(p.table.dGm_J_mol + s < 0)), otypes=[bool])(strain_J_mol)
            return np.where(favoured, crossing, 0.0)
        te = f["equilibrium_K"]
        ratio = strain_J_mol / f["latent_heat_J_mol"]  # Gs / dHv
        if p.driving_force == "turnbull":
            return te * (1.0 - ratio)
        # Hoffman: dHv (Te - T) T / Te^2 = Gs, upper root of the quadratic in T; the chemical
        # term peaks at dHv / 4 (T = Te / 2), so past that no temperature has a net driving
        # force (0 K).
        disc = 1.0 - 4.0 * ratio
        return np.where(disc >= 0.0, te * (1.0 + np.sqrt(np.maximum(disc, 0.0))) / 2.0, 0.0)

    def _leading(self, ndim):
        """The numeric fields, with the batch leading a query of ``ndim`` dimensions."""
        b = len(self._batch_shape)
        out = {k: batch_leading(v, b, ndim) for k, v in self._fields.items()}
        return SimpleNamespace(**out, upper=batch_leading(self._upper, b, ndim),
                               lower=batch_leading(self._lower, b, ndim))

    @property
    def exponent(self):
        """Avrami exponent n: the mode's own (4 or 3) unless a measured one is given."""
        n = self._fields.get("avrami_exponent", jmak.MODES[self.params.mode][0])
        return plain(np.broadcast_to(n, self._batch_shape))

    def _exponent(self, f):
        n_mode = jmak.MODES[self.params.mode][0]
        return getattr(f, "avrami_exponent", n_mode)

    def chemical_driving_force(self, T_K):
        """dGv of the transformation without strain energy, J/m^3."""
        (T,), f = self._query(T_K)
        return self._chemical(T, f)

    def effective_driving_force(self, T_K):
        """dGv + strain energy, J/m^3: what the nucleus and the growing interface feel."""
        (T,), f = self._query(T_K)
        return self._chemical(T, f) + f.strain_energy_J_m3

    def _query(self, *queries):
        *arrays, q = as_query(*queries)
        return arrays, self._leading(q)

    def _chemical(self, T, f):
        p = self.params
        if p.driving_force == "table":
            return driving_force_table(T, p.table, f.molar_volume_m3_mol)
        form = driving_force_turnbull_linear if p.driving_force == "turnbull" else driving_force_hoffman
        return form(T, f.equilibrium_K, f.latent_heat_J_mol / f.molar_volume_m3_mol)

    def nucleus(self, T_K):
        """Critical radius (m), barrier including the shape factor (J), ln I, u (m/s) and ln N."""
        (T,), f = self._query(T_K)
        return self._nucleus(T, f)

    def _nucleus(self, T, f):
        dgv = self._chemical(T, f) + f.strain_energy_J_m3
        barrier = nucleation_barrier_homogeneous(f.interface_energy_J_m2, dgv) * shape_factor_spherical_cap(
            np.deg2rad(f.wetting_angle_deg))
        sites = AVOGADRO_PER_MOL / f.molar_volume_m3_mol if self.params.site_density_m3 is None else f.site_density_m3
        log_i = log_nucleation_rate_turnbull_fisher(T, sites, f.nucleation_activation_J_mol, barrier)
        d = diffusivity_arrhenius(T, f.diffusion_prefactor_m2_s, f.diffusion_activation_J_mol)
        u = growth_velocity_diffusion_limited(T, d, f.diffusion_distance_m, dgv * f.molar_volume_m3_mol)
        return critical_radius(f.interface_energy_J_m2, dgv), barrier, log_i, u, np.log(sites)

    def nucleus_table(self, undercoolings_K):
        """r* (m), dG* (J), dG*/kT and ln I at undercoolings below the upper temperature.

        One parameter set only. Undercoolings that would fall below the product's lower
        bound are left out.
        """
        if self._batch_shape:
            raise ValueError("nucleus_table takes a single parameter set, not a batch")
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

    def _log_rate_constant(self, T, f):
        mode = self.params.mode
        _, _, log_i, u, log_n = self._nucleus(T, f)
        source = log_i if mode == "continuous" else np.broadcast_to(log_n, np.shape(log_i))
        log_k = jmak.log_rate_constant(mode, source, u) * (self._exponent(f) / jmak.MODES[mode][0])
        forms = (T < f.upper) & (T >= f.lower)
        return np.where(forms & np.isfinite(log_k), log_k, -np.inf)

    def log_rate_constant(self, T_K):
        """ln K(T) of X = 1 - exp(-K t^n) with the product's exponent; -inf where it cannot form."""
        (T,), f = self._query(T_K)
        return self._log_rate_constant(T, f)

    def time_to_fraction(self, T_K, X):
        (T, X), f = self._query(T_K, X)
        return jmak.time_to_fraction(X, self._log_rate_constant(T, f), self._exponent(f), f.incubation_time_s)

    def fraction_after(self, T_K, t_s):
        (T, t), f = self._query(T_K, t_s)
        return jmak.fraction(t, self._log_rate_constant(T, f), self._exponent(f), f.incubation_time_s)

    def rate(self, T_K, X):
        (T, X), f = self._query(T_K, X)
        return jmak.rate(X, self._log_rate_constant(T, f), self._exponent(f))

    def time_factor(self, T_K):
        """K^(-1/n), s: the time scale of t = K^(-1/n) S(X) (plus any incubation time)."""
        (T,), f = self._query(T_K)
        with np.errstate(over="ignore"):
            return np.exp(-self._log_rate_constant(T, f) / self._exponent(f))

    def incubation_s(self, T_K):
        """The given incubation time (the same at every temperature where the product forms)."""
        (T,), f = self._query(T_K)
        return np.broadcast_to(f.incubation_time_s, np.broadcast_shapes(T.shape, np.shape(f.incubation_time_s))) + 0.0

    def reaction_term(self, X):
        (X,), f = self._query(X)
        return jmak.reaction_term(X, self._exponent(f))

    def reaction_term_inverse(self, S):
        (S,), f = self._query(S)
        return jmak.reaction_term_inverse(S, self._exponent(f))

    def reaction_rate_shape(self, X):
        """dX/dS = n (1 - X) (-ln(1 - X))^((n - 1)/n): JMAK's rate at a time scale of 1 s."""
        (X,), f = self._query(X)
        return jmak.rate(X, 0.0, self._exponent(f))


#: Default lower end of the diagram for physical products, as a fraction of the upper
#: temperature in K: below about 0.4 of the equilibrium temperature diffusion in metals is
#: frozen on any practical time scale.
DEFAULT_LOWER_FRACTION_OF_UPPER = 0.4


def nucleation_growth_alloy(name: str, products, inputs=None) -> Alloy:
    """An alloy of physical products sharing one parent, with each product's Te as a line.

    Raises ``ValueError`` for products without distinct names.
    """
    products = tuple(products)
    batch = np.broadcast_shapes(*(p.batch_shape for p in products))
    # every product of one alloy shares one batch
    products = tuple(p if p.batch_shape == batch else
                     NucleationGrowthProduct(p.name, p.params, np.broadcast_to(np.asarray(p.lower_K, dtype=float), batch))
                     for p in products)
    names = [p.name for p in products]
    if len(set(names)) != len(names):
        raise InputError(None, "product.name", f"each product needs its own name, got {names}")
    upper = max(float(np.max(p.upper_K)) for p in products)
    lower = max(min(float(np.min(p.lower_K)) for p in products), DEFAULT_LOWER_FRACTION_OF_UPPER * upper)
    lines = {f"Te {p.name}" if len(products) > 1 else "Te": p.upper_K for p in products}
    return Alloy(
        name=name,
        model="nucleation-growth",
        products=products,
        critical_K=lines,
        critical_methods={k: "equilibrium temperature net of strain energy (from the product parameters)" for k in lines},
        default_range_K=(lower, upper - UPPER_MARGIN_K),
        inputs=inputs or {},
        footer=f"model: {products[0].model}",
    )
