"""``isokin plan``: the window of hold temperatures for a heat-treatment route, and a recommendation."""

from __future__ import annotations

import math
from enum import Enum
from pathlib import Path
from typing import Annotated, Optional

import typer

from ..errors import InputError
from ..readout import format_duration
from .options import (AlloyArg, FigureFormat, FormatOpt, Inline, OutOpt, OverwriteOpt, RangeOpt, SamplesOpt, SeedOpt,
                      Units, UnitsOpt, decimal_number, duration, in_units, steel_options)
from .runner import Drawing, Outcome, load, run
from .spread import heats
from .status import status


class Route(str, Enum):
    austemper = "austemper"
    interrupted_quench = "interrupted-quench"
    anneal = "anneal"


#: The library's keys of a plan as this command's options name them.
_PLAN_KEYS = {"max_hold_s": "--max-hold", "margin_K": "--margin-k", "safety": "--safety", "budget_s": "--budget",
              "route": "--route"}


@steel_options
def plan(
    alloy_file: AlloyArg = None,
    inline: Inline = None,
    route: Annotated[Optional[Route], typer.Option("--route", help="austemper, interrupted-quench or anneal.")] = None,
    max_hold: Annotated[Optional[str], typer.Option("--max-hold", metavar="DURATION",
                        help="Austemper: the longest hold the line allows (default 4h).")] = None,
    budget: Annotated[Optional[str], typer.Option("--budget", metavar="DURATION",
                      help="Anneal: the time budget of the hold (default 8h).")] = None,
    margin_k: Annotated[Optional[float], typer.Option("--margin-k", parser=decimal_number, metavar="NUMBER",
                        help="Keep hold temperatures this far above Ms, 0 to 500 K (austemper 20, interrupted quench "
                             "10).")] = None,
    safety: Annotated[Optional[float], typer.Option("--safety", parser=decimal_number, metavar="NUMBER",
                      help="Safety factor on the model's times, 1 to 100 (austemper 1.5, interrupted quench 2, "
                           "anneal 1.5).")] = None,
    target_hv: Annotated[Optional[float], typer.Option("--target-hv", parser=decimal_number, metavar="NUMBER",
                         help="Austemper: recommend the temperature closest to this hardness, HV.")] = None,
    thickness_mm: Annotated[Optional[float], typer.Option("--thickness-mm", parser=decimal_number, metavar="NUMBER",
                            help="Interrupted quench: section thickness, mm, for the equalizing time.")] = None,
    htc: Annotated[Optional[float], typer.Option("--htc", parser=decimal_number, metavar="W_PER_M2K",
                   help="Interrupted quench: heat-transfer coefficient of the bath, W/(m2 K).")] = None,
    xlsx: Annotated[bool, typer.Option("--xlsx", help="Also write <stem>-plan.xlsx (plan, summary, curves).")] = False,
    worst_case: Annotated[bool, typer.Option("--worst-case", help="Plan on every heat of the composition range "
                                             "([composition_range] or --range), not the nominal.")] = False,
    range_text: RangeOpt = None,
    samples: SamplesOpt = None,
    seed: SeedOpt = None,
    out: OutOpt = Path("isokin-out"),
    fmt: FormatOpt = FigureFormat.png,
    overwrite: OverwriteOpt = False,
    units: UnitsOpt = Units.C,
):
    """Plan a hold: the window of temperatures for a route, the hold time, and a recommendation.

    Writes <stem>-plan.json, <stem>-plan.csv and <stem>-plan.png (the diagram with the window
    shaded), and with --xlsx a spreadsheet. No window is an answer too: it says what would
    have to change.
    """

    def solve(alloy, stem):
        from ..compute import plan as planning
        from ..compute.ttt import ttt
        from ..io.export import plan_summary, write_json, write_plan_csv, write_plan_xlsx

        if route is None:
            raise InputError(None, "--route", "choose austemper, interrupted-quench or anneal")
        options = {}
        if safety is not None:
            options["safety"] = safety
        if worst_case:
            options["worst_case"] = heats(alloy, range_text, samples, seed)
        status(f"planning the {route.value} window" + (" over the heats of the range" if worst_case else ""))
        if route == Route.austemper:
            hold_limit = _duration_option(max_hold, "--max-hold")
            options.update({k: v for k, v in (("max_hold_s", hold_limit), ("margin_K", margin_k),
                                              ("target_hv", target_hv)) if v is not None})
            result = planning.austemper(alloy, **options)
        elif route == Route.interrupted_quench:
            options.update({k: v for k, v in (("margin_K", margin_k),
                                              ("thickness_m", None if thickness_mm is None else thickness_mm / 1000),
                                              ("heat_transfer_W_m2K", htc)) if v is not None})
            result = planning.interrupted_quench(alloy, **options)
        else:
            limit = _duration_option(budget, "--budget")
            options.update({"budget_s": limit} if limit is not None else {})
            result = planning.anneal(alloy, **options)
        curves = ttt(alloy)
        if xlsx:
            try:
                import openpyxl  # noqa: F401
            except ImportError:
                raise InputError(None, "--xlsx", "needs openpyxl: pip install 'isokin[xlsx]'") from None

        def draw():
            from ..plot.ttt import ttt_figure

            return ttt_figure(curves, footer_extra=" ".join(result.cautions[:1]), units=units.value, plan=result)

        files = {out / f"{stem}-plan.json": lambda p: write_json(plan_summary(result), p),
                 out / f"{stem}-plan.csv": lambda p: write_plan_csv(result, p),
                 out / f"{stem}-plan.{fmt.value}": Drawing(draw)}
        if xlsx:
            files[out / f"{stem}-plan.xlsx"] = lambda p: write_plan_xlsx(result, curves, p)
        return Outcome(lambda: _print_plan(result, units), result.warnings, files, result.cautions)

    run(lambda: load(alloy_file, inline), solve, overwrite=overwrite, keys=_PLAN_KEYS)


