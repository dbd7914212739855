"""Hostile input: every input ends in a result or one clear line, and the output set is never mixed.

The fuzz tests drive the command line's own entry point in-process, as a shell would, and
check the promise of the README: exit 0 or 2, one line on stderr for exit 2, no traceback,
no Python warning, and no NaN, infinity or temperature below absolute zero in any file.
"""

import csv
import io
import json
import math
import os
import re
import sys
import tempfile
import warnings
from contextlib import redirect_stderr, redirect_stdout
from pathlib import Path

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

import isokin
from isokin.cli import main
from isokin.relations.composition import ELEMENTS

ROOT = Path(__file__).resolve().parents[1]
GOOD = (ROOT / "alloys" / "brackwater-ba42-precipitation.toml").read_text()
STEEL = (ROOT / "alloys" / "aisi-4140-crmo.toml").read_text()
FUZZ = settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture,
                                                                        HealthCheck.too_slow])


def run_main(*args):
    """The installed entry point, in-process: (exit code, stdout, stderr, Python warnings)."""
    out, err = io.StringIO(), io.StringIO()
    old = sys.argv
    sys.argv = ["isokin", *map(str, args)]
    with redirect_stdout(out), redirect_stderr(err), warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        try:
            main()
            code = 0
        except SystemExit as exc:
            code = exc.code
        finally:
            sys.argv = old
    caught = [w for w in caught if not issubclass(w.category, (DeprecationWarning, PendingDeprecationWarning))]
    return code, out.getvalue(), err.getvalue(), caught


def refused(code, err, text=""):
    """A refusal as the CLI promises it: exit 2 and one line on stderr that says ``text``."""
    return code == 2 and text in err and len(err.strip().splitlines()) == 1


def _reject_constant(name):
    raise AssertionError(f"non-finite number {name} in a written file")


def check_written_files(folder: Path):
    for path in folder.glob("*-summary.json"):
        data = json.loads(path.read_text(), parse_constant=_reject_constant)
        stack = [data]
        while stack:
            item = stack.pop()
            if isinstance(item, dict):
                for key, value in item.items():
                    if isinstance(value, (int, float)) and not isinstance(value, bool):
                        assert math.isfinite(value), (path, key)
                        if key.endswith("_K"):
                            assert value >= 0.0, (path, key, value)
                        if key.endswith("temperature_C"):
                            assert value > -273.15, (path, key, value)
                    stack.append(value)
            elif isinstance(item, list):
                stack.extend(item)
    for path in folder.glob("*-curves.csv"):
        for row in csv.DictReader(path.open()):
            assert float(row["temperature_C"]) > -273.15 and 0 < float(row["time_s"]) <= 1e9, row
            assert math.isfinite(float(row["fraction"]))


def assert_clean_outcome(code, out, err, caught):
    assert code in (0, 2), (code, err)
    assert "Traceback" not in out + err
    assert not caught, [str(w.message) for w in caught]
    if code == 2:
        lines = err.strip().splitlines()
        assert len(lines) == 1 and lines[0].startswith("isokin: error:"), err
    else:
        assert all(line.startswith("isokin: warning:") for line in err.strip().splitlines() if line), err
        assert not re.search(r"\b(nan|inf)\b", out), out


# --- fuzz: inline heat analyses ---------------------------------------------------------------

contents = st.one_of(st.floats(0.0, 30.0).map(lambda v: f"{v:g}"), st.floats(0.0, 3.0).map(lambda v: f"{v:g}"),
                     st.sampled_from(["0", "1e-3", "0.4", "30"]))
bogus = st.sampled_from(["0_4", "inf", "nan", "-1", "1e999", "０.４", "", "x", "1,5", "2e", " 0.2 "])
symbols = st.sampled_from([*ELEMENTS, "Fe", "mn", "Xx", "carbon", "C C"])


