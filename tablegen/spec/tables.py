"""Book specs, one [[tables]] entry: its substance options, grid, extra rows and printed columns."""

from __future__ import annotations

import difflib
from dataclasses import dataclass

import numpy as np

from ..core.composition import looks_like as looks_like_composition
from ..core.errors import SpecError, TablegenError
from .document import BASES
from .grids import MAX_ROWS_PER_TABLE, fail_range, parse_grid
from .substances import NAME_RE
from .values import (UNIT_SYSTEMS, _check_keys, _choice, _fail, _get, _positive_number, _pressure, _temperature,
                     _text, _typename)

#: Column keys a table may print, in the order of docs/spec.md.
COLUMN_KEYS = ("T", "cp", "cv", "k", "h", "u", "s0", "Pr", "vr", "a", "g0", "cp_mean_h", "cp_mean_s")
DEFAULT_COLUMNS = ("T", "cp", "cv", "k", "h", "u", "s0", "Pr", "vr", "a")
#: Columns printed with a number of significant digits rather than decimals by default; the
#: count is chosen from the column's uncertainty (book.stated.auto_digits), this one where no
#: uncertainty is stated (every row extrapolated).
SIGNIFICANT_BY_DEFAULT = {"Pr": 5, "vr": 5}

DEFAULT_T_UNITS = {"SI": ("K", "°C"), "US": ("°R", "°F"), "both": ("°C", "°F")}


@dataclass(frozen=True, slots=True)
class ColumnSpec:
    """One printed column: property key, unit system, unit, and its digits.

    Exactly one of ``decimals`` (places after the point) and ``significant``
    (significant digits) is set.
    """

    key: str
    system: str          # "SI" or "US"
    unit: str            # unit symbol as printed (temperature unit for T)
    decimals: int | None
    significant: int | None
    auto: bool = False   # digits not set by the spec: the book chooses them from the uncertainty


@dataclass(frozen=True, slots=True)
class ExtraRow:
    T_K: float
    label: str


@dataclass(frozen=True, slots=True, eq=False)
class TableSpec:
    name: str
    title: str
    substance_ref: str
    substance: object            # Substance with datum, P_ref and anchor applied
    T_K: np.ndarray              # sorted grid, extra rows merged in
    extra: np.ndarray            # bool mask: row is an extra row
    extra_rows: tuple            # ExtraRow
    grid: dict                   # normalised description of the grid
    columns: tuple               # ColumnSpec
    units: str
    basis: str
    temperature_units: tuple
    T_mean_ref_K: float
    extrapolate: bool
    charts: tuple = ()           # ChartSpec (tablegen.spec.chart)
    composition_u: tuple | None = None   # (basis, {species id: standard uncertainty}) of the fractions
    csv_name: str = ""           # file name of its CSV (tablegen.spec.editions.csv_names); "" : <name>.csv
    shared_by: tuple = ()        # editions whose CSV of this table is that same file


TABLE_KEYS = ("name", "title", "substance", "grid", "extra_rows", "columns", "decimals", "significant",
              "units", "basis", "temperature_units", "datum", "P_ref", "anchor", "mean_cp_from",
              "extrapolate", "charts")
DEFAULT_KEYS = tuple(k for k in TABLE_KEYS if k not in ("name", "title", "substance", "charts"))


def _datum(v, where):
    from ..thermo.substance import Datum
    from ..core.units import quantity
    if isinstance(v, str):
        t = v.strip()
        if t == "formation":
            return Datum("formation")
        if t == "sensible":
            return Datum("sensible")
        _fail(where, f"{v!r} is not known; allowed: \"formation\", \"sensible\", "
                     f"or a table {{kind = \"sensible\", T = \"0 °C\", h = \"0 kJ/kg\"}}")
    if isinstance(v, dict):
        _check_keys(v, ("kind", "T", "h"), where)
        kind = _choice(v, "kind", ("formation", "sensible"), where, "sensible")
        if kind == "formation":
            if "T" in v or "h" in v:
                _fail(where, "a formation datum takes no T or h (it is fixed at 298.15 K)")
            return Datum("formation")
        T = _temperature(v["T"], f"{where}.T") if "T" in v else 298.15
        h = 0.0
        if "h" in v:
            hv = _get(v, "h", str, where)
            try:
                h = quantity(hv, "specific_energy", "enthalpy")
            except TablegenError as e:
                _fail(f"{where}.h", str(e))
        return Datum("sensible", T, h)
    _fail(where, f"must be \"formation\", \"sensible\" or a table, not {_typename(v)}")


def _anchor(v, where):
    from ..thermo.substance import Anchor
    if not isinstance(v, dict):
        _fail(where, f"must be a table {{T = \"298.15 K\", Pr = 1.0, vr = 1.0}}, not {_typename(v)}")
    _check_keys(v, ("T", "Pr", "vr"), where)
    vals = {}
    if "T" in v:
        vals["T_K"] = _temperature(v["T"], f"{where}.T")
    for k in ("Pr", "vr"):
        if k in v:
            vals[k] = _positive_number(v, k, where, None)
    return Anchor(**vals)


