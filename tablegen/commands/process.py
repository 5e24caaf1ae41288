"""tablegen process: one state change of a gas or incompressible substance.

Prints the start, end and isentropic end states, the work and heat per kg and
per kmol, the entropy change and the entropy generated, and how far the quick
hand methods (constant cp, constant-k power law) are off the exact result.
"""

from __future__ import annotations

import math
import sys

from ..errors import TablegenError
from .common import anchor_from_text, datum_from_text, dumps

EXAMPLE = """example:
  tablegen process air --from T=300K,P=1bar --compress-ratio 8
  tablegen process air --from T=25C,P=1bar --compress-to 8bar --eta 0.85
  tablegen process "CO2=0.12,H2O=0.1,N2=0.74,O2=0.04" --from T=1400K,P=12bar --expand-to 1.05bar --eta 0.9
  tablegen process N2 --from T=300K,P=2bar --heat-to 800K --boundary-T 1100K --json
  tablegen process air --from T=400K,P=5bar --cool-by 80kJ/kg
  tablegen process "air,rh=80%,T=25C" --from T=400K,P=8bar --heat-to 30C
  tablegen process --incompressible water --from T=20C,P=1bar --compress-to 12bar --eta 0.7
  tablegen process --incompressible c=0.9,rho=2700 --from T=20C,P=1bar --heat-to 120C

Steps through a machine and heaters are steady flow (w is shaft work); --heat-v-*
is a closed rigid vessel. Work and heat are positive into the substance.
Negative amounts need '=': --heat-by=-80kJ/kg (or use --cool-by 80kJ/kg)."""

#: option dest -> (step, parameter, kind of value)
STEP_OPTIONS = {
    "compress_to": ("compress", "P2_Pa", "pressure"),
    "compress_ratio": ("compress", "ratio", "ratio"),
    "expand_to": ("expand", "P2_Pa", "pressure"),
    "expand_ratio": ("expand", "ratio", "ratio"),
    "heat_to": ("heat_p", "T2_K", "temperature"),
    "heat_by": ("heat_p", "q_J_per_kg", "heat"),
    "cool_by": ("heat_p", "q_J_per_kg", "cooling"),
    "heat_v_to": ("heat_v", "T2_K", "temperature"),
    "heat_v_by": ("heat_v", "q_J_per_kg", "heat"),
    "throttle_to": ("throttle", "P2_Pa", "pressure"),
}

STEP_TITLES = {
    "compress": "compression, steady flow, adiabatic",
    "expand": "expansion, steady flow, adiabatic",
    "heat_p": "constant-pressure heat exchange, steady flow",
    "heat_v": "constant-volume heat exchange, closed rigid vessel",
    "throttle": "throttling, steady flow, adiabatic, no work",
}

CAUTION_GAS = ("ideal-gas model: at high pressure or near condensation real-gas effects "
               "(compressibility, Joule-Thomson change, condensing water) are not included")
CAUTION_LIQUID = ("incompressible model: one density and c(T); no phase change, no boiling or "
                  "cavitation check")
CAUTION_CODES = ("check machines, vessels and heaters against local codes and licensed "
                 "engineering practice; these figures are not a design approval")


