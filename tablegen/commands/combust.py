"""tablegen combust: flue gas, air ratios, heating values, dew point and flame temperature of a fuel."""

from __future__ import annotations

import sys

from ..core.errors import InputError, RangeError
from ..core.jsonout import dumps
from .common import add_unit_options

EXAMPLE = """--flow gives the heat input (LHV and HHV, kW and MMBtu/h) and the flue-gas and air flows
(normal m³/h, kg/s); fuel flows kg/s, kg/h, t/h, lb/h, or for a gas kmol/h, Nm3/h (0 °C,
101.325 kPa) or SCFM (60 °F, 14.696 psia). Temperatures come back in the unit you typed
(60F in: °F and °R out), or --T-unit; --flue-pressure may be gauge (against --barometer).

example:
  tablegen combust --fuel CH4=0.9,C2H6=0.06,N2=0.04 --excess-air 15
  tablegen combust --fuel CH4=90%,C2H6=6%,N2=4% --excess-air 15 --oxidant air,O2=25%
  tablegen combust --fuel propane --excess-air 20 --flow 50kg/h
  tablegen combust --fuel methane --lambda 1.15 --ref-temperature 60F --flow 2000SCFM
  tablegen combust --fuel propane --o2-dry 3.5 --oxidant air,rh=60%,T=20C,P=1atm --json
  tablegen combust --fuel "CH4=87%±0.5%,C2H6=6%±0.2%,C3H8=2%,N2=3%,CO2=2%" --o2-dry "3.5%±0.2%"
  tablegen combust --fuel fuels/heavy-oil.toml --lambda 1.2 --ref-temperature 15C

A fuel file holds a [fuel] table: composition = {CH4 = 90, ...} with basis = "mole",
"mass", "volume-dry" (then water_percent) or "volume-wet"; or analysis = {C = 0.85,
H = 0.11, ...} with basis = "as-received", "dry" or "daf" and hhv, lhv or h_formation;
or formula = "C12H23" with a heating value. See docs/combustion.md; fuels/heavy-oil.toml is in
the project's docs/examples/ folder.
The products can be tabulated: tablegen state "flue@CH4@excess-air=15" --T 400K,1500K"""

#: Keys of the "flow" member of the JSON output (with --flow) -> unit.
FLOW_UNITS = {"fuel_mass_flow": "kg/s", "heat_input_lhv": "kW", "heat_input_hhv": "kW",
              "flue_gas_mass_flow_wet": "kg/s", "flue_gas_mass_flow_dry": "kg/s",
              "flue_gas_volume_flow_wet": "m³/s (normal, metering conditions)",
              "flue_gas_volume_flow_dry": "m³/s (normal, metering conditions)",
              "oxidant_mass_flow": "kg/s", "oxidant_volume_flow": "m³/s (normal, metering conditions)"}

#: --ref-temperature spellings -> K (ISO 6976 combustion reference temperatures).
REF_CHOICES = {"25C": 298.15, "20C": 293.15, "15.55C": 288.705555555556, "60F": 288.705555555556,
               "15C": 288.15, "0C": 273.15}


