"""The alloy-file schema: typed keys with ranges, checked once so the physics never sees a bad value."""

from __future__ import annotations

import difflib
import math
import tomllib
from dataclasses import dataclass
from pathlib import Path

from ..errors import InputError


@dataclass(frozen=True)
class Key:
    """One key of a table: its type, whether it is required, and its allowed range."""

    kind: type
    required: bool = False
    low: float | None = None
    high: float | None = None
    low_open: bool = False  # True: the value must be strictly greater than low
    choices: tuple = ()
    unit: str = ""


def _check_value(source, where, name, key: Key, value):
    label = f"{where}{name}"
    if key.kind is float:
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            raise InputError(source, label, f"must be a number{' in ' + key.unit if key.unit else ''}, got {value!r}")
        value = float(value)
        if not math.isfinite(value):
            raise InputError(source, label, f"must be a finite number, got {value!r}")
    elif key.kind is int:
        if isinstance(value, bool) or not isinstance(value, int):
            raise InputError(source, label, f"must be a whole number, got {value!r}")
    elif key.kind is str:
        if not isinstance(value, str) or not value.strip():
            raise InputError(source, label, f"must be a non-empty text, got {value!r}")
    if key.choices and value not in key.choices:
        raise InputError(source, label, f"must be one of {', '.join(map(repr, key.choices))}, got {value!r}")
    unit = f" {key.unit}" if key.unit else ""
    if key.low is not None and (value <= key.low if key.low_open else value < key.low):
        rel = ">" if key.low_open else ">="
        raise InputError(source, label, f"must be {rel} {key.low:g}{unit}, got {value:g}")
    if key.high is not None and value > key.high:
        raise InputError(source, label, f"must be <= {key.high:g}{unit}, got {value:g}")
    return value


def read_table(source, where, table, schema: dict):
    """Check one TOML table against its schema; return the values, typed, with defaults absent."""
    if not isinstance(table, dict):
        raise InputError(source, where.rstrip(". "), "must be a table")
    for name in table:
        if name not in schema:
            near = difflib.get_close_matches(name, list(schema), n=1, cutoff=0.5)
            hint = f"did you mean '{near[0]}'?" if near else f"valid keys are {', '.join(schema)}"
            raise InputError(source, f"{where}{name}", f"unknown key; {hint}")
    out = {}
    for name, key in schema.items():
        if name in table:
            out[name] = _check_value(source, where, name, key, table[name])
        elif key.required:
            raise InputError(source, f"{where}{name}", "required key is missing")
    return out


def parse_toml(path: Path):
    try:
        text = path.read_text(encoding="utf-8")
    except FileNotFoundError:
        raise InputError(path, None, "no such file") from None
    except (OSError, UnicodeDecodeError) as exc:
        raise InputError(path, None, f"cannot be read ({exc.__class__.__name__})") from None
    try:
        return tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise InputError(path, None, f"is not valid TOML ({exc})") from None
