"""PDF report of a QA comparison: verdict first, then the evidence.

Lays out a finished :class:`tablegen.compare.Comparison` and evaluates
nothing. Page 1: verdict, document control, alignment constants, per-column
statistics, the judging rules, the caution and a sign-off block. Then one
deviation-versus-temperature plot per column (reportlab vector lines, with the
tolerance band), then the full side-by-side listing where every cell out of
tolerance carries the symbol ✗ as well as a tinted background, so it survives
black-and-white printing. Reproducible bytes: reportlab invariant mode,
embedded DejaVu fonts, no clock.
"""

from __future__ import annotations

import io
import math

import numpy as np

from . import fonts

PAGE_W, PAGE_H = 595.2756, 841.8898          # A4 portrait, pt
MARGIN = 36.0
TOP = PAGE_H - MARGIN - 26                   # below the running head
BOTTOM = MARGIN + 24                         # above the running foot
WIDTH = PAGE_W - 2 * MARGIN

INK = (0.10, 0.11, 0.13)
GREY = (0.42, 0.44, 0.47)
RULE = (0.75, 0.77, 0.80)
PASS_INK, PASS_FILL = (0.09, 0.40, 0.23), (0.88, 0.95, 0.90)
FAIL_INK, FAIL_FILL = (0.62, 0.11, 0.09), (0.98, 0.87, 0.85)
BAND = (0.20, 0.36, 0.62)
TRACE = (0.13, 0.15, 0.20)
OUT_MARK = "✗"
EXTRAP_MARK = "†"


# ------------------------------------------------------------- flow layout
class Flow:
    """Blocks stacked down pages; page breaks where a block does not fit."""

    def __init__(self):
        self.pages = [[]]
        self.y = TOP

    def need(self, h: float):
        if self.y - h < BOTTOM and self.pages[-1]:
            self.new_page()

    def new_page(self):
        self.pages.append([])
        self.y = TOP

    def add(self, h: float, draw):
        """draw(canvas, y_top) fills the band [y_top - h, y_top]."""
        self.need(h)
        self.pages[-1].append((self.y, draw))
        self.y -= h


#: Drawing state last set on each canvas being drawn (fill colour, font), so that big
#: listings skip operators that change nothing; keyed by the canvas's id, never stored
#: on the library's object. render_pdf removes its entry when the document is done.
_STATE: dict = {}


def _fill(c, *rgb):
    """Set the fill colour, skipping the operator when it is already set (big listings)."""
    rgb = tuple(rgb[0]) if len(rgb) == 1 else tuple(rgb)
    st = _STATE.setdefault(id(c), {})
    if st.get("fill") != rgb:
        c.setFillColorRGB(*rgb)
        st["fill"] = rgb


def _forget(c):
    """After showPage or restoreState the canvas state is reset: forget the cache."""
    _STATE[id(c)] = {}


def _text(c, x, y, s, font=fonts.SANS, size=8.5, color=INK, align="left"):
    _fill(c, *color)
    st = _STATE.setdefault(id(c), {})
    if st.get("font") != (font, size):
        c.setFont(font, size)
        st["font"] = (font, size)
    if align == "right":
        c.drawRightString(x, y, s)
    elif align == "center":
        c.drawCentredString(x, y, s)
    else:
        c.drawString(x, y, s)


def _wrap(s: str, font: str, size: float, width: float) -> list[str]:
    from reportlab.pdfbase.pdfmetrics import stringWidth
    out, line = [], ""
    for word in s.split(" "):
        trial = word if not line else line + " " + word
        if stringWidth(trial, font, size) <= width or not line:
            line = trial
        else:
            out.append(line)
            line = word
    if line:
        out.append(line)
    return out


def _fit(s: str, font: str, size: float, width: float) -> str:
    from reportlab.pdfbase.pdfmetrics import stringWidth
    if stringWidth(s, font, size) <= width:
        return s
    while s and stringWidth(s + "…", font, size) > width:
        s = s[:-1]
    return s + "…"


def _num(x, digits=3) -> str:
    if x is None or not math.isfinite(x):
        return "—"
    if x == 0:
        return "0"
    return f"{x:.{digits}g}"


