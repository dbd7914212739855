"""Composition spread: how a grade's ranges (or a heat analysis's uncertainty) spread the curves.

Compositions are sampled over the ranges with a Latin hypercube (numpy: one stratum per
sample and element, the strata shuffled per element), uniform within a min-max range and
normal for a nominal value with an uncertainty (one standard deviation, clipped at 0; the
normal quantile by scipy.special's ndtri, exact and lighter to import than scipy.stats, and
imported only where a normal range is sampled: it costs about 0.2 s);
every sample's curves come from one batch pass of the solver.
"""

from __future__ import annotations

import numpy as np

from ..errors import InputError, number, whole_number
from ..products.alloy import check_alloy
from ..relations.composition import ELEMENTS
from ..results import Noses, SpreadResult
from .ttt import ttt

DEFAULT_SAMPLES = 2000
#: The quantiles reported, besides the envelope (earliest and latest over the samples).
QUANTILES = (0.05, 0.5, 0.95)
#: Most heats in a spread: 10,000 take about 5 s and 0.5 GB here (benchmarks/bench_limits.py;
#: 20,000 came near 1 GB).
MAX_SAMPLES = 10_000
#: Most heats a worst-case plan samples: the austempering window integrates each heat's
#: shares at every scanned temperature, about 13 ms per heat here (benchmarks/bench_limits.py).
MAX_WORST_CASE_SAMPLES = 256
#: Heats a worst-case hold plan samples unless told otherwise: enough to find the corners
#: of a grade's range at a small part of a full spread's cost (our choice).
WORST_CASE_SAMPLES = 64
#: Heats solved per pass of the batch solver in a spread: a progress report after each
#: pass, and the memory of the largest runs bounded.
CHUNK_HEATS = 500


def check_ranges(ranges: dict) -> dict:
    """Ranges as {element: ("range", low, high) or ("normal", nominal, sigma)}, checked.

    Each element's range may be given as ``(min, max)`` (or a list, as an alloy file's
    ``[composition_range]`` has it), ``{"nominal": x, "uncertainty": s}`` (one standard
    deviation), or already as ``("range", min, max)`` / ``("normal", nominal, sigma)``.

    >>> check_ranges({"C": (0.38, 0.43), "Mn": {"nominal": 0.8, "uncertainty": 0.03}})
    {'C': ('range', 0.38, 0.43), 'Mn': ('normal', 0.8, 0.03)}
    """
    if not isinstance(ranges, dict) or not ranges:
        raise InputError(None, "composition_range", "is empty; give the range of one or more elements "
                         '(e.g. {"C": (0.38, 0.43)}, C from 0.38 to 0.43 mass %)')
    out = {}
    for element, spec in ranges.items():
        key = f"composition_range.{element}"
        if element not in ELEMENTS:
            raise InputError(None, key, f"unknown element; one of {', '.join(ELEMENTS)}")
        kind, a, b = _range_form(key, spec)
        a, b = number(key, a, 0.0, 100.0), number(key, b, 0.0, 100.0)
        if kind == "range" and not a <= b:
            raise InputError(None, key, f"must be [min, max] with 0 <= min <= max, got [{a:g}, {b:g}]")
        out[element] = (kind, a, b)
    return out


def _range_form(key, spec):
    """(kind, a, b) of one element's range in any of the forms :func:`check_ranges` takes."""
    if isinstance(spec, (tuple, list)) and len(spec) == 3 and spec[0] in ("range", "normal"):
        return tuple(spec)
    if isinstance(spec, (tuple, list)) and len(spec) == 2 and not any(isinstance(v, str) for v in spec):
        return ("range", *spec)
    if isinstance(spec, dict) and set(spec) == {"nominal", "uncertainty"}:
        return "normal", spec["nominal"], spec["uncertainty"]
    raise InputError(None, key, f'must be (min, max), {{"nominal": x, "uncertainty": s}}, ("range", min, max) or '
                     f'("normal", nominal, sigma), in mass %, got {spec!r}')


