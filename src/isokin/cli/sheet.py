"""``isokin sheet``: one PDF page for the heat-treat file (diagram, critical temperatures, the
plan's numbers, the inputs with their record, the cautions)."""

from __future__ import annotations

from pathlib import Path
from typing import Annotated, Optional

import typer

from .options import (AlloyArg, Inline, OutOpt, OverwriteOpt, RangeOpt, SamplesOpt, SeedOpt, Units, UnitsOpt,
                      decimal_number, hardness_target, steel_options)
from .plan import Route, _duration_option
from .runner import Drawing, Outcome, load, run
from .spread import heats
from .status import status

#: The library's keys of a sheet's plan as this command's options name them.
_SHEET_KEYS = {"max_hold_s": "--max-hold", "margin_K": "--margin-k", "safety": "--safety", "budget_s": "--budget",
               "route": "--route", "temper_s": "--temper-time", "quench_rate_K_s": "--quench-rate",
               "target_hv": "--target-hv", "curve": "--curve", "worst_case": "--worst-case",
               "avoid_embrittlement": "--allow-embrittlement"}


@steel_options
def sheet(
    alloy_file: AlloyArg = None,
    inline: Inline = None,
    route: Annotated[Optional[Route], typer.Option("--route", help="The plan on the sheet (leave out for the diagram "
                                                   "alone).", show_default=False)] = None,
    max_hold: Annotated[Optional[str], typer.Option("--max-hold", metavar="DURATION",
                        help="Austemper: the longest hold the line allows (default 4h).")] = None,
    budget: Annotated[Optional[str], typer.Option("--budget", metavar="DURATION",
                      help="Anneal: the time budget of the hold (default 8h).")] = None,
    margin_k: Annotated[Optional[float], typer.Option("--margin-k", parser=decimal_number, metavar="NUMBER",
                        help="Austemper and interrupted quench: keep hold temperatures this far above Ms, 0 to 500 K "
                             "(default 20 and 10).")] = None,
    safety: Annotated[Optional[float], typer.Option("--safety", parser=decimal_number, metavar="NUMBER",
                      help="Hold routes: safety factor on the model's times, 1 to 100 (austemper 1.5, interrupted "
                           "quench 2, anneal 1.5).")] = None,
    target_hv: Annotated[Optional[str], typer.Option("--target-hv", metavar="HV[:HV]",
                         help="Austemper: the hardness to aim at, HV. Quench and temper: the hardness after "
                              "tempering, a value or a range such as 300:340.")] = None,
    target_hrc: Annotated[Optional[str], typer.Option("--target-hrc", metavar="HRC[:HRC]",
                          help="As --target-hv, in Rockwell C (e.g. 30:34).")] = None,
    curve: Annotated[Optional[Path], typer.Option("--curve", metavar="FILE", show_default=False,
                     help="Quench and temper: the grade's measured tempering curve (CSV).")] = None,
    temper_time: Annotated[Optional[str], typer.Option("--temper-time", metavar="DURATION",
                           help="Quench and temper: the tempering time (default 2h).")] = None,
    quench_rate: Annotated[Optional[float], typer.Option("--quench-rate", parser=decimal_number, metavar="K_PER_S",
                           help="Quench and temper: the quench as a constant rate, K/s, to check it hardens the part.")] = None,
    allow_embrittlement: Annotated[bool, typer.Option("--allow-embrittlement", metavar="", help="Quench and temper: let tempers "
                                   "in the embrittlement range (250-400 °C) count.")] = False,
    thickness_mm: Annotated[Optional[float], typer.Option("--thickness-mm", parser=decimal_number, metavar="NUMBER",
                            help="Interrupted quench: section thickness, mm, for the equalizing time.")] = None,
    htc: Annotated[Optional[float], typer.Option("--htc", parser=decimal_number, metavar="W_PER_M2K",
                   help="Interrupted quench: heat-transfer coefficient of the bath, W/(m2 K).")] = None,
    worst_case: Annotated[bool, typer.Option("--worst-case", metavar="", help="Hold routes: plan on every sampled heat of the "
                                             "composition range (the file's \\[composition_range] or --range).")] = False,
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
