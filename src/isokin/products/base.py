"""The interface every transformation product meets, and the batch rule they share.

A product is anything that can tell, at each temperature, how long an isothermal hold takes
to reach a transformed fraction and how fast it transforms at a given fraction. The
classical nucleation-growth model and the empirical steel models both implement it, so the
solvers, plotting and export never ask which one they hold. Martensite, which forms on
cooling and not in time, meets the smaller :class:`AthermalProduct`.

Batches
-------
A product may hold a batch of parameter sets (compositions, fitted parameters, samples):
its ``batch_shape`` is then not ``()``, and every parameter is an array of that shape. Its
methods put the batch axes first: a query (``T_K``, ``X``) of ``q`` dimensions is laid
out as ``batch_shape + shape[b:]`` when ``q`` exceeds the batch's ``b`` dimensions, so

- ``T_K`` of shape ``(1,) * b + (N,)`` gives results ``batch_shape + (N,)`` (one grid for
  every member), and
- ``T_K`` of shape ``batch_shape + (F,)`` gives one temperature per member and point.

A query of ``b`` dimensions or fewer broadcasts against the batch as numpy would.
"""

from __future__ import annotations

from typing import Protocol, runtime_checkable

import numpy as np


def batch_leading(value, batch_ndim: int, query_ndim: int):
    """``value`` (of batch shape) with trailing unit axes, so that the batch leads a query.

    >>> batch_leading(np.zeros(5), 1, 3).shape
    (5, 1, 1)
    >>> batch_leading(np.float64(2.0), 0, 2).shape
    (1, 1)
    """
    value = np.asarray(value)
    extra = query_ndim - batch_ndim
    return value.reshape(value.shape + (1,) * extra) if extra > 0 else value


def answer_shape(batch_shape: tuple, T, query_ndim: int) -> tuple:
    """The shape of a product's answer to a query T of ``query_ndim`` dimensions, the batch leading.

    >>> answer_shape((3,), np.zeros((1, 5)), 2)
    (3, 5)
    """
    return np.broadcast_shapes(np.shape(T), tuple(batch_shape) + (1,) * max(query_ndim - len(batch_shape), 0))


def record(value):
    """A float for a single value, a list for a batch: as a JSON record writes it.

    >>> record(np.array(3.0)), record([1.0, 2.0])
    (3.0, [1.0, 2.0])
    """
    value = np.asarray(value, dtype=float)
    return float(value) if value.ndim == 0 else value.tolist()


def plain(value):
    """A float for a single parameter set, the array for a batch.

    >>> plain(np.array(3.0)), plain(np.array([1.0, 2.0])).shape
    (3.0, (2,))
    """
    return float(value) if np.ndim(value) == 0 else np.asarray(value)


def writeable(values, shape):
    """``values`` as a float array of exactly ``shape`` that may be written in place: itself
    where it already is one (a fresh result), else a broadcast copy.

    >>> writeable(np.float64(2.0), (2, 3)).shape
    (2, 3)
    """
    values = np.asarray(values, dtype=float)
    if values.shape == tuple(shape) and values.flags.writeable:
        return values
    return np.array(np.broadcast_to(values, shape))


def as_query(*queries):
    """The query arrays as floats of one number of dimensions (unit axes prepended), and it.

    >>> T, X, q = as_query(900.0, [0.01, 0.5])
    >>> T.shape, X.shape, q
    ((1,), (2,), 1)
    """
    arrays = [np.asarray(a, dtype=float) for a in queries]
    q = max(a.ndim for a in arrays)
    return (*(a.reshape((1,) * (q - a.ndim) + a.shape) for a in arrays), q)


