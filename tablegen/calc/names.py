"""Public API: substances by name, mixtures by composition.

    >>> import tablegen
    >>> gas = tablegen.substance("CO2")
    >>> mix = tablegen.mixture({"CO2": 0.09, "H2O": 0.18, "N2": 0.71, "O2": 0.02})
    >>> p = mix.properties([300.0, 1000.0])      # SI, mass basis
"""

from __future__ import annotations

from ..core import composition
from ..data.library import library
from ..data.records import norm_name
from ..data.mixtures import shipped_mixtures
from ..core.errors import InputError, NameLookupError
from ..thermo.build import mixture_substance, species_substance
from ..thermo.substance import Anchor, Datum, Substance, use_uncertainty_columns


def _uncertainty_columns(substance, T, P=None):
    from .uncertainty import uncertainty_columns  # the calc layer, loaded on first use
    return uncertainty_columns(substance, T, P)


#: properties(uncertainty=True) takes its U columns from the budget, registered here, where the
#: public API is assembled (thermo never imports the calc layer above it).
use_uncertainty_columns(_uncertainty_columns)

__all__ = ["substance", "mixture", "Substance", "Datum", "Anchor", "shipped_mixtures", "RESOLVERS"]

#: Name resolvers of the caller's own, tried after tablegen's name syntaxes and before the
#: species lookup: callables (name, data, source) returning a Substance or None.
RESOLVERS: list = []


def _name_syntaxes() -> tuple:
    """The name syntaxes tablegen itself reads, (prefix, resolver) pairs, named in this one
    place: nothing registers a syntax by being imported."""
    from .flue import PREFIX, resolve as flue_gas   # flue@FUEL@AMOUNT[@OXIDANT]: combustion products
    return ((PREFIX, flue_gas),)


def substance(name: str, *, source: str | None = None, data=()) -> Substance:
    """A substance by species id or alias, shipped mixture name, or inline mixture.

    Parameters
    ----------
    name : "CO2", "carbon dioxide", "air", or a composition such as
        "CH4=0.9,C2H6=0.06,N2=0.04", "CH4=90%,C2H6=6%,N2=4%" or
        "basis=mass,CH4=0.8,N2=0.2" (tablegen.core.composition)
    source : data set id to take species from (e.g. "nasa1993"); default: each
        species' default source
    data : extra gasdata files or folders (--data)

    Raises
    ------
    NameLookupError with the closest matches for an unknown name.
    """
    if not isinstance(name, str) or not name.strip():
        raise NameLookupError("substance name is empty; give a species id, alias or mixture")
    name = name.strip()
    for prefix, resolve in _name_syntaxes():
        if name[:len(prefix)].lower() == prefix:
            return resolve(name, data, source)
    for resolve in RESOLVERS:
        s = resolve(name, data, source)
        if s is not None:
            return s
    m = shipped_mixtures().get(norm_name(name))
    if m is not None:
        sub = mixture(m["components"], basis=m.get("basis", "mole"), source=source, data=data,
                      id=m["id"], name=m.get("name", m["id"]))
        return sub
    if composition.looks_like(name):
        from .oxidants import humid_air_substance, is_oxidant_base
        head, comma, _ = name.partition(",")
        if comma and "=" not in head and is_oxidant_base(head):
            # humid, enriched or tempered air (air,rh=60%,T=15C): the text combust --oxidant reads
            return humid_air_substance(name, data=data, source=source)
        c = composition.parse(name, "mixture")
        return mixture(c.fractions, basis=c.basis, source=source, data=data, id=name)
    rec = library(tuple(data)).record(name, source=source)
    return species_substance(rec)


def mixture(components: dict, basis: str = "mole", *, source: str | None = None, data=(),
            id: str | None = None, name: str | None = None) -> Substance:
    """A fixed-composition ideal-gas mixture, collapsed into one polynomial.

    Parameters
    ----------
    components : mapping species name -> mole or mass fraction
    basis : "mole" or "mass"

    Raises
    ------
    TablegenError for negative, duplicate or unknown components, or fractions
    that do not sum to 1 within 1e-6.
    """
    if not isinstance(components, dict):
        raise InputError("mixture components must be a mapping of species to fractions")
    lib = library(tuple(data))
    parts = []
    for k, v in components.items():
        try:
            rec = lib.record(str(k), source=source)
        except NameLookupError as e:
            raise NameLookupError(f"mixture component: {e}") from None
        parts.append((rec, v))
    from ..thermo.saturation import with_dew_point
    return with_dew_point(mixture_substance(parts, basis, id=id, name=name))
