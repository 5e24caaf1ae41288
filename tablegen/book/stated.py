"""What a book states about its values: the uncertainty U of each printed column and,
apart from it, the range of validity of the ideal-gas values.

The table model (book/model.py) calls these while it builds a table: the digits a
column's uncertainty supports, the notes under the table (U per column, and the
real gas's departure at the book's max_pressure as a separate statement), the
budget's figures for the JSON sidecar, the U_<column> CSV columns, and the two
appendix sections. Nothing here lays out a page.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..calc.realgas import Wording


@dataclass(frozen=True, slots=True)
class Section:
    """A front-matter or appendix section of a book: paragraphs and an optional small table."""

    title: str
    paragraphs: tuple = ()
    header: tuple = ()
    rows: tuple = ()

#: Columns the uncertainty budget covers (tablegen.calc.uncertainty); the mean-cp aids are not.
BUDGET_KEYS = ("cp", "cv", "k", "h", "u", "s0", "g0", "Pr", "vr", "a")

#: Columns whose U is printed in their unit (energies with an arbitrary datum), not in %.
ENERGY_COLUMNS = ("h", "u", "g0")


def basis_scale(key: str, sub, basis: str, reference) -> float:
    """SI value on the table's basis of one SI unit on the mass basis, for ``key``."""
    from ..core.constants import R_MOLAR
    if key in ("k", "Pr", "vr", "a") or basis == "mass":
        return 1.0
    Mk = sub.M * 1e-3
    if basis == "molar":
        return Mk
    return Mk * reference.P_Pa / (R_MOLAR * reference.T_K)


def _printed_factor(key, col, t, doc, sub) -> float:
    from ..spec.columns import unit_factor
    return unit_factor(key, col.system, t.basis) / basis_scale(key, sub, t.basis, doc.reference)


def auto_digits(t, doc, sub) -> dict:
    """Digits of the columns whose digits the spec leaves open, from their uncertainty.

    (key, system) -> {"decimals": n} for a column printed to decimals
    (tablegen.calc.uncertainty.digits_for) or {"significant": n} for one printed to
    significant digits, Pr and vr (tablegen.calc.uncertainty.significant_for), at the row
    where the data part of U (with a refit's residual), absolute or relative, is
    smallest. The composition part differs between users of one table and the
    rounding part depends on this very choice, so neither enters.
    """
    want = [c for c in t.columns if getattr(c, "auto", False) and c.key in BUDGET_KEYS]
    inside = (t.T_K >= sub.T_min) & (t.T_K <= sub.T_max)
    if not want or not inside.any():
        return {}
    from ..calc import uncertainty as unc
    keys = list(dict.fromkeys(c.key for c in want))
    # one row for T_rows: the interpolation part is not needed for this choice
    b = unc.budget(sub, t.T_K[inside], keys, P_max_Pa=doc.max_pressure_Pa, T_rows=t.T_K[inside][:1])
    out = {}
    for c in want:
        parts = b.u[c.key]
        U = unc.COVERAGE * np.hypot(parts["data"], parts.get("fit residual", 0.0))
        ok = np.isfinite(U) & (U > 0)
        if not ok.any():
            continue
        if c.significant is not None:
            out[(c.key, c.system)] = {"significant": unc.significant_for(U[ok] / np.abs(b.values[c.key][ok]))}
        else:
            uf = _printed_factor(c.key, c, t, doc, sub)
            out[(c.key, c.system)] = {"decimals": int(np.clip(np.max(unc.digits_for(U[ok], unit_factor=uf)), 0, 8))}
    return out


def _factor(key: str, system: str, t, doc, sub) -> float:
    """SI value on the mass basis of one printed unit of ``key`` in ``system`` on the table's basis."""
    from ..spec.columns import unit_factor
    return unit_factor(key, system, t.basis) / basis_scale(key, sub, t.basis, doc.reference)


def figure(x: float) -> str:
    """Two significant digits in plain decimals (0.000019, 0.24, 240): a figure a reader compares
    with the printed digits at a glance, never in exponent form."""
    if not np.isfinite(x) or x == 0:
        return "0"
    x = float(f"{x:.2g}")           # round first: 0.000998 is 0.0010, not 0.00100
    d = max(0, 1 - int(np.floor(np.log10(abs(x)))))
    return f"{x:.{d}f}"


