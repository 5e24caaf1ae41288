"""The table model: everything a renderer lays out, already computed and formatted.

``build_book(spec)`` evaluates every table once (vectorised over its rows),
converts to the printed units, rounds each column to its digits, and gathers
the front matter (column definitions, datums, compositions, sources,
cautions) and the fingerprint. The PDF, CSV and JSON renderers only lay this
out; they never evaluate a polynomial.

Two later additions drop in without changing the renderers' contract:
``TableModel.notes`` (e.g. per-column uncertainty statements) and
``TableModel.charts`` (chart models drawn after the table's pages), and
``BookModel.appendix``, a list of :class:`Section` printed after the tables.
"""

from __future__ import annotations

import hashlib
import json
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from ..spec.columns import column_values_SI, unit_factor, unit_for
from ..core.units import temperature_text as _fmtT
from .definitions import DEFINITIONS, pressure_text
from .stated import Section, appendix_sections, auto_digits, uncertainty_notes, worked_example  # noqa: F401

# ---------------------------------------------------------------- definitions

ROUNDING_RULE = ("Each printed value is the computed double-precision value rounded once to the "
                 "printed number of decimals (or of significant digits, for Pr and vr), ties to even "
                 "on the exact binary value; the CSV files carry the unrounded values. A value of n "
                 "significant digits below 0.0001 or from 10ⁿ⁺² up is printed in exponent form: "
                 "2.0182e-05 = 2.0182 × 10⁻⁵. Where the spec does not set them, the decimals of a "
                 "column are chosen from its stated uncertainty U: the last printed digit is the "
                 "largest power of ten not above U/2 at the row where U is smallest, so rounding "
                 "adds at most 4 % to U there and no precision is thrown away at any row. Pr and vr, "
                 "printed to a count n of significant digits, follow the same rule relative to the "
                 "value: 10¹⁻ⁿ is the largest power of ten not above U/(2 |value|) where that ratio is "
                 "smallest, so at no row is the last digit coarser than U/2 (a row whose leading digit "
                 "is large shows up to one digit more).")

CAUTIONS = (
    "These tables follow the ideal-gas model: the properties depend on temperature only "
    "(entropy also on pressure through −R ln(P/P°)). Real-gas effects at high pressure or "
    "near saturation are not included.",
    "Mixtures are of frozen composition: no dissociation, reaction or condensation. At and below "
    "the water dew point of a gas holding water vapour (rows marked c) water may condense and the "
    "tabulated values do not describe the gas.",
    "Values are valid only inside the temperature range of the coefficient data named in the "
    "sources section; values outside it are refused unless extrapolation was asked for, and "
    "are then marked.",
    "Verify these values against the applicable codes and licensed engineering practice before "
    "using them in design or safety decisions (boilers, pressure equipment, flue-gas systems, "
    "toxic or asphyxiant gases).",
)


# ---------------------------------------------------------------- dataclasses
@dataclass(frozen=True, slots=True)
class ComponentInfo:
    id: str
    mole_fraction: float
    mass_fraction: float
    M: float
    source: str


@dataclass(frozen=True, slots=True)
class SubstanceInfo:
    """What the front matter prints about a substance (no polynomial)."""

    ref: str
    id: str
    name: str
    kind: str
    M: float
    R: float
    T_min: float
    T_max: float
    mixing_entropy_R: float
    components: tuple
    sources: tuple          # (species id, data set, citation)
    dew_point_K: float | None = None     # water dew point at dew_point_P_Pa (None: none, or below 0 °C)
    dew_point_P_Pa: float | None = None  # None: the gas holds no water vapour
    description: tuple = ()              # sentences on what the gas was made from (humid air)
    combustion: dict | None = None       # tablegen.book.sheet.to_json of the combustion that made it
    figures: tuple = ()                  # (key, label, value, unit, U_k2): dew point, combustion figures
    origin_key: int | None = None        # the same number for substances of one combustion


