"""Compositions typed as text, read the way a gas analysis is written.

One reader for every place a composition is typed: ``state``, ``process``,
``chart``, ``export`` and ``compare`` substances, ``combust --fuel`` and
``--oxidant``, the parts of ``flue@...`` names and the string substances of
specs. The form::

    CH4=0.9,C2H6=0.06,N2=0.04          mole fractions, summing to 1
    CH4=90%,C2H6=6%,N2=4%              percentages, summing to 100 %
    basis=mass,CH4=0.8,N2=0.2          mass fractions (the basis word comes first)

``NAME=amount`` pairs separated by commas, the same pairs a spec writes as
``mixture = { CH4 = 0.9, ... }``. Either every amount carries ``%`` or none
does; a list of bare numbers summing to 100 is refused (a percentage carries its
sign). Percentages are read by moving the decimal point, so ``CH4=90%`` gives the
same double as ``CH4=0.9``. Mole basis unless ``basis=mass`` (or
``basis=mole``) opens the list. Species names may contain commas (NASA names such
as ``C3H6,propylene``): a name runs from one comma to the next ``=``.

A base word followed by conditions (``air,rh=60%,T=25C``) is an oxidant, read
by tablegen.calc.burn; its first part has no ``=``, which tells it from a composition.

The older form with ``:`` between name and fraction is refused with one line
that spells the same composition in this form.

This module is text only: no thermodynamics, no library look-ups.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from decimal import Decimal, InvalidOperation

from .errors import InputError, NameLookupError, RangeError

#: Fractions (or percentages / 100) that sum to 1 within this are accepted and
#: normalised; others are refused. Also used by tablegen.thermo.build.
SUM_TOLERANCE = 1e-6
BASES = ("mole", "mass")
#: The basis word opens the list: basis=mass,CH4=0.8,N2=0.2
BASIS_KEY = "basis"

_NUMBER = re.compile(r"^[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?$")


@dataclass(frozen=True, slots=True)
class Composition:
    """A composition as typed.

    Attributes
    ----------
    fractions : name as typed -> fraction (a percentage divided by 100), in the
        order given; they sum to 1 within SUM_TOLERANCE (not yet normalised)
    basis : "mole" or "mass"
    percent : whether the amounts were given in %
    text : the text as typed, stripped
    uncertainty : name -> expanded uncertainty U (k = 2) of its fraction, for the
        parts written ``NAME=amount±U`` (only where the reader allows it)
    """

    fractions: dict
    basis: str
    percent: bool
    text: str
    uncertainty: dict = None

    def __post_init__(self):
        if self.uncertainty is None:
            object.__setattr__(self, "uncertainty", {})


def looks_like(text: str) -> bool:
    """Whether ``text`` is meant as a composition (new form, or the refused ':' form)."""
    t = str(text)
    return "=" in t or colon_form_fix(t) is not None


#: Separators of a value and its expanded uncertainty: CH4=87%±0.5% (or the ASCII +-).
PLUS_MINUS = ("±", "+-")


def parse(text: str, what: str = "composition", *, uncertainty: bool = False) -> Composition:
    """Read ``NAME=fraction,...`` or ``NAME=percent%,...``, optionally after ``basis=mass,``.

    Parameters
    ----------
    text : the composition text
    what : what the text is, for messages ("fuel", "mixture", "oxidant")
    uncertainty : accept ``NAME=amount±U``: the expanded uncertainty (k = 2) of that
        part, written as the amount is (``CH4=87%±0.5%``, ``CH4=0.87±0.005``); the
        ASCII ``+-`` is read as ``±``. Without it, a ``±`` is refused.

    Returns
    -------
    Composition

    Raises
    ------
    TablegenError with one line naming what was wrong and what is allowed; for
    the ':' form, the same composition written in this form.
    """
    t = str(text).strip()
    if not t:
        raise InputError(f"{what} is empty; give NAME=fraction pairs, e.g. CH4=0.9,N2=0.1")
    fix = colon_form_fix(t)
    if fix is not None:
        raise InputError(f"{what} {t!r} uses ':' between name and fraction; write {fix}")
    head, colon, rest = t.partition(":")
    if colon and head.strip().lower() in BASES and "=" in rest:
        raise InputError(f"{what} {t!r}: the basis is written {BASIS_KEY}={head.strip().lower()} as the "
                         f"first part; write {BASIS_KEY}={head.strip().lower()},{rest.strip()}")
    if colon:
        raise InputError(f"{what} {t!r}: ':' has no place in a composition; write NAME=fraction pairs "
                         f"separated by commas, e.g. CH4=0.9,N2=0.1 (mass fractions: basis=mass,CH4=0.8,N2=0.2)")
    pairs = split_pairs(t, what)
    basis = "mole"
    if pairs and pairs[0][0].lower() == BASIS_KEY:
        basis = pairs[0][1].strip().lower()
        if basis not in BASES:
            raise NameLookupError(f"{what} {t!r}: basis {pairs[0][1]!r} is not known; allowed: basis=mole, basis=mass")
        pairs = pairs[1:]
    if not pairs:
        raise InputError(f"{what} {t!r}: no components; give NAME=fraction pairs, e.g. CH4=0.9,N2=0.1")
    for k, _ in pairs:
        if k.lower() == BASIS_KEY:
            raise InputError(f"{what} {t!r}: the basis comes first, e.g. basis=mass,CH4=0.8,N2=0.2")
    pairs, unc_text = _split_uncertainty(pairs, t, what, uncertainty)
    with_pct = [v.endswith("%") for _, v in pairs]
    if any(with_pct) and not all(with_pct):
        bare = next(k for (k, _), p in zip(pairs, with_pct) if not p)
        raise InputError(f"{what} {t!r}: give every part in % or none; {bare} has no '%'")
    percent = all(with_pct)
    fr: dict = {}
    for k, v in pairs:
        if k in fr:
            raise InputError(f"{what} {t!r}: {k!r} is given twice")
        fr[k] = _amount(v[:-1] if percent else v, percent, k, t, what)
    unc = {}
    for k, u in unc_text.items():
        if u.endswith("%") != percent:
            a = dict(pairs)[k]
            if percent:
                form = f"{k}={a}±{u}%"
            else:
                try:
                    form = f"{k}={a}±{float(u[:-1]) / 100:g}"
                except ValueError:
                    form = f"{k}={a}±0.005"
            raise InputError(f"{what} {t!r}: the uncertainty of {k} is written as its amount is "
                             f"({'with' if percent else 'without'} '%'); write {form}")
        unc[k] = _amount(u[:-1] if percent else u, percent, f"the uncertainty of {k}", t, what)
    total = sum(fr.values())
    as_percent = ",".join(f"{k}={v}%" for k, v in pairs)
    if not percent and abs(total - 100.0) <= 100.0 * SUM_TOLERANCE:
        raise InputError(f"{what} {t!r}: the fractions sum to 100; a percentage carries its sign: "
                         f"write {as_percent}")
    if abs(total - 1.0) > SUM_TOLERANCE:
        given = f"{total * 100:.9g} %" if percent else f"{total:.9g}"
        want = "100 %" if percent else "1"
        hint = f" (percentages carry the sign: {as_percent})" if not percent and total > 1.5 else ""
        raise InputError(f"{what} {t!r}: the parts sum to {given}; they must sum to {want} "
                         f"within {SUM_TOLERANCE:g} (relative){hint}")
    return Composition(fractions=fr, basis=basis, percent=percent, text=t, uncertainty=unc)


def _split_uncertainty(pairs, t: str, what: str, allowed: bool):
    """[(name, '87%±0.5%')] -> [(name, '87%')], {name: '0.5%'}; ± refused unless allowed."""
    out, unc = [], {}
    for k, v in pairs:
        sep = next((m for m in PLUS_MINUS if m in v), None)
        if sep is None:
            out.append((k, v))
            continue
        if not allowed:
            raise InputError(f"{what} {t!r}: '±' (an uncertainty) is read only in fuel analyses "
                             f"(combust --fuel, a spec's fuel, flue@ names); remove ±{v.split(sep, 1)[1].strip()} "
                             f"from {k} (a mixture in a spec states it as fraction_uncertainty)")
        a, _, u = (x.strip() for x in v.partition(sep))
        if not a or not u or any(m in u for m in PLUS_MINUS):
            raise InputError(f"{what} {t!r}: {k}={v} is not NAME=amount±uncertainty; write e.g. "
                             f"CH4=87%±0.5% or CH4=0.87±0.005")
        out.append((k, a))
        unc[k] = u
    return out, unc


def split_pairs(text: str, what: str = "composition") -> list[tuple[str, str]]:
    """'A=1,B,C=2,D=3' -> [('A', '1'), ('B,C', '2'), ('D', '3')]: a name runs to its '='.

    Values hold no comma, so each comma after a value starts the next name;
    names may hold commas. Blank names or values are refused.
    """
    pieces = text.split("=")
    if len(pieces) < 2:
        raise InputError(f"{what} {text!r}: each part is NAME=fraction, e.g. CH4=0.9,N2=0.1")
    names, values = [pieces[0]], []
    for mid in pieces[1:-1]:
        value, sep, name = mid.partition(",")
        if not sep:
            raise InputError(f"{what} {text!r}: parts are separated by commas, e.g. CH4=0.9,N2=0.1")
        values.append(value)
        names.append(name)
    last = pieces[-1]
    if "," in last:
        value, _, rest = last.partition(",")
        raise InputError(f"{what} {text!r}: {rest.strip()!r} has no '=' and no value; "
                         f"each part is NAME=fraction, e.g. CH4=0.9,N2=0.1")
    values.append(last)
    out = []
    for n, v in zip(names, values):
        n, v = n.strip(), v.strip()
        if not n:
            raise InputError(f"{what} {text!r}: a part has no name before '='; write NAME=fraction")
        if not v:
            raise InputError(f"{what} {text!r}: {n!r} has no value after '='; write {n}=fraction")
        out.append((n, v))
    return out


def _amount(v: str, percent: bool, name: str, text: str, what: str) -> float:
    s = v.strip()
    if not _NUMBER.match(s):
        raise InputError(f"{what} {text!r}: the amount of {name}, {v!r}, is not a number; "
                         f"write e.g. {name}=0.9 or {name}=90%")
    try:
        d = Decimal(s)
    except InvalidOperation:                       # pragma: no cover (the pattern above is stricter)
        raise InputError(f"{what} {text!r}: the amount of {name}, {v!r}, is not a number") from None
    x = float(d.scaleb(-2)) if percent else float(d)   # moving the point is exact
    if not math.isfinite(x) or x < 0:
        raise RangeError(f"{what} {text!r}: the amount of {name} is {v}{'%' if percent else ''}; "
                         f"amounts must be finite and >= 0")
    return x


def write(fractions: dict, *, basis: str = "mole", percent: bool = False, digits: int | None = None) -> str:
    """The text of a composition: {'CH4': 0.9, 'N2': 0.1} -> 'CH4=0.9,N2=0.1'.

    ``percent`` writes the values as given with a '%' sign; ``digits`` rounds to
    that many significant digits (default: the shortest text that reads back as
    the same double).
    """
    parts = [f"{k}={_num_text(v, digits)}{'%' if percent else ''}" for k, v in fractions.items()]
    head = "" if basis == "mole" else f"{BASIS_KEY}={basis},"
    return head + ",".join(parts)


def _num_text(v: float, digits: int | None) -> str:
    if digits is not None:
        return f"{float(v):.{digits}g}"
    r = repr(float(v))
    return r[:-2] if r.endswith(".0") else r


_COLON_PART = re.compile(r"^\s*([^:=,][^:=]*?)\s*:\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(%?)\s*$")


def colon_form_fix(text: str) -> str | None:
    """The new spelling of a composition typed in the refused ':' form, else None.

    Each part NAME, colon, number becomes NAME=number, and NAME=number% when the
    numbers sum to 100 (the ':' form allowed bare percentages); tests/test_composition.py
    has the cases.
    """
    t = str(text).strip()
    if ":" not in t or "=" in t:
        return None
    parts = [_COLON_PART.match(p) for p in t.split(",")]
    if not parts or not all(parts):
        return None
    names = [m.group(1) for m in parts]
    values = [m.group(2) for m in parts]
    pct = any(m.group(3) for m in parts)
    try:
        total = sum(float(v) for v in values)
    except ValueError:                             # pragma: no cover (the pattern only admits numbers)
        return None
    if not pct and abs(total - 100.0) <= 100.0 * SUM_TOLERANCE:
        pct = True
    return ",".join(f"{n}={v}{'%' if pct else ''}" for n, v in zip(names, values))