class TableWording(Wording):
    """The validity statements in a table's own units: its first temperature unit, bar or psia,
    h and s per its basis and system (a table in both systems speaks SI)."""

    range_join = " to "

    def __init__(self, t, doc, sub):
        super().__init__(sub.M * 1e-3)
        from ..core.units import PSI, unit
        from ..spec.columns import unit_for
        system = "US" if t.units == "US" else "SI"
        self.t_unit = unit(t.temperature_units[0], "temperature")
        self.temperature_symbol = self.t_unit.symbol
        self.pressure_unit = ("psia", PSI) if system == "US" else ("bar", 1e5)
        self.energy_units = {k: (unit_for(col, system, t.basis), _factor(col, system, t, doc, sub))
                             for k, col in (("h", "h"), ("s", "s0"))}

    def number(self, x: float) -> str:
        return figure(x)

    def temperature(self, T_K: float, fmt: str = ".3f") -> str:
        text = f"{self.t_unit.from_si(T_K):{fmt}}"
        text = text.rstrip("0").rstrip(".") if "." in text else text
        return "0" if text == "-0" else text

    def P(self, P_Pa: float) -> str:
        sym, f = self.pressure_unit
        return f"{P_Pa / f:.4g} {sym}"


def _in_table_units(t, doc, sub, first, b, inside) -> dict:
    """What the appendix says about one table, every figure in the table's units.

    ``bands``: (column, temperature band, U) rows; ``interpolation``: the largest
    error of linear interpolation per column; ``statements``: the budget's other
    statements (no figures); ``validity``: the range-of-validity sentences.
    """
    from ..calc.realgas import model_statements, virial_mixture
    w = TableWording(t, doc, sub)
    bands, inter = [], {}
    for k in b.keys:
        c = first[k]
        uf = _printed_factor(k, c, t, doc, sub)
        for x in b.bands(k):
            rel = np.isfinite(x.U_rel_max) and k not in ENERGY_COLUMNS
            val = f"{x.U_rel_max * 100:.2g} %" if rel else f"{figure(x.U_max / uf)} {c.unit}"
            mark = " (estimated)" if x.estimated else " (upper estimate)" if x.upper else ""
            bands.append((k, w.T_range(x.T_lo_K, x.T_hi_K), val + mark))
        if k in b.interpolation:
            unit = "" if c.unit == "-" else f" {c.unit}"
            inter[k] = f"{c.symbol} {figure(float(np.max(b.interpolation[k])) / uf)}{unit}"
    T = t.T_K[inside]
    vir = virial_mixture(sub.components, T)
    if vir is None:
        validity = list(b.validity)          # no figures: the statement that nothing is estimated
    else:
        props = sub.properties(T, doc.max_pressure_Pa)
        validity = model_statements(sub, vir, T, doc.max_pressure_Pa, props, wording=w)
    other = [st for st in b.statements if not st.startswith("linear interpolation")]
    return {"bands": tuple(bands), "interpolation": ", ".join(inter.values()), "interpolation_by_key": inter,
            "statements": tuple(other),
            "validity": tuple(validity), "pressure": w.P(doc.max_pressure_Pa)}


def _figure(key, col, b, U, ok, uf, *, value=None) -> str:
    rel = [x.U_rel_max for x in b.bands(key) if np.isfinite(x.U_rel_max)]
    if rel and key not in ENERGY_COLUMNS:
        return f"{max(rel) * 100:.2g} %"
    return f"{U[ok].max() / uf:.2g} {col.unit}"


