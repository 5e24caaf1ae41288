"""tablegen fit: NASA polynomial coefficients from a tabulated cp(T).

Reads a CSV in the shared column convention (header cells ``key [unit]``,
``#`` comment lines): a ``T`` column and a ``cp_molar`` column (or a mass-basis
``cp`` column, converted with the molar mass of ``--formula``), optionally
``dh298_molar`` (h - h(298.15 K)) and ``s0_molar`` (or mass-basis ``s0``)
columns, which are then fitted with cp. The fit is tablegen.calc.fitting's
constrained least squares (cp, h and s° continuous at each breakpoint); it is
refused when ill-conditioned or when it misses the residual target. The record
is written in the chosen format; the largest residuals go to stderr and into
the record's comments.
"""

from __future__ import annotations

import re
import sys
from pathlib import Path

import numpy as np

from ..data.formats import TM4513, TP2002
from ..core.formula import parse_formula
from ..core.table_reader import header_fields, split_table
from ..core.errors import DataError, FitError, InputError, RangeError, TablegenError, UnitError
from ..thermo.polynomial import FORMS, NINE, SEVEN

#: Output formats of the fitted record, and the card format written by default for each form.
OUTPUT_FORMATS = (TM4513, TP2002, "toml")
CARD_OF_FORM = {SEVEN: TM4513, NINE: TP2002}

EXAMPLE = """example:
  tablegen fit janaf-co2.csv --form 9-coefficient --formula CO2 --id CO2-JANAF \\
      --h298=-393.522kJ/mol --out co2-janaf.inp
  tablegen fit janaf-co2.csv --form 7-coefficient --formula CO2 --breakpoint 1000K \\
      --h298=-393.522kJ/mol --target-cp 0.01 --format toml

The CSV has header cells 'key [unit]': T [K] (or °C, °F, °R), cp_molar [J/(mol K)]
or cp [kJ/(kg K)], and optionally dh298_molar [J/mol] and s0_molar [J/(mol K)].
janaf-co2.csv (the NIST-JANAF CO2 table) is in the project's docs/examples/ folder."""

#: Columns the fit reads: key -> dimension of its unit.
COLUMNS = {"T": "temperature", "cp_molar": "molar_entropy", "cp": "specific_entropy",
           "dh298_molar": "molar_energy", "s0_molar": "molar_entropy", "s0": "specific_entropy"}


def add_arguments(p):
    p.epilog = EXAMPLE
    p.add_argument("table", metavar="TABLE.csv", help="tabulated cp(T), columns 'key [unit]'")
    p.add_argument("--form", required=True, choices=FORMS, metavar="FORM",
                   help="polynomial form: 7-coefficient (NASA TM-4513) or 9-coefficient (NASA/TP-2002-211556)")
    p.add_argument("--breakpoint", action="append", default=None, metavar="T",
                   help="inner interval bound with a unit (repeatable); default: chosen by the fit "
                        "(1000 K for tm-4513 card output)")
    p.add_argument("--formula", required=True, metavar="FORMULA",
                   help="elements and counts, e.g. CO2 or C1.02H3.9O0.1 (gives the molar mass)")
    p.add_argument("--id", default=None, metavar="ID", help="species id of the record (default: the formula)")
    p.add_argument("--name", default=None, metavar="NAME", help="descriptive name (default: the id)")
    p.add_argument("--h298", default=None, metavar="H",
                   help="h(298.15 K), the enthalpy of formation, with a unit, written "
                        "--h298=-393.51kJ/mol for a negative value; default 0")
    p.add_argument("--s298", default=None, metavar="S",
                   help="s°(298.15 K) at 1 bar with a unit (e.g. 213.79J/(mol K)); needed without an s0 column")
    p.add_argument("--target-cp", type=float, default=1e-3, metavar="REL",
                   help="largest |Δcp|/cp accepted at the tabulated points (default 1e-3)")
    p.add_argument("--format", default=None, choices=OUTPUT_FORMATS, metavar="FORMAT",
                   help="output format: tm-4513 (NASA TM-4513 cards, 7-coefficient only), tp-2002 "
                        "(NASA/TP-2002-211556) or toml (gasdata); default: tm-4513 for the 7-coefficient "
                        "form, tp-2002 for the 9-coefficient form")
    p.add_argument("--out", default=None, metavar="FILE", help="write to FILE instead of stdout")
    p.add_argument("--force", action="store_true", help="replace FILE if it exists")


