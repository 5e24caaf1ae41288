"""The columns a table can print: their units, default decimals and SI values.

Below the spec and the documents: the spec checks columns and chooses automatic grids
with these, the table model (book/model.py) converts and rounds with them. Every unit
factor comes from tablegen.core.units (the one conversion table); this module only names the
printed symbol of each column on each basis and unit system.
"""

from __future__ import annotations

import numpy as np

from ..core.errors import NameLookupError
from ..core.constants import R_MOLAR, T_REF
from ..core.units import unit as _unit

# ---------------------------------------------------------------- units
#: (key class, system, basis) -> printed unit symbol; its SI factor is tablegen.core.units' (the one
#: conversion table). Key classes: "cap" (cp, cv, s°, mean cp), "energy" (h, u, g°).
_UNIT_SYMBOLS = {
    ("cap", "SI", "mass"): "kJ/(kg K)", ("energy", "SI", "mass"): "kJ/kg",
    ("cap", "SI", "molar"): "J/(mol K)", ("energy", "SI", "molar"): "kJ/mol",
    ("cap", "SI", "volumetric"): "kJ/(m³ K)", ("energy", "SI", "volumetric"): "kJ/m³",
    ("cap", "US", "mass"): "Btu/(lbm °R)", ("energy", "US", "mass"): "Btu/lbm",
    ("cap", "US", "molar"): "Btu/(lbmol °R)", ("energy", "US", "molar"): "Btu/lbmol",
    ("cap", "US", "volumetric"): "Btu/(ft³ °R)", ("energy", "US", "volumetric"): "Btu/ft³",
}
_CLASS = {"cp": "cap", "cv": "cap", "s0": "cap", "cp_mean_h": "cap", "cp_mean_s": "cap",
          "h": "energy", "u": "energy", "g0": "energy"}

#: Default decimals by (key class or key, system, basis); chosen so that the last
#: printed digit is below the stated agreement of the NASA fits with their
#: source tables (about 1e-4 relative in cp, common practice for these tables).
_DECIMALS = {
    ("cap", "SI", "mass"): 4, ("energy", "SI", "mass"): 2,
    ("cap", "SI", "molar"): 3, ("energy", "SI", "molar"): 3,
    ("cap", "SI", "volumetric"): 4, ("energy", "SI", "volumetric"): 2,
    ("cap", "US", "mass"): 5, ("energy", "US", "mass"): 2,
    ("cap", "US", "molar"): 4, ("energy", "US", "molar"): 1,
    ("cap", "US", "volumetric"): 6, ("energy", "US", "volumetric"): 3,
}


def unit_for(key: str, system: str, basis: str) -> str:
    """Printed unit symbol of a column."""
    if key in ("k", "Pr", "vr"):
        return "-"
    if key == "a":
        return "m/s" if system == "SI" else "ft/s"
    return _UNIT_SYMBOLS[(_CLASS[key], system, basis)]


def unit_factor(key: str, system: str, basis: str) -> float:
    """SI value of one printed unit of a column (from tablegen.core.units)."""
    if key in ("k", "Pr", "vr"):
        return 1.0
    return _unit(unit_for(key, system, basis)).factor


def default_decimals(key: str, system: str, basis: str) -> int:
    if key == "k":
        return 4
    if key == "a":
        return 1
    return _DECIMALS[(_CLASS[key], system, basis)]



def column_values_SI(sub, T_K, keys, *, extrapolate=False, basis="mass", reference=None,
                     T_mean_ref_K=T_REF) -> dict:
    """Property values (SI, on the chosen basis) for the given column keys.

    Basis "mass": J/kg, J/(kg K); "molar": J/mol, J/(mol K); "volumetric": per m³ at
    the reference conditions (n = P/(R T) mol/m³, ideal gas). k, Pr, vr are
    dimensionless and a is m/s on every basis. Also returns the ``extrapolated``
    mask when extrapolating.
    """
    T = np.asarray(T_K, float)
    p = sub.properties(T, extrapolate=extrapolate)
    need_mean = any(k.startswith("cp_mean") for k in keys)
    if need_mean:
        p_ref = sub.properties(np.array([T_mean_ref_K]), extrapolate=True)
    if basis == "mass":
        scale, suffix = 1.0, ""
    else:
        suffix = "_molar"
        scale = 1.0 if basis == "molar" else reference.P_Pa / (R_MOLAR * reference.T_K)
    out = {}

    def based(k, src=p):
        return src[k + suffix] * scale

    for k in keys:
        if k == "T":
            out[k] = T
        elif k in ("k", "Pr", "vr", "a"):
            out[k] = p[k]
        elif k in ("cp", "cv", "h", "u", "s0", "g0"):
            out[k] = based(k)
        elif k == "cp_mean_h":
            cp_r = based("cp", p_ref)[0]
            dT = T - T_mean_ref_K
            near = np.abs(dT) <= 1e-9 * T_mean_ref_K
            with np.errstate(divide="ignore", invalid="ignore"):
                v = (based("h") - based("h", p_ref)[0]) / dT
            out[k] = np.where(near, cp_r, v)
        elif k == "cp_mean_s":
            cp_r = based("cp", p_ref)[0]
            lr = np.log(T / T_mean_ref_K)
            near = np.abs(lr) <= 1e-9
            with np.errstate(divide="ignore", invalid="ignore"):
                v = (based("s0") - based("s0", p_ref)[0]) / lr
            out[k] = np.where(near, cp_r, v)
        else:  # pragma: no cover - keys are validated by the spec
            raise NameLookupError(f"unknown column {k!r}")
    if "extrapolated" in p:
        out["extrapolated"] = p["extrapolated"]
    return out
