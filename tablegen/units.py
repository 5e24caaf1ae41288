"""Units: parsing quantities and converting at the edges only.

Inside, everything is SI (K, Pa, J/kg, J/mol, J/(kg·K), m/s). A unit is looked
up by a canonical spelling (spaces, '*', '·' and '-' between factors removed,
'deg' and '°' dropped), so "kJ/(kg K)", "kJ/kg-K", "kJ/(kg·K)" and "kJ/kgK"
are one unit.

Exact conversion factors, each by definition:
  lbm = 0.45359237 kg, ft = 0.3048 m (International Yard and Pound Agreement, 1959);
  Btu (International Table) = 1055.05585262 J, so Btu/lbm = 2326 J/kg and
  Btu/(lbm·°R) = 4186.8 J/(kg·K); atm = 101325 Pa; bar = 1e5 Pa;
  psi = lbf/in² = 6894.757293168361 Pa (lbf = 4.4482216152605 N);
  Btu/ft³ = 1055.05585262 / 0.3048³ J/m³.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass

from .errors import UnitError

LBM = 0.45359237
FT = 0.3048
BTU = 1055.05585262
PSI = 4.4482216152605 / (0.0254 ** 2)


@dataclass(frozen=True, slots=True)
class Unit:
    symbol: str       # how we print it
    dimension: str    # temperature, pressure, specific_energy, ...
    factor: float     # SI value = factor * value + offset
    offset: float = 0.0

    def to_si(self, v):
        return v * self.factor + self.offset

    def from_si(self, v):
        return (v - self.offset) / self.factor


def _u(symbol, dim, factor, offset=0.0, *spellings):
    return [(s, Unit(symbol, dim, factor, offset)) for s in (symbol, *spellings)]


_TABLE = dict(
    _u("K", "temperature", 1.0, 0.0, "kelvin")
    + _u("°C", "temperature", 1.0, 273.15, "C", "degC", "celsius")
    + _u("°F", "temperature", 5 / 9, 273.15 - 32 * 5 / 9, "F", "degF", "fahrenheit")
    + _u("°R", "temperature", 5 / 9, 0.0, "R", "degR", "rankine")
    + _u("Pa", "pressure", 1.0)
    + _u("kPa", "pressure", 1e3)
    + _u("MPa", "pressure", 1e6)
    + _u("bar", "pressure", 1e5, 0.0, "bara")
    + _u("mbar", "pressure", 1e2)
    + _u("atm", "pressure", 101325.0)
    + _u("psia", "pressure", PSI, 0.0, "psi")
    + _u("J/kg", "specific_energy", 1.0)
    + _u("kJ/kg", "specific_energy", 1e3)
    + _u("MJ/kg", "specific_energy", 1e6)
    + _u("Btu/lbm", "specific_energy", BTU / LBM, 0.0, "Btu/lb")
    + _u("J/mol", "molar_energy", 1.0, 0.0, "kJ/kmol")
    + _u("kJ/mol", "molar_energy", 1e3, 0.0, "MJ/kmol")
    + _u("Btu/lbmol", "molar_energy", BTU / LBM / 1000.0)
    + _u("J/(kg K)", "specific_entropy", 1.0)
    + _u("kJ/(kg K)", "specific_entropy", 1e3)
    + _u("Btu/(lbm °R)", "specific_entropy", BTU / LBM * 9 / 5, 0.0, "Btu/(lb R)", "Btu/(lbm F)", "Btu/(lb F)")
    + _u("J/(mol K)", "molar_entropy", 1.0, 0.0, "kJ/(kmol K)")
    + _u("kJ/(mol K)", "molar_entropy", 1e3)
    + _u("Btu/(lbmol °R)", "molar_entropy", BTU / LBM / 1000.0 * 9 / 5, 0.0, "Btu/(lbmol F)")
    + _u("m/s", "speed", 1.0)
    + _u("ft/s", "speed", FT)
    + _u("m³/kg", "specific_volume", 1.0, 0.0, "m3/kg")
    + _u("ft³/lbm", "specific_volume", FT ** 3 / LBM, 0.0, "ft3/lbm", "ft3/lb")
    + _u("kg/m³", "density", 1.0, 0.0, "kg/m3")
    + _u("lbm/ft³", "density", LBM / FT ** 3, 0.0, "lbm/ft3", "lb/ft3")
    + _u("kg/kmol", "molar_mass", 1.0, 0.0, "g/mol")
    # the volumetric basis: per m³ (or ft³) of gas at stated reference conditions
    + _u("J/m³", "volumetric_energy", 1.0, 0.0, "J/m3")
    + _u("kJ/m³", "volumetric_energy", 1e3, 0.0, "kJ/m3")
    + _u("MJ/m³", "volumetric_energy", 1e6, 0.0, "MJ/m3")
    + _u("Btu/ft³", "volumetric_energy", BTU / FT ** 3, 0.0, "Btu/ft3")
    + _u("J/(m³ K)", "volumetric_entropy", 1.0)
    + _u("kJ/(m³ K)", "volumetric_entropy", 1e3)
    + _u("MJ/(m³ K)", "volumetric_entropy", 1e6)
    + _u("Btu/(ft³ °R)", "volumetric_entropy", BTU / FT ** 3 * 9 / 5, 0.0, "Btu/(ft³ °F)")
    + _u("-", "dimensionless", 1.0, 0.0, "1", "", "none")
)


def canon(text: str) -> str:
    """Canonical spelling: no blanks, multiplication signs, 'deg' or '°'."""
    s = text.strip()
    if s in ("-", "", "1", "none"):
        return "1"
    s = s.replace("°", "").replace("deg", "").replace("²", "2").replace("³", "3")
    s = re.sub(r"[\s*·.\-]", "", s)
    m = re.fullmatch(r"([^/]+)/([^/()]+)/([^/()]+)", s)
    if m:                                   # J/kg/K -> J/(kgK)
        s = f"{m.group(1)}/({m.group(2)}{m.group(3)})"
    m = re.fullmatch(r"([^/]+)/((?:kg|kmol|mol|lbmol|lbm|lb|m3|ft3)(?:K|R|F|C))", s)
    if m:                                   # J/kgK -> J/(kgK)
        s = f"{m.group(1)}/({m.group(2)})"
    return s


_CANON = {}
for _spelling, _unit in _TABLE.items():
    _CANON.setdefault(canon(_spelling), _unit)
    _CANON.setdefault(canon(_spelling).lower(), _unit)


def unit(text: str, dimension: str | None = None) -> Unit:
    """Look a unit up by any accepted spelling, optionally of one dimension."""
    c = canon(text)
    u = _CANON.get(c) or _CANON.get(c.lower())
    if u is None:
        allowed = ", ".join(known_symbols(dimension)) if dimension else "see the README's unit list"
        raise UnitError(f"unknown unit {text!r}; allowed: {allowed}")
    if dimension and u.dimension != dimension:
        raise UnitError(f"unit {text!r} is a {u.dimension.replace('_', ' ')} unit, "
                        f"not {dimension.replace('_', ' ')}; allowed: {', '.join(known_symbols(dimension))}")
    return u


def known_symbols(dimension: str | None = None) -> list[str]:
    return list(dict.fromkeys(u.symbol for u in _TABLE.values() if dimension in (None, u.dimension)))


_NUM = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$")


def quantity(text: str, dimension: str, what: str = "value") -> float:
    """Parse '25C', '1000 K', '14.7psia' into an SI float; the unit is required."""
    m = _NUM.match(str(text))
    if not m:
        raise UnitError(f"{what} {text!r} is not a number with a unit; "
                        f"write e.g. {_example(dimension)}")
    num, sym = float(m.group(1)), m.group(2)
    if not sym:
        raise UnitError(f"{what} {text!r} has no unit; allowed units: {', '.join(known_symbols(dimension))}")
    si = unit(sym, dimension).to_si(num)
    if not math.isfinite(si):
        raise UnitError(f"{what} {text!r} is not a finite number; write e.g. {_example(dimension)}")
    return si


def temperature_K(text: str, what: str = "temperature") -> float:
    T = quantity(text, "temperature", what)
    if not T > 0:
        raise UnitError(f"{what} {text!r} is {T:g} K; temperatures must be above 0 K")
    return T


def pressure_Pa(text: str, what: str = "pressure") -> float:
    P = quantity(text, "pressure", what)
    if not P > 0:
        raise UnitError(f"{what} {text!r} must be above 0 Pa (absolute pressure)")
    return P


def temperature_list(text: str, what: str = "--T") -> list[float]:
    parts = [p for p in str(text).split(",")]
    if not parts or any(not p.strip() for p in parts):
        raise UnitError(f"{what} {text!r}: give comma-separated temperatures with units, e.g. 25C,1000K")
    return [temperature_K(p, what) for p in parts]


def _example(dimension: str) -> str:
    return {"temperature": "25C or 1000K", "pressure": "1bar or 101.325kPa"}.get(dimension, "1.0 " + known_symbols(dimension)[0])
