"""Command line: thin wrappers that read input, call the library and report.

No physics and no defaults of its own here. Bad input ends with one line on stderr and exit
code 2. The library is imported inside each command, so ``isokin --help`` and ``isokin
version`` start fast.
"""

from __future__ import annotations

import functools
import inspect
import math
import os
import re
import signal
import sys
from enum import Enum
from pathlib import Path
from typing import Annotated, Optional

import typer

from .. import __version__
from ..constants import kelvin_to_celsius
from ..errors import InputError
from ..readout import CAUTION, format_duration
from .status import status

app = typer.Typer(
    add_completion=False,
    no_args_is_help=True,
    help="isokin: isothermal transformation (TTT) diagrams from nucleation and growth kinetics, "
    "for heat-treatment planning. " + CAUTION,
)

#: Library keys as the command line names them.
OPTION_NAMES = {
    "composition": "--composition",
    "steel.grain_size_astm": "--grain-size",
    "steel.austenitizing_temperature_C": "--austenitizing-c",
    "steel.ms_method": "--ms-method",
    "steel.bs_method": "--bs-method",
    "steel.kinetics_model": "--kinetics",
    "tmin_C": "--tmin-c",
    "tmax_C": "--tmax-c",
    "points": "--points",
    "fractions": "--fraction",
    "samples": "--samples",
}


class FigureFormat(str, Enum):
    png = "png"
    svg = "svg"
    pdf = "pdf"


class Units(str, Enum):
    C = "C"
    F = "F"


def _in_units(t_c: float, units: "Units") -> str:
    """A temperature for a printed table: °C or °F."""
    return f"{t_c * 1.8 + 32.0 if units == Units.F else t_c:.1f} °{units.value}"


def fail(error):
    """One line on stderr and exit 2; a library key not from a file is named as its option."""
    if isinstance(error, InputError) and not error.source:
        error = error.relocated(keys=OPTION_NAMES)
    status.finish()
    typer.echo(f"isokin: error: {error}", err=True)
    raise typer.Exit(2)


def _decimal(text: str) -> float:
    """Option values: plain decimal numbers only (not 0_4, infinity, nan or other scripts' digits)."""
    from ..io.schema import parse_number

    value = parse_number(text)
    if value is None:
        raise typer.BadParameter(f"must be a plain finite decimal number such as 0.5 or 850, got {text!r}")
    return value


def _whole(text: str) -> int:
    from ..io.schema import parse_number

    value = parse_number(text, integer=True)
    if value is None:
        raise typer.BadParameter(f"must be a whole number such as 200, got {text!r}")
    return value


def parse_inline_composition(text: str) -> dict:
    """'C=0.79,Mn=0.76' -> {'C': 0.79, 'Mn': 0.76}; raises InputError on a malformed entry."""
    out = {}
    from ..io.schema import parse_number

    for item in filter(None, (s.strip() for s in text.replace(";", ",").split(","))):
        symbol, sep, value = item.partition("=")
        symbol = symbol.strip()
        number = parse_number(value)
        if not sep or not symbol or number is None:
            raise InputError(None, "--composition", f"'{item}' is not of the form Element=mass%, e.g. C=0.79")
        if symbol in out:
            raise InputError(None, "--composition", f"{symbol} is given twice")
        out[symbol] = number
    if not out:
        raise InputError(None, "--composition", 'is empty; give e.g. "C=0.79,Mn=0.76"')
    return out


def _stem(text: str) -> str:
    """A file stem from a name: lower case, runs of other characters as one hyphen."""
    return re.sub(r"[^a-z0-9.]+", "-", text.lower()).strip("-.") or "heat"


class Inline:
    """The steel options of a command line: --composition and what goes with it, --kinetics."""

    def __init__(self, composition=None, grain_size=None, austenitizing_c=None, ms_method=None, bs_method=None,
                 kinetics=None, calibration=None, name=None):
        self.composition, self.grain_size, self.austenitizing_c = composition, grain_size, austenitizing_c
        self.ms_method, self.bs_method, self.kinetics = ms_method, bs_method, kinetics
        self.calibration, self.name = calibration, name

    def given(self):
        """The options given that only go with --composition."""
        return {k: v for k, v in (("--grain-size", self.grain_size), ("--austenitizing-c", self.austenitizing_c),
                                  ("--ms-method", self.ms_method), ("--bs-method", self.bs_method),
                                  ("--calibration", self.calibration), ("--name", self.name)) if v is not None}


def _load(alloy_file: Optional[Path], inline: Inline):
    """The alloy and its output stem, from a file or an inline heat analysis."""
    if inline.composition is None:
        if alloy_file is None:
            raise InputError(None, "ALLOY", "name an alloy file (alloys/*.toml) or give --composition \"C=0.8,Mn=0.7\"")
        for option in inline.given():
            raise InputError(None, option, "goes with --composition; an alloy file sets it itself")
        from ..io.alloy_file import load_alloy

        alloy = load_alloy(alloy_file, kinetics_model=inline.kinetics)
        stem = alloy_file.stem if not alloy_file.stem.startswith(".") else _stem(alloy.name)
        return alloy, stem
    if alloy_file is not None:
        raise InputError(None, "--composition", "give either an alloy file or --composition, not both")
    from ..products.steel import DEFAULT_GRAIN_SIZE_ASTM, steel

    composition = parse_inline_composition(inline.composition)
    notes = [] if inline.grain_size is not None else [f"no --grain-size given; taking ASTM {DEFAULT_GRAIN_SIZE_ASTM:g}"]
    calibration = None
    if inline.calibration is not None:
        from ..io.steel_file import load_calibration

        calibration = load_calibration(inline.calibration)
    analysis = ", ".join(f"{k} {v:g}" for k, v in composition.items())
    name = inline.name or f"heat analysis {analysis}"
    alloy = steel(composition, inline.grain_size, name=name, austenitizing_temperature_C=inline.austenitizing_c,
                  ms_method=inline.ms_method, bs_method=inline.bs_method, kinetics_model=inline.kinetics,
                  calibration=calibration)
    stem = _stem(inline.name) if inline.name else _stem("heat " + " ".join(f"{k}{v:g}" for k, v in composition.items()))
    return alloy.replace(warnings=(*notes, *alloy.warnings)), stem


