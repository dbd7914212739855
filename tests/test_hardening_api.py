"""Hostile input, round two: the newer commands and the Python API keep the README's promise.

The promise checked here is the README's own (bad input: one line naming the option or key,
exit code 2, never a traceback; the API raises isokin.InputError, a ValueError, with the line
the command line prints; a successful run prints only isokin's own lines; the limits that
keep every run within seconds). Each test drives both the command line's entry point and
the library function it calls.
"""

import dataclasses
import math
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

import isokin
from isokin.compute import fit as fitting
from isokin.compute import plan as planning
from isokin.compute import spread as spreading
from isokin.compute.ttt import MAX_BATCH_VALUES
from isokin.errors import NAME_LIMIT
from isokin.results import Measurements

from test_hardening import FUZZ, assert_clean_outcome, run_main

ROOT = Path(__file__).resolve().parents[1]
STEEL_FILE = ROOT / "alloys" / "aisi-4140-crmo.toml"
DEMO_ALLOY = ROOT / "alloys" / "brackwater-bw52crv.toml"
DEMO_DATA = ROOT / "alloys" / "brackwater-bw52crv-dilatometer.csv"
PHYSICAL = ROOT / "alloys" / "brackwater-ba42-precipitation.toml"
STEEL = isokin.load_alloy(STEEL_FILE)


def one_line_refusal(args, option=None):
    """The command line refuses ``args``: exit 2, one line (naming ``option``), no Python warning."""
    code, out, err, caught = run_main(*args)
    assert_clean_outcome(code, out, err, caught)
    assert code == 2, (out, err)
    line = err.strip()
    if option is not None:
        assert line.startswith(f"isokin: error: {option}: "), line
    return line[len("isokin: error: "):]


def same_refusal(api_call, args, option):
    """The API raises InputError (a ValueError) and the command line prints the same problem,
    under its option's name."""
    with pytest.raises(isokin.InputError) as caught:
        api_call()
    assert isinstance(caught.value, ValueError) and "\n" not in str(caught.value)
    line = one_line_refusal(args, option)
    assert line == f"{option}: {caught.value.problem}", (line, str(caught.value))


# --- class 1: InputError is a ValueError, the same line in both ------------------------------

def test_input_error_is_a_value_error_with_one_line():
    error = isokin.InputError("a.toml", "steel.grain_size_astm", "must be\nfrom -1 to 14")
    assert isinstance(error, ValueError) and str(error) == "a.toml: steel.grain_size_astm: must be\\nfrom -1 to 14"


@pytest.mark.parametrize("name", ["a\nb", "a\tb", "x" * (NAME_LIMIT + 1), "   "])
def test_a_heat_name_is_checked_once_for_both(name, tmp_path):
    same_refusal(lambda: isokin.steel({"C": 0.4, "Mn": 0.8}, 7.0, name=name),
                 ["diagram", "--composition", "C=0.4,Mn=0.8", "--grain-size", "7", "--name", name, "--out", tmp_path],
                 "--name")
    assert not any(tmp_path.iterdir())


@FUZZ
@given(name=st.text(max_size=NAME_LIMIT + 5))
def test_fuzz_heat_names_are_results_or_one_line(name):
    try:
        isokin.steel({"C": 0.4, "Mn": 0.8}, 7.0, name=name)
    except isokin.InputError as exc:
        assert "\n" not in str(exc) and exc.key == "name"


# --- class 2: what raised tracebacks -----------------------------------------------------------

def test_a_parameter_the_data_do_not_constrain_is_refused(tmp_path):
    # the demo holds lie at 300-380 °C, below the spring steel's ferrite domain (common
    # practice: no proeutectoid ferrite forms in the bainite range)
    alloy = isokin.load_alloy(DEMO_ALLOY)
    data, _ = isokin.read_measurements(DEMO_DATA)
    same_refusal(lambda: isokin.fit(alloy, data, free=["ferrite.factor"]),
                 ["fit", DEMO_DATA, "--alloy", DEMO_ALLOY, "--free", "ferrite.factor", "--out", tmp_path / "c.toml"],
                 "--free")
    one_line_refusal(["fit", DEMO_DATA, "--alloy", DEMO_ALLOY, "--free", "bainite.factor", "--free", "bainite.factor",
                      "--out", tmp_path / "c.toml"], "--free")
    assert not any(tmp_path.iterdir())


@pytest.mark.parametrize("row, words", [("300,93,1e-17", "fractions must lie from"),
                                        ("300,1e300,0.5", "times must lie from"),
                                        ("300,1e-300,0.5", "times must lie from"),
                                        ("300,nan,0.5", "plain finite decimal")])
