"""PDF report of a QA comparison: verdict first, then the evidence.

Lays out a finished :class:`tablegen.calc.compare.Comparison` (one reference table)
or :class:`tablegen.calc.compare_folder.BookComparison` (a whole book against a
reference folder) and evaluates nothing.

One table: page 1 holds the verdict, the hints and any wide tolerance, document
control, alignment constants, tolerances, per-column statistics, the judging
rules, the caution and a sign-off block; then the deviation plots (a column
identical to round-off gets one line instead), then the full side-by-side
listing where every cell out of tolerance carries the symbol ✗ as well as a
tinted background, so it survives black-and-white printing.

A book: page 1 holds the book's verdict, what the spec and the reference
folder each say they are (document, revision, fingerprint), a summary line per
table (cells, out of tolerance, worst cell, verdict), statements about the
folder, hints, wide tolerances, the rules, caution and sign-off; then one
section per table with the content of a one-table report.

Deviations are printed to two significant figures with a minus sign (U+2212),
never a hyphen that could read as a separator. Reproducible bytes: reportlab
invariant mode, embedded DejaVu fonts, no clock.
"""

from __future__ import annotations

import io
import math
from pathlib import Path

import numpy as np

from . import fonts
from .pageflow import draw_pages, page_of, with_binary_streams
from .qa_layout import (DRAW_STATE, EXTRAP_MARK, FAIL_FILL, FAIL_INK, GREY, INK, MARGIN, OUT_MARK, PAGE_H,
                        PAGE_W, PASS_FILL, PASS_INK, RULE, WIDTH, draw_text, fit_text, flush_text, forget_state,
                        heading, paragraph, queue_right, queue_rules, queue_text, report_flow, ruled_table, set_fill,
                        set_stroke, text_width, wrap_text)
from .qa_plots import plots

MINUS = "−"


def _dev(x) -> str:
    from ..calc.compare_output import format_dev
    return format_dev(x, MINUS)


def _size(x) -> str:
    from ..calc.compare_output import format_size
    return format_size(x).replace("-", MINUS)


def _title(flow, text: str):
    for ln in wrap_text(text, fonts.SANS_BOLD, 14, WIDTH)[:3]:
        flow.add(19, lambda c, y, ln=ln: draw_text(c, MARGIN, y - 15, ln, fonts.SANS_BOLD, 14))
    flow.add(7, lambda c, y: None)


def _verdict_box(flow, ok: bool, detail: str, lines):
    ink, fill = (PASS_INK, PASS_FILL) if ok else (FAIL_INK, FAIL_FILL)
    word = "✓ PASS" if ok else f"{OUT_MARK} FAIL"
    wrapped = [w for ln in lines for w in wrap_text(ln, fonts.SANS, 8, WIDTH - 132)][:4]
    h = max(58, 30 + 12 * len(wrapped))

    def draw(c, y):
        set_fill(c, *fill)
        c.setStrokeColorRGB(*ink)
        c.setLineWidth(1.4)
        c.rect(MARGIN, y - h, WIDTH, h, stroke=1, fill=1)
        draw_text(c, MARGIN + 12, y - 27, word, fonts.SANS_BOLD, 20, ink)
        draw_text(c, MARGIN + 120, y - 21, fit_text(detail, fonts.SANS_BOLD, 9.5, WIDTH - 132), fonts.SANS_BOLD,
                  9.5, ink)
        for j, ln in enumerate(wrapped):
            draw_text(c, MARGIN + 120, y - 35 - 12 * j, ln, fonts.SANS, 8, INK)
    flow.add(h + 8, draw)


def _verdict(flow, cmp):
    ok = cmp.passed
    detail = (f"all {cmp.n_cells} compared cells are within tolerance" if ok else
              f"{cmp.n_out} of {cmp.n_cells} compared cells are out of tolerance (marked {OUT_MARK} in the listing)")
    al = [c.alignment for c in cmp.columns if c.alignment is not None]
    extra = [f"after fitting {len(al)} alignment constant{'s' if len(al) != 1 else ''} (below)" if al
             else "no alignment: values compared as computed with the datum and scales below"]
    if cmp.extrapolated.any():
        n = int(cmp.extrapolated.sum())
        extra.append(f"{n} row{'s' if n > 1 else ''} extrapolated beyond the data range ({EXTRAP_MARK}), "
                     f"not for design use")
    _verdict_box(flow, ok, detail, ["; ".join(extra),
                                    f"{cmp.substance['name']} ({cmp.substance['id']}) against {cmp.reference.path}"])