# ---------------------------------------------------------------- sections
def _heading(flow, title: str):
    def draw(c, y):
        _text(c, MARGIN, y - 13, title, fonts.SANS_BOLD, 10.5)
        c.setStrokeColorRGB(*RULE)
        c.setLineWidth(0.5)
        c.line(MARGIN, y - 17, MARGIN + WIDTH, y - 17)
    flow.add(24, draw)


def _paragraph(flow, s: str, size=8.0, font=fonts.SANS, color=INK, gap=4.0):
    lines = _wrap(s, font, size, WIDTH)
    lead = size * 1.3
    for ln in lines:
        flow.add(lead, lambda c, y, ln=ln: _text(c, MARGIN, y - size, ln, font, size, color))
    flow.add(gap, lambda c, y: None)


def _table(flow, head, rows, widths, aligns, size=7.6, font=fonts.SANS, row_fills=None):
    """Simple ruled table; repeats its head after a page break."""
    lead = size * 1.55
    def draw_head(c, y):
        _fill(c, 0.93, 0.94, 0.95)
        c.rect(MARGIN, y - lead, sum(widths), lead, stroke=0, fill=1)
        x = MARGIN
        for h, w, a in zip(head, widths, aligns):
            _cell(c, x, y, w, lead, h, fonts.SANS_BOLD, size, INK, a)
            x += w
    flow.need(lead * 2)
    flow.add(lead, draw_head)
    for k, r in enumerate(rows):
        if flow.y - lead < BOTTOM:
            flow.new_page()
            flow.add(lead, draw_head)
        fill = row_fills[k] if row_fills else None
        def draw(c, y, r=r, fill=fill):
            if fill:
                _fill(c, *fill)
                c.rect(MARGIN, y - lead, sum(widths), lead, stroke=0, fill=1)
            x = MARGIN
            for v, w, a in zip(r, widths, aligns):
                _cell(c, x, y, w, lead, v, font, size, INK, a)
                x += w
            c.setStrokeColorRGB(*RULE)
            c.setLineWidth(0.3)
            c.line(MARGIN, y - lead, MARGIN + sum(widths), y - lead)
        flow.add(lead, draw)
    flow.add(6, lambda c, y: None)


def _cell(c, x, y, w, lead, s, font, size, color, align):
    s = _fit(str(s), font, size, w - 4)
    base = y - lead + (lead - size) / 2 + 1.2
    if align == "right":
        _text(c, x + w - 2, base, s, font, size, color, "right")
    else:
        _text(c, x + 2, base, s, font, size, color)


def _verdict(flow, cmp):
    ok = cmp.passed
    ink, fill = (PASS_INK, PASS_FILL) if ok else (FAIL_INK, FAIL_FILL)
    word = "✓ PASS" if ok else f"{OUT_MARK} FAIL"
    detail = (f"all {cmp.n_cells} compared cells are within tolerance" if ok else
              f"{cmp.n_out} of {cmp.n_cells} compared cells are out of tolerance (marked {OUT_MARK} in the listing)")
    extra = []
    al = [c.alignment for c in cmp.columns if c.alignment is not None]
    extra.append(f"after fitting {len(al)} alignment constant{'s' if len(al) != 1 else ''} (below)" if al
                 else "no alignment: values compared as computed with the datum and scales below")
    if cmp.extrapolated.any():
        n = int(cmp.extrapolated.sum())
        extra.append(f"{n} row{'s' if n > 1 else ''} extrapolated beyond the data range ({EXTRAP_MARK}), "
                     f"not for design use")

    def draw(c, y):
        h = 58
        _fill(c, *fill)
        c.setStrokeColorRGB(*ink)
        c.setLineWidth(1.4)
        c.rect(MARGIN, y - h, WIDTH, h, stroke=1, fill=1)
        _text(c, MARGIN + 12, y - 27, word, fonts.SANS_BOLD, 20, ink)
        _text(c, MARGIN + 120, y - 21, detail, fonts.SANS_BOLD, 9.5, ink)
        _text(c, MARGIN + 120, y - 35, "; ".join(extra), fonts.SANS, 8, INK)
        _text(c, MARGIN + 120, y - 48, f"{cmp.substance['name']} ({cmp.substance['id']}) against "
                                       f"{cmp.reference.path}", fonts.SANS, 8, INK)
    flow.add(66, draw)


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
        lines = _wrap(str(value), fonts.SANS, 7.8, WIDTH - 110)
        for j, ln in enumerate(lines):
            lab = label if j == 0 else ""
            flow.add(lead, lambda c, y, lab=lab, ln=ln: (
                _text(c, MARGIN, y - 8, lab, fonts.SANS_BOLD, 7.8, GREY),
                _text(c, MARGIN + 110, y - 8, ln, fonts.SANS, 7.8)))
    flow.add(6, lambda c, y: None)


