"""``isokin cct`` and ``isokin cool``: continuous cooling, as a diagram of constant rates or along a path."""

from __future__ import annotations

import math
from pathlib import Path
from typing import Annotated, Optional

import typer

from ..constants import kelvin_to_celsius
from ..errors import InputError
from ..readout import format_austenite_left, format_duration
from .options import (AlloyArg, FigureFormat, FormatOpt, Inline, OutOpt, OverwriteOpt, Units, UnitsOpt,
                      decimal_number, in_units, steel_options)
from .runner import Drawing, Outcome, load, run
from .status import status


@steel_options
def cct(
    alloy_file: AlloyArg = None,
    inline: Inline = None,
    rates: Annotated[Optional[str], typer.Option("--rates", metavar="K_PER_S,...",
                     help="Constant cooling rates, K/s, comma-separated (default from 0.01 to 1000).")] = None,
    start_c: Annotated[Optional[float], typer.Option("--start-c", parser=decimal_number, metavar="NUMBER",
                       help="Start of cooling, °C (default the highest temperature where a product forms).")] = None,
    out: OutOpt = Path("isokin-out"),
    fmt: FormatOpt = FigureFormat.png,
    overwrite: OverwriteOpt = False,
    units: UnitsOpt = Units.C,
):
    """Draw the continuous-cooling (CCT) diagram for a family of constant rates and export it.

    Prints the phases and hardness at the end of each cooling and the critical cooling
    rates; writes <stem>-cct.png, <stem>-cct-curves.csv and <stem>-cct-summary.json.
    """

    def solve(alloy, stem):
        from ..compute.cooling import cct as cct_of
        from ..io.export import cct_summary, write_columns_csv, write_json

        status("solving the cooling rates")
        result = cct_of(alloy, _rates(rates), start_C=start_c)

        def draw():
            from ..plot.cct import plot_cct, report_figure

            return report_figure(plot_cct, result, alloy.footer, units=units.value)

        def show():
            typer.echo(f"{alloy.name}: continuous cooling from {in_units(result.start_C, units)}, where the first "
                       "product can form; times count from there")
            _final_table([f"{r:.3g} K/s" for r in result.rates_K_s], result.cooling, units)
            for record in result.critical_rates.values():
                value = record.get("rate_K_s")
                said = f"{value:.3g} K/s ({record['tolerance']})" if value is not None else record.get("note", "")
                typer.echo(f"  critical rate, {record['definition']}: {said}")

        return Outcome(show, result.cooling.warnings, {
            out / f"{stem}-cct.{fmt.value}": Drawing(draw),
            out / f"{stem}-cct-curves.csv": lambda p: write_columns_csv(result.curve_columns(), p),
            out / f"{stem}-cct-summary.json": lambda p: write_json(cct_summary(result), p)})

    run(lambda: load(alloy_file, inline), solve, overwrite=overwrite)


