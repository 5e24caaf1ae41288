"""tablegen species: list the library, validate it, or show a species' sources."""

from __future__ import annotations

import sys

from ..core.jsonout import dumps
from .common import notice

EXAMPLE = """example:
  tablegen species
  tablegen species --json
  tablegen species --check --data my-gases.toml
  tablegen species --sources H2O

my-gases.toml (a user record in the gasdata format) is in the project's docs/examples/ folder."""

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
    p.add_argument("--sources", metavar="ID",
                   help="show how far the sources of one species agree (gasdata/agreement.toml) and which is its default")


def rows(lib, all_sets: bool):
    if all_sets:
        recs = [ds.summary(i) for d in lib.search_order for ds in [lib.datasets[d]] for i in range(len(ds))]
    else:
        recs = lib.all_summaries()
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
    from ..core.errors import DataError
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
                warnings.append({"dataset": d, "id": r.id, "file": r.file, "line": r.line,
                                 "T_K": f.T_K, "function": f.function, "jump_relative": f.jump_relative,
                                 "severity_for_user_data": f.severity, "text": f.text})
    return warnings, errors


def sources(lib, name: str, as_json: bool) -> int:
    """Print the agreement figures and the default source of one species."""
    from ..calc import agreement
    from ..core.errors import NameLookupError
    try:
        rec = lib.record(name)
    except NameLookupError as e:
        raise NameLookupError(f"--sources takes one species id or name (a mixture's components each have "
                              f"their own figures): {e}") from None
    rows = agreement.for_species(rec.id)
    default = lib.defaults.get(rec.id, {})
    held = [d for d in lib.search_order if (r := lib.datasets[d].get(rec.id)) is not None and r.id == rec.id]
    if as_json:
        sys.stdout.write(dumps({"species": rec.id, "name": rec.name, "data_sets": held,
                                "default": {"source": default.get("source", rec.dataset),
                                            "reason": default.get("reason", "the only data set holding it"),
                                            "sources_agree": default.get("sources_agree")},
                                "figures": rows}))
        return 0
    print(f"{rec.name} ({rec.id}): data sets {', '.join(held)}")
    if default:
        flag = "" if default.get("sources_agree", True) else "  (the sources disagree: wider uncertainty)"
        print(f"default source: {default['source']}{flag}")
        print(f"  because it {default['reason']}" if default["reason"].startswith("agrees")
              else f"  because {default['reason']}")
    else:
        print(f"default source: {rec.dataset} (the only data set holding it)")
    print("figures: max and rms of source - against over each band; cp relative, "
          "h - h(298.15 K) in J/mol, s° in J/(mol K) (* s° - s°(298.15 K); "
          "~ one source beyond its equation's range)")
    head = ["source", "against", "band K", "cp max %", "cp rms %", "dh max", "dh rms", "s° max", "s° rms"]
    table = [head]
    for r in rows:
        star = "*" if r.get("s0_relative_to_298") else ""
        beyond = "~" if r.get("beyond_range_of") else ""
        table.append([r["source"], r["against"], f"{r['band_K'][0]:g}-{r['band_K'][1]:g}{beyond}",
                      f"{r['cp_max_rel'] * 100:.3f}", f"{r['cp_rms_rel'] * 100:.3f}",
                      f"{r['dh_max_J_per_mol']:.3g}", f"{r['dh_rms_J_per_mol']:.3g}",
                      f"{r['s0_max_J_per_molK']:.3g}{star}", f"{r['s0_rms_J_per_molK']:.3g}{star}"])
    w = [max(len(t[j]) for t in table) for j in range(len(head))]
    for t in table:
        print("  ".join(c.ljust(x) if j < 3 else c.rjust(x) for j, (c, x) in enumerate(zip(t, w))).rstrip())
    h298 = {(r["source"], r["against"]): r["h298_diff_J_per_mol"] for r in rows if "h298_diff_J_per_mol" in r}
    for (a, b), v in h298.items():
        print(f"h(298.15 K), the enthalpy of formation: {a} - {b} = {v:.4g} J/mol")
    return 0


def user_records_passed(lib) -> list[dict]:
    """The user records that passed every check (part of the check report)."""
    from ..core.errors import DataError
    out = []
    for d in reversed(getattr(lib, "user_order", [])):
        ds = lib.datasets[d]
        for i in range(len(ds)):
            try:
                r = ds._parse(i)
            except DataError:
                continue
            out.append({"dataset": d, "id": r.id, "file": r.file, "line": r.line, "form": r.form,
                        "T_min_K": r.T_min, "T_max_K": r.T_max, "M": r.M, "intervals": r.poly.n_intervals})
    return out


def breakpoint_jumps(lib) -> list[dict]:
    """The relative jump of cp, h and s° at every inner breakpoint of every record."""
    from ..core.errors import DataError
    out = []
    for d in lib.search_order:
        ds = lib.datasets[d]
        for i in range(len(ds)):
            try:
                r = ds._parse(i)
            except DataError:
                continue  # listed among the errors
            for j in r.poly.boundary_jumps():
                out.append({"dataset": d, "id": r.id, "T_K": j["T_K"], "cp": j["cp"], "h": j["h"], "s0": j["s"]})
    return out


def run(args) -> int:
    from ..data.library import library
    lib = library(args.data, strict=not args.check)
    for m in lib.messages:
        notice(args, f"note: {m}")
    if args.sources:
        return sources(lib, args.sources, args.json)
    if args.check:
        warnings, errors = check(lib)
        passed = user_records_passed(lib)
        jumps = breakpoint_jumps(lib)
        if args.json:
            sys.stdout.write(dumps({"errors": errors, "warnings": warnings, "user_records_passed": passed,
                                    "breakpoint_jumps": jumps,
                                    "datasets": {d: len(lib.datasets[d]) for d in lib.search_order}}))
        else:
            for d in lib.search_order:
                print(f"{d}: {len(lib.datasets[d])} records ({lib.datasets[d].path})")
            for r in passed:
                print(f"ok: {r['file']}:{r['line']}: {r['id']} ({r['form']}, {r['T_min_K']:g}-{r['T_max_K']:g} K, "
                      f"M {r['M']:.5g} g/mol, {r['intervals']} intervals)")
            for e in errors:
                print(f"error: {e}")
            for w in warnings:
                print(f"warning: {w['dataset']} {w['id']} ({w['file']}:{w['line']}): {w['text']}")
            for d in lib.search_order:
                js = [j for j in jumps if j["dataset"] == d]
                if js:
                    worst = {k: max(js, key=lambda j: j[k]) for k in ("cp", "h", "s0")}
                    print(f"{d}: {len(js)} breakpoints; largest relative jumps: " + ", ".join(
                        f"{k} {w[k]:.1e} ({w['id']} at {w['T_K']:g} K)" for k, w in worst.items()))
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
