"""Hostile input to the cooling paths: whatever a user gives `cool`, `cct` or the cooling API
ends in a result or in one line, the same line from Python as on the command line; no path
goes below absolute zero; the documented limits bound the work of every run.

The fuzz tests drive the command line's entry point in-process (as tests/test_hardening.py
does) and the public API with the values a hostile user tries: subnormal and huge numbers,
NaN, temperatures below absolute zero, text, empty and mismatched sequences.
"""

import csv
import math
import tempfile
import warnings
from pathlib import Path

import numpy as np
import pytest
from hypothesis import HealthCheck, event, given, settings
from hypothesis import strategies as st
from scipy.integrate import quad

import isokin
from isokin.compute import cooling as C
from isokin.constants import celsius_to_kelvin
from isokin.plot.cct import DRAWN_COLUMNS, _drawn

from test_hardening import assert_clean_outcome, check_written_files, refused, run_main

ROOT = Path(__file__).resolve().parents[1]
STEEL_FILE = ROOT / "alloys" / "aisi-4140-crmo.toml"
DEMO_LOG = ROOT / "alloys" / "brackwater-bw52crv-oil-quench-log.csv"
#: Absolute zero, °C (a fact of physics).
ABSOLUTE_ZERO_C = -273.15
FUZZ = settings(max_examples=30, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture,
                                                                        HealthCheck.too_slow])
#: Command-line fuzzing runs whole commands: fewer examples, most of them refused early.
FUZZ_CLI = settings(FUZZ, max_examples=12)
#: The path constructors take microseconds: more examples.
FUZZ_QUICK = settings(FUZZ, max_examples=100)


@pytest.fixture(scope="module")
def steel():
    return isokin.load_alloy(STEEL_FILE)


# --- values a hostile user types ------------------------------------------------------------------

HOSTILE_TEXT = ["1e-320", "5e-324", "1e308", "-1e308", "1e300", "0", "-0", "-1", "-300", "-273.15", "1e6",
                "1600.001", "1e-5", "2e7", "nan", "inf", "-inf", "abc", "", "1,5", "0_5"]
temperature_text = st.one_of(st.sampled_from(HOSTILE_TEXT), st.floats(-273.0, 1600.0).map(lambda v: f"{v:.6g}"))
rate_text = st.one_of(st.sampled_from(HOSTILE_TEXT), st.floats(-4.0, 7.0).map(lambda e: f"{10.0**e:.6g}"))
positive_text = st.one_of(st.sampled_from(HOSTILE_TEXT), st.floats(-3.0, 4.0).map(lambda e: f"{10.0**e:.6g}"))
#: Anything a notebook user might pass where a number belongs.
anything = st.one_of(st.floats(allow_nan=True, allow_infinity=True), st.integers(-10**400, 10**400),
                     st.sampled_from([None, "845", True, [], [1.0, 2.0], 5e-324, 1e308, -400.0]))


def mostly(plausible):
    """Values of one kind: three times in four a plausible one, else anything."""
    return st.integers(0, 3).flatmap(lambda k: anything if k == 0 else plausible)


def decades(low, high):
    return st.floats(low, high).map(lambda e: 10.0**e)


temperatures_C = mostly(st.floats(-273.0, 1600.0))


def path_is_physical(path):
    """Times finite, from 0 and never falling; temperatures above absolute zero and at most the
    documented maximum (the library's own limit, 1600 °C)."""
    t, T = path.time_s, path.temperature_K
    assert t.ndim == 1 and t.shape == T.shape and t.size >= 2
    assert np.all(np.isfinite(t)) and t[0] == 0.0 and np.all(np.diff(t) >= 0.0)
    assert np.all(T > 0.0) and np.all(T <= celsius_to_kelvin(C.MAX_TEMPERATURE_C) + 1e-9)


