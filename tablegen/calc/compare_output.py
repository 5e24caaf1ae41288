"""Outputs of a QA comparison as data: numbers formatted for reading, the deviations
CSV and the JSON summary, for one reference table and for a whole book.

Rounding rule (docs/compare.md): deviations to two significant figures with their
sign, tablegen values to the places of the reference cell; the CSV and JSON keep
full precision. Pure functions of a finished comparison; no file writing.
"""

from __future__ import annotations

import csv
import io
import math
import re

import numpy as np

from .compare import Alignment, Comparison
from .compare_keys import NUMBER

def format_like(value: float, text: str) -> str:
    """A number printed to the places of a reference cell's text ('29.104' -> 3 decimals)."""
    if not math.isfinite(value):
        return "—"
    if not text:
        return f"{value:.6g}"
    m = NUMBER.match(text)
    mant, exp = m.group(1), m.group(2)
    decimals = len(mant.split(".", 1)[1]) if "." in mant else 0
    if exp:
        return f"{value:.{decimals}e}"
    return f"{value:.{decimals}f}"


def format_dev(value: float, minus: str = "-") -> str:
    """A deviation to two significant figures, always signed ('+0.36', '-300', '+1.2e-7').

    Plain decimals from 1e-4 to 1e5 (rounded to two figures, so -298.3 prints as -300),
    powers of ten outside; ``minus`` is the sign printed for negatives (the PDF uses U+2212).
    """
    if not math.isfinite(value):
        return "—"
    if value == 0:
        return "0"
    r = float(f"{value:.2g}")
    e = math.floor(math.log10(abs(r)))
    if -4 <= e < 5:
        s = f"{r:+.{max(0, 1 - e)}f}"
    else:
        s = f"{r:+.1e}".replace("e-0", "e-").replace("e+0", "e").replace("e+", "e")
    return s.replace("-", minus) if minus != "-" else s


def format_size(value: float) -> str:
    """A magnitude (an allowed deviation, an RMS) to two significant figures, unsigned."""
    s = format_dev(abs(value))
    return s[1:] if s[:1] == "+" else s


def unit_suffix(symbol: str) -> str:
    """' kJ/kg' after a number; nothing for a dimensionless column (its '-' would read as a sign)."""
    return "" if symbol in ("-", "") else f" {symbol}"


#: First characters a spreadsheet may read as the start of a formula.
_FORMULA_START = frozenset(("=", "+", "-", "@", "\t", "\r", "|", "%"))


def _neutral(text: str) -> str:
    """Neutralise text against spreadsheet formula injection; numbers stay numbers."""
    s = str(text)
    if s[:1] not in _FORMULA_START or NUMBER.match(s) or re.fullmatch(r"-?(inf|nan)", s):
        return s
    return "'" + s


def deviations_csv(cmp: Comparison) -> str:
    """RFC 4180 CSV, one row per reference row, full precision, reference units.

    Per compared column: <key>.reference, <key>.tablegen (after alignment),
    <key>.deviation, <key>.relative, <key>.bound and <key>.status (within,
    OUT, or empty where the reference has no value).
    """
    ref = cmp.reference
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\r\n")
    head = ["line [-]", f"T [{ref.T_unit.symbol}]", "T_K [K]", "extrapolated [-]"]
    for c in cmp.columns:
        s = c.unit.symbol
        head += [f"{c.key}.reference [{s}]", f"{c.key}.tablegen [{s}]", f"{c.key}.deviation [{s}]",
                 f"{c.key}.relative [-]", f"{c.key}.bound [{s}]", f"{c.key}.status [-]"]
    w.writerow(head)
    # columns as lists of Python floats once (repr of the same doubles as before)
    cols = [(c.present.tolist(), c.text, c.tablegen.tolist(), c.deviation.tolist(), c.relative.tolist(),
             c.bound.tolist(), c.within.tolist()) for c in cmp.columns]
    T_K, ext = cmp.T_K.tolist(), cmp.extrapolated.tolist()
    # only the texts read from the reference can start a formula: the rest are reprs of
    # floats, which _neutral leaves as they are, and fixed words
    for i in range(len(T_K)):
        row = [str(ref.lines[i]), _neutral(ref.T_text[i]), repr(T_K[i]), "yes" if ext[i] else "no"]
        for present, text, tg, dev, rel, bound, within in cols:
            if present[i]:
                row += [_neutral(text[i]), repr(tg[i]), repr(dev[i]),
                        "" if not math.isfinite(rel[i]) else repr(rel[i]),
                        repr(bound[i]), "within" if within[i] else "OUT"]
            else:
                row += ["", repr(tg[i]), "", "", "", ""]
        w.writerow(row)
    return buf.getvalue()


