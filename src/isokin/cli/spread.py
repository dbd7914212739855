"""``isokin spread`` and ``isokin compare``: how a composition range moves the curves, and alloys side by side."""

from __future__ import annotations

import math
from pathlib import Path
from typing import Annotated, Optional

import typer

from ..constants import kelvin_to_celsius
from ..errors import InputError
from ..readout import format_duration
from .options import (AlloyArg, FigureFormat, FormatOpt, GrainOpt, Inline, OutOpt, OverwriteOpt, RangeOpt, SamplesOpt,
                      SeedOpt, Units, UnitsOpt, in_units, steel_options)
from .runner import Drawing, Outcome, file_stem, load, run
from .status import status


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

    Samples heats over the range (the file's composition_range table, or --range), computes all
    their curves with the batch solver, and writes <stem>-spread.png, <stem>-spread.csv (quantiles and
    envelope per product, fraction and temperature) and <stem>-spread.json.
    """

    def solve(alloy, stem):
        from ..compute.spread import spread as spread_of
        from ..io.export import spread_summary, write_columns_csv, write_json

        if alloy.model != "steel":
            raise InputError(None, "ALLOY", "a composition spread is for steels")
        status("sampling the heats")
        result = spread_of(alloy, _ranges(alloy, range_text), **_sampling(samples, seed),
                           progress=lambda done, total: status("solving the heats", done, total))

        def draw():
            from ..plot.cct import report_figure
            from ..plot.spread import plot_spread

            return report_figure(plot_spread, result, alloy.footer, units=units.value)

        return Outcome(lambda: _print_spread(alloy, result, units), result.nominal.warnings, {
            out / f"{stem}-spread.{fmt.value}": Drawing(draw),
            out / f"{stem}-spread.csv": lambda p: write_columns_csv(result.curve_columns(), p),
            out / f"{stem}-spread.json": lambda p: write_json(spread_summary(result), p)})

    run(lambda: load(alloy_file, inline), solve, overwrite=overwrite)


def _print_spread(alloy, result, units):
    typer.echo(f"{alloy.name}: {result.samples} heats over " + ", ".join(
        f"{e} {a:g}-{b:g}" if k == "range" else f"{e} {a:g}±{b:g}" for e, (k, a, b) in result.ranges.items()))
    typer.echo(f"  {'curve':<14}{'fraction':>9}  {'nose (5-95 %)':>22}  {'nose time (5-95 %)':>24}")
    for curve, nq in result.nose_quantiles.items():
        for k, x in enumerate(result.nominal.fractions):
            T_lo, T_hi = (kelvin_to_celsius(float(nq["temperature_K"][j, k])) for j in (0, -1))
            t_lo, t_hi = (float(nq["time_s"][j, k]) for j in (0, -1))
            if math.isfinite(t_lo) and math.isfinite(t_hi):
                typer.echo(f"  {curve:<14}{x:>9.3g}  {in_units(T_lo, units):>10} to {in_units(T_hi, units):<10}"
                           f"  {format_duration(t_lo):>10} to {format_duration(t_hi):<10}")
    ms_lo, ms_hi = (kelvin_to_celsius(t) for t in result.ms_range_K)
    typer.echo(f"  Ms over the range: {in_units(ms_lo, units)} to {in_units(ms_hi, units)}")
    T_first, t_first = result.earliest_start()
    if math.isfinite(t_first):
        typer.echo(f"  earliest start over the range (the worst case for a hold or a quench): "
                   f"{format_duration(t_first)} at {in_units(kelvin_to_celsius(T_first), units)}")
    if result.sensitivity:
        typer.echo("  what moves the earliest start most (ln of its time across each element's range): " + ", ".join(
            f"{s['element']} {s['ln_time_per_range']:+.2f}" for s in result.sensitivity))


def compare(
    alloy_files: Annotated[Optional[list[Path]], typer.Argument(metavar="ALLOY.toml ...", help="Alloy files to compare.",
                                                                 show_default=False)] = None,
    composition: Annotated[Optional[list[str]], typer.Option("--composition", metavar="EL=MASS%,...", help="A heat analysis to compare, "
                           'e.g. "C=0.40,Mn=0.85"; repeatable.')] = None,
    grain_size: GrainOpt = None,
    out: OutOpt = Path("isokin-out"),
    stem: Annotated[str, typer.Option("--stem", metavar="NAME", help="Name of the output files.")] = "comparison",
    fmt: FormatOpt = FigureFormat.png,
    overwrite: OverwriteOpt = False,
    units: UnitsOpt = Units.C,
):
    """Several alloys or heats side by side: their start curves on one figure, and a table of
    noses, Ms and the critical temperatures. Writes <stem>.png and <stem>.json."""

    def load_all():
        alloys = [load(path, Inline())[0] for path in alloy_files or []]
        alloys += [load(None, Inline(text, grain_size))[0] for text in composition or []]
        if len(alloys) < 2:
            raise InputError(None, "ALLOY", "give two or more alloy files or --composition heats to compare")
        if len(alloys) > 6:
            raise InputError(None, "ALLOY", f"at most 6 alloys on one figure, got {len(alloys)}")
        return alloys, file_stem(stem)

    def solve(alloys, name):
        from ..compute.ttt import ttt
        from ..io.export import compare_summary, write_json

        results = []
        for i, a in enumerate(alloys):
            status("solving the diagrams", i + 1, len(alloys))
            results.append(ttt(a))

        def draw():
            from ..plot.cct import report_figure
            from ..plot.spread import plot_compare

            return report_figure(plot_compare, results, "", units=units.value)

        return Outcome(lambda: _print_compare(results, units), [f"{r.alloy}: {w}" for r in results for w in r.warnings],
                       {out / f"{name}.{fmt.value}": Drawing(draw),
                        out / f"{name}.json": lambda p: write_json(compare_summary(results), p)})

    run(load_all, solve, overwrite=overwrite)


#: The critical lines from the top of a steel's diagram down, as they are read on it.
_LINES_TOP_DOWN = ("Ae3", "Ae1", "Bs", "Ms", "M50", "M90")


def _print_compare(results, units):
    known = {k for r in results for k in r.critical_K}
    lines = [k for k in _LINES_TOP_DOWN if k in known] + sorted(known - set(_LINES_TOP_DOWN))
    for i, r in enumerate(results, start=1):
        typer.echo(f"  [{i}] {r.alloy}")
    typer.echo(f"  {'':<24}" + "".join(f"{f'[{i}]':>13}" for i in range(1, len(results) + 1)))
    compositions = [r.inputs.get("composition", {}) for r in results]
    elements = list(dict.fromkeys(e for c in compositions for e in c))
    for element in elements:
        typer.echo(f"  {element + ', mass %':<24}" + "".join(
            f"{c[element]:>13g}" if element in c else f"{'-':>13}" for c in compositions))
    for line in lines:
        typer.echo(f"  {line:<24}" + "".join(
            f"{in_units(kelvin_to_celsius(float(r.critical_K[line])), units) if line in r.critical_K else '-':>13}"
            for r in results))
    # every product's start nose: the upper (ferrite, pearlite) and the bainite nose of a steel
    from ..results import OVERALL

    products = list(dict.fromkeys(p for r in results for p in r.products))
    for product in products:
        label = "all products, 1 % of what can form" if product == OVERALL else f"{product}, 1 % of its own"
        typer.echo(f"  {label}:")
        for what in ("nose", "nose time"):
            cells = []
            for r in results:
                n = r.noses.get(product)
                ok = n is not None and bool(n.forms[0]) and bool(n.inside[0])
                value = (in_units(float(n.temperature_C[0]), units) if what == "nose" else
                         format_duration(float(n.time_s[0]))) if ok else "-"
                cells.append(f"{value:>13}")
            typer.echo(f"    {what:<22}" + "".join(cells))


def heats(alloy, range_text, samples, seed):
    """A batch of heats sampled over the alloy's composition range (``plan --worst-case``)."""
    from ..compute.spread import sampled_heats

    if alloy.model != "steel":
        raise InputError(None, "--worst-case", "a composition range is for steels")
    return sampled_heats(alloy, _ranges(alloy, range_text), **_sampling(samples, seed))


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
        if element.strip() in table:
            raise InputError(None, "--range", f"{element.strip()} is given twice; give each element's range once")
        table[element.strip()] = values
    try:
        return read_ranges(None, table)
    except InputError as exc:
        raise InputError(None, "--range", exc.problem) from None


def _sampling(samples, seed):
    """The sampling options given (the library's defaults stand for the rest)."""
    return {k: v for k, v in (("samples", samples), ("seed", seed)) if v is not None}
