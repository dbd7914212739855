"""Martensite: an athermal product, formed on cooling below Ms by Koistinen-Marburger."""

from __future__ import annotations

import numpy as np

from ..relations.steel_critical import (
    KOISTINEN_MARBURGER_ALPHA_PER_K,
    martensite_fraction_koistinen_marburger_1959,
    temperature_for_martensite_fraction_koistinen_marburger_1959,
)
from .base import as_query, batch_leading, plain


class Martensite:
    """Athermal martensite below Ms: f = 1 - exp(-alpha (Ms - T)) of the austenite present.

    Parameters
    ----------
    ms_K : float or array_like
        Martensite start temperature, K (one steel or a batch).
    alpha_per_K : float or array_like, optional
        Koistinen-Marburger rate constant, 1/K (default 0.011).
    ms_method : str, optional
        The correlation that gave Ms, for the record.
    ms_of_carbon : callable, optional
        ``ms_of_carbon(carbon)``: Ms (K) of the austenite with that carbon (mass %, batch
        leading) and the steel's other elements, by the same correlation; the martensite of
        austenite enriched in carbon forms below that Ms.

    Examples
    --------
    >>> m = Martensite(573.15)
    >>> round(float(m.fraction(473.15)), 4), round(float(m.temperature_for_fraction(0.5)), 2)
    (0.6671, 510.14)
    """

    name = "martensite"
    model = "Koistinen-Marburger (1959), Acta Metall. 7, 59-60"

    def __init__(self, ms_K, alpha_per_K=KOISTINEN_MARBURGER_ALPHA_PER_K, ms_method="", ms_of_carbon=None):
        ms = np.asarray(ms_K, dtype=float)
        alpha = np.asarray(alpha_per_K, dtype=float)
        self._batch_shape = np.broadcast_shapes(ms.shape, alpha.shape)
        self._ms = np.broadcast_to(ms, self._batch_shape)
        self._alpha = np.broadcast_to(alpha, self._batch_shape)
        self.ms_method = ms_method
        self.ms_of_carbon = ms_of_carbon

    @property
    def batch_shape(self):
        return self._batch_shape

    @property
    def upper_K(self):
        """Ms, K."""
        return plain(self._ms)

    @property
    def alpha_per_K(self):
        return plain(self._alpha)

    def _leading(self, q):
        b = len(self._batch_shape)
        return batch_leading(self._ms, b, q), batch_leading(self._alpha, b, q)

    def fraction(self, T_K, austenite_carbon=None):
        """Fraction of the austenite present at Ms that is martensite at T_K (batch axes lead);
        with ``austenite_carbon`` (mass %, broadcasting with T_K), from the Ms of austenite of
        that carbon."""
        if austenite_carbon is None:
            T, q = as_query(T_K)
        else:
            T, _, q = as_query(T_K, austenite_carbon)
        ms, alpha = self._leading(q)
        if austenite_carbon is not None:
            ms = self.start_for_carbon(austenite_carbon)
        return martensite_fraction_koistinen_marburger_1959(T, ms, alpha)

    def start_for_carbon(self, austenite_carbon):
        """Ms (K) of the austenite with this carbon (batch leading); the steel's own Ms where
        no correlation in carbon was given."""
        c, q = as_query(austenite_carbon)
        if self.ms_of_carbon is None:
            return np.broadcast_to(self._leading(q)[0], np.broadcast_shapes(c.shape, self._leading(q)[0].shape))
        return np.maximum(self.ms_of_carbon(c), 0.0)

    def temperature_for_fraction(self, fraction):
        """Temperature, K, at which the martensite fraction is reached (batch axes lead)."""
        f, q = as_query(fraction)
        ms, alpha = self._leading(q)
        return temperature_for_martensite_fraction_koistinen_marburger_1959(f, ms, alpha)
