"""Table-book specs: a TOML file parsed and validated once into frozen dataclasses.

Every rule broken names the key path and what is allowed, e.g.
``tables[2].grid.step: must be > 0``, and raises :class:`SpecError` (exit 2)
before anything is computed or written. Downstream code (the table model and
the renderers) sees only the dataclasses here, never raw TOML.

The format is documented field by field in docs/spec.md.
"""

from __future__ import annotations

import datetime as _dt
import difflib
import math
import re
from dataclasses import dataclass, field, replace
from pathlib import Path

import numpy as np

from ..core.composition import looks_like as looks_like_composition
from ..core.errors import DataRangeError, SpecError, TablegenError
from ..core.rounding import round_steps_from_top
from .values import (  # noqa: F401  (the value readers of every spec table, kept importable here)
    ORIENTATIONS, PAPER_ALIASES, PAPERS, UNIT_SYSTEMS, _as_tuple, _barometer, _check_keys, _choice, _fail, _get,
    _paper, _path, _positive_number, _pressure, _temp_unit, _temperature, _text, _typename)
from ..core.texts import bad_character
from ..core.units import P_ATM

#: Largest number of rows one table may have. A printed table of 20 000 rows
#: is already some 400 A4 pages; more is a mistake in the grid, not a book.
MAX_ROWS_PER_TABLE = 20000
#: Largest number of rows in one book (all tables together).
MAX_ROWS_PER_BOOK = 100000
#: Largest number of tables in one book.
MAX_TABLES = 200

BASES = ("mass", "molar", "volumetric")

#: Column keys a table may print, in the order of docs/spec.md.
COLUMN_KEYS = ("T", "cp", "cv", "k", "h", "u", "s0", "Pr", "vr", "a", "g0", "cp_mean_h", "cp_mean_s")
DEFAULT_COLUMNS = ("T", "cp", "cv", "k", "h", "u", "s0", "Pr", "vr", "a")
#: Columns printed with a number of significant digits rather than decimals by default; the
#: count is chosen from the column's uncertainty (book.stated.auto_digits), this one where no
#: uncertainty is stated (every row extrapolated).
SIGNIFICANT_BY_DEFAULT = {"Pr": 5, "vr": 5}

#: Named reference conditions of the volumetric basis: name -> (T_K, P_Pa, text).
REFERENCE_CONDITIONS = {
    "normal": (273.15, 101325.0, "normal conditions, 0 °C and 101.325 kPa (DIN 1343)"),
    "standard-15C": (288.15, 101325.0, "standard conditions, 15 °C and 101.325 kPa (ISO 13443)"),
    # 14.696 psia x 6894.757293168 Pa/psia (exact psi, see tablegen.core.units)
    "standard-60F": ((60 + 459.67) * 5 / 9, 14.696 * 6894.757293168361,
                     "standard conditions, 60 °F and 14.696 psia"),
}

DEFAULT_T_UNITS = {"SI": ("K", "°C"), "US": ("°R", "°F"), "both": ("°C", "°F")}

_NAME_RE = re.compile(r"^[A-Za-z0-9][A-Za-z0-9_.-]{0,63}$")


# ---------------------------------------------------------------- dataclasses
@dataclass(frozen=True, slots=True)
class Reference:
    """Reference conditions of the volumetric basis (normal or standard m³, ft³)."""

    name: str
    T_K: float
    P_Pa: float
    text: str


@dataclass(frozen=True, slots=True)
class Document:
    title: str
    number: str
    revision: str
    issue_date: str
    organisation: str
    prepared_by: str
    checked_by: str
    approved_by: str
    paper: str
    orientation: str
    units: str
    basis: str
    reference: Reference
    source: str | None
    subtitle: str
    max_pressure_Pa: float = 1e5      # largest pressure the values are used at (ideal-gas term of U)
    uncertainty_columns: bool = False  # U_<key> columns in the CSV files
    validity_columns: bool = False     # Z and real-gas departure columns in the CSV files
    csv_comments: bool = False         # "#" comment lines above the CSV header (off: plain CSV)
    chart_placement: str = "after-table"  # or "grouped": all chart pages after the last table
    barometer_Pa: float | None = None  # barometric pressure of gauge values (None: not given, 1.01325 bar)
    extrapolate_all: bool = False      # every table extrapolates: the command line asked (build --extrapolate)

    @property
    def barometer(self) -> float:
        """Barometric pressure that the spec's gauge pressures are read against, Pa."""
        return P_ATM if self.barometer_Pa is None else self.barometer_Pa


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


