"""Deviation-against-temperature plots of the QA report (reportlab vector drawing).

One plot per compared column: Δ against T with the ± tolerance band, out-of-tolerance
points marked ✗ so they survive black-and-white printing. A column whose deviations are
all below 1e-9 of its allowed deviation is not plotted at round-off scale (that shows
nothing but noise): the plot is replaced by the words "identical to round-off".
"""

from __future__ import annotations

import math

import numpy as np

from ..core.rounding import round_step_up
from . import fonts
from .qa_layout import (BAND, FAIL_INK, GREY, MARGIN, OUT_MARK, RULE, TRACE, WIDTH, draw_text, fmt_num,
                        forget_state, heading, paragraph, set_fill)

#: A column whose every |Δ| is below this share of its allowed deviation is "identical to round-off".
ROUND_OFF = 1e-9

def _nice_step(span: float, n: int = 5) -> float:
    raw = span / max(n, 1)
    if raw <= 0 or not math.isfinite(raw):
        return 1.0
    m, mag = round_step_up(raw)
    return m * mag


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


def _clip_segments(t, v, valid, ylo, yhi):
    """Split a polyline through the points (t, v) (a point not ``valid`` breaks it) into
    pieces inside ylo <= v <= yhi, cut exactly at the limits, so no coordinate far outside
    the plot reaches the PDF. Returns (t, v) arrays, one pair per piece. Every segment is
    cut at once, each with the arithmetic a loop over the segments would do."""
    t0, t1, v0, v1 = t[:-1], t[1:], v[:-1], v[1:]
    dv = v1 - v0
    flat, up = dv == 0, dv > 0
    with np.errstate(divide="ignore", invalid="ignore"):
        c_lo, c_hi = (ylo - v0) / dv, (yhi - v0) / dv      # parameter where the segment meets a limit
    s0 = np.zeros(dv.shape)
    s1 = np.ones(dv.shape)
    s0 = np.where(~flat & up, np.maximum(s0, c_lo), s0)
    s1 = np.where(~flat & ~up, np.minimum(s1, c_lo), s1)
    s0 = np.where(~flat & ~up, np.maximum(s0, c_hi), s0)
    s1 = np.where(~flat & up, np.minimum(s1, c_hi), s1)
    keep = valid[:-1] & valid[1:] & ~(flat & ((v0 < ylo) | (v0 > yhi))) & ~(s0 > s1)
    k = np.flatnonzero(keep)
    if not k.size:
        return []
    a_t, a_v = t0[k] + (t1[k] - t0[k]) * s0[k], v0[k] + dv[k] * s0[k]
    b_t, b_v = t0[k] + (t1[k] - t0[k]) * s1[k], v0[k] + dv[k] * s1[k]
    # a kept segment continues the piece when it starts where the kept one before it ends
    starts = np.flatnonzero(np.concatenate(([True], (a_t[1:] != b_t[:-1]) | (a_v[1:] != b_v[:-1]))))
    pieces = []
    for i, j in zip(starts, [*starts[1:], k.size]):
        pieces.append((np.concatenate((a_t[i:i + 1], b_t[i:j])), np.concatenate((a_v[i:i + 1], b_v[i:j]))))
    return pieces


def _polyline(c, t, v, valid, ylo, yhi, X, Y):
    for pt, pv in _clip_segments(t, v, valid, ylo, yhi):
        xs, ys = X(pt).tolist(), Y(pv).tolist()
        path = c.beginPath()
        path.moveTo(xs[0], ys[0])
        for x, y in zip(xs[1:], ys[1:]):
            path.lineTo(x, y)
        c.drawPath(path, stroke=1, fill=0)