def test_measured_points_outside_what_can_be_measured_are_refused_by_both(row, words, tmp_path):
    data = tmp_path / "holds.csv"
    data.write_text(f"temperature_C,time_s,fraction\n{row}\n340,200,0.5\n380,400,0.6\n")
    line = one_line_refusal(["fit", data, "--alloy", DEMO_ALLOY, "--out", tmp_path / "c.toml"])
    assert "row 2" in line and words in line
    T, t, X = (float(v) for v in row.split(","))
    points = Measurements(np.array([T, 340.0, 380.0]) + 273.15, np.array([X, 0.5, 0.6]), np.array([t, 200.0, 400.0]),
                          (None,) * 3)
    if words != "plain finite decimal":  # the reader refuses a nan cell before the fit sees it
        with pytest.raises(isokin.InputError, match=words):
            isokin.fit(isokin.load_alloy(DEMO_ALLOY), points)


@pytest.mark.parametrize("time_s", [math.nan, -1.0, 0.0, math.inf])
def test_fit_refuses_times_that_are_not_measurements(time_s):
    data, _ = isokin.read_measurements(DEMO_DATA)
    times = data.time_s.copy()
    times[3] = time_s
    with pytest.raises(isokin.InputError, match=r"row \d+: times must lie from"):
        isokin.fit(isokin.load_alloy(DEMO_ALLOY), dataclasses.replace(data, time_s=times))


@pytest.mark.parametrize("args, option", [
    (["spread", STEEL_FILE, "--seed", "-1", "--samples", "20"], "--seed"),
    (["plan", STEEL_FILE, "--route", "austemper", "--worst-case", "--seed", "-1"], "--seed"),
    (["plan", STEEL_FILE, "--route", "austemper", "--margin-k", "1e300"], "--margin-k"),
    (["plan", STEEL_FILE, "--route", "interrupted-quench", "--margin-k", "-1"], "--margin-k"),
    (["plan", STEEL_FILE, "--route", "austemper", "--safety", "1e300"], "--safety"),
    (["plan", STEEL_FILE, "--route", "austemper", "--target-hv", "-5"], "--target-hv"),
    (["plan", STEEL_FILE, "--route", "anneal", "--budget", "1e300"], "--budget"),
])
def test_plan_and_spread_options_out_of_range_are_one_line(args, option, tmp_path):
    one_line_refusal([*args, "--out", tmp_path], option)
    assert not any(tmp_path.iterdir())


def test_the_plan_margin_is_refused_by_the_library_too():
    with pytest.raises(isokin.InputError, match="margin_K"):
        isokin.austemper(STEEL, margin_K=1e300)


def test_an_output_name_too_long_for_the_file_system_is_one_line(tmp_path):
    # 255 bytes is the usual file-name limit of Linux file systems (common practice)
    long = tmp_path / ("a" * 240 + ".toml")
    long.write_text(STEEL_FILE.read_text())
    line = one_line_refusal(["diagram", long, "--out", tmp_path / "out"], "--out")
    assert "too long" in line
    assert not (tmp_path / "out").exists() or not any((tmp_path / "out").iterdir())


# --- class 3: limits that bound time and memory ------------------------------------------------

