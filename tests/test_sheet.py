"""The one-page process sheet: read back from the PDF it writes (pypdf extracts the page's text),
it is one A4 page that carries the plan's numbers as the plan functions give them, the
critical temperatures, the alloy file's SHA-256, the calibration and the cautions.

The label-collision check of the sheet figure is in test_figure_layout.py.
"""

import hashlib
import sys
from pathlib import Path

import pypdf
import pytest

import isokin
from isokin.compute.plan import COMMON_CAUTION, ROUTE_CAUTIONS
from isokin.readout import CAUTION, format_duration, format_temperature

ROOT = Path(__file__).resolve().parents[1]
ALLOYS = ROOT / "alloys"
sys.path.insert(0, str(Path(__file__).parent))
from test_hardening import refused, run_main  # noqa: E402  the entry point, in-process

#: ISO 216 A4, 210 x 297 mm, in PDF points (1/72 in).
A4_PT = (210 / 25.4 * 72, 297 / 25.4 * 72)


def page_text(path):
    """The single page's size and its text, whitespace run together (wrapped lines joined)."""
    reader = pypdf.PdfReader(path)
    assert len(reader.pages) == 1
    page = reader.pages[0]
    return (float(page.mediabox.width), float(page.mediabox.height)), " ".join(page.extract_text().split())


def flat(text):
    return " ".join(text.split())


def test_the_sheet_command_writes_one_a4_page_with_the_plans_numbers(tmp_path):
    alloy_file = ALLOYS / "aisi-4140-crmo.toml"
    code, out, err, _ = run_main("sheet", alloy_file, "--route", "austemper", "--max-hold", "2h", "--out", tmp_path)
    assert code == 0, err
    path = tmp_path / "aisi-4140-crmo-sheet-austemper.pdf"
    size, text = page_text(path)
    assert size == pytest.approx(A4_PT, abs=0.5)
    alloy = isokin.load_alloy(alloy_file)
    plan = isokin.austemper(alloy, max_hold_s=7200.0)
    rec = plan.recommendation
    assert f"Process sheet: {alloy.name}" in text
    assert (f"Recommended: {format_temperature(rec['temperature_C'])}, hold {format_duration(rec['hold_time_s'])}"
            in text)
    assert f"Window: {format_temperature(plan.window_C[0])} to {format_temperature(plan.window_C[1])}" in text
    assert f"Hardness expected: {rec['hardness_HV']:.0f} HV" in text
    assert "max hold 2 h" in text
    for name, t_c in plan.critical_C.items():
        assert f"{name} {format_temperature(t_c)}, {alloy.critical_methods[name]}" in text
    # the file's SHA-256 (hashlib: FIPS 180-4), the version, the model choice, the calibration
    assert f"SHA-256 {hashlib.sha256(alloy_file.read_bytes()).hexdigest()}" in text
    assert f"isokin {isokin.__version__}" in text
    assert "kinetic model kirkaldy_venugopalan_1984" in text and "Calibration: none" in text
    for caution in (ROUTE_CAUTIONS["austemper"], COMMON_CAUTION, CAUTION):
        assert flat(caution) in text
    assert "Reviewed for production by" in text
    # the printed lines are the sheet's own
    assert f"Window: {format_temperature(plan.window_C[0])}" in out and "wrote " + str(path) in out


def test_a_sheet_from_python_names_the_calibration_behind_the_kinetics(tmp_path):
    data = ALLOYS / "brackwater-bw52crv-dilatometer.csv"
    digest = hashlib.sha256(data.read_bytes()).hexdigest()
    calibrated = tmp_path / "bw52crv-calibrated.toml"
    calibrated.write_text((ALLOYS / "brackwater-bw52crv.toml").read_text() + (
        "\n[steel.kinetics.bainite]\nfactor = 1.82\n\n[composition_range]\nC = [0.50, 0.55]\nCr = [0.90, 1.00]\n"
        "\n[calibration]\n"
        f'data_file = "{data.name}"\ndata_sha256 = "{digest}"\ndate = "2026-12-02T10:00:00+00:00"\n'
        'isokin_version = "0.2.0"\nfree = ["bainite.factor"]\nfitted = [1.82]\n'))
    alloy = isokin.load_alloy(calibrated)
    path = isokin.process_sheet(alloy, tmp_path / "sheet.pdf", route="interrupted-quench", alloy_file=calibrated,
                                worst_case=True)
    _, text = page_text(path)
    assert f"data {data.name}, SHA-256 {digest}" in text and "fitted bainite.factor = 1.82" in text
    assert f"SHA-256 {hashlib.sha256(calibrated.read_bytes()).hexdigest()}" in text
    assert "interrupted-quench, worst case over 64 heats" in text
    assert flat(ROUTE_CAUTIONS["interrupted-quench"]) in text
    # the diagram alone: no plan, the general caution all the same
    bare = isokin.process_sheet(isokin.steel({"C": 0.79, "Mn": 0.76}, 6.0), tmp_path / "bare.pdf")
    _, text = page_text(bare)
    assert "diagram only" in text and "no file" in text and flat(CAUTION) in text


def test_the_sheet_refuses_what_it_cannot_do_in_one_line(tmp_path):
    steel = isokin.load_alloy(ALLOYS / "aisi-4140-crmo.toml")
    for call, key in ((lambda: isokin.process_sheet(steel, tmp_path / "a.pdf", route="austemper", budget_s=3600.0),
                       "budget_s"),
                      (lambda: isokin.process_sheet(steel, tmp_path / "a.pdf", max_hold_s=3600.0), "max_hold_s"),
                      (lambda: isokin.process_sheet(steel, tmp_path / "a.png"), "target"),
                      (lambda: isokin.process_sheet(steel, tmp_path / "a.pdf", route="harden"), "route")):
        with pytest.raises(isokin.InputError) as caught:
            call()
        assert str(caught.value).startswith(key)
    assert not list(tmp_path.iterdir())
    code, _, err, _ = run_main("sheet", ALLOYS / "aisi-4140-crmo.toml", "--route", "austemper", "--budget", "2h",
                               "--out", tmp_path)
    assert refused(code, err, "--budget: is not an option of the 'austemper' plan")
    code, _, err, _ = run_main("sheet", ALLOYS / "brackwater-ba42-precipitation.toml", "--route", "anneal",
                               "--worst-case", "--out", tmp_path)
    assert refused(code, err, "--worst-case")
    # an existing sheet is kept unless --overwrite
    first = run_main("sheet", ALLOYS / "aisi-1080-eutectoid.toml", "--out", tmp_path)
    assert first[0] == 0, first[2]
    before = (tmp_path / "aisi-1080-eutectoid-sheet.pdf").read_bytes()
    code, _, err, _ = run_main("sheet", ALLOYS / "aisi-1080-eutectoid.toml", "--out", tmp_path)
    assert refused(code, err, "exists; pass --overwrite")
    assert (tmp_path / "aisi-1080-eutectoid-sheet.pdf").read_bytes() == before


def test_sheet_help_reads_plainly(monkeypatch):
    monkeypatch.setenv("COLUMNS", "240")  # wide enough that no option's text wraps
    code, out, _, _ = run_main("sheet", "--help")
    words = " ".join(out.replace("│", " ").split())  # the help's boxes and wrapping taken out
    assert code == 0 and "PDF page for the heat-treat file" in words
    assert "(the file's composition_range table, or --range)" in words
    assert "<austemper|interrupted-quench|anneal|quench-and-temper>" in words
