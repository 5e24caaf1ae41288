"""Text of ``tablegen process``: the answer line first, then states, energies, flows, comparison.

Receives the SI-based result dictionary of ``commands.process`` (the JSON
object) and a :class:`tablegen.commands.display.Shown`, and only formats: every number
is converted from SI to the shown unit here and nowhere else.
"""

from __future__ import annotations

from .display import fmt_sig
from ..core.units import unit

STEP_TITLES = {
    "compress": "compression, steady flow, adiabatic",
    "expand": "expansion, steady flow, adiabatic",
    "heat_p": "constant-pressure heat exchange, steady flow",
    "heat_v": "constant-volume heat exchange, closed rigid vessel",
    "throttle": "throttling, steady flow, adiabatic, no work",
}
#: Text output: an error below this fraction of the value is round-off and printed as 0.
ROUND_OFF = 1e-12
#: Decimals per shown unit of energy, entropy, speed (the state table).
DECIMALS = {"kJ/kg": 3, "Btu/lbm": 3, "kJ/kmol": 3, "Btu/lbmol": 3}
#: Heat duties from this size on are printed in MMBtu/h rather than Btu/h (US).
MMBTU_FROM_W = 1e6 * unit("Btu/h").factor


def _num(x: float, dec: int) -> str:
    """Fixed decimals without a negative zero ('-0.000' -> '0.000')."""
    t = f"{x:.{dec}f}"
    return t[1:] if t.startswith("-") and not t.strip("-0.") else t


def _si(d, key, factor):
    v = d.get(key)
    return None if v is None else v * factor


# ------------------------------------------------------------------ pieces
def pressure_text(sh, P_Pa: float, *, brief: bool = False, barometer: bool = True) -> str:
    """'1.013 bar', or '9.000 barg (10.013 bar)' with the barometer unless left to the caller."""
    from .display import P_DECIMALS
    shift = 1 if brief else 0
    dec = max(0, P_DECIMALS.get(sh.P, 4) - shift)
    absolute = f"{_num(unit(sh.P).from_si(P_Pa), dec)} {sh.P}"
    if not sh.P_gauge:
        return absolute
    dg = max(0, P_DECIMALS.get(sh.P_gauge, 4) - shift)
    inner = absolute + (f", {sh.barometer_text()}" if barometer else "")
    return f"{_num(sh.gauge_value(P_Pa), dg)} {sh.P_gauge} ({inner})"


def _flow_power(sh, W: float) -> str:
    """A power in the system's unit first, the other beside: '745.3 kW (999.5 hp)'."""
    kw, hp = fmt_sig(abs(W) / 1e3), fmt_sig(abs(W) / unit("hp").factor)
    return f"{hp} hp ({kw} kW)" if sh.system == "US" else f"{kw} kW ({hp} hp)"


def _duty(sh, W: float) -> str:
    kw = fmt_sig(abs(W) / 1e3)
    if sh.system != "US":
        return f"{kw} kW"
    if abs(W) >= MMBTU_FROM_W:
        return f"{fmt_sig(abs(W) / unit('MMBtu/h').factor)} MMBtu/h ({kw} kW)"
    return f"{fmt_sig(abs(W) / unit('Btu/h').factor)} Btu/h ({kw} kW)"


