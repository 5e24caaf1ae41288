"""The chart part of a spec: T-s and h-s chart specs parsed and validated once.

``parse_charts(raw)`` turns the ``charts`` tables of a book spec, or the options of
``tablegen chart``, into frozen ``ChartSpec`` values (paper, unit system, axes,
isobars, volume lines, process overlays). The spec layer: no drawing library, no
evaluation of a substance; the chart model (tablegen/book/chart_model.py) builds on these.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..core.errors import SpecError, TablegenError
from ..core.texts import bad_character, one_line_rule
from ..core.units import P_ATM

# --------------------------------------------------------------------------
# paper and unit systems

#: Landscape page sizes in points (ISO 216: A4 297 x 210 mm, A3 420 x 297 mm).
PAPERS = {"A4": (297.0 * 72 / 25.4, 210.0 * 72 / 25.4),
          "A3": (420.0 * 72 / 25.4, 297.0 * 72 / 25.4)}

#: Unit symbols of each unit system (spelled as tablegen.core.units accepts them).
UNIT_SYSTEMS = {
    "SI": {"T": "K", "s": "kJ/(kg K)", "h": "kJ/kg", "P": "bar", "v": "m³/kg"},
    "US": {"T": "°R", "s": "Btu/(lbm °R)", "h": "Btu/lbm", "P": "psia", "v": "ft³/lbm"},
}
#: Temperature units allowed on the axis of each system (first one is the default).
T_UNITS = {"SI": ("K", "°C"), "US": ("°R", "°F")}

KINDS = ("ts", "hs")
STEP_KINDS = ("compress", "expand", "heat_p", "heat_v", "throttle")

#: Default chart temperature range when no table grid gives one, K (clipped to the data).
DEFAULT_T_RANGE_K = (250.0, 2000.0)

#: Default isobars: a 1-2-5 series in each decade, in the unit of the system.
DEFAULT_PRESSURES = {"SI": (0.1, 0.2, 0.5, 1, 2, 5, 10, 20, 50, 100),      # bar
                     "US": (1, 2, 5, 10, 20, 50, 100, 200, 500, 1000)}      # psia


# --------------------------------------------------------------------------
# spec

@dataclass(frozen=True, slots=True)
class StepSpec:
    """One process step of an overlay (SI values; None where not given)."""

    kind: str                    # compress, expand, heat_p, heat_v, throttle
    P2_Pa: float | None = None
    ratio: float | None = None   # pressure ratio > 1 (P2/P1 compressing, P1/P2 expanding)
    eta: float | None = None     # isentropic efficiency, 0 < eta <= 1
    T2_K: float | None = None
    q_J_per_kg: float | None = None   # heat added instead of T2 (heat_p, heat_v); < 0 cooling
    where: str = ""              # key path, for messages


@dataclass(frozen=True, slots=True)
class OverlaySpec:
    """A start state and the process steps that follow it."""

    label: str
    T1_K: float
    P1_Pa: float
    steps: tuple = ()
    where: str = ""


@dataclass(frozen=True, slots=True)
class ChartSpec:
    """One chart, validated. Pressures in Pa, volumes in m³/kg, temperatures in K."""

    kind: str = "ts"
    pressures_Pa: tuple | None = None     # None: the default 1-2-5 series
    volumes_m3_per_kg: tuple = ()
    isotherms_K: tuple | None = None      # h-s only; None: a rounded series
    T_range_K: tuple | None = None        # None: the table's range (or the default)
    paper: str = "A4"
    units: str = "SI"
    T_unit: str = "K"
    title: str | None = None
    overlays: tuple = ()
    where: str = ""


CHART_KEYS = ("kind", "pressures", "volumes", "isotherms", "T_range", "paper", "units",
              "temperature_unit", "title", "overlays")
OVERLAY_KEYS = ("label", "start", "steps")
START_KEYS = ("T", "P")
STEP_KEYS = {"compress": ("step", "P2", "ratio", "eta"), "expand": ("step", "P2", "ratio", "eta"),
             "heat_p": ("step", "T2", "q"), "heat_v": ("step", "T2", "q"), "throttle": ("step", "P2")}


def _fail(path: str, text: str):
    raise SpecError(f"{path}: {text}")


def _system(text, path: str) -> str:
    if isinstance(text, str) and text.lower() == "both":
        return "SI"       # a book printing SI and US columns draws its charts in SI
    if not isinstance(text, str) or text.upper() not in UNIT_SYSTEMS:
        _fail(path, f"unit system {text!r} is not known; allowed: SI, US")
    return text.upper()


def _value(v, dim: str, default_unit: str, path: str, *, positive: bool = True,
           barometer_Pa: float | None = None) -> float:
    """A quantity: a string with a unit ('12bar', or a gauge '11barg') or a bare number in the chart's unit."""
    from ..core.units import pressure_Pa, quantity, unit
    if isinstance(v, bool):
        _fail(path, f"{v!r} is not a quantity; write a number with a unit, e.g. {_EXAMPLES[dim]}")
    try:
        if isinstance(v, (int, float)):
            si = unit(default_unit, dim).to_si(float(v))
        elif isinstance(v, str):
            s = v.strip()
            try:
                si = unit(default_unit, dim).to_si(float(s))
            except ValueError:
                si = pressure_Pa(s, "value", barometer_Pa=barometer_Pa) if dim == "pressure" \
                    else quantity(s, dim, "value")
        else:
            _fail(path, f"{v!r} is not a quantity; write a number with a unit, e.g. {_EXAMPLES[dim]}")
    except SpecError:
        raise
    except TablegenError as e:
        _fail(path, str(e))
    if not math.isfinite(si) or (positive and si <= 0):
        _fail(path, f"{v!r} must be above zero (absolute values)")
    return float(si)


