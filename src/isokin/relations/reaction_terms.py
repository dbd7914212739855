"""The sigmoidal reaction terms S(X) of Kirkaldy's family of steel models, and their inverses.

Kirkaldy & Venugopalan (1984) and Li et al. (1998) write the isothermal time to reach a
fraction X of a product as a temperature-and-composition factor times

    S(X) = integral from 0 to X of exp(c x**2) dx / (x**(p (1 - x)) * (1 - x)**(p x)),

with p = 2/3 in Kirkaldy & Venugopalan (c = 0 for ferrite and pearlite; for bainite c grows
with the alloy content, so that its reaction slows as it proceeds) and p = 0.4, c = 0 in
Li et al. (1998). The integral has no closed form and integrable singularities at both ends
(the integrand behaves as x**-p near 0 and as (1 - x)**-p near 1).

The integral is split at X = 1/2. Below it, from its singular end,

    L(y) = integral from 0 to y of exp(c x**2) f(x) dx               (X = y <= 1/2),

with f(x) = x**-(p (1 - x)) (1 - x)**-(p x) = f(1 - x), integrated by a fixed tanh-sinh
(double-exponential) rule, which keeps exponential convergence for the algebraic end
singularity: 73 nodes give close to machine precision without any adaptive step. Above it,
with y = 1 - X and G(y) = integral from 0 to y of exp(c (1 - x)**2) f(x) dx (the same rule),

    S(X) = S(1) - G(y)         while G(y) <= G(1/2) / 2 (towards completion), else
    S(X) = L(1/2) + M(y),      M(y) = integral from y to 1/2 of exp(c (1 - x)**2) f(x) dx,

so S is never the difference of two large integrals: with a strong retardation G(1/2) grows
as exp(c), far beyond S just above 1/2. M is integrated in w = x**(1 - p), where the integrand
exp(c (1 - x)**2) (x / (1 - x))**(p x) / (1 - p) is bounded, by the same rule on three equal
parts of [w(y), w(1/2)] (enough for the steep exponential of c up to 45). With c = 0 the two
halves are one (S(X) = 2 L(1/2) - L(1 - X), no loss either).

For one value of c, L and S above 1/2 are tabulated once (4097 values of y, clustered
towards 0) and read by cubic Hermite interpolation in w = y**(1 - p) (where S is close to
linear) with the exact slope, in both directions, with no quadrature or root finding per
value. For an array of c (a batch of steels, each with its own), each value is integrated
directly and inverted by safeguarded Newton steps. Precision against mpmath (the tests hold
these bounds): the direct path about 1e-14 relative, 1e-12 up to c = 45; the table about
1e-13 for |c| <= 4, but just above X = 1/2, where exp(c (1 - x)**2) is steepest against its
cubic steps, 4e-11 at c = 12 and 1e-8 at c = 43 (a 27 % Cr steel, far beyond any
calibration), below anything a transformation time can mean.

References: J. S. Kirkaldy and D. Venugopalan, "Prediction of microstructure and
hardenability in low alloy steels", in Phase Transformations in Ferrous Alloys, A. R. Marder
and J. I. Goldstein (eds.), TMS-AIME (1984) 125-148; M. V. Li, D. V. Niebuhr, L. L. Meekisho
and D. G. Atteridge, Metall. Mater. Trans. B 29 (1998) 661-672.
"""

from __future__ import annotations

from functools import lru_cache

import numpy as np

# Step and half-width of the tanh-sinh rule in its own variable t. Near x = 0 the mapped
# integrand decays like exp((1 - p) pi sinh t), below 1e-17 of the total at |t| = 3.8 for
# p = 0.4 and at |t| = 4.3 for p = 2/3; 4.5 leaves margin. The mapped integrand is analytic
# in a wide strip around the real t axis, so a step of 1/8 (73 nodes) reaches ~1e-15; the
# tests hold it to 1e-12 against mpmath.
_STEP = 1.0 / 8.0
_HALF_WIDTH = 4.5
#: Values of y per tabulated piece, and inverse buckets per interval.
TABLE_NODES = 4097
_BUCKETS_PER_INTERVAL = 4


def _tanh_sinh_rule() -> tuple[np.ndarray, np.ndarray]:
    """Nodes u in (0, 1) and weights of the tanh-sinh rule for integrals over (0, 1)."""
    t = np.arange(-_HALF_WIDTH, _HALF_WIDTH + 0.5 * _STEP, _STEP)
    s = np.pi * np.sinh(t)
    # u = 1 / (1 + exp(-s)) keeps full relative precision of u near 0, where the singular
    # factor x**-p is evaluated, and so does 1 - u = 1 / (1 + exp(s)) in the weights;
    # |s| <= pi sinh(4.5) ~ 141, so neither exponential overflows.
    u = 1.0 / (1.0 + np.exp(-s))
    weights = _STEP * np.pi * np.cosh(t) * u / (1.0 + np.exp(s))
    keep = weights > 0.0
    return u[keep], weights[keep]


