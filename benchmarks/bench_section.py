"""Times the section and end-quench solvers, and a batch of sections against a loop over them.

Prints: a 50-node bar through the whole quench with kinetics (aim at most 0.3 s), the
end-quench curve (aim at most 0.5 s), 100 section sizes in one batch against solving them
one by one (aim at least 20x), and the section-aware plans of a 25 mm bar (aim a few seconds),
whose candidate baths are one batch, against quenching the section into the baths one by one.
Ratios, not timed tests: the machine is shared.
"""

import time
from pathlib import Path

import numpy as np

import isokin
from isokin.compute.plan import austemper, interrupted_quench
from isokin.compute.section import into_baths

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
    li = isokin.load_alloy(ROOT / "alloys" / "aisi-4140-crmo.toml", kinetics_model="li_1998")
    bar = {"size_m": 0.025, "severity_per_in": 0.4}
    plan = best(lambda: austemper(li, **bar))
    martempering = best(lambda: interrupted_quench(li, **bar))
    baths = austemper(li, **bar).rows["temperature_C"]
    batch = best(lambda: into_baths(li, "bar", 0.025, baths, 845.0, severity_per_in=0.4), repeat=1)
    loop = best(lambda: [into_baths(li, "bar", 0.025, [b], 845.0, severity_per_in=0.4) for b in baths], repeat=1)
    print(f"plans of a 25 mm bar in salt (H 0.4): austemper {plan:.2f} s, interrupted quench {martempering:.2f} s "
          f"(aim a few seconds); its {baths.size} baths in one batch {batch:.2f} s, one by one {loop:.2f} s, ratio "
          f"{loop / batch:.0f}x")


if __name__ == "__main__":
    main()