@dataclass(frozen=True, slots=True, eq=False)
class BookSpec:
    name: str
    document: Document
    tables: tuple
    normalised: dict             # the spec as JSON-ready data, defaults applied
    data_paths: tuple = ()       # extra --data / [data] files
    substances: dict = field(default_factory=dict)
    edition: object = None       # tablegen.spec.editions.Edition of this build (None: no [editions], no --paper)
    all_tables: tuple = ()       # every table of the spec (an edition may print fewer): the data they use
                                 # enters the fingerprint every edition carries
    editions: tuple = ()         # names of every edition the spec declares, in its order


# ---------------------------------------------------------------- helpers
DOCUMENT_KEYS = ("title", "subtitle", "number", "revision", "issue_date", "organisation",
                 "prepared_by", "checked_by", "approved_by", "paper", "orientation", "units",
                 "basis", "reference", "source", "max_pressure", "uncertainty_columns", "validity_columns",
                 "chart_placement", "csv_comments", "barometer")


def _document(raw, where="document") -> Document:
    if not isinstance(raw, dict):
        _fail(where, f"must be a table ([document]), not {_typename(raw)}")
    _check_keys(raw, DOCUMENT_KEYS, where)
    date = raw.get("issue_date")
    if date is None:
        date = _dt.datetime.now(_dt.timezone.utc).date().isoformat()
    elif isinstance(date, _dt.date) and not isinstance(date, _dt.datetime):
        date = date.isoformat()
    elif isinstance(date, str):
        try:
            date = _dt.date.fromisoformat(date.strip()).isoformat()
        except ValueError:
            _fail(f"{where}.issue_date", f"{date!r} is not a date; write YYYY-MM-DD, e.g. 2026-11-30")
    else:
        _fail(f"{where}.issue_date", f"must be a date YYYY-MM-DD, not {_typename(date)}")
    baro = _barometer(raw.get("barometer"), f"{where}.barometer")
    return Document(
        title=_text(raw, "title", where, required=True),
        subtitle=_text(raw, "subtitle", where),
        number=_text(raw, "number", where, required=True, max_len=60),
        revision=_text(raw, "revision", where, required=True, max_len=20),
        issue_date=date,
        organisation=_text(raw, "organisation", where),
        prepared_by=_text(raw, "prepared_by", where, max_len=80),
        checked_by=_text(raw, "checked_by", where, max_len=80),
        approved_by=_text(raw, "approved_by", where, max_len=80),
        paper=_paper(raw, where, "A4"),
        orientation=_choice(raw, "orientation", ORIENTATIONS, where, "portrait"),
        units=_choice(raw, "units", UNIT_SYSTEMS, where, "SI"),
        basis=_choice(raw, "basis", BASES, where, "mass"),
        reference=_reference(raw.get("reference", "normal"), f"{where}.reference"),
        source=_get(raw, "source", str, where, None),
        max_pressure_Pa=_pressure(raw.get("max_pressure", "1 bar"), f"{where}.max_pressure", baro),
        uncertainty_columns=_get(raw, "uncertainty_columns", bool, where, False),
        validity_columns=_get(raw, "validity_columns", bool, where, False),
        csv_comments=_get(raw, "csv_comments", bool, where, False),
        chart_placement=_choice(raw, "chart_placement", ("after-table", "grouped"), where, "after-table"),
        barometer_Pa=None if "barometer" not in raw else baro,
    )


def _reference(v, where) -> Reference:
    if isinstance(v, str):
        if v not in REFERENCE_CONDITIONS:
            close = difflib.get_close_matches(v, list(REFERENCE_CONDITIONS), n=1, cutoff=0.5)
            hint = f"did you mean {close[0]!r}? " if close else ""
            _fail(where, f"{v!r} is not known; {hint}allowed: {', '.join(REFERENCE_CONDITIONS)}, "
                         f"or a table {{name = ..., T = ..., P = ...}}")
        T, P, text = REFERENCE_CONDITIONS[v]
        return Reference(v, T, P, text)
    if isinstance(v, dict):
        _check_keys(v, ("name", "T", "P"), where)
        name = _text(v, "name", where, required=True, max_len=40)
        T = _temperature(_get(v, "T", str, where, required=True), f"{where}.T")
        P = _pressure(_get(v, "P", str, where, required=True), f"{where}.P")
        return Reference(name, T, P, f"{name}, {T:g} K and {P / 1000:g} kPa")
    _fail(where, f"must be a name ({', '.join(REFERENCE_CONDITIONS)}) or a table, not {_typename(v)}")


# ---------------------------------------------------------------- substances
SUBSTANCE_KEYS = ("name", "of", "mixture", "basis", "combustion", "fraction_uncertainty")


