"""The command line as a user runs it, on the shipped alloys and on bad input."""

import json
import subprocess
import sys
from pathlib import Path

import pandas as pd
import pytest
from typer.testing import CliRunner

from isokin.cli import app

ROOT = Path(__file__).resolve().parents[1]
PHYSICAL_ALLOYS = sorted(p for p in (ROOT / "alloys").glob("*.toml") if 'model = "nucleation-growth"' in p.read_text())
runner = CliRunner()


def run(*args):
    return runner.invoke(app, [str(a) for a in args])


@pytest.mark.parametrize("alloy", PHYSICAL_ALLOYS, ids=lambda p: p.stem)
def test_diagram_on_shipped_physical_alloys(alloy, tmp_path):
    result = run("diagram", alloy, "--out", tmp_path, "--points", 120)
    assert result.exit_code == 0, result.output
    assert (tmp_path / f"{alloy.stem}.png").stat().st_size > 10_000
    curves = pd.read_csv(tmp_path / f"{alloy.stem}-curves.csv")
    assert list(curves.columns) == ["product", "fraction", "temperature_C", "time_s"]
    assert curves.time_s.gt(0).all() and curves.notna().all().all()
    summary = json.loads((tmp_path / f"{alloy.stem}-summary.json").read_text())
    for product in summary["products"].values():
        for fraction in ("0.01", "0.5", "0.99"):
            rec = product["fractions"][fraction]
            assert rec["forms"] and rec["nose_time_s"] > 0 and "nose_temperature_C" in rec
    assert summary["isokin_version"] and summary["inputs"]["alloy"]
    assert "nose" in result.output and "Estimates only" in result.output


def test_extra_fraction_and_svg(tmp_path):
    result = run("diagram", PHYSICAL_ALLOYS[0], "--out", tmp_path, "--fraction", 0.1, "--format", "svg",
                 "--tmin-c", 200, "--tmax-c", 480)
    assert result.exit_code == 0, result.output
    curves = pd.read_csv(tmp_path / f"{PHYSICAL_ALLOYS[0].stem}-curves.csv")
    assert sorted(curves.fraction.unique()) == [0.01, 0.1, 0.5, 0.99]
    assert curves.temperature_C.between(200, 480).all()
    assert (tmp_path / f"{PHYSICAL_ALLOYS[0].stem}.svg").read_text().lstrip().startswith("<?xml")


def test_existing_outputs_are_not_overwritten(tmp_path):
    alloy = PHYSICAL_ALLOYS[0]
    assert run("diagram", alloy, "--out", tmp_path, "--points", 50).exit_code == 0
    csv = tmp_path / f"{alloy.stem}-curves.csv"
    csv.write_text("mine\n")
    result = run("diagram", alloy, "--out", tmp_path, "--points", 50)
    assert result.exit_code == 2 and "--overwrite" in result.output
    assert csv.read_text() == "mine\n"
    assert run("diagram", alloy, "--out", tmp_path, "--points", 50, "--overwrite").exit_code == 0
    assert csv.read_text().startswith("product,fraction")


@pytest.mark.parametrize("alloy", PHYSICAL_ALLOYS, ids=lambda p: p.stem)
def test_check_prints_nuclei_and_noses(alloy):
    result = run("check", alloy)
    assert result.exit_code == 0, result.output
    assert "r* nm" in result.output and "nose" in result.output and "valid" in result.output


GOOD = (ROOT / "alloys" / "brackwater-ba42-precipitation.toml").read_text()


def _bad(tmp_path, text, name="bad.toml"):
    path = tmp_path / name
    path.write_text(text)
    return path


BAD_FILES = {
    "malformed TOML": ("[alloy\nname = 1", "is not valid TOML"),
    "missing key": (GOOD.replace("interface_energy_J_m2 = 0.10", ""), "interface_energy_J_m2: required key is missing"),
    "wrong type": (GOOD.replace("interface_energy_J_m2 = 0.10", 'interface_energy_J_m2 = "high"'), "must be a number"),
    "negative energy": (GOOD.replace("latent_heat_J_mol = 10.0e3", "latent_heat_J_mol = -10.0e3"), "must be > 0"),
    "zero energy": (GOOD.replace("interface_energy_J_m2 = 0.10", "interface_energy_J_m2 = 0.0"), "must be >= 0.001"),
    "unknown key": (GOOD.replace("interface_energy_J_m2 =", "interface_energy ="), "did you mean 'interface_energy_J_m2'"),
    "unknown mode": (GOOD.replace('mode = "continuous"', 'mode = "burst"'), "must be one of"),
    "inverted bounds": (GOOD.replace("lower_temperature_C = 150.0", "lower_temperature_C = 600.0"), "must lie below"),
    "no product": (GOOD.split("[[product]]")[0], "at least one [[product]]"),
    "missing table": (GOOD.replace("[alloy]", "[alloys]"), "did you mean [alloy]"),
    "strain too large": (GOOD.replace('mode = "continuous"', 'mode = "continuous"\nstrain_energy_J_m3 = 2e9'),
                         "no temperature with a net driving force"),
}


