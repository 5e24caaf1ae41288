"""tablegen export: write a species or fixed-composition mixture as one coefficient record.

A mixture is written as its exact collapsed polynomial (Substance.poly): the
mole-fraction-weighted sum of its components' coefficients on the union of
their breakpoints, molar, at 1 bar, with the ideal mixing term -Σ y ln y
already in the s°/R constant b2. Read back with ``--data``, the record gives
the mixture's own values; in TOML every coefficient survives bit for bit, the
card formats keep the digits their fields hold (tm-4513: 9 significant digits,
tp-2002: 10).
"""

from __future__ import annotations

import hashlib
import re
import sys

import numpy as np

from ..data.formats import TM4513, TP2002
from ..core.errors import InputError, TablegenError
from ..thermo.polynomial import NINE, SEVEN
from .common import data_notices, notice

EXAMPLE = """example:
  tablegen export "CH4=0.9,C2H6=0.06,N2=0.04" --format toml --id SITE-GAS --out site-gas.toml
  tablegen export air --format tp-2002
  tablegen export CO2 --source nasa1993 --format tm-4513 --out co2.dat
  tablegen state SITE-GAS --data site-gas.toml --T 25C,800C"""

#: --format values: the card layouts named after their reports, and gasdata TOML.
FORMATS = (TM4513, TP2002, "toml")

#: Card name fields are 18 columns (NASA TM-4513 and NASA/TP-2002-211556).
NAME_WIDTH = 18

_CLEAN_ID = re.compile(r"^[A-Za-z0-9_()+\-.,]+$")


def add_arguments(p):
    p.epilog = EXAMPLE
    p.add_argument("substance", help="species id or alias, shipped mixture (air), or a composition "
                                      "NAME=x,NAME=y (mole fractions; NAME=x%%,... or basis=mass,...)")
    p.add_argument("--format", required=True, choices=FORMATS, metavar="FORMAT",
                   help="tm-4513 (NASA TM-4513 cards, 7-coefficient form), tp-2002 (NASA/TP-2002-211556 "
                        "records, 9-coefficient form) or toml (gasdata)")
    p.add_argument("--id", default=None, metavar="ID",
                   help="species id of the record (default: the species id; for a mixture its name "
                        "plus '-mix', or MIX- and a digest of the composition)")
    p.add_argument("--out", default=None, metavar="FILE", help="write to FILE instead of stdout")
    p.add_argument("--force", action="store_true", help="replace FILE if it exists")


def default_id(sub) -> str:
    if sub.kind == "species":
        return sub.id
    if re.fullmatch(r"[A-Za-z0-9_\-]+", sub.id) and len(sub.id) <= NAME_WIDTH - 4:
        return f"{sub.id}-mix"
    digest = hashlib.sha256(";".join(f"{c.id}={c.mole_fraction!r}" for c in sub.components)
                            .encode()).hexdigest()[:8]
    return f"MIX-{digest}"


def record_of(sub, lib, rid: str) -> dict:
    """Everything a writer needs about ``sub`` as one record."""
    poly = sub.poly
    elements: dict = {}
    for c in sub.components:
        rec = lib.datasets[c.source].get(c.id) if c.source in lib.datasets else None
        if rec is None:
            rec = lib.record(c.id)
        for e, n in rec.elements.items():
            elements[e] = elements.get(e, 0.0) + c.mole_fraction * n
    elements = {e: (int(round(n)) if abs(n - round(n)) < 1e-12 else n) for e, n in elements.items()
                if abs(n) > 0}
    comp = [f"{c.id} {c.mole_fraction:.10g}" for c in sub.components]
    srcs = sorted({f"{sid}: {ds}" for sid, ds, _ in sub.sources})
    cites = sorted({cite for _, _, cite in sub.sources})
    if sub.kind == "mixture":
        comments = [f"{rid}: fixed-composition mixture {sub.name}, mole fractions: {', '.join(comp)}",
                    f"exact collapsed polynomial, molar, at 1 bar; the s/R constant b2 includes the ideal "
                    f"mixing term -sum(y ln y) = {sub.mixing_entropy_R:.10g}",
                    f"component data: {', '.join(srcs)}"]
    else:
        comments = [f"{rid}: {sub.name}, data set {sub.sources[0][1]}"]
    comments += [f"source: {c}" for c in cites]
    r = {"id": rid, "name": sub.name, "kind": sub.kind, "elements": elements, "M": sub.M,
         "comments": comments, "cites": cites,
         "origin": (" (exact collapsed polynomial of a fixed-composition mixture)" if sub.kind == "mixture"
                    else f" (record of data set {sub.sources[0][1]})")}
    if sub.kind == "mixture":
        r["composition"] = {c.id: float(c.mole_fraction) for c in sub.components}
        r["component_sources"] = {c.id: c.source for c in sub.components}
        r["mixing_R"] = float(sub.mixing_entropy_R)
    return with_poly(r, poly)


