"""What fuels and oxidants share: species records, molar enthalpies, checks of numbers and fractions.

The fuel (tablegen.calc.fuels), oxidant (tablegen.calc.oxidants) and combustion
(tablegen.calc.burn) modules read the gas library through these few functions, so a
species is looked up, and its polynomial collapsed, once per process.
"""

from __future__ import annotations

import math
from functools import lru_cache

import numpy as np

from ..core.errors import InputError, NameLookupError, RangeError, TablegenError, UnitError

#: Elements a fuel may contain; noble gases pass through as themselves.
BURNING = ("C", "H", "O", "N", "S")
NOBLE = ("Ar", "He", "Ne", "Kr", "Xe")
#: Species an oxidant may contain (each leaves the flame as itself).
OXIDANT_SPECIES = ("O2", "N2", "Ar", "He", "Ne", "Kr", "Xe", "H2O", "CO2")
#: Default metering (normal) conditions for volumes: 0 °C, 101.325 kPa (common practice, DIN 1343).
T_NORMAL = 273.15
P_NORMAL = 101325.0


def _lib(data):
    from ..data.library import library
    return library(tuple(data))


def _record(sid: str, data=(), source=None, what="species"):
    try:
        return _lib(data).record(sid, source=source)
    except NameLookupError as e:
        raise NameLookupError(f"{what}: {e}") from None


@lru_cache(maxsize=256)
def _species_sub(sid: str, data: tuple, source):
    from ..thermo.build import species_substance
    return species_substance(_record(sid, data, source))


#: How far below the lowest data temperature an enthalpy may be extrapolated, K. SO2 and H2S
#: data of NASA TM-4513 start at 300 K; 30 K reaches the 0 °C reference temperature. The lowest
#: interval's cp varies by well under 1 % over 30 K there, so h moves by < 1 J/mol per K of that.
EXTRAPOLATE_BELOW_K = 30.0


def _h_molar(sid: str, T_K: float, data=(), source=None) -> tuple[float, bool]:
    """Molar enthalpy (formation datum), J/mol, and whether T lies outside the data range."""
    sub = _species_sub(sid, tuple(data), source)
    if not (sub.T_min - EXTRAPOLATE_BELOW_K <= T_K <= sub.T_max):
        raise RangeError(f"{sid}: T = {T_K:g} K is outside its data range {sub.T_min:g}-{sub.T_max:g} K; "
                         f"allowed inlet and reference temperatures: {sub.T_min - EXTRAPOLATE_BELOW_K:g} to "
                         f"{sub.T_max:g} K")
    p = sub.properties(np.array([float(T_K)]), extrapolate=True, molar_only=True)
    return float(p["h_molar"][0]), bool(p["extrapolated"][0])


def _weights(data=()):
    return _lib(data).weights.weights


def _num(v, what: str, *, lo=None, hi=None, lo_open=False) -> float:
    if isinstance(v, bool):
        raise InputError(f"{what} must be a number, got {v!r}")
    try:
        x = float(v)
    except (TypeError, ValueError):
        raise InputError(f"{what} must be a number, got {v!r}") from None
    if not math.isfinite(x):
        raise RangeError(f"{what} must be finite, got {v!r}")
    if lo is not None and (x < lo or (lo_open and x <= lo)):
        raise RangeError(f"{what} = {x:g} is too small; allowed: {'>' if lo_open else '>='} {lo:g}"
                         + (f" and <= {hi:g}" if hi is not None else ""))
    if hi is not None and x > hi:
        raise RangeError(f"{what} = {x:g} is too large; allowed: <= {hi:g}")
    return x


def _qty(v, dimension: str, what: str, default_unit: str) -> float:
    """A quantity as a number (in default_unit) or a string with a unit."""
    from ..core.units import quantity, unit
    if isinstance(v, str):
        try:
            return quantity(v, dimension, what)
        except TablegenError:
            try:
                return unit(default_unit, dimension).to_si(float(v))
            except ValueError:
                raise UnitError(f"{what} {v!r} is not a number with a unit; write e.g. "
                                f"\"42.5 {default_unit}\" (a plain number is {default_unit})") from None
    return unit(default_unit, dimension).to_si(_num(v, what))


def _fractions(raw, what: str, *, normalise_loose: bool = False) -> tuple[dict, bool]:
    """Fractions summing to 1, or percentages summing to 100 (within 1e-6 relative).

    Returns (fractions summing to 1, given_in_percent). With ``normalise_loose``
    sums within 1 % of 1 or 100 are normalised (an analysis rounded by the lab).
    """
    if not isinstance(raw, dict) or not raw:
        raise InputError(f"{what}: give a table of species and fractions, e.g. {{CH4 = 0.9, N2 = 0.1}}")
    out = {}
    for k, v in raw.items():
        out[str(k)] = _num(v, f"{what}.{k}", lo=0.0)
    total = sum(out.values())
    tol = 1e-2 if normalise_loose else 1e-6
    for scale in (1.0, 100.0):
        if abs(total - scale) <= tol * scale:
            return {k: v / total for k, v in out.items()}, scale == 100.0
    loose = "" if normalise_loose else " (set normalise = true to accept sums within 1 %)"
    raise InputError(f"{what}: fractions sum to {total:.9g}; they must sum to 1, or to 100 "
                     f"for percentages{loose}")


@lru_cache(maxsize=None)
def _M_H2O() -> float:
    return _record("H2O").M


def _g(v) -> str:
    """Shortest text that reads back as the same float ('15', '1.15', '0.1')."""
    r = repr(float(v))
    return r[:-2] if r.endswith(".0") else r


def read_quantities(table: dict, where: str, keys: dict) -> dict:
    """Spec keys holding a temperature or a pressure with its unit -> keywords in SI.

    ``keys`` maps a spec key to (keyword, "temperature" or "pressure"); messages name
    ``where.key``.
    """
    from ..core.units import pressure_Pa, temperature_K
    read = {"temperature": temperature_K, "pressure": pressure_Pa}
    return {kw: read[dim](str(table[key]), f"{where}.{key}") for key, (kw, dim) in keys.items() if key in table}


def check_table(t, where: str, allowed, what: str) -> None:
    """A spec table with known keys only: SpecError naming ``where.KEY`` and the allowed keys."""
    from ..core.errors import SpecError
    if not isinstance(t, dict):
        raise SpecError(f"{where}: must be {what}")
    for k in t:
        if k not in allowed:
            raise SpecError(f"{where}.{k} is not known; allowed: {', '.join(allowed)}")
