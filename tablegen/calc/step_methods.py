"""Method comparison of the process steps: the exact result against constant cp and k.

For each step the entropy change by the exact s°(T) (or ∫c/T dT) against
constant cp taken at 298.15 K and at the mean temperature, and for the
machine steps of an ideal gas the isentropic end temperature and the work by
the exact relative-pressure route against the constant-k power law
T2s = T1 (P2/P1)^((k-1)/k) with k at 298.15 K, at T1 and at the mean
temperature (iterated); each with its error against the exact value
(:mod:`tablegen.calc.steps` computes the exact results).
"""

from __future__ import annotations

from dataclasses import dataclass
from types import MappingProxyType

import numpy as np

from ..core.errors import RangeError
from ..core.constants import T_REF

#: Relative tolerance of the fixed-point iteration of the power law with k at the mean temperature.
MEAN_K_RTOL = 1e-12


@dataclass(frozen=True, slots=True)
class Estimate:
    """One quantity by one method, with its error against the exact method.

    ``error`` = value - exact (same unit as value); ``rel_error`` = error/|exact|
    where the exact value is not zero to round-off, else NaN.
    """

    quantity: str        # "ds", "T2s", "w", "q", "T2"
    method: str          # "exact", "cp_298", "cp_mean", "k_298", "k_T1", "k_mean"
    label: str           # how a reader sees the method
    unit: str            # SI unit of value and error
    value: np.ndarray
    error: np.ndarray
    rel_error: np.ndarray
    parameter: np.ndarray | None = None      # the cp or k the method used
    parameter_name: str = ""                 # "cp", "k", "c", "cv"


def _rel(err, exact, floor):
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.where(np.abs(exact) > floor, err / np.abs(exact), np.nan)


def estimate(quantity, method, label, unit, value, exact, floor, parameter=None, pname=""):
    value = np.asarray(value, float)
    err = value - exact
    return Estimate(quantity, method, label, unit, value, err, _rel(err, exact, floor),
                    None if parameter is None else np.asarray(parameter, float), pname)


def _cpk(sub, T):
    """cp, cv (J/(kg K)) and k at T, and whether any T lies outside the data range.

    The comparison may evaluate slightly outside the range (a power-law end
    temperature beyond T_max); only cp/R is evaluated, as the iterations call
    this often.
    """
    T = np.asarray(T, float)
    cpR = sub.poly.evaluate(T, want=("cp",))["cp"]
    R = sub.R
    return cpR * R, (cpR - 1.0) * R, cpR / (cpR - 1.0), bool(np.any((T < sub.T_min) | (T > sub.T_max)))


