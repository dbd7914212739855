"""``isokin fit``: an alloy calibrated to measured isothermal holds."""

from __future__ import annotations

import math
from pathlib import Path
from typing import Annotated, Optional

import typer

from ..errors import InputError
from .options import OverwriteOpt, Units, UnitsOpt, in_units, whole_number
from .runner import Drawing, Outcome, run
from .status import status


def fit(
    data_file: Annotated[Optional[Path], typer.Argument(metavar="MEASUREMENTS.csv", show_default=False,
                                                        help="Measurements (CSV): temperature_C,time_s,fraction or "
                                                             "temperature_C,start_time_s,finish_time_s "
                                                             "[,product].")] = None,
    alloy_file: Annotated[Optional[Path], typer.Option("--alloy", metavar="ALLOY.toml", help="The alloy file to calibrate.")] = None,
    out: Annotated[Optional[Path], typer.Option("--out", metavar="FILE.toml", help="The calibrated alloy file to write (never the "
                                                "input).")] = None,
    free: Annotated[Optional[list[str]], typer.Option("--free", metavar="PRODUCT.PARAMETER",
                    help="A parameter to fit, repeatable, e.g. bainite.factor (default: a factor per product "
                         "seen in the data).")] = None,
    bootstrap: Annotated[Optional[int], typer.Option("--bootstrap", parser=whole_number, metavar="N",
                         help="Also percentile intervals from N resamples of the points (e.g. 200; at most 2,000, "
                              "and N x (free parameters + 1) x points at most 2 million).")] = None,
    plain: Annotated[bool, typer.Option("--plain-least-squares", metavar="", help="Plain least squares instead of the robust "
                                        "loss.")] = False,
    overwrite: OverwriteOpt = False,
    units: UnitsOpt = Units.C,
):
    """Calibrate an alloy to measured isothermal holds (dilatometry): fit, intervals, calibrated file.

    Writes the calibrated alloy file (--out), <out>-fit.json (parameters with 95 % intervals,
    residuals, Avrami exponents) and <out>-fit.png (points over the fitted curves with their
    band, residuals).
    """

    def load():
        from ..io.alloy_file import load_alloy

        if data_file is None:
            raise InputError(None, "MEASUREMENTS.csv", "name the measurements to fit, e.g. isokin fit holds.csv --alloy "
                             "alloys/my-steel.toml --out my-steel-calibrated.toml")
        if alloy_file is None:
            raise InputError(None, "--alloy", "name the alloy file to calibrate, e.g. --alloy alloys/my-steel.toml")
        if out is None:
            raise InputError(None, "--out", "name the calibrated file to write, e.g. --out my-steel-calibrated.toml")
        if out.resolve() == alloy_file.resolve():
            raise InputError(None, "--out", "is the input alloy file; a calibration never overwrites its input")
        if out.suffix != ".toml":
            raise InputError(None, "--out", f"must be a .toml file, got {out.name}")
        return load_alloy(alloy_file), out.stem

    def solve(alloy, stem):
        from datetime import datetime, timezone

        from ..compute import fit as fitting
        from ..io.export import calibrated_file, fit_report, write_json
        from ..io.measurements import read_measurements

        data, digest = read_measurements(data_file, [p.name for p in alloy.products])
        status("fitting")
        result = fitting.fit(alloy, data, free=free or None, loss="linear" if plain else "soft_l1",
                             bootstrap=bootstrap or 0,
                             progress=lambda done, total: status("bootstrap resamples", done, total))
        date = datetime.now(timezone.utc).replace(microsecond=0).isoformat()
        text = calibrated_file(result, data_file.name, digest, date)

        def draw():
            from ..plot.fit import fit_figure, shown_fractions

            fractions = shown_fractions(result.data.fraction)
            return fit_figure(result, fitting.band(result, fractions=fractions), fractions, units=units.value)

        return Outcome(lambda: _print_fit(alloy, data, result, units), (), {
            out: lambda p: p.write_text(text, encoding="utf-8"),
            out.with_name(f"{stem}-fit.json"): lambda p: write_json(fit_report(result, data_file.name, digest, date), p),
            out.with_name(f"{stem}-fit.png"): Drawing(draw)})

    run(load, solve, overwrite=overwrite, keys={"free": "--free", "data": "DATA"})


def _print_fit(alloy, data, result, units):
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
        typer.echo(f"  Avrami exponent at {in_units(a['temperature_C'], units)} ({a['product']}): measured "
                   f"{a['measured_n']:.2f}, model {a['model_n']:.2f}")
