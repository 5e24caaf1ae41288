"""Oxidants: dry, humid or oxygen-enriched air, pure oxygen or any O2 mixture; humid air as a substance.

One syntax for every place an oxidant or a humid air is typed: ``combust
--oxidant``, the oxidant part of ``flue@`` names, the ``oxidant`` of a spec's
combustion table, and, as a gas of its own, every command's SUBSTANCE and a
spec's ``substance``. A base word (``air``, ``oxygen``) alone or followed by
conditions ``KEY=VALUE`` separated by commas (:data:`OXIDANT_CONDITIONS`), or a
dry composition by mole (tablegen.core.composition). The water content of humid air
comes from the saturation pressure of IAPWS-IF97 (tablegen.thermo.saturation).
"""

from __future__ import annotations

import re
from dataclasses import dataclass, replace

from ..core.composition import looks_like as is_composition, parse as parse_composition, write as write_composition
from ..core.errors import InputError, NameLookupError, RangeError, SpecError, TablegenError, UnitError
from .reactants import OXIDANT_SPECIES, P_NORMAL, _M_H2O, _fractions, _g, _h_molar, _num, _record, check_table, read_quantities

@dataclass(frozen=True, slots=True, eq=False)
class Oxidant:
    """An oxidant as supplied: its composition (mole fractions) and the conditions it was given at.

    ``T_K`` is the temperature stated with it (None if none was), which is also
    its inlet temperature for the flame temperature unless one is given there;
    ``P_Pa`` the pressure of its humidity and dew point (101.325 kPa unless stated).
    """

    id: str
    name: str
    composition: dict
    M: float
    humidity_ratio: float = 0.0        # kg H2O / kg dry oxidant
    notes: tuple = ()
    spec: str | None = None            # text that re-creates this oxidant (for flue@ names), if any
    T_K: float | None = None           # temperature stated with the oxidant, K
    P_Pa: float = P_NORMAL             # pressure of the humidity and the dew point, Pa
    humidity_given: str = "dry"        # dry, relative_humidity, humidity_ratio or dew_point
    relative_humidity: float | None = None   # %, at T_K and P_Pa (given, or derived when T_K is stated)
    dew_point_K: float | None = None   # water dew point at P_Pa (None: dry, or below 0 °C)
    o2_percent_dry: float = 0.0        # O2 content of the dry oxidant, % by volume
    base: str = "air"                  # air, oxygen or composition
    enriched: bool = False

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
                "humidity_ratio": self.humidity_ratio, "O2_mole_fraction": self.y_O2,
                "text": self.spec, "base": self.base, "enriched": self.enriched,
                "O2_percent_dry": self.o2_percent_dry, "humidity_given": self.humidity_given,
                "relative_humidity_percent": self.relative_humidity, "temperature_K": self.T_K,
                "pressure_Pa": self.P_Pa, "dew_point_K": self.dew_point_K,
                "water_mole_fraction": self.y_H2O}


OXIDANT_KEYS = ("base", "composition", "o2_percent", "relative_humidity", "temperature", "pressure",
                "humidity_ratio", "dew_point", "name")


def _celsius(T_K: float) -> str:
    return f"{T_K - 273.15:.4g} °C"


