"""Engine speed against a plain scalar reference, in the same run.

    python benchmarks/bench_engine.py

Prints, for the vectorised engine and for a per-point Python loop that finds each time with
scipy's brentq on X(t), the time per diagram and the ratio.  Also times `isokin diagram` end
to end (figure, CSV and JSON) on a shipped alloy.  Not a test: numbers depend on the machine.
"""

from __future__ import annotations

import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np
from scipy.optimize import brentq

from isokin.compute.grid import temperature_grid
from isokin.compute.ttt import solve_ttt
from isokin.io.alloy_file import load_alloy
from isokin.relations import jmak

ROOT = Path(__file__).resolve().parents[1]
ALLOY = ROOT / "alloys" / "brackwater-ba42-precipitation.toml"
FRACTIONS = np.array([0.01, 0.5, 0.99])


def best_of(fn, repeats):
    best = np.inf
    for _ in range(repeats):
        start = time.perf_counter()
        fn()
        best = min(best, time.perf_counter() - start)
    return best


def scalar_reference(product, temperatures, fractions):
    """One temperature and one fraction at a time: K from the model, t from brentq on X(t)."""
    out = np.full((len(fractions), len(temperatures)), np.inf)
    n = product.exponent
    for j, T in enumerate(temperatures):
        log_k = float(product.log_rate_constant(float(T)))
        if not np.isfinite(log_k):
            continue
        for i, x in enumerate(fractions):
            hi = 1e-12
            while float(jmak.fraction(hi, log_k, n)) < x and hi < 1e300:
                hi *= 10.0
            if hi >= 1e300:
                continue  # beyond any representable time, as the engine reports it (inf)
            # bracket within one decade and solve in ln t: times span many decades
            log_t = brentq(lambda u: float(jmak.fraction(np.exp(u), log_k, n)) - x, np.log(hi / 10.0), np.log(hi),
                           xtol=1e-12)
            out[i, j] = np.exp(log_t)
    return out


def main():
    alloy = load_alloy(ALLOY)
    product = alloy.products[0]
    lo, hi = alloy.default_range_K

    grid = temperature_grid(lo, hi, 1000)
    engine = best_of(lambda: product.time_to_fraction(grid[None, :], FRACTIONS[:, None]), 20)
    whole = best_of(lambda: solve_ttt([product], grid, FRACTIONS), 10)
    sub = grid[::10]  # the scalar loop is slow: time 100 temperatures and scale per point
    start = time.perf_counter()
    ref = scalar_reference(product, sub, FRACTIONS)
    scalar = (time.perf_counter() - start) * grid.size / sub.size
    vec = product.time_to_fraction(sub[None, :], FRACTIONS[:, None])
    ok = np.isfinite(ref)
    agree = np.max(np.abs(vec[ok] / ref[ok] - 1.0))
    print(f"3 fractions x 1000 temperatures: engine {engine * 1e3:.3f} ms, scalar reference {scalar * 1e3:.0f} ms "
          f"(from 100 temperatures), ratio {scalar / engine:.0f}x, largest relative difference {agree:.1e}")
    print(f"  the same diagram with its three noses refined (solve_ttt): {whole * 1e3:.2f} ms")

    rng = np.random.default_rng(1)
    gamma = rng.uniform(0.08, 0.12, 1000)
    from dataclasses import replace

    lower = product.lower_K
    batch = type(product)(product.name, replace(product.params, interface_energy_J_m2=gamma), lower)
    grid200 = temperature_grid(lo, hi, 200)
    engine_b = best_of(lambda: batch.time_to_fraction(grid200[None, :], 0.5), 5)
    few = [type(product)(product.name, replace(product.params, interface_energy_J_m2=float(g)), lower)
           for g in gamma[:10]]
    start = time.perf_counter()
    for p in few:
        scalar_reference(p, grid200, [0.5])
    scalar_b = (time.perf_counter() - start) * 1000 / len(few)
    print(f"1000 parameter sets x 200 temperatures: engine {engine_b * 1e3:.1f} ms, scalar reference "
          f"{scalar_b:.0f} s (from 10 sets), ratio {scalar_b / engine_b:.0f}x")

    with tempfile.TemporaryDirectory() as tmp:
        start = time.perf_counter()
        subprocess.run([sys.executable, "-m", "isokin", "diagram", str(ALLOY), "--out", tmp], check=True,
                       capture_output=True)
        print(f"isokin diagram end to end (figure, CSV, JSON): {time.perf_counter() - start:.2f} s")


if __name__ == "__main__":
    main()
