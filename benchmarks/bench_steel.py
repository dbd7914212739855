"""Steel model speed against a plain scalar reference, in the same run.

    python benchmarks/bench_steel.py

The engine evaluates the Li et al. (1998) ferrite, pearlite and bainite times as numpy
arrays; the reference loops over every (steel, temperature, fraction) point in Python with
the math module and scipy's adaptive quad for S(X).  Not a test: numbers depend on the machine.
"""

from __future__ import annotations

import math
import time

import numpy as np
from scipy.integrate import quad

from bench_engine import best_of  # same folder: run as python benchmarks/bench_steel.py

from isokin.constants import GAS_CONSTANT_J_MOL_K
from isokin.diagram import compute_diagram, temperature_grid
from isokin.steel.composition import Composition
from isokin.steel.li1998 import li1998_products

FRACTIONS = np.array([0.01, 0.5, 0.99])
STEEL = {"C": 0.405, "Mn": 0.875, "Si": 0.25, "Cr": 0.95, "Mo": 0.20}


def scalar_time(product, log_prefactor, T, X):
    """One point: t = F / (dT^n exp(-Q/RT)) * S(X), with S(X) by adaptive quad."""
    upper, lower = float(product.upper_K), float(product.lower_K)
    if not lower <= T < upper:
        return math.inf
    s, _ = quad(lambda x: 1.0 / (x ** (0.4 * (1 - x)) * (1 - x) ** (0.4 * x)), 0.0, X)
    log_f = (log_prefactor - product.undercooling_exponent * math.log(upper - T)
             + product.activation_energy_J_mol / (GAS_CONSTANT_J_MOL_K * T))
    return math.exp(log_f) * s


def main():
    products, critical = li1998_products(Composition.from_dict(STEEL), 7.0)
    grid = temperature_grid(float(critical["M90"].value_K), float(critical["Ae3"].value_K) - 0.5, 1000)

    def engine():
        for p in products:
            p.time_to_fraction(grid[None, :], FRACTIONS[:, None])

    t_engine = best_of(engine, 20)
    t_diagram = best_of(lambda: compute_diagram(products, grid, FRACTIONS), 5)
    sub = grid[::20]
    start = time.perf_counter()
    worst = 0.0
    for p in products:
        log_pre = float(p._log_prefactor)
        for T in sub:
            for X in FRACTIONS:
                ref = scalar_time(p, log_pre, float(T), float(X))
                got = float(p.time_to_fraction(T, X))
                if math.isfinite(ref):
                    worst = max(worst, abs(got / ref - 1.0))
    t_scalar = (time.perf_counter() - start) * grid.size / sub.size
    print(f"3 products x 3 fractions x 1000 temperatures: engine {t_engine * 1e3:.2f} ms, scalar reference "
          f"{t_scalar * 1e3:.0f} ms (from 50 temperatures), ratio {t_scalar / t_engine:.0f}x, "
          f"largest relative difference {worst:.1e}")
    print(f"  the same diagram with its nine noses refined (compute_diagram): {t_diagram * 1e3:.1f} ms")

    rng = np.random.default_rng(3)
    batch = {k: rng.normal(v, 0.03 * max(v, 0.1), (10_000, 1)).clip(0.0) for k, v in STEEL.items()}
    grid200 = temperature_grid(500.0, 1000.0, 200)

    def batch_engine():
        products_b, _ = li1998_products(Composition.from_dict(batch), 7.0)
        for p in products_b:
            p.time_to_fraction(grid200, 0.5)

    t_batch = best_of(batch_engine, 3)
    per_point = t_scalar / (3 * 3 * grid.size)
    t_batch_scalar = per_point * 10_000 * 200 * 3
    print(f"10,000 compositions x 200 temperatures x 3 products: engine {t_batch:.2f} s, scalar reference "
          f"about {t_batch_scalar:.0f} s (per-point cost above), ratio {t_batch_scalar / t_batch:.0f}x")


if __name__ == "__main__":
    main()
