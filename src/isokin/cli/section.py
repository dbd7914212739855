"""``isokin section`` and ``isokin jominy``: a quenched part through its section, and the end-quench test."""

from __future__ import annotations

import math
from pathlib import Path
from typing import Annotated, Optional

import typer

from ..errors import InputError
from ..readout import format_duration
from .options import (AlloyArg, FigureFormat, FormatOpt, Inline, OutOpt, OverwriteOpt, Units, UnitsOpt,
                      decimal_number, in_units, steel_options, whole_number)
from .runner import Drawing, Outcome, load, run
from .status import status

#: Library keys of these commands as their options (a size refused is said in millimetres, as given).
KEYS = {"size_m": ("--size-mm", "mm", 1000.0), "severity_per_in": "--severity", "htc_table": "--htc-table", "nodes": "--nodes",
        "heat_transfer_W_m2K": "--htc", "water_C": "--water-c", "band": "--band"}


@steel_options
def section(
    alloy_file: AlloyArg = None,
    inline: Inline = None,
    shape: Annotated[str, typer.Option("--shape", metavar="plate|bar|sphere",
                                      help="plate (thickness), bar (diameter) or sphere (diameter).")] = "bar",
    size_mm: Annotated[Optional[float], typer.Option("--size-mm", parser=decimal_number, metavar="NUMBER",
                       help="Thickness of a plate or diameter of a bar or sphere, mm (required).")] = None,
    medium_c: Annotated[Optional[float], typer.Option("--medium-c", parser=decimal_number, metavar="NUMBER",
                        help="Temperature of the quench medium, °C (required).")] = None,
    htc: Annotated[Optional[float], typer.Option("--htc", parser=decimal_number, metavar="W_PER_M2K",
                   help="Heat-transfer coefficient of the quench, W/(m2 K).")] = None,
    severity: Annotated[Optional[float], typer.Option("--severity", parser=decimal_number, metavar="H_PER_IN",
                        help="Grossmann quench severity H, 1/in (oil 0.25-0.8, water 0.9-2, brine 2-5 by "
                             "agitation; README).")] = None,
    htc_table: Annotated[Optional[Path], typer.Option("--htc-table", metavar="FILE",
                         help="CSV of the quenchant's h against the surface temperature: temperature_C,htc_W_m2K.")] = None,
    start_c: Annotated[Optional[float], typer.Option("--start-c", parser=decimal_number, metavar="NUMBER",
                       help="Uniform temperature at the start, °C (default the austenitizing temperature).")] = None,
    nodes: Annotated[Optional[int], typer.Option("--nodes", parser=whole_number, metavar="N",
                     help="Grid nodes from centre to surface (default 41).")] = None,
    out: OutOpt = Path("isokin-out"),
    fmt: FormatOpt = FigureFormat.png,
    overwrite: OverwriteOpt = False,
    units: UnitsOpt = Units.C,
):
    """Quench a plate, bar or sphere: cooling through the section, phases and hardness against depth.

    Give one surface condition: --htc, --severity or --htc-table. Prints the profile, the depth
    to 50 % and 90 % martensite and when the centre comes within 5 K of the medium; writes
    <stem>-section.png, <stem>-section-profile.csv, <stem>-section-curves.csv and
    <stem>-section-summary.json.
    """

    def solve(alloy, stem):
        from ..compute.cooling import cct
        from ..compute.section import DEFAULT_NODES
        from ..compute.section import section as section_of
        from ..io.export import section_summary, write_columns_csv, write_json

        for option, value in (("--size-mm", size_mm), ("--medium-c", medium_c)):
            if value is None:
                raise InputError(None, option, "is required: the section's size and the medium's temperature")
        table = None
        if htc_table is not None:
            from ..io.tables import read_htc_table

            table = read_htc_table(htc_table, key="--htc-table")
        status("cooling the section")
        result = section_of(alloy, shape, size_mm / 1000.0, medium_c, heat_transfer_W_m2K=htc,
                            severity_per_in=severity, htc_table=table, start_C=start_c,
                            nodes=DEFAULT_NODES if nodes is None else nodes)
        diagram = cct(alloy, start_C=result.start_C) if alloy.model == "steel" else None

        def draw():
            from ..plot.section import section_figure

            return section_figure(result, diagram, alloy.footer, units=units.value)

        def show():
            _profile_table(result, units)

        files = {out / f"{stem}-section-profile.csv": lambda p: write_columns_csv(result.profile_columns(), p),
                 out / f"{stem}-section-curves.csv": lambda p: write_columns_csv(result.curve_columns(), p),
                 out / f"{stem}-section-summary.json": lambda p: write_json(section_summary(result), p)}
        if diagram is not None and result.hardness_HV is not None:
            files = {out / f"{stem}-section.{fmt.value}": Drawing(draw), **files}
        return Outcome(show, result.warnings, files)

    run(lambda: load(alloy_file, inline), solve, overwrite=overwrite, keys=KEYS)


