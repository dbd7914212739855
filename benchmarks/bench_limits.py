"""The largest run each documented limit allows, against the target of 10 s and 1 GB.

Each run goes in a fresh interpreter (the command line as a user runs it, or the Python call
a notebook makes) and reports its wall time, start-up included, and its peak resident memory.
Not a timed test: the machine is shared, so the figures swing from run to run.

    python benchmarks/bench_limits.py
"""

from __future__ import annotations

import json
import subprocess
import sys
import tempfile
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
TARGET_S, TARGET_MB = 10.0, 1000.0

#: Run in the child: ``work`` is the case's code; the child reports its time and peak memory.
_CHILD = """
import json, resource, sys, time
start = time.perf_counter()
try:
{work}
except SystemExit as exc:
    if exc.code not in (0, None):
        raise
print(json.dumps({{"s": time.perf_counter() - start,
                   "mb": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024}}), file=sys.stderr)
"""


def _cli(*args):
    return (f"    sys.argv = ['isokin', *{[str(a) for a in args]!r}]\n"
            "    from isokin.cli import main\n"
            "    main()")


def _python(code):
    return "\n".join("    " + line for line in code.strip().splitlines())


def _fit_data(folder: Path, points: int) -> Path:
    """``points`` holds of the demo spring steel at its three demo temperatures, times from the
    demo model with its bainite factor at 1.8, without scatter (a fraction never falls with
    time within an isotherm): an invented data set, as the demo's is."""
    import numpy as np

    import isokin
    from isokin.compute.fit import model_times
    from isokin.results import Measurements

    alloy = isokin.load_alloy(ROOT / "alloys" / "brackwater-bw52crv.toml").with_parameters({"bainite.factor": 1.8})
    per = -(-points // 3)
    T = np.repeat([300.0, 340.0, 380.0], per)[:points]
    X = np.tile(np.linspace(0.02, 0.98, per), 3)[:points]
    t = model_times(alloy, Measurements(T + 273.15, X, np.ones(points), (None,) * points))
    path = folder / f"holds-{points}.csv"
    order = np.lexsort((t, T))
    path.write_text("temperature_C,time_s,fraction\n" + "".join(
        f"{T[i]:g},{t[i]:.6g},{X[i]:.6g}\n" for i in order))
    return path


def main():
    sys.path.insert(0, str(ROOT / "src"))
    from isokin.compute.decomposition import MAX_HOLD_VALUES
    from isokin.compute.fit import MAX_BOOTSTRAP, MAX_BOOTSTRAP_WORK, MAX_POINTS
    from isokin.compute.spread import MAX_SAMPLES, MAX_WORST_CASE_SAMPLES
    from isokin.compute.ttt import MAX_BATCH_VALUES

    steel, demo = ROOT / "alloys" / "aisi-4140-crmo.toml", ROOT / "alloys" / "brackwater-bw52crv.toml"
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        data = _fit_data(folder, MAX_POINTS)
        three = ["bainite.factor", "bainite.activation_energy_cal_mol", "bainite.undercooling_exponent"]
        heats = MAX_BATCH_VALUES // (3 * 200)
        cases = {
            f"spread --samples {MAX_SAMPLES}": _cli("spread", steel, "--samples", MAX_SAMPLES, "--out", folder / "s"),
            f"plan --route austemper --worst-case --samples {MAX_WORST_CASE_SAMPLES} (4140)":
                _cli("plan", steel, "--route", "austemper", "--worst-case", "--samples", MAX_WORST_CASE_SAMPLES,
                     "--out", folder / "p1"),
            f"plan --route austemper --worst-case --samples {MAX_WORST_CASE_SAMPLES} (4340)":
                _cli("plan", ROOT / "alloys" / "aisi-4340-nicrmo.toml", "--route", "austemper", "--worst-case",
                     "--samples", MAX_WORST_CASE_SAMPLES, "--out", folder / "p2"),
            f"fit {MAX_POINTS} points, 1 free, --bootstrap {MAX_BOOTSTRAP}":
                _cli("fit", data, "--alloy", demo, "--free", "bainite.factor", "--bootstrap", MAX_BOOTSTRAP,
                     "--out", folder / "f1.toml"),
            f"fit {MAX_POINTS} points, 3 free, --bootstrap {MAX_BOOTSTRAP_WORK // (4 * MAX_POINTS)}":
                _cli("fit", data, "--alloy", demo, *(a for f in three for a in ("--free", f)), "--bootstrap",
                     MAX_BOOTSTRAP_WORK // (4 * MAX_POINTS), "--out", folder / "f3.toml"),
            f"isokin.ttt on {heats:,} heats x 3 fractions x 200 temperatures": _python(f"""
import numpy as np, isokin
rng = np.random.default_rng(0)
isokin.ttt(isokin.steel({{"C": rng.uniform(0.3, 0.6, {heats}), "Mn": rng.uniform(0.6, 1.0, {heats}),
                          "Cr": rng.uniform(0.8, 1.1, {heats}), "Mo": 0.2}}, 7.0))"""),
            f"isokin.hold on {MAX_HOLD_VALUES:,} (temperature, time) pairs": _python(f"""
import numpy as np, isokin
steel = isokin.load_alloy({str(steel)!r})
isokin.hold(steel, np.linspace(300.0, 700.0, {MAX_HOLD_VALUES}), np.geomspace(1.0, 1e5, {MAX_HOLD_VALUES}))"""),
        }
        print(f"{'largest run allowed':<72}{'time, s':>9}{'peak, MB':>10}   within {TARGET_S:g} s and {TARGET_MB:g} MB")
        for label, work in cases.items():
            done = subprocess.run([sys.executable, "-c", _CHILD.format(work=work)], capture_output=True, text=True,
                                  env={"PYTHONPATH": str(ROOT / "src"), "PATH": "/usr/bin:/bin"}, timeout=600)
            if done.returncode != 0:
                print(f"{label:<72}   failed: {done.stderr.strip().splitlines()[-1:]}")
                continue
            report = json.loads(done.stderr.strip().splitlines()[-1])
            ok = report["s"] <= TARGET_S and report["mb"] <= TARGET_MB
            print(f"{label:<72}{report['s']:>9.2f}{report['mb']:>10.0f}   {'yes' if ok else 'NO'}")


if __name__ == "__main__":
    main()