def make_oxidant(*, base="air", composition=None, o2_percent=None, relative_humidity=None,
                 temperature_K=None, pressure_Pa=None, humidity_ratio=None, dew_point_K=None, name=None,
                 data=(), source=None, what="oxidant", keyed: bool = False) -> Oxidant:
    """Dry, humid or O2-enriched air, or an O2-bearing mixture.

    Parameters
    ----------
    base : "air" (the shipped dry-air composition) or "oxygen"; ignored with composition
    composition : species -> mole fraction of the dry oxidant (O2, N2, Ar, He, Ne, Kr, Xe, CO2)
    o2_percent : enrich the dry base with pure O2 up to this O2 content, % by volume
    relative_humidity : %, over liquid water at temperature_K (required) and pressure_Pa
    humidity_ratio : kg water per kg dry oxidant, instead of relative_humidity
    dew_point_K : water dew point at pressure_Pa, instead of either (0 °C up to the
        boiling point at pressure_Pa)
    temperature_K : temperature of the oxidant: that of the relative humidity, and the
        inlet temperature of the flame temperature unless another is given there
    pressure_Pa : pressure of the humidity and of the dew point (default 101.325 kPa)
    what, keyed : how messages name the input: ``what`` alone, or (keyed, for spec
        tables) ``what.KEY`` of the key at fault

    Water saturation pressure from IAPWS-IF97 (tablegen.thermo.saturation.p_sat_Pa, eq. 30);
    ideal-gas mixing (Dalton), no enhancement factor.

    Raises
    ------
    TablegenError (one line) for a relative humidity outside 0-100 %, a negative
    humidity ratio, a humidity above saturation at the stated temperature, or a dew
    point above the stated temperature.
    """
    from ..thermo.saturation import water_dew_point_K
    notes = []
    dry, label, kind = _dry_base(base, composition, what, notes)
    dry, recs = _checked_species(dry, data, source, what)
    enriched = False
    if o2_percent is not None:
        dry, label, enriched = _enriched(dry, recs, o2_percent, label, notes, what, data, source)
    if dry.get("O2", 0.0) <= 0:
        raise InputError(f"{what}: contains no O2; an oxidant needs oxygen")
    M_dry = sum(v * recs[k].M for k, v in dry.items())
    T = None if temperature_K is None else _num(temperature_K, f"{what}.temperature (K)", lo=0.0, lo_open=True)
    P = P_NORMAL if pressure_Pa is None else _num(pressure_Pa, f"{what}.pressure (Pa)", lo=0.0, lo_open=True)
    given = [k for k, v in (("relative_humidity", relative_humidity), ("humidity_ratio", humidity_ratio),
                            ("dew_point", dew_point_K)) if v is not None]
    if len(given) > 1:
        raise InputError(f"{what}: {' and '.join(k.replace('_', ' ') for k in given)} are both given; "
                         f"allowed: one of relative humidity (rh), humidity ratio (w) or dew point (dew)")
    how = given[0] if given else "dry"
    humidity = {"relative_humidity": relative_humidity, "humidity_ratio": humidity_ratio,
                "dew_point": dew_point_K}.get(how)
    yw, rh = _water_fraction(how, humidity, T, P, M_dry, what, keyed)
    yw, w, rh = _saturation_checked(how, yw, rh, T, P, M_dry, what)
    dew = water_dew_point_K(yw, P) if yw > 0 else None
    comp = {k: v * (1 - yw) for k, v in dry.items()}
    if yw > 0:
        comp["H2O"] = yw
        recs["H2O"] = _record("H2O", data, source)
    M = sum(v * recs[k].M for k, v in comp.items())
    label = _humid_label(how, label, kind, enriched, T, P, rh, w, yw, dew_point_K, notes)
    spec = _oxidant_spec(base, composition, kind, how, humidity, o2_percent, T, P, pressure_Pa)
    return Oxidant(id=label, name=name or label, composition=comp, M=M, humidity_ratio=w, notes=tuple(notes),
                   spec=spec, T_K=T, P_Pa=P, humidity_given=how, relative_humidity=rh, dew_point_K=dew,
                   o2_percent_dry=dry["O2"] * 100.0, base=kind, enriched=enriched)


def _dry_base(base, composition, what: str, notes: list) -> tuple[dict, str, str]:
    """(dry mole fractions as named, label, kind "composition" / "oxygen" / "air") of the dry oxidant."""
    from ..data.mixtures import shipped_mixtures
    from ..data.records import norm_name
    if composition is not None:
        dry, _ = _fractions(composition, f"{what}.composition")
        return dry, "dry oxidant " + write_composition(dry, digits=4), "composition"
    b = norm_name(str(base))
    if b in ("oxygen", "o2"):
        return {"O2": 1.0}, "oxygen", "oxygen"
    m = shipped_mixtures().get(b)
    if m is None or m["id"] != "air":
        raise NameLookupError(f"{what}.base {base!r} is not known; allowed: air, oxygen (or give a composition)")
    dry = dict(m["components"])
    tot = sum(dry.values())
    dry = {k: v / tot for k, v in dry.items()}
    notes.append("dry air of the shipped composition ("
                 + ", ".join(f"{k} {v:g}" for k, v in m["components"].items()) + ", mole fractions)")
    return dry, "air", "air"


