"""Writing alloy files: the project's TOML format from a dict of tables (numbers, text, lists of tables)."""

from __future__ import annotations

import json
import math


def _value(value):
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, int):
        return str(value)
    if isinstance(value, float):
        if not math.isfinite(value):
            raise ValueError("an alloy file holds finite numbers only")
        return repr(value)
    if isinstance(value, str):
        return json.dumps(value, ensure_ascii=False)
    if isinstance(value, (list, tuple)) and all(not isinstance(v, dict) for v in value):
        return "[" + ", ".join(_value(v) for v in value) + "]"
    raise ValueError(f"cannot write {value!r} into an alloy file")


def dumps(tables: dict, header: str = "") -> str:
    """TOML text of ``tables``: top-level scalars first, then tables, then arrays of tables.

    >>> print(dumps({"alloy": {"name": "x"}, "steel": {"kinetics": {"ferrite": {"constant": 1.5}}}}), end="")
    [alloy]
    name = "x"
    <BLANKLINE>
    [steel.kinetics.ferrite]
    constant = 1.5
    """
    lines = [f"# {line}" if line else "#" for line in header.splitlines()]
    if lines:
        lines.append("")

    def table(prefix, content):
        scalars = {k: v for k, v in content.items() if not isinstance(v, dict)
                   and not (isinstance(v, list) and v and isinstance(v[0], dict))}
        if scalars:
            lines.append(f"[{prefix}]")
            lines.extend(f"{k} = {_value(v)}" for k, v in scalars.items())
            lines.append("")
        for k, v in content.items():
            if isinstance(v, dict):
                table(f"{prefix}.{k}", v)

    for name, content in tables.items():
        if isinstance(content, list):
            for item in content:
                lines.append(f"[[{name}]]")
                lines.extend(f"{k} = {_value(v)}" for k, v in item.items())
                lines.append("")
        else:
            table(name, content)
    return "\n".join(lines).rstrip("\n") + "\n"
