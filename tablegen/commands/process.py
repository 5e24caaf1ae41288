"""tablegen process: one state change of a gas or incompressible substance.

Opens with the answer in one line (end state, work or heat, power at a given
flow), in the units the question was typed in; then the start, end and
isentropic end states, the work and heat per kg and per kmol, the entropy
change and the entropy generated, the flows, and on request (--compare) how
far the quick hand methods (constant cp, constant-k power law) are off the
exact result.
"""

from __future__ import annotations

import math
import sys

from ..core.errors import InputError, NameLookupError, RangeError
from ..core.jsonout import dumps
from .common import add_unit_options, anchor_from_text, datum_from_text

EXAMPLE = """Gauge pressures (barg, mbarg, kPag, psig) are read against --barometer (default 1.01325 bar).
Flows: kg/s, kg/h, t/h, lb/h, lb/s, kmol/h, Nm3/h (0 °C, 101.325 kPa) or SCFM (60 °F,
14.696 psia); power and duty are flow times w and q. The answer comes in the units you
typed (--units SI or US to choose). A mixture's s° includes the ideal mixing term
-R Σ y ln y, which cancels in s2 - s1 (said again only with --verbose). The hand-method
comparison (constant cp, constant k) is off unless --compare; h = 0 at 0 °C unless --h-datum.
Steps through a machine and heaters are steady flow (w is shaft work); --heat-v-*
is a closed rigid vessel. Work and heat are positive into the substance.
Negative amounts need '=': --heat-by=-80kJ/kg (or use --cool-by 80kJ/kg).

example:
  tablegen process air --from T=15C,P=1.013bar --compress-to 9bar --eta 0.84 --flow 2.5kg/s
  tablegen process air --from T=60F,P=14.7psia --compress-to 120psig --eta 0.84 --flow 1200SCFM --brief
  tablegen process air --from T=300K,P=1bar --compress-ratio 8 --compare
  tablegen process "CO2=0.12,H2O=0.1,N2=0.74,O2=0.04" --from T=1400K,P=12bar --expand-to 1.05bar --eta 0.9
  tablegen process N2 --from T=300K,P=2bar --heat-to 800K --boundary-T 1100K --json
  tablegen process air --from T=400K,P=5bar --cool-by 80kJ/kg --flow 3t/h
  tablegen process "air,rh=80%,T=25C" --from T=400K,P=8bar --heat-to 30C
  tablegen process --incompressible water --from T=20C,P=0barg --compress-to 12barg --eta 0.7
  tablegen process --incompressible c=0.9,rho=2700 --from T=20C,P=1bar --heat-to 120C"""

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
                   help="start state, temperature and pressure with units, e.g. T=15C,P=1.013bar "
                        "or T=60F,P=0psig")
    g = p.add_argument_group("step (give exactly one)")
    g.add_argument("--compress-to", metavar="P", help="compress to this pressure (absolute or gauge)")
    g.add_argument("--compress-ratio", metavar="R", help="compress by this pressure ratio P2/P1 (>= 1)")
    g.add_argument("--expand-to", metavar="P", help="expand (turbine, expander) to this pressure")
    g.add_argument("--expand-ratio", metavar="R", help="expand by this pressure ratio P1/P2 (>= 1)")
    g.add_argument("--heat-to", metavar="T", help="heat or cool at constant pressure to this temperature")
    g.add_argument("--heat-by", metavar="Q", help="add heat at constant pressure, e.g. 250kJ/kg")
    g.add_argument("--cool-by", metavar="Q", help="remove heat at constant pressure, e.g. 80kJ/kg")
    g.add_argument("--heat-v-to", metavar="T", help="heat or cool at constant volume to this temperature")
    g.add_argument("--heat-v-by", metavar="Q", help="add heat at constant volume, e.g. 100kJ/kg")
    g.add_argument("--throttle-to", metavar="P", help="throttle (valve, orifice) to this pressure")
    o = p.add_argument_group("step details")
    o.add_argument("--eta", default=None, metavar="E",
                   help="isentropic efficiency of a compression or expansion, 0 < E <= 1 "
                        "(e.g. 0.85 or 85%%; default 1)")
    o.add_argument("--boundary-T", default=None, metavar="T",
                   help="temperature at which heat crosses the boundary (furnace, cooling water), "
                        "for the entropy generated; default: internally reversible")
    add_unit_options(p, flow="flow through the step, e.g. 2.5kg/s, 9t/h, 1000lb/h, 40kmol/h, 8000Nm3/h or "
                             "1200SCFM: adds power (kW and hp), heat duty and the volume flows at inlet and outlet")
    out = p.add_argument_group("output")
    out.add_argument("--brief", action="store_true", help="print only the one-line answer")
    out.add_argument("--compare", action="store_true",
                     help="add the method comparison: how far constant cp and the constant-k power law "
                          "are off the exact result (off by default; always in --json)")
    out.add_argument("--verbose", action="store_true",
                     help="add the notes that are true of every mixture (see below)")
    out.add_argument("--json", action="store_true",
                     help="one JSON object (SI-based units, listed under 'units'; the input as typed under 'input')")
    d = p.add_argument_group("datums and scales (gases)")
    d.add_argument("--h-datum", default=None, metavar="DATUM",
                   help="sensible[:T[:h]] (default sensible at 0 °C: h = 0 at 0 °C, as no reaction takes "
                        "place in a step) or formation (h(298.15 K) = enthalpy of formation)")
    d.add_argument("--p-ref", default="1bar", metavar="P", help="entropy reference pressure P°: 1bar (default) or 1atm")
    d.add_argument("--anchor", default=None, metavar="T=..,Pr=..,vr=..",
                   help="Pr/vr scale (default T=298.15K,Pr=1,vr=1)")