@st.composite
def inline_analyses(draw):
    items = draw(st.lists(st.tuples(symbols, st.one_of(contents, bogus)), min_size=0,
                          max_size=8))
    if draw(st.booleans()):
        items.insert(0, ("C", f"{draw(st.floats(0.0, 3.0)):g}"))
    text = ",".join(f"{k}={v}" for k, v in items)
    return draw(st.one_of(st.just(text), st.text(max_size=30)))


@FUZZ
@given(analysis=inline_analyses(), grain=st.one_of(st.none(), st.sampled_from(["7", "-3", "14", "nan", "0_7", "15"])))
def test_fuzz_inline_analyses(analysis, grain, tmp_path):
    args = ["check", "--composition", analysis] + (["--grain-size", grain] if grain else [])
    assert_clean_outcome(*run_main(*args))


# --- fuzz: alloy files ------------------------------------------------------------------------

def _toml_value(value):
    if isinstance(value, str):
        return json.dumps(value)
    if isinstance(value, float):
        return "nan" if math.isnan(value) else ("inf" if value == math.inf else "-inf" if value == -math.inf
                                                 else repr(value))
    return str(value).lower() if isinstance(value, bool) else str(value)


values = st.one_of(
    st.floats(allow_nan=True, allow_infinity=True), st.floats(-1e3, 1e3), st.integers(-10, 10**6),
    st.sampled_from([0.0, 1e-300, 1e308, -1e-12, 1e30, 0.4, 180.0]),
    st.text(max_size=12), st.sampled_from(["$x^2$", "a\nb", "table", "hoffman", "site-saturation", "$"]),
    st.booleans(),
)
PRODUCT_KEYS = re.findall(r"^(\w+) =", GOOD.split("[[product]]")[1], re.M) + [
    "strain_energy_J_m3", "avrami_exponent", "incubation_time_s", "lower_temperature_C", "driving_force_table"]
STEEL_KEYS = [f"composition.{e}" for e in ELEMENTS] + ["steel.grain_size_astm", "steel.austenitizing_temperature_C",
                                                       "steel.ms_method"]


def _set_key(text, table_marker, key, value):
    line = f"{key} = {_toml_value(value)}"
    pattern = re.compile(rf"^{key} = .*$", re.M)
    if pattern.search(text):
        return pattern.sub(lambda _: line, text, count=1)
    return text.replace(table_marker, f"{table_marker}\n{line}", 1)


@st.composite
def alloy_files(draw):
    if draw(st.booleans()):
        text = GOOD
        for _ in range(draw(st.integers(1, 4))):
            text = _set_key(text, "[[product]]", draw(st.sampled_from(PRODUCT_KEYS + ["name"])), draw(values))
        if draw(st.booleans()):
            text = text.replace('name = "Brackwater BA-42 (Al-4Cu, invented)"',
                                f"name = {json.dumps(draw(st.text(min_size=1, max_size=140)))}")
        return text
    text = STEEL
    for _ in range(draw(st.integers(1, 4))):
        table, key = draw(st.sampled_from(STEEL_KEYS)).split(".")
        text = _set_key(text, f"[{table}]", key, draw(st.one_of(values, st.floats(0.0, 30.0))))
    return text


@FUZZ
@given(text=alloy_files())
def test_fuzz_alloy_files(text, tmp_path):
    folder = Path(tempfile.mkdtemp(dir=tmp_path))
    path = folder / "fuzz.toml"
    path.write_text(text, encoding="utf-8")
    code, out, err, caught = run_main("diagram", path, "--out", folder / "out", "--points", "30")
    assert_clean_outcome(code, out, err, caught)
    if code == 0:
        check_written_files(folder / "out")
    else:
        assert not (folder / "out").exists() or not any((folder / "out").iterdir())


# --- one case per class of the hardening issue -------------------------------------------------

@pytest.mark.parametrize("analysis, expected", [
    ("C=0.4,Ti=3", "Ae3 from Andrews (1965) is"),
    ("C=3", "cast iron"),
    ("C=0.1,Cu=5", "has no time scale for this analysis"),
])
def test_what_cannot_be_computed_is_refused_naming_why(analysis, expected):
    code, _, err, _ = run_main("check", "--composition", analysis)
    assert code == 2 and expected in err
    assert "driven by Ti 3 %" in err or "Ae3" not in expected