def answer_line(d: dict, sh, flow) -> str:
    """One line to read aloud: start -> end; w or q; power or duty at the flow."""
    T = lambda K: sh.T_text(K, 1, absolute=False)  # noqa: E731
    P = lambda Pa: pressure_text(sh, Pa, brief=True, barometer=False)  # noqa: E731
    hu = sh.sym("h")
    line = f"{d['substance']} {T(d['T1_K'])}, {P(d['P1_Pa'])} -> {T(d['T2_K'])}, {P(d['P2_Pa'])}"
    step = d["step"]
    if step in ("compress", "expand"):
        line += f"; w = {unit(hu).from_si(d['w'] * 1e3):+.1f} {hu}"
        if flow is not None:
            W = d["power"] * 1e3
            line += f"; {_flow_power(sh, W)} {'in' if W >= 0 else 'out'} at {flow.text}"
    elif step in ("heat_p", "heat_v"):
        line += f"; q = {unit(hu).from_si(d['q'] * 1e3):+.1f} {hu}"
        if flow is not None:
            W = d["heat_duty"] * 1e3
            line += f"; {_duty(sh, W)} {'in' if W >= 0 else 'out'} at {flow.text}"
    else:
        line += "; w = 0, q = 0" + (f" at {flow.text}" if flow is not None else "")
    if sh.P_gauge:
        line += f"; gauge pressures at {sh.barometer_text()}"
    return line


def _grid(rows, align) -> list[str]:
    widths = [max(len(r[j]) for r in rows) for j in range(len(rows[0]))]
    out = []
    for r in rows:
        cells = [c.ljust(w) if a == "l" else c.rjust(w) for c, w, a in zip(r, widths, align)]
        out.append("  " + "  ".join(cells).rstrip())
    return out


def datum_text(d: dict, sub, sh) -> str:
    if d["kind"] != "ideal gas":
        T = sh.T_text(sub.T_ref_K, 2)
        return f"u = 0 and s = 0 at {T}; h = u + P v"
    dt = sub.datum
    if dt.kind == "formation":
        text = dt.describe()
    else:
        hu = sh.sym("h")
        text = (f"h = {fmt_sig(unit(hu).from_si(dt.h_ref_J_per_kg))} {hu} at {sh.T_text(dt.T_ref_K, 2)} "
                f"(sensible enthalpy)")
    return f"{text}; s at P° = {sub.P_ref_Pa / 1000:g} kPa"


def _states(d: dict, sh) -> list[str]:
    has_s = d["T2s_K"] is not None
    head = ["", "", "start 1", "end 2"] + (["isentropic 2s"] if has_s else [])
    rows = [head]
    su, hu, vu = sh.sym("s"), sh.sym("h"), sh.sym("v")
    spec = [("T", sh.T, ("T1_K", "T2_K", "T2s_K"), 1.0, lambda x: _num(unit(sh.T).from_si(x), 2))]
    if sh.T_abs:
        spec.append(("T", sh.T_abs, ("T1_K", "T2_K", "T2s_K"), 1.0, lambda x: _num(unit(sh.T_abs).from_si(x), 2)))
    from .display import P_DECIMALS
    spec.append(("P", sh.P, ("P1_Pa", "P2_Pa", "P2_Pa"), 1.0,
                 lambda x: _num(unit(sh.P).from_si(x), P_DECIMALS.get(sh.P, 4))))
    if sh.P_gauge:
        spec.append(("P", sh.P_gauge, ("P1_Pa", "P2_Pa", "P2_Pa"), 1.0,
                     lambda x: _num(sh.gauge_value(x), P_DECIMALS.get(sh.P_gauge, 4))))
    spec += [("v", vu, ("v1", "v2", None), 1.0, lambda x: f"{unit(vu).from_si(x):.6g}"),
             ("h", hu, ("h1", "h2", "h2s"), 1e3, lambda x: _num(unit(hu).from_si(x), 3)),
             ("u", hu, ("u1", "u2", None), 1e3, lambda x: _num(unit(hu).from_si(x), 3)),
             ("s", su, ("s1", "s2", None), 1e3, lambda x: _num(unit(su).from_si(x), 5))]
    if d["kind"] == "ideal gas":
        spec += [("Pr", "-", ("Pr1", "Pr2", "Pr2s"), 1.0, lambda x: f"{x:.6g}"),
                 ("vr", "-", ("vr1", "vr2", None), 1.0, lambda x: f"{x:.6g}")]
    for name, u, keys, f, fmt in spec:
        vals = [_si(d, k, f) if k else None for k in keys[:3 if has_s else 2]]
        rows.append([name, u] + ["" if v is None else fmt(v) for v in vals])
    out = _grid(rows, "llrrr")
    if sh.P_gauge:
        out.append(f"  {sh.P_gauge}: gauge pressure, absolute minus {sh.barometer_text()}")
    return out