@dataclass(frozen=True, slots=True, eq=False)
class Column:
    key: str
    system: str
    unit: str
    symbol: str
    decimals: int | None
    significant: int | None
    values: np.ndarray      # in the printed unit, full precision
    cells: tuple            # printed strings (ASCII '-' for minus)

    @property
    def csv_header(self) -> str:
        return f"{self.csv_key} [{self.unit}]"

    csv_key: str = ""


@dataclass(frozen=True, slots=True, eq=False)
class TableModel:
    name: str
    title: str
    subtitle: str
    substance: SubstanceInfo
    basis: str
    basis_text: str
    units: str
    datum_text: str
    P_ref_Pa: float
    anchor_text: str
    mean_cp_from_K: float
    grid_text: str
    datum: dict             # kind, T_ref_K, h_ref_J_per_kg
    anchor: dict            # T_K, Pr, vr
    T_K: np.ndarray
    marks: tuple            # per row: "" or a mark ("*" extra row, "x" extrapolated)
    columns: tuple          # Column; the temperature columns first
    head_lines: tuple = ()  # lines printed under the title on every page of the table
    notes: list = field(default_factory=list)     # strings printed under the table
    charts: tuple = ()      # chart models (tablegen.book.chart_model), drawn after the table
    uncertainty: dict | None = None   # the budget's figures (tablegen.calc.uncertainty), for the JSON
    U_columns: tuple = ()   # (csv header, values) of U_<key> columns, when the spec asks for them
    #: (csv header, values, description) of the Z and real-gas departure columns
    #: (document.validity_columns): where the ideal-gas values apply, not their uncertainty
    validity_columns: tuple = ()
    #: what the appendix says about the table, in its own units (book.stated._in_table_units)
    stated: dict = field(default_factory=dict)
    P_ref_text: str = ""    # P° in the table's units (how-to-read page)
    mean_cp_text: str = ""  # Tₘ in the table's temperature unit (how-to-read page)

    @property
    def rows(self) -> int:
        return int(self.T_K.size)


@dataclass(frozen=True, slots=True, eq=False)
class BookModel:
    name: str
    document: object        # spec.Document
    tables: tuple
    substances: tuple       # SubstanceInfo, one per distinct substance
    definitions: tuple      # (key, symbol, name, formula, units used)
    cautions: tuple
    rounding_rule: str
    reference_text: str     # volumetric basis reference conditions ("" if unused)
    data_files: tuple       # (file name, sha256)
    fingerprint: str
    versions: dict
    normalised_spec: dict
    appendix: list = field(default_factory=list)   # Section, printed after the tables
    sheets: tuple = ()      # tablegen.book.sheet.Sheet, one per combustion, in the substances section
    caution_refs: dict = field(default_factory=dict)   # substance id -> ids of the cautions that concern it
    extrapolation: str = ""  # which tables may extrapolate, and who asked (document control block)
    worked_example: Section | None = None   # reading between two rows of the first table (how-to-read page)
    edition: object = None  # tablegen.spec.editions.Edition: paper, sides, figure size, printed number


# ---------------------------------------------------------------- evaluation
def format_fixed(values: np.ndarray, decimals: int) -> tuple:
    """Round to ``decimals`` places; '-0.00' is printed as '0.00'."""
    out = []
    f = f"{{:.{decimals}f}}".format
    for v in values.tolist():
        s = f(v)
        if s[0] == "-" and not s.strip("-0."):
            s = s[1:]
        out.append(s)
    return tuple(out)


def sig_decimals(values: np.ndarray, significant: int) -> np.ndarray:
    """Decimals that give ``significant`` digits in fixed notation (-1: use exponent form)."""
    a = np.abs(values)
    with np.errstate(divide="ignore"):
        e = np.floor(np.log10(np.where(a > 0, a, 1.0)))
    # the rounding may carry into the next decade (9.99995 -> 10.000)
    r = np.round(a / 10.0 ** e, significant - 1)
    e = np.where(r >= 10.0, e + 1, e)
    d = (significant - 1 - e).astype(int)
    fixed = (e >= -4) & (e < significant + 2)
    return np.where(fixed, np.maximum(d, 0), -1)