def uncertainty_notes(t, doc, sub, cols, notes):
    """Budget of the table's printed columns: notes per column, JSON figures, CSV columns.

    Under the table: the expanded uncertainty U (k = 2) of each column, largest over
    the table, and, as a separate statement, how far the real gas departs from the
    ideal-gas values at the book's max_pressure. The printed digits are checked
    against U (tablegen.calc.uncertainty.digits_for). Values outside the data range
    (extrapolated) carry no stated uncertainty.
    """
    from ..calc import uncertainty as unc
    keys = [k for k in dict.fromkeys(c.key for c in cols) if k in BUDGET_KEYS]
    inside = (t.T_K >= sub.T_min) & (t.T_K <= sub.T_max)
    if not keys or not inside.any():
        return None, (), (), {}
    first = {}
    for c in cols:
        first.setdefault(c.key, c)
    steps = {k: 10.0 ** (-first[k].decimals) * _printed_factor(k, first[k], t, doc, sub)
             for k in keys if first[k].decimals is not None}
    from ..calc.burn_inputs import composition_inputs
    cu = getattr(t, "composition_u", None)
    b = unc.budget(sub, t.T_K[inside], keys, P_max_Pa=doc.max_pressure_Pa, printed_step=steps,
                   composition_u=None if cu is None else cu[1],
                   composition_basis="mole" if cu is None else cu[0],
                   composition_inputs=composition_inputs(sub))
    figures, departs = [], []
    for k in keys:
        c = first[k]
        uf = _printed_factor(k, c, t, doc, sub)
        U = b.U(k)
        ok = np.isfinite(U) & (U > 0)
        if not ok.any():
            continue
        est = any(x.estimated for x in b.bands(k))
        upper = any(x.upper for x in b.bands(k))
        figures.append(f"{c.symbol} {_figure(k, c, b, U, ok, uf)}"
                       f"{' (est.)' if est else ' (upper est.)' if upper else ''}")
        dep = b.departures.get(k)
        if dep is not None:
            if k in ENERGY_COLUMNS:
                departs.append(f"{c.symbol} {figure(dep.max() / uf)} {c.unit}")
            else:
                departs.append(f"{c.symbol} {np.max(dep / np.abs(b.values[k])) * 100:.2g} %")
        if c.decimals is not None:
            want = unc.digits_for(U[ok], unit_factor=uf)
            lo, hi = int(np.min(want)), int(np.max(want))
            if c.decimals < lo:
                notes.append(f"{c.symbol}: {c.decimals} decimals print coarser than the uncertainty "
                             f"supports ({lo} would keep rounding below U/4).")
            elif c.decimals > hi + 1:
                notes.append(f"{c.symbol}: {c.decimals} decimals print finer than the uncertainty "
                             f"supports (the last {c.decimals - hi - 1} digit(s) are not significant).")
        elif c.significant is not None:
            want = unc.significant_for(U[ok] / np.abs(b.values[k][ok]))
            if c.significant < want:
                notes.append(f"{c.symbol}: {c.significant} significant digits print coarser than the "
                             f"uncertainty supports ({want} would keep rounding below U/4).")
            elif c.significant > want + 1:
                notes.append(f"{c.symbol}: {c.significant} significant digits print finer than the "
                             f"uncertainty supports (the last {c.significant - want - 1} digit(s) are "
                             f"not significant).")
    stated = _in_table_units(t, doc, sub, first, b, inside)
    if figures:
        notes.append("Uncertainty U (k = 2) of the printed ideal-gas values (data and fit, composition, rounding), "
                     "largest over the table: " + ", ".join(figures) + "; per band in the appendix.")
    if stated["interpolation"]:
        notes.append("Linear interpolation between adjacent rows adds at most: " + stated["interpolation"] +
                     " (largest over the table, beside U; a worked example is on the how-to-read page).")
    if departs:
        notes.append(f"Range of validity, stated apart from U: at {stated['pressure']} the real gas departs from "
                     f"these ideal-gas values by at most " + ", ".join(departs) +
                     " (second-virial estimate with its own uncertainty); pressure limits in the appendix.")
    U_cols = ()
    if doc.uncertainty_columns:
        U_cols = []
        for c in cols:
            if c.key in keys:
                full = np.full(t.T_K.shape, np.nan)
                full[inside] = b.U(c.key) / _printed_factor(c.key, c, t, doc, sub)
                U_cols.append((f"U_{c.csv_header}", full))
        U_cols = tuple(U_cols)
    V_cols = _validity_columns(t, doc, sub, cols, b, inside) if doc.validity_columns else ()
    return b.to_json(), U_cols, V_cols, stated


def _validity_columns(t, doc, sub, cols, b, inside) -> tuple:
    """Z at max_pressure and the departure bound of every column it applies to, on the
    table's rows (NaN outside the data range), as (csv header, values, description)."""
    from ..calc.realgas import virial_mixture
    P_bar = doc.max_pressure_Pa / 1e5
    out = []
    T = t.T_K[inside]
    vir = virial_mixture(sub.components, T)
    if vir is None:
        return ()
    full = np.full(t.T_K.shape, np.nan)
    full[inside] = vir.Z(T, doc.max_pressure_Pa)
    out.append(("Z [-]", full, f"compressibility factor of the real gas at {P_bar:g} bar (max_pressure), "
                               f"second-virial estimate; 1 for the ideal gas of the table"))
    for c in cols:
        dep = b.departures.get(c.key)
        if dep is None:
            continue
        full = np.full(t.T_K.shape, np.nan)
        full[inside] = dep / _printed_factor(c.key, c, t, doc, sub)
        out.append((f"realgas_{c.csv_header}", full,
                    f"upper bound of |real gas - ideal gas| of the column named at {P_bar:g} bar "
                    f"(second-virial estimate with its uncertainty): where the table applies, not "
                    f"part of its uncertainty; empty outside the data range"))
    return tuple(out)


