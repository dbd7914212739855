"""Tempering: the Hollomon-Jaffe parameter, reading a measured tempering curve through it, the
temper for a hardness, the embrittlement range, and the quench-and-temper plan.

Sources: J. H. Hollomon and L. D. Jaffe, Trans. AIME 162 (1945) 223-249 (the parameter
P = T (C + log10 t_h); C = 21.3 - 5.8 %C as the relation is usually quoted, from memory);
ASTM E140 (HRC to HV). The tempering curves below are invented for these checks: they are
inputs, never check values; what is checked is the law that carries them.
"""

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from typer.testing import CliRunner

import isokin
from isokin.cli.commands import app
from isokin.compute.plan import quench_and_temper
from isokin.compute.temper import temper, temper_for_hardness, tempering_curve
from isokin.relations.hardness import hv_from_hrc_astm_e140
from isokin.relations.tempering import hollomon_jaffe_constant_1945, hollomon_jaffe_parameter_1945

STEEL = isokin.steel({"C": 0.40, "Mn": 0.85, "Si": 0.25, "Cr": 0.95, "Mo": 0.20}, 7.0, name="test 4140")
CURVE = tempering_curve([200, 300, 400, 500, 600, 700], [600, 540, 470, 400, 320, 250])


def test_constant_falls_with_carbon_as_quoted():
    # Hollomon and Jaffe (1945): C = 21.3 - 5.8 %C, time in hours (as usually quoted; from memory)
    assert float(hollomon_jaffe_constant_1945(0.0)) == pytest.approx(21.3)
    assert float(hollomon_jaffe_constant_1945(0.8)) == pytest.approx(21.3 - 4.64)


def test_equivalent_time_by_hand():
    # P = T (C + log10 t_h): 1 h at 600 °C with C = 20 is P = 873.15 * 20; at 550 °C the same P
    # takes 10^(P / 823.15 - 20) h, worked by hand here
    hours = 10.0 ** (873.15 * 20.0 / 823.15 - 20.0)
    got = isokin.equivalent_time(STEEL, 600.0, 3600.0, 550.0, constant=20.0)
    assert float(got) == pytest.approx(hours * 3600.0, rel=1e-12)
    assert 16.0 < hours < 16.6


@settings(max_examples=60, deadline=None)
@given(T1=st.floats(220.0, 680.0), hours=st.floats(0.05, 200.0), T2=st.floats(220.0, 680.0))
def test_equal_parameter_gives_equal_hardness(T1, hours, T2):
    # the law itself: two tempers with one Hollomon-Jaffe parameter give one hardness
    C = float(hollomon_jaffe_constant_1945(STEEL.composition.C))
    P = hollomon_jaffe_parameter_1945(T1 + 273.15, hours * 3600.0, C)
    t2 = 3600.0 * 10.0 ** (P / (T2 + 273.15) - C)
    if not 1.0 <= t2 <= 31 * 24 * 3600.0:
        return
    first = temper(STEEL, T1, hours * 3600.0, CURVE).hardness_HV[0]
    second = temper(STEEL, T2, t2, CURVE).hardness_HV[0]
    if math.isnan(first):
        assert math.isnan(second)
    else:
        assert second == pytest.approx(first, abs=1e-6)


@settings(max_examples=40, deadline=None)
@given(T=st.lists(st.floats(200.0, 700.0), min_size=2, max_size=30), hours=st.floats(0.1, 100.0))
def test_hardness_falls_as_the_temper_gets_hotter_or_longer(T, hours):
    # a softening curve read through the parameter softens with temperature and with time
    T = np.sort(np.asarray(T))
    hv = temper(STEEL, T, hours * 3600.0, CURVE).hardness_HV
    finite = hv[np.isfinite(hv)]
    assert np.all(np.diff(finite) <= 1e-9)
    longer = temper(STEEL, T, 2.0 * hours * 3600.0, CURVE).hardness_HV
    both = np.isfinite(hv) & np.isfinite(longer)
    assert np.all(longer[both] <= hv[both] + 1e-9)


def test_the_curve_is_reproduced_and_never_extrapolated():
    at = temper(STEEL, [300.0, 500.0, 750.0], 3600.0, CURVE)
    assert at.hardness_HV[:2] == pytest.approx([540.0, 400.0], abs=1e-9)
    assert math.isnan(at.hardness_HV[2]) and any("outside the tempering curve" in w for w in at.warnings)


def test_temper_for_a_hardness_round_trips():
    found = temper_for_hardness(STEEL, [330.0, 450.0], CURVE, time_s=2 * 3600.0)
    back = temper(STEEL, found.temperatures_C, found.times_s, CURVE).hardness_HV
    assert back == pytest.approx([330.0, 450.0], abs=1e-6)
    timed = temper_for_hardness(STEEL, 360.0, CURVE, temperature_C=560.0)
    assert temper(STEEL, 560.0, timed.times_s, CURVE).hardness_HV[0] == pytest.approx(360.0, abs=1e-6)


