"""``isokin plan``: the window of hold temperatures for a heat-treatment route, and a recommendation."""

from __future__ import annotations

import math
from enum import Enum
from pathlib import Path
from typing import Annotated, Optional

import typer

from ..errors import InputError
from ..readout import format_duration
from .options import (AllowEmbrittlementOpt, AlloyArg, BudgetOpt, CurveOpt, FigureFormat, FormatOpt, GoalOpt, Inline,
                      MarginOpt, MaxHoldOpt, OutOpt, OverwriteOpt, QuenchRateOpt, RangeOpt, SafetyOpt, SamplesOpt,
                      SeedOpt, TargetHrcOpt, TargetHvOpt, TemperTimeOpt, WorstCaseOpt,
                      Units, UnitsOpt, decimal_number, duration, hardness_target, in_units, steel_options)
from .runner import Drawing, Outcome, load, run
from .spread import heats
from .status import status


class Route(str, Enum):
    austemper = "austemper"
    interrupted_quench = "interrupted-quench"
    anneal = "anneal"
    quench_and_temper = "quench-and-temper"


#: The library's keys of a plan as this command's options name them.
_PLAN_KEYS = {"max_hold_s": "--max-hold", "margin_K": "--margin-k", "safety": "--safety", "budget_s": "--budget",
              "route": "--route", "temper_s": "--temper-time", "quench_rate_K_s": "--quench-rate",
              "target_hv": "--target-hv", "curve": "--curve", "worst_case": "--worst-case",
              "size_m": ("--size-mm", "mm", 1000.0), "thickness_m": ("--thickness-mm", "mm", 1000.0),
              "severity_per_in": "--severity", "htc_table": "--htc-table", "start_C": "--austenitizing-c",
              "goal": "--goal"}

#: The section's library keys as options.
_SECTION_OPTIONS = {"shape": "--shape", "size_m": "--size-mm", "thickness_m": "--thickness-mm",
                    "heat_transfer_W_m2K": "--htc", "severity_per_in": "--severity", "htc_table": "--htc-table"}


