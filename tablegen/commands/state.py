"""tablegen state: properties of one substance at listed temperatures."""

from __future__ import annotations

import sys

from .common import add_datum_options, dumps, notice, substance_with_options

EXAMPLE = """example:
  tablegen state air --T 25C,500C,1000K
  tablegen state CO2 --T 300K,1500K --P 10bar --json
  tablegen state "CH4=0.9,C2H6=0.06,N2=0.04" --T 60F --h-datum sensible:0C
  tablegen state "CH4=90%,C2H6=6%,N2=4%" --T 15C,800C --json
  tablegen state "air,rh=60%,T=15C" --T 0C,15C,200C

Humid air is written as combust --oxidant reads it (air,rh=60%,T=15C, air,w=8g/kg,
air,dew=5C,P=1atm); rows at or below the water dew point of a gas are marked c."""

#: JSON key -> (factor from SI, unit) for the mass-basis keys of the state output.
JSON_UNITS = {
    "cp": (1e-3, "kJ/(kg K)"), "cv": (1e-3, "kJ/(kg K)"), "k": (1.0, "-"),
    "h": (1e-3, "kJ/kg"), "u": (1e-3, "kJ/kg"), "s0": (1e-3, "kJ/(kg K)"), "g0": (1e-3, "kJ/kg"),
    "Pr": (1.0, "-"), "vr": (1.0, "-"), "a": (1.0, "m/s"),
    "cp_molar": (1.0, "J/(mol K)"), "cv_molar": (1.0, "J/(mol K)"), "h_molar": (1.0, "J/mol"),
    "u_molar": (1.0, "J/mol"), "s0_molar": (1.0, "J/(mol K)"), "g0_molar": (1.0, "J/mol"),
    "dh298_molar": (1.0, "J/mol"),
    "s": (1e-3, "kJ/(kg K)"), "s_molar": (1.0, "J/(mol K)"), "v": (1.0, "m³/kg"),
}

#: Text table: JSON key, heading, unit (the JSON unit), format.
TEXT_COLUMNS = [("T_K", "T", "K", "{:.2f}"), ("cp", "cp", "kJ/(kg K)", "{:.5f}"),
                ("k", "k", "-", "{:.5f}"), ("h", "h", "kJ/kg", "{:.3f}"),
                ("u", "u", "kJ/kg", "{:.3f}"), ("s0", "s°", "kJ/(kg K)", "{:.5f}"),
                ("Pr", "Pr", "-", "{:.6g}"), ("vr", "vr", "-", "{:.6g}"),
                ("a", "a", "m/s", "{:.2f}")]


def add_arguments(p):
    p.epilog = EXAMPLE
    p.add_argument("substance", help="species id or alias, shipped mixture (air), a composition "
                                      "NAME=x,NAME=y (mole fractions; NAME=x%%,... or basis=mass,...), a humid air "
                                      "air,rh=60%%,T=15C, or a flue gas flue@FUEL@AMOUNT")
    p.add_argument("--T", required=True, metavar="LIST",
                   help="temperatures with units, comma-separated: K, C, F or R (e.g. 25C,1000K)")
    p.add_argument("--P", default=None, metavar="VALUE",
                   help="pressure with a unit (Pa, kPa, MPa, bar, atm, psia); adds s and v")
    p.add_argument("--json", action="store_true", help="a JSON array, one object per temperature")
    add_datum_options(p)


def compute(args) -> tuple[list[dict], object]:
    import numpy as np

    from ..units import pressure_Pa, temperature_list
    sub = substance_with_options(args, args.substance)
    T = np.array(temperature_list(args.T, "--T"))
    P = pressure_Pa(args.P, "--P") if args.P is not None else None
    p = sub.properties(T, P, extrapolate=args.extrapolate)
    from ..saturation import dew_point_at
    dew = dew_point_at(sub, P)        # the gas's own figure, or at --P when that differs
    rows = []
    for i in range(T.size):
        row = {"substance": sub.id, "T_K": float(T[i]), "M": sub.M, "R": sub.R * 1e-3,
               "h_datum": sub.datum.describe(), "P_ref_Pa": sub.P_ref_Pa,
               "anchor": {"T_K": sub.anchor.T_K, "Pr": sub.anchor.Pr, "vr": sub.anchor.vr}}
        for key, (f, _) in JSON_UNITS.items():
            if key in p:
                row[key] = float(p[key][i]) * f
        if P is not None:
            row["P_Pa"] = P
        if "extrapolated" in p:
            row["extrapolated"] = bool(p["extrapolated"][i])
        if dew[1] is not None:
            row["dew_point_K"], row["dew_point_P_Pa"] = dew
            row["condensing"] = bool(dew[0] is not None and T[i] <= dew[0])
        if sub.cautions:
            row["cautions"] = list(sub.cautions)
        rows.append(row)
    return rows, sub


def run(args) -> int:
    rows, sub = compute(args)
    if args.json:
        sys.stdout.write(dumps(rows))
        return 0
    cols = list(TEXT_COLUMNS)
    if args.P is not None:
        cols.append(("s", "s", "kJ/(kg K)", "{:.5f}"))
        cols.append(("v", "v", "m³/kg", "{:.6g}"))
    table = [[c[1] for c in cols], [f"[{c[2]}]" for c in cols]]
    for r in rows:
        cells = []
        for key, _, _, fmt in cols:
            cells.append(fmt.format(r[key]) + ("*" if r.get("extrapolated") and key == "T_K" else "")
                         + ("c" if r.get("condensing") and key == "T_K" else ""))
        table.append(cells)
    widths = [max(len(row[j]) for row in table) for j in range(len(cols))]
    out = [f"{sub.name} ({sub.id}), M = {sub.M:.4f} kg/kmol, R = {sub.R * 1e-3:.6f} kJ/(kg K)",
           f"datum: {sub.datum.describe()}; s° at P° = {sub.P_ref_Pa / 1000:g} kPa; "
           f"Pr = {sub.anchor.Pr:g}, vr = {sub.anchor.vr:g} at {sub.anchor.T_K:g} K",
           ""]
    for row in table:
        out.append("  ".join(c.rjust(w) for c, w in zip(row, widths)))
    if any(r.get("extrapolated") for r in rows):
        out.append("* extrapolated beyond the data range: not for design use")
    if rows and rows[0].get("dew_point_P_Pa") is not None:
        from ..saturation import dew_point_text
        out.append(f"water dew point {dew_point_text(rows[0]['dew_point_K'], rows[0]['dew_point_P_Pa'])}"
                   + ("; c at or below it: water may condense at this temperature; ideal-gas values do not hold"
                      if any(r.get("condensing") for r in rows) else ""))
    out.extend(f"caution: {c}" for c in sub.cautions)
    sys.stdout.write("\n".join(out) + "\n")
    if sub.kind == "mixture":
        notice(args, "note: mixture s° includes the ideal mixing term -R Σ y ln y")
    return 0
