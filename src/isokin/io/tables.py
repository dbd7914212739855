"""Data tables an alloy file points to: a tabulated driving force dGm(T)."""

from __future__ import annotations

import csv
import io
from pathlib import Path

import numpy as np

from ..compute.cooling import TEMPERATURE_C, measured
from ..compute.section import BAND_DISTANCE_UNITS, band_rows_wrong
from ..constants import celsius_to_kelvin
from ..errors import InputError
from ..relations.driving_force import DrivingForceTable
from .schema import parse_number, read_input_file

DRIVING_FORCE_COLUMNS = ("temperature_C", "dGm_J_mol")
#: Plausible bounds of a table row: above absolute zero and below any metal's boiling point;
#: molar driving forces of solid-state and melting reactions stay far below 1 MJ/mol.
TEMPERATURE_RANGE_C = (-273.15, 5000.0)
DGM_LIMIT_J_MOL = 1.0e6


def _numeric_rows(source, key, path, what, columns, optional=()):
    """(line, [numbers]) of a CSV's named columns: a header naming them, blank lines and lines
    starting with # skipped; a cell that is not a plain number is an error naming its line.
    ``optional`` columns follow the required ones, None where the header lacks them."""
    text = read_input_file(source, key, path, what)
    try:
        rows = [r for r in csv.reader(io.StringIO(text, newline="")) if r and not r[0].lstrip().startswith("#")]
    except csv.Error as exc:
        raise InputError(source, key, f"{what} {path} cannot be read as CSV ({exc})") from None
    header = [h.strip() for h in rows[0]] if rows else []
    missing = [c for c in columns if c not in header]
    if missing:
        raise InputError(source, key, f"{what} {path} needs a header with {', '.join(columns)}; missing "
                         f"{', '.join(missing)}")
    present = [c for c in optional if c in header]
    index = [header.index(c) for c in (*columns, *present)]
    for line, row in enumerate(rows[1:], start=2):
        if not any(cell.strip() for cell in row):
            continue
        numbers = [parse_number(row[j]) if j < len(row) else None for j in index]
        if None in numbers:
            raise InputError(source, key, f"{what} {path}, line {line}: {', '.join((*columns, *present))} must be "
                             "plain finite decimal numbers")
        found = dict(zip(present, numbers[len(columns):]))
        yield line, numbers[:len(columns)] + [found.get(c) for c in optional]


def read_driving_force_table(source, where, path: Path) -> DrivingForceTable:
    """A CSV with columns temperature_C, dGm_J_mol (others ignored) as a DrivingForceTable."""
    need = DRIVING_FORCE_COLUMNS
    values = []
    for line, numbers in _numeric_rows(source, where, path, "table file", need):
        t_c, g = numbers
        if not (TEMPERATURE_RANGE_C[0] < t_c <= TEMPERATURE_RANGE_C[1] and abs(g) <= DGM_LIMIT_J_MOL):
            raise InputError(source, where, f"table file {path}, line {line}: temperature_C must lie above "
                             f"{TEMPERATURE_RANGE_C[0]:g} and at most {TEMPERATURE_RANGE_C[1]:g}, and |dGm_J_mol| "
                             f"at most {DGM_LIMIT_J_MOL:g}")
        values.append(numbers)
    if len(values) < 2:
        raise InputError(source, where, f"table file {path} needs at least two rows of numbers in {', '.join(need)}")
    table = np.array(values)
    try:
        return DrivingForceTable(celsius_to_kelvin(table[:, 0]), table[:, 1])
    except ValueError as exc:
        raise InputError(source, where, f"table file {path}: {exc}") from None


LOG_COLUMNS = ("time_s", "temperature_C")


def read_cooling_log(path: Path, source=None, key="log"):
    """A logged cooling path from a CSV with columns time_s, temperature_C (others ignored).

    Rows may come in any order and repeat a time (they are averaged); blank lines and lines
    starting with # are skipped; a cell that is not a plain number, or a temperature outside
    :data:`isokin.compute.cooling.TEMPERATURE_C`, is an error naming its line. The log as a
    whole meets the rules of :func:`isokin.compute.cooling.measured` (rows, span, speed).
    ``source`` and ``key`` name where the log was given, for the error message.
    """
    values = []
    for line, numbers in _numeric_rows(source, key, path, "cooling log", LOG_COLUMNS):
        if TEMPERATURE_C.outside(numbers[1]):
            raise InputError(source, key, f"cooling log {path}, line {line}: temperature_C {TEMPERATURE_C.rule}, "
                             f"got {numbers[1]!r}")
        values.append(numbers)
    table = np.array(values) if values else np.zeros((0, 2))
    try:
        return measured(table[:, 0], table[:, 1], label=Path(path).name)
    except InputError as exc:
        raise InputError(source, key, f"cooling log {path}: {exc.key} {exc.problem}") from None


