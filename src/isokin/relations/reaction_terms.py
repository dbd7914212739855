"""The sigmoidal reaction terms S(X) of Kirkaldy's family of steel models, and their inverses.

Kirkaldy & Venugopalan (1984) and Li et al. (1998) write the isothermal time to reach a
fraction X of a product as a temperature-and-composition factor times

    S(X) = integral from 0 to X of exp(c x**2) dx / (x**(p (1 - x)) * (1 - x)**(p x)),

with p = 2/3 in Kirkaldy & Venugopalan (c = 0 for ferrite and pearlite; for bainite c grows
with the alloy content, so that its reaction slows as it proceeds) and p = 0.4, c = 0 in
Li et al. (1998). The integral has no closed form and integrable singularities at both ends
(the integrand behaves as x**-p near 0 and as (1 - x)**-p near 1).

The integral is split at X = 1/2 into two pieces, each integrated from its singular end:

    L(y) = integral from 0 to y of exp(c x**2) f(x) dx               (X = y <= 1/2)
    G(y) = integral from 0 to y of exp(c (1 - x)**2) f(x) dx          (X = 1 - y > 1/2)

so S(X) = L(X) below 1/2 and S(X) = L(1/2) + G(1/2) - G(1 - X) above, where f(1 - x) = f(x)
is the symmetric part (with c = 0 the two pieces are one). Each piece is integrated by a
fixed tanh-sinh (double-exponential) rule, which keeps exponential convergence for the
algebraic end singularity: 73 nodes give close to machine precision without any adaptive
step. For one value of c a piece is tabulated once (4097 values of y, clustered towards 0)
and read by cubic Hermite interpolation in w = y**(1 - p) (where S is close to linear) with
the exact slope, in both directions: about 1e-14, with no quadrature or root finding per
value. For an array of c (a batch of steels, each with its own), each value is integrated
directly and inverted by safeguarded Newton steps.

Precision: about 1e-14 relative where c = 0. With a retardation, just above X = 1/2 the
value is L(1/2) + G(1/2) - G(1 - X), the difference of two integrals that grow as exp(c):
digits are lost as c grows (3e-13 relative at c = 4, 6e-11 at c = 12, 1e-9 at c = 16, the
tests hold these bounds), far below anything a transformation time can mean.

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
        self.xs, self.inverse_h = xs, 1.0 / h
        self.c0, self.c1 = ys[:-1], h * slopes[:-1]
        self.c2 = 3.0 * (ys[1:] - ys[:-1]) - h * (2.0 * slopes[:-1] + slopes[1:])
        self.c3 = 2.0 * (ys[:-1] - ys[1:]) + h * (slopes[:-1] + slopes[1:])

    def __call__(self, xq, interval=None):
        k = np.clip(np.searchsorted(self.xs, xq) - 1, 0, self.xs.size - 2) if interval is None else interval
        u = (xq - self.xs.take(k)) * self.inverse_h.take(k)
        return self.c0.take(k) + u * (self.c1.take(k) + u * (self.c2.take(k) + u * self.c3.take(k)))


class PieceTable:
    """One piece (L, or G when ``mirrored``) tabulated on y in [0, 1/2] for one p and c.

    The nodes are equally spaced in v = y**((1 - p) / 3), so w = v**3 = y**(1 - p) and a
    value's interval is floor(v / v_max * intervals), with no search. For the inverse,
    buckets equally spaced in (S / S(1/2))**(1/3), where the nodes are close to equally
    spaced too: a bucket's first interval and a pass or two of one comparison give the
    interval (the passes needed are counted when the table is built).
    """

    def __init__(self, p, c=0.0, mirrored=False, nodes=TABLE_NODES):
        self.p = p
        self.k = (1.0 - p) / 3.0
        v_max = 0.5**self.k
        self.w = v_max**3 * np.linspace(0.0, 1.0, nodes) ** 3
        self.y = self.w ** (1.0 / (1.0 - p))
        self.S = piece(self.y, p, c, mirrored)
        slope = _dw_ds(self.y, p, c, mirrored)
        self.intervals = nodes - 1
        self.v_scale = self.intervals / v_max
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
        v = y**self.k
        k = np.minimum((v * self.v_scale).astype(np.intp), self.intervals - 1)
        return self.S_of_w(v * v * v, k)

    def inverse(self, s):
        """y at which the piece reaches s (0 <= s <= its value at 1/2), the interval found by buckets."""
        j = np.minimum((np.cbrt(s / self.half) * self.buckets).astype(np.intp), self.buckets - 1)
        k = self.bucket_start.take(j)
        for _ in range(self.passes):
            k = np.minimum(k + (s >= self.S.take(k + 1)), self.intervals - 1)
        return np.clip(self.w_of_S(s, k), 0.0, None) ** (1.0 / (1.0 - self.p))


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
        self.upper = self.lower if self.c == 0.0 else PieceTable(self.p, self.c, mirrored=True)
        self.half = self.lower.half
        self.complete = self.half + self.upper.half

    def __call__(self, X):
        """S(X), same shape as X; ValueError unless every X lies in [0, 1]."""
        X = _check_fractions(X)
        upper = X > 0.5
        y = np.where(upper, 1.0 - X, X)
        if self.upper is self.lower:
            piece_value = self.lower.forward(y)
            values = np.where(upper, self.complete - piece_value, piece_value)
        else:
            values = np.where(upper, self.complete - self.upper.forward(np.where(upper, y, 0.0)),
                              self.lower.forward(np.where(upper, 0.0, y)))
        return _out(values)

    def inverse(self, S):
        """X at which S(X) reaches S; ValueError unless every S lies in [0, S(1)]."""
        S = np.asarray(S, dtype=float)
        if not np.all((S >= 0.0) & (S <= self.complete)):
            raise ValueError(f"reaction term S must lie in [0, {self.complete:.6f}]")
        upper = S > self.half
        s = np.where(upper, self.complete - S, S)
        if self.upper is self.lower:
            y = self.lower.inverse(s)
        else:
            y = np.where(upper, self.upper.inverse(np.where(upper, s, 0.0)),
                         self.lower.inverse(np.where(upper, 0.0, s)))
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


def _by_piece(function, y, upper, p, c):
    """``function(y, p, c, mirrored)`` evaluated once per value, on the piece it belongs to."""
    out = np.empty(y.shape)
    for mirrored in (False, True):
        mine = upper == mirrored
        if mine.any():
            out[mine] = function(y[mine], p, c[mine], mirrored)
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
    value = _by_piece(piece, np.where(upper, 1.0 - X, X), upper, p, c)
    return np.where(upper, lower_half + upper_half - value, value)


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
    upper = (S > lower_half).ravel()
    target = np.where(upper, np.maximum(complete.ravel() - S.ravel(), 0.0), S.ravel())
    c = c.ravel()
    top = 0.5 ** (1.0 - p)
    # leading order S ~ exp(c (0 or 1)) w / (1 - p) near the piece's singular end
    w = np.clip((1.0 - p) * target * np.exp(-np.where(upper, c, 0.0)), 0.0, top)
    lo, hi = np.zeros(w.shape), np.full(w.shape, top)
    active = np.flatnonzero(target > 0.0)
    w[target <= 0.0] = 0.0
    for _ in range(_NEWTON_STEPS):
        if active.size == 0:
            break
        wa, ca, ua = w[active], c[active], upper[active]
        y = wa ** (1.0 / (1.0 - p))
        f = _by_piece(piece, y, ua, p, ca) - target[active]
        lo[active] = np.where(f <= 0.0, wa, lo[active])
        hi[active] = np.where(f >= 0.0, wa, hi[active])
        step = wa - f * _by_piece(_dw_ds, y, ua, p, ca)
        inside = (step >= lo[active]) & (step <= hi[active])  # a converged step lands on an end
        w_new = np.where(inside, step, 0.5 * (lo[active] + hi[active]))
        w[active] = w_new
        active = active[(np.abs(w_new - wa) > 1e-15 * top) & (f != 0.0)]
    y = (w ** (1.0 / (1.0 - p))).reshape(shape)
    return np.where(upper.reshape(shape), 1.0 - y, y)
