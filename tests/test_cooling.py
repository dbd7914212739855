"""Continuous cooling by additivity, the CCT diagram, critical rates and hardness."""

import json
import math
import sys
from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.integrate import quad, solve_ivp

import isokin
from isokin.compute.cooling import CoolingPath, along, constant_rate, first_reached, newtonian
from isokin.constants import celsius_to_kelvin
from isokin.relations.composition import Composition
from isokin.relations.hardness import (
    hardness_bainite_maynier_1978,
    hardness_ferrite_pearlite_maynier_1978,
    hardness_martensite_maynier_1978,
    hrc_from_hv_astm_e140,
)

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(Path(__file__).parent))
from test_hardening import refused, run_main  # noqa: E402

AISI_4140 = ROOT / "alloys" / "aisi-4140-crmo.toml"
EUTECTOID = {"C": 0.80, "Mn": 0.76}


def test_a_drop_and_hold_path_reproduces_the_isothermal_hold():
    # A path that falls to 450 C at once and stays there must give what a hold gives (to 1 %).
    steel = isokin.load_alloy(AISI_4140)
    for hold_C in (450.0, 650.0):
        t = np.concatenate([[0.0], np.geomspace(1e-3, 1e5, 4000)])
        T = np.full(t.shape, celsius_to_kelvin(hold_C))
        T[0] = celsius_to_kelvin(800.0)
        times, _, fractions, _ = along(steel, [CoolingPath(t, T, "drop")])
        for check in (30.0, 300.0, 3000.0, 30000.0):
            k = int(np.searchsorted(times[0], check))
            held = isokin.hold(steel, hold_C, times[0, k], milestones=False)
            for name in ("ferrite", "pearlite", "bainite"):
                assert fractions[name][0, k] == pytest.approx(float(held.fractions[name]), abs=0.01), (hold_C, check)


def _eutectoid_pearlite_along(rate_K_s):
    """Pearlite of the plain eutectoid steel along a constant rate from 720 C: the product,
    the path's times and fractions, the additivity 1 % start, and T(t) of the path."""
    steel = isokin.steel(EUTECTOID, 6.0)
    path = constant_rate(rate_K_s, 720.0)
    t, T, fractions, _ = along(steel, [path])
    t_start, _ = first_reached(t, T, fractions["pearlite"], 0.01)
    return (steel.products[1], t, fractions, t_start,
            lambda s: float(np.interp(s, path.time_s, path.temperature_K)))


def test_additivity_against_solve_ivp_from_the_incubation():
    # Reference: scipy's solve_ivp on the model's rate dX/dt = rate(T(t), X), started at the
    # 1 % incubation that additivity finds (the Li rate is zero at X = 0), for pearlite of a
    # plain eutectoid steel along a constant rate of 1 K/s.
    pearlite, t, fractions, t0, T_of = _eutectoid_pearlite_along(1.0)
    end = float(t[0, np.argmax(fractions["pearlite"][0] >= 0.95)])
    sol = solve_ivp(lambda s, x: [float(pearlite.rate(T_of(s), min(x[0], 1.0)))], (float(t0[0]), end), [0.01],
                    rtol=1e-10, atol=1e-12, max_step=0.2)
    assert sol.success
    k = int(np.argmax(t[0] >= end))
    assert float(fractions["pearlite"][0, k]) == pytest.approx(sol.y[0, -1], abs=2e-3)


def test_at_the_predicted_start_the_scheil_sum_is_one():
    # Scheil (1935): the product starts where the integral of dt / t_start(T) reaches 1;
    # scipy's quad integrates it along the path up to the start that additivity predicts.
    pearlite, _, _, t_start, T_of = _eutectoid_pearlite_along(2.0)
    total, _ = quad(lambda s: 1.0 / float(pearlite.time_to_fraction(T_of(s), 0.01)), 0.0, float(t_start[0]),
                    limit=400)
    assert total == pytest.approx(1.0, abs=2e-3)


