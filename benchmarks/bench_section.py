"""Times the section and end-quench solvers, and a batch of sections against a loop over them.

Prints: a 50-node bar through the whole quench with kinetics (aim at most 0.3 s), the
end-quench curve (aim at most 0.5 s), and 100 section sizes in one batch against solving them
one by one (aim at least 20x). Ratios, not timed tests: the machine is shared.
"""

import time
from pathlib import Path

import numpy as np

import isokin

ROOT = Path(__file__).resolve().parents[1]


def best(f, repeat=3):
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        f()
        times.append(time.perf_counter() - t0)
    return min(times)


def main():
    steel = isokin.load_alloy(ROOT / "alloys" / "aisi-4140-crmo.toml")
    bar = best(lambda: isokin.section(steel, "bar", 0.06, 60.0, severity_per_in=0.35, nodes=50))
    print(f"50-node bar, 60 mm in oil, with kinetics: {bar:.3f} s (aim <= 0.3 s)")
    end = best(lambda: isokin.jominy(steel))
    print(f"end-quench curve: {end:.3f} s (aim <= 0.5 s)")
    sizes = np.geomspace(0.01, 0.2, 100)
    batch = best(lambda: isokin.section(steel, "bar", sizes, 60.0, heat_transfer_W_m2K=1000.0, nodes=21), repeat=1)
    loop = best(lambda: [isokin.section(steel, "bar", s, 60.0, heat_transfer_W_m2K=1000.0, nodes=21)
                         for s in sizes], repeat=1)
    print(f"100 bar sizes, 21 nodes, with kinetics: batch {batch:.2f} s, loop {loop:.2f} s, ratio {loop / batch:.0f}x "
          "(aim >= 20x)")


if __name__ == "__main__":
    main()
