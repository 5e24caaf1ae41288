"""Reading a book's PDF back as a reader would: where each text run is, how large, and the
table pages with their rows.

Positions come from pypdf. pypdf's text visitor (``extract_text(visitor_text=...)``)
gives each run's start and size but joins the runs of one line into one call, so it
cannot give each run's extent; :func:`text_runs` therefore walks the page's content
stream with pypdf's own parser (``pypdf.generic.ContentStream``) and applies the PDF
text model (ISO 32000-1:2008, 9.4: the text matrix, Tf, Tm, Td, TD, T*, TL, Tj, TJ,
and the graphics state's cm, q, Q), with each glyph's advance from the font's own
``/Widths`` array and its height from the font descriptor's ``/Ascent`` and
``/Descent``: a measure taken from the PDF, not from the code that wrote it.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from pypdf.generic import ContentStream


@dataclass(frozen=True)
class Run:
    """One shown string: its corners on the page (points), size (pt), font and text."""

    x0: float
    y0: float
    x1: float
    y1: float
    size: float
    font: str
    text: str


def _mul(a, b):
    """Product of two PDF matrices [a b c d e f] (a applied first)."""
    return [a[0] * b[0] + a[1] * b[2], a[0] * b[1] + a[1] * b[3],
            a[2] * b[0] + a[3] * b[2], a[2] * b[1] + a[3] * b[3],
            a[4] * b[0] + a[5] * b[2] + b[4], a[4] * b[1] + a[5] * b[3] + b[5]]


class _Font:
    def __init__(self, obj):
        obj = obj.get_object()
        self.name = str(obj.get("/BaseFont", ""))
        self.first = int(obj.get("/FirstChar", 0))
        self.widths = [float(w) for w in obj.get("/Widths", [])]
        desc = obj.get("/FontDescriptor")
        desc = desc.get_object() if desc is not None else {}
        self.ascent = float(desc.get("/Ascent", 800)) / 1000.0
        self.descent = float(desc.get("/Descent", -200)) / 1000.0
        self.to_unicode = _cmap(obj)

    def advance(self, codes: bytes) -> float:
        """Width of the string in text space units per unit font size."""
        out = 0.0
        for c in codes:
            i = c - self.first
            out += (self.widths[i] if 0 <= i < len(self.widths) else 0.0) / 1000.0
        return out

    def text(self, codes: bytes) -> str:
        return "".join(self.to_unicode.get(c, "?") for c in codes)


def _cmap(font) -> dict:
    """Single-byte ToUnicode map of a font (the bfchar/bfrange entries reportlab writes)."""
    tu = font.get("/ToUnicode")
    if tu is None:
        return {}
    data = tu.get_object().get_data().decode("latin-1")
    out = {}
    for block in re.findall(r"beginbfchar(.*?)endbfchar", data, re.S):
        for src, dst in re.findall(r"<([0-9A-Fa-f]+)>\s*<([0-9A-Fa-f]+)>", block):
            out[int(src, 16)] = bytes.fromhex(dst).decode("utf-16-be")
    for block in re.findall(r"beginbfrange(.*?)endbfrange", data, re.S):
        for a, b, dst in re.findall(r"<([0-9A-Fa-f]+)>\s*<([0-9A-Fa-f]+)>\s*<([0-9A-Fa-f]+)>", block):
            base = int(dst, 16)
            for k, c in enumerate(range(int(a, 16), int(b, 16) + 1)):
                out[c] = chr(base + k)
    return out


def text_runs(page) -> list[Run]:
    """Every string shown on a page, with the bounding box of its glyphs (page space)."""
    res = page.get("/Resources", {})
    res = res.get_object() if hasattr(res, "get_object") else res
    fonts = {}
    fdict = res.get("/Font", {}) if res else {}
    for k, v in (fdict.get_object() if hasattr(fdict, "get_object") else fdict).items():
        fonts[k] = _Font(v)
    content = page.get_contents()
    if content is None:
        return []
    ops = ContentStream(content, page.pdf).operations
    ctm, stack = [1.0, 0, 0, 1.0, 0, 0], []
    tm = tlm = [1.0, 0, 0, 1.0, 0, 0]
    font, size, leading = None, 0.0, 0.0
    out = []

    def show(codes: bytes):
        nonlocal tm
        if font is None:
            return
        w = font.advance(codes) * size
        m = _mul(tm, ctm)
        pts = [(x, y) for x in (0.0, w) for y in (font.descent * size, font.ascent * size)]
        xs = [m[0] * x + m[2] * y + m[4] for x, y in pts]
        ys = [m[1] * x + m[3] * y + m[5] for x, y in pts]
        eff = size * (m[2] ** 2 + m[3] ** 2) ** 0.5
        out.append(Run(min(xs), min(ys), max(xs), max(ys), eff, font.name, font.text(codes)))
        tm = _mul([1, 0, 0, 1, w, 0], tm)

    for operands, op in ops:
        if op == b"q":
            stack.append(ctm)
        elif op == b"Q":
            ctm = stack.pop() if stack else ctm
        elif op == b"cm":
            ctm = _mul([float(x) for x in operands], ctm)
        elif op == b"BT":
            tm = tlm = [1.0, 0, 0, 1.0, 0, 0]
        elif op == b"Tf":
            font, size = fonts.get(operands[0]), float(operands[1])
        elif op == b"TL":
            leading = float(operands[0])
        elif op == b"Tm":
            tm = tlm = [float(x) for x in operands]
        elif op in (b"Td", b"TD"):
            if op == b"TD":
                leading = -float(operands[1])
            tm = tlm = _mul([1, 0, 0, 1, float(operands[0]), float(operands[1])], tlm)
        elif op == b"T*":
            tm = tlm = _mul([1, 0, 0, 1, 0, -leading], tlm)
        elif op == b"Tj":
            show(bytes(operands[0].original_bytes if hasattr(operands[0], "original_bytes") else operands[0]))
        elif op == b"'":
            tm = tlm = _mul([1, 0, 0, 1, 0, -leading], tlm)
            show(bytes(operands[0].original_bytes if hasattr(operands[0], "original_bytes") else operands[0]))
        elif op == b"TJ":
            for item in operands[0]:
                if isinstance(item, (int, float)) or type(item).__name__ in ("FloatObject", "NumberObject"):
                    tm = _mul([1, 0, 0, 1, -float(item) / 1000.0 * size, 0], tm)
                else:
                    show(bytes(item.original_bytes if hasattr(item, "original_bytes") else item))
    return [r for r in out if r.text.strip()]


# ---------------------------------------------------------------- table pages
NUM = re.compile(r"^\u2212?\d+(\.\d+)?(e[+\u2212]\d+)?$")


def parse_table_pages(reader, texts=None):
    """Table pages: (table number, header pairs, rows of tokens, marks, text) per page, None
    for other pages. ``texts``: the pages' extracted text, when the caller has it already.

    A table page has its title line ("Table N. ...") and a column header starting with T;
    on small paper the heading lines (substance, datum) are on the first page of a table only."""
    pages = []
    for text in (texts if texts is not None else (p.extract_text() for p in reader.pages)):
        lines = [ln.strip() for ln in text.split("\n")]
        title = next((j for j, ln in enumerate(lines) if re.match(r"Table \d+\. ", ln)), None)
        start = next((j for j in range(title + 1, len(lines)) if lines[j] == "T"), None) if title is not None \
            else None
        if start is None:
            pages.append(None)
            continue
        number = int(re.match(r"Table (\d+)\. ", lines[title]).group(1))
        rows, header, marks = [], [], []
        j = start
        while j < len(lines):
            toks = lines[j].split()
            mark = ""
            if toks and re.fullmatch(r"[*xc]+", toks[0]):     # row marks (how-to-read page)
                mark, toks = toks[0], toks[1:]
            if toks and all(NUM.match(t) for t in toks) and len(toks) >= 2 and header:
                rows.append(toks)
                marks.append(mark)
            elif not rows:
                header.append(lines[j])
            else:
                break
            j += 1
        pairs = list(zip(header[0::2], header[1::2]))
        pages.append((number, pairs, rows, marks, text))
    return pages