def _bullets(flow, title: str, items, note: str = ""):
    if not items:
        return
    heading(flow, title)
    if note:
        paragraph(flow, note, 7.2, color=GREY, gap=2)
    for it in items:
        lines = wrap_text(it, fonts.SANS, 7.8, WIDTH - 12)
        for j, ln in enumerate(lines):
            flow.add(10.2, lambda c, y, ln=ln, j=j: (
                draw_text(c, MARGIN, y - 8, "•" if j == 0 else "", fonts.SANS, 7.8),
                draw_text(c, MARGIN + 10, y - 8, ln, fonts.SANS, 7.8)))
    flow.add(5, lambda c, y: None)


def _hints_and_wide(flow, hints, wide, prefix=lambda h: ""):
    from ..calc.compare_hints import suggested_options
    items = [prefix(h) + h.text for h in hints]
    if hints:
        items.append("Together: " + " ".join(suggested_options(hints)))
    _bullets(flow, "Hints from the deviations", items,
             "What the pattern of the deviations suggests. Hints never change the verdict; an aligned "
             "column checks only the shape of the reference.")
    _bullets(flow, "Wide tolerances (accepted with --allow-wide)",
             [f"{w.get('table', '') + '/' if w.get('table') else ''}{w['column']} = {w['tolerance']}: "
              f"{w['reason']}" for w in wide],
             "A tolerance this wide cannot tell a right table from a wrong one; the signer accepts it.")


def _control(flow, cmp):
    sub, ref, o = cmp.substance, cmp.reference, cmp.options
    a = sub["anchor"]
    rows = [("Substance", f"{sub['name']} ({sub['id']}), {sub['kind']}, M = {sub['M']:.4f} kg/kmol, "
                          f"data range {sub['T_min_K']:g}–{sub['T_max_K']:g} K")]
    if o.get("target") and o["target"] != sub["id"]:
        rows.append(("Spec table", str(o["target"])))
    for sid, ds, cite in sub["sources"]:
        rows.append(("Data" if rows[-1][0] in ("Substance", "Spec table") else "", f"{sid}: {ds}, {cite}"))
    for j, f in enumerate(o.get("data_files") or []):
        rows.append(("Data files" if j == 0 else "", f"{f['file']}  SHA-256 {f['sha256']}"))
    rows += [
        ("Enthalpy datum", sub["h_datum"]),
        ("Entropy P°", f"{sub['P_ref_Pa'] / 1000:g} kPa"),
        ("Pr/vr anchor", f"Pr = {a['Pr']:g}, vr = {a['vr']:g} at {a['T_K']:g} K"),
    ]
    if "T_mean_ref_K" in o:
        rows.append(("Mean cp from", f"Tm = {o['T_mean_ref_K']:g} K"))
    if "volume_reference" in o:
        v = o["volume_reference"]
        rows.append(("Per m³ at", f"{v['text']} ({v['n_mol_per_m3']:.6g} mol/m³)"))
    rows += [
        ("Reference file", ref.path),
        ("Reference SHA-256", ref.sha256),
        ("Reference rows", f"{len(ref.lines)} rows, T {np.min(ref.T_K):g}–{np.max(ref.T_K):g} K "
                           f"(given in {ref.T_unit.symbol}), {ref.layout} layout"),
        ("Columns compared", ", ".join(f"{c.key} [{c.unit.symbol}]" for c in cmp.columns)),
    ]
    for j, cm in enumerate(ref.comments[:4]):
        rows.append(("Reference notes" if j == 0 else "", cm))
    opts = []
    for k in ("tolerance", "align"):
        for v in o.get(k) or []:
            opts.append(f"--{k} {v}")
    if o.get("extrapolate"):
        opts.append("--extrapolate")
    for k, flag in (("h_datum", "--h-datum"), ("p_ref", "--p-ref"), ("anchor", "--anchor"),
                    ("mean_from", "--mean-from"), ("vol_ref", "--vol-ref"), ("table", "--table")):
        if o.get(k):
            opts.append(f"{flag} {o[k]}")
    rows.append(("Options", " ".join(opts) if opts else "none (defaults)"))
    rows.append(("Made by", f"tablegen {cmp.version}"))
    lead = 10.4
    for label, value in rows:
        lines = wrap_text(str(value), fonts.SANS, 7.8, WIDTH - 110)
        for j, ln in enumerate(lines):
            lab = label if j == 0 else ""
            flow.add(lead, lambda c, y, lab=lab, ln=ln: (
                draw_text(c, MARGIN, y - 8, lab, fonts.SANS_BOLD, 7.8, GREY),
                draw_text(c, MARGIN + 110, y - 8, ln, fonts.SANS, 7.8)))
    flow.add(6, lambda c, y: None)