def own_ranges(alloy) -> dict:
    """The alloy's own composition range (an alloy file's ``[composition_range]``), checked."""
    raw = check_alloy(alloy).inputs.get("composition_range")
    if raw is None:
        raise InputError(None, "composition_range", 'this alloy has no [composition_range]; give ranges, e.g. '
                         '{"C": (0.38, 0.43), "Mn": (0.75, 1.00)} (mass %)')
    return check_ranges(raw)


def nominal_of(composition: dict, ranges: dict) -> dict:
    """The nominal composition: the given analysis, mid-range where only a range is given."""
    nominal = dict(composition)
    for element, (kind, a, b) in ranges.items():
        if element not in nominal:
            nominal[element] = 0.5 * (a + b) if kind == "range" else a
    return nominal


def sample_compositions(composition: dict, ranges: dict, samples=DEFAULT_SAMPLES, seed=0) -> dict:
    """Element -> array of ``samples`` contents, a Latin hypercube over the ranged elements."""
    whole_number("samples", samples, 2, MAX_SAMPLES)
    whole_number("seed", seed)
    nominal = nominal_of(composition, ranges)
    names = list(ranges)
    out = {k: np.full(samples, float(v)) for k, v in nominal.items()}
    if not names:
        return out
    u = latin_hypercube(samples, len(names), seed)
    if any(ranges[e][0] == "normal" for e in names):
        from scipy.special import ndtri  # only here: see the module notes
    for j, element in enumerate(names):
        kind, a, b = ranges[element]
        out[element] = a + (b - a) * u[:, j] if kind == "range" else np.maximum(a + b * ndtri(u[:, j]), 0.0)
    return out


def latin_hypercube(samples: int, dimensions: int, seed=0):
    """(samples, dimensions) points in [0, 1): each dimension's n equal strata hold one point
    each, at a uniform place within it, the strata in a random order per dimension.

    >>> u = latin_hypercube(5, 2, seed=1)
    >>> sorted(np.floor(u[:, 0] * 5).astype(int).tolist()), bool(np.all((u >= 0) & (u < 1)))
    ([0, 1, 2, 3, 4], True)
    """
    rng = np.random.default_rng(seed)
    strata = np.argsort(rng.random((dimensions, samples)), axis=1).T
    return (strata + rng.random((samples, dimensions))) / samples


def sampled_heats(alloy, ranges: dict = None, samples=WORST_CASE_SAMPLES, seed=0):
    """A batch of heats sampled over the ranges (:func:`sample_compositions`; default the
    alloy's own, :func:`own_ranges`), each built with the steel's own grain size, options and
    kinetics: e.g. the worst case of a hold plan."""
    if check_alloy(alloy).composition is None:
        raise InputError(None, "composition_range", "a composition range is for steels")
    whole_number("samples", samples, 2, MAX_WORST_CASE_SAMPLES)
    ranges = own_ranges(alloy) if ranges is None else check_ranges(ranges)
    mass = sample_compositions(alloy.composition.analysis(), ranges, samples, seed)
    return alloy.with_composition(mass)


