"""The page-flow engine of the documents: blocks stacked down pages, page breaks, page x of y.

Both PDF documents place their blocks with it: the table book's running text
(:class:`tablegen.book.textflow.Flow`, front matter and appendix) and the QA report
(:mod:`tablegen.book.qa_layout`). The engine knows a cursor between the top and
the bottom of the body and the rules of breaking: a block that does not fit goes
to a new page unless the page is still empty (a block taller than a page is never
pushed on forever); a heading is kept with what follows it; a ruled table's head
is repeated where its rows run onto a new page. What a page holds is the
document's own: the engine only appends to it and asks whether it holds anything.
Drawing the planned pages, each with its running head and "page x of y", is
:func:`draw_pages`.
"""

from __future__ import annotations


class PageFlow:
    """A cursor moving down pages from ``top`` to ``bottom`` (points from the foot of the page).

    Parameters
    ----------
    top, bottom : float
        The body of every page: the first block starts at ``top``, none reaches below ``bottom``.
    pages : list, optional
        The list the pages are appended to (a book's earlier pages may be there already).
    make_page : callable, optional
        A new, empty page: anything with ``append`` and ``len`` (a list of blocks by default).
    """

    def __init__(self, top: float, bottom: float, pages: list | None = None, make_page=list):
        self.top, self.bottom = top, bottom
        self.pages = [] if pages is None else pages
        self.make_page = make_page
        self.page = None
        self.y = top
        self.new_page()

    def new_page(self):
        """Start a new page; the cursor goes to its top."""
        self.page = self.make_page()
        self.pages.append(self.page)
        self.y = self.top

    def started(self) -> bool:
        """Whether this page holds anything yet: the cursor has left its top (by more than a
        point: rounding) or a block is on it."""
        return self.y < self.top - 1 or len(self.page) > 0

    def fits(self, h: float) -> bool:
        """Whether ``h`` points fit above the bottom of this page."""
        return self.y - h >= self.bottom

    def need(self, h: float):
        """Room for ``h`` points: a new page where they do not fit on a started one."""
        if not self.fits(h) and self.started():
            self.new_page()

    def keep_with_next(self, h: float, following: float):
        """A heading (or a table's head) of ``h`` points kept on one page with the first
        ``following`` points of what comes after it."""
        self.need(h + following)

    def turn_if_short(self, h: float) -> bool:
        """Inside a ruled table: a new page where the next row of ``h`` points does not fit
        (the page has the table's head on it already). True when the page was turned, so the
        caller repeats the head."""
        if self.fits(h):
            return False
        self.new_page()
        return True

    def space(self, h: float):
        """Move the cursor down ``h`` points."""
        self.y -= h

    def add(self, h: float, block):
        """A block ``h`` points tall at the cursor, on a new page where it does not fit: the
        page gets ``(y_top, block)``."""
        self.need(h)
        self.page.append((self.y, block))
        self.y -= h


def page_of(no: int, total: int) -> str:
    """The foot's page number: "page x of y"."""
    return f"page {no} of {total}"


def draw_pages(c, pages: list, draw_page):
    """Every planned page onto the canvas ``c``: ``draw_page(c, no, total)`` draws page ``no``
    (from 1) of ``total``, running head and foot included; then the page is shown."""
    total = len(pages)
    for no in range(1, total + 1):
        draw_page(c, no, total)
        c.showPage()


def with_binary_streams(fn, *args):
    """fn(*args) with reportlab writing binary page streams."""
    from reportlab import rl_config
    a85, rl_config.useA85 = rl_config.useA85, 0     # binary streams: smaller and faster
    try:
        return fn(*args)
    finally:
        rl_config.useA85 = a85
