"""The table pages of a book's PDF: column parts, rows per page, and each page's drawing.

How a table goes onto pages (:func:`plan_table`) follows the rules of
tablegen.book.pagination; :func:`table_pages` plans the pages as drawing operations,
cell by cell into one text object per page (tablegen.book.pdf draws them), which costs
several times less per page than a flowing reportlab Table.
"""

from __future__ import annotations

from reportlab.pdfbase.pdfmetrics import getFont

from . import pagination
from .fonts import SANS, SANS_BOLD, SANS_OBLIQUE
from .pagination import Layout
from .textfit import simpleSplit
from .textflow import MINUS, Page, figure_text, text_width


class _Widths:
    """Widths of figure strings from per-character widths (DejaVu figures are tabular)."""

    def __init__(self, font: str, size: float):
        self.font, self.size = font, size
        self.cw = {}
        self.f = getFont(font)

    def __call__(self, s: str) -> float:
        # DejaVu's figures share one width; correct for the few other characters
        cw = self.cw
        if not cw:
            self.digit = self.f.stringWidth("0", self.size)
            for ch in "0123456789":
                cw[ch] = self.digit
            self.other = {ch: self.f.stringWidth(ch, self.size) - self.digit for ch in ".−e+*x-"}
        w = len(s) * self.digit
        for ch, dw in self.other.items():
            if ch in s:
                w += s.count(ch) * dw
        if not s.strip("0123456789.−e+*x-"):
            return w
        return self.f.stringWidth(s, self.size)

    def many(self, cells) -> list:
        """Widths of a column of figures: digits, one '.' at most, a leading minus."""
        self("0")
        simple = set("".join(cells)) <= set("0123456789.−") and \
            all(s.count(".") <= 1 and "−" not in s[1:] for s in cells)
        if not simple:
            return [self(s) for s in cells]
        d, dm, dd = self.digit, self.other["−"], self.other["."]
        return [len(s) * d + (dm if s[:1] == "−" else 0.0) + (dd if "." in s else 0.0) for s in cells]


class TablePlan:
    """How one table goes onto pages: column parts, row ranges, widths and the text lines."""

    __slots__ = ("groups", "chunks", "colw", "markw", "note_lines", "head", "title", "title_more")

    def __init__(self, **kw):
        for k, v in kw.items():
            setattr(self, k, v)


def _title_size(L: Layout) -> float:
    return L.text * 1.35


def _head_size(L: Layout) -> tuple[float, float]:
    """Size and line pitch of a table's heading lines (substance, basis, datum): tighter in the
    compact layout, where they are printed once per table."""
    return (L.body * 0.85, L.body * 1.1) if L.compact else (L.body * 0.9, L.body * 1.2)


