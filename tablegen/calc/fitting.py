"""Constrained least-squares fits of NASA polynomials to tabulated cp(T), h, s°.

Used to turn a tabulation (NIST-JANAF, a user's own measured or computed
table) into the NASA 9-coefficient form of NASA/TP-2002-211556 (McBride,
Zehe & Gordon 2002, eq. 1-3) or the 7-coefficient form of NASA TM-4513
(McBride, Gordon & Reno 1993), in the layout that the rest of tablegen reads.

Method
------
* The unknowns are the coefficients of every interval at once. cp, h and s°
  are continuous at each inner breakpoint, and h(298.15 K), s°(298.15 K) are
  matched where given: these are linear equality constraints C x = d, solved
  by the null-space method (x = x_p + N z, N an orthonormal basis of the null
  space of C), so the constraints hold to rounding, not approximately.
* Observations are the tabulated cp and, where given, the tabulated
  h - h(298.15 K) and s°: each row is weighted so that its residual is
  dimensionless (Δcp/cp, Δh/(cp T), Δs/cp), which puts the three kinds of
  data on one footing.
* The fit is made in the scaled variable tau = T/1000 K with equilibrated
  columns, then the coefficients are converted to raw T. In raw T the powers
  run from T^-2 = 3e-8 to T^4 = 1e15 at 6000 K, and the normal equations lose
  every significant digit (common practice in NASA fitting codes, e.g.
  NASA RP-1311 Part I, McBride & Gordon 1996, fits in reduced variables).
* A fit is refused (``FitError``) when the data are too few for an interval,
  when the reduced design matrix is ill-conditioned, when cp of the result is
  not positive over the range, or when the residuals miss the target.
* With ``breakpoints=None`` the breakpoints are chosen: one interval if that
  meets the target, then the conventional 1000 K breakpoint of both NASA
  sets, then breakpoints added one at a time at the tabulated temperature that
  most lowers the worst residual, up to ``MAX_INTERVALS`` intervals.

The solver (the scaled basis and the constrained least squares, the same bits on
every processor) is tablegen.calc.fit_solver; this module states the problem and
judges the fit.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from ..core.errors import FitError
from ..thermo.polynomial import NINE, SEVEN, Polynomial
from ..core.constants import R_MOLAR, T_REF
from .fit_solver import Problem, solve

#: Default residual target: worst |Δcp|/cp at the tabulated points. 1e-3 is
#: the agreement tablegen promises for cp of its default sources against
#: NIST-JANAF (docs/data-curation.md).
DEFAULT_TARGET = {"cp_max_rel": 1e-3}

#: Most intervals the automatic breakpoint search will use.
MAX_INTERVALS = 4

#: Keys of a residual target, and of FitResult.residuals (plus rms values).
TARGET_KEYS = ("cp_max_rel", "cp_rms_rel", "h_max_J_per_mol", "h_rms_J_per_mol",
               "s_max_J_per_molK", "s_rms_J_per_molK")

#: Breakpoints tried first by the automatic search (both NASA sets use 1000 K).
CONVENTIONAL_BREAKPOINTS_K = (1000.0,)


@dataclass(frozen=True, slots=True, eq=False)
class FitResult:
    """A finished fit.

    Attributes
    ----------
    poly : Polynomial in the 9-coefficient layout (molar, dimensionless)
    form : "9-coefficient" or "7-coefficient"
    T_bounds : tuple of interval bounds, K (first and last: the fitted range)
    coefficients : tuple of tuples in the published layout (9 or 7 per interval)
    residuals : dict with cp_max_rel, cp_rms_rel (|Δcp|/cp), h_max_J_per_mol,
        h_rms_J_per_mol (Δ of h - h(298.15 K), None unless h was tabulated),
        s_max_J_per_molK, s_rms_J_per_molK (None unless s° was tabulated),
        all at the tabulated temperatures, from the converted coefficients.
    n_points : number of tabulated temperatures used
    condition : condition number of the reduced, equilibrated design matrix
    target : the residual target that was met
    """

    poly: Polynomial
    form: str
    T_bounds: tuple
    coefficients: tuple
    residuals: dict
    n_points: int
    condition: float
    target: dict = field(default_factory=dict)

    def describe(self) -> str:
        r = self.residuals
        parts = [f"cp max {r['cp_max_rel'] * 100:.3g} %, rms {r['cp_rms_rel'] * 100:.3g} %"]
        if r.get("h_max_J_per_mol") is not None:
            parts.append(f"h-h298 max {r['h_max_J_per_mol']:.3g} J/mol")
        if r.get("s_max_J_per_molK") is not None:
            parts.append(f"s° max {r['s_max_J_per_molK']:.3g} J/(mol K)")
        return "; ".join(parts)


# ---------------------------------------------------------------- validation
def _as_table(name: str, values, n: int | None = None) -> np.ndarray:
    try:
        a = np.asarray(values, dtype=float).ravel()
    except (TypeError, ValueError):
        raise FitError(f"{name} must be a list of numbers") from None
    if n is not None and a.size != n:
        raise FitError(f"{name} has {a.size} values but T_K has {n}; give one value per temperature")
    if not np.all(np.isfinite(a)):
        raise FitError(f"{name} holds a non-finite value; every value must be a finite number")
    return a


def _target(target) -> dict:
    if target is None:
        return dict(DEFAULT_TARGET)
    if isinstance(target, (int, float)) and not isinstance(target, bool):
        target = {"cp_max_rel": float(target)}
    if not isinstance(target, dict):
        raise FitError("target must be a number (worst |Δcp|/cp) or a mapping of "
                       + ", ".join(TARGET_KEYS))
    out = {}
    for k, v in target.items():
        if k not in TARGET_KEYS:
            raise FitError(f"target key {k!r} is not known; allowed: {', '.join(TARGET_KEYS)}")
        if not isinstance(v, (int, float)) or isinstance(v, bool) or not v > 0 or not math.isfinite(v):
            raise FitError(f"target {k} must be a positive number, got {v!r}")
        out[k] = float(v)
    return out


def residuals_against(poly: Polynomial, T_K, cp_J_per_molK, *, dh_J_per_mol=None,
                      s_J_per_molK=None) -> dict:
    """Residuals of a polynomial against a tabulation (keys as FitResult.residuals).

    Used to state how far a fit made from cp alone lies from tabulated
    h - h(298.15 K) and s° that were not fitted.
    """
    T = _as_table("T_K", T_K)
    cp = _as_table("cp_J_per_molK", cp_J_per_molK, T.size)
    dh = None if dh_J_per_mol is None else _as_table("dh_J_per_mol", dh_J_per_mol, T.size)
    s = None if s_J_per_molK is None else _as_table("s_J_per_molK", s_J_per_molK, T.size)
    return _residuals(Problem(T, cp, dh, s, 0.0, None, poly.form), poly)


def _residuals(prob: Problem, poly: Polynomial) -> dict:
    v = poly.evaluate(prob.T)
    ref = poly.evaluate(np.array([T_REF]), want=("h",))["h"][0]
    rel = (v["cp"] * R_MOLAR - prob.cp) / prob.cp
    out = {"cp_max_rel": float(np.max(np.abs(rel))), "cp_rms_rel": float(np.sqrt(np.mean(rel ** 2))),
           "h_max_J_per_mol": None, "h_rms_J_per_mol": None,
           "s_max_J_per_molK": None, "s_rms_J_per_molK": None}
    dh_tab = prob.dh if prob.dh is not None else prob.dh_check
    s_tab = prob.s if prob.s is not None else prob.s_check
    if dh_tab is not None:
        dh = (v["h"] - ref) * R_MOLAR - dh_tab
        out["h_max_J_per_mol"] = float(np.max(np.abs(dh)))
        out["h_rms_J_per_mol"] = float(np.sqrt(np.mean(dh ** 2)))
    if s_tab is not None:
        ds = v["s"] * R_MOLAR - s_tab
        out["s_max_J_per_molK"] = float(np.max(np.abs(ds)))
        out["s_rms_J_per_molK"] = float(np.sqrt(np.mean(ds ** 2)))
    return out


def _misses(res: dict, target: dict) -> list[str]:
    out = []
    for k, lim in target.items():
        got = res.get(k)
        if got is None:
            raise FitError(f"target {k} needs the tabulated values it measures "
                           f"({'dh_J_per_mol' if k.startswith('h') else 's_J_per_molK'}, fitted, or "
                           f"{'check_dh_J_per_mol' if k.startswith('h') else 'check_s_J_per_molK'}, measured only)")
        if got > lim:
            out.append(f"{k} {got:.3g} > {lim:.3g}")
    return out


def _score(res: dict, target: dict) -> float:
    return max(res[k] / lim for k, lim in target.items())


def _fit_on(prob: Problem, bounds: np.ndarray) -> tuple[Polynomial, dict, float, np.ndarray]:
    coeffs, cond = solve(prob, bounds)
    poly = Polynomial(bounds, coeffs, prob.form)
    dense = np.linspace(bounds[0], bounds[-1], 2001)
    if not np.all(poly.evaluate(dense, want=("cp",))["cp"] > 0):
        raise FitError("the fitted cp turns negative inside the range; use fewer coefficients or breakpoints")
    return poly, _residuals(prob, poly), cond, coeffs


def fit_cp_table(T_K, cp_J_per_molK, *, form: str = NINE, breakpoints=None,
                 h298_J_per_mol: float | None = None, s298_J_per_molK: float | None = None,
                 dh_J_per_mol=None, s_J_per_molK=None, target=None,
                 check_dh_J_per_mol=None, check_s_J_per_molK=None) -> FitResult:
    """Fit a NASA polynomial to a tabulation of cp (and optionally h, s°).

    Parameters
    ----------
    T_K : increasing temperatures, K (the fitted range is their span)
    cp_J_per_molK : cp at T_K, J/(mol K), positive
    form : "9-coefficient" (NASA/TP-2002-211556) or "7-coefficient" (NASA TM-4513)
    breakpoints : inner interval bounds in K, or None to choose them so that the
        target is met (see the module text)
    h298_J_per_mol : h(298.15 K), the enthalpy of formation in the NASA/JANAF
        convention; 0 if None (a sensible-enthalpy fit)
    s298_J_per_molK : s°(298.15 K) at 1 bar, matched exactly if given
    dh_J_per_mol : tabulated h(T) - h(298.15 K), J/mol, fitted with cp if given
    s_J_per_molK : tabulated s°(T), J/(mol K), fitted with cp if given
        (at least one of s298_J_per_molK and s_J_per_molK is needed)
    target : worst |Δcp|/cp as a number, or a mapping of any of
        cp_max_rel, cp_rms_rel, h_max_J_per_mol, h_rms_J_per_mol,
        s_max_J_per_molK, s_rms_J_per_molK; default {"cp_max_rel": 1e-3}
    check_dh_J_per_mol, check_s_J_per_molK : tabulated h(T) - h(298.15 K) and s°(T)
        that are not fitted but measured against: their residuals are reported and held
        to the h_* and s_* target keys. A cp fit can meet its cp target at the tabulated
        points and still wiggle between them; its integrals show it, so the automatic
        breakpoint search, scoring every key of the target, passes such candidates over.

    Returns
    -------
    FitResult

    Raises
    ------
    FitError
        bad input, too few points, ill-conditioned system, non-positive cp, or
        residuals above the target; the text names the cause.

    References
    ----------
    B. J. McBride, M. J. Zehe, S. Gordon, NASA/TP-2002-211556 (2002), eq. 1-3.
    B. J. McBride, S. Gordon, M. A. Reno, NASA TM-4513 (1993).
    """
    prob = _problem(form, T_K, cp_J_per_molK, h298_J_per_mol, s298_J_per_molK, dh_J_per_mol, s_J_per_molK,
                    check_dh_J_per_mol, check_s_J_per_molK)
    tgt = _target(target)
    if breakpoints is not None:
        fit = _fit_given(prob, breakpoints, tgt)
    else:
        fit = _fit_searched(prob, tgt)
    poly, res, cond, coeffs = fit
    pub = coeffs if form == NINE else coeffs[:, 2:]
    return FitResult(poly=poly, form=form, T_bounds=tuple(float(x) for x in poly.T_bounds),
                     coefficients=tuple(tuple(float(c) for c in row) for row in pub),
                     residuals=res, n_points=int(prob.T.size), condition=cond, target=tgt)


def _problem(form, T_K, cp_J_per_molK, h298_J_per_mol, s298_J_per_molK, dh_J_per_mol, s_J_per_molK,
             check_dh_J_per_mol, check_s_J_per_molK) -> Problem:
    """The tabulation of :func:`fit_cp_table` checked, as the solver's problem."""
    if form not in (NINE, SEVEN):
        raise FitError(f"form {form!r} is not known; allowed: {NINE}, {SEVEN}")
    T = _as_table("T_K", T_K)
    if T.size < 2 or not np.all(np.diff(T) > 0) or T[0] <= 0:
        raise FitError("T_K must hold at least two positive, strictly increasing temperatures")
    cp = _as_table("cp_J_per_molK", cp_J_per_molK, T.size)
    if not np.all(cp > 0):
        raise FitError("cp_J_per_molK must be positive at every temperature")
    dh = None if dh_J_per_mol is None else _as_table("dh_J_per_mol", dh_J_per_mol, T.size)
    s = None if s_J_per_molK is None else _as_table("s_J_per_molK", s_J_per_molK, T.size)
    dh_check = None if check_dh_J_per_mol is None else _as_table("check_dh_J_per_mol", check_dh_J_per_mol, T.size)
    s_check = None if check_s_J_per_molK is None else _as_table("check_s_J_per_molK", check_s_J_per_molK, T.size)
    h298 = 0.0 if h298_J_per_mol is None else float(h298_J_per_mol)
    s298 = None if s298_J_per_molK is None else float(s298_J_per_molK)
    if not math.isfinite(h298) or (s298 is not None and not math.isfinite(s298)):
        raise FitError("h298_J_per_mol and s298_J_per_molK must be finite numbers")
    if s298 is None and s is None:
        raise FitError("s° needs a level: give s298_J_per_molK or tabulated s_J_per_molK")
    return Problem(T, cp, dh, s, h298, s298, form, dh_check, s_check)


