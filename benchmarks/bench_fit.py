"""Calibration speed: a 3-parameter fit to 60 points, and its bootstrap (200 and 2,000
resamples, all refitted in one batch) against refitting resamples one at a time with
scipy's least_squares (the fit itself on the resampled points).

    python benchmarks/bench_fit.py

Not a test: numbers depend on the machine.
"""

from __future__ import annotations

import time

import numpy as np

import isokin
from isokin.compute import fit as F


def main():
    steel = isokin.steel({"C": 0.405, "Mn": 0.875, "Si": 0.25, "Cr": 0.95, "Mo": 0.20}, 7.0)
    truth = {"bainite.factor": 2.0, "bainite.activation_energy_cal_mol": 28000.0, "bainite.undercooling_exponent": 2.2}
    T = np.repeat(np.array([380.0, 420.0, 460.0]) + 273.15, 20)
    X = np.tile(np.linspace(0.05, 0.95, 20), 3)
    names = (None,) * T.size
    exact = F.model_times(F.with_values(steel, truth), F.Measurements(T, X, np.ones_like(T), names))
    noisy = np.sort((exact * np.exp(np.random.default_rng(4).normal(0.0, 0.05, T.size))).reshape(3, 20), axis=1)
    data = F.Measurements(T, X, noisy.ravel(), names)
    F.fit(steel, data, free=("bainite.factor",))  # imports and first calls out of the timing
    start = time.perf_counter()
    result = F.fit(steel, data, free=tuple(truth))
    t_fit = time.perf_counter() - start
    print(f"3-parameter fit to 60 points: {t_fit:.3f} s (target under 0.5 s); rms {result.rms_ln_t:.3f}; fitted "
          + ", ".join(f"{k} {v:.4g}" for k, v in result.values.items()))
    # the reference: one least_squares per resample, on the points as drawn
    rng = np.random.default_rng(0)
    loops = 20
    start = time.perf_counter()
    for _ in range(loops):
        drawn = np.sort(rng.integers(0, T.size, T.size))
        F.fit(steel, F.Measurements(T[drawn], X[drawn], data.time_s[drawn], names), free=tuple(truth))
    per_resample = (time.perf_counter() - start) / loops
    for resamples, target in ((200, 1.0), (2000, 10.0)):
        start = time.perf_counter()
        F.fit(steel, data, free=tuple(truth), bootstrap=resamples)
        t_boot = time.perf_counter() - start - t_fit
        print(f"  {resamples}-resample bootstrap: {t_boot:.2f} s beyond the fit (target under {target:g} s); "
              f"one least_squares per resample would take {per_resample * resamples:.1f} s "
              f"({per_resample * resamples / t_boot:.0f}x)")


if __name__ == "__main__":
    main()