def _fraction_u(raw, comp, where, source, data) -> dict:
    """fraction_uncertainty = {SPECIES = u}: standard uncertainties of the given fractions."""
    from ..data.library import library
    if not isinstance(raw, dict) or not raw:
        _fail(where, "must be a table of species = standard uncertainty of its fraction, e.g. {CH4 = 0.005}")
    out = {}
    for k, u in raw.items():
        if k not in comp:
            _fail(f"{where}.{k}", f"is not a component of this mixture; allowed: {', '.join(comp)}")
        if isinstance(u, bool) or not isinstance(u, (int, float)) or not (math.isfinite(u) and 0 <= u < 1):
            _fail(f"{where}.{k}", f"must be a standard uncertainty of a fraction, 0 <= u < 1, not {u!r}")
        out[library(tuple(data)).record(k, source=source).id] = float(u)
    return out


def _substances(raw, where, source, data, comp_u=None) -> dict:
    """[substances.ID] tables -> {ID: Substance} (before per-table options).

    ``comp_u`` (a dict) receives {ID: (basis, {species id: u})} for mixtures that
    state the uncertainty of their fractions.
    """
    from ..calc import names as api
    comp_u = {} if comp_u is None else comp_u
    if not isinstance(raw, dict):
        _fail(where, f"must be a table of named substances, not {_typename(raw)}")
    out = {}
    for sid, entry in raw.items():
        w = f"{where}.{sid}"
        if not _NAME_RE.match(sid):
            _fail(w, "a substance id is 1-64 letters, digits, '.', '_' or '-', starting with a letter or digit")
        if not isinstance(entry, dict):
            _fail(w, f"must be a table, not {_typename(entry)}")
        _check_keys(entry, SUBSTANCE_KEYS, w)
        if "fraction_uncertainty" in entry and "mixture" not in entry:
            _fail(f"{w}.fraction_uncertainty", "applies only to 'mixture' (the fractions it qualifies)")
        given = [k for k in ("of", "mixture", "combustion") if k in entry]
        if len(given) != 1:
            _fail(w, "give exactly one of 'of' (a species, alias or shipped mixture), "
                     "'mixture' (fractions) or 'combustion'")
        name = _text(entry, "name", w, default="")
        try:
            if "of" in entry:
                of = _get(entry, "of", str, w)
                if "basis" in entry:
                    _fail(f"{w}.basis", "applies only to 'mixture'")
                sub = api.substance(of, source=source, data=data)
            elif "mixture" in entry:
                comp = _get(entry, "mixture", dict, w)
                if not comp:
                    _fail(f"{w}.mixture", "is empty; give species = fraction pairs, e.g. {CH4 = 0.9, N2 = 0.1}")
                for k, x in comp.items():
                    if isinstance(x, bool) or not isinstance(x, (int, float)):
                        _fail(f"{w}.mixture.{k}", f"must be a number (a fraction), not {_typename(x)}")
                    if not (math.isfinite(x) and 0 <= x <= 1):
                        _fail(f"{w}.mixture.{k}", f"fraction {x!r} must lie between 0 and 1")
                total = sum(comp.values())
                if abs(total - 1.0) > 1e-6:
                    _fail(f"{w}.mixture", f"fractions sum to {total:.9g}; they must sum to 1 within 1e-6")
                basis = _choice(entry, "basis", ("mole", "mass"), w, "mole")
                sub = api.mixture(dict(comp), basis=basis, source=source, data=data, id=sid,
                                  name=name or sid)
                if "fraction_uncertainty" in entry:
                    comp_u[sid] = (basis, _fraction_u(entry["fraction_uncertainty"], comp,
                                                      f"{w}.fraction_uncertainty", source, data))
            else:
                sub = _combustion(entry["combustion"], f"{w}.combustion", source=source, data=data)
                sub = replace(sub, id=sid, name=name or sub.name, _cache={})
        except SpecError:
            raise
        except TablegenError as e:
            _fail(w, str(e))
        if name and "of" in entry:
            sub = replace(sub, name=name, _cache={})
        out[sid] = sub
    return out


def _combustion(raw, where, *, source=None, data=()):
    """Combustion products of a fuel (or a measured flue-gas analysis), by tablegen.calc.burn."""
    from ..calc import flue
    if not isinstance(raw, dict):
        _fail(where, f"must be a table, not {_typename(raw)}")
    return flue.substance_from_spec(raw, where, source=source, data=data)


# ---------------------------------------------------------------- grids
GRID_KEYS = ("segments", "list", "start", "stop", "tolerance")
SEGMENT_KEYS = ("start", "stop", "step")


