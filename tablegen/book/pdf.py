"""The PDF of a table book, drawn straight onto reportlab canvas pages.

Layout is planned first (every page as a list of drawing operations), so the
total page count is known before anything is drawn and "page x of y" and the
contents page numbers are exact. Tables are drawn cell by cell into one text
object per page rather than through a flowing reportlab Table, which costs
several times more per page.

Same model, same bytes: reportlab's invariant mode fixes the document dates and
ids; the fonts are the embedded DejaVu faces of :mod:`tablegen.book.fonts`.
"""

from __future__ import annotations

import io
import re
from dataclasses import replace

from reportlab.pdfbase.pdfmetrics import getFont, stringWidth

from . import fonts, pagination
from .fonts import MONO, SANS, SANS_BOLD, SANS_OBLIQUE
from .model import pressure_text
from .pagination import Layout
from .textfit import fit_columns, simpleSplit

MINUS = "\u2212"


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


# ---------------------------------------------------------------- page plan
class Page:
    __slots__ = ("ops", "kind", "anchor")

    def __init__(self, kind: str):
        self.ops = []
        self.kind = kind      # "front", "table", "chart", "appendix"
        self.anchor = None


def _w(text: str, font: str, size: float) -> float:
    return stringWidth(text, font, size)


class Flow:
    """Running text for the front matter and appendix: paragraphs, headings, grids."""

    def __init__(self, book, L: Layout, pages: list, kind: str):
        self.L, self.pages, self.kind = L, pages, kind
        self.top = L.body_top
        self.bottom = L.body_bottom
        self.left = L.margin_x
        self.width = L.width - 2 * L.margin_x
        self.page = None
        self.y = 0.0
        self.new_page()

    def new_page(self):
        self.page = Page(self.kind)
        self.pages.append(self.page)
        self.y = self.top

    def need(self, h: float):
        if self.y - h < self.bottom and self.y < self.top - 1:
            self.new_page()

    def space(self, h: float):
        self.y -= h

    def heading(self, text: str, size: float | None = None, anchor: str | None = None, keep: float = 0.0):
        """A heading, kept on one page with what follows it: ``keep`` points of it (by
        default nine lines of text; a box or grid passes its own height)."""
        size = size or self.L.text * 1.45
        lines = simpleSplit(text, SANS_BOLD, size, self.width) or [""]
        self.need(size * (0.5 + 1.1 * len(lines)) + (keep or self.L.text * 9))
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

        self.need(hh + lead * 2)
        put_header()
        for r in rows:
            sp, h = draw_row(r)
            if self.y - h < self.bottom:
                self.new_page()
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


def _fmt_frac(x: float) -> str:
    return f"{x:.6f}"