def _alignments(flow, cmp):
    from ..compare import KEY_LABELS
    al = [c for c in cmp.columns if c.alignment is not None]
    _heading(flow, "Alignment constants (fitted before the deviations are judged)")
    if not al:
        _paragraph(flow, "None requested: every column is compared as computed, with the enthalpy datum, "
                         "entropy reference pressure and Pr/vr anchor given above.")
        return
    rows = []
    for c in al:
        a = c.alignment
        val = f"{'+' if a.kind == 'offset' and a.value_in_unit >= 0 else ''}{a.value_in_unit:.9g}"
        rows.append((f"{c.key} ({KEY_LABELS[c.key]})", a.kind, val, a.unit, str(a.n),
                     f"{_num(a.rms_before)} → {_num(a.rms_after)}"))
    _table(flow, ("column", "kind", "fitted constant", "unit", "rows", "RMS Δ before → after"),
           rows, (120, 50, 110, 70, 40, 133), ("left", "left", "right", "left", "right", "right"))
    for c in al:
        _paragraph(flow, f"{c.key}: {c.alignment.meaning}.", size=7.4, color=GREY, gap=1)
    flow.add(4, lambda c, y: None)


def _tolerances(flow, cmp):
    from ..compare import KEY_LABELS
    _heading(flow, "Tolerances (allowed |Δ| per cell, plus half the last printed digit)")
    _paragraph(flow, "Defaults and their grounds: docs/compare.md.", 7.2, color=GREY, gap=2)
    rows = []
    for c in cmp.columns:
        t = c.tolerance
        rows.append((c.key, KEY_LABELS[c.key], c.unit.symbol, t.text,
                     "--tolerance" if t.origin == "--tolerance" else "default"))
    _table(flow, ("column", "property", "unit", "tolerance", "set by"), rows, (60, 74, 62, 262, 65),
           ("left",) * 5)


def _statistics(flow, cmp):
    _heading(flow, "Per-column statistics (Δ = tablegen − reference)")
    ref = cmp.reference
    rows, fills = [], []
    for c in cmp.columns:
        s = c.stats
        if not s["n"]:
            rows.append((c.key, c.unit.symbol, "0", "0", "—", "—", "—", "—", "—"))
            fills.append(None)
            continue
        rel = f"{s['max_rel'] * 100:.3g} %" if "max_rel" in s else "—"
        rows.append((c.key, c.unit.symbol, str(s["n"]),
                     (f"{OUT_MARK} {s['n_out']}" if s["n_out"] else "0"),
                     f"{_num(s['max_signed'])} at {s['max_at_T']}", _num(s["mean"]), _num(s["rms"]), rel,
                     f"{s['max_use_of_tolerance'] * 100:.0f} %" if math.isfinite(s["max_use_of_tolerance"])
                     else "∞"))
        fills.append(FAIL_FILL if s["n_out"] else None)
    _table(flow, ("column", "unit", "cells", "out", f"max Δ at T [{ref.T_unit.symbol}]",
                  "mean Δ", "RMS Δ", "max |Δ/ref|", "max used"),
           rows, (70, 62, 34, 36, 100, 54, 54, 58, 55),
           ("left", "left", "right", "right", "right", "right", "right", "right", "right"),
           row_fills=fills)
    _paragraph(flow, "'max used' is the largest |Δ| as a share of the cell's allowed deviation; over 100 % "
                     "means out of tolerance. Statistics are in the reference column's unit.", 7.2, color=GREY)


def _rules(flow, cmp):
    from ..compare import RULES
    _heading(flow, "How the cells are judged")
    _paragraph(flow, RULES[0].upper() + RULES[1:] + ". In the listing, tablegen values are printed to the "
               "decimal places of the reference cell and deviations to two significant figures; "
               "deviations.csv holds full precision.", 7.8)


