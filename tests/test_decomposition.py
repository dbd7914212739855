"""The decomposition of austenite (or any parent) as one reaction, and the microstructure after a hold."""

import json
import math
import sys
from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import isokin
from isokin.compute.decomposition import Decomposition, WAIT_FRACTION
from isokin.constants import celsius_to_kelvin
from isokin.products.nucleation_growth import NucleationGrowthParameters, NucleationGrowthProduct, nucleation_growth_alloy
from isokin.relations.composition import Composition
from isokin.relations.steel_critical import (
    ae1_andrews_1965,
    ae3_andrews_1965,
    eutectoid_carbon_andrews_1965,
    ferrite_fraction_lever_rule_andrews,
)

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(Path(__file__).parent))
from test_hardening import refused, run_main  # noqa: E402  the entry point, in-process

# The precipitation case of the solver tests (a dilute Al-Cu-like product; demo values).
PRECIPITATION = dict(equilibrium_K=780.0, latent_heat_J_mol=1e4, molar_volume_m3_mol=1e-5, interface_energy_J_m2=0.1,
                     nucleation_activation_J_mol=136e3, diffusion_prefactor_m2_s=6.5e-5,
                     diffusion_activation_J_mol=136e3, diffusion_distance_m=1e-8, site_density_m3=1e24)
# A plain eutectoid steel, as in the Li tests (0.8 C, 0.76 Mn, ASTM 6).
EUTECTOID = {"C": 0.80, "Mn": 0.76}

steels = st.fixed_dictionaries({
    "C": st.floats(0.1, 0.9), "Mn": st.floats(0.3, 1.6), "Si": st.floats(0.0, 0.6),
    "Ni": st.floats(0.0, 2.0), "Cr": st.floats(0.0, 1.2), "Mo": st.floats(0.0, 0.4),
})


@settings(max_examples=40, deadline=None)
@given(steel=steels, grain=st.floats(3.0, 11.0), T_C=st.floats(150.0, 900.0),
       log_t=st.floats(-2.0, 7.0), quench=st.floats(-100.0, 100.0))
def test_fractions_are_never_negative_and_sum_to_one(steel, grain, T_C, log_t, quench):
    after = isokin.hold(isokin.steel(steel, grain), T_C, 10.0**log_t, quench_to_C=quench)
    values = np.array([float(v) for v in after.fractions.values()])
    assert np.all(values >= -1e-12) and math.isclose(values.sum(), 1.0, abs_tol=1e-9)


@settings(max_examples=25, deadline=None)
@given(steel=steels, grain=st.floats(3.0, 11.0), T_C=st.floats(300.0, 750.0))
def test_fractions_grow_with_hold_time(steel, grain, T_C):
    # More time at a temperature never takes a product back (common practice).
    times = np.geomspace(0.1, 1e6, 25)
    after = isokin.hold(isokin.steel(steel, grain), T_C, times)
    transformed = sum(after.fractions[p] for p in ("ferrite", "pearlite", "bainite"))
    assert np.all(np.diff(transformed) >= -1e-9)


def test_lever_rule_against_a_hand_calculation_on_the_same_andrews_lines():
    # 0.4 C, 0.8 Mn: Ae3 = 910 - 203 sqrt(0.4) - 30 x 0.8 = 757.6 C, Ae1 = 723 - 10.7 x 0.8 = 714.4 C
    # (Andrews 1965). At 740 C the austenite holds ((910 - 24 - 740) / 203)^2 % C; below Ae1 the
    # eutectoid carbon ((886 - 714.44) / 203)^2; ferrite 0.02 % C (common practice).
    steel = Composition.from_dict({"C": 0.4, "Mn": 0.8})
    assert float(ae3_andrews_1965(steel)) - 273.15 == pytest.approx(910 - 203 * math.sqrt(0.4) - 24.0, abs=1e-9)
    c_740 = ((886.0 - 740.0) / 203.0) ** 2
    c_e = ((886.0 - (723.0 - 8.56)) / 203.0) ** 2
    assert float(eutectoid_carbon_andrews_1965(steel)) == pytest.approx(c_e, rel=1e-12)
    for T_C, c_gamma in ((740.0, c_740), (650.0, c_e)):
        expected = (c_gamma - 0.4) / (c_gamma - 0.02)
        got = float(ferrite_fraction_lever_rule_andrews(celsius_to_kelvin(T_C), steel))
        assert got == pytest.approx(expected, rel=1e-12)
    assert float(ferrite_fraction_lever_rule_andrews(celsius_to_kelvin(760.0), steel)) == 0.0  # above Ae3
    at_eutectoid = Composition.from_dict({"C": float(eutectoid_carbon_andrews_1965(steel)), "Mn": 0.8})
    assert float(ferrite_fraction_lever_rule_andrews(celsius_to_kelvin(650.0), at_eutectoid)) == 0.0
    assert float(ae1_andrews_1965(steel)) - 273.15 == pytest.approx(714.44, abs=1e-9)