_NODES, _WEIGHTS = _tanh_sinh_rule()


def _log_symmetric(x, one_minus_x, p):
    """ln of 1 / (x**(p (1 - x)) (1 - x)**(p x))."""
    return -p * (one_minus_x * np.log(x) + x * np.log(one_minus_x))


def piece(y, p, c=0.0, mirrored=False):
    """L(y) (or G(y) with ``mirrored``) for 0 <= y <= 1/2 by the fixed rule after x = y u;
    ``c`` broadcasts with ``y``."""
    y = np.asarray(y, dtype=float)
    c = np.asarray(c, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        x = y[..., np.newaxis] * _NODES
        # x <= 1/2 here, so 1 - x loses no precision to cancellation.
        log_value = _log_symmetric(x, 1.0 - x, p)
        if np.any(c != 0.0):
            log_value = log_value + c[..., np.newaxis] * ((1.0 - x) if mirrored else x) ** 2
        values = np.exp(log_value)
    return y * np.sum(np.where(x > 0.0, values, 0.0) * _WEIGHTS, axis=-1)


#: Equal parts of [w(y), w(1/2)] the rule covers for M.
_TAIL_PARTS = 3
_TAIL_NODES = ((np.arange(_TAIL_PARTS)[:, np.newaxis] + _NODES) / _TAIL_PARTS).ravel()
_TAIL_WEIGHTS = np.tile(_WEIGHTS / _TAIL_PARTS, _TAIL_PARTS)


def tail(y, p, c=0.0):
    """M(y) = integral from y to 1/2 of exp(c (1 - x)**2) f(x) dx = S(1 - y) - S(1/2), for
    0 <= y <= 1/2, in w = x**(1 - p); ``c`` broadcasts with ``y``."""
    y = np.asarray(y, dtype=float)
    c = np.asarray(c, dtype=float)
    k = 1.0 - p
    top = 0.5**k
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        width = -top * np.expm1(k * np.log(2.0 * y))  # w(1/2) - w(y), no cancellation near 1/2
        w = (top - width)[..., np.newaxis] + width[..., np.newaxis] * _TAIL_NODES
        x = w ** (1.0 / k)
        log_value = c[..., np.newaxis] * (1.0 - x) ** 2 + p * x * (np.log(x) - np.log1p(-x))
        values = np.exp(np.where(x > 0.0, log_value, c[..., np.newaxis]))
    return width / k * np.sum(values * _TAIL_WEIGHTS, axis=-1)


def _above_half(y, p, c, lower_half, upper_half):
    """S(1 - y) for 0 <= y <= 1/2 from L(1/2) and G(1/2): S(1) - G(y) where G(y) is at most
    half of G(1/2), else L(1/2) + M(y) (evaluated only there)."""
    G = piece(y, p, c, mirrored=True)
    near_end = G <= 0.5 * upper_half
    out = lower_half + upper_half - G
    if not np.all(near_end):
        far = ~near_end
        out[far] = lower_half[far] + tail(y[far], p, c[far])
    return out


def _dw_ds(y, p, c=0.0, mirrored=False):
    """Slope dw/dS of a piece at y, w = y**(1 - p): (1 - p) y**(-p y) (1 - y)**(p y) / exp(c ...)."""
    y = np.asarray(y, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        log_value = -p * y * np.log(y) + p * y * np.log1p(-y) - c * ((1.0 - y) if mirrored else y) ** 2
    return (1.0 - p) * np.exp(np.where(y > 0.0, log_value, -c * (1.0 if mirrored else 0.0)))


class _Cubic:
    """Cubic Hermite interpolation of ys(xs) with given slopes (xs ascending), as per-interval
    polynomials in the local coordinate, evaluated by Horner's rule; ``interval`` gives each
    query's interval where the caller knows it (no search)."""

    def __init__(self, xs, ys, slopes):
        h = np.diff(xs)
        # A zero-width interval (a piece so retarded that its value stops changing in double
        # precision) reads as its start value.
        self.xs, self.inverse_h = xs, np.divide(1.0, h, out=np.zeros_like(h), where=h > 0.0)
        self.c0, self.c1 = ys[:-1], h * slopes[:-1]
        self.c2 = 3.0 * (ys[1:] - ys[:-1]) - h * (2.0 * slopes[:-1] + slopes[1:])
        self.c3 = 2.0 * (ys[:-1] - ys[1:]) + h * (slopes[:-1] + slopes[1:])

    def __call__(self, xq, interval=None):
        k = np.clip(np.searchsorted(self.xs, xq) - 1, 0, self.xs.size - 2) if interval is None else interval
        u = (xq - self.xs.take(k)) * self.inverse_h.take(k)
        return self.c0.take(k) + u * (self.c1.take(k) + u * (self.c2.take(k) + u * self.c3.take(k)))


class _Grid:
    """Values of y in [0, 1/2] equally spaced in v = y**((1 - p) / 3), so w = v**3 = y**(1 - p)
    and a value's interval is floor(v / v_max * intervals), with no search."""

    def __init__(self, p, nodes):
        self.p = p
        self.k = (1.0 - p) / 3.0
        v_max = 0.5**self.k
        self.w = v_max**3 * np.linspace(0.0, 1.0, nodes) ** 3
        self.y = self.w ** (1.0 / (1.0 - p))
        self.intervals = nodes - 1
        self.v_scale = self.intervals / v_max

    def _located(self, y):
        """w = y**(1 - p) and its interval."""
        v = y**self.k
        return v * v * v, np.minimum((v * self.v_scale).astype(np.intp), self.intervals - 1)


class PieceTable(_Grid):
    """L, the piece below X = 1/2, tabulated on y in [0, 1/2] for one p and c.

    For the inverse, buckets equally spaced in (S / S(1/2))**(1/3), where the nodes are close
    to equally spaced too: a bucket's first interval and a pass or two of one comparison give
    the interval (the passes needed are counted when the table is built).
    """

    def __init__(self, p, c=0.0, nodes=TABLE_NODES):
        super().__init__(p, nodes)
        self.S = piece(self.y, p, c)
        slope = _dw_ds(self.y, p, c)
        self.half = float(self.S[-1])
        self.S_of_w = _Cubic(self.w, self.S, 1.0 / slope)
        self.w_of_S = _Cubic(self.S, self.w, slope)
        self.buckets = _BUCKETS_PER_INTERVAL * self.intervals
        edges = self.half * (np.arange(self.buckets + 1) / self.buckets) ** 3
        self.bucket_start = np.clip(np.searchsorted(self.S, edges, side="right") - 1, 0, self.intervals - 1)
        occupancy = np.bincount(np.minimum((np.cbrt(self.S / self.half) * self.buckets).astype(np.intp),
                                           self.buckets - 1), minlength=self.buckets)
        self.passes = max(int(occupancy.max()), 1)

    def forward(self, y):
        """The piece at y (0 <= y <= 1/2), each y's interval found by arithmetic."""
        return self.S_of_w(*self._located(y))

    def inverse(self, s):
        """y at which the piece reaches s (0 <= s <= its value at 1/2), the interval found by buckets."""
        j = np.minimum((np.cbrt(s / self.half) * self.buckets).astype(np.intp), self.buckets - 1)
        k = self.bucket_start.take(j)
        for _ in range(self.passes):
            k = np.minimum(k + (s >= self.S.take(k + 1)), self.intervals - 1)
        return np.clip(self.w_of_S(s, k), 0.0, None) ** (1.0 / (1.0 - self.p))


class UpperTable(_Grid):
    """S(1 - y) above X = 1/2 for one p and c != 0, tabulated on y in [0, 1/2] from L(1/2)
    (see the module notes: no difference of large integrals). S falls as y grows; the
    inverse finds its interval by binary search."""

    def __init__(self, p, c, lower_half, nodes=TABLE_NODES):
        super().__init__(p, nodes)
        full = np.full(self.y.shape, 1.0)
        upper_half = float(piece(0.5, p, c, mirrored=True))
        self.S = _above_half(self.y, p, c * full, lower_half * full, upper_half * full)
        self.complete = lower_half + upper_half
        self.S[0], self.S[-1] = self.complete, lower_half
        slope = -_dw_ds(self.y, p, c, mirrored=True)  # dw/dS
        self.S_of_w = _Cubic(self.w, self.S, 1.0 / slope)
        self.rising_S = self.S[::-1].copy()
        self.w_of_S = _Cubic(self.rising_S, self.w[::-1].copy(), slope[::-1].copy())

    def forward(self, y):
        """S(1 - y) for 0 <= y <= 1/2, each y's interval found by arithmetic."""
        return self.S_of_w(*self._located(y))

    def inverse(self, S):
        """y at which S(1 - y) = S (S(1/2) <= S <= S(1))."""
        k = np.clip(np.searchsorted(self.rising_S, S, side="right") - 1, 0, self.intervals - 1)
        return np.clip(self.w_of_S(S, k), 0.0, None) ** (1.0 / (1.0 - self.p))


def _check_fractions(X):
    X = np.asarray(X, dtype=float)
    if not np.all((X >= 0.0) & (X <= 1.0)):
        raise ValueError("transformed fraction X must lie in [0, 1]")
    return X


def _out(values):
    return values if values.ndim else float(values)


class ReactionTerm:
    """S(X) for one exponent p and one retardation c, tabulated (see the module docstring).

    Parameters
    ----------
    exponent : float
        p of x**(p (1 - x)) (1 - x)**(p x), 0 < p < 1 (dimensionless).
    retardation : float, optional
        c of exp(c x**2) (dimensionless); 0 for a reaction that keeps its pace.

    Examples
    --------
    >>> li = ReactionTerm(0.4)
    >>> round(li(0.5), 10) == round(li.complete / 2, 10)
    True
    >>> round(float(li.inverse(li(0.3))), 12)
    0.3
    """

    def __init__(self, exponent, retardation=0.0):
        self.p, self.c = float(exponent), float(retardation)
        self.lower = PieceTable(self.p, self.c)
        self.half = self.lower.half
        #: None where c = 0: the upper half is the lower one mirrored.
        self.upper = None if self.c == 0.0 else UpperTable(self.p, self.c, self.half)
        self.complete = 2.0 * self.half if self.upper is None else self.upper.complete

    def __call__(self, X):
        """S(X), same shape as X; ValueError unless every X lies in [0, 1]."""
        X = _check_fractions(X)
        upper = X > 0.5
        y = np.where(upper, 1.0 - X, X)
        if self.upper is None:
            piece_value = self.lower.forward(y)
            values = np.where(upper, self.complete - piece_value, piece_value)
        else:  # each half's table only on its own values
            values = np.empty(y.shape)
            values[upper] = self.upper.forward(y[upper])
            values[~upper] = self.lower.forward(y[~upper])
        return _out(values)

    def inverse(self, S):
        """X at which S(X) reaches S; ValueError unless every S lies in [0, S(1)]."""
        S = np.asarray(S, dtype=float)
        if not np.all((S >= 0.0) & (S <= self.complete)):
            raise ValueError(f"reaction term S must lie in [0, {self.complete:.6f}]")
        upper = S > self.half
        if self.upper is None:
            y = self.lower.inverse(np.where(upper, self.complete - S, S))
        else:
            y = np.empty(S.shape)
            y[upper] = self.upper.inverse(S[upper])
            y[~upper] = self.lower.inverse(S[~upper])
        return _out(np.where(upper, 1.0 - y, y))

    def rate_shape(self, X):
        """1 / (dS/dX) = x**(p (1 - x)) (1 - x)**(p x) exp(-c x**2); 0 at and outside the ends."""
        return rate_shape(X, self.p, self.c)


@lru_cache(maxsize=64)
def reaction_term(exponent, retardation=0.0) -> ReactionTerm:
    """The tabulated :class:`ReactionTerm` of one (p, c), built once and kept."""
    return ReactionTerm(exponent, retardation)


def rate_shape(X, p, c=0.0):
    """x**(p (1 - x)) (1 - x)**(p x) exp(-c x**2) = 1 / (dS/dX); 0 at X = 0, X = 1 and outside.

    >>> float(rate_shape(0.0, 0.4)), float(rate_shape(1.0, 2 / 3))
    (0.0, 0.0)
    """
    X = np.asarray(X, dtype=float)
    inside = (X > 0.0) & (X < 1.0)
    Xs = np.where(inside, X, 0.5)
    value = np.where(inside, np.exp(-_log_symmetric(Xs, 1.0 - Xs, p) - np.asarray(c) * Xs * Xs), 0.0)
    return _out(value)


def _uniform(c):
    c = np.asarray(c, dtype=float)
    return c.size == 0 or bool(np.all(c == c.flat[0]))


def _pieces_at_half(p, c):
    """L(1/2) and G(1/2) for every c, computed once per distinct value."""
    distinct, index = np.unique(c.ravel(), return_inverse=True)
    lower = piece(np.full(distinct.shape, 0.5), p, distinct)[index].reshape(c.shape)
    upper = piece(np.full(distinct.shape, 0.5), p, distinct, mirrored=True)[index].reshape(c.shape)
    return lower, upper


def _side_values(y, upper, p, c, lower_half, upper_half):
    """L(y) where not ``upper``, S(1 - y) where ``upper`` (flat arrays of one shape)."""
    out = np.empty(y.shape)
    below = ~upper
    if below.any():
        out[below] = piece(y[below], p, c[below])
    if upper.any():
        out[upper] = _above_half(y[upper], p, c[upper], lower_half[upper], upper_half[upper])
    return out


def values(X, p, c=0.0):
    """S(X) with c an array broadcasting with X (each value its own c), by direct quadrature
    (through the table where all c are equal).

    >>> X = np.array([0.2, 0.9]); c = np.array([0.0, 3.0])
    >>> bool(np.allclose(values(X, 2 / 3, c), [reaction_term(2 / 3, 0.0)(0.2), reaction_term(2 / 3, 3.0)(0.9)]))
    True
    """
    X = _check_fractions(X)
    c = np.asarray(c, dtype=float)
    if _uniform(c):
        return np.broadcast_to(reaction_term(p, float(c.flat[0]) if c.size else 0.0)(X),
                               np.broadcast_shapes(X.shape, c.shape)).copy()
    X, c = (np.array(a, dtype=float) for a in np.broadcast_arrays(X, c))
    upper = X > 0.5
    lower_half, upper_half = _pieces_at_half(p, c)
    return _side_values(np.where(upper, 1.0 - X, X).ravel(), upper.ravel(), p, c.ravel(),
                        lower_half.ravel(), upper_half.ravel()).reshape(X.shape)


#: Newton steps of the direct inverse at most (each within a shrinking bracket; 1e-15 of the
#: range is reached in about six).
_NEWTON_STEPS = 40


def inverse_values(S, p, c=0.0):
    """X at which S(X; c) reaches S, with c an array broadcasting with S: safeguarded Newton
    steps in w = y**(1 - p) on the direct quadrature (through the table where all c are equal).

    >>> c = np.array([0.0, 3.0]); X = np.array([0.2, 0.9])
    >>> bool(np.allclose(inverse_values(values(X, 2 / 3, c), 2 / 3, c), X, rtol=1e-12))
    True
    """
    S = np.asarray(S, dtype=float)
    c = np.asarray(c, dtype=float)
    if _uniform(c):
        return np.broadcast_to(reaction_term(p, float(c.flat[0]) if c.size else 0.0).inverse(S),
                               np.broadcast_shapes(S.shape, c.shape)).copy()
    S, c = (np.array(a, dtype=float) for a in np.broadcast_arrays(S, c))
    lower_half, upper_half = _pieces_at_half(p, c)
    complete = lower_half + upper_half
    if not np.all((S >= 0.0) & (S <= complete * (1.0 + 1e-12))):
        raise ValueError("reaction term S must lie in [0, S(1)] of each member")
    shape = S.shape
    S, c, lower_half, upper_half = S.ravel(), c.ravel(), lower_half.ravel(), upper_half.ravel()
    upper = S > lower_half
    # distance to the piece's singular end, and leading order S ~ exp(c (0 or 1)) w / (1 - p) there
    distance = np.where(upper, np.maximum(lower_half + upper_half - S, 0.0), S)
    top = 0.5 ** (1.0 - p)
    w = np.clip((1.0 - p) * distance * np.exp(-np.where(upper, c, 0.0)), 0.0, top)
    lo, hi = np.zeros(w.shape), np.full(w.shape, top)
    active = np.flatnonzero(distance > 0.0)
    w[distance <= 0.0] = 0.0
    for _ in range(_NEWTON_STEPS):
        if active.size == 0:
            break
        wa, ca, ua = w[active], c[active], upper[active]
        y = wa ** (1.0 / (1.0 - p))
        value = _side_values(y, ua, p, ca, lower_half[active], upper_half[active])
        f = np.where(ua, S[active] - value, value - S[active])  # rises with w on both sides
        lo[active] = np.where(f <= 0.0, wa, lo[active])
        hi[active] = np.where(f >= 0.0, wa, hi[active])
        dw_ds = np.empty(y.shape)
        for mirrored in (False, True):
            mine = ua == mirrored
            dw_ds[mine] = _dw_ds(y[mine], p, ca[mine], mirrored)
        step = wa - f * dw_ds
        inside = (step >= lo[active]) & (step <= hi[active])  # a converged step lands on an end
        w_new = np.where(inside, step, 0.5 * (lo[active] + hi[active]))
        w[active] = w_new
        active = active[(np.abs(w_new - wa) > 1e-15 * top) & (f != 0.0)]
    y = (w ** (1.0 / (1.0 - p))).reshape(shape)
    return np.where(upper.reshape(shape), 1.0 - y, y)
