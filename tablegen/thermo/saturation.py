"""Saturation of ordinary water: vapour pressure, saturation temperature, enthalpy of vaporisation.

Used for the water dew point of flue gas, the water content of humid air and the
difference between higher and lower heating values. Two published formulations:

* IAPWS-IF97, region 4 (the saturation line): W. Wagner et al., "The IAPWS
  Industrial Formulation 1997 for the Thermodynamic Properties of Water and
  Steam", J. Eng. Gas Turbines Power 122 (2000) 150-182; IAPWS R7-97(2012),
  equations 30 (saturation pressure) and 31 (saturation temperature). Both are
  explicit, so the dew point needs no iteration. Range 273.15 K to 647.096 K.
* W. Wagner and A. Pruss, "International Equations for the Saturation
  Properties of Ordinary Water Substance. Revised According to the
  International Temperature Scale of 1990", J. Phys. Chem. Ref. Data 22 (1993)
  783-787 (IAPWS supplementary release on saturation properties, 1992):
  saturation pressure (eq. 1), saturated liquid density (eq. 2) and saturated
  vapour density (eq. 3). The enthalpy of vaporisation follows from them exactly
  by the Clapeyron equation, Δh = T (1/ρ'' - 1/ρ') dp/dT.

All functions take and return SI units and broadcast over numpy arrays.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from ..core.errors import RangeError

#: Critical point of water (IAPWS R7-97 and Wagner & Pruss 1993): K, Pa, kg/m³.
T_CRIT = 647.096
P_CRIT = 22.064e6
RHO_CRIT = 322.0
#: Lower end of IAPWS-IF97 region 4, K, and its saturation pressure, Pa (eq. 30 at 273.15 K).
T_LOW_IF97 = 273.15
P_LOW_IF97 = 611.212677

#: IAPWS-IF97 region 4 coefficients n1..n10 (IAPWS R7-97(2012), Table 34).
_N = (None, 0.11670521452767e4, -0.72421316703206e6, -0.17073846940092e2, 0.12020824702470e5,
      -0.32325550322333e7, 0.14915108613530e2, -0.48232657361591e4, 0.40511340542057e6,
      -0.23855557567849, 0.65017534844798e3)

#: Wagner & Pruss (1993) saturation pressure, eq. 1: coefficients a_i and exponents of τ.
_WP_A = (-7.85951783, 1.84408259, -11.7866497, 22.6807411, -15.9618719, 1.80122502)
_WP_A_EXP = (1.0, 1.5, 3.0, 3.5, 4.0, 7.5)
#: Saturated liquid density, eq. 2: b_i and exponents.
_WP_B = (1.99274064, 1.09965342, -0.510839303, -1.75493479, -45.5170352, -6.74694450e5)
_WP_B_EXP = (1 / 3, 2 / 3, 5 / 3, 16 / 3, 43 / 3, 110 / 3)
#: Saturated vapour density, eq. 3: c_i and exponents.
_WP_C = (-2.03150240, -2.68302940, -5.38626492, -17.2991605, -44.7586581, -63.9201063)
_WP_C_EXP = (2 / 6, 4 / 6, 8 / 6, 18 / 6, 37 / 6, 71 / 6)
#: Triple point temperature, K: lower end of the Wagner & Pruss equations.
T_TRIPLE = 273.16


def _check(x, lo, hi, what, unit):
    x = np.asarray(x, dtype=float)
    if not np.all(np.isfinite(x)) or np.any(x < lo) or np.any(x > hi):
        bad = x[~(np.isfinite(x) & (x >= lo) & (x <= hi))].flat[0]
        raise RangeError(f"water saturation: {what} {bad:g} {unit} is outside the range of the "
                         f"formulation; allowed: {lo:g} to {hi:g} {unit}")
    return x


def p_sat_Pa(T_K):
    """Saturation pressure of water, Pa (IAPWS-IF97 eq. 30).

    Parameters
    ----------
    T_K : array_like, 273.15 K <= T <= 647.096 K

    Raises
    ------
    RangeError outside 273.15-647.096 K.

    References
    ----------
    IAPWS R7-97(2012), section 8.1, equation 30, Table 34.
    """
    T = _check(T_K, T_LOW_IF97, T_CRIT, "temperature", "K")
    n = _N
    th = T + n[9] / (T - n[10])
    A = th * th + n[1] * th + n[2]
    B = n[3] * th * th + n[4] * th + n[5]
    C = n[6] * th * th + n[7] * th + n[8]
    return (2 * C / (-B + np.sqrt(B * B - 4 * A * C))) ** 4 * 1e6


def T_sat_K(p_Pa):
    """Saturation temperature of water, K (IAPWS-IF97 eq. 31, the explicit backward equation).

    Parameters
    ----------
    p_Pa : array_like, 611.213 Pa <= p <= 22.064 MPa

    Raises
    ------
    RangeError outside that range (below it, water vapour would condense as ice).

    References
    ----------
    IAPWS R7-97(2012), section 8.2, equation 31, Table 34.
    """
    p = _check(p_Pa, P_LOW_IF97, P_CRIT, "pressure", "Pa")
    n = _N
    be = (p / 1e6) ** 0.25
    E = be * be + n[3] * be + n[6]
    F = n[1] * be * be + n[4] * be + n[7]
    G = n[2] * be * be + n[5] * be + n[8]
    D = 2 * G / (-F - np.sqrt(F * F - 4 * E * G))
    return (n[10] + D - np.sqrt((n[10] + D) ** 2 - 4 * (n[9] + n[10] * D))) / 2


def _wp_sum(tau, coef, expo):
    return sum(c * tau ** e for c, e in zip(coef, expo))


def h_vap_J_per_kg(T_K):
    """Enthalpy of vaporisation of water on the saturation line, J/kg.

    Clapeyron's equation Δh = T (1/ρ'' - 1/ρ') dp/dT with p, ρ' and ρ'' from the
    Wagner & Pruss (1993) saturation equations 1-3. Agrees with IAPWS-95 within
    0.02 % between 273.16 K and 450 K (tests/test_burn.py).

    Parameters
    ----------
    T_K : array_like, 273.15 K <= T < 647.096 K

    Raises
    ------
    RangeError outside that range.

    References
    ----------
    W. Wagner and A. Pruss, J. Phys. Chem. Ref. Data 22 (1993) 783-787, eqs. 1-3.
    """
    # 273.15 K (0 °C, an ISO 6976 reference temperature) lies 0.01 K below the triple point:
    # the equations are smooth there and describe the (metastable) liquid continuously.
    T = _check(T_K, T_LOW_IF97, T_CRIT - 1e-6, "temperature", "K")
    tau = 1.0 - T / T_CRIT
    S = _wp_sum(tau, _WP_A, _WP_A_EXP)
    dS_dtau = sum(a * e * tau ** (e - 1) for a, e in zip(_WP_A, _WP_A_EXP))
    p = P_CRIT * np.exp(T_CRIT / T * S)
    # d ln p / dT = -Tc/T² S + (Tc/T) dS/dτ dτ/dT, with dτ/dT = -1/Tc
    dp_dT = p * (-T_CRIT / T ** 2 * S - dS_dtau / T)
    rho_liq = RHO_CRIT * (1.0 + _wp_sum(tau, _WP_B, _WP_B_EXP))
    rho_vap = RHO_CRIT * np.exp(_wp_sum(tau, _WP_C, _WP_C_EXP))
    return T * dp_dT * (1.0 / rho_vap - 1.0 / rho_liq)


#: Pressure of the dew point when none is stated: 101.325 kPa (1 atm).
P_DEW_DEFAULT = 101325.0


def water_dew_point_K(y_H2O: float, P_Pa: float = P_DEW_DEFAULT) -> float | None:
    """Water dew point of a gas holding mole fraction ``y_H2O`` of water vapour at ``P_Pa``, K.

    The saturation temperature (IAPWS-IF97 eq. 31) at the water partial pressure
    y P (ideal gas, Dalton; the enhancement factor of real humid air, about 1.004
    at 1 atm, is neglected: common practice for flue gas). None when the partial
    pressure lies below 611.213 Pa, where water would deposit as ice (a frost
    point, below 0 °C, not computed), or when there is no water.

    Raises
    ------
    RangeError when the partial pressure exceeds the critical pressure.
    """
    pw = float(y_H2O) * float(P_Pa)
    if not pw >= P_LOW_IF97:
        return None
    return float(T_sat_K(pw))


def dew_point_text(T_K: float | None, P_Pa: float) -> str:
    """'330.52 K (57.37 °C) at 101.325 kPa', or the frost-point sentence when T_K is None."""
    if T_K is None:
        return (f"below 0 °C at {P_Pa / 1000:g} kPa (a frost point, not computed: the water partial "
                f"pressure is below 611.2 Pa)")
    return f"{T_K:.2f} K ({T_K - 273.15:.2f} °C) at {P_Pa / 1000:g} kPa"


def with_dew_point(substance, P_Pa: float = P_DEW_DEFAULT):
    """The substance with its water dew point at ``P_Pa`` attached (once, for every document).

    Only mixtures holding water vapour get one: for them the dew point is where
    the tabulated ideal-gas values stop describing the gas. A pure species'
    tables are of the ideal gas at P° (a standard state) and carry none.
    """
    P = float(P_Pa)
    if not (P > 0 and np.isfinite(P)):
        raise RangeError(f"pressure of the dew point {P_Pa!r} Pa must be a positive number")
    y = next((c.mole_fraction for c in substance.components if c.id == "H2O"), 0.0)
    if substance.kind != "mixture" or not 0.0 < y < 1.0:
        return substance
    return replace(substance, dew_point_K=water_dew_point_K(y, P), dew_point_P_Pa=P, _cache={})


def dew_point_at(substance, P_Pa: float | None = None) -> tuple[float | None, float | None]:
    """(dew point K, its pressure Pa) of a substance: its own figure at its stated pressure, or
    the dew point of the same water content at ``P_Pa`` (a state at another pressure).

    (None, None) for a substance without water vapour; (None, P) when the dew
    point lies below 0 °C.
    """
    P0 = getattr(substance, "dew_point_P_Pa", None)
    if P0 is None:
        return None, None
    if P_Pa is None or abs(float(P_Pa) - P0) <= 1e-9 * P0:
        return substance.dew_point_K, P0
    y = next(c.mole_fraction for c in substance.components if c.id == "H2O")
    return water_dew_point_K(y, float(P_Pa)), float(P_Pa)
