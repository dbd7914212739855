"""The additivity of :func:`isokin.compute.cooling.along`, one time step at a time.

A path that is computed as it goes (the nodes of a section, whose temperatures depend on the
heat the products release) cannot be handed to ``along`` whole. :class:`Additivity` keeps
what ``along`` accumulates (Scheil's sum, each product's isokinetic sum, its running
equilibrium cap and own share, the extended-volume shares, the lowest temperature reached)
for a batch of paths and advances it over one step with the same trapezoid increments, so
that stepping a path gives what ``along`` gives for the whole of it (tested to 1e-9). The
rules are ``along``'s; see that module for their meaning.
"""

from __future__ import annotations

import numpy as np

from ..relations.steel_critical import martensite_fraction_koistinen_marburger_1959
from .cooling import _sequence_order
from .decomposition import WAIT_FRACTION

#: Points on which a product's incubation is probed: a product whose incubation is zero over
#: the whole range of the run starts at once, as in ``along``.
_PROBE_POINTS = 64
#: Carbons (mass %, up to that of a cast iron) on which Ms is tabulated.
_CARBON_POINTS = 4201
_MOST_CARBON = 2.1


class Additivity:
    """The state of the decomposition along a batch of paths (shape ``(P,)``), stepped in time.

    Parameters
    ----------
    alloy : Alloy
        One alloy.
    T0_K : array (P,)
        Temperatures where the paths start.
    T_low_K : float
        The lowest temperature the run may reach (for probing incubation).
    """

    def __init__(self, alloy, T0_K, T_low_K):
        self.alloy = alloy
        self.by_name = {p.name: p for p in alloy.products}
        self.order = _sequence_order(alloy)
        T0 = np.asarray(T0_K, dtype=float)
        probe = np.linspace(T_low_K, float(np.max(T0)), _PROBE_POINTS)
        self.incubates = {n: bool(np.any(p.incubation_s(probe) > 0)) for n, p in self.by_name.items()}
        self.s_end = {n: float(p.reaction_term(1.0)) for n, p in self.by_name.items()}
        self.s_wait = {n: float(p.reaction_term(WAIT_FRACTION)) for n, p in self.by_name.items()}
        self._carbon = self._ms = None
        self.T_min = T0.copy()
        self.T = T0.copy()
        zero = np.zeros(T0.shape)
        self._rates = {n: self._rates_at(p, T0) for n, p in self.by_name.items()}
        self.sums = {n: zero.copy() for n in self.order}
        self.scheil = {n: zero.copy() for n in self.order}
        self.done = {n: np.zeros(T0.shape, dtype=bool) for n in self.order}
        self.cap = {n: np.where(self._rates[n][2], p.equilibrium_fraction(T0), 0.0) for n, p in self.by_name.items()}
        self.own = {n: np.maximum(self.cap[n] * p.reaction_term_inverse(zero), 0.0) for n, p in self.by_name.items()}
        self.raw = {n: zero.copy() for n in self.order}
        self._own_before = {n: v.copy() for n, v in self.own.items()}
        self.others = {n: self._others(n) for n in self.order}
        self.fractions = self._fractions()

    @staticmethod
    def _rates_at(p, T):
        factor = p.time_factor(T)
        forms = np.isfinite(factor) & (factor > 0)
        with np.errstate(divide="ignore"):
            speed = np.where(forms, 1.0 / np.where(forms, factor, 1.0), 0.0)
            incubation = p.incubation_s(T)
            scheil = np.where(forms & (incubation > 0), 1.0 / np.where(incubation > 0, incubation, 1.0), 0.0)
        return speed, scheil, forms

    def _others(self, name):
        out = np.ones(self.T.shape)
        for other, b in self.own.items():
            if other != name:
                out = out * (1.0 - b)
        return out

    def step(self, T_K, dt_s):
        """Advance every path by ``dt_s`` to temperatures ``T_K`` (P,); returns the phase
        fractions there (phase -> (P,), the phases of ``along``)."""
        T = np.asarray(T_K, dtype=float)
        for name in self.order:
            p = self.by_name[name]
            speed0, scheil0, _ = self._rates[name]
            speed1, scheil1, forms = self._rates[name] = self._rates_at(p, T)
            started = np.ones(T.shape, dtype=bool)
            if self.incubates[name]:
                self.scheil[name] = self.scheil[name] + 0.5 * (scheil0 + scheil1) * dt_s
                started = self.scheil[name] >= 1.0
            waits_for = self.alloy.sequence.get(name)
            if waits_for is not None:
                w = self.by_name[waits_for]
                self.done[name] |= self.sums[waits_for] >= self.s_wait[waits_for]
                w_forms = self._rates[waits_for][2] & (w.equilibrium_fraction(T) > 0.0)
                started = started & (self.done[name] | ~w_forms)
            self.sums[name] = self.sums[name] + 0.5 * (speed0 + speed1) * dt_s * started
            s_end = self.s_end[name]
            x = p.reaction_term_inverse(np.minimum(self.sums[name], s_end) if np.isfinite(s_end) else self.sums[name])
            self.cap[name] = np.maximum(self.cap[name], np.where(forms, p.equilibrium_fraction(T), 0.0))
            self.own[name] = np.maximum(self.own[name], self.cap[name] * x)
        for name in self.order:
            others = self._others(name)
            self.raw[name] = self.raw[name] + 0.5 * (self.others[name] + others) * (self.own[name] - self._own_before[name])
            self.others[name] = others
        self._own_before = {n: v.copy() for n, v in self.own.items()}
        self.T = T
        self.T_min = np.minimum(self.T_min, T)
        self.fractions = self._fractions()
        return self.fractions

    def _fractions(self):
        remaining = np.ones(self.T.shape)
        for a in self.own.values():
            remaining = remaining * (1.0 - a)
        total = 1.0 - remaining
        summed = sum(self.raw.values())
        with np.errstate(divide="ignore", invalid="ignore"):
            scale = np.where(summed > 0.0, total / summed, 0.0)
        fractions = {p.name: self.raw[p.name] * scale for p in self.alloy.products}
        left = 1.0 - total
        alloy = self.alloy
        if alloy.martensite is not None:
            km = martensite_fraction_koistinen_marburger_1959(self.T_min, self._start(fractions),
                                                              alloy.martensite.alpha_per_K)
            fractions[alloy.martensite.name] = left * km
            fractions[f"retained {alloy.parent}"] = left * (1.0 - km)
        else:
            fractions[alloy.parent] = left
        return fractions

    def _start(self, fractions):
        """Ms of the austenite left at each node, from its carbon by the alloy's mass balance.

        Ms of a steel is a smooth function of the carbon alone (the rest of the analysis
        fixed): it is tabulated once on :data:`_CARBON_POINTS` carbons and interpolated, which
        differs from the correlation by far less than 0.01 K."""
        martensite, balance = self.alloy.martensite, self.alloy.carbon_balance
        if balance is None or np.all(self.T_min > martensite.upper_K):
            # no martensite anywhere yet: the Ms of the austenite left is at most the steel's
            # own (its carbon only rises), and Koistinen-Marburger gives none above it
            return martensite.upper_K
        if self._ms is None:
            self._carbon = np.linspace(0.0, _MOST_CARBON, _CARBON_POINTS)
            self._ms = martensite.start_for_carbon(self._carbon)
        return np.interp(balance.austenite_carbon(fractions, 1), self._carbon, self._ms)
