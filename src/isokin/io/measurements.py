"""Measured isothermal data for a calibration, read from CSV.

Two forms, told apart by their columns:

- fraction curves: ``temperature_C,time_s,fraction`` (one block per isotherm, as a
  dilatometer export gives after the lever-rule conversion);
- start and finish times: ``temperature_C,start_time_s,finish_time_s``, optionally with
  ``start_fraction`` and ``finish_fraction`` (the fractions they stand for; 0.01 and 0.99
  where not given).

A ``product`` column names the product each row measures; without it (or where it is empty)
a row measures the whole decomposition, as a dilatometer sees it.
"""

from __future__ import annotations

import csv
import hashlib
import io
from pathlib import Path

import numpy as np

from ..compute.fit import first_bad_point
from ..constants import celsius_to_kelvin, kelvin_to_celsius
from ..errors import InputError
from ..results import Measurements
from .schema import parse_number, read_input_file

CURVE_COLUMNS = ("temperature_C", "time_s", "fraction")
TIMES_COLUMNS = ("temperature_C", "start_time_s", "finish_time_s")
DEFAULT_START, DEFAULT_FINISH = 0.01, 0.99


def read_measurements(path, product_names=()):
    """The points of a measurement file, checked row by row; and the file's SHA-256."""
    path = Path(path)
    text = read_input_file(path, None, path, "measurement file")
    rows = [r for r in csv.reader(io.StringIO(text, newline="")) if r and not r[0].lstrip().startswith("#")]
    if not rows:
        raise InputError(path, None, "is empty; give a header and rows of measurements")
    header = [h.strip() for h in rows[0]]
    curves = all(c in header for c in CURVE_COLUMNS)
    times = all(c in header for c in TIMES_COLUMNS)
    if not (curves or times):
        raise InputError(path, None, f"needs the columns {', '.join(CURVE_COLUMNS)} (fraction curves) or "
                         f"{', '.join(TIMES_COLUMNS)} (start and finish times)")
    col = {name: header.index(name) for name in header}
    T, X, t, products, lines = [], [], [], [], []

    def number(row, name, line, default=None):
        if name not in col or col[name] >= len(row) or not row[col[name]].strip():
            if default is not None:
                return default
            raise InputError(path, f"row {line}", f"{name} is missing")
        value = parse_number(row[col[name]])
        if value is None:
            raise InputError(path, f"row {line}", f"{name} must be a plain finite decimal number, got "
                             f"{row[col[name]]!r}")
        return value

    for line, row in enumerate(rows[1:], start=2):
        if not any(cell.strip() for cell in row):
            continue
        product = row[col["product"]].strip() if "product" in col and col["product"] < len(row) else ""
        if product and product_names and product not in product_names:
            raise InputError(path, f"row {line}", f"unknown product '{product}'; this alloy has "
                             f"{', '.join(product_names)} (or leave it empty for the whole decomposition)")
        temperature = number(row, "temperature_C", line)
        if curves:
            pairs = [(number(row, "time_s", line), number(row, "fraction", line))]
        else:
            pairs = [(number(row, "start_time_s", line), number(row, "start_fraction", line, DEFAULT_START)),
                     (number(row, "finish_time_s", line), number(row, "finish_fraction", line, DEFAULT_FINISH))]
        for time_s, fraction in pairs:
            bad = first_bad_point(celsius_to_kelvin(temperature), fraction, time_s)
            if bad is not None:
                raise InputError(path, f"row {line}", bad[1])
            T.append(celsius_to_kelvin(temperature))
            X.append(fraction)
            t.append(time_s)
            products.append(product or None)
            lines.append(line)
    if not T:
        raise InputError(path, None, "holds no measurements")
    T, X, t = np.array(T), np.array(X), np.array(t)
    for key in sorted({(a, p or "") for a, p in zip(T, products)}):
        pick = np.nonzero((T == key[0]) & np.array([(p or "") == key[1] for p in products]))[0]
        order = pick[np.argsort(t[pick], kind="stable")]
        falling = np.nonzero(np.diff(X[order]) < 0)[0]
        if falling.size:
            raise InputError(path, f"row {lines[order[falling[0] + 1]]}", f"the fraction falls with time within the "
                             f"isotherm at {kelvin_to_celsius(key[0]):g} °C; a transformation does not go back")
    digest = hashlib.sha256(text.encode("utf-8")).hexdigest()
    return Measurements(T, X, t, tuple(products), source=str(path), rows=tuple(lines)), digest