def plan_table(t, L: Layout, index: int = 1) -> TablePlan:
    """Column parts and rows per page of one table (rules in tablegen.book.pagination).

    Full layout: title, heading lines and notes on every page. Compact layout (small
    paper): the heading lines on the first page of the table and the notes on its
    last page; the title, column symbols and units on every page. Every column part
    of a row range has the same lines, so the rows of facing parts line up.
    """
    widths = _Widths(SANS, L.body)
    colw = []
    for c in t.columns:
        cells = [figure_text(s) for s in c.cells]
        longest = max((widths(s) for s in _shapes(cells)), default=0.0)
        head = max(text_width(c.symbol, SANS_BOLD, L.head), text_width(c.unit, SANS, L.body * 0.82))
        colw.append(max(longest, head))
    has_marks = any(t.marks)
    markw = max(text_width(m, SANS, L.body) for m in t.marks) + 2 if has_marks else 0.0
    full = L.live_width
    tcols = [i for i, c in enumerate(t.columns) if c.key == "T"]
    others = [i for i, c in enumerate(t.columns) if c.key != "T"]
    base = sum(colw[i] + L.gap for i in tcols)
    # SI and US columns of one property stay side by side on one page
    units = []
    for i in others:
        if units and t.columns[units[-1][-1]].key == t.columns[i].key:
            units[-1].append(i)
        else:
            units.append([i])
    parts = pagination.column_parts([sum(colw[i] + L.gap for i in u) for u in units], base, full - markw,
                                    L.max_columns, [len(u) for u in units], even=L.two_sided)
    groups = [tcols + [i for ui in part for i in units[ui]] for part in parts] if units else [tcols]
    note_lines = []
    for n in t.notes:
        note_lines.extend(simpleSplit(n, SANS_OBLIQUE, L.body * 0.85, full))
    head = []
    for line in t.head_lines:
        head.extend(simpleSplit(line, SANS, _head_size(L)[0], full))
    ts = _title_size(L)
    title = simpleSplit(f"Table {index}. {t.title}", SANS_BOLD, ts, full) or [""]
    more = simpleSplit(f"Table {index}. {t.title} (continued)", SANS_BOLD, ts, full) or [""]
    line_h = L.body * 0.85 * 1.3
    height = (L.body_top - L.body_bottom - 6 - (L.head * 1.15 + L.body * 0.82 * 1.3 + 4) - line_h - 6)

    def rows(first: bool, with_notes: bool) -> int:
        """Rows of a page: the first has the title and the heading lines, a later one the
        title with "(continued)" (and, in the full layout, the heading lines too)."""
        with_head = first or not L.compact
        h = (height - ts * 1.3 * len(title if first else more) - (_head_size(L)[1] * len(head) if with_head else 0.0)
             - (line_h * len(note_lines) if with_notes else 0.0))
        return max(1, int(h // L.row))
    notes_later = L.compact      # compact: the notes on the last page only; full: on every page
    chunks = pagination.row_chunks(t.rows, rows(True, not notes_later), rows(False, not notes_later),
                                   rows(False, True), rows(True, True))
    return TablePlan(groups=groups, chunks=chunks, colw=colw, markw=markw, note_lines=note_lines, head=head,
                     title=title, title_more=more)


def _shapes(cells):
    """One representative string per (length, minus count): enough to find the widest."""
    seen = {}
    for s in cells:
        k = (len(s), s.count(MINUS), s.count("."))
        if k not in seen:
            seen[k] = s
    return seen.values()


def blank_page(L: Layout, why: str) -> Page:
    """A page left blank on purpose, saying so (and why)."""
    page = Page("blank")
    y = (L.body_top + L.body_bottom) / 2
    page.ops.append(("c", SANS_OBLIQUE, L.text * 1.1, L.width / 2, y, "This page is intentionally left blank."))
    for i, line in enumerate(simpleSplit(why, SANS_OBLIQUE, L.text * 0.9, L.live_width * 0.8)):
        page.ops.append(("c", SANS_OBLIQUE, L.text * 0.9, L.width / 2, y - L.text * 1.6 - i * L.text * 1.2, line))
    return page


def to_left_page(pages: list, L: Layout, why: str):
    """In a two-sided edition, a blank page so that the next page is a left-hand (even) one."""
    if L.two_sided and (len(pages) + 1) % 2 == 1:
        pages.append(blank_page(L, why))


def table_pages(t, index: int, L: Layout, pages: list):
    P = plan_table(t, L, index)
    groups, colw, markw = P.groups, P.colw, P.markw
    n = t.rows
    chunks = P.chunks
    widths = _Widths(SANS, L.body)
    cells_txt = [[figure_text(s) for s in c.cells] for c in t.columns]
    cell_w = [widths.many(col) for col in cells_txt]
    left0 = L.margin_x
    full = L.live_width
    top = L.body_top
    ts = _title_size(L)
    facing = L.two_sided and len(groups) > 1
    start = len(pages)
    for ci, (a, b) in enumerate(chunks):
        first, last = ci == 0, ci == len(chunks) - 1
        if facing:
            to_left_page(pages, L, f"The column parts of Table {index} follow on facing pages.")
        for gi, g in enumerate(groups):
            page = Page("table")
            if first and gi == 0:
                page.anchor = f"table{index}"
                page.ops.append(("anchor", f"table{index}"))
            ops = page.ops
            # spread the columns over the width, up to twice the least gap
            natural = markw + sum(colw[i] + L.gap for i in g)
            gap = L.gap + min(L.gap, max(0.0, (full - natural) / max(1, len(g))))
            tw = markw + sum(colw[i] + gap for i in g)
            x0 = left0 + (full - tw) / 2 if tw < full else left0
            y = top
            for line in (P.title if first else P.title_more):
                y -= ts * 1.3
                ops.append(("t", SANS_BOLD, ts, left0, y + ts * 0.3, line))
            y -= 2
            for line in (P.head if first or not L.compact else ()):
                y -= _head_size(L)[1]
                ops.append(("t", SANS, _head_size(L)[0], left0, y, line))
            y -= 6
            # column header: symbol, unit, rule
            xr = []
            x = x0 + markw
            for i in g:
                x += gap / 2 + colw[i]
                xr.append(x)
                x += gap / 2
            y_sym = y - L.head * 1.15
            y_unit = y_sym - L.body * 0.82 * 1.3
            for i, xx in zip(g, xr):
                c = t.columns[i]
                ops.append(("r", SANS_BOLD, L.head, xx, y_sym, c.symbol))
                ops.append(("r", SANS, L.body * 0.82, xx, y_unit, c.unit))
            y_rule = y_unit - 4
            ops.append(("l", x0, y_rule, x0 + tw, y_rule, 0.8, 0.0))
            # body
            bases = []
            yy = y_rule
            for r in range(a, b):
                yy -= L.row
                bases.append(yy + (L.row - L.body) * 0.5)
                if (r - a + 1) % 5 == 0 and r + 1 < b:
                    ops.append(("l", x0, yy, x0 + tw, yy, 0.3, 0.6))
            ops.append(("cells", SANS, L.body,
                        _CellGrid(a, bases, x0, t.marks if markw else None, tuple(zip(g, xr)), cells_txt, cell_w)))
            ops.append(("l", x0, yy - 1, x0 + tw, yy - 1, 0.8, 0.0))
            ny = yy - 3
            lines = list(P.note_lines) if last or not L.compact else []
            lines.append(_part_line(a, b, n, gi, len(groups), facing, last and gi + 1 == len(groups)))
            for line in filter(None, lines):
                ny -= L.body * 0.85 * 1.3
                ops.append(("t", SANS_OBLIQUE, L.body * 0.85, left0, ny, line))
            pages.append(page)
    return len(pages) - start


class _CellGrid:
    """The cells of one table page, made when the page is drawn: (x, baseline, text) in
    row order (the mark, then the columns), from the table's own lists of texts and
    widths. A 500-page book held some 600,000 such tuples at once when every page kept
    its own list; now a page keeps its baselines only."""

    __slots__ = ("first", "bases", "x0", "marks", "columns", "texts", "widths")

    def __init__(self, first, bases, x0, marks, columns, texts, widths):
        self.first, self.bases, self.x0, self.marks = first, bases, x0, marks
        self.columns, self.texts, self.widths = columns, texts, widths

    def __iter__(self):
        marks, x0, texts, widths = self.marks, self.x0, self.texts, self.widths
        for r, base in enumerate(self.bases, self.first):
            if marks is not None and marks[r]:
                yield (x0, base, marks[r])
            for i, xx in self.columns:
                yield (xx - widths[i][r], base, texts[i][r])


def _part_line(a: int, b: int, n: int, gi: int, parts: int, facing: bool, end: bool) -> str:
    """The foot line of a table page: its rows, its column part, what follows."""
    bits = [f"rows {a + 1}-{b} of {n}"] if (a, b) != (0, n) else []
    if parts > 1:
        other = gi + 2 if gi % 2 == 0 else gi
        bits.append(f"columns part {gi + 1} of {parts}" +
                    (f" (part {other} on the facing page)" if facing and other <= parts else ""))
    if not end:
        bits.append("continued on the next page")
    return " · ".join(bits)