def gas_comparison(sub, step, T1, P1, T2, P2, ds, T2s, w, q, eta, params, p1, p2):
    R = sub.R
    out = {}
    lnP = np.log(P2 / P1)
    lnT = np.log(T2 / T1)
    Tm = 0.5 * (T1 + T2)
    cp298, cv298, k298, x298 = _cpk(sub, np.array(T_REF))
    cpm, cvm, _, xm = _cpk(sub, Tm)
    ext = " (extrapolated)" if x298 else ""
    floor_s = 1e-9 * R
    out["ds"] = (
        estimate("ds", "exact", "exact s°(T)", "J/(kg K)", ds, ds, floor_s),
        estimate("ds", "cp_298", f"cp at {T_REF:g} K{ext}", "J/(kg K)", cp298 * lnT - R * lnP, ds,
                  floor_s, cp298, "cp"),
        estimate("ds", "cp_mean", "cp at mean T (T1+T2)/2", "J/(kg K)", cpm * lnT - R * lnP, ds,
                  floor_s, cpm, "cp"),
    )
    if step in ("compress", "expand"):
        ratio = P2 / P1
        k1 = sub.properties(T1)["k"]
        cp1 = sub.properties(T1)["cp"]

        def power(k):
            return T1 * ratio ** ((k - 1.0) / k)

        T_k298 = power(k298)
        T_k1 = power(k1)
        T_km = T_k1
        for _ in range(200):
            cp_mean, _, k_mean, _ = _cpk(sub, 0.5 * (T1 + T_km))
            Tn = power(k_mean)
            done = np.all(np.abs(Tn - T_km) <= MEAN_K_RTOL * Tn)
            T_km = Tn
            if done:
                break
        else:
            raise RangeError("the power law with k at the mean temperature did not converge")
        cp_mean, _, k_mean, _ = _cpk(sub, 0.5 * (T1 + T_km))
        floor_T = 1e-12 * T1
        out["T2s"] = (
            estimate("T2s", "exact", "exact, Pr route", "K", T2s, T2s, floor_T),
            estimate("T2s", "k_298", f"power law, k at {T_REF:g} K{ext}", "K", T_k298, T2s, floor_T,
                      k298, "k"),
            estimate("T2s", "k_T1", "power law, k at T1", "K", T_k1, T2s, floor_T, k1, "k"),
            estimate("T2s", "k_mean", "power law, k at mean T (iterated)", "K", T_km, T2s, floor_T,
                      k_mean, "k"),
        )

        def work(cp, Ts):
            ws = cp * (Ts - T1)
            return ws / eta if step == "compress" else ws * eta

        floor_w = 1e-12 * cp1 * T1
        out["w"] = (
            estimate("w", "exact", "exact, h(T2) - h(T1)", "J/kg", w, w, floor_w),
            estimate("w", "k_298", f"cp and k at {T_REF:g} K{ext}", "J/kg", work(cp298, T_k298), w,
                      floor_w, cp298, "cp"),
            estimate("w", "k_T1", "cp and k at T1", "J/kg", work(cp1, T_k1), w, floor_w, cp1, "cp"),
            estimate("w", "k_mean", "cp and k at mean T (iterated)", "J/kg", work(cp_mean, T_km), w,
                      floor_w, cp_mean, "cp"),
        )
    elif step in ("heat_p", "heat_v"):
        c298, cm, name = (cp298, cpm, "cp") if step == "heat_p" else (cv298, cvm, "cv")
        scale = 1e-12 * c298 * T1
        if params.get("T2_K") is not None:
            out["q"] = (
                estimate("q", "exact", "exact, " + ("h(T2) - h(T1)" if name == "cp" else "u(T2) - u(T1)"),
                          "J/kg", q, q, scale),
                estimate("q", "cp_298", f"{name} at {T_REF:g} K{ext}", "J/kg", c298 * (T2 - T1), q, scale,
                          c298, name),
                estimate("q", "cp_mean", f"{name} at mean T (T1+T2)/2", "J/kg", cm * (T2 - T1), q, scale,
                          cm, name),
            )
        else:
            T_m = T1 + q / c298
            for _ in range(200):
                cc = _cpk(sub, 0.5 * (T1 + T_m))[0 if name == "cp" else 1]
                Tn = T1 + q / cc
                done = np.all(np.abs(Tn - T_m) <= MEAN_K_RTOL * np.abs(Tn))
                T_m = Tn
                if done:
                    break
            else:
                raise RangeError(f"{step}: the mean-{name} estimate of T2 did not converge")
            floor_T = 1e-12 * T1
            out["T2"] = (
                estimate("T2", "exact", "exact, from " + ("h" if name == "cp" else "u"), "K", T2, T2, floor_T),
                estimate("T2", "cp_298", f"{name} at {T_REF:g} K{ext}", "K", T1 + q / c298, T2, floor_T,
                          c298, name),
                estimate("T2", "cp_mean", f"{name} at mean T (iterated)", "K", T_m, T2, floor_T, cc, name),
            )
    return MappingProxyType(out)


def liquid_comparison(sub, T1, T2, ds):
    """c at 298.15 K and at the mean temperature against ∫c/T dT, for an incompressible substance."""
    lnT = np.log(T2 / T1)
    c298 = sub.c(T_REF)
    cm = sub.c(0.5 * (T1 + T2))
    floor_s = 1e-12 * max(abs(float(c298)), 1.0)
    comp = {"ds": (
        estimate("ds", "exact", "exact, ∫c/T dT", "J/(kg K)", ds, ds, floor_s),
        estimate("ds", "cp_298", f"c at {T_REF:g} K", "J/(kg K)", c298 * lnT, ds, floor_s, c298, "c"),
        estimate("ds", "cp_mean", "c at mean T (T1+T2)/2", "J/(kg K)", cm * lnT, ds, floor_s, cm, "c"),
    )}
    return MappingProxyType(comp)
