"""Oxidants: dry, humid or oxygen-enriched air, pure oxygen or any O2 mixture; humid air as a substance.

One syntax for every place an oxidant or a humid air is typed: ``combust
--oxidant``, the oxidant part of ``flue@`` names, the ``oxidant`` of a spec's
combustion table, and, as a gas of its own, every command's SUBSTANCE and a
spec's ``substance``. A base word (``air``, ``oxygen``) alone or followed by
conditions ``KEY=VALUE`` separated by commas (:data:`OXIDANT_CONDITIONS`), or a
dry composition by mole (tablegen.composition). The water content of humid air
comes from the saturation pressure of IAPWS-IF97 (tablegen.saturation).
"""

from __future__ import annotations

import re
from dataclasses import dataclass, replace

from .composition import looks_like as is_composition, parse as parse_composition, write as write_composition
from .errors import SpecError, TablegenError
from .reactants import OXIDANT_SPECIES, P_NORMAL, _M_H2O, _fractions, _g, _h_molar, _num, _record

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
