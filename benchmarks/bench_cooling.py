"""Continuous cooling speed: 100 constant-rate paths of a 3-product steel, vectorised across
paths, against scipy's solve_ivp integrating the same additivity sums path by path; the
austempering plan of 4140 (its required quench rates bisected for every hold at once) against
bisecting hold by hold; the CCT critical rates (both definitions in one batched bisection).

    python benchmarks/bench_cooling.py

Not a test: numbers depend on the machine.
"""

from __future__ import annotations

import time

import numpy as np
from scipy.integrate import solve_ivp

from bench_engine import best_of  # same folder: run as python benchmarks/bench_cooling.py

import isokin
from isokin.compute import cooling, plan
from isokin.compute.cooling import constant_rate

STEEL = {"C": 0.405, "Mn": 0.875, "Si": 0.25, "Cr": 0.95, "Mo": 0.20}


def reference(alloy, path):
    """The products' sums of dt / F(T) by solve_ivp (pearlite gated on ferrite's 99 %), then X = S^-1(sum)."""
    ferrite, pearlite, bainite = alloy.products
    wait = float(ferrite.reaction_term(0.99))

    def T_of(t):
        return float(np.interp(t, path.time_s, path.temperature_K))

    def speed(product, T):
        f = float(product.time_factor(T))
        return 0.0 if not np.isfinite(f) else 1.0 / f

    def rhs(t, y):
        T = T_of(t)
        return [speed(ferrite, T), speed(pearlite, T) if y[0] >= wait else 0.0, speed(bainite, T)]

    sol = solve_ivp(rhs, (0.0, float(path.time_s[-1])), [0.0, 0.0, 0.0], rtol=1e-8, atol=1e-12,
                    max_step=float(path.time_s[-1]) / 400)
    s_end = float(ferrite.reaction_term(1.0))
    return [float(p.reaction_term_inverse(min(s, s_end))) for p, s in zip(alloy.products, sol.y[:, -1])]


def main():
    alloy = isokin.steel(STEEL, 7.0)
    rates = np.geomspace(0.01, 1000.0, 100)
    paths = [constant_rate(r, 850.0) for r in rates]
    t_engine = best_of(lambda: isokin.cool(alloy, paths), 5)
    sample = rates[::10]
    start = time.perf_counter()
    refs = [reference(alloy, constant_rate(r, 850.0)) for r in sample]
    t_ref = (time.perf_counter() - start) * len(rates) / len(sample)
    print(f"100 constant-rate paths, 3 products (with sharing, martensite, hardness): {t_engine * 1e3:.0f} ms "
          f"(target under 300 ms); solve_ivp reference of the additivity sums {t_ref:.1f} s (from 10 paths), "
          f"ratio {t_ref / t_engine:.0f}x")
    print(f"  (accuracy against solve_ivp on the rate form: tests/test_cooling.py; reference own fractions at "
          f"{sample[4]:.3g} K/s: {', '.join(f'{x:.4f}' for x in refs[4])})")
    plans()


def plans():
    alloy = isokin.load_alloy("alloys/aisi-4140-crmo.toml")
    t_plan = best_of(lambda: isokin.austemper(alloy), 5)
    holds = isokin.austemper(alloy).to_frame()["temperature_C"].to_numpy()
    start = cooling.default_start_C(alloy)
    t_rates = best_of(lambda: plan.required_rates(alloy, start, holds), 3)
    t_each = best_of(lambda: [plan.required_rates(alloy, start, holds[i:i + 1]) for i in range(holds.size)], 1)
    print(f"austempering plan of 4140, {holds.size} candidate holds: {t_plan:.3f} s (target under 0.15 s); its "
          f"required quench rates {t_rates * 1e3:.0f} ms against bisecting hold by hold {t_each:.2f} s, "
          f"ratio {t_each / t_rates:.0f}x")
    t_crit = best_of(lambda: cooling.critical_rates(alloy, start), 3)
    print(f"CCT critical rates of 4140 (both definitions in one batched bisection): {t_crit * 1e3:.0f} ms")


if __name__ == "__main__":
    main()
