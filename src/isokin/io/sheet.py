"""The record a process sheet prints: which program, which file (by its SHA-256), which model
choices and which calibration made the numbers, so that a sheet in the heat-treat file can be
traced back to its input."""

from __future__ import annotations

import datetime
import hashlib
from pathlib import Path

from .. import __version__
from ..errors import InputError


def file_sha256(path) -> str:
    """SHA-256 of a file's bytes, in hex; InputError naming the file where it cannot be read."""
    path = Path(path)
    try:
        return hashlib.sha256(path.read_bytes()).hexdigest()
    except OSError as exc:
        raise InputError(path, "alloy_file", f"cannot be read ({exc.strerror or exc})") from None


def sheet_record(alloy, alloy_file=None, date=None) -> dict:
    """What a process sheet says of where its numbers come from.

    Parameters
    ----------
    alloy : Alloy
        The alloy the sheet is for.
    alloy_file : path, optional
        The alloy file it was read from: its name and SHA-256 go on the sheet. None for an
        analysis given in Python or on the command line.
    date : datetime.date, optional
        The day the sheet is made (default today, UTC).

    Returns
    -------
    dict
        ``isokin_version``, ``date`` (ISO), ``alloy_file`` and ``alloy_sha256`` (None without
        a file), ``description`` (the alloy's one line on its model and inputs),
        ``note`` (the file's own note), ``model_choices`` (method name -> choice),
        ``calibration`` (lines on the fit behind the kinetics, empty without one).
    """
    day = date or datetime.datetime.now(datetime.timezone.utc).date()
    provenance = alloy.provenance
    choices = {label: provenance[key] for label, key in (("kinetic model", "kinetics_model"),
                                                         ("Ms method", "ms_method"), ("Bs method", "bs_method"))
               if provenance.get(key)}
    return {
        "isokin_version": __version__,
        "date": day.isoformat(),
        "alloy_file": None if alloy_file is None else Path(alloy_file).name,
        "alloy_sha256": None if alloy_file is None else file_sha256(alloy_file),
        "description": alloy.footer,
        "note": alloy.inputs.get("alloy", {}).get("note", ""),
        "model_choices": choices,
        "calibration": _calibration_lines(alloy),
    }


def _calibration_lines(alloy) -> list:
    """The fit behind the kinetics in a few lines: a calibrated file's own record, or the
    calibration of another heat applied to this analysis."""
    own, applied = alloy.inputs.get("calibration"), alloy.provenance.get("calibration")
    record = applied or own
    if not record:
        return []
    lines = []
    if applied:
        lines.append(f"fitted to {record.get('reference_alloy', 'another heat')} ({Path(str(record.get('file', ''))).name}), "
                     "applied to this analysis")
    if record.get("data_file"):
        digest = record.get("data_sha256")
        lines.append(f"data {Path(str(record['data_file'])).name}" + (f", SHA-256 {digest}" if digest else ""))
    fitted = ", ".join(f"{name} = {value:.4g}" for name, value in zip(record.get("free", []), record.get("fitted", []))
                       if isinstance(value, (int, float)))
    if fitted:
        lines.append(f"fitted {fitted}")
    when = ", ".join(f"{label} {record[key]}" for label, key in (("on", "date"), ("by isokin", "isokin_version"),
                                                                  ("rms ln t", "rms_ln_t")) if key in record)
    if when:
        lines.append(when)
    return lines