def _segment(seg, where) -> tuple[np.ndarray, dict]:
    if not isinstance(seg, dict):
        _fail(where, f"must be a table {{start = ..., stop = ..., step = ...}}, not {_typename(seg)}")
    _check_keys(seg, SEGMENT_KEYS, where)
    a, ua = _temp_unit(_get(seg, "start", str, where, required=True), f"{where}.start")
    if not ua.to_si(a) > 0:
        _fail(f"{where}.start", f"is {ua.to_si(a):g} K; temperatures must be above 0 K")
    b, ub = _temp_unit(_get(seg, "stop", str, where, required=True), f"{where}.stop")
    st, us = _temp_unit(_get(seg, "step", str, where, required=True), f"{where}.step")
    if ub.symbol != ua.symbol:
        _fail(f"{where}.stop", f"is in {ub.symbol} but start is in {ua.symbol}; give both in one unit")
    if not (st > 0):
        _fail(f"{where}.step", f"must be > 0, got {st:g}")
    # A step is a temperature difference: 10 °C = 10 K, 10 °F = 10 °R.
    step_native = st * us.factor / ua.factor
    for val, key in ((a, "start"), (b, "stop")):
        if not ua.to_si(val) > 0:
            _fail(f"{where}.{key}", f"is {ua.to_si(val):g} K; temperatures must be above 0 K")
    if not b > a:
        _fail(f"{where}.stop", f"must be above start ({b:g} {ua.symbol} <= {a:g} {ua.symbol})")
    n = (b - a) / step_native
    if n + 1 > MAX_ROWS_PER_TABLE:
        _fail(f"{where}.step", f"gives {int(n) + 1} rows; a table has at most {MAX_ROWS_PER_TABLE} rows")
    count = int(math.floor(n + 1e-9)) + 1
    vals = a + step_native * np.arange(count)
    if abs(vals[-1] - b) > 1e-9 * max(1.0, abs(b)):
        vals = np.append(vals, b)
    T = ua.to_si(vals)
    return T, {"start_K": ua.to_si(a), "stop_K": ua.to_si(b), "step_K": st * us.factor,
               "unit": ua.symbol, "rows": int(T.size)}


def _grid(raw, where, sub, columns_for_auto, extrapolate):
    if not isinstance(raw, dict):
        _fail(where, f"must be a table with 'segments', 'list', or 'start', 'stop' and 'tolerance', "
                     f"not {_typename(raw)}")
    _check_keys(raw, GRID_KEYS, where)
    kinds = [k for k in ("segments", "list", "tolerance") if k in raw]
    if len(kinds) != 1:
        _fail(where, "give exactly one of 'segments' (start, stop, step), 'list' (temperatures) "
                     "or 'tolerance' (with start and stop)")
    kind = kinds[0]
    if kind != "tolerance":
        for k in ("start", "stop"):
            if k in raw:
                _fail(f"{where}.{k}", "belongs to an automatic grid (with 'tolerance'); "
                                      "inside 'segments' give start, stop, step per segment")
    if kind == "segments":
        segs = _get(raw, "segments", list, where)
        if not segs:
            _fail(f"{where}.segments", "is empty; give at least one {start, stop, step}")
        parts, desc = [], []
        for i, s in enumerate(segs):
            T, d = _segment(s, f"{where}.segments[{i}]")
            parts.append(T)
            desc.append(d)
            if sum(p.size for p in parts) > MAX_ROWS_PER_TABLE:
                _fail(f"{where}.segments", f"give more than {MAX_ROWS_PER_TABLE} rows; "
                                           f"a table has at most {MAX_ROWS_PER_TABLE} rows")
        return np.concatenate(parts), {"kind": "segments", "segments": desc}
    if kind == "list":
        lst = _get(raw, "list", list, where)
        if not lst:
            _fail(f"{where}.list", "is empty; give at least one temperature")
        if len(lst) > MAX_ROWS_PER_TABLE:
            _fail(f"{where}.list", f"has {len(lst)} rows; a table has at most {MAX_ROWS_PER_TABLE} rows")
        T = np.array([_temperature(v, f"{where}.list[{i}]") for i, v in enumerate(lst)])
        return T, {"kind": "list", "T_K": T.tolist()}
    # automatic step from an interpolation tolerance
    tol = _positive_number(raw, "tolerance", where, None)
    if tol >= 0.1:
        _fail(f"{where}.tolerance", f"{tol:g} is a relative error and must be below 0.1 (e.g. 1e-4)")
    a, ua = _temp_unit(_get(raw, "start", str, where, required=True), f"{where}.start")
    b, ub = _temp_unit(_get(raw, "stop", str, where, required=True), f"{where}.stop")
    if ub.symbol != ua.symbol:
        _fail(f"{where}.stop", f"is in {ub.symbol} but start is in {ua.symbol}; give both in one unit")
    if not ua.to_si(a) > 0:
        _fail(f"{where}.start", f"is {ua.to_si(a):g} K; temperatures must be above 0 K")
    if not b > a:
        _fail(f"{where}.stop", f"must be above start ({b:g} {ua.symbol} <= {a:g} {ua.symbol})")
    step, worst = auto_step(sub, a, b, ua, columns_for_auto, tol, extrapolate, where)
    n = int(math.floor((b - a) / step + 1e-9)) + 1
    vals = a + step * np.arange(n)
    if abs(vals[-1] - b) > 1e-9 * max(1.0, abs(b)):
        vals = np.append(vals, b)
    T = ua.to_si(vals)
    return T, {"kind": "auto", "start_K": ua.to_si(a), "stop_K": ua.to_si(b), "unit": ua.symbol,
               "tolerance": tol, "step": step, "step_K": step * ua.factor,
               "worst_interpolation_error": worst, "rows": int(T.size)}


