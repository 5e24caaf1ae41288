"""tablegen compare SPEC.toml FOLDER: every table of a book against a reference folder.

The part of the compare command that checks a whole book in one call
(tablegen.calc.compare_folder does the matching); one report, one deviations CSV and
one summary for the book, exit status the worst of its tables.
"""

from __future__ import annotations

import sys
from pathlib import Path

from ..core.errors import InputError, NameLookupError
from ..core.jsonout import dumps
from .common import notice
from .compare_table import (FILES, compared_keys, data_files, default_out, hint_lines, is_spec, load_spec,
                            publish, refuse_datum_options)


def _split_scoped(values, flag: str, tables) -> dict:
    """'[TABLE/]COL=...' options -> {table: [COL=..., ...]}; unscoped ones go to every table
    holding the column (checked by the caller)."""
    names = [t.name for t in tables]
    out = {n: [] for n in names}
    unscoped = []
    for v in values:
        head = v.split("=", 1)[0]
        if "/" in head:
            table, rest = v.split("/", 1)
            if table not in out:
                raise NameLookupError(f"{flag} {v!r}: table {table!r} is not compared; "
                                      f"compared tables: {', '.join(names)}")
            out[table].append(rest)
        else:
            unscoped.append(v)
    return out, unscoped


def _table_options(args, specs, refs):
    """Per table: (keys, tolerances, align), from --columns, --tolerance and --align."""
    from ..calc.compare_tolerance import parse_align, parse_tolerance
    tol_scoped, tol_all = _split_scoped(args.tolerance, "--tolerance", specs)
    al_scoped, al_all = _split_scoped(args.align, "--align", specs)
    used_tol, used_al = set(), set()
    per, notes = {}, []
    for t in specs:
        ref = refs[t.name]
        if args.columns is not None:
            keys = [k.strip() for k in args.columns.split(",") if k.strip() in ref.comparable_keys]
        else:
            keys = compared_keys(args, ref, notes)
        units = {k: tuple(c.unit for c in ref.columns_of(k)) for k in keys}
        tolerances, align = {}, {}
        for text in tol_all + tol_scoped[t.name]:
            key = text.split("=", 1)[0].strip()
            if text in tol_all and key not in units:
                continue
            k, tol = parse_tolerance(text, units)
            if k in tolerances:
                raise InputError(f"--tolerance: column {k!r} of table {t.name} is given twice; "
                                 f"give one tolerance a column")
            tolerances[k] = tol
            used_tol.add(text)
        for text in al_all + al_scoped[t.name]:
            key = text.split("=", 1)[0].strip()
            if text in al_all and key not in units:
                continue
            k, kind = parse_align(text, keys)
            align[k] = kind
            used_al.add(text)
        if not keys:
            raise InputError(f"--columns {args.columns!r}: table {t.name} has none of these columns; "
                             f"its columns: {', '.join(ref.comparable_keys)}")
        per[t.name] = (keys, tolerances, align)
    for flag, given, used in (("--tolerance", tol_all, used_tol), ("--align", al_all, used_al)):
        for v in given:
            if v not in used:
                raise NameLookupError(f"{flag} {v!r}: no compared table has column {v.split('=', 1)[0]!r}; "
                                      f"write TABLE/COL=... for one table")
    return per, notes


def _spec_info(spec, path: str) -> dict:
    from ..book.model import data_files as book_data_files, fingerprint
    fp, _ = fingerprint(spec.normalised, book_data_files(spec))
    d = spec.document
    return {"file": path, "name": spec.name, "title": d.title, "number": d.number, "revision": d.revision,
            "issue_date": d.issue_date, "fingerprint": fp}