def _alignments(flow, cmp):
    from ..calc.compare_hints import _quantum, format_constant
    from ..calc.compare_keys import column_label
    al = [c for c in cmp.columns if c.alignment is not None]
    heading(flow, "Alignment constants (fitted before the deviations are judged)")
    if not al:
        paragraph(flow, "None requested: every column is compared as computed, with the enthalpy datum, "
                        "entropy reference pressure and Pr/vr anchor given above.")
        return
    rows = []
    for c in al:
        a = c.alignment
        val = (format_constant(a.value_in_unit, _quantum(c)) if a.kind == "offset"
               else f"× {a.value_in_unit:.6g}").replace("-", MINUS)
        rows.append((column_label(c.key), a.kind, val, a.unit if a.kind == "offset" else "", str(a.n),
                     f"{_size(a.rms_before)} → {_size(a.rms_after)}"))
    ruled_table(flow, ("column", "kind", "fitted constant", "unit", "rows", "RMS Δ before → after"),
                rows, (120, 50, 110, 70, 40, 133), ("left", "left", "right", "left", "right", "right"))
    for c in al:
        paragraph(flow, c.alignment.meaning.replace(" -", " " + MINUS) + ".", size=7.4, color=GREY, gap=1)
    flow.add(4, lambda c, y: None)


def _tolerances(flow, cmp):
    from ..calc.compare_keys import KEY_LABELS
    heading(flow, "Tolerances (allowed |Δ| per cell, plus half the last printed digit)")
    paragraph(flow, "Defaults and their grounds: docs/compare.md.", 7.2, color=GREY, gap=2)
    rows = []
    for c in cmp.columns:
        t = c.tolerance
        rows.append((c.key, KEY_LABELS[c.key], c.unit.symbol, t.text,
                     "--tolerance" if t.origin == "--tolerance" else "default"))
    ruled_table(flow, ("column", "property", "unit", "tolerance", "set by"), rows, (60, 74, 62, 262, 65),
           ("left",) * 5)


def _statistics(flow, cmp):
    heading(flow, "Per-column statistics (Δ = tablegen − reference)")
    ref = cmp.reference
    rows, fills = [], []
    for c in cmp.columns:
        s = c.stats
        if not s["n"]:
            rows.append((c.key, c.unit.symbol, "0", "0", "—", "—", "—", "—", "—"))
            fills.append(None)
            continue
        rel = f"{_size(s['max_rel'] * 100)} %" if "max_rel" in s else "—"
        rows.append((c.key, c.unit.symbol, str(s["n"]),
                     (f"{OUT_MARK} {s['n_out']}" if s["n_out"] else "0"),
                     f"{_dev(s['max_signed'])} at {s['max_at_T']}", _dev(s["mean"]), _size(s["rms"]), rel,
                     f"{s['max_use_of_tolerance'] * 100:.0f} %" if math.isfinite(s["max_use_of_tolerance"])
                     else "∞"))
        fills.append(FAIL_FILL if s["n_out"] else None)
    ruled_table(flow, ("column", "unit", "cells", "out", f"max Δ at T [{ref.T_unit.symbol}]",
                  "mean Δ", "RMS Δ", "max |Δ/ref|", "max used"),
           rows, (70, 62, 34, 36, 100, 54, 54, 58, 55),
           ("left", "left", "right", "right", "right", "right", "right", "right", "right"),
           row_fills=fills)
    paragraph(flow, "'max used' is the largest |Δ| as a share of the cell's allowed deviation; over 100 % "
                    "means out of tolerance. Statistics are in the reference column's unit, deviations to two "
                    "significant figures.", 7.2, color=GREY)