def _digits_map(raw, key, where, lo, hi) -> dict:
    m = _get(raw, key, dict, where, {})
    for k, v in m.items():
        w = f"{where}.{key}.{k}"
        if k not in COLUMN_KEYS:
            close = difflib.get_close_matches(k, list(COLUMN_KEYS), n=1, cutoff=0.5)
            hint = f"did you mean {close[0]!r}? " if close else ""
            _fail(w, f"unknown column; {hint}allowed: {', '.join(COLUMN_KEYS)}")
        if isinstance(v, bool) or not isinstance(v, int):
            _fail(w, f"must be an integer, not {_typename(v)}")
        if not lo <= v <= hi:
            _fail(w, f"{v} is out of range; allowed: {lo} to {hi}")
    return dict(m)


def _temperature_units(raw, where, system):
    from ..core.units import unit
    v = _get(raw, "temperature_units", list, where, list(DEFAULT_T_UNITS[system]))
    if not 1 <= len(v) <= 2:
        _fail(f"{where}.temperature_units", f"has {len(v)} entries; give one or two temperature units")
    out = []
    for i, u in enumerate(v):
        if not isinstance(u, str):
            _fail(f"{where}.temperature_units[{i}]", f"must be a unit string, not {_typename(u)}")
        try:
            out.append(unit(u, "temperature").symbol)
        except TablegenError as e:
            _fail(f"{where}.temperature_units[{i}]", str(e))
    if len(set(out)) != len(out):
        _fail(f"{where}.temperature_units", "lists one unit twice")
    return tuple(out)


def _columns(raw, where, system, basis, t_units, decimals, significant) -> tuple:
    from .columns import default_decimals, unit_for
    cols = _get(raw, "columns", list, where, list(DEFAULT_COLUMNS))
    if not cols:
        _fail(f"{where}.columns", "is empty; give at least one column besides T")
    seen = set()
    for i, c in enumerate(cols):
        w = f"{where}.columns[{i}]"
        if not isinstance(c, str):
            _fail(w, f"must be a column key string, not {_typename(c)}")
        if c not in COLUMN_KEYS:
            close = difflib.get_close_matches(c, list(COLUMN_KEYS), n=1, cutoff=0.5)
            hint = f"did you mean {close[0]!r}? " if close else ""
            _fail(w, f"{c!r} is not a column; {hint}allowed: {', '.join(COLUMN_KEYS)}")
        if c in seen:
            _fail(w, f"{c!r} is listed twice")
        seen.add(c)
    if seen == {"T"}:
        _fail(f"{where}.columns", "holds only T; give at least one property column")
    if "T" not in seen:
        cols = ["T", *cols]
    for k in decimals:
        if k in significant:
            _fail(f"{where}.significant.{k}", "is also given in decimals; give one of the two per column")
    systems = ("SI", "US") if system == "both" else (system,)
    out = []
    for c in cols:
        if c == "T":
            for u in t_units:
                d = decimals.get("T")
                out.append(ColumnSpec("T", "SI" if u in ("K", "°C") else "US", u,
                                      d if d is not None else -1, None))
            continue
        # dimensionless columns are the same in both systems: print them once
        for s in (systems[:1] if c in ("k", "Pr", "vr") else systems):
            u = unit_for(c, s, basis)
            if c in significant:
                out.append(ColumnSpec(c, s, u, None, significant[c]))
            elif c in decimals:
                out.append(ColumnSpec(c, s, u, decimals[c], None))
            elif c in SIGNIFICANT_BY_DEFAULT:   # the count is chosen from U (book.stated.auto_digits)
                out.append(ColumnSpec(c, s, u, None, SIGNIFICANT_BY_DEFAULT[c], auto=True))
            else:
                out.append(ColumnSpec(c, s, u, default_decimals(c, s, basis), None, auto=True))
    return tuple(out)


def _T_decimals(T_K: np.ndarray, unit_symbol: str) -> int:
    """Fewest decimals (0-3) that print every grid temperature in this unit exactly."""
    from ..core.units import unit
    v = unit(unit_symbol, "temperature").from_si(T_K)
    for d in range(0, 4):
        if np.all(np.abs(np.round(v, d) - v) <= 1e-7 * np.maximum(1.0, np.abs(v))):
            return d
    return 3


def _table_substance(raw, where, subs, source, data):
    """The table's substance reference and the substance it names."""
    from ..calc import names as api
    ref = _get(raw, "substance", str, where, required=True).strip()
    if not ref:
        _fail(f"{where}.substance", "must not be empty")
    if ref in subs:
        sub = subs[ref]
    else:
        try:
            sub = api.substance(ref, source=source, data=data)
        except TablegenError as e:
            _fail(f"{where}.substance", f"{e}; or define it under [substances.{ref}]"
                  if not looks_like_composition(ref) else str(e))
    return ref, sub


