"""The chart composer: one drawing routine for both chart renderers.

``chart_pdf`` (reportlab) and ``chart_png`` (matplotlib) each implement the handful
of primitives of :class:`_Surface`; :func:`_compose` lays a finished chart model
(``chart_data.ChartModel``) out on one with them, so the PDF page and the PNG look the
same. It reads the model's numbers and never evaluates the substance.
"""

from __future__ import annotations

import math

import numpy as np

from .chart_layout import (BLACK, INK, STYLES, _factors, _flow, _line_step, _panel_ops, layout,
                           panel_layout)


class _Surface:
    """Drawing primitives in points, origin bottom left (implemented per renderer)."""

    def polyline(self, pts, width, dash, rgb, clip=None): ...
    def polygon(self, pts, fill, stroke=None, width=0.0): ...
    def circle(self, x, y, r, fill, stroke, width): ...
    def text(self, x, y, s, size, font="sans", align="left", angle=0.0, rgb=INK): ...
    def width(self, s, size, font="sans") -> float: ...


def _text_bg(surf, x, y, s, size, angle, font="sans", rgb=INK, pad=1.2):
    """Text centred on (x, y) with a white ground that interrupts the line under it."""
    w = surf.width(s, size, font) + 2 * pad
    a = math.radians(angle)
    ca, sa = math.cos(a), math.sin(a)
    lo, hi = -0.30 * size, 0.80 * size
    off = -0.36 * size                          # baseline below the centre
    corners = []
    for px, py in ((-w / 2, lo + off), (w / 2, lo + off), (w / 2, hi + off), (-w / 2, hi + off)):
        corners.append((x + px * ca - py * sa, y + px * sa + py * ca))
    surf.polygon(corners, (1.0, 1.0, 1.0))
    bx, by = x - off * sa, y + off * ca
    surf.text(bx, by, s, size, font, "center", angle, rgb)


class _Plot:
    """The plot rectangle of a page (points) and the chart units it shows."""

    def __init__(self, lay, x0, y0, xa, ya):
        px, py, self.pw, self.ph = lay.plot
        self.px, self.py = px + x0, py + y0
        self.xa, self.ya = xa, ya
        self.clip = (self.px, self.py, self.pw, self.ph)

    def X(self, v):
        return self.px + (np.asarray(v, float) - self.xa.lo) / (self.xa.hi - self.xa.lo) * self.pw

    def Y(self, v):
        return self.py + (np.asarray(v, float) - self.ya.lo) / (self.ya.hi - self.ya.lo) * self.ph


def _compose(surf, model, x0, y0, width, height, page_text: str = "", part: str = "whole"):
    """Draw ``model`` (a ``ChartModel``) into the box (x0, y0, width, height), points.

    ``part``: "whole" (title band, plot, reading panel, footer); "plot" or "panel" for
    the two pages of a model built with ``panel_page``.
    """
    opts = {"min_pt": model.extra.get("min_pt"), "title": model.title, "subtitle": model.subtitle}
    lay = (panel_layout(width, height, **opts) if part == "panel"
           else layout(width, height, panel_page=part == "plot", **opts))
    fs = lay.scale
    _title_band(surf, lay, x0, y0, fs)
    if part != "panel":
        plot = _Plot(lay, x0, y0, model.x_axis, model.y_axis)
        _grid(surf, plot)
        _lines_and_points(surf, model, plot, fs)
        _frame_and_scales(surf, model, plot, fs)
    if part != "plot":
        qx, qy, qw, qh = lay.panel
        _draw_panel(surf, model.panel, (qx + x0, qy + y0, qw, qh), fs, lay.columns, opts["min_pt"])
    _chart_footer(surf, model, lay, x0, y0, fs, page_text)


def _title_band(surf, lay, x0, y0, fs):
    tx, ty, tw, th = lay.title
    tx, ty = tx + x0, ty + y0
    yl = ty + th - 15 * fs
    for i, (line, size, font) in enumerate(lay.title_lines):
        if i:
            yl -= _line_step(lay.title_lines, i, fs)
        surf.text(tx, yl, line, size, font, "left", rgb=BLACK if font == "bold" else INK)
    surf.polyline([(tx, ty + 1.5 * fs), (tx + tw, ty + 1.5 * fs)], 0.8 * fs, None, BLACK)