TEMPERING_COLUMNS = ("temperature_C",)
TEMPERING_OPTIONAL = ("hardness_HV", "hardness_HRC", "time_s")


def read_tempering_curve(path: Path, source=None, key="curve"):
    """A measured tempering curve from a CSV: temperature_C and hardness_HV or hardness_HRC
    (Rockwell C converted by ASTM E140), and time_s where the tempers were not 1 h each.
    Blank lines and lines starting with # are skipped."""
    from ..compute.temper import DEFAULT_CURVE_TIME_S, tempering_curve
    from ..relations.hardness import hv_from_hrc_astm_e140

    rows = [numbers for _, numbers in _numeric_rows(source, key, path, "tempering curve", TEMPERING_COLUMNS,
                                                     TEMPERING_OPTIONAL)]
    table = np.array(rows, dtype=float) if rows else np.zeros((0, 4))
    hv, hrc, time_s = table[:, 1], table[:, 2], table[:, 3]
    if np.isnan(hv).all() == np.isnan(hrc).all():
        raise InputError(source, key, f"tempering curve {path} needs one hardness column: hardness_HV or hardness_HRC")
    if np.isnan(hv).all():
        if np.any((hrc < 20.0) | (hrc > 68.0)):
            raise InputError(source, key, f"tempering curve {path}: hardness_HRC must lie from 20 to 68 (the "
                             "Rockwell C scale); give softer tempers in hardness_HV")
        hv = hv_from_hrc_astm_e140(hrc)
    times = DEFAULT_CURVE_TIME_S if np.isnan(time_s).all() else time_s
    try:
        return tempering_curve(table[:, 0], hv, times, source=Path(path).name)
    except InputError as exc:
        where = f"{exc.key} " if exc.key else ""
        raise InputError(source, key, f"tempering curve {path}: {where}{exc.problem}") from None


BAND_COLUMNS = ("hrc_min", "hrc_max")


def read_hardness_band(path: Path, source=None, key="band"):
    """A hardenability band from a CSV: a distance column (``distance_sixteenths_in`` or
    ``distance_mm``) and ``hrc_min``, ``hrc_max``; returns (distance_m, hrc_min, hrc_max)."""
    text = read_input_file(source, key, path, "band file")
    header = next((line for line in text.splitlines() if line.strip() and not line.lstrip().startswith("#")), "")
    names = [h.strip() for h in header.split(",")]
    unit = next((name for name in BAND_DISTANCE_UNITS if name in names), None)
    if unit is None:
        raise InputError(source, key, f"band file {path} needs a distance column: distance_sixteenths_in or "
                         "distance_mm")
    rows = []
    for line, (d, lo, hi) in _numeric_rows(source, key, path, "band file", (unit, *BAND_COLUMNS)):
        if band_rows_wrong(np.array(d * BAND_DISTANCE_UNITS[unit]), np.array(lo), np.array(hi)):
            raise InputError(source, key, f"band file {path}, line {line}: the distance must lie on the 100 mm bar "
                             "and 0 <= hrc_min <= hrc_max <= 70")
        rows.append((d * BAND_DISTANCE_UNITS[unit], lo, hi))
    if not rows:
        raise InputError(source, key, f"band file {path} has no rows")
    return tuple(np.array(v) for v in zip(*sorted(rows)))


HTC_COLUMNS = ("temperature_C", "htc_W_m2K")


def read_htc_table(path: Path, source=None, key="htc_table"):
    """A quenchant's heat-transfer coefficient against the surface temperature, from a CSV with
    columns temperature_C, htc_W_m2K (others ignored); returns (temperature_C, htc_W_m2K),
    sorted by temperature."""
    rows = []
    for line, (t_c, h) in _numeric_rows(source, key, path, "heat-transfer table", HTC_COLUMNS):
        if not (-273.15 < t_c <= TEMPERATURE_RANGE_C[1] and 0.0 < h <= 1.0e6):
            raise InputError(source, key, f"heat-transfer table {path}, line {line}: temperature_C must lie above "
                             "-273.15 and htc_W_m2K between 0 and 1e6 (exclusive of 0)")
        rows.append((t_c, h))
    t_c = np.array([r[0] for r in rows])
    if np.unique(t_c).size < 2 or np.unique(t_c).size != t_c.size:
        raise InputError(source, key, f"heat-transfer table {path} needs two or more rows with distinct temperatures")
    order = np.argsort(t_c)
    return t_c[order], np.array([r[1] for r in rows])[order]