def add_arguments(p):
    p.epilog = EXAMPLE
    p.add_argument("--fuel", required=True, metavar="SPEC",
                   help="a composition, mole fractions CH4=0.9,C2H6=0.06,N2=0.04 or percentages "
                        "CH4=90%%,C2H6=6%%,N2=4%% (basis=mass,... for mass fractions), with the analysis' "
                        "expanded uncertainty (k = 2) of any part written as the part is: CH4=87%%±0.5%% or "
                        "CH4=0.87±0.005 (+- for ±); one species (propane), or a TOML fuel file")
    g = p.add_argument_group("amount of oxidant (give exactly one)").add_mutually_exclusive_group(required=True)
    g.add_argument("--excess-air", metavar="P", help="excess air in %% (0 = stoichiometric)")
    g.add_argument("--lambda", dest="air_ratio", metavar="L", help="air ratio λ (>= 1)")
    g.add_argument("--phi", metavar="F", help="equivalence ratio φ = 1/λ (0 < φ <= 1)")
    g.add_argument("--o2-dry", metavar="P", help="measured flue-gas O2, %% by volume, dry basis; with its "
                                                   "expanded uncertainty (k = 2): 3.5%%±0.2%% (or 3.5%%+-0.2%%)")
    g.add_argument("--o2-wet", metavar="P", help="measured flue-gas O2, %% by volume, wet basis (3.1%%±0.2%% as "
                                                   "for --o2-dry)")
    p.add_argument("--oxidant", default="air", metavar="SPEC",
                   help="air (default, dry), oxygen, air,rh=60%%,T=25C[,P=1atm] (humid, relative "
                        "humidity at T and P), air,w=8g/kg (humid, humidity ratio), air,dew=5C[,P=1atm] "
                        "(humid, dew point), air,O2=30%% (enriched to 30 %% O2, dry), or a dry composition "
                        "O2=0.3,N2=0.7; T=... states the air temperature, which the flame temperature uses")
    p.add_argument("--ref-temperature", default=None, metavar="T",
                   help="combustion reference temperature of the heating values: 25C (default), 20C, "
                        "15.55C (= 60F), 15C or 0C")
    p.add_argument("--metering", default=None, metavar="T,P",
                   help="metering conditions of normal volumes (default 0C,101.325kPa)")
    p.add_argument("--fuel-temperature", default=None, metavar="T",
                   help="fuel inlet temperature for the flame temperature (default 25C)")
    p.add_argument("--oxidant-temperature", default=None, metavar="T",
                   help="oxidant inlet temperature for the flame temperature (default: the T of --oxidant, "
                        "else 25C)")
    p.add_argument("--flue-pressure", default=None, metavar="P",
                   help="flue-gas pressure for the water dew point (default 101.325kPa; gauge values "
                        "such as 5mbarg are read against --barometer)")
    add_unit_options(p, flow="fuel flow, e.g. 50kg/h, 1.2t/h, 400lb/h, or for a gas 120Nm3/h, 2000SCFM, "
                             "5kmol/h: adds heat input and flue-gas and air flows")
    p.add_argument("--json", action="store_true",
                   help="all figures as one JSON object (SI-based; units under 'units', input as typed under 'input')")


def _percent(text, what):
    t = str(text).strip().rstrip("%").strip()
    try:
        return float(t)
    except ValueError:
        raise InputError(f"{what} {text!r} is not a number; give e.g. 15 or 15%") from None


def measured_o2(text, what) -> tuple[float, float | None]:
    """'3.5' or '3.5%' -> (3.5, None); '3.5%±0.2%' -> (3.5, 0.2): the O2 and its expanded uncertainty, %."""
    from ..calc.burn import measured_o2 as read
    return read(text, what)


#: Defaults of the condition options (None in argparse, so that typed values can be told apart).
CONDITION_DEFAULTS = {"ref_temperature": "25C", "metering": "0C,101.325kPa", "fuel_temperature": "25C",
                      "oxidant_temperature": "25C", "flue_pressure": "101.325kPa"}


def _given(args, key):
    v = getattr(args, key)
    return CONDITION_DEFAULTS[key] if v is None else v


def typed_values(args) -> tuple[list[str], list[str]]:
    """Temperatures and pressures the user typed (not the defaults), in the order of the options."""
    T = [args.ref_temperature, args.fuel_temperature, args.oxidant_temperature]
    P = [args.flue_pressure]
    if args.metering is not None and len(str(args.metering).split(",")) == 2:
        t, p = str(args.metering).split(",")
        T.insert(1, t)
        P.append(p)
    return [t for t in T if t is not None], [p for p in P if p is not None]