@pytest.mark.parametrize("analysis, options, expected", [
    ("C=0.4,Mn=0.5,Ni=25,Cr=18", ("--ms-method", "andrews_1965"),
     "Ms by Andrews (1965), linear lies below absolute zero: no martensite forms on cooling"),
    ("C=1.0,Mn=0.4,Cr=12,Mo=1", ("--bs-method", "steven_haynes_1956"),
     "Bs by Steven & Haynes (1956) lies below absolute zero: no bainite forms"),
])
def test_temperatures_below_absolute_zero_are_answers_with_a_warning(analysis, options, expected):
    code, out, err, _ = run_main("check", "--composition", analysis, *options)
    assert code == 0 and expected in err


def test_elements_without_a_kinetic_term_say_so():
    # Boron changes hardenability strongly (common practice), but no model here has a term for it.
    code, _, err, _ = run_main("check", "--composition", "C=0.4,Mn=0.8,V=0.1,B=0.002,Nb=0.03")
    assert code == 0
    assert "V moves only the critical temperatures" in err
    assert "B, Nb enter none of the models" in err and "boron raises hardenability" in err


def test_every_element_a_correlation_uses_has_a_range():
    from isokin.relations.steel_critical import CALIBRATED_RANGES

    andrews = set(CALIBRATED_RANGES["Andrews (1965), Ae1/Ae3"])
    assert {"C", "Mn", "Si", "Ni", "Cr", "Mo", "V", "W", "Cu", "P", "Al", "As", "Ti"} <= andrews
    code, _, err, _ = run_main("check", "--composition", "C=0.3,Mn=0.8,Al=0.5")
    assert code == 0 and "Al = 0.5 mass % is outside" in err


@pytest.mark.parametrize("option, value", [("--tmax-c", "inf"), ("--fraction", "nan"), ("--tmin-c", "0_4"),
                                            ("--points", "２００"), ("--fraction", "infinity")])
def test_numbers_are_plain_decimals(option, value, tmp_path):
    code, _, err, _ = run_main("diagram", ROOT / "alloys" / "brackwater-ba42-precipitation.toml", "--out", tmp_path,
                               option, value)
    assert refused(code, err, option)
    code, _, err, _ = run_main("check", "--composition", "C=0_4")
    assert code == 2 and "Element=mass%" in err


@pytest.mark.parametrize("cell", ["-inf", "1e308", "nan", "0_5"])
def test_table_cells_are_plain_plausible_numbers(cell, tmp_path):
    (tmp_path / "dgm.csv").write_text(f"temperature_C,dGm_J_mol\n200,-3000\n505,{cell}\n")
    text = GOOD.replace('driving_force = "turnbull"', 'driving_force = "table"\ndriving_force_table = "dgm.csv"')
    text = re.sub(r"^(equilibrium_temperature_C|latent_heat_J_mol) = .*$", "", text, flags=re.M)
    (tmp_path / "a.toml").write_text(text)
    code, _, err, _ = run_main("check", tmp_path / "a.toml")
    assert code == 2 and "dgm.csv" in err and "line 3" in err


@pytest.mark.parametrize("key, value, expected", [
    ("diffusion_distance_m", "1e-300", "must be >= 1e-11"),
    ("diffusion_prefactor_m2_s", "1e308", "must be <= 0.1"),
    ("site_density_m3", "1e30", "exceeds one site per atom"),
])
def test_physical_keys_have_plausible_ranges(key, value, expected, tmp_path):
    text = _set_key(GOOD, "[[product]]", key, float(value))
    (tmp_path / "a.toml").write_text(text)
    code, _, err, _ = run_main("check", tmp_path / "a.toml")
    assert code == 2 and expected in err and f"product[1].{key}" in err