def _checked_species(dry: dict, data, source, what: str) -> tuple[dict, dict]:
    """The dry oxidant keyed by record id, and those records; refuses water and non-oxidant species."""
    recs = {}
    for k in list(dry):
        rec = _record(k, data, source, what=f"{what}.composition.{k}")
        if rec.id not in OXIDANT_SPECIES or rec.id == "H2O":
            raise InputError(f"{what}.composition.{k}: not an oxidant species; allowed: "
                             f"{', '.join(s for s in OXIDANT_SPECIES if s != 'H2O')} "
                             f"(give water as relative_humidity, humidity_ratio or dew_point)")
        if rec.id in recs:
            raise InputError(f"{what}.composition: species {rec.id!r} is given twice")
        recs[rec.id] = rec
        dry[rec.id] = dry.pop(k)
    return dry, recs


def _enriched(dry: dict, recs: dict, o2_percent, label: str, notes: list, what: str, data,
              source) -> tuple[dict, str, bool]:
    """The dry base enriched with pure O2 to ``o2_percent`` (% by volume): (dry, label, enriched)."""
    z = _num(o2_percent, f"{what}.o2_percent", lo=0.0, hi=100.0) / 100.0
    y0 = dry.get("O2", 0.0)
    if z < y0 - 1e-12:
        raise RangeError(f"{what}.o2_percent = {z * 100:g} is below the O2 content of the base "
                         f"({y0 * 100:.4g} %); enrichment adds O2: allowed {y0 * 100:.4g} to 100")
    a = (1 - z) / (1 - y0) if y0 < 1 else 1.0   # share of base gas, rest pure O2
    dry = {k: v * a for k, v in dry.items()}
    dry["O2"] = dry.get("O2", 0.0) + (1 - a)
    recs.setdefault("O2", _record("O2", data, source))
    enriched = z > y0 + 1e-12
    if enriched:
        label = f"O2-enriched {label} ({z * 100:g} % O2, dry basis)"
    notes.append(f"enriched with pure O2 to {z * 100:g} % O2 by volume (dry)")
    return dry, label, enriched


def _water_fraction(how: str, humidity, T, P: float, M_dry: float, what: str,
                    keyed: bool) -> tuple[float, float | None]:
    """(water mole fraction, relative humidity % or None) from the one humidity given.

    ``how`` is "dry", "relative_humidity" (``humidity`` in %), "humidity_ratio" (kg/kg)
    or "dew_point" (K); water saturation pressure from IAPWS-IF97 eq. 30.
    """
    from ..thermo.saturation import T_CRIT, T_LOW_IF97, p_sat_Pa

    def at(key: str, words: str) -> str:
        return f"{what}.{key}:" if keyed else f"{what}: {words}"

    if how == "relative_humidity":
        rh = _num(humidity, f"{what}: relative humidity (%)")
        if not 0.0 <= rh <= 100.0:
            raise RangeError(f"{at('relative_humidity', 'relative humidity')} {rh:g} % is outside 0 to 100 %; "
                             f"allowed: 0 <= rh <= 100 %")
        if T is None:
            raise InputError(f"{what}: a relative humidity needs the air temperature it is stated at; "
                             f"write e.g. air,rh={rh:g}%,T=25C")
        if not T_LOW_IF97 <= T <= T_CRIT:
            raise RangeError(f"{what}: relative humidity is taken over liquid water between 0 °C and "
                             f"373.946 °C; T = {_celsius(T)} is outside; give a humidity ratio (w=...) instead")
        pw = rh / 100.0 * float(p_sat_Pa(T))
        if pw >= P:
            raise RangeError(f"{what}: water vapour pressure {pw:g} Pa reaches the total pressure {P:g} Pa; "
                             f"allowed: a relative humidity whose vapour pressure stays below the pressure")
        return pw / P, rh
    if how == "humidity_ratio":
        w = _num(humidity, f"{what}: humidity ratio (kg/kg)")
        if w < 0:
            raise RangeError(f"{at('humidity_ratio', 'humidity ratio')} {w:g} kg/kg is negative; allowed: w >= 0 "
                             f"(e.g. w=8g/kg)")
        if w > 10:
            raise RangeError(f"{at('humidity_ratio', 'humidity ratio')} {w:g} kg/kg is too large; allowed: "
                             f"0 <= w <= 10 kg/kg")
        r = w * M_dry / _M_H2O()
        return r / (1 + r), None
    if how == "dew_point":
        Td = _num(humidity, f"{what}: dew point (K)", lo=0.0, lo_open=True)
        if Td < T_LOW_IF97:
            raise RangeError(f"{at('dew_point', 'dew point')} {_celsius(Td)} is below 0 °C, where water deposits as ice "
                             f"(a frost point); give the humidity ratio (w=...) instead")
        if T is not None and Td > T + 1e-9:
            raise RangeError(f"{at('dew_point', 'dew point')} {_celsius(Td)} is above the air temperature {_celsius(T)}; "
                             f"allowed: a dew point at or below the air temperature")
        pw = float(p_sat_Pa(min(Td, T_CRIT)))
        if pw >= P:
            raise RangeError(f"{what}: a dew point of {_celsius(Td)} needs a water vapour pressure of {pw:g} Pa, "
                             f"not below the pressure {P:g} Pa; allowed: a dew point below the boiling point "
                             f"at that pressure")
        return pw / P, None
    return 0.0, None


