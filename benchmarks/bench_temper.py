"""Tempering speed: the hardness of 1,000 (temperature, time) tempers in one vectorised call
(target 5 ms), against one call per temper; and the temper for 1,000 target hardnesses.

    python benchmarks/bench_temper.py

Not a test: numbers depend on the machine.
"""

from __future__ import annotations

import numpy as np

from bench_engine import best_of  # same folder: run as python benchmarks/bench_temper.py

import isokin

CURVE = isokin.tempering_curve([200, 300, 400, 500, 600, 700], [600, 540, 470, 400, 320, 250])


def main():
    steel = isokin.steel({"C": 0.40, "Mn": 0.85, "Si": 0.25, "Cr": 0.95, "Mo": 0.20}, 7.0)
    rng = np.random.default_rng(0)
    T = rng.uniform(200.0, 650.0, 1000)
    t = 3600.0 * 10.0 ** rng.uniform(-1.0, 1.5, 1000)
    batch = best_of(lambda: isokin.temper(steel, T, t, CURVE), repeats=20)
    loop = best_of(lambda: [isokin.temper(steel, a, b, CURVE) for a, b in zip(T[:100], t[:100])], repeats=3) * 10
    targets = rng.uniform(280.0, 580.0, 1000)
    inverse = best_of(lambda: isokin.temper_for_hardness(steel, targets, CURVE, time_s=7200.0), repeats=20)
    print(f"1,000 tempers in one call: {batch * 1e3:.2f} ms (target 5 ms); one call each: {loop * 1e3:.0f} ms; "
          f"ratio {loop / batch:.0f}x")
    print(f"1,000 target hardnesses to temperatures: {inverse * 1e3:.2f} ms")


if __name__ == "__main__":
    main()
