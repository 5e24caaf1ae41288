"""tablegen species: list the library, validate it, or show a species' sources."""

from __future__ import annotations

import sys

from .common import dumps

EXAMPLE = """example:
  tablegen species
  tablegen species --json
  tablegen species --check --data my-gases.toml"""

#: A jump in h or s° at a breakpoint above this (relative) is a data warning.
JUMP_WARN = 1e-4


def add_arguments(p):
    p.epilog = EXAMPLE
    p.add_argument("--json", action="store_true", help="machine-readable list")
    p.add_argument("--check", action="store_true",
                   help="validate every record (cp > 0, h and s° increasing, continuity at breakpoints, "
                        "molar mass, contiguous intervals) and print a report; exit status 2 if any "
                        "user record is refused")
    p.add_argument("--all-sets", action="store_true", help="list every record of every data set, not one per species")


def rows(lib, all_sets: bool):
    recs = [r for d in lib.search_order for r in lib.datasets[d].records()] if all_sets else lib.all_records()
    for r in recs:
        yield {"id": r.id, "name": r.name, "formula": "".join(f"{e}{'' if n == 1 else n}" for e, n in r.elements.items()),
               "M": r.M, "T_min_K": r.T_min, "T_max_K": r.T_max, "form": r.form, "source": r.dataset,
               "source_note": r.source_note, "aliases": list(r.aliases)}


def check(lib) -> tuple[list[dict], list[str]]:
    """Validate every record of every data set; return warnings and errors.

    The checks are those every record passes on load (tablegen.data.validate:
    cp > 0 over the range, h and s° increasing, cp, h and s° continuous at the
    breakpoints; molar mass against the elements, contiguous intervals, well
    formed fields). Errors: user files or records that are refused (collected
    by a library made with strict=False) and shipped records that cannot be
    built. Warnings: findings that do not refuse a record, one dict each with
    dataset, id, file, line, T_K, function (cp, h or s0), jump_relative, text.
    """
    from ..errors import DataError
    warnings, errors = [], list(getattr(lib, "load_errors", []))
    for d in lib.search_order:
        ds = lib.datasets[d]
        for i in range(len(ds)):
            try:
                r = ds._parse(i)
            except DataError as e:
                if str(e) not in errors:   # a refused user record is already listed
                    errors.append(str(e))
                continue
            for f in r.warnings:
                if f.severity == "error" or f.function is None:
                    # shipped-data findings that would refuse user data, or not a jump
                    warnings.append({"dataset": d, "id": r.id, "file": r.file, "line": r.line,
                                     "T_K": f.T_K if f.T_K is not None else float("nan"),
                                     "function": f.function or "-", "jump_relative": f.jump_relative or 0.0,
                                     "text": f.text})
                    continue
                warnings.append({"dataset": d, "id": r.id, "file": r.file, "line": r.line,
                                 "T_K": f.T_K, "function": f.function, "jump_relative": f.jump_relative,
                                 "cp_jump_relative": f.jump_relative if f.function == "cp" else None,
                                 "text": f.text})
    return warnings, errors


def run(args) -> int:
    from ..data.library import library
    lib = library(args.data, strict=not args.check)
    for m in lib.messages:
        if not args.quiet:
            print(f"note: {m}", file=sys.stderr)
    if args.check:
        warnings, errors = check(lib)
        if args.json:
            sys.stdout.write(dumps({"errors": errors, "warnings": warnings,
                                    "datasets": {d: len(lib.datasets[d]) for d in lib.search_order}}))
        else:
            for d in lib.search_order:
                print(f"{d}: {len(lib.datasets[d])} records ({lib.datasets[d].path})")
            for e in errors:
                print(f"error: {e}")
            for w in warnings:
                print(f"warning: {w['dataset']} {w['id']} ({w['file']}:{w['line']}): {w['text']}")
            print("checked: fields and column widths, contiguous intervals, molar mass against the elements, "
                  "cp > 0, h and s° increasing, cp, h and s° continuous at breakpoints")
            print(f"{len(errors)} errors, {len(warnings)} warnings")
        return 2 if errors else 0
    data = list(rows(lib, args.all_sets))
    if args.json:
        sys.stdout.write(dumps(data))
        return 0
    head = ["id", "name", "M kg/kmol", "range K", "form", "source"]
    table = [head] + [[r["id"], r["name"], f"{r['M']:.4f}", f"{r['T_min_K']:g}-{r['T_max_K']:g}",
                       r["form"], f"{r['source']} {r['source_note']}".strip()] for r in data]
    w = [max(len(t[j]) for t in table) for j in range(len(head))]
    for t in table:
        print("  ".join(c.ljust(x) for c, x in zip(t, w)).rstrip())
    return 0
