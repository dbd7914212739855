"""The Python API does what the commands do: a spread over the alloy's own range, worst-case
plans with ``worst_case=True``, critical temperatures in °C beside K, and tables and JSON that
say what their "1 %" is a share of.

The checks here are of parity: the command's own output (run in-process) against the library
call a notebook user makes. Where a number is checked against something outside the project,
the source is named beside it.
"""

import json
import sys
from pathlib import Path

import numpy as np
import pytest

import isokin
from isokin.compute.spread import WORST_CASE_SAMPLES, check_ranges, sampled_heats

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(Path(__file__).parent))
from test_hardening import run_main  # noqa: E402  the entry point, in-process

AISI_4140 = isokin.load_alloy(ROOT / "alloys" / "aisi-4140-crmo.toml")
#: SAE J404's carbon range of 4140, mass % (from memory), as the shipped file carries it.
C_4140 = (0.38, 0.43)


def test_spread_uses_the_alloy_files_own_range_by_default():
    own = isokin.spread(AISI_4140, samples=20, seed=3, overall=False)
    given = isokin.spread(AISI_4140, AISI_4140.inputs["composition_range"], samples=20, seed=3, overall=False)
    assert own.ranges == given.ranges and own.ranges["C"] == ("range", *C_4140)
    for name in own.times_s:
        np.testing.assert_array_equal(own.times_s[name], given.times_s[name])
    assert np.all((own.compositions["C"] >= C_4140[0]) & (own.compositions["C"] <= C_4140[1]))


def test_spread_takes_plain_ranges_as_the_command_line_range_does(tmp_path):
    plain = isokin.spread(AISI_4140, {"C": C_4140, "Mn": {"nominal": 0.85, "uncertainty": 0.03}}, samples=20,
                          seed=1)
    tagged = isokin.spread(AISI_4140, {"C": ("range", *C_4140), "Mn": ("normal", 0.85, 0.03)}, samples=20, seed=1)
    np.testing.assert_array_equal(plain.times_s["total"], tagged.times_s["total"])
    code, _, err, _ = run_main("spread", ROOT / "alloys" / "aisi-4140-crmo.toml", "--range", "C=0.38:0.43,Mn=0.85+-0.03",
                               "--samples", "20", "--seed", "1", "--out", tmp_path)
    assert code == 0, err
    summary = json.loads((tmp_path / "aisi-4140-crmo-spread.json").read_text())
    T_first, t_first = plain.earliest_start()
    assert summary["earliest_start"]["time_s"] == pytest.approx(t_first, rel=1e-5)


@pytest.mark.parametrize("ranges, key", [
    ({"C": (0.43, 0.38)}, "composition_range.C"),            # min above max
    ({"Q": (0.1, 0.2)}, "composition_range.Q"),              # not an element
    ({"C": (0.38, 0.40, 0.43)}, "composition_range.C"),      # three numbers
    ({"C": {"nominal": 0.4}}, "composition_range.C"),         # no uncertainty
    ({}, "composition_range"),
])
def test_a_bad_range_is_one_clear_line(ranges, key):
    with pytest.raises(isokin.InputError) as caught:
        check_ranges(ranges)
    assert str(caught.value).startswith(key) and "\n" not in str(caught.value)


def test_an_alloy_without_a_range_is_told_to_give_one():
    bare = isokin.steel({"C": 0.40, "Mn": 0.85, "Cr": 0.95, "Mo": 0.20}, 7.0)
    for call in (lambda: isokin.spread(bare, samples=10), lambda: isokin.austemper(bare, worst_case=True)):
        with pytest.raises(isokin.InputError, match=r"no \[composition_range\]; give ranges"):
            call()


def test_worst_case_true_samples_the_alloys_own_range_as_the_command_does(tmp_path):
    heats = sampled_heats(AISI_4140)  # the default heats and seed
    assert heats.batch_shape == (WORST_CASE_SAMPLES,)
    api = isokin.interrupted_quench(AISI_4140, worst_case=True)
    batch = isokin.interrupted_quench(AISI_4140, worst_case=heats)
    assert api.window_C == batch.window_C and api.options["worst_case_heats"] == WORST_CASE_SAMPLES
    np.testing.assert_array_equal(api.rows["hold_time_s"], batch.rows["hold_time_s"])
    code, _, err, _ = run_main("plan", ROOT / "alloys" / "aisi-4140-crmo.toml", "--route", "interrupted-quench",
                               "--worst-case", "--out", tmp_path)
    assert code == 0, err
    written = json.loads(next(tmp_path.glob("aisi-4140-crmo-plan*.json")).read_text())
    assert written["window_C"] == pytest.approx(api.window_C, abs=1e-3)
    assert written["recommendation"]["hold_time_s"] == pytest.approx(api.recommendation["hold_time_s"], rel=1e-9)
    # False is the nominal plan; the worst case is never less conservative (safe times the
    # shortest over the heats, so at most the nominal's at each bath)
    nominal = isokin.interrupted_quench(AISI_4140, worst_case=False)
    assert "worst_case_heats" not in nominal.options
    anneal = isokin.anneal(AISI_4140, worst_case=True)
    assert anneal.options["worst_case_heats"] == WORST_CASE_SAMPLES
    nominal_anneal = isokin.anneal(AISI_4140)
    assert nominal_anneal.window_C[0] <= anneal.window_C[0] and anneal.window_C[1] <= nominal_anneal.window_C[1]