def check_cool_csv(folder: Path):
    """The phases along a path: no temperature below absolute zero, fractions finite in [0, 1]."""
    for path in folder.glob("*-cool.csv"):
        for row in csv.DictReader(path.open()):
            assert float(row["temperature_C"]) > ABSOLUTE_ZERO_C, row
            phases = [float(v) for k, v in row.items() if k not in ("path", "time_s", "temperature_C")]
            assert all(-1e-9 <= v <= 1.0 + 1e-9 for v in phases), row


def check_cct_files(folder: Path):
    """The CCT curves (their own columns) hold finite times and temperatures above absolute zero;
    then the summary as every command's (tests/test_hardening.py), with the curves set aside."""
    for path in folder.glob("*-cct-curves.csv"):
        for row in csv.DictReader(path.open()):
            assert float(row["temperature_C"]) > ABSOLUTE_ZERO_C and 0.0 < float(row["time_s"]) < math.inf, row
        path.unlink()
    check_written_files(folder)


def api_outcome(call):
    """Run ``call`` with every warning an error: its value, or the InputError it raised (one line)."""
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        try:
            outcome = call()
        except isokin.InputError as exc:
            assert "\n" not in str(exc) and str(exc).strip(), str(exc)
            outcome = exc
    return outcome


def fuzzed(call):
    """:func:`api_outcome` within a hypothesis test, counted (--hypothesis-show-statistics)."""
    outcome = api_outcome(call)
    event(f"API {'refused' if isinstance(outcome, isokin.InputError) else 'computed'}")
    return outcome


# --- the command line ---------------------------------------------------------------------------------

@st.composite
def cool_options(draw):
    kind = draw(st.sampled_from(["rate", "newtonian", "section"]))
    if kind == "rate":
        options = [x for r in draw(st.lists(rate_text, min_size=1, max_size=3)) for x in ("--rate", r)]
    elif kind == "newtonian":
        options = ["--medium-c", draw(temperature_text), "--time-constant-s", draw(positive_text)]
    else:
        options = ["--medium-c", draw(temperature_text), "--thickness-mm", draw(positive_text), "--htc",
                   draw(positive_text), "--shape", draw(st.sampled_from(["plate", "bar", "sphere", "cube", ""]))]
    if draw(st.booleans()):
        options += ["--start-c", draw(temperature_text)]
    return options


@FUZZ_CLI
@given(options=cool_options())
def test_fuzz_cool_options_through_the_command_line(options, tmp_path):
    out_folder = Path(tempfile.mkdtemp(dir=tmp_path)) / "out"  # one per example
    code, out, err, caught = run_main("cool", STEEL_FILE, *options, "--out", out_folder)
    assert_clean_outcome(code, out, err, caught)
    event(f"exit {code}")
    if code == 2:
        assert any(o in err for o in options if o.startswith("--")), err  # an option at fault is named
        assert not out_folder.exists() or not any(out_folder.iterdir())
    else:
        check_written_files(out_folder)
        check_cool_csv(out_folder)


@FUZZ_CLI
@given(rates=st.lists(rate_text, min_size=1, max_size=4), start=st.one_of(st.none(), temperature_text))
def test_fuzz_cct_options_through_the_command_line(rates, start, tmp_path):
    options = ["--rates", ",".join(rates)] + (["--start-c", start] if start is not None else [])
    out_folder = Path(tempfile.mkdtemp(dir=tmp_path))
    code, out, err, caught = run_main("cct", STEEL_FILE, *options, "--out", out_folder)
    assert_clean_outcome(code, out, err, caught)
    event(f"exit {code}")
    if code == 2:
        assert "--rates" in err or "--start-c" in err, err
    else:
        check_cct_files(out_folder)


log_cell = st.one_of(st.floats(-300.0, 2000.0).map(lambda v: f"{v:.6g}"), st.sampled_from(HOSTILE_TEXT))