def format_significant(values: np.ndarray, significant: int) -> tuple:
    """``significant`` significant digits: fixed notation from 1e-4 up to 10^(n+2), else 1.2345e+07."""
    d = sig_decimals(values, significant)
    out = []
    for v, k in zip(values.tolist(), d.tolist()):
        if k < 0:
            out.append(f"{v:.{significant - 1}e}")
        else:
            out.append(f"{v:.{k}f}")
    return tuple(out)


def _csv_key(key: str, basis: str) -> str:
    if key in ("T", "k", "Pr", "vr", "a"):
        return key
    return key + {"mass": "", "molar": "_molar", "volumetric": "_vol"}[basis]


def _substance_info(ref: str, s) -> SubstanceInfo:
    from .provenance import made_from
    comps = tuple(ComponentInfo(c.id, c.mole_fraction, c.mass_fraction, c.M, c.source) for c in s.components)
    description, combustion, figs = made_from(s)
    origin = getattr(s, "origin", None)
    return SubstanceInfo(ref=ref, id=s.id, name=s.name, kind=s.kind, M=s.M, R=s.R, T_min=s.T_min,
                         T_max=s.T_max, mixing_entropy_R=s.mixing_entropy_R, components=comps,
                         sources=tuple(tuple(x) for x in s.sources), dew_point_K=s.dew_point_K,
                         dew_point_P_Pa=s.dew_point_P_Pa, description=tuple(description),
                         combustion=combustion, figures=tuple(figs),
                         origin_key=None if origin is None else id(origin))


def _datum_text(d, unit_symbol: str = "K", h_unit: tuple = ("kJ/kg", 1e3)) -> str:
    """The datum in words; a sensible datum's h in ``h_unit`` (symbol, SI value on the mass basis)."""
    if d.kind == "formation":
        return "h(298.15 K) = enthalpy of formation (NASA/JANAF convention)"
    at = _fmtT(d.T_ref_K, unit_symbol)
    if unit_symbol == "K":
        return f"h({at}) = {d.h_ref_J_per_kg / h_unit[1]:g} {h_unit[0]} (sensible enthalpy)"
    T, K = at.split(" (")
    return f"h({T}) = {d.h_ref_J_per_kg / h_unit[1]:g} {h_unit[0]} (sensible enthalpy; {T} = {K[:-1]})"


def _h_unit(t, doc, sub) -> tuple:
    """The unit a table prints h in (its first system) and its SI value on the mass basis."""
    from .stated import basis_scale
    system = "US" if t.units == "US" else "SI"
    return (unit_for("h", system, t.basis),
            unit_factor("h", system, t.basis) / basis_scale("h", sub, t.basis, doc.reference))


def _range_text(sub, unit_symbol: str) -> str:
    """The data range in the table's temperature unit, in K beside it."""
    if unit_symbol == "K":
        return f"{sub.T_min:g}-{sub.T_max:g} K"
    from ..core.units import unit
    u = unit(unit_symbol, "temperature")
    return (f"{u.from_si(sub.T_min):.6g} to {u.from_si(sub.T_max):.6g} {unit_symbol} "
            f"({sub.T_min:g}-{sub.T_max:g} K)")


def _P0_text(t, sub) -> str:
    """P° as a table prints it: in psia for a US table, with bar beside it."""
    from ..core.units import PSI
    P0 = pressure_text(sub.P_ref_Pa)
    return f"{sub.P_ref_Pa / PSI:.5g} psia ({P0.split(' (')[0]})" if t.units == "US" else P0