def _print_noses(result, units):
    typer.echo(f"{'product':<14}{'fraction':>9}  {'nose':>10}  nose time")
    for name in result.products:
        n = result.noses[name]
        for k, x in enumerate(result.fractions):
            if n.forms[k]:
                where = "" if n.inside[k] else "  (at the edge of the range: the true nose lies outside)"
                typer.echo(f"{name:<14}{x:>9.3g}  {_in_units(float(n.temperature_C[k]), units):>10}  "
                           f"{format_duration(float(n.time_s[k]))}{where}")
    for name in result.products:
        if not result.noses[name].forms.any():
            typer.echo(f"{name:<14}  does not form in the temperature range asked for")


def _warn(result, who=None):
    """The result's warnings on stderr; ``who`` names the alloy where several are run."""
    status.finish()
    for line in result.warnings:
        typer.echo(f"isokin: warning: {who + ': ' if who else ''}{line}", err=True)


def _output_paths(out: Path, names: dict, overwrite: bool):
    """The output files by role, in ``out`` (created); InputError where one exists without --overwrite."""
    try:
        out.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise InputError(None, "--out", f"cannot create folder {out} ({exc.strerror})") from None
    if not out.is_dir() or not os.access(out, os.W_OK | os.X_OK):
        raise InputError(None, "--out", f"folder {out} is not writable; choose another with --out")
    paths = {role: out / name for role, name in names.items()}
    existing = [str(p) for p in paths.values() if p.exists() or p.is_symlink()]
    if existing and not overwrite:
        raise InputError(None, "--out", f"{existing[0]} exists; pass --overwrite to replace it, or choose another --out")
    return paths


def _write(writers: dict, out: Path, overwrite: bool):
    """All files of a run, together or none; one line and exit 2 when that fails."""
    from ..io.export import write_outputs

    try:
        write_outputs(writers, overwrite=overwrite)
    except FileExistsError as exc:
        fail(f"--out: {exc.filename} appeared while writing; nothing was written; pass --overwrite or choose "
             "another --out")
    except OSError as exc:
        where = f": {exc.filename}" if getattr(exc, "filename", None) else ""
        fail(f"--out: cannot write into {out} ({exc.strerror or exc}{where}); nothing was written")


def _write_run(files: dict, out: Path, overwrite: bool, figure=None):
    """All files of a run together (see :func:`_write`); ``figure`` = (path, format, make): the
    figure ``make()`` draws with the non-interactive Agg backend, written with the rest, then closed."""
    try:
        status("drawing the figure and writing the files" if figure else "writing the files")
        _write_files(files, out, overwrite, figure)
    finally:
        status.finish()


def _write_files(files: dict, out: Path, overwrite: bool, figure):
    if figure is None:
        return _write(files, out, overwrite)
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    from ..io.export import write_figure

    path, fmt, make = figure
    drawn = make()
    try:
        _write({path: lambda p: write_figure(drawn, p, fmt), **files}, out, overwrite)
    finally:
        plt.close(drawn)


AlloyArg = Annotated[
    Optional[Path],
    typer.Argument(help="Alloy file (TOML). Leave out when giving --composition.", show_default=False),
]
CompositionOpt = Annotated[
    Optional[str],
    typer.Option("--composition", help='Steel heat analysis in mass %, e.g. "C=0.79,Mn=0.76,Si=0.25".'),
]
GrainOpt = Annotated[
    Optional[float],
    typer.Option("--grain-size", parser=_decimal, metavar="NUMBER", help="ASTM austenite grain size number, with --composition (default 7)."),
]
AustenitizingOpt = Annotated[
    Optional[float],
    typer.Option("--austenitizing-c", parser=_decimal, metavar="NUMBER", help="Austenitizing temperature, °C, with --composition (warns below Ae3)."),
]
MsMethodOpt = Annotated[
    Optional[str],
    typer.Option("--ms-method", help="Ms correlation with --composition: van_bohemen_2012 (default, the most "
                 "accurate on measured data), andrews_1965, andrews_1965_product or steven_haynes_1956."),
]
BsMethodOpt = Annotated[
    Optional[str],
    typer.Option("--bs-method", metavar="METHOD", help="Bs line with --composition: van_bohemen_2012 (default), steven_haynes_1956, "
                 "kirkaldy_venugopalan_1984 or li_1998."),
]
KineticsOpt = Annotated[
    Optional[str],
    typer.Option("--kinetics", metavar="MODEL", help="Steel kinetics: kirkaldy_venugopalan_1984 (default) or li_1998; with an alloy "
                 "file it replaces the file's choice."),
]
CalibrationOpt = Annotated[
    Optional[Path],
    typer.Option("--calibration", metavar="FILE", help="A calibrated alloy file (from isokin fit) whose fitted kinetics to apply "
                 "to the --composition heat.", show_default=False),
]
NameOpt = Annotated[
    Optional[str],
    typer.Option("--name", help="Name of the heat, with --composition; also names the output files."),
]
#: The options of a steel given on the command line, in the order --help lists them.
_STEEL_OPTIONS = (("composition", CompositionOpt), ("grain_size", GrainOpt), ("austenitizing_c", AustenitizingOpt),
                  ("ms_method", MsMethodOpt), ("bs_method", BsMethodOpt), ("kinetics", KineticsOpt),
                  ("calibration", CalibrationOpt), ("name", NameOpt))


def steel_options(command):
    """Give a command the options of a steel on the command line (see :data:`_STEEL_OPTIONS`),
    after its alloy file; the command receives them as one ``inline`` argument."""
    signature = inspect.signature(command, eval_str=True)
    params = [p for p in signature.parameters.values() if p.name != "inline"]
    extra = [inspect.Parameter(name, inspect.Parameter.POSITIONAL_OR_KEYWORD, default=None, annotation=kind)
             for name, kind in _STEEL_OPTIONS]

    @functools.wraps(command)
    def with_options(**kwargs):
        return command(inline=Inline(**{name: kwargs.pop(name) for name, _ in _STEEL_OPTIONS}), **kwargs)

    with_options.__signature__ = signature.replace(parameters=[params[0], *extra, *params[1:]])
    with_options.__annotations__ = {p.name: p.annotation for p in with_options.__signature__.parameters.values()}
    return with_options