def _profile_table(result, units):
    from ..relations.hardness import hrc_from_hv_astm_e140

    typer.echo(f"{result.alloy}: {result.shape} {result.size_m[0] * 1e3:g} mm from {in_units(result.start_C, units)} "
               f"into {in_units(result.medium_C, units)}, {result.surface}; Biot {result.biot_number[0]:.2g}")
    names = list(result.final)
    typer.echo(f"  {'depth mm':>9}  " + "  ".join(f"{n:>{max(len(n), 7)}}" for n in names)
               + ("     HV    HRC" if result.hardness_HV is not None else ""))
    depth = result.depth_m[0]
    for j in range(depth.size - 1, -1, -max(1, depth.size // 12)):
        row = f"  {depth[j] * 1e3:>9.2f}  " + "  ".join(f"{float(result.final[n][0, j]) * 100:>{max(len(n), 7) - 2}.1f} %"
                                                       for n in names)
        if result.hardness_HV is not None:
            hv = float(result.hardness_HV[0, j])
            hrc = float(hrc_from_hv_astm_e140(hv))
            row += f"  {hv:>5.0f}  " + (f"{hrc:>5.1f}" if math.isfinite(hrc) else "    -")
        typer.echo(row)
    for level, d in result.martensite_depth_m.items():
        through = d[0] >= depth[0] - 1e-12
        typer.echo(f"  {level * 100:.0f} % martensite to a depth of {d[0] * 1e3:.1f} mm"
                   + (" (through the section)" if through else ""))
    arrival = float(result.centre_at_medium_s[0])
    typer.echo(f"  the centre comes within 5 K of the medium after {format_duration(arrival)}"
               if math.isfinite(arrival) else "  the centre does not come within 5 K of the medium")


@steel_options
def jominy(
    alloy_file: AlloyArg = None,
    inline: Inline = None,
    band: Annotated[Optional[Path], typer.Option("--band", metavar="FILE",
                    help="Hardenability band to check: CSV with distance_sixteenths_in (or distance_mm), hrc_min, "
                         "hrc_max (alloys/bands/ holds SAE J1268 bands typed from memory).")] = None,
    start_c: Annotated[Optional[float], typer.Option("--start-c", parser=decimal_number, metavar="NUMBER",
                       help="Austenitizing temperature, °C (default the alloy's).")] = None,
    water_c: Annotated[Optional[float], typer.Option("--water-c", parser=decimal_number, metavar="NUMBER",
                       help="Temperature of the water jet, °C (default 20).")] = None,
    out: OutOpt = Path("isokin-out"),
    fmt: FormatOpt = FigureFormat.png,
    overwrite: OverwriteOpt = False,
):
    """The end-quench (Jominy) test: hardness against distance from the quenched end, J50 and DI.

    Prints the hardness at the standard distances (mm and sixteenths of an inch), the distance to
    50 % martensite and the ideal critical diameter by Grossmann's method, and with --band the
    distances that fall outside it. Writes <stem>-jominy.png, <stem>-jominy.csv and
    <stem>-jominy-summary.json.
    """

    def solve(alloy, stem):
        from ..compute.section import jominy as jominy_of
        from ..io.export import jominy_summary, write_columns_csv, write_json

        checked = None
        if band is not None:
            from ..io.tables import read_hardness_band

            checked = read_hardness_band(band, key="--band")
        status("running the end-quench test")
        result = jominy_of(alloy, start_C=start_c, band=checked,
                           **({"water_C": water_c} if water_c is not None else {}))

        def draw():
            from ..plot.section import jominy_figure

            return jominy_figure(result, alloy.footer)

        def show():
            from ..relations.hardness import hrc_from_hv_astm_e140

            typer.echo(f"{result.alloy}: end-quench test from {result.start_C:g} °C")
            columns = result.columns()
            cells = [f"{p} {float(hrc_from_hv_astm_e140(hv)):.1f}" if math.isfinite(float(hrc_from_hv_astm_e140(hv)))
                     else f"{p} <20" for p, hv in zip(columns["position"], columns["hardness_HV"])]
            for k in range(0, len(cells), 8):
                typer.echo("  HRC at " + ", ".join(cells[k:k + 8]))
            typer.echo(f"  50 % martensite at {result.half_martensite_m * 1e3:.1f} mm "
                       f"(J{result.half_martensite_m / 0.0254 * 16:.1f})")
            typer.echo(f"  ideal critical diameter DI {result.ideal_diameter_in:.2f} in "
                       f"({result.ideal_diameter_in * 25.4:.0f} mm), Grossmann's method")
            if result.band is not None:
                b = result.band
                if b["outside"].any():
                    names = ", ".join(f"{d * 1e3:.1f} mm ({p:.1f} HRC against {lo:g}-{hi:g})" for d, p, lo, hi in zip(
                        b["distance_m"][b["outside"]], b["predicted_HRC"][b["outside"]], b["hrc_min"][b["outside"]],
                        b["hrc_max"][b["outside"]]))
                    typer.echo(f"  outside the band at {int(b['outside'].sum())} of {b['outside'].size} distances: {names}")
                else:
                    typer.echo(f"  inside the band at all {b['outside'].size} distances")

        return Outcome(show, result.warnings, {
            out / f"{stem}-jominy.{fmt.value}": Drawing(draw),
            out / f"{stem}-jominy.csv": lambda p: write_columns_csv(result.columns(), p),
            out / f"{stem}-jominy-summary.json": lambda p: write_json(jominy_summary(result), p)})

    run(lambda: load(alloy_file, inline), solve, overwrite=overwrite, keys=KEYS)
