"""Steel model speed against plain scalar references, in the same run.

    python benchmarks/bench_steel.py

1. The ferrite, pearlite and bainite times of each kinetic model (Kirkaldy & Venugopalan
   1984, Li et al. 1998) as numpy arrays, against a loop over every (temperature, fraction)
   point in Python with the math module and scipy's adaptive quad for S(X).
2. The TTT diagram of 1,000 steels x 3 products x 200 temperatures with every nose refined
   (`isokin.ttt` on a batch), against looping the single-alloy path over the same steels,
   for each kinetic model.
3. The decomposition diagram of one steel on 1,000 temperatures (products within the
   sequence and the whole decomposition, every nose refined), and `isokin.hold` on 1,000
   (temperature, time) pairs, against a scalar loop that integrates the shares with scipy's
   quad one hold at a time.

Not a test: numbers depend on the machine.
"""

from __future__ import annotations

import math
import time

import numpy as np
from scipy.integrate import quad

from bench_engine import best_of  # same folder: run as python benchmarks/bench_steel.py

import isokin
import isokin.products.steel
from isokin.compute.grid import temperature_grid
from isokin.compute.ttt import solve_ttt
from isokin.constants import GAS_CONSTANT_J_MOL_K

FRACTIONS = np.array([0.01, 0.5, 0.99])
STEEL = {"C": 0.405, "Mn": 0.875, "Si": 0.25, "Cr": 0.95, "Mo": 0.20}
GRAIN = 7.0


def _term(term, composition):
    if "*" in term:
        a, b = term.split("*")
        return composition.get(a, 0.0) * composition.get(b, 0.0)
    if term.startswith("sqrt_"):
        return math.sqrt(composition.get(term[5:], 0.0))
    return composition.get(term, 0.0)


def scalar_time(product, T, X, composition=STEEL, grain=GRAIN):
    """One point: t = factor F / (2^(a (G - G0)) dT^n D(T)) * S(X), from the published
    coefficients with the math module, S(X) by adaptive quad."""
    c = product.coefficients
    upper, lower = float(product.upper_K), float(product.lower_K)
    if not lower <= T < upper:
        return math.inf
    total = c.constant + sum(v * _term(k, composition) for k, v in c.terms.items())
    ln_f = math.log(total) if c.linear else total
    RT = GAS_CONSTANT_J_MOL_K * T
    inverse_d = math.exp(c.activation_energy_J_mol / RT)
    drag = sum(v * _term(k, composition) for k, v in c.drag_terms.items())
    if drag > 0.0:
        inverse_d += drag * math.exp(c.drag_activation_energy_J_mol / RT)
    p = c.reaction_exponent
    r = c.retardation_constant + sum(v * _term(k, composition) for k, v in c.retardation_terms.items())
    s, _ = quad(lambda x: math.exp(r * x * x) / (x ** (p * (1 - x)) * (1 - x) ** (p * x)), 0.0, X)
    log_t = (ln_f + math.log(c.factor) - c.grain_size_coefficient * (grain - c.grain_size_offset) * math.log(2.0)
             - c.undercooling_exponent * math.log(upper - T) + math.log(inverse_d))
    return math.exp(log_t) * s