def test_cct_start_lies_below_and_right_of_the_isothermal_start():
    # Common practice: continuous cooling delays the start against an isothermal hold at
    # the same temperature, and moves it to lower temperatures.
    steel = isokin.load_alloy(AISI_4140)
    diagram = isokin.cct(steel, rates_K_s=[0.1, 1.0, 10.0])
    iso = isokin.ttt(steel)
    t_start, T_start = diagram.curves["total"]["start"]
    ok = np.isfinite(t_start)
    assert ok.any()
    t_iso = np.interp(T_start[ok], iso.temperatures_K, iso.times_s["total"][0])
    assert np.all(t_start[ok] >= t_iso)
    top = iso.temperatures_K[np.isfinite(iso.times_s["total"][0])].max()
    assert np.all(T_start[ok] < top) and np.all(np.diff(T_start[ok]) < 0.0)  # faster: lower


def test_critical_rate_of_a_eutectoid_steel_is_of_the_order_of_100_K_per_s():
    # Textbook fact from memory: a plain eutectoid steel needs of the order of 100 K/s or
    # more to miss the pearlite nose. Band accepted: 50 to 1000 K/s.
    rates = isokin.cct(isokin.steel(EUTECTOID, 6.0), rates_K_s=[1.0, 100.0]).critical_rates
    value = rates["ferrite_pearlite_under_1_percent"]["rate_K_s"]
    assert 50.0 <= value <= 1000.0
    # Koistinen-Marburger from Ms leaves more than 5 % retained austenite at 20 C here
    assert rates["martensite_95_percent_at_20_C"]["rate_K_s"] is None
    assert "Koistinen-Marburger" in rates["martensite_95_percent_at_20_C"]["note"]


steels = st.fixed_dictionaries({
    "C": st.floats(0.1, 0.9), "Mn": st.floats(0.3, 1.6), "Cr": st.floats(0.0, 1.2), "Mo": st.floats(0.0, 0.4),
})


@settings(max_examples=25, deadline=None)
@given(steel=steels, log_rate=st.floats(-2.0, 3.0))
def test_fractions_sum_to_one_at_every_step_and_none_is_negative(steel, log_rate):
    result = isokin.cool(isokin.steel(steel, 7.0), constant_rate(10.0**log_rate, 900.0))
    stacked = np.array(list(result.fractions.values()))
    assert np.all(stacked >= -1e-12)
    np.testing.assert_allclose(stacked.sum(axis=0), 1.0, atol=1e-9)
    transformed = sum(result.fractions[p] for p in ("ferrite", "pearlite", "bainite"))
    assert np.all(np.diff(transformed, axis=-1) >= -1e-9)


def test_faster_cooling_never_gives_more_ferrite_and_pearlite():
    steel = isokin.load_alloy(AISI_4140)
    result = isokin.cool(steel, [constant_rate(r, 850.0) for r in (0.05, 0.5, 5.0, 50.0)])
    soft = result.final["ferrite"] + result.final["pearlite"]
    assert np.all(np.diff(soft) <= 1e-9) and np.all(np.diff(result.hardness_HV) >= -1e-6)


def test_newtonian_path_and_lumped_section():
    # T = Tm + (T0 - Tm) exp(-t / tau) (Newton's law of cooling, common practice).
    path = newtonian(850.0, 50.0, 20.0)
    T_C = path.temperature_K - 273.15
    np.testing.assert_allclose(T_C, 50.0 + 800.0 * np.exp(-path.time_s / 20.0), atol=1e-9)
    from isokin.compute.cooling import lumped_time_constant

    tau, biot = lumped_time_constant(0.02, 1000.0, shape="bar")
    assert tau == pytest.approx(7850 * 600 * 0.005 / 1000.0) and biot == pytest.approx(1000 * 0.005 / 30.0)