@st.composite
def plausible_logs(draw):
    """Rows of a log that mostly cools (any order, repeats, reheats), now and then a hostile cell."""
    n = draw(st.integers(2, 12))
    times = draw(st.lists(st.floats(0.0, 1e4), min_size=n, max_size=n))
    temperatures = draw(st.lists(st.floats(-273.0, 1600.0), min_size=n, max_size=n))
    rows = [[f"{t:.6g}", f"{T:.6g}"] for t, T in zip(sorted(times), sorted(temperatures, reverse=True))]
    for _ in range(draw(st.sampled_from([0, 0, 0, 1, 2]))):
        rows[draw(st.integers(0, n - 1))][draw(st.integers(0, 1))] = draw(log_cell)
    return [tuple(r) for r in rows]


@FUZZ_CLI
@given(rows=st.one_of(plausible_logs(), st.lists(st.tuples(log_cell, log_cell), min_size=0, max_size=12)))
def test_fuzz_cooling_logs_through_the_command_line_and_the_api(rows, tmp_path):
    folder = Path(tempfile.mkdtemp(dir=tmp_path))  # one per example
    log = folder / "log.csv"
    log.write_text("time_s,temperature_C\n" + "".join(f"{t},{T}\n" for t, T in rows))
    code, out, err, caught = run_main("cool", STEEL_FILE, "--log", log, "--out", folder / "out")
    assert_clean_outcome(code, out, err, caught)
    event(f"exit {code}")
    # the API reads the file by the same path and says the same line
    read = fuzzed(lambda: isokin.read_cooling_log(log, key="--log"))
    if isinstance(read, isokin.InputError):
        assert code == 2 and err.strip() == f"isokin: error: {read}"
    else:
        path_is_physical(read)
        if code == 0:
            check_cool_csv(folder / "out")


# --- the API ----------------------------------------------------------------------------------------

@FUZZ_QUICK
@given(start=temperatures_C, medium=temperatures_C, tau=mostly(decades(-4.0, 7.0)),
       end=st.one_of(st.none(), temperatures_C))
def test_fuzz_newtonian_gives_a_physical_path_or_one_line(start, medium, tau, end):
    result = fuzzed(lambda: isokin.newtonian(start, medium, tau, end_C=end))
    if not isinstance(result, isokin.InputError):
        path_is_physical(result)


@FUZZ_QUICK
@given(rate=mostly(decades(-4.0, 7.0)), start=temperatures_C, end=temperatures_C)
def test_fuzz_constant_rate_gives_a_physical_path_or_one_line(rate, start, end):
    result = fuzzed(lambda: isokin.constant_rate(rate, start, end_C=end))
    if not isinstance(result, isokin.InputError):
        path_is_physical(result)


@FUZZ_QUICK
@given(thickness=mostly(decades(-6.0, 1.0)), htc=mostly(decades(0.0, 6.0)),
       shape=st.sampled_from(["plate", "bar", "sphere", "cube", None, 3]), start=temperatures_C, medium=temperatures_C)
def test_fuzz_lumped_sections_give_a_physical_path_or_one_line(thickness, htc, shape, start, medium):
    result = fuzzed(lambda: isokin.newtonian_section(start, medium, thickness, htc, shape=shape))
    if not isinstance(result, isokin.InputError):
        path_is_physical(result)


sample_values = st.one_of(st.floats(allow_nan=True, allow_infinity=True), st.floats(-300.0, 1700.0),
                          st.floats(0.0, 1e4), st.just(1e300))
plausible_times = st.lists(st.floats(0.0, 1e4), min_size=2, max_size=8).map(sorted)


@FUZZ
@given(times=st.one_of(plausible_times, st.lists(sample_values, max_size=8),
                       st.sampled_from([None, "abc", 3.0, [[0.0, 1.0]]])),
       temperatures=st.one_of(st.lists(st.floats(-273.0, 1600.0), min_size=2, max_size=8),
                              st.lists(sample_values, max_size=8), st.sampled_from([None, ["a", "b"]])))
