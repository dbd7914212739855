"""The decomposition of one parent phase into its products: what forms when, and how much.

Products share one parent (austenite, for steels). Two rules combine them:

- **Sequence.** A product may wait for another (``Alloy.sequence``): pearlite waits for
  proeutectoid ferrite, as in Kirkaldy's scheme that Li et al. (1998) build on (the rule as
  recalled from those papers, not checked against their text). It begins once the other
  has reached :data:`WAIT_FRACTION` of its own completion at that temperature, and its
  isothermal clock starts then.
- **Sharing.** Products that run at the same time share the parent by Avrami's
  extended-volume rule for concurrent reactions (M. Avrami, J. Chem. Phys. 8 (1940) 212;
  as used for simultaneous transformations, e.g. J. S. Kirkaldy and D. Venugopalan (1983),
  from memory): with each product's own fraction a_i (what it would reach alone, capped at
  its equilibrium share, such as the lever-rule ferrite), the total is
  1 - prod(1 - a_i), and product i takes dX_i = prod_{j != i} (1 - a_j) da_i, which is the
  same as dX_i = (1 - X) dY_i in the extended fractions Y_i = -ln(1 - a_i). One product
  alone reduces exactly to its own curve. Below Bs, bainite thus shares the austenite with
  ferrite and pearlite from the start of the hold.

What remains of the parent after a hold is quenched: martensite by Koistinen-Marburger from
Ms (on the austenite as it is; the carbon enrichment by ferrite is not followed), the rest
is retained austenite. Every function here broadcasts over temperatures and times with a
batch of alloys leading, and loops in Python only over the handful of products.
"""

from __future__ import annotations

import numpy as np

from ..constants import MAX_TEMPERATURE_C, ZERO_CELSIUS_K, celsius_to_kelvin
from ..errors import InputError, number, numbers
from ..products.alloy import check_alloy
from ..products.base import as_query, batch_leading, writeable
from ..results import OVERALL, HoldResult

#: A product that waits for another begins when that one has reached this share of its own
#: completion (the full completion takes infinitely long in JMAK).
WAIT_FRACTION = 0.99
#: Gauss-Legendre nodes for each product's share of a concurrent decomposition.
_NODES, _WEIGHTS = np.polynomial.legendre.leggauss(24)
_ROOT_STEPS = 40


class _PerProduct(dict):
    """A dict filled on first access, one product at a time."""

    def __init__(self, names, compute):
        super().__init__()
        self._names, self._compute = tuple(names), compute

    def __missing__(self, name):
        if name not in self._names:
            raise KeyError(name)
        value = self[name] = self._compute(name)
        return value

    def values(self):
        return [self[name] for name in self._names]

    def items(self):
        return [(name, self[name]) for name in self._names]

    def __iter__(self):
        return iter(self._names)


