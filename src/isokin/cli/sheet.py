"""``isokin sheet``: one PDF page for the heat-treat file (diagram, critical temperatures, the
plan's numbers, the inputs with their record, the cautions)."""

from __future__ import annotations

from pathlib import Path
from typing import Annotated, Optional

import typer

from .options import (AllowEmbrittlementOpt, AlloyArg, BudgetOpt, CurveOpt, GoalOpt, Inline, MarginOpt, MaxHoldOpt,
                      OutOpt, OverwriteOpt, QuenchRateOpt, RangeOpt, SafetyOpt, SamplesOpt, SeedOpt, TargetHrcOpt,
                      TargetHvOpt, TemperTimeOpt, Units, UnitsOpt, WorstCaseOpt, decimal_number, hardness_target,
                      steel_options)
from .plan import Route, _duration_option
from .runner import Drawing, Outcome, load, run
from .spread import heats
from .status import status

#: The library's keys of a sheet's plan as this command's options name them.
_SHEET_KEYS = {"max_hold_s": "--max-hold", "margin_K": "--margin-k", "safety": "--safety", "budget_s": "--budget",
               "route": "--route", "temper_s": "--temper-time", "quench_rate_K_s": "--quench-rate",
               "target_hv": "--target-hv", "curve": "--curve", "worst_case": "--worst-case",
               "avoid_embrittlement": "--allow-embrittlement", "goal": "--goal"}


@steel_options
def sheet(
    alloy_file: AlloyArg = None,
    inline: Inline = None,
    route: Annotated[Optional[Route], typer.Option("--route", help="The plan on the sheet (leave out for the diagram "
                                                   "alone).", show_default=False)] = None,
    max_hold: MaxHoldOpt = None,
    budget: BudgetOpt = None,
    goal: GoalOpt = None,
    margin_k: MarginOpt = None,
    safety: SafetyOpt = None,
    target_hv: TargetHvOpt = None,
    target_hrc: TargetHrcOpt = None,
    curve: CurveOpt = None,
    temper_time: TemperTimeOpt = None,
    quench_rate: QuenchRateOpt = None,
    allow_embrittlement: AllowEmbrittlementOpt = False,
    thickness_mm: Annotated[Optional[float], typer.Option("--thickness-mm", parser=decimal_number, metavar="NUMBER",
                            help="Interrupted quench: section thickness, mm, for the equalizing time.")] = None,
    htc: Annotated[Optional[float], typer.Option("--htc", parser=decimal_number, metavar="W_PER_M2K",
                   help="Interrupted quench: heat-transfer coefficient of the bath, W/(m2 K).")] = None,
    worst_case: WorstCaseOpt = False,
    range_text: RangeOpt = None,
    samples: SamplesOpt = None,
    seed: SeedOpt = None,
    out: OutOpt = Path("isokin-out"),
    overwrite: OverwriteOpt = False,
    units: UnitsOpt = Units.C,
):
    """One PDF page for the heat-treat file: the diagram (with the plan's window), the critical
    temperatures, the plan's numbers and expected hardness, the inputs with the alloy file's
    SHA-256, the model choices and calibration, and the cautions.

    Writes <stem>-sheet.pdf, or <stem>-sheet-<route>.pdf with --route (-worst-case added for a
    worst-case plan). The route options are those of isokin plan.
    """

    def solve(alloy, stem):
        from ..plot.sheet import plan_lines, prepare_sheet, sheet_figure

        options = _plan_options(alloy, route)
        status("preparing the sheet" + (f" with the {route.value} plan" if route else ""))
        result, plan, record = prepare_sheet(alloy, route.value if route else None, alloy_file=alloy_file,
                                             **options)
        name = f"{stem}-sheet" + (f"-{route.value}" if route else "") + ("-worst-case" if worst_case else "")

        def show():
            typer.echo(f"{alloy.name}: process sheet" + (f" ({route.value})" if route else ""))
            for line in plan_lines(plan, units.value) if plan is not None else ():
                typer.echo(f"  {line}")

        return Outcome(show, [*result.warnings, *(w for w in (plan.warnings if plan else ()) if w not in result.warnings)],
                       {out / f"{name}.pdf": Drawing(lambda: sheet_figure(result, record, plan, units.value))},
                       plan.cautions if plan is not None else ())

    def _plan_options(alloy, route):
        """The route options given, as the library names them (the library's defaults stand for the rest)."""
        target = hardness_target(target_hv, target_hrc)
        options = {"max_hold_s": _duration_option(max_hold, "--max-hold"), "budget_s": _duration_option(budget, "--budget"),
                   "goal": goal,
                   "margin_K": margin_k, "safety": safety, "temper_s": _duration_option(temper_time, "--temper-time"),
                   "quench_rate_K_s": quench_rate, "heat_transfer_W_m2K": htc,
                   "thickness_m": None if thickness_mm is None else thickness_mm / 1000.0,
                   "avoid_embrittlement": False if allow_embrittlement else None}
        if target is not None:
            options["target_hv"] = target[0] if route != Route.quench_and_temper and len(target) == 1 else target
        if curve is not None:
            from ..io.tables import read_tempering_curve

            options["curve"] = read_tempering_curve(curve, None, "--curve")
        if worst_case:
            options["worst_case"] = heats(alloy, range_text, samples, seed)
        return {k: v for k, v in options.items() if v is not None}

    run(lambda: load(alloy_file, inline), solve, overwrite=overwrite, keys=_SHEET_KEYS)
