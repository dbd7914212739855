"""``isokin hold``: what holding at one temperature and quenching gives."""

from __future__ import annotations

import math
from pathlib import Path
from typing import Annotated, Optional

import typer

from ..errors import InputError
from ..readout import format_austenite_left, format_duration
from .options import (AlloyArg, Inline, OutOpt, OverwriteOpt, Units, UnitsOpt, decimal_number, duration, in_units,
                      steel_options)
from .runner import Outcome, load, run


@steel_options
def hold(
    alloy_file: AlloyArg = None,
    inline: Inline = None,
    temperature_c: Annotated[Optional[float], typer.Option("--temperature-c", parser=decimal_number, metavar="NUMBER",
                                                           help="Hold temperature, °C.")] = None,
    time: Annotated[Optional[list[str]], typer.Option("--time", metavar="DURATION",
                    help="Hold time: 90s, 30min, 2h, 1.5d or seconds; repeatable.")] = None,
    times: Annotated[Optional[str], typer.Option("--times", metavar="START..END/N",
                     help="A log-spaced grid of 2 to 200 hold times up to 1e9 s, e.g. 10s..8h/12.")] = None,
    quench_to_c: Annotated[Optional[float], typer.Option("--quench-to-c", parser=decimal_number, metavar="NUMBER",
                                                         help="Quench after the hold to this, °C (default 20).")] = None,
    out: OutOpt = Path("isokin-out"),
    overwrite: OverwriteOpt = False,
    units: UnitsOpt = Units.C,
):
    """What a hold gives: the fractions after holding at a temperature and quenching.

    Prints the fractions of each product, martensite and retained austenite (steels) for
    each hold time, and the times to 1, 50 and 99 % at that temperature; writes
    <stem>-hold.json into --out.
    """

    def solve(alloy, stem):
        from ..compute.decomposition import hold as hold_at
        from ..io.export import write_hold_json

        if temperature_c is None:
            raise InputError(None, "--temperature-c", "give the hold temperature, e.g. --temperature-c 450")
        seconds = _durations(time, times)
        options = {} if quench_to_c is None else {"quench_to_C": quench_to_c}
        result = hold_at(alloy, temperature_c, seconds, **options)
        return Outcome(lambda: _print_hold(alloy, temperature_c, result, units), result.warnings,
                       {out / f"{stem}-hold.json": lambda p: write_hold_json(result, p)})

    run(lambda: load(alloy_file, inline), solve, overwrite=overwrite)


def _print_hold(alloy, temperature_c, result, units):
    from ..results import PRACTICAL_HORIZON_S

    typer.echo(f"{alloy.name}: hold at {in_units(temperature_c, units)}, then quench to "
               f"{in_units(result.quench_to_C, units)}")
    names = list(result.fractions)
    carbon = result.austenite_carbon is not None
    typer.echo(f"  {'hold time':>10}  " + "  ".join(f"{n:>{max(len(n), 7)}}" for n in names)
               + ("   austenite left: C, Ms" if carbon else ""))
    for k, t in enumerate(result.times_s):
        left = "   " + format_austenite_left(result.austenite_carbon.ravel()[k], result.martensite_start_K.ravel()[k],
                                             units.value) if carbon else ""
        typer.echo(f"  {format_duration(float(t)):>10}  " + "  ".join(
            f"{float(result.fractions[n][k]) * 100:>{max(len(n), 7) - 2}.1f} %" for n in names) + left)
    typer.echo(f"  times at {in_units(temperature_c, units)} to 1 %, 50 %, 99 % "
               f"({float(result.transformable[0]) * 100:.0f} % of the part can transform here)")
    for product, marks in result.milestones_s.items():
        cells = [format_duration(float(v)) if math.isfinite(v) and v <= PRACTICAL_HORIZON_S else "never"
                 for v in marks[0]]
        typer.echo(f"  {product:<12}" + "".join(f"{c:>12}" for c in cells) + f"   {result.milestone_of[product]}")


def _durations(times: list, grid: Optional[str]) -> list:
    """Hold times in seconds from --time values and a --times START..END/N grid (log-spaced)."""
    from ..compute.grid import log_times
    from ..io.schema import parse_duration, parse_number

    seconds = [duration(text, "--time") for text in times or []]
    if grid is not None:
        span, _, count = grid.partition("/")
        start, sep, end = span.partition("..")
        first, last = parse_duration(start), parse_duration(end)
        n = parse_number(count, integer=True) if count else None
        if not sep or "..." in span or first is None or last is None or n is None:
            raise InputError(None, "--times", f"{grid!r} is not START..END/N, e.g. 10s..8h/12 (2 to 200 times, "
                             "log-spaced, START above 0)")
        seconds += list(log_times(first, last, n))
    if not seconds:
        raise InputError(None, "--time", "give the hold time, e.g. --time 30min (repeatable), or --times 10s..8h/12")
    return sorted(seconds)
