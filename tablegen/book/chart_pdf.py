"""The chart's PDF renderer (reportlab): vector pages of finished chart models.

:func:`draw_chart` draws one model into a box of any reportlab canvas (a book page,
through ``book/pdf.py``); :func:`chart_pdf` makes a standalone PDF of chart pages.
Both lay out ``chart_data.ChartModel`` numbers through ``chart_compose``; nothing
here evaluates a substance.
"""

from __future__ import annotations

import numpy as np

from ..spec.chart import PAPERS
from .chart_compose import _compose, _Surface
from .chart_layout import INK


class _PdfSurface(_Surface):
    def __init__(self, canvas):
        from .fonts import MONO, SANS, SANS_BOLD, SANS_OBLIQUE, register
        register()
        self.c = canvas
        self.fonts = {"sans": SANS, "bold": SANS_BOLD, "oblique": SANS_OBLIQUE, "mono": MONO}

    def width(self, s, size, font="sans"):
        from reportlab.pdfbase.pdfmetrics import stringWidth
        return stringWidth(s, self.fonts[font], size)

    def polyline(self, pts, width, dash, rgb, clip=None):
        c = self.c
        pts = np.asarray(pts, float)
        if len(pts) < 2:
            return
        c.saveState()
        if clip is not None:
            p = c.beginPath()
            p.rect(*clip)
            c.clipPath(p, stroke=0, fill=0)
        c.setLineWidth(width)
        c.setStrokeColorRGB(*rgb)
        c.setLineJoin(1)
        c.setLineCap(0 if dash else 1)
        if dash:
            c.setDash(list(dash), 0)
        p = c.beginPath()
        p.moveTo(float(pts[0, 0]), float(pts[0, 1]))
        for x, y in pts[1:]:
            p.lineTo(float(x), float(y))
        c.drawPath(p, stroke=1, fill=0)
        c.restoreState()

    def polygon(self, pts, fill, stroke=None, width=0.0):
        c = self.c
        c.saveState()
        c.setFillColorRGB(*fill)
        if stroke is not None:
            c.setStrokeColorRGB(*stroke)
            c.setLineWidth(width)
        p = c.beginPath()
        p.moveTo(*pts[0])
        for q in pts[1:]:
            p.lineTo(*q)
        p.close()
        c.drawPath(p, stroke=1 if stroke is not None else 0, fill=1)
        c.restoreState()

    def circle(self, x, y, r, fill, stroke, width):
        c = self.c
        c.saveState()
        c.setFillColorRGB(*fill)
        c.setStrokeColorRGB(*stroke)
        c.setLineWidth(width)
        c.circle(x, y, r, stroke=1, fill=1)
        c.restoreState()

    def text(self, x, y, s, size, font="sans", align="left", angle=0.0, rgb=INK):
        c = self.c
        c.saveState()
        c.setFillColorRGB(*rgb)
        c.setFont(self.fonts[font], size)
        c.translate(x, y)
        if angle:
            c.rotate(angle)
        if align == "center":
            c.drawCentredString(0, 0, s)
        elif align == "right":
            c.drawRightString(0, 0, s)
        else:
            c.drawString(0, 0, s)
        c.restoreState()


def draw_chart(canvas, model, x: float, y: float, width: float, height: float,
               page_text: str = "", part: str = "whole") -> None:
    """Draw the chart as vector graphics into the box (points) of a reportlab canvas.

    The box holds the whole chart page design (title band, plot, reading panel,
    footer); a landscape A4 or A3 page box gives the intended proportions.
    ``part``: "whole"; or, for a model built with ``panel_page``, "plot" (title band
    and plot) and "panel" (title band and reading panel), two facing pages.
    """
    _compose(_PdfSurface(canvas), model, x, y, width, height, page_text, part)


def chart_pdf(models, *, title: str = "tablegen charts", date_text: str = "") -> bytes:
    """A PDF with one landscape page per chart model (reproducible bytes)."""
    import io

    from .. import __version__
    from . import fonts
    from .fonts import SANS, register
    register()
    buf = io.BytesIO()
    first = PAPERS[models[0].paper]
    c = fonts.canvas(buf, pagesize=first, initialFontName=SANS, initialFontSize=8, pageCompression=1)
    c.setTitle(title)
    c.setAuthor("tablegen")
    c.setCreator(f"tablegen {__version__}")
    c.setSubject("ideal-gas T-s and h-s charts")
    n = len(models)
    for i, m in enumerate(models):
        size = PAPERS[m.paper]
        c.setPageSize(size)
        page = f"page {i + 1} of {n}" + (f" · {date_text}" if date_text else "")
        draw_chart(c, m, 0.0, 0.0, size[0], size[1], page_text=page)
        c.showPage()
    c.save()
    return buf.getvalue()