class Decomposition:
    """The decomposition of an alloy's parent at hold temperatures T_K (batch axes leading).

    ``caps[name]``: the share of the parent each product reaches alone at completion (its
    equilibrium share, 0 where it cannot form); ``delays[name]``: when it may begin (0 unless
    it waits for another); ``factors[name]``: F(T) of a separable product. All are computed
    on first use, product by product.

    Parameters
    ----------
    alloy : Alloy
        Its products, their sequence and martensite.
    T_K : array_like
        Hold temperatures, K: a query as the products take it (see products/base.py).
    """

    def __init__(self, alloy, T_K):
        self.alloy = alloy
        self.T, _ = as_query(T_K)
        self._by_name = {p.name: p for p in alloy.products}
        self.caps = _PerProduct(self._by_name, self._cap)
        self.delays = _PerProduct(self._by_name, self._delay)
        self.factors = _PerProduct(self._by_name, lambda name: self._by_name[name].time_factor(self.T))

    def _cap(self, name):
        p = self._by_name[name]
        # the product's window from its interface bounds, with the batch leading the query
        b, q = len(p.batch_shape), self.T.ndim
        forms = ((self.T >= batch_leading(np.asarray(p.lower_K), b, q))
                 & (self.T < batch_leading(np.asarray(p.upper_K), b, q)))
        cap = p.equilibrium_fraction(self.T)
        return np.where(forms, cap, 0.0)

    def _delay(self, name):
        waits_for = self.alloy.sequence.get(name)
        if waits_for is None:
            return np.zeros(np.shape(self.caps[name]))
        t_wait = self.own_time(self._by_name[waits_for], WAIT_FRACTION)
        return np.where(self.caps[waits_for] > 0.0, t_wait, 0.0)

    def own_time(self, p, X):
        """Seconds product ``p`` alone takes to reach its own fraction X (0 < X < 1) at T: F(T) S(X)
        from the factor already computed where it is separable."""
        if p.separable:
            return self.factors[p.name] * p.reaction_term(X)
        return p.time_to_fraction(self.T, X)

    @property
    def transformable(self):
        """Share of the parent that can transform at T, given time: 1 - prod(1 - cap_i)."""
        remaining = 1.0
        for cap in self.caps.values():
            remaining = remaining * (1.0 - cap)
        return 1.0 - remaining

    def own_fractions(self, t_s):
        """Each product's own share a_i(t) of the parent, alone, at hold time t_s."""
        return {p.name: self.caps[p.name] * p.fraction_after(self.T, np.maximum(t_s - self.delays[p.name], 0.0))
                for p in self.alloy.products}

    def total(self, t_s):
        """Share of the parent transformed after t_s seconds: 1 - prod(1 - a_i)."""
        remaining = 1.0
        for a in self.own_fractions(t_s).values():
            remaining = remaining * (1.0 - a)
        return 1.0 - remaining

    def time_to_total(self, share):
        """Seconds until the total reaches ``share`` of what can transform at T (0 < share < 1);
        ``inf`` where nothing can transform. Broadcasts ``share`` against T.

        Where one product alone can form, it is that product's own time (closed form);
        otherwise the root of the total in ln t, bracketed by each product alone (where the
        first of a sequence reaches the share before the next begins, the bracket's end is
        the root).
        """
        W = self.transformable
        share = np.asarray(share, dtype=float)
        target = share * W
        shape = np.broadcast_shapes(np.shape(target), self.T.shape)
        target = np.broadcast_to(target, shape)
        active = sum((cap > 0.0).astype(int) for cap in self.caps.values())
        result = np.full(shape, np.inf)
        alone = np.broadcast_to(active == 1, shape)
        if alone.any():
            for p in self.alloy.products:
                mine = alone & (self.caps[p.name] > 0.0)
                if mine.any():
                    t = self.delays[p.name] + self.own_time(p, share)
                    np.copyto(result, np.broadcast_to(t, shape), where=mine)
        several = np.broadcast_to(active > 1, shape)
        if not several.any():
            return result
        # Brackets from each product alone: the total is at least any one product's share,
        # and at most the sum of them.
        hi = np.full(shape, np.inf)
        lo = np.full(shape, np.inf)
        for p in self.alloy.products:
            cap, start = self.caps[p.name], self.delays[p.name]
            if not np.any(several & (cap > 0.0)):
                continue
            with np.errstate(divide="ignore", invalid="ignore"):
                need_hi = np.where(cap > 0.0, target / cap, np.inf)
                need_lo = np.where(cap > 0.0, target / (active * cap), np.inf)
            for need, bound in ((need_hi, hi), (need_lo, lo)):
                ok = need < 1.0
                t = start + self.own_time(p, np.where(ok, need, 0.5))
                bound[...] = np.minimum(bound, np.where(ok, t, np.inf))
        solvable = several & (W > 0.0) & np.isfinite(hi) & np.isfinite(lo)
        lo = np.where(solvable, np.maximum(lo, 1e-300), 1.0)
        hi = np.where(solvable, np.maximum(hi, lo), 1.0)
        idx = np.flatnonzero(solvable)
        total, sloped = self._total_at(shape, idx)
        root = _bracketed_root(total, sloped, np.log(lo).ravel(), np.log(hi).ravel(), target.ravel(), idx).reshape(shape)
        np.copyto(result, np.exp(root), where=solvable)
        return result

    def _total_at(self, shape, idx):
        """(total(t, idx), sloped): the total at times t of the points idx of the flattened shape,
        from the products that can form at some of those points, and whether it also gives its
        slope in ln t (``total(t, idx, slope=True)``).

        Where every such product is separable with a reaction term shared by the batch (Li's
        S(X); Kirkaldy & Venugopalan's ferrite and pearlite; JMAK with one exponent),
        X = S^-1(t / F(T)) with F computed once, so only the points still being solved are
        evaluated; otherwise the whole array is.
        """
        involved = [p for p in self.alloy.products
                    if np.any(np.broadcast_to(self.caps[p.name], shape).ravel()[idx] > 0.0)]
        if all(p.separable for p in involved):
            parts = []
            for p in involved:
                factor = np.broadcast_to(self.factors[p.name], shape).ravel()
                cap = np.broadcast_to(self.caps[p.name], shape).ravel()
                start = np.broadcast_to(self.delays[p.name], shape).ravel()
                parts.append((p, factor, cap, start, float(p.reaction_term(1.0))))

            def total(t, idx, slope=False):
                """The total at t (and, with ``slope``, its derivative in ln t)."""
                left, rates = [], []
                for p, factor, cap, start, s_end in parts:
                    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
                        s = np.maximum(t - start[idx], 0.0) / factor[idx]
                    s = np.where(np.isfinite(s), np.minimum(s, s_end), np.where(np.isnan(s), 0.0, s_end))
                    x = p.reaction_term_inverse(s)
                    left.append(1.0 - cap[idx] * x)
                    if slope:
                        with np.errstate(divide="ignore", invalid="ignore"):
                            rates.append(np.where((s > 0.0) & (s < s_end), cap[idx] * p.reaction_rate_shape(x)
                                                  / factor[idx], 0.0))
                remaining = np.prod(left, axis=0)
                if not slope:
                    return 1.0 - remaining
                with np.errstate(divide="ignore", invalid="ignore"):
                    growth = sum(r * np.prod([q for j, q in enumerate(left) if j != i], axis=0)
                                 for i, r in enumerate(rates))
                return 1.0 - remaining, t * growth

            return total, True

        def total_full(t, idx):
            t_full = np.zeros(int(np.prod(shape)))
            t_full[idx] = t
            return self.total(t_full.reshape(shape)).ravel()[idx]

        return total_full, False

    def shares(self, t_s):
        """Each product's share of the parent after t_s seconds (they sum to :meth:`total`)."""
        t = np.asarray(t_s, dtype=float)
        own_end = self.own_fractions(t)
        raw = {}
        for p in self.alloy.products:
            cap = self.caps[p.name]
            x_end = np.where(cap > 0.0, own_end[p.name] / np.where(cap > 0.0, cap, 1.0), 0.0)
            # the product's own fraction x runs over Gauss-Legendre nodes in [0, x_end]
            x = x_end[..., None] * (0.5 * (_NODES + 1.0))
            T = self.T[..., None]
            t_at = self.delays[p.name][..., None] + p.time_to_fraction(T, x)
            others = 1.0
            for q in self.alloy.products:
                if q is p:
                    continue
                start = self.delays[q.name][..., None]
                others = others * (1.0 - self.caps[q.name][..., None]
                                   * q.fraction_after(T, np.maximum(np.where(np.isfinite(t_at), t_at, 0.0) - start, 0.0)))
            raw[p.name] = cap * x_end * 0.5 * np.sum(others * _WEIGHTS, axis=-1)
        total = self.total(t)
        summed = sum(raw.values())
        with np.errstate(divide="ignore", invalid="ignore"):
            scale = np.where(summed > 0.0, total / summed, 0.0)
        return {name: value * scale for name, value in raw.items()}