@steel_options
def cool(
    alloy_file: AlloyArg = None,
    inline: Inline = None,
    rate: Annotated[Optional[list[float]], typer.Option("--rate", parser=decimal_number, metavar="K_PER_S",
                    help="Constant cooling rate, K/s; repeatable.")] = None,
    log: Annotated[Optional[Path], typer.Option("--log", metavar="LOG.csv", help="Measured log: CSV with time_s,temperature_C.")] = None,
    medium_c: Annotated[Optional[float], typer.Option("--medium-c", parser=decimal_number, metavar="NUMBER",
                        help="Newtonian cooling toward this medium temperature, °C.")] = None,
    time_constant_s: Annotated[Optional[float], typer.Option("--time-constant-s", parser=decimal_number, metavar="NUMBER",
                               help="Newtonian time constant, s (or give --thickness-mm and --htc).")] = None,
    thickness_mm: Annotated[Optional[float], typer.Option("--thickness-mm", parser=decimal_number, metavar="NUMBER",
                            help="Section thickness (plate) or diameter (bar, sphere), mm, for a lumped body.")] = None,
    htc: Annotated[Optional[float], typer.Option("--htc", parser=decimal_number, metavar="W_PER_M2K",
                   help="Heat-transfer coefficient of the quench, W/(m2 K), with --thickness-mm.")] = None,
    shape: Annotated[str, typer.Option("--shape", metavar="plate|bar|sphere", help="plate, bar or sphere, with --thickness-mm.")] = "plate",
    start_c: Annotated[Optional[float], typer.Option("--start-c", parser=decimal_number, metavar="NUMBER",
                       help="Start of cooling, °C (default the austenitizing temperature, else the highest "
                            "temperature where a product forms).")] = None,
    out: OutOpt = Path("isokin-out"),
    fmt: FormatOpt = FigureFormat.png,
    overwrite: OverwriteOpt = False,
    units: UnitsOpt = Units.C,
):
    """What a cooling path produces: final phases, where each product starts, and hardness.

    Give constant rates (--rate), a measured log (--log), or Newtonian cooling (--medium-c with
    --time-constant-s, or with --thickness-mm and --htc). Writes <stem>-cool.png (the path over
    the isothermal and continuous-cooling curves), <stem>-cool.csv (the phases along the path)
    and <stem>-cool-summary.json.
    """

    def solve(alloy, stem):
        from ..compute import cooling as C
        from ..compute.ttt import ttt
        from ..io.export import cooling_summary, write_cooling_csv, write_json

        start = C.default_start_C(alloy) if start_c is None else start_c
        kinds = sum(x is not None and x != [] for x in (rate, log, medium_c))
        if kinds != 1:
            raise InputError(None, "--rate", "give one kind of path: --rate, --log, or --medium-c with "
                             "--time-constant-s or --thickness-mm and --htc")
        if rate:
            path = C.constant_rates(rate, start)
        elif log is not None:
            from ..io.tables import read_cooling_log

            path = [read_cooling_log(log, key="--log")]
            start = float(kelvin_to_celsius(path[0].temperature_K[0]))
        elif time_constant_s is not None:
            path = [C.newtonian(start, medium_c, time_constant_s)]
        elif thickness_mm is not None and htc is not None:
            path = [C.newtonian_section(start, medium_c, thickness_mm / 1000.0, htc, shape)]
        else:
            raise InputError(None, "--medium-c", "needs --time-constant-s, or --thickness-mm and --htc")
        status("following the cooling path")
        result = C.cool(alloy, path)
        isothermal = ttt(alloy)
        continuous = C.cct_beneath(alloy, start)

        def draw():
            from ..plot.cct import plot_cooling, report_figure

            return report_figure(plot_cooling, result, alloy.footer, ttt=isothermal, cct=continuous,
                                 units=units.value)

        def show():
            typer.echo(f"{alloy.name}: cooling from {in_units(start, units)}; times count from there")
            _final_table(list(result.labels), result, units)
            for k, label in enumerate(result.labels):
                for product in result.start_temperature_K:
                    T = float(result.start_temperature_K[product][k])
                    if math.isfinite(T):
                        typer.echo(f"  {label}: {product} starts at {in_units(kelvin_to_celsius(T), units)} after "
                                   f"{format_duration(float(result.start_time_s[product][k]))}")

        return Outcome(show, result.warnings, {
            out / f"{stem}-cool.{fmt.value}": Drawing(draw),
            out / f"{stem}-cool.csv": lambda p: write_cooling_csv(result, p),
            out / f"{stem}-cool-summary.json": lambda p: write_json(cooling_summary(result), p)})

    keys = {"end_C": "--medium-c", "path": "--medium-c"} if medium_c is not None else {"path": "--log"}
    keys["rates_K_s"] = "--rate"
    run(lambda: load(alloy_file, inline), solve, overwrite=overwrite, keys=keys)


def _rates(text: Optional[str]):
    """--rates "0.1,1,10" as K/s, or None for the default family."""
    if text is None:
        return None
    from ..io.schema import parse_number

    values = [parse_number(v) for v in text.replace(";", ",").split(",") if v.strip()]
    if not values or any(v is None for v in values):
        raise InputError(None, "--rates", f"{text!r} is not a list of cooling rates in K/s, e.g. 0.1,1,10,100")
    return values  # the library refuses rates that are not positive


def _final_table(labels, result, units):
    """Final phases, hardness and where each product starts, one row per path."""
    from ..relations.hardness import hrc_from_hv_astm_e140

    names = list(result.final)
    head = f"  {'cooling':>18}  " + "  ".join(f"{n:>{max(len(n), 7)}}" for n in names)
    carbon = result.austenite_carbon is not None
    typer.echo(head + ("     HV    HRC" if result.hardness_HV is not None else "")
               + ("   austenite left: C, Ms" if carbon else ""))
    for k, label in enumerate(labels):
        row = f"  {label:>18}  " + "  ".join(f"{float(result.final[n][k]) * 100:>{max(len(n), 7) - 2}.1f} %"
                                               for n in names)
        if result.hardness_HV is not None:
            hv = float(result.hardness_HV[k])
            hrc = float(hrc_from_hv_astm_e140(hv))
            row += f"  {hv:>5.0f}  " + (f"{hrc:>5.1f}" if math.isfinite(hrc) else "    -")
        left = "   " + format_austenite_left(result.austenite_carbon.ravel()[k], result.martensite_start_K.ravel()[k],
                                             units.value) if carbon else ""
        typer.echo(row + left)