#: How a spec asks for extrapolation, named where a temperature is outside the data range
#: (build and compare read a spec and both take --extrapolate for every table).
EXTRAPOLATE_HOW = "extrapolate = true in this table or in [defaults], or --extrapolate for every table"


def _fail_range(where: str, e: TablegenError):
    """_fail with a range error, naming the spec's way to extrapolate."""
    _fail(where, str(e.offering(EXTRAPOLATE_HOW) if isinstance(e, DataRangeError) else e))


def auto_step(sub, a, b, ua, keys, tol, extrapolate, where):
    """Largest round step (in the grid's unit) for which linear interpolation between
    adjacent rows stays within ``tol`` for every printed column.

    The error at each interval midpoint, |f(mid) - (f(lo) + f(hi))/2|, is taken
    relative to max(|f(mid)|, span of f over the table) so that columns passing
    through zero (sensible enthalpy) are judged against their range. The midpoint
    of linear interpolation is where the error of a smooth function peaks.
    """
    from .columns import column_values_SI
    keys = [k for k in keys if k != "T"] or ["cp"]
    for step in round_steps_from_top(b - a):
        n = int(math.floor((b - a) / step + 1e-9)) + 1
        if n > MAX_ROWS_PER_TABLE:
            break
        vals = a + step * np.arange(n)
        if abs(vals[-1] - b) > 1e-9 * max(1.0, abs(b)):
            vals = np.append(vals, b)
        T = ua.to_si(vals)
        if T.size < 2:
            continue
        mid = 0.5 * (T[1:] + T[:-1])
        try:
            fT = column_values_SI(sub, T, keys, extrapolate=extrapolate)
            fm = column_values_SI(sub, mid, keys, extrapolate=extrapolate)
        except TablegenError as e:
            _fail_range(where, e)
        worst = 0.0
        for k in keys:
            y, ym = fT[k], fm[k]
            scale = max(float(np.max(y) - np.min(y)), 1e-300)
            err = np.abs(ym - 0.5 * (y[1:] + y[:-1])) / np.maximum(np.abs(ym), scale)
            worst = max(worst, float(np.max(err)))
        if worst <= tol:
            return step, worst
    _fail(f"{where}.tolerance", f"{tol:g} needs more than {MAX_ROWS_PER_TABLE} rows "
                                f"(a table has at most {MAX_ROWS_PER_TABLE}); loosen it or narrow the range")


# ---------------------------------------------------------------- tables
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


def _table(raw, where, defaults, doc, subs, source, data) -> TableSpec:
    from ..calc import names as api
    from ..thermo.substance import default_datum
    if not isinstance(raw, dict):
        _fail(where, f"must be a table ([[tables]]), not {_typename(raw)}")
    _check_keys(raw, TABLE_KEYS, where)
    merged = {**defaults, **raw}
    name = _get(raw, "name", str, where, required=True)
    if not _NAME_RE.match(name):
        _fail(f"{where}.name", f"{name!r}: a table name is 1-64 letters, digits, '.', '_' or '-' "
                               f"(it names the CSV file), starting with a letter or digit")
    title = _text(raw, "title", where, default=name)
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
    T, grid = _grid(merged["grid"], f"{where}.grid", sub, keys, extrapolate)
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
    if allT.size > MAX_ROWS_PER_TABLE:
        _fail(f"{where}.grid", f"gives {allT.size} rows; a table has at most {MAX_ROWS_PER_TABLE} rows")
    try:
        sub.check_T(allT, extrapolate)
    except TablegenError as e:
        _fail_range(f"{where}.grid", e)
    try:                 # finite results only: an anchor or an extrapolation may not overflow
        sub.properties(allT, extrapolate=extrapolate, molar_only=True)
    except TablegenError as e:
        _fail_range(where, e)
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