def _caution_and_signoff(flow, cmp):
    from ..compare import CAUTION
    _paragraph(flow, "Caution: " + CAUTION, 8.2, fonts.SANS_BOLD, FAIL_INK, gap=8)

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
            _text(c, x + 4, y - 10, lab, fonts.SANS, 7, GREY)
    flow.need(60)
    flow.add(60, draw)


# ------------------------------------------------------------------- plots
def _nice_step(span: float, n: int = 5) -> float:
    raw = span / max(n, 1)
    if raw <= 0 or not math.isfinite(raw):
        return 1.0
    mag = 10 ** math.floor(math.log10(raw))
    for m in (1, 2, 2.5, 5, 10):
        if raw <= m * mag:
            return m * mag
    return 10 * mag


def _ticks(lo: float, hi: float, n: int = 5):
    step = _nice_step(hi - lo, n)
    start = math.ceil(lo / step - 1e-9) * step
    out, v = [], start
    while v <= hi + 1e-9 * step:
        out.append(0.0 if abs(v) < 1e-12 * step else v)
        v += step
    return out, step


def _tick_label(v: float, step: float) -> str:
    if v == 0:
        return "0"
    if abs(v) >= 1e5 or abs(v) < 1e-3:
        return f"{v:.2g}"
    dec = max(0, -int(math.floor(math.log10(step)))) if step < 1 else 0
    return f"{v:.{dec}f}".replace("-", "−")


def _clip_segments(points, ylo, yhi):
    """Split a polyline (None breaks it) into pieces inside ylo <= y <= yhi, cut exactly at the limits,
    so no coordinate far outside the plot reaches the PDF."""
    pieces, cur = [], []
    for a, b in zip(points[:-1], points[1:]):
        if a is None or b is None:
            continue
        (t0, v0), (t1, v1) = a, b
        s0, s1 = 0.0, 1.0                       # parameter range of the segment inside the limits
        dv = v1 - v0
        for lim, inside_above in ((ylo, True), (yhi, False)):
            if dv == 0:
                if (v0 < lim) if inside_above else (v0 > lim):
                    s0, s1 = 1.0, 0.0
                continue
            sc = (lim - v0) / dv
            if (dv > 0) == inside_above:
                s0 = max(s0, sc)
            else:
                s1 = min(s1, sc)
        if s0 > s1:
            continue
        p0 = (t0 + (t1 - t0) * s0, v0 + dv * s0)
        p1 = (t0 + (t1 - t0) * s1, v0 + dv * s1)
        if cur and cur[-1] == p0:
            cur.append(p1)
        else:
            if len(cur) > 1:
                pieces.append(cur)
            cur = [p0, p1]
    if len(cur) > 1:
        pieces.append(cur)
    return pieces


def _polyline(c, points, ylo, yhi, X, Y):
    for piece in _clip_segments(points, ylo, yhi):
        path = c.beginPath()
        path.moveTo(X(piece[0][0]), Y(piece[0][1]))
        for t, v in piece[1:]:
            path.lineTo(X(t), Y(v))
        c.drawPath(path, stroke=1, fill=0)


