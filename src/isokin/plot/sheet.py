"""A one-page process sheet for the heat-treat file: the isothermal diagram (with a plan's
window), the critical temperatures, the plan's numbers, the inputs and their record, and the
cautions, on one A4 page.

The page is a matplotlib figure: the diagram is drawn by :func:`~isokin.plot.ttt.plot_ttt` or
:func:`~isokin.plot.ttt.plot_plan` into axes on the upper half, and the text blocks flow below
it, each placed under the one before by its drawn height (in two columns, then across the
page); where they would run off the page the text is set a size smaller. The figure has a
canvas of its own, so making a sheet leaves pyplot's figures alone.
"""

from __future__ import annotations

import inspect
import textwrap
from pathlib import Path

import numpy as np
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.figure import Figure

from ..compute.plan import anneal, austemper, interrupted_quench, quench_and_temper
from ..compute.ttt import ttt
from ..errors import InputError, choice
from ..io.export import write_figure, write_outputs
from ..io.sheet import sheet_record
from ..products.alloy import check_alloy
from ..readout import CAUTION, format_duration, format_temperature
from ..relations.hardness import hrc_from_hv_astm_e140
from .labels import declutter, literal
from .ttt import plot_plan, plot_ttt

#: The plan of each route a sheet can carry.
ROUTES = {"austemper": austemper, "interrupted-quench": interrupted_quench, "anneal": anneal,
          "quench-and-temper": quench_and_temper}
#: ISO A4 portrait, inches (210 x 297 mm).
PAGE_IN = (210 / 25.4, 297 / 25.4)
#: Where things stand on the page, in page fractions: the margins, the diagram's axes and the
#: top of the text below them (the diagram's x label and ticks stand between).
LEFT, RIGHT, BOTTOM = 0.07, 0.96, 0.02
DIAGRAM = (0.11, 0.50, 0.84, 0.40)
TEXT_TOP = 0.435
COLUMN_GAP = 0.03
#: Text sizes tried in turn until the blocks fit on the page, points.
TEXT_SIZES = (7.5, 7.0, 6.5, 6.0, 5.5)
#: Average width of a character of the sheet's font, in units of its size (DejaVu Sans).
CHAR_WIDTH_EM = 0.56
#: What the plan's time is, in the words of each route.
TIME_WORDS = {"austemper": "hold", "interrupted-quench": "at most", "anneal": "hold", "quench-and-temper": "temper"}
SIGN_OFF = ("Reviewed for production by (name, signature, date): ______________________________",
            "Trial heat treatment confirmed (report no., date): ______________________________")


def prepare_sheet(alloy, route=None, plan=None, alloy_file=None, **options):
    """The parts of a sheet: (diagram, plan or None, record).

    ``route`` plans one of :data:`ROUTES` with ``options`` (the keys of that route's function,
    e.g. ``max_hold_s``, ``worst_case=True``); or give a ``plan`` made before. ``alloy_file``
    names the file the alloy was read from, for its name and SHA-256.
    """
    check_alloy(alloy)
    if route is not None:
        if plan is not None:
            raise InputError(None, "plan", "give a route to plan or a plan made before, not both")
        plan_of = ROUTES[choice("route", route, tuple(ROUTES))]
        accepted = set(inspect.signature(plan_of).parameters) - {"alloy"}
        for key in options:
            if key not in accepted:
                raise InputError(None, key, f"is not an option of the '{route}' plan")
        plan = plan_of(alloy, **options)
    elif options:
        raise InputError(None, next(iter(options)), "is an option of a route's plan: give the route too")
    return ttt(alloy), plan, sheet_record(alloy, alloy_file)


