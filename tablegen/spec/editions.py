"""Editions of a book: one spec, several printed forms (desk A4, pocket A5, wall A3, Letter).

An ``[editions.NAME]`` table of a spec changes how the book is printed, never what
it prints: paper, orientation, figure size, one or two sides, which tables and rows,
which columns, which unit system. Substances, data, datums, anchors, bases and
reference pressures are the spec's, so every edition shows the same values at the
same temperature and carries the same fingerprint of spec and data.

This module validates the editions, writes the raw spec of one edition (the spec
with its overrides applied, parsed by :mod:`tablegen.spec.book` like any spec) and
names the CSV files of the editions in one output folder. Key paths in messages
start at ``editions.NAME``. The keys are documented in docs/spec.md, "Editions".
"""

from __future__ import annotations

import copy
import difflib
import math
import re
from dataclasses import dataclass, field

import numpy as np

from ..core.errors import NameLookupError, SpecError

#: Keys of an [editions.NAME] table.
EDITION_KEYS = ("label", "suffix", "paper", "orientation", "two_sided", "font_size", "grid_step", "T_range",
                "units", "columns", "temperature_units", "tables", "table")
#: Keys of an [editions.NAME.table.TABLE] table (one table's own overrides).
TABLE_KEYS = ("title", "grid", "columns", "units", "temperature_units", "extra_rows")
#: Spec keys an edition may not change, and what they are: they change the values, not their print.
FIXED = {
    "substances": "the substances", "data": "the coefficient data", "source": "the data set",
    "substance": "a table's substance", "datum": "the enthalpy datum", "P_ref": "the reference pressure",
    "anchor": "the Pr/vr anchor", "basis": "the basis", "mean_cp_from": "the mean-cp base temperature",
    "extrapolate": "extrapolation", "decimals": "the printed digits", "significant": "the printed digits",
    "reference": "the volumetric reference conditions", "max_pressure": "the stated uncertainty",
    "title": "the title", "subtitle": "the title", "number": "the document number", "revision": "the revision",
    "issue_date": "the issue date", "organisation": "the organisation", "prepared_by": "the approval block",
    "checked_by": "the approval block", "approved_by": "the approval block", "document": "the document",
    "defaults": "the table defaults", "charts": "the charts", "name": "a table's name",
    "uncertainty_columns": "the CSV columns", "csv_comments": "the CSV files",
    "chart_placement": "the chart placement", "editions": "the editions",
}
#: Smallest and largest figure size of the tables, pt. Below 6.5 pt a printed figure is hard
#: to read at arm's length (common practice for reference tables); above 14 pt few columns fit.
FONT_SIZE_PT = (6.5, 14.0)

_NAME_RE = re.compile(r"^[a-z0-9][a-z0-9_-]{0,31}$")
_PT_RE = re.compile(r"^\s*([0-9]+(?:\.[0-9]*)?)\s*pt\s*$")


@dataclass(frozen=True, slots=True)
class Edition:
    """One printed form of a book, as resolved for a build."""

    name: str                 # "" for a spec without editions
    label: str                # printed in the document control and the running foot
    suffix: str               # appended to the document number on the edition's pages
    paper: str
    orientation: str
    two_sided: bool
    font_size_pt: float | None    # table figures; None: the paper's own size
    paper_from: str = "spec"      # "spec", "edition" or "--paper"
    primary: bool = True          # the first edition of the spec (its CSV files carry no edition name)
    normalised: dict = field(default_factory=dict)   # the edition's keys as written, for the sidecar

    def number(self, base: str) -> str:
        """The document number printed on the edition's pages."""
        return base + self.suffix


@dataclass(frozen=True, slots=True)
class EditionSpec:
    """An [editions.NAME] table, validated."""

    name: str
    label: str
    suffix: str
    paper: str | None
    orientation: str | None
    two_sided: bool | None
    font_size_pt: float | None
    grid_step: tuple          # (value, Unit) per unit family given
    T_range_K: tuple | None
    units: str | None
    columns: list | None
    temperature_units: list | None
    tables: tuple | None      # names of the tables this edition prints (None: all)
    table: dict               # table name -> its own overrides (raw TOML values)
    normalised: dict


def _fail(where: str, msg: str):
    raise SpecError(f"{where}: {msg}")


