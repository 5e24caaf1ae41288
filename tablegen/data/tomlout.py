"""A small TOML writer for the gasdata format (tomllib reads, nothing in the
standard library writes). Floats are written with repr(), the shortest text that
reads back to the same double, so a record survives a round trip bit for bit."""

from __future__ import annotations

import math
import re

_BARE = re.compile(r"^[A-Za-z0-9_-]+$")


def _key(k: str) -> str:
    return k if _BARE.match(k) else _str(k)


def _str(s: str) -> str:
    out = s.replace("\\", "\\\\").replace('"', '\\"').replace("\n", "\\n").replace("\t", "\\t")
    return f'"{out}"'


def value(v) -> str:
    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, int):
        return str(v)
    if isinstance(v, float):
        if math.isnan(v) or math.isinf(v):
            raise ValueError("TOML data may not hold NaN or infinity")
        r = repr(v)
        return r if ("." in r or "e" in r or "inf" in r) else r + ".0"
    if isinstance(v, str):
        return _str(v)
    if isinstance(v, (list, tuple)):
        return "[" + ", ".join(value(x) for x in v) + "]"
    if isinstance(v, dict):
        return "{" + ", ".join(f"{_key(k)} = {value(x)}" for k, x in v.items()) + "}"
    raise TypeError(f"cannot write {type(v).__name__} to TOML")


def table(name: str, d: dict, array: bool = False) -> str:
    """One [name] or [[name]] table; nested lists of lists go one per line."""
    lines = [f"[[{name}]]" if array else f"[{name}]"]
    for k, v in d.items():
        if isinstance(v, (list, tuple)) and v and isinstance(v[0], (list, tuple)):
            inner = ",\n".join("  " + value(x) for x in v)
            lines.append(f"{_key(k)} = [\n{inner},\n]")
        else:
            lines.append(f"{_key(k)} = {value(v)}")
    return "\n".join(lines) + "\n"