def _uncertainty_section(tables, doc):
    rows = []
    assumptions, sources, paras_tables = [], [], []
    for t in tables:
        u = t.uncertainty
        if not u:
            continue
        for a in u.get("assumptions", []):
            # the one figure of the assumptions, in psia too where a table is in US units
            a = a.replace(f"P_max = {doc.max_pressure_Pa / 1e5:g} bar", f"P_max = {_max_pressure_text(tables, doc)}")
            if a not in assumptions:
                assumptions.append(a)
        for sname in u.get("sources", []):
            if str(sname) not in sources:
                sources.append(str(sname))
        st = t.stated           # every figure in the table's own units
        if st.get("interpolation"):
            paras_tables.append(f"{t.title}: linear interpolation between adjacent printed rows adds at "
                                f"most: {st['interpolation']} (largest over the table)")
        paras_tables += [f"{t.title}: {x}" for x in st.get("statements", ())]
        rows += [(t.name, key, band, val) for key, band, val in st.get("bands", ())]
    paras = [
        "Each printed column carries a combined expanded uncertainty U (coverage factor k = 2), "
        "given under its table and listed per temperature band below. U covers the printed ideal-gas "
        "values only, from four parts, each computed, not assumed: (1) data: the published uncertainty "
        "of the source functions where one exists (CODATA key values at 298.15 K) and, across "
        "temperature, the spread of the printed evaluation against independent evaluations of "
        "comparable quality (gasdata/agreement.toml; for the NIST-JANAF refits the NASA 2002 air set and "
        "the ideal-gas parts of the reference equations of state, IAPWS-95 for water); a less accurate "
        "evaluation only where no comparable one compares (marked \"upper estimate\"), a documented "
        "default for the species' class where none does (marked \"estimated\"); (2) fit residual: a "
        "refit's stated residual against the table it was fitted to; (3) composition, when fraction "
        "uncertainties are given, by linear sensitivity; (4) rounding: half a unit of the last printed "
        "digit. Interpolation between printed rows is stated beside U as the largest error linear "
        "interpolation can make.",
        "The parts are combined in quadrature and expanded with k = 2. How far a real gas departs from "
        "the ideal-gas values at pressure is not part of U: it is stated in the next appendix as the "
        "range of validity of the tables. These figures describe the tables, not a design margin.",
    ]
    paras += paras_tables
    from .provenance import input_contributions
    paras += input_contributions(tables)
    paras += [f"Assumption: {a}" for a in assumptions]
    if sources:
        paras.append("Sources of the figures: " + "; ".join(sources) + ".")
    return Section(title="Uncertainty of the printed values", paragraphs=tuple(paras),
                   header=("table", "column", "band", "U (k = 2)"), rows=tuple(rows))


def _validity_section(tables, doc):
    paras = [
        "The tables give the ideal-gas functions exactly, within the uncertainty of the previous "
        "appendix. A real gas departs from them as the pressure rises and near condensation. The "
        "statements below say where the ideal-gas values hold, at the book's stated maximum pressure "
        f"({_max_pressure_text(tables, doc)}, document key max_pressure), estimated from the second "
        "virial coefficient (Tsonopoulos correlation) with its own uncertainty; they are a limit of "
        "use, not an uncertainty of the printed values.",
    ]
    for t in tables:
        if t.uncertainty:
            paras += [f"{t.title}: {st}" for st in t.stated.get("validity", ())]
    return Section(title="Range of validity of the ideal-gas values", paragraphs=tuple(paras))


def _max_pressure_text(tables, doc) -> str:
    """The book's max_pressure in bar, and in psia beside it where a table is in US units."""
    from ..core.units import PSI
    P = doc.max_pressure_Pa
    text = f"{P / 1e5:g} bar"
    if any(t.units == "US" for t in tables):
        text += f" = {P / PSI:.4g} psia"
    return text


def appendix_sections(tables, doc) -> list:
    """The appendix sections a book prints after its tables (none without a budget)."""
    if not any(t.uncertainty for t in tables):
        return []
    return [_uncertainty_section(tables, doc), _validity_section(tables, doc)]


def _operand(text: str, bare: bool = False) -> str:
    """A printed number as it reads in a sum: the true minus sign, a negative one in parentheses."""
    t = text.replace("-", "−")
    return t if bare or not t.startswith("−") else f"({t})"


#: Where between its two rows the worked example reads (a fraction of the row step).
EXAMPLE_FRACTION = 0.3


