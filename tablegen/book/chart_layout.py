"""The chart page design: line styles, the page's rectangles, the reading panel's flow.

Shared by the chart model (labels are placed, and the panel checked to fit, for the
box it will be drawn in) and the renderers (``chart_compose`` draws by it). No
thermodynamics: text widths come from the DejaVu metrics both renderers use.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

from ..core.errors import TablegenError
from ..spec.chart import PAPERS

#: Line styles: (width pt, dash pattern in pt or None, RGB). Meaning is carried by
#: width and dash (greyscale-safe); the colour only helps on screen.
STYLES = {
    "grid_major": (0.45, None, (0.72, 0.74, 0.76)),
    "grid_minor": (0.2, None, (0.85, 0.86, 0.87)),
    "isobar": (0.7, None, (0.20, 0.36, 0.56)),
    "isobar_decade": (1.2, None, (0.20, 0.36, 0.56)),
    "isochore": (0.65, (4.0, 2.2), (0.16, 0.42, 0.30)),
    "isotherm": (0.65, (6.0, 1.8, 1.2, 1.8), (0.45, 0.28, 0.12)),
    "process": (2.2, None, (0.52, 0.03, 0.03)),
    "isentropic": (1.4, (5.0, 2.5), (0.52, 0.03, 0.03)),
    "aux": (0.9, (1.2, 1.6), (0.52, 0.03, 0.03)),
    "dewpoint": (1.5, (0.9, 1.5), (0.05, 0.38, 0.62)),
    "frame": (0.8, None, (0.0, 0.0, 0.0)),
}
BLACK = (0.0, 0.0, 0.0)
INK = (0.12, 0.12, 0.12)


@dataclass(frozen=True, slots=True)
class Layout:
    """Rectangles of a chart page, points, origin bottom left: (x, y, w, h)."""

    page: tuple
    title: tuple
    plot: tuple
    panel: tuple
    footer: tuple
    scale: float          # font scale
    columns: int = 1      # columns of the reading panel
    title_lines: tuple = ()      # the title and subtitle wrapped to the band: ((text, size, font), ...)

#: Smallest text size of the design at font scale 1 (the reading panel's notes), pt.
SMALLEST_PT = 6.0


def _title_lines(title: str, subtitle: str, s: float, width: float) -> tuple:
    """Title and subtitle wrapped to the title band (the subtitle breaks at its ' · ')."""
    m = _Measure()
    out = [(line, 14.5 * s, "bold") for line in _wrap(m, title, 14.5 * s, width, "bold")] if title else []
    cur = ""
    for piece in subtitle.split(" · ") if subtitle else []:
        t = piece if not cur else cur + " · " + piece
        if cur and m.width(t, 8.2 * s) > width:
            out.append((cur, 8.2 * s, "sans"))
            cur = piece
        else:
            cur = t
    if cur:
        out.extend((line, 8.2 * s, "sans") for line in _wrap(m, cur, 8.2 * s, width))
    return tuple(out)


def _line_step(lines, i: int, s: float) -> float:
    """Baseline distance from title-band line i - 1 to line i (3.2 s more where the subtitle starts)."""
    return lines[i][1] * 1.2 + (3.2 * s if lines[i][2] != lines[i - 1][2] else 0.0)


def layout(width: float, height: float, *, panel_page: bool = False, min_pt: float | None = None,
           title: str = "", subtitle: str = "") -> Layout:
    """Our page design: title band on top, plot at left, reading panel at right.

    A portrait box (width < 1.15 height) puts the reading panel under the plot,
    in two columns. ``panel_page``: the plot fills the box and the reading panel
    goes on a page of its own (:func:`panel_layout`), for small paper. ``min_pt``:
    the smallest text size allowed (the font scale grows to keep every text at or
    above it). The title and subtitle, when given, are wrapped to the band.
    """
    s = max(0.8, min(1.45, math.sqrt(max(width, height) / PAPERS["A4"][0])))
    if min_pt:
        s = max(s, min_pt / SMALLEST_PT)
    m = 26.0 * s if width > 500 else 12.0 * s
    lines = _title_lines(title, subtitle, s, width - 2 * m)
    title_h = 34.0 * s if len(lines) <= 2 else 21.0 * s + sum(_line_step(lines, i, s) for i in range(1, len(lines)))
    foot_h = 14.0 * s
    left = 44.0 * s       # y tick labels and axis title
    right = 48.0 * s      # secondary scale
    bottom = 34.0 * s     # x tick labels and axis title
    px = m + left
    portrait = width < 1.15 * height
    if panel_page:
        panel = (m, m + foot_h, 0.0, 0.0)
        py = m + foot_h + bottom
        pw = width - 2 * m - left - right
        ph = height - 2 * m - title_h - foot_h - bottom - 6.0 * s
        cols = 1
    elif portrait:
        panel_h = 0.36 * (height - 2 * m - title_h - foot_h)
        panel = (m, m + foot_h, width - 2 * m, panel_h)
        py = m + foot_h + panel_h + bottom + 6.0 * s
        pw = width - 2 * m - left - right
        ph = height - m - title_h - 6.0 * s - py
        cols = 2
    else:
        panel_w = 190.0 * s
        panel = (width - m - panel_w, m + foot_h, panel_w, height - 2 * m - title_h - foot_h)
        py = m + foot_h + bottom
        pw = width - 2 * m - left - right - panel_w - 10.0 * s
        ph = height - 2 * m - title_h - foot_h - bottom - 6.0 * s
        cols = 1
    if pw < 150 or ph < 150:
        raise TablegenError(f"a chart box of {width:.0f} x {height:.0f} pt is too small; "
                            f"allowed: at least about {PAPERS['A4'][0] / 1.414:.0f} x {PAPERS['A4'][1] / 1.414:.0f} pt "
                            f"(landscape A5)")
    return Layout(page=(0.0, 0.0, width, height),
                  title=(m, height - m - title_h, width - 2 * m, title_h),
                  plot=(px, py, pw, ph), panel=panel,
                  footer=(m, m, width - 2 * m, foot_h), scale=s, columns=cols, title_lines=lines)


def panel_layout(width: float, height: float, *, min_pt: float | None = None, title: str = "",
                 subtitle: str = "") -> Layout:
    """The page of a chart's reading panel on its own (small paper): the title band, then
    the panel in two columns over the rest of the box."""
    lay = layout(width, height, panel_page=True, min_pt=min_pt, title=title, subtitle=subtitle)
    m, s = lay.title[0], lay.scale
    top = lay.title[1]
    panel = (m, m + lay.footer[3], width - 2 * m, top - 6.0 * s - m - lay.footer[3])
    return replace(lay, panel=panel, columns=2 if width > 300 else 1)


# --------------------------------------------------------------------------
# the reading panel: blocks measured into drawing operations, flowed into columns

def _panel_ops(surf, blocks, width, fs, k):
    """Blocks -> (height, ops) at font factor k; ops are drawn relative to the block top."""
    out = []
    for b in blocks:
        size = b.size * k
        ops, y = [], 0.0
        if b.kind == "heading":
            y -= size * 1.5
            ops.append(("text", 0.0, y, b.content[0], size, "bold", "left", BLACK))
            y -= 2.5 * fs * k
        elif b.kind == "key":
            for style, text in b.content:
                y -= size * 1.55
                mid = y + size * 0.32
                if style in ("point", "point_open"):
                    ops.append(("dot", 11 * fs * k, mid, 2.4 * fs * k, style == "point_open"))
                else:
                    ops.append(("sample", 0.0, mid, 22 * fs * k, style))
                ops.append(("text", 27 * fs * k, y, text, size, "sans", "left", INK))
            y -= 3 * fs * k
        elif b.kind == "text":
            for para in b.content:
                for line in _wrap(surf, para, size, width):
                    y -= size * 1.32
                    ops.append(("text", 0.0, y, line, size, "sans", "left", INK))
                y -= size * 0.4
            y -= 2 * fs * k
        elif b.kind == "table":
            ncol = len(b.content[0])
            widths = [max(surf.width(r[j], size, "bold" if i == 0 else "sans")
                          for i, r in enumerate(b.content)) for j in range(ncol)]
            gap = min(10 * fs * k, max(3.0, (width - sum(widths)) / max(ncol - 1, 1)))
            xs = [0.0]
            for wdt in widths[:-1]:
                xs.append(xs[-1] + wdt + gap)
            for i, row in enumerate(b.content):
                y -= size * 1.38
                for j, cell in enumerate(row):
                    if j == 0:
                        ops.append(("text", xs[j], y, cell, size, "bold", "left", INK))
                    else:
                        ops.append(("text", xs[j] + widths[j], y, cell, size, "bold" if i == 0 else "sans",
                                    "right", INK))
                if i == 0:
                    ops.append(("rule", 0.0, y - 2.0, xs[-1] + widths[-1]))
            y -= 5 * fs * k
        out.append((b.kind, -y, ops))
    return out


def _flow(items, height, columns):
    """Place blocks top-down in columns; a heading stays with the block after it.
    Returns [(column, top offset, ops)] or None when they do not fit."""
    placed, col, used = [], 0, 0.0
    i = 0
    while i < len(items):
        group = [items[i]]
        if items[i][0] == "heading" and i + 1 < len(items):
            group.append(items[i + 1])
        need = sum(g[1] for g in group)
        if used + need > height:
            col += 1
            used = 0.0
            if col >= columns or need > height:
                return None
        for g in group:
            placed.append((col, used, g[2]))
            used += g[1]
        i += len(group)
    return placed

#: Font factors tried for the reading panel; below 0.8 the text is too small to read in print.
PANEL_FACTORS = (1.0, 0.93, 0.86, 0.8)


class _Measure:
    """Text widths without a canvas (the same DejaVu metrics both renderers use)."""

    def width(self, s, size, font="sans"):
        from reportlab.pdfbase.pdfmetrics import stringWidth

        from .fonts import SANS, SANS_BOLD, register
        register()
        return stringWidth(s, SANS_BOLD if font == "bold" else SANS, size)


def _factors(fs: float, min_pt: float | None) -> tuple:
    """The panel's font factors that keep its smallest text at or above ``min_pt``."""
    if not min_pt:
        return PANEL_FACTORS
    return tuple(k for k in PANEL_FACTORS if SMALLEST_PT * fs * k >= min_pt - 1e-9) or PANEL_FACTORS[:1]


def panel_fits(blocks, lay: Layout, min_pt: float | None = None) -> bool:
    qx, qy, qw, qh = lay.panel
    cw = (qw - 14.0 * lay.scale * (lay.columns - 1)) / lay.columns
    return any(_flow(_panel_ops(_Measure(), blocks, cw, lay.scale, k), qh - 4 * lay.scale, lay.columns)
               is not None for k in _factors(lay.scale, min_pt))


def _wrap(surf, text, size, width, font="sans"):
    words = text.split(" ")
    out, cur = [], ""
    for w in words:
        t = w if not cur else cur + " " + w
        if surf.width(t, size, font) <= width or not cur:
            cur = t
        else:
            out.append(cur)
            cur = w
    if cur:
        out.append(cur)
    return out
