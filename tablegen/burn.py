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
  temperature (Wagner & Pruss 1993, see tablegen.saturation).
* A fuel given by ultimate analysis or formula has no polynomial: its heating
  value (HHV or LHV, on the basis of the analysis) or its enthalpy of formation
  must be given; the fuel's enthalpy is then h(T) = h(T_hv) + cp (T - T_hv) with
  cp given by the user or, if not given, zero (stated in the notes).
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass, field, replace
from functools import lru_cache
from pathlib import Path

import numpy as np

from .composition import colon_form_fix, looks_like as is_composition, parse as parse_composition, \
    write as write_composition
from .errors import NameLookupError, RangeError, SpecError, TablegenError
from .thermo.substance import R_MOLAR, T_REF

#: Elements a fuel may contain; noble gases pass through as themselves.
BURNING = ("C", "H", "O", "N", "S")
NOBLE = ("Ar", "He", "Ne", "Kr", "Xe")
#: Species an oxidant may contain (each leaves the flame as itself).
OXIDANT_SPECIES = ("O2", "N2", "Ar", "He", "Ne", "Kr", "Xe", "H2O", "CO2")
#: Product species of complete combustion, in the order they are listed.
PRODUCT_ORDER = ("CO2", "H2O", "SO2", "N2", "O2", "Ar", "He", "Ne", "Kr", "Xe")
#: Combustion reference temperatures ISO 6976 allows, K (15.55 °C is 60 °F).
REFERENCE_TEMPERATURES_K = {"25 °C": 298.15, "20 °C": 293.15, "15.55 °C (60 °F)": 288.705555555556,
                            "15 °C": 288.15, "0 °C": 273.15}
#: Default metering (normal) conditions for volumes: 0 °C, 101.325 kPa (common practice, DIN 1343).
T_NORMAL = 273.15
P_NORMAL = 101325.0
#: Frozen flame temperatures above this are flagged as upper bounds (dissociation).
T_DISSOCIATION_WARN = 2000.0
#: Flue-gas O2 and λ: λ this far below 1 is treated as round-off of λ = 1.
LAMBDA_ROUNDOFF = 1e-12

CAUTIONS = (
    "Frozen complete combustion: all C burns to CO2, H to H2O, S to SO2 and N to N2; no "
    "dissociation, and no CO, NOx or unburned fuel unless the fuel itself contains them.",
    "The acid dew point of flue gas from a sulfur-bearing fuel (SO3/H2SO4 condensing) lies well "
    "above the water dew point given here and is not computed.",
    "Flue gas is toxic and asphyxiant: keep it out of occupied spaces, and never rely on these "
    "figures for ventilation or exposure limits.",
    "These are engineering estimates: for boiler, burner, flue and stack design defer to local "
    "codes and licensed engineering practice.",
)


# ============================================================== data access
def _lib(data):
    from .data.library import library
    return library(tuple(data))


def _record(sid: str, data=(), source=None, what="species"):
    try:
        return _lib(data).record(sid, source=source)
    except NameLookupError as e:
        raise NameLookupError(f"{what}: {e}") from None


@lru_cache(maxsize=256)
def _species_sub(sid: str, data: tuple, source):
    from .thermo.build import species_substance
    return species_substance(_record(sid, data, source))


#: How far below the lowest data temperature an enthalpy may be extrapolated, K. SO2 and H2S
#: data of NASA TM-4513 start at 300 K; 30 K reaches the 0 °C reference temperature. The lowest
#: interval's cp varies by well under 1 % over 30 K there, so h moves by < 1 J/mol per K of that.
EXTRAPOLATE_BELOW_K = 30.0


def _h_molar(sid: str, T_K: float, data=(), source=None) -> tuple[float, bool]:
    """Molar enthalpy (formation datum), J/mol, and whether T lies outside the data range."""
    sub = _species_sub(sid, tuple(data), source)
    if not (sub.T_min - EXTRAPOLATE_BELOW_K <= T_K <= sub.T_max):
        raise RangeError(f"{sid}: T = {T_K:g} K is outside its data range {sub.T_min:g}-{sub.T_max:g} K; "
                         f"allowed inlet and reference temperatures: {sub.T_min - EXTRAPOLATE_BELOW_K:g} to "
                         f"{sub.T_max:g} K")
    p = sub.properties(np.array([float(T_K)]), extrapolate=True, molar_only=True)
    return float(p["h_molar"][0]), bool(p["extrapolated"][0])


def _weights(data=()):
    return _lib(data).weights.weights


def _num(v, what: str, *, lo=None, hi=None, lo_open=False) -> float:
    if isinstance(v, bool):
        raise TablegenError(f"{what} must be a number, got {v!r}")
    try:
        x = float(v)
    except (TypeError, ValueError):
        raise TablegenError(f"{what} must be a number, got {v!r}") from None
    if not math.isfinite(x):
        raise TablegenError(f"{what} must be finite, got {v!r}")
    if lo is not None and (x < lo or (lo_open and x <= lo)):
        raise TablegenError(f"{what} = {x:g} is too small; allowed: {'>' if lo_open else '>='} {lo:g}"
                            + (f" and <= {hi:g}" if hi is not None else ""))
    if hi is not None and x > hi:
        raise TablegenError(f"{what} = {x:g} is too large; allowed: <= {hi:g}")
    return x


def _qty(v, dimension: str, what: str, default_unit: str) -> float:
    """A quantity as a number (in default_unit) or a string with a unit."""
    from .units import quantity, unit
    if isinstance(v, str):
        try:
            return quantity(v, dimension, what)
        except TablegenError:
            try:
                return unit(default_unit, dimension).to_si(float(v))
            except ValueError:
                raise TablegenError(f"{what} {v!r} is not a number with a unit; write e.g. "
                                    f"\"42.5 {default_unit}\" (a plain number is {default_unit})") from None
    return unit(default_unit, dimension).to_si(_num(v, what))


def _fractions(raw, what: str, *, normalise_loose: bool = False) -> tuple[dict, bool]:
    """Fractions summing to 1, or percentages summing to 100 (within 1e-6 relative).

    Returns (fractions summing to 1, given_in_percent). With ``normalise_loose``
    sums within 1 % of 1 or 100 are normalised (an analysis rounded by the lab).
    """
    if not isinstance(raw, dict) or not raw:
        raise TablegenError(f"{what}: give a table of species and fractions, e.g. {{CH4 = 0.9, N2 = 0.1}}")
    out = {}
    for k, v in raw.items():
        out[str(k)] = _num(v, f"{what}.{k}", lo=0.0)
    total = sum(out.values())
    tol = 1e-2 if normalise_loose else 1e-6
    for scale in (1.0, 100.0):
        if abs(total - scale) <= tol * scale:
            return {k: v / total for k, v in out.items()}, scale == 100.0
    loose = "" if normalise_loose else " (set normalise = true to accept sums within 1 %)"
    raise TablegenError(f"{what}: fractions sum to {total:.9g}; they must sum to 1, or to 100 "
                        f"for percentages{loose}")


# ==================================================================== fuels
@dataclass(frozen=True, slots=True, eq=False)
class Fuel:
    """A fuel as fired, reduced to what combustion needs.

    Amounts are per kg of fuel as fired: ``elements`` (mol/kg) of the part that
    enters the flame as gas or combustible matter, ``moisture`` (mol/kg of
    liquid water, analysis fuels only), ``ash`` (kg/kg, inert solid).
    """

    id: str
    name: str
    kind: str                    # "gas", "analysis" or "formula"
    elements: dict               # element -> mol per kg of fuel as fired
    moisture: float = 0.0        # mol liquid H2O per kg of fuel
    ash: float = 0.0             # kg per kg
    M: float | None = None       # g/mol (gas mixture, or one formula unit)
    gas: object = None           # Substance of a gaseous fuel
    composition: dict = field(default_factory=dict)   # gas: species -> mole fraction
    h_ref: float | None = None   # J/kg of fuel as fired at T_h_ref (analysis, formula)
    T_h_ref: float = T_REF
    cp: float | None = None      # J/(kg K), analysis and formula fuels, if given
    phase: str = "gas"
    analysis: dict = field(default_factory=dict)       # bases -> mass fractions (analysis fuels)
    notes: tuple = ()
    spec: str | None = None      # text that re-creates this fuel (for flue@ names), if any

    def h_J_per_kg(self, T_K: float, data=(), source=None) -> tuple[float, bool]:
        """Enthalpy of the fuel as fired at T (formation datum), J/kg; and 'extrapolated'."""
        if self.kind == "gas":
            h, ext = 0.0, False
            for sid, y in self.composition.items():
                hm, e = _h_molar(sid, T_K, data, source)
                h += y * hm
                ext = ext or e
            return h / (self.M * 1e-3), ext
        return self.h_ref + (self.cp or 0.0) * (T_K - self.T_h_ref), False

    def describe(self) -> dict:
        d = {"id": self.id, "name": self.name, "kind": self.kind, "phase": self.phase,
             "elements_mol_per_kg": dict(self.elements), "moisture_mass_fraction":
                 self.moisture * _M_H2O() * 1e-3, "ash_mass_fraction": self.ash}
        if self.M is not None:
            d["M"] = self.M
        if self.composition:
            d["composition_mole"] = dict(self.composition)
        if self.analysis:
            d["analysis"] = {k: dict(v) for k, v in self.analysis.items()}
        return d