def _fit_given(prob: Problem, breakpoints, tgt: dict) -> tuple:
    """The fit on the breakpoints given, or FitError if it misses the target."""
    lo, hi = float(prob.T[0]), float(prob.T[-1])
    bp = sorted(float(x) for x in _as_table("breakpoints", breakpoints))
    for b in bp:
        if not lo < b < hi:
            raise FitError(f"breakpoint {b:g} K lies outside the tabulated range {lo:g}-{hi:g} K")
    bounds = np.array([lo, *bp, hi])
    if np.any(np.diff(bounds) <= 0):
        raise FitError("breakpoints must be distinct")
    fit = _fit_on(prob, bounds)
    miss = _misses(fit[1], tgt)
    if miss:
        raise FitError(f"the fit misses its residual target ({'; '.join(miss)}); "
                       "add breakpoints, fit fewer temperatures or loosen the target")
    return fit


def _fit_searched(prob: Problem, tgt: dict) -> tuple:
    """The fit on breakpoints chosen: one interval, the conventional ones, then one added
    at a time where it most lowers the worst residual (see the module text)."""
    T = prob.T
    lo, hi = float(T[0]), float(T[-1])
    tried: list[tuple[float, tuple, tuple]] = []
    reasons: list[str] = []

    def attempt(bp: tuple):
        try:
            fit = _fit_on(prob, np.array([lo, *bp, hi]))
        except FitError as e:
            reasons.append(f"{list(bp) or 'one interval'}: {e}")
            return None
        tried.append((_score(fit[1], tgt), bp, fit))
        return fit

    for bp in [(), *[(b,) for b in CONVENTIONAL_BREAKPOINTS_K if lo < b < hi]]:
        fit = attempt(bp)
        if fit is not None and not _misses(fit[1], tgt):
            return fit
    current: tuple = ()
    candidates = [float(t) for t in T[1:-1]]
    while len(current) + 1 < MAX_INTERVALS:
        best = None
        for c in candidates:
            if c in current:
                continue
            bp = tuple(sorted((*current, c)))
            fit = attempt(bp)
            if fit is not None:
                sc = _score(fit[1], tgt)
                if best is None or sc < best[0]:
                    best = (sc, bp, fit)
        if best is None:
            break
        current = best[1]
        if not _misses(best[2][1], tgt):
            return best[2]
    if not tried:
        raise FitError("no fit could be made: " + (reasons[0] if reasons else "no usable breakpoints"))
    sc, bp, fit = min(tried, key=lambda t: t[0])
    raise FitError(f"no fit with up to {MAX_INTERVALS} intervals meets the residual target; best "
                   f"(breakpoints {list(bp)} K) has {'; '.join(_misses(fit[1], tgt))}")
