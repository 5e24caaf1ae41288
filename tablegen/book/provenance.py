"""What a book states beside its tables about how each gas was made.

Numbered cautions (each printed once, referenced from the tables and sheets it
concerns), combustion sheets (tablegen.book.sheet), the one water dew point of a
gas and its condensing rows (mark c), what humid air was made from, and the
parts of U that come from the uncertain inputs of a combustion. Built from the
finished substances; nothing here evaluates a polynomial beyond the table's own
values.
"""

from __future__ import annotations

import numpy as np

from ..core.units import temperature_text as _fmtT


#: The row mark of a condensing row, and what it means (printed on the how-to-read page).
MARK_CONDENSING = "c"
CONDENSING_TEXT = "water may condense at this temperature; ideal-gas values do not hold"


def condensing(sub, T_K) -> np.ndarray:
    """Rows at or below the substance's water dew point (its one figure, at its stated pressure)."""
    T = np.asarray(T_K, float)
    dew = getattr(sub, "dew_point_K", None)
    if dew is None:
        return np.zeros(T.shape, bool)
    return T <= dew * (1 + 1e-12)


def dew_point_note(sub, unit_symbol: str, n_rows: int) -> str:
    """The table note of a gas holding water vapour: its dew point and the rows marked c."""
    from .sheet import dew_point_sentence
    dp = dew_point_sentence(sub.dew_point_K, sub.dew_point_P_Pa)
    if sub.dew_point_K is not None and unit_symbol not in ("K", "°C"):
        # a US table: the figure in its units first, SI in brackets (every figure about a
        # table in that table's units)
        from ..core.units import PSI
        T_us = _fmtT(sub.dew_point_K, unit_symbol).split(" = ")[0].split(" (")[0]
        dp = f"{T_us} at {sub.dew_point_P_Pa / PSI:.4g} psia ({dp})"
    rows = (f"{n_rows} row{'s' if n_rows != 1 else ''} at or below it marked c: {CONDENSING_TEXT}"
            if n_rows else "no row of this table is at or below it")
    return f"c water dew point of this gas {dp}; {rows}."


def made_from(s) -> tuple[list, dict | None, list]:
    """What the front matter, the JSON and the CSVW say a substance was made from:
    (description sentences, combustion JSON or None, figures at full precision)."""
    from ..calc.burn_result import CombustionResult
    from ..calc.oxidants import Oxidant
    from . import sheet
    origin = getattr(s, "origin", None)
    description, combustion, figs = [], None, []
    if s.dew_point_P_Pa is not None:
        figs += [("dew_point_K", "water dew point", s.dew_point_K, "K", None),
                 ("dew_point_P_Pa", "pressure of the water dew point", s.dew_point_P_Pa, "Pa", None)]
    if isinstance(origin, Oxidant):
        o = origin
        if o.y_H2O > 0:
            rh = ("" if o.relative_humidity is None or o.humidity_given == "relative_humidity" or o.T_K is None
                  else f", relative humidity {o.relative_humidity:.4g} % at {o.T_K - 273.15:g} °C")
            description.append(f"Humid air as typed, {o.spec}: humidity ratio {o.humidity_ratio * 1000:.5g} g water "
                               f"per kg dry gas, water {o.y_H2O * 100:.5g} % by volume{rh} (water saturation "
                               f"pressure from IAPWS-IF97, ideal-gas mixing).")
        else:
            description.append(f"Dry oxidant as typed, {o.spec}: O2 {o.o2_percent_dry:.4g} % by volume.")
        figs += [("humidity_ratio", "humidity ratio", o.humidity_ratio, "kg/kg", None),
                 ("water_mole_fraction", "water mole fraction", o.y_H2O, "1", None)]
        if o.relative_humidity is not None:
            figs.append(("relative_humidity", "relative humidity", o.relative_humidity, "%", None))
    elif isinstance(origin, CombustionResult):
        combustion = sheet.to_json(origin)
        description.append(f"The {'dry' if 'H2O' not in {c.id for c in s.components} else 'wet'} flue gas of "
                           f"{origin.fuel.name} with {origin.oxidant.name} at λ = {origin.air_ratio:.4f}, frozen "
                           f"complete combustion: its combustion sheet states everything it was computed from.")
        figs = [f for f in figs if f[0] not in ("dew_point_K", "dew_point_P_Pa")] + sheet.figures(origin)
    if s.dew_point_P_Pa is not None:
        description.append(f"Water dew point {sheet.dew_point_sentence(s.dew_point_K, s.dew_point_P_Pa)}"
                           + ("" if isinstance(origin, CombustionResult) else
                              " (its stated pressure, 101.325 kPa unless the gas states one)") +
                           "; table rows at or below it are marked c.")
    return description, combustion, figs