@lru_cache(maxsize=None)
def _M_H2O() -> float:
    return _record("H2O").M


def _oxygen_need(el: dict) -> float:
    """mol O2 per kg for complete combustion: C + H/4 + S - O/2."""
    return el.get("C", 0.0) + el.get("H", 0.0) / 4 + el.get("S", 0.0) - el.get("O", 0.0) / 2


def gas_fuel(composition: dict, basis: str = "mole", *, water_percent: float = 0.0, name=None,
             id=None, data=(), source=None, what="fuel", normalise=False) -> Fuel:
    """A gaseous fuel by species.

    Parameters
    ----------
    composition : species -> fraction (or percent)
    basis : "mole", "mass", "volume-dry" or "volume-wet" (ideal gas: volume = mole)
    water_percent : with "volume-dry", the H2O content of the wet gas in % by volume
    """
    bases = ("mole", "mass", "volume-dry", "volume-wet")
    if basis not in bases:
        raise TablegenError(f"{what}.basis {basis!r} is not known; allowed: {', '.join(bases)}")
    fr, _ = _fractions(composition, f"{what}.composition", normalise_loose=normalise)
    recs = {}
    for k in fr:
        rec = _record(k, data, source, what=f"{what}.composition.{k}")
        if rec.id in recs:
            raise TablegenError(f"{what}.composition: species {rec.id!r} is given twice")
        bad = [e for e in rec.elements if e not in BURNING + NOBLE]
        if bad:
            raise TablegenError(f"{what}.composition.{k}: element {bad[0]} is not handled; fuel "
                                f"species may contain only {', '.join(BURNING + NOBLE)}")
        recs[rec.id] = (rec, fr[k])
    if basis == "mass":
        n = {sid: w / r.M for sid, (r, w) in recs.items()}
        tot = sum(n.values())
        y = {sid: v / tot for sid, v in n.items()}
    else:
        y = {sid: x for sid, (r, x) in recs.items()}
    notes = []
    wp = _num(water_percent, f"{what}.water_percent", lo=0.0, hi=100.0)
    if wp > 0:
        if basis != "volume-dry":
            raise TablegenError(f"{what}.water_percent is only for basis = \"volume-dry\"; "
                                f"with other bases list H2O in the composition")
        if "H2O" in y:
            raise TablegenError(f"{what}: a dry analysis cannot list H2O; give the water as water_percent")
        yw = wp / 100.0
        y = {k: v * (1 - yw) for k, v in y.items()}
        y["H2O"] = yw
        recs["H2O"] = (_record("H2O", data, source), yw)
        notes.append(f"dry analysis converted to wet gas with {wp:g} % by volume H2O")
    y = {k: v for k, v in y.items() if v > 0}
    if not y:
        raise TablegenError(f"{what}: every fraction is zero")
    M = sum(v * recs[k][0].M for k, v in y.items())
    el: dict = {}
    for sid, v in y.items():
        for e, n in recs[sid][0].elements.items():
            el[e] = el.get(e, 0.0) + v * n / (M * 1e-3)
    from .thermo.build import mixture_substance
    gas = mixture_substance([(recs[k][0], v) for k, v in y.items()], "mole",
                            id=id or write_composition(y, digits=6), what=what)
    fid = id or gas.id
    return Fuel(id=fid, name=name or fid, kind="gas", elements=el, M=M, gas=gas, composition=y,
                notes=tuple(notes))


_FORMULA = re.compile(r"([A-Z][a-z]?)(\d+(?:\.\d*)?|\.\d+)?")


def parse_formula(text: str, what: str = "formula") -> dict:
    """'C12H23' or 'CH1.8O0.5N0.01' -> {element: count}; only C, H, O, N, S."""
    t = str(text).strip()
    if not t or "".join(m.group(0) for m in _FORMULA.finditer(t)) != t:
        raise TablegenError(f"{what} {text!r} is not a formula; write e.g. C12H23 or CH1.8O0.5 "
                            f"(elements {', '.join(BURNING)})")
    out: dict = {}
    for m in _FORMULA.finditer(t):
        e, n = m.group(1), float(m.group(2)) if m.group(2) else 1.0
        if e not in BURNING:
            raise TablegenError(f"{what} {text!r}: element {e} is not handled; allowed: {', '.join(BURNING)}")
        out[e] = out.get(e, 0.0) + n
    return out


#: Analysis keys and bases for fuels given by ultimate analysis.
ANALYSIS_KEYS = ("C", "H", "O", "N", "S", "moisture", "ash")
ANALYSIS_BASES = ("as-received", "dry", "daf")


def _convert_analysis(an: dict, basis: str, moisture, ash, what: str) -> dict:
    """Ultimate analysis on any basis -> {as-received, dry, daf} mass fractions."""
    an = {k: _num(v, f"{what}.analysis.{k}", lo=0.0, hi=1.0) for k, v in an.items()}
    for k in an:
        if k not in ANALYSIS_KEYS:
            raise TablegenError(f"{what}.analysis.{k} is not known; allowed: {', '.join(ANALYSIS_KEYS)} "
                                f"(mass fractions)")
    organic = {k: an.get(k, 0.0) for k in BURNING}
    if basis == "as-received":
        if moisture is not None or ash is not None:
            raise TablegenError(f"{what}: on the as-received basis give moisture and ash inside the analysis")
        M, A = an.get("moisture", 0.0), an.get("ash", 0.0)
        total = sum(organic.values()) + M + A
        ar = {**organic, "moisture": M, "ash": A}
    elif basis == "dry":
        if "moisture" in an:
            raise TablegenError(f"{what}: a dry analysis has no moisture; give the as-received moisture "
                                f"as {what}.moisture")
        if ash is not None:
            raise TablegenError(f"{what}: on the dry basis give ash inside the analysis")
        A_d = an.get("ash", 0.0)
        total = sum(organic.values()) + A_d
        M = _num(moisture or 0.0, f"{what}.moisture", lo=0.0, hi=0.99)
        ar = {k: v * (1 - M) for k, v in organic.items()}
        ar.update(moisture=M, ash=A_d * (1 - M))
    else:
        if "moisture" in an or "ash" in an:
            raise TablegenError(f"{what}: a daf analysis has no moisture or ash; give the as-received "
                                f"moisture as {what}.moisture and the dry-basis ash as {what}.ash")
        total = sum(organic.values())
        M = _num(moisture or 0.0, f"{what}.moisture", lo=0.0, hi=0.99)
        A_d = _num(ash or 0.0, f"{what}.ash", lo=0.0, hi=0.99)
        f = (1 - M) * (1 - A_d)
        ar = {k: v * f for k, v in organic.items()}
        ar.update(moisture=M, ash=A_d * (1 - M))
    if abs(total - 1.0) > 1e-3:
        raise TablegenError(f"{what}.analysis ({basis}) sums to {total:.6g}; mass fractions on that "
                            f"basis must sum to 1 within 0.001")
    s = sum(ar.values())
    ar = {k: v / s for k, v in ar.items()}
    dry = {k: v / (1 - ar["moisture"]) for k, v in ar.items() if k != "moisture"}
    daf_tot = sum(ar[k] for k in BURNING)
    if daf_tot <= 0:
        raise TablegenError(f"{what}.analysis has no C, H, O, N or S: nothing to burn")
    daf = {k: ar[k] / daf_tot for k in BURNING}
    return {"as-received": ar, "dry": dry, "daf": daf}


def _products_of_fuel_per_kg(el: dict, moisture: float) -> dict:
    """Products (mol/kg of fuel) of burning exactly with the O2 needed: water all vapour."""
    out = {"CO2": el.get("C", 0.0), "H2O": el.get("H", 0.0) / 2 + moisture, "SO2": el.get("S", 0.0),
           "N2": el.get("N", 0.0) / 2}
    for g in NOBLE:
        if el.get(g):
            out[g] = el[g]
    return out


def _h_products(prod: dict, T_K: float, data, source, *, liquid_water: bool) -> tuple[float, bool]:
    """Σ n h(T) of products (J per kg fuel); water liquid or vapour."""
    from .saturation import h_vap_J_per_kg
    tot, ext = 0.0, False
    for sid, n in prod.items():
        if n == 0:
            continue
        h, e = _h_molar(sid, T_K, data, source)
        if sid == "H2O" and liquid_water:
            h -= float(h_vap_J_per_kg(T_K)) * _M_H2O() * 1e-3
        tot += n * h
        ext = ext or e
    return tot, ext