def compute(args):
    from ..calc.burn import combustion
    from ..core.units import barometer_Pa, pressure_Pa, temperature_K
    ref_text = _given(args, "ref_temperature")
    ref = str(ref_text).replace(" ", "").replace("°", "")
    if ref not in REF_CHOICES:
        raise RangeError(f"--ref-temperature {ref_text!r} is not allowed; allowed: "
                         f"25C, 20C, 15.55C (60F), 15C, 0C (ISO 6976)")
    metering = _given(args, "metering")
    parts = str(metering).split(",")
    if len(parts) != 2:
        raise InputError(f"--metering {metering!r}: give T,P, e.g. 15C,101.325kPa")
    amount = {}
    if args.excess_air is not None:
        amount["excess_air"] = _percent(args.excess_air, "--excess-air")
    elif args.air_ratio is not None:
        amount["air_ratio"] = _percent(args.air_ratio, "--lambda")
    elif args.phi is not None:
        amount["phi"] = _percent(args.phi, "--phi")
    elif args.o2_dry is not None:
        amount["o2_dry"], amount["o2_uncertainty"] = measured_o2(args.o2_dry, "--o2-dry")
    else:
        amount["o2_wet"], amount["o2_uncertainty"] = measured_o2(args.o2_wet, "--o2-wet")
    return combustion(
        args.fuel, args.oxidant, T_ref_K=REF_CHOICES[ref],
        T_meter_K=temperature_K(parts[0], "--metering temperature"),
        P_meter_Pa=pressure_Pa(parts[1], "--metering pressure"),
        T_fuel_K=None if args.fuel_temperature is None else temperature_K(args.fuel_temperature,
                                                                           "--fuel-temperature"),
        T_oxidant_K=None if args.oxidant_temperature is None else temperature_K(args.oxidant_temperature,
                                                                                 "--oxidant-temperature"),
        P_flue_Pa=pressure_Pa(_given(args, "flue_pressure"), "--flue-pressure",
                              barometer_Pa=barometer_Pa(args.barometer)),
        data=args.data, source=args.source, **amount)


def flow_figures(r, flow) -> dict:
    """Flows at a fuel flow: heat input = heating value × fuel flow; gas flows = per-kg figures × fuel flow."""
    hv, fg = r.heating_values, r.flue_gas
    m = flow.mass_kg_per_s(r.fuel.M, "--flow")
    # MJ/kg x 1e3 x kg/s = kW, in the order of operations the figures were always computed in
    return {"fuel_mass_flow": m, "heat_input_lhv": hv.lhv_J_per_kg * 1e-6 * 1e3 * m,
            "heat_input_hhv": hv.hhv_J_per_kg * 1e-6 * 1e3 * m,
            "flue_gas_mass_flow_wet": fg.kg_wet_per_kg * m, "flue_gas_mass_flow_dry": fg.kg_dry_per_kg * m,
            "flue_gas_volume_flow_wet": fg.m3_wet_per_kg * m, "flue_gas_volume_flow_dry": fg.m3_dry_per_kg * m,
            "oxidant_mass_flow": r.ratios.mass * m, "oxidant_volume_flow": r.ratios.volume_m3_per_kg * m}


def render_flow(f: dict, flow, sh, norm: str) -> list[str]:
    """The flow block: heat input in kW and MMBtu/h, gas flows in normal m³/h and kg/s."""
    from .display import fmt_sig
    from ..core.units import unit
    mm = unit("MMBtu/h").factor
    kgs = f["fuel_mass_flow"]
    same = [f"{fmt_sig(kgs * 3600)} kg/h", f"{fmt_sig(kgs)} kg/s"]
    same = [t for t in same if t.split()[1] != flow.unit.symbol]
    out = [f"At a fuel flow of {flow.text} ({', '.join(same)})"]
    rows = [("heat input, LHV basis", f"{fmt_sig(f['heat_input_lhv'])} kW",
             f"{fmt_sig(f['heat_input_lhv'] * 1e3 / mm)} MMBtu/h"),
            ("heat input, HHV basis", f"{fmt_sig(f['heat_input_hhv'])} kW",
             f"{fmt_sig(f['heat_input_hhv'] * 1e3 / mm)} MMBtu/h"),
            ("flue gas, wet", f"{fmt_sig(f['flue_gas_volume_flow_wet'] * 3600)} m³/h",
             f"{fmt_sig(f['flue_gas_mass_flow_wet'])} kg/s"),
            ("flue gas, dry", f"{fmt_sig(f['flue_gas_volume_flow_dry'] * 3600)} m³/h",
             f"{fmt_sig(f['flue_gas_mass_flow_dry'])} kg/s"),
            ("oxidant", f"{fmt_sig(f['oxidant_volume_flow'] * 3600)} m³/h", f"{fmt_sig(f['oxidant_mass_flow'])} kg/s")]
    return out + _table(("", "", ""), rows)[1:] + [f"  gas volumes per hour: {norm}"]


