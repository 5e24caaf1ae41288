"""Fuels as fired: gases by species, liquids and solids by ultimate analysis or formula.

A :class:`Fuel` holds what combustion needs (element amounts per kg, moisture,
ash, the enthalpy of the fuel) and what the document must show of it: the
analysis as given, the basis, the normalisation applied and the uncertainty the
analysis states.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from pathlib import Path

from ..core.composition import looks_like as is_composition, parse as parse_composition, write as write_composition
from ..core.formula import parse_formula
from ..core.errors import InputError, NameLookupError, RangeError, SpecError, TablegenError, UnitError
from .reactants import BURNING, NOBLE, _M_H2O, _fractions, _h_molar, _num, _qty, _record, _weights, check_table
from ..core.constants import T_REF

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
    given: dict = field(default_factory=dict)          # the analysis as given (see analysis_as_given)
    uncertainty: dict = field(default_factory=dict)    # part as typed -> expanded U (k = 2) of its given fraction
    remake: object = None        # callable(fractions on the given basis) -> Fuel, for sensitivities

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
        d["as_given"] = dict(self.given)
        d["uncertainty_k2"] = dict(self.uncertainty)
        return d


def _given(raw: dict, fractions: dict, basis: str, percent: bool, normalised_loose: bool, **extra) -> dict:
    """The analysis as the user gave it: its parts (as fractions; ``in_percent`` says how they
    were typed), their sum, whether they were normalised, and the fractions used."""
    scale = 100.0 if percent else 1.0
    values = {str(k): float(v) / scale for k, v in raw.items()}
    total = float(sum(values.values()))
    return {"basis": basis, "values": values, "in_percent": percent, "sum": total,
            "normalised": abs(total - 1.0) > 1e-12, "normalise_loose": normalised_loose,
            "fractions": dict(fractions), **extra}


def check_uncertainty(unc, fractions: dict, what: str, *, percent: bool = False) -> dict:
    """Expanded uncertainties (k = 2) of given fractions: each >= 0 and no larger than its fraction.

    ``unc`` maps names of ``fractions`` to U as a fraction (a number) or as a
    percentage (text with '%', when the analysis is in percent).
    """
    out = {}
    for k, u in (unc or {}).items():
        if k not in fractions:
            raise NameLookupError(f"{what}: uncertainty of {k!r}, which is not a part of the analysis; allowed: "
                                  f"{', '.join(fractions)}")
        if isinstance(u, str):
            t = u.strip()
            if not t.endswith("%"):
                raise UnitError(f"{what}: uncertainty of {k} {u!r} needs its '%' (e.g. \"0.5%\") or is "
                                f"a number (a fraction)")
            x = _num(t[:-1], f"{what}: uncertainty of {k} (%)") / 100.0
        else:
            if percent:
                raise UnitError(f"{what}: the analysis is in percent, so the uncertainty of {k} is too; "
                                f"write \"{_num(u, 'U'):g}%\"")
            x = _num(u, f"{what}: uncertainty of {k}")
        if x < 0:
            raise RangeError(f"{what}: uncertainty of {k} is negative ({x:g}); allowed: U >= 0")
        if x > fractions[k] * (1 + 1e-12):
            f = fractions[k]
            raise RangeError(f"{what}: the uncertainty of {k} (±{x * 100:g} %) makes its fraction negative "
                             f"({f * 100:g} % - {x * 100:g} % < 0); allowed: U <= the fraction "
                             f"({f * 100:g} %)")
        if x > 0:
            out[k] = x
    return out


def _oxygen_need(el: dict) -> float:
    """mol O2 per kg for complete combustion: C + H/4 + S - O/2."""
    return el.get("C", 0.0) + el.get("H", 0.0) / 4 + el.get("S", 0.0) - el.get("O", 0.0) / 2


def gas_fuel(composition: dict, basis: str = "mole", *, water_percent: float = 0.0, name=None,
             id=None, data=(), source=None, what="fuel", normalise=False, uncertainty=None,
             percent=None) -> Fuel:
    """A gaseous fuel by species.

    Parameters
    ----------
    composition : species -> fraction (or percent)
    basis : "mole", "mass", "volume-dry" or "volume-wet" (ideal gas: volume = mole)
    water_percent : with "volume-dry", the H2O content of the wet gas in % by volume
    uncertainty : species (as in composition) -> expanded uncertainty U (k = 2) of its
        fraction on ``basis``: a fraction, or a text with '%' (see check_uncertainty)
    percent : whether the composition was typed in percent (default: from its sum)
    """
    bases = ("mole", "mass", "volume-dry", "volume-wet")
    if basis not in bases:
        raise NameLookupError(f"{what}.basis {basis!r} is not known; allowed: {', '.join(bases)}")
    fr, pct = _fractions(composition, f"{what}.composition", normalise_loose=normalise)
    unc = check_uncertainty(uncertainty, fr, f"{what}")
    given = _given(composition, fr, basis, pct, normalise, water_percent=float(water_percent or 0.0))
    pct = pct if percent is None else percent
    given["in_percent"] = pct
    recs = {}
    for k in fr:
        rec = _record(k, data, source, what=f"{what}.composition.{k}")
        if rec.id in recs:
            raise InputError(f"{what}.composition: species {rec.id!r} is given twice")
        bad = [e for e in rec.elements if e not in BURNING + NOBLE]
        if bad:
            raise InputError(f"{what}.composition.{k}: element {bad[0]} is not handled; fuel "
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
            raise InputError(f"{what}.water_percent is only for basis = \"volume-dry\"; "
                             f"with other bases list H2O in the composition")
        if "H2O" in y:
            raise InputError(f"{what}: a dry analysis cannot list H2O; give the water as water_percent")
        yw = wp / 100.0
        y = {k: v * (1 - yw) for k, v in y.items()}
        y["H2O"] = yw
        recs["H2O"] = (_record("H2O", data, source), yw)
        notes.append(f"dry analysis converted to wet gas with {wp:g} % by volume H2O")
    y = {k: v for k, v in y.items() if v > 0}
    if not y:
        raise InputError(f"{what}: every fraction is zero")
    M = sum(v * recs[k][0].M for k, v in y.items())
    el: dict = {}
    for sid, v in y.items():
        for e, n in recs[sid][0].elements.items():
            el[e] = el.get(e, 0.0) + v * n / (M * 1e-3)
    from ..thermo.build import mixture_substance
    gas = mixture_substance([(recs[k][0], v) for k, v in y.items()], "mole",
                            id=id or write_composition(y, digits=6), what=what)
    fid = id or gas.id

    def remake(x: dict) -> Fuel:
        return gas_fuel(x, basis, water_percent=water_percent, name=name, id=fid, data=data, source=source,
                        what=what)

    if given["normalised"]:
        notes.append(f"analysis as given sums to {given['sum'] * (100 if pct else 1):.9g}{' %' if pct else ''}; "
                     f"normalised to {'100 %' if pct else '1'}")
    return Fuel(id=fid, name=name or fid, kind="gas", elements=el, M=M, gas=gas, composition=y,
                notes=tuple(notes), given=given, uncertainty=unc, remake=remake)


#: Analysis keys and bases for fuels given by ultimate analysis.
ANALYSIS_KEYS = ("C", "H", "O", "N", "S", "moisture", "ash")
ANALYSIS_BASES = ("as-received", "dry", "daf")


def _convert_analysis(an: dict, basis: str, moisture, ash, what: str) -> dict:
    """Ultimate analysis on any basis -> {as-received, dry, daf} mass fractions."""
    an = {k: _num(v, f"{what}.analysis.{k}", lo=0.0, hi=1.0) for k, v in an.items()}
    for k in an:
        if k not in ANALYSIS_KEYS:
            raise NameLookupError(f"{what}.analysis.{k} is not known; allowed: {', '.join(ANALYSIS_KEYS)} "
                                  f"(mass fractions)")
    organic = {k: an.get(k, 0.0) for k in BURNING}
    if basis == "as-received":
        if moisture is not None or ash is not None:
            raise InputError(f"{what}: on the as-received basis give moisture and ash inside the analysis")
        M, A = an.get("moisture", 0.0), an.get("ash", 0.0)
        total = sum(organic.values()) + M + A
        ar = {**organic, "moisture": M, "ash": A}
    elif basis == "dry":
        if "moisture" in an:
            raise InputError(f"{what}: a dry analysis has no moisture; give the as-received moisture "
                             f"as {what}.moisture")
        if ash is not None:
            raise InputError(f"{what}: on the dry basis give ash inside the analysis")
        A_d = an.get("ash", 0.0)
        total = sum(organic.values()) + A_d
        M = _num(moisture or 0.0, f"{what}.moisture", lo=0.0, hi=0.99)
        ar = {k: v * (1 - M) for k, v in organic.items()}
        ar.update(moisture=M, ash=A_d * (1 - M))
    else:
        if "moisture" in an or "ash" in an:
            raise InputError(f"{what}: a daf analysis has no moisture or ash; give the as-received "
                             f"moisture as {what}.moisture and the dry-basis ash as {what}.ash")
        total = sum(organic.values())
        M = _num(moisture or 0.0, f"{what}.moisture", lo=0.0, hi=0.99)
        A_d = _num(ash or 0.0, f"{what}.ash", lo=0.0, hi=0.99)
        f = (1 - M) * (1 - A_d)
        ar = {k: v * f for k, v in organic.items()}
        ar.update(moisture=M, ash=A_d * (1 - M))
    if abs(total - 1.0) > 1e-3:
        raise InputError(f"{what}.analysis ({basis}) sums to {total:.6g}; mass fractions on that "
                         f"basis must sum to 1 within 0.001")
    s = sum(ar.values())
    ar = {k: v / s for k, v in ar.items()}
    dry = {k: v / (1 - ar["moisture"]) for k, v in ar.items() if k != "moisture"}
    daf_tot = sum(ar[k] for k in BURNING)
    if daf_tot <= 0:
        raise InputError(f"{what}.analysis has no C, H, O, N or S: nothing to burn")
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
    from ..thermo.saturation import h_vap_J_per_kg
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


def _condensed_bases(formula, analysis, basis, moisture, ash, W, what) -> tuple[dict, str, str, float | None]:
    """(mass fractions on each basis, basis, kind "formula" / "analysis", M of the formula unit or None)."""
    if formula is not None:
        if analysis is not None:
            raise InputError(f"{what}: give a formula or an analysis, not both")
        counts = parse_formula(formula, f"{what}.formula", elements=BURNING, add_repeats=True,
                               example=f"e.g. C12H23 or CH1.8O0.5 (elements {', '.join(BURNING)})")
        M_formula = sum(W[e] * n for e, n in counts.items())
        mass = {e: W[e] * n / M_formula for e, n in counts.items()}
        if moisture or ash:
            raise InputError(f"{what}: a formula fuel has no moisture or ash; use an analysis for those")
        bases = {"as-received": {**{k: mass.get(k, 0.0) for k in BURNING}, "moisture": 0.0, "ash": 0.0}}
        return bases, "as-received", "formula", M_formula
    if not isinstance(analysis, dict):
        raise InputError(f"{what}: give composition (gas species), analysis (mass fractions of "
                         f"C, H, O, N, S, moisture, ash) or formula")
    if basis not in ANALYSIS_BASES:
        raise NameLookupError(f"{what}.basis {basis!r} is not known for an analysis; allowed: "
                              f"{', '.join(ANALYSIS_BASES)}")
    return _convert_analysis(analysis, basis, moisture, ash, what), basis, "analysis", None


def _fuel_enthalpy(el, mw, ar, basis, kind, given, hhv, lhv, h_formation, M_formula, T_hv, notes, data, source,
                   what) -> float:
    """The fuel's enthalpy, J/kg as fired, at the heating value's reference temperature ``T_hv``.

    From the enthalpy of formation, or from the HHV (an LHV first made an HHV with the
    water formed) by HHV = h_fuel + n_O2 h_O2 - Σ n h(products, liquid water).
    """
    from ..thermo.saturation import h_vap_J_per_kg
    # mass of the basis material per kg as fired
    per_kg_ar = {"as-received": 1.0, "dry": 1 - ar["moisture"], "daf": sum(ar[k] for k in BURNING)}[basis]
    prod = _products_of_fuel_per_kg(el, mw)
    o2 = _oxygen_need(el)
    h_o2, _ = _h_molar("O2", T_hv, data, source)
    dh_vap = float(h_vap_J_per_kg(T_hv))
    if h_formation is not None:
        hf = float(h_formation)
        h_ref = hf / (M_formula * 1e-3) if kind == "formula" else hf
        notes.append(f"enthalpy of formation of the fuel given: {h_ref / 1e6:.6g} MJ/kg at {T_hv:g} K")
        return h_ref
    hp_liq, _ = _h_products(prod, T_hv, data, source, liquid_water=True)
    if hhv is not None:
        hhv_ar = float(hhv) * per_kg_ar
    else:
        # water formed per kg of basis material: as received it includes the moisture
        water_b = prod["H2O"] if basis == "as-received" else (prod["H2O"] - mw) / per_kg_ar
        hhv_b = float(lhv) + dh_vap * water_b * _M_H2O() * 1e-3
        hhv_ar = hhv_b * per_kg_ar
    if hhv_ar <= 0:
        raise RangeError(f"{what}: the heating value must be positive")
    notes.append(f"fuel enthalpy derived from the given {given.upper()} "
                 f"(per kg{'' if kind == 'formula' else ' ' + basis}) at {T_hv:g} K")
    return hhv_ar + hp_liq - o2 * h_o2


def condensed_fuel(*, formula=None, basis="as-received", analysis=None,
                   moisture=None, ash=None, hhv=None, lhv=None, h_formation=None, hv_T_ref=T_REF,
                   cp=None, phase="liquid", name=None, id=None, data=(), source=None,
                   what="fuel", uncertainty=None) -> Fuel:
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
    uncertainty : part of the analysis -> expanded uncertainty U (k = 2) of its mass
        fraction (a fraction, or a text with '%')
    """
    W = _weights(data)
    bases, basis, kind, M_formula = _condensed_bases(formula, analysis, basis, moisture, ash, W, what)
    ar = bases["as-received"]
    el = {e: ar.get(e, 0.0) / (W[e] * 1e-3) for e in BURNING if ar.get(e, 0.0) > 0}
    mw = ar["moisture"] / (_M_H2O() * 1e-3)
    if _oxygen_need(el) <= 0:
        raise InputError(f"{what}: the fuel needs no oxygen (it holds as much O as its C, H and S "
                         f"can take): nothing to burn")
    given = [k for k, v in (("hhv", hhv), ("lhv", lhv), ("h_formation", h_formation)) if v is not None]
    if len(given) != 1:
        raise InputError(f"{what}: a fuel given by {'formula' if formula else 'analysis'} needs exactly one "
                         f"of hhv, lhv or h_formation (its enthalpy is not in the data); got "
                         f"{', '.join(given) or 'none'}")
    T_hv = float(hv_T_ref)
    notes = []
    h_ref = _fuel_enthalpy(el, mw, ar, basis, kind, given[0], hhv, lhv, h_formation, M_formula, T_hv,
                           notes, data, source, what)
    if cp is None:
        notes.append("fuel cp not given: its sensible enthalpy is neglected (h(T) = h at the heating "
                     "value's reference temperature)")
    else:
        cp = _num(cp, f"{what}.cp", lo=0.0)
    fid = id or (str(formula) if formula else f"fuel ({kind})")
    analysis_out = bases if kind == "analysis" else {}
    if kind == "analysis":
        raw = {k: float(v) for k, v in analysis.items()}
        tot = sum(raw.values())
        fr = {k: v / tot for k, v in raw.items()}
        unc = check_uncertainty(uncertainty, fr, what)
        given_d = _given(raw, fr, basis, False, False, moisture=moisture, ash=ash)

        def remake(x: dict) -> Fuel:
            return condensed_fuel(basis=basis, analysis=x, moisture=moisture, ash=ash, hhv=hhv, lhv=lhv,
                                  h_formation=h_formation, hv_T_ref=hv_T_ref, cp=cp, phase=phase, name=name,
                                  id=fid, data=data, source=source, what=what)
    else:
        unc, remake = {}, None
        given_d = {"formula": str(formula), "basis": "as-received"}
    given_d["heating_value"] = {k: v for k, v in (("hhv_J_per_kg", hhv), ("lhv_J_per_kg", lhv),
                                                  ("h_formation", h_formation)) if v is not None}
    given_d["heating_value_reference_K"] = T_hv
    return Fuel(id=fid, name=name or fid, kind=kind, elements=el, moisture=mw, ash=ar["ash"],
                M=M_formula, h_ref=h_ref, T_h_ref=T_hv, cp=cp, phase=phase, analysis=analysis_out,
                notes=tuple(notes), given=given_d, uncertainty=unc, remake=remake)


