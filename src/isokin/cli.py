"""Command line: thin wrappers that read input, call the library and report.

No physics here.  Bad input ends with one line on stderr and exit code 2.
"""

from __future__ import annotations

import os
import sys
from enum import Enum
from pathlib import Path
from typing import Annotated, Optional

import numpy as np
import typer

from . import __version__
from .alloy import AlloyModel, load_alloy
from .constants import celsius_to_kelvin, kelvin_to_celsius
from .diagram import DEFAULT_POINTS, compute_diagram, default_fractions, temperature_grid
from .errors import InputError
from .readout import CAUTION, format_duration

app = typer.Typer(
    add_completion=False,
    no_args_is_help=True,
    help="isokin: isothermal transformation (TTT) diagrams from nucleation and growth kinetics, "
    "for heat-treatment planning. " + CAUTION,
)


class FigureFormat(str, Enum):
    png = "png"
    svg = "svg"
    pdf = "pdf"


def fail(message: str):
    typer.echo(f"isokin: error: {message}", err=True)
    raise typer.Exit(2)


def _load(alloy_file: Optional[Path], composition: Optional[str], grain_size: Optional[float]) -> AlloyModel:
    if composition is not None:
        if alloy_file is not None:
            raise InputError(None, "--composition", "give either an alloy file or --composition, not both")
        from .steel_alloy import steel_model_inline

        return steel_model_inline(composition, grain_size)
    if alloy_file is None:
        raise InputError(None, "ALLOY", "name an alloy file (alloys/*.toml) or give --composition \"C=0.8,Mn=0.7\"")
    if grain_size is not None:
        raise InputError(None, "--grain-size", "goes with --composition; an alloy file sets grain_size_astm itself")
    return load_alloy(alloy_file)


def _grid(alloy: AlloyModel, tmin_c, tmax_c, points):
    lo, hi = alloy.default_range_K
    lo = celsius_to_kelvin(tmin_c) if tmin_c is not None else lo
    hi = celsius_to_kelvin(tmax_c) if tmax_c is not None else hi
    if lo <= 0:
        raise InputError(None, "--tmin-c", "must lie above absolute zero (-273.15 °C)")
    if not lo < hi:
        raise InputError(None, "--tmin-c", f"must lie below the upper temperature ({kelvin_to_celsius(hi):.1f} °C)")
    n = points if points is not None else (alloy.default_points or DEFAULT_POINTS)
    return temperature_grid(lo, hi, n)


def _fractions(extra):
    fr = np.asarray(extra or [], dtype=float)
    bad = fr[(fr <= 0) | (fr >= 1)]
    if bad.size:
        raise InputError(None, "--fraction", f"must lie strictly between 0 and 1 (0.05 for 5 %), got {bad[0]:g}")
    return default_fractions(fr)


def _print_noses(diagram):
    typer.echo(f"{'product':<14}{'fraction':>9}  {'nose °C':>9}  nose time")
    for nose in diagram.noses:
        where = "" if nose.inside else "  (at the edge of the range: the true nose lies outside)"
        typer.echo(f"{nose.product:<14}{nose.fraction:>9.3g}  {nose.temperature_C:>9.1f}  {format_duration(nose.time_s)}{where}")
    formed = {n.product for n in diagram.noses}
    for product in diagram.products:
        if product.name not in formed:
            typer.echo(f"{product.name:<14}  does not form in the temperature range asked for")


def _warn(alloy):
    for line in alloy.warnings:
        typer.echo(f"isokin: warning: {line}", err=True)


def _output_paths(out: Path, stem: str, fmt: str, overwrite: bool):
    try:
        out.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise InputError(None, "--out", f"cannot create folder {out} ({exc.strerror})") from None
    if not out.is_dir() or not os.access(out, os.W_OK | os.X_OK):
        raise InputError(None, "--out", f"folder {out} is not writable; choose another with --out")
    paths = {
        "figure": out / f"{stem}.{fmt}",
        "curves": out / f"{stem}-curves.csv",
        "summary": out / f"{stem}-summary.json",
    }
    existing = [str(p) for p in paths.values() if p.exists()]
    if existing and not overwrite:
        raise InputError(None, "--out", f"{existing[0]} exists; pass --overwrite to replace it, or choose another --out")
    return paths


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
    typer.Option("--grain-size", help="ASTM austenite grain size number, with --composition (default 7)."),
]


