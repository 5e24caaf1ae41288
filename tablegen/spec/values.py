"""The value readers of a spec: each checks one TOML value and names its key path.

Shared by the book spec (spec.py) and its editions (editions.py); a refusal is a
SpecError whose text starts with the key path, e.g. ``tables[2].grid.segments[0].step``.
"""

from __future__ import annotations

import difflib
import math

from ..core.errors import SpecError, TablegenError
from ..core.texts import bad_character, one_line_rule
from ..core.units import P_ATM

PAPERS = ("A4", "Letter", "A3", "A5")
#: Former paper names, read as the name they stand for.
PAPER_ALIASES = {"A5-pocket": "A5"}
ORIENTATIONS = ("portrait", "landscape")
UNIT_SYSTEMS = ("SI", "US", "both")


def _fail(where: str, msg: str):
    raise SpecError(f"{where}: {msg}")


def _typename(v) -> str:
    return {str: "a string", int: "an integer", float: "a number", bool: "true/false",
            list: "a list", dict: "a table"}.get(type(v), type(v).__name__)


def _check_keys(raw: dict, allowed, where: str):
    for k in raw:
        if k not in allowed:
            close = difflib.get_close_matches(k, list(allowed), n=1, cutoff=0.6)
            hint = f"did you mean {close[0]!r}? " if close else ""
            path = f"{where}.{k}" if where else k
            _fail(path, f"unknown key; {hint}allowed: {', '.join(allowed)}")


def _path(where: str, key: str) -> str:
    return f"{where}.{key}" if where else key


def _get(raw: dict, key: str, types, where: str, default=None, required=False):
    if key not in raw:
        if required:
            _fail(_path(where, key), "is required")
        return default
    v = raw[key]
    ok = isinstance(v, types) and not (isinstance(v, bool) and bool not in _as_tuple(types))
    if not ok:
        want = " or ".join(_typename(t()) if t not in (int, float) else {int: "an integer", float: "a number"}[t]
                           for t in _as_tuple(types))
        _fail(_path(where, key), f"must be {want}, not {_typename(v)}")
    return v


def _as_tuple(t):
    return t if isinstance(t, tuple) else (t,)


def _choice(raw, key, choices, where, default):
    v = _get(raw, key, str, where, default)
    for c in choices:
        if v.casefold() == c.casefold():
            return c
    close = difflib.get_close_matches(v, list(choices), n=1, cutoff=0.5)
    hint = f"did you mean {close[0]!r}? " if close else ""
    _fail(_path(where, key), f"{v!r} is not known; {hint}allowed: {', '.join(choices)}")


def _text(raw, key, where, default="", required=False, max_len=200):
    v = _get(raw, key, str, where, default, required)
    v = v.strip()
    if required and not v:
        _fail(_path(where, key), "must not be empty")
    if len(v) > max_len:
        _fail(_path(where, key), f"is {len(v)} characters long; at most {max_len} allowed")
    bad = bad_character(v)
    if bad:
        _fail(_path(where, key), f"{one_line_rule()} (it holds {bad})")
    return v


def _temperature(v, where) -> float:
    from ..core.units import quantity
    if isinstance(v, bool) or not isinstance(v, str):
        _fail(where, f"must be a temperature with a unit as a string, e.g. \"300 K\" or \"25 °C\", "
                     f"not {_typename(v)}")
    try:
        T = quantity(v, "temperature", "temperature")
    except TablegenError as e:
        _fail(where, str(e))
    if not (math.isfinite(T) and T > 0):
        _fail(where, f"{v!r} is {T:g} K; temperatures must be above 0 K")
    return T


def _temp_unit(v: str, where):
    """A temperature value split into (number, Unit), for grids kept exact in their own unit."""
    from ..core.units import _NUM, unit
    if isinstance(v, bool) or not isinstance(v, str):
        _fail(where, f"must be a temperature with a unit as a string, e.g. \"300 K\", not {_typename(v)}")
    m = _NUM.match(v)
    if not m or not m.group(2):
        _fail(where, f"{v!r} is not a temperature with a unit; write e.g. \"300 K\" or \"25 °C\"")
    if not math.isfinite(float(m.group(1))):
        _fail(where, f"{v!r} is not a finite number; write e.g. \"300 K\"")
    try:
        u = unit(m.group(2), "temperature")
    except TablegenError as e:
        _fail(where, str(e))
    return float(m.group(1)), u


def _pressure(v, where, barometer_Pa: float | None = None) -> float:
    """An absolute pressure; a gauge one ('10 barg') only where ``barometer_Pa`` is given."""
    from ..core.units import pressure_Pa
    if isinstance(v, bool) or not isinstance(v, str):
        _fail(where, f"must be a pressure with a unit as a string, e.g. \"1 bar\", not {_typename(v)}")
    try:
        P = pressure_Pa(v, "pressure", barometer_Pa=barometer_Pa)
    except TablegenError as e:
        _fail(where, str(e))
    if not (math.isfinite(P) and P > 0):
        _fail(where, f"{v!r} must be above 0 Pa (absolute pressure)")
    return P


def _barometer(v, where) -> float:
    """document.barometer: the barometric pressure of the spec's gauge values (default 1.01325 bar)."""
    from ..core.units import barometer_Pa
    if v is None:
        return P_ATM
    if isinstance(v, bool) or not isinstance(v, str):
        _fail(where, f"must be a pressure with a unit as a string, e.g. \"0.95 bar\", not {_typename(v)}")
    try:
        return barometer_Pa(v, "barometer")
    except TablegenError as e:
        _fail(where, str(e))


def _positive_number(raw, key, where, default):
    v = _get(raw, key, (int, float), where, default)
    if not (math.isfinite(v) and v > 0):
        _fail(_path(where, key), f"must be > 0, got {v!r}")
    return float(v)


# ---------------------------------------------------------------- document


def _paper(raw, where, default):
    """The paper name (a former name such as A5-pocket read as the one it stands for)."""
    v = raw.get("paper", default)
    if isinstance(v, str) and v.strip() in PAPER_ALIASES:
        return PAPER_ALIASES[v.strip()]
    return _choice(raw, "paper", PAPERS, where, default)
