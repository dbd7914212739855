"""Continuous cooling: the decomposition along real cooling paths by additivity, and the CCT diagram.

Each product's progress along a path follows the isokinetic form of additivity: where its
isothermal time separates as t = F(T) S(X) (Li's model; JMAK with a constant exponent) the
sum of dt / F(T) along the path equals S(X), exactly for the model, so X = S^-1(sum).
Scheil's rule decides when growth may begin for a product with an incubation time (the
sum of dt / tau(T) reaching 1). The Li rate is zero at X = 0, so no integration starts
from X = 0 here: the sums are the integration. The decomposition rules of the isothermal
case carry over step by step: pearlite's sum starts once ferrite has reached 99 % of its
own completion (or where ferrite cannot form); ferrite's equilibrium share follows the
temperature (its running maximum, as the part cools); products running together share
the austenite by the extended-volume rule; below Ms the remaining austenite turns to
martensite by Koistinen-Marburger at the lowest temperature reached; the rest is retained.
Those carried-over rules are approximations of the additivity principle (the equilibrium
share and the sequence are not isokinetic), and the text of results says so.

Paths are arrays (path, step); everything is vectorised over paths.
"""

from __future__ import annotations

import numpy as np

from ..constants import MAX_TEMPERATURE_C, ZERO_CELSIUS_K, celsius_to_kelvin, kelvin_to_celsius
from ..errors import Bounds, InputError, real_number
from ..products.alloy import check_alloy
from ..relations.hardness import hardness_of_mixture
from ..results import OVERALL, CCTResult, CoolingResult
from .decomposition import WAIT_FRACTION

#: Steps of a path where products can form: temperature steps of at most this, K (coarser only
#: where a log would pass MAX_PATH_POINTS; the products' sums do not hang on the step, see along).
MAX_STEP_K = 0.5
#: Default family of constant rates for the CCT diagram, K/s: the 1-2-5 series from 0.01 to 1000.
DEFAULT_RATES_K_S = tuple(m * 10.0**e for e in range(-2, 3) for m in (1.0, 2.0, 5.0)) + (1000.0,)
#: A product "starts" along a path when it makes up this share of the part.
START_SHARE = 0.01
#: ...and "finishes" when it reaches this share of what it makes up at the end of the path.
FINISH_SHARE = 0.99
#: The lumped (Newtonian) body is a fair model only while the Biot number stays below this.
LUMPED_BIOT_LIMIT = 0.1
#: Temperature at which the cooling rate of the hardness relations is taken, °C.
HARDNESS_RATE_AT_C = 700.0

# --- what a cooling path may be: one rule per kind of value, for the API and the command line alike.
# The limits keep every run within seconds and well under 1 GB (benchmarks/bench_limits_cooling.py).

#: Temperatures of a path (start, end, medium, rows of a log): above absolute zero and at most
#: 1600 °C, above the melting range of every steel (pure iron melts at 1538 °C; common practice).
TEMPERATURE_C = Bounds(-ZERO_CELSIUS_K, MAX_TEMPERATURE_C, f"must be a temperature above {-ZERO_CELSIUS_K:g} °C "
                       f"(absolute zero) and at most {MAX_TEMPERATURE_C:g} °C (above the melting range of steels)",
                       unit="°C", low_open=True)
#: Constant cooling rates and the fastest change a log may show: from furnace cooling of a large
#: forging (0.36 K/h) to splat quenching (common practice, from memory).
RATE_K_S = Bounds(1e-4, 1e7, "must be a cooling rate from 0.0001 K/s (0.36 K/h, furnace cooling) to 1e+07 K/s "
                  "(splat quenching)", unit="K/s")
#: Newtonian time constants: from a fine droplet in gas to a furnace-cooled ingot (about 4 months).
TIME_CONSTANT_S = Bounds(1e-4, 1e7, "must be a Newtonian time constant from 0.0001 s to 1e+07 s", unit="s")
#: A lumped section's size and heat transfer; its properties (the defaults are steel's).
SECTION = {
    "thickness_m": Bounds(1e-6, 10.0, "must be a positive section thickness or diameter, from 1e-06 m to 10 m "
                          "(0.001 mm to 10 m)", unit="m"),
    "heat_transfer_W_m2K": Bounds(1.0, 1e6, "must be a positive heat-transfer coefficient, from 1 to 1e+06 W/(m2 K) "
                                  "(still air about 10, agitated water about 1e4; common practice)", unit="W/(m2 K)"),
    "density_kg_m3": Bounds(100.0, 30000.0, "must be a density from 100 to 30000 kg/m3", unit="kg/m3"),
    "heat_capacity_J_kgK": Bounds(10.0, 10000.0, "must be a specific heat from 10 to 10000 J/(kg K)", unit="J/(kg K)"),
    "conductivity_W_mK": Bounds(0.01, 5000.0, "must be a thermal conductivity from 0.01 to 5000 W/(m K)",
                                unit="W/(m K)"),
}
#: Most cooling rates in one run: the rates of a CCT diagram, the --rate options of a cooling (a
#: call from Python may take more paths, up to MAX_EVALUATION_POINTS together).
MAX_RATES = 60
#: Most rows of a cooling log (a 10 Hz thermocouple for well over two hours), and its longest span
#: (about 32 years, where the diagrams stop too).
MAX_LOG_ROWS = 100_000
MAX_LOG_SPAN_S = 1e9
#: Most points of one path after refinement, and of all paths of one call together (paths ×
#: longest path): the memory of a call grows with them, about 0.4 kB a point.
MAX_PATH_POINTS = 250_000
MAX_EVALUATION_POINTS = 1_000_000


