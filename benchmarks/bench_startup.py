"""Start-up times of the command line beside a bare interpreter, best of several runs.

    python benchmarks/bench_startup.py

Runs the installed interpreter directly (no shell shims), as the console script does.
Not a test: numbers depend on the machine.
"""

from __future__ import annotations

import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
CASES = {
    "python -c pass": ["-c", "pass"],
    "isokin version": ["-m", "isokin", "version"],
    "isokin --help": ["-m", "isokin", "--help"],
    "isokin check alloys/aisi-4140-crmo.toml": ["-m", "isokin", "check", str(ROOT / "alloys" / "aisi-4140-crmo.toml")],
}
TARGETS_S = {"isokin version": 0.25, "isokin --help": 0.25, "isokin check alloys/aisi-4140-crmo.toml": 0.6}


def best_run(args, repeats=7):
    best = float("inf")
    for _ in range(repeats):
        start = time.perf_counter()
        subprocess.run([sys.executable, *args], check=True, capture_output=True)
        best = min(best, time.perf_counter() - start)
    return best


def main():
    for label, args in CASES.items():
        t = best_run(args)
        target = TARGETS_S.get(label)
        goal = f"  (target under {target:g} s: {'met' if t < target else 'MISSED'})" if target else ""
        print(f"{label:<42} {t:.3f} s{goal}")


if __name__ == "__main__":
    main()
