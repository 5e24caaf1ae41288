"""Embedded fonts for every PDF (the DejaVu TrueType faces that matplotlib ships) and its canvas.

They cover °, ·, ², ³, Greek letters and sub/superscript digits, so no new
dependency is needed; registering them with reportlab embeds subsets in the PDF.
Start canvases with ``initialFontName=SANS`` so no unembedded standard font is
referenced; :func:`canvas` makes one whose bytes depend on nothing but what is drawn.
"""

from __future__ import annotations

from functools import lru_cache
from pathlib import Path

SANS = "TG-Sans"
SANS_BOLD = "TG-Sans-Bold"
SANS_OBLIQUE = "TG-Sans-Oblique"
MONO = "TG-Mono"
CONDENSED = "TG-Condensed"
CONDENSED_BOLD = "TG-Condensed-Bold"

_FILES = {
    SANS: "DejaVuSans.ttf",
    SANS_BOLD: "DejaVuSans-Bold.ttf",
    SANS_OBLIQUE: "DejaVuSans-Oblique.ttf",
    MONO: "DejaVuSansMono.ttf",
}


def font_dir() -> Path:
    # Find matplotlib's data folder without importing matplotlib (a quarter of a
    # second that a PDF-only command need not pay).
    import importlib.util
    spec = importlib.util.find_spec("matplotlib")
    for loc in (spec.submodule_search_locations or []) if spec else []:
        d = Path(loc) / "mpl-data" / "fonts" / "ttf"
        if (d / _FILES[SANS]).is_file():
            return d
    import matplotlib
    return Path(matplotlib.get_data_path()) / "fonts" / "ttf"


@lru_cache(maxsize=None)
def register() -> dict:
    """Register the faces with reportlab once; returns name -> file path."""
    from reportlab.lib.fonts import addMapping
    from reportlab.pdfbase import pdfmetrics
    from reportlab.pdfbase.ttfonts import TTFont
    d = font_dir()
    out = {}
    for name, fname in _FILES.items():
        path = d / fname
        pdfmetrics.registerFont(TTFont(name, str(path)))
        out[name] = str(path)
    addMapping(SANS, 0, 0, SANS)
    addMapping(SANS, 1, 0, SANS_BOLD)
    addMapping(SANS, 0, 1, SANS_OBLIQUE)
    addMapping(SANS, 1, 1, SANS_BOLD)
    return out


def canvas(buf, **kw):
    """A reportlab canvas in invariant mode whose dates are fixed whatever the environment says.

    reportlab takes the document dates from SOURCE_DATE_EPOCH when it is set, even in
    invariant mode; same input must give the same bytes, so the variable is hidden from
    it while the document is made (the dates are reportlab's invariant 2000-01-01).
    """
    import os

    from reportlab.pdfgen.canvas import Canvas
    saved = os.environ.pop("SOURCE_DATE_EPOCH", None)
    try:
        return Canvas(buf, invariant=1, **kw)
    finally:
        if saved is not None:
            os.environ["SOURCE_DATE_EPOCH"] = saved