def main(model):
    print(f"--- {model}")
    alloy = isokin.steel(STEEL, GRAIN, kinetics_model=model)
    products = alloy.products
    grid = temperature_grid(float(alloy.critical_K["M90"]), float(alloy.critical_K["Ae3"]) - 0.5, 1000)

    def engine():
        for p in products:
            p.time_to_fraction(grid[None, :], FRACTIONS[:, None])

    t_engine = best_of(engine, 20)
    t_diagram = best_of(lambda: solve_ttt(products, grid, FRACTIONS), 5)
    sub = grid[::20]
    start = time.perf_counter()
    worst = 0.0
    for p in products:
        for T in sub:
            for X in FRACTIONS:
                ref = scalar_time(p, float(T), float(X))
                got = float(p.time_to_fraction(T, X))
                if math.isfinite(ref):
                    worst = max(worst, abs(got / ref - 1.0))
    t_scalar = (time.perf_counter() - start) * grid.size / sub.size
    print(f"3 products x 3 fractions x 1000 temperatures: engine {t_engine * 1e3:.2f} ms, scalar reference "
          f"{t_scalar * 1e3:.0f} ms (from 50 temperatures), ratio {t_scalar / t_engine:.0f}x, "
          f"largest relative difference {worst:.1e}")
    print(f"  the same diagram with its nine noses refined (solve_ttt): {t_diagram * 1e3:.1f} ms")

    rng = np.random.default_rng(3)
    n = 1000
    heats = {k: rng.normal(v, 0.05 * v, n).clip(0.0) for k, v in STEEL.items()}

    def batch(**options):
        return isokin.ttt(isokin.steel(heats, GRAIN, kinetics_model=model), points=200, **options)

    def loop(sample, **options):
        result = batch(**options)
        start = time.perf_counter()
        worst_T = 0.0
        for i in sample:
            one = isokin.ttt(isokin.steel({k: float(v[i]) for k, v in heats.items()}, GRAIN, kinetics_model=model),
                             temperatures_C=result.temperatures_C, **options)
            for name in one.products:
                worst_T = max(worst_T, float(np.max(np.abs(one.noses[name].temperature_K
                                                           - result.noses[name].temperature_K[i]))))
        return (time.perf_counter() - start) * n / sample.size, worst_T

    sample = rng.choice(n, 25, replace=False)
    own = dict(overall=False, decomposition=False)
    t_batch = best_of(lambda: batch(**own), 3)
    t_loop, worst = loop(sample, **own)
    print(f"1,000 steels x 3 products x 200 temperatures, all 9,000 noses refined (each product's own curve, "
          f"decomposition=False): batch {t_batch:.3f} s, single-alloy loop {t_loop:.2f} s (from 25 steels), "
          f"ratio {t_loop / t_batch:.0f}x; largest nose difference {worst:.1e} K")
    within = dict(overall=False)
    t_batch = best_of(lambda: batch(**within), 3)
    t_loop, worst = loop(sample, **within)
    print(f"  the products within the decomposition (sequence, equilibrium share): batch {t_batch:.3f} s, loop "
          f"{t_loop:.2f} s, ratio {t_loop / t_batch:.0f}x")
    t_batch = best_of(batch, 3)
    t_loop, worst = loop(sample)
    print(f"  ... and the whole-decomposition curves too (12,000 noses): batch {t_batch:.3f} s, loop {t_loop:.2f} s, "
          f"ratio {t_loop / t_batch:.0f}x (target at least 50x)")


def decomposition():
    from scipy.integrate import quad

    from isokin.compute.decomposition import Decomposition

    alloy = isokin.steel(STEEL, GRAIN)
    t_diagram = best_of(lambda: isokin.ttt(alloy, points=1000), 5)
    print(f"decomposition diagram, 3 products + total on 1,000 temperatures, all 12 noses refined: "
          f"{t_diagram * 1e3:.1f} ms (target under 20 ms)")
    rng = np.random.default_rng(8)
    T_C, t_s = rng.uniform(330.0, 760.0, 1000), 10.0 ** rng.uniform(-1.0, 5.0, 1000)
    t_hold = best_of(lambda: isokin.hold(alloy, T_C, t_s, milestones=False), 5)
    t_hold_all = best_of(lambda: isokin.hold(alloy, T_C, t_s), 3)

    def scalar_shares(T_K, t):
        d = Decomposition(alloy, np.array(T_K))
        out = {}
        for p in alloy.products:
            others = [q for q in alloy.products if q is not p]
            cap, start = float(d.caps[p.name]), float(d.delays[p.name])
            if cap == 0.0 or t <= start:
                out[p.name] = 0.0
                continue

            def integrand(tau):
                x = float(p.fraction_after(T_K, tau))
                rate = float(p.rate(T_K, x)) if 0.0 < x < 1.0 else 0.0
                rest = 1.0
                for q in others:
                    rest *= 1.0 - float(d.caps[q.name]) * float(q.fraction_after(T_K, max(start + tau - float(d.delays[q.name]), 0.0)))
                return cap * rate * rest

            out[p.name] = quad(integrand, 0.0, t - start, limit=200)[0]
        return out

    sample = range(20)
    start = time.perf_counter()
    worst = 0.0
    vectorised = isokin.hold(alloy, T_C, t_s, milestones=False)
    for i in sample:
        ref = scalar_shares(T_C[i] + 273.15, t_s[i])
        for name, value in ref.items():
            worst = max(worst, abs(value - float(vectorised.fractions[name][i])))
    t_scalar = (time.perf_counter() - start) * 1000 / len(sample)
    print(f"isokin.hold on 1,000 (temperature, time) pairs: {t_hold * 1e3:.1f} ms fractions only (target under "
          f"10 ms), {t_hold_all * 1e3:.1f} ms with the times to 1/50/99 %; scalar quad loop about {t_scalar:.1f} s "
          f"(from 20 holds), ratio {t_scalar / t_hold:.0f}x; largest share difference {worst:.1e}")


if __name__ == "__main__":
    for key in isokin.products.steel.KINETICS_MODELS:
        main(key)
    decomposition()