def _rules(flow, cmp):
    from ..calc.compare_output import RULES
    heading(flow, "How the cells are judged")
    paragraph(flow, RULES[0].upper() + RULES[1:] + ". In the listing, tablegen values are printed to the "
               "decimal places of the reference cell and deviations to two significant figures; "
               "deviations.csv holds full precision.", 7.8)


def _caution_and_signoff(flow, cmp):
    from ..calc.compare_output import CAUTION
    paragraph(flow, "Caution: " + CAUTION, 8.2, fonts.SANS_BOLD, FAIL_INK, gap=8)

    def draw(c, y):
        h = 52
        c.setStrokeColorRGB(*GREY)
        c.setLineWidth(0.6)
        c.rect(MARGIN, y - h, WIDTH, h, stroke=1, fill=0)
        cols = ("Checked by", "Date", "Signature", "Decision (release / hold)")
        w = WIDTH / len(cols)
        for j, lab in enumerate(cols):
            x = MARGIN + j * w
            if j:
                c.line(x, y - h, x, y)
            draw_text(c, x + 4, y - 10, lab, fonts.SANS, 7, GREY)
    flow.need(60)
    flow.add(60, draw)



# ----------------------------------------------------------------- listing
#: What ``--listing`` accepts: every row; the rows out of tolerance with their neighbours;
#: or every row up to LISTING_FULL_ROWS rows of a table and the failing rows above (default).
LISTING_MODES = ("auto", "full", "failing")
#: Rows of one table that "auto" still lists in full (about eleven A4 pages per group of
#: three columns; a larger table takes seconds per thousand rows to draw and nobody reads it).
LISTING_FULL_ROWS = 500
#: Rows listed either side of a row out of tolerance in an abridged listing.
LISTING_NEIGHBOURS = 2


def listed_rows(cmp, listing: str = "auto") -> list:
    """The rows the PDF listing prints: a list of row indices, with ``(a, b)`` for a run of
    rows a..b-1 left out (all within tolerance). The first and last row always appear, so
    the range compared is visible; deviations.csv keeps every row whatever the mode."""
    n = int(cmp.T_K.size)
    if listing == "full" or (listing == "auto" and n <= LISTING_FULL_ROWS):
        return list(range(n))
    bad = np.zeros(n, bool)
    for col in cmp.columns:
        bad |= np.asarray(col.present, bool) & ~np.asarray(col.within, bool)
    keep = bad.copy()
    for d in range(1, LISTING_NEIGHBOURS + 1):
        keep[:-d] |= bad[d:]
        keep[d:] |= bad[:-d]
    if n:
        keep[0] = keep[-1] = True
    out, i = [], 0
    while i < n:
        if keep[i]:
            out.append(i)
            i += 1
            continue
        j = i
        while j < n and not keep[j]:
            j += 1
        out.append((i, j))
        i = j
    return out


