"""User text that goes into documents: one line, nothing that changes how the line reads.

Refused: C0 and C1 control characters (tab, line feed, NEL U+0085, ...), DEL, the line
and paragraph separators U+2028 and U+2029, and the bidirectional controls
(U+061C, U+200E, U+200F, U+202A-U+202E, U+2066-U+2069), which can make a printed
title or a CSV cell read in another order than it is stored (Unicode Standard Annex #9).
"""

from __future__ import annotations

import unicodedata

_BIDI = frozenset("\u061c\u200e\u200f\u202a\u202b\u202c\u202d\u202e\u2066\u2067\u2068\u2069")


def bad_character(text: str) -> str | None:
    """The first character a one-line document text may not hold, as U+XXXX, or None."""
    for c in text:
        if c in _BIDI or unicodedata.category(c) in ("Cc", "Zl", "Zp"):
            return f"U+{ord(c):04X}"
    return None


def one_line_rule() -> str:
    return "must be one line of text without control, line-separator or direction-control characters"
