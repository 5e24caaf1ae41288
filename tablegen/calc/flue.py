"""Flue gases as substances: ``flue@`` names, spec combustion tables and measured analyses.

``flue@FUEL@AMOUNT[@OXIDANT][@dry]`` names a flue gas anywhere a substance is
typed; a spec's ``combustion = {...}`` table defines one with its conditions
(flue pressure, inlet temperatures, reference temperature, metering); a
``flue_analysis`` table is a measured flue gas. The calculation is
tablegen.calc.burn's; this module reads the names and tables. Its resolver of
``flue@`` names is listed by tablegen.calc.names (``_name_syntaxes``); nothing is
registered by importing this module.
"""

from __future__ import annotations

from dataclasses import replace
from functools import lru_cache

from .burn import CAUTIONS, combustion, measured_o2
from ..core.composition import colon_form_fix, write as write_composition
from ..core.errors import InputError, NameLookupError, RangeError, SpecError, TablegenError
from .fuels import check_texts, fuel_from_table, fuel_from_text
from .oxidants import oxidant_colon_fix, oxidant_from_table
from .reactants import P_NORMAL, _fractions, _num, _record, read_quantities

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
    key = NAME_AMOUNTS[k.lower()]
    if key in ("o2_dry", "o2_wet"):
        val, U = measured_o2(v, f"flue-gas name amount {k}")
        amount = {key: val} if U is None else {key: val, "o2_uncertainty": U}
    else:
        amount = {key: _num(v.rstrip("%"), f"flue-gas name amount {k}")}
    oxidant = parts[2].strip() if len(parts) == 3 else "air"
    return fuel_text, amount, oxidant, dry


@lru_cache(maxsize=64)
def _resolve_cached(name: str, data: tuple, source):
    fuel_text, amount, oxidant, dry = parse_name(name)
    r = combustion(fuel_text, oxidant, data=data, source=source, **amount)
    sub = r.products_dry if dry else r.products
    if sub is None:
        raise NameLookupError(f"flue-gas name {name!r}: this flue gas is water only, it has no dry part")
    return replace(sub, id=name, _cache={})   # origin (the CombustionResult) travels with it


def resolve(name: str, data=(), source=None):
    """The resolver of flue@ names (tablegen.calc.names names it): a Substance for a flue@ name, else None."""
    if not isinstance(name, str) or not name.strip().lower().startswith(PREFIX):
        return None
    return _resolve_cached(name.strip(), tuple(data), source)


SPEC_KEYS = ("fuel", "oxidant", "excess_air", "lambda", "phi", "o2_dry", "o2_wet", "flue_basis", "name", "id",
             "flue_pressure", "fuel_temperature", "oxidant_temperature", "reference_temperature", "metering")
ANALYSIS_SPEC_KEYS = ("flue_analysis", "basis", "water_percent", "normalise", "name", "id", "flue_pressure")
#: Spec reference_temperature spellings -> K (ISO 6976 combustion reference temperatures).
REFERENCE_CHOICES = {"25C": 298.15, "20C": 293.15, "15.55C": 288.705555555556, "60F": 288.705555555556,
                     "15C": 288.15, "0C": 273.15}


def _conditions(table: dict, where: str) -> dict:
    """The conditions keys of a combustion spec table -> combustion() keywords (each with its unit)."""
    from ..core.units import pressure_Pa, temperature_K
    try:
        out = read_quantities(table, where, {"flue_pressure": ("P_flue_Pa", "pressure"),
                                             "fuel_temperature": ("T_fuel_K", "temperature"),
                                             "oxidant_temperature": ("T_oxidant_K", "temperature")})
        if "reference_temperature" in table:
            ref = str(table["reference_temperature"]).replace(" ", "").replace("°", "")
            if ref not in REFERENCE_CHOICES:
                raise RangeError(f"{where}.reference_temperature {table['reference_temperature']!r} is not "
                                 f"allowed; allowed: 25C, 20C, 15.55C (60F), 15C, 0C (ISO 6976)")
            out["T_ref_K"] = REFERENCE_CHOICES[ref]
        if "metering" in table:
            parts = str(table["metering"]).split(",")
            if len(parts) != 2:
                raise InputError(f"{where}.metering {table['metering']!r}: give T,P, e.g. \"15C,101.325kPa\"")
            out["T_meter_K"] = temperature_K(parts[0], f"{where}.metering temperature")
            out["P_meter_Pa"] = pressure_Pa(parts[1], f"{where}.metering pressure")
    except SpecError:
        raise
    except TablegenError as e:
        raise SpecError(str(e) if str(e).startswith(where) else f"{where}: {e}") from None
    return out


