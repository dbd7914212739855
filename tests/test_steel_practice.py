"""Steel diagrams against facts of the trade, for both kinetic models.

Each check says where its number comes from; most are common practice recalled from memory
(marked so). No coefficient was tuned to any of them: where a published model misses a fact,
the test is marked as an expected failure with the reason (strict, so a model that comes to
meet it is noticed), and the README's "How accurate is it" lists it. The default kinetic model
is the one that meets more of them.

Compositions at the middle of their standard ranges are from memory of SAE J403/J404.
"""

from pathlib import Path

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.optimize import minimize_scalar

import isokin
from isokin.compute.decomposition import Decomposition
from isokin.compute.plan import austemper
from isokin.constants import celsius_to_kelvin, kelvin_to_celsius
from isokin.products.steel import DEFAULT_KINETICS

ROOT = Path(__file__).resolve().parents[1]
KV, LI = "kirkaldy_venugopalan_1984", "li_1998"
MODELS = (KV, LI)
# SAE mid-range analyses (from memory of the standards)
SAE_5160 = {"C": 0.60, "Mn": 0.875, "Si": 0.25, "Cr": 0.80}
SAE_6150 = {"C": 0.505, "Mn": 0.80, "Si": 0.25, "Cr": 0.95, "V": 0.15}
AISI_4340 = {"C": 0.405, "Mn": 0.70, "Si": 0.25, "Ni": 1.825, "Cr": 0.80, "Mo": 0.25}
# plain eutectoid steels: the corners of C 0.79-0.82 and Mn 0.7-0.8, killed (Si 0.25), ASTM 6
EUTECTOIDS = [{"C": c, "Mn": mn, "Si": 0.25} for c in (0.79, 0.82) for mn in (0.7, 0.8)]


def misses(model, reason):
    """The model as a parameter, marked as a strict expected failure: the fact it falls short of."""
    return pytest.param(model, marks=pytest.mark.xfail(strict=True, reason=reason))


def start_curve(alloy, points=1500):
    """Hold temperatures (K) and the time to 1 % of what can transform there (the start curve)."""
    lo, hi = alloy.default_range_K
    T = np.linspace(lo, hi, points)
    return T, Decomposition(alloy, T).time_to_total(0.01)


def nose(alloy, T, t, where):
    """The minimum of the start curve over the grid points ``where``, refined by scipy's bounded
    Brent search in ln t between the neighbouring grid points: (temperature K, time s)."""
    k = np.flatnonzero(where)[np.argmin(t[where])]
    lo, hi = T[max(k - 1, 0)], T[min(k + 1, T.size - 1)]
    best = minimize_scalar(lambda x: float(np.log(Decomposition(alloy, np.array(x)).time_to_total(0.01))),
                           bounds=(lo, hi), method="bounded", options={"xatol": 1e-3})
    return (best.x, float(np.exp(best.fun))) if best.fun < np.log(t[k]) else (T[k], float(t[k]))


def bainite_start_K(alloy):
    return celsius_to_kelvin(alloy.provenance["bainite_start"]["temperature_C"])


@pytest.mark.parametrize("model", [
    KV, misses(LI, "Li et al.'s bainite at 300 C in a eutectoid steel takes 7.5-11.5 h to reach 50 %")])
@pytest.mark.parametrize("composition", EUTECTOIDS)
def test_a_eutectoid_steel_held_at_300_C_becomes_bainite_not_pearlite(model, composition):
    # Common practice, from memory: a eutectoid steel held at 300 C forms lower bainite;
    # after 1 h at least 95 % of it is bainite and pearlite does not form there.
    alloy = isokin.steel(composition, 6.0, kinetics_model=model)
    after = isokin.hold(alloy, 300.0, 3600.0)
    assert float(after.fractions["bainite"]) >= 0.95
    assert float(after.fractions["pearlite"]) < 0.01


@pytest.mark.parametrize("model", [
    misses(KV, "Kirkaldy & Venugopalan's bainite reaches 50 % at 300 C in 2.9-3.2 min, faster than the 5 min "
               "recalled from practice"),
    misses(LI, "Li et al.'s bainite takes 7.5-11.5 h")])