def process_sheet(alloy, target, route=None, plan=None, alloy_file=None, units="C", overwrite=False, **options):
    """Write a one-page process sheet (PDF) for the heat-treat file and return its path.

    Parameters
    ----------
    alloy : Alloy
        From :func:`isokin.load_alloy` or :func:`isokin.steel`.
    target : path
        The PDF to write (``.pdf``; its folder is made where missing); written whole or not
        at all, and an existing file only replaced with ``overwrite`` (FileExistsError).
    route : {"austemper", "interrupted-quench", "anneal", "quench-and-temper"}, optional
        Plan this route with ``options`` (as its function takes them: ``max_hold_s``,
        ``margin_K``, ``safety``, ``worst_case=True``, ``curve`` and ``target_hv`` for a
        quench and temper, ...); without it, give a ``plan`` made before, or neither for the
        diagram alone.
    alloy_file : path, optional
        The alloy file: its name and SHA-256 go on the sheet.
    units : {"C", "F"}

    Examples
    --------
    >>> import isokin, tempfile, pathlib
    >>> steel = isokin.load_alloy("alloys/aisi-4140-crmo.toml")
    >>> with tempfile.TemporaryDirectory() as folder:
    ...     path = isokin.process_sheet(steel, pathlib.Path(folder) / "4140-anneal.pdf", route="anneal",
    ...                                 alloy_file="alloys/aisi-4140-crmo.toml")
    ...     path.name, path.read_bytes()[:5]
    ('4140-anneal.pdf', b'%PDF-')
    """
    target = Path(target)
    if target.suffix.lower() != ".pdf":
        raise InputError(None, "target", f"a process sheet is a PDF: name the file ....pdf, got {target.name!r}")
    choice("units", units, ("C", "F"))
    diagram, plan, record = prepare_sheet(alloy, route, plan, alloy_file, **options)
    fig = sheet_figure(diagram, record, plan, units)
    target.parent.mkdir(parents=True, exist_ok=True)
    write_outputs({target: lambda path: write_figure(fig, path, "pdf")}, overwrite=overwrite)
    return target


def sheet_figure(result, record, plan=None, units="C"):
    """The sheet as a figure of one A4 page (see the module notes).

    Parameters
    ----------
    result : TTTResult
        The alloy's diagram.
    record : dict
        From :func:`isokin.io.sheet.sheet_record`.
    plan : PlanResult, optional
        Its window is shaded on the diagram (a hold route's) and its numbers listed.
    """
    fig = Figure(figsize=PAGE_IN)
    FigureCanvasAgg(fig)
    kind = "diagram only" if plan is None else plan.route + (
        f", worst case over {plan.options['worst_case_heats']} heats" if plan.options.get("worst_case_heats") else "")
    fig.text(LEFT, 0.985, literal(f"Process sheet: {result.alloy}"), fontsize=13, fontweight="bold", va="top")
    fig.text(LEFT, 0.962, literal(f"{kind} · prepared {record['date']} with isokin {record['isokin_version']}"),
             fontsize=8.5, color="#333333", va="top")
    ax = fig.add_axes(DIAGRAM)
    if plan is not None and plan.route != "quench-and-temper":  # its window is of tempering, not of holds
        plot_plan(plan, result, ax, units)
    else:
        plot_ttt(result, ax, units)
    ax.set_title("", loc="left")  # the sheet's own title names the alloy and the plan
    left = [("Critical temperatures", critical_lines(result, units))]
    right = [(f"Plan: {kind}" if plan is not None else "Plan", plan_lines(plan, units))]
    across = [("Inputs and record", record_lines(record))]
    if result.warnings or (plan is not None and plan.warnings):
        across.append(("Warnings", list(dict.fromkeys((*result.warnings, *(plan.warnings if plan else ()))))))
    cautions = [*(plan.cautions if plan is not None else ()), CAUTION]
    across.append(("Cautions", cautions))
    across.append(("", list(SIGN_OFF)))
    _lay_out(fig, left, right, across)
    declutter(fig)
    return fig


def critical_lines(result, units="C"):
    """The critical temperatures with their methods, and the start nose of the diagram."""
    lines = [f"{literal(name)}  {format_temperature(float(t_c), units)}, {literal(result.critical_methods.get(name, ''))}"
             for name, t_c in result.critical_C.items() if np.isfinite(t_c)]
    start = result.overall or result.products[0]
    nose = result.noses[start]
    if nose.forms[0]:
        lines.append(f"start nose ({result.fractions[0] * 100:g} % {result.fraction_of.get(start, '')}): "
                     f"{format_temperature(float(nose.temperature_C[0]), units)} at {format_duration(float(nose.time_s[0]))}")
    return lines


