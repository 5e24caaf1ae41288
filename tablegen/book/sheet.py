"""The combustion sheet of a flue gas: everything its tables were computed from, as the book prints it.

One sheet per combustion result (the wet and the dry flue gas of one combustion
share it): the fuel as given and as used, the oxidant and its humidity, the
amount of oxidant and where it came from, oxidant/fuel ratios, flue-gas
quantities and composition, the water dew point, the heating values, the
adiabatic flame temperature with the temperatures it assumes, the stated input
uncertainties and what they give, and references to the cautions that apply.

:func:`figures` lists the same numbers at full precision, with their units, for
the JSON sidecar and the CSVW metadata of every table of the gas. The sheet is
built from the finished result (tablegen.calc.burn_result.CombustionResult); nothing here
evaluates a polynomial.
"""

from __future__ import annotations

from dataclasses import dataclass

#: Full-precision figures of a combustion: (JSON key of calc.burn_result.figure_values, label, unit).
FIGURES = (
    ("lambda", "air ratio λ", "1"), ("excess_air_percent", "excess air", "%"), ("phi", "equivalence ratio φ", "1"),
    ("afr_mass_stoich", "oxidant/fuel by mass, stoichiometric", "kg/kg"),
    ("afr_mass", "oxidant/fuel by mass, actual", "kg/kg"),
    ("afr_mass_dry_oxidant_stoich", "dry oxidant/fuel by mass, stoichiometric", "kg/kg"),
    ("afr_mass_dry_oxidant", "dry oxidant/fuel by mass, actual", "kg/kg"),
    ("afr_molar_stoich", "oxidant/fuel by mole, stoichiometric", "mol/mol"),
    ("afr_molar", "oxidant/fuel by mole, actual", "mol/mol"),
    ("afr_volume_stoich", "oxidant/fuel by normal volume, stoichiometric", "m3/m3"),
    ("afr_volume", "oxidant/fuel by normal volume, actual", "m3/m3"),
    ("oxidant_volume_per_kg_stoich", "oxidant per kg fuel, stoichiometric", "m3/kg"),
    ("oxidant_volume_per_kg", "oxidant per kg fuel, actual", "m3/kg"),
    ("flue_gas_mass_wet_per_kg", "flue gas per kg fuel, wet", "kg/kg"),
    ("flue_gas_mass_dry_per_kg", "flue gas per kg fuel, dry", "kg/kg"),
    ("flue_gas_volume_wet_per_kg", "flue gas per kg fuel, wet", "m3/kg"),
    ("flue_gas_volume_dry_per_kg", "flue gas per kg fuel, dry", "m3/kg"),
    ("flue_gas_volume_wet_per_m3_fuel", "flue gas per normal m3 fuel, wet", "m3/m3"),
    ("flue_gas_volume_dry_per_m3_fuel", "flue gas per normal m3 fuel, dry", "m3/m3"),
    ("flue_gas_mol_wet_per_kg", "flue gas per kg fuel, wet", "mol/kg"),
    ("flue_gas_mol_dry_per_kg", "flue gas per kg fuel, dry", "mol/kg"),
    ("M_flue_wet", "molar mass of the wet flue gas", "kg/kmol"),
    ("M_flue_dry", "molar mass of the dry flue gas", "kg/kmol"),
    ("dew_point_K", "water dew point at the flue pressure", "K"),
    ("flue_pressure_Pa", "flue pressure of the dew point", "Pa"),
    ("water_partial_pressure_Pa", "water partial pressure", "Pa"),
    ("lhv_mass", "LHV per kg", "MJ/kg"), ("hhv_mass", "HHV per kg", "MJ/kg"),
    ("lhv_molar", "LHV per kmol", "MJ/kmol"), ("hhv_molar", "HHV per kmol", "MJ/kmol"),
    ("lhv_volume", "LHV per normal m3", "MJ/m3"), ("hhv_volume", "HHV per normal m3", "MJ/m3"),
    ("combustion_reference_T_K", "combustion reference temperature of the heating values", "K"),
    ("t_adiabatic_K", "adiabatic flame temperature", "K"),
    ("T_fuel_K", "fuel temperature of the flame temperature", "K"),
    ("T_oxidant_K", "oxidant temperature of the flame temperature", "K"),
    ("metering_T_K", "metering temperature of normal volumes", "K"),
    ("metering_P_Pa", "metering pressure of normal volumes", "Pa"),
)