def condensed_fuel(*, formula=None, basis="as-received", analysis=None,
                   moisture=None, ash=None, hhv=None, lhv=None, h_formation=None, hv_T_ref=T_REF,
                   cp=None, phase="liquid", name=None, id=None, data=(), source=None,
                   what="fuel") -> Fuel:
    """A liquid or solid fuel by ultimate analysis or formula, with its heating value.

    Parameters
    ----------
    analysis : mass fractions C, H, O, N, S (and moisture, ash on the as-received basis)
    formula : "CxHyOzNwSv" instead of an analysis
    basis : "as-received", "dry" or "daf" (dry, ash-free); heating values are on this basis
    moisture : as-received moisture (dry and daf bases), mass fraction
    ash : dry-basis ash (daf basis), mass fraction
    hhv, lhv : J/kg on ``basis``, at ``hv_T_ref``; or h_formation (J/kg of fuel as
        fired, J/mol for a formula) at hv_T_ref
    cp : J/(kg K) of the fuel as fired, for sensible enthalpy (else neglected)
    """
    W = _weights(data)
    M_formula = None
    if formula is not None:
        if analysis is not None:
            raise TablegenError(f"{what}: give a formula or an analysis, not both")
        counts = parse_formula(formula, f"{what}.formula")
        M_formula = sum(W[e] * n for e, n in counts.items())
        mass = {e: W[e] * n / M_formula for e, n in counts.items()}
        if moisture or ash:
            raise TablegenError(f"{what}: a formula fuel has no moisture or ash; use an analysis for those")
        bases = {"as-received": {**{k: mass.get(k, 0.0) for k in BURNING}, "moisture": 0.0, "ash": 0.0}}
        basis = "as-received"
        kind = "formula"
    else:
        if not isinstance(analysis, dict):
            raise TablegenError(f"{what}: give composition (gas species), analysis (mass fractions of "
                                f"C, H, O, N, S, moisture, ash) or formula")
        if basis not in ANALYSIS_BASES:
            raise TablegenError(f"{what}.basis {basis!r} is not known for an analysis; allowed: "
                                f"{', '.join(ANALYSIS_BASES)}")
        bases = _convert_analysis(analysis, basis, moisture, ash, what)
        kind = "analysis"
    ar = bases["as-received"]
    el = {e: ar.get(e, 0.0) / (W[e] * 1e-3) for e in BURNING if ar.get(e, 0.0) > 0}
    mw = ar["moisture"] / (_M_H2O() * 1e-3)
    if _oxygen_need(el) <= 0:
        raise TablegenError(f"{what}: the fuel needs no oxygen (it holds as much O as its C, H and S "
                            f"can take): nothing to burn")
    # mass of the basis-b material per kg as fired, and its water per kg of basis material
    per_kg_ar = {"as-received": 1.0, "dry": 1 - ar["moisture"], "daf": sum(ar[k] for k in BURNING)}[basis]
    given = [k for k, v in (("hhv", hhv), ("lhv", lhv), ("h_formation", h_formation)) if v is not None]
    if len(given) != 1:
        raise TablegenError(f"{what}: a fuel given by {'formula' if formula else 'analysis'} needs exactly one "
                            f"of hhv, lhv or h_formation (its enthalpy is not in the data); got "
                            f"{', '.join(given) or 'none'}")
    T_hv = float(hv_T_ref)
    prod = _products_of_fuel_per_kg(el, mw)
    o2 = _oxygen_need(el)
    h_o2, _ = _h_molar("O2", T_hv, data, source)
    from .saturation import h_vap_J_per_kg
    dh_vap = float(h_vap_J_per_kg(T_hv))
    notes = []
    if h_formation is not None:
        hf = float(h_formation)
        h_ref = hf / (M_formula * 1e-3) if formula is not None else hf
        notes.append(f"enthalpy of formation of the fuel given: {h_ref / 1e6:.6g} MJ/kg at {T_hv:g} K")
    else:
        hp_liq, _ = _h_products(prod, T_hv, data, source, liquid_water=True)
        if hhv is not None:
            hhv_ar = float(hhv) * per_kg_ar
        else:
            # water formed per kg of basis material: as received it includes the moisture
            water_b = prod["H2O"] if basis == "as-received" else (prod["H2O"] - mw) / per_kg_ar
            hhv_b = float(lhv) + dh_vap * water_b * _M_H2O() * 1e-3
            hhv_ar = hhv_b * per_kg_ar
        if hhv_ar <= 0:
            raise TablegenError(f"{what}: the heating value must be positive")
        h_ref = hhv_ar + hp_liq - o2 * h_o2          # HHV = h_fuel + n_O2 h_O2 - Σ n h(products, liquid water)
        notes.append(f"fuel enthalpy derived from the given {given[0].upper()} "
                     f"(per kg{'' if kind == 'formula' else ' ' + basis}) at {T_hv:g} K")
    if cp is None:
        notes.append("fuel cp not given: its sensible enthalpy is neglected (h(T) = h at the heating "
                     "value's reference temperature)")
    else:
        cp = _num(cp, f"{what}.cp", lo=0.0)
    fid = id or (str(formula) if formula else f"fuel ({kind})")
    analysis_out = bases if kind == "analysis" else {}
    return Fuel(id=fid, name=name or fid, kind=kind, elements=el, moisture=mw, ash=ar["ash"],
                M=M_formula, h_ref=h_ref, T_h_ref=T_hv, cp=cp, phase=phase, analysis=analysis_out,
                notes=tuple(notes))


FUEL_KEYS = ("name", "id", "composition", "basis", "water_percent", "normalise", "analysis", "formula",
             "moisture", "ash", "hhv", "lhv", "h_formation", "hv_reference_temperature", "cp", "phase")


def _check_texts(t: dict, where: str) -> None:
    """The name and id of a fuel or flue gas: one line of text, printed in documents."""
    from .texts import bad_character, one_line_rule
    for k in ("name", "id"):
        v = t.get(k)
        if v is None:
            continue
        if not isinstance(v, str) or len(v) > 200:
            raise SpecError(f"{where}.{k}: must be a text of at most 200 characters")
        if bad_character(v):
            raise SpecError(f"{where}.{k}: {one_line_rule()} (it holds {bad_character(v)})")


def fuel_from_table(t: dict, where: str = "fuel", *, data=(), source=None) -> Fuel:
    """A fuel from a spec table (TOML): keys in FUEL_KEYS; errors name the key path."""
    if not isinstance(t, dict):
        raise SpecError(f"{where}: must be a table (composition, analysis or formula)")
    for k in t:
        if k not in FUEL_KEYS:
            raise SpecError(f"{where}.{k} is not known; allowed: {', '.join(FUEL_KEYS)}")
    _check_texts(t, where)
    from .units import temperature_K
    try:
        if "composition" in t:
            for k in ("analysis", "formula", "hhv", "lhv", "h_formation", "cp"):
                if k in t:
                    raise TablegenError(f"{where}.{k}: a gas fuel by composition takes its enthalpy "
                                        f"from the species data; remove {k}")
            return gas_fuel(t["composition"], t.get("basis", "mole"), water_percent=t.get("water_percent", 0.0),
                            name=t.get("name"), id=t.get("id"), data=data, source=source, what=where,
                            normalise=bool(t.get("normalise", False)))
        if "water_percent" in t or "normalise" in t:
            raise TablegenError(f"{where}: water_percent and normalise belong to gas fuels (composition)")
        T_hv = temperature_K(str(t.get("hv_reference_temperature", "25C")),
                             f"{where}.hv_reference_temperature")
        mol = "formula" in t
        kw = {}
        for k in ("hhv", "lhv"):
            if k in t:
                kw[k] = _qty(t[k], "specific_energy", f"{where}.{k}", "MJ/kg")
        if "h_formation" in t:
            kw["h_formation"] = _qty(t["h_formation"], "molar_energy" if mol else "specific_energy",
                                     f"{where}.h_formation", "kJ/mol" if mol else "MJ/kg")
        if "cp" in t:
            kw["cp"] = _qty(t["cp"], "specific_entropy", f"{where}.cp", "kJ/(kg K)")
        phase = t.get("phase", "liquid")
        if phase not in ("liquid", "solid"):
            raise TablegenError(f"{where}.phase {phase!r} is not known; allowed: liquid, solid")
        return condensed_fuel(formula=t.get("formula"), analysis=t.get("analysis"),
                              basis=t.get("basis", "as-received"), moisture=t.get("moisture"),
                              ash=t.get("ash"), hv_T_ref=T_hv, phase=phase, name=t.get("name"),
                              id=t.get("id"), data=data, source=source, what=where, **kw)
    except SpecError:
        raise
    except TablegenError as e:
        raise SpecError(str(e) if str(e).startswith(where) else f"{where}: {e}") from None