def draw_deviation_plot(c, col, T_disp, T_unit, x, y, w, h):
    """Δ against T with the ±tolerance band; out-of-tolerance points marked ✗ (vector)."""
    from ..calc.compare_keys import column_label
    draw_text(c, x, y + h + 8, f"{column_label(col.key)}, Δ in {col.unit.symbol}", fonts.SANS_BOLD, 7.8)
    px0, py0, pw, ph = x + 42, y + 22, w - 50, h - 30
    m = col.present
    order = np.argsort(T_disp, kind="stable")
    Ts, ds, bs, ms, ws = T_disp[order], col.deviation[order], col.bound[order], m[order], col.within[order]
    if not np.any(ms):
        draw_text(c, px0 + pw / 2, py0 + ph / 2, "no reference values", size=8, color=GREY, align="center")
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
        draw_text(c, px0 - 3, Y(v) - 2.3, _tick_label(v, ystep), size=6.3, color=GREY, align="right")
    for t in xt:
        if t_lo - 1e-9 <= t <= t_hi + 1e-9:
            c.line(X(t), py0, X(t), py0 + ph)
            draw_text(c, X(t), py0 - 8, _tick_label(t, xstep), size=6.3, color=GREY, align="center")
    draw_text(c, px0 + pw / 2, py0 - 17, f"T [{T_unit}]", size=6.8, color=GREY, align="center")
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
    every = np.ones(int(np.sum(ms)), bool)
    for sign in (1, -1):
        _polyline(c, Ts[ms], sign * bs[ms], every, ylo, yhi, X, Y)
    c.setDash()
    c.setStrokeColorRGB(*TRACE)
    c.setLineWidth(0.7)
    _polyline(c, Ts, ds, ms, ylo, yhi, X, Y)
    set_fill(c, *TRACE)
    if int(np.sum(ms)) <= 200:              # row markers while they stay distinguishable
        for t, d, mm, ok in zip(Ts, ds, ms, ws):
            if mm and ok:
                c.rect(X(t) - 0.9, Y(d) - 0.9, 1.8, 1.8, stroke=0, fill=1)
    c.restoreState()
    forget_state(c)
    for t, d, mm, ok in zip(Ts, ds, ms, ws):
        if mm and not ok:
            yy = min(max(Y(d), py0), py0 + ph)
            draw_text(c, X(t), yy - 3.2, OUT_MARK, fonts.SANS_BOLD, 9, FAIL_INK, "center")
    legend = "— Δ   "
    legend += "- - ± allowed deviation" + (f" (up to ±{fmt_num(bmax, 2)}, partly beyond the plot)" if band_clipped else "")
    if not np.all(ws[ms]):
        legend += f"   {OUT_MARK} out of tolerance"
    draw_text(c, px0, py0 + ph + 4, legend, size=6.3, color=GREY)


def identical_to_round_off(col) -> bool:
    """Every |Δ| of the column below ROUND_OFF of its allowed deviation (and at least one cell)."""
    m = col.present
    return bool(np.any(m)) and bool(np.all(np.abs(col.deviation[m]) <= ROUND_OFF * col.bound[m]))


def plots(flow, cmp, title: str = "Deviation against temperature"):
    """The plots of a comparison on a new page; columns identical to round-off get one line instead
    (a plot scaled to ±1e-13 shows only the noise of float64)."""
    from ..calc.compare_keys import column_label
    from ..calc.compare_output import format_size, unit_suffix
    ref = cmp.reference
    T_disp = ref.T_unit.from_si(cmp.T_K)
    flow.new_page()
    heading(flow, title)
    same = [c for c in cmp.columns if identical_to_round_off(c)]
    cols = [c for c in cmp.columns if c not in same]
    if same:
        parts = [f"{column_label(c.key)} (largest |Δ| {format_size(float(np.max(np.abs(c.deviation[c.present]))))}"
                 f"{unit_suffix(c.unit.symbol)})" for c in same]
        paragraph(flow, "Identical to round-off, not plotted (every |Δ| below 1e-9 of its allowed deviation): "
                  + "; ".join(parts) + ".", 7.8, gap=6)
    ph, gap = 200.0, 26.0
    for k in range(0, len(cols), 2):
        pair = cols[k:k + 2]

        def draw(c, y, pair=pair):
            w = (WIDTH - 20) / 2
            for j, col in enumerate(pair):
                draw_deviation_plot(c, col, T_disp, ref.T_unit.symbol, MARGIN + j * (w + 20), y - ph - 4, w, ph - 14)
        flow.add(ph + gap, draw)