def _saturation_checked(how: str, yw: float, rh, T, P: float, M_dry: float,
                        what: str) -> tuple[float, float, float | None]:
    """(water mole fraction, humidity ratio kg/kg, relative humidity %): refuses a humid oxidant
    above saturation at its stated temperature, and gives its relative humidity there."""
    from ..thermo.saturation import T_CRIT, T_LOW_IF97, p_sat_Pa
    M_w = _M_H2O()
    w = yw / (1 - yw) * M_w / M_dry
    if how != "dry" and T is not None and T_LOW_IF97 <= T <= T_CRIT:
        ps = float(p_sat_Pa(T))
        rh_T = yw * P / ps * 100.0
        if rh_T > 100.0 * (1 + 1e-9):
            y_s = min(ps / P, 1.0)
            w_max = y_s / (1 - y_s) * M_w / M_dry if y_s < 1 else float("inf")
            raise RangeError(f"{what}: humidity ratio {w * 1000:.4g} g/kg is above saturation at {_celsius(T)} "
                             f"and {P / 1000:g} kPa; allowed: w <= {w_max * 1000:.4g} g/kg there")
        rh = rh_T if rh is None else rh
    return yw, w, rh


def _humid_label(how, label, kind, enriched, T, P, rh, w, yw, dew_point_K, notes) -> str:
    """The oxidant's label (and, when humid, its note): what the user stated, in the order they would read it."""
    from ..thermo.saturation import p_sat_Pa
    if how == "dry":
        return ("dry " + label if kind == "air" and not enriched else label) + (
            f" at {_celsius(T)}" if T is not None else "")
    if how == "relative_humidity":
        cond = f"RH {rh:g} % at {_celsius(T)} and {P / 1000:g} kPa"
    elif how == "humidity_ratio":
        cond = f"humidity ratio {w * 1000:.4g} g/kg" + (f" at {_celsius(T)}" if T is not None else "")
    else:
        cond = f"dew point {_celsius(float(dew_point_K))} at {P / 1000:g} kPa" + (
            f", air at {_celsius(T)}" if T is not None else "")
    ps_note = ""
    if how == "relative_humidity":
        ps_note = (f"; saturation pressure of water at {_celsius(T)} from IAPWS-IF97 region 4 (eq. 30): "
                   f"{float(p_sat_Pa(T)):.6g} Pa")
    elif how == "dew_point":
        ps_note = (f"; saturation pressure of water at the dew point from IAPWS-IF97 region 4 (eq. 30): "
                   f"{yw * P:.6g} Pa")
    notes.append(f"humid: {cond}{ps_note}; water {yw * 100:.6g} % by volume, humidity ratio "
                 f"{w * 1000:.6g} g/kg (ideal-gas mixing, no enhancement factor)")
    return f"humid {label}, {cond}"


def _oxidant_spec(base, composition, kind, how, humidity, o2_percent, T, P, pressure_Pa) -> str | None:
    """The oxidant written back as it is typed (``air,rh=60%,T=298.15K,P=101325Pa``), for flue@ names;
    None for a composition with conditions (no text form)."""
    opts = []
    if o2_percent is not None:
        opts.append(f"O2={_g(o2_percent)}%")
    if how == "relative_humidity":
        opts.append(f"rh={_g(humidity)}%")
    elif how == "humidity_ratio":
        opts.append(f"w={_g(humidity)}kg/kg")
    elif how == "dew_point":
        opts.append(f"dew={_g(float(humidity))}K")
    if T is not None:
        opts.append(f"T={_g(T)}K")
    if how in ("relative_humidity", "dew_point") or pressure_Pa is not None:
        opts.append(f"P={_g(P)}Pa")
    if composition is None:
        return ",".join(["oxygen" if kind == "oxygen" and not opts else str(base).strip().lower(), *opts])
    return None if opts else write_composition({k: float(v) for k, v in composition.items()})