def _head_lines(t, sub, basis_text: str, datum_text: str) -> tuple:
    """The lines under the title on every page of a table, in the table's units (SI beside US)."""
    unit_symbol = t.temperature_units[0]
    R = f"R = {sub.R:.3f} J/(kg K)"
    if t.units == "US":
        R = f"R = {sub.R / unit_factor('cp', 'US', 'mass'):.6f} Btu/(lbm °R) ({sub.R:.3f} J/(kg K))"
    return (f"{sub.name} ({sub.id}), M = {sub.M:.4f} kg/kmol, {R}; data valid {_range_text(sub, unit_symbol)}",
            f"Values {basis_text}; entropy at P° = {_P0_text(t, sub)}",
            f"Enthalpy datum {datum_text}; Pr/vr anchor: {anchor_text_of(sub.anchor, unit_symbol)}")


def anchor_text_of(an, unit_symbol: str = "K") -> str:
    return f"Pr = {an.Pr:g} and vr = {an.vr:g} at {_fmtT(an.T_K, unit_symbol)}"




def _grid_text(g: dict) -> str:
    text = _grid_text_of(g)
    if "T_range_K" in g:      # an edition that prints part of the grid
        from ..core.units import unit
        u = unit(g["segments"][0]["unit"] if g["kind"] == "segments" else g.get("unit", "K"), "temperature")
        lo, hi = (f"{u.from_si(T):.6g}".replace("-", "−") for T in g["T_range_K"])
        text += f"; this edition prints the rows from {lo} to {hi} {u.symbol}"
    return text


def _grid_text_of(g: dict) -> str:
    if g["kind"] == "segments":
        parts = []
        from ..core.units import unit
        for s in g["segments"]:
            u = unit(s["unit"], "temperature")
            step = s["step_K"] / u.factor
            parts.append(f"{u.from_si(s['start_K']):g} to {u.from_si(s['stop_K']):g} {u.symbol} "
                         f"step {step:g} {u.symbol}")
        return "; ".join(parts)
    if g["kind"] == "list":
        return f"{len(g['T_K'])} listed temperatures"
    from ..core.units import unit
    u = unit(g["unit"], "temperature")
    return (f"{u.from_si(g['start_K']):g} to {u.from_si(g['stop_K']):g} {u.symbol}, step {g['step']:g} "
            f"{u.symbol} chosen so that linear interpolation between rows stays within "
            f"{g['tolerance']:g} (worst {g['worst_interpolation_error']:.2g})")