def _ng(name="precipitate", **changes):
    return NucleationGrowthProduct(name, NucleationGrowthParameters(**{**PRECIPITATION, **changes}))


def test_a_single_product_reduces_exactly_to_its_own_curve():
    product = _ng()
    alloy = nucleation_growth_alloy("one", [product])
    T = np.linspace(500.0, 770.0, 40)
    d = Decomposition(alloy, T[None, :])
    q = np.array([0.01, 0.5, 0.99])[:, None]
    np.testing.assert_allclose(d.time_to_total(q), product.time_to_fraction(T[None, :], q), rtol=1e-9)
    t = np.geomspace(1.0, 1e6, 40)
    after = isokin.hold(alloy, T - 273.15, t)
    np.testing.assert_allclose(after.fractions["precipitate"], product.fraction_after(T, t), rtol=1e-12, atol=1e-15)
    result = isokin.ttt(alloy, temperatures_C=T - 273.15)
    assert result.overall is None and result.products == ("precipitate",)


def test_two_identical_concurrent_products_are_one_with_twice_the_rate_constant():
    # JMAK with continuous nucleation: K = pi I u^3 / 3 and I is proportional to the site
    # density, so doubling N doubles K (Avrami 1939-41, the extended-volume identity).
    alloy = nucleation_growth_alloy("twins", [_ng("a"), _ng("b")])
    double = _ng("a", site_density_m3=2e24)
    T = np.linspace(500.0, 770.0, 30)
    q = np.array([0.01, 0.5, 0.99])[:, None]
    together = Decomposition(alloy, T[None, :]).time_to_total(q)
    np.testing.assert_allclose(together, double.time_to_fraction(T[None, :], q), rtol=1e-9)
    after = isokin.hold(alloy, T - 273.15, 2000.0)
    np.testing.assert_allclose(after.fractions["a"], after.fractions["b"], rtol=1e-12)
    np.testing.assert_allclose(after.fractions["a"] + after.fractions["b"], double.fraction_after(T, 2000.0),
                               rtol=1e-9, atol=1e-12)


def test_eutectoid_steel_held_at_650_C_for_an_hour_is_pearlite():
    # Common practice: a plain eutectoid steel held in the pearlite range transforms fully.
    after = isokin.hold(isokin.steel(EUTECTOID, 6.0), 650.0, 3600.0)
    assert float(after.fractions["pearlite"]) >= 0.99


def test_a_short_hold_then_quench_is_koistinen_marburger_on_what_is_left():
    # Koistinen & Marburger (1959): f = 1 - exp(-0.011 (Ms - T)) of the austenite left.
    steel = isokin.steel(EUTECTOID, 6.0)
    after = isokin.hold(steel, 650.0, 0.1, quench_to_C=20.0)
    left = 1.0 - sum(float(after.fractions[p]) for p in ("ferrite", "pearlite", "bainite"))
    ms = float(steel.critical_K["Ms"])
    expected = left * (1.0 - math.exp(-0.011 * (ms - celsius_to_kelvin(20.0))))
    assert float(after.fractions["martensite"]) == pytest.approx(expected, rel=1e-9)
    assert float(after.fractions["retained austenite"]) == pytest.approx(left - expected, rel=1e-9)


def test_the_overall_start_is_never_later_than_any_products_start():
    for path in sorted((ROOT / "alloys").glob("*.toml")):
        result = isokin.ttt(isokin.load_alloy(path))
        if result.overall is None:
            continue
        total = result.times_s["total"][0]
        for name in result.products[:-1]:
            own = result.times_s[name][0]
            ok = np.isfinite(own)
            assert np.all(total[ok] <= own[ok] * (1 + 1e-9)), (path.name, name)


