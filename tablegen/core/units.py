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
  Btu/ft³ = 1055.05585262 / 0.3048³ J/m³;
  mechanical horsepower hp = 550 ft·lbf/s = 745.69987158227022 W;
  inch = 0.0254 m; hPa = 100 Pa.

Gauge pressures (``barg``, ``mbarg``, ``kPag``, ``psig``) are read against a barometric
pressure the caller states (:func:`parse_pressure`); where none is stated they
are refused, so no gauge value is ever converted silently.

Flows (:func:`parse_flow`): mass flows (kg/s, kg/h, t/h, lb/h, lb/s), molar
flows (kmol/h, kmol/s, mol/s, lbmol/h) and flows of gas volume at reference
conditions: normal m³ (Nm³/h, Nm³/s) at 0 °C and 101.325 kPa (the normal
conditions of DIN 1343 that tablegen uses throughout) and standard ft³ (SCFM,
SCFH) at 60 °F and 14.696 psia (common practice in the US gas industry), both
as ideal gas.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass

from .constants import R_MOLAR
from .errors import UnitError

LBM = 0.45359237
FT = 0.3048
INCH = 0.0254
BTU = 1055.05585262
LBF = 4.4482216152605
PSI = LBF / (INCH ** 2)
#: Mechanical horsepower, 550 ft·lbf/s, W.
HP = 550.0 * FT * LBF
#: Standard atmosphere, Pa (CGPM 1954): the barometric pressure of gauge readings unless stated.
P_ATM = 101325.0
#: Normal conditions of a normal m³: 0 °C and 101.325 kPa (DIN 1343).
T_NORMAL_K = 273.15
P_NORMAL_PA = 101325.0
#: Standard conditions of a standard ft³: 60 °F and 14.696 psia (common practice, US gas industry).
T_SCF_K = (60.0 + 459.67) * 5.0 / 9.0
P_SCF_PA = 14.696 * PSI


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
    + _u("hPa", "pressure", 1e2)
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
    + _u("W", "power", 1.0)
    + _u("kW", "power", 1e3)
    + _u("MW", "power", 1e6)
    + _u("hp", "power", HP)
    + _u("Btu/h", "power", BTU / 3600.0, 0.0, "Btu/hr")
    + _u("MMBtu/h", "power", BTU * 1e6 / 3600.0, 0.0, "MMBtu/hr")
    + _u("kg/s", "mass_flow", 1.0)
    + _u("kg/h", "mass_flow", 1.0 / 3600.0, 0.0, "kg/hr")
    + _u("t/h", "mass_flow", 1000.0 / 3600.0, 0.0, "t/hr")
    + _u("lb/h", "mass_flow", LBM / 3600.0, 0.0, "lbm/h", "lb/hr", "lbm/hr")
    + _u("lb/s", "mass_flow", LBM, 0.0, "lbm/s")
    # molar flows and flows of gas volume at reference conditions, SI value in mol/s
    + _u("kmol/h", "molar_flow", 1000.0 / 3600.0, 0.0, "kmol/hr")
    + _u("kmol/s", "molar_flow", 1000.0)
    + _u("mol/s", "molar_flow", 1.0)
    + _u("lbmol/h", "molar_flow", LBM * 1000.0 / 3600.0, 0.0, "lbmol/hr")
    + _u("Nm³/h", "molar_flow", P_NORMAL_PA / (R_MOLAR * T_NORMAL_K) / 3600.0, 0.0, "Nm3/h", "Nm3/hr")
    + _u("Nm³/s", "molar_flow", P_NORMAL_PA / (R_MOLAR * T_NORMAL_K), 0.0, "Nm3/s")
    + _u("SCFM", "molar_flow", P_SCF_PA * FT ** 3 / (R_MOLAR * T_SCF_K) / 60.0, 0.0, "scfm")
    + _u("SCFH", "molar_flow", P_SCF_PA * FT ** 3 / (R_MOLAR * T_SCF_K) / 3600.0, 0.0, "scfh")
    # actual volume flow, at the state it is measured in
    + _u("m³/s", "volume_flow", 1.0, 0.0, "m3/s")
    + _u("m³/h", "volume_flow", 1.0 / 3600.0, 0.0, "m3/h")
    + _u("ft³/min", "volume_flow", FT ** 3 / 60.0, 0.0, "ft3/min", "cfm", "acfm")
    + _u("-", "dimensionless", 1.0, 0.0, "1", "", "none")
)