def _listing(flow, cmp, table: str = "", listing: str = "auto"):
    from ..calc.compare_output import format_dev
    ref = cmp.reference
    cols = list(cmp.columns)
    per = 3
    size = 6.9
    lead = 9.6
    w_line, w_T = 26.0, 44.0
    w_ref, w_tg, w_d, w_m = 52.0, 52.0, 42.0, 11.0
    aligned_any = any(c.alignment is not None for c in cols)
    rows = listed_rows(cmp, listing)
    lines, T_text = [str(n) for n in ref.lines], ref.T_text
    extrapolated = np.asarray(cmp.extrapolated, bool).tolist()
    for g in range(0, len(cols), per):
        group = cols[g:g + per]
        flow.new_page()
        title = "Side-by-side listing" + (f": {table}" if table else "") + (f" (columns {g + 1}–{g + len(group)} of {len(cols)})" if len(cols) > per else "")
        heading(flow, title)
        note = (f"{OUT_MARK} and tint: out of tolerance.  {EXTRAP_MARK}: extrapolated beyond the data range.  "
                f"Δ = tablegen − reference.  Cells too long for the column are shown to 8 significant "
                f"figures (deviations.csv keeps every digit).")
        if aligned_any:
            note += "  tablegen columns of aligned keys include the fitted constant."
        if len(rows) < cmp.T_K.size:
            note += (f"  Abridged: the rows out of tolerance, {LISTING_NEIGHBOURS} rows either side, the first and "
                     f"the last row; deviations.csv has all {cmp.T_K.size:,} rows (--listing full prints them).")
        paragraph(flow, note, 7.0, color=GREY, gap=2)

        def head(c, y, group=group):
            set_fill(c, 0.93, 0.94, 0.95)
            c.rect(MARGIN, y - 2 * lead, w_line + w_T + len(group) * (w_ref + w_tg + w_d + w_m), 2 * lead,
                   stroke=0, fill=1)
            draw_text(c, MARGIN + w_line - 2, y - 2 * lead + 2.5, "line", fonts.SANS_BOLD, size, INK, "right")
            draw_text(c, MARGIN + w_line + w_T - 2, y - 2 * lead + 2.5, f"T [{ref.T_unit.symbol}]", fonts.SANS_BOLD,
                  size, INK, "right")
            x = MARGIN + w_line + w_T
            for col in group:
                gw = w_ref + w_tg + w_d + w_m
                lab = f"{col.key} [{col.unit.symbol}]"
                draw_text(c, x + gw / 2, y - lead + 2.5, fit_text(lab, fonts.SANS_BOLD, size, gw - 4), fonts.SANS_BOLD,
                      size, INK, "center")
                tg = "tablegen" + ("*" if col.alignment is not None else "")
                for lab2, ww in (("reference", w_ref), (tg, w_tg), ("Δ", w_d)):
                    x += ww
                    draw_text(c, x - 2, y - 2 * lead + 2.5, lab2, fonts.SANS_BOLD, size, INK, "right")
                c.setStrokeColorRGB(*RULE)
                c.setLineWidth(0.3)
                c.line(x + w_m, y, x + w_m, y - 2 * lead)
                x += w_m
        flow.keep_with_next(2 * lead, 2 * lead)
        flow.add(2 * lead, head)
        # the columns as Python lists once (the same values; a listing draws many thousand cells)
        gw = w_ref + w_tg + w_d + w_m
        rule_xs, x = [], MARGIN + w_line + w_T
        for _ in group:                       # the sums the cells take, so rules and cells agree
            x += w_ref
            x += w_tg
            x += w_d
            rule_xs.append(x + w_m)
            x += w_m
        data = [(np.asarray(col.present, bool).tolist(), np.asarray(col.within, bool).tolist(), col.text,
                 np.asarray(col.reference, float).tolist(), np.asarray(col.tablegen, float).tolist(),
                 np.asarray(col.deviation, float).tolist()) for col in group]
        for i in rows:
            if flow.turn_if_short(lead):
                flow.add(2 * lead, head)
            if isinstance(i, tuple):
                flow.add(lead, lambda c, y, gap=i: _gap_row(c, y, ref, gap, lead, size))
                continue

            def row(c, y, i=i, data=data, rule_xs=tuple(rule_xs)):
                # cells are queued and drawn per page in one text object per colour (flush_text)
                base = y - lead + 2.6
                # queued in the order of one call per cell, so the page's colour groups come out alike
                queue_right(c, fonts.MONO, size, GREY, ((MARGIN + w_line - 2, base, lines[i]),))
                queue_right(c, fonts.MONO, size, INK,
                            ((MARGIN + w_line + w_T - 2, base, T_text[i] + (EXTRAP_MARK if extrapolated[i] else " ")),))
                ink_cells = []
                x = MARGIN + w_line + w_T
                for present, within, text, reference, tablegen, deviation in data:
                    bad = present[i] and not within[i]
                    if bad:
                        set_fill(c, *FAIL_FILL)
                        c.rect(x, y - lead, gw, lead, stroke=0, fill=1)
                    if present[i]:
                        r_s, t_s = _pair(text[i], reference[i], tablegen[i], w_ref - 3, size)
                        cells = (r_s, t_s, format_dev(deviation[i]))
                    else:
                        cells = ("—", _pair("", math.nan, tablegen[i], w_tg - 3, size)[1], "")
                    out = [] if bad else ink_cells
                    for s, ww in zip(cells, (w_ref, w_tg, w_d)):
                        x += ww
                        out.append((x - 2, base, fit_text(s.replace("-", "−"), fonts.MONO, size, ww - 3)))
                    if bad:
                        queue_right(c, fonts.MONO, size, FAIL_INK, out)
                        queue_text(c, x + w_m / 2, base, OUT_MARK, fonts.SANS_BOLD, size + 0.6, FAIL_INK, "center")
                    x += w_m
                queue_right(c, fonts.MONO, size, INK, ink_cells)
                queue_rules(c, rule_xs, y, y - lead)
                if i % 5 == 4:
                    set_stroke(c, RULE, 0.25)
                    c.line(MARGIN, y - lead, x, y - lead)
            flow.add(lead, row)
        if aligned_any:
            paragraph(flow, "* includes the fitted alignment constant (page 1).", 7.0, color=GREY)