@dataclass(frozen=True, slots=True)
class Sheet:
    """A combustion sheet: its title, the substances it defines, and its blocks in order.

    Blocks: ("heading", text), ("para", text), ("grid", header, rows, column fractions,
    right-aligned column indices).
    """

    title: str
    substances: tuple          # names of the substances this combustion defines in the book
    blocks: tuple
    caution_refs: tuple        # ids of the book's cautions that apply ("C5", ...)


def figures(result) -> list:
    """[(key, label, value, unit, U_k2 or None)] of a combustion at full precision (None values left out)."""
    from ..calc.burn_result import figure_values
    s = figure_values(result)
    prop = result.uncertainty
    out = []
    for key, label, unit in FIGURES:
        v = s.get(key)
        if v is None:
            continue
        out.append((key, label, float(v), unit, None if prop is None else prop.U(key)))
    for basis in ("wet", "dry"):
        for sp, y in s[f"products_{basis}"].items():
            U = None if prop is None else prop.products[basis].get(sp)
            out.append((f"products_{basis}.{sp}", f"{sp} mole fraction, {basis} flue gas", float(y), "1", U))
    return out


def to_json(result, caution_refs=()) -> dict:
    """The combustion of a substance for the JSON sidecar: inputs as given, figures at full precision."""
    from ..calc.burn_result import amount_json
    fg, fl, prop = result.flue_gas, result.flame, result.uncertainty
    return {
        "fuel": result.fuel.describe(), "oxidant": result.oxidant.describe(),
        "amount_given": amount_json(result.amount_given),
        "T_fuel_source": fl.T_fuel_source, "T_oxidant_source": fl.T_oxidant_source,
        "figures": {k: {"label": lab, "value": v, "unit": u, "U_k2": U} for k, lab, v, u, U in figures(result)},
        "products_wet": dict(fg.mole_fractions_wet), "products_dry": dict(fg.mole_fractions_dry),
        "products_wet_mass": dict(fg.mass_fractions_wet), "products_dry_mass": dict(fg.mass_fractions_dry),
        "uncertainty": None if prop is None else prop.to_json(), "notes": list(result.notes),
        "cautions": list(caution_refs),
    }


# ---------------------------------------------------------------- the printed sheet
def _pct(x) -> str:
    return f"{x * 100:.4f}"


def _pm(v: float, U: float | None, fmt: str, scale: float = 1.0) -> str:
    """'44.902 ± 0.130' (U expanded, k = 2) or '44.902'."""
    text = fmt.format(v * scale)
    return text if not U else f"{text} ± {fmt.format(U * scale)}"


def _celsius(T_K: float, digits: int = 2) -> str:
    return f"{T_K:.{digits}f} K ({T_K - 273.15:.{digits}f} °C)"