def _grid(surf, plot):
    X, Y, px, py, pw, ph = plot.X, plot.Y, plot.px, plot.py, plot.pw, plot.ph
    for v in plot.xa.minor:
        surf.polyline([(float(X(v)), py), (float(X(v)), py + ph)], *STYLES["grid_minor"])
    for v in plot.ya.minor:
        surf.polyline([(px, float(Y(v))), (px + pw, float(Y(v)))], *STYLES["grid_minor"])
    for v in plot.xa.major:
        surf.polyline([(float(X(v)), py), (float(X(v)), py + ph)], *STYLES["grid_major"])
    for v in plot.ya.major:
        surf.polyline([(px, float(Y(v))), (px + pw, float(Y(v)))], *STYLES["grid_major"])


def _angle(lab):
    return math.degrees(math.atan2(lab.dv, lab.du)) if lab.du or lab.dv else 0.0


def _lines_and_points(surf, model, plot, fs):
    X, Y, pw, ph = plot.X, plot.Y, plot.pw, plot.ph
    # lines (thin families first, overlays on top)
    order = {"isotherm": 0, "isochore": 1, "isobar": 2, "dewpoint": 3, "aux": 4, "isentropic": 5, "process": 6}
    for ln in sorted(model.lines, key=lambda ln: order.get(ln.family, 9)):
        w, dash, rgb = STYLES[ln.style]
        surf.polyline(np.column_stack([X(ln.x), Y(ln.y)]), w, dash, rgb, plot.clip)
    # arrows along the actual process paths
    for ar in model.arrows:
        ax_, ay_ = float(X(ar.x)), float(Y(ar.y))
        L = math.hypot(ar.du * pw, ar.dv * ph)
        if L == 0:
            continue
        ux, uy = ar.du * pw / L, ar.dv * ph / L
        a, b = 6.0 * fs, 2.6 * fs
        tip = (ax_ + ux * a / 2, ay_ + uy * a / 2)
        surf.polygon([tip, (tip[0] - ux * a - uy * b, tip[1] - uy * a + ux * b),
                      (tip[0] - ux * a + uy * b, tip[1] - uy * a - ux * b)], STYLES["process"][2])
    # inline line labels
    for ln in model.lines:
        if ln.label is not None:
            lab = ln.label
            rgb = STYLES[ln.style][2]
            font = "bold" if ln.style == "isobar_decade" else "sans"
            _text_bg(surf, float(X(lab.x)), float(Y(lab.y)), lab.text, lab.size, _angle(lab), font, rgb)
    # state points
    for p in model.points:
        r = 2.6 * fs
        if p.isentropic:
            surf.circle(float(X(p.x)), float(Y(p.y)), r, (1, 1, 1), BLACK, 1.0 * fs)
        else:
            surf.circle(float(X(p.x)), float(Y(p.y)), r, BLACK, (1, 1, 1), 0.6 * fs)
        if p.label is not None:
            _text_bg(surf, float(X(p.label.x)), float(Y(p.label.y)), p.label.text, p.label.size, 0.0,
                     "bold", BLACK, pad=0.8)


