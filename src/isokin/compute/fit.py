"""Calibration: the models fitted to the user's own isothermal measurements, with uncertainty.

Measured points (temperature, fraction, time) are compared in ln t with the model's time to
that fraction: a product's own curve where the data name the product, the whole
decomposition (what a dilatometer sees) where they do not. scipy's least_squares fits the
free parameters with a robust loss (soft L1), so one bad point cannot drag the fit; the
Jacobian at the solution gives confidence intervals, a bootstrap over the points is an
option, and parameter sets drawn from the covariance give the band on the fitted curves.

Free parameters are named ``<product>.<parameter>``:

- steels: ``factor`` (a multiplier on F, fitted in its logarithm, relative to the alloy's
  own), ``activation_energy_cal_mol``, ``undercooling_exponent``;
- physical products: ``interface_energy_J_m2`` (an effective value, standing for gamma
  with its shape factor), ``diffusion_prefactor_m2_s`` (fitted in its logarithm),
  ``nucleation_activation_J_mol``, ``diffusion_activation_J_mol``.
"""

from __future__ import annotations

import warnings

import numpy as np

from ..constants import kelvin_to_celsius
from ..errors import InputError, whole_number
from ..products.alloy import check_alloy
from ..results import PRACTICAL_HORIZON_S, FitResult, Measurements, check_measurements
from .decomposition import Decomposition
from .ttt import ttt

#: Parameters fitted in their logarithm (they span decades and must stay positive).
LOG_PARAMETERS = ("factor", "diffusion_prefactor_m2_s")
#: Scale of the robust loss in ln t: residuals beyond about this count linearly, not squared.
ROBUST_SCALE = 0.2
#: The confidence level of the reported intervals.
CONFIDENCE = 0.95
#: Bootstrap resamples at most (2,000 refit in about half a second here).
MAX_BOOTSTRAP = 2000
#: Measured points a fit takes at most: far more than isothermal dilatometry gives.
MAX_POINTS = 500
#: A bootstrap's work at most: resamples x (free parameters + 1) x points, the model times
#: each step of the batched refit computes. 2,000,000 take about 5 s here
#: (benchmarks/bench_limits.py); the refit runs in blocks of :data:`REFIT_BLOCK` of them,
#: which bounds its memory (about 0.4 kB each).
MAX_BOOTSTRAP_WORK = 2_000_000
REFIT_BLOCK = 250_000
#: A measured fraction lies at least this far from 0 and from 1: nearer, no dilatometer tells
#: it from no transformation or a complete one, and its ln(-ln(1 - X)) means nothing.
FRACTION_RESOLUTION = 1e-4
#: Measured times lie from a millisecond (faster than any dilatometer) to the horizon beyond
#: which isokin says "does not form in practice", s.
MEASURED_TIME_RANGE_S = (1e-3, PRACTICAL_HORIZON_S)


def first_bad_point(temperature_K, fraction, time_s):
    """(index, what is wrong) of the first measured point a fit cannot take, or None: the one
    check of the reader (row by row) and of :func:`fit` (measurements built in Python)."""
    T, X, t = np.broadcast_arrays(*(np.asarray(a, dtype=float) for a in (temperature_K, fraction, time_s)))
    checks = ((~(np.isfinite(T) & (T > 0.0)), lambda i: f"temperature_C must be a finite temperature above -273.15, "
               f"got {T.flat[i] - 273.15:g}"),
              (~((t >= MEASURED_TIME_RANGE_S[0]) & (t <= MEASURED_TIME_RANGE_S[1])), lambda i: f"times must lie "
               f"from {MEASURED_TIME_RANGE_S[0]:g} to {MEASURED_TIME_RANGE_S[1]:g} s, got {t.flat[i]:g}"),
              (~((X >= FRACTION_RESOLUTION) & (X <= 1.0 - FRACTION_RESOLUTION)), lambda i: f"fractions must lie from "
               f"{FRACTION_RESOLUTION:g} to {1 - FRACTION_RESOLUTION:g} (no dilatometer tells a fraction nearer 0 or 1), "
               f"got {X.flat[i]:g}"))
    bad = np.stack([mask.ravel() for mask, _ in checks])
    if not bad.any():
        return None
    i = int(np.argmax(bad.any(axis=0)))
    return i, checks[int(np.argmax(bad[:, i]))][1](i)


