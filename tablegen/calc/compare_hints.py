"""Hints from the deviations of a QA comparison: what a failing column's pattern says.

A reference table often differs from tablegen's by one constant per column: the
enthalpy datum shifts h and u, the zero of the entropy scale or the reference
pressure shifts s°, the anchor of relative pressure and volume scales Pr and vr.
Cell by cell that reads as "every cell out of tolerance"; as a pattern it is one
number and one option. This module finds those patterns:

* offset: the deviations of an offset column (h, u, s°, ...) are one constant to
  within the column's tolerance, i.e. every cell would pass once the constant is
  removed. The hint gives the constant and the ``--align`` (and, for h and u, the
  ``--h-datum``) that removes it; a constant that holds for all but a few cells is
  reported as such, with the number of cells left.
* reference pressure: the s° constant equals R ln(P°_reference / P°_tablegen) for
  P° = 1 atm or 1 bar: "the reference uses P° = 1 atm: try --p-ref 1atm".
* scale: Pr or vr are tablegen's times one factor to within tolerance: the hint
  names the anchor that matches.

Hints never change a verdict: they are advice printed beside it. Pure
computation on a column's arrays; no printing, no reportlab.

References: s(T, P) = s°(T) - R ln(P/P°) for an ideal gas, so tables at two
reference pressures differ in s° by R ln(P°₁/P°₂), R ln(101325/100000) =
0.10940 J/(mol K) (standard thermodynamics, common practice).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .compare_keys import ALIGNABLE, KEY_LABELS, last_place

#: Reference pressures a handbook may use, Pa: 1 bar (IUPAC since 1982) and 1 atm (older tables).
P_REF_CANDIDATES = {"1bar": 1e5, "1atm": 101325.0}
#: Entropy keys (offset by a change of reference pressure) and their basis.
ENTROPY_KEYS = {"s0": "mass", "s0_molar": "molar", "s0_vol": "volumetric"}
#: Keys a change of enthalpy datum shifts by the same constant, per basis.
DATUM_KEYS = {"h": "mass", "u": "mass", "h_molar": "molar", "u_molar": "molar", "h_vol": "volumetric",
              "u_vol": "volumetric", "dh298_molar": "molar"}
#: A constant that holds for all but this share of a column's cells is still reported.
MOSTLY = 0.10


@dataclass(frozen=True, slots=True)
class Hint:
    """One hint: the column, what its deviations show, and the options that would remove it."""

    column: str
    kind: str                   # "offset", "offset-except", "p_ref", "scale"
    value: float                # offset in the column's unit, or the scale factor
    unit: str
    text: str                   # one sentence, for stderr and page 1
    options: tuple              # command-line options that remove it, each one string
    spec: str = ""              # the same as a spec table setting, where one exists
    cells_left: int = 0         # offset-except: cells out of tolerance after the offset

    def as_json(self) -> dict:
        return {"column": self.column, "kind": self.kind, "value": self.value, "unit": self.unit,
                "text": self.text, "options": list(self.options), "spec": self.spec,
                "cells_left": self.cells_left}


def format_constant(value: float, quantum: float | None = None, sig: int = 6) -> str:
    """A fitted constant with its sign: to one place beyond the reference's last printed place
    (so rounding the constant costs at most a tenth of the reference's own rounding), else to
    ``sig`` significant figures. ASCII '-' (callers that print for paper use a minus sign)."""
    if not math.isfinite(value):
        return "—"
    if quantum and quantum > 0 and value != 0:
        decimals = max(0, 1 - int(math.floor(math.log10(quantum))))
        if abs(value) >= 10 ** (1 - decimals):
            return f"{value:+.{decimals}f}"
    return f"{value:+.{sig}g}"


def _quantum(col) -> float | None:
    qs = [last_place(t) for t, p in zip(col.text, col.present) if p and t]
    return min(qs) if qs else None


def _unit_text(symbol: str) -> str:
    return "" if symbol == "-" else f" {symbol}"


def column_hints(col, context: dict) -> list[Hint]:
    """The hints of one column (none for a passing or aligned column).

    Parameters
    ----------
    col : ColumnResult (tablegen.calc.compare)
    context : what the options would change, from the substance compared:
        ``M`` (g/mol), ``n_per_m3`` (mol/m³ of the volumetric basis), ``P_ref_Pa``,
        ``anchor`` {T_K, Pr, vr}, ``h298_J_per_kg`` (h at 298.15 K on the current datum)
        ``spec`` (True when the substance is a spec table, whose datum, P° and anchor
        are set in the spec and not by options), ``T_text`` and ``T_unit`` (the reference's
        temperatures as printed, to name cells)
    """
    if col.alignment is not None or col.n_out == 0 or col.key not in ALIGNABLE:
        return []
    m = col.present
    if int(np.sum(m)) < 2:
        return []
    dev, bound = col.deviation[m], col.bound[m]
    label = KEY_LABELS[col.key]
    u = _unit_text(col.unit.symbol)
    if ALIGNABLE[col.key] == "scale":
        return _scale_hint(col, context, label)
    p_ref = _p_ref_hint(col, context, dev, bound, label, u)
    if p_ref:
        return [p_ref]
    c = float(np.mean(dev))
    shift = -c                                  # the --align offset (reference - tablegen)
    q = _quantum(col)
    shown = format_constant(shift, q)
    align = f"--align {col.key}=offset"
    if np.all(np.abs(dev - c) <= bound):
        why = ("a different enthalpy datum" if col.key in DATUM_KEYS
               else "a different zero of the entropy scale")
        text = (f"{col.key}: every deviation is the same {format_constant(c, q)}{u} to within its "
                f"tolerance ({why}): the reference is tablegen's {label} {shown}{u}")
        opts, spec = [align], ""
        datum = _datum_option(col, context, shift)
        if datum:
            text += f"; try {datum[0]} (moves h and u together) or {align}"
            opts, spec = [datum[0], align], datum[1]
        else:
            text += f"; try {align}"
        return [Hint(col.key, "offset", shift, col.unit.symbol, text, tuple(opts), spec)]
    med = float(np.median(dev))
    off = np.abs(dev - med) > bound
    left = int(np.sum(off))
    if left < col.n_out and left <= max(1, MOSTLY * dev.size):
        T_all = context.get("T_text") or ()
        T_text = [t for t, p in zip(T_all, m) if p]
        where = ", ".join(T_text[i] for i in np.flatnonzero(off)[:3]) if T_text else ""
        where += f" {context.get('T_unit', '')}".rstrip() if where and left <= 3 else ""
        after = int(np.sum(np.abs(dev - c) > bound))      # --align fits the mean, which those cells pull
        text = (f"{col.key}: the deviations are the same {format_constant(med, q)}{u} (median) except in "
                f"{left} cell{'s' if left != 1 else ''}" + (f" (T = {where}{', ...' if left > 3 else ''})"
                                                           if where else "")
                + f": a datum and {'a wrong cell' if left == 1 else 'wrong cells'}? With {align}, "
                f"{after} cell{'s' if after != 1 else ''} would still be out of tolerance (the fitted mean "
                f"includes {'that cell' if left == 1 else 'those cells'})")
        return [Hint(col.key, "offset-except", -med, col.unit.symbol, text, (align,), "", left)]
    return []


def _entropy_per_mole_factor(col, context) -> float:
    """Column unit per J/(mol K): the constant R ln(...) in the column's unit."""
    basis = ENTROPY_KEYS[col.key]
    if basis == "molar":
        f = 1.0
    elif basis == "mass":
        f = 1.0 / (context["M"] * 1e-3)
    else:
        f = context["n_per_m3"]
    return f / col.unit.factor


def _p_ref_hint(col, context, dev, bound, label, u) -> Hint | None:
    if col.key not in ENTROPY_KEYS:
        return None
    from ..core.constants import R_MOLAR
    P_tg = float(context["P_ref_Pa"])
    for name, P in P_REF_CANDIDATES.items():
        if abs(P / P_tg - 1) < 1e-9:
            continue
        # s°_reference = s°_tablegen - R ln(P/P_tg), so Δ = tablegen - reference = R ln(P/P_tg)
        expected = R_MOLAR * math.log(P / P_tg) * _entropy_per_mole_factor(col, context)
        if np.all(np.abs(dev - expected) <= bound):
            pretty = "1 atm" if name == "1atm" else "1 bar"
            sign = "+" if P > P_tg else "-"
            text = (f"{col.key}: the deviations are {format_constant(expected, None, 5)}{u} = "
                    f"{sign}R ln({P / 1000:g}/{P_tg / 1000:g}) to within tolerance: the reference uses "
                    f"P° = {pretty}: try " + ("P_ref = " + repr(pretty).replace("'", '"') + " in the spec table"
                                             if context.get("spec") else f"--p-ref {name}"))
            opts = () if context.get("spec") else (f"--p-ref {name}",)
            return Hint(col.key, "p_ref", -expected, col.unit.symbol, text, opts,
                        f'P_ref = "{pretty}"')
    return None


def _datum_option(col, context, shift) -> tuple[str, str] | None:
    """The --h-datum (and spec datum) that shifts h by ``shift`` (column unit), mass basis only."""
    if DATUM_KEYS.get(col.key) != "mass" or col.key == "dh298_molar":
        return None
    h_new = (context["h298_J_per_kg"] + shift * col.unit.factor) / 1000.0     # kJ/kg
    text = f"{h_new:.6g}kJ/kg"
    opt = f"--h-datum sensible:298.15K:{text}"
    spec = f'datum = {{ kind = "sensible", T = "298.15 K", h = "{h_new:.6g} kJ/kg" }}'
    if context.get("spec"):
        return None
    return opt, spec


def _scale_hint(col, context, label) -> list[Hint]:
    m = col.present
    ref, tg = col.reference[m], col.tablegen_raw[m]
    if np.any(ref <= 0) or np.any(tg <= 0):
        return []
    f = float(np.exp(np.mean(np.log(ref) - np.log(tg))))
    if not np.all(np.abs(tg * f - ref) <= col.bound[m]):
        return []
    a = context["anchor"]
    new = (a["Pr"] if col.key == "Pr" else a["vr"]) * f
    text = (f"{col.key}: the reference is tablegen's {label} × {f:.6g} to within tolerance (another "
            f"{col.key} anchor): {col.key} = {new:.6g} at {a['T_K']:g} K matches")
    spec = f"anchor = {{ T = \"{a['T_K']:g} K\", {col.key} = {new:.6g} }}"
    return [Hint(col.key, "scale", f, "-", text, (f"--align {col.key}=scale",), spec)]


def comparison_hints(columns, context: dict) -> tuple:
    """The hints of every column of a comparison, in column order (see :func:`column_hints`).

    Scale hints of Pr and vr share one anchor, so their text names the ``--anchor``
    that matches both (a spec table: the ``anchor`` setting).
    """
    hints = [h for col in columns for h in column_hints(col, context)]
    anchor = anchor_option(hints, context)
    out = []
    for h in hints:
        if h.kind == "scale":
            align = h.options[0]
            if anchor:
                h = Hint(h.column, h.kind, h.value, h.unit, f"{h.text}; try {anchor} or {align}",
                         (anchor, align), h.spec)
            else:
                h = Hint(h.column, h.kind, h.value, h.unit,
                         f"{h.text}; set the table's anchor in the spec, or try {align}", (align,), h.spec)
        out.append(h)
    return tuple(out)


def suggested_options(hints) -> list[str]:
    """One option per hinted column that, together, remove every hinted constant:
    --p-ref where the reference pressure explains s°, else --align (always valid)."""
    out = []
    for h in hints:
        if h.kind == "p_ref" and h.options:
            opt = h.options[0]
        else:
            opt = f"--align {h.column}={ALIGNABLE[h.column]}"
        if opt not in out:
            out.append(opt)
    return out


def anchor_option(hints, context) -> str | None:
    """--anchor T=..,Pr=..,vr=.. that matches every scale hint at once (None without scale hints)."""
    sc = {h.column: h.value for h in hints if h.kind == "scale"}
    if not sc or context.get("spec"):
        return None
    a = context["anchor"]
    parts = [f"T={a['T_K']:g}K"]
    for k in ("Pr", "vr"):
        parts.append(f"{k}={a[k] * sc.get(k, 1.0):.6g}")
    return "--anchor " + ",".join(parts)