def with_poly(r: dict, poly) -> dict:
    """Add the polynomial-derived fields a writer needs to a record dict."""
    from ..core.constants import R_MOLAR
    hR = float(poly.evaluate(np.array([298.15]))["h"][0])
    r.update({"T_bounds_K": [float(x) for x in poly.T_bounds], "coeffs9": poly.coeffs.copy(),
              "h298_over_R_K": hR, "h_formation_J_per_mol": hR * R_MOLAR,
              "a7_form": bool(np.all(poly.coeffs[:, :2] == 0.0))})
    return r


def citation(r: dict, version: str | None = None) -> str:
    if "citation" in r:
        return r["citation"]
    v = f" {version}" if version else ""
    return f"tablegen{v} export of {r['name']}{r['origin']}"


def to_tm4513(r: dict) -> str:
    from ..data import formats
    b = r["T_bounds_K"]
    c = r["coeffs9"]
    if not r["a7_form"]:
        raise InputError(f"{r['id']}: the polynomial has T^-2 and T^-1 terms (9-coefficient form), which "
                         f"the 7-coefficient {TM4513} format cannot hold; use --format {TP2002} or toml")
    inner = b[1:-1]
    T0 = formats.TM4513_COMMON_T
    if not (b[0] < T0 < b[-1]) or any(abs(t - T0) > 1e-9 for t in inner):
        raise InputError(f"{r['id']}: the {TM4513} format holds two intervals that meet at "
                         f"{T0:g} K; this polynomial covers {b[0]:g}-{b[-1]:g} K with breakpoints at "
                         f"{[float(t) for t in inner] or 'none'} K; use --format {TP2002} or toml")
    if len(inner) == 0:
        lower = upper = c[0]
    else:
        lower, upper = c[0], c[1]
    if len(r["elements"]) > 4:
        raise InputError(f"{r['id']}: the TM-4513 formula field holds 4 elements, this record has "
                         f"{len(r['elements'])} ({', '.join(r['elements'])}); use --format {TP2002} or toml")
    rec = {"id": r["id"], "elements": r["elements"], "M": r["M"], "T_bounds_K": [b[0], T0, b[-1]],
           "coefficients": [lower[2:], upper[2:]], "date": r.get("date", "export"), "h298_over_R_K": r["h298_over_R_K"]}
    try:
        return formats.write_tm4513(rec, comments=[f"citation: {citation(r)}", *r["comments"]])
    except TablegenError as e:
        raise InputError(f"{r['id']}: {e}; use --format {TP2002} or toml") from None


def to_tp2002(r: dict) -> str:
    from ..data import formats
    if len(r["elements"]) > 5:
        raise InputError(f"{r['id']}: the NASA/TP-2002-211556 formula field holds 5 elements, this record "
                         f"has {len(r['elements'])} ({', '.join(r['elements'])}); use --format toml")
    rec = {"id": r["id"], "comment": r.get("card_comment", f"tablegen export of {r['name']}")[:62],
           "refcode": r.get("date", "export"),
           "elements": r["elements"], "M": r["M"], "h_formation_J_per_mol": r["h_formation_J_per_mol"],
           "T_bounds_K": r["T_bounds_K"], "coefficients": r["coeffs9"]}
    try:
        return formats.write_tp2002(rec, comments=[f"citation: {citation(r)}", *r["comments"]])
    except TablegenError as e:
        raise InputError(f"{r['id']}: {e}; use --format toml") from None