def _frame_and_scales(surf, model, plot, fs):
    X, Y, px, py, pw, ph = plot.X, plot.Y, plot.px, plot.py, plot.pw, plot.ph
    xa, ya = model.x_axis, model.y_axis
    surf.polyline([(px, py), (px + pw, py), (px + pw, py + ph), (px, py + ph), (px, py)], *STYLES["frame"])
    tick = 4.0 * fs
    tsz = 7.4 * fs
    for v, t in zip(xa.major, xa.labels):
        xx = float(X(v))
        surf.polyline([(xx, py), (xx, py - tick)], 0.6, None, BLACK)
        surf.text(xx, py - tick - tsz - 1.5, t, tsz, "sans", "center")
    for v in xa.minor:
        surf.polyline([(float(X(v)), py), (float(X(v)), py - tick / 2)], 0.4, None, BLACK)
    for v, t in zip(ya.major, ya.labels):
        yy = float(Y(v))
        surf.polyline([(px, yy), (px - tick, yy)], 0.6, None, BLACK)
        surf.text(px - tick - 2.0, yy - tsz * 0.35, t, tsz, "sans", "right")
    for v in ya.minor:
        surf.polyline([(px, float(Y(v))), (px - tick / 2, float(Y(v)))], 0.4, None, BLACK)
    surf.text(px + pw / 2, py - tick - 2 * tsz - 8 * fs, xa.label, 8.6 * fs, "sans", "center", rgb=BLACK)
    surf.text(px - 36 * fs, py + ph / 2, ya.label, 8.6 * fs, "sans", "center", 90.0, BLACK)
    if model.side is not None:
        sd = model.side
        for v, t in zip(sd.major, sd.labels):
            yy = float(Y(v))
            if ya.lo - 1e-9 <= v <= ya.hi + 1e-9:
                surf.polyline([(px + pw, yy), (px + pw + tick, yy)], 0.6, None, BLACK)
                surf.text(px + pw + tick + 2.0, yy - tsz * 0.35, t, tsz, "sans", "left")
        for v in sd.minor:
            if ya.lo <= v <= ya.hi:
                surf.polyline([(px + pw, float(Y(v))), (px + pw + tick / 2, float(Y(v)))], 0.4, None, BLACK)
        surf.text(px + pw + 40 * fs, py + ph / 2, sd.label, 8.6 * fs, "sans", "center", 90.0, BLACK)


def _chart_footer(surf, model, lay, x0, y0, fs, page_text):
    fx, fy, fw, fh = lay.footer
    fx, fy = fx + x0, fy + y0
    surf.polyline([(fx, fy + fh), (fx + fw, fy + fh)], 0.4, None, INK)
    left = model.footer or "tablegen"
    surf.text(fx, fy + 3 * fs, f"{left} · chart fingerprint {model.fingerprint}", 6.2 * fs, "sans", "left")
    if page_text:
        surf.text(fx + fw, fy + 3 * fs, page_text, 6.2 * fs, "sans", "right")


def _draw_panel(surf, blocks, rect, fs, columns, min_pt=None):
    qx, qy, qw, qh = rect
    gap = 14.0 * fs
    cw = (qw - gap * (columns - 1)) / columns
    placed = None
    for k in _factors(fs, min_pt):
        placed = _flow(_panel_ops(surf, blocks, cw, fs, k), qh - 4 * fs, columns)
        if placed is not None:
            break
    if placed is None:      # cannot happen within the spec limits; keep what fits, never overprint
        placed, col, acc = [], 0, 0.0
        for _, h, ops in _panel_ops(surf, blocks, cw, fs, 0.62):
            if acc + h > qh - 4 * fs:
                col, acc = col + 1, 0.0
            if col < columns:
                placed.append((col, acc, ops))
            acc += h
    for col, top, ops in placed:
        ox = qx + col * (cw + gap)
        oy = qy + qh - 4 * fs - top
        for op in ops:
            if op[0] == "text":
                _, x, y, text, size, font, align, rgb = op
                surf.text(ox + x, oy + y, text, size, font, align, rgb=rgb)
            elif op[0] == "dot":
                _, x, y, r, hollow = op
                if hollow:
                    surf.circle(ox + x, oy + y, r, (1, 1, 1), BLACK, 1.0 * fs)
                else:
                    surf.circle(ox + x, oy + y, r, BLACK, (1, 1, 1), 0.6 * fs)
            elif op[0] == "sample":
                _, x, y, length, style = op
                w, dash, rgb = STYLES[style]
                surf.polyline([(ox + x, oy + y), (ox + x + length, oy + y)], w, dash, rgb)
            elif op[0] == "rule":
                _, x, y, length = op
                surf.polyline([(ox + x, oy + y), (ox + x + length, oy + y)], 0.4, None, INK)
