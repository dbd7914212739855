"""The sequence every command follows: read the input, call the library, write the files of the
run together, then report.

Bad input ends a command with one line on stderr and exit code 2, before anything is written.
"""

from __future__ import annotations

import os
import re
import warnings
from pathlib import Path
from typing import Optional

import typer

from ..errors import InputError
from ..readout import CAUTION
from .options import Inline
from .status import status

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
    "seed": "--seed",
    "temperature_C": "--temperature-c",
    "time_s": "--time",
    "quench_to_C": "--quench-to-c",
    "rate_K_s": "--rate",
    "rates_K_s": "--rates",
    "start_C": "--start-c",
    "medium_C": "--medium-c",
    "time_constant_s": "--time-constant-s",
    "thickness_m": "--thickness-mm",
    "heat_transfer_W_m2K": "--htc",
    "shape": "--shape",
    "bootstrap": "--bootstrap",
    "times_s": "--times",
    "name": "--name",
    "target_hv": "--target-hv",
}


def fail(error, keys=None):
    """One line on stderr and exit 2; a library key not from a file is named as its option
    (``keys``: a command's own options for library keys, beside :data:`OPTION_NAMES`)."""
    if isinstance(error, InputError) and not error.source:
        error = error.relocated(keys={**OPTION_NAMES, **(keys or {})})
    status.finish()
    typer.echo(f"isokin: error: {error}", err=True)
    raise typer.Exit(2)


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


def file_stem(text: str) -> str:
    """A file stem from a name: lower case, runs of other characters as one hyphen."""
    return re.sub(r"[^a-z0-9.]+", "-", text.lower()).strip("-.") or "heat"


def load(alloy_file: Optional[Path], inline: Inline):
    """The alloy and its output stem, from a file or an inline heat analysis."""
    if inline.composition is None:
        if alloy_file is None:
            raise InputError(None, "ALLOY", "name an alloy file (alloys/*.toml) or give --composition \"C=0.8,Mn=0.7\"")
        option = next(iter(inline.given()), None)
        if option is not None:
            raise InputError(None, option, "goes with --composition; an alloy file sets it itself")
        from ..io.alloy_file import load_alloy

        alloy = load_alloy(alloy_file, kinetics_model=inline.kinetics)
        stem = alloy_file.stem if not alloy_file.stem.startswith(".") else file_stem(alloy.name)
        return alloy, stem
    if alloy_file is not None:
        raise InputError(None, "--composition", "give either an alloy file or --composition, not both")
    from ..products.steel import steel

    composition = parse_inline_composition(inline.composition)
    calibration = None
    if inline.calibration is not None:
        from ..io.steel_file import load_calibration

        calibration = load_calibration(inline.calibration)
    alloy = steel(composition, inline.grain_size, name=inline.name, austenitizing_temperature_C=inline.austenitizing_c,
                  ms_method=inline.ms_method, bs_method=inline.bs_method, kinetics_model=inline.kinetics,
                  calibration=calibration)
    stem = file_stem(inline.name or "heat " + " ".join(f"{k}{v:g}" for k, v in composition.items()))
    return alloy, stem


class Drawing:
    """The writer of a figure file: ``draw()`` makes the figure, saved in the format of the file's suffix."""

    def __init__(self, draw):
        self.draw = draw


class Outcome:
    """What a command's run gives, for :func:`run` to write and report.

    ``show()`` prints the command's own table. ``warnings`` are lines for stderr. ``files`` maps
    each output path (all in one folder) to the function that writes the file at the path it is
    given, or to the :class:`Drawing` of the figure, in the order the 'wrote' lines list them.
    ``cautions`` of the run are printed before the general one.
    """

    def __init__(self, show, warnings=(), files=None, cautions=()):
        self.show, self.warnings, self.files, self.cautions = show, warnings, files or {}, cautions


