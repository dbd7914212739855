"""Composition spread, worst-case plans and comparisons."""

import json
import sys
from pathlib import Path

import numpy as np
import pytest

import isokin
from isokin.compute import plan
from isokin.compute.spread import sampled_heats, spread
from isokin.products.steel import rebuild
from isokin.io.steel_file import read_ranges

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(Path(__file__).parent))
from test_hardening import refused, run_main  # noqa: E402

AISI_4140 = isokin.load_alloy(ROOT / "alloys" / "aisi-4140-crmo.toml")
RANGES = read_ranges(None, AISI_4140.inputs["composition_range"])  # SAE J404, from memory


def test_the_envelope_contains_every_heat_and_a_zero_range_collapses_onto_the_nominal():
    result = spread(AISI_4140, RANGES, samples=300, seed=2)
    for name, times in result.times_s.items():
        assert np.all(result.earliest_s[name] <= times) and np.all(times <= result.latest_s[name])
        q = result.quantiles_s[name]
        assert np.all(result.earliest_s[name] <= q[0]) and np.all(q[-1] <= result.latest_s[name])
    # the worst case is the first start of any heat and any curve, where some heat reaches it
    # (the definition of an envelope, common practice; checked on the samples' own times)
    every_start = np.stack([t[:, 0] for t in result.times_s.values()])  # (curve, heat, T)
    np.testing.assert_array_equal(result.earliest_start_s, every_start.min(axis=(0, 1)))
    T_first, t_first = result.earliest_start()
    assert t_first == every_start.min() and np.isclose(T_first, result.nominal.temperatures_K[
        np.unravel_index(np.argmin(every_start), every_start.shape)[2]])
    nominal = {k: float(v) for k, v in AISI_4140.inputs["composition"].items()}
    flat = {e: ("range", nominal[e], nominal[e]) for e in RANGES}
    collapsed = spread(AISI_4140, flat, samples=20, seed=0)
    for name in collapsed.times_s:
        np.testing.assert_allclose(collapsed.earliest_s[name], collapsed.nominal.times_s[name], rtol=1e-12)
        np.testing.assert_allclose(collapsed.latest_s[name], collapsed.nominal.times_s[name], rtol=1e-12)


def test_quantiles_converge_as_samples_grow():
    # Fixed seeds; the median start nose time of 500 heats within 3 % of that of 4000.
    small = spread(AISI_4140, RANGES, samples=500, seed=11, overall=False)
    large = spread(AISI_4140, RANGES, samples=4000, seed=12, overall=False)
    for name in ("ferrite", "bainite"):
        a = small.nose_quantiles[name]["time_s"][1, 0]
        b = large.nose_quantiles[name]["time_s"][1, 0]
        assert a == pytest.approx(b, rel=0.03)


def test_sensitivity_ranking_agrees_with_finite_differences_of_the_model():
    result = spread(AISI_4140, RANGES, samples=1500, seed=5)
    nominal = {k: float(v) for k, v in AISI_4140.inputs["composition"].items()}

    def start(mass):
        r = isokin.ttt(rebuild(AISI_4140, mass), temperatures_C=result.nominal.temperatures_C)
        return float(np.log(r.noses["total"].time_s[0]))

    effect = {}
    for element, (_, low, high) in RANGES.items():
        effect[element] = start({**nominal, element: high}) - start({**nominal, element: low})
    by_fd = sorted(effect, key=lambda e: -abs(effect[e]))
    by_spread = [s["element"] for s in result.sensitivity]
    assert by_spread[0] in by_fd[:2] and by_spread[-1] == by_fd[-1]
    for s in result.sensitivity:
        assert np.sign(s["ln_time_per_range"]) == np.sign(effect[s["element"]]) or abs(effect[s["element"]]) < 0.02


def test_the_worst_case_plan_is_never_less_conservative():
    heats = sampled_heats(AISI_4140, RANGES, 48, seed=3)
    nominal, worst = plan.interrupted_quench(AISI_4140), plan.interrupted_quench(AISI_4140, worst_case=heats)
    assert worst.window_C[0] >= nominal.window_C[0]
    common = np.intersect1d(np.round(nominal.rows["temperature_C"], 6), np.round(worst.rows["temperature_C"], 6))
    for T in common:
        a = nominal.rows["hold_time_s"][np.isclose(nominal.rows["temperature_C"], T)][0]
        b = worst.rows["hold_time_s"][np.isclose(worst.rows["temperature_C"], T)][0]
        assert b <= a * (1 + 1e-9)
    nominal, worst = plan.anneal(AISI_4140), plan.anneal(AISI_4140, worst_case=heats)
    assert worst.window_C[0] >= nominal.window_C[0] - 1e-9 and worst.window_C[1] <= nominal.window_C[1] + 1e-9
    a4340 = isokin.load_alloy(ROOT / "alloys" / "aisi-4340-nicrmo.toml")
    r4340 = read_ranges(None, a4340.inputs["composition_range"])
    heats = sampled_heats(a4340, r4340, 48, seed=3)
    nominal, worst = plan.austemper(a4340), plan.austemper(a4340, worst_case=heats)
    assert worst.window_C[0] >= nominal.window_C[0] and worst.window_C[1] <= nominal.window_C[1] + 1e-9


