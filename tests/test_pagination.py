"""The page rules of tablegen.book.pagination, checked as rules (hypothesis draws the cases)
and against brute force: rows per page, balanced column parts, the running head.

The rules are those docs/spec.md states for "The PDF"; they are common practice of printed
reference tables (rows in groups of five, no near-empty continuation page, column parts of
about equal width).
"""

from __future__ import annotations

import itertools
from types import SimpleNamespace

from hypothesis import assume, given
from hypothesis import strategies as st

from tablegen.book.pagination import MIN_ROWS, column_parts, layout_for, row_chunks


@given(n=st.integers(15, 2000), first=st.integers(15, 80), extra=st.integers(0, 10), notes=st.integers(0, 10))
def test_rows_per_page_follow_the_rules(n, first, extra, notes):
    """Pages of 15 to 90 rows and notes of up to 10 lines, the last page holding 15 or more
    (every paper and figure size tablegen prints: about 20 rows on A5 at 14 pt, 60 on A4)."""
    middle = first + extra
    last = middle - notes
    assume(last >= 15)
    single = first - notes
    chunks = row_chunks(n, first, middle, last, single)
    assert chunks[0][0] == 0 and chunks[-1][1] == n
    assert all(a1 == b0 for (_, b0), (a1, _) in zip(chunks, chunks[1:]))        # contiguous, in order
    sizes = [b - a for a, b in chunks]
    assert all(s >= 1 for s in sizes)
    if len(chunks) == 1:
        assert n <= max(single, first)
        return
    assert all(s % 5 == 0 for s in sizes[:-1])                                   # whole groups of five
    assert sizes[0] <= first and all(s <= middle for s in sizes[1:-1])           # each fits its page
    assert sizes[-1] <= last
    assert min(sizes[1:]) >= MIN_ROWS                                            # no near-empty continuation page


@given(n=st.integers(1, 300), first=st.integers(1, 30), middle=st.integers(1, 30), notes=st.integers(0, 30))
def test_rows_per_page_keep_every_row_whatever_the_capacities(n, first, middle, notes):
    chunks = row_chunks(n, first, middle, max(1, middle - notes), max(1, first - notes))
    assert chunks[0][0] == 0 and chunks[-1][1] == n
    assert all(a1 == b0 and b1 > a1 for (_, b0), (a1, b1) in zip(chunks, chunks[1:]))


def test_a_lone_last_row_is_shared_with_the_page_before():
    # 176 rows, 35 to a page: 35 x 5 = 175 would leave one row alone on page 6
    chunks = row_chunks(176, 35, 35, 35, 35)
    sizes = [b - a for a, b in chunks]
    assert sum(sizes) == 176 and sizes[-1] >= MIN_ROWS and sizes[:4] == [35, 35, 35, 35]
    assert sizes[-2:] == [20, 16]


def _brute(widths, base, avail, k):
    """The narrowest widest part over every split of the units into k contiguous parts."""
    m = len(widths)
    best = None
    for cuts in itertools.combinations(range(1, m), k - 1):
        bounds = [0, *cuts, m]
        w = max(base + sum(widths[a:b]) for a, b in zip(bounds, bounds[1:]))
        if best is None or w < best:
            best = w
    return best


@given(widths=st.lists(st.floats(20, 90), min_size=1, max_size=9), base=st.floats(20, 60),
       even=st.booleans())
def test_column_parts_are_the_fewest_and_balanced(widths, base, even):
    avail = 300.0
    parts = column_parts(widths, base, avail, even=even)
    assert [i for p in parts for i in p] == list(range(len(widths)))             # every unit, in order
    assert all(p for p in parts)
    for p in parts:
        assert base + sum(widths[i] for i in p) <= avail + 1e-9 or len(p) == 1   # each part fits the page
    # the fewest parts that fit (one more in a two-sided edition, to make pairs)
    fewest = next(k for k in range(1, len(widths) + 1)
                  if _brute(widths, base, avail, k) <= avail + 1e-9 or k == len(widths))
    want = min(len(widths), fewest + 1 if even and fewest > 1 and fewest % 2 else fewest)
    assert len(parts) == want
    widest = max(base + sum(widths[i] for i in p) for p in parts)
    assert abs(widest - _brute(widths, base, avail, len(parts))) < 1e-6          # as equal as the units allow


def test_the_demo_air_table_case_is_balanced():
    # T repeated (40 pt) and six property columns of 45 pt and three of 30 pt, 300 pt wide pages:
    # greedily 5 + 4 columns; balanced the two parts differ by at most one column's width
    widths = [45.0] * 6 + [30.0] * 3
    parts = column_parts(widths, 40.0, 300.0)
    w = [sum(widths[i] for i in p) for p in parts]
    assert len(parts) == 2 and max(w) - min(w) <= 45.0


def _book(title, number="KFH-PT-0107", paper="A5"):
    doc = SimpleNamespace(title=title, number=number, revision="C", issue_date="2026-10-14", paper=paper,
                          orientation="portrait")
    return SimpleNamespace(document=doc, edition=None)


