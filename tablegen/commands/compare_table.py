"""tablegen compare against one reference table: the comparison, its files and its text.

Also what the comparison of a whole book (compare_book.py) shares with it: the output
files, the spec and substance options, the output folder, the hint lines.
"""

from __future__ import annotations

import re
import sys
from pathlib import Path

from ..core.errors import InputError, NameLookupError, TablegenError
from ..core.jsonout import dumps
from .common import notice, substance_with_options

FILES = ("report.pdf", "deviations.csv", "summary.json")
#: Exit status of an output problem (bad input is 2, as for every command).
EXIT_OUTPUT = 3


class OutputProblem(TablegenError):
    """The comparison succeeded but its files cannot be written (exit 3)."""

    exit_status = EXIT_OUTPUT


def is_spec(target: str) -> bool:
    return target.lower().endswith(".toml")


def refuse_datum_options(args, target):
    given = [o for o, v in (("--h-datum", args.h_datum), ("--p-ref", args.p_ref),
                            ("--anchor", args.anchor), ("--mean-from", args.mean_from),
                            ("--vol-ref", args.vol_ref)) if v is not None]
    if given:
        raise InputError(f"{given[0]} applies to a substance name; a spec table carries its own "
                         f"datum, P° and anchor (set them in the spec)")


def load_spec(args):
    from ..spec import book as spec_module
    # --extrapolate opens every table of the book, as it does for tablegen build
    return spec_module.load(args.substance, source=args.source, data=args.data,
                            edition=getattr(args, "edition", None),
                            extrapolate=bool(getattr(args, "extrapolate", False)))


def resolve(args):
    """The substance to compare (datum, P° and anchor applied) and its display name."""
    target = args.substance
    if is_spec(target):
        refuse_datum_options(args, target)
        book = load_spec(args)
        tables = list(book.tables)
        if args.table is not None:
            hit = [t for t in tables if t.name == args.table]
            if not hit:
                raise NameLookupError(f"--table {args.table!r} is not in {target}; its tables: "
                                      f"{', '.join(t.name for t in tables)}")
            table = hit[0]
        elif len(tables) == 1:
            table = tables[0]
        else:
            raise InputError(f"{target} holds {len(tables)} tables; choose one with --table NAME "
                             f"({', '.join(t.name for t in tables)}), or give a reference folder")
        r = book.document.reference
        if getattr(table, "extrapolate", False):
            args.extrapolate = True          # the table itself was built with extrapolation (marked)
        return (table.substance, table.name, f"{target} [{table.name}]", float(table.T_mean_ref_K),
                (float(r.T_K), float(r.P_Pa), r.text), True)
    if args.table is not None:
        raise InputError("--table applies to a spec file (*.toml), not to a substance name")
    sub = substance_with_options(args, target)
    T_m = None
    if args.mean_from is not None:
        from ..core.units import temperature_K
        T_m = temperature_K(args.mean_from, "--mean-from")
    return sub, sub.id, sub.id, T_m, volume_reference(args.vol_ref), False


def volume_reference(text):
    """--vol-ref: a named set of reference conditions or 'T,P'; None for the default."""
    from ..calc.compare_keys import VOLUME_REFERENCES
    from ..core.units import pressure_Pa, temperature_K
    if text is None:
        return None
    t = text.strip()
    if t in VOLUME_REFERENCES:
        return VOLUME_REFERENCES[t]
    parts = t.split(",")
    if len(parts) != 2:
        raise InputError(f"--vol-ref {text!r}: give {', '.join(VOLUME_REFERENCES)}, or T,P such as 20C,1atm")
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


def default_out(name: str, reference: str) -> Path:
    """output/compare-NAME-vs-REFERENCE/: named after what is checked and the reference file or
    folder, so two references of one gas never share a folder."""
    ref = Path(reference)
    stem = ref.resolve().name if ref.is_dir() else ref.stem
    return Path("output") / f"compare-{safe_name(name)}-vs-{safe_name(stem)}"