def _fmt(v, f="{:.4f}"):
    return "-" if v is None else f.format(v)


def _table(head, rows) -> list[str]:
    """Left-aligned label column, right-aligned value columns."""
    cells = [[str(c) for c in r] for r in [head, *rows]]
    n = max(len(r) for r in cells)
    cells = [r + [""] * (n - len(r)) for r in cells]
    w = [max(len(r[j]) for r in cells) for j in range(n)]
    out = []
    for r in cells:
        out.append("  " + r[0].ljust(w[0]) + "".join("  " + c.rjust(w[j + 1]) for j, c in enumerate(r[1:])))
    return out


def _T(sh, T_K: float, decimals: int) -> str:
    """'52.2 °C' in the shown unit, with the absolute scale beside: '52.2 °C (325.4 K)'."""
    from ..core.units import unit
    t = f"{unit(sh.T).from_si(T_K):.{decimals}f} {sh.T}"
    return t + (f" ({unit(sh.T_abs).from_si(T_K):.{decimals}f} {sh.T_abs})" if sh.T_abs else "")


def render_text(r, sh=None, flow=None, flows=None) -> str:
    from .display import choose
    from ..core.units import unit
    sh = sh or choose()
    f, ox = r.fuel, r.oxidant
    q, fg, dp, hv, fl = r.ratios, r.flue_gas, r.dew_point, r.heating_values, r.flame
    gas = f.kind == "gas"
    Tm, Pm = r.metering_T_K, r.metering_P_Pa
    norm = f"normal m³ = {unit(sh.T).from_si(Tm):g} {sh.T}, {Pm / 1000:g} kPa"
    out = [f"Combustion of {f.name}" + (f" (M = {f.M:.4f} kg/kmol)" if f.M else ""),
           f"  oxidant: {oxidant_text(ox)}",
           f"  λ = {r.air_ratio:.4f}   excess air = {r.excess_air_percent:.2f} %   φ = {r.phi:.4f}"
           + amount_text(r.amount_given),
           f"  volumes: {norm}, ideal gas", ""]
    if flows is not None:
        out += render_flow(flows, flow, sh, norm) + [""]
    rows = [("mass [kg/kg]", _fmt(q.mass_stoich), _fmt(q.mass))]
    if ox.y_H2O > 0:
        rows.append(("mass, dry oxidant [kg/kg]", _fmt(q.mass_dry_oxidant_stoich), _fmt(q.mass_dry_oxidant)))
    if q.molar is not None:
        rows.append(("molar [mol/mol]", _fmt(q.molar_stoich), _fmt(q.molar)))
    if gas:
        rows.append(("volume [m³/m³]", _fmt(q.volume_stoich), _fmt(q.volume)))
    rows.append(("oxidant volume [m³/kg fuel]", _fmt(q.volume_m3_per_kg_stoich), _fmt(q.volume_m3_per_kg)))
    out += ["Oxidant/fuel ratios"] + _table(("", "stoichiometric", "actual"), rows)
    rows = []
    for k, y in fg.mole_fractions_wet.items():
        d, dm = fg.mole_fractions_dry.get(k), fg.mass_fractions_dry.get(k)
        rows.append((k, f"{y * 100:.4f}", f"{fg.mass_fractions_wet[k] * 100:.4f}",
                     "-" if d is None else f"{d * 100:.4f}", "-" if dm is None else f"{dm * 100:.4f}"))
    rows.append(("molar mass [kg/kmol]", f"{fg.M_wet_kg_per_kmol:.4f}", "", _fmt(fg.M_dry_kg_per_kmol), ""))
    out += ["", "Flue gas, frozen complete combustion"] + \
        _table(("", "wet mole %", "wet mass %", "dry mole %", "dry mass %"), rows)
    rows = [("per kg fuel [kg/kg]", _fmt(fg.kg_wet_per_kg), _fmt(fg.kg_dry_per_kg)),
            ("per kg fuel [m³/kg]", _fmt(fg.m3_wet_per_kg), _fmt(fg.m3_dry_per_kg))]
    if gas:
        rows.append(("per m³ fuel [m³/m³]", _fmt(fg.m3_wet_per_m3_fuel), _fmt(fg.m3_dry_per_m3_fuel)))
    if f.ash:
        rows.append(("ash [kg/kg fuel]", _fmt(fg.ash_kg_per_kg), ""))
    out += ["", "Flue-gas quantities"] + _table(("", "wet", "dry"), rows)
    from .process_text import pressure_text
    flue_P = pressure_text(sh, dp.flue_pressure_Pa) if sh.P_gauge else f"{dp.flue_pressure_Pa / 1000:g} kPa"
    out += ["", f"Water dew point at {flue_P}: " +
            (f"{_T(sh, dp.T_K, 1)}; water partial pressure "
             f"{dp.water_partial_pressure_Pa / 1000:.4f} kPa" if dp.T_K is not None else dp.note)]
    out += ["", f"Heating values, combustion reference temperature {_T(sh, hv.T_ref_K, 2)} "
                f"(Δh_vap of water {hv.h_vap_water_J_per_kg / 1000:.2f} kJ/kg)"] + \
        _table(("", "LHV", "HHV"), _hv_rows(hv))
    Ta = fl.T_adiabatic_K
    out += ["", "Adiabatic flame temperature: " +
            (_T(sh, Ta, 0) if Ta is not None else
             f"above {r.products.T_max:g} K, the end of the data (not given)") +
            f", fuel at {unit(sh.T).from_si(fl.T_fuel_K):g} {sh.T} ({fl.T_fuel_source or 'as given'}), "
            f"oxidant at {unit(sh.T).from_si(fl.T_oxidant_K):g} {sh.T} ({fl.T_oxidant_source or 'as given'})"]
    if r.uncertainty is not None:
        out += ["", *uncertainty_lines(r)]
    out += ["", "Notes"] + [f"  - {n}" for n in r.notes]
    out += ["", "Printed digits: heating values to 0.001 MJ/kg (the data agree with ISO 6976 to about 0.01 %), "
                "dew point to 0.1 K, flame temperature to 1 K; fractions and ratios are exact to round-off "
                "within the model. --json gives full precision."]
    out += ["", "CAUTIONS"] + [f"  ! {c}" for c in r.cautions]
    if r.products.id.lower().startswith("flue@"):
        out += ["", f"Tabulate this flue gas: tablegen state \"{r.products.id}\" --T 400K,1500K"]
    return "\n".join(out) + "\n"