def _front(book, L: Layout, pages: list, contents: list):
    d = book.document
    f = Flow(book, L, pages, "front")
    if d.organisation:
        f.para(d.organisation, size=L.text * 1.2, font=SANS_BOLD, after=L.text)
    f.para(d.title, size=L.text * 2.1, font=SANS_BOLD, after=L.text * 0.4)
    if d.subtitle:
        f.para(d.subtitle, size=L.text * 1.25, after=L.text * 0.6)
    f.space(L.text)
    f.heading("Document control", L.text * 1.25)
    units = {"SI": "SI", "US": "US customary", "both": "SI and US customary side by side"}[d.units]
    f.grid(("Item", "Value"), [
        ("Document number", d.number),
        ("Revision", d.revision),
        ("Issue date", d.issue_date),
        ("Organisation", d.organisation or "—"),
        ("Paper", f"{d.paper}, {d.orientation}"),
        *_edition_rows(book),
        ("Units; basis", f"{units}; {d.basis} (tables may set their own)"),
        *([("Volumetric reference", book.reference_text)] if book.reference_text else []),
        *([("Extrapolation", book.extrapolation)] if book.extrapolation else []),
        ("Generated by", f"tablegen {book.versions['tablegen']} (reportlab {book.versions['reportlab']}, "
                         f"numpy {book.versions['numpy']})"),
        ("Fingerprint (SHA-256)", _grouped(book.fingerprint)),
    ], (0.3, 0.7), mono_cols=())
    f.heading("Approval", L.text * 1.25)
    _signatures(f, d)
    # the contents stay together: on this page if they fit, else all on the next
    f.heading("Contents", L.text * 1.25, keep=min(sum(len(lines) for lines, _, _ in _contents_lines(f, contents))
                                                  * L.text * 1.4, f.top - f.bottom - L.text * 4))
    _contents(f, contents)

    # how to read
    f.new_page()
    f.heading("How to read these tables", anchor="read")
    f.para("Each table gives ideal-gas properties of one substance at the temperatures of its first "
           "column or columns. The substance, the basis (per unit mass, per mole or per volume at "
           "stated reference conditions), the enthalpy datum, the entropy reference pressure P° and "
           f"the Pr/vr anchor are printed at the head of {'each table' if L.compact else 'every table page'} "
           "and listed below. Values between rows may be interpolated linearly; the largest error that "
           "adds is printed under each table, beside the uncertainty U, and the example below shows how "
           "to use it.")
    f.para(book.rounding_rule)
    f.para("Row marks in the narrow first column: * an extra row at a named temperature; "
           "x a value extrapolated beyond the range of the coefficient data; c at or below the water dew "
           "point of the gas: water may condense at this temperature; ideal-gas values do not hold. The "
           "CSV files carry the same marks in their last column, mark.")
    if _facing_note(book, L):
        f.para(_facing_note(book, L))
    if L.compact:
        f.para("On this small paper each table page repeats only what a reader needs on every page: the "
               "table title, the column symbols and units, the document number, revision and page. The "
               "substance, basis, datum and anchor are printed on the first page of each table, and its "
               "notes (marked rows, uncertainty, cautions) on its last page.")
    _worked_example(f, book)
    if book.reference_text:
        f.para(f"Volumetric basis: values per cubic metre (SI) or cubic foot (US) of gas at "
               f"{book.reference_text}, that is per amount n = P/(R T) of ideal gas at those conditions.")
    f.heading("Columns", L.text * 1.2)
    rows = [(sym, name, formula, ", ".join(units)) for key, sym, name, formula, units in book.definitions]
    f.grid(("Symbol", "Quantity", "Definition", "Units"), rows, (0.1, 0.2, 0.5, 0.2))
    f.para("R is the specific gas constant of the substance: the molar gas constant 8.31446261815324 J/(mol K) "
           "(N_A k, exact since the 2019 SI) divided by the molar mass M. T₀ is the datum temperature, Tₐ the anchor "
           "temperature and Tₘ the temperature from which mean heat capacities are taken.", size=L.text * 0.92)
    f.heading("Datums, reference pressure and anchors per table", L.text * 1.2)
    rows = []
    for i, t in enumerate(book.tables, 1):
        rows.append((f"{i}. {t.title}", f"{t.substance.name}", t.datum_text,
                     t.P_ref_text or pressure_text(t.P_ref_Pa), t.anchor_text,
                     t.mean_cp_text or f"{t.mean_cp_from_K:g} K", t.grid_text))
    f.grid(("Table", "Substance", "Enthalpy datum", "P°", "Pr/vr anchor", "Tₘ", "Grid"), rows,
           (0.15, 0.12, 0.2, 0.1, 0.15, 0.08, 0.2), size=L.text * 0.8)

    # compositions
    f.new_page()
    f.heading("Substances and compositions", anchor="subs")
    sheets = {}
    for sh in book.sheets:
        sheets.setdefault(sh.substances[-1], sh)
    for s in book.substances:
        f.heading(f"{s.name} ({s.id})", L.text * 1.1)
        f.para(f"M = {s.M:.4f} kg/kmol, R = {s.R:.3f} J/(kg K); coefficient data valid "
               f"{s.T_min:g} K to {s.T_max:g} K.")
        for line in s.description:
            f.para(line)
        if s.kind == "mixture":
            rows = [(c.id, _fmt_frac(c.mole_fraction), _fmt_frac(c.mass_fraction), f"{c.M:.4f}", c.source)
                    for c in s.components]
            f.grid(("Species", "Mole fraction", "Mass fraction", "M, kg/kmol", "Data set"), rows,
                   (0.2, 0.2, 0.2, 0.2, 0.2), right_cols=(1, 2, 3))
            f.para(f"The mixture's s° includes the ideal mixing term −R Σ yᵢ ln yᵢ = "
                   f"{s.mixing_entropy_R:.6f} R = {s.mixing_entropy_R * s.R / 1000:.6f} kJ/(kg K). "
                   f"Composition is frozen at all temperatures.", size=L.text * 0.92)
        sh = sheets.pop(s.name, None)
        if sh is not None:
            _sheet(f, sh, book.sheets.index(sh) + 1)
            if s is not book.substances[-1]:
                f.new_page()
    # sources
    f.heading("Data sources", anchor="sources")
    rows = []
    seen = set()
    for s in book.substances:
        for sid, ds, cite in s.sources:
            if (sid, ds) not in seen:
                seen.add((sid, ds))
                rows.append((sid, ds, cite))
    f.grid(("Species", "Data set", "Citation"), rows, (0.14, 0.14, 0.72), size=L.text * 0.85)
    f.para("Data files used (SHA-256 of the bytes; the fingerprint covers these and the normalised spec):",
           size=L.text * 0.9)
    f.grid(("File", "SHA-256"), [(n, _grouped(h)) for n, h in book.data_files], (0.28, 0.72),
           size=L.text * 0.8, mono_cols=(1,))
    f.heading("Caution", anchor="caution", keep=min(f.box_lines(book.cautions)[1], f.top - f.bottom - L.text * 3))
    f.box("CAUTION", book.cautions)