def compared_keys(args, ref, notes: list) -> list:
    if args.columns is not None:
        keys = [k.strip() for k in args.columns.split(",")]
        if not all(keys):
            raise InputError(f"--columns {args.columns!r}: give comma-separated keys, e.g. cp,h,s0")
        for k in keys:
            if k not in ref.keys:
                raise NameLookupError(f"--columns: {k!r} is not a column of {ref.path}; "
                                      f"its columns: {', '.join(ref.keys)}")
        return keys
    keys = list(ref.keys)
    skipped = [k for k in keys if k not in ref.comparable_keys]
    if skipped and ref.comparable_keys:
        keys = list(ref.comparable_keys)
        notes.append(f"note: columns {', '.join(skipped)} of {ref.path} cannot be evaluated and are "
                     f"not compared; name the columns with --columns to silence this")
    return keys


def parse_column_options(args, units: dict):
    """--tolerance and --align of one table: {key: Tolerance}, {key: kind}."""
    from ..calc.compare_tolerance import parse_align, parse_tolerance
    tolerances, align = {}, {}
    for t in args.tolerance:
        k, tol = parse_tolerance(t, units)
        if k in tolerances:
            raise InputError(f"--tolerance: column {k!r} is given twice; give one tolerance a column")
        tolerances[k] = tol
    for a in args.align:
        k, kind = parse_align(a, list(units))
        if k in align:
            raise InputError(f"--align: column {k!r} is given twice")
        align[k] = kind
    return tolerances, align


def compute(args):
    """Read, check and compare one reference table; returns (Comparison, {path: bytes}, notes)."""
    from ..calc.compare import compare
    from ..calc.compare_reference import read_reference
    from ..calc.compare_output import deviations_csv, summary

    sub, name, target_label, T_m, vol_ref, spec_table = resolve(args)
    ref = read_reference(args.reference)
    notes = []
    keys = compared_keys(args, ref, notes)
    units = {k: tuple(c.unit for c in ref.columns_of(k)) for k in keys}
    tolerances, align = parse_column_options(args, units)
    options = {"target": target_label, "reference": args.reference, "columns": keys,
               "tolerance": list(args.tolerance), "align": list(args.align),
               "extrapolate": bool(args.extrapolate), "allow_wide": bool(args.allow_wide),
               "h_datum": args.h_datum, "p_ref": args.p_ref, "anchor": args.anchor,
               "mean_from": args.mean_from, "vol_ref": args.vol_ref, "table": args.table,
               "data_files": data_files(sub, args)}
    cmp = compare(sub, ref, columns=keys, tolerances=tolerances, align=align,
                  extrapolate=args.extrapolate, T_mean_ref_K=T_m, volume_reference=vol_ref, options=options,
                  allow_wide=args.allow_wide, spec_table=spec_table)
    from ..book.qa_report import render_pdf
    out = Path(args.out) if args.out else default_out(name, args.reference)
    files = {out / "report.pdf": render_pdf(cmp, args.listing),
             out / "deviations.csv": deviations_csv(cmp),
             out / "summary.json": dumps(summary(cmp))}
    return cmp, files, notes


def write_outputs(files: dict, force: bool, about=()) -> list[str]:
    """Publish the files as the one set of their folder (tablegen.core.outfiles.publish_folder: staged
    beside it, swapped in whole, with a manifest); any refusal or fault there is an output
    problem (exit 3), after which the folder holds what it held. Returns notes to print."""
    from ..core import outfiles
    from ..core.errors import Interrupted
    folder = Path(next(iter(files))).parent
    try:
        return outfiles.publish_folder(folder, {Path(p).name: d for p, d in files.items()}, force=force,
                                       about=about, what="comparison")
    except Interrupted:
        raise
    except TablegenError as e:
        raise OutputProblem(str(e)) from None


