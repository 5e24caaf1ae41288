"""Where the ideal-gas values apply: the real gas's departure from them.

An ideal-gas table is exactly the ideal-gas function; how far a real gas
departs from it at a pressure is a statement of where the table applies, not
an uncertainty of its values. This module estimates the departures from the
second virial coefficient (Tsonopoulos 1974) and words the range of validity
("ideal-gas values within 0.1 % up to X bar above Y K"), with its cautions
(density beyond the virial estimate's range, possible condensation). The
uncertainty budget (tablegen.calc.uncertainty) states it beside U, never inside it.
"""

from __future__ import annotations

import math
import tomllib
from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from .evidence import gasdata_file
from ..core.constants import R_MOLAR

@lru_cache(maxsize=1)
def critical_constants() -> dict:
    """Critical constants from gasdata/critical.toml: id -> (Tc K, Pc Pa, Vc m3/mol, omega, source)."""
    p = gasdata_file("critical.toml")
    if p is None:
        return {}
    raw = tomllib.loads(p.read_text(encoding="utf-8"))
    return {e["id"]: (float(e["Tc_K"]), float(e["Pc_Pa"]), float(e["Vc_m3_per_mol"]),
                      float(e["omega"]), f'{e["source"]}: {e.get("source_note", "")}')
            for e in raw.get("species", [])}


# ---------------------------------------------------------------- virial model
#: Tsonopoulos (1974) correlation of the second virial coefficient,
#: B Pc/(R Tc) = f0(Tr) + omega f1(Tr) + f2(Tr), as {power of 1/Tr: coefficient}.
#: C. Tsonopoulos, An empirical correlation of second virial coefficients,
#: AIChE J. 20 (1974) 263-272.
TSONOPOULOS_F0 = {0: 0.1445, 1: -0.330, 2: -0.1385, 3: -0.0121, 8: -0.000607}
TSONOPOULOS_F1 = {0: 0.0637, 2: 0.331, 3: -0.423, 8: -0.008}
#: Polar term f2 = a/Tr^6 - b/Tr^8: water a = -0.0109, b = 0 (C. Tsonopoulos and
#: J. L. Heidman, Fluid Phase Equilib. 57 (1990) 261-276; from memory).
POLAR_AB = {"H2O": (-0.0109, 0.0)}
#: Polar species without polar parameters here: their B estimate is stated
#: with the wider relative uncertainty.
POLAR_WITHOUT_TERM = frozenset({"NH3", "SO2", "H2S", "HCl", "HF", "HCN", "CH3OH", "C2H5OH", "NO2",
                                "SO3", "COS", "CH2O", "CH3Cl", "CH2Cl2", "CHCl3", "C3H6O"})
#: Expanded (k = 2) uncertainty of the B estimate: relative part and absolute
#: part (m3/mol).  Common practice for corresponding-states B correlations away
#: from the critical region (Tr > 0.6); checked against CoolProp in the tests.
B_U_REL, B_U_REL_POLAR, B_U_ABS = 0.10, 0.25, 3.0e-6
#: Relative expanded uncertainty of the temperature derivatives of B (a
#: correlation's slope and curvature are less certain than its value;
#: judgement, checked against CoolProp in the tests), nonpolar and polar.
DB_U_REL, DB_U_REL_POLAR = 0.25, 0.40


def _series(coef: dict, Tr: np.ndarray):
    f = sum(c * Tr ** -n for n, c in coef.items())
    d1 = sum(-n * c * Tr ** -(n + 1) for n, c in coef.items())
    d2 = sum(n * (n + 1) * c * Tr ** -(n + 2) for n, c in coef.items())
    return f, d1, d2


def second_virial(T, Tc, Pc, omega, a=0.0, b=0.0):
    """B(T) and its first two temperature derivatives, m3/mol (Tsonopoulos 1974).

    Range: gases above about 0.6 Tc; no quantum correction (H2, He, Ne are
    estimated with their classical critical constants).
    """
    T = np.asarray(T, float)
    Tr = T / Tc
    coef = {}
    for table, w in ((TSONOPOULOS_F0, 1.0), (TSONOPOULOS_F1, omega), ({6: a, 8: -b}, 1.0)):
        for n, c in table.items():
            coef[n] = coef.get(n, 0.0) + w * c
    f, d1, d2 = _series(coef, Tr)
    s = R_MOLAR * Tc / Pc
    return s * f, s * d1 / Tc, s * d2 / Tc ** 2


