"""Page geometry and the page-planning rules of a table book, without a drawing library.

What a technical publisher decides before any page is drawn: the paper and its
margins (every printed mark stays inside them, running heads included), the type
sizes, how many rows go on a page (rows per page a multiple of five; no
continuation page with fewer than :data:`MIN_ROWS` rows: the last two pages share
the rows instead), how the columns of a table too wide for one page are split
into balanced parts, and the page order of a saddle-stitched booklet.

The PDF writer (:mod:`tablegen.book.pdf`) lays the pages out by these rules; the
table model uses :func:`chart_box` so that chart labels are placed for the box
the chart is drawn in.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

MM = 72.0 / 25.4                 # points per millimetre (as reportlab.lib.units.mm)

#: Paper sizes, portrait, points (ISO 216 A sizes; US Letter 8.5 in x 11 in).
PAPER_PT = {"A4": (210 * MM, 297 * MM), "Letter": (612.0, 792.0), "A3": (297 * MM, 420 * MM),
            "A5": (148 * MM, 210 * MM)}

#: Fewest rows a continuation page of a table may hold (two groups of five).
MIN_ROWS = 10
#: Rows are grouped in fives (a light rule after each fifth row).
ROW_GROUP = 5
#: Smallest type on a page of the small paper (A5), points: figures, notes, chart text.
MIN_TEXT_SMALL_PT = 6.5


@dataclass(frozen=True, slots=True)
class Layout:
    """Geometry and type sizes of one edition's pages, points.

    ``margin_x``, ``margin_top`` and ``margin_bottom`` bound every printed mark:
    the running head and foot sit inside them, the body (``body_top`` to
    ``body_bottom``) between those.
    """

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
    run: float = 7.65    # running head and foot, pt
    compact: bool = False     # heading lines and notes once per table (small paper)
    two_sided: bool = False   # column parts and split charts on facing pages
    head_lines: int = 1       # lines of the running head

    @property
    def head_y(self) -> float:
        """Baseline of the (first) running-head line."""
        return self.height - self.margin_top - self.run

    @property
    def body_top(self) -> float:
        return self.head_y - (self.head_lines - 1) * self.run * 1.2 - 3.0 - 8.0

    @property
    def foot_small(self) -> float:
        """Size of the foot's fingerprint line."""
        return max(self.run * 0.8, MIN_TEXT_SMALL_PT) if self.paper == "A5" else self.run * 0.8

    @property
    def foot_y(self) -> float:
        """Baseline of the foot's first line (document, page x of y); the fingerprint line is below."""
        return self.margin_bottom + self.foot_small * 0.3 + self.foot_small * 1.45

    @property
    def body_bottom(self) -> float:
        return self.foot_y + self.run + 1.0 + 6.0

    @property
    def live_width(self) -> float:
        return self.width - 2 * self.margin_x


def layout_for(paper: str, orientation: str = "portrait", font_size: float | None = None,
               two_sided: bool = False) -> Layout:
    """The layout of a paper: margins and type sizes; ``font_size`` sets the table figures
    (every other size follows in proportion)."""
    paper = {"A5-pocket": "A5"}.get(paper, paper)
    w, h = PAPER_PT[paper]
    if orientation == "landscape":
        w, h = h, w
    if paper == "A5":
        # field use: the compact running layout, a row pitch with room for a pencil mark
        L = Layout(paper, w, h, 10 * MM, 9 * MM, 8 * MM, 8.5, 11.0, 9.0, 8.2, 8.5, 0, run=7.5, compact=True)
    elif paper == "A3":
        L = Layout(paper, w, h, 20 * MM, 15 * MM, 13 * MM, 9.0, 11.6, 9.5, 10.0, 14.0, 0, run=8.5)
    else:
        L = Layout(paper, w, h, 15 * MM, 12 * MM, 10 * MM, 7.6, 9.8, 8.2, 9.0, 11.0, 0, run=7.65)
    if font_size is not None:
        k = font_size / L.body
        L = replace(L, body=font_size, row=L.row * k, head=L.head * k, text=L.text * max(1.0, k),
                    gap=L.gap * k)
    return replace(L, two_sided=bool(two_sided))


def chart_box(L: Layout) -> tuple[float, float, float, float]:
    """(x, y, width, height) of the box a chart page is drawn in."""
    return (L.margin_x, L.body_bottom, L.live_width, L.body_top - L.body_bottom)


def chart_on_two_pages(L: Layout) -> bool:
    """Small paper: the chart on one page, its reading panel on the facing page."""
    return L.paper == "A5"


# ---------------------------------------------------------------- rows per page
def _down(n: int) -> int:
    """n rounded down to whole groups of five (at least one group)."""
    return max(ROW_GROUP, n - n % ROW_GROUP) if n >= ROW_GROUP else max(1, n)