class CoolingPath:
    """A temperature history: times (s, from 0) and temperatures (K), and a label."""

    def __init__(self, time_s, temperature_K, label, warnings=()):
        self.time_s = np.asarray(time_s, dtype=float)
        self.temperature_K = np.asarray(temperature_K, dtype=float)
        self.label = label
        self.warnings = tuple(warnings)

    def rate_at_C_per_h(self, at_C=HARDNESS_RATE_AT_C):
        """The cooling rate where the path first passes ``at_C`` going down, °C/h (at its start
        where it starts below)."""
        T = kelvin_to_celsius(self.temperature_K)
        below = np.nonzero(T <= at_C)[0]
        k = int(below[0]) if below.size else T.size - 1
        k = min(max(k, 1), T.size - 1)
        dT = T[k - 1] - T[k]
        dt = self.time_s[k] - self.time_s[k - 1]
        return float(max(dT, 0.0) / dt * 3600.0) if dt > 0 else 0.0


def _pieces(path, top_K):
    """Into how many pieces each step of the path is cut where it can run below ``top_K`` (above
    it nothing forms): steps of at most MAX_STEP_K, or coarser where that would pass
    MAX_PATH_POINTS (a long zig-zag log). Above ``top_K`` the path keeps its own points."""
    T = path.temperature_K
    below = np.minimum(T[:-1], T[1:]) < top_K
    change = np.where(below, np.abs(np.diff(T)), 0.0)
    step = max(MAX_STEP_K, float(change.sum()) / max(MAX_PATH_POINTS - change.size, 1))
    return np.maximum(np.ceil(change / step), 1).astype(int)


def _refined(path, pieces):
    """The path's times and temperatures with its steps cut into ``pieces`` (:func:`_pieces`)."""
    t, T = path.time_s, path.temperature_K
    if np.all(pieces == 1):
        return t, T
    start = np.repeat(np.arange(t.size - 1), pieces)
    offset = (np.arange(start.size) - np.repeat(np.cumsum(pieces) - pieces, pieces)) / np.repeat(pieces, pieces)
    return (np.append(t[start] + offset * (t[start + 1] - t[start]), t[-1]),
            np.append(T[start] + offset * (T[start + 1] - T[start]), T[-1]))


def formation_top_C(alloy) -> float:
    """The highest temperature at which any product of the alloy could form, °C."""
    return float(kelvin_to_celsius(max(float(np.max(p.upper_K)) for p in alloy.products)))


def default_start_C(alloy) -> float:
    """Where a cooling starts unless told: the alloy's austenitizing temperature where it
    gives one, else :func:`formation_top_C`."""
    given = alloy.inputs.get("steel", {}).get("austenitizing_temperature_C")
    return float(given) if given is not None else formation_top_C(alloy)


def _start_and_end(start_C, end_C):
    """Start and end temperatures of a cooling, °C, each within :data:`TEMPERATURE_C` and the end below the start."""
    start, end = TEMPERATURE_C.check("start_C", start_C), TEMPERATURE_C.check("end_C", end_C)
    if not end < start:
        raise InputError(None, "start_C", f"{start:g} °C must lie above the end of cooling, {end:g} °C")
    return start, end


def constant_rate(rate_K_s, start_C, end_C=20.0):
    """Cooling at a constant rate (K/s, within :data:`RATE_K_S`) from start_C to end_C (°C, within
    :data:`TEMPERATURE_C`).

    >>> path = constant_rate(10.0, 845.0)
    >>> round(float(path.time_s[-1]), 9)
    82.5
    """
    rate = RATE_K_S.check("rate_K_s", rate_K_s)
    start, end = _start_and_end(start_C, end_C)
    T = np.linspace(celsius_to_kelvin(start), celsius_to_kelvin(end), int(np.ceil((start - end) / MAX_STEP_K)) + 1)
    return CoolingPath((T[0] - T) / rate, T, f"{rate:g} K/s")


