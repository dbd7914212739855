"""Heat-treat plans: windows, edges, recommendations, outputs that agree, monotone effects."""

import csv
import json
import math
import sys
from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import isokin
from isokin.compute import plan
from isokin.compute.decomposition import Decomposition
from isokin.constants import celsius_to_kelvin

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(Path(__file__).parent))
from test_hardening import refused, run_main  # noqa: E402

AISI_4140 = isokin.load_alloy(ROOT / "alloys" / "aisi-4140-crmo.toml")
AISI_4340 = isokin.load_alloy(ROOT / "alloys" / "aisi-4340-nicrmo.toml")


def _austemper_margin(alloy, T_C, max_hold_s, safety):
    d = Decomposition(alloy, celsius_to_kelvin(np.array([T_C])))
    hold_s = float(d.time_to_total(0.99)[0]) * safety
    shares = d.shares(np.array([hold_s]))
    soft = float(shares["ferrite"][0] + shares["pearlite"][0])
    return math.log(max_hold_s / hold_s), math.log(0.01 / soft) if soft > 0.0 else math.inf


@pytest.mark.parametrize("alloy", [AISI_4140, AISI_4340], ids=["4140", "4340"])
def test_at_the_window_edge_the_governing_curve_meets_its_limit(alloy):
    result = plan.austemper(alloy, max_hold_s=3600.0)
    floor = float(alloy.critical_K["Ms"]) - 273.15 + 20.0
    for edge, side in zip(result.window_C, (-1.0, 1.0)):
        if edge == pytest.approx(floor, abs=1e-9):
            continue  # the margin above Ms is the limit there
        # one condition is met with equality, to the edge's 0.01 K
        by_time, by_soft = _austemper_margin(alloy, edge, 3600.0, 1.5)
        assert min(by_time, by_soft) == pytest.approx(0.0, abs=0.02)
        inside = _austemper_margin(alloy, edge - side, 3600.0, 1.5)
        outside = _austemper_margin(alloy, edge + side, 3600.0, 1.5)
        assert min(inside) > 0.0 > min(outside)


def test_austempering_windows_of_medium_carbon_steels_lie_in_the_bainite_range_above_ms():
    # Common practice (from memory): austempering at about 260-400 C, above Ms. The model's
    # kinetic window may reach higher (upper bainite); the recommendation stays at or below 400 C.
    for alloy in (AISI_4140, AISI_4340):
        result = plan.austemper(alloy)
        low, high = result.window_C
        assert low > float(alloy.critical_K["Ms"]) - 273.15
        assert 260.0 <= low <= 400.0 and high < float(alloy.critical_K["Bs"]) - 273.15
        assert 260.0 <= result.recommendation["temperature_C"] <= 400.0
        assert "lower bainite" in result.recommendation["reason"]


def test_no_window_explains_itself_and_is_an_answer(tmp_path):
    code, out, err, _ = run_main("plan", ROOT / "alloys" / "aisi-4340-nicrmo.toml", "--route", "austemper",
                                 "--max-hold", "20s", "--out", tmp_path)
    assert code == 0 and "no hold temperature works" in out
    data = json.loads((tmp_path / "aisi-4340-nicrmo-plan-austemper.json").read_text())
    assert data["window_C"] is None and data["recommendation"] is None and data["no_window"]
    short = plan.austemper(AISI_4140, max_hold_s=10.0)
    assert short.window_C is None and "allow that much" in short.no_window


@settings(max_examples=3, deadline=None)
@given(hold_h=st.floats(0.05, 2.0), more=st.floats(1.2, 4.0))
def test_a_longer_maximum_hold_never_narrows_the_window(hold_h, more):
    a = plan.austemper(AISI_4140, max_hold_s=hold_h * 3600.0)
    b = plan.austemper(AISI_4140, max_hold_s=hold_h * 3600.0 * more)
    assert np.all(b.rows["feasible"][a.rows["feasible"]])


@settings(max_examples=3, deadline=None)
@given(margin=st.floats(0.0, 40.0), more=st.floats(1.0, 30.0))
def test_a_larger_margin_never_widens_the_window(margin, more):
    a = plan.austemper(AISI_4140, margin_K=margin)
    b = plan.austemper(AISI_4140, margin_K=margin + more)
    if b.window_C is not None:
        slack = 2 * plan.EDGE_TOLERANCE_K  # edges bisected from different scans agree to this
        assert a.window_C is not None and b.window_C[0] >= a.window_C[0] - slack
        assert b.window_C[1] <= a.window_C[1] + slack