def fuel_from_text(text: str, *, data=(), source=None) -> Fuel:
    """--fuel: a composition ('CH4=0.9,C2H6=0.06,N2=0.04', 'CH4=90%,...', 'basis=mass,...';
    tablegen.composition), a species name, or a TOML file."""
    t = str(text).strip()
    if not t:
        raise TablegenError("fuel is empty; give a composition (CH4=0.9,N2=0.1), a species or a TOML file")
    p = Path(t)
    if t.lower().endswith(".toml") or (p.is_file() and not is_composition(t)):
        if not p.is_file():
            raise TablegenError(f"fuel file {t!r} does not exist")
        from . import tomlread
        raw = tomlread.read(p, f"fuel file {t}", SpecError)
        table = raw.get("fuel", raw) if isinstance(raw.get("fuel"), dict) else raw
        f = fuel_from_table(table, f"{p.name}:fuel" if "fuel" in raw else p.name, data=data, source=source)
        return replace(f, spec=t if "@" not in t else None)
    if "@" in t:
        raise TablegenError(f"fuel {t!r}: '@' is not allowed in a fuel text (it separates the parts of flue-gas names)")
    if is_composition(t):
        c = parse_composition(t, "fuel")
        f = gas_fuel(c.fractions, c.basis, id=t, data=data, source=source)
    else:
        f = gas_fuel({t: 1.0}, "mole", id=t, name=t, data=data, source=source)
    return replace(f, spec=t)


# ================================================================ oxidants
@dataclass(frozen=True, slots=True, eq=False)
class Oxidant:
    """An oxidant as supplied: composition (mole fractions), humidity ratio."""

    id: str
    name: str
    composition: dict
    M: float
    humidity_ratio: float = 0.0        # kg H2O / kg dry oxidant
    notes: tuple = ()
    spec: str | None = None            # text that re-creates this oxidant (for flue@ names), if any

    @property
    def y_O2(self) -> float:
        return self.composition.get("O2", 0.0)

    @property
    def y_H2O(self) -> float:
        return self.composition.get("H2O", 0.0)

    def h_molar(self, T_K, data=(), source=None) -> tuple[float, bool]:
        h, ext = 0.0, False
        for sid, y in self.composition.items():
            hm, e = _h_molar(sid, T_K, data, source)
            h += y * hm
            ext = ext or e
        return h, ext

    def describe(self) -> dict:
        return {"id": self.id, "name": self.name, "composition_mole": dict(self.composition), "M": self.M,
                "humidity_ratio": self.humidity_ratio, "O2_mole_fraction": self.y_O2}


OXIDANT_KEYS = ("base", "composition", "o2_percent", "relative_humidity", "temperature", "pressure",
                "humidity_ratio", "name")


def make_oxidant(*, base="air", composition=None, o2_percent=None, relative_humidity=None,
                 temperature_K=None, pressure_Pa=P_NORMAL, humidity_ratio=None, name=None,
                 data=(), source=None, what="oxidant") -> Oxidant:
    """Dry, humid or O2-enriched air, or an O2-bearing mixture.

    Parameters
    ----------
    base : "air" (the shipped dry-air composition) or "oxygen"; ignored with composition
    composition : species -> mole fraction of the dry oxidant (O2, N2, Ar, He, Ne, Kr, Xe, CO2)
    o2_percent : enrich the dry base with pure O2 up to this O2 content, % by volume
    relative_humidity : %, with temperature_K and pressure_Pa; water saturation
        pressure from IAPWS-IF97 (tablegen.saturation.p_sat_Pa), 0-100 °C
    humidity_ratio : kg water per kg dry oxidant, instead of relative_humidity
    """
    from .api import shipped_mixtures
    from .data.library import norm_name
    notes = []
    if composition is not None:
        dry, _ = _fractions(composition, f"{what}.composition")
        label = write_composition(dry, digits=4)
    else:
        b = norm_name(str(base))
        if b in ("oxygen", "o2"):
            dry, label = {"O2": 1.0}, "oxygen"
        else:
            m = shipped_mixtures().get(b)
            if m is None or m["id"] != "air":
                raise TablegenError(f"{what}.base {base!r} is not known; allowed: air, oxygen (or give a composition)")
            dry, label = dict(m["components"]), "dry air"
            tot = sum(dry.values())
            dry = {k: v / tot for k, v in dry.items()}
            notes.append("dry air of the shipped composition ("
                         + ", ".join(f"{k} {v:g}" for k, v in m["components"].items()) + ", mole fractions)")
    recs = {}
    for k in list(dry):
        rec = _record(k, data, source, what=f"{what}.composition.{k}")
        if rec.id not in OXIDANT_SPECIES or rec.id == "H2O":
            raise TablegenError(f"{what}.composition.{k}: not an oxidant species; allowed: "
                                f"{', '.join(s for s in OXIDANT_SPECIES if s != 'H2O')} "
                                f"(give water as relative_humidity or humidity_ratio)")
        if rec.id in recs:
            raise TablegenError(f"{what}.composition: species {rec.id!r} is given twice")
        recs[rec.id] = rec
        dry[rec.id] = dry.pop(k)
    if o2_percent is not None:
        z = _num(o2_percent, f"{what}.o2_percent", lo=0.0, hi=100.0) / 100.0
        y0 = dry.get("O2", 0.0)
        if z < y0 - 1e-12:
            raise TablegenError(f"{what}.o2_percent = {z * 100:g} is below the O2 content of the base "
                                f"({y0 * 100:.4g} %); enrichment adds O2: allowed {y0 * 100:.4g} to 100")
        a = (1 - z) / (1 - y0) if y0 < 1 else 1.0   # share of base gas, rest pure O2
        dry = {k: v * a for k, v in dry.items()}
        dry["O2"] = dry.get("O2", 0.0) + (1 - a)
        recs.setdefault("O2", _record("O2", data, source))
        label += f", O2-enriched to {z * 100:g} %"
        notes.append(f"enriched with pure O2 to {z * 100:g} % O2 by volume (dry)")
    if dry.get("O2", 0.0) <= 0:
        raise TablegenError(f"{what}: contains no O2; an oxidant needs oxygen")
    M_dry = sum(v * recs[k].M for k, v in dry.items())
    M_w = _M_H2O()
    w = 0.0
    if relative_humidity is not None and humidity_ratio is not None:
        raise TablegenError(f"{what}: give relative_humidity or humidity_ratio, not both")
    if relative_humidity is not None:
        from .saturation import p_sat_Pa
        rh = _num(relative_humidity, f"{what}.relative_humidity", lo=0.0, hi=100.0) / 100.0
        if temperature_K is None:
            raise TablegenError(f"{what}: relative humidity needs the air temperature (T=...)")
        T = float(temperature_K)
        if not 273.15 <= T <= 373.15:
            raise TablegenError(f"{what}: relative humidity is taken over liquid water between 0 °C and "
                                f"100 °C; T = {T - 273.15:g} °C is outside; give a humidity ratio instead")
        P = _num(pressure_Pa, f"{what}.pressure", lo=0.0, lo_open=True)
        pw = rh * float(p_sat_Pa(T))
        if pw >= P:
            raise TablegenError(f"{what}: water vapour pressure {pw:g} Pa reaches the total pressure {P:g} Pa")
        yw = pw / P
        w = yw / (1 - yw) * M_w / M_dry
        label += f", RH {rh * 100:g} % at {T - 273.15:g} °C and {P / 1000:g} kPa"
        notes.append(f"humid: RH {rh * 100:g} % at {T - 273.15:g} °C, {P / 1000:g} kPa; saturation pressure "
                     f"of water from IAPWS-IF97 region 4 (eq. 30): {pw / rh if rh else float(p_sat_Pa(T)):.6g} Pa; "
                     f"humidity ratio {w:.6g} kg/kg")
    elif humidity_ratio is not None:
        w = _num(humidity_ratio, f"{what}.humidity_ratio", lo=0.0, hi=10.0)
        label += f", humidity ratio {w:g} kg/kg"
        notes.append(f"humid: humidity ratio {w:g} kg water per kg dry gas")
    r = w * M_dry / M_w
    yw = r / (1 + r)
    comp = {k: v * (1 - yw) for k, v in dry.items()}
    if yw > 0:
        comp["H2O"] = yw
        recs["H2O"] = _record("H2O", data, source)
    M = sum(v * recs[k].M for k, v in comp.items())
    opts = [f"{k}={_g(v)}{unit}" for k, v, unit in (("O2", o2_percent, "%"), ("rh", relative_humidity, "%"),
                                                     ("w", humidity_ratio, "kg/kg")) if v is not None]
    if relative_humidity is not None:
        opts += [f"T={_g(float(temperature_K))}K", f"P={_g(float(pressure_Pa))}Pa"]
    if composition is None:
        spec = ",".join(["oxygen" if dry == {"O2": 1.0} and not opts else str(base).strip().lower(), *opts])
    else:
        spec = None if opts else write_composition({k: float(v) for k, v in composition.items()})
    return Oxidant(id=label, name=name or label, composition=comp, M=M, humidity_ratio=w, notes=tuple(notes),
                   spec=spec)