def constant_rates(rates_K_s, start_C, end_C=20.0):
    """One :func:`constant_rate` path per rate, in the order given: one to :data:`MAX_RATES` rates."""
    return [constant_rate(rate, start_C, end_C) for rate in _rates(rates_K_s)]


def _rates(rates_K_s):
    """One to :data:`MAX_RATES` cooling rates, each within :data:`RATE_K_S`, as floats (key ``rates_K_s``)."""
    if isinstance(rates_K_s, str):
        rates = []
    elif real_number(rates_K_s) is not None:
        rates = [rates_K_s]
    else:
        try:
            rates = list(rates_K_s)
        except TypeError:
            rates = []
    if not 1 <= len(rates) <= MAX_RATES:
        raise InputError(None, "rates_K_s", f"give from 1 to {MAX_RATES} cooling rates in K/s, got "
                         f"{len(rates) if rates else repr(rates_K_s)}")
    return [RATE_K_S.check("rates_K_s", rate) for rate in rates]


#: Volume per cooled area of each lumped shape, per unit of its size (thickness or diameter).
_VOLUME_PER_AREA = {"plate": 0.5, "bar": 0.25, "sphere": 1.0 / 6.0}


def lumped_time_constant(thickness_m, heat_transfer_W_m2K, density_kg_m3=7850.0, heat_capacity_J_kgK=600.0,
                         conductivity_W_mK=30.0, shape="plate"):
    """Time constant of a lumped body, tau = rho c (V/A) / h, and its Biot number h (V/A) / k.

    ``shape``: "plate" (thickness, cooled on both faces, V/A = L/2), "bar" (diameter, V/A = D/4)
    or "sphere" (diameter, V/A = D/6). Defaults for carbon and low-alloy steel near 700 °C
    are common practice: 7850 kg/m^3, 600 J/(kg K), 30 W/(m K). Each value lies within its
    :data:`SECTION` range.

    >>> tau, biot = lumped_time_constant(0.01, 500.0)
    >>> round(tau, 1), round(biot, 3)
    (47.1, 0.083)
    """
    if not isinstance(shape, str) or shape not in _VOLUME_PER_AREA:
        raise InputError(None, "shape", f"must be plate, bar or sphere, got {shape!r}")
    given = {"thickness_m": thickness_m, "heat_transfer_W_m2K": heat_transfer_W_m2K, "density_kg_m3": density_kg_m3,
             "heat_capacity_J_kgK": heat_capacity_J_kgK, "conductivity_W_mK": conductivity_W_mK}
    size, h, rho, c, k = (SECTION[key].check(key, value) for key, value in given.items())
    ratio = _VOLUME_PER_AREA[shape] * size
    return rho * c * ratio / h, h * ratio / k


def newtonian(start_C, medium_C, time_constant_s, end_C=None, label=None, warnings=()):
    """Newtonian cooling toward a medium: T = Tm + (T0 - Tm) exp(-t / tau), down to end_C
    (default 1 K above the medium). Temperatures within :data:`TEMPERATURE_C`, tau within
    :data:`TIME_CONSTANT_S`.

    >>> path = newtonian(845.0, 60.0, 20.0)
    >>> round(float(path.temperature_K[-1]) - 273.15, 6)
    61.0
    """
    tau = TIME_CONSTANT_S.check("time_constant_s", time_constant_s)
    medium = TEMPERATURE_C.check("medium_C", medium_C)
    start = TEMPERATURE_C.check("start_C", start_C)
    if not medium < start:
        raise InputError(None, "medium_C", f"{medium:g} °C must lie below the start temperature, {start:g} °C")
    end = medium + 1.0 if end_C is None else TEMPERATURE_C.check("end_C", end_C)
    if not medium < end < start:
        raise InputError(None, "end_C", f"{end:g} °C must lie between the medium, {medium:g} °C, and the start "
                         f"temperature, {start:g} °C")
    T_C = np.linspace(start, end, int(np.ceil((start - end) / MAX_STEP_K)) + 1)
    t = -tau * np.log((T_C - medium) / (start - medium))
    return CoolingPath(t, celsius_to_kelvin(T_C), label or f"Newtonian, tau {tau:g} s to {medium:g} °C", warnings)


