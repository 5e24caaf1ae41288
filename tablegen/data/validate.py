"""Checks every coefficient record passes when it is loaded.

A record is refused (user data) or flagged (shipped data) when its polynomial
breaks what an ideal-gas cp, h and s° must do:

* cp > 0 over the whole range (sampled at ``SAMPLES`` points an interval plus
  the ends);
* h and s° increase with T inside every interval (dh/dT = cp, ds°/dT = cp/T,
  so this follows from cp > 0 analytically; the sampled check also catches
  coefficients that overflow or lose all precision);
* cp, h and s° continuous at every breakpoint: a jump of h or s° above
  ``JUMP_LIMIT`` relative is an error for user data and a warning for shipped
  data; a cp jump above ``CP_JUMP_LIMIT`` is an error for user data, one above
  ``JUMP_LIMIT`` a warning;
* the enthalpy printed in a card record (H(298.15)/R of TM-4513, the heat of
  formation of TP-2002-211556) agrees with the polynomial within
  ``JUMP_LIMIT`` relative (a warning: it catches a copying slip).

Relative jumps are measured as in ``Polynomial.boundary_jumps`` (h relative to
|h| + cp T, s° relative to |s°|). The limits are common practice: the NASA sets
shipped with tablegen are continuous to better than 1e-5 in cp, h and s° (see
``tablegen species --check``), so 1e-4 leaves room for coefficients printed
to 8 digits and still catches a mistyped digit.

Intervals contiguous, bounds increasing and molar mass consistent with the
elements are checked where records are built (tablegen.data.library and the
card readers in tablegen.data.formats).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..thermo.polynomial import Polynomial

#: Sample points an interval for the cp > 0 and monotonicity checks.
SAMPLES = 101
#: Relative jump of h or s° at a breakpoint above which a record is refused
#: (user data) or flagged (shipped data); a cp jump above it is flagged.
JUMP_LIMIT = 1e-4
#: Relative jump of cp at a breakpoint above which user data are refused.
CP_JUMP_LIMIT = 1e-3
#: The reference temperature of the printed enthalpies, K.
T_REF = 298.15


@dataclass(frozen=True, slots=True)
class Finding:
    """One result of a check; breakpoint jumps also carry where and how much."""

    severity: str                 # "error" or "warning"
    text: str
    T_K: float | None = None      # breakpoint of a jump
    function: str | None = None   # "cp", "h" or "s0" for a jump
    jump_relative: float | None = None


def evaluate_rows(c: np.ndarray, T: np.ndarray) -> dict[str, np.ndarray]:
    """cp/R, h/R and s/R of coefficient rows c (n, 9) at temperatures T (n, m).

    Row k of T is evaluated with row k of c, whatever interval T lies in (the
    checks need both sides of a breakpoint). Same formulas as
    tablegen.thermo.polynomial (NASA/TP-2002-211556 eq. 1-3).
    """
    a1, a2, a3, a4, a5, a6, a7, b1, b2 = (c[:, i:i + 1] for i in range(9))
    inv = 1.0 / T
    lnT = np.log(T)
    cp = a1 * inv * inv + a2 * inv + a3 + T * (a4 + T * (a5 + T * (a6 + T * a7)))
    h = -a1 * inv + a2 * lnT + b1 + T * (a3 + T * (a4 / 2 + T * (a5 / 3 + T * (a6 / 4 + T * a7 / 5))))
    s = -a1 * inv * inv / 2 - a2 * inv + a3 * lnT + b2 + T * (a4 + T * (a5 / 2 + T * (a6 / 3 + T * a7 / 4)))
    return {"cp": cp, "h": h, "s": s}


def check_polynomial(poly: Polynomial, *, user: bool) -> list[Finding]:
    """Findings on cp > 0, monotonic h and s°, and breakpoint continuity.

    Parameters
    ----------
    poly : the record's polynomial (molar, dimensionless)
    user : True for user data (continuity breaks are errors), False for shipped
    """
    out: list[Finding] = []
    b = poly.T_bounds
    c = poly.coeffs
    frac = np.linspace(0.0, 1.0, SAMPLES)
    T = b[:-1, None] + (b[1:] - b[:-1])[:, None] * frac[None, :]
    T[:, -1] = b[1:]
    with np.errstate(all="ignore"):
        v = evaluate_rows(c, T)
    for k in range(poly.n_intervals):
        where = f"interval {k + 1} ({b[k]:g}-{b[k + 1]:g} K)"
        cp, h, s = v["cp"][k], v["h"][k], v["s"][k]
        if not (np.all(np.isfinite(cp)) and np.all(np.isfinite(h)) and np.all(np.isfinite(s))):
            out.append(Finding("error", f"{where}: cp, h or s° is not finite; check the coefficients"))
            continue
        bad = np.flatnonzero(cp <= 0)
        if bad.size:
            i = int(bad[np.argmin(cp[bad])])
            out.append(Finding("error", f"{where}: cp goes negative (cp/R = {cp[i]:.4g} at "
                                        f"{T[k, i]:.6g} K); cp must be positive over the whole range"))
            continue
        for arr, label in ((h, "h"), (s, "s°")):
            d = np.diff(arr)
            if np.any(d <= 0):
                i = int(np.flatnonzero(d <= 0)[0])
                out.append(Finding("error", f"{where}: {label} does not increase with T near {T[k, i]:.6g} K; "
                                            f"{label} must increase with T"))
    if poly.n_intervals > 1:
        Tb = b[1:-1, None]
        with np.errstate(all="ignore"):
            lo = evaluate_rows(c[:-1], Tb)
            hi = evaluate_rows(c[1:], Tb)
        # relative jumps as in Polynomial.boundary_jumps: h against |h| + cp T
        jc = np.abs(hi["cp"] - lo["cp"]) / np.abs(lo["cp"])
        jh = np.abs(hi["h"] - lo["h"]) / (np.abs(lo["h"]) + np.abs(lo["cp"]) * Tb)
        js = np.abs(hi["s"] - lo["s"]) / np.abs(lo["s"])
        for m in range(Tb.shape[0]):
            j = {"T_K": float(Tb[m, 0]), "cp": float(jc[m, 0]), "h": float(jh[m, 0]), "s": float(js[m, 0])}
            out.extend(_jump_findings(j, user))
    return out


def _jump_findings(j: dict, user: bool) -> list[Finding]:
    out = []
    T_b = j["T_K"]
    for key, label, fn in (("h", "h", "h"), ("s", "s°", "s0")):
        if j[key] > JUMP_LIMIT:
            out.append(Finding("error" if user else "warning",
                               f"{label} jumps by {j[key]:.2e} relative at the breakpoint {T_b:g} K "
                               f"(allowed: {JUMP_LIMIT:g}); cp, h and s° must be continuous there",
                               T_b, fn, j[key]))
    if j["cp"] > (CP_JUMP_LIMIT if user else JUMP_LIMIT):
        out.append(Finding("error" if user else "warning",
                           f"cp jumps by {j['cp']:.2e} relative at the breakpoint {T_b:g} K "
                           f"(allowed: {CP_JUMP_LIMIT if user else JUMP_LIMIT:g})", T_b, "cp", j["cp"]))
    elif j["cp"] > JUMP_LIMIT:
        out.append(Finding("warning", f"cp jumps by {j['cp']:.2e} relative at the breakpoint "
                                      f"{T_b:g} K (above {JUMP_LIMIT:g})", T_b, "cp", j["cp"]))
    return out


def check_printed_enthalpy(poly: Polynomial, checks: dict, R_J_per_molK: float) -> list[Finding]:
    """Compare the enthalpy printed in a card record with the polynomial's."""
    if poly.T_min > T_REF + 50.0:
        return []
    v = poly.evaluate(np.array([T_REF]))
    hR, cpR = float(v["h"][0]), float(v["cp"][0])
    scale = abs(hR) + abs(cpR) * T_REF
    out = []
    if "h298_over_R_K" in checks and checks["h298_over_R_K"] != 0.0:
        d = abs(checks["h298_over_R_K"] - hR) / scale
        if d > JUMP_LIMIT:
            out.append(Finding("warning", f"H(298.15)/R printed on line 4 ({checks['h298_over_R_K']:.8g} K) "
                                          f"differs from the polynomial's ({hR:.8g} K) by {d:.1e} relative"))
    if "h_formation_J_per_mol" in checks:
        hf = checks["h_formation_J_per_mol"]
        d = abs(hf - hR * R_J_per_molK) / (scale * R_J_per_molK)
        if d > JUMP_LIMIT:
            out.append(Finding("warning", f"heat of formation given in the record ({hf:.8g} J/mol) "
                                          f"differs from the polynomial's ({hR * R_J_per_molK:.8g} J/mol) "
                                          f"by {d:.1e} relative"))
    return out