def _hv_rows(hv) -> list:
    """LHV and HHV rows in MJ per kg, kmol and normal m³ (those that apply)."""
    rows = [("per kg [MJ/kg]", f"{hv.lhv_J_per_kg * 1e-6:.3f}", f"{hv.hhv_J_per_kg * 1e-6:.3f}")]
    if hv.lhv_J_per_mol is not None:
        rows.append(("per kmol [MJ/kmol]", f"{hv.lhv_J_per_mol * 1e-3:.2f}", f"{hv.hhv_J_per_mol * 1e-3:.2f}"))
    if hv.lhv_J_per_m3 is not None:
        rows.append(("per normal m³ [MJ/m³]", f"{hv.lhv_J_per_m3 * 1e-6:.3f}", f"{hv.hhv_J_per_m3 * 1e-6:.3f}"))
    return rows


def oxidant_text(ox) -> str:
    """'humid air, RH 60 % at 15 °C and 101.325 kPa; humidity ratio 6.35 g/kg, water dew point 7.3 °C; ...'."""
    parts = [ox.name]
    if ox.y_H2O > 0:
        dp = "below 0 °C" if ox.dew_point_K is None else f"{ox.dew_point_K - 273.15:.1f} °C"
        extra = [f"humidity ratio {ox.humidity_ratio * 1000:.4g} g/kg", f"water {ox.y_H2O * 100:.4g} % by volume",
                 f"water dew point {dp} at {ox.P_Pa / 1000:g} kPa"]
        if ox.humidity_given != "relative_humidity" and ox.relative_humidity is not None:
            extra.insert(0, f"RH {ox.relative_humidity:.3g} % at {ox.T_K - 273.15:g} °C")
        parts.append(", ".join(extra))
    parts.append(f"O2 {ox.y_O2 * 100:.4g} % by volume{' (wet)' if ox.y_H2O > 0 else ''}, M = {ox.M:.4f} kg/kmol")
    return "; ".join(parts)


