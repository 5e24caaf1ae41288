"""The PDF of a table book, drawn straight onto reportlab canvas pages: the page flow.

Layout is planned first (every page as a list of drawing operations), so the
total page count is known before anything is drawn and "page x of y" and the
contents page numbers are exact. This module puts the parts in page order (front
matter: tablegen.book.front; table pages: tablegen.book.tablepages; chart pages;
appendix) and draws the planned pages with their running head and foot. Table cells
are drawn into one text object per page (:func:`_draw_cells`).

Same model, same bytes: reportlab's invariant mode fixes the document dates and
ids; the fonts are the embedded DejaVu faces of :mod:`tablegen.book.fonts`.
"""

from __future__ import annotations

import io
import re
from dataclasses import replace

from reportlab.pdfbase.pdfmetrics import getFont

from . import fonts, pagination
from .fonts import MONO, SANS, SANS_BOLD
from .front import front_matter
from .pageflow import draw_pages, page_of, with_binary_streams
from .pagination import Layout
from .tablepages import table_pages, to_left_page
from .textfit import simpleSplit
from .textflow import Flow, Page, text_width


def layout_for(paper: str, orientation: str = "portrait", font_size: float | None = None,
               two_sided: bool = False) -> Layout:
    """Geometry and type sizes of a paper (tablegen.book.pagination.layout_for)."""
    return pagination.layout_for(paper, orientation, font_size, two_sided)


def book_layout(book) -> Layout:
    """The layout of a book's edition: its paper, sides and figure size, and a running head
    of one or two lines (:func:`running_head`)."""
    d, ed = book.document, book.edition
    L = layout_for(d.paper, d.orientation, getattr(ed, "font_size_pt", None), bool(getattr(ed, "two_sided", False)))
    return replace(L, head_lines=len(running_head(book, L)))



# ---------------------------------------------------------------- running head and foot
_SHORTEN = re.compile(r"\s*(?::|\s[-–—]\s|\()")


def running_head(book, L: Layout) -> list[str]:
    """The running head's title, by rule: the full title if it fits beside the document
    number; else the title up to its first colon, dash or bracket (the main title); else
    the full title wrapped onto two lines. Never cut off."""
    d = book.document
    avail = L.live_width - text_width(_number_text(book), SANS_BOLD, L.run) - L.run * 2
    t = d.title
    if text_width(t, SANS, L.run) <= avail:
        return [t]
    main = _SHORTEN.split(t, maxsplit=1)[0].strip()
    if main and text_width(main, SANS, L.run) <= avail:
        return [main]
    return simpleSplit(t, SANS, L.run, avail)[:2] or [t]


def _number_text(book) -> str:
    d, ed = book.document, book.edition
    number = ed.number(d.number) if ed is not None else d.number
    return f"{number}  Rev. {d.revision}"


def _foot_text(book, L: Layout) -> str:
    """Document number, revision, the edition's label where it fits, and the issue date."""
    d, ed = book.document, book.edition
    number = ed.number(d.number) if ed is not None else d.number
    room = L.live_width - text_width("page 0000 of 0000", SANS, L.run) - L.run * 2
    if ed is not None and ed.label:
        text = f"{number} Rev. {d.revision} · {ed.label} · issued {d.issue_date}"
        if text_width(text, SANS, L.run) <= room:
            return text
    return f"{number} Rev. {d.revision} · issued {d.issue_date}"


# ---------------------------------------------------------------- assembly
def _contents_entries(book) -> list:
    """Every section, table and chart page of the book, in page order, with its anchor."""
    d = book.document
    entries = [("How to read these tables", "read"), ("Substances and compositions", "subs")]
    entries += [(sh.title, f"sheet{i}") for i, sh in enumerate(book.sheets, 1)]
    entries += [("Data sources", "sources"), ("Caution", "caution")]
    grouped = d.chart_placement == "grouped" and any(t.charts for t in book.tables)
    charts = []
    for i, t in enumerate(book.tables, 1):
        entries.append((f"Table {i}. {t.title}", f"table{i}"))
        for j, m in enumerate(t.charts, 1):
            kind = "T-s chart" if m.kind == "ts" else "h-s chart"
            charts.append((f"Chart {i}.{j}. {kind}: {m.title}", f"chart{i}.{j}"))
        if not grouped:
            entries += charts
            charts = []
    if grouped:
        entries.append(("Charts", "charts"))
        entries += charts
    entries += [(f"Appendix {chr(64 + i)}. {s.title}", f"appendix{i}") for i, s in enumerate(book.appendix, 1)]
    return entries