def test_names_are_plain_text_on_the_figure_and_limited(tmp_path):
    text = GOOD.replace('name = "precipitate"', 'name = "$\\\\frac{1}{0}$ theta"')
    (tmp_path / "a.toml").write_text(text)
    code, out, err, caught = run_main("diagram", tmp_path / "a.toml", "--out", tmp_path / "o", "--points", "40",
                                      "--format", "svg")
    assert_clean_outcome(code, out, err, caught)
    assert code == 0 and "frac" in (tmp_path / "o" / "a.svg").read_text()  # drawn as the text typed
    (tmp_path / "b.toml").write_text(GOOD.replace('name = "precipitate"', f'name = "{"x" * 200}"'))
    code, _, err, _ = run_main("check", tmp_path / "b.toml")
    assert code == 2 and "at most 120 characters" in err
    (tmp_path / "c.toml").write_text(GOOD.replace('name = "precipitate"', 'name = "two\\nlines"'))
    code, _, err, _ = run_main("check", tmp_path / "c.toml")
    assert refused(code, err, "one line")


def test_files_must_be_regular_local_and_small(tmp_path):
    deep = tmp_path / "deep.toml"
    deep.write_text("x = " + "[" * 100_000 + "]" * 100_000)
    big = tmp_path / "big.toml"
    big.write_text("# " + "x" * 1_100_000)
    fifo = tmp_path / "pipe.toml"
    os.mkfifo(fifo)
    for path, expected in ((deep, "nested too deeply"), (Path("/dev/zero"), "not a regular file"),
                           (fifo, "not a regular file"), (big, "the limit is"), (tmp_path, "not a regular file")):
        code, _, err, _ = run_main("check", path)
        assert code == 2 and expected in err, err
    text = GOOD.replace('driving_force = "turnbull"',
                        'driving_force = "table"\ndriving_force_table = "http://example.invalid/dgm.csv"')
    text = re.sub(r"^(equilibrium_temperature_C|latent_heat_J_mol) = .*$", "", text, flags=re.M)
    (tmp_path / "url.toml").write_text(text)
    code, _, err, _ = run_main("check", tmp_path / "url.toml")
    assert code == 2 and "looks like a URL" in err


def test_errors_blame_the_key_at_fault(tmp_path):
    (tmp_path / "a.toml").write_text(GOOD.replace('mode = "continuous"', 'mode = "continuous"\nlower_temperature_C = 505'))
    code, _, err, _ = run_main("check", tmp_path / "a.toml")
    assert code == 2 and "product[1].lower_temperature_C" in err
    for value in ("100", "nan"):
        code, _, err, _ = run_main("diagram", ROOT / "alloys" / "brackwater-ba42-precipitation.toml", "--out",
                                   tmp_path / "o", "--tmax-c", value)
        assert code == 2 and "--tmax-c" in err and "--tmin-c" not in err
    hoffman = GOOD.replace('driving_force = "turnbull"', 'driving_force = "hoffman"').replace(
        'mode = "continuous"', 'mode = "continuous"\nstrain_energy_J_m3 = 3e8')  # Gs/dHv = 0.3 > 1/4
    (tmp_path / "h.toml").write_text(hoffman)
    code, _, err, _ = run_main("check", tmp_path / "h.toml")
    assert code == 2 and "no temperature with a net driving force" in err


def test_a_failure_midway_leaves_the_old_set_and_no_temporaries(tmp_path):
    from isokin.io.export import write_outputs

    a, b = tmp_path / "a.csv", tmp_path / "b.json"
    a.write_text("old a")
    b.write_text("old b")

    def fails(_):
        raise SystemExit(143)  # what a SIGTERM becomes in the command line

    with pytest.raises(SystemExit):
        write_outputs({a: lambda p: p.write_text("new a"), b: fails}, overwrite=True)
    assert a.read_text() == "old a" and b.read_text() == "old b"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["a.csv", "b.json"]
    # without --overwrite, a name that exists (even a dangling link) stops the whole set
    (tmp_path / "c.png").symlink_to(tmp_path / "nowhere")
    with pytest.raises(FileExistsError):
        write_outputs({tmp_path / "d.csv": lambda p: p.write_text("d"),
                       tmp_path / "c.png": lambda p: p.write_text("c")})
    assert not (tmp_path / "d.csv").exists() and (tmp_path / "c.png").is_symlink()