def add_arguments(p):
    p.epilog = EXAMPLE
    p.add_argument("substance", nargs="?", default=None,
                   help="gas: species id or alias, shipped mixture (air), a composition NAME=x,NAME=y "
                        "(mole fractions; NAME=x%%,... or basis=mass,...), a humid air air,rh=60%%,T=15C "
                        "(leave out with --incompressible)")
    p.add_argument("--incompressible", default=None, metavar="NAME|c=..,rho=..",
                   help="a liquid or solid instead of a gas: a shipped entry (water-liquid, ice-Ih), "
                        "c=KJ_PER_KG_K,rho=KG_PER_M3[,T=LO:HI] (c may be a polynomial in T/K "
                        "written a0:a1:a2, kJ/(kg K)), or a file FILE.toml[:NAME] of "
                        "[[incompressible]] tables as in docs/process.md")
    p.add_argument("--from", dest="start", required=True, metavar="T=..,P=..",
                   help="start state, temperature and absolute pressure with units, e.g. T=300K,P=1bar")
    g = p.add_argument_group("step (give exactly one)")
    g.add_argument("--compress-to", metavar="P", help="compress to this absolute pressure")
    g.add_argument("--compress-ratio", metavar="R", help="compress by this pressure ratio P2/P1 (>= 1)")
    g.add_argument("--expand-to", metavar="P", help="expand (turbine, expander) to this absolute pressure")
    g.add_argument("--expand-ratio", metavar="R", help="expand by this pressure ratio P1/P2 (>= 1)")
    g.add_argument("--heat-to", metavar="T", help="heat or cool at constant pressure to this temperature")
    g.add_argument("--heat-by", metavar="Q", help="add heat at constant pressure, e.g. 250kJ/kg")
    g.add_argument("--cool-by", metavar="Q", help="remove heat at constant pressure, e.g. 80kJ/kg")
    g.add_argument("--heat-v-to", metavar="T", help="heat or cool at constant volume to this temperature")
    g.add_argument("--heat-v-by", metavar="Q", help="add heat at constant volume, e.g. 100kJ/kg")
    g.add_argument("--throttle-to", metavar="P", help="throttle (valve, orifice) to this absolute pressure")
    o = p.add_argument_group("step details")
    o.add_argument("--eta", default=None, metavar="E",
                   help="isentropic efficiency of a compression or expansion, 0 < E <= 1 "
                        "(e.g. 0.85 or 85%%; default 1)")
    o.add_argument("--boundary-T", default=None, metavar="T",
                   help="temperature at which heat crosses the boundary (furnace, cooling water), "
                        "for the entropy generated; default: internally reversible")
    p.add_argument("--json", action="store_true", help="one JSON object (SI-based units, listed under 'units')")
    d = p.add_argument_group("datums and scales (gases)")
    d.add_argument("--h-datum", default="formation", metavar="DATUM",
                   help="formation (default) or sensible[:T[:h]], as for 'tablegen state'")
    d.add_argument("--p-ref", default="1bar", metavar="P", help="entropy reference pressure P°: 1bar (default) or 1atm")
    d.add_argument("--anchor", default=None, metavar="T=..,Pr=..,vr=..",
                   help="Pr/vr scale (default T=298.15K,Pr=1,vr=1)")


# ------------------------------------------------------------------ parsing
def parse_start(text: str) -> tuple[float, float]:
    from ..units import pressure_Pa, temperature_K
    vals = {}
    for part in str(text).split(","):
        if "=" not in part:
            raise TablegenError(f"--from {text!r}: write T=300K,P=1bar (temperature and absolute pressure)")
        k, v = (x.strip() for x in part.split("=", 1))
        if k not in ("T", "P"):
            raise TablegenError(f"--from: unknown key {k!r}; allowed: T, P")
        if k in vals:
            raise TablegenError(f"--from: {k} given twice")
        vals[k] = v
    if set(vals) != {"T", "P"}:
        raise TablegenError(f"--from {text!r}: give both T and P, e.g. T=300K,P=1bar")
    return temperature_K(vals["T"], "--from T"), pressure_Pa(vals["P"], "--from P")


def _number(text: str, what: str, allow_percent: bool = False) -> float:
    t = str(text).strip()
    scale = 1.0
    if allow_percent and t.endswith("%"):
        t, scale = t[:-1].strip(), 0.01
    try:
        v = float(t) * scale
    except ValueError:
        raise TablegenError(f"{what} {text!r} is not a number") from None
    if not math.isfinite(v):
        raise TablegenError(f"{what} {text!r} must be finite")
    return v