@pytest.mark.parametrize("composition", EUTECTOIDS)
def test_eutectoid_bainite_at_300_C_is_half_done_within_5_to_60_min(model, composition):
    # Common practice, from memory: bainite at 300 C in a eutectoid steel starts within about a
    # minute and is half done within 5-60 min.
    alloy = isokin.steel(composition, 6.0, kinetics_model=model)
    half = float(Decomposition(alloy, np.array(celsius_to_kelvin(300.0))).time_to_total(0.5))
    assert 5 * 60.0 <= half <= 60 * 60.0


@pytest.mark.parametrize("model", MODELS)
@pytest.mark.parametrize("composition", EUTECTOIDS)
def test_eutectoid_start_nose(model, composition):
    # ASM atlas of isothermal transformation diagrams (1977), eutectoid steel, as quoted in the
    # literature (recalled): the start nose lies between 520 and 570 C at 0.3-3 s.
    alloy = isokin.steel(composition, 6.0, kinetics_model=model)
    T, t = start_curve(alloy)
    T_nose, t_nose = nose(alloy, T, t, np.isfinite(t))
    assert 520.0 <= kelvin_to_celsius(T_nose) <= 570.0 and 0.3 <= t_nose <= 3.0


@pytest.mark.parametrize("model", [
    KV, misses(LI, "Li et al.'s reaction term gives t(50 %)/t(1 %) = 9.8 at every temperature")])
def test_eutectoid_reaction_is_half_done_within_five_times_its_start(model):
    # ASM atlas (1977) as quoted in the literature: a eutectoid steel at 540 C starts near 1 s
    # and is half transformed in about 3 s (Avrami exponent 3-4, from memory).
    alloy = isokin.steel({"C": 0.79, "Mn": 0.76, "Si": 0.25}, 6.0, kinetics_model=model)
    t1, t50 = Decomposition(alloy, np.array(celsius_to_kelvin(540.0))).time_to_total(np.array([0.01, 0.5]))
    assert t50 / t1 <= 5.0


@pytest.mark.parametrize("model", MODELS)
@pytest.mark.parametrize("composition", [SAE_5160, SAE_6150], ids=["5160", "6150"])
def test_spring_steels_austemper_without_ferrite_or_pearlite(model, composition):
    # Common practice (from memory): spring steels such as SAE 5160 and 6150 are austempered at
    # about 300-400 C; no ferrite or pearlite forms there within hours.
    alloy = isokin.steel(composition, 7.0, kinetics_model=model)
    T = np.arange(320.0, 381.0, 10.0)
    after = isokin.hold(alloy, T, 4 * 3600.0)
    assert np.all(after.fractions["ferrite"] + after.fractions["pearlite"] < 0.01)
    window = austemper(alloy)
    assert window.window_C is not None and window.window_C[0] < 380.0


def test_the_shipped_spring_steel_has_an_austempering_window():
    # The invented demo grade BW-52CrV is a Cr-V spring steel like SAE 6150 (common practice: austempered).
    alloy = isokin.load_alloy(ROOT / "alloys" / "brackwater-bw52crv.toml")
    plan = austemper(alloy)
    assert plan.window_C is not None and plan.recommendation is not None
    assert 300.0 <= plan.recommendation["temperature_C"] <= 400.0


@pytest.mark.parametrize("model", MODELS)
def test_4340_has_a_bainite_nose_below_a_bay(model):
    # Common practice, from memory: Ni-Cr-Mo steels such as 4340 show two C-curves with a slow
    # bay between them around 500-550 C; the bainite nose lies below about 480 C.
    alloy = isokin.steel(AISI_4340, 7.0, kinetics_model=model)
    T, t = start_curve(alloy)
    bs = bainite_start_K(alloy)
    T_low, t_low = nose(alloy, T, t, np.isfinite(t) & (T < bs))
    T_up, _ = nose(alloy, T, t, np.isfinite(t) & (T > bs))
    assert kelvin_to_celsius(T_low) <= 480.0
    between = (T > T_low) & (T < T_up)
    assert np.max(np.where(np.isfinite(t[between]), t[between], np.inf)) >= 10.0 * t_low


@pytest.mark.parametrize("model", [
    misses(KV, "the ferrite/pearlite nose of Kirkaldy & Venugopalan sits about 140-180 K below Ae3/Ae1 "
               "(564 C for 4340)"),
    misses(LI, "the ferrite/pearlite nose of Li et al. sits about 150-180 K below Ae3/Ae1 (564 C for 4340)")])