def _gap_row(c, y, ref, gap, lead, size):
    """The line that stands for a run of rows left out of an abridged listing."""
    a, b = gap
    queue_text(c, MARGIN + 26.0 + 44.0, y - lead + 2.6,
               f"… {b - a:,} rows within tolerance not listed (lines {ref.lines[a]}–{ref.lines[b - 1]})",
               fonts.SANS, size, GREY, "left")


def _pair(text, ref_value, tg_value, width, size):
    """Reference cell as printed and tablegen value to the same places; both to 8 significant
    figures when the printed text is too wide for the column (deviations.csv keeps everything)."""
    from ..calc.compare_output import format_like
    if text:
        r_s, t_s = text, format_like(tg_value, text)
        if max(text_width(r_s, fonts.MONO, size), text_width(t_s, fonts.MONO, size)) <= width:
            return r_s, t_s
        return f"{ref_value:.8g}", f"{tg_value:.8g}"
    t_s = f"{tg_value:.8g}" if math.isfinite(tg_value) else "—"
    return "", t_s




# -------------------------------------------------------------- one table
def _table_body(flow, cmp, table: str = ""):
    """Everything of a one-table report after its verdict and hints."""
    heading(flow, "Document control")
    _control(flow, cmp)
    _alignments(flow, cmp)
    _tolerances(flow, cmp)
    _statistics(flow, cmp)


def render_pdf(cmp, listing: str = "auto") -> bytes:
    """The QA report of one reference table as PDF bytes (same comparison, same bytes);
    ``listing``: the rows of the side-by-side listing (:data:`LISTING_MODES`, :func:`listed_rows`)."""
    fonts.register()
    flow = report_flow()
    _title(flow, f"QA comparison: {cmp.substance['name']} against the reference table")
    _verdict(flow, cmp)
    _hints_and_wide(flow, cmp.hints, cmp.wide)
    _table_body(flow, cmp)
    _rules(flow, cmp)
    _caution_and_signoff(flow, cmp)
    plots(flow, cmp)
    _listing(flow, cmp, listing=listing)
    verdict = "PASS" if cmp.passed else f"FAIL ({cmp.n_out} cells)"
    return _render(flow, title=f"QA comparison: {cmp.substance['id']} against {cmp.reference.path}",
                   subject=cmp.verdict, version=cmp.version, ok=cmp.passed,
                   right=f"{cmp.substance['id']} against {cmp.reference.path} · {verdict}",
                   foot=f"Reference SHA-256 {cmp.reference.sha256[:16]}…")


