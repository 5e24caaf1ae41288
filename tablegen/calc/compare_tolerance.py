"""Tolerances and alignments of a QA comparison: the documented defaults, the
``--tolerance`` and ``--align`` syntax, and the plausibility check of a tolerance.

A tolerance always carries its unit or ``%``: ``cp=0.5%``, ``h=0.5kJ/kg``,
``h=0.1%+0.2kJ/kg``. A bare number is refused, since ``cp=0.5`` could mean 0.5 %
or 0.5 kJ/(kg K), and the wrong reading passes a cp 10 % off without a word.
A tolerance wider than 20 % relative, or wider than the spread of the column's
own values, cannot tell a right table from a wrong one; it is accepted only
when the user says so (``allow_wide``) and is then stated on the report's
first page.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass

import numpy as np

from .compare_keys import ALIGNABLE, CHANGE_FLOOR_MOLAR, CHANGE_KEYS, CHANGE_REL, DEFAULT_REL
from ..core.errors import InputError, NameLookupError, RangeError, UnitError
from ..core.units import unit

#: Largest relative tolerance accepted without ``allow_wide``: 20 % is several times
#: any disagreement between evaluations of the same gas (docs/compare.md), so a wider
#: one would pass a table with a wrong unit or a wrong gas (common practice).
WIDE_REL = 0.20
#: Hard limits, even for a wide tolerance: 100 % relative; 1e12 in SI units absolute
#: (beyond any property value a table holds, so every bound and its plot stay finite).
MAX_RELATIVE_PERCENT = 100.0
MAX_ABSOLUTE_SI = 1e12


@dataclass(frozen=True, slots=True)
class Tolerance:
    """|Δ| <= rel·|reference| + rel_change·|X(T) - X(298.15 K)| + abs_si + q/2.

    q is one unit in the last printed place of the reference cell; X(298.15 K)
    is tablegen's value (after alignment) at 298.15 K.
    """

    rel: float = 0.0
    abs_si: float = 0.0
    text: str = ""
    origin: str = "default"       # "default" or "--tolerance"
    rel_change: float = 0.0

    def bound_si(self, ref_si, quantum_si, change_si=0.0):
        return (self.rel * np.abs(ref_si) + self.rel_change * np.abs(change_si) + self.abs_si
                + 0.5 * quantum_si)


def default_tolerance(key: str, M_g_per_mol: float = 1.0, unit_=None, n_per_m3: float = 1.0) -> Tolerance:
    """The documented default of a column (M converts the per-mole floors to per kg,
    n_per_m3 (mol/m³ at the reference conditions) to per m³)."""
    if key in CHANGE_KEYS:
        kind = CHANGE_KEYS[key]
        floor = CHANGE_FLOOR_MOLAR[kind]
        if key.endswith("_molar"):
            floor_si = floor
        elif key.endswith("_vol"):
            floor_si = floor * n_per_m3
        else:
            floor_si = floor / (M_g_per_mol * 1e-3)
        shown = (f"{floor:g} J/mol" if kind == "energy" else f"{floor:g} J/(mol K)")
        if unit_ is not None and not key.endswith("_molar"):
            shown = f"{floor_si / unit_.factor:.2g} {unit_.symbol}"
        return Tolerance(0.0, floor_si, f"{CHANGE_REL * 100:g} % of change from 298.15 K + {shown}",
                         "default", CHANGE_REL)
    rel = DEFAULT_REL[key]
    return Tolerance(rel, 0.0, f"{rel * 100:g} %", "default")


_TOL_PART = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(%?)\s*(.*?)\s*$")


def _unit_example(u) -> str:
    """How a value in unit u is written after a number ('-' for a dimensionless column)."""
    return u.symbol


def parse_tolerance(text: str, ref_units: dict, flag: str = "--tolerance") -> tuple[str, Tolerance]:
    """'cp=0.1%', 'h=0.5kJ/kg', 'h=0.2%+10 J/kg', 'Pr=2%' -> (key, Tolerance).

    Parameters
    ----------
    text : the option's text, ``COLUMN=VALUE%``, ``COLUMN=VALUE UNIT`` or both
        joined by ``+`` (the "% of reading + absolute" form in which instrument
        accuracies are stated, common practice)
    ref_units : key -> Unit, or tuple of Units, of the compared columns

    Raises
    ------
    TablegenError for a bare number (it could be read as relative or absolute:
    the message shows both readings), an unknown column, a unit that does not
    fit the column, a negative value or two parts of one kind.
    """
    if "=" not in text:
        raise InputError(f"{flag} {text!r}: write COLUMN=VALUE% or COLUMN=VALUE UNIT, "
                         f"e.g. cp=0.1% or h=0.5kJ/kg")
    key, val = (x.strip() for x in text.split("=", 1))
    if key not in ref_units:
        raise NameLookupError(f"{flag} {text!r}: column {key!r} is not compared; "
                              f"compared columns: {', '.join(ref_units)}")
    units = ref_units[key] if isinstance(ref_units[key], tuple) else (ref_units[key],)
    rel, abs_si = 0.0, 0.0
    parts = val.split("+") if val else [""]
    merged = []                     # '1e+3' holds a '+': rejoin pieces that end in an exponent marker
    for part in parts:
        if merged and re.search(r"\d[eE]$", merged[-1].strip()):
            merged[-1] += "+" + part
        else:
            merged.append(part)
    seen_rel = seen_abs = False
    for part in merged:
        m = _TOL_PART.match(part)
        if not m or not part.strip():
            raise InputError(f"{flag} {text!r}: {part.strip()!r} is not a number; "
                             f"write e.g. {key}=0.1% or {key}=0.5{_unit_example(units[0])} "
                             f"or {key}=0.1%+0.5{_unit_example(units[0])}")
        num, pct, sym = m.group(1), m.group(2), m.group(3)
        v = float(num)
        if not (math.isfinite(v) and v >= 0):
            raise RangeError(f"{flag} {text!r}: tolerances must be numbers >= 0")
        if not pct and not sym:
            whole = text.strip() if len(merged) == 1 else f"{text.strip()} ({num!r})"
            raise UnitError(f"{flag} {whole}: a bare number could be relative or absolute; "
                            f"give a unit or %: {num}% or {num}{_unit_example(units[0])}")
        if pct:
            if sym or seen_rel:
                raise InputError(f"{flag} {text!r}: write one relative part, e.g. {key}=0.1%")
            if v > MAX_RELATIVE_PERCENT:
                raise RangeError(f"{flag} {text!r}: a relative tolerance is at most {MAX_RELATIVE_PERCENT:g} %")
            rel, seen_rel = v / 100.0, True
            continue
        if seen_abs:
            raise InputError(f"{flag} {text!r}: write one absolute part, "
                             f"e.g. {key}=0.1%+0.5{_unit_example(units[0])}")
        try:
            u = unit(sym, units[0].dimension)
        except UnitError as e:
            raise UnitError(f"{flag} {text!r}: {e}") from None
        abs_si, seen_abs = v * u.factor, True
        if not abs_si <= MAX_ABSOLUTE_SI:
            raise RangeError(f"{flag} {text!r}: an absolute tolerance is at most "
                             f"{MAX_ABSOLUTE_SI / u.factor:.3g} {u.symbol} ({MAX_ABSOLUTE_SI:g} in SI units)")
    return key, Tolerance(rel, abs_si, val, "--tolerance")


def parse_align(text: str, keys) -> tuple[str, str]:
    """'h=offset', 'Pr=scale' -> (key, kind); checked against the compared keys."""
    if "=" not in text:
        raise InputError(f"--align {text!r}: write COLUMN=offset or COLUMN=scale, e.g. h=offset or Pr=scale")
    key, kind = (x.strip() for x in text.split("=", 1))
    if key not in keys:
        raise NameLookupError(f"--align {text!r}: column {key!r} is not compared; compared columns: {', '.join(keys)}")
    if key not in ALIGNABLE:
        allowed = ", ".join(f"{k}={v}" for k, v in ALIGNABLE.items())
        raise InputError(f"--align {text!r}: {key} cannot be aligned (a datum does not shift it by a constant); "
                         f"allowed: {allowed}")
    if kind != ALIGNABLE[key]:
        raise InputError(f"--align {text!r}: {key} aligns by {ALIGNABLE[key]}, not {kind!r}; "
                         f"write {key}={ALIGNABLE[key]}")
    return key, kind


def wide_reason(tol: Tolerance, ref_si: np.ndarray, unit_) -> str | None:
    """Why a tolerance cannot tell a right column from a wrong one, or None.

    Wide: a relative part above :data:`WIDE_REL`, or an allowed deviation (relative
    part at the largest reference value plus the absolute part) larger than the
    range of the column's reference values (max - min; needs two distinct values).
    Defaults are documented (docs/compare.md) and not checked.
    """
    if tol.origin == "default":
        return None
    if tol.rel > WIDE_REL:
        return f"{tol.rel * 100:g} % is more than {WIDE_REL * 100:g} % relative"
    v = ref_si[np.isfinite(ref_si)]
    if v.size < 2:
        return None
    span = float(np.max(v) - np.min(v))
    allowed = float(np.max(tol.rel * np.abs(v) + tol.abs_si))
    if span > 0 and allowed > span:
        return (f"±{allowed / unit_.factor:.2g} {unit_.symbol} is more than the range of the column's "
                f"values ({span / unit_.factor:.2g} {unit_.symbol})")
    return None
