"""Imposition: the pages of an A5 book two to a side of A4 sheets, for a saddle-stitched booklet.

The page order is :func:`tablegen.book.pagination.saddle_stitch`; the pages are the PDF
writer's own (tablegen.book.pdf), drawn at their place on the sheet, so the booklet shows
exactly the A5 book's pages; the pages that pad the count to a multiple of four say that
they are intentionally blank.
"""

from __future__ import annotations

from . import pagination, pdf
from .pageflow import with_binary_streams
from .tablepages import blank_page


def render_booklet(book) -> bytes:
    """The book's pages imposed for a saddle-stitched booklet: two pages side by side on
    each side of a sheet twice the page's width (A5 pages on A4), in the order
    :func:`tablegen.book.pagination.saddle_stitch` gives; printed on both sides, flipped
    on the short edge, folded and stapled at the fold. Pages that pad the count to a
    multiple of four say that they are intentionally blank."""
    L, pages = pdf.plan(book)
    return with_binary_streams(_render_booklet, book, L, pages, pdf.anchors_of(pages))


def _render_booklet(book, L, pages, anchors) -> bytes:
    if L.paper == "A5" and L.width < L.height:
        sheet_w, sheet_h = pagination.PAPER_PT["A4"][1], pagination.PAPER_PT["A4"][0]    # A4 landscape
    else:
        sheet_w, sheet_h = 2 * L.width, L.height
    c, buf = pdf.new_canvas(book, (sheet_w, sheet_h))
    off = (sheet_w - 2 * L.width) / 2
    total = len(pages)
    head = pdf.running_head(book, L)
    pad = blank_page(L, "It completes the last sheet of the booklet.")
    for sides in pagination.saddle_stitch(total):
        for pair in sides:
            for slot, no in enumerate(pair):
                c.saveState()
                c.translate(off + slot * L.width, (sheet_h - L.height) / 2)
                if no is None:
                    pdf.draw_ops(c, pad, L)
                else:
                    pdf.draw_page(c, book, L, pages, no, anchors, head)
                c.restoreState()
            # fold marks at the spine, outside the pages' margins
            c.setLineWidth(0.4)
            c.setStrokeGray(0.5)
            c.line(sheet_w / 2, sheet_h, sheet_w / 2, sheet_h - 3 * pagination.MM)
            c.line(sheet_w / 2, 0, sheet_w / 2, 3 * pagination.MM)
            c.setStrokeGray(0.0)
            c.showPage()
    c.save()
    return buf.getvalue()