# -------------------------------------------------------------- the book
def _identity_rows(bc):
    s, f = bc.spec, bc.folder
    b = f.book or {}
    rows = [("this spec", s["file"], s.get("number", ""), s.get("revision", ""), s.get("issue_date", ""),
             s.get("fingerprint", "")[:16] + "…")]
    if b:
        rows.append(("reference book", f"{Path(f.path).name}/{f.sidecar}", b.get("number", ""),
                     b.get("revision", ""), b.get("issue_date", ""),
                     (b.get("fingerprint", "")[:16] + "…") if b.get("fingerprint") else "—"))
    else:
        rows.append(("reference folder", f.path, "—", "—", "—", "no book sidecar"))
    return rows


def _book_page_one(flow, bc):
    from ..calc.compare_output import unit_suffix, worst_cell
    s, f = bc.spec, bc.folder
    _title(flow, f"QA comparison: {s.get('title') or s['name']} against the reference folder {f.path}")
    n = len(bc.tables)
    detail = (f"all {n} tables, all {bc.n_cells} compared cells within tolerance" if bc.passed else
              f"{bc.n_failed_tables} of {n} tables fail: {bc.n_out} of {bc.n_cells} cells out of tolerance")
    same = {True: "The reference book has the same fingerprint: it was computed from the same spec and data, "
                  "so any deviation means its files were changed after the build.",
            False: "The reference book has another fingerprint: another spec or other data (a new revision "
                   "compared with the last issued one).",
            None: "The reference folder states no book fingerprint."}[bc.same_fingerprint]
    _verdict_box(flow, bc.passed, detail, [f"{s['file']} against {f.path}; exit status the worst of the tables",
                                           same])
    heading(flow, "What is compared")
    ruled_table(flow, ("", "file", "document", "revision", "issued", "fingerprint"), _identity_rows(bc),
                (76, 170, 72, 48, 60, 97), ("left",) * 6)
    heading(flow, "Tables")
    rows, fills = [], []
    for t in bc.tables:
        c = t.comparison
        ident = t.entry.identity or {}
        w = worst_cell(c)
        use = "—" if not w else ("∞" if not math.isfinite(w["use_of_tolerance"]) else
                                 "< 1 %" if w["use_of_tolerance"] < 0.01 else f"{w['use_of_tolerance'] * 100:.0f} %")
        rows.append((t.name, Path(t.entry.path).name, ident.get("revision", "—") or "—", str(c.n_cells),
                     f"{OUT_MARK} {c.n_out}" if c.n_out else "0",
                     f"{w['column']} at {w['T']} {w['T_unit']}" if w else "—",
                     f"{_dev(w['deviation'])} of ±{_size(w['bound'])}{unit_suffix(w['unit'])}" if w else "—",
                     use, "PASS" if c.passed else f"{OUT_MARK} FAIL"))
        fills.append(None if c.passed else FAIL_FILL)
    ruled_table(flow, ("table", "reference file", "rev.", "cells", "out", "worst cell", "Δ of allowed", "used",
                       "verdict"), rows, (70, 80, 24, 30, 26, 88, 135, 30, 40),
                ("left", "left", "left", "right", "right", "left", "right", "right", "left"), size=6.8,
                row_fills=fills)
    paragraph(flow, "Worst cell: the cell that uses the largest share of its allowed deviation; 'used' is that "
                    "share (over 100 % is out of tolerance).", 7.0, color=GREY)
    _bullets(flow, "About the reference folder", list(f.notes) + (
        [f"Files of the folder no compared table uses: {', '.join(f.unmatched)}"] if f.unmatched else []))
    hints = [(t.name, h) for t in bc.tables for h in t.comparison.hints]
    _bullets(flow, "Hints from the deviations", [f"{name}: {h.text}" for name, h in hints],
             "What the pattern of the deviations suggests. Hints never change the verdict.")
    wide = [dict(w, table=t.name) for t in bc.tables for w in t.comparison.wide]
    _hints_and_wide(flow, (), wide)
    _rules(flow, None)
    _caution_and_signoff(flow, None)