def test_fuzz_measured_paths_and_their_cooling(times, temperatures, steel):
    path = fuzzed(lambda: isokin.measured(times, temperatures))
    if isinstance(path, isokin.InputError):
        return
    path_is_physical(path)
    result = fuzzed(lambda: isokin.cool(steel, path))
    if isinstance(result, isokin.InputError):
        assert result.key == "path"  # a log that never cools into the range where products form
        return
    stacked = np.array(list(result.fractions.values()))
    assert np.all(np.isfinite(stacked)) and np.all(stacked >= -1e-12)
    np.testing.assert_allclose(stacked.sum(axis=0), 1.0, atol=1e-9)
    assert np.all(result.temperature_K > 0.0) and np.all(np.isfinite(result.hardness_HV))


@FUZZ
@given(rates=st.one_of(st.lists(mostly(decades(-4.0, 7.0)), max_size=4), anything, st.just("1,10")),
       start=st.one_of(st.none(), temperatures_C))
def test_fuzz_cct_rates_and_start(rates, start, steel):
    result = fuzzed(lambda: isokin.cct(steel, rates, start_C=start))
    if not isinstance(result, isokin.InputError):
        assert np.all(np.isfinite(result.rates_K_s)) and result.cooling.temperature_K.min() > 0.0


@pytest.mark.parametrize("call, words", [
    (lambda a: isokin.cool(a, []), "give one or more cooling paths, got none"),
    (lambda a: isokin.cool(a, "a path"), "must be a cooling path"),
    (lambda a: isokin.cool(a, [isokin.constant_rate(1e-4, 1600.0)] * 400), "points to evaluate"),
    (lambda a: isokin.measured([0, 1, 2], [800, 700]), "has 2 values for 3 times"),
    (lambda a: isokin.measured([0, math.nan], [800, 700]), "must be finite times"),
    (lambda a: isokin.measured([0, 10], [845, -400]), "above -273.15 °C (absolute zero)"),
    (lambda a: isokin.newtonian(845, -400, 10), "above -273.15 °C (absolute zero)"),
    (lambda a: isokin.constant_rate(10, 845, end_C=-400), "above -273.15 °C (absolute zero)"),
    (lambda a: isokin.newtonian_section(845, 60, 0.02, 500.0, shape="cube"), "plate, bar or sphere"),
    (lambda a: isokin.newtonian_section(845, 60, -0.02, 500.0), "positive section thickness"),
    (lambda a: isokin.newtonian_section(845, 60, 0.02, -500.0), "positive heat-transfer coefficient"),
    (lambda a: isokin.cct(a, []), "give from 1 to 60 cooling rates"),
])
def test_api_errors_are_the_apis_own(call, words, steel):
    # each of these raised a Python error that was not the API's, or returned a path below 0 K
    outcome = api_outcome(lambda: call(steel))
    assert isinstance(outcome, isokin.InputError) and words in outcome.problem, outcome


@pytest.mark.parametrize("api, options", [
    (lambda a: isokin.constant_rate(5e-324, 845.0), ["--rate", "5e-324"]),
    (lambda a: isokin.constant_rate(10.0, 1e308), ["--rate", "10", "--start-c", "1e308"]),
    (lambda a: isokin.newtonian(845.0, 60.0, 1e308), ["--medium-c", "60", "--time-constant-s", "1e308"]),
    (lambda a: isokin.newtonian(845.0, -300.0, 10.0), ["--medium-c", "-300", "--time-constant-s", "10"]),
    (lambda a: isokin.newtonian_section(845.0, 60.0, -0.003, 100.0), ["--medium-c", "60", "--thickness-mm", "-3",
                                                                      "--htc", "100"]),
    (lambda a: isokin.newtonian_section(845.0, 60.0, 1e-6, 1e6, "sphere"),
     ["--medium-c", "60", "--thickness-mm", "0.001", "--htc", "1e6", "--shape", "sphere"]),
    (lambda a: C.constant_rates([1.0] * 61, 845.0), ["--rate", "1"] * 61),
])
def test_the_api_and_the_command_line_say_the_same_line(api, options, steel, tmp_path):
    with pytest.raises(isokin.InputError) as caught:
        api(steel)
    start = [] if "--start-c" in options else ["--start-c", "845"]
    code, _, err, _ = run_main("cool", STEEL_FILE, *options, *start, "--out", tmp_path)
    assert refused(code, err, caught.value.problem), (err, caught.value.problem)
    assert not any(tmp_path.iterdir())


