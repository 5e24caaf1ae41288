"""Chemical formulas as typed: ``CO2``, ``C3H8``, ``CH1.8O0.5N0.01`` -> element counts.

One reader for every place a formula is typed: ``tablegen fit --formula`` (any
element, each once) and the formula of a condensed fuel (only the elements that
burn, a repeated element adds up, as in ``CH3CH2OH``). No thermodynamics: the
molar mass is the caller's, from its atomic weights.
"""

from __future__ import annotations

import re

from .errors import InputError, RangeError

#: One term of a formula: an element symbol and an optional count (fractional counts
#: allowed, for a pseudo-species or a fuel's ultimate formula).
_TERM = re.compile(r"([A-Z][a-z]?)(\d+(?:\.\d*)?|\.\d+)?")

#: What a formula looks like, for the message that refuses one.
FORMULA_EXAMPLE = "element symbols with counts, e.g. CO2, C3H8 or C1.02H3.9O0.1"


def parse_formula(text: str, what: str = "formula", *, elements=None, add_repeats: bool = False,
                  example: str = FORMULA_EXAMPLE) -> dict:
    """Element counts of a formula: 'CO2' -> {'C': 1, 'O': 2}, 'CH1.8' -> {'C': 1, 'H': 1.8}.

    Parameters
    ----------
    text : the formula as typed; surrounding blanks are ignored
    what : where it was typed, the start of every message (e.g. ``--formula``)
    elements : the elements allowed, in the order the message lists them (None: any symbol)
    add_repeats : a repeated element adds up (``CH3CH2OH``); otherwise it is refused
    example : the text after "write" in the message that refuses a non-formula

    Returns
    -------
    dict : element -> count, in the order written; a whole count is an int.

    Raises
    ------
    InputError for text that is not element symbols with counts, an element not
    allowed, or an element given twice (unless ``add_repeats``); RangeError for a
    count of zero.
    """
    t = str(text).strip()
    terms = list(_TERM.finditer(t))
    if not t or "".join(m.group(0) for m in terms) != t:
        raise InputError(f"{what} {text!r} is not a formula; write {example}")
    out: dict = {}
    for m in terms:
        el, x = m.group(1), float(m.group(2)) if m.group(2) else 1.0
        if elements is not None and el not in elements:
            raise InputError(f"{what} {text!r}: element {el} is not handled; allowed: {', '.join(elements)}")
        if el in out and not add_repeats:
            raise InputError(f"{what} {text!r}: element {el} is given twice")
        if x <= 0:
            raise RangeError(f"{what} {text!r}: count of {el} must be positive")
        x = out.get(el, 0) + x
        out[el] = int(x) if x == int(x) else x
    return out