# ------------------------------------------------------------------ parsing
def parse_start(text: str, barometer_Pa: float | None = None):
    """'T=15C,P=1.013bar' -> (T1 in K, the start Pressure, {'T': '15C', 'P': '1.013bar'} as typed)."""
    from ..core.units import parse_pressure, temperature_K
    vals = {}
    for part in str(text).split(","):
        if "=" not in part:
            raise InputError(f"--from {text!r}: write T=300K,P=1bar (temperature and pressure)")
        k, v = (x.strip() for x in part.split("=", 1))
        if k not in ("T", "P"):
            raise NameLookupError(f"--from: unknown key {k!r}; allowed: T, P")
        if k in vals:
            raise InputError(f"--from: {k} given twice")
        vals[k] = v
    if set(vals) != {"T", "P"}:
        raise InputError(f"--from {text!r}: give both T and P, e.g. T=300K,P=1bar")
    return (temperature_K(vals["T"], "--from T"),
            parse_pressure(vals["P"], "--from P", barometer_Pa=barometer_Pa), vals)


def _number(text: str, what: str, allow_percent: bool = False) -> float:
    t = str(text).strip()
    scale = 1.0
    if allow_percent and t.endswith("%"):
        t, scale = t[:-1].strip(), 0.01
    try:
        v = float(t) * scale
    except ValueError:
        raise InputError(f"{what} {text!r} is not a number") from None
    if not math.isfinite(v):
        raise RangeError(f"{what} {text!r} must be finite")
    return v


def step_from_args(args, barometer_Pa: float | None = None) -> tuple[str, dict, dict]:
    """The step, its SI parameters, and the typed step option {'option': ..., 'text': ..., 'pressure': ...}."""
    from ..core.units import parse_pressure, quantity, temperature_K
    chosen = [(dest, getattr(args, dest)) for dest in STEP_OPTIONS if getattr(args, dest) is not None]
    if len(chosen) != 1:
        names = ", ".join("--" + d.replace("_", "-") for d in STEP_OPTIONS)
        if not chosen:
            raise InputError(f"no step given; give exactly one of {names}")
        raise InputError(f"{len(chosen)} steps given (" +
                         ", ".join("--" + d.replace("_", "-") for d, _ in chosen) +
                         "); give exactly one step per run")
    dest, text = chosen[0]
    step, param, kind = STEP_OPTIONS[dest]
    opt = "--" + dest.replace("_", "-")
    typed = {"option": opt, "text": str(text), "kind": kind}
    if kind == "pressure":
        pr = parse_pressure(text, opt, barometer_Pa=barometer_Pa)
        typed["pressure"] = pr
        value = pr.Pa
    elif kind == "ratio":
        value = _number(text, opt)
        if value <= 0:
            raise RangeError(f"{opt} {text}: a pressure ratio must be above 0 (and >= 1 for this step)")
    elif kind == "temperature":
        value = temperature_K(text, opt)
    else:
        value = quantity(text, "specific_energy", opt)
        if kind == "cooling":
            if value < 0:
                raise RangeError(f"{opt} {text}: give the heat removed as a positive amount, "
                                 f"or use --heat-by for heat added")
            value = -value
    params = {param: value}
    if args.eta is not None:
        if step not in ("compress", "expand"):
            raise InputError(f"--eta applies to compression and expansion only, not to {opt}")
        params["eta"] = _number(args.eta, "--eta", allow_percent=True)
    if args.boundary_T is not None:
        if step not in ("heat_p", "heat_v"):
            raise InputError(f"--boundary-T applies to heating and cooling steps only, not to {opt}")
        params["T_boundary_K"] = temperature_K(args.boundary_T, "--boundary-T")
    return step, params, typed