def summary(cmp: Comparison) -> dict:
    """The JSON summary (sorted keys when dumped); values in the reference's units."""
    ref = cmp.reference
    cols = []
    for c in cmp.columns:
        t = c.tolerance
        cols.append({"key": c.key, "unit": c.unit.symbol, "header": c.header,
                     "tolerance": {"text": t.text, "relative": t.rel, "absolute": t.abs_si / c.unit.factor,
                                   "relative_to_change_from_298.15K": t.rel_change,
                                   "origin": t.origin, "rounding_allowance": "half a unit in the last printed "
                                   "place of each reference cell"},
                     "stats": c.stats,
                     "alignment": None if c.alignment is None else _alignment_json(c.alignment)})
    return {
        **_verdict_json(cmp),
        "substance": cmp.substance,
        "reference": {"file": ref.path, "sha256": ref.sha256, "layout": ref.layout, "rows": len(ref.lines),
                      "T_unit": ref.T_unit.symbol, "T_min_K": float(np.min(ref.T_K)),
                      "T_max_K": float(np.max(ref.T_K)), "columns": list(ref.keys),
                      "comments": list(ref.comments)},
        "extrapolated_rows": [ref.lines[i] for i in np.flatnonzero(cmp.extrapolated)],
        "columns": cols,
        "alignments": [_alignment_json(c.alignment) for c in cmp.columns if c.alignment is not None],
        "hints": [h.as_json() for h in cmp.hints],
        "suggested_options": suggested(cmp),
        "wide_tolerances": list(cmp.wide),
        "worst_cell": worst_cell(cmp),
        "out_of_tolerance": cmp.out_cells(),
        "rules": RULES,
        "caution": CAUTION,
        "tablegen_version": cmp.version,
        "options": cmp.options,
    }


def _alignment_json(a: Alignment) -> dict:
    return {"column": a.key, "kind": a.kind, "value": a.value_in_unit, "unit": a.unit, "n": a.n,
            "rms_before": a.rms_before, "rms_after": a.rms_after, "meaning": a.meaning}


RULES = ("deviation = tablegen (after alignment) − reference, in the reference column's unit; "
         "a cell is within tolerance when |deviation| ≤ relative tolerance × |reference| + absolute tolerance "
         "+ half a unit in the last printed place of the reference cell (default tolerances of h, u and s° "
         "take their relative part from the change since 298.15 K instead of the value); offsets are fitted by least squares "
         "(mean of reference − tablegen), scale factors by least squares on logarithms")

CAUTION = ("This comparison checks agreement with the given reference only: it does not show that either "
           "table is correct, and it does not replace review under the applicable codes and licensed "
           "engineering practice.")


#: What each exit status of ``tablegen compare`` means (also in --help and docs/compare.md).
EXIT_MEANING = {"0": "every compared cell is within tolerance", "1": "some cell is out of tolerance",
                "2": "bad input (the reference or the options); nothing written",
                "3": "an output problem (the folder's files exist without --force, or cannot be written)"}


def _verdict_json(result) -> dict:
    """The verdict keys of a summary (a Comparison or a BookComparison)."""
    return {"verdict": "pass" if result.passed else "fail", "verdict_text": result.verdict,
            "exit_status": 0 if result.passed else 1, "exit_status_meaning": EXIT_MEANING,
            "cells_compared": result.n_cells, "cells_out_of_tolerance": result.n_out}


def suggested(cmp: Comparison) -> list[str]:
    """The options that together remove every constant the hints found."""
    from .compare_hints import suggested_options
    return suggested_options(cmp.hints)