def draw_deviation_plot(c, col, T_disp, T_unit, x, y, w, h):
    """Δ against T with the ±tolerance band; out-of-tolerance points marked ✗ (vector)."""
    from ..compare import KEY_LABELS
    _text(c, x, y + h + 8, f"{KEY_LABELS[col.key]}   ({col.key}, Δ in {col.unit.symbol})", fonts.SANS_BOLD, 7.8)
    px0, py0, pw, ph = x + 42, y + 22, w - 50, h - 30
    m = col.present
    order = np.argsort(T_disp, kind="stable")
    Ts, ds, bs, ms, ws = T_disp[order], col.deviation[order], col.bound[order], m[order], col.within[order]
    if not np.any(ms):
        _text(c, px0 + pw / 2, py0 + ph / 2, "no reference values", size=8, color=GREY, align="center")
        return
    t_lo, t_hi = float(np.min(Ts)), float(np.max(Ts))
    if t_hi <= t_lo:
        t_lo, t_hi = t_lo - 1, t_hi + 1
    dmax = float(np.nanmax(np.abs(ds[ms])))
    bmax = float(np.nanmax(bs[ms]))
    ymax = dmax * 1.2
    ymax = max(ymax, min(bmax * 1.1, 3 * ymax))       # show the band unless it dwarfs the deviations
    if not ymax > 0:
        ymax = bmax * 1.1 if bmax > 0 else 1.0
    band_clipped = bmax > ymax
    yt, ystep = _ticks(-ymax, ymax, 4)
    ylo, yhi = min(yt[0], -ymax), max(yt[-1], ymax)
    xt, xstep = _ticks(t_lo, t_hi, 6)

    def X(t):
        return px0 + (t - t_lo) / (t_hi - t_lo) * pw

    def Y(v):
        return py0 + (v - ylo) / (yhi - ylo) * ph

    c.saveState()
    c.setStrokeColorRGB(*RULE)
    c.setLineWidth(0.3)
    for v in yt:
        c.line(px0, Y(v), px0 + pw, Y(v))
        _text(c, px0 - 3, Y(v) - 2.3, _tick_label(v, ystep), size=6.3, color=GREY, align="right")
    for t in xt:
        if t_lo - 1e-9 <= t <= t_hi + 1e-9:
            c.line(X(t), py0, X(t), py0 + ph)
            _text(c, X(t), py0 - 8, _tick_label(t, xstep), size=6.3, color=GREY, align="center")
    _text(c, px0 + pw / 2, py0 - 17, f"T [{T_unit}]", size=6.8, color=GREY, align="center")
    c.setStrokeColorRGB(*GREY)
    c.setLineWidth(0.6)
    c.rect(px0, py0, pw, ph, stroke=1, fill=0)
    c.setLineWidth(0.5)
    c.line(px0, Y(0), px0 + pw, Y(0))
    p = c.beginPath()
    p.rect(px0, py0, pw, ph)
    c.clipPath(p, stroke=0, fill=0)
    c.setStrokeColorRGB(*BAND)
    c.setLineWidth(0.8)
    c.setDash(3, 2)
    for sign in (1, -1):
        _polyline(c, [(t, sign * b) for t, b, mm in zip(Ts, bs, ms) if mm], ylo, yhi, X, Y)
    c.setDash()
    c.setStrokeColorRGB(*TRACE)
    c.setLineWidth(0.7)
    _polyline(c, [(t, d) if mm else None for t, d, mm in zip(Ts, ds, ms)], ylo, yhi, X, Y)
    _fill(c, *TRACE)
    if int(np.sum(ms)) <= 200:              # row markers while they stay distinguishable
        for t, d, mm, ok in zip(Ts, ds, ms, ws):
            if mm and ok:
                c.rect(X(t) - 0.9, Y(d) - 0.9, 1.8, 1.8, stroke=0, fill=1)
    c.restoreState()
    _forget(c)
    for t, d, mm, ok in zip(Ts, ds, ms, ws):
        if mm and not ok:
            yy = min(max(Y(d), py0), py0 + ph)
            _text(c, X(t), yy - 3.2, OUT_MARK, fonts.SANS_BOLD, 9, FAIL_INK, "center")
    legend = "— Δ   "
    legend += "- - ± allowed deviation" + (f" (up to ±{_num(bmax, 2)}, partly beyond the plot)" if band_clipped else "")
    if not np.all(ws[ms]):
        legend += f"   {OUT_MARK} out of tolerance"
    _text(c, px0, py0 + ph + 4, legend, size=6.3, color=GREY)


def _plots(flow, cmp):
    ref = cmp.reference
    T_disp = ref.T_unit.from_si(cmp.T_K)
    flow.new_page()
    _heading(flow, "Deviation against temperature")
    ph, gap = 200.0, 26.0
    cols = list(cmp.columns)
    for k in range(0, len(cols), 2):
        pair = cols[k:k + 2]
        def draw(c, y, pair=pair):
            w = (WIDTH - 20) / 2
            for j, col in enumerate(pair):
                draw_deviation_plot(c, col, T_disp, ref.T_unit.symbol, MARGIN + j * (w + 20), y - ph - 4, w, ph - 14)
        flow.add(ph + gap, draw)


