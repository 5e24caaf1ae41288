"""tablegen state: properties of one substance at listed temperatures."""

from __future__ import annotations

import sys

from ..core.jsonout import dumps
from .common import add_datum_options, add_unit_options, substance_with_options

EXAMPLE = """The answer comes in the units you typed: --T 15C gives °C and K, --P in psig gives psig
and psia (gauge values against --barometer, default 1.01325 bar); --units SI or US, --T-unit
and --P-unit choose. Enthalpy: h = 0 at 0 °C unless --h-datum says otherwise. A mixture's s°
includes the ideal mixing term -R Σ y ln y (said again only with --verbose).

example:
  tablegen state air --T 25C,500C,1000K
  tablegen state CO2 --T 300K,1500K --P 10bar --json
  tablegen state "CH4=0.9,C2H6=0.06,N2=0.04" --T 60F --h-datum sensible:0C
  tablegen state "CH4=90%,C2H6=6%,N2=4%" --T 15C,800C --json
  tablegen state air --T 60F,400F --P 120psig --units US
  tablegen state methane --T 15C --h-datum formation
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
#: Units of the other keys of a row.
OTHER_UNITS = {"T_K": "K", "P_Pa": "Pa", "M": "kg/kmol", "R": "kJ/(kg K)", "P_ref_Pa": "Pa"}

#: Text table: JSON key, heading, quantity of the shown unit (None: dimensionless), decimals.
TEXT_COLUMNS = [("cp", "cp", "s", "{:.5f}"), ("k", "k", None, "{:.5f}"), ("h", "h", "h", "{:.3f}"),
                ("u", "u", "h", "{:.3f}"), ("s0", "s°", "s", "{:.5f}"), ("Pr", "Pr", None, "{:.6g}"),
                ("vr", "vr", None, "{:.6g}"), ("a", "a", "a", "{:.2f}")]


def add_arguments(p):
    p.epilog = EXAMPLE
    p.add_argument("substance", help="species id or alias, shipped mixture (air), a composition "
                                      "NAME=x,NAME=y (mole fractions; NAME=x%%,... or basis=mass,...), a humid air "
                                      "air,rh=60%%,T=15C, or a flue gas flue@FUEL@AMOUNT")
    p.add_argument("--T", required=True, metavar="LIST",
                   help="temperatures with units, comma-separated: K, C, F or R (e.g. 25C,1000K)")
    p.add_argument("--P", default=None, metavar="VALUE",
                   help="pressure with a unit (Pa, kPa, MPa, bar, atm, psia, or gauge barg, kPag, psig); "
                        "adds s and v")
    p.add_argument("--json", action="store_true",
                   help="a JSON array, one object per temperature (SI-based; each with its 'units' and "
                        "the 'input' as typed)")
    p.add_argument("--verbose", action="store_true",
                   help="add the notes that are true of every mixture (see below)")
    add_unit_options(p)
    add_datum_options(p, default=None)


def compute(args) -> tuple[list[dict], object]:
    import numpy as np

    from ..core.units import barometer_Pa, parse_pressure, temperature_list
    sub = substance_with_options(args, args.substance, by_rule=True)
    T = np.array(temperature_list(args.T, "--T"))
    pr = parse_pressure(args.P, "--P", barometer_Pa=barometer_Pa(args.barometer)) if args.P is not None else None
    P = None if pr is None else pr.Pa
    p = sub.properties(T, P, extrapolate=args.extrapolate)
    from ..thermo.saturation import dew_point_at
    dew = dew_point_at(sub, P)        # the gas's own figure, or at --P when that differs
    typed_T = [t.strip() for t in str(args.T).split(",")]
    units = {k: u for k, (_, u) in JSON_UNITS.items() if k in p}
    units.update({k: u for k, u in OTHER_UNITS.items() if k != "P_Pa" or P is not None})
    rows = []
    for i in range(T.size):
        row = {"substance": sub.id, "T_K": float(T[i]), "M": sub.M, "R": sub.R * 1e-3,
               "h_datum": sub.datum.describe(), "P_ref_Pa": sub.P_ref_Pa,
               "anchor": {"T_K": sub.anchor.T_K, "Pr": sub.anchor.Pr, "vr": sub.anchor.vr},
               "units": units, "input": {"T": typed_T[i]}}
        for key, (f, _) in JSON_UNITS.items():
            if key in p:
                row[key] = float(p[key][i]) * f
        if P is not None:
            row["P_Pa"] = P
            row["input"]["P"] = pr.typed
            if pr.gauge:
                row["input"].update(P_gauge_Pa=pr.gauge_Pa, barometer_Pa=pr.barometer_Pa, P_gauge_unit=pr.gauge)
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
    from .display import choose
    from ..calc.steps import MIXING_NOTE
    from ..core.units import barometer_Pa, unit
    from .process_text import pressure_text
    rows, sub = compute(args)
    if args.json:
        sys.stdout.write(dumps(rows))
        return 0
    sh = choose(system=args.units, T_unit=args.T_unit, P_unit=args.P_unit,
                typed_T=[r["input"]["T"] for r in rows], typed_P=[args.P] if args.P else [],
                barometer_Pa=barometer_Pa(args.barometer))
    cols = [("T_K", "T", sh.T, lambda x: f"{unit(sh.T).from_si(x):.2f}")]
    if sh.T_abs:
        cols.append(("T_K", "T", sh.T_abs, lambda x: f"{unit(sh.T_abs).from_si(x):.2f}"))
    extra = [("s", "s", "s", "{:.5f}"), ("v", "v", "v", "{:.6g}")] if args.P is not None else []
    for key, head, q, fmt in TEXT_COLUMNS + extra:
        u = sh.sym(q) if q else "-"
        factor = 1.0 / JSON_UNITS[key][0]
        cols.append((key, head, u, lambda x, u=u, fmt=fmt, f=factor: fmt.format(unit(u).from_si(x * f))))
    table = [[c[1] for c in cols], [f"[{c[2]}]" for c in cols]]
    for r in rows:
        cells = []
        for j, (key, _, _, fmt) in enumerate(cols):
            cells.append(fmt(r[key]) + ("*" if r.get("extrapolated") and j == 0 else "")
                         + ("c" if r.get("condensing") and j == 0 else ""))
        table.append(cells)
    widths = [max(len(row[j]) for row in table) for j in range(len(cols))]
    from .process_text import datum_text
    su = sh.sym("s")
    out = [f"{sub.name} ({sub.id}), M = {sub.M:.4f} kg/kmol, R = {unit(su).from_si(sub.R):.6f} {su}",
           f"datum: {datum_text({'kind': 'ideal gas'}, sub, sh)}; "
           f"Pr = {sub.anchor.Pr:g}, vr = {sub.anchor.vr:g} at {sub.anchor.T_K:g} K"]
    if args.P is not None:
        out.append(f"s and v at P = {pressure_text(sh, rows[0]['P_Pa'])}")
    out.append("")
    for row in table:
        out.append("  ".join(c.rjust(w) for c, w in zip(row, widths)))
    if any(r.get("extrapolated") for r in rows):
        out.append("* extrapolated beyond the data range: not for design use")
    if rows and rows[0].get("dew_point_P_Pa") is not None:
        from ..thermo.saturation import dew_point_text
        out.append(f"water dew point {dew_point_text(rows[0]['dew_point_K'], rows[0]['dew_point_P_Pa'])}"
                   + ("; c at or below it: water may condense at this temperature; ideal-gas values do not hold"
                      if any(r.get("condensing") for r in rows) else ""))
    out.extend(f"caution: {c}" for c in sub.cautions)
    if args.verbose and sub.kind == "mixture":
        out.append(f"note: {MIXING_NOTE}")
    sys.stdout.write("\n".join(out) + "\n")
    return 0
