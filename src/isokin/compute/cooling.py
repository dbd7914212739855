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

from ..constants import celsius_to_kelvin, kelvin_to_celsius
from ..errors import InputError
from ..relations.hardness import hardness_of_mixture
from ..results import OVERALL, CCTResult, CoolingResult
from .decomposition import WAIT_FRACTION

#: Steps of a constructed path: temperature steps of at most this, K.
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


def _refine(time_s, temperature_K, max_step_K=MAX_STEP_K):
    """The path with linear points inserted so that no step changes T by more than max_step_K."""
    t, T = np.asarray(time_s, dtype=float), np.asarray(temperature_K, dtype=float)
    pieces = np.maximum(np.ceil(np.abs(np.diff(T)) / max_step_K), 1).astype(int)
    start = np.repeat(np.arange(t.size - 1), pieces)
    offset = np.concatenate([np.arange(n) / n for n in pieces]) if pieces.size else np.array([])
    t_new = np.append(t[start] + offset * (t[start + 1] - t[start]), t[-1])
    T_new = np.append(T[start] + offset * (T[start + 1] - T[start]), T[-1])
    return t_new, T_new


def formation_top_C(alloy) -> float:
    """The highest temperature at which any product of the alloy could form, °C."""
    return float(kelvin_to_celsius(max(float(np.max(p.upper_K)) for p in alloy.products)))


def default_start_C(alloy) -> float:
    """Where a cooling starts unless told: the alloy's austenitizing temperature where it
    gives one, else :func:`formation_top_C`."""
    given = alloy.inputs.get("steel", {}).get("austenitizing_temperature_C")
    return float(given) if given is not None else formation_top_C(alloy)


def constant_rate(rate_K_s, start_C, end_C=20.0):
    """Cooling at a constant rate from start_C to end_C."""
    rate = float(rate_K_s)
    if not (np.isfinite(rate) and rate > 0):
        raise InputError(None, "rate_K_s", f"must be a positive finite cooling rate in K/s, got {rate_K_s!r}")
    if not end_C < start_C:
        raise InputError(None, "end_C", f"{end_C:g} °C must lie below the start temperature, {start_C:g} °C")
    T = np.linspace(celsius_to_kelvin(start_C), celsius_to_kelvin(end_C),
                    int(np.ceil((start_C - end_C) / MAX_STEP_K)) + 1)
    return CoolingPath((T[0] - T) / rate, T, f"{rate:g} K/s")


#: Volume per cooled area of each lumped shape, per unit of its size (thickness or diameter).
_VOLUME_PER_AREA = {"plate": 0.5, "bar": 0.25, "sphere": 1.0 / 6.0}


def lumped_time_constant(thickness_m, heat_transfer_W_m2K, density_kg_m3=7850.0, heat_capacity_J_kgK=600.0,
                         conductivity_W_mK=30.0, shape="plate"):
    """Time constant of a lumped body, tau = rho c (V/A) / h, and its Biot number h (V/A) / k.

    ``shape``: "plate" (thickness, cooled on both faces, V/A = L/2), "bar" (diameter, V/A = D/4)
    or "sphere" (diameter, V/A = D/6). Defaults for carbon and low-alloy steel near 700 °C
    are common practice: 7850 kg/m^3, 600 J/(kg K), 30 W/(m K).

    >>> tau, biot = lumped_time_constant(0.01, 500.0)
    >>> round(tau, 1), round(biot, 3)
    (47.1, 0.083)
    """
    if shape not in _VOLUME_PER_AREA:
        raise InputError(None, "shape", f"must be plate, bar or sphere, got {shape!r}")
    for key, value in (("thickness_m", thickness_m), ("heat_transfer_W_m2K", heat_transfer_W_m2K),
                       ("density_kg_m3", density_kg_m3), ("heat_capacity_J_kgK", heat_capacity_J_kgK),
                       ("conductivity_W_mK", conductivity_W_mK)):
        try:
            positive = bool(np.isfinite(float(value)) and float(value) > 0.0)
        except (TypeError, ValueError):
            positive = False
        if not positive:
            raise InputError(None, key, "must be a positive number")
    ratio = _VOLUME_PER_AREA[shape] * thickness_m
    return density_kg_m3 * heat_capacity_J_kgK * ratio / heat_transfer_W_m2K, heat_transfer_W_m2K * ratio / conductivity_W_mK