def _extra_rows(merged, where, T):
    """The extra rows, merged into the grid: (extras, sorted T_K, bool mask of the extra rows)."""
    extras = []
    ex = _get(merged, "extra_rows", list, where, [])
    for i, e in enumerate(ex):
        w = f"{where}.extra_rows[{i}]"
        if isinstance(e, str):
            extras.append(ExtraRow(_temperature(e, w), ""))
        elif isinstance(e, dict):
            _check_keys(e, ("T", "label"), w)
            extras.append(ExtraRow(_temperature(_get(e, "T", str, w, required=True), f"{w}.T"),
                                   _text(e, "label", w, max_len=40)))
        else:
            _fail(w, f"must be a temperature string or a table {{T = ..., label = ...}}, not {_typename(e)}")
    allT = np.concatenate([T, [e.T_K for e in extras]]) if extras else T
    flag = np.concatenate([np.zeros(T.size, bool), np.ones(len(extras), bool)])
    order = np.argsort(allT, kind="stable")
    allT, flag = allT[order], flag[order]
    # drop duplicates (an extra row on a grid point marks that row)
    keep = np.ones(allT.size, bool)
    if allT.size > 1:
        dup = np.abs(np.diff(allT)) <= 1e-9 * allT[1:]
        keep[1:] = ~dup
        for j in np.nonzero(dup)[0]:
            flag[j] = flag[j] or flag[j + 1]
    allT, flag = allT[keep], flag[keep]
    return extras, allT, flag


def parse_table(raw, where, defaults, doc, subs, source, data) -> TableSpec:
    from ..thermo.substance import default_datum
    if not isinstance(raw, dict):
        _fail(where, f"must be a table ([[tables]]), not {_typename(raw)}")
    _check_keys(raw, TABLE_KEYS, where)
    merged = {**defaults, **raw}
    name = _get(raw, "name", str, where, required=True)
    if not NAME_RE.match(name):
        _fail(f"{where}.name", f"{name!r}: a table name is 1-64 letters, digits, '.', '_' or '-' "
                               f"(it names the CSV file), starting with a letter or digit")
    title = _text(raw, "title", where, default=name)
    ref, sub = _table_substance(raw, where, subs, source, data)
    system = _choice(merged, "units", UNIT_SYSTEMS, where, doc.units)
    basis = _choice(merged, "basis", BASES, where, doc.basis)
    try:
        # no datum key: the rule of state, process and charts (thermo.substance.default_datum)
        datum = _datum(merged["datum"], f"{where}.datum") if "datum" in merged else \
            default_datum(sub, reacting=None, basis=basis)
        P_ref = _pressure(merged["P_ref"], f"{where}.P_ref") if "P_ref" in merged else 1e5
        anchor = _anchor(merged["anchor"], f"{where}.anchor") if "anchor" in merged else None
        sub = sub.with_options(datum=datum, P_ref_Pa=P_ref, anchor=anchor)
    except SpecError:
        raise
    except TablegenError as e:
        _fail(where, str(e))
    extrapolate = _get(merged, "extrapolate", bool, where, False) or doc.extrapolate_all
    t_units = _temperature_units(merged, where, system)
    decimals = _digits_map(merged, "decimals", where, 0, 9)
    significant = _digits_map(merged, "significant", where, 2, 12)
    if "T" in significant:
        _fail(f"{where}.significant.T", "temperatures take decimals, not significant digits")
    cols = _columns(merged, where, system, basis, t_units, decimals, significant)
    keys = [c.key for c in cols]
    if "grid" not in merged:
        _fail(f"{where}.grid", "is required: give segments, a list, or start/stop with a tolerance")
    T, grid = parse_grid(merged["grid"], f"{where}.grid", sub, keys, extrapolate)
    extras, allT, flag = _extra_rows(merged, where, T)
    if allT.size > MAX_ROWS_PER_TABLE:
        _fail(f"{where}.grid", f"gives {allT.size} rows; a table has at most {MAX_ROWS_PER_TABLE} rows")
    try:
        sub.check_T(allT, extrapolate)
    except TablegenError as e:
        fail_range(f"{where}.grid", e)
    try:                 # finite results only: an anchor or an extrapolation may not overflow
        sub.properties(allT, extrapolate=extrapolate, molar_only=True)
    except TablegenError as e:
        fail_range(where, e)
    # T decimals: fewest that print the grid exactly, unless given
    fixed = []
    for c in cols:
        if c.key == "T" and c.decimals == -1:
            c = ColumnSpec("T", c.system, c.unit, _T_decimals(allT, c.unit), None)
        fixed.append(c)
    mref = merged.get("mean_cp_from")
    if mref is None:
        T_mean = datum.T_ref_K if datum.kind == "sensible" else 298.15
    else:
        T_mean = _temperature(mref, f"{where}.mean_cp_from")
    charts = ()
    if "charts" in raw:
        try:
            from .chart import parse_charts
        except ImportError:
            _fail(f"{where}.charts", "charts are not available in this build of tablegen")
        charts = tuple(parse_charts(raw["charts"], f"{where}.charts", units=system, barometer_Pa=doc.barometer))
    return TableSpec(name=name, title=title, substance_ref=ref, substance=sub, T_K=allT, extra=flag,
                     extra_rows=tuple(extras), grid=grid, columns=tuple(fixed), units=system, basis=basis,
                     temperature_units=t_units, T_mean_ref_K=float(T_mean), extrapolate=bool(extrapolate),
                     charts=charts)

