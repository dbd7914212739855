"""Steel diagrams from the command line: shipped steels, inline heat analyses, bad input."""

import json
from pathlib import Path

import pandas as pd
import pytest
from typer.testing import CliRunner

from isokin.cli import app

ROOT = Path(__file__).resolve().parents[1]
STEELS = sorted(p for p in (ROOT / "alloys").glob("*.toml") if 'model = "steel"' in p.read_text())
runner = CliRunner()


def run(*args):
    return runner.invoke(app, [str(a) for a in args])


def test_shipped_steels_cover_the_issue():
    names = {p.stem for p in STEELS}
    assert {"aisi-1080-eutectoid", "aisi-4140-crmo", "aisi-4340-nicrmo", "brackwater-bw52crv"} <= names


@pytest.mark.parametrize("steel", STEELS, ids=lambda p: p.stem)
def test_steel_diagram_and_exports(steel, tmp_path):
    result = run("diagram", steel, "--out", tmp_path, "--points", 150)
    assert result.exit_code == 0, result.output
    summary = json.loads((tmp_path / f"{steel.stem}-summary.json").read_text())
    lines = summary["critical_temperatures"]
    assert {"Ae1", "Bs", "Ms", "M50", "M90"} <= set(lines)
    assert all(v["method"] for v in lines.values())
    # martensite lines below Ms, Bs below Ae1 (facts of the trade, no source needed)
    assert lines["M90"]["temperature_C"] < lines["M50"]["temperature_C"] < lines["Ms"]["temperature_C"]
    assert lines["Ms"]["temperature_C"] < lines["Bs"]["temperature_C"] < lines["Ae1"]["temperature_C"]
    curves = pd.read_csv(tmp_path / f"{steel.stem}-curves.csv")
    assert {"pearlite", "bainite"} <= set(curves["product"])
    assert curves.temperature_C.min() >= lines["Ms"]["temperature_C"] - 1e-6
    for product in ("pearlite", "bainite"):
        assert summary["products"][product]["fractions"]["0.01"]["forms"]


def test_eutectoid_steel_has_no_ferrite_and_pearlite_nose_near_one_second(tmp_path):
    # Plain eutectoid steel: no proeutectoid ferrite; pearlite starts near 1 s at a nose of
    # 500-600 °C (a fact of the trade, common practice).
    steel = ROOT / "alloys" / "aisi-1080-eutectoid.toml"
    result = run("diagram", steel, "--out", tmp_path)
    assert result.exit_code == 0, result.output
    summary = json.loads((tmp_path / "aisi-1080-eutectoid-summary.json").read_text())
    assert not summary["products"]["ferrite"]["fractions"]["0.01"]["forms"]
    start = summary["products"]["pearlite"]["fractions"]["0.01"]
    assert 500 <= start["nose_temperature_C"] <= 600 and 0.1 <= start["nose_time_s"] <= 10
    assert "Ae3" not in summary["critical_temperatures"]


def test_inline_composition_matches_the_same_file(tmp_path):
    result = run("diagram", "--composition", "C=0.405,Mn=0.875,Si=0.25,Cr=0.95,Mo=0.20", "--grain-size", 7,
                 "--out", tmp_path / "inline")
    assert result.exit_code == 0, result.output
    assert run("diagram", ROOT / "alloys" / "aisi-4140-crmo.toml", "--out", tmp_path / "file").exit_code == 0
    a = pd.read_csv(tmp_path / "inline" / "heat-c0.405-mn0.875-si0.25-cr0.95-mo0.2-curves.csv")
    b = pd.read_csv(tmp_path / "file" / "aisi-4140-crmo-curves.csv")
    pd.testing.assert_frame_equal(a, b)
    assert run("check", "--composition", "C=0.79,Mn=0.76", "--grain-size", 6).exit_code == 0