# ---------------------------------------------------------------- book
TOP_KEYS = ("document", "data", "substances", "defaults", "tables", "editions")


def load(path, *, source: str | None = None, data=(), edition: str | None = None,
         paper: str | None = None, extrapolate: bool = False) -> BookSpec:
    """Read and validate a spec file: the book as its first edition prints it (or the
    edition named), or as written when the spec declares no editions.

    Parameters
    ----------
    path : the TOML spec
    source, data : --source and --data from the command line (the spec's own
        [data] section adds to them; the command line's source wins)
    edition, paper : as :func:`load_editions`
    extrapolate : --extrapolate from the command line: every table may extrapolate
        (as ``extrapolate = true`` in each), and the document says so

    Raises
    ------
    SpecError naming the key path and the rule, for any broken rule.
    """
    return load_editions(path, source=source, data=data, editions=edition, paper=paper,
                         extrapolate=extrapolate)[0]


def load_editions(path, *, source: str | None = None, data=(), editions=None,
                  paper: str | None = None, extrapolate: bool = False) -> tuple:
    """Every edition of a spec (or those named, comma-separated) as a BookSpec each.

    Every edition is validated, whichever are asked for, so a spec that builds one
    edition builds them all. ``paper`` prints the editions on another paper for once
    (``--paper``); it is recorded in each edition and leaves the fingerprint alone.
    """
    p = Path(path)
    raw = read_toml(p, missing="spec file not found")
    return parse_editions(raw, name=book_name(p), base=p.parent, source=source, data=data, editions=editions,
                          paper=paper, extrapolate=extrapolate)


def parse_editions(raw: dict, *, name: str, base: Path | None = None, source: str | None = None, data=(),
                   editions=None, paper: str | None = None, extrapolate: bool = False) -> tuple:
    """Validate parsed TOML into one BookSpec per edition (see :func:`load_editions`)."""
    from . import editions as E
    if paper is not None:
        hit = [c for c in PAPERS if c.casefold() == PAPER_ALIASES.get(paper, paper).casefold()]
        if not hit:
            raise SpecError(f"--paper {paper!r}: not a paper tablegen prints on; allowed: {', '.join(PAPERS)}")
        paper = hit[0]
    book = parse(raw, name=name, base=base, source=source, data=data, extrapolate=extrapolate)
    if "editions" not in raw:
        if editions:
            raise SpecError(f"--edition {editions}: {name} declares no editions; build it without "
                            f"--edition, or declare [editions.NAME] tables (docs/spec.md, \"Editions\")")
        d = replace(book.document, paper=paper) if paper else book.document
        ed = E.Edition(name="", label="", suffix="", paper=d.paper, orientation=d.orientation,
                       two_sided=d.paper == "A5", font_size_pt=None,
                       paper_from="--paper" if paper else "spec")
        return (replace(book, document=d, edition=ed),)
    specs = E.parse(raw["editions"], [t.name for t in book.tables], PAPERS, _choice)
    built = []
    for i, es in enumerate(specs):
        try:
            one = parse(E.apply(raw, es, paper), name=name, base=base, source=source, data=data,
                        extrapolate=extrapolate)
        except SpecError as e:
            raise SpecError(f"editions.{es.name}: {e}") from None
        built.append((es, one, E.restrict(one, es)))
    names = E.csv_names([(es.name, tables) for es, _, tables in built])
    out = []
    for i, (es, one, tables) in enumerate(built):
        d = one.document
        ed = E.Edition(name=es.name, label=es.label, suffix=es.suffix, paper=d.paper, orientation=d.orientation,
                       two_sided=es.two_sided if es.two_sided is not None else d.paper == "A5",
                       font_size_pt=es.font_size_pt,
                       paper_from="--paper" if paper else ("edition" if es.paper else "spec"),
                       primary=i == 0, normalised=es.normalised)
        tables = tuple(replace(t, csv_name=names[(es.name, t.name)][0], shared_by=names[(es.name, t.name)][1])
                       for t in tables)
        out.append(replace(one, tables=tables, normalised=book.normalised, edition=ed,
                           editions=tuple(s.name for s in specs), all_tables=book.tables))
    picked = {e.name for e in E.selected([o.edition for o in out], editions)}
    return tuple(o for o in out if o.edition.name in picked)