#: Conditions of an oxidant written BASE,KEY=VALUE,... (docs/combustion.md), with what they mean.
OXIDANT_CONDITIONS = {
    "O2": "O2 content of the dry oxidant after enrichment with pure O2 (O2=30% or O2=0.3)",
    "rh": "relative humidity over liquid water at T and P (rh=60%; needs T)",
    "w": "humidity ratio, water per dry oxidant (w=8g/kg or w=0.008kg/kg)",
    "dew": "water dew point at P (dew=5C)",
    "T": "temperature of the air: that of rh, and its inlet temperature for the flame temperature (T=25C)",
    "P": "pressure of the humidity and the dew point (P=1atm; default 101.325 kPa)",
}
#: Base words of the BASE,KEY=VALUE form.
OXIDANT_BASES = ("air", "oxygen")
OXIDANT_FORMS = ("air, oxygen, air,rh=60%,T=25C[,P=1atm], air,w=8g/kg, air,dew=5C[,P=1atm], air,O2=30%, "
                 "or O2=0.3,N2=0.7")
_HUMIDITY_RATIO = re.compile(r"^([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(kg/kg|g/kg)$")


def is_oxidant_base(head: str) -> bool:
    """Whether ``head`` is a base word of the BASE,KEY=VALUE oxidant form (air and its aliases, oxygen)."""
    from ..data.mixtures import shipped_mixtures
    from ..data.records import norm_name
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
    from ..core.units import pressure_Pa, temperature_K
    keys = {k.lower(): k for k in OXIDANT_CONDITIONS}
    kw, seen = {}, set()
    for item in rest.split(","):
        k, eq, v = (x.strip() for x in item.partition("="))
        key = k if k in OXIDANT_CONDITIONS else keys.get(k.lower())
        if not eq or key is None:
            raise NameLookupError(f"oxidant {t!r}: {item.strip()!r} is not a condition of {head}; allowed: "
                                  f"O2 (O2=30%), rh (rh=60%), w (w=8g/kg), dew (dew=5C), T (T=25C), P (P=1atm)")
        if key in seen:
            raise InputError(f"oxidant {t!r}: {key} is given twice")
        seen.add(key)
        if key == "O2":
            kw["o2_percent"] = _o2_content(t, v)
        elif key == "rh":
            if not v.endswith("%"):
                raise UnitError(f"oxidant {t!r}: rh={v} is a relative humidity in %; write rh={v}%")
            kw["relative_humidity"] = _num(v[:-1].strip(), f"oxidant {t!r}: rh (%)")
        elif key == "T":
            kw["temperature_K"] = temperature_K(v, f"oxidant {t!r}: T")
        elif key == "dew":
            kw["dew_point_K"] = temperature_K(v, f"oxidant {t!r}: dew")
        elif key == "P":
            kw["pressure_Pa"] = pressure_Pa(v, f"oxidant {t!r}: P")
        else:
            m = _HUMIDITY_RATIO.match(v)
            if not m:
                raise UnitError(f"oxidant {t!r}: w={v} is a humidity ratio with its unit; write e.g. "
                                f"w=0.008kg/kg or w=8g/kg")
            kw["humidity_ratio"] = float(m.group(1)) * (1e-3 if m.group(2) == "g/kg" else 1.0)
    if "P" in seen and not seen & {"rh", "w", "dew"}:
        raise InputError(f"oxidant {t!r}: P is the pressure of the humidity; give it with rh, w or dew, "
                         f"e.g. {head},rh=60%,T=25C,P=1atm")
    return kw


def _o2_content(t: str, v: str) -> float:
    """O2=30% or O2=0.3 -> 30.0 (% by volume)."""
    s = v[:-1].strip() if v.endswith("%") else v
    x = _num(s, f"oxidant {t!r}: O2")
    if not v.endswith("%"):
        if x > 1:
            raise RangeError(f"oxidant {t!r}: O2={v} is above 1; give the O2 content as a fraction "
                             f"(O2={x / 100:g}) or with its sign (O2={v}%)")
        x *= 100.0
    return x