def newtonian_section(start_C, medium_C, thickness_m, heat_transfer_W_m2K, shape="plate", **properties):
    """Newtonian cooling of a lumped section, with a warning where its Biot number is too high.

    >>> path = newtonian_section(845.0, 60.0, 0.025, 1500.0, shape="bar")
    >>> path.label
    'bar 25 mm, h 1500 W/m2K'
    """
    tau, biot = lumped_time_constant(thickness_m, heat_transfer_W_m2K, shape=shape, **properties)
    if TIME_CONSTANT_S.outside(tau):
        raise InputError(None, "thickness_m", f"a {shape} of {thickness_m * 1e3:g} mm with a heat-transfer coefficient "
                         f"of {heat_transfer_W_m2K:g} W/(m2 K) has a lumped time constant of {tau:.3g} s, outside "
                         f"{TIME_CONSTANT_S.low:g} to {TIME_CONSTANT_S.high:g} s")
    notes = []
    if biot > LUMPED_BIOT_LIMIT:
        notes.append(f"the Biot number of this section is {biot:.2g}, above {LUMPED_BIOT_LIMIT:g}: the core cools "
                     "slower than the surface, and one lumped temperature does not describe it")
    return newtonian(start_C, medium_C, tau, label=f"{shape} {thickness_m * 1e3:g} mm, h {heat_transfer_W_m2K:g} W/m2K",
                     warnings=notes)


def _numbers(key, values):
    """``values`` as a 1-D float array; InputError naming ``key`` where they are not numbers."""
    try:
        array = np.asarray(values, dtype=float)
    except (TypeError, ValueError):
        array = None
    if array is None or array.ndim != 1 or (array.size and np.asarray(values).dtype.kind not in "iuf"):
        raise InputError(None, key, "must be a sequence of plain numbers")
    return array


def measured(time_s, temperature_C, label="measured log"):
    """A logged path: sorted by time, repeated times averaged.

    At most :data:`MAX_LOG_ROWS` samples, finite times spanning at most :data:`MAX_LOG_SPAN_S`,
    temperatures within :data:`TEMPERATURE_C`, and no change between samples faster than the
    fastest rate of :data:`RATE_K_S`. A log that reheats midway is kept as it is (additivity
    simply adds less where it is hotter); the path starts at its first sample.

    >>> path = measured([0, 10, 5], [845, 300, 600])
    >>> path.time_s.tolist(), (path.temperature_K - 273.15).round(6).tolist()
    ([0.0, 5.0, 10.0], [845.0, 600.0, 300.0])
    """
    t, T = _numbers("time_s", time_s), _numbers("temperature_C", temperature_C)
    if t.size != T.size:
        raise InputError(None, "temperature_C", f"has {T.size} values for {t.size} times; give one temperature "
                         "per time")
    if t.size > MAX_LOG_ROWS:
        raise InputError(None, "time_s", f"has {t.size} samples; the limit is {MAX_LOG_ROWS}")
    for key, bad in (("time_s", ~np.isfinite(t)), ("temperature_C", TEMPERATURE_C.outside(T))):
        if bad.any():
            k = int(np.argmax(bad))
            rule = "must be finite times in s" if key == "time_s" else TEMPERATURE_C.rule
            got = f"{t[k]:g} s" if key == "time_s" else f"{T[k]:g} °C"
            raise InputError(None, key, f"{rule}, got {got} (value {k}, counting from 0)")
    with np.errstate(over="ignore"):
        span = float(t.max() - t.min()) if t.size else 0.0
    if span > MAX_LOG_SPAN_S:
        raise InputError(None, "time_s", f"spans {span:g} s; a log may span at most {MAX_LOG_SPAN_S:g} s")
    order = np.argsort(t, kind="stable")
    t, T = t[order], T[order]
    unique, index, counts = np.unique(t, return_inverse=True, return_counts=True)
    T = np.bincount(index, weights=T) / counts
    if unique.size < 2:
        raise InputError(None, "time_s", "needs at least two rows with distinct times")
    with np.errstate(over="ignore"):
        speed = np.abs(np.diff(T)) / np.diff(unique)
    if np.any(speed > RATE_K_S.high):
        k = int(np.argmax(speed))
        raise InputError(None, "temperature_C", f"changes by {abs(T[k + 1] - T[k]):g} K in "
                         f"{unique[k + 1] - unique[k]:g} s after {unique[k]:g} s, faster than {RATE_K_S.high:g} K/s, "
                         "the fastest cooling taken")
    return CoolingPath(unique - unique[0], celsius_to_kelvin(T), label)