def worst_cell(cmp: Comparison) -> dict | None:
    """The cell that uses the largest share of its allowed deviation (None without cells)."""
    best, best_use = None, -1.0
    for c in cmp.columns:
        m = c.present
        if not np.any(m):
            continue
        with np.errstate(divide="ignore", invalid="ignore"):
            use = np.abs(c.deviation) / c.bound
        use = np.where(np.isfinite(use), use, np.where(np.abs(c.deviation) > 0, np.inf, 0.0))
        use = np.where(m, use, -1.0)
        i = int(np.argmax(use))
        if use[i] > best_use:
            best_use = float(use[i])
            best = {"column": c.key, "unit": c.unit.symbol, "line": cmp.reference.lines[i],
                    "T": cmp.reference.T_text[i], "T_unit": cmp.reference.T_unit.symbol,
                    "deviation": float(c.deviation[i]), "bound": float(c.bound[i]),
                    "use_of_tolerance": best_use, "within": bool(c.within[i])}
    return best


def worst_text(w: dict | None, minus: str = "-") -> str:
    """'h at 1400 K: Δ = +2.0 kJ/kg, allowed ±0.50 (400 %)' for a summary line."""
    if not w:
        return "—"
    u = w["use_of_tolerance"]
    use = "∞" if not math.isfinite(u) else "< 1 %" if u < 0.01 else f"{u * 100:.0f} %"
    return (f"{w['column']} at {w['T']} {w['T_unit']}: Δ = {format_dev(w['deviation'], minus)}"
            f"{unit_suffix(w['unit'])}, allowed ±{format_size(w['bound'])} ({use} of it)")


# ---------------------------------------------------------------- the book
def book_summary(bc) -> dict:
    """The JSON summary of a book comparison: the book's verdict, then each table's summary."""
    tables, hints, wide = [], [], []
    for t in bc.tables:
        s = summary(t.comparison)
        tables.append({"name": t.name, "title": t.title, "reference_file": t.entry.path,
                       "matched_by": t.entry.matched_by, "reference_identity": t.entry.identity,
                       "reference_identity_from": t.entry.identity_from,
                       "verdict": s["verdict"], "cells_compared": s["cells_compared"],
                       "cells_out_of_tolerance": s["cells_out_of_tolerance"],
                       "worst_cell": s["worst_cell"], "summary": s})
        hints += [dict(h.as_json(), table=t.name) for h in t.comparison.hints]
        wide += [dict(w, table=t.name) for w in t.comparison.wide]
    f = bc.folder
    return {
        **_verdict_json(bc),
        "tables_compared": len(bc.tables),
        "tables_failed": bc.n_failed_tables,
        "spec": bc.spec,
        "reference_folder": {"path": f.path, "sidecar": f.sidecar, "book": f.book,
                             "unmatched_files": list(f.unmatched), "notes": list(f.notes)},
        "same_fingerprint": bc.same_fingerprint,
        "tables": tables,
        "hints": hints,
        "wide_tolerances": wide,
        "rules": RULES,
        "caution": CAUTION,
        "tablegen_version": bc.version,
        "options": bc.options,
    }


def book_deviations_csv(bc) -> str:
    """One row per compared cell of every table (RFC 4180, full precision), in the reference's
    units: table, file line, T as printed and in K, column, unit, reference, tablegen (after
    alignment), deviation, relative deviation, allowed deviation, status (within or OUT)."""
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\r\n")
    w.writerow(["table", "line", "T", "T_unit", "T_K [K]", "extrapolated", "column", "unit", "reference",
                "tablegen", "deviation", "relative [-]", "bound", "status"])
    for t in bc.tables:
        cmp = t.comparison
        ref = cmp.reference
        for i in range(cmp.T_K.size):
            for c in cmp.columns:
                if not c.present[i]:
                    continue
                row = [t.name, str(ref.lines[i]), ref.T_text[i], ref.T_unit.symbol, repr(float(cmp.T_K[i])),
                       "yes" if cmp.extrapolated[i] else "no", c.key, c.unit.symbol, c.text[i],
                       repr(float(c.tablegen[i])), repr(float(c.deviation[i])),
                       "" if not math.isfinite(c.relative[i]) else repr(float(c.relative[i])),
                       repr(float(c.bound[i])), "within" if c.within[i] else "OUT"]
                w.writerow([_neutral(x) for x in row])
    return buf.getvalue()