UnitsOpt = Annotated[Units, typer.Option("--units", help="Temperatures of the figure and printed tables: C or F "
                                          "(files keep °C).")]
OutOpt = Annotated[Path, typer.Option("--out", help="Folder for the output files.")]
FormatOpt = Annotated[FigureFormat, typer.Option("--format", help="Figure file type.")]
OverwriteOpt = Annotated[bool, typer.Option("--overwrite", help="Replace output files that already exist.")]
RangeOpt = Annotated[Optional[str], typer.Option("--range", metavar="EL=MIN:MAX,...",
                     help='Composition range, mass %, e.g. "C=0.38:0.43,Mn=0.75:1.00" (or EL=NOMINAL+-SIGMA).')]
SamplesOpt = Annotated[Optional[int], typer.Option("--samples", parser=_whole, metavar="N",
                       help="Heats sampled over the range (Latin hypercube).")]
SeedOpt = Annotated[Optional[int], typer.Option("--seed", parser=_whole, metavar="N",
                    help="Seed of the sampling (default 0): the same seed gives the same heats.")]


@app.command()
@steel_options
def diagram(
    alloy_file: AlloyArg = None,
    inline: Inline = None,
    out: OutOpt = Path("isokin-out"),
    fraction: Annotated[
        Optional[list[float]],
        typer.Option("--fraction", parser=_decimal, metavar="NUMBER", help="Extra transformed fraction to draw (0-1), repeatable; 0.01, 0.5, 0.99 always."),
    ] = None,
    tmin_c: Annotated[Optional[float], typer.Option("--tmin-c", parser=_decimal, metavar="NUMBER",
                                                    help="Lowest hold temperature, °C.")] = None,
    tmax_c: Annotated[Optional[float], typer.Option("--tmax-c", parser=_decimal, metavar="NUMBER",
                                                    help="Highest hold temperature, °C.")] = None,
    points: Annotated[Optional[int], typer.Option("--points", parser=_whole, metavar="N",
                                                  help="Hold temperatures in the grid (3 to 5,000).")] = None,
    fmt: FormatOpt = FigureFormat.png,
    overwrite: OverwriteOpt = False,
    units: UnitsOpt = Units.C,
):
    """Draw the isothermal diagram (C-curves at 1, 50, 99 % and their noses) and export it.

    Writes <stem>.png (or .svg/.pdf), <stem>-curves.csv and <stem>-summary.json into --out.
    """
    from ..compute.grid import alloy_grid, check_fractions, default_fractions
    from ..compute.ttt import ttt

    try:
        alloy, stem = _load(alloy_file, inline)
        grid = alloy_grid(alloy, tmin_c, tmax_c, points)
        fr = check_fractions(default_fractions(fraction or ()), key="fractions")
        paths = _output_paths(out, {"figure": f"{stem}.{fmt.value}", "curves": f"{stem}-curves.csv",
                                    "summary": f"{stem}-summary.json"}, overwrite)
    except InputError as exc:
        fail(exc)
    status("solving the diagram")
    result = ttt(alloy, temperatures_C=kelvin_to_celsius(grid), fractions=fr)
    _warn(result)

    from ..io.export import write_curves_csv, write_summary_json
    from ..plot.ttt import ttt_figure

    _write_run({paths["curves"]: lambda p: write_curves_csv(result, p),
                paths["summary"]: lambda p: write_summary_json(result, p)}, out, overwrite,
               (paths["figure"], fmt.value, lambda: ttt_figure(result, units=units.value)))
    typer.echo(f"{alloy.name}: {alloy.model}")
    _print_noses(result, units)
    for p in paths.values():
        typer.echo(f"wrote {p}")
    typer.echo(CAUTION)


@app.command()
@steel_options
def check(
    alloy_file: AlloyArg = None,
    inline: Inline = None,
    units: UnitsOpt = Units.C,
):
    """Validate an alloy and print what follows from it: critical temperatures, nuclei, noses."""
    from ..compute.ttt import ttt
    from ..products.base import ReportsNucleus

    try:
        alloy, _ = _load(alloy_file, inline)
        result = ttt(alloy)
    except InputError as exc:
        fail(exc)
    _warn(result)
    typer.echo(f"{alloy.name}: {alloy.model}; the input is valid")
    for line, t_k in alloy.critical_K.items():
        typer.echo(f"  {line:<16}{_in_units(kelvin_to_celsius(float(t_k)), units):>10}   "
                   f"{alloy.critical_methods.get(line, '')}")
    for product in alloy.products:
        if isinstance(product, ReportsNucleus):
            _print_nuclei(product, units)
    _print_noses(result, units)
    typer.echo(CAUTION)


def _print_nuclei(product, units):
    rows = product.nucleus_table((10.0, 50.0, 100.0, 200.0))
    typer.echo(f"  {product.name}: critical nucleus below {_in_units(kelvin_to_celsius(float(product.upper_K)), units)}")
    typer.echo(f"    {'undercooling K':>14}  {'r* nm':>9}  {'dG* J':>10}  {'dG*/kT':>8}  {'ln I':>8}")
    for dt, r, barrier, barrier_kt, log_i in zip(*rows.values()):
        typer.echo(f"    {dt:>14.0f}  {_cell(r * 1e9, 9)}  {_cell(barrier, 10)}  {_cell(barrier_kt, 8)}  "
                   f"{_cell(log_i, 8)}")
    if not len(rows["undercooling_K"]):
        typer.echo("    (none of these undercoolings lies above the product's lower temperature)")


def _cell(value, width):
    """A number of the nucleus table; where none exists (no stable nucleus there), the word."""
    return f"{value:>{width}.3g}" if math.isfinite(value) else f"{'none':>{width}}"


