"""2,000 random heat analyses through the command line's entry point, in-process.

    python benchmarks/random_compositions.py [N]

Each analysis has carbon over 0-3 % and one to six other elements over 0-30 % each. Every
one must end in a result (exit 0, possibly with warnings) or a one-line refusal (exit 2);
the script prints how many did which, the most common refusals, and the count of
tracebacks, which must be 0. Not a test: the fuzz tests in tests/test_hardening.py hold the
promise; this shows it at scale.
"""

from __future__ import annotations

import collections
import re
import sys
import time
import traceback
from pathlib import Path

import numpy as np

from isokin.relations.composition import ELEMENTS

sys.path.insert(0, str(Path(__file__).resolve().parents[1] / "tests"))
from test_hardening import run_main  # noqa: E402  the entry point in-process, as the tests drive it


def main_script(n=2000):
    rng = np.random.default_rng(2026)
    others = [e for e in ELEMENTS if e != "C"]
    counts = collections.Counter()
    refusals = collections.Counter()
    tracebacks = []
    start = time.perf_counter()
    for _ in range(n):
        picked = rng.choice(others, size=rng.integers(1, 7), replace=False)
        analysis = {"C": rng.uniform(0.0, 3.0), **{e: rng.uniform(0.0, 30.0) for e in picked}}
        text = ",".join(f"{k}={v:.4g}" for k, v in analysis.items())
        try:
            code, _, err, python_warnings = run_main("check", "--composition", text)
        except Exception:  # the one thing that must never happen
            tracebacks.append((text, traceback.format_exc(limit=3)))
            continue
        if python_warnings:
            counts["python warning"] += 1
        if code == 0:
            counts["result with warnings" if "warning:" in err else "result"] += 1
        elif code == 2 and len(err.strip().splitlines()) == 1:
            counts["one-line refusal"] += 1
            reason = re.sub(r"(?<![A-Za-z])[-+]?\d[\d.e+-]*", "#", err.strip().split("--composition: ", 1)[-1])
            refusals[reason.split(":")[0][:90]] += 1
        else:
            counts[f"bad outcome (exit {code})"] += 1
    elapsed = time.perf_counter() - start
    print(f"{n} random analyses in {elapsed:.1f} s ({elapsed / n * 1e3:.1f} ms each)")
    for key, value in counts.most_common():
        print(f"  {key:<24}{value:>6}")
    print("  most common refusals:")
    for reason, value in refusals.most_common(6):
        print(f"    {value:>5}  {reason}")
    print(f"tracebacks: {len(tracebacks)}")
    for text, tb in tracebacks[:3]:
        print(f"  {text}\n{tb}")
    return len(tracebacks)


if __name__ == "__main__":
    sys.exit(1 if main_script(int(sys.argv[1]) if len(sys.argv) > 1 else 2000) else 0)