@steel_options
def plan(
    alloy_file: AlloyArg = None,
    inline: Inline = None,
    route: Annotated[Optional[Route], typer.Option("--route", help="austemper, interrupted-quench, anneal or "
                                                   "quench-and-temper.")] = None,
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
    shape: Annotated[Optional[str], typer.Option("--shape", metavar="plate|bar|sphere", help="Austemper, interrupted "
                     "quench: the section is a "
                     "plate (thickness), bar (diameter; the default) or sphere (diameter).")] = None,
    size_mm: Annotated[Optional[float], typer.Option("--size-mm", parser=decimal_number, metavar="NUMBER",
                       help="Austemper, interrupted quench: thickness or diameter of the section, mm; with one of "
                            "--htc, --severity or --htc-table the section is cooled into each bath through its "
                            "thickness and hold times count from its centre's arrival.")] = None,
    thickness_mm: Annotated[Optional[float], typer.Option("--thickness-mm", parser=decimal_number, metavar="NUMBER",
                            help="As --size-mm, a plate's unless --shape says otherwise (the earlier name).")] = None,
    htc: Annotated[Optional[float], typer.Option("--htc", parser=decimal_number, metavar="W_PER_M2K",
                   help="With a section: heat-transfer coefficient of the bath, W/(m2 K).")] = None,
    severity: Annotated[Optional[float], typer.Option("--severity", parser=decimal_number, metavar="H_PER_IN",
                        help="With a section: Grossmann quench severity H of the bath, 1/in.")] = None,
    htc_table: Annotated[Optional[Path], typer.Option("--htc-table", metavar="FILE",
                         help="With a section: CSV of the bath's h against the surface temperature "
                              "(temperature_C,htc_W_m2K).")] = None,
    xlsx: Annotated[bool, typer.Option("--xlsx", metavar="", help="Also write the plan as a spreadsheet (.xlsx).")] = False,
    worst_case: WorstCaseOpt = False,
    range_text: RangeOpt = None,
    samples: SamplesOpt = None,
    seed: SeedOpt = None,
    out: OutOpt = Path("isokin-out"),
    fmt: FormatOpt = FigureFormat.png,
    overwrite: OverwriteOpt = False,
    units: UnitsOpt = Units.C,
):
    """Plan a hold: the window of temperatures for a route, the hold time, and a recommendation.

    Writes <stem>-plan-<route>.json, .csv and .png (the diagram with the window shaded;
    -worst-case added to the names of a worst-case plan), and with --xlsx a spreadsheet. No window is an answer too: it says what would
    have to change.
    """

    def solve(alloy, stem):
        from ..compute import plan as planning
        from ..compute.ttt import ttt
        from ..io.export import plan_summary, write_json, write_plan_csv, write_plan_xlsx

        if route is None:
            raise InputError(None, "--route", "choose austemper, interrupted-quench, anneal or quench-and-temper")
        target = hardness_target(target_hv, target_hrc)
        options = {}
        if safety is not None:
            options["safety"] = safety
        if worst_case:
            options["worst_case"] = heats(alloy, range_text, samples, seed)
        section = {k: v for k, v in (("shape", shape), ("size_m", None if size_mm is None else size_mm / 1000),
                                     ("thickness_m", None if thickness_mm is None else thickness_mm / 1000),
                                     ("heat_transfer_W_m2K", htc), ("severity_per_in", severity),
                                     ("htc_table", htc_table)) if v is not None}
        if section and route not in (Route.austemper, Route.interrupted_quench):
            raise InputError(None, _SECTION_OPTIONS[next(iter(section))], "a section goes with the austemper and "
                             "interrupted-quench routes")
        if "htc_table" in section:
            from ..io.tables import read_htc_table

            section["htc_table"] = read_htc_table(htc_table, key="--htc-table")
        status(f"planning the {route.value} window" + (" over the heats of the range" if worst_case else "")
               + (" through the section" if section else ""))
        if route == Route.quench_and_temper:
            return _quench_and_temper(alloy, stem, target, options)
        if route == Route.austemper:
            if target is not None and len(target) != 1:
                raise InputError(None, "--target-hv", "austempering aims at one hardness, e.g. --target-hv 480")
            hold_limit = _duration_option(max_hold, "--max-hold")
            options.update({k: v for k, v in (("max_hold_s", hold_limit), ("margin_K", margin_k),
                                              ("target_hv", None if target is None else target[0])) if v is not None})
            result = planning.austemper(alloy, **options, **section)
        elif route == Route.interrupted_quench:
            options.update({"margin_K": margin_k} if margin_k is not None else {})
            result = planning.interrupted_quench(alloy, **options, **section)
        else:
            limit = _duration_option(budget, "--budget")
            options.update({k: v for k, v in (("budget_s", limit), ("goal", goal)) if v is not None})
            result = planning.anneal(alloy, **options)
        curves = ttt(alloy)

        def draw():
            from ..plot.ttt import ttt_figure

            return ttt_figure(curves, footer_extra=" ".join(result.cautions[:1]), units=units.value, plan=result)

        name = _plan_name(stem, route, worst_case)
        files = {out / f"{name}.json": lambda p: write_json(plan_summary(result), p),
                 out / f"{name}.csv": lambda p: write_plan_csv(result, p),
                 out / f"{name}.{fmt.value}": Drawing(draw)}
        if xlsx:
            files[out / f"{name}.xlsx"] = lambda p: write_plan_xlsx(result, curves, p)
        return Outcome(lambda: _print_plan(result, units), result.warnings, files, result.cautions)

    def _quench_and_temper(alloy, stem, target, options):
        from ..compute import plan as planning
        from ..compute.temper import EMBRITTLEMENT_RANGE_C, tempering_lines
        from ..constants import kelvin_to_celsius
        from ..io.export import plan_summary, write_json, write_plan_csv, write_plan_xlsx
        from ..io.tables import read_tempering_curve
        from ..readout import format_duration as text

        if options.pop("worst_case", None) is not None or "safety" in options:
            raise InputError(None, "--worst-case" if worst_case else "--safety", "goes with the hold routes, not "
                             "quench-and-temper")
        if curve is None:
            raise InputError(None, "--curve", "quench-and-temper reads the hardness after tempering from the grade's "
                             "measured tempering curve: give --curve FILE (CSV with temperature_C and hardness_HV or "
                             "hardness_HRC)")
        if target is None:
            raise InputError(None, "--target-hv", "give the hardness after tempering, e.g. --target-hrc 30:34")
        measured = read_tempering_curve(curve, None, "--curve")
        temper_s = _duration_option(temper_time, "--temper-time")
        result = planning.quench_and_temper(alloy, measured, target, quench_rate_K_s=quench_rate,
                                            avoid_embrittlement=not allow_embrittlement,
                                            **({} if temper_s is None else {"temper_s": temper_s}))
        T_line, hv_line = tempering_lines(alloy, measured, [result.options["temper_s"]])

        def draw():
            from ..plot.temper import tempering_figure

            rec = result.recommendation
            return tempering_figure(
                [(f"{text(result.options['temper_s'])} temper", T_line, hv_line[0])],
                (kelvin_to_celsius(measured.temperature_K), measured.hardness_HV, f"measured tempers ({measured.source})"),
                f"Quench and temper plan: {alloy.name}", units.value, target_HV=tuple(result.options["target_HV"]),
                marks=None if rec is None else ("recommended", [(rec["temperature_C"], rec["hardness_HV"])]),
                embrittlement_C=EMBRITTLEMENT_RANGE_C, footer=" ".join(result.cautions[:1]))

        name = _plan_name(stem, Route.quench_and_temper, False)
        files = {out / f"{name}.json": lambda p: write_json(plan_summary(result), p),
                 out / f"{name}.csv": lambda p: write_plan_csv(result, p),
                 out / f"{name}.{fmt.value}": Drawing(draw)}
        if xlsx:
            files[out / f"{name}.xlsx"] = lambda p: write_plan_xlsx(result, None, p)
        return Outcome(lambda: _print_plan(result, units), result.warnings, files, result.cautions)

    run(lambda: load(alloy_file, inline), solve, overwrite=overwrite, keys=_PLAN_KEYS)


