"""tablegen compare: QA comparison of generated values against a reference table.

Exit status 0 when every compared cell is within tolerance, 1 when any is not,
2 for bad input, so the command can gate a QA pipeline.
"""

from __future__ import annotations

import re
import sys
from pathlib import Path

from .common import add_datum_options, dumps, notice, published, substance_with_options

EXAMPLE = """example:
  tablegen compare N2 janaf-n2.csv --tolerance cp_molar=0.5% --tolerance dh298_molar=0.5%+0.001
  tablegen compare air air-rev-b.txt --h-datum sensible:0C --align Pr=scale --align vr=scale
  tablegen compare CO2 earlier-issue.csv --columns cp,h --tolerance h=0.2 --out qa/co2 --json
  tablegen build plant-tables.toml
  tablegen compare plant-tables.toml output/plant-tables/flue-nm3.csv --table flue-nm3

The files named here are in the project's docs/examples/ folder.

REFERENCE: CSV or whitespace-separated text; header cells 'key [unit]' (keys of the
state JSON: cp, cv, k, h, u, s0, g0, Pr, vr, a, cp_molar, h_molar, s0_molar,
dh298_molar, ...; temperature column T), '#' starts a comment line.
Exit status: 0 all cells within tolerance, 1 some cell out of tolerance, 2 bad input."""

FILES = ("report.pdf", "deviations.csv", "summary.json")


def add_arguments(p):
    p.epilog = EXAMPLE
    p.add_argument("substance", metavar="SUBSTANCE-OR-SPEC",
                   help="species id or alias, shipped mixture, composition (NAME=x,NAME=y), or a table-book spec (*.toml)")
    p.add_argument("reference", metavar="REFERENCE", help="reference table (CSV or whitespace-separated text)")
    p.add_argument("--columns", default=None, metavar="KEYS",
                   help="comma-separated keys to compare (default: every property column of REFERENCE)")
    p.add_argument("--tolerance", action="append", default=[], metavar="COL=VALUE[%]",
                   help="tolerance of a column, repeatable: relative (cp=0.1%%), absolute in the column's "
                        "unit (h=0.5) or with a unit (h=0.5kJ/kg), or both (h=0.1%%+0.2); "
                        "defaults: cp and mean cp 0.5%%; h, u, s0 0.5%% of the change since 298.15 K "
                        "plus a small floor; k, a 0.25%%; Pr, vr 2%% (docs/compare.md)")
    p.add_argument("--align", action="append", default=[], metavar="COL=offset|scale",
                   help="fit and report a constant before judging, repeatable: offset for h, u, s0, "
                        "h_molar, u_molar, s0_molar, dh298_molar; scale for Pr, vr")
    p.add_argument("--mean-from", default=None, metavar="T",
                   help="Tm of mean-cp columns (cp_mean_h, cp_mean_s): default the sensible-datum "
                        "temperature, else 298.15 K; a spec table uses its own")
    p.add_argument("--vol-ref", default=None, metavar="REF",
                   help="reference conditions of per-m³ columns (cp_vol, h_vol, ...): normal (default, "
                        "0 °C and 101.325 kPa), standard-15C, standard-60F, or T,P (e.g. 20C,1atm); "
                        "a spec uses its own")
    p.add_argument("--table", default=None, metavar="NAME",
                   help="with a spec file: the table to compare (needed when the spec has several)")
    p.add_argument("--out", default=None, metavar="DIR",
                   help="folder for report.pdf, deviations.csv, summary.json and their manifest, published "
                        "together (default output/compare-NAME/)")
    p.add_argument("--force", action="store_true", help="replace the earlier comparison in the output folder")
    p.add_argument("--json", action="store_true", help="print the JSON summary on stdout")
    add_datum_options(p)
    # None marks "not given", so a spec table's own datum can be kept.
    p.set_defaults(h_datum=None, p_ref=None, anchor=None)