def read_table(path: str, M_g_per_mol: float) -> dict:
    """The fit columns of a CSV, SI molar units; cites from '# source:' lines."""
    from ..core.units import unit
    p = Path(path)
    try:
        text = p.read_text(encoding="utf-8-sig")
    except FileNotFoundError:
        raise DataError(f"{path}: no such file; give a CSV table of cp(T)") from None
    except (OSError, UnicodeDecodeError) as e:
        raise DataError(f"{path}: cannot read ({e}); the table must be UTF-8 CSV") from None
    table = split_table(text, path, whitespace=False, strip=False)
    cites = []
    for _, ln in table.comments:
        m = re.match(r"^\s*#\s*source:\s*(.+?)\s*$", ln, re.I)
        if m:
            cites.append(m.group(1))
    if not table.header_line:
        raise DataError(f"{path}: the table is empty; it needs a header line and rows")
    head_line, head = table.header_line, table.header
    cols = {}
    for j, key, u in header_fields(head, str(path), head_line, example="T [K] or cp_molar [J/(mol K)]"):
        cell = head[j]
        if key in COLUMNS:
            if key in cols:
                raise DataError(f"{path}:{head_line}: column {key!r} appears twice")
            try:
                cols[key] = (j, unit(u, COLUMNS[key]))
            except TablegenError as e:
                raise UnitError(f"{path}:{head_line}: column {cell!r}: {e}") from None
    if "T" not in cols:
        raise DataError(f"{path}:{head_line}: no 'T [unit]' column; the table needs T and cp_molar (or cp)")
    if "cp_molar" not in cols and "cp" not in cols:
        raise DataError(f"{path}:{head_line}: no cp column; give 'cp_molar [J/(mol K)]' or 'cp [kJ/(kg K)]'")
    for a, b in (("cp_molar", "cp"), ("s0_molar", "s0")):
        if a in cols and b in cols:
            raise DataError(f"{path}:{head_line}: give {a} or {b}, not both")
    data = {k: [] for k in cols}
    for n, r in table.rows:
        if len(r) != len(head):
            raise DataError(f"{path}:{n}: the row has {len(r)} cells but the header has {len(head)}")
        for k, (j, u) in cols.items():
            try:
                v = float(r[j])
            except ValueError:
                raise DataError(f"{path}:{n}: column {head[j]!r}: {r[j]!r} is not a number") from None
            if not np.isfinite(v):
                raise DataError(f"{path}:{n}: column {head[j]!r}: {r[j]!r} is not a finite number")
            data[k].append(u.to_si(v))
    if len(data["T"]) < 2:
        raise FitError(f"{path}: the table has {len(data['T'])} rows; a fit needs many more")
    Mk = M_g_per_mol * 1e-3
    out = {"T_K": np.array(data["T"])}
    out["cp"] = np.array(data["cp_molar"]) if "cp_molar" in data else np.array(data["cp"]) * Mk
    if "dh298_molar" in data:
        out["dh"] = np.array(data["dh298_molar"])
    if "s0_molar" in data or "s0" in data:
        out["s"] = np.array(data["s0_molar"]) if "s0_molar" in data else np.array(data["s0"]) * Mk
    order = np.argsort(out["T_K"], kind="stable")
    if np.any(np.diff(out["T_K"][order]) <= 0):
        raise DataError(f"{path}: temperatures repeat; give each temperature once")
    out = {k: v[order] for k, v in out.items()}
    out["cites"] = cites
    return out


def report(fit, tab, path: str) -> list[str]:
    r = fit.residuals
    bp = [f"{t:g}" for t in fit.T_bounds[1:-1]]
    lines = [f"fit of {Path(path).name}: {fit.n_points} points, {fit.T_bounds[0]:g}-{fit.T_bounds[-1]:g} K, "
             f"{fit.form}, breakpoints {', '.join(bp) + ' K' if bp else 'none'}, condition {fit.condition:.2g}",
             f"largest residuals: cp {r['cp_max_rel'] * 100:.3g} % (rms {r['cp_rms_rel'] * 100:.3g} %)"]
    if r.get("h_max_J_per_mol") is not None:
        lines[-1] += f"; h-h298 {r['h_max_J_per_mol']:.3g} J/mol"
    else:
        lines[-1] += "; h-h298 not tabulated"
    if r.get("s_max_J_per_molK") is not None:
        lines[-1] += f"; s° {r['s_max_J_per_molK']:.3g} J/(mol K)"
    else:
        lines[-1] += "; s° not tabulated (level from --s298)"
    return lines