def _plan_name(stem: str, route: Route, worst_case: bool) -> str:
    """The plan's file names carry the route (and a worst case), so that two plans never collide."""
    return f"{stem}-plan-{route.value}" + ("-worst-case" if worst_case else "")


def _duration_option(text: Optional[str], option: str) -> Optional[float]:
    return None if text is None else duration(text, option)  # the plan refuses a limit that is not above 0


#: Plan columns as printed: heading, and how the value is written.
_PLAN_COLUMNS = {"centre_arrival_s": ("centre in", "duration"), "equalize_s": ("equalizes in", "duration"),
                 "ferrite_pearlite_on_arrival": ("F+P by then", "percent"),
                 "centre_transformed_on_arrival": ("centre done", "percent"),
                 "formed_on_arrival": ("formed by then", "percent"), "start_used_on_arrival": ("start used", "percent"),
                 "required_rate_K_s": ("quench K/s", "number"), "hardness_HV": ("HV", "number"),
                 "embrittlement_range": ("embrittles", "flag"), "start_any_s": ("first 1 % at", "duration")}


def _cell(value, kind):
    if kind == "flag":
        return "yes" if value else ""
    if not math.isfinite(value):
        return "-"
    return {"duration": format_duration, "percent": lambda v: f"{v * 100:.2g} %"}.get(kind, lambda v: f"{v:.3g}")(value)


def _print_plan(result, units):
    rows = result.rows
    typer.echo(f"{result.alloy}: {result.route} plan")
    options = result.options
    if "cooling_model" in options:
        typer.echo(f"  section: {options['shape']} {options['size_m'] * 1e3:g} mm, {options['surface']}; Biot "
                   f"{options['biot_number']:.2g}: {options['cooling_model']}; times count from the centre's arrival "
                   "within 5 K of the bath")
    if "as_quenched_martensite" in options:
        hv = options.get("as_quenched_HV")
        typer.echo(f"  quench at {options['quench_rate_K_s']:g} K/s: {options['as_quenched_martensite'] * 100:.0f} % "
                   "martensite" + (f", {hv:.0f} HV as quenched" if hv is not None else ""))
    at, time = ("temper at", "temper") if result.route == "quench-and-temper" else ("hold at", "hold time")
    extra = [c for c in _PLAN_COLUMNS if c in rows]
    typer.echo(f"  {at:>10}  {'ok':>3}  {time:>10}  " + "  ".join(f"{_PLAN_COLUMNS[c][0]:>12}" for c in extra)
               + "  governed by")
    every = list(range(len(rows["feasible"])))
    # an interrupted quench shows every bath tried, with why a failing one fails; the other
    # routes a dozen rows of their window
    feasible = every if result.route == "interrupted-quench" else [k for k in every if rows["feasible"][k]] or every
    for k in feasible[:: 1 if result.route == "interrupted-quench" else max(1, len(feasible) // 12)]:
        cells = [f"{_cell(float(rows[c][k]), _PLAN_COLUMNS[c][1]):>12}" for c in extra]
        hold_s = float(rows["hold_time_s"][k])
        typer.echo(f"  {in_units(float(rows['temperature_C'][k]), units):>10}  {'yes' if rows['feasible'][k] else 'no':>3}"
                   f"  {format_duration(hold_s) if math.isfinite(hold_s) else 'never':>10}  " + "  ".join(cells)
                   + f"  {rows['governing'][k]}")
    if result.window_C is not None:
        typer.echo(f"  window: {in_units(result.window_C[0], units)} to {in_units(result.window_C[1], units)}")
    if result.recommendation is not None:
        r = result.recommendation
        typer.echo(f"  recommended: {in_units(r['temperature_C'], units)}, {time.split()[0]} "
                   f"{format_duration(r['hold_time_s'])} ({r['reason']})")
    if result.no_window:
        typer.echo(f"  {result.no_window}")