def _example_column(tm):
    """The column the worked example reads: h where printed to decimals, else the first such column."""
    cols = [c for c in tm.columns if c.key in BUDGET_KEYS and c.decimals is not None]
    return next((c for c in cols if c.key == "h"), cols[0] if cols else None)


def worked_example(ts, tm, doc):
    """How to read between two printed rows, from the book's first table (a Section, or None).

    Two adjacent plain rows inside the data range, a third of the way into the
    table; the value read EXAMPLE_FRACTION of the step past the first, linearly
    from the printed (rounded) values, to the column's decimals; the interpolation
    bound of these two rows and the table's largest (printed under the table),
    and U at the two rows. ``ts`` is the table spec, ``tm`` its model.
    """
    from ..calc import uncertainty as unc
    from ..calc.interpolation import interpolation_bound
    from ..core.units import unit
    sub = ts.substance
    c = _example_column(tm)
    tcol = tm.columns[0]
    inside = (tm.T_K >= sub.T_min) & (tm.T_K <= sub.T_max)
    plain = [i for i in range(tm.rows - 1) if not tm.marks[i] and not tm.marks[i + 1]
             and inside[i] and inside[i + 1]]
    if c is None or not plain:
        return None
    i = next((j for j in plain if j >= tm.rows // 3), plain[-1])
    T1, T2 = float(tm.T_K[i]), float(tm.T_K[i + 1])
    u = unit(tcol.unit, "temperature")
    t1, t2 = float(tcol.values[i]), float(tcol.values[i + 1])
    t_read = t1 + EXAMPLE_FRACTION * (t2 - t1)
    j = [x.key for x in tm.columns].index(c.key)
    v1, v2 = (float(x) for x in (tm.columns[j].cells[i], tm.columns[j].cells[i + 1]))
    v = v1 + (t_read - t1) / (t2 - t1) * (v2 - v1)
    uf = _printed_factor(c.key, c, ts, doc, sub)
    bound = float(interpolation_bound(sub, c.key, np.array([T1, T2]), P_Pa=doc.max_pressure_Pa)[0]) / uf
    step = {c.key: 10.0 ** (-c.decimals) * uf}
    cu = getattr(ts, "composition_u", None)
    b = unc.budget(sub, np.array([T1, T2]), [c.key], P_max_Pa=doc.max_pressure_Pa, printed_step=step,
                   composition_u=None if cu is None else cu[1],
                   composition_basis="mole" if cu is None else cu[0], T_rows=np.array([]))
    U = float(np.max(b.U(c.key))) / uf
    # the reading's temperature to the column's decimals, or as many more as it needs (at most 3)
    td = next((d for d in range(tcol.decimals, 4) if abs(round(t_read, d) - t_read) < 1e-9), 3)
    T_text = f"{t_read:.{td}f}"
    sym, un = c.symbol, c.unit
    cells = [tcol.cells[i], tm.columns[j].cells[i]], [tcol.cells[i + 1], tm.columns[j].cells[i + 1]]
    read = f"{v:.{c.decimals}f}"
    largest = tm.stated.get("interpolation_by_key", {}).get(c.key, "")
    n = _operand
    paras = (
        f"Worked example, from Table 1 ({tm.title}): to read {sym} at {n(T_text)} {u.symbol}, take the "
        f"printed rows at {n(cells[0][0])} and {n(cells[1][0])} {u.symbol} and interpolate linearly "
        f"between them: {sym} = {n(cells[0][1])} + ({n(T_text)} − {n(cells[0][0])})/({n(cells[1][0])} − "
        f"{n(cells[0][0])}) × ({n(cells[1][1])} − {n(cells[0][1])}) = {n(read, bare=True)} {un}.",
        f"How good the reading is: linear interpolation between these two rows adds at most "
        f"{figure(bound)} {un}; the largest over the table, {largest}, printed under it, bounds it "
        f"between any two rows. The printed values carry the expanded uncertainty U = {figure(U)} {un} "
        f"(k = 2) here. So {sym}({n(T_text, bare=True)} {u.symbol}) = {n(read, bare=True)} {un} within "
        f"{figure(U)} + {figure(bound)} = {figure(U + bound)} {un}. Rows marked x (extrapolated) carry "
        f"no stated bound.",
    )
    rows = ((cells[0][0], cells[0][1], "printed row"),
            (T_text, read, f"read, {EXAMPLE_FRACTION:g} of the step past the row above"),
            (cells[1][0], cells[1][1], "printed row"))
    return Section(title="Reading between rows: a worked example", paragraphs=paras,
                   header=(f"T [{u.symbol}]", f"{sym} [{un}]", ""), rows=rows)