def run(args) -> int:
    from ..data.validate import check_polynomial
    from ..calc.fitting import fit_cp_table
    from ..core.filewrite import check_files, write_files
    from ..core.units import quantity, temperature_K
    from .common import data_notices, notice
    from .export import check_id, with_poly, write_record
    fmt = args.format or CARD_OF_FORM[args.form]
    if fmt == TM4513 and args.form != SEVEN:
        raise InputError(f"--format {TM4513} holds only the 7-coefficient form; use --form {SEVEN}, or "
                         f"--format {TP2002} or toml")
    if args.out:
        check_files([args.out], args.force)
    lib = data_notices(args)
    elements = parse_formula(args.formula, "--formula")
    M = lib.weights.molar_mass(elements, f"--formula {args.formula}: ")
    rid = check_id(args.id or args.formula.strip())
    tab = read_table(args.table, M)
    bps = None
    if args.breakpoint:
        bps = [temperature_K(b, "--breakpoint") for b in args.breakpoint]
    if fmt == TM4513:
        if bps is None:
            bps = [1000.0]
        if len(bps) != 1 or abs(bps[0] - 1000.0) > 1e-9:
            raise InputError(f"the {TM4513} card format has one breakpoint, at 1000 K; give "
                             f"--breakpoint 1000K or choose --format toml")
        if not tab["T_K"][0] < 1000.0 < tab["T_K"][-1]:
            raise InputError(f"the {TM4513} card format needs a table that spans 1000 K; "
                             f"choose --format toml")
    h298 = quantity(args.h298, "molar_energy", "--h298") if args.h298 is not None else None
    s298 = quantity(args.s298, "molar_entropy", "--s298") if args.s298 is not None else None
    if not 0 < args.target_cp < 1:
        raise RangeError(f"--target-cp {args.target_cp!r} must lie between 0 and 1 (a relative error)")
    from ..calc.fitting import FitError
    if h298 is None:
        notice(args, "note: h(298.15 K) taken as 0 (a sensible-enthalpy record); give --h298 for the "
                     "enthalpy of formation")
    try:
        fit = fit_cp_table(tab["T_K"], tab["cp"], form=args.form, breakpoints=bps, h298_J_per_mol=h298,
                           s298_J_per_molK=s298, dh_J_per_mol=tab.get("dh"), s_J_per_molK=tab.get("s"),
                           target={"cp_max_rel": args.target_cp})
    except FitError as e:
        hint = (f" (the {TM4513} card format allows only the 1000 K breakpoint; --format toml allows more)"
                if fmt == TM4513 else "")
        raise FitError(f"fit of {args.table} refused: {e}{hint}") from None
    errors = [f for f in check_polynomial(fit.poly, user=True) if f.severity == "error"]
    if errors:
        raise FitError(f"the fit is refused: {errors[0].text}")
    lines = report(fit, tab, args.table)
    for ln in lines:
        notice(args, ln)
    cites = tab["cites"] or [f"tabulation {Path(args.table).name}"]
    r = {"id": rid, "name": args.name or rid, "kind": "species", "elements": elements, "M": M,
         "comments": [f"{rid}: fit of {Path(args.table).name} by tablegen fit ({args.form})", *lines,
                      *[f"source: {c}" for c in cites]],
         "cites": cites, "origin": f" (fit of {Path(args.table).name})",
         "citation": f"{'; '.join(cites)}; coefficients fitted by tablegen fit ({args.form})",
         "card_comment": f"fit of {Path(args.table).name} (tablegen fit)",
         "dataset_id": f"fit-{rid}", "date": "fit", "title": f"tablegen fit of {Path(args.table).name}",
         "fit_residuals": {k: float(v) for k, v in fit.residuals.items() if v is not None},
         "fit_input": Path(args.table).name}
    text = write_record(with_poly(r, fit.poly), fmt)
    if args.out:
        write_files({args.out: text}, args.force)
        notice(args, f"wrote {args.out} (record {rid}, {fmt})")
    else:
        sys.stdout.write(text)
    return 0
