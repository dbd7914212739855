"""``isokin diagram`` and ``isokin check``: the isothermal diagram of an alloy, and what its input gives."""

from __future__ import annotations

import math
from pathlib import Path
from typing import Annotated, Optional

import typer

from ..constants import kelvin_to_celsius
from ..readout import format_duration
from .options import (AlloyArg, FigureFormat, FormatOpt, Inline, OutOpt, OverwriteOpt, Units, UnitsOpt,
                      decimal_number, in_units, steel_options, whole_number)
from .runner import Drawing, Outcome, load, run
from .status import status


@steel_options
def diagram(
    alloy_file: AlloyArg = None,
    inline: Inline = None,
    out: OutOpt = Path("isokin-out"),
    fraction: Annotated[
        Optional[list[float]],
        typer.Option("--fraction", parser=decimal_number, metavar="NUMBER", help="Extra transformed fraction to draw (0-1), repeatable; 0.01, 0.5, 0.99 always."),
    ] = None,
    tmin_c: Annotated[Optional[float], typer.Option("--tmin-c", parser=decimal_number, metavar="NUMBER",
                                                    help="Lowest hold temperature, °C.")] = None,
    tmax_c: Annotated[Optional[float], typer.Option("--tmax-c", parser=decimal_number, metavar="NUMBER",
                                                    help="Highest hold temperature, °C.")] = None,
    points: Annotated[Optional[int], typer.Option("--points", parser=whole_number, metavar="N",
                                                  help="Hold temperatures in the grid (3 to 5,000).")] = None,
    fmt: FormatOpt = FigureFormat.png,
    overwrite: OverwriteOpt = False,
    units: UnitsOpt = Units.C,
):
    """Draw the isothermal diagram (C-curves at 1, 50, 99 % and their noses) and export it.

    Writes <stem>.png (or .svg/.pdf), <stem>-curves.csv and <stem>-summary.json into --out.
    """

    def solve(alloy, stem):
        from ..compute.grid import alloy_grid, check_fractions, default_fractions
        from ..compute.ttt import ttt
        from ..io.export import write_curves_csv, write_summary_json

        grid = alloy_grid(alloy, tmin_c, tmax_c, points)
        fr = check_fractions(default_fractions(fraction or ()), key="fractions")
        status("solving the diagram")
        result = ttt(alloy, temperatures_C=kelvin_to_celsius(grid), fractions=fr)

        def draw():
            from ..plot.ttt import ttt_figure

            return ttt_figure(result, units=units.value)

        def show():
            typer.echo(f"{alloy.name}: {alloy.model}")
            _print_noses(result, units)

        return Outcome(show, result.warnings, {out / f"{stem}.{fmt.value}": Drawing(draw),
                                               out / f"{stem}-curves.csv": lambda p: write_curves_csv(result, p),
                                               out / f"{stem}-summary.json": lambda p: write_summary_json(result, p)})

    run(lambda: load(alloy_file, inline), solve, overwrite=overwrite)


@steel_options
def check(
    alloy_file: AlloyArg = None,
    inline: Inline = None,
    units: UnitsOpt = Units.C,
):
    """Validate an alloy and print what follows from it: critical temperatures, nuclei, noses."""

    def solve(alloy, stem):
        from ..compute.ttt import ttt
        from ..products.base import ReportsNucleus

        result = ttt(alloy)

        def show():
            typer.echo(f"{alloy.name}: {alloy.model}; the input is valid")
            for line, t_k in alloy.critical_K.items():
                typer.echo(f"  {line:<16}{in_units(kelvin_to_celsius(float(t_k)), units):>10}   "
                           f"{alloy.critical_methods.get(line, '')}")
            for product in alloy.products:
                if isinstance(product, ReportsNucleus):
                    _print_nuclei(product, units)
            _print_noses(result, units)

        return Outcome(show, result.warnings)

    run(lambda: load(alloy_file, inline), solve)


def _print_noses(result, units):
    width = max((len(of) for of in result.fraction_of.values()), default=0) + 8
    typer.echo(f"{'product':<14}{'fraction':<{width}}  {'nose':>10}  nose time")
    for name in result.products:
        n = result.noses[name]
        for k, x in enumerate(result.fractions):
            if n.forms[k]:
                where = "" if n.inside[k] else "  (at the edge of the range: the true nose lies outside)"
                share = f"{x * 100:g} % {result.fraction_of.get(name, '')}".rstrip()
                typer.echo(f"{name:<14}{share:<{width}}  {in_units(float(n.temperature_C[k]), units):>10}  "
                           f"{format_duration(float(n.time_s[k]))}{where}")
    for name in result.products:
        if not result.noses[name].forms.any():
            typer.echo(f"{name:<14}  does not form in the temperature range asked for")


def _print_nuclei(product, units):
    rows = product.nucleus_table((10.0, 50.0, 100.0, 200.0))
    typer.echo(f"  {product.name}: critical nucleus below {in_units(kelvin_to_celsius(float(product.upper_K)), units)}")
    typer.echo(f"    {'undercooling K':>14}  {'r* nm':>9}  {'dG* J':>10}  {'dG*/kT':>8}  {'ln I':>8}")
    for dt, r, barrier, barrier_kt, log_i in zip(*rows.values()):
        typer.echo(f"    {dt:>14.0f}  {_cell(r * 1e9, 9)}  {_cell(barrier, 10)}  {_cell(barrier_kt, 8)}  "
                   f"{_cell(log_i, 8)}")
    if not len(rows["undercooling_K"]):
        typer.echo("    (none of these undercoolings lies above the product's lower temperature)")


def _cell(value, width):
    """A number of the nucleus table; where none exists (no stable nucleus there), the word."""
    return f"{value:>{width}.3g}" if math.isfinite(value) else f"{'none':>{width}}"