def test_outputs_honour_the_umask_and_a_hidden_file_name_gives_visible_outputs(tmp_path):
    old = os.umask(0o022)
    try:
        (tmp_path / ".toml").write_text(GOOD)
        code, _, err, _ = run_main("diagram", tmp_path / ".toml", "--out", tmp_path / "o", "--points", "30")
    finally:
        os.umask(old)
    assert code == 0, err
    names = sorted(p.name for p in (tmp_path / "o").iterdir())
    assert names and not any(n.startswith(".") for n in names)
    assert all((p.stat().st_mode & 0o777) == 0o644 for p in (tmp_path / "o").iterdir())


def test_csv_keeps_distinct_temperatures_distinct(tmp_path):
    code, _, err, _ = run_main("diagram", ROOT / "alloys" / "brackwater-ba42-precipitation.toml", "--out", tmp_path,
                               "--tmin-c", "300", "--tmax-c", "300.001", "--points", "50")
    assert code == 0, err
    rows = list(csv.DictReader((tmp_path / "brackwater-ba42-precipitation-curves.csv").open()))
    per_fraction = {}
    for row in rows:
        per_fraction.setdefault(row["fraction"], []).append(row["temperature_C"])
    assert all(len(set(t)) == len(t) == 50 for t in per_fraction.values())


def test_size_limits_are_one_line_errors_and_the_largest_run_is_quick(tmp_path):
    import time

    product = "[[product]]" + GOOD.split("[[product]]")[1]
    head = GOOD.split("[[product]]")[0]
    nine = head + "".join(product.replace('name = "precipitate"', f'name = "p{i}"') for i in range(9))
    (tmp_path / "nine.toml").write_text(nine)
    code, _, err, _ = run_main("check", tmp_path / "nine.toml")
    assert code == 2 and "at most 8 [[product]] tables" in err
    extra = [a for f in np.linspace(0.02, 0.98, 10) for a in ("--fraction", f"{f:.3f}")]
    code, _, err, _ = run_main("diagram", ROOT / "alloys" / "aisi-4140-crmo.toml", "--out", tmp_path / "o", *extra)
    assert code == 2 and "at most 12 distinct fractions" in err
    code, _, err, _ = run_main("diagram", ROOT / "alloys" / "aisi-4140-crmo.toml", "--out", tmp_path / "o",
                               "--points", "5001")
    assert code == 2 and "--points" in err
    eight = head + "".join(product.replace('name = "precipitate"', f'name = "p{i}"') for i in range(8))
    (tmp_path / "eight.toml").write_text(eight)
    # the run's own processor time: on a shared machine (the suite's other workers, other jobs)
    # the wall clock measures the neighbours too
    start = time.process_time()
    code, _, err, _ = run_main("diagram", tmp_path / "eight.toml", "--out", tmp_path / "big", "--points", "5000",
                               *extra[:18])
    assert code == 0, err
    assert time.process_time() - start < 10.0


def test_successful_runs_print_only_the_tools_own_lines():
    for alloy in sorted((ROOT / "alloys").glob("*.toml")):
        code, out, err, caught = run_main("check", alloy)
        assert_clean_outcome(code, out, err, caught)
        assert code == 0


def test_times_faster_than_any_diffusional_transformation_are_flagged(tmp_path):
    # Every key within its own range, together a nonsense alloy: the result says so.
    text = GOOD
    for key, value in (("diffusion_prefactor_m2_s", 0.1), ("diffusion_activation_J_mol", 0.0),
                       ("nucleation_activation_J_mol", 0.0), ("diffusion_distance_m", 1e-11),
                       ("interface_energy_J_m2", 0.001)):
        text = _set_key(text, "[[product]]", key, value)
    (tmp_path / "fast.toml").write_text(text)
    code, out, err, caught = run_main("check", tmp_path / "fast.toml")
    assert_clean_outcome(code, out, err, caught)
    assert code == 0 and "faster than any diffusional transformation" in err