def test_cct_limits_by_both(steel, tmp_path):
    rates = ",".join(["1"] * (C.MAX_RATES + 1))
    with pytest.raises(isokin.InputError, match=f"from 1 to {C.MAX_RATES} cooling rates") as caught:
        isokin.cct(steel, [1.0] * (C.MAX_RATES + 1))
    code, _, err, _ = run_main("cct", STEEL_FILE, "--rates", rates, "--out", tmp_path)
    assert refused(code, err, f"--rates: {caught.value.problem}")
    for option, value in (("--rates", "1e-320"), ("--rates", "1e308"), ("--start-c", "1e308")):
        code, _, err, _ = run_main("cct", STEEL_FILE, option, value, "--out", tmp_path)
        assert refused(code, err, f"{option}: must be a"), err
    assert not any(tmp_path.iterdir())


# --- below absolute zero ----------------------------------------------------------------------------

def test_a_medium_just_above_absolute_zero_cools_and_writes_nothing_below_it(tmp_path):
    # Absolute zero is -273.15 °C (a fact of physics): -300 °C is refused, -273 °C is a medium
    code, _, err, _ = run_main("cool", STEEL_FILE, "--medium-c", "-300", "--time-constant-s", "10", "--out", tmp_path)
    assert refused(code, err, "--medium-c: must be a temperature above -273.15 °C (absolute zero)")
    code, out, err, caught = run_main("cool", STEEL_FILE, "--medium-c", "-273", "--time-constant-s", "10",
                                      "--out", tmp_path)
    assert_clean_outcome(code, out, err, caught)
    assert code == 0
    check_cool_csv(tmp_path)
    check_written_files(tmp_path)


# --- the limits bound the work ------------------------------------------------------------------------

def zig_zag(rows, hot=1300.0, cold=20.0):
    return np.arange(float(rows)), np.where(np.arange(rows) % 2, cold, hot)


