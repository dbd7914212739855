"""Every figure type, drawn by its command on the shipped alloys: no two text labels overlap and
every label lies inside the figure (matplotlib gives each text its extent on the canvas).

A legend counts as one label (its box); the texts inside it are not checked against each
other. Tick labels are checked like any other text.
"""

import math
from pathlib import Path

import matplotlib
import pytest
from matplotlib.text import Text
from typer.testing import CliRunner

from isokin.cli.commands import app

matplotlib.use("Agg")

ROOT = Path(__file__).resolve().parents[1]
ALLOYS = ROOT / "alloys"
#: Slack in pixels (at 100 dpi): anti-aliasing can touch without the labels being unreadable.
SLACK_PX = 1.0


def labels(fig):
    """(text, extent) of every visible label of the figure, a legend as one box."""
    fig.canvas.draw()
    renderer = fig.canvas.get_renderer()
    legends = [ax.get_legend() for ax in fig.axes if ax.get_legend() is not None] + list(fig.legends)
    skip = {t for lg in legends for t in (*lg.get_texts(), lg.get_title())}
    for ax in fig.findobj(lambda a: hasattr(a, "get_major_ticks") and hasattr(a, "get_view_interval")):
        low, high = sorted(ax.get_view_interval())
        for tick in (*ax.get_major_ticks(), *ax.get_minor_ticks()):
            loc = tick.get_loc()
            if not (low < loc < high or math.isclose(loc, low, rel_tol=1e-9, abs_tol=1e-12)
                    or math.isclose(loc, high, rel_tol=1e-9, abs_tol=1e-12)):
                skip |= {tick.label1, tick.label2}  # a tick outside the view is not drawn
    out = []
    for text in fig.findobj(Text):
        if text in skip or not text.get_visible() or not text.get_text().strip():
            continue
        # the words alone: an annotation's own extent takes in its arrow
        out.append((text.get_text(), Text.get_window_extent(text, renderer)))
    out += [(f"legend ({', '.join(t.get_text() for t in lg.get_texts())[:60]})", lg.get_window_extent(renderer))
            for lg in legends if lg.get_visible()]
    return out


def problems(fig):
    found = []
    boxes = labels(fig)
    frame = fig.bbox
    for text, box in boxes:
        if (box.x0 < frame.x0 - SLACK_PX or box.y0 < frame.y0 - SLACK_PX or box.x1 > frame.x1 + SLACK_PX
                or box.y1 > frame.y1 + SLACK_PX):
            found.append(f"outside the figure: {text!r}")
    for i, (a, box_a) in enumerate(boxes):
        for b, box_b in boxes[i + 1:]:
            shrunk_a = box_a.expanded(1.0, 1.0).padded(-SLACK_PX)
            if shrunk_a.overlaps(box_b.padded(-SLACK_PX)):
                found.append(f"{a!r} overlaps {b!r}")
    return found


COMMANDS = {
    "diagram 4140": ["diagram", "aisi-4140-crmo.toml"],
    "diagram 4340": ["diagram", "aisi-4340-nicrmo.toml"],
    "diagram 1080": ["diagram", "aisi-1080-eutectoid.toml"],
    "diagram BW-52CrV": ["diagram", "brackwater-bw52crv.toml"],
    "diagram Al-Cu": ["diagram", "brackwater-ba42-precipitation.toml"],
    "diagram Cu droplet": ["diagram", "brackwater-cu-atomised-droplet.toml"],
    "cct 4140": ["cct", "aisi-4140-crmo.toml"],
    "cct 1080": ["cct", "aisi-1080-eutectoid.toml"],
    "cct Al-Cu": ["cct", "brackwater-ba42-precipitation.toml"],
    "cool 4140": ["cool", "aisi-4140-crmo.toml", "--rate", "5", "--rate", "50"],
    "cool log": ["cool", "brackwater-bw52crv.toml", "--log", "brackwater-bw52crv-oil-quench-log.csv"],
    "plan austemper": ["plan", "aisi-4140-crmo.toml", "--route", "austemper"],
    "plan interrupted": ["plan", "aisi-4340-nicrmo.toml", "--route", "interrupted-quench"],
    "plan anneal": ["plan", "aisi-4140-crmo.toml", "--route", "anneal"],
    "plan without a window": ["plan", "aisi-4340-nicrmo.toml", "--route", "austemper", "--max-hold", "10s"],
    "plan worst case": ["plan", "aisi-4140-crmo.toml", "--route", "austemper", "--worst-case", "--samples", "16"],
    "plan quench and temper": ["plan", "brackwater-bw52crv.toml", "--route", "quench-and-temper", "--curve",
                               "brackwater-bw52crv-tempering.csv", "--target-hrc", "44:48"],
    "temper": ["temper", "brackwater-bw52crv.toml", "--curve", "brackwater-bw52crv-tempering.csv",
               "--temperature-c", "450", "--time", "1h", "--time", "8h"],
    "section": ["section", "aisi-4140-crmo.toml", "--shape", "bar", "--size-mm", "60", "--medium-c", "60",
                "--severity", "0.35"],
    "jominy": ["jominy", "aisi-4140-crmo.toml", "--band", "bands/sae-4140h.csv"],
    "fit": ["fit", "brackwater-bw52crv-dilatometer.csv", "--alloy", "brackwater-bw52crv.toml"],
    "spread": ["spread", "aisi-4140-crmo.toml", "--samples", "200"],
    "compare": ["compare", "aisi-4140-crmo.toml", "aisi-4340-nicrmo.toml"],
    "sheet": ["sheet", "aisi-1080-eutectoid.toml"],
    "sheet austemper worst case": ["sheet", "aisi-4140-crmo.toml", "--route", "austemper", "--worst-case", "--samples",
                                   "16"],
    "sheet interrupted": ["sheet", "aisi-4340-nicrmo.toml", "--route", "interrupted-quench", "--thickness-mm", "25",
                          "--htc", "800"],
    "sheet anneal": ["sheet", "brackwater-bw52crv.toml", "--route", "anneal"],
    "sheet without a window": ["sheet", "aisi-4340-nicrmo.toml", "--route", "austemper", "--max-hold", "10s"],
    "sheet quench and temper": ["sheet", "brackwater-bw52crv.toml", "--route", "quench-and-temper", "--curve",
                                "brackwater-bw52crv-tempering.csv", "--target-hrc", "44:48"],
    "sheet Al-Cu": ["sheet", "brackwater-ba42-precipitation.toml", "--route", "anneal"],
}


@pytest.mark.parametrize("name", list(COMMANDS))
def test_no_label_collides_or_leaves_the_figure(name, tmp_path, monkeypatch):
    import isokin.io.export as export

    seen = []
    monkeypatch.setattr(export, "write_figure", lambda fig, target, fmt, dpi=150: seen.append(problems(fig)))
    args = [str(ALLOYS / a) if a.endswith((".toml", ".csv")) else a for a in COMMANDS[name]]
    out = ["--out" if name != "fit" else "--out", str(tmp_path / ("x.toml" if name == "fit" else "out"))]
    result = CliRunner().invoke(app, args + out)
    assert result.exit_code == 0, result.output
    assert seen, "the command drew no figure"
    assert seen[0] == [], "\n".join(seen[0])