def test_results_give_critical_temperatures_in_celsius_as_the_files_do(tmp_path):
    # 0 °C is 273.15 K exactly (SI definition of the degree Celsius)
    diagram = isokin.ttt(AISI_4140, points=20)
    code, _, err, _ = run_main("diagram", ROOT / "alloys" / "aisi-4140-crmo.toml", "--points", "20", "--out", tmp_path)
    assert code == 0, err
    written = json.loads((tmp_path / "aisi-4140-crmo-summary.json").read_text())["critical_temperatures"]
    assert set(diagram.critical_C) == set(written)
    for name, t_c in diagram.critical_C.items():
        assert t_c == pytest.approx(written[name]["temperature_C"], abs=1e-3)
        assert t_c == pytest.approx(float(diagram.critical_K[name]) - 273.15, abs=1e-9)
    after = isokin.hold(AISI_4140, 450.0, 60.0)
    plan = isokin.anneal(AISI_4140)
    cct = isokin.cct(AISI_4140, rates_K_s=[1.0, 10.0])
    for result in (after, plan, cct, cct.cooling):
        assert result.critical_C == pytest.approx(diagram.critical_C, abs=1e-9)
    assert float(after.martensite_start_C) == pytest.approx(float(after.martensite_start_K) - 273.15, abs=1e-9)
    batch = isokin.ttt(isokin.steel({"C": [0.38, 0.43], "Mn": 0.85}, 7.0), points=10)
    assert np.shape(batch.critical_C["Ms"]) == (2,)


def test_diagram_and_hold_say_what_their_1_percent_is_a_share_of(tmp_path):
    # the words matter because the numbers differ: at 600 °C ferrite's 1 % of the austenite
    # (diagram) comes later than 1 % of its own equilibrium share (hold); the totals agree
    diagram = isokin.ttt(AISI_4140, temperatures_C=[580.0, 600.0, 620.0])
    after = isokin.hold(AISI_4140, 600.0, 60.0)
    t_diagram, t_hold = float(diagram.times_s["ferrite"][0, 1]), float(after.milestones_s["ferrite"][0])
    assert t_hold < t_diagram
    assert float(after.milestones_s["total"][0]) == pytest.approx(float(diagram.times_s["total"][0, 1]), rel=1e-6)
    alloy = ROOT / "alloys" / "aisi-4140-crmo.toml"
    code, out, err, _ = run_main("diagram", alloy, "--points", "40", "--out", tmp_path)
    assert code == 0, err
    rows = {line.split()[0]: line for line in out.splitlines() if " % of " in line}
    assert "1 % of the austenite" in rows["ferrite"] and "of what can transform" in rows["total"]
    meaning = json.loads((tmp_path / "aisi-4140-crmo-summary.json").read_text())["fraction_meaning"]
    assert "not the product's own completion" in meaning["ferrite"]
    code, out, err, _ = run_main("hold", alloy, "--temperature-c", "600", "--time", "1min", "--out", tmp_path)
    assert code == 0, err
    ferrite = next(line for line in out.splitlines() if line.strip().startswith("ferrite") and " s " in line)
    assert ferrite.rstrip().endswith("of its own completion at this temperature, not of the austenite as on the diagram")
    written = json.loads((tmp_path / "aisi-4140-crmo-hold.json").read_text())
    assert written["milestone_of"]["total"] == "of what can transform at this temperature, as on the diagram"
    # a physical alloy's curves are each product's own completion in both: nothing to contrast
    physical = isokin.load_alloy(ROOT / "alloys" / "brackwater-ba42-precipitation.toml")
    assert isokin.hold(physical, 300.0, 60.0).milestone_of == {"precipitate": "of its own completion at this temperature"}
    assert isokin.ttt(physical, points=10).fraction_of == {"precipitate": "of its own completion"}