def _fuel_blocks(f) -> list:
    g = f.given or {}
    out = [("heading", "Fuel")]
    kinds = {"gas": "gas by species", "analysis": "ultimate analysis (mass fractions)", "formula": "formula"}
    text = (f"{f.name}: " if f.name != f.spec else "") + kinds.get(f.kind, f.kind)
    if f.spec and f.kind != "gas" or (f.spec and f.name != f.spec):
        text += f", given as {f.spec}"
    elif f.spec:
        text += f", as typed: {f.spec}"
    text = text[0].upper() + text[1:]
    if f.kind == "formula":
        out.append(("para", text + f"; M = {f.M:.4f} kg/kmol per formula unit."))
    else:
        pct = g.get("in_percent")
        total = g.get("sum", 1.0) * (100 if pct else 1)
        norm = (f"the parts as given sum to {total:.6g}{' %' if pct else ''} and were normalised to "
                f"{'100 %' if pct else '1'}" if g.get("normalised") else
                f"the parts sum to {'100 %' if pct else '1'} (no normalisation)")
        basis = {"mole": "by mole (= by volume, ideal gas)", "mass": "by mass", "volume-dry": "by volume, dry",
                 "volume-wet": "by volume, wet"}.get(g.get("basis"), f"{g.get('basis')} basis")
        out.append(("para", f"{text}; analysis {basis}; {norm}."))
        if f.kind == "gas" and g.get("water_percent"):
            out.append(("para", f"Water of the wet gas: {g['water_percent']:g} % by volume."))
    unc = f.uncertainty or {}
    scale = 100 if g.get("in_percent") else 1
    unit = " %" if g.get("in_percent") else ""
    if f.kind == "gas":
        used = {c.id: c for c in f.gas.components}
        head = ["Species", f"As given{unit}"] + ([f"U (k = 2){unit}"] if unc else []) + \
            ["As used, mole fraction", "As used, mass fraction"]
        rows = []
        typed = list(g.get("values", {}))
        for (k, c) in zip(typed + [None] * (len(used) - len(typed)), used.values()):
            v = g.get("values", {}).get(k)
            row = [c.id if k in (None, c.id) else f"{k} ({c.id})", "" if v is None else f"{v * scale:.6g}"]
            if unc:
                row.append("" if unc.get(k) is None else f"{unc[k] * scale:.3g}")
            rows.append(tuple(row + [f"{c.mole_fraction:.6f}", f"{c.mass_fraction:.6f}"]))
        n = len(head)
        out.append(("grid", tuple(head), tuple(rows), tuple([1.0 / n] * n), tuple(range(1, n))))
        out.append(("para", f"Molar mass of the fuel as used: {f.M:.4f} kg/kmol."))
    elif f.kind == "analysis":
        keys = list(f.analysis["as-received"])
        head = ["Part", f"As given ({g.get('basis')})"] + (["U (k = 2)"] if unc else []) + \
            ["As received", "Dry", "Dry ash-free"]
        rows = []
        for k in keys:
            v = g.get("values", {}).get(k)
            row = [k, "" if v is None else f"{v:.5f}"]
            if unc:
                row.append("" if unc.get(k) is None else f"{unc[k]:.3g}")
            row += [f"{f.analysis[b][k]:.5f}" if k in f.analysis[b] else "—" for b in ("as-received", "dry", "daf")]
            rows.append(tuple(row))
        n = len(head)
        out.append(("grid", tuple(head), tuple(rows), tuple([1.0 / n] * n), tuple(range(1, n))))
    hv = g.get("heating_value", {})
    for k, v in hv.items():
        what = {"hhv_J_per_kg": "HHV", "lhv_J_per_kg": "LHV", "h_formation": "enthalpy of formation"}[k]
        out.append(("para", f"Given: {what} {v / 1e6:.6g} MJ/kg ({g.get('basis')} basis) at "
                            f"{g.get('heating_value_reference_K', 298.15) - 273.15:g} °C."))
    for n in f.notes:
        out.append(("para", f"Note: {n}."))
    return out


def _oxidant_blocks(ox) -> list:
    out = [("heading", "Oxidant")]
    parts = [ox.name[0].upper() + ox.name[1:] + (f", given as {ox.spec}" if ox.spec else "")]
    if ox.y_H2O > 0:
        dp = "below 0 °C" if ox.dew_point_K is None else _celsius(ox.dew_point_K, 2)
        hum = [f"humidity ratio {ox.humidity_ratio * 1000:.5g} g water per kg dry oxidant",
               f"water {ox.y_H2O * 100:.5g} % by volume", f"water dew point {dp} at {ox.P_Pa / 1000:g} kPa"]
        if ox.humidity_given != "relative_humidity" and ox.relative_humidity is not None and ox.T_K is not None:
            hum.insert(0, f"relative humidity {ox.relative_humidity:.4g} % at {ox.T_K - 273.15:g} °C")
        parts.append("; ".join(hum))
        parts[-1] = parts[-1][0].upper() + parts[-1][1:]
    parts.append(f"O2 {ox.o2_percent_dry:.4g} % by volume of the dry oxidant"
                 + (" (enriched with pure O2)" if ox.enriched else ""))
    out.append(("para", ". ".join(parts) + "."))
    rows = tuple((k, f"{y:.6f}") for k, y in ox.composition.items())
    out.append(("grid", ("Species", "Mole fraction, as supplied"), rows, (0.5, 0.5), (1,)))
    return out


