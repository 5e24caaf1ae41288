"""Text fitted to a width on the page: lines broken between words, and a word longer than
the line (a composition, a hash, a path) broken where it can be, so no text runs past a
margin; grid columns widened to their longest word where the others have room.

Widths are the embedded DejaVu faces' own (reportlab's font metrics).
"""

from __future__ import annotations

from reportlab.lib.utils import simpleSplit as _split_words
from reportlab.pdfbase.pdfmetrics import stringWidth

from .fonts import MONO, SANS, SANS_BOLD


def _w(text: str, font: str, size: float) -> float:
    return stringWidth(text, font, size)


#: An upper bound of a DejaVu glyph's advance, em (the widest, W and the dashes, are about 1.0).
_EM_MAX = 1.25


def _longest_word(texts, font: str, size: float) -> float:
    """Width of the widest word of some texts, measuring only words that could be the widest."""
    words = sorted({w for t in texts for w in str(t).split()}, key=len, reverse=True)
    best = 0.0
    for w in words:
        if len(w) * size * _EM_MAX <= best:
            break
        best = max(best, _w(w, font, size))
    return best


def simpleSplit(text: str, font: str, size: float, width: float) -> list[str]:
    """Lines of text within a width: broken between words, and a word longer than the
    width (a composition, a hash, a path) after a comma, semicolon, slash or '=' where
    it can be, else between characters, so no line runs past the margin."""
    longest = max((len(w) for w in text.split()), default=0)
    if longest * size * _EM_MAX <= width:          # no word can be wider than the line: words suffice
        return _split_words(text, font, size, width)
    out = []
    for line in _split_words(text, font, size, width):
        while _w(line, font, size) > width and len(line) > 1:
            cut = len(line) - 1
            while cut > 1 and _w(line[:cut], font, size) > width:
                cut -= 1
            soft = max(line.rfind(ch, 0, cut) for ch in ",;/=")
            if soft > 0 and _w(line[:soft + 1], font, size) <= width:
                cut = soft + 1
            out.append(line[:cut])
            line = line[cut:]
        out.append(line)
    return out


def fit_columns(widths, header, rows, size, pad, mono_cols=()) -> list:
    """Column widths of a grid, widened where a column's longest word (its header in bold)
    would not fit, taken from the columns with room to spare, so words are not broken in a
    narrow column on small paper. The widths as given where the words cannot all fit."""
    need = []
    for j in range(len(widths)):
        font = MONO if j in mono_cols else SANS
        longest = max(_longest_word([header[j]] if j < len(header) else [], SANS_BOLD, size),
                      _longest_word([r[j] for r in rows if j < len(r)], font, size))
        need.append(min(longest + 2 * pad + 0.5, 0.45 * sum(widths)))
    short = sum(max(0.0, n - w) for n, w in zip(need, widths))
    spare = sum(max(0.0, w - n) for n, w in zip(need, widths))
    if short <= 0 or short > spare:
        return widths
    k = short / spare
    return [n if n > w else w - (w - n) * k for n, w in zip(need, widths)]


# ---------------------------------------------------------------- front matter