def compute_book(args):
    """Read the spec and the folder, compare every table; (BookComparison, {path: bytes})."""
    from ..calc.compare import compare
    from ..calc.compare_reference import read_reference
    from ..calc.compare_folder import BookComparison, TableComparison, read_folder, read_mapping
    from ..calc.compare_output import book_deviations_csv, book_summary

    if not is_spec(args.substance):
        raise InputError(f"{args.reference} is a folder; a reference folder is compared with a book "
                         f"spec (*.toml), a substance with one reference table")
    refuse_datum_options(args, args.substance)
    spec = load_spec(args)
    specs = list(spec.tables)
    if args.table is not None:
        wanted = [n.strip() for n in args.table.split(",") if n.strip()]
        names = {t.name for t in specs}
        bad = [n for n in wanted if n not in names]
        if bad or not wanted:
            raise NameLookupError(f"--table {args.table!r}: {bad[0] if bad else 'no name'!r} is not in "
                                  f"{args.substance}; its tables: {', '.join(t.name for t in specs)}")
        specs = [t for t in specs if t.name in wanted]
    mapping = read_mapping(args.map) if args.map else None
    folder = read_folder(args.reference, spec.name, [t.name for t in specs], mapping, args.map or "",
                         edition=spec.edition.name if spec.edition is not None else "")
    refs = {e.table: read_reference(e.path) for e in folder.entries}
    per, notes = _table_options(args, specs, refs)
    r = spec.document.reference
    vol_ref = (float(r.T_K), float(r.P_Pa), r.text)
    results = []
    for t, e in zip(specs, folder.entries):
        keys, tolerances, align = per[t.name]
        sub = t.substance
        options = {"target": f"{args.substance} [{t.name}]", "reference": e.path, "columns": keys,
                   "tolerance": [x for x in args.tolerance], "align": [x for x in args.align],
                   "extrapolate": bool(t.extrapolate), "allow_wide": bool(args.allow_wide), "table": t.name,
                   "data_files": data_files(sub, args)}
        cmp = compare(sub, refs[t.name], columns=keys, tolerances=tolerances, align=align,
                      extrapolate=bool(t.extrapolate), T_mean_ref_K=float(t.T_mean_ref_K),
                      volume_reference=vol_ref, options=options, allow_wide=args.allow_wide, spec_table=True)
        results.append(TableComparison(t.name, t.title, e, cmp))
    from .. import __version__
    bc = BookComparison(_spec_info(spec, args.substance), folder, tuple(results), __version__,
                        {"spec": args.substance, "reference_folder": args.reference, "map": args.map,
                         "tables": [t.name for t in specs], "tolerance": list(args.tolerance),
                         "align": list(args.align), "columns": args.columns, "allow_wide": bool(args.allow_wide)})
    from ..book.qa_report import render_book_pdf
    out = Path(args.out) if args.out else default_out(spec.name, args.reference)
    files = {out / "report.pdf": render_book_pdf(bc, args.listing),
             out / "deviations.csv": book_deviations_csv(bc),
             out / "summary.json": dumps(book_summary(bc))}
    return bc, files, notes


def book_text(bc) -> str:
    from ..calc.compare_keys import KEY_LABELS
    from ..calc.compare_output import format_dev, format_size, unit_suffix, worst_cell, worst_text
    s, f = bc.spec, bc.folder
    ident = f"{s['number']} rev {s['revision']}" if s.get("number") else s["name"]
    lines = [bc.verdict, f"  {s['file']} ({ident}) against {f.path}"]
    if f.book:
        b = f.book
        same = {True: "same fingerprint: built from the same spec and data",
                False: "another fingerprint: another spec or other data"}.get(bc.same_fingerprint, "")
        lines.append(f"  reference book {f.sidecar}: {b['number']} rev {b['revision']}, fingerprint "
                     f"{b['fingerprint'][:16]}…" + (f" ({same})" if same else ""))
    rows = [("table", "reference", "cells", "out", "worst cell", "verdict")]
    for t in bc.tables:
        c = t.comparison
        rows.append((t.name, Path(t.entry.path).name, str(c.n_cells), str(c.n_out), worst_text(worst_cell(c)),
                     "PASS" if c.passed else "FAIL"))
    w = [max(len(r[j]) for r in rows) for j in range(len(rows[0]))]
    for r in rows:
        lines.append("  " + "  ".join(x.rjust(w[j]) if j in (2, 3) else x.ljust(w[j])
                                      for j, x in enumerate(r)).rstrip())
    for n in f.notes:
        lines.append(f"note: {n}")
    for t in bc.tables:
        for wd in t.comparison.wide:
            lines.append(f"wide tolerance (accepted with --allow-wide): {t.name}/{wd['column']}="
                         f"{wd['tolerance']}: {wd['reason']}")
    bad = [(t, b) for t in bc.tables for b in t.comparison.out_cells()]
    if bad:
        lines.append("out of tolerance:")
        for t, b in bad[:50]:
            u = unit_suffix(b["unit"])
            lines.append(f"  {t.name} line {b['line']}: T = {b['T']} {t.comparison.reference.T_unit.symbol}, "
                         f"{KEY_LABELS[b['column']]}: reference {b['reference_text']}{u}, tablegen "
                         f"{b['tablegen']:.6g}{u}, Δ = {format_dev(b['deviation'])}{u}, "
                         f"allowed ±{format_size(b['bound'])}{u}")
        if len(bad) > 50:
            lines.append(f"  ... and {len(bad) - 50} more (see deviations.csv)")
    return "\n".join(lines) + "\n"


def run_book(args) -> int:
    from ..calc.compare_output import book_summary
    bc, files, notes = compute_book(args)
    publish(args, files, notes, f"issue: comparison of book {bc.spec.get('name', '')} against "
                                f"the folder {bc.folder.path}: {'PASS' if bc.passed else 'FAIL'}")
    sys.stdout.write(dumps(book_summary(bc)) if args.json else book_text(bc))
    if args.json:                        # the text summary already states them
        for n in bc.folder.notes:
            notice(args, f"note: {n}")
    for t in bc.tables:
        for line in hint_lines(t.comparison.hints, f"{t.name}: "):
            notice(args, line)
    folder = Path(next(iter(files))).parent
    notice(args, f"wrote {folder}/: {', '.join(FILES)} and their manifest tablegen-issue.sha256")
    return 0 if bc.passed else 1