def _allowed(keys) -> str:
    return ", ".join(keys)


def _check(raw: dict, allowed, where: str, kind: str):
    for k in raw:
        if k in allowed:
            continue
        if k in FIXED:
            _fail(f"{where}.{k}", f"an edition may not change {FIXED[k]}: every edition of a book prints "
                                  f"the same values from the same substances and data; {kind} may set: "
                                  f"{_allowed(allowed)}")
        close = difflib.get_close_matches(k, list(allowed), n=1, cutoff=0.6)
        hint = f"did you mean {close[0]!r}? " if close else ""
        _fail(f"{where}.{k}", f"unknown key; {hint}allowed: {_allowed(allowed)}")


def parse(raw, table_names, papers, choose) -> tuple:
    """The [editions] table of a spec -> EditionSpec per edition, in the order written.

    ``papers`` are the paper names; ``choose(raw, key, choices, where, default)`` is the
    spec's own choice reader, so messages read alike.
    """
    from . import values as S
    if not isinstance(raw, dict):
        _fail("editions", f"must be a table of named editions ([editions.desk], [editions.pocket]), "
                          f"not {S._typename(raw)}")
    if not raw:
        _fail("editions", "is empty; give at least one [editions.NAME] table, or leave [editions] out")
    out = []
    for name, e in raw.items():
        w = f"editions.{name}"
        if not _NAME_RE.match(name):
            _fail(w, "an edition name is 1-32 lower-case letters, digits, '-' or '_', starting with a letter "
                     "or digit (it names the edition's files)")
        if not isinstance(e, dict):
            _fail(w, f"must be a table, not {S._typename(e)}")
        _check(e, EDITION_KEYS, w, "an edition")
        label = S._text(e, "label", w, default=f"{name} edition", max_len=60)
        suffix = S._text(e, "suffix", w, default="", max_len=12)
        paper = S._paper(e, w, None) if "paper" in e else None
        orientation = choose(e, "orientation", S.ORIENTATIONS, w, None) if "orientation" in e else None
        two_sided = S._get(e, "two_sided", bool, w, None)
        font = _font_size(e, w)
        steps = _grid_step(e.get("grid_step"), f"{w}.grid_step") if "grid_step" in e else ()
        rng = _T_range(e["T_range"], f"{w}.T_range") if "T_range" in e else None
        units = choose(e, "units", S.UNIT_SYSTEMS, w, None) if "units" in e else None
        columns = S._get(e, "columns", list, w, None)
        t_units = S._get(e, "temperature_units", list, w, None)
        tables = None
        if "tables" in e:
            tl = S._get(e, "tables", list, w)
            if not tl:
                _fail(f"{w}.tables", "is empty; list the tables this edition prints, or leave the key out "
                                     "for all of them")
            for i, t in enumerate(tl):
                if not isinstance(t, str) or t not in table_names:
                    _fail(f"{w}.tables[{i}]", f"{t!r} is not a table of this spec; its tables: "
                                              f"{_allowed(table_names)}")
            if len(set(tl)) != len(tl):
                _fail(f"{w}.tables", "lists a table twice")
            tables = tuple(n for n in table_names if n in tl)      # the spec's order
        per = S._get(e, "table", dict, w, {})
        for tname, over in per.items():
            tw = f"{w}.table.{tname}"
            if tname not in table_names:
                _fail(tw, f"{tname!r} is not a table of this spec; its tables: {_allowed(table_names)}")
            if not isinstance(over, dict):
                _fail(tw, f"must be a table of overrides, not {S._typename(over)}")
            _check(over, TABLE_KEYS, tw, "an edition's table")
        out.append(EditionSpec(name=name, label=label, suffix=suffix, paper=paper, orientation=orientation,
                               two_sided=two_sided, font_size_pt=font, grid_step=steps, T_range_K=rng,
                               units=units, columns=columns, temperature_units=t_units, tables=tables,
                               table=copy.deepcopy(per), normalised=_plain(e)))
    return tuple(out)


def _plain(v):
    """TOML values as JSON-ready data (dates as ISO text)."""
    if isinstance(v, dict):
        return {k: _plain(x) for k, x in v.items()}
    if isinstance(v, list):
        return [_plain(x) for x in v]
    if hasattr(v, "isoformat"):
        return v.isoformat()
    return v