def _amount_para(r, prop) -> str:
    a = r.amount_given
    key, value, U_k2 = (None, 0, None) if a is None else (a.key, a.value, a.U_k2)
    U = None if prop is None else prop.U("lambda")
    lam = _pm(r.air_ratio, U, "{:.4f}")
    ea = _pm(r.excess_air_percent, None if prop is None else prop.U("excess_air_percent"), "{:.2f}")
    src = {"excess_air": f"excess air given: {value:g} %", "air_ratio": f"λ given: {value:g}",
           "phi": f"φ given: {value:g}"}.get(key)
    if src is None:
        basis = "dry" if key == "o2_dry" else "wet"
        pm = "" if U_k2 is None else f" ± {U_k2:g} %"
        src = f"from the measured flue-gas O2 {value:g} %{pm} by volume ({basis})"
    return f"λ = {lam}, excess air = {ea} %, φ = {r.phi:.4f}; {src}."


def _ratio_rows(q, gas: bool) -> tuple:
    rows = [("by mass, oxidant as supplied", "kg/kg", f"{q.mass_stoich:.4f}", f"{q.mass:.4f}"),
            ("by mass, dry oxidant", "kg/kg", f"{q.mass_dry_oxidant_stoich:.4f}", f"{q.mass_dry_oxidant:.4f}")]
    if q.molar is not None:
        rows.append(("by mole", "mol/mol", f"{q.molar_stoich:.4f}", f"{q.molar:.4f}"))
    if gas and q.volume is not None:
        rows.append(("by normal volume", "m³/m³", f"{q.volume_stoich:.4f}", f"{q.volume:.4f}"))
    rows.append(("oxidant per kg fuel", "m³/kg", f"{q.volume_m3_per_kg_stoich:.4f}", f"{q.volume_m3_per_kg:.4f}"))
    return tuple(rows)


def _flue_rows(fg) -> tuple:
    rows = [("per kg fuel", "kg/kg", f"{fg.kg_wet_per_kg:.4f}", f"{fg.kg_dry_per_kg:.4f}"),
            ("per kg fuel", "m³/kg", f"{fg.m3_wet_per_kg:.4f}", f"{fg.m3_dry_per_kg:.4f}"),
            ("per kg fuel", "mol/kg", f"{fg.mol_wet_per_kg:.3f}", f"{fg.mol_dry_per_kg:.3f}")]
    if fg.m3_wet_per_m3_fuel is not None:
        rows.append(("per normal m³ fuel", "m³/m³", f"{fg.m3_wet_per_m3_fuel:.4f}", f"{fg.m3_dry_per_m3_fuel:.4f}"))
    rows.append(("molar mass", "kg/kmol", f"{fg.M_wet_kg_per_kmol:.4f}",
                 "—" if fg.M_dry_kg_per_kmol is None else f"{fg.M_dry_kg_per_kmol:.4f}"))
    return tuple(rows)