def _check_data(data):
    """The measurements as :func:`read_measurements` gives them, with good points; InputError
    naming the first bad row otherwise."""
    check_measurements(data)
    try:
        arrays = [np.asarray(a, dtype=float) for a in (data.temperature_K, data.fraction, data.time_s)]
        same = all(a.ndim == 1 and a.size == arrays[0].size for a in arrays) and len(data.product) == arrays[0].size
    except (TypeError, ValueError):
        same = False
    if not same:
        raise InputError(data.source, None, "temperature_K, fraction, time_s and product must be one value per point")
    if arrays[0].size > MAX_POINTS:
        raise InputError(data.source, None, f"holds {arrays[0].size} points; a fit takes at most {MAX_POINTS}")
    bad = first_bad_point(*arrays)
    if bad is not None:
        i, problem = bad
        raise InputError(data.source, f"row {data.rows[i] if len(data.rows) > i else i + 1}", problem)


def avrami_exponent(time_s, fraction):
    """The slope n of ln(-ln(1 - X)) against ln t (JMAK's exponent), by least squares.

    >>> t = np.array([1.0, 2.0, 4.0, 8.0])
    >>> round(avrami_exponent(t, 1 - np.exp(-0.01 * t**2.5)), 12)
    2.5
    """
    x = np.log(np.asarray(time_s, dtype=float))
    y = np.log(-np.log1p(-np.asarray(fraction, dtype=float)))
    return float(np.polyfit(x, y, 1)[0])


def _check_free(alloy, free):
    known = alloy.calibration_parameters
    if len(set(free)) != len(free):
        raise InputError(None, "free", "names a parameter twice; give each once")
    for name in free:
        if name not in known:
            products = sorted({p.name for p in alloy.products})
            parameters = sorted({k.partition(".")[2] for k in known})
            raise InputError(None, "free", f"unknown parameter '{name}'; give <product>.<parameter> with a product of "
                             f"{', '.join(products)} and a parameter of {', '.join(parameters)}")


def default_free(alloy, data: Measurements):
    """Free parameters when none are named: for each product the data name (or, for data of
    the whole decomposition, each product that makes up 5 % or more of the part at some
    measured point), its default calibration parameters (a steel product's factor; a
    physical product's interface energy and diffusion prefactor)."""
    wanted = [n for n in data.product if n is not None]
    if wanted:
        forming = [p for p in alloy.products if p.name in wanted]
    else:
        # the products that make up a real share of what the dilatometer saw
        shares = Decomposition(alloy, data.temperature_K).shares(data.time_s)
        forming = [p for p in alloy.products if np.any(shares[p.name] >= 0.05)]
    return tuple(f"{p.name}.{k}" for p in forming for k in p.default_calibration)


def with_values(alloy, values: dict):
    """The alloy with parameters set (``{"bainite.factor": 2.0, ...}``); values may be arrays
    (a batch of parameter sets)."""
    return alloy.with_parameters(values)


def model_times(alloy, data: Measurements):
    """The model's time to each measured fraction, s (batch axes of the alloy leading)."""
    b = len(alloy.batch_shape)
    T = data.temperature_K.reshape((1,) * b + (-1,))
    X = data.fraction.reshape((1,) * b + (-1,))
    out = np.full(np.broadcast_shapes(alloy.batch_shape + (1,), T.shape), np.inf)
    products = np.array([p if p is not None else "" for p in data.product], dtype=object)
    whole = products == ""
    if whole.any():
        out[..., whole] = Decomposition(alloy, T[..., whole]).time_to_total(X[..., whole])
    for p in alloy.products:
        mine = products == p.name
        if mine.any():
            out[..., mine] = p.time_to_fraction(T[..., mine], X[..., mine])
    return out


def _bounds(name, start):
    """Plausible bounds in the fitted coordinate: four decades either way for a factor or a
    prefactor, half to twice an energy, a given range for an exponent."""
    parameter = name.partition(".")[2]
    if parameter in LOG_PARAMETERS:
        return start - np.log(1e4), start + np.log(1e4)
    if parameter == "undercooling_exponent":
        return 0.5, 6.0
    return 0.5 * start, 2.0 * start