def resolve(args):
    """The substance to compare (datum, P° and anchor applied) and its display name."""
    from ..errors import TablegenError
    target = args.substance
    if target.lower().endswith(".toml"):
        given = [o for o, v in (("--h-datum", args.h_datum), ("--p-ref", args.p_ref),
                                ("--anchor", args.anchor), ("--mean-from", args.mean_from),
                                ("--vol-ref", args.vol_ref)) if v is not None]
        if given:
            raise TablegenError(f"{given[0]} applies to a substance name; a spec table carries its own "
                                f"datum, P° and anchor (set them in the spec)")
        try:
            from .. import spec as spec_module
        except ImportError:
            raise TablegenError(f"{target}: reading spec files needs the table-book module (tablegen.spec), "
                                f"which this build lacks; give a substance name instead") from None
        book = spec_module.load(target, source=args.source, data=args.data)
        tables = list(book.tables)
        if args.table is not None:
            hit = [t for t in tables if t.name == args.table]
            if not hit:
                raise TablegenError(f"--table {args.table!r} is not in {target}; its tables: "
                                    f"{', '.join(t.name for t in tables)}")
            table = hit[0]
        elif len(tables) == 1:
            table = tables[0]
        else:
            raise TablegenError(f"{target} holds {len(tables)} tables; choose one with --table NAME "
                                f"({', '.join(t.name for t in tables)})")
        r = book.document.reference
        if getattr(table, "extrapolate", False):
            args.extrapolate = True          # the table itself was built with extrapolation (marked)
        return (table.substance, table.name, f"{target} [{table.name}]", float(table.T_mean_ref_K),
                (float(r.T_K), float(r.P_Pa), r.text))
    if args.table is not None:
        raise TablegenError("--table applies to a spec file (*.toml), not to a substance name")
    sub = substance_with_options(args, target)
    T_m = None
    if args.mean_from is not None:
        from ..units import temperature_K
        T_m = temperature_K(args.mean_from, "--mean-from")
    return sub, sub.id, sub.id, T_m, volume_reference(args.vol_ref)


def volume_reference(text):
    """--vol-ref: a named set of reference conditions or 'T,P'; None for the default."""
    from ..compare import VOLUME_REFERENCES
    from ..errors import TablegenError
    from ..units import pressure_Pa, temperature_K
    if text is None:
        return None
    t = text.strip()
    if t in VOLUME_REFERENCES:
        return VOLUME_REFERENCES[t]
    parts = t.split(",")
    if len(parts) != 2:
        raise TablegenError(f"--vol-ref {text!r}: give {', '.join(VOLUME_REFERENCES)}, or T,P such as 20C,1atm")
    T = temperature_K(parts[0], "--vol-ref temperature")
    P = pressure_Pa(parts[1], "--vol-ref pressure")
    return (T, P, f"{T:g} K and {P / 1000:g} kPa")


def data_files(sub, args) -> list[dict]:
    """Name and SHA-256 of each coefficient file the substance's species came from (traceability)."""
    import hashlib

    from ..data.library import library
    lib = library(tuple(args.data or ()))
    files = {}
    for _species, dataset, _cite in sub.sources:
        ds = lib.datasets.get(dataset)
        if ds is not None and Path(ds.path).is_file():
            files[Path(ds.path).name] = hashlib.sha256(Path(ds.path).read_bytes()).hexdigest()
    return [{"file": k, "sha256": v} for k, v in sorted(files.items())]


def safe_name(text: str) -> str:
    s = re.sub(r"[^A-Za-z0-9_.+-]+", "_", text).strip("._")
    return s or "substance"


def compute(args):
    """Read, check and compare; returns (Comparison, {file name: bytes}, output folder)."""
    from ..compare import compare, deviations_csv, parse_align, parse_tolerance, read_reference, summary
    from ..errors import TablegenError

    sub, name, target_label, T_m, vol_ref = resolve(args)
    from .. import outfiles
    out = out_folder(args, name)
    outfiles.check_folder(out, FILES, force=args.force, what="comparison")
    ref = read_reference(args.reference)
    if args.columns is not None:
        keys = [k.strip() for k in args.columns.split(",")]
        if not all(keys):
            raise TablegenError(f"--columns {args.columns!r}: give comma-separated keys, e.g. cp,h,s0")
    else:
        keys = list(ref.keys)
        skipped = [k for k in keys if k not in ref.comparable_keys]
        if skipped and ref.comparable_keys:
            keys = list(ref.comparable_keys)
            notice(args, f"note: columns {', '.join(skipped)} of {ref.path} cannot be evaluated and are "
                         f"not compared; name the columns with --columns to silence this")
    for k in keys:
        if k not in ref.keys:
            raise TablegenError(f"--columns: {k!r} is not a column of {ref.path}; its columns: {', '.join(ref.keys)}")
    units = {k: tuple(c.unit for c in ref.columns_of(k)) for k in keys}
    tolerances, align = {}, {}
    for t in args.tolerance:
        k, tol = parse_tolerance(t, units)
        if k in tolerances:
            raise TablegenError(f"--tolerance: column {k!r} is given twice; give one tolerance a column")
        tolerances[k] = tol
    for a in args.align:
        k, kind = parse_align(a, keys)
        if k in align:
            raise TablegenError(f"--align: column {k!r} is given twice")
        align[k] = kind
    options = {"target": target_label, "reference": args.reference, "columns": keys,
               "tolerance": list(args.tolerance), "align": list(args.align),
               "extrapolate": bool(args.extrapolate),
               "h_datum": args.h_datum, "p_ref": args.p_ref, "anchor": args.anchor,
               "mean_from": args.mean_from, "vol_ref": args.vol_ref, "table": args.table,
               "data_files": data_files(sub, args)}
    cmp = compare(sub, ref, columns=keys, tolerances=tolerances, align=align,
                  extrapolate=args.extrapolate, T_mean_ref_K=T_m, volume_reference=vol_ref, options=options)
    from ..book.qa_report import render_pdf
    files = {"report.pdf": render_pdf(cmp), "deviations.csv": deviations_csv(cmp),
             "summary.json": dumps(summary(cmp))}
    return cmp, files, out