def _hv_rows(hv, prop) -> tuple:
    def pm(key, v, fmt):          # v in MJ per unit; key names its uncertainty (figure_values)
        return _pm(v, None if prop is None else prop.U(key), fmt)
    rows = [("per kg", "MJ/kg", pm("lhv_mass", hv.lhv_J_per_kg * 1e-6, "{:.3f}"),
             pm("hhv_mass", hv.hhv_J_per_kg * 1e-6, "{:.3f}"))]
    if hv.lhv_J_per_mol is not None:
        rows.append(("per kmol", "MJ/kmol", pm("lhv_molar", hv.lhv_J_per_mol * 1e-3, "{:.2f}"),
                     pm("hhv_molar", hv.hhv_J_per_mol * 1e-3, "{:.2f}")))
    if hv.lhv_J_per_m3 is not None:
        rows.append(("per normal m³", "MJ/m³", pm("lhv_volume", hv.lhv_J_per_m3 * 1e-6, "{:.3f}"),
                     pm("hhv_volume", hv.hhv_J_per_m3 * 1e-6, "{:.3f}")))
    return tuple(rows)


def dew_point_sentence(T_K, P_Pa) -> str:
    """The water dew point as every document of the book prints it."""
    from ..thermo.saturation import dew_point_text
    return dew_point_text(T_K, P_Pa)


def build(result, names: tuple, caution_refs: tuple, caution_titles: dict) -> Sheet:
    """The printed combustion sheet of ``result`` for the substances ``names``."""
    f, ox, prop = result.fuel, result.oxidant, result.uncertainty
    fg, dp, hv, fl = result.flue_gas, result.dew_point, result.heating_values, result.flame
    gas = f.kind == "gas"
    Tm, Pm = result.metering_T_K, result.metering_P_Pa
    blocks = [("para", f"Defines: {', '.join(names)}. Model: frozen complete combustion (tablegen.calc.burn); "
                       f"normal volumes are ideal-gas volumes at {Tm - 273.15:g} °C and {Pm / 1000:g} kPa.")]
    blocks += _fuel_blocks(f)
    blocks += _oxidant_blocks(ox)
    blocks += [("heading", "Amount of oxidant"), ("para", _amount_para(result, prop)),
               ("heading", "Oxidant/fuel ratios"),
               ("grid", ("Ratio", "Unit", "Stoichiometric", "Actual"), _ratio_rows(result.ratios, gas),
                (0.4, 0.16, 0.22, 0.22), (2, 3)),
               ("heading", "Flue gas per unit of fuel"),
               ("grid", ("Quantity", "Unit", "Wet", "Dry"), _flue_rows(fg), (0.4, 0.16, 0.22, 0.22), (2, 3))]
    blocks += _composition_blocks(fg, prop)
    blocks += [("heading", "Water dew point"),
               ("para", f"{dew_point_sentence(dp.T_K, dp.flue_pressure_Pa)}, the flue pressure "
                        f"stated (water partial pressure {dp.water_partial_pressure_Pa / 1000:.4f} kPa; "
                        f"saturation temperature of IAPWS-IF97, eq. 31)"
                        + ("" if prop is None or prop.U("dew_point_K") is None else
                           f"; U (k = 2) {prop.U('dew_point_K'):.2f} K from the stated inputs")
                        + ". Table rows at or below it are marked c: water may condense there and the "
                          "ideal-gas values do not hold.")]
    Tr = hv.T_ref_K
    blocks += [("heading", f"Heating values at {Tr - 273.15:g} °C (combustion reference temperature)"),
               ("grid", ("Basis", "Unit", "LHV", "HHV"), _hv_rows(hv, prop), (0.25, 0.15, 0.3, 0.3), (2, 3)),
               ("para", f"Water condensed for the HHV with Δh_vap = {hv.h_vap_water_J_per_kg / 1000:.2f} kJ/kg "
                        f"at {Tr - 273.15:g} °C; {hv.water_formed_kg_per_kg:.4f} kg water formed per kg fuel.")]
    Ta = fl.T_adiabatic_K
    ta_text = ("above the upper end of the flue-gas data (not given)" if Ta is None else
               _pm(Ta, None if prop is None else prop.U("t_adiabatic_K"), "{:.0f}") + f" K ({Ta - 273.15:.0f} °C)")
    blocks += [("heading", "Adiabatic flame temperature"),
               ("para", f"{ta_text}: frozen complete-combustion products, no heat loss; fuel at "
                        f"{fl.T_fuel_K - 273.15:g} °C ({fl.T_fuel_source or 'as given'}), oxidant at "
                        f"{fl.T_oxidant_K - 273.15:g} °C ({fl.T_oxidant_source or 'as given'}).")]
    if prop is not None:
        blocks += _uncertainty_blocks(prop, result)
    refs = ", ".join(f"{c} ({caution_titles.get(c, '')})" for c in caution_refs)
    blocks += [("heading", "Cautions for this fuel"),
               ("para", f"{refs}: printed in full in the Caution section; they apply to every table of "
                        f"{', '.join(names)}.")]
    return Sheet(title=f"Combustion sheet: {names[0]}", substances=tuple(names), blocks=tuple(blocks),
                 caution_refs=tuple(caution_refs))