#: Gauge units: spelling -> the absolute unit of the same scale. A gauge value is read
#: against a stated barometric pressure: absolute = barometer + factor * value.
GAUGE_UNITS = {"barg": "bar", "mbarg": "mbar", "kPag": "kPa", "psig": "psia"}
_GAUGE_SPELLINGS = {**{g.lower(): g for g in GAUGE_UNITS},
                    "bar(g)": "barg", "mbar(g)": "mbarg", "kpa(g)": "kPag", "psi(g)": "psig"}


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


def gauge_symbol(text: str) -> str | None:
    """'barg', 'bar g', 'bar(g)', 'PSIG' -> the gauge symbol ('barg', 'psig'); None if not gauge."""
    return _GAUGE_SPELLINGS.get(canon(text).lower())


def unit(text: str, dimension: str | None = None) -> Unit:
    """Look a unit up by any accepted spelling, optionally of one dimension."""
    c = canon(text)
    u = _CANON.get(c) or _CANON.get(c.lower())
    if u is None:
        g = gauge_symbol(text)
        if g is not None and dimension in (None, "pressure"):
            raise UnitError(f"{text!r} is a gauge pressure unit, not allowed here (no barometric pressure "
                            f"applies); allowed: absolute units {', '.join(known_symbols('pressure'))}")
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


@dataclass(frozen=True, slots=True)
class Pressure:
    """A pressure as typed and as absolute pascal.

    ``unit`` is the absolute unit of the typed scale (bar for barg, psia for
    psig); ``gauge`` says the value was typed as gauge pressure, read against
    ``barometer_Pa``.
    """

    Pa: float
    typed: str
    unit: Unit
    gauge: str | None = None            # gauge symbol typed ('barg', 'kPag', 'psig'), or None
    barometer_Pa: float | None = None

    @property
    def gauge_Pa(self) -> float | None:
        return None if self.gauge is None else self.Pa - self.barometer_Pa


def parse_pressure(text: str, what: str = "pressure", *, barometer_Pa: float | None = None) -> Pressure:
    """An absolute or gauge pressure with its unit: '9bar', '101.3kPa', '9barg', '120psig'.

    Parameters
    ----------
    barometer_Pa : barometric pressure gauge values are read against (Pa);
        None where no barometer applies, and then a gauge unit is refused.

    Raises
    ------
    UnitError for a missing or unknown unit, an absolute value not above
    0 Pa, or a gauge value at or below vacuum at the stated barometer.
    """
    m = _NUM.match(str(text))
    if not m:
        raise UnitError(f"{what} {text!r} is not a number with a unit; write e.g. 1bar, 101.325kPa or 9barg")
    num, sym = float(m.group(1)), m.group(2)
    if not sym:
        raise UnitError(f"{what} {text!r} has no unit; allowed units: "
                        f"{', '.join(known_symbols('pressure'))}, gauge: {', '.join(GAUGE_UNITS)}")
    g = gauge_symbol(sym)
    if g is None:
        u = unit(sym, "pressure")
        P = u.to_si(num)
        if not P > 0:
            raise UnitError(f"{what} {text!r} must be above 0 Pa (absolute pressure); "
                            f"for a gauge reading write e.g. {num:g}{_gauge_of(u.symbol)}")
        return Pressure(P, str(text).strip(), u)
    if barometer_Pa is None:
        raise UnitError(f"{what} {text!r} is a gauge pressure, not allowed here (this is an absolute "
                        f"reference pressure); allowed: absolute units {', '.join(known_symbols('pressure'))}")
    u = unit(GAUGE_UNITS[g], "pressure")
    P = barometer_Pa + u.to_si(num)
    if not P > 0:
        raise UnitError(f"{what} {text!r} is {u.from_si(P):.6g} {u.symbol} absolute at barometer "
                        f"{u.from_si(barometer_Pa):.6g} {u.symbol}, at or below vacuum; allowed: gauge values "
                        f"above {-u.from_si(barometer_Pa):.6g} {g}")
    return Pressure(P, str(text).strip(), u, g, float(barometer_Pa))


def _gauge_of(symbol: str) -> str:
    return next((g for g, a in GAUGE_UNITS.items() if a == symbol), "barg")


def pressure_Pa(text: str, what: str = "pressure", *, barometer_Pa: float | None = None) -> float:
    """Absolute pressure in Pa; gauge units only where a barometer is given."""
    return parse_pressure(text, what, barometer_Pa=barometer_Pa).Pa


