"""``isokin temper``: the hardness a temper gives, or the temper that gives a hardness."""

from __future__ import annotations

import math
from pathlib import Path
from typing import Annotated, Optional

import typer

from ..errors import InputError
from ..readout import format_duration
from .options import (AlloyArg, FigureFormat, FormatOpt, Inline, OutOpt, OverwriteOpt, Units, UnitsOpt, decimal_number,
                      duration, hardness_target, in_units, steel_options)
from .runner import Drawing, Outcome, load, run


@steel_options
def temper(
    alloy_file: AlloyArg = None,
    inline: Inline = None,
    curve: Annotated[Optional[Path], typer.Option("--curve", metavar="FILE", show_default=False,
                     help="The grade's measured tempering curve (CSV): temperature_C and hardness_HV or hardness_HRC, "
                          "and time_s where the tempers were not 1 h.")] = None,
    temperature_c: Annotated[Optional[list[float]], typer.Option(
        "--temperature-c", parser=decimal_number, metavar="NUMBER", help="Tempering temperature, °C; repeatable.")] = None,
    time: Annotated[Optional[list[str]], typer.Option(
        "--time", metavar="DURATION", help="Tempering time: 30min, 2h, 1.5d or seconds; repeatable.")] = None,
    target_hv: Annotated[Optional[str], typer.Option(
        "--target-hv", metavar="HV[:HV]", help="Find the temper for this hardness (or range, e.g. 300:340), with one "
        "--time (gives the temperature) or one --temperature-c (gives the time).")] = None,
    target_hrc: Annotated[Optional[str], typer.Option(
        "--target-hrc", metavar="HRC[:HRC]", help="As --target-hv, in Rockwell C (e.g. 30:34).")] = None,
    out: OutOpt = Path("isokin-out"),
    fmt: FormatOpt = FigureFormat.png,
    overwrite: OverwriteOpt = False,
    units: UnitsOpt = Units.C,
):
    """Tempering: the hardness of a temper, or the temper that reaches a hardness.

    Carries the grade's measured tempering curve (--curve) to other times and temperatures
    by the Hollomon-Jaffe parameter, with the constant from the steel's carbon. With
    --temperature-c and --time: the hardness of every such temper. With --target-hv or
    --target-hrc: the temperature for one --time, or the time at one --temperature-c.
    Tempers from 250 to 400 °C are flagged (tempered-martensite embrittlement). Writes
    <stem>-temper.json, <stem>-temper.csv and <stem>-temper.png (hardness against tempering
    temperature for each time) into --out.
    """

    def solve(alloy, stem):
        import numpy as np

        from ..constants import kelvin_to_celsius
        from ..compute.temper import (EMBRITTLEMENT_CAUTION, EMBRITTLEMENT_RANGE_C, temper as temper_at,
                                      temper_for_hardness, tempering_lines)
        from ..io.export import write_temper_csv, write_temper_json
        from ..io.tables import read_tempering_curve

        if curve is None:
            raise InputError(None, "--curve", "give the grade's measured tempering curve, a CSV with temperature_C "
                             "and hardness_HV (or hardness_HRC): the hardness after tempering is read from it")
        measured = read_tempering_curve(curve, None, "--curve")
        seconds = [duration(text, "--time") for text in time or []]
        temperatures = list(temperature_c or [])
        target = hardness_target(target_hv, target_hrc)
        if target is None:
            if not temperatures or not seconds:
                raise InputError(None, "--time", "give --temperature-c and --time (the hardness of those tempers), "
                                 "or a --target-hv / --target-hrc")
            T, t = np.meshgrid(temperatures, seconds, indexing="ij")
            result = temper_at(alloy, T.ravel(), t.ravel(), measured)
        else:
            if len(seconds) + len(temperatures) != 1:
                raise InputError(None, "--time", "with a target hardness give one --time (to find the temperature) "
                                 "or one --temperature-c (to find the time)")
            result = temper_for_hardness(alloy, target, measured, time_s=seconds[0] if seconds else None,
                                         temperature_C=temperatures[0] if temperatures else None)
        cautions = (EMBRITTLEMENT_CAUTION,) if np.any(result.embrittlement) else ()
        shown = sorted({float(t) for t in result.times_s if np.isfinite(t)}) or [measured.time_s[0]]
        T_line, hv_lines = tempering_lines(alloy, measured, shown[:5])

        def draw():
            from ..plot.temper import tempering_figure
            from ..readout import format_duration as text

            lines = [(f"{text(t)} temper", T_line, hv) for t, hv in zip(shown, hv_lines)]
            points = (kelvin_to_celsius(measured.temperature_K), measured.hardness_HV,
                      f"measured tempers ({measured.source})")
            target = marks = None
            if result.target_HV is not None:
                target = (float(result.target_HV.min()), float(result.target_HV.max()))
                found = np.isfinite(result.temperatures_C) & np.isfinite(result.hardness_HV)
                marks = ("found", list(zip(result.temperatures_C[found], result.hardness_HV[found])))
            return tempering_figure(lines, points, f"Tempering: {alloy.name}", units.value, target_HV=target,
                                    marks=marks, embrittlement_C=EMBRITTLEMENT_RANGE_C,
                                    footer=f"Hollomon-Jaffe parameter, C = {result.constant:.2f}.")

        return Outcome(lambda: _print(alloy, result, units), result.warnings,
                       {out / f"{stem}-temper.json": lambda p: write_temper_json(result, p),
                        out / f"{stem}-temper.csv": lambda p: write_temper_csv(result, p),
                        out / f"{stem}-temper.{fmt.value}": Drawing(draw)}, cautions)

    run(lambda: load(alloy_file, inline), solve, overwrite=overwrite,
        keys={"hardness_HV": "--target-hv" if target_hrc is None else "--target-hrc"})


def _print(alloy, result, units):
    from ..relations.hardness import hrc_from_hv_astm_e140

    typer.echo(f"{alloy.name}: tempers by the Hollomon-Jaffe parameter P = T_K (C + log10 t_h), C = "
               f"{result.constant:.2f}; hardness from {result.curve.source}")
    typer.echo(f"  {'temperature':>12}  {'time':>10}  {'P':>7}  {'as 1 h at':>10}  {'HV':>5}  {'HRC':>5}")
    for k in range(result.temperatures_C.size):
        T, t, hv = (float(v[k]) for v in (result.temperatures_C, result.times_s, result.hardness_HV))
        hrc = float(hrc_from_hv_astm_e140(hv))
        cells = [in_units(T, units) if math.isfinite(T) else "-", format_duration(t) if math.isfinite(t) else "-",
                 f"{result.parameter[k]:.0f}" if math.isfinite(result.parameter[k]) else "-",
                 in_units(float(result.equivalent_1h_C[k]), units) if math.isfinite(result.equivalent_1h_C[k]) else "-",
                 f"{hv:.0f}" if math.isfinite(hv) else "-", f"{hrc:.1f}" if math.isfinite(hrc) else "-"]
        flag = "  embrittlement range" if result.embrittlement[k] else ""
        typer.echo(f"  {cells[0]:>12}  {cells[1]:>10}  {cells[2]:>7}  {cells[3]:>10}  {cells[4]:>5}  {cells[5]:>5}"
                   + flag)