def resolve_substance(args):
    from ..calc import names as api
    from ..calc.incompressible import incompressible
    from ..core.units import pressure_Pa
    if args.incompressible is not None:
        if args.substance is not None:
            raise InputError("give either a gas SUBSTANCE or --incompressible, not both")
        if args.h_datum is not None or args.anchor is not None or args.p_ref != "1bar":
            raise InputError("--h-datum, --p-ref and --anchor apply to gases only; an incompressible "
                             "substance has u = 0 and s = 0 at its datum temperature")
        return incompressible(args.incompressible)
    if args.substance is None:
        raise InputError("no substance given; name a gas (e.g. air, N2) or use --incompressible")
    sub = api.substance(args.substance, source=args.source, data=args.data)
    return sub.with_options(datum=datum_from_text(args.h_datum, sub, by_rule=True),
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
    from ..thermo.saturation import dew_point_at
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


#: Flow keys of the JSON output -> unit (present with --flow).
FLOW_UNITS = {"mass_flow": "kg/s", "molar_flow": "kmol/s", "normal_volume_flow": "m³/s (0 °C, 101.325 kPa)",
              "power": "kW", "heat_duty": "kW", "volume_flow_1": "m³/s", "volume_flow_2": "m³/s"}


def add_flow(d: dict, flow) -> None:
    """Flow figures into the JSON result: power = w × flow, duty = q × flow, volume flows v × flow."""
    from ..core.units import P_NORMAL_PA, T_NORMAL_K
    from ..core.constants import R_MOLAR
    m = flow.mass_kg_per_s(d["M"], "--flow")
    d["mass_flow"] = m
    if d["M"] is not None:
        d["molar_flow"] = m / d["M"]
        d["normal_volume_flow"] = d["molar_flow"] * 1e3 * R_MOLAR * T_NORMAL_K / P_NORMAL_PA
    d["power"] = d["w"] * m
    d["heat_duty"] = d["q"] * m
    d["volume_flow_1"] = d["v1"] * m
    d["volume_flow_2"] = d["v2"] * m
    d["units"].update({k: u for k, u in FLOW_UNITS.items() if k in d})


def input_echo(args, P1, typed_step: dict, barometer_Pa: float) -> dict:
    """The input as typed, and every pressure typed with its absolute value (and gauge reading)."""
    given = {"substance": args.substance, "incompressible": args.incompressible, "from": args.start,
             typed_step["option"][2:]: typed_step["text"], "eta": args.eta, "boundary_T": args.boundary_T,
             "flow": args.flow, "barometer": args.barometer, "units": args.units, "T_unit": args.T_unit,
             "P_unit": args.P_unit, "h_datum": args.h_datum}
    pressures = [("--from P", P1)]
    if "pressure" in typed_step:
        pressures.append((typed_step["option"], typed_step["pressure"]))
    rows = []
    for what, pr in pressures:
        row = {"option": what, "typed": pr.typed, "P_Pa": pr.Pa}
        if pr.gauge:
            row.update(gauge_Pa=pr.gauge_Pa, barometer_Pa=pr.barometer_Pa, gauge_unit=pr.gauge)
        rows.append(row)
    return {"typed": {k: v for k, v in given.items() if v is not None}, "pressures": rows,
            "barometer_Pa": barometer_Pa}


def run(args) -> int:
    from .display import choose
    from ..calc.steps import MIXING_NOTE, process
    from ..core.units import barometer_Pa, parse_flow
    from .common import data_notices
    from .process_text import answer_line, format_text
    data_notices(args)
    baro = barometer_Pa(args.barometer)
    T1, P1, start_typed = parse_start(args.start, baro)
    step, params, typed_step = step_from_args(args, baro)
    flow = parse_flow(args.flow) if args.flow is not None else None
    if flow is not None and step == "heat_v":
        raise InputError(f"--flow applies to steady-flow steps (machines, heaters, valves), not to "
                         f"{typed_step['option']}, a closed rigid vessel")
    kind = typed_step["kind"]
    typed_T = [start_typed["T"]] + ([typed_step["text"]] if kind == "temperature" else [])
    typed_P = [start_typed["P"]] + ([typed_step["text"]] if kind == "pressure" else [])
    typed_other = [x for x in (args.flow, typed_step["text"] if kind in ("heat", "cooling") else None)
                   if x is not None]
    shown = choose(system=args.units, T_unit=args.T_unit, P_unit=args.P_unit, typed_T=typed_T,
                   typed_P=typed_P, typed_other=typed_other, barometer_Pa=baro)
    sub = resolve_substance(args)
    res = process(sub, T1, P1.Pa, step, **params)
    d = result_to_json(res, sub, step, params)
    if flow is not None:
        add_flow(d, flow)
    d["input"] = input_echo(args, P1, typed_step, baro)
    if args.json:
        sys.stdout.write(dumps(d))
        return 0
    line = answer_line(d, shown, flow)
    if args.brief:
        sys.stdout.write(line + "\n")
        return 0
    notes = [MIXING_NOTE] if args.verbose and d["kind"] == "ideal gas" and getattr(sub, "kind", "") == "mixture" else []
    sys.stdout.write(format_text(d, sub, shown, flow, line, compare=args.compare, extra_notes=notes))
    return 0
