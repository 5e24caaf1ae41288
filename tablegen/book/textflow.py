"""The running text of a table book's PDF: planned pages and the blocks of the front matter
and appendix (paragraphs, headings kept with what follows, wrapped grids, ruled boxes).

A page is planned as a list of drawing operations (tuples that tablegen.book.pdf draws);
the blocks are stacked down the pages by the documents' page-flow engine,
:mod:`tablegen.book.pageflow`.
"""

from __future__ import annotations

from reportlab.pdfbase.pdfmetrics import stringWidth

from .fonts import MONO, SANS, SANS_BOLD
from .pageflow import PageFlow
from .pagination import Layout
from .textfit import fit_columns, simpleSplit

MINUS = "\u2212"


class Page:
    """A planned page of a book: its drawing operations (tablegen.book.pdf draws them), its
    kind and the anchor of its first section."""

    __slots__ = ("ops", "kind", "anchor")

    def __init__(self, kind: str):
        self.ops = []
        self.kind = kind      # "front", "table", "chart", "appendix"
        self.anchor = None

    def __len__(self) -> int:
        """Operations on the page (the page-flow engine asks whether a page holds any)."""
        return len(self.ops)


def text_width(text: str, font: str, size: float) -> float:
    """Width of a string in a font and size, points."""
    return stringWidth(text, font, size)


def figure_text(s: str) -> str:
    """A printed figure with a true minus sign (U+2212) for the hyphen."""
    return s.replace("-", MINUS) if "-" in s else s


class Flow(PageFlow):
    """Running text for the front matter and appendix: paragraphs, headings, grids, boxes,
    placed by the page-flow engine (:class:`tablegen.book.pageflow.PageFlow`)."""

    def __init__(self, L: Layout, pages: list, kind: str):
        self.L, self.kind = L, kind
        self.left = L.margin_x
        self.width = L.width - 2 * L.margin_x
        super().__init__(L.body_top, L.body_bottom, pages, lambda: Page(kind))

    def heading(self, text: str, size: float | None = None, anchor: str | None = None, keep: float = 0.0):
        """A heading, kept on one page with what follows it: ``keep`` points of it (by
        default nine lines of text; a box or grid passes its own height)."""
        size = size or self.L.text * 1.45
        lines = simpleSplit(text, SANS_BOLD, size, self.width) or [""]
        self.keep_with_next(size * (0.5 + 1.1 * len(lines)), keep or self.L.text * 9)
        for i, line in enumerate(lines):
            self.y -= size * 1.1
            self.page.ops.append(("t", SANS_BOLD, size, self.left, self.y, line))
        if anchor:
            self.page.anchor = self.page.anchor or anchor
            self.page.ops.append(("anchor", anchor))
        self.y -= size * 0.6

    def para(self, text: str, size: float | None = None, font: str = SANS, indent: float = 0.0,
             after: float | None = None):
        size = size or self.L.text
        lead = size * 1.32
        for line in simpleSplit(text, font, size, self.width - indent):
            self.need(lead)
            self.y -= lead
            self.page.ops.append(("t", font, size, self.left + indent, self.y + size * 0.25, line))
        self.y -= size * 0.5 if after is None else after

    def grid(self, header, rows, fractions, size: float | None = None, mono_cols=(), right_cols=()):
        """A wrapped grid; the header repeats when the grid runs onto a new page."""
        size = size or self.L.text * 0.92
        lead = size * 1.28
        pad = 3.0
        widths = fit_columns([f * self.width for f in fractions], header, rows, size, pad, mono_cols)
        xs = [self.left + sum(widths[:i]) for i in range(len(widths))]

        def split(cells, bold=False):
            out = []
            for j, c in enumerate(cells):
                font = SANS_BOLD if bold else (MONO if j in mono_cols else SANS)
                out.append((font, simpleSplit(str(c), font, size, widths[j] - 2 * pad) or [""]))
            return out

        def draw_row(cells, bold=False, rule=True):
            sp = split(cells, bold)
            n = max(len(lines) for _, lines in sp)
            h = n * lead + 3
            return sp, h

        hsp, hh = draw_row(header, True)

        def put_header():
            self.y -= hh
            top = self.y + hh
            for j, (font, lines) in enumerate(hsp):
                for i, line in enumerate(lines):
                    self.page.ops.append(("t", font, size, xs[j] + pad, top - (i + 1) * lead + size * 0.2, line))
            self.page.ops.append(("l", self.left, self.y, self.left + self.width, self.y, 0.6, 0.0))

        self.keep_with_next(hh, lead * 2)
        put_header()
        for r in rows:
            sp, h = draw_row(r)
            if self.turn_if_short(h):
                put_header()
            top = self.y
            self.y -= h
            for j, (font, lines) in enumerate(sp):
                for i, line in enumerate(lines):
                    yy = top - (i + 1) * lead + size * 0.2
                    if j in right_cols:
                        self.page.ops.append(("r", font, size, xs[j] + widths[j] - pad, yy, line))
                    else:
                        self.page.ops.append(("t", font, size, xs[j] + pad, yy, line))
            self.page.ops.append(("l", self.left, self.y, self.left + self.width, self.y, 0.25, 0.65))
        self.y -= lead * 0.6

    def box_lines(self, paragraphs, size: float | None = None):
        """Lines and height of a ruled box of these paragraphs (see :meth:`box`)."""
        size = size or self.L.text
        lead = size * 1.32
        pad = 7.0
        lines = []
        for p in paragraphs:
            lines.extend(simpleSplit(p, SANS, size, self.width - 2 * pad))
            lines.append("")
        return lines, (len(lines) + 2) * lead + 2 * pad

    def box(self, title: str, paragraphs, size: float | None = None):
        """A ruled box (the caution notice); kept on one page."""
        size = size or self.L.text
        lead = size * 1.32
        pad = 7.0
        lines, h = self.box_lines(paragraphs, size)
        self.need(h)
        top = self.y
        self.page.ops.append(("rect", self.left, top - h, self.width, h, 1.2))
        y = top - pad - lead
        self.page.ops.append(("t", SANS_BOLD, size * 1.25, self.left + pad, y, title))
        y -= lead * 0.6
        for line in lines:
            y -= lead
            if line:
                self.page.ops.append(("t", SANS, size, self.left + pad, y, line))
        self.y = top - h - lead