def test_a_log_over_the_row_limit_is_refused_by_both(tmp_path):
    times, temperatures = zig_zag(C.MAX_LOG_ROWS + 1)
    with pytest.raises(isokin.InputError, match=f"the limit is {C.MAX_LOG_ROWS}"):
        isokin.measured(times, temperatures)
    # repeated times keep the file small (under the 1 MB of an input file); rows count as rows
    log = tmp_path / "long.csv"
    log.write_text("time_s,temperature_C\n" + "0,900\n1,20\n" * ((C.MAX_LOG_ROWS + 2) // 2))
    code, _, err, _ = run_main("cool", STEEL_FILE, "--log", log, "--out", tmp_path / "out")
    assert refused(code, err, f"the limit is {C.MAX_LOG_ROWS}")


def test_a_long_zig_zag_log_is_evaluated_at_a_bounded_number_of_points(steel):
    # issue 19: 2,000 rows alternating 1300 and 20 °C took 42 s and 4 GB, refined 0.5 K a step
    path = isokin.measured(*zig_zag(2000))
    t, T, fractions, _ = C.along(steel, [path])
    assert t.shape[-1] <= C.MAX_PATH_POINTS + 1
    assert np.all(np.diff(t[0]) >= 0.0) and T.min() == pytest.approx(celsius_to_kelvin(20.0))
    assert math.isclose(sum(float(v[0, -1]) for v in fractions.values()), 1.0, abs_tol=1e-9)
    # paths held above the range where products form are not refined at all
    hot = isokin.measured([0.0, 10.0, 20.0, 30.0], [1300.0, 1250.0, 1300.0, 20.0])
    assert C.along(steel, [hot])[0].shape[-1] < 1300.0 / C.MAX_STEP_K
    with pytest.raises(isokin.InputError, match="points to evaluate"):
        isokin.cool(steel, [path] * (C.MAX_EVALUATION_POINTS // C.MAX_PATH_POINTS + 1))


def test_the_step_of_a_path_does_not_change_how_far_products_get(steel, monkeypatch):
    # Additivity along straight pieces integrates each product's rate exactly, so forcing
    # coarse steps (a cap of 400 points on the demo log, steps of several kelvin) changes the
    # final phases only through the step-wise sequence rules: within 0.02 of the 0.5 K steps.
    log = isokin.read_cooling_log(DEMO_LOG)
    fine = isokin.cool(steel, log).final
    monkeypatch.setattr(C, "MAX_PATH_POINTS", 400)
    coarse_t = C.along(steel, [log])[0]
    assert coarse_t.shape[-1] <= 401
    coarse = isokin.cool(steel, log).final
    for name in fine:
        assert float(coarse[name][0]) == pytest.approx(float(fine[name][0]), abs=0.02), name


def test_each_step_integrates_the_rate_as_scipy_quad_does(steel):
    # Reference: scipy's quad of 1/F(T(t)) dt along straight pieces (a fast drop across the
    # whole range of bainite and ferrite, a slow piece, a hold), against the tabulated integral.
    grid = C._table_grid(steel)
    pieces = [(0.0, 3.0, 1073.15, 673.15), (0.0, 5000.0, 1000.0, 900.0), (0.0, 600.0, 723.15, 723.15)]
    for product in steel.products:
        speed, _ = C._rate_tables(product, grid)
        for t0, t1, Ta, Tb in pieces:
            got = float(speed.over_steps(np.array([[t0, t1]]), np.array([[Ta, Tb]]))[0, 0])

            def rate(s):
                factor = float(product.time_factor(Ta + (Tb - Ta) * (s - t0) / (t1 - t0)))
                return 1.0 / factor if math.isfinite(factor) and factor > 0 else 0.0

            # the rate jumps where a product's range ends: quad is told where
            edges = [t0 + (t1 - t0) * (edge - Ta) / (Tb - Ta) for edge in (float(product.lower_K),
                     float(product.upper_K)) if Tb != Ta and min(Ta, Tb) < edge < max(Ta, Tb)]
            expected, _ = quad(rate, t0, t1, points=edges or None, limit=500, epsabs=1e-12, epsrel=1e-9)
            assert got == pytest.approx(expected, rel=2e-3, abs=1e-9), (product.name, Ta, Tb)


def test_a_long_path_is_drawn_with_its_extremes():
    # what the figure shows of a 90,000-row zig-zag: its hottest and coldest points and its ends
    t, T = zig_zag(90_000, 1300.0, 20.0)
    x, y = _drawn(t, T)
    assert x.size <= 4 * DRAWN_COLUMNS
    assert y.max() == 1300.0 and y.min() == 20.0 and x[-1] == t[-1]
    short_t, short_T = np.linspace(0.0, 10.0, 50), np.linspace(900.0, 20.0, 50)
    assert _drawn(short_t, short_T)[1].size == 50


def test_cool_and_cct_refuse_what_is_not_an_alloy():
    # the API's own error, one line, as ttt and hold give it
    with pytest.raises(isokin.InputError, match="alloy"):
        isokin.cool("not an alloy", isokin.constant_rate(10.0, 845.0))
    with pytest.raises(isokin.InputError, match="alloy"):
        isokin.cct("not an alloy")