def plan(book):
    """All pages of the book as drawing operations, and the layout."""
    fonts.register()
    d = book.document
    L = book_layout(book)
    grouped = d.chart_placement == "grouped" and any(t.charts for t in book.tables)
    pages: list[Page] = []
    front_matter(book, L, pages, _contents_entries(book))
    for i, t in enumerate(book.tables, 1):
        table_pages(t, i, L, pages)
        if t.charts and not grouped:
            _chart_pages(t, i, L, pages)
    if grouped:
        first = len(pages)
        for i, t in enumerate(book.tables, 1):
            _chart_pages(t, i, L, pages)
        pages[first].ops.insert(0, ("anchor", "charts"))
    if book.appendix:
        f = Flow(L, pages, "appendix")
        for i, s in enumerate(book.appendix, 1):
            if i > 1:
                f.new_page()
            f.heading(f"Appendix {chr(64 + i)}. {s.title}", anchor=f"appendix{i}")
            for p in s.paragraphs:
                f.para(p)
            if s.rows:
                n = len(s.header) or len(s.rows[0])
                f.grid(s.header, s.rows, tuple([1.0 / n] * n))
    return L, pages


def _chart_pages(t, index: int, L, pages):
    """One page per chart model, drawn by tablegen.book.chart_pdf; on small paper a spread of two
    pages, the chart on the left and its reading panel on the right."""
    for j, model in enumerate(t.charts, 1):
        anchor = ("anchor", f"chart{index}.{j}")
        if model.extra.get("panel_page"):
            to_left_page(pages, L, "The chart that follows and its key face each other.")
            for part in ("plot", "panel"):
                page = Page("chart")
                page.ops.append(("chart", model, part))
                pages.append(page)
            pages[-2].ops.insert(0, anchor)
        else:
            page = Page("chart")
            page.ops += [anchor, ("chart", model, "whole")]
            pages.append(page)


def render(book) -> bytes:
    """The PDF bytes of a book model."""
    L, pages = plan(book)
    return with_binary_streams(_render, book, L, pages, anchors_of(pages))


def anchors_of(pages) -> dict:
    """Anchor name -> page number (from 1) of a planned book."""
    anchors = {}
    for i, p in enumerate(pages, 1):
        for op in p.ops:
            if op[0] == "anchor":
                anchors.setdefault(op[1], i)
    return anchors


def new_canvas(book, size):
    """A canvas of the book's PDF metadata (title, document, fingerprint), reproducible bytes."""
    d = book.document
    buf = io.BytesIO()
    c = fonts.canvas(buf, pagesize=size, initialFontName=SANS, initialFontSize=10, pageCompression=1)
    c.setTitle(d.title)
    c.setAuthor(d.organisation or "")
    c.setSubject(f"{_number_text(book).replace('  Rev. ', ' rev. ')}, issued {d.issue_date}")
    c.setCreator(f"tablegen {book.versions['tablegen']}")
    c.setKeywords(f"fingerprint sha256:{book.fingerprint}")
    return c, buf


def _render(book, L, pages, anchors) -> bytes:
    c, buf = new_canvas(book, (L.width, L.height))
    head = running_head(book, L)
    draw_pages(c, pages, lambda c, no, total: draw_page(c, book, L, pages, no, anchors, head))
    c.save()
    return buf.getvalue()


def draw_page(c, book, L: Layout, pages: list, no: int, anchors: dict, head=None):
    """Page ``no`` (from 1) of a planned book, running head and foot included, onto a canvas
    at its origin (tablegen.book.impose places pages two to a sheet)."""
    _decorate(c, book, L, no, len(pages), head)
    _draw_ops(c, pages[no - 1].ops, anchors, L)


def draw_ops(c, page: Page, L: Layout):
    """A page's drawing without running head or foot (a page that pads a booklet)."""
    _draw_ops(c, page.ops, {}, L)