def to_toml(r: dict) -> str:
    from .. import __version__
    from ..data.tomlout import table
    form = SEVEN if r["a7_form"] else NINE
    coeffs = [[float(x) for x in (row[2:] if form == SEVEN else row)] for row in r["coeffs9"]]
    ds = {"id": r.get("dataset_id", f"export-{r['id']}"),
          "title": r.get("title", f"tablegen export of {r['name']}"),
          "citation": citation(r, __version__),
          "reference_pressure_Pa": 100000.0,
          "sources": list(r["cites"])}
    sp = {"id": r["id"], "name": r["name"], "aliases": [], "elements": r["elements"],
          "molar_mass_g_per_mol": float(r["M"]), "phase": "gas", "form": form,
          "T_bounds_K": r["T_bounds_K"], "coefficients": coeffs,
          "h_formation_298_J_per_mol": float(r["h_formation_J_per_mol"]),
          "source": ds["id"], "source_note": r["comments"][0]}
    if "composition" in r:
        sp["composition_basis"] = "mole"
        sp["composition"] = r["composition"]
        sp["component_sources"] = r["component_sources"]
        sp["mixing_entropy_over_R"] = r["mixing_R"]
        sp["note"] = ("exact collapsed polynomial, molar, at 1 bar; the s/R constant includes the ideal "
                      "mixing term -sum(y ln y) given in mixing_entropy_over_R")
    for k in ("fit_residuals", "fit_input"):
        if k in r:
            sp[k] = r[k]
    head = ("# tablegen gasdata file; format: docs/user-data.md.\n"
            "# " + "\n# ".join(r["comments"]) + "\n\n")
    return head + table("dataset", ds) + "\n\n" + table("species", sp, array=True)


def write_record(r: dict, fmt: str) -> str:
    """A record dict (see record_of, with_poly) in one of FORMATS."""
    rid = r["id"]
    if fmt in (TM4513, TP2002) and (len(rid) > NAME_WIDTH or " " in rid):
        raise InputError(f"record id {rid!r} does not fit the {NAME_WIDTH}-column name field of the "
                         f"{fmt} format (no spaces); give a shorter --id or use --format toml")
    return {TM4513: to_tm4513, TP2002: to_tp2002, "toml": to_toml}[fmt](r)


def check_id(rid: str) -> str:
    if not rid or not _CLEAN_ID.match(rid) or ":" in rid:
        raise InputError(f"--id {rid!r} is not a usable species id; allowed: letters, digits and _ ( ) + - . "
                         f"(no spaces, no ':')")
    return rid


def render(sub, lib, fmt: str, rid: str) -> str:
    return write_record(record_of(sub, lib, rid), fmt)


def run(args) -> int:
    from ..calc import names as api
    from ..core.filewrite import check_files, write_files
    if args.out:
        check_files([args.out], args.force)
    lib = data_notices(args)
    sub = api.substance(args.substance, source=args.source, data=args.data)
    rid = check_id(args.id if args.id is not None else default_id(sub))
    if args.id is None and sub.kind == "mixture":
        notice(args, f"note: record id {rid} (choose another with --id)")
    text = render(sub, lib, args.format, rid)
    if args.format != "toml" and sub.kind == "mixture":
        digits = 9 if args.format == TM4513 else 10
        notice(args, f"note: the {args.format} format holds {digits} significant digits a coefficient; "
                     f"--format toml keeps every digit of the collapsed polynomial")
    if args.out:
        write_files({args.out: text}, args.force)
        notice(args, f"wrote {args.out} (record {rid}, {args.format})")
    else:
        sys.stdout.write(text)
    return 0
