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
  ``JUMP_LIMIT`` relative (a warning: it is a check of transcription).

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


def interval_poly(poly: Polynomial, k: int) -> Polynomial:
    return Polynomial(poly.T_bounds[k:k + 2], poly.coeffs[k:k + 1], poly.form)


def check_polynomial(poly: Polynomial, *, user: bool) -> list[Finding]:
    """Findings on cp > 0, monotonic h and s°, and breakpoint continuity.

    Parameters
    ----------
    poly : the record's polynomial (molar, dimensionless)
    user : True for user data (continuity breaks are errors), False for shipped
    """
    out: list[Finding] = []
    b = poly.T_bounds
    for k in range(poly.n_intervals):
        T = np.linspace(b[k], b[k + 1], SAMPLES)
        with np.errstate(all="ignore"):
            v = interval_poly(poly, k).evaluate(T)
        where = f"interval {k + 1} ({b[k]:g}-{b[k + 1]:g} K)"
        if not all(np.all(np.isfinite(x)) for x in v.values()):
            out.append(Finding("error", f"{where}: cp, h or s° is not finite; check the coefficients"))
            continue
        bad = np.flatnonzero(v["cp"] <= 0)
        if bad.size:
            i = int(bad[np.argmin(v["cp"][bad])])
            out.append(Finding("error", f"{where}: cp goes negative (cp/R = {v['cp'][i]:.4g} at "
                                        f"{T[i]:.6g} K); cp must be positive over the whole range"))
            continue
        for key, label in (("h", "h"), ("s", "s°")):
            if np.any(np.diff(v[key]) <= 0):
                i = int(np.flatnonzero(np.diff(v[key]) <= 0)[0])
                out.append(Finding("error", f"{where}: {label} does not increase with T near {T[i]:.6g} K; "
                                            f"{label} must increase with T"))
    for j in poly.boundary_jumps():
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
            out.append(Finding("warning", f"heat of formation printed on the second line ({hf:.8g} J/mol) "
                                          f"differs from the polynomial's ({hR * R_J_per_molK:.8g} J/mol) "
                                          f"by {d:.1e} relative"))
    return out