def row_chunks(n: int, first: int, middle: int, last: int, single: int,
               min_rows: int = MIN_ROWS) -> list[tuple[int, int]]:
    """Row ranges [a, b) of the pages of a table of ``n`` rows.

    ``first``, ``middle`` and ``last`` are the rows the first, a middle and the last
    page hold (the first page may carry the table's heading lines, the last its
    notes); ``single`` the rows of a table on one page. Every page but the last
    holds whole groups of five, as many as fit; the last page holds at least
    ``min_rows`` rows: where it would hold fewer, the last two pages share their rows
    (the earlier one a whole number of groups of five, as near half as that allows),
    and where that is not enough, earlier pages give up groups of five too.
    """
    if n <= 0:
        return [(0, 0)]
    if n <= single:
        return [(0, n)]
    sizes = [_down(first)]
    while n - sum(sizes) > last:
        sizes.append(_down(middle))
    rest = n - sum(sizes)            # the last page's rows (<= 0: the page before cannot be the last)
    # balance the last two pages
    r = sizes[-1] + rest
    floor = ROW_GROUP if len(sizes) == 1 else min_rows
    share = min(sizes[-1], _up(math.ceil(r / 2)))
    while r - share < min_rows and share - ROW_GROUP >= floor:
        share -= ROW_GROUP
    if r - share > last:
        share = min(sizes[-1], _up(r - last))
    if 1 <= r - share <= last and share >= 1:
        sizes[-1], rest = share, r - share
    # still short: earlier pages give up groups of five, the latest first
    i = len(sizes) - 2
    while rest < min_rows and i >= 0:
        floor = ROW_GROUP if i == 0 else min_rows
        if sizes[i] - ROW_GROUP >= floor and rest + ROW_GROUP <= last:
            sizes[i] -= ROW_GROUP
            rest += ROW_GROUP
        else:
            i -= 1
    while rest < 1:                  # capacities too small for the rules: keep every row, in order
        k = max(range(len(sizes)), key=lambda j: sizes[j])
        sizes[k] -= 1
        rest += 1
    sizes.append(rest)
    out, a = [], 0
    for k in sizes:
        out.append((a, a + k))
        a += k
    return out


def _up(n: int) -> int:
    return n if n % ROW_GROUP == 0 else n + ROW_GROUP - n % ROW_GROUP


# ---------------------------------------------------------------- column parts
def column_parts(widths: list[float], base: float, avail: float, max_columns: int = 0,
                 counts: list[int] | None = None, even: bool = False) -> list[list[int]]:
    """Split column units (a property in one or both unit systems) into pages.

    ``widths`` of the units in print order, ``base`` the width every part repeats
    (the temperature columns), ``avail`` the page width, ``max_columns`` the most
    property columns a page takes (0: no limit), ``counts`` the columns per unit.
    The fewest parts that fit are used, made as equal in width as the units allow
    (the widest part as narrow as it can be); ``even``: a two-sided edition, where
    parts face each other in pairs, takes an even number of parts when it needs
    more than one. Returns the unit indices of each part.
    """
    m = len(widths)
    if m == 0:
        return [[]]
    counts = counts or [1] * m

    def fits(i, j):          # units i..j-1 on one page
        return base + sum(widths[i:j]) <= avail + 1e-9 and \
            (not max_columns or sum(counts[i:j]) <= max_columns)

    # fewest parts: greedy fill (a unit wider than the page goes alone)
    k, i = 0, 0
    while i < m:
        j = i + 1
        while j < m and fits(i, j + 1):
            j += 1
        k, i = k + 1, j
    if even and k > 1 and k % 2:
        k += 1
    k = min(k, m)
    # balanced: the partition into k contiguous parts whose widest part is narrowest
    INF = float("inf")
    best = [[INF] * (m + 1) for _ in range(k + 1)]
    cut = [[0] * (m + 1) for _ in range(k + 1)]
    best[0][0] = 0.0
    pre = [0.0]
    for w in widths:
        pre.append(pre[-1] + w)
    for p in range(1, k + 1):
        for j in range(p, m + 1):
            for i in range(p - 1, j):
                if best[p - 1][i] == INF:
                    continue
                if not fits(i, j) and j - i > 1:
                    continue
                v = max(best[p - 1][i], base + pre[j] - pre[i])
                if v < best[p][j] - 1e-9:
                    best[p][j], cut[p][j] = v, i
    parts, j = [], m
    for p in range(k, 0, -1):
        i = cut[p][j]
        parts.append(list(range(i, j)))
        j = i
    return parts[::-1]


# ---------------------------------------------------------------- booklets
def saddle_stitch(pages: int) -> list[tuple[tuple, tuple]]:
    """Sheets of a saddle-stitched booklet of ``pages`` pages, 2 up.

    Returns per sheet ((front left, front right), (back left, back right)) as page
    numbers from 1, or None for a blank page padding the count to a multiple of
    four. Sheet k (from 0) of a booklet of N = 4 s pages carries N - 2k and 2k + 1
    on its front and 2k + 2 and N - 2k - 1 on its back, so the stacked, folded
    sheets read 1, 2, ..., N.
    """
    N = 4 * max(1, math.ceil(pages / 4))

    def page(p):
        return p if p <= pages else None
    return [((page(N - 2 * k), page(2 * k + 1)), (page(2 * k + 2), page(N - 2 * k - 1)))
            for k in range(N // 4)]