def step_from_args(args) -> tuple[str, dict]:
    from ..units import pressure_Pa, quantity, temperature_K
    chosen = [(dest, getattr(args, dest)) for dest in STEP_OPTIONS if getattr(args, dest) is not None]
    if len(chosen) != 1:
        names = ", ".join("--" + d.replace("_", "-") for d in STEP_OPTIONS)
        if not chosen:
            raise TablegenError(f"no step given; give exactly one of {names}")
        raise TablegenError(f"{len(chosen)} steps given (" +
                            ", ".join("--" + d.replace("_", "-") for d, _ in chosen) +
                            "); give exactly one step per run")
    dest, text = chosen[0]
    step, param, kind = STEP_OPTIONS[dest]
    opt = "--" + dest.replace("_", "-")
    if kind == "pressure":
        value = pressure_Pa(text, opt)
    elif kind == "ratio":
        value = _number(text, opt)
        if value <= 0:
            raise TablegenError(f"{opt} {text}: a pressure ratio must be above 0 (and >= 1 for this step)")
    elif kind == "temperature":
        value = temperature_K(text, opt)
    else:
        value = quantity(text, "specific_energy", opt)
        if kind == "cooling":
            if value < 0:
                raise TablegenError(f"{opt} {text}: give the heat removed as a positive amount, "
                                    f"or use --heat-by for heat added")
            value = -value
    params = {param: value}
    if args.eta is not None:
        if step not in ("compress", "expand"):
            raise TablegenError(f"--eta applies to compression and expansion only, not to {opt}")
        params["eta"] = _number(args.eta, "--eta", allow_percent=True)
    if args.boundary_T is not None:
        if step not in ("heat_p", "heat_v"):
            raise TablegenError(f"--boundary-T applies to heating and cooling steps only, not to {opt}")
        params["T_boundary_K"] = temperature_K(args.boundary_T, "--boundary-T")
    return step, params


def resolve_substance(args):
    from .. import api
    from ..steps import incompressible
    from ..units import pressure_Pa
    if args.incompressible is not None:
        if args.substance is not None:
            raise TablegenError("give either a gas SUBSTANCE or --incompressible, not both")
        if args.h_datum != "formation" or args.anchor is not None or args.p_ref != "1bar":
            raise TablegenError("--h-datum, --p-ref and --anchor apply to gases only; an incompressible "
                                "substance has u = 0 and s = 0 at its datum temperature")
        return incompressible(args.incompressible)
    if args.substance is None:
        raise TablegenError("no substance given; name a gas (e.g. air, N2) or use --incompressible")
    sub = api.substance(args.substance, source=args.source, data=args.data)
    return sub.with_options(datum=datum_from_text(args.h_datum),
                            P_ref_Pa=pressure_Pa(args.p_ref or "1bar", "--p-ref"),
                            anchor=anchor_from_text(args.anchor))


# ------------------------------------------------------------------ results
#: JSON key -> (result attribute, factor from SI, unit)
JSON_FIELDS = {
    "T1_K": ("T1_K", 1.0, "K"), "P1_Pa": ("P1_Pa", 1.0, "Pa"),
    "v1": ("v1", 1.0, "m³/kg"), "h1": ("h1", 1e-3, "kJ/kg"), "u1": ("u1", 1e-3, "kJ/kg"),
    "s1": ("s1", 1e-3, "kJ/(kg K)"),
    "T2_K": ("T2_K", 1.0, "K"), "P2_Pa": ("P2_Pa", 1.0, "Pa"),
    "v2": ("v2", 1.0, "m³/kg"), "h2": ("h2", 1e-3, "kJ/kg"), "u2": ("u2", 1e-3, "kJ/kg"),
    "s2": ("s2", 1e-3, "kJ/(kg K)"),
    "Pr1": ("Pr1", 1.0, "-"), "Pr2": ("Pr2", 1.0, "-"), "vr1": ("vr1", 1.0, "-"), "vr2": ("vr2", 1.0, "-"),
    "T2s_K": ("T2s_K", 1.0, "K"), "h2s": ("h2s", 1e-3, "kJ/kg"), "eta": ("eta", 1.0, "-"),
    "w": ("w_J_per_kg", 1e-3, "kJ/kg"), "q": ("q_J_per_kg", 1e-3, "kJ/kg"),
    "ds": ("ds_J_per_kgK", 1e-3, "kJ/(kg K)"), "s_gen": ("s_gen_J_per_kgK", 1e-3, "kJ/(kg K)"),
    "w_molar": ("w_J_per_kmol", 1e-3, "kJ/kmol"), "q_molar": ("q_J_per_kmol", 1e-3, "kJ/kmol"),
    "ds_molar": ("ds_J_per_kmolK", 1e-3, "kJ/(kmol K)"),
    "s_gen_molar": ("s_gen_J_per_kmolK", 1e-3, "kJ/(kmol K)"),
}

