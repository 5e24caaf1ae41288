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
from dataclasses import dataclass

from reportlab.lib.pagesizes import A3, A4, A5, landscape, letter
from reportlab.lib.units import mm
from reportlab.lib.utils import simpleSplit
from reportlab.pdfbase.pdfmetrics import getFont, stringWidth

from . import fonts
from .fonts import MONO, SANS, SANS_BOLD, SANS_OBLIQUE
from .model import pressure_text

MINUS = "\u2212"


@dataclass(frozen=True, slots=True)
class Layout:
    """Geometry and type sizes of one paper format."""

    paper: str
    width: float
    height: float
    margin_x: float
    margin_top: float
    margin_bottom: float
    body: float          # table figures, pt
    row: float           # row pitch, pt
    head: float          # column symbols, pt
    text: float          # front-matter text, pt
    gap: float           # least space between columns, pt
    max_columns: int     # property columns per page at most (0: as many as fit)


_SIZES = {"A4": A4, "Letter": letter, "A3": A3, "A5-pocket": A5}


def layout_for(paper: str, orientation: str) -> Layout:
    w, h = _SIZES[paper]
    if orientation == "landscape":
        w, h = landscape((w, h))
    if paper == "A5-pocket":
        # field use: larger figures, fewer columns, wide row pitch for a pencil mark
        return Layout(paper, w, h, 11 * mm, 13 * mm, 13 * mm, 9.0, 12.6, 9.5, 8.5, 9.0, 5)
    if paper == "A3":
        return Layout(paper, w, h, 20 * mm, 18 * mm, 18 * mm, 9.0, 11.6, 9.5, 10.0, 14.0, 0)
    return Layout(paper, w, h, 15 * mm, 16 * mm, 16 * mm, 7.6, 9.8, 8.2, 9.0, 11.0, 0)


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
        self.top = L.height - L.margin_top - 10
        self.bottom = L.margin_bottom + 14
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

    def heading(self, text: str, size: float | None = None, anchor: str | None = None):
        size = size or self.L.text * 1.45
        self.need(size * 1.6 + self.L.text * 9)
        self.y -= size * 1.1
        self.page.ops.append(("t", SANS_BOLD, size, self.left, self.y, text))
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
        widths = [f * self.width for f in fractions]
        xs = [self.left + sum(widths[:i]) for i in range(len(widths))]
        pad = 3.0

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

    def box(self, title: str, paragraphs, size: float | None = None):
        """A ruled box (the caution notice); kept on one page."""
        size = size or self.L.text
        lead = size * 1.32
        pad = 7.0
        lines = []
        for p in paragraphs:
            lines.extend(simpleSplit(p, SANS, size, self.width - 2 * pad))
            lines.append("")
        h = (len(lines) + 2) * lead + 2 * pad
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


# ---------------------------------------------------------------- front matter
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
        ("Units; basis", f"{units}; {d.basis} (tables may set their own)"),
        *([("Volumetric reference", book.reference_text)] if book.reference_text else []),
        *([("Extrapolation", book.extrapolation)] if book.extrapolation else []),
        ("Generated by", f"tablegen {book.versions['tablegen']} (reportlab {book.versions['reportlab']}, "
                         f"numpy {book.versions['numpy']})"),
        ("Fingerprint (SHA-256)", _grouped(book.fingerprint)),
    ], (0.3, 0.7), mono_cols=())
    f.heading("Approval", L.text * 1.25)
    _signatures(f, d)
    f.heading("Contents", L.text * 1.25)
    for title, anchor in contents:
        f.need(L.text * 1.4)
        f.y -= L.text * 1.4
        f.page.ops.append(("t", SANS, L.text, f.left, f.y, title))
        f.page.ops.append(("pageref", SANS, L.text, f.left + f.width, f.y, anchor))

    # how to read
    f.new_page()
    f.heading("How to read these tables", anchor="read")
    f.para("Each table gives ideal-gas properties of one substance at the temperatures of its first "
           "column or columns. The substance, the basis (per unit mass, per mole or per volume at "
           "stated reference conditions), the enthalpy datum, the entropy reference pressure P° and "
           "the Pr/vr anchor are printed at the head of every table page and listed below. Values "
           "between rows may be interpolated linearly; the largest error that adds is printed under "
           "each table, beside the uncertainty U, and the example below shows how to use it.")
    f.para(book.rounding_rule)
    f.para("Row marks in the narrow first column: * an extra row at a named temperature; "
           "x a value extrapolated beyond the range of the coefficient data; c at or below the water dew "
           "point of the gas: water may condense at this temperature; ideal-gas values do not hold. The "
           "CSV files carry the same marks in their last column, mark.")
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
    f.heading("Caution", anchor="caution")
    f.box("CAUTION", book.cautions)


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