_BOOK_NAME_BAD = set('/\\:*?"<>|')


def book_name(path: Path) -> str:
    """The book's name, the spec file's name without .toml; it names the files and the default folder."""
    name = path.stem
    if not name or not name[0].isalnum() or len(name) > 100 or bad_character(name) or \
            _BOOK_NAME_BAD & set(name):
        raise SpecError(f"{path.name}: the spec file's name gives the book name {name!r}, which names its "
                        f"files and output/{name}/; allowed: up to 100 characters, starting with a letter "
                        f"or digit, without control characters or / \\ : * ? \" < > |")
    return name


def read_toml(path, label: str = "", missing: str = "no such file") -> dict:
    """A TOML file as a dict, or a SpecError naming the file (a byte-order mark is fine).

    Its size and nesting are bounded before parsing (tablegen.core.tomlread).
    """
    from ..core import tomlread
    p = Path(path)
    name = f"{label} {p}" if label else str(p)
    text = tomlread.read_text(p, name, SpecError, missing=missing)
    return tomlread.loads(text, p.name, SpecError)


def parse(raw: dict, *, name: str, base: Path | None = None, source: str | None = None,
          data=(), extrapolate: bool = False) -> BookSpec:
    """Validate parsed TOML into a BookSpec (see :func:`load`)."""
    _check_keys(raw, TOP_KEYS, "")
    if "document" not in raw:
        _fail("document", "is required ([document] with title, number and revision)")
    doc = _document(raw["document"])
    if extrapolate:
        doc = replace(doc, extrapolate_all=True)
    dsec = raw.get("data", {})
    if not isinstance(dsec, dict):
        _fail("data", f"must be a table, not {_typename(dsec)}")
    _check_keys(dsec, ("files",), "data")
    files = _get(dsec, "files", list, "data", [])
    paths = []
    for i, f in enumerate(files):
        if not isinstance(f, str):
            _fail(f"data.files[{i}]", f"must be a path string, not {_typename(f)}")
        fp = (Path(base) / f) if base is not None and not Path(f).is_absolute() else Path(f)
        if not fp.exists():
            _fail(f"data.files[{i}]", f"{f!r} does not exist")
        paths.append(str(fp))
    data = tuple(data) + tuple(paths)
    src = source or doc.source
    if src is not None:
        from ..data.library import library
        known = library(data).datasets
        if src not in known:
            w = "document.source" if source is None else "--source"
            _fail(w, f"unknown data set {src!r}; allowed: {', '.join(sorted(known))}")
    comp_u: dict = {}
    subs = _substances(raw.get("substances", {}), "substances", src, data, comp_u)
    defaults = raw.get("defaults", {})
    if not isinstance(defaults, dict):
        _fail("defaults", f"must be a table, not {_typename(defaults)}")
    _check_keys(defaults, DEFAULT_KEYS, "defaults")
    tabs = raw.get("tables")
    if tabs is None:
        _fail("tables", "is required: give at least one [[tables]] entry")
    if not isinstance(tabs, list):
        _fail("tables", f"must be an array of tables ([[tables]]), not {_typename(tabs)}")
    if not tabs:
        _fail("tables", "is empty: give at least one [[tables]] entry")
    if len(tabs) > MAX_TABLES:
        _fail("tables", f"has {len(tabs)} tables; a book has at most {MAX_TABLES}")
    tables = []
    names = set()
    total = 0
    for i, t in enumerate(tabs):
        ts = _table(t, f"tables[{i}]", defaults, doc, subs, src, data)
        if ts.substance_ref in comp_u:
            ts = replace(ts, composition_u=comp_u[ts.substance_ref])
        if ts.name.casefold() in names:
            _fail(f"tables[{i}].name", f"{ts.name!r} is used by an earlier table; names must be unique")
        names.add(ts.name.casefold())
        total += ts.T_K.size
        if total > MAX_ROWS_PER_BOOK:
            _fail(f"tables[{i}]", f"brings the book to {total} rows; a book has at most {MAX_ROWS_PER_BOOK} rows")
        tables.append(ts)
    eds = ()
    if "editions" in raw:
        from . import editions as E
        eds = E.parse(raw["editions"], [t.name for t in tables], PAPERS, _choice)
    spec = BookSpec(name=name, document=doc, tables=tuple(tables), normalised={}, data_paths=data,
                    substances=subs, editions=tuple(e.name for e in eds))
    normalised = normalise(spec, src)
    if eds:
        # the editions are part of the spec: all of them enter the fingerprint every edition carries
        normalised["editions"] = {e.name: e.normalised for e in eds}
    object.__setattr__(spec, "normalised", normalised)
    return spec