def test_unreachable_target_is_said_plainly():
    found = temper_for_hardness(STEEL, 700.0, CURVE, time_s=3600.0)
    assert math.isnan(found.temperatures_C[0])
    assert any("no temper on it reaches 700 HV" in w and "600 HV" in w for w in found.warnings)


def test_embrittlement_range_flagged():
    # tempered-martensite embrittlement near 250-400 °C (common practice, from memory)
    flags = temper(STEEL, [200.0, 300.0, 450.0], 3600.0, CURVE).embrittlement
    assert flags.tolist() == [False, True, False]


def test_secondary_hardening_curve_refused_for_the_inverse():
    bumpy = tempering_curve([400, 500, 550, 600], [500, 480, 510, 420])
    assert temper(STEEL, 525.0, 3600.0, bumpy).hardness_HV[0] > 480.0
    with pytest.raises(isokin.InputError, match="secondary hardening"):
        temper_for_hardness(STEEL, 450.0, bumpy, time_s=3600.0)


@pytest.mark.parametrize("args, match", [
    (([200], [500]), "two or more"),
    (([200, 900], [500, 300]), "temperature_C"),
    (([200, 400], [500, 5000]), "hardness_HV"),
    (([200, 400], [500, float("nan")]), "hardness_HV"),
])
def test_bad_curves_refused(args, match):
    with pytest.raises(isokin.InputError, match=match):
        tempering_curve(*args)


def test_curve_file_in_hrc(tmp_path):
    path = tmp_path / "curve.csv"
    path.write_text("# measured\ntemperature_C,hardness_HRC,time_s\n300,50,7200\n500,40,7200\n")
    curve = isokin.read_tempering_curve(path)
    assert curve.hardness_HV.tolist() == pytest.approx([float(hv_from_hrc_astm_e140(50)),
                                                        float(hv_from_hrc_astm_e140(40))])
    assert curve.time_s.tolist() == [7200.0, 7200.0]
    path.write_text("temperature_C,hardness_HV\n300,abc\n")
    with pytest.raises(isokin.InputError, match="line 2"):
        isokin.read_tempering_curve(path)


def test_quench_and_temper_plan():
    plan = quench_and_temper(STEEL, CURVE, (320.0, 360.0), temper_s=3600.0)
    rec = plan.recommendation
    assert rec["hardness_HV"] == pytest.approx(340.0)
    assert temper(STEEL, rec["temperature_C"], 3600.0, CURVE).hardness_HV[0] == pytest.approx(340.0, abs=1e-6)
    assert plan.window_C[0] < rec["temperature_C"] < plan.window_C[1]
    # a target only the embrittlement range reaches: no window unless allowed
    inside = quench_and_temper(STEEL, CURVE, (480.0, 520.0), temper_s=3600.0)
    assert inside.recommendation is None and "embrittlement range" in inside.no_window
    allowed = quench_and_temper(STEEL, CURVE, (480.0, 520.0), temper_s=3600.0, avoid_embrittlement=False)
    assert 250.0 <= allowed.recommendation["temperature_C"] <= 400.0


def test_quench_and_temper_warns_when_the_quench_does_not_harden():
    # 4140 cooled at 1 K/s does not through-harden (common practice)
    plan = quench_and_temper(STEEL, CURVE, (320.0, 360.0), quench_rate_K_s=1.0)
    assert plan.options["as_quenched_martensite"] < 0.9
    assert any("fully hardened" in w for w in plan.warnings)


def test_cli_temper_and_plan(tmp_path):
    curve = tmp_path / "curve.csv"
    curve.write_text("temperature_C,hardness_HV\n200,600\n400,470\n600,320\n700,250\n")
    runner = CliRunner()
    out = tmp_path / "out"
    result = runner.invoke(app, ["temper", "alloys/aisi-4140-crmo.toml", "--curve", str(curve), "--temperature-c",
                                 "300", "--time", "2h", "--out", str(out)])
    assert result.exit_code == 0, result.output
    assert "embrittlement range" in result.output
    assert sorted(p.name for p in out.iterdir()) == ["aisi-4140-crmo-temper.csv", "aisi-4140-crmo-temper.json",
                                                     "aisi-4140-crmo-temper.png"]
    result = runner.invoke(app, ["temper", "alloys/aisi-4140-crmo.toml", "--target-hrc", "30:34", "--time", "2h",
                                 "--out", str(out)])
    assert result.exit_code == 2 and "--curve" in result.output and "Traceback" not in result.output
    result = runner.invoke(app, ["plan", "alloys/aisi-4140-crmo.toml", "--route", "quench-and-temper", "--curve",
                                 str(curve), "--target-hrc", "60:62", "--out", str(tmp_path / "plan")])
    assert result.exit_code == 0, result.output
    assert "no temper of 2 h reaches" in result.output
    result = runner.invoke(app, ["plan", "alloys/aisi-4140-crmo.toml", "--route", "austemper", "--target-hv",
                                 "400:450", "--out", str(tmp_path / "a")])
    assert result.exit_code == 2 and "one hardness" in result.output