def _duration_option(text: Optional[str], option: str) -> Optional[float]:
    return None if text is None else duration(text, option)  # the plan refuses a limit that is not above 0


#: Plan columns as printed: heading, and whether the value is a duration.
_PLAN_COLUMNS = {"required_rate_K_s": ("quench K/s", False), "hardness_HV": ("HV", False),
                 "start_any_s": ("first 1 % at", True), "equalize_s": ("equalizes in", True)}


def _print_plan(result, units):
    rows = result.rows
    typer.echo(f"{result.alloy}: {result.route} plan")
    extra = [c for c in _PLAN_COLUMNS if c in rows]
    typer.echo(f"  {'hold at':>10}  {'ok':>3}  {'hold time':>10}  " + "  ".join(f"{_PLAN_COLUMNS[c][0]:>12}" for c in extra)
               + "  governed by")
    feasible = [k for k, ok in enumerate(rows["feasible"]) if ok] or list(range(len(rows["feasible"])))
    for k in feasible[:: max(1, len(feasible) // 12)]:
        cells = []
        for c in extra:
            v = float(rows[c][k])
            text = (format_duration(v) if _PLAN_COLUMNS[c][1] else f"{v:.3g}") if math.isfinite(v) else "-"
            cells.append(f"{text:>12}")
        hold_s = float(rows["hold_time_s"][k])
        typer.echo(f"  {in_units(float(rows['temperature_C'][k]), units):>10}  {'yes' if rows['feasible'][k] else 'no':>3}"
                   f"  {format_duration(hold_s) if math.isfinite(hold_s) else 'never':>10}  " + "  ".join(cells)
                   + f"  {rows['governing'][k]}")
    if result.window_C is not None:
        typer.echo(f"  window: {in_units(result.window_C[0], units)} to {in_units(result.window_C[1], units)}")
    if result.recommendation is not None:
        r = result.recommendation
        typer.echo(f"  recommended: {in_units(r['temperature_C'], units)}, hold {format_duration(r['hold_time_s'])} "
                   f"({r['reason']})")
    if result.no_window:
        typer.echo(f"  {result.no_window}")
