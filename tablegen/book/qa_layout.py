"""Drawing primitives of the QA report: page geometry, colours, text, and a flow of blocks.

Blocks are stacked down pages by the documents' page-flow engine
(:class:`tablegen.book.pageflow.PageFlow`, made for these pages by :func:`report_flow`);
each block is a function that draws itself at a given height. The drawing state last set on a canvas (fill colour, font)
is kept in a dict keyed by the canvas, never on the library's object, so long pages
skip operators that change nothing.
"""

from __future__ import annotations

import math
from functools import lru_cache

from . import fonts
from .pageflow import PageFlow

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
def report_flow() -> PageFlow:
    """The report's blocks on its pages: ``flow.add(h, draw)``, where draw(canvas, y_top)
    fills the band [y_top - h, y_top]."""
    return PageFlow(TOP, BOTTOM)


#: Drawing state last set on each canvas being drawn (fill colour, font), so that big
#: listings skip operators that change nothing; keyed by the canvas's id, never stored
#: on the library's object. render_pdf removes its entry when the document is done.
DRAW_STATE: dict = {}


def set_fill(c, *rgb):
    """Set the fill colour, skipping the operator when it is already set (big listings)."""
    rgb = tuple(rgb[0]) if len(rgb) == 1 else tuple(rgb)
    st = DRAW_STATE.setdefault(id(c), {})
    if st.get("fill") != rgb:
        c.setFillColorRGB(*rgb)
        st["fill"] = rgb


def forget_state(c):
    """After showPage or restoreState the canvas state is reset: forget the cache."""
    DRAW_STATE[id(c)] = {}


def draw_text(c, x, y, s, font=fonts.SANS, size=8.5, color=INK, align="left"):
    set_fill(c, *color)
    st = DRAW_STATE.setdefault(id(c), {})
    if st.get("font") != (font, size):
        c.setFont(font, size)
        st["font"] = (font, size)
    if align == "right":
        c.drawRightString(x, y, s)
    elif align == "center":
        c.drawCentredString(x, y, s)
    else:
        c.drawString(x, y, s)


def text_width(s: str, font: str, size: float) -> float:
    """reportlab's width of s; in the monospaced face, where every glyph has one advance,
    the width of as many digits (the same number, from one measurement per length)."""
    if font == fonts.MONO and _mono_uniform():
        return _mono_width(len(s), size)
    from reportlab.pdfbase.pdfmetrics import stringWidth
    return stringWidth(s, font, size)


@lru_cache(maxsize=None)
def _mono_uniform() -> bool:
    """True if every glyph of the monospaced face (and its default) has one advance."""
    from reportlab.pdfbase.pdfmetrics import getFont
    face = getFont(fonts.MONO).face
    return len({*face.charWidths.values(), face.defaultWidth}) == 1


@lru_cache(maxsize=4096)
def _mono_width(n: int, size: float) -> float:
    from reportlab.pdfbase.pdfmetrics import stringWidth
    return stringWidth("0" * n, fonts.MONO, size)


def queue_text(c, x, y, s, font, size, color=INK, align="left"):
    """Like draw_text, but held back and drawn with the page's other queued cells by
    flush_text: one text object per font, size and colour (the book pages' batched cell
    drawing), for listings of many thousand cells. Same glyphs at the same places."""
    if not s:
        return
    if align != "left":
        w = text_width(s, font, size)
        x -= w if align == "right" else w / 2
    q = DRAW_STATE.setdefault(id(c), {}).setdefault("queue", {})
    q.setdefault((font, size, tuple(color)), []).append((x, y, s))


def queue_right(c, font, size, color, cells):
    """queue_text for several right-aligned texts of one font, size and colour at once:
    ``cells`` are (x of the right end, y, text); the same places as one call each."""
    q = DRAW_STATE.setdefault(id(c), {}).setdefault("queue", {}).setdefault((font, size, tuple(color)), [])
    if font == fonts.MONO and _mono_uniform():          # the listing's cells: one lookup by length
        q.extend((x - _mono_width(len(s), size), y, s) for x, y, s in cells if s)
    else:
        q.extend((x - text_width(s, font, size), y, s) for x, y, s in cells if s)


def queue_rules(c, xs, y_top, y_bottom):
    """Vertical rules (RULE, 0.3 pt) at the places ``xs`` from y_top to y_bottom, held back
    like queue_text: flush_text draws the rules of a page that meet end to end at one x as
    one line (a listing of many thousand rows draws one rule per column and page, not one
    per cell)."""
    DRAW_STATE.setdefault(id(c), {}).setdefault("rules", []).append((xs, y_top, y_bottom))


