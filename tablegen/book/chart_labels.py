"""Placement of the chart's inline labels and process arrows (part of the chart model).

Labels sit on their lines where they overprint nothing, in the plot rectangle of the
box the chart will be drawn in (points); text widths are the renderers' DejaVu metrics.
"""

from __future__ import annotations

import math

import numpy as np

from .chart_axes import _fmt_value
from .chart_data import Arrow, Axis, Label, Line, StatePoint


def place_labels(lay, x_axis, y_axis, lines, ov_lines, points, arrows, cv, substance, fs) -> tuple:
    """Arrows on the process paths, then the state-point labels, then the line labels.

    Returns
    -------
    (arrows, points, lines): ``Arrow`` objects; the points and all lines (``lines`` then
    ``ov_lines``) with their labels.
    """
    placer = _Placer(lay.plot, x_axis, y_axis)
    for ln in ov_lines:
        placer.block_line(ln.x, ln.y)
    for p in points:
        placer.block_point(p.x, p.y, 3.2 * fs)
    arrow_objs = _arrows(placer, arrows)
    # point labels first (they matter most), then line labels
    placed_points = []
    for p in points:
        lab = placer.place_point(p.name, p.x, p.y, (8.2 if not p.isentropic else 7.4) * fs)
        placed_points.append(StatePoint(p.name, p.T_K, p.P_Pa, p.h, p.s, p.x, p.y, p.isentropic, lab))
    labelled = _line_labels(placer, lines + ov_lines, cv, substance, fs)
    return arrow_objs, placed_points, labelled


def _arrows(placer, arrows) -> list:
    """An arrow at 55 % of the length of each process path (A, B, x, y)."""
    arrow_objs = []
    for A, B, x, y in arrows:
        u, v = placer.norm(np.asarray(x), np.asarray(y))
        d = np.hypot(np.diff(u) * placer.W, np.diff(v) * placer.H)
        cum = np.concatenate([[0], np.cumsum(d)])
        if cum[-1] < 1e-9:
            continue
        j = int(np.searchsorted(cum, cum[-1] * 0.55))
        j = min(max(j, 1), len(u) - 1)
        f = (cum[-1] * 0.55 - cum[j - 1]) / max(cum[j] - cum[j - 1], 1e-12)
        xm = x[j - 1] + f * (x[j] - x[j - 1])
        ym = y[j - 1] + f * (y[j] - y[j - 1])
        arrow_objs.append(Arrow(float(xm), float(ym), float(u[j] - u[j - 1]), float(v[j] - v[j - 1])))
    return arrow_objs


def _line_labels(placer, all_lines, cv, substance, fs) -> list:
    """Each isobar, isochore, isotherm and the dew-point line with its label placed."""
    labelled = []
    size = 7.0 * fs
    Psym = cv.sym["P"]
    for idx, ln in enumerate(all_lines):
        if ln.family == "isobar":
            text = f"{_fmt_value(cv.P.from_si(ln.value_SI))} {Psym}"
            lab = placer.place_on_line(text, ln.x, ln.y, size * (1.08 if ln.style == "isobar_decade" else 1.0),
                                       targets=_stagger(idx, (0.90, 0.80, 0.70, 0.60, 0.50, 0.40)))
        elif ln.family == "isochore":
            text = f"{_fmt_value(cv.v.from_si(ln.value_SI))} {cv.sym['v']}"
            lab = placer.place_on_line(text, ln.x, ln.y, size,
                                       targets=_stagger(idx, (0.22, 0.32, 0.14, 0.42, 0.52)))
        elif ln.family == "isotherm":
            text = f"{_fmt_value(cv.T.from_si(ln.value_SI))} {cv.sym['T']}"
            lab = placer.place_on_line(text, ln.x, ln.y, size, along_x=True,
                                       targets=(0.90, 0.80, 0.70, 0.60, 0.50, 0.30, 0.15))
        elif ln.family == "dewpoint":
            dew_T = f"{cv.T.from_si(ln.value_SI):.1f} {cv.sym['T']}"
            # the longest wording that fits the plot (a small page's plot is narrower than the first)
            for text in (f"water dew point {dew_T} at {cv.P.from_si(substance.dew_point_P_Pa):.4g} {Psym}: "
                         f"condensation below", f"water dew point {dew_T}: condensation below",
                         f"water dew point {dew_T}"):
                if placer._width(text, size * 1.05) + 2.4 <= 0.9 * placer.W:
                    break
            lab = placer.place_on_line(text, ln.x, ln.y, size * 1.05, along_x=True,
                                       targets=(0.70, 0.55, 0.85, 0.40, 0.25))
        else:
            lab = None
        labelled.append(Line(ln.family, ln.x, ln.y, ln.style, lab, ln.value_SI, ln.T_K, ln.P_Pa))
    return labelled


def _stagger(i: int, targets: tuple) -> tuple:
    """Neighbouring lines start their label search at alternating heights."""
    k = (i % 2) * 1
    return targets[k:] + targets[:k]