def render_book_pdf(bc, listing: str = "auto") -> bytes:
    """The QA report of a book against a reference folder: a summary page, then one section per table
    (``listing`` as for :func:`render_pdf`, table by table)."""
    fonts.register()
    flow = report_flow()
    _book_page_one(flow, bc)
    n = len(bc.tables)
    for k, t in enumerate(bc.tables, start=1):
        cmp = t.comparison
        flow.new_page()
        _title(flow, f"Table {k} of {n}: {t.name} ({t.title}) against {Path(t.entry.path).name}")
        _verdict(flow, cmp)
        ident = t.entry.identity or {}
        if ident:
            paragraph(flow, f"Reference matched by {t.entry.matched_by}; {t.entry.identity_from} names document "
                            f"{ident.get('number') or '—'}, revision {ident.get('revision') or '—'}, fingerprint "
                            f"{(ident.get('fingerprint') or '—')[:16]}….", 7.6, color=GREY)
        else:
            paragraph(flow, f"Reference matched by {t.entry.matched_by}; no metadata file states its issue.",
                      7.6, color=GREY)
        _hints_and_wide(flow, cmp.hints, cmp.wide)
        _table_body(flow, cmp, t.name)
        plots(flow, cmp, f"Deviation against temperature: {t.name}")
        _listing(flow, cmp, t.name, listing)
    s = bc.spec
    verdict = "PASS" if bc.passed else f"FAIL ({bc.n_out} cells in {bc.n_failed_tables} tables)"
    return _render(flow, title=f"QA comparison: {s['name']} against {bc.folder.path}", subject=bc.verdict,
                   version=bc.version, ok=bc.passed, right=f"{s['name']} against {bc.folder.path} · {verdict}",
                   foot=f"Spec fingerprint {s.get('fingerprint', '')[:16]}…")


# ------------------------------------------------------------------ render
def _render(flow, *, title, subject, version, ok, right, foot) -> bytes:
    return with_binary_streams(_draw, flow.pages, title, subject, version, ok, right, foot)


def _draw(pages, title, subject, version, ok, right, foot) -> bytes:
    buf = io.BytesIO()
    c = fonts.canvas(buf, pagesize=(PAGE_W, PAGE_H), initialFontName=fonts.SANS, pageCompression=1)
    c.setTitle(title)
    c.setAuthor("tablegen")
    c.setCreator(f"tablegen {version}")
    c.setSubject(subject)

    def draw_page(c, no, total):
        forget_state(c)
        _running(c, no, total, ok, right, f"{foot}  tablegen {version}")
        for y, draw in pages[no - 1]:
            draw(c, y)
        flush_text(c)
    try:
        draw_pages(c, pages, draw_page)
        c.save()
    finally:
        DRAW_STATE.pop(id(c), None)
    return buf.getvalue()


def _running(c, k, total, ok, right, foot):
    draw_text(c, MARGIN, PAGE_H - MARGIN - 8, "tablegen · QA comparison", fonts.SANS_BOLD, 7.5, GREY)
    draw_text(c, PAGE_W - MARGIN, PAGE_H - MARGIN - 8, fit_text(right, fonts.SANS, 7.5, WIDTH - 140),
              fonts.SANS, 7.5, PASS_INK if ok else FAIL_INK, "right")
    c.setStrokeColorRGB(*RULE)
    c.setLineWidth(0.5)
    c.line(MARGIN, PAGE_H - MARGIN - 13, PAGE_W - MARGIN, PAGE_H - MARGIN - 13)
    c.line(MARGIN, MARGIN + 14, PAGE_W - MARGIN, MARGIN + 14)
    draw_text(c, MARGIN, MARGIN + 4, f"Checks agreement with the given reference only.  {foot}",
              fonts.SANS, 6.8, GREY)
    draw_text(c, PAGE_W - MARGIN, MARGIN + 4, page_of(k, total), fonts.SANS, 7.5, INK, "right")
