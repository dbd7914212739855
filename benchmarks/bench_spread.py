"""Composition spread speed: 10,000 heats x 3 products x 300 temperatures in one batch pass,
against a loop over the heats that calls the single-composition path.

    python benchmarks/bench_spread.py

Not a test: numbers depend on the machine.
"""

from __future__ import annotations

import time

from functools import partial

import numpy as np

from bench_engine import best_of  # same folder: run as python benchmarks/bench_spread.py

import isokin
from isokin.compute.spread import sample_compositions
from isokin.io.steel_file import read_ranges
from isokin.products.steel import rebuild


#: Heats the loop is timed on; its time is scaled to 10,000.
LOOP_SAMPLE = 200


def main():
    alloy = isokin.load_alloy("alloys/aisi-4140-crmo.toml")
    ranges = read_ranges(None, alloy.inputs["composition_range"])
    nominal = {k: float(v) for k, v in alloy.inputs["composition"].items()}
    build = partial(rebuild, alloy)
    grid_C = np.linspace(320.0, 760.0, 300)
    for decomposition in (False, True):
        options = dict(temperatures_C=grid_C, overall=False, decomposition=decomposition)
        mass = sample_compositions(nominal, ranges, 10_000, seed=1)
        t_batch = best_of(lambda: isokin.ttt(build(mass), **options), 2)
        start = time.perf_counter()
        for i in range(LOOP_SAMPLE):
            isokin.ttt(build({k: float(v[i]) for k, v in mass.items()}), **options)
        t_loop = (time.perf_counter() - start) * 10_000 / LOOP_SAMPLE
        view = "within the decomposition" if decomposition else "each product's own curve"
        print(f"10,000 heats x 3 products x 300 temperatures ({view}), all noses: batch {t_batch:.2f} s "
              f"(target under 3 s), loop over heats {t_loop:.0f} s (from {LOOP_SAMPLE}), ratio {t_loop / t_batch:.0f}x")


if __name__ == "__main__":
    main()