def _contents_lines(f: Flow, contents):
    """(lines, indent, anchor) of each contents entry: wrapped short of the page number;
    chart entries indented under their table."""
    L = f.L
    numw = _w("0000", SANS, L.text)
    out = []
    for title, anchor in contents:
        indent = L.text * 1.5 if anchor.startswith("chart") else 0.0
        out.append((simpleSplit(title, SANS, L.text, f.width - numw - indent - 4) or [""], indent, anchor))
    return out


def _contents(f: Flow, contents):
    """One line per entry (wrapped, never past the page number), the page number at the right."""
    L = f.L
    for lines, indent, anchor in _contents_lines(f, contents):
        f.need(L.text * 1.4 * len(lines))
        for line in lines:
            f.y -= L.text * 1.4
            f.page.ops.append(("t", SANS, L.text, f.left + indent, f.y, line))
        f.page.ops.append(("pageref", SANS, L.text, f.left + f.width, f.y, anchor))


def _edition_rows(book) -> list:
    """Rows of the document control that say which edition this is (none without editions)."""
    ed = book.edition
    rows = []
    if ed is not None and ed.name:
        rows.append(("Edition", f"{ed.label} ({ed.name}), document number {ed.number(book.document.number)}; "
                                f"every edition of revision {book.document.revision} carries the fingerprint below"))
    if ed is not None and ed.paper_from == "--paper":
        rows.append(("Paper chosen", "for this build only (tablegen build --paper); the spec gives "
                                     f"{book.normalised_spec['document']['paper']}"))
    if ed is not None and ed.two_sided:
        rows.append(("Printing", "two-sided: column parts of a wide table face each other"))
    return rows


def _facing_note(book, L: Layout) -> str:
    """The how-to-read paragraph on facing pages and blank versos (two-sided editions only)."""
    if not L.two_sided:
        return ""
    text = ("This edition is printed on both sides of the paper. A table too wide for one page is printed "
            "in column parts of about equal width, with the temperature columns repeated on each: part 1 on "
            "a left-hand (even-numbered) page and part 2 on the right-hand page facing it (parts 3 and 4 on "
            "the next spread), so each row reads straight across the spread. Where such a table would "
            "start on a right-hand page, the page before it is left blank and says so.")
    if any(t.charts for t in book.tables) and pagination.chart_on_two_pages(L):
        text += (" Each chart takes a spread: the chart on the left-hand page, its key, states and "
                 "cautions on the right-hand page.")
    return text


def _sheet(f: Flow, sh, n: int):
    """A combustion sheet, after the last substance it defines."""
    L = f.L
    f.new_page()
    f.heading(sh.title, L.text * 1.25, anchor=f"sheet{n}")
    for b in sh.blocks:
        if b[0] == "heading":
            f.heading(b[1], L.text * 1.05)
        elif b[0] == "para":
            f.para(b[1], size=L.text * 0.95)
        else:
            _, header, rows, fractions, right = b
            f.grid(header, rows, fractions, size=L.text * 0.88, right_cols=right)
def _worked_example(f: Flow, book):
    """The how-to-read page's worked example: two printed rows, the value read between them, its bound."""
    ex = book.worked_example
    if ex is None:
        return
    L = f.L
    f.heading(ex.title, L.text * 1.2)
    f.para(ex.paragraphs[0])
    f.grid(ex.header, [(_cell_text(a), _cell_text(b), c) for a, b, c in ex.rows], (0.14, 0.18, 0.68),
           mono_cols=(0, 1), right_cols=(0, 1))
    for text in ex.paragraphs[1:]:
        f.para(text)


def _grouped(hexdigest: str) -> str:
    """A hash in blocks of eight, so it wraps and reads aloud."""
    return " ".join(hexdigest[i:i + 8] for i in range(0, len(hexdigest), 8))


