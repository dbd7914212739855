"""Data tables an alloy file points to: a tabulated driving force dGm(T)."""

from __future__ import annotations

import csv
import math
from pathlib import Path

import numpy as np

from ..constants import celsius_to_kelvin
from ..errors import InputError
from ..relations.driving_force import DrivingForceTable

DRIVING_FORCE_COLUMNS = ("temperature_C", "dGm_J_mol")


def read_driving_force_table(source, where, path: Path) -> DrivingForceTable:
    """A CSV with columns temperature_C, dGm_J_mol (others ignored) as a DrivingForceTable."""
    need = DRIVING_FORCE_COLUMNS
    try:
        with open(path, newline="", encoding="utf-8") as handle:
            rows = list(csv.reader(handle))
    except FileNotFoundError:
        raise InputError(source, where, f"table file {path} does not exist") from None
    except (OSError, UnicodeDecodeError, csv.Error) as exc:
        raise InputError(source, where, f"table file {path} cannot be read as CSV ({exc.__class__.__name__})") from None
    header = [h.strip() for h in rows[0]] if rows else []
    missing = [c for c in need if c not in header]
    if missing:
        raise InputError(source, where, f"table file {path} needs the columns {', '.join(need)}; missing {', '.join(missing)}")
    columns = [header.index(c) for c in need]
    values = []
    for row in rows[1:]:
        if not any(cell.strip() for cell in row):
            continue
        try:
            numbers = [float(row[j]) for j in columns]
        except (ValueError, IndexError):
            numbers = None
        if numbers is None or not all(math.isfinite(v) for v in numbers):
            raise InputError(source, where, f"table file {path} needs at least two rows of numbers in {', '.join(need)}")
        values.append(numbers)
    if len(values) < 2:
        raise InputError(source, where, f"table file {path} needs at least two rows of numbers in {', '.join(need)}")
    table = np.array(values)
    try:
        return DrivingForceTable(celsius_to_kelvin(table[:, 0]), table[:, 1])
    except ValueError as exc:
        raise InputError(source, where, f"table file {path}: {exc}") from None