# ----------------------------------------------------------------- listing
def _listing(flow, cmp):
    from ..compare import format_dev
    ref = cmp.reference
    cols = list(cmp.columns)
    per = 3
    size = 6.9
    lead = 9.6
    w_line, w_T = 26.0, 44.0
    w_ref, w_tg, w_d, w_m = 52.0, 52.0, 42.0, 11.0
    aligned_any = any(c.alignment is not None for c in cols)
    for g in range(0, len(cols), per):
        group = cols[g:g + per]
        flow.new_page()
        title = "Side-by-side listing" + (f" (columns {g + 1}–{g + len(group)} of {len(cols)})" if len(cols) > per else "")
        _heading(flow, title)
        note = (f"{OUT_MARK} and tint: out of tolerance.  {EXTRAP_MARK}: extrapolated beyond the data range.  "
                f"Δ = tablegen − reference.  Cells too long for the column are shown to 8 significant "
                f"figures (deviations.csv keeps every digit).")
        if aligned_any:
            note += "  tablegen columns of aligned keys include the fitted constant."
        _paragraph(flow, note, 7.0, color=GREY, gap=2)

        def head(c, y, group=group):
            _fill(c, 0.93, 0.94, 0.95)
            c.rect(MARGIN, y - 2 * lead, w_line + w_T + len(group) * (w_ref + w_tg + w_d + w_m), 2 * lead,
                   stroke=0, fill=1)
            _text(c, MARGIN + w_line - 2, y - 2 * lead + 2.5, "line", fonts.SANS_BOLD, size, INK, "right")
            _text(c, MARGIN + w_line + w_T - 2, y - 2 * lead + 2.5, f"T [{ref.T_unit.symbol}]", fonts.SANS_BOLD,
                  size, INK, "right")
            x = MARGIN + w_line + w_T
            for col in group:
                gw = w_ref + w_tg + w_d + w_m
                lab = f"{col.key} [{col.unit.symbol}]"
                _text(c, x + gw / 2, y - lead + 2.5, _fit(lab, fonts.SANS_BOLD, size, gw - 4), fonts.SANS_BOLD,
                      size, INK, "center")
                tg = "tablegen" + ("*" if col.alignment is not None else "")
                for lab2, ww in (("reference", w_ref), (tg, w_tg), ("Δ", w_d)):
                    x += ww
                    _text(c, x - 2, y - 2 * lead + 2.5, lab2, fonts.SANS_BOLD, size, INK, "right")
                c.setStrokeColorRGB(*RULE)
                c.setLineWidth(0.3)
                c.line(x + w_m, y, x + w_m, y - 2 * lead)
                x += w_m
        flow.need(4 * lead)
        flow.add(2 * lead, head)
        n = cmp.T_K.size
        for i in range(n):
            if flow.y - lead < BOTTOM:
                flow.new_page()
                flow.add(2 * lead, head)

            def row(c, y, i=i, group=group):
                base = y - lead + 2.6
                ext = bool(cmp.extrapolated[i])
                _text(c, MARGIN + w_line - 2, base, str(ref.lines[i]), fonts.MONO, size, GREY, "right")
                _text(c, MARGIN + w_line + w_T - 2, base, ref.T_text[i] + (EXTRAP_MARK if ext else " "),
                      fonts.MONO, size, INK, "right")
                x = MARGIN + w_line + w_T
                for col in group:
                    gw = w_ref + w_tg + w_d + w_m
                    bad = bool(col.present[i] and not col.within[i])
                    if bad:
                        _fill(c, *FAIL_FILL)
                        c.rect(x, y - lead, gw, lead, stroke=0, fill=1)
                    ink = FAIL_INK if bad else INK
                    if col.present[i]:
                        r_s, t_s = _pair(col.text[i], col.reference[i], col.tablegen[i], w_ref - 3, size)
                        cells = (r_s, t_s, format_dev(col.deviation[i]))
                    else:
                        cells = ("—", _pair("", np.nan, col.tablegen[i], w_tg - 3, size)[1], "")
                    for s, ww in zip(cells, (w_ref, w_tg, w_d)):
                        x += ww
                        _text(c, x - 2, base, _fit(s.replace("-", "−"), fonts.MONO, size, ww - 3), fonts.MONO,
                              size, ink, "right")
                    if bad:
                        _text(c, x + w_m / 2, base, OUT_MARK, fonts.SANS_BOLD, size + 0.6, FAIL_INK, "center")
                    c.setStrokeColorRGB(*RULE)
                    c.setLineWidth(0.3)
                    c.line(x + w_m, y, x + w_m, y - lead)
                    x += w_m
                if i % 5 == 4:
                    c.setStrokeColorRGB(*RULE)
                    c.setLineWidth(0.25)
                    c.line(MARGIN, y - lead, x, y - lead)
            flow.add(lead, row)
        if aligned_any:
            _paragraph(flow, "* includes the fitted alignment constant (page 1).", 7.0, color=GREY)


