"""The JSON sidecar of a book: what was built, from what, with which tool.

Its schema is docs/book-json-schema.json (documented in docs/spec.md). It holds
the normalised spec, datums, anchors, compositions, sources per species, the
versions of the tools and the SHA-256 fingerprint printed in the PDF footer.
Keys are sorted so the bytes are reproducible.
"""

from __future__ import annotations

SCHEMA_ID = "tablegen-book/1"


def sidecar(book, files: dict) -> dict:
    """JSON-ready dict; ``files`` maps "pdf" and "csv" to the file names written."""
    from .csvout import MARK_CODES
    subs = []
    for s in book.substances:
        subs.append({
            "id": s.id, "name": s.name, "kind": s.kind, "M_g_per_mol": s.M, "R_J_per_kgK": s.R,
            "T_min_K": s.T_min, "T_max_K": s.T_max, "mixing_entropy_over_R": s.mixing_entropy_R,
            "components": [{"id": c.id, "mole_fraction": c.mole_fraction, "mass_fraction": c.mass_fraction,
                            "M_g_per_mol": c.M, "data_set": c.source} for c in s.components],
            "sources": [{"species": a, "data_set": b, "citation": c} for a, b, c in s.sources],
            "dew_point": None if s.dew_point_P_Pa is None else {"T_K": s.dew_point_K, "P_Pa": s.dew_point_P_Pa,
                                                                 "method": "IAPWS-IF97 eq. 31 at the water "
                                                                           "partial pressure"},
            "description": list(s.description),
            "combustion": None if s.combustion is None else
            dict(s.combustion, cautions=list(book.caution_refs.get(s.id, ()))),
            "cautions": list(book.caution_refs.get(s.id, ())),
        })
    tables = []
    for t, csv, meta in zip(book.tables, files["csv"], files["csv_metadata"]):
        tables.append({
            "name": t.name, "title": t.title, "substance_id": t.substance.id, "basis": t.basis,
            "units": t.units, "rows": t.rows, "csv": csv, "csv_metadata": meta,
            "datum": dict(t.datum, text=t.datum_text), "P_ref_Pa": t.P_ref_Pa,
            "anchor": dict(t.anchor), "mean_cp_from_K": t.mean_cp_from_K, "grid": t.grid_text,
            "columns": [{"key": c.key, "csv_header": c.csv_header, "unit": c.unit, "system": c.system,
                         "decimals": c.decimals, "significant": c.significant} for c in t.columns],
            "notes": list(t.notes),
            "marks": {m: MARK_CODES[m] for m in MARK_CODES if any(m in r for r in t.marks)},
            "cautions": list(book.caution_refs.get(t.substance.id, ())),
            "uncertainty": t.uncertainty,
        })
    d = book.document
    return {
        "schema": SCHEMA_ID,
        "name": book.name,
        "document": {"title": d.title, "number": d.number, "revision": d.revision,
                     "issue_date": d.issue_date, "organisation": d.organisation},
        "fingerprint": {"sha256": book.fingerprint,
                        "covers": "canonical JSON of 'spec' followed by the name and SHA-256 of each data file"},
        "versions": dict(book.versions),
        "spec": book.normalised_spec,
        "data_files": [{"name": n, "sha256": h} for n, h in book.data_files],
        "substances": subs,
        "tables": tables,
        "rounding_rule": book.rounding_rule,
        "cautions": list(book.cautions),
        "mark_codes": dict(MARK_CODES),
        "combustion_sheets": [{"title": sh.title, "substances": list(sh.substances),
                               "cautions": list(sh.caution_refs)} for sh in book.sheets],
        "appendix": [{"title": s.title, "paragraphs": list(s.paragraphs)} for s in book.appendix],
        "files": {"pdf": files["pdf"], "csv": list(files["csv"]), "csv_metadata": list(files["csv_metadata"])},
        "edition": edition(book),
    }


def edition(book) -> dict:
    """Which edition this file is: its name ("" for a spec without editions), label, printed
    document number, paper, sides and figure size, and the rows of each of its tables."""
    ed = book.edition
    d = book.document
    out = {"name": "", "label": "", "number": d.number, "paper": d.paper, "orientation": d.orientation,
           "two_sided": False, "font_size_pt": None, "paper_from": "spec", "primary": True, "overrides": {}}
    if ed is not None:
        out.update(name=ed.name, label=ed.label, number=ed.number(d.number), two_sided=bool(ed.two_sided),
                   font_size_pt=ed.font_size_pt, paper_from=ed.paper_from, primary=bool(ed.primary),
                   overrides=dict(ed.normalised))
    out["tables"] = [{"name": t.name, "rows": t.rows, "T_K": [float(x) for x in t.T_K],
                      "columns": [c.csv_header for c in t.columns]} for t in book.tables]
    return out


def render(book, files: dict) -> str:
    """The sidecar text: sorted keys, two-space indent, UTF-8 characters kept."""
    from ..core.jsonout import dumps
    return dumps(sidecar(book, files))