def test_the_documented_limits_are_refused_one_above(tmp_path):
    with pytest.raises(isokin.InputError, match="samples"):
        isokin.spread(STEEL, {"C": ("range", 0.38, 0.43)}, samples=spreading.MAX_SAMPLES + 1)
    one_line_refusal(["spread", STEEL_FILE, "--samples", spreading.MAX_SAMPLES + 1, "--out", tmp_path], "--samples")
    one_line_refusal(["plan", STEEL_FILE, "--route", "austemper", "--worst-case", "--samples",
                      spreading.MAX_WORST_CASE_SAMPLES + 1, "--out", tmp_path], "--samples")
    heats = MAX_BATCH_VALUES // (3 * 200) + 1
    with pytest.raises(isokin.InputError, match="solve the batch in parts"):
        isokin.ttt(isokin.steel({"C": np.full(heats, 0.4), "Mn": 0.8, "Cr": 1.0}, 7.0))
    # the most points a fit takes, at the demo's hold temperatures, times from the demo model
    alloy = isokin.load_alloy(DEMO_ALLOY)
    n = fitting.MAX_POINTS
    T = np.repeat([300.0, 340.0, 380.0], -(-n // 3))[:n]
    X = np.tile(np.linspace(0.05, 0.95, -(-n // 3)), 3)[:n]
    t = fitting.model_times(alloy, Measurements(T + 273.15, X, np.ones(n), (None,) * n))
    data = tmp_path / "many.csv"
    data.write_text("temperature_C,time_s,fraction\n" + "".join(f"{a:g},{b:.6g},{c:.6g}\n" for a, b, c in zip(T, t, X)))
    free = ["bainite.factor", "bainite.activation_energy_cal_mol"]
    too_many = fitting.MAX_BOOTSTRAP_WORK // ((len(free) + 1) * n) + 1
    assert too_many <= fitting.MAX_BOOTSTRAP  # the work limit is the one that bites here
    points, _ = isokin.read_measurements(data)
    same_refusal(lambda: isokin.fit(alloy, points, free=free, bootstrap=too_many),
                 ["fit", data, "--alloy", DEMO_ALLOY, *(a for f in free for a in ("--free", f)), "--bootstrap",
                  too_many, "--out", tmp_path / "c.toml"], "--bootstrap")
    data.write_text(data.read_text() + "300,1e4,0.99\n")
    with pytest.raises(isokin.InputError, match=f"at most {n}"):
        isokin.fit(alloy, isokin.read_measurements(data)[0])


def test_the_worst_case_plan_in_blocks_gives_the_same_window(monkeypatch):
    heats = spreading.sampled_heats(STEEL, {"C": ("range", 0.38, 0.43), "Mo": ("range", 0.15, 0.25)}, 12, seed=2)
    whole = isokin.austemper(STEEL, worst_case=heats)
    monkeypatch.setattr(planning, "BLOCK_PAIRS", 12 * 5)  # five temperatures per block
    blocks = isokin.austemper(STEEL, worst_case=heats)
    assert whole.window_C == blocks.window_C
    assert np.array_equal(whole.rows["hold_time_s"], blocks.rows["hold_time_s"])


def test_the_bootstrap_in_blocks_gives_the_same_intervals(monkeypatch):
    alloy = isokin.load_alloy(DEMO_ALLOY)
    data, _ = isokin.read_measurements(DEMO_DATA)
    whole = isokin.fit(alloy, data, bootstrap=40)
    monkeypatch.setattr(fitting, "REFIT_BLOCK", 2 * data.time_s.size * 7)  # seven resamples per block
    blocks = isokin.fit(alloy, data, bootstrap=40)
    assert whole.bootstrap_intervals == blocks.bootstrap_intervals


# --- class 4: invalid input that was accepted --------------------------------------------------

@pytest.mark.parametrize("grid", ["10s...8h/12", "10s..8h", "10s..8h/1", "8h..10s/3", "10s..1e305d/50", "..8h/3"])
def test_a_bad_hold_time_grid_is_one_line_naming_times(grid, tmp_path):
    one_line_refusal(["hold", STEEL_FILE, "--temperature-c", 450, "--times", grid, "--out", tmp_path], "--times")


@pytest.mark.parametrize("text", ["C=0.38:0.43,C=0.40:0.45", "", ",", " , "])
def test_a_repeated_or_empty_range_is_one_line(text, tmp_path):
    one_line_refusal(["spread", STEEL_FILE, "--range", text, "--samples", 20, "--out", tmp_path], "--range")
    with pytest.raises(isokin.InputError, match="empty"):
        isokin.spread(STEEL, {}, samples=20)


physical_values = st.one_of(st.sampled_from([-1.0, -1e-30, math.nan, math.inf, -math.inf, "x", None, [1.0, "a"]]),
                            st.floats(allow_nan=True, allow_infinity=True).filter(lambda v: not v > 0))


@FUZZ
@given(field=st.sampled_from(["molar_volume_m3_mol", "interface_energy_J_m2", "nucleation_activation_J_mol",
                              "diffusion_prefactor_m2_s", "diffusion_activation_J_mol", "diffusion_distance_m",
                              "latent_heat_J_mol", "avrami_exponent", "incubation_time_s", "strain_energy_J_m3",
                              "wetting_angle_deg", "site_density_m3"]),
       value=physical_values)
def test_fuzz_nucleation_growth_parameters_are_physical(field, value):
    params = isokin.load_alloy(PHYSICAL).products[0].params
    may_be_zero = field in ("nucleation_activation_J_mol", "diffusion_activation_J_mol", "incubation_time_s",
                            "strain_energy_J_m3")
    if value is None and field in ("avrami_exponent", "site_density_m3"):
        return  # None is their default: the mode's own exponent, homogeneous nucleation
    if may_be_zero and isinstance(value, float) and value == 0.0:
        return
    with pytest.raises(isokin.InputError) as caught:
        dataclasses.replace(params, **{field: value})
    assert caught.value.key == field and "\n" not in str(caught.value)


# --- class 5: messages -------------------------------------------------------------------------

def test_no_command_is_one_clear_line():
    code, out, err, caught = run_main()
    assert code == 2 and not caught
    assert err.strip().startswith("isokin: error: give a command") and len(err.strip().splitlines()) == 1


@pytest.mark.parametrize("name", ["鋼 4711", "heat 🔥"])
def test_a_name_the_font_cannot_draw_gives_one_isokin_warning(name, tmp_path):
    code, out, err, caught = run_main("diagram", "--composition", "C=0.4,Mn=0.8", "--grain-size", "7", "--name", name,
                                      "--out", tmp_path)
    assert_clean_outcome(code, out, err, caught)
    assert code == 0 and "font has no character" in err


def test_a_fit_of_the_physical_demo_prints_only_isokin_lines(tmp_path):
    code, out, err, caught = run_main("fit", DEMO_DATA, "--alloy", PHYSICAL, "--out", tmp_path / "c.toml")
    assert_clean_outcome(code, out, err, caught)
    assert code == 0


# --- class 6: errors that were not the API's ---------------------------------------------------

@pytest.mark.parametrize("call", [
    lambda: isokin.steel({"C": []}),
    lambda: isokin.steel(pd.DataFrame({"C": [0.4, "x"], "Mn": [0.8, 0.8]})),
    lambda: isokin.steel({"C": 0.4, "Mn": 0.8}, "seven"),
    lambda: isokin.spread(STEEL, {"C": ("range", 0.38, 0.43)}, samples=2.5),
    lambda: isokin.spread(STEEL, {"C": ("range", "a", 0.43)}, samples=20),
    lambda: isokin.ttt("not an alloy"),
    lambda: isokin.ttt(STEEL, temperatures_C=["a", "b", "c"]),
    lambda: isokin.ttt(STEEL, fractions="half"),
    lambda: isokin.ttt(STEEL, points=2.5),
    lambda: isokin.hold("not an alloy", 450.0, 60.0),
    lambda: isokin.hold(STEEL, 450.0, [60.0, math.nan]),
    lambda: isokin.austemper("not an alloy"),
    lambda: isokin.fit(STEEL, "not data"),
])
def test_api_errors_are_input_errors_of_one_line(call):
    with pytest.raises(isokin.InputError) as caught:
        call()
    assert "\n" not in str(caught.value)


junk = st.one_of(st.none(), st.booleans(), st.text(max_size=4), st.floats(allow_nan=True, allow_infinity=True),
                 st.integers(-10**6, 10**6), st.lists(st.floats(allow_nan=True), max_size=3),
                 st.lists(st.text(max_size=2), min_size=1, max_size=3))


@FUZZ
@given(temperatures=junk, fractions=junk, points=junk)
def test_fuzz_ttt_arguments_give_a_result_or_an_input_error(temperatures, fractions, points):
    try:
        isokin.ttt(STEEL, temperatures_C=temperatures, fractions=(0.01, 0.5, 0.99) if fractions is None else fractions,
                   points=points)
    except isokin.InputError as exc:
        assert "\n" not in str(exc)


@FUZZ
@given(temperature=junk, times=junk, quench=junk)
def test_fuzz_hold_arguments_give_a_result_or_an_input_error(temperature, times, quench):
    try:
        isokin.hold(STEEL, temperature, times, quench_to_C=20.0 if quench is None else quench)
    except isokin.InputError as exc:
        assert "\n" not in str(exc)


@settings(FUZZ, max_examples=15)
@given(samples=junk, seed=junk, low=junk)
def test_fuzz_spread_arguments_give_a_result_or_an_input_error(samples, seed, low):
    allowed = isinstance(samples, int) and not isinstance(samples, bool) and 20 < samples <= spreading.MAX_SAMPLES
    try:
        isokin.spread(STEEL, {"C": ("range", low, 0.43)}, samples=20 if allowed else samples, seed=seed)
    except isokin.InputError as exc:
        assert "\n" not in str(exc)


@FUZZ
@given(margin=junk, safety=junk, hold=junk)
def test_fuzz_plan_options_give_a_result_or_an_input_error(margin, safety, hold):
    try:
        isokin.interrupted_quench(STEEL, margin_K=10.0 if margin is None else margin, safety=safety)
        isokin.anneal(STEEL, budget_s=8 * 3600.0 if hold is None else hold, safety=safety)
    except isokin.InputError as exc:
        assert "\n" not in str(exc)
