"""Book specs, the [substances] tables: named species, mixtures and combustion products."""

from __future__ import annotations

import math
import re
from dataclasses import replace

from ..core.errors import SpecError, TablegenError
from .values import _check_keys, _choice, _fail, _get, _text, _typename

#: What a substance id and a table name may be (a table name names its CSV file).
NAME_RE = re.compile(r"^[A-Za-z0-9][A-Za-z0-9_.-]{0,63}$")


SUBSTANCE_KEYS = ("name", "of", "mixture", "basis", "combustion", "fraction_uncertainty")


def _fraction_u(raw, comp, where, source, data) -> dict:
    """fraction_uncertainty = {SPECIES = u}: standard uncertainties of the given fractions."""
    from ..data.library import library
    if not isinstance(raw, dict) or not raw:
        _fail(where, "must be a table of species = standard uncertainty of its fraction, e.g. {CH4 = 0.005}")
    out = {}
    for k, u in raw.items():
        if k not in comp:
            _fail(f"{where}.{k}", f"is not a component of this mixture; allowed: {', '.join(comp)}")
        if isinstance(u, bool) or not isinstance(u, (int, float)) or not (math.isfinite(u) and 0 <= u < 1):
            _fail(f"{where}.{k}", f"must be a standard uncertainty of a fraction, 0 <= u < 1, not {u!r}")
        out[library(tuple(data)).record(k, source=source).id] = float(u)
    return out


def parse_substances(raw, where, source, data, comp_u=None) -> dict:
    """[substances.ID] tables -> {ID: Substance} (before per-table options).

    ``comp_u`` (a dict) receives {ID: (basis, {species id: u})} for mixtures that
    state the uncertainty of their fractions.
    """
    from ..calc import names as api
    comp_u = {} if comp_u is None else comp_u
    if not isinstance(raw, dict):
        _fail(where, f"must be a table of named substances, not {_typename(raw)}")
    out = {}
    for sid, entry in raw.items():
        w = f"{where}.{sid}"
        if not NAME_RE.match(sid):
            _fail(w, "a substance id is 1-64 letters, digits, '.', '_' or '-', starting with a letter or digit")
        if not isinstance(entry, dict):
            _fail(w, f"must be a table, not {_typename(entry)}")
        _check_keys(entry, SUBSTANCE_KEYS, w)
        if "fraction_uncertainty" in entry and "mixture" not in entry:
            _fail(f"{w}.fraction_uncertainty", "applies only to 'mixture' (the fractions it qualifies)")
        given = [k for k in ("of", "mixture", "combustion") if k in entry]
        if len(given) != 1:
            _fail(w, "give exactly one of 'of' (a species, alias or shipped mixture), "
                     "'mixture' (fractions) or 'combustion'")
        name = _text(entry, "name", w, default="")
        try:
            if "of" in entry:
                of = _get(entry, "of", str, w)
                if "basis" in entry:
                    _fail(f"{w}.basis", "applies only to 'mixture'")
                sub = api.substance(of, source=source, data=data)
            elif "mixture" in entry:
                comp = _get(entry, "mixture", dict, w)
                if not comp:
                    _fail(f"{w}.mixture", "is empty; give species = fraction pairs, e.g. {CH4 = 0.9, N2 = 0.1}")
                for k, x in comp.items():
                    if isinstance(x, bool) or not isinstance(x, (int, float)):
                        _fail(f"{w}.mixture.{k}", f"must be a number (a fraction), not {_typename(x)}")
                    if not (math.isfinite(x) and 0 <= x <= 1):
                        _fail(f"{w}.mixture.{k}", f"fraction {x!r} must lie between 0 and 1")
                total = sum(comp.values())
                if abs(total - 1.0) > 1e-6:
                    _fail(f"{w}.mixture", f"fractions sum to {total:.9g}; they must sum to 1 within 1e-6")
                basis = _choice(entry, "basis", ("mole", "mass"), w, "mole")
                sub = api.mixture(dict(comp), basis=basis, source=source, data=data, id=sid,
                                  name=name or sid)
                if "fraction_uncertainty" in entry:
                    comp_u[sid] = (basis, _fraction_u(entry["fraction_uncertainty"], comp,
                                                      f"{w}.fraction_uncertainty", source, data))
            else:
                sub = _combustion(entry["combustion"], f"{w}.combustion", source=source, data=data)
                sub = replace(sub, id=sid, name=name or sub.name, _cache={})
        except SpecError:
            raise
        except TablegenError as e:
            _fail(w, str(e))
        if name and "of" in entry:
            sub = replace(sub, name=name, _cache={})
        out[sid] = sub
    return out


def _combustion(raw, where, *, source=None, data=()):
    """Combustion products of a fuel (or a measured flue-gas analysis), by tablegen.calc.burn."""
    from ..calc import flue
    if not isinstance(raw, dict):
        _fail(where, f"must be a table, not {_typename(raw)}")
    return flue.substance_from_spec(raw, where, source=source, data=data)


def _combustion_inputs(o) -> dict:
    """What a combustion result was computed from (the fingerprint covers them)."""
    from ..calc.burn_result import amount_json
    fl = o.flame
    return {"fuel": o.fuel.describe(), "oxidant": o.oxidant.describe(), "amount_given": amount_json(o.amount_given),
            "T_fuel_K": fl.T_fuel_K, "T_fuel_source": fl.T_fuel_source, "T_oxidant_K": fl.T_oxidant_K,
            "T_oxidant_source": fl.T_oxidant_source, "flue_pressure_Pa": o.dew_point.flue_pressure_Pa,
            "combustion_reference_T_K": o.heating_values.T_ref_K, "metering_T_K": o.metering_T_K,
            "metering_P_Pa": o.metering_P_Pa}


def made_from(sub) -> dict:
    """What a substance was made from, for the normalised spec: the inputs of its combustion,
    or the conditions of a humid air; {} for others."""
    from ..calc.burn_result import CombustionResult
    from ..calc.oxidants import Oxidant
    o = getattr(sub, "origin", None)
    out = {}
    if isinstance(o, CombustionResult):
        out["combustion"] = _combustion_inputs(o)
    elif isinstance(o, Oxidant):
        out["humid_air"] = o.describe()
    if getattr(sub, "dew_point_P_Pa", None) is not None:
        out["dew_point"] = {"T_K": sub.dew_point_K, "P_Pa": sub.dew_point_P_Pa}
    return out