def amount_text(a) -> str:
    """Where λ came from, when it was not given directly: '  (from measured O2 3.5 ± 0.2 % dry)'.

    ``a`` is the result's AmountGiven (or None).
    """
    if a is not None and a.key in ("o2_dry", "o2_wet"):
        pm = "" if a.U_k2 is None else f" ± {a.U_k2:g}"
        return f"   (from measured O2 {a.value:g}{pm} % {'dry' if a.key == 'o2_dry' else 'wet'})"
    return ""


#: Figures of the uncertainty block: JSON key (calc.burn_result.figure_values), label, unit, scale, format.
U_FIGURES = (("lambda", "λ", "", 1.0, "{:.4f}"), ("excess_air_percent", "excess air", "%", 1.0, "{:.2f}"),
             ("afr_mass", "oxidant/fuel, mass", "kg/kg", 1.0, "{:.4f}"),
             ("flue_gas_volume_wet_per_kg", "flue gas, wet", "m³/kg fuel", 1.0, "{:.4f}"),
             ("lhv_mass", "LHV", "MJ/kg", 1.0, "{:.3f}"), ("hhv_mass", "HHV", "MJ/kg", 1.0, "{:.3f}"),
             ("dew_point_K", "water dew point", "K", 1.0, "{:.2f}"),
             ("t_adiabatic_K", "adiabatic flame temperature", "K", 1.0, "{:.1f}"))


def uncertainty_lines(r) -> list[str]:
    """The stated input uncertainties and what they give (expanded, k = 2)."""
    from ..calc.burn_result import figure_values
    u, s = r.uncertainty, figure_values(r)
    out = ["Uncertainty from the stated inputs (expanded, k = 2; JCGM 100:2008 linear propagation)"]
    out += [f"  input  {i.label}: {i.value * 100 if i.unit == 'fraction' else i.value:.6g} ± "
            f"{i.U * 100 if i.unit == 'fraction' else i.U:.3g} %" for i in u.inputs]
    rows = []
    for key, label, unit, f, fmt in U_FIGURES:
        U = u.U(key)
        if U is None or s.get(key) is None or U == 0.0:
            continue           # e.g. λ when the excess air is given: exact
        big = max(u.figures[key]["parts"].items(), key=lambda kv: abs(kv[1]))[0] if U > 0 else "-"
        rows.append((f"{label}{' [' + unit + ']' if unit else ''}", fmt.format(s[key] * f), fmt.format(U * f), big))
    for k, y in s["products_wet"].items():
        rows.append((f"{k} wet [mole %]", f"{y * 100:.4f}", f"{u.products['wet'].get(k, 0.0) * 100:.4f}", ""))
    out += _table(("", "value", "U (k = 2)", "largest part"), rows)
    return out


def run(args) -> int:
    from .display import choose
    from ..core.units import barometer_Pa, parse_flow
    from .common import data_notices
    data_notices(args)
    flow = parse_flow(args.flow) if args.flow is not None else None
    typed_T, typed_P = typed_values(args)
    sh = choose(system=args.units, T_unit=args.T_unit, P_unit=args.P_unit, typed_T=typed_T, typed_P=typed_P,
                typed_other=[args.flow] if args.flow else [], barometer_Pa=barometer_Pa(args.barometer))
    r = compute(args)
    flows = flow_figures(r, flow) if flow is not None else None
    if args.json:
        from ..calc.burn_result import to_json
        obj = to_json(r)
        obj["input"] = {k: v for k, v in (("fuel", args.fuel), ("oxidant", args.oxidant), ("flow", args.flow),
                                          ("barometer", args.barometer),
                                          *((k, getattr(args, k)) for k in CONDITION_DEFAULTS)) if v is not None}
        if flows is not None:
            obj["flow"] = flows
            obj["units"]["flow"] = FLOW_UNITS
        sys.stdout.write(dumps(obj))
    else:
        sys.stdout.write(render_text(r, sh, flow, flows))
    return 0