def test_above_ae3_nothing_forms_and_the_quench_gives_martensite_and_retained_austenite():
    steel = isokin.steel({"C": 0.4, "Mn": 0.8, "Cr": 1.0}, 7.0)
    above = float(steel.critical_K["Ae3"]) - 273.15 + 20.0
    after = isokin.hold(steel, above, [1.0, 3600.0, 1e8])
    for p in ("ferrite", "pearlite", "bainite"):
        assert np.all(after.fractions[p] == 0.0)
    np.testing.assert_allclose(after.fractions["martensite"] + after.fractions["retained austenite"], 1.0)


def test_pearlite_waits_for_ferrite_and_below_bs_bainite_forms_alone():
    steel = isokin.load_alloy(ROOT / "alloys" / "aisi-4140-crmo.toml")
    d = Decomposition(steel, celsius_to_kelvin(np.array([650.0, 450.0])))
    ferrite_done = steel.products[0].time_to_fraction(d.T, WAIT_FRACTION)
    assert d.delays["pearlite"][0] == pytest.approx(ferrite_done[0], rel=1e-12)
    assert np.all(d.delays["bainite"] == 0.0)
    before = isokin.hold(steel, 650.0, 0.9 * float(ferrite_done[0]))
    assert float(before.fractions["pearlite"]) == 0.0 and float(before.fractions["ferrite"]) > 0.2
    # below the kinetic model's Bs, ferrite and pearlite do not form (Kirkaldy's scheme, as recalled)
    alone = isokin.hold(steel, 450.0, 60.0)
    assert float(alone.fractions["bainite"]) > 0.3
    assert float(alone.fractions["ferrite"]) == float(alone.fractions["pearlite"]) == 0.0


def test_total_curves_in_the_exports(tmp_path):
    code, out, err, _ = run_main("diagram", ROOT / "alloys" / "aisi-4140-crmo.toml", "--out", tmp_path, "--points", "80")
    assert code == 0, err
    summary = json.loads((tmp_path / "aisi-4140-crmo-summary.json").read_text())
    total = summary["products"]["total"]
    assert total["fractions"]["0.01"]["forms"] and "extended-volume" in total["model"]
    rows = (tmp_path / "aisi-4140-crmo-curves.csv").read_text().splitlines()
    assert any(r.startswith("total,") for r in rows)
    assert "\ntotal " in out


def test_hold_command_answers_what_a_hold_gives(tmp_path):
    for path in sorted((ROOT / "alloys").glob("*.toml")):
        code, out, err, _ = run_main("hold", path, "--temperature-c", "400", "--time", "30min", "--time", "90s",
                                     "--out", tmp_path, "--overwrite")
        assert code == 0, (path.name, err)
        data = json.loads((tmp_path / f"{path.stem}-hold.json").read_text())
        assert [h["time_s"] for h in data["holds"]] == [90.0, 1800.0]
        assert all(math.isclose(sum(h["fractions"].values()), 1.0, abs_tol=1e-5) for h in data["holds"])
        assert data["isokin_version"] and data["inputs"] and "milestones_s" in data
    code, out, _, _ = run_main("hold", ROOT / "alloys" / "aisi-1080-eutectoid.toml", "--temperature-c", "650",
                               "--times", "0.1s..1h/5", "--out", tmp_path / "g", "--units", "F")
    assert code == 0 and "1202.0 °F" in out and out.count(" %") > 20


@pytest.mark.parametrize("args, key", [
    (["--time", "30min"], "--temperature-c"),
    (["--temperature-c", "400"], "--time"),
    (["--temperature-c", "400", "--time", "3 weeks"], "--time"),
    (["--temperature-c", "400", "--times", "1h..1s/5"], "--times"),
    (["--temperature-c", "-300", "--time", "1h"], "temperature"),
])
def test_bad_hold_options(args, key, tmp_path):
    code, _, err, _ = run_main("hold", ROOT / "alloys" / "aisi-4140-crmo.toml", *args, "--out", tmp_path)
    assert refused(code, err, key)


