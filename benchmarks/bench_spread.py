"""Composition spread speed: ``isokin.spread`` of 10,000 heats end to end (sampling, every
heat's diagram, quantiles, noses and what drives them), and 10,000 heats x 3 products x 300
temperatures in one batch pass against a loop over the heats that calls the single-composition
path.

    python benchmarks/bench_spread.py

Not a test: numbers depend on the machine.
"""

from __future__ import annotations

from functools import partial

import numpy as np

from bench_engine import best_of  # same folder: run as python benchmarks/bench_spread.py

import isokin
from isokin.compute.spread import sample_compositions
from isokin.io.steel_file import read_ranges
from isokin.products.steel import rebuild


#: Heats the loop is timed on (its time is scaled to 10,000), and repeats of each timing:
#: the best of the repeats is reported on both sides, as timeit does, so that a busy moment
#: of the machine does not decide the ratio.
LOOP_SAMPLE = 100
REPEATS = 3


def main():
    alloy = isokin.load_alloy("alloys/aisi-4140-crmo.toml")
    ranges = read_ranges(None, alloy.inputs["composition_range"])
    nominal = {k: float(v) for k, v in alloy.inputs["composition"].items()}
    build = partial(rebuild, alloy)
    grid_C = np.linspace(320.0, 760.0, 300)
    mass = sample_compositions(nominal, ranges, 10_000, seed=1)
    heats = [{k: float(v[i]) for k, v in mass.items()} for i in range(LOOP_SAMPLE)]
    t_spread = best_of(lambda: isokin.spread(alloy, ranges, samples=10_000, seed=1), REPEATS)
    print(f"isokin.spread, 10,000 heats end to end: {t_spread:.2f} s (target under 3 s)")
    for decomposition in (False, True):
        options = dict(temperatures_C=grid_C, overall=False, decomposition=decomposition)
        t_batch = best_of(lambda: isokin.ttt(build(mass), **options), REPEATS)
        t_loop = best_of(lambda: [isokin.ttt(build(heat), **options) for heat in heats], REPEATS) * 10_000 / LOOP_SAMPLE
        view = "within the decomposition" if decomposition else "each product's own curve"
        print(f"10,000 heats x 3 products x 300 temperatures ({view}), all noses: batch {t_batch:.2f} s "
              f"(target under 3 s), loop over heats {t_loop:.0f} s (from {LOOP_SAMPLE}), ratio {t_loop / t_batch:.0f}x "
              "(target 50x)")


if __name__ == "__main__":
    main()