#: Barometric pressures allowed, Pa: from the top of Mount Everest (about 0.34 bar) to the highest
#: sea-level readings (about 1.08 bar), with a margin; outside is most likely a mistyped unit.
BAROMETER_RANGE_PA = (0.3e5, 1.2e5)


def barometer_Pa(text: str | None, what: str = "--barometer") -> float:
    """A barometric (ambient) pressure, absolute, with a unit; None gives 1.01325 bar."""
    if text is None:
        return P_ATM
    m = _NUM.match(str(text))
    if m and m.group(2) and gauge_symbol(m.group(2)):
        raise UnitError(f"{what} {text!r}: a barometric pressure is absolute; allowed: e.g. 1.01325bar, "
                        f"950mbar, 95kPa, 14.2psia")
    try:
        P = quantity(text, "pressure", what)
    except UnitError as e:
        raise UnitError(f"{e}; e.g. {what} 1.01325bar") from None
    lo, hi = BAROMETER_RANGE_PA
    if not (lo <= P <= hi):
        raise UnitError(f"{what} {text!r} is {P / 1e5:.6g} bar; allowed: a barometric pressure from "
                        f"{lo / 1e5:g} to {hi / 1e5:g} bar (300 to 1200 hPa)")
    return P


@dataclass(frozen=True, slots=True)
class Flow:
    """A flow as typed: mass flow (kg/s) or amount flow (mol/s), never both."""

    typed: str
    unit: Unit
    kg_per_s: float | None = None
    mol_per_s: float | None = None

    @property
    def text(self) -> str:
        """'2.5 kg/s', '1200 SCFM': the number as typed, with the unit's own symbol."""
        return f"{_NUM.match(self.typed).group(1)} {self.unit.symbol}"

    def mass_kg_per_s(self, M_kg_per_kmol: float | None, what: str = "--flow") -> float:
        """The mass flow, converting an amount flow with the molar mass."""
        if self.kg_per_s is not None:
            return self.kg_per_s
        if M_kg_per_kmol is None:
            raise UnitError(f"{what} {self.typed!r}: a molar or gas-volume flow needs a molar mass, and this "
                            f"substance has none; allowed: mass flows {', '.join(known_symbols('mass_flow'))}")
        return self.mol_per_s * M_kg_per_kmol * 1e-3


def parse_flow(text: str, what: str = "--flow") -> Flow:
    """'2.5kg/s', '9t/h', '1200Nm3/h', '850SCFM', '40kmol/h': a flow, zero or positive."""
    allowed = ", ".join(known_symbols("mass_flow") + known_symbols("molar_flow"))
    m = _NUM.match(str(text))
    if not m or not m.group(2):
        raise UnitError(f"{what} {text!r} is not a flow with a unit; allowed units: {allowed}")
    num, sym = float(m.group(1)), m.group(2)
    c = canon(sym)
    u = _CANON.get(c) or _CANON.get(c.lower())
    if u is None or u.dimension not in ("mass_flow", "molar_flow"):
        raise UnitError(f"{what} {text!r}: unknown flow unit {sym!r}; allowed: {allowed}")
    if not num >= 0:
        raise UnitError(f"{what} {text!r} is negative; allowed: a flow of zero or more")
    if u.dimension == "mass_flow":
        return Flow(str(text).strip(), u, kg_per_s=u.to_si(num))
    return Flow(str(text).strip(), u, mol_per_s=u.to_si(num))


def temperature_list(text: str, what: str = "--T") -> list[float]:
    parts = [p for p in str(text).split(",")]
    if not parts or any(not p.strip() for p in parts):
        raise UnitError(f"{what} {text!r}: give comma-separated temperatures with units, e.g. 25C,1000K")
    return [temperature_K(p, what) for p in parts]


def _example(dimension: str) -> str:
    return {"temperature": "25C or 1000K", "pressure": "1bar or 101.325kPa"}.get(dimension, "1.0 " + known_symbols(dimension)[0])


def kelvin_text(T_K: float) -> str:
    """A temperature in K for print: up to 3 decimals, no trailing zeros ("298.15 K")."""
    return f"{T_K:.3f}".rstrip("0").rstrip(".") + " K"


def temperature_text(T_K: float, unit_symbol: str) -> str:
    """A temperature in the unit ``unit_symbol``, with K beside it when that unit is not K."""
    v = unit(unit_symbol, "temperature").from_si(T_K)
    s = f"{v:.3f}".rstrip("0").rstrip(".")
    if s == "-0":
        s = "0"
    return f"{s} {unit_symbol}" if unit_symbol == "K" else f"{s} {unit_symbol} ({kelvin_text(T_K)})"