def _composition_blocks(fg, prop) -> list:
    """The flue-gas composition grid, wet and dry, by mole and mass (with U where stated)."""
    rows = []
    for k, y in fg.mole_fractions_wet.items():
        d, dm = fg.mole_fractions_dry.get(k), fg.mass_fractions_dry.get(k)
        row = [k, _pct(y)]
        if prop is not None:
            row.append(_pct(prop.products["wet"].get(k, 0.0)))
        row += [_pct(fg.mass_fractions_wet[k]), "—" if d is None else _pct(d)]
        if prop is not None:
            row.append("—" if d is None else _pct(prop.products["dry"].get(k, 0.0)))
        rows.append(tuple(row + ["—" if dm is None else _pct(dm)]))
    if prop is None:
        head, fr = ("Species", "Wet, mole %", "Wet, mass %", "Dry, mole %", "Dry, mass %"), (0.2,) * 5
    else:
        head = ("Species", "Wet, mole %", "U (k = 2)", "Wet, mass %", "Dry, mole %", "U (k = 2)", "Dry, mass %")
        fr = (0.16, 0.15, 0.12, 0.15, 0.15, 0.12, 0.15)
    return [("heading", "Flue-gas composition"), ("grid", head, tuple(rows), fr, tuple(range(1, len(head))))]


def _uncertainty_blocks(prop, result) -> list:
    from ..calc.burn_result import figure_values
    s = figure_values(result)
    inputs = "; ".join(f"{i.label} {i.value * 100 if i.unit == 'fraction' else i.value:.6g} ± "
                       f"{i.U * 100 if i.unit == 'fraction' else i.U:.3g} %" for i in prop.inputs)
    out = [("heading", "Uncertainty from the stated inputs"),
           ("para", f"Inputs stated with an expanded uncertainty (k = 2): {inputs}. Propagated through the "
                    f"combustion calculation by the law of propagation of uncertainty (JCGM 100:2008, 5.1.2; "
                    f"independent inputs, the analysis renormalised); the flue-gas composition part enters the "
                    f"stated U of every table of this gas (uncertainty appendix).")]
    rows = []
    for key, label, fmt in (("lambda", "λ", "{:.4f}"), ("excess_air_percent", "excess air, %", "{:.2f}"),
                            ("lhv_mass", "LHV, MJ/kg", "{:.3f}"), ("hhv_mass", "HHV, MJ/kg", "{:.3f}"),
                            ("dew_point_K", "water dew point, K", "{:.2f}"),
                            ("t_adiabatic_K", "flame temperature, K", "{:.1f}")):
        fig = prop.figures.get(key)
        if fig is None or s.get(key) is None or fig["U"] == 0.0:
            continue           # e.g. λ and excess air when the excess air is given: exact
        big = max(fig["parts"].items(), key=lambda kv: abs(kv[1]))[0] if fig["U"] > 0 else "—"
        rows.append((label, fmt.format(s[key]), fmt.format(fig["U"]), big))
    out.append(("grid", ("Figure", "Value", "U (k = 2)", "Largest contribution"), tuple(rows),
                (0.3, 0.2, 0.2, 0.3), (1, 2)))
    return out