def build_table(t, doc) -> TableModel:
    """Evaluate and format one table spec."""
    from ..core.units import unit
    sub = t.substance
    keys = list(dict.fromkeys(c.key for c in t.columns))
    vals = column_values_SI(sub, t.T_K, keys, extrapolate=t.extrapolate, basis=t.basis,
                            reference=doc.reference, T_mean_ref_K=t.T_mean_ref_K)
    auto = auto_digits(t, doc, sub)
    cols = []
    for c in t.columns:
        if getattr(c, "auto", False) and (c.key, c.system) in auto:
            from dataclasses import replace as _replace
            c = _replace(c, **auto[(c.key, c.system)])
        if c.key == "T":
            # grid temperatures are exact decimals in their own unit; conversion leaves binary
            # noise (-59.66999999999996 °F) that 1e-9 rounding removes without loss
            v = np.round(unit(c.unit, "temperature").from_si(t.T_K), 9)
        else:
            v = vals[c.key] / unit_factor(c.key, c.system, t.basis)
        v = np.asarray(v, float)
        cells = format_fixed(v, c.decimals) if c.decimals is not None else format_significant(v, c.significant)
        cols.append(Column(key=c.key, system=c.system, unit=c.unit, symbol=DEFINITIONS[c.key][0],
                           decimals=c.decimals, significant=c.significant, values=v, cells=cells,
                           csv_key=_csv_key(c.key, t.basis)))
    from .provenance import condensing, dew_point_note
    ext = vals.get("extrapolated")
    wet = condensing(sub, t.T_K)
    marks = []
    for i in range(t.T_K.size):
        m = ""
        if t.extra[i]:
            m += "*"
        if ext is not None and ext[i]:
            m += "x"
        if wet[i]:
            m += "c"
        marks.append(m)
    notes = []
    if t.extra_rows:
        labels = [_fmtT(e.T_K, t.temperature_units[0]) + (f": {e.label}" if e.label else "")
                  for e in t.extra_rows]
        notes.append("* extra row at a named temperature: " + "; ".join(labels) + ".")
    if ext is not None and np.any(ext):
        notes.append(f"x extrapolated beyond the data range {_range_text(sub, t.temperature_units[0])}: "
                     f"use with care.")
    if sub.dew_point_P_Pa is not None:
        notes.append(dew_point_note(sub, t.temperature_units[0], int(np.sum(wet))))
    basis_text = {"mass": "per unit mass", "molar": "per mole",
                  "volumetric": f"per m³ (SI) or ft³ (US) at {doc.reference.text}"}[t.basis]
    an = sub.anchor
    anchor_text = anchor_text_of(an, t.temperature_units[0])
    subtitle = (f"{sub.name} ({sub.id}), M = {sub.M:.4f} kg/kmol · {basis_text} · "
                f"P° = {pressure_text(sub.P_ref_Pa)}")
    t_unit = t.temperature_units[0]
    datum_text = _datum_text(sub.datum, t_unit, _h_unit(t, doc, sub))
    head_lines = _head_lines(t, sub, basis_text, datum_text)
    unc, U_cols, V_cols, stated = uncertainty_notes(t, doc, sub, cols, notes)
    charts = ()
    if t.charts:
        from .chart_model import build_chart
        charts = tuple(build_chart(sub, c, T_range_K=(float(t.T_K.min()), float(t.T_K.max())), units=t.units,
                                   **chart_page(doc))
                       for c in t.charts)
    return TableModel(
        charts=charts,
        name=t.name, title=t.title, subtitle=subtitle, substance=_substance_info(t.substance_ref, sub),
        basis=t.basis, basis_text=basis_text, units=t.units, datum_text=datum_text, head_lines=head_lines,
        P_ref_Pa=sub.P_ref_Pa, anchor_text=anchor_text, mean_cp_from_K=t.T_mean_ref_K,
        P_ref_text=_P0_text(t, sub), mean_cp_text=_fmtT(t.T_mean_ref_K, t_unit),
        grid_text=_grid_text(t.grid),
        datum={"kind": sub.datum.kind, "T_ref_K": sub.datum.T_ref_K, "h_ref_J_per_kg": sub.datum.h_ref_J_per_kg},
        anchor={"T_K": an.T_K, "Pr": an.Pr, "vr": an.vr}, T_K=np.asarray(t.T_K, float), marks=tuple(marks),
        columns=tuple(cols), notes=notes, uncertainty=unc, U_columns=U_cols, validity_columns=V_cols,
        stated=stated)


def chart_page(doc) -> dict:
    """How a chart goes onto the book's pages: the box it is drawn in (its labels are placed
    for that box), on one page or with its reading panel on the facing page (small paper),
    and the smallest text size there."""
    from .pagination import MIN_TEXT_SMALL_PT, chart_box, chart_on_two_pages, layout_for
    L = layout_for(doc.paper, doc.orientation)
    _, _, w, h = chart_box(L)
    small = chart_on_two_pages(L)
    return {"box_pt": (w, h), "panel_page": small, "min_pt": MIN_TEXT_SMALL_PT if small else None}