def out_folder(args, name: str) -> Path:
    return Path(args.out) if args.out else Path("output") / f"compare-{safe_name(name)}"


def text_summary(cmp) -> str:
    from ..compare import KEY_LABELS, format_dev
    ref = cmp.reference
    lines = [cmp.verdict, f"  {cmp.substance['id']} against {ref.path} ({len(ref.lines)} rows, "
                          f"{', '.join(c.key for c in cmp.columns)})"]
    al = [c.alignment for c in cmp.columns if c.alignment is not None]
    if al:
        lines.append("alignment (fitted before judging):")
        for a in al:
            lines.append(f"  {a.key}: {a.kind} {a.value_in_unit:.9g} {a.unit if a.kind == 'offset' else ''}".rstrip()
                         + f"  (RMS Δ {a.rms_before:.3g} -> {a.rms_after:.3g})")
    else:
        lines.append("alignment: none")
    head = ("column", "unit", "tolerance", "cells", "out", "max |Δ|", "at T", "mean Δ", "RMS Δ", "max |Δ/ref|")
    rows = [head]
    for c in cmp.columns:
        s = c.stats
        if not s["n"]:
            rows.append((c.key, c.unit.symbol, c.tolerance.text, "0", "0", "—", "—", "—", "—", "—"))
            continue
        rel = f"{s['max_rel'] * 100:.3g} %" if "max_rel" in s else "—"
        rows.append((c.key, c.unit.symbol, c.tolerance.text, str(s["n"]), str(s["n_out"]),
                     f"{s['max_abs']:.3g}", f"{s['max_at_T']} {ref.T_unit.symbol}", format_dev(s["mean"]),
                     f"{s['rms']:.3g}", rel))
    w = [max(len(r[j]) for r in rows) for j in range(len(head))]
    for r in rows:
        lines.append("  " + "  ".join(x.ljust(w[j]) if j < 3 else x.rjust(w[j]) for j, x in enumerate(r)))
    bad = cmp.out_cells()
    if bad:
        lines.append("out of tolerance:")
        for b in bad[:50]:
            lines.append(f"  line {b['line']}: T = {b['T']} {ref.T_unit.symbol}, {b['column']} "
                         f"({KEY_LABELS[b['column']]}): reference {b['reference_text']}, tablegen "
                         f"{b['tablegen']:.6g}, Δ = {format_dev(b['deviation'])} {b['unit']} "
                         f"(allowed ±{b['bound']:.2g})")
        if len(bad) > 50:
            lines.append(f"  ... and {len(bad) - 50} more (see deviations.csv)")
    if cmp.extrapolated.any():
        n = int(cmp.extrapolated.sum())
        lines.append(f"note: {n} row{'s lie' if n > 1 else ' lies'} outside the data range and "
                     f"{'were' if n > 1 else 'was'} extrapolated (marked in the report); not for design use")
    return "\n".join(lines) + "\n"


def run(args) -> int:
    from .common import data_notices
    data_notices(args)
    from .. import outfiles
    from ..compare import summary
    cmp, files, out = compute(args)
    about = [f"issue: comparison of {cmp.substance['id']} against {cmp.reference.path} "
             f"(sha256 {cmp.reference.sha256}): {cmp.verdict}"]
    notes = outfiles.publish_folder(out, files, force=args.force, about=about, what="comparison")
    if args.json:
        sys.stdout.write(dumps(summary(cmp)))
    else:
        sys.stdout.write(text_summary(cmp))
    published(args, out, files, notes, f"files ({', '.join(FILES)})", paths=False)
    return 0 if cmp.passed else 1