def _energies(d: dict, sh) -> list[str]:
    molar = d["kind"] == "ideal gas"
    hu, su, hm, sm = sh.sym("h"), sh.sym("s"), sh.sym("h_molar"), sh.sym("s_molar")
    rows = [["", "", "per kg" if sh.system == "SI" else "per lbm", "",
             "per kmol" if sh.system == "SI" else "per lbmol", ""]] if molar else \
        [["", "", "per kg" if sh.system == "SI" else "per lbm", ""]]
    for label, key, sym, u, um, dec in [
            ("work in", "w", "w", hu, hm, 3), ("heat in", "q", "q", hu, hm, 3),
            ("entropy change", "ds", "s2 - s1", su, sm, 5),
            ("entropy generated", "s_gen", "s_gen", su, sm, 5)]:
        row = [label, sym, f"{unit(u).from_si(d[key] * 1e3):+.{dec}f}", u]
        if molar:
            row += [f"{unit(um).from_si(d[key + '_molar']):+.{dec}f}", um]
        rows.append(row)
    out = _grid(rows, "llrlrl")
    out.append(f"  s_gen: {d['s_gen_basis']}")
    if d.get("T_boundary_K") is not None:
        out.append(f"  boundary temperature {sh.T_text(d['T_boundary_K'], 2)}")
    return out


def _flows(d: dict, sh, flow) -> list[str]:
    from ..core.units import P_SCF_PA, T_SCF_K
    from ..core.constants import R_MOLAR
    m = d["mass_flow"]
    mu = sh.sym("mass_flow")
    parts = [f"{fmt_sig(unit(mu).from_si(m))} {mu}", f"{fmt_sig(m)} kg/s" if mu != "kg/s" else
             f"{fmt_sig(m * 3600)} kg/h"]
    if d.get("molar_flow") is not None:
        if sh.system == "US":
            scfm = d["molar_flow"] * 1e3 * R_MOLAR * T_SCF_K / P_SCF_PA / unit("ft³/min").factor
            parts.append(f"{fmt_sig(scfm)} SCFM (60 °F, 14.696 psia)")
        else:
            parts.append(f"{fmt_sig(d['normal_volume_flow'] * 3600)} Nm³/h (0 °C, 101.325 kPa)")
    out = [f"flow {flow.text}: " + " = ".join(dict.fromkeys(parts))]
    vu = sh.sym("volume_flow")
    rows = []
    if d["step"] in ("compress", "expand"):
        W = d["power"] * 1e3
        rows.append(["power " + ("in" if W >= 0 else "out"), _flow_power(sh, W)])
    if d["step"] in ("heat_p", "heat_v"):
        W = d["heat_duty"] * 1e3
        rows.append(["heat duty " + ("in" if W >= 0 else "out"), _duty(sh, W)])
    for end, key, T, P in (("in", "volume_flow_1", d["T1_K"], d["P1_Pa"]),
                           ("out", "volume_flow_2", d["T2_K"], d["P2_Pa"])):
        rows.append([f"volume flow {end}",
                     f"{fmt_sig(unit(vu).from_si(d[key]))} {vu} at {sh.T_text(T, 2, absolute=False)}, "
                     f"{pressure_text(sh, P, barometer=False)}"])
    return out + _grid(rows, "ll")