_EXAMPLES = {"pressure": "'10bar'", "temperature": "'1200K'", "specific_volume": "'0.5m3/kg'",
             "specific_energy": "'500kJ/kg'"}


def _list(v, dim, default_unit, path, barometer_Pa=None):
    if isinstance(v, (str, int, float)) and not isinstance(v, bool):
        v = [x for x in str(v).split(",")] if isinstance(v, str) else [v]
    if not isinstance(v, (list, tuple)) or not v:
        _fail(path, f"give a non-empty list, e.g. [{_EXAMPLES[dim]}, ...]")
    out = [_value(x, dim, default_unit, f"{path}[{i}]", barometer_Pa=barometer_Pa) for i, x in enumerate(v)]
    if len(out) > 40:
        _fail(path, f"{len(out)} lines are too many to read; allowed: at most 40")
    return tuple(sorted(set(out)))


def _table(v, path: str, allowed) -> dict:
    if not isinstance(v, dict):
        _fail(path, "must be a table of keys and values")
    for k in v:
        if k not in allowed:
            _fail(f"{path}.{k}", f"unknown key; allowed: {', '.join(allowed)}")
    return v


def _number(v, path: str, lo: float, hi: float, what: str) -> float:
    if isinstance(v, bool) or not isinstance(v, (int, float)) or not math.isfinite(float(v)):
        _fail(path, f"{what} must be a number, got {v!r}")
    x = float(v)
    if not (lo < x <= hi):
        _fail(path, f"{what} {x:g} is outside the allowed range: above {lo:g} up to {hi:g}")
    return x


