"""Checking input values, once, so the physics never sees a bad one.

One path per kind of value: numbers written as text (:func:`parse_number`, for options,
inline analyses and table cells), names (:func:`isokin.errors.text`), files (:func:`read_input_file`),
and typed TOML keys with ranges (:class:`Key`, :func:`read_table`).
"""

from __future__ import annotations

import difflib
import math
import os
import re
import stat
import tomllib
from dataclasses import dataclass
from pathlib import Path

from ..errors import NAME_LIMIT, InputError, text

#: A plain decimal number: ASCII digits, optional sign, point and exponent; no underscores,
#: no "inf" or "nan", no other scripts' digits.
_DECIMAL = re.compile(r"[+-]?(?:[0-9]+(?:\.[0-9]*)?|\.[0-9]+)(?:[eE][+-]?[0-9]+)?", re.ASCII)
_INTEGER = re.compile(r"[+-]?[0-9]+", re.ASCII)
#: Longest note, in characters (a name's limit is :data:`isokin.errors.NAME_LIMIT`).
NOTE_LIMIT = 2000
#: Largest alloy file and data table read, bytes: far above any real one.
FILE_LIMIT_BYTES = 1_000_000


def parse_number(text: str, integer: bool = False):
    """A finite plain decimal number from text, or None.

    >>> parse_number(" 0.79 "), parse_number("1e-3"), parse_number("0_4"), parse_number("inf"), parse_number("1e999")
    (0.79, 0.001, None, None, None)
    >>> parse_number("12", integer=True), parse_number("1.5", integer=True)
    (12, None)
    """
    text = text.strip(" \t")
    if not (_INTEGER if integer else _DECIMAL).fullmatch(text):
        return None
    if integer:
        return int(text)
    value = float(text)
    return value if math.isfinite(value) else None


#: Units a duration may carry, in seconds.
DURATION_UNITS_S = {"s": 1.0, "min": 60.0, "h": 3600.0, "d": 86400.0}
_DURATION = re.compile(r"\s*([0-9.eE+-]+)\s*(s|min|h|d)?\s*", re.ASCII)


def parse_duration(text: str):
    """A hold time in seconds from '90s', '30min', '2h', '1.5 d' or plain seconds; None if not one.

    >>> parse_duration("30min"), parse_duration("2h"), parse_duration("45"), parse_duration("3 weeks")
    (1800.0, 7200.0, 45.0, None)
    """
    match = _DURATION.fullmatch(text)
    if not match:
        return None
    number = parse_number(match.group(1))
    if number is None or number < 0:
        return None
    return number * DURATION_UNITS_S[match.group(2) or "s"]


def read_input_file(source, key, path: Path, what="file") -> str:
    """The text of a regular local file of at most :data:`FILE_LIMIT_BYTES`, as UTF-8.

    Devices, pipes and folders are refused (they may never end).
    """
    text = str(path)
    try:
        info = os.stat(path)
    except FileNotFoundError:
        raise InputError(source, key, f"{what} {text} does not exist" if key else "no such file") from None
    except OSError as exc:
        raise InputError(source, key, f"{what} {text} cannot be read ({exc.__class__.__name__})") from None
    if not stat.S_ISREG(info.st_mode):
        raise InputError(source, key, f"{what} {text} is not a regular file")
    if info.st_size > FILE_LIMIT_BYTES:
        raise InputError(source, key, f"{what} {text} is {info.st_size} bytes; the limit is {FILE_LIMIT_BYTES}")
    try:
        with open(path, "rb") as handle:
            data = handle.read(FILE_LIMIT_BYTES + 1)
        return data.decode("utf-8")
    except (OSError, UnicodeDecodeError) as exc:
        raise InputError(source, key, f"{what} {text} cannot be read ({exc.__class__.__name__})") from None


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
    limit: int = NAME_LIMIT  # longest text, characters


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
        text(label, value, key.limit, source=source)
    elif key.kind is list:
        if not isinstance(value, list) or len(value) > 100:
            raise InputError(source, label, f"must be a list (of at most 100 values), got {value!r}")
        return value
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
    """The tables of a TOML alloy file; InputError with one line for any failure."""
    text = read_input_file(path, None, path, "alloy file")
    try:
        return tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise InputError(path, None, f"is not valid TOML ({exc})") from None
    except RecursionError:
        raise InputError(path, None, "is nested too deeply to be an alloy file") from None