def spread(alloy, ranges: dict = None, samples=DEFAULT_SAMPLES, seed=0, overall=True, build=None, progress=None):
    """The curves of every sampled composition, their quantiles and envelope, the noses' and
    Ms's spread and the elements that drive the spread.

    Parameters
    ----------
    alloy : Alloy
        The nominal steel (its analysis is the centre where a range does not say otherwise).
    ranges : dict, optional
        Element -> range, in any form :func:`check_ranges` takes (``{"C": (0.38, 0.43)}``);
        default the alloy's own ``[composition_range]`` (:func:`own_ranges`).
    build : callable, optional
        ``build(mass_percent) -> Alloy`` for a batch of compositions; default the steel's own
        options (grain size, austenitizing temperature, Ms method, kinetics).
    progress : callable, optional
        ``progress(done, total)`` after each pass of :data:`CHUNK_HEATS` heats.

    Returns
    -------
    SpreadResult
    """
    if check_alloy(alloy).composition is None:
        raise InputError(None, "composition_range", "a composition spread is for steels")
    ranges = own_ranges(alloy) if ranges is None else check_ranges(ranges)
    build = alloy.with_composition if build is None else build
    composition = alloy.composition.analysis()
    nominal_alloy = build(nominal_of(composition, ranges))
    nominal = ttt(nominal_alloy, overall=overall)
    grid_C = nominal.temperatures_C
    mass = sample_compositions(composition, ranges, samples, seed)
    names, whole, times, noses, ms = _solve_heats(build, mass, grid_C, overall, progress)
    quantiles, earliest, latest = {}, {}, {}
    for name in names:
        t = times[name]
        quantiles[name] = np.quantile(t, QUANTILES, axis=0, method="inverted_cdf")
        earliest[name] = np.min(t, axis=0)
        latest[name] = np.max(t, axis=0)
    nose_quantiles = {name: {"temperature_K": np.quantile(n.temperature_K, QUANTILES, axis=0, method="inverted_cdf"),
                             "time_s": np.quantile(n.time_s, QUANTILES, axis=0, method="inverted_cdf")}
                      for name, n in noses.items()}
    return SpreadResult(
        alloy=alloy.name, samples=int(samples), seed=int(seed), ranges=ranges, nominal=nominal,
        quantile_levels=np.asarray(QUANTILES), quantiles_s=quantiles, earliest_s=earliest, latest_s=latest,
        nose_quantiles=nose_quantiles, ms_range_K=(float(np.min(ms)), float(np.max(ms))),
        sensitivity=_sensitivity(mass, ranges, noses, whole), compositions=mass, times_s=times)


def _solve_heats(build, mass, grid_C, overall, progress):
    """Every heat's curves on the grid, :data:`CHUNK_HEATS` heats per batch pass: (curve
    names, the whole decomposition's name or None, times and noses by curve, Ms of each heat)."""
    n = len(next(iter(mass.values())))
    parts, ms = [], []
    for start in range(0, n, CHUNK_HEATS):
        batch = build({k: v[start:start + CHUNK_HEATS] for k, v in mass.items()})
        parts.append(ttt(batch, temperatures_C=grid_C, overall=overall))
        ms.append(np.broadcast_to(np.asarray(batch.critical_K["Ms"], dtype=float), batch.batch_shape))
        if progress is not None:
            progress(min(start + CHUNK_HEATS, n), n)
    names = parts[0].products
    times = {name: np.concatenate([p.times_s[name] for p in parts]) for name in names}
    noses = {name: Noses(*(np.concatenate([getattr(p.noses[name], field) for p in parts])
                           for field in ("temperature_K", "time_s", "inside"))) for name in names}
    return names, parts[0].overall, times, noses, np.concatenate(ms)


def _sensitivity(mass, ranges, noses, whole):
    """Elements ranked by how much they move ln(time) of the earliest start (the whole
    decomposition's, else the fastest product's 1 % nose): standardized regression
    coefficients over the samples, in ln s per range-width."""
    name = whole or min(noses, key=lambda n: float(np.min(noses[n].time_s)))
    y = np.log(noses[name].time_s[:, 0])
    names = [e for e in ranges if np.ptp(mass[e]) > 0]
    ok = np.isfinite(y)
    if not names or ok.sum() <= len(names) + 1:
        return ()
    A = np.column_stack([(mass[e][ok] - mass[e][ok].mean()) / np.ptp(mass[e][ok]) for e in names] + [np.ones(ok.sum())])
    coefficients = np.linalg.lstsq(A, y[ok], rcond=None)[0][:-1]
    order = np.argsort(-np.abs(coefficients))
    return tuple({"element": names[k], "ln_time_per_range": float(coefficients[k]),
                  "curve": f"{name} 1 % nose"} for k in order)