#: comparison quantity -> (heading, factor from SI, unit)
COMPARISON_UNITS = {
    "ds": ("s2 - s1", 1e-3, "kJ/(kg K)"),
    "T2s": ("T2s", 1.0, "K"),
    "T2": ("T2", 1.0, "K"),
    "w": ("w", 1e-3, "kJ/kg"),
    "q": ("q", 1e-3, "kJ/kg"),
}
#: Text output: an error below this fraction of the value is round-off and printed as 0.
ROUND_OFF = 1e-12

PARAM_UNITS = {"cp": (1e-3, "kJ/(kg K)"), "cv": (1e-3, "kJ/(kg K)"), "c": (1e-3, "kJ/(kg K)"), "k": (1.0, "-")}


def _scalar(v):
    """A 0-d result as a float; NaN (no relative error of a zero exact value) as None."""
    if v is None:
        return None
    v = float(v)
    return v if math.isfinite(v) else None


def result_to_json(res, sub, step, params) -> dict:
    out = {"substance": res.substance_id, "substance_name": res.substance_name, "kind": res.kind,
           "step": step, "basis": res.basis, "M": res.M,
           "R": None if res.kind != "ideal gas" else sub.R * 1e-3,
           "s_gen_basis": res.s_gen_basis, "notes": list(res.notes)}
    out["units"] = {k: u for k, (_, _, u) in JSON_FIELDS.items()}
    out["units"]["R"] = "kJ/(kg K)"
    out["units"]["M"] = "kg/kmol"
    for key, (attr, f, _) in JSON_FIELDS.items():
        v = getattr(res, attr)
        v = _scalar(v)
        out[key] = None if v is None else v * f
    if out["T2s_K"] is not None and out["Pr1"] is not None:
        out["Pr2s"] = out["Pr1"] * out["P2_Pa"] / out["P1_Pa"]     # the isentropic relation Pr2s/Pr1 = P2/P1
        out["units"]["Pr2s"] = "-"
    if "T_boundary_K" in params:
        out["T_boundary_K"] = params["T_boundary_K"]
    if "ratio" in params:
        out["ratio"] = params["ratio"]
    comp = {}
    for q, ests in res.comparison.items():
        _, f, unit = COMPARISON_UNITS[q]
        rows = []
        for e in ests:
            row = {"method": e.method, "label": e.label, "unit": unit,
                   "value": _scalar(e.value) * f, "error": _scalar(e.error) * f,
                   "rel_error": _scalar(e.rel_error)}
            if e.parameter is not None:
                pf, pu = PARAM_UNITS[e.parameter_name]
                row["parameter"] = {"name": e.parameter_name, "value": float(e.parameter) * pf, "unit": pu}
            rows.append(row)
        comp[q] = rows
    out["comparison"] = comp
    if res.kind == "ideal gas":
        out["h_datum"] = sub.datum.describe()
        out["P_ref_Pa"] = sub.P_ref_Pa
        out["sources"] = [list(s) for s in sub.sources]
        out["cautions"] = [CAUTION_GAS, *getattr(sub, "cautions", ()), CAUTION_CODES]
        out.update(dew_points(sub, out))
    else:
        out["h_datum"] = f"u = 0 and s = 0 at {sub.T_ref_K:g} K; h = u + P v"
        out["incompressible"] = {"c_J_per_kgK": list(sub.c_J_per_kgK), "rho_kg_per_m3": sub.rho_kg_per_m3,
                                 "T_range_K": [sub.T_min, None if math.isinf(sub.T_max) else sub.T_max]}
        out["sources"] = [[sub.id, sub.source, sub.source_note]]
        out["cautions"] = [CAUTION_LIQUID, CAUTION_CODES]
    return out


