"""The chart's PNG renderer (matplotlib, Agg): a finished chart model as a PNG page.

It lays out ``chart_data.ChartModel`` numbers through ``chart_compose``, the same
composer as the PDF pages, so both look the same; nothing here evaluates a substance.
"""

from __future__ import annotations

import numpy as np

from ..core.errors import TablegenError
from ..spec.chart import PAPERS
from .chart_compose import _compose, _Surface
from .chart_layout import INK

#: zlib level of the PNG files. A 300 dpi A4 chart, RGB (measured 2026-12-02): level 3
#: encodes in 0.14 s to 649 KiB, the default 6 in 0.18 s to 558 KiB (RGBA at 6, as before:
#: 0.23 s, 617 KiB); the pixels are the same at every level.
PNG_COMPRESS_LEVEL = 3


class _MplSurface(_Surface):
    def __init__(self, ax):
        from matplotlib.font_manager import FontProperties

        from .fonts import font_dir
        d = font_dir()
        self.ax = ax
        self.fp = {"sans": FontProperties(fname=str(d / "DejaVuSans.ttf")),
                   "bold": FontProperties(fname=str(d / "DejaVuSans-Bold.ttf")),
                   "oblique": FontProperties(fname=str(d / "DejaVuSans-Oblique.ttf")),
                   "mono": FontProperties(fname=str(d / "DejaVuSansMono.ttf"))}
        self.z = 0            # drawing order is stacking order, as on the PDF page

    def _z(self):
        self.z += 1
        return self.z

    def width(self, s, size, font="sans"):
        from reportlab.pdfbase.pdfmetrics import stringWidth

        from .fonts import MONO, SANS, SANS_BOLD, SANS_OBLIQUE, register
        register()
        names = {"sans": SANS, "bold": SANS_BOLD, "oblique": SANS_OBLIQUE, "mono": MONO}
        return stringWidth(s, names[font], size)

    def polyline(self, pts, width, dash, rgb, clip=None):
        from matplotlib.lines import Line2D
        from matplotlib.patches import Rectangle
        pts = np.asarray(pts, float)
        ln = Line2D(pts[:, 0], pts[:, 1], linewidth=width, color=rgb, solid_joinstyle="round",
                    solid_capstyle="round" if not dash else "butt", dash_capstyle="butt",
                    linestyle=(0, tuple(dash)) if dash else "-", antialiased=True, zorder=self._z())
        self.ax.add_line(ln)
        if clip is not None:
            r = Rectangle(clip[:2], clip[2], clip[3], transform=self.ax.transData)
            ln.set_clip_path(r)

    def polygon(self, pts, fill, stroke=None, width=0.0):
        from matplotlib.patches import Polygon
        self.ax.add_patch(Polygon(pts, closed=True, facecolor=fill,
                                  edgecolor=stroke if stroke is not None else "none",
                                  linewidth=width if stroke is not None else 0.0, zorder=self._z()))

    def circle(self, x, y, r, fill, stroke, width):
        from matplotlib.patches import Circle
        self.ax.add_patch(Circle((x, y), r, facecolor=fill, edgecolor=stroke, linewidth=width,
                                 zorder=self._z()))

    def text(self, x, y, s, size, font="sans", align="left", angle=0.0, rgb=INK):
        self.ax.text(x, y, s, fontproperties=self.fp[font], fontsize=size, ha=align, va="baseline",
                     rotation=angle, rotation_mode="anchor", color=rgb, zorder=self._z())


#: rcParams every chart PNG is drawn and saved under (dashes in points, no path
#: simplification, no TeX or mathtext, a fixed hash salt): the same bytes everywhere.
_RC = {"lines.scale_dashes": False, "path.simplify": False, "text.usetex": False,
       "svg.hashsalt": "tablegen", "text.parse_math": False}