# ---------------------------------------------------------------- fingerprint
def data_files(spec) -> list[Path]:
    """Coefficient and composition files the book's values depend on.

    The files of the data sets its species come from, the atomic weights, shipped
    mixtures and default sources, and every user data file read (a spec's [data],
    --data and the user data folder), whether or not it supplied a species: a user
    file can change which record a name resolves to.
    """
    from ..data.library import library
    lib = library(tuple(spec.data_paths))
    files = set(lib.user_files)
    for t in getattr(spec, "all_tables", ()) or spec.tables:
        for _, ds, _ in t.substance.sources:
            d = lib.datasets.get(ds)
            if d is not None and getattr(d, "path", None) is not None:
                files.add(Path(d.path))
    root = lib.root
    for extra in ("atomic-weights.toml", "mixtures.toml", "defaults.toml"):
        if (root / extra).is_file():
            files.add(root / extra)
    return sorted(files, key=lambda p: (p.name, str(p)))


def fingerprint(normalised: dict, files) -> tuple[str, tuple]:
    """SHA-256 over the canonical JSON of the normalised spec and each data file.

    The hashed text is the spec JSON (sorted keys, no blanks) followed by one line
    ``<file name> <sha256 of its bytes>`` per data file in name order, so the
    value is independent of where the files live.
    """
    h = hashlib.sha256()
    h.update(json.dumps(normalised, sort_keys=True, separators=(",", ":"), ensure_ascii=False).encode())
    listed = []
    for p in files:
        d = hashlib.sha256(Path(p).read_bytes()).hexdigest()
        listed.append((Path(p).name, d))
        h.update(f"\n{Path(p).name} {d}".encode())
    return h.hexdigest(), tuple(listed)


def versions() -> dict:
    import platform

    import numpy
    import reportlab

    from .. import __version__
    return {"tablegen": __version__, "numpy": numpy.__version__, "reportlab": reportlab.Version,
            "python": platform.python_version()}


def extrapolation_text(spec) -> str:
    """The document control entry on extrapolation: every table by the command line, the tables
    whose spec asks, or "" where none may extrapolate (the caution notice says values outside the
    data range are refused)."""
    if spec.document.extrapolate_all:
        return "allowed in every table (tablegen build --extrapolate); such rows are marked x"
    asked = [str(i) for i, t in enumerate(spec.tables, 1) if t.extrapolate]
    if not asked:
        return ""
    which = f"table {asked[0]}" if len(asked) == 1 else f"tables {', '.join(asked)}"
    return f"allowed in {which} (spec key extrapolate); such rows are marked x"


def build_book(spec, tables=None) -> BookModel:
    """Evaluate every table of a validated spec into the book model.

    ``tables`` may pass table models already built (to report progress per table).
    """
    doc = spec.document
    if tables is None:
        tables = tuple(build_table(t, doc) for t in spec.tables)
    seen, subs = set(), []
    for t in tables:
        if t.substance.id not in seen:
            seen.add(t.substance.id)
            subs.append(t.substance)
    present = {c.key for t in tables for c in t.columns}
    used = [k for k in DEFINITIONS if k in present]
    definitions = []
    for k in used:
        sym, name, formula = DEFINITIONS[k]
        units = []
        for t in tables:
            for c in t.columns:
                if c.key == k and c.unit not in units:
                    units.append(c.unit)
        definitions.append((k, sym, name, formula, tuple(units)))
    ref_text = doc.reference.text if any(t.basis == "volumetric" for t in tables) else ""
    fp, listed = fingerprint(spec.normalised, data_files(spec))
    from .provenance import numbered_cautions, sheets_of
    cautions, refs = numbered_cautions(spec, tables, CAUTIONS)
    sheets = sheets_of(spec, tables, refs, cautions)
    appendix = appendix_sections(tables, doc)
    example = worked_example(spec.tables[0], tables[0], doc) if tables else None
    return BookModel(appendix=appendix, extrapolation=extrapolation_text(spec), worked_example=example,
                     name=spec.name, document=doc, tables=tables, substances=tuple(subs),
                     definitions=tuple(definitions), cautions=tuple(cautions), rounding_rule=ROUNDING_RULE,
                     reference_text=ref_text, data_files=listed, fingerprint=fp, versions=versions(),
                     normalised_spec=spec.normalised, sheets=sheets, caution_refs=refs,
                     edition=getattr(spec, "edition", None))