class SharedDecomposition:
    """The decomposition at the temperatures last asked for, shared by the curves of one
    alloy: where the diagram solver asks them all at the same query (the same array), its
    caps, delays and time factors are computed once."""

    def __init__(self, alloy):
        self.alloy, self._T, self._last = alloy, None, None

    def at(self, T_K) -> Decomposition:
        if T_K is not self._T:  # the array is held, so its identity is not reused
            self._T, self._last = T_K, Decomposition(self.alloy, T_K)
        return self._last


class ProductCurve:
    """One product's curve within the decomposition: the time until it reaches a share X of
    the parent by itself, after its turn in the sequence (``delay + t(X / cap)``; never where
    its equilibrium share ``cap`` is X or less). With no sequence and no equilibrium share
    it is the product's own curve, unchanged."""

    def __init__(self, alloy, product, shared=None):
        self.alloy, self.product = alloy, product
        self.name, self.model, self.batch_shape = product.name, product.model, product.batch_shape
        self._shared = SharedDecomposition(alloy) if shared is None else shared

    @property
    def upper_K(self):
        return self.product.upper_K

    def time_to_fraction(self, T_K, X):
        d = self._shared.at(T_K)
        cap, delay = d.caps[self.name], d.delays[self.name]
        X = np.asarray(X, dtype=float)
        waits = self.name in self.alloy.sequence
        if np.all(X < 1.0) and np.all((cap == 0.0) | (cap == 1.0)):
            # the whole parent where it forms: its own fractions, as given (cheap); the
            # large arrays are written in place
            t = self.product.time_to_fraction(d.T, X)
            reachable = cap > 0.0
            t = writeable(t, np.broadcast_shapes(np.shape(t), reachable.shape, np.shape(delay)))
            if waits:
                t += delay
            np.copyto(t, np.inf, where=~reachable)
            return t
        reachable = cap > X
        if self.product.separable:
            # t = delay + F(T) S(X / cap): S only where the share is reachable, F on the
            # temperatures' shape, broadcast in the product
            shape = np.broadcast_shapes(reachable.shape, np.shape(delay))
            with np.errstate(divide="ignore", invalid="ignore"):
                share = np.broadcast_to(X / cap, shape)
            where = np.broadcast_to(reachable, shape)
            S = np.zeros(shape)
            S[where] = self.product.reaction_term(share[where])
            with np.errstate(invalid="ignore"):
                t = d.factors[self.name] * S
            if waits:
                t += delay
            np.copyto(t, np.inf, where=~where)
            return t
        with np.errstate(divide="ignore", invalid="ignore"):
            own = np.where(reachable, X / np.where(reachable, cap, 1.0), 0.5)
        return np.where(reachable, delay + d.own_time(self.product, own), np.inf)