FUEL_KEYS = ("name", "id", "composition", "basis", "water_percent", "normalise", "analysis", "formula",
             "moisture", "ash", "hhv", "lhv", "h_formation", "hv_reference_temperature", "cp", "phase",
             "uncertainty")


def _table_uncertainty(t: dict, part: str, where: str):
    """The ``uncertainty`` table of a fuel table: {part = U}, U written as the parts are."""
    if "uncertainty" not in t:
        return None
    unc = t["uncertainty"]
    if not isinstance(unc, dict) or not unc:
        raise InputError(f"{where}.uncertainty must be a table of parts and their expanded uncertainty "
                         f"(k = 2), e.g. {{CH4 = \"0.5%\"}}")
    raw = t.get(part) or {}
    try:
        total = sum(float(v) for v in raw.values())
    except (TypeError, ValueError):
        return unc
    if abs(total - 100.0) <= 1.0:
        for k, u in unc.items():
            if not isinstance(u, str):
                raise UnitError(f"{where}.uncertainty.{k}: the {part} is in percent, so is its "
                                f"uncertainty; write \"{u}%\"")
    return unc


def check_texts(t: dict, where: str) -> None:
    """The name and id of a fuel or flue gas: one line of text, printed in documents."""
    from ..core.texts import bad_character, one_line_rule
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
    check_table(t, where, FUEL_KEYS, "a table (composition, analysis or formula)")
    check_texts(t, where)
    from ..core.units import temperature_K
    try:
        if "composition" in t:
            for k in ("analysis", "formula", "hhv", "lhv", "h_formation", "cp"):
                if k in t:
                    raise InputError(f"{where}.{k}: a gas fuel by composition takes its enthalpy "
                                     f"from the species data; remove {k}")
            return gas_fuel(t["composition"], t.get("basis", "mole"), water_percent=t.get("water_percent", 0.0),
                            name=t.get("name"), id=t.get("id"), data=data, source=source, what=where,
                            normalise=bool(t.get("normalise", False)),
                            uncertainty=_table_uncertainty(t, "composition", where))
        if "water_percent" in t or "normalise" in t:
            raise InputError(f"{where}: water_percent and normalise belong to gas fuels (composition)")
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
            raise NameLookupError(f"{where}.phase {phase!r} is not known; allowed: liquid, solid")
        if "formula" in t and "uncertainty" in t:
            raise InputError(f"{where}.uncertainty: a formula has no analysis uncertainty; give an analysis")
        return condensed_fuel(formula=t.get("formula"), analysis=t.get("analysis"),
                              basis=t.get("basis", "as-received"), moisture=t.get("moisture"),
                              ash=t.get("ash"), hv_T_ref=T_hv, phase=phase, name=t.get("name"),
                              id=t.get("id"), data=data, source=source, what=where,
                              uncertainty=_table_uncertainty(t, "analysis", where), **kw)
    except SpecError:
        raise
    except TablegenError as e:
        raise SpecError(str(e) if str(e).startswith(where) else f"{where}: {e}") from None