@dataclass(frozen=True, slots=True)
class VirialEstimate:
    """Mixture second virial coefficient and the departures it gives per pascal."""

    B: np.ndarray          # m3/mol
    dB: np.ndarray         # m3/(mol K)
    d2B: np.ndarray        # m3/(mol K2)
    U_B: np.ndarray        # expanded uncertainty of B, m3/mol
    U_dB: np.ndarray       # expanded uncertainty of dB/dT
    U_d2B: np.ndarray      # expanded uncertainty of d2B/dT2
    covered: float         # mole fraction with critical data
    missing: tuple         # species without critical data
    Vc: float              # mixture critical volume estimate, m3/mol

    def Z(self, T, P):
        return 1.0 + self.B * P / (R_MOLAR * T)


def virial_mixture(components, T: np.ndarray) -> VirialEstimate | None:
    """B of a mixture: B = Σ Σ y_i y_j B_ij over species with critical constants.

    Combining rules (J. M. Prausnitz, R. N. Lichtenthaler and E. G. de Azevedo,
    Molecular Thermodynamics of Fluid-Phase Equilibria, 3rd ed., 1999, ch. 5):
    Tc_ij = sqrt(Tc_i Tc_j) (k_ij = 0), Vc_ij = ((Vc_i^(1/3) + Vc_j^(1/3))/2)^3,
    Zc_ij = (Zc_i + Zc_j)/2, Pc_ij = Zc_ij R Tc_ij / Vc_ij, omega_ij = (omega_i + omega_j)/2,
    no polar term in cross coefficients.  Species without critical data are
    left out and the rest renormalised (stated in the budget).
    """
    crit = critical_constants()
    known = [(c.id, c.mole_fraction, crit[c.id]) for c in components if c.id in crit]
    missing = tuple(c.id for c in components if c.id not in crit)
    if not known:
        return None
    tot = sum(y for _, y, _ in known)
    B = np.zeros_like(T)
    dB = np.zeros_like(T)
    d2B = np.zeros_like(T)
    UB = np.zeros_like(T)
    UdB = np.zeros_like(T)
    Ud2B = np.zeros_like(T)
    Vc_mix = 0.0
    for i, (si, yi, ci) in enumerate(known):
        for j, (sj, yj, cj) in enumerate(known):
            w = yi * yj / tot ** 2
            if i == j:
                Tc, Pc, Vc, om = ci[:4]
                a, b = POLAR_AB.get(si, (0.0, 0.0))
                polar = si in POLAR_WITHOUT_TERM
            else:
                Tc = math.sqrt(ci[0] * cj[0])
                Vc = ((ci[2] ** (1 / 3) + cj[2] ** (1 / 3)) / 2) ** 3
                Zc = (ci[1] * ci[2] / (R_MOLAR * ci[0]) + cj[1] * cj[2] / (R_MOLAR * cj[0])) / 2
                Pc = Zc * R_MOLAR * Tc / Vc
                om = (ci[3] + cj[3]) / 2
                a = b = 0.0
                polar = si in POLAR_WITHOUT_TERM or sj in POLAR_WITHOUT_TERM
            rel = B_U_REL_POLAR if polar else B_U_REL
            rd = DB_U_REL_POLAR if polar else DB_U_REL
            b0, b1, b2 = second_virial(T, Tc, Pc, om, a, b)
            B += w * b0
            dB += w * b1
            d2B += w * b2
            UB += w * (rel * np.abs(b0) + B_U_ABS)
            UdB += w * (rd * np.abs(b1) + B_U_ABS / T)
            Ud2B += w * (rd * np.abs(b2) + B_U_ABS / T ** 2)
            Vc_mix += w * Vc
    return VirialEstimate(B, dB, d2B, UB, UdB, Ud2B, float(tot), missing, float(Vc_mix))


