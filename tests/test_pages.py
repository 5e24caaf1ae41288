"""Every page of the demo book in its four editions (A4 desk, A5 pocket, US Letter, A3 wall),
read back as a reader and a printer would.

Text positions and sizes are read from the PDF with pypdf (tests/pdf_pages.py: the content
stream walked with pypdf's parser, glyph advances from each font's own /Widths). The rules
checked are the page rules docs/spec.md states ("The PDF", "Editions"); where a rule is a
publishing convention it says so:

* every text run lies inside the page's margins (running heads included);
* no table page after the first holds fewer than ten rows, and all but a table's last page
  hold whole groups of five (common practice of printed reference tables);
* in the two-sided pocket edition, column part 1 of every row range is on an even (left-hand)
  page and part 2 on the page after it (the facing right-hand page), and so on for parts 3
  and 4; pages left blank say so (common practice: "intentionally left blank");
* on A5 no text is smaller than 6.5 pt, charts included, and a full table page holds at
  least 32 rows of figures of at least 8 pt;
* the contents list every table and chart with the page it starts on;
* the A4 booklet of the pocket edition holds ceil(pages / 4) sheets, two pages a side, in
  the order a saddle-stitched stack of folded sheets is read (computed here by walking the
  stack, independently of the code's formula), padded with pages that say they are blank.
"""

from __future__ import annotations

import math
import re

import pytest
from pypdf import PdfReader

from pdf_pages import parse_table_pages, text_runs
from tablegen.book.pagination import layout_for

EDITIONS = {"desk": ("A4", "portrait"), "pocket": ("A5", "portrait"), "letter": ("Letter", "portrait"),
            "wall": ("A3", "landscape")}
#: fewest rows on a table page after the first (docs/spec.md)
MIN_ROWS = 10


@pytest.fixture(scope="module")
def books(demo_book):
    """Per edition: (layout, reader, text runs per page, text per page, table pages)."""
    out = {}
    for name, (paper, orientation) in EDITIONS.items():
        reader = PdfReader(str(demo_book / f"kestrel-fen-{name}.pdf"))
        texts = [p.extract_text() for p in reader.pages]
        out[name] = (layout_for(paper, orientation), reader, [text_runs(p) for p in reader.pages], texts,
                     parse_table_pages(reader, texts))
    return out


@pytest.mark.parametrize("edition", list(EDITIONS))
def test_every_text_run_lies_inside_the_margins(books, edition):
    L, reader, runs, _, _ = books[edition]
    assert abs(float(reader.pages[0].mediabox.width) - L.width) < 0.01
    eps = 0.01
    for no, page in enumerate(runs, 1):
        assert page, no
        for r in page:
            assert r.x0 >= L.margin_x - eps and r.x1 <= L.width - L.margin_x + eps, (edition, no, r)
            assert r.y0 >= L.margin_bottom - eps and r.y1 <= L.height - L.margin_top + eps, (edition, no, r)


def test_the_margin_check_sees_text_past_the_margin(tmp_path):
    """The reader above catches a run that crosses the margin (a check that can fail)."""
    from reportlab.pdfgen.canvas import Canvas

    from tablegen.book import fonts
    fonts.register()
    p = tmp_path / "x.pdf"
    c = Canvas(str(p), pagesize=(420, 595), initialFontName=fonts.SANS)
    c.setFont(fonts.SANS, 10)
    c.drawRightString(400, 300, "right end at 400 pt")
    c.drawString(30, 200, "from 30 pt")
    c.save()
    runs = text_runs(PdfReader(str(p)).pages[0])
    ends = {r.text: (r.x0, r.x1) for r in runs}
    assert ends["right end at 400 pt"][1] == pytest.approx(400.0, abs=0.01)
    assert ends["from 30 pt"][0] == pytest.approx(30.0, abs=0.01)
    assert ends["from 30 pt"][1] > 30 + 40


@pytest.mark.parametrize("edition", list(EDITIONS))
def test_no_table_page_holds_fewer_than_the_minimum_rows(books, edition):
    pages = books[edition][4]
    sizes = {}
    for no, p in enumerate(pages, 1):
        if p is None:
            continue
        m = re.search(r"rows (\d+)-(\d+) of (\d+)", p[4])
        a, b, n = (int(x) for x in m.groups()) if m else (1, len(p[2]), len(p[2]))
        assert len(p[2]) == b - a + 1, (edition, no)
        sizes.setdefault(p[0], {})[a] = (b - a + 1, n)
    for table, ranges in sizes.items():
        counts = [ranges[a][0] for a in sorted(ranges)]
        assert sum(counts) == ranges[min(ranges)][1]
        assert all(c % 5 == 0 for c in counts[:-1]), (edition, table, counts)
        if len(counts) > 1:
            assert min(counts[1:]) >= MIN_ROWS, (edition, table, counts)