def oxidant_from_text(text: str, *, data=(), source=None, what: str = "oxidant") -> Oxidant:
    """--oxidant: 'air', 'oxygen', 'air,rh=60%,T=25C,P=1atm', 'air,w=8g/kg', 'air,O2=30%' or 'O2=0.3,N2=0.7'.

    A base word (air or oxygen) alone or followed by conditions (OXIDANT_CONDITIONS),
    or a dry composition by mole (tablegen.core.composition).
    """
    t = str(text).strip()
    if not t:
        raise InputError(f"oxidant is empty; allowed: {OXIDANT_FORMS}")
    if "@" in t:
        raise InputError(f"oxidant {t!r}: '@' is not allowed (it separates the parts of flue-gas names)")
    fix = oxidant_colon_fix(t)
    if fix is not None:
        raise InputError(f"oxidant {t!r} uses ':' after {t.partition(':')[0].strip()}; write {fix}")
    head, sep, rest = t.partition(",")
    if "=" not in head and is_oxidant_base(head):
        kw = _oxidant_conditions(t, head.strip(), rest) if sep else {}
        return replace(make_oxidant(base=head.strip(), data=data, source=source, what=f"{what} {t!r}", **kw),
                       spec=t)
    if not is_composition(t):
        raise NameLookupError(f"oxidant {t!r} is not known; allowed: {OXIDANT_FORMS}")
    c = parse_composition(t, "oxidant")
    if c.basis != "mole":
        raise InputError(f"oxidant {t!r}: an oxidant composition is by mole (= by volume); "
                         f"remove basis={c.basis}")
    return replace(make_oxidant(composition=c.fractions, data=data, source=source, what=f"{what} {t!r}"),
                   spec=t)


def oxidant_from_table(t, where="oxidant", *, data=(), source=None) -> Oxidant:
    if isinstance(t, str):
        try:
            return oxidant_from_text(t, data=data, source=source)
        except TablegenError as e:
            raise SpecError(f"{where}: {e}") from None
    check_table(t, where, OXIDANT_KEYS, f"a string ({OXIDANT_FORMS}) or a table")
    try:
        kw = {k: t[k] for k in ("base", "composition", "o2_percent", "relative_humidity", "humidity_ratio",
                                 "name") if k in t}
        rh = kw.get("relative_humidity")
        if isinstance(rh, str):
            if not rh.strip().endswith("%"):
                raise UnitError(f"{where}.relative_humidity {rh!r} is a percentage; write e.g. \"60%\"")
            kw["relative_humidity"] = _num(rh.strip()[:-1], f"{where}.relative_humidity (%)")
        w = kw.get("humidity_ratio")
        if isinstance(w, str):
            m = _HUMIDITY_RATIO.match(w.strip())
            if not m:
                raise UnitError(f"{where}.humidity_ratio {w!r} is a humidity ratio with its unit; write "
                                f"e.g. \"8g/kg\" or \"0.008kg/kg\"")
            kw["humidity_ratio"] = float(m.group(1)) * (1e-3 if m.group(2) == "g/kg" else 1.0)
        kw.update(read_quantities(t, where, {"dew_point": ("dew_point_K", "temperature"),
                                             "temperature": ("temperature_K", "temperature"),
                                             "pressure": ("pressure_Pa", "pressure")}))
        return make_oxidant(data=data, source=source, what=where, keyed=True, **kw)
    except TablegenError as e:
        raise SpecError(str(e) if str(e).startswith(where) else f"{where}: {e}") from None


def humid_air_substance(text: str, *, data=(), source=None):
    """Humid (or enriched, or tempered) air as a substance: the oxidant text ``air,rh=60%,T=15C``.

    The same text and the same composition as ``combust --oxidant`` reads; the
    water dew point at the stated pressure (P, default 101.325 kPa) is attached,
    and the oxidant itself is the substance's ``origin`` (documents print its
    conditions).
    """
    from ..thermo.saturation import with_dew_point
    from ..thermo.build import mixture_substance
    ox = oxidant_from_text(text, data=data, source=source, what="humid air")
    recs = [(_record(k, data, source), y) for k, y in ox.composition.items()]
    sub = mixture_substance(recs, "mole", id=str(text).strip(), name=ox.name, what=f"humid air {text!r}")
    sub = with_dew_point(sub, ox.P_Pa)
    return replace(sub, origin=ox, _cache={})
