"""The isothermal diagram: times to each fraction over a temperature grid, and the noses.

Every product is evaluated on the whole grid in one numpy call, whatever its batch; the
noses of all curves of a product (every batch member, every fraction) are refined together
by a vectorised golden-section search in ln t.
"""

from __future__ import annotations

import numpy as np

from ..constants import celsius_to_kelvin
from ..errors import InputError, numbers
from ..products.alloy import check_alloy
from ..products.base import writeable
from ..results import OVERALL, Noses, TTTResult
from .decomposition import WAIT_FRACTION, OverallCurve, ProductCurve, SharedDecomposition, regions_after
from .grid import DEFAULT_FRACTIONS, MAX_POINTS, alloy_grid, check_fractions

#: A nose faster than this (s) means an input slip, not a transformation: said in a warning.
IMPLAUSIBLY_FAST_S = 1.0e-9
#: Each nose temperature is refined to this, K.
NOSE_TOLERANCE_K = 0.01
#: Zoomed parabolas per nose after the one on the grid.
_NOSE_ZOOMS = 1
#: Values a curve is asked for at once: a large batch is solved a few temperatures at a
#: time, so its temporaries stay in the processor's cache instead of new memory pages.
CHUNK_VALUES = 1 << 16
#: Most values (heats x fractions x temperatures) one diagram call solves: 6 million (10,000
#: heats x 3 fractions x 200 temperatures, a spread's largest batch) take a few seconds and
#: well under 1 GB here (benchmarks/bench_limits.py); a larger batch is solved in parts.
MAX_BATCH_VALUES = 6_000_000


