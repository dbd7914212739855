"""The command line end to end beside the floor no command can beat, medians of several runs:
start-up (``version``, ``--help``, ``check``), ``diagram`` of a shipped steel (solve, figure,
CSV and JSON) beside ``python -c "import numpy, matplotlib.pyplot"``, and ``spread`` of 2,000
heats. Runs alternate, so a busy moment of the machine falls on both sides.

    python benchmarks/bench_startup.py

Runs the installed interpreter directly (no shell shims), as the console script does.
Not a test: numbers depend on the machine.
"""

from __future__ import annotations

import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
STEEL = str(ROOT / "alloys" / "aisi-4140-crmo.toml")
OUT = tempfile.mkdtemp(prefix="isokin-bench-")
CASES = {
    "python -c pass": ["-c", "pass"],
    "floor: import numpy, matplotlib.pyplot": ["-c", "import numpy, matplotlib.pyplot"],
    "isokin version": ["-m", "isokin", "version"],
    "isokin --help": ["-m", "isokin", "--help"],
    "isokin check (4140)": ["-m", "isokin", "check", STEEL],
    "isokin diagram (4140)": ["-m", "isokin", "diagram", STEEL, "--out", OUT, "--overwrite"],
    "isokin spread (4140, 2,000 heats)": ["-m", "isokin", "spread", STEEL, "--out", OUT, "--overwrite"],
}
TARGETS_S = {"isokin version": 0.2, "isokin --help": 0.25, "isokin check (4140)": 0.6, "isokin diagram (4140)": 0.8,
             "isokin spread (4140, 2,000 heats)": 1.5}
REPEATS = 7


def main():
    times = {label: [] for label in CASES}
    for _ in range(REPEATS):
        for label, args in CASES.items():
            start = time.perf_counter()
            subprocess.run([sys.executable, *args], check=True, capture_output=True)
            times[label].append(time.perf_counter() - start)
    floor = statistics.median(times["floor: import numpy, matplotlib.pyplot"])
    for label, runs in times.items():
        t = statistics.median(runs)
        target = TARGETS_S.get(label)
        goal = f"  (target under {target:g} s: {'met' if t < target else 'MISSED'})" if target else ""
        above = f", {t - floor:+.3f} s beside the floor" if label.startswith("isokin diagram") else ""
        print(f"{label:<42} {t:.3f} s median of {REPEATS}{above}{goal}")


if __name__ == "__main__":
    main()