def _g(v) -> str:
    """Shortest text that reads back as the same float ('15', '1.15', '0.1')."""
    r = repr(float(v))
    return r[:-2] if r.endswith(".0") else r


#: Conditions of an oxidant written BASE,KEY=VALUE,... (docs/combustion.md), with what they mean.
OXIDANT_CONDITIONS = {
    "O2": "O2 content of the dry oxidant after enrichment with pure O2 (O2=30% or O2=0.3)",
    "rh": "relative humidity over liquid water at T and P (rh=60%)",
    "T": "air temperature of the relative humidity (T=25C)",
    "P": "air pressure of the relative humidity (P=1atm; default 101.325 kPa)",
    "w": "humidity ratio, water per dry oxidant (w=8g/kg or w=0.008kg/kg)",
}
#: Base words of the BASE,KEY=VALUE form.
OXIDANT_BASES = ("air", "oxygen")
OXIDANT_FORMS = "air, oxygen, air,rh=60%,T=25C[,P=1atm], air,w=8g/kg, air,O2=30%, or O2=0.3,N2=0.7"
_HUMIDITY_RATIO = re.compile(r"^([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(kg/kg|g/kg)$")


def is_oxidant_base(head: str) -> bool:
    """Whether ``head`` is a base word of the BASE,KEY=VALUE oxidant form (air and its aliases, oxygen)."""
    from .api import shipped_mixtures
    from .data.library import norm_name
    b = norm_name(head)
    m = shipped_mixtures().get(b)
    return b in ("oxygen", "o2") or (m is not None and m["id"] == "air")


def oxidant_colon_fix(text: str) -> str | None:
    """The BASE,KEY=VALUE spelling of an oxidant written with ':' after its base word, else None.

    Bare numbers gain the unit the key needs: '%' for O2 and rh, kg/kg for w.
    """
    base, sep, rest = str(text).strip().partition(":")
    if not sep or "=" not in rest or not base.strip() or "," in base:
        return None
    out = [base.strip()]
    for item in rest.split(","):
        k, _, v = (x.strip() for x in item.partition("="))
        bare = bool(re.fullmatch(r"[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?", v))
        if k.lower() == "o2":
            out.append(f"O2={v}%" if bare else f"O2={v}")
        elif k.lower() == "rh":
            out.append(f"rh={v}%" if bare else f"rh={v}")
        elif k.lower() == "w":
            out.append(f"w={v}kg/kg" if bare else f"w={v}")
        else:
            out.append(f"{k}={v}")
    return ",".join(out)


def _oxidant_conditions(t: str, head: str, rest: str) -> dict:
    """'rh=60%,T=25C' of 'air,rh=60%,T=25C' -> make_oxidant keywords; every value carries its unit."""
    from .units import pressure_Pa, temperature_K
    keys = {k.lower(): k for k in OXIDANT_CONDITIONS}
    kw, seen = {}, set()
    for item in rest.split(","):
        k, eq, v = (x.strip() for x in item.partition("="))
        key = k if k in OXIDANT_CONDITIONS else keys.get(k.lower())
        if not eq or key is None:
            raise TablegenError(f"oxidant {t!r}: {item.strip()!r} is not a condition of {head}; allowed: "
                                f"O2 (O2=30%), rh (rh=60%), T (T=25C), P (P=1atm), w (w=8g/kg)")
        if key in seen:
            raise TablegenError(f"oxidant {t!r}: {key} is given twice")
        seen.add(key)
        if key == "O2":
            kw["o2_percent"] = _o2_content(t, v)
        elif key == "rh":
            if not v.endswith("%"):
                raise TablegenError(f"oxidant {t!r}: rh={v} is a relative humidity in %; write rh={v}%")
            kw["relative_humidity"] = _num(v[:-1].strip(), f"oxidant {t!r}: rh (%)")
        elif key == "T":
            kw["temperature_K"] = temperature_K(v, f"oxidant {t!r}: T")
        elif key == "P":
            kw["pressure_Pa"] = pressure_Pa(v, f"oxidant {t!r}: P")
        else:
            m = _HUMIDITY_RATIO.match(v)
            if not m:
                raise TablegenError(f"oxidant {t!r}: w={v} is a humidity ratio with its unit; write e.g. "
                                    f"w=0.008kg/kg or w=8g/kg")
            kw["humidity_ratio"] = float(m.group(1)) * (1e-3 if m.group(2) == "g/kg" else 1.0)
    if "P" in seen and "rh" not in seen:
        raise TablegenError(f"oxidant {t!r}: P is the pressure of the relative humidity; give it with rh and T")
    if "T" in seen and "rh" not in seen:
        raise TablegenError(f"oxidant {t!r}: T is the temperature of the relative humidity; give it with rh, "
                            f"e.g. {head},rh=60%,T=25C")
    return kw


def _o2_content(t: str, v: str) -> float:
    """O2=30% or O2=0.3 -> 30.0 (% by volume)."""
    s = v[:-1].strip() if v.endswith("%") else v
    x = _num(s, f"oxidant {t!r}: O2")
    if not v.endswith("%"):
        if x > 1:
            raise TablegenError(f"oxidant {t!r}: O2={v} is above 1; give the O2 content as a fraction "
                                f"(O2={x / 100:g}) or with its sign (O2={v}%)")
        x *= 100.0
    return x


def oxidant_from_text(text: str, *, data=(), source=None) -> Oxidant:
    """--oxidant: 'air', 'oxygen', 'air,rh=60%,T=25C,P=1atm', 'air,w=8g/kg', 'air,O2=30%' or 'O2=0.3,N2=0.7'.

    A base word (air or oxygen) alone or followed by conditions (OXIDANT_CONDITIONS),
    or a dry composition by mole (tablegen.composition).
    """
    t = str(text).strip()
    if not t:
        raise TablegenError(f"oxidant is empty; allowed: {OXIDANT_FORMS}")
    if "@" in t:
        raise TablegenError(f"oxidant {t!r}: '@' is not allowed (it separates the parts of flue-gas names)")
    fix = oxidant_colon_fix(t)
    if fix is not None:
        raise TablegenError(f"oxidant {t!r} uses ':' after {t.partition(':')[0].strip()}; write {fix}")
    head, sep, rest = t.partition(",")
    if "=" not in head and is_oxidant_base(head):
        kw = _oxidant_conditions(t, head.strip(), rest) if sep else {}
        return replace(make_oxidant(base=head.strip(), data=data, source=source, **kw), spec=t)
    if not is_composition(t):
        raise TablegenError(f"oxidant {t!r} is not known; allowed: {OXIDANT_FORMS}")
    c = parse_composition(t, "oxidant")
    if c.basis != "mole":
        raise TablegenError(f"oxidant {t!r}: an oxidant composition is by mole (= by volume); "
                            f"remove basis={c.basis}")
    return replace(make_oxidant(composition=c.fractions, data=data, source=source), spec=t)


def oxidant_from_table(t, where="oxidant", *, data=(), source=None) -> Oxidant:
    if isinstance(t, str):
        try:
            return oxidant_from_text(t, data=data, source=source)
        except TablegenError as e:
            raise SpecError(f"{where}: {e}") from None
    if not isinstance(t, dict):
        raise SpecError(f"{where}: must be a string ({OXIDANT_FORMS}) or a table")
    for k in t:
        if k not in OXIDANT_KEYS:
            raise SpecError(f"{where}.{k} is not known; allowed: {', '.join(OXIDANT_KEYS)}")
    from .units import pressure_Pa, temperature_K
    try:
        kw = {k: t[k] for k in ("base", "composition", "o2_percent", "relative_humidity", "humidity_ratio",
                                 "name") if k in t}
        if "temperature" in t:
            kw["temperature_K"] = temperature_K(str(t["temperature"]), f"{where}.temperature")
        if "pressure" in t:
            kw["pressure_Pa"] = pressure_Pa(str(t["pressure"]), f"{where}.pressure")
        return make_oxidant(data=data, source=source, what=where, **kw)
    except TablegenError as e:
        raise SpecError(str(e) if str(e).startswith(where) else f"{where}: {e}") from None


# ================================================================== result
@dataclass(frozen=True, slots=True, eq=False)
class CombustionResult:
    """Complete combustion of a fuel with an oxidant.

    ``products`` is the wet flue gas and ``products_dry`` the dry flue gas, both
    ordinary Substances (``products_dry`` is None when the flue gas is water only); ``summary`` holds every figure (JSON-ready); ``cautions``
    must be shown with every result.
    """

    fuel: Fuel
    oxidant: Oxidant
    air_ratio: float
    products: object
    products_dry: object
    moles_per_kg: dict          # product species -> mol per kg of fuel (wet)
    summary: dict
    cautions: list


AMOUNT_KEYS = ("excess_air", "air_ratio", "phi", "o2_dry", "o2_wet")