def _signatures(f: Flow, d):
    L = f.L
    size = L.text
    rows = (("Prepared", d.prepared_by), ("Checked", d.checked_by), ("Approved", d.approved_by))
    colx = [f.left, f.left + 0.16 * f.width, f.left + 0.5 * f.width, f.left + 0.8 * f.width]
    f.need(size * 9)
    f.y -= size * 1.3
    for x, h in zip(colx, ("Role", "Name", "Signature", "Date")):
        f.page.ops.append(("t", SANS_BOLD, size * 0.92, x, f.y, h))
    for role, name in rows:
        f.y -= size * 2.6
        f.page.ops.append(("t", SANS, size, colx[0], f.y + 2, role))
        if name:
            f.page.ops.append(("t", SANS, size, colx[1], f.y + 2, name))
        else:
            f.page.ops.append(("l", colx[1], f.y, colx[2] - 10, f.y, 0.5, 0.0))
        f.page.ops.append(("l", colx[2], f.y, colx[3] - 10, f.y, 0.5, 0.0))
        f.page.ops.append(("l", colx[3], f.y, f.left + f.width, f.y, 0.5, 0.0))
    f.y -= size * 1.6


# ---------------------------------------------------------------- table pages
def _cell_text(s: str) -> str:
    return s.replace("-", MINUS) if "-" in s else s


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
        cells = [_cell_text(s) for s in c.cells]
        longest = max((widths(s) for s in _shapes(cells)), default=0.0)
        head = max(_w(c.symbol, SANS_BOLD, L.head), _w(c.unit, SANS, L.body * 0.82))
        colw.append(max(longest, head))
    has_marks = any(t.marks)
    markw = max(_w(m, SANS, L.body) for m in t.marks) + 2 if has_marks else 0.0
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
    cells_txt = [[_cell_text(s) for s in c.cells] for c in t.columns]
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
            cells = []
            yy = y_rule
            for r in range(a, b):
                yy -= L.row
                base = yy + (L.row - L.body) * 0.5
                if markw and t.marks[r]:
                    cells.append((x0, base, t.marks[r]))
                for i, xx in zip(g, xr):
                    cells.append((xx - cell_w[i][r], base, cells_txt[i][r]))
                if (r - a + 1) % 5 == 0 and r + 1 < b:
                    ops.append(("l", x0, yy, x0 + tw, yy, 0.3, 0.6))
            ops.append(("cells", SANS, L.body, cells))
            ops.append(("l", x0, yy - 1, x0 + tw, yy - 1, 0.8, 0.0))
            ny = yy - 3
            lines = list(P.note_lines) if last or not L.compact else []
            lines.append(_part_line(a, b, n, gi, len(groups), facing, last and gi + 1 == len(groups)))
            for line in filter(None, lines):
                ny -= L.body * 0.85 * 1.3
                ops.append(("t", SANS_OBLIQUE, L.body * 0.85, left0, ny, line))
            pages.append(page)
    return len(pages) - start


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


def _fit(text: str, font: str, size: float, width: float) -> str:
    """Text cut to a width with an ellipsis (the QA report's cells; never a book's running head)."""
    if _w(text, font, size) <= width:
        return text
    while text and _w(text + "…", font, size) > width:
        text = text[:-1]
    return text + "…"


# ---------------------------------------------------------------- running head and foot
_SHORTEN = re.compile(r"\s*(?::|\s[-–—]\s|\()")


def running_head(book, L: Layout) -> list[str]:
    """The running head's title, by rule: the full title if it fits beside the document
    number; else the title up to its first colon, dash or bracket (the main title); else
    the full title wrapped onto two lines. Never cut off."""
    d = book.document
    avail = L.live_width - _w(_number_text(book), SANS_BOLD, L.run) - L.run * 2
    t = d.title
    if _w(t, SANS, L.run) <= avail:
        return [t]
    main = _SHORTEN.split(t, maxsplit=1)[0].strip()
    if main and _w(main, SANS, L.run) <= avail:
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
    room = L.live_width - _w("page 0000 of 0000", SANS, L.run) - L.run * 2
    if ed is not None and ed.label:
        text = f"{number} Rev. {d.revision} · {ed.label} · issued {d.issue_date}"
        if _w(text, SANS, L.run) <= room:
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
    _front(book, L, pages, _contents_entries(book))
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
        f = Flow(book, L, pages, "appendix")
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


def with_binary_streams(fn, *args):
    """fn(*args) with reportlab writing binary page streams."""
    from reportlab import rl_config
    a85, rl_config.useA85 = rl_config.useA85, 0     # binary streams: smaller and faster
    try:
        return fn(*args)
    finally:
        rl_config.useA85 = a85


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
    for no in range(1, len(pages) + 1):
        draw_page(c, book, L, pages, no, anchors, head)
        c.showPage()
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
    c.drawRightString(right, yb, f"page {no} of {total}")
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
