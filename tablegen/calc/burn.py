"""Fuels, oxidants and their complete-combustion products as first-class substances.

A fuel (gas by species, liquid or solid by ultimate analysis, or a formula) and
an oxidant (dry, humid or oxygen-enriched air, or any O2-bearing mixture) at a
given amount of oxidant (excess air, λ, φ, or measured flue-gas O2) give the
flue gas as an ordinary :class:`~tablegen.thermo.substance.Substance`, plus the
figures a combustion engineer checks: air/fuel ratios, flue-gas quantities,
water dew point, heating values and the adiabatic flame temperature.

Model (the usual one of boiler and burner calculations):

* Frozen complete combustion: C -> CO2, H -> H2O, S -> SO2, N -> N2, noble
  gases pass unchanged, the oxygen not used leaves as O2. No dissociation, no
  CO, NOx or unburned fuel. Everything is an element balance, so the
  amounts are exact to round-off.
* λ = O2 supplied / O2 needed for complete combustion; excess air = (λ - 1) x 100 %;
  φ = 1/λ. λ < 1 is refused (it would need CO and H2 in the products).
* Gases are ideal: % by volume = % by mole, normal volumes use R T/P at the
  stated metering conditions (ISO 6976's real-gas volumetric values differ by
  the compression factor, about 0.2 % for natural gas at 15 °C, common practice).
* Enthalpies of formation are those of the NASA polynomials of each species
  (h(298.15 K) = ΔfH°). Water condensed for the higher heating value uses the
  enthalpy of vaporisation on the saturation line at the combustion reference
  temperature (Wagner & Pruss 1993, see tablegen.thermo.saturation).
* A fuel given by ultimate analysis or formula has no polynomial: its heating
  value (HHV or LHV, on the basis of the analysis) or its enthalpy of formation
  must be given; the fuel's enthalpy is then h(T) = h(T_hv) + cp (T - T_hv) with
  cp given by the user or, if not given, zero (stated in the notes).
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from ..core.errors import InputError, RangeError, UnitError
from .burn_result import (AmountGiven, CombustionResult, DewPoint, Flame, FlueGasQuantities, HeatingValues,
                          OxidantRatios, figure_values)
from .fuels import FUEL_KEYS, Fuel, _h_products, _oxygen_need, _products_of_fuel_per_kg, fuel_from_table, fuel_from_text
from .oxidants import Oxidant, oxidant_from_table, oxidant_from_text
from .reactants import P_NORMAL, T_NORMAL, _M_H2O, _g, _h_molar, _lib, _num
from ..core.constants import R_MOLAR, T_REF

#: Product species of complete combustion, in the order they are listed.
PRODUCT_ORDER = ("CO2", "H2O", "SO2", "N2", "O2", "Ar", "He", "Ne", "Kr", "Xe")
#: Combustion reference temperatures ISO 6976 allows, K (15.55 °C is 60 °F).
REFERENCE_TEMPERATURES_K = {"25 °C": 298.15, "20 °C": 293.15, "15.55 °C (60 °F)": 288.705555555556,
                            "15 °C": 288.15, "0 °C": 273.15}
#: Frozen flame temperatures above this are flagged as upper bounds (dissociation).
T_DISSOCIATION_WARN = 2000.0
#: Flue-gas O2 and λ: λ this far below 1 is treated as round-off of λ = 1.
LAMBDA_ROUNDOFF = 1e-12

CAUTION_SULFUR = ("The fuel contains sulfur: the flue gas carries SO2 and, in practice, some SO3; its acid "
                  "dew point (sulfuric acid condensing) lies well above the water dew point given here and is "
                  "not computed; surfaces below it corrode.")
CAUTION_TOXIC = ("Flue gas is toxic and asphyxiant: keep it out of occupied spaces, and never rely on these "
                 "figures for ventilation or exposure limits.")
CAUTION_CODES = ("These are engineering estimates: for boiler, burner, flue and stack design defer to local "
                 "codes and licensed engineering practice.")
#: The cautions of every combustion result; the others are added where they apply (combustion_cautions).
CAUTIONS = (CAUTION_TOXIC, CAUTION_CODES)


AMOUNT_KEYS = ("excess_air", "air_ratio", "phi", "o2_dry", "o2_wet")


def _solve_air_ratio(*, excess_air, air_ratio, phi, o2_dry, o2_wet, o2_need, n_ox_st, wet0, dry0,
                     ox: Oxidant) -> float:
    given = {k: v for k, v in (("excess_air", excess_air), ("lambda", air_ratio), ("phi", phi),
                               ("o2_dry", o2_dry), ("o2_wet", o2_wet)) if v is not None}
    if len(given) != 1:
        raise InputError("give exactly one amount of oxidant: excess air (%), lambda, phi, "
                         f"or flue-gas O2 (dry or wet, %); got {', '.join(given) or 'none'}")
    (k, v), = given.items()
    if k == "excess_air":
        return 1 + _num(v, "excess air (%)", lo=0.0) / 100
    if k == "lambda":
        if _num(v, "lambda") < 1:
            raise RangeError(f"lambda = {float(v):g} is below 1; complete combustion needs lambda >= 1 "
                             f"(fuel-rich flames make CO and H2, which this model does not)")
        return float(v)
    if k == "phi":
        return 1 / _num(v, "phi", lo=0.0, hi=1.0, lo_open=True)
    # Flue gas at λ: O2 = (λ-1) O2_need; wet total = wet0 + λ n_st; dry total = dry0 + λ n_st (1 - y_H2O,ox),
    # where wet0, dry0 are the totals at λ = 0 (element balance, linear in λ). Solve y = O2/total for λ.
    c = 1.0 if k == "o2_wet" else 1.0 - ox.y_H2O
    total0 = wet0 if k == "o2_wet" else dry0
    y_max = ox.y_O2 / c
    y = _num(v, f"flue-gas O2 ({'wet' if k == 'o2_wet' else 'dry'}, %)", lo=0.0) / 100
    if y >= y_max:
        raise RangeError(f"flue-gas O2 {y * 100:g} % ({'wet' if k == 'o2_wet' else 'dry'}) is not below "
                         f"the O2 content of the oxidant on that basis ({y_max * 100:.4g} %); allowed: "
                         f"0 <= O2 < {y_max * 100:.4g} %")
    return (o2_need + y * total0) / (o2_need - y * n_ox_st * c)


def measured_o2(text, what: str = "flue-gas O2") -> tuple[float, float | None]:
    """A measured O2 as typed: '3.5' or '3.5%' -> (3.5, None); '3.5%±0.2%' (or '+-') -> (3.5, 0.2), in %.

    The uncertainty is expanded (k = 2) and carries its '%' like the value.
    """
    from ..core.composition import PLUS_MINUS
    t = str(text).strip()
    sep = next((m for m in PLUS_MINUS if m in t), None)
    if sep is None:
        return _num(t[:-1].strip() if t.endswith("%") else t, f"{what} (%)"), None
    v, _, u = (x.strip() for x in t.partition(sep))
    if not v.endswith("%") or not u.endswith("%"):
        raise UnitError(f"{what} {t!r}: a measured O2 with its uncertainty is written with '%' on both; "
                        f"allowed: e.g. 3.5%±0.2% (the expanded uncertainty, k = 2)")
    return _num(v[:-1].strip(), f"{what} (%)"), _num(u[:-1].strip(), f"uncertainty of {what} (%)")


def _given_amount(excess_air, air_ratio, phi, o2_dry, o2_wet):
    for k, v in (("excess-air", excess_air), ("lambda", air_ratio), ("phi", phi), ("o2-dry", o2_dry),
                 ("o2-wet", o2_wet)):
        if v is not None:
            return k, float(v)
    raise InputError("give one amount of oxidant")  # pragma: no cover - checked before


def _products_at(fuel: Fuel, ox: Oxidant, n_ox: float) -> dict:
    """Product moles per kg of fuel for n_ox mol of oxidant per kg (element balance)."""
    el = dict(fuel.elements)
    water = fuel.moisture
    for sid, y in ox.composition.items():
        if sid == "O2":
            el["O"] = el.get("O", 0.0) + 2 * y * n_ox
        elif sid == "N2":
            el["N"] = el.get("N", 0.0) + 2 * y * n_ox
        elif sid == "H2O":
            water += y * n_ox
        elif sid == "CO2":
            el["C"] = el.get("C", 0.0) + y * n_ox
            el["O"] = el.get("O", 0.0) + 2 * y * n_ox
        else:
            el[sid] = el.get(sid, 0.0) + y * n_ox
    out = _products_of_fuel_per_kg(el, water)
    out["O2"] = el.get("O", 0.0) / 2 - el.get("C", 0.0) - el.get("H", 0.0) / 4 - el.get("S", 0.0)
    return out


def _normal_molar_volume(T_K: float, P_Pa: float) -> float:
    """Ideal-gas molar volume, m³/mol."""
    return R_MOLAR * T_K / P_Pa


def _as_fuel(fuel, data, source) -> Fuel:
    if isinstance(fuel, Fuel):
        return fuel
    if isinstance(fuel, dict):
        if fuel and not any(k in FUEL_KEYS for k in fuel):      # a bare {species: mole fraction}
            fuel = {"composition": fuel}
        return fuel_from_table(fuel, "fuel", data=data, source=source)
    return fuel_from_text(fuel, data=data, source=source)


def _as_oxidant(oxidant, data, source) -> Oxidant:
    if isinstance(oxidant, Oxidant):
        return oxidant
    if isinstance(oxidant, dict):
        return oxidant_from_table(oxidant, "oxidant", data=data, source=source)
    return oxidant_from_text(oxidant or "air", data=data, source=source)


def combustion(fuel, oxidant="air", *, excess_air=None, air_ratio=None, phi=None, o2_dry=None,
               o2_wet=None, o2_uncertainty=None, T_ref_K: float = 298.15, T_meter_K: float = T_NORMAL,
               P_meter_Pa: float = P_NORMAL, T_fuel_K: float | None = None, T_oxidant_K: float | None = None,
               P_flue_Pa: float = P_NORMAL, data=(), source=None, **kw) -> CombustionResult:
    """Frozen complete combustion of a fuel with an oxidant.

    Parameters
    ----------
    fuel : Fuel, spec table (dict), or text ('CH4=0.9,C2H6=0.06,N2=0.04', a species, a TOML file);
        a text analysis may state expanded uncertainties, 'CH4=87%±0.5%,...'
    oxidant : Oxidant, table, or text ('air', 'air,rh=60%,T=25C', 'air,O2=30%', 'O2=0.3,N2=0.7')
    excess_air : %; or air_ratio (λ, also accepted as ``lambda=``), phi (φ = 1/λ),
        o2_dry / o2_wet (measured flue-gas O2, % by volume): exactly one
    o2_uncertainty : expanded uncertainty (k = 2) of the measured O2, % by volume
    T_ref_K : combustion reference temperature of the heating values: 298.15, 293.15,
        288.7056 (60 °F), 288.15 or 273.15 K (ISO 6976)
    T_meter_K, P_meter_Pa : metering conditions of normal volumes (default 0 °C, 101.325 kPa)
    T_fuel_K : fuel inlet temperature for the adiabatic flame temperature (default 25 °C)
    T_oxidant_K : oxidant inlet temperature for it; default the temperature stated with
        the oxidant (``air,rh=60%,T=15C`` is at 15 °C), else 25 °C
    P_flue_Pa : flue-gas pressure for the water dew point

    Returns
    -------
    CombustionResult (tablegen.calc.burn_result): its figures are attributes of
    ``ratios``, ``flue_gas``, ``dew_point``, ``heating_values`` and ``flame``, SI
    inside; ``burn_result.to_json`` gives the JSON form. With stated input
    uncertainties, ``uncertainty`` holds their propagation (tablegen.calc.burn_inputs).

    Raises
    ------
    TablegenError (or SpecError for tables) naming the bad input.
    """
    if "lambda" in kw:
        if air_ratio is not None:
            raise InputError("give lambda or air_ratio, not both")
        air_ratio = kw.pop("lambda")
    if kw:
        raise TypeError(f"combustion() got unknown arguments: {', '.join(kw)}")
    data = tuple(data)
    f = _as_fuel(fuel, data, source)
    ox = _as_oxidant(oxidant, data, source)
    amount = {k: v for k, v in (("excess_air", excess_air), ("air_ratio", air_ratio), ("phi", phi),
                                ("o2_dry", o2_dry), ("o2_wet", o2_wet)) if v is not None}
    if o2_uncertainty is not None:
        if not (set(amount) & {"o2_dry", "o2_wet"}):
            raise InputError("an O2 uncertainty belongs to a measured flue-gas O2 (o2_dry or o2_wet)")
        U = _num(o2_uncertainty, "uncertainty of the flue-gas O2 (%)")
        (k, v), = ((k, v) for k, v in amount.items() if k in ("o2_dry", "o2_wet"))
        if U < 0:
            raise RangeError(f"uncertainty of the flue-gas O2 is negative ({U:g} %); allowed: U >= 0")
        if U > _num(v, "flue-gas O2 (%)"):
            raise RangeError(f"uncertainty of the flue-gas O2 (±{U:g} %) is larger than the O2 itself "
                             f"({float(v):g} %); allowed: U <= the measured O2")
    temps = {"T_fuel_K": (T_REF, "the default") if T_fuel_K is None else (T_fuel_K, "as given"),
             "T_oxidant_K": ((ox.T_K, "stated with the oxidant") if ox.T_K is not None else (T_REF, "the default"))
             if T_oxidant_K is None else (T_oxidant_K, "as given")}
    conditions = dict(T_ref_K=T_ref_K, T_meter_K=T_meter_K, P_meter_Pa=P_meter_Pa, P_flue_Pa=P_flue_Pa,
                      T_fuel_K=temps["T_fuel_K"][0], T_oxidant_K=temps["T_oxidant_K"][0])
    r = _burn(f, ox, amount, data=data, source=source, **conditions)
    (ak, av), = amount.items()
    given = AmountGiven(key=ak, value=float(av), U_k2=None if o2_uncertainty is None else float(o2_uncertainty),
                        unit={"excess_air": "%", "air_ratio": "-", "phi": "-"}.get(ak, "%"))
    flame = replace(r.flame, T_fuel_source=temps["T_fuel_K"][1], T_oxidant_source=temps["T_oxidant_K"][1])
    unc = None
    if f.uncertainty or o2_uncertainty:
        from .burn_inputs import propagate

        def rerun(fuel_x, amount_x):
            return figure_values(_burn(fuel_x, ox, amount_x, data=data, source=source, **conditions))
        unc = propagate(figure_values(r), f, amount, o2_uncertainty, rerun)
    result = replace(r, flame=flame, amount_given=given, uncertainty=unc)
    # one dew point, computed once: the figure of the result travels with the wet flue gas
    products = replace(r.products, cautions=tuple(r.cautions), dew_point_K=r.dew_point.T_K,
                       dew_point_P_Pa=float(P_flue_Pa), _cache={})
    products_dry = None if r.products_dry is None else replace(r.products_dry, cautions=tuple(r.cautions),
                                                                _cache={})
    result = replace(result, products=products, products_dry=products_dry)
    # each flue gas knows the result that made it (documents print its combustion sheet)
    for sub in (products, products_dry):
        if sub is not None:
            object.__setattr__(sub, "origin", result)
    return result


def _burn(f: Fuel, ox: Oxidant, amount: dict, *, T_ref_K, T_meter_K, P_meter_Pa, T_fuel_K, T_oxidant_K,
          P_flue_Pa, data, source) -> CombustionResult:
    """The combustion calculation itself, for given fuel, oxidant, amount and conditions."""
    from ..thermo.build import mixture_substance
    T_ref = _num(T_ref_K, "combustion reference temperature (K)")
    if not any(abs(T_ref - v) < 0.01 for v in REFERENCE_TEMPERATURES_K.values()):
        raise RangeError(f"combustion reference temperature {T_ref:g} K is not one ISO 6976 allows; "
                         f"allowed: {', '.join(REFERENCE_TEMPERATURES_K)}")
    for nm, v in (("metering temperature", T_meter_K), ("metering pressure", P_meter_Pa),
                  ("fuel temperature", T_fuel_K), ("oxidant temperature", T_oxidant_K),
                  ("flue-gas pressure", P_flue_Pa)):
        _num(v, nm, lo=0.0, lo_open=True)

    o2_need = _oxygen_need(f.elements)
    if o2_need <= 0:
        raise InputError(f"fuel {f.id}: needs no oxygen (no C, H or S beyond its own O): nothing to burn")
    n_st = o2_need / ox.y_O2                          # mol oxidant per kg fuel, stoichiometric
    p0 = _products_at(f, ox, 0.0)
    wet0 = sum(p0.values())
    dry0 = wet0 - p0["H2O"]
    if "o2_dry" in amount:
        p1 = _products_at(f, ox, n_st)
        if sum(v for k, v in p1.items() if k not in ("H2O", "O2")) <= 1e-12 * sum(p1.values()):
            raise InputError("this dry flue gas would hold nothing but O2, so a dry O2 reading cannot fix "
                             "the amount of oxidant; give the wet O2, lambda or excess air")
    lam = _solve_air_ratio(**{k: amount.get(k) for k in AMOUNT_KEYS}, o2_need=o2_need, n_ox_st=n_st,
                           wet0=wet0, dry0=dry0, ox=ox)
    n_ox = lam * n_st
    prod = _products_at(f, ox, n_ox)
    if abs(prod["O2"]) <= LAMBDA_ROUNDOFF * o2_need:      # λ = 1: round-off of O2 need - supply
        prod["O2"] = 0.0
    elif prod["O2"] < 0:  # pragma: no cover - λ >= 1 is enforced above
        raise RangeError("oxidant short of stoichiometric; complete combustion needs lambda >= 1")
    prod = {k: prod[k] for k in PRODUCT_ORDER if prod.get(k, 0.0) > 0}
    N_wet = sum(prod.values())
    N_dry = N_wet - prod.get("H2O", 0.0)
    lib = _lib(data)
    recs = {k: lib.record(k, source=source) for k in prod}
    y_wet = {k: v / N_wet for k, v in prod.items()}
    has_dry = N_dry > 1e-12 * N_wet          # hydrogen in pure O2 at λ = 1 leaves water only
    y_dry = {k: v / N_dry for k, v in prod.items() if k != "H2O"} if has_dry else {}
    amount_key, amount_value = _given_amount(**{k: amount.get(k) for k in AMOUNT_KEYS})
    amount_text = f"{amount_key}={_g(amount_value)}"
    if f.spec and ox.spec:
        base_id = f"flue@{f.spec}@{amount_text}" + ("" if ox.spec == "air" else f"@{ox.spec}")
    else:
        base_id = f"flue gas of {f.id} with {ox.id} at {amount_text}"
    products = mixture_substance([(recs[k], v) for k, v in y_wet.items()], "mole", id=base_id,
                                 name=f"flue gas of {f.name} with {ox.name} at λ = {lam:.4g} (wet)",
                                 what="flue gas")
    products_dry = mixture_substance([(recs[k], v) for k, v in y_dry.items()], "mole",
                                     id=base_id + ("@dry" if base_id.startswith("flue@") else " (dry)"),
                                     name=f"flue gas of {f.name} with {ox.name} at λ = {lam:.4g} (dry)",
                                     what="dry flue gas") if has_dry else None

    notes = list(f.notes) + list(ox.notes)
    Vm = _normal_molar_volume(T_meter_K, P_meter_Pa)                    # m³/mol
    ratios, flue_gas = _quantities(f, ox, lam, n_st, o2_need, prod, recs, y_wet, y_dry, has_dry, products,
                                   products_dry, Vm)
    if f.kind == "gas":
        notes.append(f"volumes are ideal-gas normal volumes at {T_meter_K:g} K and {P_meter_Pa / 1000:g} kPa "
                     f"(no compression factor)")
    dew_point = _dew_point(y_wet, P_flue_Pa)
    heating_values = _heating_values(f, o2_need, T_ref, Vm, data, source, notes)
    T_ad = _flame(f, ox, n_ox, N_wet, products, T_fuel_K, T_oxidant_K, data, source, notes)
    flame = Flame(T_adiabatic_K=T_ad, T_fuel_K=float(T_fuel_K), T_oxidant_K=float(T_oxidant_K))
    cautions = combustion_cautions(f, prod, products, T_ad)
    return CombustionResult(fuel=f, oxidant=ox, air_ratio=lam, products=products, products_dry=products_dry,
                            moles_per_kg=prod, ratios=ratios, flue_gas=flue_gas, dew_point=dew_point,
                            heating_values=heating_values, flame=flame, metering_T_K=T_meter_K,
                            metering_P_Pa=P_meter_Pa, notes=notes, cautions=cautions)


def _quantities(f, ox, lam, n_st, o2_need, prod, recs, y_wet, y_dry, has_dry, products, products_dry,
                Vm) -> tuple[OxidantRatios, FlueGasQuantities]:
    """Oxidant/fuel ratios, flue-gas amounts and compositions (Vm: normal molar volume, m³/mol)."""
    n_ox = lam * n_st
    N_wet = sum(prod.values())
    N_dry = N_wet - prod.get("H2O", 0.0)
    m_wet = sum(v * recs[k].M for k, v in prod.items()) * 1e-3        # kg per kg fuel
    m_dry = m_wet - prod.get("H2O", 0.0) * recs["H2O"].M * 1e-3 if "H2O" in prod else m_wet
    if not has_dry:
        N_dry = m_dry = 0.0
    w_wet = {k: v * recs[k].M * 1e-3 / m_wet for k, v in prod.items()}
    w_dry = {k: v * recs[k].M * 1e-3 / m_dry for k, v in prod.items() if k != "H2O"} if has_dry else {}
    M_ox = ox.M * 1e-3
    molar = volume = per_m3_fuel = (None, None)
    if f.kind in ("gas", "formula"):
        Mf = f.M * 1e-3
        molar = (n_st * Mf, n_ox * Mf)
        if f.kind == "gas":                      # ideal gas: volume ratio = mole ratio
            volume, per_m3_fuel = (n_st * Mf, n_ox * Mf), (N_wet * Mf, N_dry * Mf)
    dry_stoich = n_st * (ox.M - ox.y_H2O * _M_H2O()) * 1e-3
    ratios = OxidantRatios(
        oxygen_stoich_mol_per_kg=o2_need, mass_stoich=n_st * M_ox, mass=n_ox * M_ox,
        mass_dry_oxidant_stoich=dry_stoich, mass_dry_oxidant=dry_stoich * lam,
        molar_stoich=molar[0], molar=molar[1], volume_stoich=volume[0], volume=volume[1],
        volume_m3_per_kg_stoich=n_st * Vm, volume_m3_per_kg=n_ox * Vm)
    flue_gas = FlueGasQuantities(
        mole_fractions_wet=y_wet, mole_fractions_dry=y_dry, mass_fractions_wet=w_wet, mass_fractions_dry=w_dry,
        mol_wet_per_kg=N_wet, mol_dry_per_kg=N_dry, kg_wet_per_kg=m_wet, kg_dry_per_kg=m_dry,
        m3_wet_per_kg=N_wet * Vm, m3_dry_per_kg=N_dry * Vm,
        m3_wet_per_m3_fuel=per_m3_fuel[0], m3_dry_per_m3_fuel=per_m3_fuel[1],
        M_wet_kg_per_kmol=products.M, M_dry_kg_per_kmol=products_dry.M if has_dry else None,
        ash_kg_per_kg=f.ash)
    return ratios, flue_gas


def _dew_point(y_wet: dict, P_flue_Pa: float) -> DewPoint:
    """The water dew point of the wet flue gas at the flue pressure (IAPWS-IF97 eq. 31)."""
    from ..thermo.saturation import water_dew_point_K
    yw = y_wet.get("H2O", 0.0)
    pw = yw * P_flue_Pa
    T_K = water_dew_point_K(yw, P_flue_Pa)
    if T_K is not None:
        note = "water dew point: IAPWS-IF97 saturation temperature (eq. 31) at the water partial pressure"
    else:
        note = (f"water partial pressure {pw:.4g} Pa is below 611.2 Pa: the dew point lies below "
                f"0 °C (frost point, not computed)")
    return DewPoint(T_K=T_K, flue_pressure_Pa=float(P_flue_Pa), water_partial_pressure_Pa=pw, note=note)


def _heating_values(f: Fuel, o2_need: float, T_ref: float, Vm: float, data, source, notes) -> HeatingValues:
    """LHV and HHV at the combustion reference temperature, per kg, mol and normal m³."""
    from ..thermo.saturation import h_vap_J_per_kg
    hf, e1 = f.h_J_per_kg(T_ref, data, source)
    h_o2, e2 = _h_molar("O2", T_ref, data, source)
    stoich_prod = _products_of_fuel_per_kg(f.elements, f.moisture)
    hp_vap, e3 = _h_products(stoich_prod, T_ref, data, source, liquid_water=False)
    hp_liq, _ = _h_products(stoich_prod, T_ref, data, source, liquid_water=True)
    h_react = hf + o2_need * h_o2
    lhv = h_react - hp_vap                                             # J/kg
    hhv = h_react - hp_liq
    dh_vap = float(h_vap_J_per_kg(T_ref))
    molar = volume = (None, None)
    if f.M is not None:
        Mf = f.M * 1e-3
        molar = (lhv * Mf, hhv * Mf)                                   # J/mol
    if f.kind == "gas":
        volume = (lhv * f.M * 1e-3 / Vm, hhv * f.M * 1e-3 / Vm)        # J/m³ (normal)
    notes.append(f"heating values at {T_ref:g} K from the enthalpies of formation of the data; water condensed "
                 f"with Δh_vap = {dh_vap / 1000:.2f} kJ/kg at {T_ref:g} K (Wagner & Pruss 1993 with Clapeyron)")
    if e1 or e2 or e3:
        notes.append("some species enthalpies were evaluated slightly below the lower end of their data "
                     "(SO2 and H2S data start at 300 K) with the lowest interval extrapolated")
    return HeatingValues(lhv_J_per_kg=lhv, hhv_J_per_kg=hhv, lhv_J_per_mol=molar[0], hhv_J_per_mol=molar[1],
                         lhv_J_per_m3=volume[0], hhv_J_per_m3=volume[1], h_vap_water_J_per_kg=dh_vap,
                         water_formed_kg_per_kg=stoich_prod["H2O"] * _M_H2O() * 1e-3, T_ref_K=T_ref)


def _flame(f: Fuel, ox: Oxidant, n_ox: float, N_wet: float, products, T_fuel_K, T_oxidant_K, data, source,
           notes) -> float | None:
    """Frozen adiabatic flame temperature, K (None above the data range of the products)."""
    hfu, e4 = f.h_J_per_kg(T_fuel_K, data, source)
    hox, e5 = ox.h_molar(T_oxidant_K, data, source)
    H = hfu + n_ox * hox                                                 # J per kg fuel
    h_lo, h_hi = products.properties(np.array([products.T_min, products.T_max]), molar_only=True)["h_molar"]
    if H / N_wet > h_hi:
        # e.g. rich in O2: the frozen temperature lies above the data; the rest of the result stands
        T_ad = None
        notes.append(f"the frozen adiabatic flame temperature lies above {products.T_max:g} K, the upper end "
                     f"of the flue-gas data, and is not given")
    elif H / N_wet < h_lo:
        raise RangeError(f"adiabatic flame temperature lies below the data range of the flue gas "
                         f"({products.T_min:g}-{products.T_max:g} K); check the inlet temperatures")
    else:
        T_ad = float(products.T_from("h_molar", np.array([H / N_wet]))[0])
    if f.kind != "gas" and f.cp is None and abs(T_fuel_K - f.T_h_ref) > 0.01:
        notes.append(f"fuel inlet temperature {T_fuel_K:g} K differs from {f.T_h_ref:g} K but the fuel cp is "
                     f"not given: its sensible heat is neglected in the flame temperature")
    if f.ash > 0:
        notes.append("ash is inert and takes up no heat in the flame temperature")
    if (e4 or e5) and not any("extrapolated" in n for n in notes):
        notes.append("some species enthalpies were evaluated slightly below the lower end of their data "
                     "(SO2 and H2S data start at 300 K) with the lowest interval extrapolated")
    return T_ad


def combustion_cautions(f: Fuel, prod: dict, products, T_ad: float | None) -> list:
    """The cautions that apply to this fuel and result, and only those.

    Sulfur and the acid dew point only where the fuel holds S; the hydrogen caution
    only where the fuel holds H2; the flame-temperature caution only where it applies.
    """
    burnt = ["all C burns to CO2" if f.elements.get("C") else "", "H to H2O" if f.elements.get("H") else "",
             "S to SO2" if f.elements.get("S") else "", "N to N2" if f.elements.get("N") else ""]
    burnt = [b for b in burnt if b]
    if burnt and not burnt[0].startswith("all"):
        burnt[0] = "all " + burnt[0]
    phrase = (", ".join(burnt[:-1]) + " and " + burnt[-1]) if len(burnt) > 1 else (burnt[0] if burnt else "")
    out = [f"Frozen complete combustion: {phrase}; no dissociation, and no CO, NOx or unburned fuel unless "
           f"the fuel itself contains them."]
    if T_ad is None:
        out.append(f"The frozen adiabatic flame temperature would lie above {products.T_max:g} K and is "
                   f"not given; dissociation (CO, H2, OH, O, H, NO) holds a real flame far below it.")
    elif T_ad > T_DISSOCIATION_WARN:
        out.append(f"The adiabatic flame temperature {T_ad:.0f} K is above {T_DISSOCIATION_WARN:.0f} K: "
                   f"dissociation (CO, H2, OH, O, H, NO) would lower it, so the frozen value is an upper bound.")
    if "SO2" in prod:
        out.append(CAUTION_SULFUR)
    y_h2 = f.composition.get("H2", 0.0)
    if y_h2 > 0:
        out.append(f"The fuel contains hydrogen (H2 {y_h2 * 100:.4g} % by volume): hydrogen flames burn several "
                   f"times faster than natural-gas flames (laminar burning velocity about 2 m/s in stoichiometric "
                   f"air against about 0.4 m/s for methane), so flashback is more likely, and they are nearly "
                   f"invisible in daylight; burners, flame detection and flashback protection must be rated for "
                   f"this hydrogen content.")
    out += [CAUTION_TOXIC, CAUTION_CODES]
    return out


def result_for(substance) -> CombustionResult | None:
    """The combustion result behind a flue-gas Substance (its ``origin``), or None for other substances.

    Documents that tabulate a substance call this to print the combustion cautions and
    figures with it.
    """
    origin = getattr(substance, "origin", None)
    return origin if isinstance(origin, CombustionResult) else None


def cautions_for(substance) -> list | None:
    """The cautions to print with a flue-gas Substance, or None if it is not one."""
    if getattr(substance, "cautions", ()):
        return list(substance.cautions)
    r = result_for(substance)
    return None if r is None else list(r.cautions)
