"""What a book states about its values: the uncertainty U of each printed column and,
apart from it, the range of validity of the ideal-gas values.

The table model (book/model.py) calls these while it builds a table: the digits a
column's uncertainty supports, the notes under the table (U per column, and the
real gas's departure at the book's max_pressure as a separate statement), the
budget's figures for the JSON sidecar, the U_<column> CSV columns, and the two
appendix sections. Nothing here lays out a page.
"""

from __future__ import annotations

import numpy as np

#: Columns the uncertainty budget covers (tablegen.uncertainty); the mean-cp aids are not.
BUDGET_KEYS = ("cp", "cv", "k", "h", "u", "s0", "g0", "Pr", "vr", "a")

#: Columns whose U is printed in their unit (energies with an arbitrary datum), not in %.
ENERGY_COLUMNS = ("h", "u", "g0")


def basis_scale(key: str, sub, basis: str, reference) -> float:
    """SI value on the table's basis of one SI unit on the mass basis, for ``key``."""
    from ..thermo.substance import R_MOLAR
    if key in ("k", "Pr", "vr", "a") or basis == "mass":
        return 1.0
    Mk = sub.M * 1e-3
    if basis == "molar":
        return Mk
    return Mk * reference.P_Pa / (R_MOLAR * reference.T_K)


def _printed_factor(key, col, t, doc, sub) -> float:
    from .model import unit_factor
    return unit_factor(key, col.system, t.basis) / basis_scale(key, sub, t.basis, doc.reference)


def auto_decimals(t, doc, sub) -> dict:
    """Decimals of the columns whose digits the spec leaves open, from their uncertainty.

    (key, system) -> decimals: tablegen.uncertainty.digits_for at the row where the
    data part of U (with a refit's residual) is smallest. The composition part
    differs between users of one table and the rounding part depends on this very
    choice, so neither enters.
    """
    want = [c for c in t.columns if getattr(c, "auto", False) and c.decimals is not None
            and c.key in BUDGET_KEYS]
    inside = (t.T_K >= sub.T_min) & (t.T_K <= sub.T_max)
    if not want or not inside.any():
        return {}
    from .. import uncertainty as unc
    keys = list(dict.fromkeys(c.key for c in want))
    # one row for T_rows: the interpolation part is not needed for this choice
    b = unc.budget(sub, t.T_K[inside], keys, P_max_Pa=doc.max_pressure_Pa, T_rows=t.T_K[inside][:1])
    out = {}
    for c in want:
        parts = b.u[c.key]
        U = unc.COVERAGE * np.hypot(parts["data"], parts.get("fit residual", 0.0))
        ok = np.isfinite(U) & (U > 0)
        if ok.any():
            uf = _printed_factor(c.key, c, t, doc, sub)
            out[(c.key, c.system)] = int(np.clip(np.max(unc.digits_for(U[ok], unit_factor=uf)), 0, 8))
    return out


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
    against U (tablegen.uncertainty.digits_for). Values outside the data range
    (extrapolated) carry no stated uncertainty.
    """
    from .. import uncertainty as unc
    keys = [k for k in dict.fromkeys(c.key for c in cols) if k in BUDGET_KEYS]
    inside = (t.T_K >= sub.T_min) & (t.T_K <= sub.T_max)
    if not keys or not inside.any():
        return None, (), ()
    first = {}
    for c in cols:
        first.setdefault(c.key, c)
    steps = {k: 10.0 ** (-first[k].decimals) * _printed_factor(k, first[k], t, doc, sub)
             for k in keys if first[k].decimals is not None}
    from ..burn_inputs import composition_inputs
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
                departs.append(f"{c.symbol} {dep.max() / uf:.2g} {c.unit}")
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
    P_bar = doc.max_pressure_Pa / 1e5
    if figures:
        notes.append("Uncertainty U (k = 2) of the printed ideal-gas values (data and fit, composition, rounding), "
                     "largest over the table: " + ", ".join(figures) + "; per band in the appendix.")
    if departs:
        notes.append(f"Range of validity, stated apart from U: at {P_bar:g} bar the real gas departs from "
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
    return b.to_json(), U_cols, _validity_columns(t, doc, sub, cols, b, inside) if doc.validity_columns else ()


def _validity_columns(t, doc, sub, cols, b, inside) -> tuple:
    """Z at max_pressure and the departure bound of every column it applies to, on the
    table's rows (NaN outside the data range), as (csv header, values, description)."""
    from ..realgas import virial_mixture
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
    from .model import Section
    rows = []
    assumptions, sources, paras_tables = [], [], []
    for t in tables:
        u = t.uncertainty
        if not u:
            continue
        for a in u.get("assumptions", []):
            if a not in assumptions:
                assumptions.append(a)
        for sname in u.get("sources", []):
            if str(sname) not in sources:
                sources.append(str(sname))
        for st in u.get("statements", []):
            paras_tables.append(f"{t.title}: {st}")
        for key, fig in u.get("keys", {}).items():
            for b in fig.get("bands", []):
                rel = b.get("U_rel")
                val = f"{rel * 100:.2g} %" if rel is not None else f"{b.get('U')} {fig.get('unit', '')}"
                mark = " (estimated)" if b.get("estimated") else " (upper estimate)" if b.get("upper_estimate") else ""
                rows.append((t.name, key, f"{b['T_lo_K']:g}-{b['T_hi_K']:g} K", val + mark))
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
    from .model import Section
    paras = [
        "The tables give the ideal-gas functions exactly, within the uncertainty of the previous "
        "appendix. A real gas departs from them as the pressure rises and near condensation. The "
        "statements below say where the ideal-gas values hold, at the book's stated maximum pressure "
        f"({doc.max_pressure_Pa / 1e5:g} bar, document key max_pressure), estimated from the second "
        "virial coefficient (Tsonopoulos correlation) with its own uncertainty; they are a limit of "
        "use, not an uncertainty of the printed values.",
    ]
    for t in tables:
        u = t.uncertainty
        if not u:
            continue
        for st in u.get("validity", {}).get("statements", []):
            paras.append(f"{t.title}: {st}")
    return Section(title="Range of validity of the ideal-gas values", paragraphs=tuple(paras))


def appendix_sections(tables, doc) -> list:
    """The appendix sections a book prints after its tables (none without a budget)."""
    if not any(t.uncertainty for t in tables):
        return []
    return [_uncertainty_section(tables, doc), _validity_section(tables, doc)]