def test_maynier_against_hand_calculations_of_the_printed_formulas():
    # Maynier, Jungmann & Dollet (1978), as written in the module (coefficients from memory),
    # evaluated by hand at two compositions and rates.
    a = Composition.from_dict({"C": 0.4, "Mn": 0.8, "Si": 0.25, "Cr": 1.0, "Mo": 0.2})
    vr = 3600.0  # 1 K/s at 700 C, in C/h
    lg = math.log10(vr)
    assert float(hardness_martensite_maynier_1978(a, vr)) == pytest.approx(
        127 + 949 * 0.4 + 27 * 0.25 + 11 * 0.8 + 16 * 1.0 + 21 * lg)
    assert float(hardness_bainite_maynier_1978(a, vr)) == pytest.approx(
        -323 + 185 * 0.4 + 330 * 0.25 + 153 * 0.8 + 144 * 1.0 + 191 * 0.2
        + (89 + 53 * 0.4 - 55 * 0.25 - 22 * 0.8 - 20 * 1.0 - 33 * 0.2) * lg)
    b = Composition.from_dict({"C": 0.2, "Mn": 1.2, "Si": 0.3, "Ni": 0.5, "V": 0.1})
    vr = 100.0
    assert float(hardness_ferrite_pearlite_maynier_1978(b, vr)) == pytest.approx(
        42 + 223 * 0.2 + 53 * 0.3 + 30 * 1.2 + 12.6 * 0.5 + (10 - 19 * 0.3 + 4 * 0.5 + 130 * 0.1) * 2.0)
    # ASTM E140 rows (typed from memory): HV 392 is HRC 40; below HRC 20 there is no value
    assert float(hrc_from_hv_astm_e140(392.0)) == pytest.approx(40.0)
    assert math.isnan(float(hrc_from_hv_astm_e140(150.0)))


def test_cct_and_cool_commands_as_a_user_runs_them(tmp_path):
    code, out, err, _ = run_main("cct", AISI_4140, "--out", tmp_path, "--rates", "0.1,1,10,100")
    assert code == 0, err
    summary = json.loads((tmp_path / "aisi-4140-crmo-cct-summary.json").read_text())
    assert [r["rate_K_s"] for r in summary["rates"]] == [0.1, 1.0, 10.0, 100.0]
    assert summary["critical_cooling_rates"]["ferrite_pearlite_under_1_percent"]["rate_K_s"] > 0
    assert "critical rate" in out and (tmp_path / "aisi-4140-crmo-cct.png").stat().st_size > 10_000
    log = ROOT / "alloys" / "brackwater-bw52crv-oil-quench-log.csv"
    code, out, err, _ = run_main("cool", ROOT / "alloys" / "brackwater-bw52crv.toml", "--log", log, "--out", tmp_path)
    assert code == 0, err
    data = json.loads((tmp_path / "brackwater-bw52crv-cool-summary.json").read_text())
    final = data["paths"][0]["final_fractions"]
    assert math.isclose(sum(final.values()), 1.0, abs_tol=1e-5) and final["martensite"] > 0.1
    assert 300 < data["paths"][0]["hardness_HV"] < 1000
    rows = (tmp_path / "brackwater-bw52crv-cool.csv").read_text().splitlines()
    assert rows[0].startswith("path,time_s,temperature_C,ferrite")
    code, out, err, _ = run_main("cool", AISI_4140, "--rate", "5", "--rate", "50", "--out", tmp_path / "r")
    assert code == 0 and out.count("K/s") >= 2


@pytest.mark.parametrize("text, expected", [
    ("time_s,temperature_C\n0,850\n", "at least two rows"),
    ("time_s,temperature_C\n0,850\n1,abc\n", "line 3"),
    ("time,temp\n0,850\n1,800\n", "needs a header"),
    ("time_s,temperature_C\n0,900\n10,880\n", "never cools below"),
])
def test_bad_logs_get_one_clear_line(text, expected, tmp_path):
    log = tmp_path / "log.csv"
    log.write_text(text)
    code, _, err, _ = run_main("cool", AISI_4140, "--log", log, "--out", tmp_path / "o")
    assert refused(code, err, expected)


def test_a_log_that_reheats_midway_is_taken_as_it_is():
    # A tempering-like reheat: additivity adds less while it is hotter, nothing is rejected.
    steel = isokin.load_alloy(AISI_4140)
    from isokin.compute.cooling import measured

    path = measured([0, 10, 20, 40, 60, 200], [850, 600, 500, 560, 450, 30])
    result = isokin.cool(steel, path)
    assert math.isclose(sum(float(v[0]) for v in result.final.values()), 1.0, abs_tol=1e-9)
    assert np.all(np.diff(path.time_s) >= 0)