def _pair(text, ref_value, tg_value, width, size):
    """Reference cell as printed and tablegen value to the same places; both to 8 significant
    figures when the printed text is too wide for the column (deviations.csv keeps everything)."""
    from reportlab.pdfbase.pdfmetrics import stringWidth

    from ..compare import format_like
    if text:
        r_s, t_s = text, format_like(tg_value, text)
        if max(stringWidth(r_s, fonts.MONO, size), stringWidth(t_s, fonts.MONO, size)) <= width:
            return r_s, t_s
        return f"{ref_value:.8g}", f"{tg_value:.8g}"
    t_s = f"{tg_value:.8g}" if math.isfinite(tg_value) else "—"
    return "", t_s


# ------------------------------------------------------------------ render
def render_pdf(cmp) -> bytes:
    """The QA report as PDF bytes (same comparison, same bytes)."""
    fonts.register()
    flow = Flow()

    for ln in _wrap(f"QA comparison: {cmp.substance['name']} against the reference table",
                    fonts.SANS_BOLD, 14, WIDTH)[:3]:
        flow.add(19, lambda c, y, ln=ln: _text(c, MARGIN, y - 15, ln, fonts.SANS_BOLD, 14))
    flow.add(7, lambda c, y: None)
    _verdict(flow, cmp)
    _heading(flow, "Document control")
    _control(flow, cmp)
    _alignments(flow, cmp)
    _tolerances(flow, cmp)
    _statistics(flow, cmp)
    _rules(flow, cmp)
    _caution_and_signoff(flow, cmp)
    _plots(flow, cmp)
    _listing(flow, cmp)

    from reportlab import rl_config
    a85, rl_config.useA85 = rl_config.useA85, 0     # binary streams: smaller and faster
    try:
        return _render(cmp, flow)
    finally:
        rl_config.useA85 = a85


def _render(cmp, flow) -> bytes:
    buf = io.BytesIO()
    c = fonts.canvas(buf, pagesize=(PAGE_W, PAGE_H), initialFontName=fonts.SANS, pageCompression=1)
    c.setTitle(f"QA comparison: {cmp.substance['id']} against {cmp.reference.path}")
    c.setAuthor("tablegen")
    c.setCreator(f"tablegen {cmp.version}")
    c.setSubject(cmp.verdict)
    total = len(flow.pages)
    try:
        for k, page in enumerate(flow.pages, start=1):
            _forget(c)
            _running(c, cmp, k, total)
            for y, draw in page:
                draw(c, y)
            c.showPage()
        c.save()
    finally:
        _STATE.pop(id(c), None)
    return buf.getvalue()


def _running(c, cmp, k, total):
    ok = cmp.passed
    _text(c, MARGIN, PAGE_H - MARGIN - 8, "tablegen · QA comparison", fonts.SANS_BOLD, 7.5, GREY)
    verdict = "PASS" if ok else f"FAIL ({cmp.n_out} cells)"
    _text(c, PAGE_W - MARGIN, PAGE_H - MARGIN - 8,
          _fit(f"{cmp.substance['id']} against {cmp.reference.path} · {verdict}", fonts.SANS, 7.5, WIDTH - 140),
          fonts.SANS, 7.5, PASS_INK if ok else FAIL_INK, "right")
    c.setStrokeColorRGB(*RULE)
    c.setLineWidth(0.5)
    c.line(MARGIN, PAGE_H - MARGIN - 13, PAGE_W - MARGIN, PAGE_H - MARGIN - 13)
    c.line(MARGIN, MARGIN + 14, PAGE_W - MARGIN, MARGIN + 14)
    _text(c, MARGIN, MARGIN + 4, "Checks agreement with the given reference only.  "
                                 f"Reference SHA-256 {cmp.reference.sha256[:16]}…  tablegen {cmp.version}",
          fonts.SANS, 6.8, GREY)
    _text(c, PAGE_W - MARGIN, MARGIN + 4, f"page {k} of {total}", fonts.SANS, 7.5, INK, "right")
