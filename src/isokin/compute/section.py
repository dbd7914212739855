"""Cooling through a real section: 1-D transient conduction in a plate, a long round bar or a
sphere (and along a Jominy bar), coupled to the decomposition.

The conduction
--------------
Finite volumes on a graded grid of nodes from the centre (r = 0) to the surface (r = R), the
nodes closer together toward the surface (where the gradients are steep): node i sits at
r_i = R g(i / (N - 1)) with g(x) = a x + (1 - a) sin(pi x / 2), a = :data:`GRADING`. Each
node owns the volume between the midpoints to its neighbours, (r+^(m+1) - r-^(m+1)) / (m+1)
per unit of r^m area, with m = 0, 1, 2 for plate, bar and sphere; the faces between nodes
carry k A (T_j - T_i) / (r_j - r_i) with k the mean of the two nodes; the surface node loses
h A (T_s - T_medium). Backward Euler in time (unconditionally stable and free of the
oscillations Crank-Nicolson shows after a sudden quench), so every step is one tridiagonal
system per section; a batch of sections (leading axis) is one block-diagonal banded system
for scipy.linalg.solve_banded, with no loop over nodes or sections. Properties (k, rho c_p)
are taken at the start of each step (at the node's temperature and transformed share), as is
h where it depends on the surface temperature. Steps adapt: each is sized so that no node
changes by more than ``max_step_K`` (nor by more than :data:`RELATIVE_STEP` of its distance to the
medium) and no product grows by more than :data:`MAX_STEP_FRACTION`.

The coupling
------------
After the temperature step, the phases of all nodes advance as one batch over that step by
the additivity of :mod:`isokin.compute.cooling` (:class:`isokin.compute.stepwise.Additivity`:
the same sums, the same rules). The heat of the phases formed in a step (each product's
latent heat at the node's temperature) is released into the node in the next step, as a
source in the implicit system: a lag of one step, so that the temperature path the
kinetics followed is the path recorded, and no heat is lost (what the last step forms is
released at the end). The phases reported are those of that recorded path.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ..constants import celsius_to_kelvin, kelvin_to_celsius
from ..errors import InputError, choice, numbers, whole_number
from ..relations import conduction as C
from ..relations.hardenability import ideal_critical_diameter_grossmann_in
from ..relations.hardness import E140_HRC, E140_HV, hardness_of_mixture
from ..results import JominyResult, SectionResult
from .cooling import LUMPED_BIOT_LIMIT, default_start_C
from .decomposition import Decomposition
from .stepwise import Additivity

#: Share of the grid spaced evenly; the rest follows a sine, so that the surface cell is about
#: a quarter of an even cell and the centre cell about 1.4 times one.
GRADING = 0.25
#: Exponent m of r^m in the conduction equation, per shape.
SHAPE_EXPONENT = {"plate": 0, "bar": 1, "sphere": 2}
#: Default grid nodes from centre to surface.
DEFAULT_NODES = 41
#: Default largest change of any node's temperature in one step, K.
MAX_STEP_K = 6.0
#: Largest change of a node in one step, as a share of its distance to the medium.
RELATIVE_STEP = 0.1
SMALLEST_STEP_K = 0.5
#: Largest growth of any product's share in one step.
MAX_STEP_FRACTION = 0.05
#: The run ends when every node is within this of the medium, K.
END_WITHIN_K = 1.0
#: The centre is "at the medium" within this, K (the time a planner waits for).
CENTRE_WITHIN_K = 5.0
#: Most steps of one run: far more than any quench needs.
MAX_STEPS = 200_000
#: Martensite shares whose depth below the surface a section reports.
MARTENSITE_LEVELS = (0.5, 0.9)

PROPERTY_NOTE = ("conductivity and specific heat of austenite and of the transformed products against temperature, "
                 "mixed by the transformed share (BISRA 1953 tables, ballpark values from memory); density 7850 "
                 "kg/m3, constant; heat of transformation as quench simulations commonly take it (from memory): "
                 "1.56e9 - 1.5e6 T_C J/m3 for ferrite, pearlite and bainite, 6.44e8 J/m3 for martensite")
COUPLING_NOTE = ("backward Euler conduction on a graded grid, properties at the start of each step; the phases of all "
                 "nodes advance over each step by the additivity of the cooling paths (one batch); the heat of the "
                 "phases formed in a step is released in the next")


@dataclass(frozen=True)
class ThermalProperties:
    """Conductivity and heat capacity of austenite and of its products, as tables
    ((°C, value), ...), the density, and whether the heat of transformation is released.

    Defaults: :mod:`isokin.relations.conduction` (from memory, see there). Any table may be
    replaced; :meth:`constant` gives one set of constant properties for every phase.
    """

    density_kg_m3: float = C.DENSITY_KG_M3
    austenite_conductivity: tuple = C.AUSTENITE_CONDUCTIVITY
    product_conductivity: tuple = C.PRODUCT_CONDUCTIVITY
    austenite_heat_capacity: tuple = C.AUSTENITE_HEAT_CAPACITY
    product_heat_capacity: tuple = C.PRODUCT_HEAT_CAPACITY
    latent_heat: bool = True
    note: str = PROPERTY_NOTE

    def __post_init__(self):
        if not (np.isfinite(self.density_kg_m3) and self.density_kg_m3 > 0):
            raise InputError(None, "density_kg_m3", "must be a positive number")
        for key in ("austenite_conductivity", "product_conductivity", "austenite_heat_capacity",
                    "product_heat_capacity"):
            table = np.asarray(getattr(self, key), dtype=float)
            if table.ndim != 2 or table.shape[1] != 2 or table.shape[0] < 1 or not np.all(np.isfinite(table)):
                raise InputError(None, key, "must be rows of (temperature_C, value)")
            if np.any(table[:, 1] <= 0) or np.any(np.diff(table[:, 0]) <= 0):
                raise InputError(None, key, "values must be positive and temperatures rising")

    @classmethod
    def constant(cls, conductivity_W_mK, heat_capacity_J_kgK, density_kg_m3=C.DENSITY_KG_M3):
        """The same constant properties for every phase and no heat of transformation."""
        k, c = ((0.0, float(conductivity_W_mK)),), ((0.0, float(heat_capacity_J_kgK)),)
        return cls(density_kg_m3, k, k, c, c, latent_heat=False,
                   note=f"constant: k {conductivity_W_mK:g} W/(m K), c {heat_capacity_J_kgK:g} J/(kg K), "
                        f"rho {density_kg_m3:g} kg/m3, no heat of transformation")

    def at(self, T_K, transformed):
        """(k W/(m K), rho c_p J/(m^3 K)) at temperatures T_K where ``transformed`` of the part
        has transformed."""
        k = (1 - transformed) * C.tabulated(self.austenite_conductivity, T_K) + transformed * C.tabulated(
            self.product_conductivity, T_K)
        c = (1 - transformed) * C.tabulated(self.austenite_heat_capacity, T_K) + transformed * C.tabulated(
            self.product_heat_capacity, T_K)
        return k, self.density_kg_m3 * c


class Surface:
    """How the surface loses heat: ``h(T_surface_K)`` in W/(m^2 K), and a label."""

    def __init__(self, label, h_of_T):
        self.label, self.h = label, h_of_T


def surface_condition(heat_transfer_W_m2K=None, severity_per_in=None, htc_table=None, start_C=850.0,
                      properties=None):
    """One surface condition from exactly one of: a constant heat-transfer coefficient, W/(m^2 K)
    (a number, or an array for a batch of sections); a Grossmann severity H, 1/in (h = 2 H k,
    k of austenite at the start temperature); a table ``(temperature_C, h_W_m2K)`` of h against
    the surface temperature (linear between rows, held beyond them)."""
    given = [x is not None for x in (heat_transfer_W_m2K, severity_per_in, htc_table)]
    if sum(given) != 1:
        raise InputError(None, "heat_transfer_W_m2K", "give one surface condition: a heat-transfer coefficient, "
                         "a Grossmann severity or a table of h against the surface temperature")
    if heat_transfer_W_m2K is not None:
        h = _positive("heat_transfer_W_m2K", heat_transfer_W_m2K)
        return Surface(f"h {_number_text(h)} W/m2K", lambda T: h)
    if severity_per_in is not None:
        H = _positive("severity_per_in", severity_per_in)
        props = properties or ThermalProperties()
        k = C.tabulated(props.austenite_conductivity, celsius_to_kelvin(start_C))
        h = C.heat_transfer_from_severity_W_m2K(H, k)
        return Surface(f"Grossmann H {_number_text(H)} /in (h {_number_text(h)} W/m2K)", lambda T: h)
    t_c, h = (np.asarray(v, dtype=float) for v in htc_table)
    if t_c.ndim != 1 or t_c.size < 2 or t_c.shape != h.shape or np.any(np.diff(t_c) <= 0):
        raise InputError(None, "htc_table", "needs two or more rows with rising temperature_C")
    if not (np.all(np.isfinite(h)) and np.all(h > 0)):
        raise InputError(None, "htc_table", "htc_W_m2K must be positive")
    T_K = celsius_to_kelvin(t_c)
    return Surface(f"h(T) table, {h.min():.0f}-{h.max():.0f} W/m2K", lambda T: np.interp(T, T_K, h))


def _number_text(x):
    x = np.asarray(x)
    return f"{float(x):.4g}" if x.size == 1 else f"{float(x.min()):.4g}-{float(x.max()):.4g}"


def _positive(key, value, unit=None):
    """``value`` as a float array, every element positive and finite; InputError naming ``key``
    (and the element refused, in ``unit``, where it is a number) otherwise."""
    try:
        v = np.asarray(value, dtype=float)
    except (TypeError, ValueError):
        v = np.array(np.nan)
    bad = ~(np.isfinite(v) & (v > 0))
    if v.size < 1 or bad.any():
        first = v[bad].flat[0] if v.size else np.nan
        if unit is not None and np.isfinite(first):
            raise InputError(None, key, "must be a positive finite number", got=(float(first), unit))
        raise InputError(None, key, f"must be a positive finite number, got {value!r}")
    return v


#: Largest section, m (thickness of a plate, diameter of a bar or sphere).
MAX_SIZE_M = 2.0


def section_sizes(size_m, key="size_m"):
    """Section sizes (thickness or diameter), m, as a flat array: positive, at most
    :data:`MAX_SIZE_M`; a refused size is named in metres (a caller that took millimetres says
    it in those, see :meth:`isokin.InputError.relocated`)."""
    size = _positive(key, size_m, unit="m").ravel()
    if np.any(size > MAX_SIZE_M):
        raise InputError(None, key, f"must be at most {MAX_SIZE_M:g} m ({MAX_SIZE_M * 1e3:g} mm)",
                         got=(float(size[size > MAX_SIZE_M][0]), "m"))
    return size


class Grid:
    """Nodes from the centre (0) to the surface (R) of a batch of sections, shape (B, N). One
    node is the lumped body: the whole section at one temperature, losing heat through its
    surface."""

    def __init__(self, shape, half_size_m, nodes):
        if shape not in SHAPE_EXPONENT:
            raise InputError(None, "shape", f"must be plate, bar or sphere, got {shape!r}")
        whole_number("nodes", nodes, 1, 2000)
        m = SHAPE_EXPONENT[shape]
        R = np.atleast_1d(half_size_m).astype(float)
        x = np.linspace(0.0, 1.0, nodes)
        self.fraction = GRADING * x + (1 - GRADING) * np.sin(0.5 * np.pi * x)
        self.shape, self.m, self.R = shape, m, R
        self.r = R[:, None] * self.fraction
        mid = 0.5 * (self.r[:, 1:] + self.r[:, :-1])
        faces = np.concatenate([np.zeros((R.size, 1)), mid, R[:, None]], axis=1)
        self.volume = (faces[:, 1:] ** (m + 1) - faces[:, :-1] ** (m + 1)) / (m + 1)
        self.face_area = mid**m
        self.gap = np.diff(self.r, axis=1)
        self.surface_area = R**m

    def at_fraction_of_radius(self, values, where):
        """``values`` (B, N, ...) at r = where * R, linear between nodes."""
        j = int(np.clip(np.searchsorted(self.fraction, where) - 1, 0, self.fraction.size - 2))
        w = (where - self.fraction[j]) / (self.fraction[j + 1] - self.fraction[j])
        return (1 - w) * values[:, j] + w * values[:, j + 1]


@dataclass
class Run:
    """What :func:`conduct` computes: times (M,), temperatures (B, N, M), phases (phase ->
    (B, N, M)) where an alloy was given, and the heat balance, J per unit of r^m area."""

    time_s: np.ndarray
    temperature_K: np.ndarray
    fractions: dict = field(default_factory=dict)
    heat_out_J: np.ndarray = None
    latent_J: np.ndarray = None
    sensible_J: np.ndarray = None


def conduct(grid, start_K, medium_K, surface, properties, alloy=None, side_loss=None, max_step_K=MAX_STEP_K,
            end_within_K=END_WITHIN_K, time_limit_s=None, record_nodes=None):
    """Cool a batch of sections from ``start_K`` toward ``medium_K`` (see the module notes).

    ``medium_K``: one temperature for every section, or one per section (B,): a batch of
    sections quenched into baths at different temperatures. ``side_loss(T_K)``: an extra loss
    per volume and kelvin above the medium, W/(m^3 K) (the sides of a Jominy bar), or None.
    The run ends when every node is within ``end_within_K`` of its medium, or at
    ``time_limit_s``. ``record_nodes``: the nodes whose phases are kept at every step (default
    all; the temperatures of every node are kept).
    """
    B, N = grid.r.shape
    T = np.full((B, N), float(start_K))
    Tm = np.broadcast_to(np.asarray(medium_K, dtype=float), (B,))
    kept = slice(None) if record_nodes is None else np.asarray(record_nodes)
    kinetics = Additivity(alloy, T.ravel(), float(Tm.min())) if alloy is not None else None
    transformed = np.zeros((B, N))
    latent_next = np.zeros((B, N))
    times, temps = [0.0], [T]
    records = {n: [v.reshape(B, N)[:, kept]] for n, v in kinetics.fractions.items()} if kinetics else {}
    heat_out = np.zeros(B)
    latent_total = np.zeros(B)
    sensible = np.zeros(B)
    k, rc = properties.at(T, transformed)
    h0 = np.broadcast_to(surface.h(T[:, -1]), (B,))
    surface_rate = h0 * grid.surface_area * (T[:, -1] - Tm) / (rc[:, -1] * grid.volume[:, -1])
    dt = 0.25 * max_step_K / float(np.max(surface_rate))
    t = 0.0
    for _ in range(MAX_STEPS):
        k, rc = properties.at(T, transformed)
        h = np.broadcast_to(surface.h(T[:, -1]), (B,))
        sink = side_loss(T) if side_loss is not None else None
        while True:
            T_new = _implicit_step(grid, T, Tm, k, rc, h, sink, latent_next, dt)
            # the heat released is a fixed amount whatever the step: only conduction sizes it
            change = float(np.max(np.abs(T_new - T - latent_next / rc)))
            if change <= 1.5 * max_step_K:
                break
            dt *= 0.8 * max_step_K / change
        capacity = rc * grid.volume
        sensible += np.sum(capacity * (T_new - T), axis=1)
        heat_out += dt * h * grid.surface_area * (T_new[:, -1] - Tm)
        if sink is not None:
            heat_out += dt * np.sum(sink * grid.volume * (T_new - Tm[:, None]), axis=1)
        latent_total += np.sum(grid.volume * latent_next, axis=1)
        t += dt
        grown = 0.0
        latent_next = np.zeros((B, N))
        if kinetics is not None:
            before = kinetics.fractions
            after = kinetics.step(T_new.ravel(), dt)
            for name, value in after.items():
                records[name].append(value.reshape(B, N)[:, kept])
            gain = {n: (after[n] - before[n]).reshape(B, N) for n in after}
            transformed = 1.0 - (after[f"retained {alloy.parent}"] if alloy.martensite is not None
                                 else after[alloy.parent]).reshape(B, N)
            if properties.latent_heat:
                latent_next = _latent(alloy, gain, T_new)
            grown = max(float(np.max(g)) for n, g in gain.items() if not n.startswith("retained"))
        T_before, T = T, T_new
        times.append(t)
        temps.append(T)
        if float(np.max(np.abs(T - Tm[:, None]))) <= end_within_K:
            break
        if time_limit_s is not None and t >= time_limit_s:
            break
        # in the tail toward the medium, steps are also held to a share of what is left to go
        # (never below SMALLEST_STEP_K, so that a node already at the medium sets no limit)
        allowed = np.minimum(max_step_K, np.maximum(RELATIVE_STEP * np.abs(T_before - Tm[:, None]), SMALLEST_STEP_K))
        factor = min(float(np.min(allowed / np.maximum(np.abs(T - T_before), 1e-12))),
                     MAX_STEP_FRACTION / grown if grown > 0 else np.inf)
        dt *= float(np.clip(factor, 0.5, 1.25))
    else:
        raise InputError(None, "medium_C", f"the section did not cool within {MAX_STEPS} steps; check the surface "
                         "condition (a very small heat-transfer coefficient?)")
    # heat formed in the last step: released into the nodes where it formed
    capacity = rc * grid.volume
    T = T + latent_next / rc
    temps[-1] = T
    latent_total += np.sum(grid.volume * latent_next, axis=1)
    sensible += np.sum(latent_next * grid.volume, axis=1)
    return Run(np.array(times), np.stack(temps, axis=-1),
               {n: np.stack(v, axis=-1) for n, v in records.items()}, heat_out, latent_total, sensible)


def _implicit_step(grid, T, Tm, k, rc, h, sink, latent, dt):
    """One backward-Euler step of the whole batch: one banded solve."""
    B, N = T.shape
    capacity = rc * grid.volume / dt
    G = 0.5 * (k[:, 1:] + k[:, :-1]) * grid.face_area / grid.gap
    diag = capacity.copy()
    diag[:, 1:] += G
    diag[:, :-1] += G
    rhs = capacity * T + grid.volume * latent / dt
    diag[:, -1] += h * grid.surface_area
    rhs[:, -1] += h * grid.surface_area * Tm
    if sink is not None:
        diag += sink * grid.volume
        rhs += sink * grid.volume * Tm[:, None]
    off = np.zeros((B, N))
    off[:, :-1] = -G
    banded = np.zeros((3, B * N))
    banded[0, 1:] = off.ravel()[:-1]
    banded[1] = diag.ravel()
    banded[2, :-1] = off.ravel()[:-1]
    from scipy.linalg import solve_banded  # here, not at import: loading an alloy file must not pay for scipy

    return solve_banded((1, 1), banded, rhs.ravel(), check_finite=False).reshape(B, N)


def _latent(alloy, gain, T):
    """Heat released per volume by the phases gained in a step, J/m^3."""
    heat = np.zeros(T.shape)
    for product in alloy.products:
        heat += np.maximum(gain[product.name], 0.0) * C.latent_heat_diffusional_J_m3(T)
    if alloy.martensite is not None:
        heat += np.maximum(gain[alloy.martensite.name], 0.0) * C.LATENT_HEAT_MARTENSITE_J_M3
    return heat


def _one_steel_or_alloy(alloy):
    if alloy.batch_shape:
        raise InputError(None, "alloy", "a section takes one alloy, not a batch")


def _final_state(alloy, run, shape_BN):
    """Final phases (phase -> (B, N)), the rate at 700 °C (°C/h), the hardness (HV; None for
    a physical alloy) and the carbon of the austenite left."""
    final = {name: v[..., -1] for name, v in run.fractions.items()}
    T_C = kelvin_to_celsius(run.temperature_K)
    M = run.time_s.size
    k = np.clip(np.argmax(T_C <= 700.0, axis=-1), 1, M - 1)
    T0 = np.take_along_axis(T_C, (k - 1)[..., None], axis=-1)[..., 0]
    T1 = np.take_along_axis(T_C, k[..., None], axis=-1)[..., 0]
    rate = np.maximum(T0 - T1, 0.0) / (run.time_s[k] - run.time_s[k - 1]) * 3600.0
    if alloy.model != "steel":
        return final, rate, None, None
    carbon = alloy.carbon_balance.austenite_carbon(final, len(shape_BN))
    return final, rate, hardness_of_mixture(alloy.composition, final, rate, carbon), carbon


def _depth_below(values, depth, level):
    """Depth (from the surface) where ``values`` (B, N; nodes centre to surface) first fall below
    ``level`` going inward, linear between nodes; the whole half-size where they never do, 0
    where the surface is already below."""
    v, d = values[:, ::-1], depth[:, ::-1]
    below = v < level
    j = np.argmax(below, axis=1)
    never = ~below.any(axis=1)
    jp = np.maximum(j - 1, 0)
    rows = np.arange(v.shape[0])
    v0, v1, d0, d1 = v[rows, jp], v[rows, j], d[rows, jp], d[rows, j]
    with np.errstate(divide="ignore", invalid="ignore"):
        w = np.where(v0 > v1, (v0 - level) / (v0 - v1), 0.0)
    out = np.where(j == 0, 0.0, d0 + np.clip(w, 0.0, 1.0) * (d1 - d0))
    return np.where(never, d[:, -1], out)


def _first_within(time_s, temperature_K, medium_K, within_K):
    """Time (B,) at which a temperature history (B, M) first comes within ``within_K`` of the
    medium, linear between steps; NaN where it never does."""
    gap = temperature_K - medium_K - within_K
    inside = gap <= 0
    j = np.argmax(inside, axis=1)
    jp = np.maximum(j - 1, 0)
    rows = np.arange(gap.shape[0])
    g0, g1 = gap[rows, jp], gap[rows, j]
    with np.errstate(divide="ignore", invalid="ignore"):
        w = np.where(g0 > g1, g0 / (g0 - g1), 0.0)
    t = time_s[jp] + np.clip(w, 0, 1) * (time_s[j] - time_s[jp])
    return np.where(inside.any(axis=1), t, np.nan)


def _start_and_medium(alloy, start_C, medium_C):
    start = default_start_C(alloy) if start_C is None else float(start_C)
    medium = float(medium_C)
    if not (np.isfinite(medium) and np.isfinite(start) and -273.15 < medium < start):
        raise InputError(None, "medium_C", f"must lie below the start temperature, {start:g} °C, and above "
                         "absolute zero")
    return start, medium


def section(alloy, shape="bar", size_m=0.025, medium_C=60.0, heat_transfer_W_m2K=None, severity_per_in=None,
            htc_table=None, start_C=None, nodes=DEFAULT_NODES, properties=None, max_step_K=MAX_STEP_K):
    """What a quench makes of a real section: the temperatures through it, and the phases and
    hardness against depth.

    Parameters
    ----------
    alloy : Alloy
        One alloy (a steel gives martensite depths and hardness).
    shape : {"plate", "bar", "sphere"}
        An infinite plate (cooled on both faces), a long round bar or a sphere.
    size_m : float or array_like
        Thickness (plate) or diameter (bar, sphere), m; an array gives a batch of sections,
        solved together.
    medium_C : float
        Temperature of the quench medium, °C.
    heat_transfer_W_m2K, severity_per_in, htc_table
        The surface condition: exactly one (see :func:`surface_condition`).
    start_C : float, optional
        Uniform temperature at the start (default: the alloy's austenitizing temperature).
    nodes : int
        Grid nodes from centre to surface.
    properties : ThermalProperties, optional
        Thermal properties (default: :class:`ThermalProperties`).

    Returns
    -------
    SectionResult

    Examples
    --------
    >>> import isokin
    >>> steel = isokin.load_alloy("alloys/aisi-4140-crmo.toml", kinetics_model="li_1998")
    >>> bar = isokin.section(steel, "bar", 0.025, 60.0, severity_per_in=0.35)   # oil, moderate agitation
    >>> float(bar.martensite_depth_m[0.5][0])   # 50 % martensite through to the centre, m
    0.0125
    """
    _one_steel_or_alloy(alloy)
    whole_number("nodes", nodes, 5, 2000)
    start, medium = _start_and_medium(alloy, start_C, medium_C)
    size = section_sizes(size_m)
    props = properties or ThermalProperties()
    surface = surface_condition(heat_transfer_W_m2K, severity_per_in, htc_table, start, props)
    grid = Grid(shape, size / 2.0, nodes)
    run = conduct(grid, celsius_to_kelvin(start), celsius_to_kelvin(medium), surface, props, alloy,
                  max_step_K=max_step_K)
    final, rate, hv, carbon = _final_state(alloy, run, grid.r.shape)
    depth = grid.R[:, None] - grid.r
    martensite = final.get(alloy.martensite.name) if alloy.martensite is not None else None
    levels = {x: _depth_below(martensite, depth, x) for x in MARTENSITE_LEVELS} if martensite is not None else {}
    curves = {"surface": run.temperature_K[:, -1], "mid-radius": grid.at_fraction_of_radius(run.temperature_K, 0.5),
              "centre": run.temperature_K[:, 0]}
    k0, rc0 = props.at(celsius_to_kelvin(start), 0.0)
    h0 = np.broadcast_to(surface.h(celsius_to_kelvin(start)), size.shape)
    biot = h0 * grid.R / (grid.m + 1) / k0
    warnings = list(alloy.warnings)
    if alloy.martensite is not None and celsius_to_kelvin(medium) > float(np.max(alloy.martensite.upper_K)):
        warnings.append(f"the medium, {medium:g} °C, lies above Ms: what is left of the austenite at the end of the "
                        "run is still austenite in the medium (it transforms on holding or on the final cooling), "
                        "not retained austenite; see plan --route austemper")
    return SectionResult(
        alloy=alloy.name, shape=shape, size_m=size, medium_C=medium, start_C=start, surface=surface.label,
        depth_m=depth, time_s=run.time_s, temperature_K=run.temperature_K, curves_K=curves, final=final,
        hardness_HV=hv, rate_at_700_C_per_h=rate, austenite_carbon=carbon, martensite_depth_m=levels,
        centre_at_medium_s=_first_within(run.time_s, curves["centre"], celsius_to_kelvin(medium), CENTRE_WITHIN_K),
        biot_number=biot, heat_out_J=run.heat_out_J, latent_J=run.latent_J, sensible_J=run.sensible_J,
        critical_K=dict(alloy.critical_K), warnings=tuple(dict.fromkeys(warnings)), inputs=alloy.inputs,
        provenance={**alloy.provenance, "thermal_properties": props.note, "coupling": COUPLING_NOTE,
                    "surface": surface.label, "grid": f"{nodes} nodes from centre to surface, graded"})


#: Grid nodes from centre to surface of the sections a plan quenches into its baths: on a 25 mm
#: bar of 4140 in salt the centre's arrival agrees with 41 nodes' to 0.1 % at most baths and the
#: ferrite + pearlite on arrival to 7 % (measured; a bath where the heat of bainite holds the
#: centre near the 5 K mark can differ much more).
BATH_NODES = 21
#: How the cooling of a section into a bath is computed: by its Biot number ("auto": lumped
#: below :data:`isokin.compute.cooling.LUMPED_BIOT_LIMIT`), or as asked.
BATH_MODELS = ("auto", "conduction", "lumped")
#: Spacing of the table of start times that Scheil's sum reads, K.
START_TABLE_STEP_K = 1.0


@dataclass(frozen=True)
class BathArrival:
    """A section quenched from one temperature into each of a batch of B baths, until its
    centre comes within :data:`CENTRE_WITHIN_K` of its bath.

    ``model``: "conduction" (through the section) or "lumped" (one temperature: the same
    solver with one node, so the same properties, kinetics and heat of transformation);
    ``biot_number``: h (V/A)
    / k, h the largest the surface gives between the start and the coolest bath, k of
    austenite at the start; ``surface``: the surface condition's label. Per bath (B,):
    ``arrival_s``, when the centre arrives; ``on_arrival``: phase -> (B, 2), the shares at the
    centre and at the surface then; ``start_used``: Scheil's sum of dt / t_start(T) until then,
    the largest over the section, t_start(T) being the time to the start (1 %) of any product
    held at T (1 means that product has started).
    """

    model: str
    biot_number: float
    surface: str
    arrival_s: np.ndarray
    on_arrival: dict
    start_used: np.ndarray


def into_baths(alloy, shape, size_m, baths_C, start_C, heat_transfer_W_m2K=None, severity_per_in=None, htc_table=None,
               model="auto", nodes=BATH_NODES, properties=None):
    """A section quenched into each of a batch of baths (the candidate temperatures of a plan),
    until its centre reaches the bath: all the baths are one batch of the conduction solver.

    Parameters
    ----------
    alloy : Alloy
        One alloy.
    shape : {"plate", "bar", "sphere"}
    size_m : float
        Thickness (plate) or diameter (bar, sphere), m.
    baths_C : array_like
        The baths' temperatures, °C, below ``start_C``.
    start_C : float
        Uniform temperature of the section when it enters the bath, °C.
    heat_transfer_W_m2K, severity_per_in, htc_table
        The bath's surface condition: exactly one (see :func:`surface_condition`).
    model : {"auto", "conduction", "lumped"}
        "auto": lumped where the Biot number is below 0.1, else conduction.

    Returns
    -------
    BathArrival
    """
    _one_steel_or_alloy(alloy)
    size = section_sizes(size_m)
    if size.size != 1:
        raise InputError(None, "size_m", "give one section size here")
    if shape not in SHAPE_EXPONENT:
        raise InputError(None, "shape", f"must be plate, bar or sphere, got {shape!r}")
    model = choice("section_model", model, BATH_MODELS)
    baths_K = celsius_to_kelvin(np.atleast_1d(np.asarray(baths_C, dtype=float)))
    start_K = celsius_to_kelvin(float(start_C))
    if not np.all(baths_K + CENTRE_WITHIN_K < start_K):
        raise InputError(None, "start_C", f"must lie more than {CENTRE_WITHIN_K:g} K above every bath")
    props = properties or ThermalProperties()
    surface = surface_condition(heat_transfer_W_m2K, severity_per_in, htc_table, start_C, props)
    span = np.linspace(float(baths_K.min()), start_K, 64)
    h_most = float(np.max(np.broadcast_to(surface.h(span), span.shape)))
    k0 = float(C.tabulated(props.austenite_conductivity, start_K))
    m = SHAPE_EXPONENT[shape]
    R = float(size[0]) / 2.0
    biot = h_most * R / (m + 1) / k0
    lumped = model == "lumped" or (model == "auto" and biot < LUMPED_BIOT_LIMIT)
    grid = Grid(shape, np.full(baths_K.size, R), 1 if lumped else nodes)
    # run on to within END_WITHIN_K, so that the heat the last step releases cannot lift a
    # centre that has just arrived back out of CENTRE_WITHIN_K
    run = conduct(grid, start_K, baths_K, surface, props, alloy, record_nodes=[0, -1])
    centre = run.temperature_K[:, 0]
    arrival = _first_within(run.time_s, centre, baths_K[:, None], CENTRE_WITHIN_K)
    at = np.argmax(centre - baths_K[:, None] <= CENTRE_WITHIN_K, axis=1)
    rows = np.arange(baths_K.size)
    on_arrival = {name: v[rows, :, at] for name, v in run.fractions.items()}
    return BathArrival("lumped" if lumped else "conduction", biot, surface.label, arrival, on_arrival,
                       _start_used(alloy, run.time_s, run.temperature_K, at))


def _start_used(alloy, time_s, T_K, at):
    """Scheil's sum of dt / t_start(T) along temperature histories ``T_K`` (B, P, M) at times
    ``time_s`` ((M,) or (B, 1, M)), up to step ``at`` (B,) of each; the largest over P.
    t_start(T), the time to 1 % of any product held at T, is tabulated every
    :data:`START_TABLE_STEP_K` and read linearly (as a rate, 0 where nothing forms)."""
    low, high = float(T_K.min()), float(T_K.max())
    table_K = np.linspace(low, high, max(int(np.ceil((high - low) / START_TABLE_STEP_K)) + 1, 2))
    start_s = Decomposition(alloy, table_K).time_to_total(0.01)
    with np.errstate(divide="ignore"):
        rate = np.interp(T_K, table_K, np.where(np.isfinite(start_s) & (start_s > 0), 1.0 / start_s, 0.0))
    increments = 0.5 * (rate[..., 1:] + rate[..., :-1]) * np.diff(time_s, axis=-1)
    summed = np.concatenate([np.zeros(T_K.shape[:-1] + (1,)), np.cumsum(increments, axis=-1)], axis=-1)
    return summed[np.arange(T_K.shape[0]), :, at].max(axis=-1)


#: The end-quench bar (ASTM A255 / ISO 642): 25 mm diameter, 100 mm long, m.
JOMINY_DIAMETER_M = 0.025
JOMINY_LENGTH_M = 0.100
#: Heat-transfer coefficient of the standard water jet on the quenched end, W/(m^2 K): the
#: order quoted for it in end-quench simulations (1e4 to 5e4; from memory).
JOMINY_JET_W_M2K = 2.0e4
#: Water of the jet, °C (the standard asks for 5-30 °C, from memory).
JOMINY_WATER_C = 20.0
JOMINY_NODES = 61
#: The end-quench run ends when every node is within this of the water, K: the martensite
#: that Koistinen-Marburger adds over the last 10 K is under 1 % of the part.
JOMINY_END_WITHIN_K = 10.0
#: Distances from the quenched end at which hardness is reported: ISO 642 / ASTM A255 metric
#: positions, mm, and SAE J1268's sixteenths of an inch (from memory).
JOMINY_DISTANCES_MM = (1.5, 3.0, 5.0, 7.0, 9.0, 11.0, 13.0, 15.0, 20.0, 25.0, 30.0, 35.0, 40.0, 45.0, 50.0)
JOMINY_SIXTEENTHS = (1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15, 16, 18, 20, 22, 24, 26, 28, 30, 32)
JOMINY_SIDES_NOTE = ("1-D along the axis; the far end insulated; the sides lose heat to still air at the water's "
                     "temperature by linearised radiation (emissivity 0.8) and free convection (10 W/m2K), taken as "
                     "a loss per volume of 4 h_side / D (common practice, from memory)")


#: The distance of a hardenability band from the quenched end: metres per unit of each column.
BAND_DISTANCE_UNITS = {"distance_sixteenths_in": C.INCH_M / 16.0, "distance_mm": 1e-3}
#: Rockwell C bounds of a band's hardness.
BAND_HRC = (0.0, 70.0)


def band_rows_wrong(distance_m, hrc_min, hrc_max):
    """Rows of a hardenability band that cannot be: a distance off the end-quench bar, or not
    0 <= hrc_min <= hrc_max <= 70."""
    return ~((distance_m > 0.0) & (distance_m <= JOMINY_LENGTH_M) & (hrc_min >= BAND_HRC[0]) & (hrc_min <= hrc_max)
             & (hrc_max <= BAND_HRC[1]))


def hardness_band(table):
    """A hardenability band from a table of lists (an alloy file's ``[hardenability_band]``):
    one distance list, ``distance_sixteenths_in`` or ``distance_mm``, and ``hrc_min``,
    ``hrc_max`` of the same length. Returns (distance_m, hrc_min, hrc_max) sorted by distance;
    InputError naming the key (``hardenability_band.<key>``) otherwise."""
    where = "hardenability_band"
    if not isinstance(table, dict):
        raise InputError(None, where, "must be a table of lists: distance_sixteenths_in (or distance_mm), hrc_min, "
                         "hrc_max")
    known = (*BAND_DISTANCE_UNITS, "hrc_min", "hrc_max")
    for key in table:
        if key not in known:
            raise InputError(None, f"{where}.{key}", f"unknown key; valid keys are {', '.join(known)}")
    distance = [key for key in BAND_DISTANCE_UNITS if key in table]
    if len(distance) != 1:
        raise InputError(None, where, "give one distance list: distance_sixteenths_in or distance_mm")
    columns = {}
    for key in (distance[0], "hrc_min", "hrc_max"):
        if key not in table:
            raise InputError(None, f"{where}.{key}", "required key is missing")
        if not isinstance(table[key], (list, tuple)):
            raise InputError(None, f"{where}.{key}", "must be a list of numbers, one per distance")
        columns[key] = numbers(f"{where}.{key}", table[key])
    lengths = {v.size for v in columns.values()}
    if len(lengths) != 1 or lengths.pop() > 100:
        raise InputError(None, f"{where}.hrc_max", f"{distance[0]}, hrc_min and hrc_max must be lists of the same "
                         "length (at most 100)")
    d = columns[distance[0]] * BAND_DISTANCE_UNITS[distance[0]]
    wrong = band_rows_wrong(d, columns["hrc_min"], columns["hrc_max"])
    if wrong.any():
        k = int(np.argmax(wrong))
        raise InputError(None, where, f"entry {k + 1}: the distance must lie on the {JOMINY_LENGTH_M * 1e3:g} mm bar "
                         f"and 0 <= hrc_min <= hrc_max <= 70, got {columns[distance[0]][k]:g}, "
                         f"{columns['hrc_min'][k]:g}, {columns['hrc_max'][k]:g}")
    order = np.argsort(d, kind="stable")
    return d[order], columns["hrc_min"][order], columns["hrc_max"][order]


def jominy(alloy, start_C=None, water_C=JOMINY_WATER_C, jet_W_m2K=JOMINY_JET_W_M2K, band=None, nodes=JOMINY_NODES,
           properties=None, max_step_K=MAX_STEP_K):
    """The end-quench (Jominy) test by the conduction model along the bar, and DI by Grossmann.

    The bar (25 mm diameter, 100 mm long) starts at ``start_C`` (default the austenitizing
    temperature) and a water jet cools one end; see :data:`JOMINY_SIDES_NOTE` for the rest of
    its surface.

    Parameters
    ----------
    band : (distance_m, hrc_min, hrc_max), optional
        A hardenability band to check the predicted curve against; default the alloy file's
        ``[hardenability_band]`` where it has one.

    Returns
    -------
    JominyResult

    Examples
    --------
    >>> import isokin
    >>> curve = isokin.jominy(isokin.load_alloy("alloys/aisi-4140-crmo.toml"))
    >>> 3.0 < curve.ideal_diameter_in < 8.0
    True
    """
    _one_steel_or_alloy(alloy)
    if alloy.model != "steel":
        raise InputError(None, "alloy", "the end-quench test is for steels (model = \"steel\")")
    start, water = _start_and_medium(alloy, start_C, water_C)
    props = properties or ThermalProperties()
    surface = surface_condition(jet_W_m2K, start_C=start, properties=props)
    grid = Grid("plate", JOMINY_LENGTH_M, nodes)
    water_K = celsius_to_kelvin(water)

    def sides(T):
        return C.radiation_convection_W_m2K(T, water_K) * 4.0 / JOMINY_DIAMETER_M

    run = conduct(grid, celsius_to_kelvin(start), water_K, surface, props, alloy, side_loss=sides,
                  max_step_K=max_step_K, end_within_K=JOMINY_END_WITHIN_K)
    final, rate, hv, carbon = _final_state(alloy, run, grid.r.shape)
    distance = (JOMINY_LENGTH_M - grid.r[0])[::-1]
    hv_d = hv[0, ::-1]
    martensite = final[alloy.martensite.name][0, ::-1]

    def at(d_m):
        return np.interp(d_m, distance, hv_d)

    mm = np.asarray(JOMINY_DISTANCES_MM) / 1000.0
    sixteenths = np.asarray(JOMINY_SIXTEENTHS) * C.INCH_M / 16.0
    half = _depth_below(final[alloy.martensite.name], JOMINY_LENGTH_M - grid.r, 0.5)[0]
    grain = alloy.options.get("grain_size_astm", 7.0)
    di_in, outside_factors = ideal_critical_diameter_grossmann_in(alloy.composition, grain)
    warnings = list(alloy.warnings)
    if outside_factors:
        warnings.append(f"DI: {', '.join(outside_factors)} lie outside the range of their ASTM A255 factors; "
                        "DI is extrapolated")
    checked = None
    band_source = "given" if band is not None else None
    if band is None and "hardenability_band" in alloy.inputs:
        band, band_source = hardness_band(alloy.inputs["hardenability_band"]), "the alloy file's [hardenability_band]"
    if band is not None:
        d_band, lo, hi = (np.asarray(v, dtype=float) for v in band)
        # below HRC 20 (E140's first row) read as 20: a band's low end there means "20 or below"
        predicted = np.interp(at(d_band), E140_HV, E140_HRC)
        outside = (predicted < lo - 0.5) | (predicted > hi + 0.5)
        checked = {"distance_m": d_band, "hrc_min": lo, "hrc_max": hi, "predicted_HRC": predicted,
                   "outside": outside}
    rate_d = rate[0, ::-1]
    return JominyResult(
        alloy=alloy.name, distance_m=distance, hardness_HV=hv_d, martensite=martensite,
        rate_at_700_C_per_s=rate_d / 3600.0, time_s=run.time_s, temperature_K=run.temperature_K[0, ::-1],
        distances_mm=np.asarray(JOMINY_DISTANCES_MM), hardness_mm_HV=at(mm),
        sixteenths=np.asarray(JOMINY_SIXTEENTHS), hardness_sixteenths_HV=at(sixteenths),
        half_martensite_m=float(half), ideal_diameter_in=float(di_in), band=checked, start_C=start, water_C=water,
        jet_W_m2K=float(jet_W_m2K), critical_K=dict(alloy.critical_K), warnings=tuple(dict.fromkeys(warnings)),
        inputs=alloy.inputs,
        provenance={**alloy.provenance, "thermal_properties": props.note, "coupling": COUPLING_NOTE,
                    "sides": JOMINY_SIDES_NOTE, "jet": f"h {jet_W_m2K:g} W/m2K on the quenched end (order quoted in "
                    "end-quench simulations, from memory)",
                    **({"band": band_source} if band_source else {}),
                    "ideal_diameter": "Grossmann's method: carbon base at the grain size times ASTM A255 multiplying "
                                      "factors (all recalled from memory of the standard)"})