def dew_points(sub, d: dict) -> dict:
    """The gas's water dew point, and each state at or below the dew point at its own pressure."""
    from ..saturation import dew_point_at
    T0, P0 = dew_point_at(sub)
    if P0 is None:
        return {}
    out = {"dew_point_K": T0, "dew_point_P_Pa": P0, "condensing_states": []}
    for name, kT, kP in (("1", "T1_K", "P1_Pa"), ("2", "T2_K", "P2_Pa"), ("2s", "T2s_K", "P2_Pa")):
        T, P = d.get(kT), d.get(kP)
        if T is None or P is None:
            continue
        Td, _ = dew_point_at(sub, P)
        if Td is not None and T <= Td:
            out["condensing_states"].append({"state": name, "T_K": T, "P_Pa": P, "dew_point_K": Td})
    return out


def _grid(rows, align) -> list[str]:
    widths = [max(len(r[j]) for r in rows) for j in range(len(rows[0]))]
    out = []
    for r in rows:
        cells = [c.ljust(w) if a == "l" else c.rjust(w) for c, w, a in zip(r, widths, align)]
        out.append("  " + "  ".join(cells).rstrip())
    return out


def _fmt(v, fmt):
    return "" if v is None else fmt.format(v)


def format_text(d: dict, sub) -> str:
    lines = []
    if d["kind"] == "ideal gas":
        lines.append(f"{d['substance_name']} ({d['substance']}), ideal gas, M = {d['M']:.4f} kg/kmol, "
                     f"R = {d['R']:.6f} kJ/(kg K)")
    else:
        lines.append(f"{d['substance_name']} ({d['substance']}), incompressible: {sub.describe()}")
    detail = STEP_TITLES[d["step"]]
    if d.get("ratio") is not None:
        detail += f"; pressure ratio {d['ratio']:g}"
    if d.get("eta") is not None:
        detail += f"; isentropic efficiency {d['eta']:g}"
    lines.append(f"step: {detail}")
    lines.append(f"datum: {d['h_datum']}" +
                 (f"; s at P° = {d['P_ref_Pa'] / 1000:g} kPa" if d["kind"] == "ideal gas" else ""))
    lines.append("")
    has_s = d["T2s_K"] is not None
    head = ["", "", "start 1", "end 2"] + (["isentropic 2s"] if has_s else [])
    rows = [head]
    spec = [("T", "K", "T1_K", "T2_K", "T2s_K", "{:.2f}"),
            ("P", "kPa", "P1_Pa", "P2_Pa", "P2_Pa", "{:.3f}"),
            ("v", "m³/kg", "v1", "v2", None, "{:.6g}"),
            ("h", "kJ/kg", "h1", "h2", "h2s", "{:.3f}"),
            ("u", "kJ/kg", "u1", "u2", None, "{:.3f}"),
            ("s", "kJ/(kg K)", "s1", "s2", None, "{:.5f}")]
    if d["kind"] == "ideal gas":
        spec += [("Pr", "-", "Pr1", "Pr2", "Pr2s", "{:.6g}"), ("vr", "-", "vr1", "vr2", None, "{:.6g}")]
    for name, unit, k1, k2, ks, fmt in spec:
        f = 1e-3 if name == "P" else 1.0
        row = [name, unit, _fmt(d[k1] * f, fmt), _fmt(d[k2] * f, fmt)]
        if has_s:
            row.append(_fmt(None if ks is None or d.get(ks) is None else d[ks] * f, fmt))
        rows.append(row)
    lines += _grid(rows, "llrrr")
    lines.append("")
    molar = d["kind"] == "ideal gas"
    rows = [["", "", "per kg", "", "per kmol", ""]] if molar else [["", "", "per kg", ""]]
    for label, key, unit, munit, fmt in [
            ("work in", "w", "kJ/kg", "kJ/kmol", "{:+.3f}"), ("heat in", "q", "kJ/kg", "kJ/kmol", "{:+.3f}"),
            ("entropy change", "ds", "kJ/(kg K)", "kJ/(kmol K)", "{:+.5f}"),
            ("entropy generated", "s_gen", "kJ/(kg K)", "kJ/(kmol K)", "{:+.5f}")]:
        sym = {"w": "w", "q": "q", "ds": "s2 - s1", "s_gen": "s_gen"}[key]
        row = [label, sym, fmt.format(d[key]), unit]
        if molar:
            row += [fmt.format(d[key + "_molar"]), munit]
        rows.append(row)
    lines += _grid(rows, "llrlrl")
    lines.append(f"  s_gen: {d['s_gen_basis']}")
    if d.get("T_boundary_K") is not None:
        lines.append(f"  boundary temperature {d['T_boundary_K']:.2f} K")
    lines.append("")
    lines.append("method comparison (error = method - exact)")
    rows = [["quantity", "method", "used", "value", "error", "error %"]]
    fmts = {"ds": "{:.6g}", "T2s": "{:.2f}", "T2": "{:.2f}", "w": "{:.3f}", "q": "{:.3f}"}
    for q, ests in d["comparison"].items():
        heading, _, unit = COMPARISON_UNITS[q]
        for i, e in enumerate(ests):
            used = ""
            if e.get("parameter"):
                p = e["parameter"]
                used = f"{p['name']} = {p['value']:.5f}"
            exact = e["method"] == "exact"
            rel = "" if exact or e["rel_error"] is None else f"{e['rel_error'] * 100:+.3g}"
            if not exact and e["rel_error"] is None:
                rel = "-"
            err = "" if exact else f"{e['error']:+.3g}"
            if not exact and abs(e["error"]) <= ROUND_OFF * abs(e["value"]):
                err, rel = "0", ("0" if rel else rel)     # equal to round-off: the methods coincide
            rows.append([f"{heading} [{unit}]" if i == 0 else "", e["label"], used,
                         fmts[q].format(e["value"]), err, rel])
    lines += _grid(rows, "lllrrr")
    for n in d["notes"]:
        lines.append(f"note: {n}")
    if d.get("dew_point_P_Pa") is not None:
        from ..saturation import dew_point_text
        lines.append(f"water dew point of this gas {dew_point_text(d['dew_point_K'], d['dew_point_P_Pa'])}")
        for c in d["condensing_states"]:
            lines.append(f"caution: state {c['state']} ({c['T_K']:.2f} K, {c['P_Pa'] / 1000:g} kPa) is at or below the "
                         f"water dew point at its pressure, {c['dew_point_K']:.2f} K: water condenses there and the "
                         f"ideal-gas figures do not hold")
    lines.append("")
    for c in d["cautions"]:
        lines.append(f"caution: {c}")
    return "\n".join(lines) + "\n"


def run(args) -> int:
    from .common import data_notices
    data_notices(args)
    from ..steps import process
    T1, P1 = parse_start(args.start)
    step, params = step_from_args(args)
    sub = resolve_substance(args)
    res = process(sub, T1, P1, step, **params)
    d = result_to_json(res, sub, step, params)
    if args.json:
        sys.stdout.write(dumps(d))
    else:
        sys.stdout.write(format_text(d, sub))
    return 0