def _comparison(d: dict, sh) -> list[str]:
    """The hand methods against the exact result, in the shown units (temperature errors as differences)."""
    hu, su = sh.sym("h"), sh.sym("s")
    units = {"ds": ("s2 - s1", su, 1e3), "T2s": ("T2s", sh.T, 1.0), "T2": ("T2", sh.T, 1.0),
             "w": ("w", hu, 1e3), "q": ("q", hu, 1e3)}
    fmts = {"ds": "{:.6g}", "T2s": "{:.2f}", "T2": "{:.2f}", "w": "{:.3f}", "q": "{:.3f}"}
    lines = ["method comparison (error = method - exact)"]
    rows = [["quantity", "method", "used", "value", "error", "error %"]]
    for q, ests in d["comparison"].items():
        heading, u, f = units[q]
        uu = unit(u)
        for i, e in enumerate(ests):
            used = ""
            if e.get("parameter"):
                p = e["parameter"]
                if p["name"] == "k":
                    used = f"k = {p['value']:.5f}"
                else:
                    used = f"{p['name']} = {unit(su).from_si(p['value'] * 1e3):.5f}"
            exact = e["method"] == "exact"
            rel = "" if exact or e["rel_error"] is None else f"{e['rel_error'] * 100:+.3g}"
            if not exact and e["rel_error"] is None:
                rel = "-"
            err = "" if exact else f"{e['error'] * f / uu.factor:+.3g}"
            if not exact and abs(e["error"]) <= ROUND_OFF * abs(e["value"]):
                err, rel = "0", ("0" if rel else rel)     # equal to round-off: the methods coincide
            rows.append([f"{heading} [{u}]" if i == 0 else "", e["label"], used,
                         fmts[q].format(uu.from_si(e["value"] * f)), err, rel])
    return lines + _grid(rows, "lllrrr")


def format_text(d: dict, sub, sh, flow, line: str, *, compare: bool = False, extra_notes=()) -> str:
    lines = [line, ""]
    if d["kind"] == "ideal gas":
        su = sh.sym("s")
        lines.append(f"{d['substance_name']} ({d['substance']}), ideal gas, M = {d['M']:.4f} kg/kmol, "
                     f"R = {unit(su).from_si(d['R'] * 1e3):.6f} {su}")
    else:
        lines.append(f"{d['substance_name']} ({d['substance']}), incompressible: {sub.describe()}")
    detail = STEP_TITLES[d["step"]]
    if d.get("ratio") is not None:
        detail += f"; pressure ratio {d['ratio']:g}"
    if d.get("eta") is not None:
        detail += f"; isentropic efficiency {d['eta']:g}"
    lines.append(f"step: {detail}")
    lines.append(f"datum: {datum_text(d, sub, sh)}")
    lines.append("")
    lines += _states(d, sh)
    lines.append("")
    lines += _energies(d, sh)
    if flow is not None:
        lines.append("")
        lines += _flows(d, sh, flow)
    if compare:
        lines.append("")
        lines += _comparison(d, sh)
    notes = list(d["notes"]) + list(extra_notes)
    if notes:
        lines.append("")
    for n in notes:
        lines.append(f"note: {n}")
    lines += _dew_lines(d, sh)
    lines.append("")
    for c in d["cautions"]:
        lines.append(f"caution: {c}")
    return "\n".join(lines) + "\n"


def _dew_lines(d: dict, sh) -> list[str]:
    """The gas's water dew point (its one figure) and the states at or below the dew point at their pressure."""
    if d.get("dew_point_P_Pa") is None:
        return []
    from ..thermo.saturation import dew_point_text
    out = [f"water dew point of this gas {dew_point_text(d['dew_point_K'], d['dew_point_P_Pa'])}"]
    for c in d.get("condensing_states", ()):
        out.append(f"caution: state {c['state']} ({sh.T_text(c['T_K'], 2)}, {pressure_text(sh, c['P_Pa'])}) is at "
                   f"or below the water dew point at its pressure, {sh.T_text(c['dew_point_K'], 2)}: water "
                   f"condenses there and the ideal-gas figures do not hold")
    return out