def flush_text(c):
    """Draw the text and rules queued by queue_text and queue_rules (call before the page ends)."""
    from .pdf import _draw_cells
    st = DRAW_STATE.setdefault(id(c), {})
    rules = st.pop("rules", None)
    if rules:
        spans: dict = {}
        for xs, a, b in rules:
            for x in xs:
                spans.setdefault(x, []).append((a, b))
        set_stroke(c, RULE, 0.3)
        for x, runs in spans.items():
            runs.sort(key=lambda r: -r[0])
            top, bottom = runs[0]
            for a, b in runs[1:]:
                if abs(a - bottom) <= 1e-6:           # this run starts where the last ended
                    bottom = min(bottom, b)
                    continue
                c.line(x, top, x, bottom)
                top, bottom = a, b
            c.line(x, top, x, bottom)
    q = st.pop("queue", None)
    for (font, size, color), cells in (q or {}).items():
        set_fill(c, *color)
        _draw_cells(c, font, size, cells)


def set_stroke(c, rgb, width):
    """Stroke colour and line width, skipping operators that change nothing (big listings)."""
    st = DRAW_STATE.setdefault(id(c), {})
    if st.get("stroke") != (rgb, width):
        c.setStrokeColorRGB(*rgb)
        c.setLineWidth(width)
        st["stroke"] = (rgb, width)


def wrap_text(s: str, font: str, size: float, width: float) -> list[str]:
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


def fit_text(s: str, font: str, size: float, width: float) -> str:
    """Text cut with '…' to fit a width (the report's cells and running head)."""
    if text_width(s, font, size) <= width:
        return s
    while s and text_width(s + "…", font, size) > width:
        s = s[:-1]
    return s + "…"


def fmt_num(x, digits=3) -> str:
    if x is None or not math.isfinite(x):
        return "—"
    if x == 0:
        return "0"
    return f"{x:.{digits}g}"


# ---------------------------------------------------------------- sections
#: Points of what follows a heading kept on its page (two lines of body text).
HEADING_KEEP = 21.0


def heading(flow, title: str):
    def draw(c, y):
        draw_text(c, MARGIN, y - 13, title, fonts.SANS_BOLD, 10.5)
        c.setStrokeColorRGB(*RULE)
        c.setLineWidth(0.5)
        c.line(MARGIN, y - 17, MARGIN + WIDTH, y - 17)
    flow.keep_with_next(24, HEADING_KEEP)    # never a heading alone at the foot of a page
    flow.add(24, draw)


def paragraph(flow, s: str, size=8.0, font=fonts.SANS, color=INK, gap=4.0):
    lines = wrap_text(s, font, size, WIDTH)
    lead = size * 1.3
    for ln in lines:
        flow.add(lead, lambda c, y, ln=ln: draw_text(c, MARGIN, y - size, ln, font, size, color))
    flow.add(gap, lambda c, y: None)


def ruled_table(flow, head, rows, widths, aligns, size=7.6, font=fonts.SANS, row_fills=None):
    """Simple ruled table; repeats its head after a page break."""
    lead = size * 1.55
    def draw_head(c, y):
        set_fill(c, 0.93, 0.94, 0.95)
        c.rect(MARGIN, y - lead, sum(widths), lead, stroke=0, fill=1)
        x = MARGIN
        for h, w, a in zip(head, widths, aligns):
            table_cell(c, x, y, w, lead, h, fonts.SANS_BOLD, size, INK, a)
            x += w
    flow.keep_with_next(lead, lead)
    flow.add(lead, draw_head)
    for k, r in enumerate(rows):
        if flow.turn_if_short(lead):
            flow.add(lead, draw_head)
        fill = row_fills[k] if row_fills else None
        def draw(c, y, r=r, fill=fill):
            if fill:
                set_fill(c, *fill)
                c.rect(MARGIN, y - lead, sum(widths), lead, stroke=0, fill=1)
            x = MARGIN
            for v, w, a in zip(r, widths, aligns):
                table_cell(c, x, y, w, lead, v, font, size, INK, a)
                x += w
            c.setStrokeColorRGB(*RULE)
            c.setLineWidth(0.3)
            c.line(MARGIN, y - lead, MARGIN + sum(widths), y - lead)
        flow.add(lead, draw)
    flow.add(6, lambda c, y: None)


def table_cell(c, x, y, w, lead, s, font, size, color, align):
    s = fit_text(str(s), font, size, w - 4)
    base = y - lead + (lead - size) / 2 + 1.2
    if align == "right":
        draw_text(c, x + w - 2, base, s, font, size, color, "right")
    else:
        draw_text(c, x + 2, base, s, font, size, color)