class _Tabulated:
    """A rate r(T), 1/s, tabulated on a fine temperature grid, with its integral over T: the
    integral of r(T(t)) dt over a linear piece of a path is then read off, exactly for the
    tabulated rate, however long the piece (wide pieces by the integral, narrow ones by
    Simpson's rule on the table)."""

    def __init__(self, grid, values):
        self.grid, self.values = grid, values
        self.integral = np.concatenate([[0.0], np.cumsum(0.5 * (values[1:] + values[:-1]) * np.diff(grid))])

    def over_steps(self, t, T):
        """The integral over each step of the paths (P, M): (P, M - 1)."""
        dT = np.diff(T, axis=-1)
        wide = np.abs(dT) > MAX_STEP_K
        G = np.interp(T, self.grid, self.integral)
        with np.errstate(divide="ignore", invalid="ignore"):
            by_integral = (G[..., 1:] - G[..., :-1]) / dT

        def r(x):
            return np.interp(x, self.grid, self.values, left=0.0, right=0.0)

        by_simpson = (r(T[..., :-1]) + 4.0 * r(0.5 * (T[..., :-1] + T[..., 1:])) + r(T[..., 1:])) / 6.0
        return np.diff(t, axis=-1) * np.where(wide, by_integral, by_simpson)


#: Points of the temperature tables of the products' rates (over their range: under 0.25 K apart).
TABLE_POINTS = 8001


def _table_grid(alloy):
    """Temperatures of the rate tables, K: from the lowest at which any product forms (but 1 K at
    the least: nothing forms that close to absolute zero) to the highest."""
    low = max(min(float(np.min(p.lower_K)) for p in alloy.products), 1.0)
    return np.linspace(low, max(float(np.max(p.upper_K)) for p in alloy.products), TABLE_POINTS)


def _rate_tables(p, grid):
    """The product's isokinetic speed 1/F(T) and Scheil's incubation rate 1/tau(T) as
    :class:`_Tabulated` (the second None where it has no incubation)."""
    with np.errstate(divide="ignore"):
        factor, incubation = p.time_factor(grid), p.incubation_s(grid)
    forms = np.isfinite(factor) & (factor > 0)
    speed = np.where(forms, 1.0 / np.where(forms, factor, 1.0), 0.0)
    waits = forms & (incubation > 0)
    scheil = np.where(waits, 1.0 / np.where(waits, incubation, 1.0), 0.0)
    return _Tabulated(grid, speed), (_Tabulated(grid, scheil) if np.any(incubation > 0) else None)


def _stack(paths, top_K):
    """Paths refined (:func:`_refined`) as (P, M) arrays of times and temperatures, each padded with
    its last point (dt = 0); at most :data:`MAX_EVALUATION_POINTS` together (counted before any is made)."""
    pieces = [_pieces(p, top_K) for p in paths]
    m = max(int(n.sum()) + 1 for n in pieces)
    if len(paths) * m > MAX_EVALUATION_POINTS:
        raise InputError(None, "path", f"{len(paths)} paths of up to {m} points make {len(paths) * m} points to "
                         f"evaluate, above the limit of {MAX_EVALUATION_POINTS}: give fewer or shorter paths")
    refined = [_refined(p, n) for p, n in zip(paths, pieces)]
    t = np.array([np.pad(t, (0, m - t.size), mode="edge") for t, _ in refined])
    T = np.array([np.pad(T, (0, m - T.size), mode="edge") for _, T in refined])
    return t, T


def _from_zero(increments):
    """Running sums along the last axis that start at 0 at the first point."""
    return np.concatenate([np.zeros(increments.shape[:-1] + (1,)), np.cumsum(increments, axis=-1)], axis=-1)


def _running(values, op):
    return op.accumulate(values, axis=-1)


