"""Compatibility: files written with the former names of the coefficient forms.

Before the forms were named in plain words, tablegen wrote a gasdata record's
polynomial form as ``form = "nasa7"`` or ``form = "nasa9"`` and read user card
files named ``*.nasa7`` and ``*.nasa9`` from a data folder. Files like that are
still read: the data reader (tablegen.data.library, tablegen.data.formats) maps
those names here, and nowhere else. Nothing tablegen writes or prints uses them;
the current names are ``7-coefficient`` / ``9-coefficient`` for the forms and
``tm-4513`` / ``tp-2002`` for the card layouts (docs/user-data.md).
"""

from __future__ import annotations

from ..thermo.polynomial import NINE, SEVEN

#: Former value of a record's ``form`` key -> the current name.
FORMS = {"nasa7": SEVEN, "nasa9": NINE}

#: Former file extensions of card files in a data folder -> the card layout.
EXTENSIONS = {".nasa7": "tm-4513", ".nasa9": "tp-2002"}


def form(name: str) -> str:
    """The current name of a form read from a file (unchanged if it is no former name)."""
    return FORMS.get(name, name)