def _parts(texts):
    """(page number, table, first row, part, parts) of every table page in column parts."""
    out = []
    for no, text in enumerate(texts, 1):
        t = re.search(r"^Table (\d+)\. ", text, re.M)
        part = re.search(r"columns part (\d+) of (\d+)", text)
        if t and part:
            rows = re.search(r"rows (\d+)-\d+ of \d+", text)
            out.append((no, int(t.group(1)), int(rows.group(1)) if rows else 1, int(part.group(1)),
                        int(part.group(2))))
    return out


def test_pocket_column_parts_face_each_other(books):
    texts = books["pocket"][3]
    parts = _parts(texts)
    assert any(n == 2 for *_, n in parts) and any(n == 4 for *_, n in parts)    # the demo splits tables
    at = {(t, a, k): no for no, t, a, k, _ in parts}
    for no, t, a, k, n in parts:
        if k % 2 == 1:
            assert no % 2 == 0, (no, t, a, k)                      # odd parts on left-hand pages
            assert at[(t, a, k + 1)] == no + 1                     # the next part faces it
    # pages left blank say so (and nothing else but the running head and foot); the
    # how-to-read page says why they are there
    for no, text in enumerate(texts, 1):
        if "intentionally left blank" in text:
            assert len(text.strip().split("\n")) <= 7, no
    assert any("left blank and says so" in " ".join(text.split()) for text in texts[:6])


def test_a_left_hand_page_is_made_by_a_blank_verso_that_says_so():
    from tablegen.book.tablepages import to_left_page
    from tablegen.book.textflow import Page
    L = layout_for("A5", two_sided=True)
    pages = [Page("front") for _ in range(2)]
    to_left_page(pages, L, "The parts of Table 9 face each other.")
    assert len(pages) == 3 and pages[2].kind == "blank"         # so the next page, 4, is a left-hand page
    to_left_page(pages, L, "why")
    assert len(pages) == 3                                      # already there
    texts = [op[-1] for op in pages[2].ops if op[0] == "c"]
    assert texts[0] == "This page is intentionally left blank." and "The parts of Table 9 face each other." in texts
    one = [Page("front") for _ in range(2)]
    to_left_page(one, layout_for("A5", two_sided=False), "why")
    assert len(one) == 2                                        # one-sided: no blank pages


def test_desk_edition_is_one_sided(books):
    texts = books["desk"][3]
    assert not any("intentionally left blank" in t for t in texts)


@pytest.mark.parametrize("edition", ["pocket"])
def test_small_paper_text_is_legible_and_a_page_holds_32_rows(books, edition):
    L, reader, runs, texts, pages = books[edition]
    for no, page in enumerate(runs, 1):
        for r in page:
            assert r.size >= 6.5 - 1e-6, (no, r)
    charts = [no for no, t in enumerate(texts, 1) if "chart fingerprint" in t]
    assert len(charts) >= 4                                        # charts are among the pages checked
    # every page of a table but its last holds 32 rows or more, unless it shares the last rows
    # with the last page (fewer than 2 x 32 rows from its first to the table's end)
    full = 0
    for no, p in enumerate(pages, 1):
        m = re.search(r"rows (\d+)-(\d+) of (\d+)", p[4]) if p is not None else None
        if not m or m.group(2) == m.group(3) or int(m.group(3)) - int(m.group(1)) + 1 < 64:
            continue
        full += 1
        assert len(p[2]) >= 32, (no, len(p[2]))
        figures = [r.size for r in runs[no - 1] if re.fullmatch(r"[−\d.]+", r.text)]
        assert figures and min(figures) >= 8.0
    assert full >= 2