def fuel_from_text(text: str, *, data=(), source=None) -> Fuel:
    """--fuel: a composition ('CH4=0.9,C2H6=0.06,N2=0.04', 'CH4=90%,...', 'basis=mass,...';
    tablegen.core.composition), a species name, or a TOML file."""
    t = str(text).strip()
    if not t:
        raise InputError("fuel is empty; give a composition (CH4=0.9,N2=0.1), a species or a TOML file")
    p = Path(t)
    if t.lower().endswith(".toml") or (p.is_file() and not is_composition(t)):
        if not p.is_file():
            raise InputError(f"fuel file {t!r} does not exist")
        from ..core import tomlread
        raw = tomlread.read(p, f"fuel file {t}", SpecError)
        table = raw.get("fuel", raw) if isinstance(raw.get("fuel"), dict) else raw
        f = fuel_from_table(table, f"{p.name}:fuel" if "fuel" in raw else p.name, data=data, source=source)
        return replace(f, spec=t if "@" not in t else None)
    if "@" in t:
        raise InputError(f"fuel {t!r}: '@' is not allowed in a fuel text (it separates the parts of flue-gas names)")
    if is_composition(t):
        c = parse_composition(t, "fuel", uncertainty=True)
        f = gas_fuel(c.fractions, c.basis, id=t, data=data, source=source, uncertainty=c.uncertainty,
                     percent=c.percent, what=f"fuel {t!r}")
    else:
        f = gas_fuel({t: 1.0}, "mole", id=t, name=t, data=data, source=source)
    return replace(f, spec=t)
