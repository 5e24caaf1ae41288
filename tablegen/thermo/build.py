"""Making substances from library records: a species, or a collapsed mixture."""

from __future__ import annotations

import math

from ..core.composition import SUM_TOLERANCE, write
from ..core.errors import DataError, InputError, NameLookupError, RangeError, TablegenError
from .polynomial import combine
from .substance import Component, Substance


def species_substance(rec) -> Substance:
    return Substance(
        id=rec.id, name=rec.name, kind="species", M=rec.M, poly=rec.poly,
        components=(Component(rec.id, 1.0, 1.0, rec.M, rec.dataset),),
        sources=((rec.id, rec.dataset, rec.source_text),),
    )


def normalise(fractions: dict, what: str = "composition") -> dict:
    """Check and normalise fractions: finite, >= 0, summing to 1 within 1e-6."""
    if not fractions:
        raise InputError(f"{what}: no components given; give at least one species with its fraction")
    out = {}
    for k, v in fractions.items():
        try:
            x = float(v)
        except (TypeError, ValueError):
            raise InputError(f"{what}: fraction of {k!r} is not a number ({v!r})") from None
        if not math.isfinite(x) or x < 0:
            raise RangeError(f"{what}: fraction of {k!r} is {v!r}; fractions must be finite and >= 0")
        out[k] = x
    total = sum(out.values())
    if abs(total - 1.0) > SUM_TOLERANCE:
        raise InputError(f"{what}: fractions sum to {total:.9g}; they must sum to 1 within {SUM_TOLERANCE:g}")
    return {k: v / total for k, v in out.items()}


def mixture_substance(records_fractions, basis: str = "mole", *, id: str | None = None,
                      name: str | None = None, what: str = "mixture") -> Substance:
    """Collapse records with mole or mass fractions into one substance.

    Parameters
    ----------
    records_fractions : list of (Record, fraction)
    basis : "mole" or "mass"
    """
    if basis not in ("mole", "mass"):
        raise NameLookupError(f"{what}: basis {basis!r} is not known; allowed: mole, mass")
    seen = {}
    for rec, _ in records_fractions:
        if rec.id in seen:
            raise InputError(f"{what}: species {rec.id!r} is given twice")
        seen[rec.id] = rec
    fr = normalise({rec.id: x for rec, x in records_fractions}, what)
    recs = [(seen[k], x) for k, x in fr.items() if x > 0]
    if not recs:
        raise InputError(f"{what}: every fraction is zero")
    if basis == "mass":
        n = {r.id: w / r.M for r, w in recs}
        tot = sum(n.values())
        y = {k: v / tot for k, v in n.items()}
    else:
        y = dict((r.id, x) for r, x in recs)
    M = sum(y[r.id] * r.M for r, _ in recs)
    mix_s = -sum(v * math.log(v) for v in y.values() if v > 0)
    try:
        poly = combine([r.poly for r, _ in recs], [y[r.id] for r, _ in recs], extra_s=mix_s)
    except TablegenError as e:
        raise DataError(f"{what}: {e}") from None
    comps = tuple(Component(r.id, y[r.id], y[r.id] * r.M / M, r.M, r.dataset) for r, _ in recs)
    if id is None:
        id = write({c.id: c.mole_fraction for c in comps})
    return Substance(
        id=id, name=name or id, kind="mixture", M=M, poly=poly, components=comps,
        sources=tuple((r.id, r.dataset, r.source_text) for r, _ in recs),
        mixing_entropy_R=mix_s,
    )