def _to_internal(name, value):
    return np.log(value) if name.partition(".")[2] in LOG_PARAMETERS else value


def _to_values(free, theta):
    return {n: (np.exp(v) if n.partition(".")[2] in LOG_PARAMETERS else v) for n, v in zip(free, theta)}


def fit(alloy, data: Measurements, free=None, loss="soft_l1", bootstrap=0, seed=0, progress=None):
    """Fit the free parameters to the measurements.

    Parameters
    ----------
    alloy : Alloy
        One alloy (its parameters are the starting point).
    data : Measurements
    free : sequence of str, optional
        ``<product>.<parameter>`` names; default :func:`default_free`.
    loss : str
        least_squares loss: "soft_l1" (default, robust) or "linear" (plain least squares).
    bootstrap : int
        Resamples of the points for percentile intervals as well, 0 (none) to :data:`MAX_BOOTSTRAP`.
    progress : callable, optional
        ``progress(done, total)`` after each resample.

    Returns
    -------
    FitResult
    """
    # scipy.optimize and scipy.special load on the first fit: the CLI starts faster
    from scipy.optimize import least_squares
    from scipy.special import stdtrit

    if check_alloy(alloy).batch_shape:
        raise InputError(None, "alloy", "a fit takes one alloy, not a batch")
    _check_data(data)
    whole_number("bootstrap", bootstrap, 0, MAX_BOOTSTRAP)
    whole_number("seed", seed)
    free = tuple(default_free(alloy, data) if free is None else free)
    _check_free(alloy, free)
    m, k = data.time_s.size, len(free)
    if bootstrap * (k + 1) * m > MAX_BOOTSTRAP_WORK:
        raise InputError(None, "bootstrap", f"{bootstrap} resamples of {m} points with {k} free parameters exceed a "
                         f"run's limit of {MAX_BOOTSTRAP_WORK:,} resamples x (free + 1) x points; take at most "
                         f"{MAX_BOOTSTRAP_WORK // ((k + 1) * m)} resamples")
    start = model_times(alloy, data)
    bad = ~np.isfinite(start)
    if bad.any():
        i = int(np.argmax(bad))
        row = data.rows[i] if data.rows else i + 1
        what = data.product[i] or "any product"
        raise InputError(data.source, f"row {row}", f"{what} cannot reach fraction {data.fraction[i]:g} at "
                         f"{kelvin_to_celsius(data.temperature_K[i]):g} °C in this model; check the temperature and product")
    if m < k + 1:
        raise InputError(data.source, None, f"{m} points cannot fit {k} free parameters; give at least {k + 1}")
    if k == 0:
        r = _ln_ratio(start, data)
        return FitResult(alloy=alloy, fitted=alloy, free=(), values={}, model_values={}, intervals={},
                         bootstrap_intervals={}, residuals_ln_t=r, rms_ln_t=float(np.sqrt(np.mean(r**2))),
                         data=data, covariance=np.zeros((0, 0)), loss=loss, avrami=_avrami(data, start),
                         model_times_s=start)
    base = {n: alloy.calibration_parameters[n] for n in free}
    theta0 = np.array([_to_internal(n, base[n]) for n in free], dtype=float)

    def residuals(theta):
        return _ln_ratio(model_times(with_values(alloy, _to_values(free, theta)), data), data)

    bounds = np.array([_bounds(n, theta0[i]) for i, n in enumerate(free)]).T
    solution = least_squares(residuals, theta0, loss=loss, f_scale=ROBUST_SCALE, x_scale="jac", method="trf",
                             bounds=bounds)
    theta = solution.x
    J = solution.jac
    _check_constrained(free, J)
    values = _to_values(free, theta)
    fitted = with_values(alloy, values)
    times = model_times(fitted, data)
    r = _ln_ratio(times, data)
    dof = max(m - k, 1)
    s2 = float(np.sum(r**2) / dof)
    covariance = np.linalg.pinv(J.T @ J) * s2
    half = stdtrit(dof, 0.5 + CONFIDENCE / 2) * np.sqrt(np.clip(np.diag(covariance), 0, None))
    # an interval wider than the plausible bounds of the fit is cut at them
    low_end, high_end = np.maximum(theta - half, bounds[0]), np.minimum(theta + half, bounds[1])
    intervals = {n: (_to_values([n], [low_end[i]])[n], _to_values([n], [high_end[i]])[n]) for i, n in enumerate(free)}
    boot = {}
    if bootstrap:
        rng = np.random.default_rng(seed)
        counts = np.stack([np.bincount(rng.integers(0, m, m), minlength=m) for _ in range(int(bootstrap))])
        per = max(1, REFIT_BLOCK // ((k + 1) * m))
        draws = np.concatenate([_refit_batch(alloy, data, free, theta, bounds, counts[i:i + per], loss,
                                             None if progress is None else
                                             lambda done, _, i=i: progress(i + done, len(counts)))
                                for i in range(0, len(counts), per)])
        lo, hi = np.percentile(draws, [50 * (1 - CONFIDENCE), 50 * (1 + CONFIDENCE)], axis=0)
        boot = {n: (_to_values([n], [lo[i]])[n], _to_values([n], [hi[i]])[n]) for i, n in enumerate(free)}
    return FitResult(alloy=alloy, fitted=fitted, free=free, values={n: float(v) for n, v in values.items()},
                     model_values=base, intervals=intervals, bootstrap_intervals=boot, residuals_ln_t=r,
                     rms_ln_t=float(np.sqrt(np.mean(r**2))), data=data, covariance=covariance, loss=loss,
                     avrami=_avrami(data, times), theta=theta, model_times_s=times)


def _check_constrained(free, J):
    """InputError where a free parameter moves no residual (the data do not constrain it) or
    where the data cannot tell free parameters apart (the Jacobian has lower rank)."""
    size = np.linalg.norm(J, axis=0)
    idle = [n for n, s in zip(free, size) if not s > 1e-9 * max(float(np.max(size)), 1e-300)]
    if idle:
        raise InputError(None, "free", f"the data do not constrain {idle[0]} (no measured point moves with it); "
                         "leave it out, or add holds where that product forms")
    if np.linalg.matrix_rank(J / size) < len(free):
        raise InputError(None, "free", f"the data cannot tell {', '.join(free)} apart; free fewer of them, or add "
                         "holds at more temperatures")


def _ln_ratio(times, data):
    """ln(model / measured time) per point (the last axis), 50 where the model gives none."""
    with np.errstate(divide="ignore"):
        r = np.log(times) - np.log(data.time_s)
    return np.where(np.isfinite(r), r, 50.0)


#: Iterations of the batched refit of the bootstrap at most, and the step (in the fitted
#: coordinates) below which a resample has converged: the precision an interval needs.
_REFIT_STEPS = 30
_REFIT_TOLERANCE = 1e-5


def _refit_batch(alloy, data, free, theta, bounds, counts, loss, progress=None):
    """The fit again for every bootstrap resample at once: damped Gauss-Newton steps
    (Levenberg-Marquardt) with the robust loss's weights, every resample's model times from
    one batch of parameter sets per step (the resample, and one forward difference per free
    parameter for the Jacobian). ``counts`` (resample, point): how often each point was drawn.
    Returns the parameters (resample, free) in the fitted coordinates."""
    B, k = counts.shape[0], len(free)
    lower, upper = bounds

    def residuals(th):
        """(sets, points) residuals in ln t for parameter sets ``th`` (sets, free)."""
        return _ln_ratio(model_times(with_values(alloy, _to_values(free, th.T)), data), data)

    def cost(r, rows=slice(None)):
        z = (r / ROBUST_SCALE) ** 2
        rho = 2.0 * (np.sqrt(1.0 + z) - 1.0) if loss == "soft_l1" else z
        return 0.5 * ROBUST_SCALE**2 * np.sum(counts[rows] * rho, axis=1)

    def cost_of(th_rows, rows):
        return cost(residuals(th_rows), rows)

    th = np.repeat(theta[None, :], B, axis=0)
    h = 1e-6 * np.maximum(np.abs(th), 1.0)
    damping = np.full(B, 1e-3)
    going = np.ones(B, dtype=bool)
    for step in range(_REFIT_STEPS):
        # the resample and its forward differences, as one batch of parameter sets
        shifted = th[:, None, :] + np.eye(k)[None, :, :] * h[:, None, :]
        r_all = residuals(np.concatenate([th[:, None, :], shifted], axis=1).reshape(-1, k)).reshape(B, k + 1, -1)
        r = r_all[:, 0, :]
        J = np.swapaxes((r_all[:, 1:, :] - r[:, None, :]) / h[:, :, None], 1, 2)  # (B, points, free)
        weight = counts / np.sqrt(1.0 + (r / ROBUST_SCALE) ** 2) if loss == "soft_l1" else counts.astype(float)
        A = np.einsum("bpi,bp,bpj->bij", J, weight, J)
        g = np.einsum("bpi,bp,bp->bi", J, weight, r)
        diag = np.maximum(np.diagonal(A, axis1=1, axis2=2), 1e-12)
        now = cost(r)
        accepted = np.zeros(B, dtype=bool)
        for _ in range(8):  # raise the damping where a step would not lower the cost
            trying = np.flatnonzero(going & ~accepted)
            if trying.size == 0:
                break
            lhs = A[trying] + damping[trying, None, None] * np.einsum("bi,ij->bij", diag[trying], np.eye(k))
            delta = -np.linalg.solve(lhs, g[trying, :, None])[..., 0]
            trial = np.clip(th[trying] + delta, lower, upper)
            better = cost_of(trial, trying) <= now[trying]
            th[trying[better]] = trial[better]
            damping[trying] = np.where(better, damping[trying] / 3.0, damping[trying] * 10.0)
            going[trying[better & (np.max(np.abs(delta), axis=1) < _REFIT_TOLERANCE)]] = False
            accepted[trying[better]] = True
        going &= accepted  # a resample that cannot lower its cost has reached its minimum
        if progress is not None:
            progress(int(np.count_nonzero(~going)), B)
        if not going.any():
            break
    return th


def _avrami(data, model):
    """Per isotherm (and product): the Avrami exponent of the data and of the model (its times
    ``model`` at the same points) at the same fractions."""
    out = []
    keys = sorted({(float(T), p) for T, p in zip(data.temperature_K, data.product)}, key=lambda k: (k[0], k[1] or ""))
    for T, p in keys:
        pick = (data.temperature_K == T) & np.array([q == p for q in data.product])
        if pick.sum() >= 3 and np.ptp(data.fraction[pick]) > 0:
            out.append({"temperature_C": kelvin_to_celsius(T), "product": p or "total",
                        "measured_n": avrami_exponent(data.time_s[pick], data.fraction[pick]),
                        "model_n": avrami_exponent(model[pick], data.fraction[pick])})
    return tuple(out)


def band(result, fractions=(0.01, 0.5, 0.99), samples=100, seed=1, temperatures_K=None):
    """Curves of the fitted model and their band: the 2.5 and 97.5 percentiles of the times over
    parameter sets drawn from the fit's covariance (one batch). Returns (T_K, times, lo, hi)."""
    fitted = result.fitted
    T = temperatures_K if temperatures_K is not None else np.linspace(*fitted.default_range_K, 120)
    centre = ttt(fitted, temperatures_C=kelvin_to_celsius(T), fractions=fractions)
    name = centre.overall or centre.products[0]
    if not result.free or not np.all(np.isfinite(result.covariance)):
        return T, centre.times_s[name], centre.times_s[name], centre.times_s[name]
    rng = np.random.default_rng(seed)
    bounds = np.array([_bounds(n, _to_internal(n, result.model_values[n])) for n in result.free]).T
    draws = np.clip(rng.multivariate_normal(result.theta, result.covariance, size=samples), *bounds)
    batch = with_values(result.alloy, _to_values(result.free, draws.T))
    spread = ttt(batch, temperatures_C=kelvin_to_celsius(T), fractions=fractions)
    times = np.where(np.isfinite(spread.times_s[name]), spread.times_s[name], np.nan)
    with warnings.catch_warnings():  # no curve at some temperatures: the band is NaN there
        warnings.filterwarnings("ignore", message="All-NaN slice")
        lo, hi = np.nanpercentile(times, [2.5, 97.5], axis=0)
    return T, centre.times_s[name], lo, hi