class _Placer:
    def __init__(self, plot, xa: Axis, ya: Axis):
        self.W, self.H = plot[2], plot[3]
        self.xa, self.ya = xa, ya
        self.boxes = []      # oriented rectangles: (cx, cy, ux, uy, hw, hh) in pt
        self.segs = []       # blocked points (x, y, r) in pt
        self._seg_arr = None

    def norm(self, x, y):
        return ((np.asarray(x, float) - self.xa.lo) / (self.xa.hi - self.xa.lo),
                (np.asarray(y, float) - self.ya.lo) / (self.ya.hi - self.ya.lo))

    def block_line(self, x, y):
        u, v = self.norm(x, y)
        px, py = u * self.W, v * self.H
        # sample every ~3 pt
        for i in range(len(px) - 1):
            n = max(1, int(math.hypot(px[i + 1] - px[i], py[i + 1] - py[i]) / 3.0))
            for t in np.linspace(0, 1, n + 1):
                self.segs.append((px[i] + t * (px[i + 1] - px[i]), py[i] + t * (py[i + 1] - py[i]), 1.5))

    def block_point(self, x, y, r):
        u, v = self.norm([x], [y])
        self.segs.append((float(u[0]) * self.W, float(v[0]) * self.H, r))

    @staticmethod
    def _width(text, size):
        from reportlab.pdfbase.pdfmetrics import stringWidth

        from .fonts import SANS, register
        register()
        return stringWidth(text, SANS, size)

    def _free(self, box, margin=2.0) -> float:
        """Overlap cost of an oriented box: 0 when it is free and inside the plot."""
        cx, cy, ux, uy, hw, hh = box
        cost = 0.0
        ex = abs(ux) * hw + abs(uy) * hh
        ey = abs(uy) * hw + abs(ux) * hh
        if cx - ex < margin or cx + ex > self.W - margin or cy - ey < margin or cy + ey > self.H - margin:
            cost += 100.0
        for b in self.boxes:
            if _obb_overlap(box, b):
                cost += 10.0
        if self.segs:
            if self._seg_arr is None or len(self._seg_arr) != len(self.segs):
                self._seg_arr = np.array(self.segs, float)
            sx, sy, r = self._seg_arr.T
            dx, dy = sx - cx, sy - cy
            a = dx * ux + dy * uy
            c = -dx * uy + dy * ux
            cost += float(np.count_nonzero((np.abs(a) < hw + r) & (np.abs(c) < hh + r)))
        return cost

    def place_on_line(self, text, x, y, size, targets, along_x=False):
        u, v = self.norm(x, y)
        w = self._width(text, size) + 2.4
        hh = size * 0.62
        best = None
        key = u if along_x else v
        cands = []
        lo_k, hi_k = float(np.min(key)), float(np.max(key))
        for t in targets:
            level = lo_k + t * (hi_k - lo_k) if along_x else t
            cands.append(level)
        # finer fallbacks
        cands += list(np.linspace(0.05, 0.95, 19)) if not along_x else list(lo_k + np.linspace(0.05, 0.95, 19) * (hi_k - lo_k))
        for level in cands:
            idx = np.nonzero((key[:-1] - level) * (key[1:] - level) <= 0)[0]
            if idx.size == 0:
                continue
            i = int(idx[0])
            span = key[i + 1] - key[i]
            f = 0.0 if span == 0 else (level - key[i]) / span
            cu = u[i] + f * (u[i + 1] - u[i])
            cvv = v[i] + f * (v[i + 1] - v[i])
            du = (u[i + 1] - u[i]) * self.W
            dv = (v[i + 1] - v[i]) * self.H
            L = math.hypot(du, dv)
            if L == 0:
                continue
            ux, uy = du / L, dv / L
            if ux < 0 or (ux == 0 and uy < 0):
                ux, uy = -ux, -uy
            box = (cu * self.W, cvv * self.H, ux, uy, w / 2, hh)
            cost = self._free(box)
            if best is None or cost < best[0]:
                best = (cost, box, cu, cvv, ux, uy)
            if cost == 0:
                break
        if best is None:
            return None
        _, box, cu, cvv, ux, uy = best
        self.boxes.append(box)
        return Label(text, self.xa.lo + cu * (self.xa.hi - self.xa.lo),
                     self.ya.lo + cvv * (self.ya.hi - self.ya.lo), ux, uy, size)

    def place_point(self, text, x, y, size):
        u, v = self.norm([x], [y])
        px, py = float(u[0]) * self.W, float(v[0]) * self.H
        w = self._width(text, size) + 2.0
        hh = size * 0.6
        best = None
        d = 4.5 + size * 0.35
        for ang in (135, 45, 225, 315, 90, 180, 0, 270, 160, 20, 200, 340):
            a = math.radians(ang)
            cx = px + math.cos(a) * (d + w / 2 * abs(math.cos(a)))
            cy = py + math.sin(a) * (d + hh * abs(math.sin(a)))
            box = (cx, cy, 1.0, 0.0, w / 2, hh)
            # the own marker must not count against the label
            cost = self._free(box) - (1.0 if abs(cx - px) < w / 2 + 3.2 and abs(cy - py) < hh + 3.2 else 0.0)
            if best is None or cost < best[0]:
                best = (max(cost, 0.0), box)
            if cost <= 0:
                break
        box = best[1]
        self.boxes.append(box)
        return Label(text, self.xa.lo + box[0] / self.W * (self.xa.hi - self.xa.lo),
                     self.ya.lo + box[1] / self.H * (self.ya.hi - self.ya.lo), 1.0, 0.0, size)


def _obb_overlap(a, b) -> bool:
    """Separating-axis test for two oriented rectangles (cx, cy, ux, uy, hw, hh)."""
    ax, ay, aux, auy, ahw, ahh = a
    bx, by, bux, buy, bhw, bhh = b
    dx, dy = bx - ax, by - ay
    for (nx, ny) in ((aux, auy), (-auy, aux), (bux, buy), (-buy, bux)):
        ra = ahw * abs(aux * nx + auy * ny) + ahh * abs(-auy * nx + aux * ny)
        rb = bhw * abs(bux * nx + buy * ny) + bhh * abs(-buy * nx + bux * ny)
        if abs(dx * nx + dy * ny) > ra + rb:
            return False
    return True