def model_departures(est: VirialEstimate, T: np.ndarray, P: float) -> dict:
    """Real minus ideal-gas values at (T, P) from B (molar SI): Z, cp, cv, h, u, s.

    Low-density virial relations (e.g. Prausnitz et al. 1999, ch. 5):
    Z - 1 = B P/(R T);  h - h° = P (B - T B');  u - u° = -P T B';
    s - s°(T, P) = -P B';  cp - cp° = -P T B'';  cv - cv° = -P (2 B' + T B'').
    """
    return {
        "Z": est.B * P / (R_MOLAR * T),
        "h": P * (est.B - T * est.dB),
        "u": -P * T * est.dB,
        "s": -P * est.dB,
        "cp": -P * T * est.d2B,
        "cv": -P * (2 * est.dB + T * est.d2B),
    }


def departure_bounds(est: VirialEstimate, T: np.ndarray, P: float) -> dict:
    """Upper bounds of |real - ideal| at (T, P): the estimate plus its expanded
    uncertainty (from U_B, U_dB, U_d2B), molar SI, keys as model_departures."""
    return {
        "Z": (np.abs(est.B) + est.U_B) * P / (R_MOLAR * T),
        "h": P * (np.abs(est.B - T * est.dB) + est.U_B + T * est.U_dB),
        "u": P * T * (np.abs(est.dB) + est.U_dB),
        "s": P * (np.abs(est.dB) + est.U_dB),
        "cp": P * T * (np.abs(est.d2B) + est.U_d2B),
        "cv": P * (2 * np.abs(est.dB) + T * np.abs(est.d2B) + 2 * est.U_dB + T * est.U_d2B),
    }


def vapour_pressure_estimate(T, Tc, Pc, omega):
    """Vapour pressure from the acentric factor: log10(Psat/Pc) = 7/3 (1+omega)(1 - Tc/T).

    W. C. Edmister, Petroleum Refiner 37 (1958) 173 (from memory); a rough
    estimate (about 10 % near Tr = 0.7), used only for a caution.
    """
    T = np.asarray(T, float)
    return Pc * 10.0 ** (7.0 / 3.0 * (1.0 + omega) * (1.0 - Tc / T))


class Wording:
    """How the validity statements print their figures: SI, as in the JSON sidecar.

    A document in other units changes the attributes below (tablegen.book.stated
    does, so that every figure about a table is in that table's units). ``M_kg``
    is the molar mass in kg/mol: the departures are molar.
    """

    #: symbol and SI value (Pa) of the pressure unit
    pressure_unit = ("bar", 1e5)
    #: symbol of the temperature unit, and what joins the two ends of a range
    temperature_symbol, range_join = "K", "-"
    #: symbol and SI value on the mass basis (J/kg, J/(kg K)) of the units of h and s
    energy_units = {"h": ("kJ/kg", 1e3), "s": ("J/(kg K)", 1.0)}

    def __init__(self, M_kg: float):
        self.M_kg = M_kg

    def number(self, x: float) -> str:
        """A departure or bound, to two significant digits."""
        return f"{x:.2g}"

    def temperature(self, T_K: float, fmt: str = "g") -> str:
        """A temperature in the unit of ``temperature_symbol``, without the symbol."""
        return f"{T_K:{fmt}}"

    def T(self, T_K: float) -> str:
        return f"{self.temperature(T_K)} {self.temperature_symbol}"

    def T_about(self, T_K: float) -> str:
        return f"{self.temperature(T_K, '.0f')} {self.temperature_symbol}"

    def T_range(self, lo_K: float, hi_K: float) -> str:
        return f"{self.temperature(lo_K)}{self.range_join}{self.temperature(hi_K)} {self.temperature_symbol}"

    def P(self, P_Pa: float) -> str:
        sym, f = self.pressure_unit
        return f"{P_Pa / f:g} {sym}"

    def P_limit(self, P_Pa: float) -> str:
        """A pressure limit, rounded down (stated conservatively)."""
        sym, f = self.pressure_unit
        return f"{_round_down(P_Pa / f)} {sym}"

    def energy(self, key: str, per_mol: float) -> str:
        """h ("h", J/mol) or s ("s", J/(mol K)) in ``energy_units``."""
        sym, f = self.energy_units[key]
        return f"{self.number(per_mol / self.M_kg / f)} {sym}"