def _decorate(c, book, L: Layout, no: int, total: int, head=None):
    left, right = L.margin_x, L.width - L.margin_x
    size = L.run
    c.setFillGray(0.0)
    ytop = L.head_y
    c.setFont(SANS, size)
    for i, line in enumerate(head or running_head(book, L)):
        c.drawString(left, ytop - i * size * 1.2, line)
    c.setFont(SANS_BOLD, size)
    c.drawRightString(right, ytop, _number_text(book))
    y_rule = ytop - (len(head or [1]) - 1) * size * 1.2 - 3
    c.setLineWidth(0.5)
    c.line(left, y_rule, right, y_rule)
    yb = L.foot_y
    c.line(left, yb + size + 1, right, yb + size + 1)
    c.setFont(SANS, size)
    c.drawString(left, yb, _foot_text(book, L))
    c.drawRightString(right, yb, page_of(no, total))
    fsize = L.foot_small
    c.setFont(MONO, fsize)
    c.drawString(left, yb - fsize * 1.45, f"tablegen {book.versions['tablegen']} · sha256 {book.fingerprint}")


def _draw_ops(c, ops, anchors, L):
    for op in ops:
        kind = op[0]
        if kind == "t":
            _, font, size, x, y, text = op
            c.setFont(font, size)
            c.drawString(x, y, text)
        elif kind == "r":
            _, font, size, x, y, text = op
            c.setFont(font, size)
            c.drawRightString(x, y, text)
        elif kind == "l":
            _, x1, y1, x2, y2, lw, gray = op
            c.setLineWidth(lw)
            c.setStrokeGray(gray)
            c.line(x1, y1, x2, y2)
            c.setStrokeGray(0.0)
        elif kind == "rect":
            _, x, y, w, h, lw = op
            c.setLineWidth(lw)
            c.rect(x, y, w, h, stroke=1, fill=0)
        elif kind == "cells":
            _, font, size, cells = op
            _draw_cells(c, font, size, cells)
        elif kind == "pageref":
            _, font, size, x, y, anchor = op
            c.setFont(font, size)
            c.drawRightString(x, y, str(anchors.get(anchor, "")))
        elif kind == "c":
            _, font, size, x, y, text = op
            c.setFont(font, size)
            c.drawCentredString(x, y, text)
        elif kind == "chart":
            from .chart_pdf import draw_chart
            draw_chart(c, op[1], *pagination.chart_box(L), part=op[2])
        elif kind == "anchor":
            pass


def _draw_cells(c, fontname: str, size: float, cells):
    """Many short strings at given positions in one text object.

    This writes the text operators directly (what reportlab's text object would write,
    less its per-string width bookkeeping, which doubles the time of a table page):
    characters are mapped to the embedded font's subsets once per character through
    reportlab's own ``splitString``, so subsetting and embedding stay reportlab's, and the
    operators go into the page through the canvas's public ``addLiteral``. The one
    non-public name used is the canvas's document (``Canvas._doc``), which ``splitString``
    needs; that is why pyproject.toml bounds reportlab to the releases tested, and
    tests/test_book.py checks this path against the public text-object path page by page.
    """
    from reportlab.pdfbase.pdfdoc import escapePDF
    cells = list(cells)          # a table page's cells are made on demand (tablepages._CellGrid): once
    font = getFont(fontname)
    doc = c._doc
    tf = f"{size:.2f} Tf"
    used = set("".join(s for _, _, s in cells))
    enc = {}
    for ch in sorted(used):
        (subset, b), = font.splitString(ch, doc)
        enc[ch] = (subset, escapePDF(b))
    subsets = {v[0] for v in enc.values()}
    if len(subsets) <= 1:
        # the usual case: every character of the figures lies in one subset
        table = str.maketrans({ch: v[1] for ch, v in enc.items()})
        out = ["BT"]
        if subsets:
            out.append(f"{font.getSubsetInternalName(subsets.pop(), doc)} {tf}")
        out.extend([f"1 0 0 1 {x:.2f} {y:.2f} Tm ({s.translate(table)}) Tj" for x, y, s in cells])
        out.append("ET")
        c.addLiteral(" ".join(out))
        return
    # characters from more than one subset: the font changes inside the text object,
    # each cell placed first, then its runs of one subset each
    out = ["BT"]
    cur = None
    for x, y, s in cells:
        out.append(f"1 0 0 1 {x:.2f} {y:.2f} Tm")
        pieces = []
        for ch in s:
            e = enc[ch]
            if e[0] != cur:
                if pieces:
                    out.append(f"({''.join(pieces)}) Tj")
                    pieces = []
                cur = e[0]
                out.append(f"{font.getSubsetInternalName(cur, doc)} {tf}")
            pieces.append(e[1])
        if pieces:
            out.append(f"({''.join(pieces)}) Tj")
    out.append("ET")
    c.addLiteral(" ".join(out))
