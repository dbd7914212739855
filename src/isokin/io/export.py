"""Files a plan can be built on: tidy CSV of the curves and a JSON summary.

Every file is written to a temporary name in the target folder and renamed into place, so
a crash never leaves half a file where a good one was.
"""

from __future__ import annotations

import csv
import json
import os
import tempfile
from contextlib import contextmanager
from pathlib import Path

import numpy as np

from .. import __version__
from ..constants import kelvin_to_celsius
from ..readout import CAUTION_SHORT
from ..results import PRACTICAL_HORIZON_S, TTTResult

CURVE_COLUMNS = ["product", "fraction", "temperature_C", "time_s"]


@contextmanager
def atomic_path(target: Path):
    """Yield a temporary path beside ``target``; rename it onto ``target`` on success."""
    target = Path(target)
    fd, tmp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=target.suffix, dir=target.parent)
    os.close(fd)
    try:
        yield Path(tmp)
        os.replace(tmp, target)
    finally:
        if os.path.exists(tmp):
            os.unlink(tmp)


def _cell(value):
    return f"{value:.6g}" if isinstance(value, (float, np.floating)) else str(value)


def write_curves_csv(result: TTTResult, target: Path):
    """The tidy curve table (``member`` first for a batch), written atomically."""
    columns = result.curve_columns()
    names = list(columns)
    with atomic_path(target) as tmp, open(tmp, "w", newline="", encoding="utf-8") as handle:
        writer = csv.writer(handle, lineterminator="\n")
        writer.writerow(names)
        writer.writerows([_cell(v) for v in row] for row in zip(*(columns[n].tolist() for n in names)))


def _temperature_C(t_k):
    return round(float(kelvin_to_celsius(t_k)), 3)


def summary(result: TTTResult) -> dict:
    """Noses, critical temperatures, inputs, model choices and version: enough to trace a plan back."""
    if result.batch_shape:
        raise ValueError("the summary describes one alloy; take result.member(i) of a batch")
    products = {}
    for name in result.products:
        entry = {"model": result.product_models[name], "upper_temperature_C": _temperature_C(result.upper_K[name]),
                 "fractions": {}}
        noses = result.noses[name]
        for k, x in enumerate(result.fractions):
            span = result.forming_range_C(name, k)
            record = {"forms": span is not None and bool(noses.forms[k])}
            if record["forms"]:
                record.update(
                    nose_temperature_C=round(float(noses.temperature_C[k]), 3),
                    nose_time_s=float(f"{float(noses.time_s[k]):.6g}"),
                    nose_inside_range=bool(noses.inside[k]),
                    lowest_temperature_C=round(span[0], 3),
                    highest_temperature_C=round(span[1], 3),
                )
            entry["fractions"][f"{x:g}"] = record
        products[name] = entry
    lines = {name: {"temperature_C": _temperature_C(t), "method": result.critical_methods.get(name, "")}
             for name, t in result.critical_K.items()}
    return {
        "isokin_version": __version__,
        "alloy": result.alloy,
        "model": result.model,
        "temperature_range_C": [_temperature_C(t) for t in result.temperatures_K[[0, -1]]],
        "points": int(result.temperatures_K.size),
        "practical_horizon_s": PRACTICAL_HORIZON_S,
        "fraction_meaning": "share of each product's own completion at the hold temperature",
        "critical_temperatures": lines,
        "products": products,
        "model_choices": result.provenance,
        "warnings": list(result.warnings),
        "inputs": result.inputs,
        "note": CAUTION_SHORT,
    }


def write_summary_json(result: TTTResult, target: Path):
    with atomic_path(target) as tmp:
        tmp.write_text(json.dumps(summary(result), indent=2, ensure_ascii=False) + "\n", encoding="utf-8")


def write_figure(fig, target: Path, dpi=150):
    """Write a matplotlib figure atomically; the format follows the extension (png, svg, pdf)."""
    target = Path(target)
    with atomic_path(target) as tmp:
        fig.savefig(tmp, dpi=dpi, format=target.suffix.lstrip("."))