def plan_table(t, L: Layout):
    """Column groups and rows per page of one table.

    Returns (groups, rows_per_page, column widths, mark column width, note lines, head lines).
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
    avail = L.width - 2 * L.margin_x - markw
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
    groups, cur, used = [], [], base
    for u in units:
        w = sum(colw[i] + L.gap for i in u)
        if cur and (used + w > avail or (L.max_columns and len(cur) + len(u) > L.max_columns)):
            groups.append(cur)
            cur, used = [], base
        cur.extend(u)
        used += w
    if cur or not groups:
        groups.append(cur)
    note_lines = []
    for n in t.notes:
        note_lines.extend(simpleSplit(n, SANS_OBLIQUE, L.body * 0.85, L.width - 2 * L.margin_x))
    top = L.height - L.margin_top - 10
    bottom = L.margin_bottom + 14
    head = []
    for line in t.head_lines:
        head.extend(simpleSplit(line, SANS, L.body * 0.9, L.width - 2 * L.margin_x))
    title_h = L.text * 1.35 * 1.3 + L.body * 1.2 * len(head) + 4
    header_h = L.head * 1.3 + L.body * 0.82 * 1.3 + 6
    notes_h = (len(note_lines) + 1) * L.body * 0.85 * 1.3 + 4
    avail_h = top - bottom - title_h - header_h - notes_h
    rpp = max(1, int(avail_h // L.row))
    if rpp >= 10:
        rpp -= rpp % 5
    return [tcols + g for g in groups], rpp, colw, markw, note_lines, head


def _shapes(cells):
    """One representative string per (length, minus count): enough to find the widest."""
    seen = {}
    for s in cells:
        k = (len(s), s.count(MINUS), s.count("."))
        if k not in seen:
            seen[k] = s
    return seen.values()


def table_pages(t, index: int, L: Layout, pages: list):
    groups, rpp, colw, markw, note_lines, head = plan_table(t, L)
    n = t.rows
    chunks = [(a, min(a + rpp, n)) for a in range(0, n, rpp)]
    widths = _Widths(SANS, L.body)
    cells_txt = [[_cell_text(s) for s in c.cells] for c in t.columns]
    cell_w = [widths.many(col) for col in cells_txt]
    left0 = L.margin_x
    full = L.width - 2 * L.margin_x
    top = L.height - L.margin_top - 10
    for ci, (a, b) in enumerate(chunks):
        for gi, g in enumerate(groups):
            page = Page("table")
            if ci == 0 and gi == 0:
                page.anchor = f"table{index}"
                page.ops.append(("anchor", f"table{index}"))
            ops = page.ops
            # spread the columns over the width, up to twice the least gap
            natural = markw + sum(colw[i] + L.gap for i in g)
            gap = L.gap + min(L.gap, max(0.0, (full - natural) / max(1, len(g))))
            tw = markw + sum(colw[i] + gap for i in g)
            x0 = left0 + (full - tw) / 2 if tw < full else left0
            y = top - L.text * 1.35
            part = []
            if len(chunks) > 1:
                part.append(f"rows {a + 1}-{b} of {n}")
            if len(groups) > 1:
                part.append(f"columns part {gi + 1} of {len(groups)}")
            if b < n or gi + 1 < len(groups):
                part.append("continued on the next page")
            ops.append(("t", SANS_BOLD, L.text * 1.35, left0, y,
                        _fit(f"Table {index}. {t.title}", SANS_BOLD, L.text * 1.35, full)))
            for line in head:
                y -= L.body * 1.2
                ops.append(("t", SANS, L.body * 0.9, left0, y, line))
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
            lines = list(note_lines)
            if part:
                lines.append(" · ".join(part))
            for line in lines:
                ny -= L.body * 0.85 * 1.3
                ops.append(("t", SANS_OBLIQUE, L.body * 0.85, left0, ny, line))
            pages.append(page)
    return len(chunks) * len(groups)


def _fit(text: str, font: str, size: float, width: float) -> str:
    if _w(text, font, size) <= width:
        return text
    while text and _w(text + "…", font, size) > width:
        text = text[:-1]
    return text + "…"


# ---------------------------------------------------------------- assembly
def plan(book):
    """All pages of the book as drawing operations, and the layout."""
    fonts.register()
    d = book.document
    L = layout_for(d.paper, d.orientation)
    contents = [("How to read these tables", "read"), ("Substances and compositions", "subs")]
    contents += [(sh.title, f"sheet{i}") for i, sh in enumerate(book.sheets, 1)]
    contents += [("Data sources", "sources"), ("Caution", "caution")]
    contents += [(f"Table {i}. {t.title}", f"table{i}") for i, t in enumerate(book.tables, 1)]
    grouped = d.chart_placement == "grouped" and any(t.charts for t in book.tables)
    if grouped:
        contents.append(("Charts", "charts"))
    contents += [(f"Appendix {chr(64 + i)}. {s.title}", f"appendix{i}") for i, s in enumerate(book.appendix, 1)]
    pages: list[Page] = []
    _front(book, L, pages, contents)
    for i, t in enumerate(book.tables, 1):
        table_pages(t, i, L, pages)
        if t.charts and not grouped:
            _chart_pages(t, L, pages)
    if grouped:
        first = len(pages)
        for t in book.tables:
            _chart_pages(t, L, pages)
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


def _chart_pages(t, L, pages):
    """One page per chart model, drawn by tablegen.book.charts."""
    for model in t.charts:
        page = Page("chart")
        page.ops.append(("chart", model))
        pages.append(page)


def render(book) -> bytes:
    """The PDF bytes of a book model."""
    L, pages = plan(book)
    anchors = {}
    for i, p in enumerate(pages, 1):
        for op in p.ops:
            if op[0] == "anchor":
                anchors.setdefault(op[1], i)
    d = book.document
    from reportlab import rl_config
    a85, rl_config.useA85 = rl_config.useA85, 0     # binary streams: smaller and faster
    try:
        return _render(book, L, pages, anchors, d)
    finally:
        rl_config.useA85 = a85


def _render(book, L, pages, anchors, d) -> bytes:
    buf = io.BytesIO()
    c = fonts.canvas(buf, pagesize=(L.width, L.height), initialFontName=SANS, initialFontSize=10,
                     pageCompression=1)
    c.setTitle(d.title)
    c.setAuthor(d.organisation or "")
    c.setSubject(f"{d.number} rev. {d.revision}, issued {d.issue_date}")
    c.setCreator(f"tablegen {book.versions['tablegen']}")
    c.setKeywords(f"fingerprint sha256:{book.fingerprint}")
    total = len(pages)
    for no, page in enumerate(pages, 1):
        _decorate(c, book, L, no, total)
        _draw_ops(c, page.ops, anchors, L)
        c.showPage()
    c.save()
    return buf.getvalue()


def _decorate(c, book, L: Layout, no: int, total: int):
    d = book.document
    left, right = L.margin_x, L.width - L.margin_x
    ytop = L.height - L.margin_top + 4
    size = L.text * 0.85
    c.setFont(SANS, size)
    c.setFillGray(0.0)
    c.drawString(left, ytop, _fit(d.title, SANS, size, (right - left) * 0.6))
    c.setFont(SANS_BOLD, size)
    c.drawRightString(right, ytop, f"{d.number}  Rev. {d.revision}")
    c.setLineWidth(0.5)
    c.line(left, ytop - 3, right, ytop - 3)
    yb = L.margin_bottom - 2
    c.line(left, yb + size + 1, right, yb + size + 1)
    c.setFont(SANS, size)
    c.drawString(left, yb - 1, f"{d.number} Rev. {d.revision} · issued {d.issue_date}")
    c.drawRightString(right, yb - 1, f"page {no} of {total}")
    fsize = size * 0.8
    c.setFont(MONO, fsize)
    c.drawString(left, yb - 1 - fsize * 1.45, f"tablegen {book.versions['tablegen']} · sha256 {book.fingerprint}")


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
        elif kind == "chart":
            from . import charts
            model = op[1]
            charts.draw_chart(c, model, L.margin_x, L.margin_bottom + 20, L.width - 2 * L.margin_x,
                              L.height - L.margin_top - L.margin_bottom - 50)
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


def page_count(book) -> int:
    """Pages the book will have (the plan without drawing)."""
    return len(plan(book)[1])
