"""Files a plan can be built on: tidy CSV of the curves and a JSON summary.

Every file is written to a temporary name in the target folder and renamed into place, so
a crash never leaves half a file where a good one was.
"""

from __future__ import annotations

import json
import os
import tempfile
from contextlib import contextmanager
from pathlib import Path

from . import __version__
from .constants import kelvin_to_celsius
from .diagram import PRACTICAL_HORIZON_S, Diagram
from .readout import CAUTION_SHORT

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


def write_curves_csv(diagram: Diagram, target: Path):
    with atomic_path(target) as tmp:
        diagram.curves()[CURVE_COLUMNS].to_csv(tmp, index=False, float_format="%.6g")


def summary(diagram: Diagram, alloy) -> dict:
    """Noses, critical temperatures, inputs and version: enough to trace a plan back."""
    products = {}
    for product in diagram.products:
        entry = {"model": product.model, "fractions": {}}
        upper = float(product.upper_K)
        entry["upper_temperature_C"] = round(float(kelvin_to_celsius(upper)), 3)
        for k, x in enumerate(diagram.fractions):
            nose = next((n for n in diagram.noses if n.product == product.name and n.fraction == x), None)
            span = diagram.forming_range_C(product.name, k)
            record = {"forms": span is not None and nose is not None and nose.time_s <= PRACTICAL_HORIZON_S}
            if record["forms"]:
                record.update(
                    nose_temperature_C=round(nose.temperature_C, 3),
                    nose_time_s=float(f"{nose.time_s:.6g}"),
                    nose_inside_range=nose.inside,
                    lowest_temperature_C=round(span[0], 3),
                    highest_temperature_C=round(span[1], 3),
                )
            entry["fractions"][f"{x:g}"] = record
        products[product.name] = entry
    lines = {
        name: {"temperature_C": round(float(kelvin_to_celsius(t)), 3), "method": alloy.line_methods.get(name, "")}
        for name, t in alloy.lines_K.items()
    }
    return {
        "isokin_version": __version__,
        "alloy": alloy.name,
        "model": alloy.model,
        "temperature_range_C": [round(float(kelvin_to_celsius(t)), 3) for t in diagram.temperatures_K[[0, -1]]],
        "points": int(diagram.temperatures_K.size),
        "practical_horizon_s": PRACTICAL_HORIZON_S,
        "critical_temperatures": lines,
        "products": products,
        "warnings": list(alloy.warnings),
        "inputs": alloy.inputs,
        "note": CAUTION_SHORT,
    }


def write_summary_json(diagram: Diagram, alloy, target: Path):
    with atomic_path(target) as tmp:
        tmp.write_text(json.dumps(summary(diagram, alloy), indent=2, ensure_ascii=False) + "\n", encoding="utf-8")