def test_running_head_is_shortened_by_rule_never_cut():
    from tablegen.book.pdf import running_head
    from tablegen.book.textflow import text_width
    from tablegen.book.fonts import SANS, register
    register()
    L = layout_for("A5")
    short = "Kestrel Fen: tables"
    assert running_head(_book(short), L) == [short]
    long = ("Harrowmere Community Heat Cooperative, Kestrel Fen heat station: gas property tables "
            "for the shift engineers of the boiler house")
    assert running_head(_book(long), L) == ["Harrowmere Community Heat Cooperative, Kestrel Fen heat station"]
    no_break = ("Harrowmere Community Heat Cooperative Kestrel Fen heat station gas property tables "
                "for the shift engineers")
    lines = running_head(_book(no_break), L)
    assert len(lines) == 2 and " ".join(lines) == no_break                     # wrapped, every word kept
    room = L.live_width - text_width("KFH-PT-0107  Rev. C", "TG-Sans-Bold", L.run)
    assert all(text_width(x, SANS, L.run) < room for x in lines)


# ---------------------------------------------------------------- the page-flow engine
@given(heights=st.lists(st.floats(0.5, 900.0), min_size=1, max_size=60))
def test_page_flow_breaks_where_a_block_does_not_fit_and_only_there(heights):
    """Blocks in order down pages of a 700 pt body. Common practice of page make-up: a block
    goes to a new page when it does not fit, unless the page is still empty, so a block taller
    than a page stands alone instead of being pushed on for ever."""
    from tablegen.book.pageflow import PageFlow
    top, bottom = 760.0, 60.0
    f = PageFlow(top, bottom)
    for k, h in enumerate(heights):
        f.add(h, (k, h))
    placed = [blk for page in f.pages for _, blk in page]
    assert [k for k, _ in placed] == list(range(len(heights)))          # every block, in order
    for n, page in enumerate(f.pages):
        assert page, n                                                  # no empty page
        y0, (k0, h0) = page[0]
        assert abs(y0 - top) < 1e-9                                     # each page starts at the top
        for (y, (k, h)), nxt in zip(page, page[1:] + [None]):
            assert y - h >= bottom - 1e-9 or len(page) == 1, (n, k)     # only a lone block overruns
            if nxt is not None:
                assert abs(nxt[0] - (y - h)) < 1e-9                     # stacked without gaps
        if n + 1 < len(f.pages):                                        # broken only where it had to be
            y_last, (k, h) = page[-1]
            assert y_last - h - f.pages[n + 1][0][1][1] < bottom


def test_a_heading_is_kept_with_what_follows_and_a_table_head_repeats():
    from tablegen.book.pageflow import PageFlow
    f = PageFlow(760.0, 60.0)
    f.add(650.0, "text")                      # 50 pt left on the page
    f.keep_with_next(20.0, 40.0)              # a heading of 20 pt and the first 40 pt after it
    f.add(20.0, "heading")
    assert [b for _, b in f.pages[1]] == ["heading"]
    assert not f.turn_if_short(600.0)         # a row that fits: same page
    f.add(600.0, "row")
    assert f.turn_if_short(200.0) and len(f.pages) == 3 and abs(f.y - 760.0) < 1e-9


def test_the_book_and_the_qa_report_flow_on_the_one_engine():
    """Each document's running blocks are placed by tablegen.book.pageflow (issue: one
    page-flow engine)."""
    from tablegen.book.fonts import register
    from tablegen.book.pageflow import PageFlow
    from tablegen.book.qa_layout import BOTTOM, TOP, report_flow
    from tablegen.book.textflow import Flow
    register()
    L = layout_for("A4")
    book = Flow(L, [], "front")
    report = report_flow()
    assert isinstance(book, PageFlow) and isinstance(report, PageFlow)
    assert max(abs(book.top - L.body_top), abs(book.bottom - L.body_bottom), abs(report.top - TOP),
               abs(report.bottom - BOTTOM)) < 1e-9
    book.space(book.y - book.bottom - L.text)    # a line's height left: the heading goes on
    book.heading("Caution", anchor="caution")
    assert len(book.pages) == 2 and ("anchor", "caution") in book.pages[1].ops


def test_a_qa_report_heading_never_ends_a_page():
    # a heading with room for itself but not for two lines after it goes to the next page
    from tablegen.book.qa_layout import BOTTOM, HEADING_KEEP, heading, paragraph, report_flow
    flow = report_flow()
    paragraph(flow, "first page text")
    flow.y = BOTTOM + 24 + HEADING_KEEP / 2
    heading(flow, "Statistics")
    assert len(flow.pages) == 2 and len(flow.pages[1]) == 1
    # with room for both it stays
    flow = report_flow()
    paragraph(flow, "first page text")
    flow.y = BOTTOM + 24 + HEADING_KEEP + 1
    heading(flow, "Statistics")
    assert len(flow.pages) == 1