def along(alloy, paths):
    """Fractions of every phase along each path: (t, T, dict phase -> (P, M) array, carbon),
    with ``carbon`` the (P, M) carbon of the austenite left (mass %, steels; else None).

    The paths are refined where products can form (:func:`_refined`); each product's sums over
    a step are the exact integrals of its tabulated rates along that step (:class:`_Tabulated`),
    so a coarser step moves only where a product is seen to start, not how far it has got."""
    if alloy.batch_shape:
        raise InputError(None, "alloy", "continuous cooling takes one alloy, not a batch")
    grid = _table_grid(alloy)
    t, T = _stack(paths, grid[-1])
    own, sums = {}, {}
    products = list(alloy.products)
    by_name = {p.name: p for p in products}
    order = _sequence_order(alloy)
    for p in (by_name[name] for name in order):
        factor = p.time_factor(T)
        forms = np.isfinite(factor) & (factor > 0)
        speed, scheil = _rate_tables(p, grid)
        started = np.ones(T.shape, dtype=bool) if scheil is None else _from_zero(scheil.over_steps(t, T)) >= 1.0
        waits_for = alloy.sequence.get(p.name)
        if waits_for is not None:
            w = by_name[waits_for]
            # once the other has reached its wait fraction, for good; and wherever it cannot form at all
            done = _running(sums[waits_for] >= float(w.reaction_term(WAIT_FRACTION)), np.logical_or)
            started = started & (done | ~(np.isfinite(w.time_factor(T)) & (w.equilibrium_fraction(T) > 0.0)))
        sums[p.name] = _from_zero(speed.over_steps(t, T) * started[..., 1:])
        s_end = float(p.reaction_term(1.0))
        x = p.reaction_term_inverse(np.minimum(sums[p.name], s_end) if np.isfinite(s_end) else sums[p.name])
        cap = _running(np.where(forms, p.equilibrium_fraction(T), 0.0), np.maximum)
        own[p.name] = _running(cap * x, np.maximum)
    remaining = np.ones(T.shape)
    for a in own.values():
        remaining = remaining * (1.0 - a)
    total = 1.0 - remaining
    fractions = {}
    raw = {}
    for name, a in own.items():
        others = np.ones(T.shape)
        for other, b in own.items():
            if other != name:
                others = others * (1.0 - b)
        raw[name] = _from_zero(0.5 * (others[..., :-1] + others[..., 1:]) * np.diff(a, axis=-1))
    summed = sum(raw.values())
    with np.errstate(divide="ignore", invalid="ignore"):
        scale = np.where(summed > 0.0, total / summed, 0.0)
    for p in products:
        fractions[p.name] = raw[p.name] * scale
    left = 1.0 - total
    carbon = None
    if alloy.martensite is not None:
        # the austenite's carbon is settled before martensite forms: no product forms below Ms
        if alloy.carbon_balance is not None:
            carbon = alloy.carbon_balance.austenite_carbon(fractions, T.ndim)
        km = alloy.martensite.fraction(_running(T, np.minimum), carbon)
        fractions[alloy.martensite.name] = left * km
        fractions[f"retained {alloy.parent}"] = left * (1.0 - km)
    else:
        fractions[alloy.parent] = left
    return t, T, fractions, carbon


def _sequence_order(alloy):
    """Product names with every product after the one it waits for."""
    names = [p.name for p in alloy.products]
    ordered = []
    while names:
        for name in list(names):
            before = alloy.sequence.get(name)
            if before is None or before in ordered:
                ordered.append(name)
                names.remove(name)
    return ordered


def hardness(alloy, paths, final, carbon):
    """Vickers hardness at the end of each path (Maynier et al. 1978 for bainite and ferrite +
    pearlite at the path's rate at 700 °C, ASTM A255 for martensite of the austenite's carbon,
    retained austenite counted soft) and that rate, °C/h; None where the alloy is not a steel."""
    if alloy.model != "steel":
        return None
    rate = np.array([p.rate_at_C_per_h() for p in paths])
    return hardness_of_mixture(alloy.composition, final, rate, carbon), rate


def first_reached(t, T, values, level):
    """(time s, temperature K) where ``values`` first reach ``level`` along each path; NaN where never."""
    level = np.asarray(level, dtype=float)
    level_b = level[..., None] if level.ndim else level
    reached = values >= level_b
    k = np.argmax(reached, axis=-1)
    ok = np.take_along_axis(reached, k[..., None], axis=-1)[..., 0] & (np.broadcast_to(level, reached.shape[:-1]) > 0)
    level = np.broadcast_to(level, reached.shape[:-1])
    # linear interpolation within the step where the level is crossed
    k_prev = np.maximum(k - 1, 0)
    v0 = np.take_along_axis(values, k_prev[..., None], axis=-1)[..., 0]
    v1 = np.take_along_axis(values, k[..., None], axis=-1)[..., 0]
    with np.errstate(divide="ignore", invalid="ignore"):
        w = np.where(v1 > v0, (level - v0) / (v1 - v0), 1.0)
    w = np.clip(np.nan_to_num(w, nan=1.0), 0.0, 1.0)

    def at(a):
        a0 = np.take_along_axis(a, k_prev[..., None], axis=-1)[..., 0]
        a1 = np.take_along_axis(a, k[..., None], axis=-1)[..., 0]
        return a0 + w * (a1 - a0)

    return np.where(ok, at(t), np.nan), np.where(ok, at(T), np.nan)


def _path_list(path):
    """``path`` as a list of one or more cooling paths (their number is bounded by the points they
    make together, :data:`MAX_EVALUATION_POINTS`); InputError otherwise."""
    paths = list(path) if isinstance(path, (list, tuple)) else [path]
    if not paths:
        raise InputError(None, "path", "give one or more cooling paths, got none")
    for item in paths:
        try:
            item.time_s, item.temperature_K, item.label, item.warnings  # noqa: B018 (a path has these)
        except AttributeError:
            raise InputError(None, "path", "must be a cooling path from isokin.constant_rate, newtonian, "
                             f"newtonian_section, measured or read_cooling_log (or a list of them), got "
                             f"{item!r:.60}") from None
    return paths


