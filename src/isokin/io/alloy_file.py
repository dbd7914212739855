"""Reading an alloy file (TOML): the common tables here, each model's tables in its loader.

``[alloy] model`` picks the loader from :data:`MODEL_LOADERS`; a loader is a module with
``TABLES`` (the top-level tables it reads) and ``load(path, head, data) -> Alloy``.
"""

from __future__ import annotations

import difflib
import importlib
from pathlib import Path

from ..compute.grid import MAX_POINTS
from ..constants import celsius_to_kelvin
from ..errors import InputError
from .schema import NOTE_LIMIT, Key, parse_toml, read_table

#: Model name -> the module that reads its tables.
MODEL_LOADERS = {
    "nucleation-growth": "isokin.io.nucleation_growth_file",
    "steel": "isokin.io.steel_file",
}
ALLOY_KEYS = {
    "name": Key(str, required=True),
    "model": Key(str, required=True, choices=tuple(MODEL_LOADERS)),
    "note": Key(str, limit=NOTE_LIMIT),
}
DIAGRAM_KEYS = {
    "lower_temperature_C": Key(float, low=-273.15, low_open=True, unit="°C"),
    "upper_temperature_C": Key(float, low=-273.15, low_open=True, unit="°C"),
    "points": Key(int, low=3, high=MAX_POINTS),
}
COMMON_TABLES = ("alloy", "diagram", "calibration")
#: [calibration]: the record a fit leaves in a calibrated file (read back as it is, not used by the physics).
CALIBRATION_KEYS = {
    "data_file": Key(str, limit=1000), "data_sha256": Key(str), "date": Key(str), "isokin_version": Key(str),
    "free": Key(list), "fitted": Key(list), "model_values": Key(list), "interval_low": Key(list),
    "interval_high": Key(list), "confidence": Key(float, low=0.0, high=1.0), "loss": Key(str),
    "points": Key(int, low=0), "rms_ln_t": Key(float, low=0.0),
}


def _loaders():
    return {model: importlib.import_module(name) for model, name in MODEL_LOADERS.items()}


def load_alloy(path, kinetics_model=None):
    """Read an alloy file and build its :class:`~isokin.products.alloy.Alloy`.

    ``kinetics_model`` (a steel's) replaces the file's ``[steel] kinetics_model``. Raises
    InputError with one line naming the file, the key and what would be right.
    """
    path = Path(path)
    data = parse_toml(path)
    if kinetics_model is not None:
        data = _with_kinetics_model(path, data, kinetics_model)
    loaders = _loaders()
    known = COMMON_TABLES + tuple(t for m in loaders.values() for t in m.TABLES)
    for name in data:
        if name not in known:
            near = difflib.get_close_matches(name, known, n=1, cutoff=0.5)
            hint = f"did you mean [{near[0]}]?" if near else f"valid tables are {', '.join(known)}"
            raise InputError(path, name, f"unknown table; {hint}")
    if "alloy" not in data:
        raise InputError(path, "alloy", "required table [alloy] is missing")
    head = read_table(path, "alloy.", data["alloy"], ALLOY_KEYS)
    diagram = read_table(path, "diagram.", data.get("diagram", {}), DIAGRAM_KEYS)
    if "calibration" in data:
        read_table(path, "calibration.", data["calibration"], CALIBRATION_KEYS)
    loader = loaders[head["model"]]
    for model, other in loaders.items():
        for name in set(other.TABLES) - set(loader.TABLES):
            if name in data:
                raise InputError(path, name, f"belongs to model = '{model}'; this alloy is model = '{head['model']}'")
    alloy = loader.load(path, head, data)
    if "calibration" in data:
        alloy = alloy.replace(inputs={**alloy.inputs, "calibration": data["calibration"]})
    return _apply_diagram_range(path, alloy, diagram, data.get("diagram", {}))


def _with_kinetics_model(path, data, kinetics_model):
    """The file's tables with another steel kinetic model, where that can be (a model that does
    not exist is the argument's fault, not the file's)."""
    from ..products.steel import kinetics_model_key  # only here: loaders are imported by model

    kinetics_model_key(kinetics_model)
    steel = data.get("steel")
    if not isinstance(steel, dict) or data.get("alloy", {}).get("model") != "steel":
        raise InputError(path, "steel.kinetics_model", "a kinetic model is chosen for steels (model = 'steel') only")
    own = steel.get("kinetics_model")
    if "kinetics" in steel and own != kinetics_model:
        raise InputError(path, "steel.kinetics", f"overrides coefficients of the file's own kinetic model; they do not "
                         f"carry over to {kinetics_model!r}: remove them or keep the file's model")
    return {**data, "steel": {**steel, "kinetics_model": kinetics_model}}


def _apply_diagram_range(source, alloy, diagram: dict, raw: dict):
    lo, hi = alloy.default_range_K
    lo = celsius_to_kelvin(diagram["lower_temperature_C"]) if "lower_temperature_C" in diagram else lo
    hi = celsius_to_kelvin(diagram["upper_temperature_C"]) if "upper_temperature_C" in diagram else hi
    if not lo < hi:
        key = "upper_temperature_C" if "upper_temperature_C" in diagram else "lower_temperature_C"
        raise InputError(source, f"diagram.{key}", "the diagram's lower temperature must lie below its upper one")
    return alloy.replace(default_range_K=(lo, hi), inputs={**alloy.inputs, "diagram": dict(raw)},
                         default_points=diagram.get("points"))