def _combustion_inputs(o) -> dict:
    """What a combustion result was computed from (the fingerprint covers them)."""
    from ..calc.burn_result import amount_json
    fl = o.flame
    return {"fuel": o.fuel.describe(), "oxidant": o.oxidant.describe(), "amount_given": amount_json(o.amount_given),
            "T_fuel_K": fl.T_fuel_K, "T_fuel_source": fl.T_fuel_source, "T_oxidant_K": fl.T_oxidant_K,
            "T_oxidant_source": fl.T_oxidant_source, "flue_pressure_Pa": o.dew_point.flue_pressure_Pa,
            "combustion_reference_T_K": o.heating_values.T_ref_K, "metering_T_K": o.metering_T_K,
            "metering_P_Pa": o.metering_P_Pa}


def _made_from(sub) -> dict:
    """What a substance was made from, for the normalised spec: the inputs of its combustion,
    or the conditions of a humid air; {} for others."""
    from ..calc.burn_result import CombustionResult
    from ..calc.oxidants import Oxidant
    o = getattr(sub, "origin", None)
    out = {}
    if isinstance(o, CombustionResult):
        out["combustion"] = _combustion_inputs(o)
    elif isinstance(o, Oxidant):
        out["humid_air"] = o.describe()
    if getattr(sub, "dew_point_P_Pa", None) is not None:
        out["dew_point"] = {"T_K": sub.dew_point_K, "P_Pa": sub.dew_point_P_Pa}
    return out


def normalise(spec: BookSpec, source) -> dict:
    """The spec as plain JSON-ready data with every default applied, SI values.

    This is what the fingerprint hashes, so it holds no file paths or dates of the run.
    """
    d = spec.document
    doc = {k: getattr(d, k) for k in ("title", "subtitle", "number", "revision", "issue_date",
                                       "organisation", "prepared_by", "checked_by", "approved_by",
                                       "paper", "orientation", "units", "basis", "max_pressure_Pa",
                                       "uncertainty_columns", "validity_columns", "chart_placement",
                                       "csv_comments")}
    doc["reference"] = {"name": d.reference.name, "T_K": d.reference.T_K, "P_Pa": d.reference.P_Pa}
    if d.barometer_Pa is not None:          # only where given, so older specs keep their fingerprint
        doc["barometer_Pa"] = d.barometer_Pa
    if d.extrapolate_all:                   # likewise: only when the command line asked
        doc["extrapolate_all"] = True
    doc["source"] = source
    tables = []
    for t in spec.tables:
        s = t.substance
        tables.append({
            "name": t.name, "title": t.title, "substance": t.substance_ref, "substance_id": s.id,
            "units": t.units, "basis": t.basis, "temperature_units": list(t.temperature_units),
            "grid": t.grid, "rows": int(t.T_K.size), "T_K": [float(x) for x in t.T_K],
            "extra_rows": [{"T_K": e.T_K, "label": e.label} for e in t.extra_rows],
            "columns": [{"key": c.key, "system": c.system, "unit": c.unit,
                         "decimals": "auto" if c.auto and c.decimals is not None else c.decimals,
                         "significant": "auto" if c.auto and c.significant is not None else c.significant}
                        for c in t.columns],
            "datum": {"kind": s.datum.kind, "T_ref_K": s.datum.T_ref_K, "h_ref_J_per_kg": s.datum.h_ref_J_per_kg},
            "P_ref_Pa": s.P_ref_Pa,
            "anchor": {"T_K": s.anchor.T_K, "Pr": s.anchor.Pr, "vr": s.anchor.vr},
            "mean_cp_from_K": t.T_mean_ref_K, "extrapolate": t.extrapolate,
        })
        if t.substance_ref not in spec.substances:
            tables[-1].update(_made_from(s))
        if t.charts:
            from dataclasses import asdict, is_dataclass
            tables[-1]["charts"] = [asdict(c) if is_dataclass(c) else repr(c) for c in t.charts]
    subs = {}
    for k, s in sorted(spec.substances.items()):
        subs[k] = {"id": s.id, "name": s.name, "kind": s.kind,
                   "mole_fractions": {c.id: c.mole_fraction for c in s.components}}
        made = _made_from(s)
        if made:
            subs[k].update(made)
    for t in spec.tables:
        if t.composition_u is not None and t.substance_ref in subs:
            subs[t.substance_ref]["fraction_uncertainty"] = {"basis": t.composition_u[0],
                                                             "u": dict(sorted(t.composition_u[1].items()))}
    return {"name": spec.name, "document": doc, "substances": subs, "tables": tables}