@pytest.mark.parametrize("safety, more", [(1.0, 1.5), (2.0, 3.0), (1.5, 4.0)])
def test_a_larger_safety_factor_never_lengthens_the_safe_time(safety, more):
    a = plan.interrupted_quench(AISI_4140, safety=safety)
    b = plan.interrupted_quench(AISI_4140, safety=more)
    assert np.all(b.rows["hold_time_s"] <= a.rows["hold_time_s"])
    # the safe time is the start of any product (1 % of what can transform) over the factor
    np.testing.assert_allclose(a.rows["hold_time_s"] * safety, a.rows["start_any_s"], rtol=1e-12)


def test_anneal_completes_within_the_budget_without_bainite():
    # Common practice, no source: an isothermal anneal holds in the pearlite range above Bs,
    # so the part comes out ferrite + pearlite with no bainite, within the furnace time given.
    result = plan.anneal(AISI_4140, budget_s=3600.0)
    ok = result.rows["feasible"]
    assert np.all(result.rows["hold_time_s"][ok] <= 3600.0)
    assert result.window_C[0] >= float(AISI_4140.critical_K["Bs"]) - 273.15
    assert np.all(result.rows["after_bainite"][ok] < 0.01)


def test_the_numbers_agree_in_table_json_csv_xlsx_and_figure(tmp_path):
    pd = pytest.importorskip("pandas")
    pytest.importorskip("openpyxl")
    code, out, err, _ = run_main("plan", ROOT / "alloys" / "aisi-4140-crmo.toml", "--route", "austemper",
                                 "--max-hold", "2h", "--xlsx", "--out", tmp_path)
    assert code == 0, err
    data = json.loads((tmp_path / "aisi-4140-crmo-plan-austemper.json").read_text())
    rec = data["recommendation"]
    rows = list(csv.DictReader((tmp_path / "aisi-4140-crmo-plan-austemper.csv").open()))
    chosen = min(rows, key=lambda r: abs(float(r["temperature_C"]) - rec["temperature_C"]))
    assert float(chosen["hold_time_s"]) == pytest.approx(rec["hold_time_s"], rel=1e-7)
    book = pd.read_excel(tmp_path / "aisi-4140-crmo-plan-austemper.xlsx", sheet_name=None)
    assert set(book) == {"summary", "plan", "units", "inputs", "curves"}
    plan_sheet = book["plan"]
    assert plan_sheet["hold_time_readable"][0] and dict(zip(book["units"]["column"], book["units"]["unit"]))[
        "hold_time_s"] == "s"
    k = int(np.argmin(np.abs(plan_sheet["temperature_C"] - rec["temperature_C"])))
    assert plan_sheet["hold_time_s"][k] == pytest.approx(rec["hold_time_s"], rel=1e-9)
    assert f"recommended: {rec['temperature_C']:.1f} °C" in out
    assert (tmp_path / "aisi-4140-crmo-plan-austemper.png").stat().st_size > 10_000
    assert "molten salt" in out


@pytest.mark.parametrize("args, key", [
    (["--route", "austemper", "--max-hold", "soon"], "--max-hold"),
    (["--route", "austemper", "--safety", "0.5"], "--safety"),
    (["--route", "interrupted-quench", "--thickness-mm", "20"], "--thickness-mm"),
    ([], "--route"),
])
def test_bad_plan_options(args, key, tmp_path):
    code, _, err, _ = run_main("plan", ROOT / "alloys" / "aisi-4140-crmo.toml", *args, "--out", tmp_path)
    assert refused(code, err, key)


def test_plan_routes_on_the_shipped_steels(tmp_path):
    for path in sorted((ROOT / "alloys").glob("*.toml")):
        alloy = isokin.load_alloy(path)
        routes = ["anneal"] if alloy.model != "steel" else ["austemper", "interrupted-quench", "anneal"]
        for route in routes:
            code, out, err, _ = run_main("plan", path, "--route", route, "--out", tmp_path, "--overwrite")
            assert code == 0, (path.name, route, err)
            assert "window" in out or "no " in out


def test_anneal_goal_soft_holds_hottest_and_shortest_holds_fastest():
    # isothermal annealing for a soft structure holds just below Ae1 (common practice): the soft
    # goal takes the hottest hold that transforms all the austenite in the budget, the other the
    # fastest; both lie in the same window
    soft = plan.anneal(AISI_4140)
    fast = plan.anneal(AISI_4140, goal="shortest")
    assert soft.window_C == fast.window_C
    assert soft.recommendation["temperature_C"] > fast.recommendation["temperature_C"]
    assert soft.recommendation["hold_time_s"] >= fast.recommendation["hold_time_s"]
    assert soft.recommendation["temperature_C"] < float(AISI_4140.critical_K["Ae1"]) - 273.15
    with pytest.raises(isokin.InputError, match="goal"):
        plan.anneal(AISI_4140, goal="fast")