def _font_size(e, w) -> float | None:
    if "font_size" not in e:
        return None
    v = e["font_size"]
    m = _PT_RE.match(v) if isinstance(v, str) else None
    if not m:
        _fail(f"{w}.font_size", f"must be a size in points as a string, e.g. \"8.5 pt\", not {v!r}")
    pt = float(m.group(1))
    lo, hi = FONT_SIZE_PT
    if not lo <= pt <= hi:
        _fail(f"{w}.font_size", f"{pt:g} pt is out of range; allowed: {lo:g} pt to {hi:g} pt")
    return pt


def _grid_step(v, where) -> tuple:
    """One step, or one per unit family (a kelvin-sized one for K/°C grids, a rankine-sized one
    for °F/°R grids): ((value, Unit), ...)."""
    from . import values as S
    items = v if isinstance(v, list) else [v]
    if not 1 <= len(items) <= 2:
        _fail(where, f"has {len(items)} entries; give one step, or two: one for K/°C grids and one for °F/°R "
                     f"grids, e.g. [\"20 K\", \"40 °F\"]")
    out = []
    for i, s in enumerate(items):
        wi = f"{where}[{i}]" if isinstance(v, list) else where
        val, u = S._temp_unit(s, wi)
        if not (math.isfinite(val) and val > 0):
            _fail(wi, f"must be > 0, got {val:g}; give a temperature step such as \"20 K\"")
        out.append((val, u))
    if len(out) == 2 and _family(out[0][1]) == _family(out[1][1]):
        _fail(where, "gives two steps of one unit family; give one for K/°C grids and one for °F/°R grids")
    return tuple(out)


def _family(u) -> str:
    return "kelvin" if abs(u.factor - 1.0) < 1e-12 else "rankine"


def _T_range(v, where) -> tuple:
    from . import values as S
    if not isinstance(v, list) or len(v) != 2:
        _fail(where, "must be two temperatures [low, high], e.g. [\"-40 °C\", \"1200 °C\"]")
    lo = S._temperature(v[0], f"{where}[0]")
    hi = S._temperature(v[1], f"{where}[1]")
    if not hi > lo:
        _fail(where, f"the high end ({hi:g} K) must be above the low end ({lo:g} K)")
    return (lo, hi)


# ---------------------------------------------------------------- one edition's raw spec
def _step_text(steps, seg_start: str, where: str) -> str:
    """The edition's step written in the unit of a segment's start."""
    from . import values as S
    _, u = S._temp_unit(seg_start, where)
    fam = _family(u)
    for val, su in steps:
        if _family(su) == fam:
            return f"{val:g} {su.symbol}"
    val, su = steps[0]
    return f"{val * su.factor / u.factor:.12g} {u.symbol}"


def _with_step(grid, steps, where):
    """A raw grid with each segment's step replaced; an automatic grid becomes one segment.
    A listed grid is kept (its temperatures were chosen one by one)."""
    if not isinstance(grid, dict) or not steps:
        return grid
    if "segments" in grid and isinstance(grid["segments"], list):
        segs = []
        for i, s in enumerate(grid["segments"]):
            if isinstance(s, dict) and isinstance(s.get("start"), str):
                s = dict(s, step=_step_text(steps, s["start"], f"{where}.segments[{i}].start"))
            segs.append(s)
        return dict(grid, segments=segs)
    if "tolerance" in grid and isinstance(grid.get("start"), str) and isinstance(grid.get("stop"), str):
        return {"segments": [{"start": grid["start"], "stop": grid["stop"],
                              "step": _step_text(steps, grid["start"], f"{where}.start")}]}
    return grid