def model_statements(substance, vir: VirialEstimate, T: np.ndarray, P: float, props,
                     wording: Wording | None = None) -> list:
    """Sentences such as 'ideal-gas values within 0.1 % up to X bar above Y K'
    (figures as ``wording`` prints them; default SI)."""
    w = Wording(substance.M * 1e-3) if wording is None else wording
    out = []
    T_lo, T_hi = float(T.min()), float(T.max())
    Tg = np.linspace(T_lo, T_hi, 400) if T_hi > T_lo else np.array([T_lo])
    vg = virial_mixture(substance.components, Tg)
    cp_g = substance.properties(Tg)["cp_molar"]
    # departures per pascal (upper bounds): Z and cp relative
    bnd = departure_bounds(vg, Tg, 1.0)
    per_pa = np.maximum(bnd["Z"], bnd["cp"] / cp_g)
    cands = sorted({T_lo, *(t for t in (300.0, 500.0, 1000.0) if T_lo < t < T_hi)})
    for tol in (0.001, 0.01):
        parts = []
        for Y in cands:
            m = Tg >= Y - 1e-9
            X = tol / float(np.max(per_pa[m]))
            parts.append(f"up to {w.P_limit(X)} above {w.T(Y)}")
        out.append(f"ideal-gas values (Z, cp) within {tol * 100:g} % " + ", ".join(parts))
    dep = model_departures(vir, T, P)
    bnd = departure_bounds(vir, T, P)

    def figures(d):
        return (f"|Z-1| {np.max(np.abs(d['Z'])) * 100:.2g} %, "
                f"cp {np.max(np.abs(d['cp']) / props['cp_molar']) * 100:.2g} %, "
                f"h {w.energy('h', float(np.max(np.abs(d['h']))))}, "
                f"s {w.energy('s', float(np.max(np.abs(d['s']))))}")
    out.append(
        f"at {w.P(P)} over {w.T_range(T_lo, T_hi)} the real gas departs from these values by up to "
        f"{figures(dep)} (second virial coefficient, Tsonopoulos 1974); with the estimate's own "
        f"uncertainty, by at most {figures(bnd)}")
    rho_vc = P * vir.Vc / (R_MOLAR * T * np.maximum(1 + vir.B * P / (R_MOLAR * T), 0.1))
    if np.any(rho_vc > 0.1):
        bad = float(T[rho_vc > 0.1].max())
        out.append(f"caution: at {w.P(P)} below about {w.T_about(bad)} the density exceeds a tenth of the "
                   f"critical density, beyond the range of the second-virial estimate; the ideal-gas "
                   f"departures stated there are indicative only")
    if vir.missing:
        out.append(f"no critical constants for {', '.join(vir.missing)} (mole fraction "
                   f"{1 - vir.covered:.3g}): the virial estimate uses the other components")
    crit = critical_constants()
    for c in substance.components:
        if c.id == "H2O" and getattr(substance, "dew_point_P_Pa", None) is not None:
            # the one water dew point of the substance (IAPWS-IF97), the figure every document prints
            from ..thermo.saturation import dew_point_text
            dew = dew_point_text(substance.dew_point_K, substance.dew_point_P_Pa)
            if getattr(w, "pressure_unit", ("bar",))[0] != "bar":     # a US table: its units first, SI in brackets
                dew = f"{w.T(substance.dew_point_K)} at {w.P(substance.dew_point_P_Pa)} ({dew})"
            out.append(f"caution: water dew point {dew}: "
                       f"at and below it water may condense, and ideal-gas values and this budget do not hold "
                       f"there (rows marked c)")
            continue
        if c.id not in crit:
            continue
        Tc, Pc, _, om, _ = crit[c.id]
        low = Tg[(Tg < Tc) & (c.mole_fraction * P > vapour_pressure_estimate(Tg, Tc, Pc, om))]
        if low.size:
            out.append(f"caution: below about {w.T_about(float(low.max()))} the partial pressure of {c.id} at "
                       f"{w.P(P)} exceeds its estimated vapour pressure; it may condense, and "
                       f"ideal-gas values and this budget do not hold there")
    return out


def _round_down(x: float) -> str:
    """Two significant digits, rounded down (a limit stated conservatively)."""
    if x <= 0 or not math.isfinite(x):
        return "0"
    e = math.floor(math.log10(x)) - 1
    v = math.floor(x / 10 ** e) * 10 ** e
    return f"{v:.{max(0, -e)}f}"