@pytest.mark.parametrize("edition", list(EDITIONS))
def test_contents_list_every_table_and_chart_page(books, edition):
    texts = books[edition][3]
    holding = [text for text in texts[:3] if re.search(r"^Contents$", text, re.M)]
    assert len(holding) == 1                                     # the contents are kept on one page
    block = holding[0].split("\nContents\n", 1)[1]
    lines = [ln.strip() for ln in block.split("\n") if ln.strip()]
    entries, cur = {}, ""
    for ln in lines:
        cur = f"{cur} {ln}".strip() if cur else ln
        m = re.match(r"^((?:Table \d+\.|Chart \d+\.\d+\.).*?)\s+(\d+)$", cur)
        if m:
            entries[m.group(1)] = int(m.group(2))
            cur = ""
        elif re.search(r"\s\d+$", cur) or "page " in cur:
            cur = ""
    tables = sorted({int(m.group(1)) for t in texts for m in re.finditer(r"^Table (\d+)\. ", t, re.M)})
    listed = {int(re.match(r"Table (\d+)", k).group(1)): v for k, v in entries.items() if k.startswith("Table")}
    assert sorted(listed) == tables
    table_pages = books[edition][4]
    for t, page in listed.items():
        first = next(no for no, p in enumerate(table_pages, 1) if p is not None and p[0] == t)
        assert page == first, (edition, t)
    chart_pages = [no for no, text in enumerate(texts, 1) if re.search(r"\((T-s|h-s)\) chart", text)]
    charts = {k: v for k, v in entries.items() if k.startswith("Chart")}
    assert len(charts) == len({no for no in chart_pages if "How to read" not in texts[no - 1]
                               or "specific entropy" in texts[no - 1]})
    for title, page in charts.items():
        kind = "T-s" if "T-s chart" in title else "h-s"
        assert f"({kind}) chart" in texts[page - 1] and "specific entropy" in texts[page - 1], (title, page)


@pytest.mark.parametrize("edition", list(EDITIONS))
def test_running_head_is_whole_and_headings_keep_with_what_follows(books, edition):
    L, _, runs, _, _ = books[edition]
    title = "Kestrel Fen Heat Station: gas property tables"
    for no, page in enumerate(runs, 1):
        head = [r.text for r in page if r.y0 > L.body_top]
        assert head and (head[0] == title or title.startswith(head[0])) and "…" not in head[0], (no, head)
        body = [r for r in page if L.body_bottom < r.y0 < L.body_top and r.x1 - r.x0 > r.y1 - r.y0]
        if not body:
            continue
        last = min(body, key=lambda r: r.y0)
        heading = "Bold" in last.font and last.size >= L.text * 1.1
        assert not heading, (edition, no, last.text)            # no heading alone at the foot of a page


def _reading_order(pages: int) -> list[tuple[int, int, int]]:
    """(sheet, side, slot) of booklet pages 1..N, by walking a stack of nested folded sheets:
    the outer half of each sheet's front right and back left going in, then the back right
    and front left of each sheet coming out. side 0 = front, slot 0 = left."""
    sheets = math.ceil(pages / 4)
    order = []
    for k in range(sheets):
        order += [(k, 0, 1), (k, 1, 0)]
    for k in reversed(range(sheets)):
        order += [(k, 1, 1), (k, 0, 0)]
    return order


def test_pocket_booklet_is_in_saddle_stitch_order(demo_book, books):
    L, reader = books["pocket"][:2]
    n = len(reader.pages)
    booklet = PdfReader(str(demo_book / "kestrel-fen-pocket-booklet.pdf"))
    sheets = math.ceil(n / 4)
    assert len(booklet.pages) == 2 * sheets                        # two sides per sheet
    w, h = float(booklet.pages[0].mediabox.width), float(booklet.pages[0].mediabox.height)
    assert (round(w / 72 * 25.4), round(h / 72 * 25.4)) == (297, 210)     # A4 landscape (ISO 216)
    expected = {}
    for page, (k, side, slot) in enumerate(_reading_order(n), 1):
        expected[(2 * k + side, slot)] = page
    mid = w / 2
    for i, p in enumerate(booklet.pages):
        runs = text_runs(p)
        for slot in (0, 1):
            half = [r.text for r in runs if (r.x0 < mid) == (slot == 0)]
            numbers = [int(m.group(1)) for t in half for m in [re.fullmatch(rf"page (\d+) of {n}", t)] if m]
            want = expected[(i, slot)]
            if want <= n:
                assert numbers == [want], (i, slot, numbers, want)
            else:
                assert not numbers and any("intentionally left blank" in t for t in half), (i, slot)