def cool(alloy, path):
    """What continuous cooling produces: the phases along each path, at its end, the start of
    each product and the hardness.

    Parameters
    ----------
    alloy : Alloy
        One alloy.
    path : CoolingPath or list of them
        From :func:`constant_rate`, :func:`newtonian`, :func:`newtonian_section` or
        :func:`measured` (or a log read by :func:`isokin.io.tables.read_cooling_log`).

    Returns
    -------
    CoolingResult

    Raises
    ------
    InputError
        (key ``path``) where no path cools below the highest temperature at which a product
        forms: there is nothing to predict.

    Examples
    --------
    >>> import isokin
    >>> from isokin.compute.cooling import constant_rate
    >>> steel = isokin.steel({"C": 0.4, "Mn": 0.85, "Cr": 0.95, "Mo": 0.2}, 7.0)
    >>> water = isokin.cool(steel, constant_rate(100.0, 850.0))
    >>> float(water.final["martensite"][0]) > 0.9
    True
    """
    check_alloy(alloy)
    paths = _path_list(path)
    top_C = formation_top_C(alloy)
    if all(float(kelvin_to_celsius(np.min(p.temperature_K))) >= top_C for p in paths):
        raise InputError(None, "path", f"{' and '.join(p.label for p in paths)} never cools below {top_C:.0f} °C, "
                         "where the first product could form: nothing to predict")
    t, T, fractions, carbon = along(alloy, paths)
    final = {name: v[:, -1] for name, v in fractions.items()}
    starts = {p.name: first_reached(t, T, fractions[p.name], START_SHARE) for p in alloy.products}
    hv = hardness(alloy, paths, final, None if carbon is None else carbon[:, -1])
    warnings = list(alloy.warnings) + [w for p in paths for w in p.warnings]
    return CoolingResult(
        alloy=alloy.name, labels=tuple(p.label for p in paths), time_s=t, temperature_K=T, fractions=fractions,
        final=final, start_time_s={k: v[0] for k, v in starts.items()},
        start_temperature_K={k: v[1] for k, v in starts.items()},
        hardness_HV=None if hv is None else hv[0], rate_at_700_C_per_h=None if hv is None else hv[1],
        critical_K=dict(alloy.critical_K), warnings=tuple(dict.fromkeys(warnings)), inputs=alloy.inputs,
        provenance={**alloy.provenance, "additivity": ADDITIVITY_NOTE},
        austenite_carbon=None if carbon is None else carbon[:, -1],
        martensite_start_K=None if carbon is None else alloy.martensite.start_for_carbon(carbon[:, -1]))


#: What the record says about the method.
ADDITIVITY_NOTE = ("isokinetic additivity: sum of dt/F(T) = S(X) per product (exact for separable models); Scheil's "
                   "sum for incubation; sequence, equilibrium share and sharing carried over from the isothermal "
                   "rules step by step (an approximation)")


#: A CCT diagram traces its curves through this many rates per decade at least.
CURVE_RATES_PER_DECADE = 8


def cct(alloy, rates_K_s=None, start_C=None, end_C=20.0):
    """The continuous-cooling (CCT) diagram for a family of constant rates.

    Each path starts at the highest temperature where a product can form (Ae3 of a steel;
    Ae1 past the eutectoid), so times are counted from there, unless ``start_C`` is given.

    Returns
    -------
    CCTResult
        Per rate: the start (1 % of the part) and finish (99 % of its final share) of each
        product and of the whole decomposition, the final fractions and hardness, and the
        critical cooling rates.
    """
    check_alloy(alloy)
    start, end = _start_and_end(formation_top_C(alloy) if start_C is None else start_C, end_C)
    rates = np.sort(_rates(DEFAULT_RATES_K_S if rates_K_s is None else rates_K_s))
    result = cool(alloy, [constant_rate(r, start, end) for r in rates])
    traced = rates
    if rates.size > 1:  # the curves through more rates than the table lists, so that they are smooth
        decades = np.log10(rates[-1] / rates[0])
        traced = np.union1d(rates, np.geomspace(rates[0], rates[-1], int(np.ceil(CURVE_RATES_PER_DECADE * decades)) + 1))
    dense = result if traced.size == rates.size else cool(alloy, [constant_rate(r, start, end) for r in traced])
    t, T, f = dense.time_s, dense.temperature_K, dense.fractions
    curves = {}
    names = [p.name for p in alloy.products]
    transformed = sum(f[n] for n in names)
    series = [(n, f[n]) for n in names] + ([(OVERALL, transformed)] if len(names) > 1 else [])
    for name, values in series:
        final = values[:, -1]
        start_t, start_T = first_reached(t, T, values, START_SHARE)
        finish_t, finish_T = first_reached(t, T, values, np.where(final >= START_SHARE, FINISH_SHARE * final, 0.0))
        curves[name] = {"start": (start_t, start_T), "finish": (finish_t, finish_T)}
    critical = critical_rates(alloy, start, end)
    return CCTResult(alloy=alloy.name, rates_K_s=rates, start_C=start, cooling=result, curves=curves,
                     critical_rates=critical, critical_K=dict(alloy.critical_K), curve_rates_K_s=traced)