def _parse_step(raw, path: str, sysu: dict) -> StepSpec:
    if not isinstance(raw, dict):
        _fail(path, "each step is a table such as {step = \"compress\", P2 = \"12bar\", eta = 0.86}")
    kind = raw.get("step")
    if kind not in STEP_KINDS:
        _fail(f"{path}.step", f"{kind!r} is not a known step; allowed: {', '.join(STEP_KINDS)}")
    _table(raw, path, STEP_KEYS[kind])
    if kind in ("compress", "expand"):
        if ("P2" in raw) == ("ratio" in raw):
            _fail(path, f"a {kind} step needs exactly one of P2 (end pressure) or ratio (pressure ratio > 1)")
        if "eta" not in raw:
            _fail(f"{path}.eta", "missing; give the isentropic efficiency, 0 < eta <= 1 (1 for isentropic)")
        eta = _number(raw["eta"], f"{path}.eta", 0.0, 1.0, "isentropic efficiency")
        P2 = _value(raw["P2"], "pressure", sysu["P"], f"{path}.P2",
                    barometer_Pa=sysu["barometer"]) if "P2" in raw else None
        ratio = None
        if "ratio" in raw:
            ratio = _number(raw["ratio"], f"{path}.ratio", 1.0, 1e4, "pressure ratio")
        return StepSpec(kind, P2_Pa=P2, ratio=ratio, eta=eta, where=path)
    if kind in ("heat_p", "heat_v"):
        if ("T2" in raw) == ("q" in raw):
            _fail(path, f"a {kind} step needs exactly one of T2 (end temperature) or q (heat added per kg)")
        if "q" in raw:
            return StepSpec(kind, q_J_per_kg=_value(raw["q"], "specific_energy", sysu["h"], f"{path}.q",
                                                    positive=False), where=path)
        return StepSpec(kind, T2_K=_value(raw["T2"], "temperature", sysu["T"], f"{path}.T2"), where=path)
    if "P2" not in raw:
        _fail(f"{path}.P2", "missing; a throttle step needs the end pressure P2")
    return StepSpec(kind, P2_Pa=_value(raw["P2"], "pressure", sysu["P"], f"{path}.P2",
                                       barometer_Pa=sysu["barometer"]), where=path)


def _parse_overlay(raw, path: str, sysu: dict, n: int) -> OverlaySpec:
    _table(raw, path, OVERLAY_KEYS)
    label = raw.get("label", f"process {chr(ord('A') + n)}" if n < 26 else f"process {n + 1}")
    if not isinstance(label, str) or not label.strip() or len(label) > 60:
        _fail(f"{path}.label", "must be a text of 1 to 60 characters")
    if "start" not in raw:
        _fail(f"{path}.start", "missing; give the start state, e.g. start = {T = \"15C\", P = \"1.013bar\"}")
    start = _table(raw["start"], f"{path}.start", START_KEYS)
    for k in START_KEYS:
        if k not in start:
            _fail(f"{path}.start.{k}", "missing; the start state needs T and P")
    T1 = _value(start["T"], "temperature", sysu["T"], f"{path}.start.T")
    P1 = _value(start["P"], "pressure", sysu["P"], f"{path}.start.P", barometer_Pa=sysu["barometer"])
    steps = raw.get("steps", [])
    if not isinstance(steps, list):
        _fail(f"{path}.steps", "must be a list of step tables")
    if len(steps) > 12:
        _fail(f"{path}.steps", f"{len(steps)} steps; allowed: at most 12 per overlay")
    parsed = tuple(_parse_step(s, f"{path}.steps[{i}]", sysu) for i, s in enumerate(steps))
    return OverlaySpec(label.strip(), T1, P1, parsed, where=path)