def newtonian(start_C, medium_C, time_constant_s, end_C=None, label=None, warnings=()):
    """Newtonian cooling toward a medium: T = Tm + (T0 - Tm) exp(-t / tau), down to end_C
    (default 1 K above the medium)."""
    tau = float(time_constant_s)
    if not (np.isfinite(tau) and tau > 0):
        raise InputError(None, "time_constant_s", f"must be a positive finite time in s, got {time_constant_s!r}")
    if not medium_C < start_C:
        raise InputError(None, "medium_C", "must lie below the start temperature")
    end = medium_C + 1.0 if end_C is None else end_C
    if not medium_C < end < start_C:
        raise InputError(None, "end_C", "must lie between the medium and the start temperature")
    T_C = np.linspace(start_C, end, int(np.ceil((start_C - end) / MAX_STEP_K)) + 1)
    t = -tau * np.log((T_C - medium_C) / (start_C - medium_C))
    return CoolingPath(t, celsius_to_kelvin(T_C), label or f"Newtonian, tau {tau:g} s to {medium_C:g} °C", warnings)


def newtonian_section(start_C, medium_C, thickness_m, heat_transfer_W_m2K, shape="plate", **properties):
    """Newtonian cooling of a lumped section, with a warning where its Biot number is too high."""
    tau, biot = lumped_time_constant(thickness_m, heat_transfer_W_m2K, shape=shape, **properties)
    notes = []
    if biot > LUMPED_BIOT_LIMIT:
        notes.append(f"the Biot number of this section is {biot:.2g}, above {LUMPED_BIOT_LIMIT:g}: the core cools "
                     "slower than the surface, and one lumped temperature does not describe it")
    return newtonian(start_C, medium_C, tau, label=f"{shape} {thickness_m * 1e3:g} mm, h {heat_transfer_W_m2K:g} W/m2K",
                     warnings=notes)


def measured(time_s, temperature_C, label="measured log"):
    """A logged path: sorted by time, repeated times averaged, refined between the samples.

    A log that reheats midway is kept as it is (additivity simply adds less where it is
    hotter); the path starts at its first sample.
    """
    t = np.asarray(time_s, dtype=float)
    T = np.asarray(temperature_C, dtype=float)
    order = np.argsort(t, kind="stable")
    t, T = t[order], T[order]
    unique, index, counts = np.unique(t, return_inverse=True, return_counts=True)
    T = np.bincount(index, weights=T) / counts
    if unique.size < 2:
        raise InputError(None, "log", "needs at least two distinct times")
    t_fine, T_fine = _refine(unique - unique[0], celsius_to_kelvin(T))
    return CoolingPath(t_fine, T_fine, label)


def _stack(paths):
    """Paths of different lengths as (P, M) arrays, each padded with its last point (dt = 0)."""
    m = max(p.time_s.size for p in paths)
    t = np.array([np.pad(p.time_s, (0, m - p.time_s.size), mode="edge") for p in paths])
    T = np.array([np.pad(p.temperature_K, (0, m - p.temperature_K.size), mode="edge") for p in paths])
    return t, T


def _trapezoid_increments(rate, dt):
    return 0.5 * (rate[..., :-1] + rate[..., 1:]) * dt


def _running(values, op):
    return op.accumulate(values, axis=-1)