CAUTION_SULFUR_MEASURED = ("The flue gas holds SO2 (and, in practice, some SO3): its acid dew point (sulfuric acid "
                           "condensing) lies well above its water dew point and is not computed; surfaces below it "
                           "corrode.")


def flue_gas_from_analysis(composition: dict, basis: str = "volume-dry", *, water_percent: float = 0.0,
                           normalise: bool = False, name=None, id=None, data=(), source=None,
                           what="flue_analysis", P_flue_Pa: float = P_NORMAL):
    """A measured flue-gas analysis (% by volume, dry or wet) as a Substance.

    Parameters
    ----------
    composition : species -> % by volume (or fractions)
    basis : "volume-dry" (then ``water_percent``, the H2O of the wet gas in %) or "volume-wet"
    """
    from ..thermo.build import mixture_substance
    if basis not in ("volume-dry", "volume-wet"):
        raise NameLookupError(f"{what}: basis {basis!r} is not known; allowed: volume-dry, volume-wet")
    y, _ = _fractions(composition, what, normalise_loose=normalise)
    wp = _num(water_percent, f"{what}: water_percent", lo=0.0, hi=100.0)
    if wp and basis != "volume-dry":
        raise InputError(f"{what}: water_percent is only for basis = \"volume-dry\"")
    recs = [(_record(k, data, source, what=f"{what}.{k}"), v) for k, v in y.items()]
    if basis == "volume-dry":
        if any(r.id == "H2O" for r, _ in recs):
            raise InputError(f"{what}: a dry analysis cannot list H2O; give it as water_percent")
        recs = [(r, v * (1 - wp / 100)) for r, v in recs]
        if wp:
            recs.append((_record("H2O", data, source), wp / 100))
    label = id or "flue gas analysis " + write_composition({r.id: v for r, v in recs}, digits=6)
    sub = mixture_substance(recs, "mole", id=label, name=name or label, what=what)
    # a measured flue gas: no combustion was computed; the acid dew point where it holds SO2
    from ..thermo.saturation import with_dew_point
    cautions = ((CAUTION_SULFUR_MEASURED,) if any(c.id == "SO2" for c in sub.components) else ()) + CAUTIONS
    return replace(with_dew_point(sub, P_flue_Pa), cautions=cautions, _cache={})


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
    check_texts(table, where)
    if "flue_analysis" in table:
        for k in table:
            if k not in ANALYSIS_SPEC_KEYS:
                raise SpecError(f"{where}.{k} is not known with flue_analysis; allowed: "
                                f"{', '.join(ANALYSIS_SPEC_KEYS)}")
        cond = _conditions(table, where)
        try:
            return flue_gas_from_analysis(table["flue_analysis"], table.get("basis", "volume-dry"),
                                          P_flue_Pa=cond.get("P_flue_Pa", P_NORMAL),
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
    amount = {("air_ratio" if ak == "lambda" else ak): av}
    if ak in ("o2_dry", "o2_wet") and isinstance(av, str):
        try:
            v, U = measured_o2(av, f"{where}.{ak}")
        except TablegenError as e:
            raise SpecError(str(e)) from None
        amount = {ak: v} if U is None else {ak: v, "o2_uncertainty": U}
    elif isinstance(av, bool) or not isinstance(av, (int, float)):
        raise SpecError(f"{where}.{ak} must be a number" + (" or a text such as \"3.5%±0.2%\"" if ak.startswith("o2")
                                                             else "") + f", got {av!r}")
    cond = _conditions(table, where)
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
        r = combustion(fuel, ox, data=data, source=source, **amount, **cond)
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
    return sub