def parse_chart(raw: dict, where: str, *, units: str = "SI",
                barometer_Pa: float = P_ATM) -> tuple[ChartSpec, ...]:
    """One chart table (kind = "both" gives two specs). See :func:`parse_charts`."""
    _table(raw, where, CHART_KEYS)
    system = _system(raw.get("units", units), f"{where}.units")
    sysu = dict(UNIT_SYSTEMS[system], barometer=barometer_Pa)
    kind = raw.get("kind", "ts")
    if kind not in ("ts", "hs", "both"):
        _fail(f"{where}.kind", f"{kind!r} is not known; allowed: ts, hs, both")
    paper = raw.get("paper", "A4")
    if not isinstance(paper, str) or paper.upper() not in PAPERS:
        _fail(f"{where}.paper", f"{paper!r} is not known; allowed: A4, A3 (landscape)")
    T_unit = raw.get("temperature_unit", T_UNITS[system][0])
    from ..core.units import unit as _unit
    try:
        T_unit = _unit(str(T_unit), "temperature").symbol
    except TablegenError:
        T_unit = None
    if T_unit not in T_UNITS[system]:
        _fail(f"{where}.temperature_unit", f"{raw.get('temperature_unit')!r} is not allowed with "
              f"{system} units; allowed: {', '.join(T_UNITS[system])}")
    pressures = None
    if "pressures" in raw:
        pressures = _list(raw["pressures"], "pressure", sysu["P"], f"{where}.pressures", barometer_Pa)
    volumes = ()
    if "volumes" in raw:
        volumes = _list(raw["volumes"], "specific_volume", sysu["v"], f"{where}.volumes")
    isotherms = None
    if "isotherms" in raw:
        isotherms = _list(raw["isotherms"], "temperature", T_unit, f"{where}.isotherms")
    T_range = None
    if "T_range" in raw:
        r = raw["T_range"]
        if isinstance(r, str):
            r = r.split(",")
        if not isinstance(r, (list, tuple)) or len(r) != 2:
            _fail(f"{where}.T_range", "give two temperatures, low and high, e.g. 300K and 1500K")
        lo = _value(r[0], "temperature", T_unit, f"{where}.T_range[0]")
        hi = _value(r[1], "temperature", T_unit, f"{where}.T_range[1]")
        if not hi > lo * 1.05:
            _fail(f"{where}.T_range", "the high temperature must exceed the low one by at least 5 %")
        T_range = (lo, hi)
    title = raw.get("title")
    if title is not None and (not isinstance(title, str) or len(title) > 100):
        _fail(f"{where}.title", "must be a text of at most 100 characters")
    if title is not None and bad_character(title):
        _fail(f"{where}.title", f"{one_line_rule()} (it holds {bad_character(title)})")
    ov = raw.get("overlays", [])
    if isinstance(ov, dict):
        ov = [ov]
    if not isinstance(ov, list):
        _fail(f"{where}.overlays", "must be a list of overlay tables")
    if len(ov) > 4:
        _fail(f"{where}.overlays", f"{len(ov)} overlays; allowed: at most 4 per chart")
    sysu_T = dict(sysu, T=T_unit)    # bare temperatures are read in the axis unit
    overlays = tuple(_parse_overlay(o, f"{where}.overlays[{i}]", sysu_T, i) for i, o in enumerate(ov))
    kinds = KINDS if kind == "both" else (kind,)
    return tuple(ChartSpec(kind=k, pressures_Pa=pressures, volumes_m3_per_kg=volumes,
                           isotherms_K=isotherms, T_range_K=T_range, paper=paper.upper(),
                           units=system, T_unit=T_unit, title=title, overlays=overlays, where=where)
                 for k in kinds)


def parse_charts(raw, where: str, *, units: str = "SI", barometer_Pa: float = P_ATM) -> tuple[ChartSpec, ...]:
    """Validate a ``charts`` spec value into ChartSpecs.

    Parameters
    ----------
    raw : list of chart tables (a single table is accepted too), as read from TOML
    where : key path of ``raw`` for messages, e.g. ``tables[0].charts``
    units : unit system of the document, "SI" or "US"; bare numbers in the
        spec are read in its units (K or °R, bar or psia, m³/kg or ft³/lbm)
    barometer_Pa : barometric pressure that gauge pressures ('12barg', '150psig')
        are read against; default 1.01325 bar

    Raises
    ------
    SpecError naming the key path, e.g. ``tables[0].charts[1].pressures``.
    """
    units = _system(units, f"{where} (unit system)")
    if isinstance(raw, dict):
        raw = [raw]
    if not isinstance(raw, list):
        _fail(where, "must be a list of chart tables, e.g. charts = [{kind = \"ts\"}]")
    out = []
    for i, c in enumerate(raw):
        out.extend(parse_chart(c, f"{where}[{i}]", units=units, barometer_Pa=barometer_Pa))
    return tuple(out)