def along(alloy, paths):
    """Fractions of every phase along each path: (t, T, dict phase -> (P, M) array, carbon),
    with ``carbon`` the (P, M) carbon of the austenite left (mass %, steels; else None)."""
    if alloy.batch_shape:
        raise InputError(None, "alloy", "continuous cooling takes one alloy, not a batch")
    t, T = _stack(paths)
    dt = np.diff(t, axis=-1)
    own, sums = {}, {}
    products = list(alloy.products)
    by_name = {p.name: p for p in products}
    order = _sequence_order(alloy)
    for p in (by_name[name] for name in order):
        factor = p.time_factor(T)
        forms = np.isfinite(factor) & (factor > 0)
        with np.errstate(divide="ignore"):
            speed = np.where(forms, 1.0 / np.where(forms, factor, 1.0), 0.0)
            incubation = p.incubation_s(T)
            scheil_rate = np.where(forms & (incubation > 0), 1.0 / np.where(incubation > 0, incubation, 1.0), 0.0)
        started = np.ones(T.shape, dtype=bool)
        if np.any(incubation > 0):
            scheil = np.concatenate([np.zeros(T.shape[:-1] + (1,)), np.cumsum(_trapezoid_increments(scheil_rate, dt),
                                                                                axis=-1)], axis=-1)
            started = (scheil >= 1.0) | ~np.any(incubation > 0)
        waits_for = alloy.sequence.get(p.name)
        if waits_for is not None:
            w = by_name[waits_for]
            # once the other has reached its wait fraction, for good; and wherever it cannot form at all
            done = _running(sums[waits_for] >= float(w.reaction_term(WAIT_FRACTION)), np.logical_or)
            started = started & (done | ~(np.isfinite(w.time_factor(T)) & (w.equilibrium_fraction(T) > 0.0)))
        increments = _trapezoid_increments(speed, dt) * started[..., 1:]
        sums[p.name] = np.concatenate([np.zeros(T.shape[:-1] + (1,)), np.cumsum(increments, axis=-1)], axis=-1)
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
        step = 0.5 * (others[..., :-1] + others[..., 1:]) * np.diff(a, axis=-1)
        raw[name] = np.concatenate([np.zeros(T.shape[:-1] + (1,)), np.cumsum(step, axis=-1)], axis=-1)
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
    return list(path) if isinstance(path, (list, tuple)) else [path]


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
    rates = np.asarray(DEFAULT_RATES_K_S if rates_K_s is None else rates_K_s, dtype=float).ravel()
    if rates.size < 1 or not np.all(np.isfinite(rates) & (rates > 0)):
        raise InputError(None, "rates_K_s", "give one or more positive finite cooling rates in K/s")
    if rates.size > MAX_RATES:
        raise InputError(None, "rates_K_s", f"at most {MAX_RATES} rates in one diagram, got {rates.size}")
    rates = np.sort(rates)
    start = formation_top_C(alloy) if start_C is None else float(start_C)
    paths = [constant_rate(r, start, end_C) for r in rates]
    result = cool(alloy, paths)
    t, T, f = result.time_s, result.temperature_K, result.fractions
    curves = {}
    names = [p.name for p in alloy.products]
    transformed = sum(f[n] for n in names)
    series = [(n, f[n]) for n in names] + ([(OVERALL, transformed)] if len(names) > 1 else [])
    for name, values in series:
        final = values[:, -1]
        start_t, start_T = first_reached(t, T, values, START_SHARE)
        finish_t, finish_T = first_reached(t, T, values, np.where(final >= START_SHARE, FINISH_SHARE * final, 0.0))
        curves[name] = {"start": (start_t, start_T), "finish": (finish_t, finish_T)}
    critical = critical_rates(alloy, start, end_C)
    return CCTResult(alloy=alloy.name, rates_K_s=rates, start_C=start, cooling=result, curves=curves,
                     critical_rates=critical, critical_K=dict(alloy.critical_K))


#: Most rates in one CCT diagram.
MAX_RATES = 60
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