def curve_times(curves, temperatures_K, fractions):
    """Seconds to each fraction on the grid, {name: (batch..., F, N)}; ``inf`` where none forms.

    A large batch is solved a few temperatures at a time (:data:`CHUNK_VALUES`), every curve
    on one block before the next: the curves of one decomposition share its caps and delays
    there, and the temporaries stay in the processor's cache.
    """
    T = np.asarray(temperatures_K, dtype=float).reshape(-1)
    fr = np.asarray(fractions, dtype=float).reshape(-1)
    outs = {c.name: np.empty(c.batch_shape + (fr.size, T.size)) for c in curves}
    step = max(1, CHUNK_VALUES // max(max(out[..., 0].size for out in outs.values()), 1))
    dims = {len(c.batch_shape) for c in curves}
    X = {b: fr.reshape((1,) * b + (-1, 1)) for b in dims}
    for start in range(0, T.size, step):
        block = slice(start, start + step)
        part = {b: T[block].reshape((1,) * b + (1, -1)) for b in dims}  # one query per block: curves share it
        for c in curves:
            b = len(c.batch_shape)
            out = outs[c.name][..., block]
            t = writeable(c.time_to_fraction(part[b], X[b]), out.shape)
            np.copyto(t, np.inf, where=~(t > 0))  # guards against a model returning 0 or NaN where nothing forms
            out[...] = t
    return outs


def refine_noses(product, temperatures_K, fractions, times_s) -> Noses:
    """The nose of every curve of one product, refined to :data:`NOSE_TOLERANCE_K`.

    Starts from each curve's grid minimum and its two neighbours: the parabola in ln t
    through them, then two zoomed parabolas around its vertex, all curves at once (the best
    point evaluated is kept, so a nose is never worse than the grid's). A minimum on the grid's first
    or last point, or next to a point where the product does not form, is reported as it is
    on the grid with ``inside`` False.
    """
    grid = np.asarray(temperatures_K, dtype=float)
    n = grid.size
    b = len(product.batch_shape)
    X = np.asarray(fractions, dtype=float).reshape((1,) * b + (-1,))
    i = np.argmin(times_s, axis=-1)  # times are positive: ln t only at the three points used

    def log_at(j):
        with np.errstate(divide="ignore"):
            return np.log(np.take_along_axis(times_s, j[..., None], axis=-1)[..., 0])

    best, below, above = log_at(i), log_at(np.maximum(i - 1, 0)), log_at(np.minimum(i + 1, n - 1))
    inside = np.isfinite(best) & (i > 0) & (i < n - 1) & np.isfinite(below) & np.isfinite(above)
    at_grid = grid[i]
    if not inside.any():
        return Noses(temperature_K=at_grid, time_s=np.exp(best), inside=inside)

    def f(T):
        with np.errstate(divide="ignore"):
            t = product.time_to_fraction(T, X)
            return np.where(t > 0, np.log(t), np.inf)

    lo = np.where(inside, grid[np.maximum(i - 1, 0)], at_grid)
    hi = np.where(inside, grid[np.minimum(i + 1, n - 1)], at_grid)
    # The parabola through the grid minimum and its neighbours, then twice more through the
    # vertex and two points at a sixteenth of the previous spacing around it: each zoom cuts
    # the error of the vertex (the cubic part of ln t) by about 250.
    q, fq = at_grid, np.where(inside, best, 0.0)
    v = _vertex(lo, q, hi, np.where(inside, below, 0.0), fq, np.where(inside, above, 0.0))
    spacing = 0.5 * (hi - lo)
    for _ in range(_NOSE_ZOOMS):
        v = np.where(inside, np.clip(v, lo, hi), q)
        spacing = np.maximum(spacing / 16.0, 0.25 * NOSE_TOLERANCE_K)
        left, right = np.maximum(v - spacing, lo), np.minimum(v + spacing, hi)
        f_left, f_v, f_right = f(left), f(v), f(right)
        for x, fx in ((left, f_left), (v, f_v), (right, f_right)):
            take = inside & (fx < fq)
            q, fq = np.where(take, x, q), np.where(take, fx, fq)
        v = _vertex(left, v, right, f_left, f_v, f_right)
    v = np.where(inside, np.clip(v, lo, hi), q)
    f_v = f(v)
    take = inside & (f_v < fq)
    q, fq = np.where(take, v, q), np.where(take, f_v, fq)
    better = inside & (fq < best)
    return Noses(temperature_K=np.where(better, q, at_grid), time_s=np.exp(np.where(better, fq, best)),
                 inside=inside)


def _vertex(p, q, r, fp, fq, fr):
    """Abscissa of the vertex of the parabola through three points; q where they are collinear."""
    with np.errstate(divide="ignore", invalid="ignore"):
        den = (q - p) * (fq - fr) - (q - r) * (fq - fp)
        v = q - 0.5 * ((q - p) ** 2 * (fq - fr) - (q - r) ** 2 * (fq - fp)) / den
    return np.where(np.isfinite(v), v, q)


def solve_ttt(products, temperatures_K, fractions=DEFAULT_FRACTIONS):
    """Times and noses of each product on a grid: (times dict, noses dict) by product name."""
    grid = np.asarray(temperatures_K, dtype=float)
    fr = np.asarray(fractions, dtype=float)
    times = curve_times(products, grid, fr)
    noses = {p.name: refine_noses(p, grid, fr, times[p.name]) for p in products}
    return times, noses


def ttt(alloy, temperatures_C=None, fractions=DEFAULT_FRACTIONS, points=None, overall=True,
        decomposition=True) -> TTTResult:
    """The isothermal (TTT) diagram of an alloy or a batch of alloys.

    Parameters
    ----------
    alloy : Alloy
        From :func:`isokin.load_alloy` or :func:`isokin.steel`; may hold a batch.
    temperatures_C : array_like, optional
        Hold temperatures, °C; default the alloy's own range.
    fractions : sequence of float, optional
        Transformed fractions of each product's own completion, each in (0, 1).
    points : int, optional
        Size of the default grid; default the alloy file's, else 200.
    overall : bool
        Also the curves of the decomposition as a whole ("total"), where the alloy has more
        than one product; they are root-found, so a large batch is faster without them.
    decomposition : bool
        Products' curves within the decomposition (after their turn in the sequence, as
        shares of the parent; the default). False gives each product's own curve from all of
        the parent, as the published model states it (no sequence, no equilibrium share and
        no "total"), for comparison with the model's source.

    Returns
    -------
    TTTResult
        Times of shape (batch..., fraction, temperature) and the noses of every curve.

    Examples
    --------
    >>> import isokin
    >>> result = isokin.ttt(isokin.steel({"C": 0.79, "Mn": 0.76}, 6.0), points=60)
    >>> nose = result.noses["pearlite"]
    >>> bool(500 < float(nose.temperature_C[0]) < 600), bool(nose.time_s[0] < 5)
    (True, True)
    """
    check_alloy(alloy)
    fr = check_fractions(fractions)
    if temperatures_C is None:
        grid = alloy_grid(alloy, points=points)
    else:
        grid = np.sort(celsius_to_kelvin(numbers("temperatures_C", temperatures_C, -273.15, low_open=True,
                                                 unit="°C").ravel()))
        if grid.size < 3 or np.any(np.diff(grid) <= 0) or grid.size > MAX_POINTS:
            raise InputError(None, "temperatures_C", f"give 3 to {MAX_POINTS} distinct temperatures above -273.15 °C")
    heats = int(np.prod(alloy.batch_shape))
    if heats * fr.size * grid.size > MAX_BATCH_VALUES:
        raise InputError(None, "alloy", f"{heats} heats x {fr.size} fractions x {grid.size} temperatures is more than "
                         f"{MAX_BATCH_VALUES:,} values in one call; solve the batch in parts")
    within = decomposition and bool(alloy.sequence or any(p.capped for p in alloy.products))
    shared = SharedDecomposition(alloy)
    curves = [ProductCurve(alloy, p, shared) if within else p for p in alloy.products]
    with_whole = overall and decomposition and len(alloy.products) > 1
    if with_whole:
        whole = OverallCurve(alloy, shared)
        curves.append(whole)
    times, noses = solve_ttt(curves, grid, fr)
    names = tuple(p.name for p in alloy.products)
    models = {p.name: p.model for p in alloy.products}
    uppers = {p.name: p.upper_K for p in alloy.products}
    regions = ()
    if with_whole:
        names += (OVERALL,)
        models[OVERALL] = whole.model
        uppers[OVERALL] = whole.upper_K
        if not alloy.batch_shape:
            regions = regions_after(alloy, grid, times[OVERALL][-1], noses)
    warnings = list(alloy.warnings)
    meanings = {p.name: fraction_meaning(alloy, p, within) for p in alloy.products}
    shares_of = {p.name: f"of the {alloy.parent}" if within else "of its own completion" for p in alloy.products}
    if with_whole:
        meanings[OVERALL] = ("share of the austenite that can transform at the hold temperature that has transformed, "
                             "all products together (as hold's times to 1, 50, 99 % of the total count it)"
                             if alloy.martensite is not None else
                             "share of what can transform at the hold temperature that has, all products together")
        shares_of[OVERALL] = "of what can transform"
    fastest = min((float(np.min(n.time_s)) for n in noses.values()), default=np.inf)
    if fastest < IMPLAUSIBLY_FAST_S:
        warnings.append(f"the fastest curve reaches its fraction in {fastest:.2g} s, faster than any diffusional "
                        "transformation: check the units and magnitudes of the input")
    return TTTResult(
        alloy=alloy.name,
        model=alloy.model,
        temperatures_K=grid,
        fractions=fr,
        products=names,
        times_s=times,
        noses=noses,
        product_models=models,
        upper_K=uppers,
        critical_K=dict(alloy.critical_K),
        critical_methods=dict(alloy.critical_methods),
        batch_shape=alloy.batch_shape,
        footer=alloy.footer,
        warnings=tuple(warnings),
        inputs=alloy.inputs,
        provenance=dict(alloy.provenance),
        regions=regions,
        fraction_meanings=meanings,
        fraction_of=shares_of,
        valid=alloy.valid,
        parent=alloy.parent,
        athermal=None if alloy.martensite is None else alloy.martensite.name,
    )


def fraction_meaning(alloy, product, within):
    """What a fraction X of a product's curve is, in plain words."""
    if not within:
        return f"share of its own completion: {product.name} alone from all of the {alloy.parent}, as its model states it"
    waits = alloy.sequence.get(product.name)
    after = f", counted from when {waits} has reached {WAIT_FRACTION * 100:g} % of its own share" if waits else ""
    return (f"share of the {alloy.parent} that has become {product.name}, by itself within the decomposition{after}; "
            "a curve stops where its equilibrium share is smaller; not the product's own completion at that "
            "temperature, which hold's times to 1, 50, 99 % count")