def test_inline_heat_carries_the_steel_file_options_and_its_own_stem(tmp_path):
    # A second heat no longer collides with the first; a name becomes the stem; the Ms
    # method and austenitizing temperature reach the summary as they do from a file.
    out = tmp_path / "out"
    first = run("diagram", "--composition", "C=0.40,Mn=0.85", "--out", out)
    second = run("diagram", "--composition", "C=0.42,Mn=0.85", "--out", out)
    assert first.exit_code == 0 and second.exit_code == 0, second.output
    named = run("diagram", "--composition", "C=0.40,Mn=0.85", "--name", "Heat 4711 / ladle 2", "--ms-method",
                "steven_haynes_1956", "--austenitizing-c", "700", "--out", out)
    assert named.exit_code == 0, named.output
    summary = json.loads((out / "heat-4711-ladle-2-summary.json").read_text())
    assert summary["alloy"] == "Heat 4711 / ladle 2"
    assert summary["critical_temperatures"]["Ms"]["method"] == "Steven & Haynes (1956)"
    assert summary["inputs"]["steel"]["austenitizing_temperature_C"] == 700.0
    assert any("austenitizing at 700" in w for w in summary["warnings"])
    assert len(list(out.glob("*-summary.json"))) == 3
    bad = run("check", "--composition", "C=0.4", "--ms-method", "andrews")
    assert bad.exit_code == 2 and bad.output.strip().startswith("isokin: error: --ms-method:")
    assert run("check", ROOT / "alloys" / "aisi-4140-crmo.toml", "--name", "x").exit_code == 2


def test_out_of_range_composition_warns_but_runs(tmp_path):
    result = runner.invoke(app, ["check", "--composition", "C=0.4,Mn=0.8,Cr=2.5", "--grain-size", "7"])
    assert result.exit_code == 0
    assert "Cr = 2.5 mass % is outside" in result.output and "Kirkaldy & Venugopalan (1984)" in result.output


BAD_INLINE = {
    "negative content": ("C=0.4,Mn=-0.5", "negative"),
    "unknown element": ("C=0.4,Mx=0.5", "did you mean"),
    "no iron left": ("C=0.4,Cr=60,Ni=45", "iron"),
    "malformed entry": ("C0.4", "Element=mass%"),
    "no carbon": ("Mn=0.8", "carbon"),
}


@pytest.mark.parametrize("case", sorted(BAD_INLINE))
def test_bad_inline_compositions(case):
    text, expected = BAD_INLINE[case]
    result = run("check", "--composition", text, "--grain-size", 7)
    assert result.exit_code == 2, result.output
    lines = result.output.strip().splitlines()
    assert len(lines) == 1 and expected in lines[0].lower() or expected in lines[0]


@pytest.mark.parametrize("grain", [-2, 15])
def test_grain_size_outside_the_astm_scale(grain):
    result = run("check", "--composition", "C=0.4", "--grain-size", grain)
    assert result.exit_code == 2 and "ASTM" in result.output


STEEL_TEXT = (ROOT / "alloys" / "aisi-4140-crmo.toml").read_text()
BAD_STEEL_FILES = {
    "negative content": (STEEL_TEXT.replace("Mn = 0.875", "Mn = -0.875"), "composition.Mn"),
    "unknown element": (STEEL_TEXT.replace("Mo = 0.20", "Mo2 = 0.20"), "did you mean 'Mo'"),
    "grain size above 14": (STEEL_TEXT.replace("grain_size_astm = 7.0", "grain_size_astm = 16.0"), "grain_size_astm"),
    "grain size missing": (STEEL_TEXT.replace("grain_size_astm = 7.0", ""), "grain_size_astm: required"),
    "no iron": (STEEL_TEXT.replace("Cr = 0.95", "Cr = 99.0"), "iron"),
    "product table in a steel": (STEEL_TEXT + '\n[[product]]\nname = "x"\n', "nucleation-growth"),
    "ms method": (STEEL_TEXT.replace("[steel]", '[steel]\nms_method = "guess"'), "must be one of"),
}


@pytest.mark.parametrize("case", sorted(BAD_STEEL_FILES))
def test_bad_steel_files(case, tmp_path):
    text, expected = BAD_STEEL_FILES[case]
    path = tmp_path / "steel.toml"
    path.write_text(text)
    result = run("check", path)
    assert result.exit_code == 2, result.output
    lines = result.output.strip().splitlines()
    assert len(lines) == 1 and expected in lines[0] and "steel.toml" in lines[0]


def test_austenitizing_below_ae3_warns(tmp_path):
    path = tmp_path / "steel.toml"
    path.write_text(STEEL_TEXT.replace("austenitizing_temperature_C = 845.0", "austenitizing_temperature_C = 740.0"))
    result = run("check", path)
    assert result.exit_code == 0 and "not above Ae3" in result.output