def test_regions_are_labelled_from_the_curves():
    from isokin.plot.ttt import region_labels

    result = isokin.ttt(isokin.load_alloy(ROOT / "alloys" / "aisi-4140-crmo.toml"))
    # what the decomposition has become, by the model, after it has finished
    phases = [r[2] for r in result.regions]
    assert ("ferrite", "pearlite") in phases and ("bainite",) in phases
    for T, t_end, _ in result.regions:
        finish = result.times_s["total"][-1]
        done = np.isfinite(finish)
        assert t_end == pytest.approx(np.exp(np.interp(T, result.temperatures_K[done], np.log(finish[done]))), rel=1e-9)
    # and where the figure writes it
    labels = region_labels(result)
    texts = [r[0] for r in labels]
    assert texts[0] == "austenite" and "martensite" in texts and "bainite" in texts
    assert any("ferrite + pearlite" == t for t in texts)
    parent = labels[0]
    start = np.interp(parent[1], result.temperatures_K, result.times_s["total"][0])
    assert parent[2] < start  # left of the start curve


def test_units_convert_the_figure_axis():
    import matplotlib.pyplot as plt

    result = isokin.ttt(isokin.load_alloy(ROOT / "alloys" / "aisi-4140-crmo.toml"), points=60)
    ax = isokin.plot_ttt(result, units="F")
    assert "°F" in ax.get_ylabel()
    top = max(line.get_ydata().max() for line in ax.lines if len(line.get_ydata()) > 2)
    assert top == pytest.approx(float(result.temperatures_C[-1]) * 1.8 + 32.0, rel=1e-9)
    plt.close(ax.figure)


def test_own_curves_are_the_published_models_curves():
    # decomposition=False: each product from all of the austenite, no sequence, no total.
    steel = isokin.load_alloy(ROOT / "alloys" / "aisi-4140-crmo.toml")
    result = isokin.ttt(steel, points=50, decomposition=False)
    assert result.overall is None
    T = result.temperatures_K
    for product in steel.products:
        own = product.time_to_fraction(T[None, :], result.fractions[:, None])
        np.testing.assert_allclose(result.times_s[product.name], np.where(own > 0, own, np.inf), rtol=1e-14)


@pytest.mark.parametrize("alloy_file", ["aisi-4340-nicrmo", "aisi-4140-crmo", "brackwater-bw52crv",
                                        "aisi-1080-eutectoid"])
def test_any_fraction_of_the_whole_decomposition_agrees_with_a_hold(alloy_file):
    # The total curve at X is where a hold at that temperature has transformed X of what can
    # transform there: the same model read two ways, to 1e-3 absolute (here far closer).
    alloy = isokin.load_alloy(ROOT / "alloys" / f"{alloy_file}.toml")
    fractions = (0.01, 0.05, 0.1, 0.3, 0.5, 0.7, 0.95, 0.99)
    result = isokin.ttt(alloy, fractions=fractions, points=60)
    for i in range(0, 60, 3):
        t = result.times_s["total"][:, i]
        ok = np.isfinite(t)
        if ok.any():
            after = isokin.hold(alloy, float(result.temperatures_C[i]), t[ok], milestones=False)
            done = sum(after.fractions[p.name] for p in alloy.products) / after.transformable
            np.testing.assert_allclose(done, np.asarray(fractions)[ok], atol=1e-6)
    # and a curve a fine grid draws does not zig-zag between neighbouring grid points: its
    # slope changes sign only at its noses, at Ae1 (pearlite joins) and at the kinetic model's
    # Bs (bainite takes over from ferrite and pearlite)
    fine = isokin.ttt(alloy, fractions=(0.05,), points=400).times_s["total"][0]
    slope = np.sign(np.diff(np.log(fine[np.isfinite(fine)])))
    assert np.count_nonzero(slope[1:] != slope[:-1]) <= 5


def test_the_summary_says_what_each_curves_fraction_means(tmp_path):
    code, _, err, _ = run_main("diagram", ROOT / "alloys" / "aisi-4140-crmo.toml", "--out", tmp_path, "--points", "40")
    assert code == 0, err
    meaning = json.loads((tmp_path / "aisi-4140-crmo-summary.json").read_text())["fraction_meaning"]
    assert set(meaning) == {"ferrite", "pearlite", "bainite", "total"}
    assert "share of the austenite that has become ferrite" in meaning["ferrite"]
    assert "all products together" in meaning["total"]
    physical = isokin.ttt(isokin.load_alloy(ROOT / "alloys" / "brackwater-ba42-precipitation.toml"), points=20)
    assert "own completion" in physical.fraction_meanings["precipitate"]