class PngPages:
    """Chart PNGs drawn on one matplotlib figure per paper and dpi, reused between charts.

    Building a figure costs more than clearing one; a command that writes a T-s and an
    h-s PNG of the same paper draws both on the same figure. The figure's artists are
    removed after each page, so every page is drawn on an empty figure and its bytes are
    those of a figure of its own.
    """

    def __init__(self):
        self._figs = {}
        self._pool = None
        self._pending = []

    def close(self) -> None:
        """Finish the encodings still running and stop the worker thread (png_soon)."""
        if self._pool is not None:
            self._pool.shutdown(wait=True)
            self._pool = None

    def _figure(self, W: float, H: float, dpi: int):
        from matplotlib.backends.backend_agg import FigureCanvasAgg
        from matplotlib.figure import Figure

        key = (W, H, dpi)
        if key not in self._figs:
            fig = Figure(figsize=(W / 72.0, H / 72.0), dpi=dpi, facecolor="white")
            FigureCanvasAgg(fig)
            ax = fig.add_axes((0, 0, 1, 1))
            ax.set_xlim(0, W)
            ax.set_ylim(0, H)
            ax.set_axis_off()
            self._figs[key] = (fig, ax)
        return self._figs[key]

    def png(self, model, paper: str | None = None, dpi: int = 300) -> bytes:
        """The chart as a PNG page (landscape A4 or A3) at ``dpi``; reproducible bytes."""
        return _encode(*self._draw(model, paper, dpi))

    def png_soon(self, model, paper: str | None = None, dpi: int = 300):
        """Like :meth:`png`, but only the drawing is done now: the PNG encoding (a third of
        a chart's time, in zlib without Python's lock) runs on a worker thread while the
        next chart is drawn. Returns a function that waits for the bytes, which are those
        of :meth:`png`. At most two pages wait for their encoding (memory); call
        :meth:`close` when done."""
        from concurrent.futures import ThreadPoolExecutor
        image = self._draw(model, paper, dpi)
        if self._pool is None:
            self._pool = ThreadPoolExecutor(max_workers=1, thread_name_prefix="tablegen-png")
        self._pending = [f for f in self._pending if not f.done()]
        while len(self._pending) >= 2:
            self._pending.pop(0).result()
        future = self._pool.submit(_encode, *image)
        self._pending.append(future)
        return future.result

    def _draw(self, model, paper, dpi):
        """The page drawn and copied out of the figure: (RGB image, tEXt chunks, dpi)."""
        import matplotlib

        paper = (paper or model.paper).upper()
        if paper not in PAPERS:
            raise TablegenError(f"paper {paper!r} is not known; allowed: A4, A3")
        W, H = PAPERS[paper]
        with matplotlib.rc_context(_RC):
            fig, ax = self._figure(W, H, dpi)
            try:
                _compose(_MplSurface(ax), model, 0.0, 0.0, W, H, page_text="")
                rgb = _rgb(fig)
            finally:
                for artist in (*ax.lines, *ax.patches, *ax.texts):
                    artist.remove()
        return rgb, {"Title": model.title[:200], "Description": f"tablegen chart {model.fingerprint}"}, dpi


def _rgb(fig):
    """The drawn figure as an RGB image (the page is opaque white: an alpha channel would
    only add a constant byte per pixel to encode), a copy independent of the figure."""
    from PIL import Image

    fig.canvas.draw()
    w, h = fig.canvas.get_width_height(physical=True)
    return Image.frombuffer("RGBA", (w, h), fig.canvas.buffer_rgba(), "raw", "RGBA", 0, 1).convert("RGB")


def _encode(rgb, text: dict, dpi: int) -> bytes:
    """An RGB image as PNG bytes, with ``text`` as tEXt chunks and the resolution in pHYs;
    no time or software chunk, so the bytes are reproducible."""
    import io

    from PIL import PngImagePlugin
    info = PngImagePlugin.PngInfo()
    for k, v in text.items():
        info.add_text(k, v)
    buf = io.BytesIO()
    rgb.save(buf, format="png", pnginfo=info, dpi=(dpi, dpi), compress_level=PNG_COMPRESS_LEVEL)
    return buf.getvalue()


def chart_png(model, paper: str | None = None, dpi: int = 300) -> bytes:
    """The chart as a PNG page (landscape A4 or A3) at ``dpi``; reproducible bytes.

    One page on a figure of its own; :class:`PngPages` draws several on one figure.
    """
    return PngPages().png(model, paper, dpi)