def _solve_air_ratio(*, excess_air, air_ratio, phi, o2_dry, o2_wet, o2_need, n_ox_st, wet0, dry0,
                     ox: Oxidant) -> float:
    given = {k: v for k, v in (("excess_air", excess_air), ("lambda", air_ratio), ("phi", phi),
                               ("o2_dry", o2_dry), ("o2_wet", o2_wet)) if v is not None}
    if len(given) != 1:
        raise TablegenError("give exactly one amount of oxidant: excess air (%), lambda, phi, "
                            f"or flue-gas O2 (dry or wet, %); got {', '.join(given) or 'none'}")
    (k, v), = given.items()
    if k == "excess_air":
        return 1 + _num(v, "excess air (%)", lo=0.0) / 100
    if k == "lambda":
        if _num(v, "lambda") < 1:
            raise TablegenError(f"lambda = {float(v):g} is below 1; complete combustion needs lambda >= 1 "
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
        raise TablegenError(f"flue-gas O2 {y * 100:g} % ({'wet' if k == 'o2_wet' else 'dry'}) is not below "
                            f"the O2 content of the oxidant on that basis ({y_max * 100:.4g} %); allowed: "
                            f"0 <= O2 < {y_max * 100:.4g} %")
    return (o2_need + y * total0) / (o2_need - y * n_ox_st * c)


def _given_amount(excess_air, air_ratio, phi, o2_dry, o2_wet):
    for k, v in (("excess-air", excess_air), ("lambda", air_ratio), ("phi", phi), ("o2-dry", o2_dry),
                 ("o2-wet", o2_wet)):
        if v is not None:
            return k, float(v)
    raise TablegenError("give one amount of oxidant")  # pragma: no cover - checked before


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


def combustion(fuel, oxidant="air", *, excess_air=None, air_ratio=None, phi=None, o2_dry=None,
               o2_wet=None, T_ref_K: float = 298.15, T_meter_K: float = T_NORMAL,
               P_meter_Pa: float = P_NORMAL, T_fuel_K: float = T_REF, T_oxidant_K: float = T_REF,
               P_flue_Pa: float = P_NORMAL, data=(), source=None, **kw) -> CombustionResult:
    """Frozen complete combustion of a fuel with an oxidant.

    Parameters
    ----------
    fuel : Fuel, spec table (dict), or text ('CH4=0.9,C2H6=0.06,N2=0.04', a species, a TOML file)
    oxidant : Oxidant, table, or text ('air', 'air,rh=60%,T=25C', 'air,O2=30%', 'O2=0.3,N2=0.7')
    excess_air : %; or air_ratio (λ, also accepted as ``lambda=``), phi (φ = 1/λ),
        o2_dry / o2_wet (measured flue-gas O2, % by volume): exactly one
    T_ref_K : combustion reference temperature of the heating values: 298.15, 293.15,
        288.7056 (60 °F), 288.15 or 273.15 K (ISO 6976)
    T_meter_K, P_meter_Pa : metering conditions of normal volumes (default 0 °C, 101.325 kPa)
    T_fuel_K, T_oxidant_K : inlet temperatures for the adiabatic flame temperature
    P_flue_Pa : flue-gas pressure for the water dew point

    Returns
    -------
    CombustionResult

    Raises
    ------
    TablegenError (or SpecError for tables) naming the bad input.
    """
    from .saturation import T_sat_K, h_vap_J_per_kg, P_LOW_IF97
    from .thermo.build import mixture_substance
    if "lambda" in kw:
        if air_ratio is not None:
            raise TablegenError("give lambda or air_ratio, not both")
        air_ratio = kw.pop("lambda")
    if kw:
        raise TypeError(f"combustion() got unknown arguments: {', '.join(kw)}")
    data = tuple(data)
    if isinstance(fuel, Fuel):
        f = fuel
    elif isinstance(fuel, dict):
        if fuel and not any(k in FUEL_KEYS for k in fuel):      # a bare {species: mole fraction}
            fuel = {"composition": fuel}
        f = fuel_from_table(fuel, "fuel", data=data, source=source)
    else:
        f = fuel_from_text(fuel, data=data, source=source)
    if isinstance(oxidant, Oxidant):
        ox = oxidant
    elif isinstance(oxidant, dict):
        ox = oxidant_from_table(oxidant, "oxidant", data=data, source=source)
    else:
        ox = oxidant_from_text(oxidant or "air", data=data, source=source)
    T_ref = _num(T_ref_K, "combustion reference temperature (K)")
    if not any(abs(T_ref - v) < 0.01 for v in REFERENCE_TEMPERATURES_K.values()):
        raise TablegenError(f"combustion reference temperature {T_ref:g} K is not one ISO 6976 allows; "
                            f"allowed: {', '.join(REFERENCE_TEMPERATURES_K)}")
    for nm, v in (("metering temperature", T_meter_K), ("metering pressure", P_meter_Pa),
                  ("fuel temperature", T_fuel_K), ("oxidant temperature", T_oxidant_K),
                  ("flue-gas pressure", P_flue_Pa)):
        _num(v, nm, lo=0.0, lo_open=True)

    o2_need = _oxygen_need(f.elements)
    if o2_need <= 0:
        raise TablegenError(f"fuel {f.id}: needs no oxygen (no C, H or S beyond its own O): nothing to burn")
    n_st = o2_need / ox.y_O2                          # mol oxidant per kg fuel, stoichiometric
    p0 = _products_at(f, ox, 0.0)
    wet0 = sum(p0.values())
    dry0 = wet0 - p0["H2O"]
    if o2_dry is not None:
        p1 = _products_at(f, ox, n_st)
        if sum(v for k, v in p1.items() if k not in ("H2O", "O2")) <= 1e-12 * sum(p1.values()):
            raise TablegenError("this dry flue gas would hold nothing but O2, so a dry O2 reading cannot fix "
                                "the amount of oxidant; give the wet O2, lambda or excess air")
    lam = _solve_air_ratio(excess_air=excess_air, air_ratio=air_ratio, phi=phi, o2_dry=o2_dry, o2_wet=o2_wet,
                           o2_need=o2_need, n_ox_st=n_st, wet0=wet0, dry0=dry0, ox=ox)
    n_ox = lam * n_st
    prod = _products_at(f, ox, n_ox)
    if abs(prod["O2"]) <= LAMBDA_ROUNDOFF * o2_need:      # λ = 1: round-off of O2 need - supply
        prod["O2"] = 0.0
    elif prod["O2"] < 0:  # pragma: no cover - λ >= 1 is enforced above
        raise TablegenError("oxidant short of stoichiometric; complete combustion needs lambda >= 1")
    prod = {k: prod[k] for k in PRODUCT_ORDER if prod.get(k, 0.0) > 0}
    N_wet = sum(prod.values())
    N_dry = N_wet - prod.get("H2O", 0.0)
    lib = _lib(data)
    recs = {k: lib.record(k, source=source) for k in prod}
    y_wet = {k: v / N_wet for k, v in prod.items()}
    has_dry = N_dry > 1e-12 * N_wet          # hydrogen in pure O2 at λ = 1 leaves water only
    y_dry = {k: v / N_dry for k, v in prod.items() if k != "H2O"} if has_dry else {}
    m_wet = sum(v * recs[k].M for k, v in prod.items()) * 1e-3        # kg per kg fuel
    m_dry = m_wet - prod.get("H2O", 0.0) * recs["H2O"].M * 1e-3 if "H2O" in prod else m_wet
    if not has_dry:
        N_dry = m_dry = 0.0
    w_wet = {k: v * recs[k].M * 1e-3 / m_wet for k, v in prod.items()}
    w_dry = {k: v * recs[k].M * 1e-3 / m_dry for k, v in prod.items() if k != "H2O"} if has_dry else {}
    amount_key, amount_value = _given_amount(excess_air, air_ratio, phi, o2_dry, o2_wet)
    amount = f"{amount_key}={_g(amount_value)}"
    if f.spec and ox.spec:
        base_id = f"flue@{f.spec}@{amount}" + ("" if ox.spec == "air" else f"@{ox.spec}")
    else:
        base_id = f"flue gas of {f.id} with {ox.id} at {amount}"
    products = mixture_substance([(recs[k], v) for k, v in y_wet.items()], "mole", id=base_id,
                                 name=f"flue gas of {f.name} with {ox.name} at λ = {lam:.4g} (wet)",
                                 what="flue gas")
    products_dry = mixture_substance([(recs[k], v) for k, v in y_dry.items()], "mole",
                                     id=base_id + ("@dry" if base_id.startswith("flue@") else " (dry)"),
                                     name=f"flue gas of {f.name} with {ox.name} at λ = {lam:.4g} (dry)",
                                     what="dry flue gas") if has_dry else None

    notes = list(f.notes) + list(ox.notes)
    # ---------------------------------------------------------- ratios and volumes
    Vm = _normal_molar_volume(T_meter_K, P_meter_Pa)                    # m³/mol
    M_ox = ox.M * 1e-3
    s: dict = {
        "lambda": lam, "excess_air_percent": (lam - 1) * 100, "phi": 1 / lam,
        "oxygen_stoich_mol_per_kg": o2_need,
        "afr_mass_stoich": n_st * M_ox, "afr_mass": n_ox * M_ox,
        "afr_mass_dry_oxidant_stoich": n_st * (ox.M - ox.y_H2O * _M_H2O()) * 1e-3,
        "oxidant_volume_per_kg_stoich": n_st * Vm, "oxidant_volume_per_kg": n_ox * Vm,
        "products_wet": y_wet, "products_dry": y_dry,
        "products_wet_mass": w_wet, "products_dry_mass": w_dry,
        "flue_gas_mol_wet_per_kg": N_wet, "flue_gas_mol_dry_per_kg": N_dry,
        "flue_gas_mass_wet_per_kg": m_wet, "flue_gas_mass_dry_per_kg": m_dry,
        "flue_gas_volume_wet_per_kg": N_wet * Vm, "flue_gas_volume_dry_per_kg": N_dry * Vm,
        "M_flue_wet": products.M, "M_flue_dry": products_dry.M if has_dry else None,
        "metering_T_K": T_meter_K, "metering_P_Pa": P_meter_Pa,
        "combustion_reference_T_K": T_ref, "ash_mass_per_kg": f.ash,
    }
    s["afr_mass_dry_oxidant"] = s["afr_mass_dry_oxidant_stoich"] * lam
    if f.kind == "gas":
        Mf = f.M * 1e-3
        s.update(afr_molar_stoich=n_st * Mf, afr_molar=n_ox * Mf,
                 afr_volume_stoich=n_st * Mf, afr_volume=n_ox * Mf,     # ideal gas: volume ratio = mole ratio
                 flue_gas_volume_wet_per_m3_fuel=N_wet * Mf, flue_gas_volume_dry_per_m3_fuel=N_dry * Mf)
    elif f.kind == "formula":
        Mf = f.M * 1e-3
        s.update(afr_molar_stoich=n_st * Mf, afr_molar=n_ox * Mf, afr_volume_stoich=None, afr_volume=None,
                 flue_gas_volume_wet_per_m3_fuel=None, flue_gas_volume_dry_per_m3_fuel=None)
    else:
        s.update(afr_molar_stoich=None, afr_molar=None, afr_volume_stoich=None, afr_volume=None,
                 flue_gas_volume_wet_per_m3_fuel=None, flue_gas_volume_dry_per_m3_fuel=None)

    # ---------------------------------------------------------- dew point
    yw = y_wet.get("H2O", 0.0)
    pw = yw * P_flue_Pa
    s["flue_pressure_Pa"] = P_flue_Pa
    s["water_partial_pressure_Pa"] = pw
    if pw >= P_LOW_IF97:
        s["dew_point_K"] = float(T_sat_K(pw))
        s["dew_point_note"] = "water dew point: IAPWS-IF97 saturation temperature (eq. 31) at the water partial pressure"
    else:
        s["dew_point_K"] = None
        s["dew_point_note"] = (f"water partial pressure {pw:.4g} Pa is below 611.2 Pa: the dew point lies below "
                               f"0 °C (frost point, not computed)")

    # ---------------------------------------------------------- heating values
    ext_any = False
    hf, e1 = f.h_J_per_kg(T_ref, data, source)
    h_o2, e2 = _h_molar("O2", T_ref, data, source)
    stoich_prod = _products_of_fuel_per_kg(f.elements, f.moisture)
    hp_vap, e3 = _h_products(stoich_prod, T_ref, data, source, liquid_water=False)
    hp_liq, _ = _h_products(stoich_prod, T_ref, data, source, liquid_water=True)
    ext_any = e1 or e2 or e3
    h_react = hf + o2_need * h_o2
    lhv = h_react - hp_vap                                             # J/kg
    hhv = h_react - hp_liq
    dh_vap = float(h_vap_J_per_kg(T_ref))
    s.update(lhv_mass=lhv * 1e-6, hhv_mass=hhv * 1e-6, h_vap_water_J_per_kg=dh_vap,
             water_formed_kg_per_kg=stoich_prod["H2O"] * _M_H2O() * 1e-3)
    if f.M is not None:
        Mf = f.M * 1e-3
        s.update(lhv_molar=lhv * Mf * 1e-3, hhv_molar=hhv * Mf * 1e-3)     # MJ/kmol = kJ/mol
    else:
        s.update(lhv_molar=None, hhv_molar=None)
    if f.kind == "gas":
        s.update(lhv_volume=lhv * f.M * 1e-3 / Vm * 1e-6, hhv_volume=hhv * f.M * 1e-3 / Vm * 1e-6)  # MJ/m³
    else:
        s.update(lhv_volume=None, hhv_volume=None)
    notes.append(f"heating values at {T_ref:g} K from the enthalpies of formation of the data; water condensed "
                 f"with Δh_vap = {dh_vap / 1000:.2f} kJ/kg at {T_ref:g} K (Wagner & Pruss 1993 with Clapeyron)")
    if f.kind == "gas":
        notes.append(f"volumes are ideal-gas normal volumes at {T_meter_K:g} K and {P_meter_Pa / 1000:g} kPa "
                     f"(no compression factor)")

    # ---------------------------------------------------------- adiabatic flame temperature
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
    s.update(t_adiabatic_K=T_ad, T_fuel_K=T_fuel_K, T_oxidant_K=T_oxidant_K)
    if f.kind != "gas" and f.cp is None and abs(T_fuel_K - f.T_h_ref) > 0.01:
        notes.append(f"fuel inlet temperature {T_fuel_K:g} K differs from {f.T_h_ref:g} K but the fuel cp is "
                     f"not given: its sensible heat is neglected in the flame temperature")
    if f.ash > 0:
        notes.append("ash is inert and takes up no heat in the flame temperature")
    if ext_any or e4 or e5:
        notes.append("some species enthalpies were evaluated slightly below the lower end of their data "
                     "(SO2 and H2S data start at 300 K) with the lowest interval extrapolated")

    cautions = list(CAUTIONS)
    if T_ad is None:
        cautions.insert(1, f"The frozen adiabatic flame temperature would lie above {products.T_max:g} K and is "
                           f"not given; dissociation (CO, H2, OH, O, H, NO) holds a real flame far below it.")
    elif T_ad > T_DISSOCIATION_WARN:
        cautions.insert(1, f"The adiabatic flame temperature {T_ad:.0f} K is above {T_DISSOCIATION_WARN:.0f} K: "
                           f"dissociation (CO, H2, OH, O, H, NO) would lower it, so the frozen value is an upper bound.")
    if "SO2" in prod:
        cautions.insert(1, "The fuel contains sulfur: the flue gas carries SO2 (and SO3 in practice); "
                           "surfaces below the acid dew point corrode.")
    s["fuel"] = f.describe()
    s["oxidant"] = ox.describe()
    s["notes"] = notes
    s["cautions"] = cautions
    # the cautions travel with the substances, into every table, chart and state output
    products = replace(products, cautions=tuple(cautions), _cache={})
    if products_dry is not None:
        products_dry = replace(products_dry, cautions=tuple(cautions), _cache={})
    result = CombustionResult(fuel=f, oxidant=ox, air_ratio=lam, products=products, products_dry=products_dry,
                              moles_per_kg=prod, summary=s, cautions=cautions)
    _MADE[products.id] = result
    if products_dry is not None:
        _MADE[products_dry.id] = result
    return result


class _Recent(dict):
    """A dict that keeps only the most recent entries (bounded memory in long runs)."""

    LIMIT = 512

    def __setitem__(self, key, value):
        if key in self:
            del self[key]
        super().__setitem__(key, value)
        while len(self) > self.LIMIT:
            del self[next(iter(self))]


#: Substance id -> the CombustionResult that made it (so documents can print its cautions).
_MADE: dict = _Recent()


def result_for(substance) -> CombustionResult | None:
    """The combustion result behind a flue-gas Substance (by id), or None for other substances.

    Documents that tabulate a substance call this to print the combustion cautions and
    summary with it.
    """
    r = _MADE.get(getattr(substance, "id", None))
    if r is None and str(getattr(substance, "id", "")).lower().startswith(PREFIX):
        try:
            resolve(substance.id)
        except TablegenError:
            return None
        r = _MADE.get(substance.id)
    return r


def cautions_for(substance) -> list | None:
    """The cautions to print with a flue-gas Substance, or None if it is not one."""
    if getattr(substance, "cautions", ()):
        return list(substance.cautions)
    r = result_for(substance)
    return None if r is None else list(r.cautions)


# ================================================================ names and specs
#: Prefix of the flue-gas name syntax: flue@FUEL@AMOUNT[@OXIDANT][@dry]
PREFIX = "flue@"
NAME_AMOUNTS = {"excess-air": "excess_air", "lambda": "air_ratio", "phi": "phi", "o2-dry": "o2_dry",
                "o2-wet": "o2_wet"}
NAME_HELP = ("flue-gas names read flue@FUEL@AMOUNT[@OXIDANT][@dry], e.g. "
             "flue@CH4=0.9,C2H6=0.06,N2=0.04@excess-air=15@air,rh=60%,T=25C; AMOUNT is excess-air=P, "
             "lambda=L, phi=F, o2-dry=P or o2-wet=P")


def parse_name(name: str):
    """flue@FUEL@AMOUNT[@OXIDANT][@dry] -> (fuel text, {amount key: value}, oxidant text, dry)."""
    if not name.lower().startswith(PREFIX):
        return None
    parts = name[len(PREFIX):].split("@")
    dry = False
    if parts and parts[-1].strip().lower() in ("dry", "wet"):
        dry = parts.pop().strip().lower() == "dry"
    if len(parts) not in (2, 3) or not parts[0].strip():
        raise NameLookupError(f"flue-gas name {name!r} is incomplete; {NAME_HELP}")
    fuel_text, amount = parts[0].strip(), parts[1].strip()
    ox_text = parts[2].strip() if len(parts) == 3 else None
    fuel_fix = colon_form_fix(fuel_text)
    ox_fix = ox_text and (colon_form_fix(ox_text) or oxidant_colon_fix(ox_text))
    if fuel_fix or ox_fix:
        new = PREFIX + "@".join([fuel_fix or fuel_text, amount] + ([ox_fix or ox_text] if ox_text else [])) \
            + ("@dry" if dry else "")
        raise NameLookupError(f"flue-gas name {name!r} uses ':' where '=' or ',' belongs; write {new}")
    if "=" not in amount:
        raise NameLookupError(f"flue-gas name {name!r}: amount {amount!r} needs KEY=VALUE; {NAME_HELP}")
    k, v = (x.strip() for x in amount.split("=", 1))
    if k.lower() not in NAME_AMOUNTS:
        raise NameLookupError(f"flue-gas name {name!r}: unknown amount {k!r}; allowed: "
                              f"{', '.join(NAME_AMOUNTS)}")
    val = _num(v.rstrip("%"), f"flue-gas name amount {k}")
    oxidant = parts[2].strip() if len(parts) == 3 else "air"
    return fuel_text, {NAME_AMOUNTS[k.lower()]: val}, oxidant, dry


@lru_cache(maxsize=64)
def _resolve_cached(name: str, data: tuple, source):
    fuel_text, amount, oxidant, dry = parse_name(name)
    r = combustion(fuel_text, oxidant, data=data, source=source, **amount)
    sub = r.products_dry if dry else r.products
    if sub is None:
        raise NameLookupError(f"flue-gas name {name!r}: this flue gas is water only, it has no dry part")
    out = replace(sub, id=name, _cache={})
    _MADE[name] = r
    return out


def resolve(name: str, data=(), source=None):
    """Resolver for tablegen.api.RESOLVERS: a Substance for a flue@ name, else None."""
    if not isinstance(name, str) or not name.strip().lower().startswith(PREFIX):
        return None
    return _resolve_cached(name.strip(), tuple(data), source)


SPEC_KEYS = ("fuel", "oxidant", "excess_air", "lambda", "phi", "o2_dry", "o2_wet", "flue_basis", "name", "id")
ANALYSIS_SPEC_KEYS = ("flue_analysis", "basis", "water_percent", "normalise", "name", "id")


def flue_gas_from_analysis(composition: dict, basis: str = "volume-dry", *, water_percent: float = 0.0,
                           normalise: bool = False, name=None, id=None, data=(), source=None,
                           what="flue_analysis"):
    """A measured flue-gas analysis (% by volume, dry or wet) as a Substance.

    Parameters
    ----------
    composition : species -> % by volume (or fractions)
    basis : "volume-dry" (then ``water_percent``, the H2O of the wet gas in %) or "volume-wet"
    """
    from .thermo.build import mixture_substance
    if basis not in ("volume-dry", "volume-wet"):
        raise TablegenError(f"{what}: basis {basis!r} is not known; allowed: volume-dry, volume-wet")
    y, _ = _fractions(composition, what, normalise_loose=normalise)
    wp = _num(water_percent, f"{what}: water_percent", lo=0.0, hi=100.0)
    if wp and basis != "volume-dry":
        raise TablegenError(f"{what}: water_percent is only for basis = \"volume-dry\"")
    recs = [(_record(k, data, source, what=f"{what}.{k}"), v) for k, v in y.items()]
    if basis == "volume-dry":
        if any(r.id == "H2O" for r, _ in recs):
            raise TablegenError(f"{what}: a dry analysis cannot list H2O; give it as water_percent")
        recs = [(r, v * (1 - wp / 100)) for r, v in recs]
        if wp:
            recs.append((_record("H2O", data, source), wp / 100))
    label = id or "flue gas analysis " + write_composition({r.id: v for r, v in recs}, digits=6)
    sub = mixture_substance(recs, "mole", id=label, name=name or label, what=what)
    # a measured flue gas: the combustion cautions but the first (nothing was computed)
    return replace(sub, cautions=CAUTIONS[1:], _cache={})


def substance_from_spec(table: dict, where: str, *, data=(), source=None):
    """A flue-gas Substance from a spec table.

    Either a measured analysis: flue_analysis (species -> % by volume), basis
    "volume-dry" (default; water_percent gives the H2O of the wet gas) or "volume-wet".
    Or a computed flue gas: fuel (text or table, see fuel_from_table), oxidant (text or table), one of
    excess_air (%), lambda, phi, o2_dry (%), o2_wet (%); flue_basis "wet" (default) or
    "dry"; optional name and id.

    Raises
    ------
    SpecError naming the key path, e.g. ``tables[0].substance.fuel.analysis.C``.
    """
    if not isinstance(table, dict):
        raise SpecError(f"{where}: a flue-gas substance is a table with fuel and an amount of oxidant")
    _check_texts(table, where)
    if "flue_analysis" in table:
        for k in table:
            if k not in ANALYSIS_SPEC_KEYS:
                raise SpecError(f"{where}.{k} is not known with flue_analysis; allowed: "
                                f"{', '.join(ANALYSIS_SPEC_KEYS)}")
        try:
            return flue_gas_from_analysis(table["flue_analysis"], table.get("basis", "volume-dry"),
                                          water_percent=table.get("water_percent", 0.0),
                                          normalise=bool(table.get("normalise", False)), name=table.get("name"),
                                          id=table.get("id"), data=data, source=source,
                                          what=f"{where}.flue_analysis")
        except SpecError:
            raise
        except TablegenError as e:
            raise SpecError(str(e) if str(e).startswith(where) else f"{where}: {e}") from None
    for k in table:
        if k not in SPEC_KEYS:
            raise SpecError(f"{where}.{k} is not known; allowed: {', '.join(SPEC_KEYS)}")
    if "fuel" not in table:
        raise SpecError(f"{where}.fuel is missing; give a fuel text (CH4=0.9,N2=0.1) or table")
    basis = table.get("flue_basis", "wet")
    if basis not in ("wet", "dry"):
        raise SpecError(f"{where}.flue_basis {basis!r} is not known; allowed: wet, dry")
    amounts = {k: table[k] for k in ("excess_air", "lambda", "phi", "o2_dry", "o2_wet") if k in table}
    if len(amounts) != 1:
        raise SpecError(f"{where}: give exactly one of excess_air, lambda, phi, o2_dry, o2_wet; got "
                        f"{', '.join(amounts) or 'none'}")
    (ak, av), = amounts.items()
    if isinstance(av, bool) or not isinstance(av, (int, float)):
        raise SpecError(f"{where}.{ak} must be a number, got {av!r}")
    fuel = table["fuel"]
    try:
        if isinstance(fuel, dict):
            fuel = fuel_from_table(fuel, f"{where}.fuel", data=data, source=source)
        elif isinstance(fuel, str):
            fuel = fuel_from_text(fuel, data=data, source=source)
        else:
            raise SpecError(f"{where}.fuel must be a text or a table")
    except SpecError:
        raise
    except TablegenError as e:
        raise SpecError(f"{where}.fuel: {e}") from None
    ox = oxidant_from_table(table.get("oxidant", "air"), f"{where}.oxidant", data=data, source=source)
    try:
        r = combustion(fuel, ox, data=data, source=source, **{("air_ratio" if ak == "lambda" else ak): av})
    except SpecError:
        raise
    except TablegenError as e:
        raise SpecError(f"{where}.{ak}: {e}") from None
    sub = r.products_dry if basis == "dry" else r.products
    if sub is None:
        raise SpecError(f"{where}.flue_basis: this flue gas is water only, it has no dry part; use \"wet\"")
    kw = {}
    if "id" in table:
        kw["id"] = str(table["id"])
    if "name" in table:
        kw["name"] = str(table["name"])
    if kw:
        sub = replace(sub, _cache={}, **kw)
        _MADE[sub.id] = r
    return sub


def _register():
    from . import api
    if resolve not in api.RESOLVERS:
        api.RESOLVERS.append(resolve)


_register()
