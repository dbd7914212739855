"""Data tables an alloy file points to: a tabulated driving force dGm(T)."""

from __future__ import annotations

import csv
import io
from pathlib import Path

import numpy as np

from ..compute.cooling import TEMPERATURE_C, measured
from ..constants import celsius_to_kelvin
from ..errors import InputError
from ..relations.driving_force import DrivingForceTable
from .schema import parse_number, read_input_file

DRIVING_FORCE_COLUMNS = ("temperature_C", "dGm_J_mol")
#: Plausible bounds of a table row: above absolute zero and below any metal's boiling point;
#: molar driving forces of solid-state and melting reactions stay far below 1 MJ/mol.
TEMPERATURE_RANGE_C = (-273.15, 5000.0)
DGM_LIMIT_J_MOL = 1.0e6


def _numeric_rows(source, key, path, what, columns):
    """(line, [numbers]) of a CSV's named columns: a header naming them, blank lines and lines
    starting with # skipped; a cell that is not a plain number is an error naming its line."""
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
    index = [header.index(c) for c in columns]
    for line, row in enumerate(rows[1:], start=2):
        if not any(cell.strip() for cell in row):
            continue
        numbers = [parse_number(row[j]) if j < len(row) else None for j in index]
        if None in numbers:
            raise InputError(source, key, f"{what} {path}, line {line}: {', '.join(columns)} must be plain finite "
                             "decimal numbers")
        yield line, numbers


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