def run(load, solve, *, overwrite=False, keys=None):
    """Run a command: ``load()`` gives (alloy, output stem) and ``solve(alloy, stem)`` calls the
    library and returns the :class:`Outcome`, whose files are then claimed. An InputError in any
    of this (``keys`` names the command's options for library keys) ends the command with one
    line and exit code 2, and nothing is written.

    Then, in this order: the warnings; the files, written together or not at all; the command's
    table; a line per file written; the run's own cautions and the general caution.
    """
    try:
        alloy, stem = load()
        outcome = solve(alloy, stem)
        _claim(list(outcome.files), overwrite)
    except InputError as exc:
        fail(exc, keys)
    status.finish()
    for line in outcome.warnings:
        typer.echo(f"isokin: warning: {line}", err=True)
    if outcome.files:
        _write_run(outcome.files, overwrite)
    outcome.show()
    for path in outcome.files:
        typer.echo(f"wrote {path}")
    for caution in outcome.cautions:
        typer.echo(caution)
    typer.echo(CAUTION)


#: Bytes a temporary name adds to an output file's name (io.export.write_outputs: a dot, the
#: name, a dot, eight random characters and the suffix again).
_TEMPORARY_EXTRA = 24


def _claim(paths: list, overwrite: bool):
    """The folder of the output files is created and writable, and (without --overwrite) none of
    them exists; InputError otherwise."""
    if not paths:
        return
    out = paths[0].parent
    try:
        out.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise InputError(None, "--out", f"cannot create folder {out} ({exc.strerror})") from None
    if not out.is_dir() or not os.access(out, os.W_OK | os.X_OK):
        raise InputError(None, "--out", f"folder {out} is not writable; choose another with --out")
    try:
        limit = os.pathconf(out, "PC_NAME_MAX")
    except (OSError, ValueError):
        limit = 255
    for path in paths:  # each file is first written under a temporary name a few bytes longer
        if len(path.name.encode("utf-8")) + _TEMPORARY_EXTRA > limit:
            raise InputError(None, "--out", f"the output name {path.name[:24]}... is {len(path.name.encode())} bytes, too "
                             f"long for this file system ({limit}); shorten the alloy file's name or the output name")
    existing = [str(p) for p in paths if p.exists() or p.is_symlink()]
    if existing and not overwrite:
        raise InputError(None, "--out", f"{existing[0]} exists; pass --overwrite to replace it, or choose another --out")


def _write_run(files: dict, overwrite: bool):
    """All files of a run together (see :func:`_write`); the figure among them is drawn with the
    non-interactive Agg backend, written first, then closed."""
    out = next(iter(files)).parent
    figure = next((path for path, writer in files.items() if isinstance(writer, Drawing)), None)
    if figure is None:
        return _write(files, out, overwrite)
    # before the status line: loading pyplot counts toward the status's quiet first second, as it always has
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    from ..io.export import write_figure

    try:
        status("drawing the figure and writing the files")
        with warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("always")
            drawn = files[figure].draw()
            try:
                _write({figure: lambda p: write_figure(drawn, p, figure.suffix[1:]),
                        **{path: writer for path, writer in files.items() if path != figure}}, out, overwrite)
            finally:
                plt.close(drawn)
    finally:
        status.finish()
    _figure_warnings(caught)


#: matplotlib's warning for a character its font cannot draw (it draws an empty box instead).
_MISSING_GLYPH = re.compile(r"Glyph (\d+) \(.*\) missing from font")


def _figure_warnings(caught):
    """Characters of a name the figure's font lacks, as one isokin warning line; any other
    warning passes on as it came."""
    missing = []
    for w in caught:
        match = _MISSING_GLYPH.search(str(w.message))
        if not match:
            warnings.warn_explicit(w.message, w.category, w.filename, w.lineno)
        elif chr(int(match.group(1))) not in missing:
            missing.append(chr(int(match.group(1))))
    if missing:
        typer.echo(f"isokin: warning: the figure's font has no character for {' '.join(missing)}; the figure shows an "
                   "empty box in its place (the files keep the name as given)", err=True)


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