def cct_beneath(alloy, start_C):
    """The CCT diagram a cooling figure draws beneath a path that starts at start_C, °C: a
    steel's default family of rates from there; None for another alloy, or where the path
    starts at or below 20 °C, the end of those rates."""
    if alloy.model != "steel" or not start_C > 20.0:
        return None
    return cct(alloy, start_C=start_C)


#: Critical rates are found to this ratio (0.5 % of the rate).
RATE_TOLERANCE = 1.005


def critical_rates(alloy, start_C, end_C=20.0):
    """The slowest constant rates that (a) keep ferrite + pearlite under 1 % of the part and
    (b) give at least 95 % martensite at 20 °C, by bisection on ln(rate) between 1e-3 and 1e4 K/s.

    Returns a dict: name -> {"rate_K_s": value or None, "tolerance": ratio, "definition": text}.
    """
    products = [p.name for p in alloy.products]
    if alloy.martensite is not None:
        soft = [n for n in ("ferrite", "pearlite") if n in products]
        definitions = {
            "ferrite_pearlite_under_1_percent": (
                "slowest constant rate from the start temperature with ferrite + pearlite under 1 % of the part",
                lambda fr: sum(np.asarray(fr[n]) for n in soft) < 0.01),
            "martensite_95_percent_at_20_C": ("slowest constant rate to 20 °C that leaves at least 95 % martensite",
                                              lambda fr: np.asarray(fr[alloy.martensite.name]) >= 0.95),
        }
    else:
        definitions = {
            "all_products_under_1_percent": (
                f"slowest constant rate from the start temperature that keeps {' + '.join(products)} under 1 % of "
                "the part (the quench-sensitive range passed in time)",
                lambda fr: sum(np.asarray(fr[n]) for n in products) < 0.01),
        }
    keys = list(definitions)
    ends = [20.0 if key.startswith("martensite") else end_C for key in keys]

    def good(rates, which):
        """Whether definition ``which[i]`` holds at ``rates[i]``: one batch of paths for all pairs."""
        final = cool(alloy, [constant_rate(r, start_C, ends[k]) for r, k in zip(rates, which)]).final
        holds = np.stack([np.broadcast_to(np.asarray(definitions[key][1](final), dtype=bool), (len(which),))
                          for key in keys])
        return holds[np.asarray(which), np.arange(len(which))]

    scan = np.geomspace(1e-3, 1e4, 15)
    every = np.arange(len(keys))
    passed = good(np.tile(scan, len(keys)), np.repeat(every, scan.size)).reshape(len(keys), scan.size)
    lo, hi = np.full(len(keys), np.nan), np.full(len(keys), np.nan)
    bracketed = ~passed[:, 0] & passed[:, -1]
    for k in np.flatnonzero(bracketed):
        first = int(np.argmax(passed[k]))
        lo[k], hi[k] = np.log(scan[first - 1]), np.log(scan[first])
    # every bracketed definition halves its bracket in the same batch of paths
    while bracketed.any() and np.any(hi[bracketed] - lo[bracketed] > np.log(RATE_TOLERANCE)):
        going = np.flatnonzero(bracketed & (hi - lo > np.log(RATE_TOLERANCE)))
        mid = 0.5 * (lo[going] + hi[going])
        ok = good(np.exp(mid), going)
        lo[going], hi[going] = np.where(ok, lo[going], mid), np.where(ok, mid, hi[going])
    out = {}
    for k, key in enumerate(keys):
        record = {"definition": definitions[key][0],
                  "tolerance": f"within {100 * (RATE_TOLERANCE - 1):.1f} % of the rate"}
        if not passed[k, -1]:
            record["rate_K_s"] = None
            record["note"] = "not reached at any rate up to 1e4 K/s"
            if key.startswith("martensite"):
                most = float(alloy.martensite.fraction(celsius_to_kelvin(20.0)))
                if most < 0.95:
                    record["note"] = (f"never: Koistinen-Marburger from Ms gives at most {most * 100:.0f} % martensite "
                                      "at 20 °C; the rest stays retained austenite (sub-zero treatment would be needed)")
        elif passed[k, 0]:
            record["rate_K_s"] = float(scan[0])
            record["note"] = "met already at 1e-3 K/s, the slowest rate tried"
        else:
            record["rate_K_s"] = float(np.exp(hi[k]))
        out[key] = record
    return out