class OverallCurve:
    """The decomposition as a whole, seen as one more curve: the time until the total reaches
    a share of what can transform at each temperature. It answers ``time_to_fraction`` like a
    product, so the diagram solver and its nose refinement treat it as one."""

    def __init__(self, alloy, shared=None):
        self.alloy = alloy
        self._shared = SharedDecomposition(alloy) if shared is None else shared
        self.name = OVERALL
        self.model = (f"decomposition of {alloy.parent}: sequence {_sequence_text(alloy)}; concurrent products "
                      "share the parent by the extended-volume rule; fraction = share of what can transform at T")
        self.batch_shape = alloy.batch_shape

    @property
    def upper_K(self):
        return np.max(np.stack([np.broadcast_to(p.upper_K, self.batch_shape) for p in self.alloy.products]), axis=0)

    def time_to_fraction(self, T_K, X):
        return self._shared.at(T_K).time_to_total(X)


def _sequence_text(alloy):
    if not alloy.sequence:
        return "none (all concurrent)"
    return ", ".join(f"{after} after {before} reaches {WAIT_FRACTION * 100:g} %"
                     for after, before in alloy.sequence.items())


#: A product or the untransformed parent is named in a region from this share on.
REGION_SHARE = 0.05


def regions_after(alloy, grid_K, finish_times, noses):
    """What the parent has become once its transformation has finished, at the temperatures a
    diagram names regions at: each product's nose (its middle fraction) and midway between
    consecutive upper temperatures (austenite + ferrite between Ae1 and Ae3).

    Returns a tuple of (temperature K, finish time s, phases) for a single alloy: the phases
    that make up :data:`REGION_SHARE` or more of the part at three times the finish time of
    the whole decomposition, the parent first where some of it is left. Where the words go
    is the figure's business (:mod:`isokin.plot.ttt`).
    """
    uppers = sorted({min(float(np.max(p.upper_K)), float(grid_K[-1])) for p in alloy.products
                     if grid_K[0] < np.max(p.upper_K) <= grid_K[-1] + 1.0})
    middle = {p.name: len(noses[p.name].time_s) // 2 for p in alloy.products}
    candidates = [float(noses[p.name].temperature_K[middle[p.name]]) for p in alloy.products
                  if noses[p.name].forms.any() and bool(noses[p.name].inside[middle[p.name]])]
    candidates += [0.5 * (a + b) for a, b in zip(uppers, uppers[1:])]
    done = np.isfinite(finish_times)
    out = []
    for T in sorted(candidates, reverse=True):
        if done.sum() < 2 or not grid_K[0] < T < grid_K[-1]:
            continue
        t_end = float(np.exp(np.interp(T, grid_K[done], np.log(finish_times[done]))))
        held = Decomposition(alloy, np.array(T))
        shares = held.shares(np.array(3.0 * t_end))
        phases = [alloy.parent] if 1.0 - float(held.total(np.array(3.0 * t_end))) >= REGION_SHARE else []
        phases += [name for name, share in shares.items() if float(share) >= REGION_SHARE]
        if phases:
            out.append((T, t_end, tuple(phases)))
    return tuple(out)


#: Fractions of the milestones a hold reports for each product and for the total.
MILESTONES = (0.01, 0.5, 0.99)
#: Most (temperature, time) pairs in one hold: 100,000 take about a second and well under
#: 1 GB here (benchmarks/bench_limits.py).
MAX_HOLD_VALUES = 100_000


def hold(alloy, temperature_C, time_s, quench_to_C=20.0, milestones=True):
    """The microstructure after an isothermal hold and a quench: the fractions of each product,
    martensite and retained austenite (steels), or of the untransformed parent.

    Parameters
    ----------
    alloy : Alloy
        One alloy (or a batch, with the batch leading the temperature and time arrays).
    temperature_C : float or array_like
        Hold temperature, °C.
    time_s : float or array_like
        Hold time, s (0 or more); broadcasts against the temperature.
    quench_to_C : float
        Temperature the part is quenched to after the hold, °C (default 20).
    milestones : bool
        Also find the times to 1, 50 and 99 % at each temperature (the fractions alone are
        cheaper for many holds).

    Returns
    -------
    HoldResult
        ``.fractions``: phase name -> share of the part (they sum to 1), of the broadcast
        shape of temperature and time; ``.milestones_s``: the times to 1, 50 and 99 % of
        each product and of the whole decomposition at each temperature; for steels
        ``.austenite_carbon`` (mass %) and ``.martensite_start_K``: the carbon of the
        austenite left at the end of the hold (ferrite, and the ferrite of carbide-free
        bainite, reject theirs into it) and its Ms, from which the quench forms martensite.

    Examples
    --------
    >>> import isokin
    >>> steel = isokin.steel({"C": 0.79, "Mn": 0.76}, 6.0)
    >>> after = isokin.hold(steel, 650.0, 3600.0)
    >>> round(float(after.fractions["pearlite"]), 3)
    1.0
    """
    check_alloy(alloy)
    T_C = numbers("temperature_C", temperature_C, -ZERO_CELSIUS_K, MAX_TEMPERATURE_C, low_open=True, unit="°C")
    t = numbers("time_s", time_s, 0.0, unit="s")
    number("quench_to_C", quench_to_C, -ZERO_CELSIUS_K, MAX_TEMPERATURE_C, low_open=True, unit="°C")
    try:
        T_C, t = np.broadcast_arrays(T_C, t)
    except ValueError:
        raise InputError(None, "time_s", f"has shape {t.shape}, which does not match the temperatures' "
                         f"{T_C.shape}") from None
    if T_C.size > MAX_HOLD_VALUES:
        raise InputError(None, "time_s", f"at most {MAX_HOLD_VALUES} (temperature, time) pairs in one hold, got "
                         f"{T_C.size}")
    T = celsius_to_kelvin(T_C)
    held = Decomposition(alloy, T)
    fractions = dict(held.shares(t))
    left = np.maximum(1.0 - held.total(t), 0.0)
    carbon = start = None
    if alloy.martensite is not None:
        if alloy.carbon_balance is not None:
            carbon = alloy.carbon_balance.austenite_carbon(fractions, T.ndim)
        start = alloy.martensite.start_for_carbon(carbon) if carbon is not None else None
        martensite = left * alloy.martensite.fraction(np.minimum(T, celsius_to_kelvin(quench_to_C)), carbon)
        fractions[alloy.martensite.name] = martensite
        fractions[f"retained {alloy.parent}"] = left - martensite
    else:
        fractions[alloy.parent] = left
    marks = np.asarray(MILESTONES)
    times_to, shares_of = {}, {}
    if milestones:
        T_marks = T[..., None]
        times_to = {p.name: p.time_to_fraction(T_marks, marks) for p in alloy.products}
        # a diagram's product curves are shares of the parent where the products wait their turn or stop at
        # an equilibrium share; these milestones are each product's own completion all the same
        unlike = bool(alloy.sequence or any(p.capped for p in alloy.products))
        shares_of = {p.name: "of its own completion at this temperature"
                     + (f", not of the {alloy.parent} as on the diagram" if unlike else "") for p in alloy.products}
        if len(alloy.products) > 1:
            times_to[OVERALL] = Decomposition(alloy, T_marks).time_to_total(marks)
            shares_of[OVERALL] = "of what can transform at this temperature, as on the diagram"
    return HoldResult(alloy=alloy.name, temperatures_C=T_C, times_s=t, quench_to_C=float(quench_to_C),
                      fractions=fractions, milestone_fractions=marks, milestones_s=times_to, milestone_of=shares_of,
                      transformable=held.transformable, austenite_carbon=carbon, martensite_start_K=start,
                      critical_K=dict(alloy.critical_K), warnings=tuple(alloy.warnings), inputs=alloy.inputs, provenance=dict(alloy.provenance))


def _bracketed_root(total, sloped, a, b, target, idx):
    """Vectorised root of total(e^u) = target in u = ln t on [a, b], per point, to 1e-9 in
    ln t; points drop out as they converge. Returns u for every point.

    Newton steps on the slope where ``total`` gives one (``sloped``: ``total(t, idx, slope=True)``), each
    kept inside the bracket that the signs of the residuals shrink, else a bisection;
    without a slope, Illinois regula falsi. An end that meets the target to rounding is the
    root; an upper end that falls short by rounding (a bracket from one product alone, exact
    in theory) is moved up until it holds.
    """
    u = b.copy()
    a, b, target = a[idx], b[idx], target[idx]
    fa, fb = total(np.exp(a), idx) - target, total(np.exp(b), idx) - target
    tiny = 1e-12 * np.maximum(target, 1e-300)
    for _ in range(60):
        short = (fb < -tiny) & (fa < -tiny)
        if not short.any():
            break
        a, fa = np.where(short, b, a), np.where(short, fb, fa)
        b = np.where(short, b + 0.1, b)
        fb = np.where(short, total(np.exp(b), idx) - target, fb)
    at_end = (np.abs(fb) <= tiny) | (np.abs(fa) <= tiny)
    u[idx] = np.where(np.abs(fa) <= tiny, a, b)
    going = ~at_end
    idx, a, b, fa, fb, target = idx[going], a[going], b[going], fa[going], fb[going], target[going]
    if idx.size == 0:
        return u
    if not sloped:
        return _illinois(total, a, b, fa, fb, target, idx, u)
    with np.errstate(divide="ignore", invalid="ignore"):
        x = np.where(fb != fa, b - fb * (b - a) / (fb - fa), 0.5 * (a + b))
    x = np.where(np.isfinite(x) & (x > a) & (x < b), x, 0.5 * (a + b))
    low, high = a, b  # a < b; the total grows with time: below the root the residual is negative
    for _ in range(_ROOT_STEPS):
        if idx.size == 0:
            break
        f, df = total(np.exp(x), idx, slope=True)
        f = f - target
        below = f < 0.0
        low, high = np.where(below, x, low), np.where(below, high, x)
        with np.errstate(divide="ignore", invalid="ignore"):
            step = x - f / df
        inside = np.isfinite(step) & (step >= low) & (step <= high)  # a root found lands on an end
        x_new = np.where(f == 0.0, x, np.where(inside, step, 0.5 * (low + high)))
        u[idx] = x_new
        going = (np.abs(x_new - x) >= 1e-9) & (f != 0.0)
        idx, x, low, high, target = idx[going], x_new[going], low[going], high[going], target[going]
    return u


def _illinois(total, a, b, fa, fb, target, idx, u):
    """Illinois regula falsi on the brackets of :func:`_bracketed_root` (no slope given)."""
    for _ in range(_ROOT_STEPS):
        if idx.size == 0:
            break
        with np.errstate(divide="ignore", invalid="ignore"):
            c = np.where(fb != fa, b - fb * (b - a) / (fb - fa), 0.5 * (a + b))
        c = np.where(np.isfinite(c) & (np.minimum(a, b) <= c) & (c <= np.maximum(a, b)), c, 0.5 * (a + b))
        step = np.abs(c - b)
        fc = total(np.exp(c), idx) - target
        flip = fc * fb < 0.0
        a, fa = np.where(flip, b, a), np.where(flip, fb, 0.5 * fa)
        b, fb = c, fc
        u[idx] = b
        going = (step >= 1e-9) & (fb != 0.0)
        idx, a, b, fa, fb, target = idx[going], a[going], b[going], fa[going], fb[going], target[going]
    return u