def test_spread_and_compare_as_a_user_runs_them(tmp_path):
    code, out, err, _ = run_main("spread", ROOT / "alloys" / "aisi-4140-crmo.toml", "--samples", "200", "--seed",
                                 "7", "--out", tmp_path)
    assert code == 0, err
    summary = json.loads((tmp_path / "aisi-4140-crmo-spread.json").read_text())
    assert summary["samples"] == 200 and summary["seed"] == 7 and summary["sensitivity"]
    first = (tmp_path / "aisi-4140-crmo-spread.csv").read_text()
    assert first.startswith("product,fraction,temperature_C,nominal_time_s")
    code, _, err, _ = run_main("spread", ROOT / "alloys" / "aisi-4140-crmo.toml", "--samples", "200", "--seed",
                               "7", "--out", tmp_path, "--overwrite")
    assert code == 0 and (tmp_path / "aisi-4140-crmo-spread.csv").read_text() == first  # deterministic
    code, out, err, _ = run_main("spread", "--composition", "C=0.4,Mn=0.8", "--range", "C=0.38:0.43,Mn=0.8+-0.03",
                                 "--samples", "100", "--out", tmp_path)
    assert code == 0, err
    code, out, err, _ = run_main("compare", ROOT / "alloys" / "aisi-4140-crmo.toml",
                                 ROOT / "alloys" / "aisi-4340-nicrmo.toml", "--composition", "C=0.4,Mn=0.8",
                                 "--out", tmp_path)
    assert code == 0, err
    data = json.loads((tmp_path / "comparison.json").read_text())
    assert len(data["alloys"]) == 3 and "Ms" in out
    code, out, err, _ = run_main("plan", ROOT / "alloys" / "aisi-4340-nicrmo.toml", "--route", "austemper",
                                 "--worst-case", "--samples", "32", "--out", tmp_path)
    assert code == 0, err
    assert json.loads((tmp_path / "aisi-4340-nicrmo-plan-austemper-worst-case.json").read_text())["options"]["worst_case_heats"] == 32


@pytest.mark.parametrize("args, expected", [
    (["--range", "C=0.43:0.38"], "min <= max"),
    (["--range", "C=abc"], "EL=MIN:MAX"),
    (["--range", "Xx=0:1"], "unknown element"),
    (["--samples", "1"], "--samples"),
])
def test_bad_spread_options(args, expected, tmp_path):
    code, _, err, _ = run_main("spread", ROOT / "alloys" / "aisi-4140-crmo.toml", *args, "--out", tmp_path)
    assert refused(code, err, expected)


def test_passes_of_heats_give_the_one_batch_answer_and_report_progress():
    # Reference: one batch pass over the same heats (isokin.ttt on the whole batch): each
    # heat's curves do not depend on which pass solved it.
    from isokin.compute import spread as S
    from isokin.compute.ttt import ttt

    calls = []
    n = S.CHUNK_HEATS * 2 + 7
    result = spread(AISI_4140, RANGES, samples=n, seed=4, overall=False,
                    progress=lambda done, total: calls.append((done, total)))
    assert calls == [(S.CHUNK_HEATS, n), (2 * S.CHUNK_HEATS, n), (n, n)]
    whole = ttt(rebuild(AISI_4140, result.compositions), temperatures_C=result.nominal.temperatures_C,
                overall=False)
    for name in whole.products:
        np.testing.assert_array_equal(result.times_s[name], whole.times_s[name])


class _Terminal:
    def __init__(self, tty):
        self.text, self.tty = "", tty

    def write(self, text):
        self.text += text

    def flush(self):
        pass

    def isatty(self):
        return self.tty


def test_the_status_line_waits_a_second_and_shows_on_a_terminal_only():
    # Common practice (no source): progress is for a person at a terminal, and a quick
    # command should not flicker one.
    from isokin.cli.status import QUIET_FOR_S, Status

    now = [0.0]
    for tty in (True, False):
        stream = _Terminal(tty)
        status = Status(stream, clock=lambda: now[0])
        now[0] = 0.5 * QUIET_FOR_S
        status("solving the heats", 500, 2000)
        assert stream.text == ""
        now[0] = 1.5 * QUIET_FOR_S
        status("solving the heats", 1000, 2000)
        status("solving the heats", 2000, 2000)
        status("drawing the figure")
        status.finish()
        if tty:
            lines = stream.text.split("\n")
            assert lines[0].endswith("isokin: solving the heats: 2000 of 2000")
            assert lines[1].endswith("isokin: drawing the figure") and lines[2] == ""
        else:
            assert stream.text == ""