def plan_lines(plan, units="C"):
    """The plan's numbers in words: recommendation, window, hardness, limits."""
    if plan is None:
        return ["No route was asked for: the diagram alone. A sheet with --route (austemper, interrupted-quench, "
                "anneal, quench-and-temper) carries the plan's window and numbers."]
    lines = []
    rec = plan.recommendation
    if rec is not None:
        lines.append(f"Recommended: {format_temperature(rec['temperature_C'], units)}, {TIME_WORDS[plan.route]} "
                     f"{format_duration(rec['hold_time_s'])} ({rec['reason']})")
    if plan.window_C is not None:
        lines.append(f"Window: {format_temperature(plan.window_C[0], units)} to "
                     f"{format_temperature(plan.window_C[1], units)}")
    if plan.no_window:
        lines.append(f"No window: {plan.no_window}")
    hv = None if rec is None else rec.get("hardness_HV")
    if hv is not None:
        hrc = float(hrc_from_hv_astm_e140(hv))
        lines.append(f"Hardness expected: {hv:.0f} HV" + (f" ({hrc:.0f} HRC by ASTM E140)" if np.isfinite(hrc) else ""))
    elif rec is not None:
        lines.append("Hardness expected: not estimated for this route")
    if rec is not None and "required_rate_K_s" in rec:
        lines.append(f"Quench to the bath at {rec['required_rate_K_s']:.3g} K/s or faster (ferrite + pearlite "
                     "under 1 % of the part on arrival)")
    given = [option_text(k, v) for k, v in plan.options.items() if v is not None and not k.startswith("worst_case")]
    if given:
        lines.append("Settings: " + "; ".join(given))
    if plan.options.get("worst_case_heats"):
        lines.append(f"Worst case over {plan.options['worst_case_heats']} heats of the composition range: "
                     f"{plan.options['worst_case']}")
    return [literal(line) for line in lines]


def option_text(key, value):
    """A plan option as words, its unit read from its key (``max_hold_s`` -> max hold 4 h)."""
    words = key.replace("_", " ")
    for suffix, show in ((" s", format_duration), (" C", format_temperature), (" K", lambda v: f"{v:g} K"),
                         (" m", lambda v: f"{v * 1e3:g} mm"), (" W m2K", lambda v: f"{v:g} W/(m2 K)")):
        if words.endswith(suffix) and isinstance(value, (int, float)) and not isinstance(value, bool):
            return f"{words[:-len(suffix)]} {show(value)}"
    if isinstance(value, bool):
        value = "yes" if value else "no"
    elif isinstance(value, (list, tuple)):
        value = "-".join(f"{v:.4g}" for v in value)
    elif isinstance(value, float):
        value = f"{value:.4g}"
    return f"{words} {value}"


def record_lines(record):
    """Where the numbers come from: the file and its SHA-256, the model, the calibration."""
    lines = [f"Alloy file: {record['alloy_file']}, SHA-256 {record['alloy_sha256']}" if record["alloy_file"]
             else "Alloy: an analysis given directly (no file)"]
    if record.get("note"):
        lines.append(f"Note: {record['note']}")
    lines.append(f"Inputs and models: {record['description']}")
    if record["model_choices"]:
        lines.append("Model choices: " + ", ".join(f"{k} {v}" for k, v in record["model_choices"].items()))
    lines.append("Calibration: " + ("; ".join(record["calibration"]) if record["calibration"] else
                                    "none (the models' published coefficients)"))
    lines.append(f"isokin {record['isokin_version']}, prepared {record['date']}")
    return [literal(line) for line in lines]


def _lay_out(fig, left, right, across):
    """Flow the blocks: ``left`` and ``right`` in two columns under the diagram, ``across``
    over the whole width below both, at the first size of :data:`TEXT_SIZES` that fits."""
    middle = 0.5 * (LEFT + RIGHT)
    for size in TEXT_SIZES:
        placed = []
        bottom_left = _flow(fig, left, LEFT, middle - 0.5 * COLUMN_GAP, TEXT_TOP, size, placed)
        bottom_right = _flow(fig, right, middle + 0.5 * COLUMN_GAP, RIGHT, TEXT_TOP, size, placed)
        bottom = _flow(fig, across, LEFT, RIGHT, min(bottom_left, bottom_right) - 0.01, size, placed)
        if bottom >= BOTTOM or size == TEXT_SIZES[-1]:
            return
        for text in placed:
            text.remove()


def _flow(fig, blocks, x0, x1, top, size, placed):
    """Blocks of (heading, lines) from ``top`` down between x0 and x1 (page fractions), each
    line wrapped to the width; returns where the last ends."""
    renderer = fig.canvas.get_renderer()
    width_pt = (x1 - x0) * fig.get_figwidth() * 72.0
    chars = max(20, int(width_pt / (CHAR_WIDTH_EM * size)))
    y = top
    for heading, lines in blocks:
        if heading:
            text = fig.text(x0, y, heading, fontsize=size + 1.0, fontweight="bold", va="top")
            placed.append(text)
            y -= text.get_window_extent(renderer).height / fig.bbox.height + 0.003
        body = "\n".join(textwrap.fill(line, chars, subsequent_indent="   ", break_on_hyphens=False)
                         for line in lines)
        text = fig.text(x0, y, body, fontsize=size, va="top", linespacing=1.25, color="#1a1a1a")
        placed.append(text)
        y -= text.get_window_extent(renderer).height / fig.bbox.height + 0.012
    return y