@pytest.mark.parametrize("case", sorted(BAD_FILES))
def test_bad_files_give_one_line_and_exit_2(case, tmp_path):
    text, expected = BAD_FILES[case]
    path = _bad(tmp_path, text)
    for command in ("diagram", "check"):
        result = run(command, path, *(["--out", tmp_path / "o"] if command == "diagram" else []))
        assert result.exit_code == 2, result.output
        lines = result.output.strip().splitlines()
        assert len(lines) == 1 and "Traceback" not in result.output
        assert expected in lines[0] and "bad.toml" in lines[0]


BAD_OPTIONS = {
    "fraction zero": (["--fraction", "0"], "strictly between 0 and 1"),
    "fraction one": (["--fraction", "1.5"], "strictly between 0 and 1"),
    "tmin above tmax": (["--tmin-c", "400", "--tmax-c", "300"], "must lie below"),
    "below absolute zero": (["--tmin-c", "-300"], "absolute zero"),
    "missing file": (None, "no such file"),
}


@pytest.mark.parametrize("case", sorted(BAD_OPTIONS))
def test_bad_options_give_one_line_and_exit_2(case, tmp_path):
    args, expected = BAD_OPTIONS[case]
    alloy = tmp_path / "absent.toml" if args is None else PHYSICAL_ALLOYS[0]
    result = run("diagram", alloy, "--out", tmp_path, *(args or []))
    assert result.exit_code == 2
    lines = result.output.strip().splitlines()
    assert len(lines) == 1 and expected in lines[0]


def test_unwritable_output_folder(tmp_path):
    blocker = tmp_path / "a-file"
    blocker.write_text("x")
    for out in (blocker, blocker / "sub"):
        result = run("diagram", PHYSICAL_ALLOYS[0], "--out", out)
        assert result.exit_code == 2
        assert len(result.output.strip().splitlines()) == 1 and "--out" in result.output


def test_console_script_runs_as_installed(tmp_path):
    # the entry point a user types, in a separate process
    proc = subprocess.run([sys.executable, "-m", "isokin", "check", str(PHYSICAL_ALLOYS[0])],
                          capture_output=True, text=True, cwd=tmp_path)
    assert proc.returncode == 0, proc.stderr
    bad = subprocess.run([sys.executable, "-m", "isokin", "check", str(tmp_path / "none.toml")],
                         capture_output=True, text=True, cwd=tmp_path)
    assert bad.returncode == 2 and "Traceback" not in bad.stderr and len(bad.stderr.strip().splitlines()) == 1


@pytest.mark.parametrize("args", [["diagram", "--points", "two"], ["diagram", "--format", "gif"], ["frobnicate"],
                                  ["diagram", "--tmin-c", "abc"]])
def test_usage_errors_are_one_line_too(args, tmp_path):
    proc = subprocess.run([sys.executable, "-m", "isokin", *args], capture_output=True, text=True, cwd=tmp_path)
    assert proc.returncode == 2
    lines = proc.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("isokin: error:") and "--help" in lines[0]


def test_tabulated_driving_force_reproduces_the_linear_form(tmp_path):
    # A dGm(T) table written from Turnbull's linear form (exact under linear interpolation)
    # must give the same curves as the linear form itself.
    import numpy as np

    text = GOOD.replace('driving_force = "turnbull"', 'driving_force = "table"\ndriving_force_table = "dgm.csv"')
    text = text.replace("equilibrium_temperature_C = 505.0", "").replace("latent_heat_J_mol = 10.0e3", "")
    t_c = np.array([100.0, 505.0, 600.0])
    dgm = np.where(t_c < 505.0, -10.0e3 * (505.0 - t_c) / (505.0 + 273.15), 0.0)
    pd.DataFrame({"temperature_C": t_c, "dGm_J_mol": dgm}).to_csv(tmp_path / "dgm.csv", index=False)
    path = _bad(tmp_path, text, "tabulated.toml")
    assert run("diagram", path, "--out", tmp_path / "a", "--points", 80).exit_code == 0
    assert run("diagram", PHYSICAL_ALLOYS[0], "--out", tmp_path / "b", "--points", 80).exit_code == 0
    a = pd.read_csv(tmp_path / "a" / "tabulated-curves.csv")
    b = pd.read_csv(tmp_path / "b" / f"{PHYSICAL_ALLOYS[0].stem}-curves.csv")
    np.testing.assert_allclose(a.time_s, b.time_s, rtol=1e-4)


def test_bad_driving_force_table(tmp_path):
    text = GOOD.replace('driving_force = "turnbull"', 'driving_force = "table"\ndriving_force_table = "dgm.csv"')
    text = text.replace("equilibrium_temperature_C = 505.0", "").replace("latent_heat_J_mol = 10.0e3", "")
    path = _bad(tmp_path, text)
    result = run("check", path)
    assert result.exit_code == 2 and "does not exist" in result.output
    (tmp_path / "dgm.csv").write_text("T,G\n1,2\n")
    result = run("check", path)
    assert result.exit_code == 2 and "temperature_C, dGm_J_mol" in result.output