@app.command()
def diagram(
    alloy_file: AlloyArg = None,
    composition: CompositionOpt = None,
    grain_size: GrainOpt = None,
    out: Annotated[Path, typer.Option("--out", help="Folder for the figure, CSV and JSON.")] = Path("isokin-out"),
    fraction: Annotated[
        Optional[list[float]],
        typer.Option("--fraction", help="Extra transformed fraction to draw (0-1), repeatable; 0.01, 0.5, 0.99 always."),
    ] = None,
    tmin_c: Annotated[Optional[float], typer.Option("--tmin-c", help="Lowest hold temperature, °C.")] = None,
    tmax_c: Annotated[Optional[float], typer.Option("--tmax-c", help="Highest hold temperature, °C.")] = None,
    points: Annotated[Optional[int], typer.Option("--points", min=3, max=100_000, help="Hold temperatures in the grid.")] = None,
    fmt: Annotated[FigureFormat, typer.Option("--format", help="Figure file type.")] = FigureFormat.png,
    overwrite: Annotated[bool, typer.Option("--overwrite", help="Replace output files that already exist.")] = False,
):
    """Draw the isothermal diagram (C-curves at 1, 50, 99 % and their noses) and export it.

    Writes <stem>.png (or .svg/.pdf), <stem>-curves.csv and <stem>-summary.json into --out.
    """
    try:
        alloy = _load(alloy_file, composition, grain_size)
        grid = _grid(alloy, tmin_c, tmax_c, points)
        fr = _fractions(fraction)
        stem = alloy_file.stem if alloy_file is not None else "composition"
        paths = _output_paths(out, stem, fmt.value, overwrite)
    except InputError as exc:
        fail(str(exc))
    _warn(alloy)
    result = compute_diagram(alloy.products, grid, fr)

    from .export import write_curves_csv, write_summary_json
    from .plotting import draw_diagram, save_figure

    try:
        save_figure(draw_diagram(result, alloy), paths["figure"])
        write_curves_csv(result, paths["curves"])
        write_summary_json(result, alloy, paths["summary"])
    except OSError as exc:
        fail(f"--out: cannot write into {out} ({exc.strerror or exc})")
    typer.echo(f"{alloy.name}: {alloy.model}")
    _print_noses(result)
    for p in paths.values():
        typer.echo(f"wrote {p}")
    typer.echo(CAUTION)


@app.command()
def check(
    alloy_file: AlloyArg = None,
    composition: CompositionOpt = None,
    grain_size: GrainOpt = None,
):
    """Validate an alloy and print what follows from it: critical temperatures, nuclei, noses."""
    try:
        alloy = _load(alloy_file, composition, grain_size)
    except InputError as exc:
        fail(str(exc))
    _warn(alloy)
    typer.echo(f"{alloy.name}: {alloy.model}; the input is valid")
    for name, t_k in alloy.lines_K.items():
        typer.echo(f"  {name:<16}{kelvin_to_celsius(t_k):8.1f} °C   {alloy.line_methods.get(name, '')}")
    for product in alloy.products:
        if hasattr(product, "nucleus"):
            _print_nuclei(product)
    result = compute_diagram(alloy.products, _grid(alloy, None, None, None))
    _print_noses(result)
    typer.echo(CAUTION)


def _print_nuclei(product):
    rows = product.nucleus_table((10.0, 50.0, 100.0, 200.0))
    typer.echo(f"  {product.name}: critical nucleus below {kelvin_to_celsius(float(product.upper_K)):.1f} °C")
    typer.echo(f"    {'undercooling K':>14}  {'r* nm':>9}  {'dG* J':>10}  {'dG*/kT':>8}  {'ln I':>8}")
    for dt, r, barrier, barrier_kt, log_i in zip(*rows.values()):
        typer.echo(f"    {dt:>14.0f}  {r * 1e9:>9.3g}  {barrier:>10.3g}  {barrier_kt:>8.3g}  {log_i:>8.3g}")


@app.command()
def version():
    """Print the isokin version."""
    typer.echo(__version__)


def main():
    """Entry point: a usage error (unknown option, wrong type, value out of range) ends with one line too."""
    try:
        code = app(standalone_mode=False)
    except Exception as exc:
        # click-style usage errors, whichever click copy typer carries: exit code 2 and a message
        if getattr(exc, "exit_code", None) != 2 or not hasattr(exc, "format_message"):
            raise
        command = exc.ctx.command_path if getattr(exc, "ctx", None) else "isokin"
        typer.echo(f"isokin: error: {exc.format_message()} (see: {command} --help)", err=True)
        sys.exit(2)
    sys.exit(code if isinstance(code, int) else 0)