@runtime_checkable
class Product(Protocol):
    """A product that forms in time at a temperature (ferrite, pearlite, bainite, precipitate, ...).

    Attributes
    ----------
    name : str
        Trade name of the product.
    model : str
        Short name of the model and its source, for figure footers and the JSON summary.
    batch_shape : tuple of int
        Shape of the batch of parameter sets; ``()`` for one.
    upper_K : float or ndarray
        The product cannot form at or above this temperature (equilibrium or start
        temperature); of batch shape.
    lower_K : float or ndarray
        The product is not formed below this temperature (for example Ms); 0 when unbounded.
    separable : bool
        True where the time separates as t = F(T) S(X) with one S for the whole batch (then
        :meth:`time_factor`, :meth:`reaction_term` and :meth:`reaction_term_inverse` give F,
        S and S^-1).
    capped : bool
        True where the product stops at an equilibrium share of the parent below all of it
        (proeutectoid ferrite: :meth:`equilibrium_fraction`).
    calibration_parameters : dict of str to float
        The parameters a calibration may vary and their current values (a factor is
        relative to the product as it is, 1).
    default_calibration : tuple of str
        Those a calibration varies unless told otherwise.
    """

    name: str
    model: str

    @property
    def batch_shape(self) -> tuple: ...

    @property
    def upper_K(self) -> float | np.ndarray: ...

    @property
    def lower_K(self) -> float | np.ndarray: ...

    @property
    def separable(self) -> bool: ...

    @property
    def capped(self) -> bool: ...

    @property
    def calibration_parameters(self) -> dict: ...

    def varied(self, values: dict, batch_shape=()):
        """A copy with calibration parameters set (``{"factor": 2.0}``; arrays give a batch of
        parameter sets) and broadcast to ``batch_shape``."""
        ...

    def equilibrium_fraction(self, T_K) -> np.ndarray:
        """Share of the parent it reaches at completion at T_K (1 unless :attr:`capped`;
        batch axes lead)."""
        ...

    def time_to_fraction(self, T_K, X) -> np.ndarray:
        """Seconds of isothermal hold at T_K to reach fraction X (0 < X < 1); ``inf`` where
        the product cannot form. Batch axes lead (see the module docstring)."""
        ...

    def rate(self, T_K, X) -> np.ndarray:
        """dX/dt in 1/s at temperature T_K and fraction X; 0 where it cannot form."""
        ...

    def fraction_after(self, T_K, t_s) -> np.ndarray:
        """Fraction X of its own completion after an isothermal hold of t_s seconds at T_K;
        0 where it cannot form (the inverse of :meth:`time_to_fraction`)."""
        ...

    def time_factor(self, T_K) -> np.ndarray:
        """F(T) in s of t = F(T) S(X) (after any incubation); ``inf`` where the product cannot form."""
        ...

    def incubation_s(self, T_K) -> np.ndarray:
        """Incubation time at T_K, s, before growth starts (0 where there is none); along a
        path its Scheil sum decides when growth begins."""
        ...

    def reaction_term(self, X) -> np.ndarray:
        """S(X) of t = F(T) S(X), dimensionless."""
        ...

    def reaction_term_inverse(self, S) -> np.ndarray:
        """X at which S(X) reaches S."""
        ...

    def reaction_rate_shape(self, X) -> np.ndarray:
        """dX/dS, so that dX/dt = reaction_rate_shape(X) / F(T) (0 at X = 0 and X = 1)."""
        ...


@runtime_checkable
class AthermalProduct(Protocol):
    """A product that forms on cooling below a start temperature, not in time (martensite)."""

    name: str
    model: str

    @property
    def upper_K(self) -> float | np.ndarray:
        """Start temperature (Ms), K."""
        ...

    def fraction(self, T_K) -> np.ndarray:
        """Fraction of the parent transformed on reaching T_K from above the start."""
        ...

    def temperature_for_fraction(self, fraction) -> np.ndarray:
        """Temperature, K, at which the fraction is reached."""
        ...


@runtime_checkable
class ReportsNucleus(Protocol):
    """A product of classical nucleation that can tabulate its critical nucleus."""

    name: str

    def nucleus_table(self, undercoolings_K) -> dict:
        """Undercooling (K), r* (m), dG* (J), dG*/kT and ln I at undercoolings below its upper temperature."""
        ...