def _durations(times: list, grid: Optional[str]) -> list:
    """Hold times in seconds from --time values and a --times START..END/N grid (log-spaced)."""
    from ..io.schema import parse_duration

    seconds = []
    for text in times or []:
        value = parse_duration(text)
        if value is None:
            raise InputError(None, "--time", f"{text!r} is not a duration; write e.g. 90s, 30min, 2h, 1.5d or seconds")
        seconds.append(value)
    if grid is not None:
        span, _, count = grid.partition("/")
        start, sep, end = span.partition("..")
        first, last = parse_duration(start), parse_duration(end)
        from ..io.schema import parse_number

        n = parse_number(count, integer=True) if count else None
        if not sep or first is None or last is None or n is None or not (0 < first < last) or not 2 <= n <= 200:
            raise InputError(None, "--times", f"{grid!r} is not START..END/N, e.g. 10s..8h/12 (2 to 200 times, "
                             "log-spaced, START above 0)")
        import numpy as np

        seconds += list(np.geomspace(first, last, n))
    if not seconds:
        raise InputError(None, "--time", "give the hold time, e.g. --time 30min (repeatable), or --times 10s..8h/12")
    return sorted(seconds)


@app.command()
@steel_options
def hold(
    alloy_file: AlloyArg = None,
    inline: Inline = None,
    temperature_c: Annotated[Optional[float], typer.Option("--temperature-c", parser=_decimal, metavar="NUMBER",
                                                           help="Hold temperature, °C.")] = None,
    time: Annotated[Optional[list[str]], typer.Option("--time", metavar="DURATION",
                    help="Hold time: 90s, 30min, 2h, 1.5d or seconds; repeatable.")] = None,
    times: Annotated[Optional[str], typer.Option("--times", metavar="START..END/N",
                     help="A log-spaced grid of hold times, e.g. 10s..8h/12.")] = None,
    quench_to_c: Annotated[Optional[float], typer.Option("--quench-to-c", parser=_decimal, metavar="NUMBER",
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
    from ..compute.decomposition import hold as hold_at

    try:
        alloy, stem = _load(alloy_file, inline)
        if temperature_c is None:
            raise InputError(None, "--temperature-c", "give the hold temperature, e.g. --temperature-c 450")
        seconds = _durations(time, times)
        options = {} if quench_to_c is None else {"quench_to_C": quench_to_c}
        result = hold_at(alloy, temperature_c, seconds, **options)
        paths = _output_paths(out, {"hold": f"{stem}-hold.json"}, overwrite)
    except InputError as exc:
        fail(exc)
    _warn(result)
    from ..io.export import write_hold_json

    _write({paths["hold"]: lambda p: write_hold_json(result, p)}, out, overwrite)
    typer.echo(f"{alloy.name}: hold at {_in_units(temperature_c, units)}, then quench to "
               f"{_in_units(result.quench_to_C, units)}")
    names = list(result.fractions)
    carbon = result.austenite_carbon is not None
    typer.echo(f"  {'hold time':>10}  " + "  ".join(f"{n:>{max(len(n), 7)}}" for n in names)
               + ("   austenite left: C, Ms" if carbon else ""))
    for k, t in enumerate(result.times_s):
        typer.echo(f"  {format_duration(float(t)):>10}  " + "  ".join(
            f"{float(result.fractions[n][k]) * 100:>{max(len(n), 7) - 2}.1f} %" for n in names)
            + (f"   {_austenite_left(result, k, units)}" if carbon else ""))
    typer.echo(f"  times at {_in_units(temperature_c, units)} to 1 %, 50 %, 99 % (products: of their own completion; "
               f"total: of the {float(result.transformable[0]) * 100:.0f} % that can transform here)")
    for product, marks in result.milestones_s.items():
        cells = [format_duration(float(v)) if math.isfinite(v) and v <= 1e9 else "never" for v in marks[0]]
        typer.echo(f"  {product:<12}" + "".join(f"{c:>12}" for c in cells))
    typer.echo(f"wrote {paths['hold']}")
    typer.echo(CAUTION)


def _rates(text: Optional[str]):
    """--rates "0.1,1,10" as K/s, or None for the default family."""
    if text is None:
        return None
    from ..io.schema import parse_number

    values = [parse_number(v) for v in text.replace(";", ",").split(",") if v.strip()]
    if not values or any(v is None or v <= 0 for v in values):
        raise InputError(None, "--rates", f"{text!r} is not a list of positive cooling rates in K/s, e.g. 0.1,1,10,100")
    return values


def _austenite_left(result, index, units):
    """'0.57 % C, Ms 269 °C': the austenite left at the end of a hold or path."""
    carbon, start = result.austenite_carbon.ravel()[index], result.martensite_start_K.ravel()[index]
    return f"{float(carbon):.2f} % C, Ms {_in_units(float(kelvin_to_celsius(start)), units)}"


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
        typer.echo(row + (f"   {_austenite_left(result, k, units)}" if carbon else ""))


@app.command()
@steel_options
def cct(
    alloy_file: AlloyArg = None,
    inline: Inline = None,
    rates: Annotated[Optional[str], typer.Option("--rates", metavar="K_PER_S,...",
                     help="Constant cooling rates, K/s, comma-separated (default 21 from 0.01 to 1000).")] = None,
    start_c: Annotated[Optional[float], typer.Option("--start-c", parser=_decimal, metavar="NUMBER",
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
    from ..compute.cooling import cct as cct_of

    try:
        alloy, stem = _load(alloy_file, inline)
        status("solving the cooling rates")
        result = cct_of(alloy, _rates(rates), start_C=start_c)
        paths = _output_paths(out, {"figure": f"{stem}-cct.{fmt.value}", "curves": f"{stem}-cct-curves.csv",
                                    "summary": f"{stem}-cct-summary.json"}, overwrite)
    except InputError as exc:
        fail(exc)
    _warn(result.cooling)
    from ..io.export import cct_summary, write_columns_csv, write_json
    from ..plot.cct import plot_cct, report_figure

    _write_run({paths["curves"]: lambda p: write_columns_csv(result.curve_columns(), p),
                paths["summary"]: lambda p: write_json(cct_summary(result), p)}, out, overwrite,
               (paths["figure"], fmt.value, lambda: report_figure(plot_cct, result, alloy.footer, units=units.value)))
    typer.echo(f"{alloy.name}: continuous cooling from {_in_units(result.start_C, units)}")
    _final_table([f"{r:.3g} K/s" for r in result.rates_K_s], result.cooling, units)
    for key, record in result.critical_rates.items():
        value = record.get("rate_K_s")
        said = f"{value:.3g} K/s ({record['tolerance']})" if value is not None else record.get("note", "")
        typer.echo(f"  critical rate, {record['definition']}: {said}")
    for p in paths.values():
        typer.echo(f"wrote {p}")
    typer.echo(CAUTION)


@app.command()
@steel_options
def cool(
    alloy_file: AlloyArg = None,
    inline: Inline = None,
    rate: Annotated[Optional[list[float]], typer.Option("--rate", parser=_decimal, metavar="K_PER_S",
                    help="Constant cooling rate, K/s; repeatable.")] = None,
    log: Annotated[Optional[Path], typer.Option("--log", help="Measured log: CSV with time_s,temperature_C.")] = None,
    medium_c: Annotated[Optional[float], typer.Option("--medium-c", parser=_decimal, metavar="NUMBER",
                        help="Newtonian cooling toward this medium temperature, °C.")] = None,
    time_constant_s: Annotated[Optional[float], typer.Option("--time-constant-s", parser=_decimal, metavar="NUMBER",
                               help="Newtonian time constant, s (or give --thickness-mm and --htc).")] = None,
    thickness_mm: Annotated[Optional[float], typer.Option("--thickness-mm", parser=_decimal, metavar="NUMBER",
                            help="Section thickness (plate) or diameter (bar, sphere), mm, for a lumped body.")] = None,
    htc: Annotated[Optional[float], typer.Option("--htc", parser=_decimal, metavar="W_PER_M2K",
                   help="Heat-transfer coefficient of the quench, W/(m2 K), with --thickness-mm.")] = None,
    shape: Annotated[str, typer.Option("--shape", help="plate, bar or sphere, with --thickness-mm.")] = "plate",
    start_c: Annotated[Optional[float], typer.Option("--start-c", parser=_decimal, metavar="NUMBER",
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
    from ..compute import cooling as C

    try:
        alloy, stem = _load(alloy_file, inline)
        start = C.default_start_C(alloy) if start_c is None else start_c
        kinds = sum(x is not None and x != [] for x in (rate, log, medium_c))
        if kinds != 1:
            raise InputError(None, "--rate", "give one kind of path: --rate, --log, or --medium-c with "
                             "--time-constant-s or --thickness-mm and --htc")
        if rate:
            path = [C.constant_rate(r, start) for r in rate]
        elif log is not None:
            from ..io.tables import read_cooling_log

            path = [read_cooling_log(log, key="--log")]
            start = float(kelvin_to_celsius(path[0].temperature_K[0]))
            top_C = C.formation_top_C(alloy)
            if float(kelvin_to_celsius(path[0].temperature_K.min())) >= top_C:
                raise InputError(None, "--log", f"{log} never cools below {top_C:.0f} °C, where the first product "
                                 "could form: nothing to predict")
        elif time_constant_s is not None:
            path = [C.newtonian(start, medium_c, time_constant_s)]
        elif thickness_mm is not None and htc is not None:
            if shape not in ("plate", "bar", "sphere"):
                raise InputError(None, "--shape", f"must be plate, bar or sphere, got {shape!r}")
            if not (thickness_mm > 0 and htc > 0):
                raise InputError(None, "--thickness-mm", "the thickness and --htc must be positive")
            path = [C.newtonian_section(start, medium_c, thickness_mm / 1000.0, htc, shape)]
        else:
            raise InputError(None, "--medium-c", "needs --time-constant-s, or --thickness-mm and --htc")
        status("following the cooling path")
        result = C.cool(alloy, path)
        isothermal = ttt_of(alloy)
        continuous = C.cct(alloy, start_C=start) if alloy.model == "steel" else None
        paths = _output_paths(out, {"figure": f"{stem}-cool.{fmt.value}", "along": f"{stem}-cool.csv",
                                    "summary": f"{stem}-cool-summary.json"}, overwrite)
    except InputError as exc:
        fail(exc)
    _warn(result)
    from ..io.export import cooling_summary, write_cooling_csv, write_json
    from ..plot.cct import plot_cooling, report_figure

    _write_run({paths["along"]: lambda p: write_cooling_csv(result, p),
                paths["summary"]: lambda p: write_json(cooling_summary(result), p)}, out, overwrite,
               (paths["figure"], fmt.value, lambda: report_figure(plot_cooling, result, alloy.footer, ttt=isothermal,
                                                                 cct=continuous, units=units.value)))
    typer.echo(f"{alloy.name}: cooling from {_in_units(start, units)}")
    _final_table(list(result.labels), result, units)
    for k, label in enumerate(result.labels):
        for product in result.start_temperature_K:
            T = float(result.start_temperature_K[product][k])
            if math.isfinite(T):
                typer.echo(f"  {label}: {product} starts at {_in_units(kelvin_to_celsius(T), units)} after "
                           f"{format_duration(float(result.start_time_s[product][k]))}")
    for p in paths.values():
        typer.echo(f"wrote {p}")
    typer.echo(CAUTION)


class Route(str, Enum):
    austemper = "austemper"
    interrupted_quench = "interrupted-quench"
    anneal = "anneal"


def _duration_option(text: Optional[str], option: str) -> Optional[float]:
    if text is None:
        return None
    from ..io.schema import parse_duration

    value = parse_duration(text)
    if value is None or value <= 0:
        raise InputError(None, option, f"{text!r} is not a duration; write e.g. 90s, 30min, 2h, 1.5d or seconds")
    return value


@app.command()
@steel_options
def plan(
    alloy_file: AlloyArg = None,
    inline: Inline = None,
    route: Annotated[Optional[Route], typer.Option("--route", help="austemper, interrupted-quench or anneal.")] = None,
    max_hold: Annotated[Optional[str], typer.Option("--max-hold", metavar="DURATION",
                        help="Austemper: the longest hold the line allows (default 4h).")] = None,
    budget: Annotated[Optional[str], typer.Option("--budget", metavar="DURATION",
                      help="Anneal: the time budget of the hold (default 8h).")] = None,
    margin_k: Annotated[Optional[float], typer.Option("--margin-k", parser=_decimal, metavar="NUMBER",
                        help="Keep hold temperatures this far above Ms, K (austemper 20, interrupted quench 10).")] = None,
    safety: Annotated[Optional[float], typer.Option("--safety", parser=_decimal, metavar="NUMBER",
                      help="Safety factor on the model's times (austemper 1.5, interrupted quench 2, anneal 1.5).")] = None,
    target_hv: Annotated[Optional[float], typer.Option("--target-hv", parser=_decimal, metavar="NUMBER",
                         help="Austemper: recommend the temperature closest to this hardness, HV.")] = None,
    thickness_mm: Annotated[Optional[float], typer.Option("--thickness-mm", parser=_decimal, metavar="NUMBER",
                            help="Interrupted quench: section thickness, mm, for the equalizing time.")] = None,
    htc: Annotated[Optional[float], typer.Option("--htc", parser=_decimal, metavar="W_PER_M2K",
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
    from ..compute import plan as planning

    try:
        alloy, stem = _load(alloy_file, inline)
        if route is None:
            raise InputError(None, "--route", "choose austemper, interrupted-quench or anneal")
        options = {}
        if safety is not None:
            options["safety"] = safety
        if worst_case:
            options["worst_case"] = _heats(alloy, range_text, samples, seed)
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
        curves = ttt_of(alloy)
        names = {"summary": f"{stem}-plan.json", "table": f"{stem}-plan.csv", "figure": f"{stem}-plan.{fmt.value}"}
        if xlsx:
            try:
                import openpyxl  # noqa: F401
            except ImportError:
                raise InputError(None, "--xlsx", "needs openpyxl: pip install 'isokin[xlsx]'") from None
            names["book"] = f"{stem}-plan.xlsx"
        paths = _output_paths(out, names, overwrite)
    except InputError as exc:
        fail(exc.relocated(keys={"max_hold_s": "--max-hold", "margin_K": "--margin-k", "safety": "--safety",
                                 "budget_s": "--budget", "thickness_m": "--thickness-mm",
                                 "heat_transfer_W_m2K": "--htc", "route": "--route"}) if not exc.source else exc)
    _warn(result)
    from ..io.export import plan_summary, write_json, write_plan_csv, write_plan_xlsx
    from ..plot.ttt import ttt_figure

    files = {paths["summary"]: lambda p: write_json(plan_summary(result), p),
             paths["table"]: lambda p: write_plan_csv(result, p)}
    if xlsx:
        files[paths["book"]] = lambda p: write_plan_xlsx(result, curves, p)
    _write_run(files, out, overwrite,
               (paths["figure"], fmt.value, lambda: ttt_figure(curves, footer_extra=" ".join(result.cautions[:1]),
                                                               units=units.value, plan=result)))
    _print_plan(result, units)
    for p in paths.values():
        typer.echo(f"wrote {p}")
    for caution in result.cautions:
        typer.echo(caution)
    typer.echo(CAUTION)


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
        typer.echo(f"  {_in_units(float(rows['temperature_C'][k]), units):>10}  {'yes' if rows['feasible'][k] else 'no':>3}"
                   f"  {format_duration(hold_s) if math.isfinite(hold_s) else 'never':>10}  " + "  ".join(cells)
                   + f"  {rows['governing'][k]}")
    if result.window_C is not None:
        typer.echo(f"  window: {_in_units(result.window_C[0], units)} to {_in_units(result.window_C[1], units)}")
    if result.recommendation is not None:
        r = result.recommendation
        typer.echo(f"  recommended: {_in_units(r['temperature_C'], units)}, hold {format_duration(r['hold_time_s'])} "
                   f"({r['reason']})")
    if result.no_window:
        typer.echo(f"  {result.no_window}")


@app.command()
def fit(
    data_file: Annotated[Path, typer.Argument(help="Measurements (CSV): temperature_C,time_s,fraction or "
                                              "temperature_C,start_time_s,finish_time_s [,product].")],
    alloy_file: Annotated[Optional[Path], typer.Option("--alloy", help="The alloy file to calibrate.")] = None,
    out: Annotated[Optional[Path], typer.Option("--out", help="The calibrated alloy file to write (never the "
                                                "input).")] = None,
    free: Annotated[Optional[list[str]], typer.Option("--free", metavar="PRODUCT.PARAMETER",
                    help="A parameter to fit, repeatable, e.g. bainite.factor (default: a factor per product "
                         "seen in the data).")] = None,
    bootstrap: Annotated[Optional[int], typer.Option("--bootstrap", parser=_whole, metavar="N",
                         help="Also percentile intervals from N resamples of the points (e.g. 200).")] = None,
    plain: Annotated[bool, typer.Option("--plain-least-squares", help="Plain least squares instead of the robust "
                                        "loss.")] = False,
    overwrite: OverwriteOpt = False,
    units: UnitsOpt = Units.C,
):
    """Calibrate an alloy to measured isothermal holds (dilatometry): fit, intervals, calibrated file.

    Writes the calibrated alloy file (--out), <out>-fit.json (parameters with 95 % intervals,
    residuals, Avrami exponents) and <out>-fit.png (points over the fitted curves with their
    band, residuals).
    """
    from datetime import datetime, timezone

    from ..compute import fit as fitting
    from ..io.alloy_file import load_alloy
    from ..io.measurements import read_measurements

    try:
        if alloy_file is None:
            raise InputError(None, "--alloy", "name the alloy file to calibrate, e.g. --alloy alloys/my-steel.toml")
        if out is None:
            raise InputError(None, "--out", "name the calibrated file to write, e.g. --out my-steel-calibrated.toml")
        if out.resolve() == alloy_file.resolve():
            raise InputError(None, "--out", "is the input alloy file; a calibration never overwrites its input")
        if out.suffix != ".toml":
            raise InputError(None, "--out", f"must be a .toml file, got {out.name}")
        alloy = load_alloy(alloy_file)
        data, digest = read_measurements(data_file, [p.name for p in alloy.products])
        if bootstrap is not None and not 0 <= bootstrap <= 2000:
            raise InputError(None, "--bootstrap", f"must lie from 0 to 2000, got {bootstrap}")
        status("fitting")
        result = fitting.fit(alloy, data, free=free or None, loss="linear" if plain else "soft_l1",
                             bootstrap=bootstrap or 0,
                             progress=lambda done, total: status("bootstrap resamples", done, total))
        stem = out.stem
        paths = _output_paths(out.parent if str(out.parent) else Path("."),
                              {"alloy": out.name, "report": f"{stem}-fit.json", "figure": f"{stem}-fit.png"}, overwrite)
    except InputError as exc:
        fail(exc.relocated(keys={"free": "--free", "data": "DATA"}) if not exc.source else exc)
    date = datetime.now(timezone.utc).replace(microsecond=0).isoformat()
    from ..io.export import calibrated_tables, fit_report, write_json
    from ..io.toml_out import dumps
    from ..plot.fit import fit_figure

    header = (f"Calibrated by isokin {__version__} on {date} from {data_file.name} (sha256 {digest[:16]}...).\n"
              f"Fitted: {', '.join(result.free) or 'nothing'}; rms of ln(model/measured time) {result.rms_ln_t:.3f}.\n"
              "A calibration describes the heat it was measured on; confirm before production.")
    text = dumps(calibrated_tables(result, data_file.name, digest, date), header)
    _write_run({paths["alloy"]: lambda p: p.write_text(text, encoding="utf-8"),
                paths["report"]: lambda p: write_json(fit_report(result, data_file.name, digest, date), p)},
               out.parent, overwrite,
               (paths["figure"], "png", lambda: fit_figure(result, fitting.band(result), units=units.value)))
    typer.echo(f"{alloy.name}: {data.time_s.size} points, fitted {', '.join(result.free) or 'nothing'}")
    typer.echo(f"  {'parameter':<36}{'model':>12}{'fitted':>12}   95 % interval")
    for name in result.free:
        low, high = result.intervals[name]
        typer.echo(f"  {name:<36}{result.model_values[name]:>12.4g}{result.values[name]:>12.4g}   {low:.4g} to {high:.4g}")
        if name in result.bootstrap_intervals:
            b_low, b_high = result.bootstrap_intervals[name]
            typer.echo(f"  {'':<60}bootstrap {b_low:.4g} to {b_high:.4g}")
    typer.echo(f"  rms of ln(model / measured time): {result.rms_ln_t:.3f} (a factor of {math.exp(result.rms_ln_t):.2f})")
    for a in result.avrami:
        typer.echo(f"  Avrami exponent at {_in_units(a['temperature_C'], units)} ({a['product']}): measured "
                   f"{a['measured_n']:.2f}, model {a['model_n']:.2f}")
    for p in paths.values():
        typer.echo(f"wrote {p}")
    typer.echo(CAUTION)



def _ranges(alloy, text):
    """The composition range: --range, else the alloy file's [composition_range]."""
    from ..io.schema import parse_number
    from ..io.steel_file import read_ranges

    if text is None:
        raw = alloy.inputs.get("composition_range")
        if raw is None:
            raise InputError(None, "--range", 'this alloy has no [composition_range]; give e.g. --range '
                             '"C=0.38:0.43,Mn=0.75:1.00"')
        return read_ranges(None, raw)
    table = {}
    for item in filter(None, (s.strip() for s in text.split(","))):
        element, sep, spec = item.partition("=")
        if "+-" in spec:
            a, _, b = spec.partition("+-")
            values = {"nominal": parse_number(a), "uncertainty": parse_number(b)}
            if None in values.values():
                values = None
        else:
            a, _, b = spec.partition(":")
            values = [parse_number(a), parse_number(b)] if _ else None
        if not sep or values is None or (isinstance(values, list) and None in values):
            raise InputError(None, "--range", f"'{item}' is not EL=MIN:MAX or EL=NOMINAL+-SIGMA, e.g. C=0.38:0.43")
        table[element.strip()] = values
    try:
        return read_ranges(None, table)
    except InputError as exc:
        raise InputError(None, "--range", exc.problem) from None


def _heats(alloy, range_text, samples, seed):
    """A batch of heats sampled over the alloy's composition range."""
    from ..compute.spread import sampled_heats

    if alloy.model != "steel":
        raise InputError(None, "--worst-case", "a composition range is for steels")
    return sampled_heats(alloy, _ranges(alloy, range_text), **_sampling(samples, seed))


def _sampling(samples, seed):
    """The sampling options given (the library's defaults stand for the rest)."""
    return {k: v for k, v in (("samples", samples), ("seed", seed)) if v is not None}


@app.command()
@steel_options
def spread(
    alloy_file: AlloyArg = None,
    inline: Inline = None,
    range_text: RangeOpt = None,
    samples: SamplesOpt = None,
    seed: SeedOpt = None,
    out: OutOpt = Path("isokin-out"),
    fmt: FormatOpt = FigureFormat.png,
    overwrite: OverwriteOpt = False,
    units: UnitsOpt = Units.C,
):
    """How the composition range spreads the curves: bands, the worst-case start, Ms range, drivers.

    Samples heats over the range ([composition_range] of the file or --range), computes all
    their curves with the batch solver, and writes <stem>-spread.png, <stem>-spread.csv (quantiles and
    envelope per product, fraction and temperature) and <stem>-spread.json.
    """
    from ..compute.spread import spread as spread_of

    try:
        alloy, stem = _load(alloy_file, inline)
        if alloy.model != "steel":
            raise InputError(None, "ALLOY", "a composition spread is for steels")
        status("sampling the heats")
        result = spread_of(alloy, _ranges(alloy, range_text), **_sampling(samples, seed),
                           progress=lambda done, total: status("solving the heats", done, total))
        paths = _output_paths(out, {"figure": f"{stem}-spread.{fmt.value}", "table": f"{stem}-spread.csv",
                                    "summary": f"{stem}-spread.json"}, overwrite)
    except InputError as exc:
        fail(exc)
    _warn(result.nominal)
    from ..io.export import spread_summary, write_columns_csv, write_json
    from ..plot.cct import report_figure
    from ..plot.spread import plot_spread

    _write_run({paths["table"]: lambda p: write_columns_csv(result.curve_columns(), p),
                paths["summary"]: lambda p: write_json(spread_summary(result), p)}, out, overwrite,
               (paths["figure"], fmt.value, lambda: report_figure(plot_spread, result, alloy.footer, units=units.value)))
    typer.echo(f"{alloy.name}: {result.samples} heats over " + ", ".join(
        f"{e} {a:g}-{b:g}" if k == "range" else f"{e} {a:g}±{b:g}" for e, (k, a, b) in result.ranges.items()))
    typer.echo(f"  {'curve':<14}{'fraction':>9}  {'nose (5-95 %)':>22}  {'nose time (5-95 %)':>24}")
    for curve, nq in result.nose_quantiles.items():
        for k, x in enumerate(result.nominal.fractions):
            T_lo, T_hi = (kelvin_to_celsius(float(nq["temperature_K"][j, k])) for j in (0, -1))
            t_lo, t_hi = (float(nq["time_s"][j, k]) for j in (0, -1))
            if math.isfinite(t_lo) and math.isfinite(t_hi):
                typer.echo(f"  {curve:<14}{x:>9.3g}  {_in_units(T_lo, units):>10} to {_in_units(T_hi, units):<10}"
                           f"  {format_duration(t_lo):>10} to {format_duration(t_hi):<10}")
    ms_lo, ms_hi = (kelvin_to_celsius(t) for t in result.ms_range_K)
    typer.echo(f"  Ms over the range: {_in_units(ms_lo, units)} to {_in_units(ms_hi, units)}")
    T_first, t_first = result.earliest_start()
    if math.isfinite(t_first):
        typer.echo(f"  earliest start over the range (the worst case for a hold or a quench): "
                   f"{format_duration(t_first)} at {_in_units(kelvin_to_celsius(T_first), units)}")
    if result.sensitivity:
        typer.echo("  what moves the earliest start most (ln of its time across each element's range): " + ", ".join(
            f"{s['element']} {s['ln_time_per_range']:+.2f}" for s in result.sensitivity))
    for p in paths.values():
        typer.echo(f"wrote {p}")
    typer.echo(CAUTION)


@app.command()
def compare(
    alloy_files: Annotated[Optional[list[Path]], typer.Argument(help="Alloy files to compare.",
                                                                 show_default=False)] = None,
    composition: Annotated[Optional[list[str]], typer.Option("--composition", help="A heat analysis to compare, "
                           'e.g. "C=0.40,Mn=0.85"; repeatable.')] = None,
    grain_size: GrainOpt = None,
    out: OutOpt = Path("isokin-out"),
    stem: Annotated[str, typer.Option("--stem", help="Name of the output files.")] = "comparison",
    fmt: FormatOpt = FigureFormat.png,
    overwrite: OverwriteOpt = False,
    units: UnitsOpt = Units.C,
):
    """Several alloys or heats side by side: their start curves on one figure, and a table of
    noses, Ms and the critical temperatures. Writes <stem>.png and <stem>.json."""
    from ..compute.ttt import ttt

    try:
        alloys = [_load(path, Inline())[0] for path in alloy_files or []]
        alloys += [_load(None, Inline(text, grain_size))[0] for text in composition or []]
        if len(alloys) < 2:
            raise InputError(None, "ALLOY", "give two or more alloy files or --composition heats to compare")
        if len(alloys) > 6:
            raise InputError(None, "ALLOY", f"at most 6 alloys on one figure, got {len(alloys)}")
        results = []
        for i, a in enumerate(alloys):
            status("solving the diagrams", i + 1, len(alloys))
            results.append(ttt(a))
        paths = _output_paths(out, {"figure": f"{_stem(stem)}.{fmt.value}", "summary": f"{_stem(stem)}.json"},
                              overwrite)
    except InputError as exc:
        fail(exc)
    for r in results:
        _warn(r, r.alloy)
    from ..io.export import compare_summary, write_json
    from ..plot.cct import report_figure
    from ..plot.spread import plot_compare

    _write_run({paths["summary"]: lambda p: write_json(compare_summary(results), p)}, out, overwrite,
               (paths["figure"], fmt.value, lambda: report_figure(plot_compare, results, "", units=units.value)))
    known = {k for r in results for k in r.critical_K}
    lines = [k for k in _LINES_TOP_DOWN if k in known] + sorted(known - set(_LINES_TOP_DOWN))
    for i, r in enumerate(results, start=1):
        typer.echo(f"  [{i}] {r.alloy}")
    typer.echo(f"  {'':<24}" + "".join(f"{f'[{i}]':>13}" for i in range(1, len(results) + 1)))
    for line in lines:
        typer.echo(f"  {line:<24}" + "".join(
            f"{_in_units(kelvin_to_celsius(float(r.critical_K[line])), units) if line in r.critical_K else '-':>13}"
            for r in results))
    for label in ("start (1 %) nose", "start (1 %) nose time"):
        cells = []
        for r in results:
            n = r.noses[r.overall or r.products[0]]
            ok = bool(n.forms[0])
            value = (_in_units(float(n.temperature_C[0]), units) if "time" not in label else
                     format_duration(float(n.time_s[0]))) if ok else "-"
            cells.append(f"{value:>13}")
        typer.echo(f"  {label:<24}" + "".join(cells))
    for p in paths.values():
        typer.echo(f"wrote {p}")
    typer.echo(CAUTION)


#: The critical lines from the top of a steel's diagram down, as they are read on it.
_LINES_TOP_DOWN = ("Ae3", "Ae1", "Bs", "Ms", "M50", "M90")


def ttt_of(alloy):
    from ..compute.ttt import ttt

    return ttt(alloy)


@app.command()
def version():
    """Print the isokin version."""
    typer.echo(__version__)


def _terminated(signum, frame):
    # unwinds like an exception, so that temporary files are cleaned up on the way out
    raise SystemExit(128 + signum)


def main():
    """Entry point: a usage error (unknown option, wrong type, value out of range) ends with one line too."""
    signal.signal(signal.SIGTERM, _terminated)
    status.restart()
    try:
        code = app(standalone_mode=False)
    except KeyboardInterrupt:
        typer.echo("isokin: interrupted; nothing more was written", err=True)
        sys.exit(130)
    except Exception as exc:
        # click-style usage errors, whichever click copy typer carries: exit code 2 and a message
        if getattr(exc, "exit_code", None) != 2 or not hasattr(exc, "format_message"):
            raise
        command = exc.ctx.command_path if getattr(exc, "ctx", None) else "isokin"
        typer.echo(f"isokin: error: {exc.format_message()} (see: {command} --help)", err=True)
        sys.exit(2)
    sys.exit(code if isinstance(code, int) else 0)
