"""Answers in the units of the question: which units a command prints, and how.

Everything inside is SI; this module only chooses the units of the printed
answer from what the user typed (or asked for with ``--units``, ``--T-unit``,
``--P-unit``) and formats numbers in them. It holds no thermodynamics.

Unit systems (names of our own, as in the book specs and charts):

======  ==========  ======  =========  =============  ========  =====  =========  =========
system  T           P       h          s              v         power  mass flow  volume
======  ==========  ======  =========  =============  ========  =====  =========  =========
SI      °C (and K)  bar     kJ/kg      kJ/(kg K)      m³/kg     kW     kg/s       m³/h
US      °F (and °R) psia    Btu/lbm    Btu/(lbm °R)   ft³/lbm   hp     lb/h       ft³/min
======  ==========  ======  =========  =============  ========  =====  =========  =========

``auto`` (the default) answers in the units of the question: the system is US
where the first temperature or the first pressure was typed in a US customary
unit (°F, °R, psia, psig), or, where neither was typed, any other value (Btu,
lb, SCFM), else SI; the temperature comes back in the unit of the first
temperature typed (a relative scale with its absolute one beside it: °C with
K, °F with °R) and the pressure in the unit of the first pressure typed; a
gauge pressure typed anywhere adds the gauge reading (barg, kPag, psig) beside
the absolute one, with the barometric pressure it was read against.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..core.errors import UnitError
from ..core.units import GAUGE_UNITS, P_ATM, _NUM, gauge_symbol, unit

SYSTEM_NAMES = ("auto", "SI", "US")

#: quantity -> unit symbol, per unit system
SYSTEMS = {
    "SI": {"T": "°C", "P": "bar", "h": "kJ/kg", "s": "kJ/(kg K)", "v": "m³/kg", "a": "m/s",
           "h_molar": "kJ/kmol", "s_molar": "kJ/(kmol K)", "power": "kW", "mass_flow": "kg/s",
           "volume_flow": "m³/h"},
    "US": {"T": "°F", "P": "psia", "h": "Btu/lbm", "s": "Btu/(lbm °R)", "v": "ft³/lbm", "a": "ft/s",
           "h_molar": "Btu/lbmol", "s_molar": "Btu/(lbmol °R)", "power": "hp", "mass_flow": "lb/h",
           "volume_flow": "ft³/min"},
}
#: Units that make an answer US customary when typed.
US_SYMBOLS = {"°F", "°R", "psia", "psig", "Btu/lbm", "Btu/lbmol", "Btu/(lbm °R)", "lb/h", "lb/s",
              "lbmol/h", "SCFM", "SCFH", "ft³/lbm", "Btu/h", "MMBtu/h", "hp"}
#: The absolute scale printed beside a relative temperature scale.
ABSOLUTE_T = {"°C": "K", "°F": "°R"}
#: Temperature and pressure units of each system (a typed unit outside them gives the system's own).
FAMILY = {"SI": {"K", "°C", "Pa", "kPa", "MPa", "bar", "mbar", "hPa", "atm"},
          "US": {"°F", "°R", "psia", "atm"}}
#: Decimals of a pressure in the state table (about 0.1 mbar); the answer line prints one fewer.
P_DECIMALS = {"Pa": 0, "hPa": 1, "mbar": 1, "kPa": 2, "MPa": 5, "bar": 4, "atm": 5, "psia": 3,
              "barg": 4, "mbarg": 1, "kPag": 2, "psig": 3}


def typed_symbol(text) -> str | None:
    """The unit symbol of a typed quantity ('15C' -> '°C', '9barg' -> 'barg'); None if none or unknown."""
    m = _NUM.match(str(text))
    if not m or not m.group(2):
        return None
    g = gauge_symbol(m.group(2))
    if g:
        return g
    try:
        return unit(m.group(2)).symbol
    except UnitError:
        return None


def fmt_sig(x: float, n: int = 4) -> str:
    """At least n significant digits, never an exponent: 745.3, 7453, 74530, 0.7453."""
    if x is None or not math.isfinite(x):
        return "-"
    if x == 0:
        return "0"
    dec = max(0, n - 1 - math.floor(math.log10(abs(x))))
    return f"{x:.{dec}f}"


@dataclass(frozen=True, slots=True)
class Shown:
    """The units one answer is printed in (symbols), and the barometer of its gauge values."""

    system: str
    T: str
    T_abs: str | None
    P: str
    P_gauge: str | None
    barometer_Pa: float
    units: tuple            # ((quantity, symbol), ...) of the system for h, s, v, a, power, flows

    def sym(self, key: str) -> str:
        return dict(self.units)[key]

    def value(self, key: str, si: float) -> float:
        """SI value of quantity ``key`` ('T', 'P', 'h', 's', 'power', ...) in the shown unit."""
        s = {"T": self.T, "P": self.P}.get(key) or self.sym(key)
        return unit(s).from_si(si)

    # ------------------------------------------------------------- text
    def T_text(self, T_K: float, decimals: int = 2, absolute: bool = True) -> str:
        t = f"{unit(self.T).from_si(T_K):.{decimals}f} {self.T}"
        if absolute and self.T_abs:
            t += f" ({unit(self.T_abs).from_si(T_K):.{decimals}f} {self.T_abs})"
        return t

    def P_abs_text(self, P_Pa: float, decimals: int | None = None) -> str:
        d = P_DECIMALS.get(self.P, 4) if decimals is None else decimals
        return f"{unit(self.P).from_si(P_Pa):.{d}f} {self.P}"

    def gauge_value(self, P_Pa: float) -> float:
        return unit(GAUGE_UNITS[self.P_gauge]).from_si(P_Pa - self.barometer_Pa)

    def barometer_text(self) -> str:
        """'barometer 1.01325 bar' in the absolute unit of the gauge scale."""
        u = GAUGE_UNITS[self.P_gauge]
        return f"barometer {unit(u).from_si(self.barometer_Pa):.6g} {u}"

    def P_text(self, P_Pa: float, brief: bool = False) -> str:
        """'1.0130 bar', or with a gauge scale '9.0000 barg (10.0133 bar, barometer 1.01325 bar)'."""
        shift = 1 if brief else 0
        absolute = self.P_abs_text(P_Pa, max(0, P_DECIMALS.get(self.P, 4) - shift))
        if not self.P_gauge:
            return absolute
        d = max(0, P_DECIMALS.get(self.P_gauge, 4) - shift)
        return f"{self.gauge_value(P_Pa):.{d}f} {self.P_gauge} ({absolute}, {self.barometer_text()})"


def choose(*, system: str | None = None, T_unit: str | None = None, P_unit: str | None = None,
           typed_T=(), typed_P=(), typed_other=(), barometer_Pa: float = P_ATM) -> Shown:
    """The units of an answer from the options and the values as typed.

    Parameters
    ----------
    system : "auto" (or None), "SI" or "US" (--units)
    T_unit, P_unit : overrides (--T-unit, --P-unit); P_unit may be a gauge unit
    typed_T, typed_P, typed_other : the values as the user typed them, in order
        (temperatures, pressures, anything else with a unit such as a flow)
    barometer_Pa : barometric pressure of the gauge values

    Raises
    ------
    UnitError for an unknown system or a unit of the wrong kind.
    """
    name = _system_name(system)
    t_syms = [s for s in map(typed_symbol, typed_T) if s]
    p_syms = [s for s in map(typed_symbol, typed_P) if s]
    o_syms = [s for s in map(typed_symbol, typed_other) if s]
    if name == "auto":
        decisive = t_syms[:1] + p_syms[:1] or o_syms
        name = "US" if any(s in US_SYMBOLS for s in decisive) else "SI"
        explicit = False
    else:
        explicit = True
    table = SYSTEMS[name]
    if T_unit is not None:
        T = _T_unit(T_unit)
    elif t_syms and (not explicit or t_syms[0] in FAMILY[name]):
        T = t_syms[0]
    else:
        T = table["T"]
    any_gauge = next((s for s in p_syms if s in GAUGE_UNITS), None)
    if P_unit is not None:
        P, gauge = _P_unit(P_unit)
        gauge = gauge or (_gauge_for(P) if any_gauge else None)
    else:
        first = next(iter(p_syms), None)
        if first in GAUGE_UNITS and (not explicit or GAUGE_UNITS[first] in FAMILY[name]):
            P = GAUGE_UNITS[first]
        elif first and first not in GAUGE_UNITS and (not explicit or first in FAMILY[name]):
            P = first
        else:
            P = table["P"]
        gauge = None
        if any_gauge:
            gauge = any_gauge if GAUGE_UNITS[any_gauge] == P else _gauge_for(P) or any_gauge
    return Shown(name, T, ABSOLUTE_T.get(T), P, gauge, float(barometer_Pa),
                 tuple((k, v) for k, v in table.items() if k not in ("T", "P")))


def _system_name(system) -> str:
    if system is None:
        return "auto"
    for n in SYSTEM_NAMES:
        if str(system).strip().lower() == n.lower():
            return n
    raise UnitError(f"--units {system!r} is not known; allowed: {', '.join(SYSTEM_NAMES)} "
                    f"(auto: the units you typed)")


def _T_unit(text: str) -> str:
    try:
        return unit(text, "temperature").symbol
    except UnitError:
        raise UnitError(f"--T-unit {text!r} is not a temperature unit; allowed: K, C, F, R") from None


def _P_unit(text: str) -> tuple[str, str | None]:
    g = gauge_symbol(text)
    if g:
        return GAUGE_UNITS[g], g
    try:
        return unit(text, "pressure").symbol, None
    except UnitError:
        raise UnitError(f"--P-unit {text!r} is not a pressure unit; allowed: bar, kPa, MPa, psia, "
                        f"Pa, mbar, hPa, atm, or gauge barg, kPag, psig") from None


def _gauge_for(P: str) -> str | None:
    return next((g for g, a in GAUGE_UNITS.items() if a == P), None)
