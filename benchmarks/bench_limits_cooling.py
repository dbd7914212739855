"""The largest cooling runs the documented limits allow, each in a fresh process as a user runs
it, with its wall time and peak memory against the target of 10 s and 1 GB on a 2-core machine.

    python benchmarks/bench_limits_cooling.py

The limits are the library's own (isokin.compute.cooling): at most 60 rates or paths, start
temperatures up to 1600 °C, rates from 1e-4 to 1e7 K/s, time constants up to 1e7 s, logs of
100,000 rows, 250,000 points a path and 1,000,000 a call. Not a test: numbers depend on the machine.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np

from isokin.compute import cooling as C

ROOT = Path(__file__).resolve().parents[1]
ALLOY = ROOT / "alloys" / "aisi-4340-nicrmo.toml"
TARGET_S, TARGET_MB = 10.0, 1024.0

#: Run in the child: the command line's entry point (argv) or a snippet, then report its own peak memory.
CHILD = """
import json, os, resource, sys
code = 0
try:
    if sys.argv[1] == "--snippet":
        exec(sys.argv[2])
    else:
        sys.argv = ["isokin", *sys.argv[1:]]
        from isokin.cli import main
        main()
except SystemExit as exc:
    code = exc.code
finally:
    with open(os.environ["BENCH_REPORT"], "w") as f:
        json.dump({"code": code, "peak_MB": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024}, f)
"""


def measure(label, args):
    """Run ``args`` in a fresh interpreter; print its time, peak memory and exit code."""
    with tempfile.TemporaryDirectory() as folder:
        report = Path(folder) / "report.json"
        env = {**os.environ, "BENCH_REPORT": str(report),
               "PYTHONPATH": os.pathsep.join([str(ROOT / "src"), os.environ.get("PYTHONPATH", "")])}
        cli = args[0] != "--snippet"
        command = [sys.executable, "-c", CHILD, *args, *(["--out", str(Path(folder) / "out")] if cli else [])]
        start = time.perf_counter()
        done = subprocess.run(command, env=env, capture_output=True, text=True, cwd=ROOT)
        seconds = time.perf_counter() - start
        result = json.loads(report.read_text())
    verdict = "ok" if seconds <= TARGET_S and result["peak_MB"] <= TARGET_MB else "OVER TARGET"
    print(f"{label:<62} {seconds:6.2f} s {result['peak_MB']:7.0f} MB  exit {result['code']}  {verdict}")
    if result["code"] not in (0, None):
        print("   ", done.stderr.strip().splitlines()[-1] if done.stderr.strip() else "(no message)")


def log_file(folder, name, temperatures_C, step_s=1.0):
    path = Path(folder) / name
    rows = [f"{k * step_s:g},{T:g}" for k, T in enumerate(temperatures_C)]
    path.write_text("time_s,temperature_C\n" + "\n".join(rows) + "\n")
    return path


def main():
    top = C.MAX_TEMPERATURE_C
    n = C.MAX_RATES
    rates = np.geomspace(C.RATE_K_S.low, C.RATE_K_S.high, n)
    print(f"target: each within {TARGET_S:g} s and {TARGET_MB:g} MB (peak resident memory of the process)")
    measure(f"cct, {n} rates from {C.RATE_K_S.low:g} to {C.RATE_K_S.high:g} K/s, from {top:g} °C",
            ["cct", str(ALLOY), "--rates", ",".join(f"{r:.6g}" for r in rates), "--start-c", f"{top:g}"])
    measure(f"cool, {n} --rate from {top:g} °C",
            ["cool", str(ALLOY), *[x for r in rates for x in ("--rate", f"{r:.6g}")], "--start-c", f"{top:g}"])
    measure(f"cool, slowest rate {C.RATE_K_S.low:g} K/s from {top:g} °C",
            ["cool", str(ALLOY), "--rate", f"{C.RATE_K_S.low:g}", "--start-c", f"{top:g}"])
    measure(f"cool, Newtonian tau {C.TIME_CONSTANT_S.high:g} s from {top:g} °C to -273 °C",
            ["cool", str(ALLOY), "--medium-c", "-273", "--time-constant-s", f"{C.TIME_CONSTANT_S.high:g}",
             "--start-c", f"{top:g}"])
    with tempfile.TemporaryDirectory() as folder:
        rows = C.MAX_LOG_ROWS
        rng = np.random.default_rng(0)
        # whole degrees: 100,000 rows of a finer log would pass the 1 MB limit of an input file
        quench = np.round(20.0 + 1280.0 * np.exp(-np.arange(rows) / 4000.0) + rng.normal(0.0, 0.5, rows))
        for label, temperatures in (
            (f"cool --log, {rows} rows, a noisy quench from 1300 °C", quench),
            (f"cool --log, {rows} rows zig-zag 1300/20 °C (row limit)", np.where(np.arange(rows) % 2, 20.0, 1300.0)),
            ("cool --log, 90,000 rows zig-zag 1300/20 °C", np.where(np.arange(90_000) % 2, 20.0, 1300.0)),
            ("cool --log, 2,000 rows zig-zag 1300/20 °C (17 KB)", np.where(np.arange(2_000) % 2, 20.0, 1300.0)),
            (f"cool --log, 90,000 rows zig-zag {top:g}/-273 °C (near 1 MB)",
             np.where(np.arange(90_000) % 2, -273.0, top)),
        ):
            measure(label, ["cool", str(ALLOY), "--log", str(log_file(folder, "log.csv", temperatures))])
    # the API at the cap of points in one call: four zig-zag logs refined to the cap of a path
    snippet = (
        "import numpy as np, isokin\n"
        "from isokin.compute import cooling as C\n"
        f"alloy = isokin.load_alloy({str(ALLOY)!r})\n"
        "zig = isokin.measured(np.arange(2000.0), np.where(np.arange(2000) % 2, 20.0, 1300.0))\n"
        "result = isokin.cool(alloy, [zig] * (C.MAX_EVALUATION_POINTS // C.MAX_PATH_POINTS))\n"
        "print(result.time_s.shape)\n")
    measure(f"API isokin.cool at {C.MAX_EVALUATION_POINTS:,} points (4 zig-zag logs)", ["--snippet", snippet])
    measure(f"API isokin.cool, 1 K/s from {top:g} °C, as many paths as {C.MAX_EVALUATION_POINTS:,} points allow",
            ["--snippet", (
                "import isokin\n"
                "from isokin.compute import cooling as C\n"
                f"alloy = isokin.load_alloy({str(ALLOY)!r})\n"
                f"one = isokin.constant_rate(1.0, {top})\n"
                "paths = [one] * (C.MAX_EVALUATION_POINTS // one.time_s.size)\n"
                "print(len(paths), isokin.cool(alloy, paths).time_s.shape)\n")])
    measure(f"API isokin.cct, {n} rates from {top:g} °C", ["--snippet", (
        "import numpy as np, isokin\n"
        f"isokin.cct(isokin.load_alloy({str(ALLOY)!r}), np.geomspace(1e-4, 1e7, {n}), start_C={top})\n")])


if __name__ == "__main__":
    main()