def test_4340_upper_nose_at_or_above_600_C(model):
    # From memory: the upper (ferrite/pearlite) nose of Ni-Cr-Mo steels such as 4340 lies at
    # about 600-700 C.
    alloy = isokin.steel(AISI_4340, 7.0, kinetics_model=model)
    T, t = start_curve(alloy)
    T_up, _ = nose(alloy, T, t, np.isfinite(t) & (T > bainite_start_K(alloy)))
    assert kelvin_to_celsius(T_up) >= 600.0


def _upper_nose(composition, grain, model):
    alloy = isokin.steel(composition, grain, kinetics_model=model)
    T, t = start_curve(alloy, points=600)
    return nose(alloy, T, t, np.isfinite(t) & (T > bainite_start_K(alloy)))


low_alloy = st.fixed_dictionaries({"C": st.floats(0.25, 0.45), "Mn": st.floats(0.5, 1.2), "Si": st.floats(0.15, 0.35),
                                   "Ni": st.floats(0.0, 1.0), "Cr": st.floats(0.0, 1.0), "Mo": st.floats(0.0, 0.3)})


@settings(max_examples=8, deadline=None)
@given(steel=low_alloy, element=st.sampled_from(["Mo", "Cr"]), more=st.floats(0.1, 0.4),
       model=st.sampled_from(MODELS))
def test_molybdenum_and_chromium_slow_the_upper_nose_and_move_it(steel, element, more, model):
    # Common practice: Mo and Cr delay ferrite and pearlite and shift their C-curve. Held up
    # to 0.45 % C; nearer the eutectoid the models fail it (the next check).
    T0, t0 = _upper_nose(steel, 7.0, model)
    T1, t1 = _upper_nose({**steel, element: steel[element] + more}, 7.0, model)
    assert t1 > t0 and abs(T1 - T0) > 0.1


@pytest.mark.xfail(strict=True, reason="near the eutectoid, Mo raises Andrews' Ae3 (+31.5 K per %) and with it the "
                   "lever-rule share of proeutectoid ferrite (4 % to 13 % here), so 1 % of the part is reached sooner "
                   "although ferrite and pearlite each form more slowly")
def test_molybdenum_slows_the_upper_nose_near_the_eutectoid():
    # Common practice, as above; a 0.53 % C Cr steel with 0.25 % Mo added, default kinetics
    # (Li et al. 1998 fails it the same way at other analyses near 0.55 % C).
    steel = {"C": 0.53, "Mn": 1.0, "Si": 0.25, "Cr": 0.75}
    _, t0 = _upper_nose(steel, 7.0, "kirkaldy_venugopalan_1984")
    _, t1 = _upper_nose({**steel, "Mo": 0.25}, 7.0, "kirkaldy_venugopalan_1984")
    assert t1 > t0


@settings(max_examples=5, deadline=None)
@given(steel=low_alloy, model=st.sampled_from(MODELS))
def test_a_coarser_grain_slows_the_upper_nose(steel, model):
    # Common practice: a coarser austenite grain (lower ASTM number) delays ferrite and pearlite.
    assert _upper_nose(steel, 5.0, model)[1] > _upper_nose(steel, 8.0, model)[1]


def test_bainite_never_forms_above_ae1_and_the_cap_is_said():
    # Common practice (from memory): bainite (ferrite + carbide) does not form above the
    # eutectoid temperature.
    # For C 0.10, Mn 0.5 van Bohemen's Bs (762 C) lies above Andrews' Ae1 (718 C).
    alloy = isokin.steel({"C": 0.10, "Mn": 0.5}, 7.0)
    ae1 = float(alloy.critical_K["Ae1"])
    assert float(alloy.critical_K["Bs"]) <= ae1 and all(p.upper_K <= ae1 for p in alloy.products[1:])
    assert sum("capped at Ae1" in w and "Bs" in w and "Ae1" in w for w in alloy.warnings) == 1
    after = isokin.hold(alloy, kelvin_to_celsius(ae1) + 20.0, 3600.0)
    assert float(after.fractions["bainite"]) == 0.0


def test_the_default_model_is_the_one_that_meets_more_of_the_facts():
    # Holds the documented choice: the default is the model that fails fewer of the checks
    # above (each model's shortfalls are its strict expected failures, tabulated in the README's
    # "How accurate is it").
    assert DEFAULT_KINETICS == KV