def text_summary(cmp, label: str = "") -> str:
    from ..calc.compare_keys import KEY_LABELS
    from ..calc.compare_output import format_dev, format_size, unit_suffix
    ref = cmp.reference
    lines = [cmp.verdict, f"  {label or cmp.substance['id']} against {ref.path} ({len(ref.lines)} rows; "
                          f"{', '.join(c.key for c in cmp.columns)})"]
    al = [c.alignment for c in cmp.columns if c.alignment is not None]
    if al:
        lines.append("alignment (fitted before judging):")
        for a in al:
            lines.append(f"  {a.meaning}; RMS Δ {format_size(a.rms_before)} before, "
                         f"{format_size(a.rms_after)} after")
    else:
        lines.append("alignment: none")
    for w in cmp.wide:
        lines.append(f"wide tolerance (accepted with --allow-wide): {w['column']}={w['tolerance']}: {w['reason']}")
    head = ("column", "unit", "tolerance", "cells", "out", "max |Δ|", "at T", "mean Δ", "RMS Δ", "max |Δ/ref|")
    rows = [head]
    for c in cmp.columns:
        s = c.stats
        if not s["n"]:
            rows.append((c.key, c.unit.symbol, c.tolerance.text, "0", "0", "—", "—", "—", "—", "—"))
            continue
        rel = f"{format_size(s['max_rel'] * 100)} %" if "max_rel" in s else "—"
        rows.append((c.key, c.unit.symbol, c.tolerance.text, str(s["n"]), str(s["n_out"]),
                     format_size(s["max_abs"]), f"{s['max_at_T']} {ref.T_unit.symbol}", format_dev(s["mean"]),
                     format_size(s["rms"]), rel))
    w = [max(len(r[j]) for r in rows) for j in range(len(head))]
    for r in rows:
        lines.append("  " + "  ".join(x.ljust(w[j]) if j < 3 else x.rjust(w[j]) for j, x in enumerate(r)))
    bad = cmp.out_cells()
    explained = {h.column for h in cmp.hints if h.kind != "offset-except"}
    if explained:                # a column one constant explains: its first cells show the pattern
        seen = {}
        kept = []
        for b in bad:
            seen[b["column"]] = seen.get(b["column"], 0) + 1
            if b["column"] not in explained or seen[b["column"]] <= 2:
                kept.append(b)
        for k in sorted(explained):
            if seen.get(k, 0) > 2:
                lines.append(f"{k}: {seen[k]} cells out of tolerance, all explained by one constant "
                             f"(hint on stderr); the first 2 are listed")
        bad = kept
    if bad:
        lines.append("out of tolerance:")
        for b in bad[:50]:
            u = unit_suffix(b["unit"])
            lines.append(f"  line {b['line']}: T = {b['T']} {ref.T_unit.symbol}, {KEY_LABELS[b['column']]}: "
                         f"reference {b['reference_text']}{u}, tablegen {b['tablegen']:.6g}{u}, "
                         f"Δ = {format_dev(b['deviation'])}{u}, allowed ±{format_size(b['bound'])}{u}")
        if len(bad) > 50:
            lines.append(f"  ... and {len(bad) - 50} more (see deviations.csv)")
    if cmp.extrapolated.any():
        n = int(cmp.extrapolated.sum())
        lines.append(f"note: {n} row{'s lie' if n > 1 else ' lies'} outside the data range and "
                     f"{'were' if n > 1 else 'was'} extrapolated (marked in the report); not for design use")
    return "\n".join(lines) + "\n"


def hint_lines(hints, prefix: str = "") -> list[str]:
    return [f"hint: {prefix}{h.text}" for h in hints]


def publish(args, files: dict, notes: list, about: str) -> None:
    """Write the comparison's files as one issue (``about`` its manifest line) and give the notes."""
    for n in notes + write_outputs(files, args.force, [about]):
        notice(args, n)


def run_table(args) -> int:
    """``tablegen compare`` against one reference table (a folder goes to compare_book.run_book)."""
    if getattr(args, "edition", None) is not None:
        raise InputError(f"--edition {args.edition}: an edition is chosen only for a book spec compared "
                         f"with a reference folder; leave --edition out for one reference table")
    from ..calc.compare_hints import suggested_options
    from ..calc.compare_output import summary
    cmp, files, notes = compute(args)
    publish(args, files, notes, f"issue: comparison of {cmp.options.get('target') or cmp.substance['id']} "
                                f"against {cmp.reference.path} (sha256 {cmp.reference.sha256}): {cmp.verdict}")
    if args.json:
        sys.stdout.write(dumps(summary(cmp)))
    else:
        sys.stdout.write(text_summary(cmp, cmp.options.get("target", "")))
    for line in hint_lines(cmp.hints):
        notice(args, line)
    if cmp.hints:
        notice(args, f"hint: together: {' '.join(suggested_options(cmp.hints))}")
    folder = Path(next(iter(files))).parent
    notice(args, f"wrote {folder}/: {', '.join(FILES)} and their manifest tablegen-issue.sha256")
    return 0 if cmp.passed else 1