def apply(raw: dict, ed: EditionSpec, paper_override: str | None = None) -> dict:
    """The raw spec of one edition: its overrides written into a copy of the spec."""
    out = copy.deepcopy({k: v for k, v in raw.items() if k != "editions"})
    doc = out.setdefault("document", {})
    if isinstance(doc, dict):
        if ed.paper:
            doc["paper"] = ed.paper
        if paper_override:
            doc["paper"] = paper_override
        if ed.orientation:
            doc["orientation"] = ed.orientation
        if ed.units:
            doc["units"] = ed.units
    defaults = out.get("defaults", {}) if isinstance(out.get("defaults", {}), dict) else {}
    tabs = out.get("tables")
    if not isinstance(tabs, list):
        return out
    for i, t in enumerate(tabs):
        if not isinstance(t, dict):
            continue
        for key, val in (("units", ed.units), ("columns", ed.columns), ("temperature_units", ed.temperature_units)):
            if val is not None:
                t[key] = copy.deepcopy(val)
        own = ed.table.get(t.get("name"), {})
        if ed.grid_step and "grid" not in own:
            grid = t.get("grid", defaults.get("grid"))
            if grid is not None:
                t["grid"] = _with_step(grid, ed.grid_step, f"editions.{ed.name}.grid_step (tables[{i}].grid)")
        for key, val in own.items():
            t[key] = copy.deepcopy(val)
    return out


def restrict(spec, ed: EditionSpec):
    """The edition's tables (its selection) with rows outside its T_range left out.

    Raises SpecError naming the edition and the table when a table keeps no row.
    """
    from dataclasses import replace
    tables = [t for t in spec.tables if ed.tables is None or t.name in ed.tables]
    if ed.T_range_K is None:
        return tuple(tables)
    lo, hi = ed.T_range_K
    out = []
    for t in tables:
        eps = 1e-9 * hi
        keep = (t.T_K >= lo - eps) & (t.T_K <= hi + eps)
        if not keep.any():
            _fail(f"editions.{ed.name}.T_range", f"{lo:g}-{hi:g} K leaves table {t.name!r} with no rows (its "
                                                 f"grid runs {t.T_K.min():g}-{t.T_K.max():g} K); widen T_range or "
                                                 f"leave the table out with editions.{ed.name}.tables")
        if keep.all():
            out.append(t)
            continue
        extra = tuple(e for e in t.extra_rows if lo - eps <= e.T_K <= hi + eps)
        grid = dict(t.grid, T_range_K=[lo, hi])
        out.append(replace(t, T_K=t.T_K[keep], extra=t.extra[keep], extra_rows=extra, grid=grid))
    return tuple(out)


# ---------------------------------------------------------------- CSV names in one folder
def printed_key(t) -> tuple:
    """What a table's CSV holds: equal keys give equal CSV files."""
    cols = tuple((c.key, c.system, c.unit, c.decimals, c.significant, bool(c.auto)) for c in t.columns)
    return (t.title, t.units, t.basis, tuple(t.temperature_units), cols,
            np.asarray(t.T_K, float).tobytes(), np.asarray(t.extra, bool).tobytes())


def csv_names(editions: list) -> dict:
    """{(edition, table): (csv file name, editions sharing that file)} for editions in spec order.

    The first edition that prints a table owns ``<table>.csv``; a later edition that prints it
    alike (same rows, columns, units, title) shares that file, one that prints it otherwise
    gets ``<table>-<edition>.csv``. The names follow from the spec alone, so a build of one
    edition writes the same names and bytes as a build of all.
    """
    owners, out = {}, {}
    for ename, tables in editions:
        for t in tables:
            key = printed_key(t)
            first = owners.setdefault(t.name, (ename, key))
            name = f"{t.name}.csv" if first[1] == key else f"{t.name}-{ename}.csv"
            out[(ename, t.name)] = name
    sharing = {}
    for (ename, _), name in out.items():
        sharing.setdefault(name, []).append(ename)
    return {k: (name, tuple(sharing[name])) for k, name in out.items()}


def selected(eds, wanted) -> list:
    """The editions named by --edition (comma-separated), in spec order."""
    names = [e.name for e in eds]
    if wanted is None:
        return list(eds)
    want = [w.strip() for w in wanted.split(",") if w.strip()] if isinstance(wanted, str) else list(wanted)
    if not want:
        raise NameLookupError(f"--edition {wanted!r}: no edition named; this spec's editions: {_allowed(names)}")
    for w in want:
        if w not in names:
            close = difflib.get_close_matches(w, names, n=1, cutoff=0.5)
            hint = f"did you mean {close[0]!r}? " if close else ""
            raise NameLookupError(f"--edition {w!r}: not an edition of this spec; {hint}its editions: {_allowed(names)}")
    return [e for e in eds if e.name in want]