def _in_table_unit(t, key: str, v: float, fig: dict) -> str:
    """An absolute part of U (SI, as the budget holds it) in the unit the table prints that
    column in: every figure about a table is in that table's units (a table in both
    systems speaks SI, as its appendix does)."""
    from ..spec.columns import unit_factor, unit_for
    system = "US" if t.units == "US" else "SI"
    try:
        factor, unit = unit_factor(key, system, t.basis), unit_for(key, system, t.basis)
    except KeyError:
        return _si_text(v, fig.get("unit", ""))
    return f"{v / factor:.2g} {unit}"


def _si_text(v: float, unit: str) -> str:
    """'2.5e+04 J/kg' -> '25 kJ/kg': an SI figure in the unit the tables print."""
    if unit.startswith("J/") and abs(v) >= 100:
        return f"{v / 1000:.2g} k{unit}"
    return f"{v:.2g} {unit}"


def input_contributions(tables) -> list:
    """One paragraph per table whose composition comes from uncertain combustion inputs: each
    input's largest part of U (k = 2) per column, so the reader sees where U comes from."""
    out = []
    for t in tables:
        keys = (t.uncertainty or {}).get("keys", {})
        parts: dict = {}
        for key, fig in keys.items():
            for b in fig.get("bands", []):
                for name, v in b.get("components", {}).items():
                    if not name.startswith("composition: ") or v is None:
                        continue
                    rel = None
                    if b.get("U_rel") is not None and b.get("U"):
                        rel = v / b["U"] * b["U_rel"]
                    cur = parts.setdefault(name[len("composition: "):], {}).get(key)
                    val = (rel, v) if rel is not None else (None, v)
                    if cur is None or (val[1] > cur[1]):
                        parts[name[len("composition: "):]][key] = val
        if not parts:
            continue
        items = []
        for name, per in parts.items():
            figs = ", ".join(f"{k} {rel * 100:.2g} %" if rel is not None else f"{k} {_in_table_unit(t, k, v, keys[k])}"
                             for k, (rel, v) in per.items())
            items.append(f"{name}: {figs}")
        out.append(f"{t.title}: the flue-gas composition comes from inputs stated with an uncertainty "
                   f"(combustion sheet); each input's largest part of U (k = 2), propagated through the "
                   f"combustion calculation: " + "; ".join(items) + ".")
    return out


def caution_title(text: str) -> str:
    """A short name of a caution: its words before the first ':' (or its first six words)."""
    body = text.split(". ", 1)[1] if text[:1] == "C" and ". " in text[:6] else text
    head = body.split(":", 1)[0]
    if len(head) > 70 or head == body:
        head = " ".join(body.split()[:6]).rstrip(",;.") + " …"
    return head


def numbered_cautions(spec, tables, book_cautions) -> tuple[list, dict]:
    """Every caution once, numbered C1, C2, ...: the book's own, then those the substances carry,
    each with the substances it concerns; and {substance id: ids of its cautions}. The tables
    of each substance get a note that points to its cautions."""
    texts = list(book_cautions)
    who: dict = {}
    refs: dict = {}
    for ts, tm in zip(spec.tables, tables):
        for text in ts.substance.cautions:
            if text not in texts:
                texts.append(text)
            names = who.setdefault(text, [])
            if tm.substance.name not in names:
                names.append(tm.substance.name)
            ids = refs.setdefault(tm.substance.id, [])
            cid = f"C{texts.index(text) + 1}"
            if cid not in ids:
                ids.append(cid)
    out = []
    for i, text in enumerate(texts, 1):
        names = who.get(text)
        out.append(f"C{i}. {text}" + (f" (Applies to: {'; '.join(names)}.)" if names else ""))
    for tm in tables:
        ids = refs.get(tm.substance.id)
        if ids:
            tm.notes.insert(0, f"Cautions {_ref_list(ids)} (Caution section) concern this gas, besides "
                               f"C1-C{len(book_cautions)} for every table.")
    return out, refs


def _ref_list(ids) -> str:
    return ids[0] if len(ids) == 1 else ", ".join(ids[:-1]) + " and " + ids[-1]


def sheets_of(spec, tables, refs, cautions) -> tuple:
    """One combustion sheet per combustion that defines a substance of the book."""
    from ..calc.burn_result import CombustionResult
    from . import sheet
    titles = {c.split(". ", 1)[0]: caution_title(c) for c in cautions}
    order, names = [], {}
    for ts, tm in zip(spec.tables, tables):
        r = getattr(ts.substance, "origin", None)
        if not isinstance(r, CombustionResult):
            continue
        key = id(r)
        if key not in names:
            order.append((key, r, tm.substance.id))
            names[key] = []
        if tm.substance.name not in names[key]:
            names[key].append(tm.substance.name)
    return tuple(sheet.build(r, tuple(names[key]), tuple(refs.get(sid, ())), titles) for key, r, sid in order)
