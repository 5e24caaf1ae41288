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
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from .errors import TablegenError
from .thermo.polynomial import NCOEF, NINE, SEVEN, Polynomial
from .thermo.substance import R_MOLAR, T_REF

#: The scaled variable is tau = T / T_SCALE.
T_SCALE = 1000.0

#: Largest condition number of the column-equilibrated reduced design matrix
#: accepted. Rounding in double precision (eps = 2.2e-16) then perturbs the
#: coefficients by at most about 2e-16 * 1e10 = 2e-6 of their size, well below
#: the 1e-5 that the 5-significant-figure tabulations support.
COND_LIMIT = 1e10

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


class FitError(TablegenError):
    """A fit cannot be made or is not good enough; the text says why."""


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


# ---------------------------------------------------------------- basis rows
def _basis(tau: np.ndarray, kind: str) -> np.ndarray:
    """Rows of the scaled basis (n, 9) for cp/R, h/(R T_SCALE) or s/R.

    In tau = T/T_SCALE, with scaled coefficients A1..A7, B1, B2:
      cp/R           = A1 tau^-2 + A2 tau^-1 + A3 + A4 tau + ... + A7 tau^4
      h/(R T_SCALE)  = -A1/tau + A2 ln tau + A3 tau + A4 tau^2/2 + ... + A7 tau^5/5 + B1
      s/R            = -A1 tau^-2/2 - A2/tau + A3 ln tau + A4 tau + ... + A7 tau^4/4 + B2
    (NASA/TP-2002-211556 eq. 1-3 with T replaced by tau.)
    """
    t = np.asarray(tau, dtype=float)[:, None]
    z = np.zeros_like(t)
    one = np.ones_like(t)
    lt = np.log(t)
    if kind == "cp":
        cols = [t ** -2, 1 / t, one, t, t ** 2, t ** 3, t ** 4, z, z]
    elif kind == "h":
        cols = [-1 / t, lt, t, t ** 2 / 2, t ** 3 / 3, t ** 4 / 4, t ** 5 / 5, one, z]
    else:
        cols = [-(t ** -2) / 2, -1 / t, lt, t, t ** 2 / 2, t ** 3 / 3, t ** 4 / 4, z, one]
    return np.hstack(cols)


#: physical scale of each basis kind: cp and s° in J/(mol K), h in J/mol
_UNIT = {"cp": R_MOLAR, "h": R_MOLAR * T_SCALE, "s": R_MOLAR}


def scaled_to_raw(A: np.ndarray) -> np.ndarray:
    """Convert scaled coefficients (n, 9) in tau = T/1000 to raw-T coefficients.

    a1 = A1 S^2, a2 = A2 S, a3 = A3, a(3+k) = A(3+k) / S^k (k = 1..4),
    b1 = S (B1 - A2 ln S), b2 = B2 - A3 ln S, with S = T_SCALE; obtained by
    substituting T = S tau in NASA/TP-2002-211556 eq. 1-3.
    """
    A = np.asarray(A, dtype=float)
    S = T_SCALE
    lnS = math.log(S)
    a = np.empty_like(A)
    a[:, 0] = A[:, 0] * S ** 2
    a[:, 1] = A[:, 1] * S
    a[:, 2] = A[:, 2]
    for k in range(1, 5):
        a[:, 2 + k] = A[:, 2 + k] / S ** k
    a[:, 7] = S * (A[:, 7] - A[:, 1] * lnS)
    a[:, 8] = A[:, 8] - A[:, 2] * lnS
    return a


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


# ---------------------------------------------------------------- the solver
@dataclass(frozen=True, slots=True)
class _Problem:
    T: np.ndarray
    cp: np.ndarray
    dh: np.ndarray | None
    s: np.ndarray | None
    h298: float
    s298: float | None
    form: str


def _solve(prob: _Problem, bounds: np.ndarray) -> tuple[np.ndarray, float]:
    """Raw-T coefficients (n, 9) on ``bounds`` and the condition number."""
    n_int = bounds.size - 1
    cols = list(range(NCOEF)) if prob.form == NINE else list(range(2, NCOEF))
    m = len(cols)
    n_shape = m - 2                         # coefficients that shape cp
    inner = bounds[1:-1]
    T = prob.T
    idx = np.searchsorted(inner, T, side="right")   # same rule as Polynomial
    for k in range(n_int):
        n_k = int(np.count_nonzero(idx == k))
        if n_k < n_shape:
            raise FitError(
                f"interval {bounds[k]:g}-{bounds[k + 1]:g} K holds {n_k} tabulated temperatures; "
                f"a {prob.form} interval needs at least {n_shape}: give more points or fewer breakpoints")

    def block(Tv, kind, ints):
        """Rows for values of `kind` at temperatures Tv in intervals ints."""
        B = _basis(Tv / T_SCALE, kind)[:, cols] * _UNIT[kind]
        rows = np.zeros((Tv.size, n_int * m))
        for k in range(n_int):
            sel = ints == k
            rows[sel, k * m:(k + 1) * m] = B[sel]
        return rows

    k_ref = int(np.searchsorted(inner, T_REF, side="right"))
    ref_ints = np.array([k_ref])
    Tref = np.array([T_REF])

    # observations, weighted to dimensionless residuals
    A_rows = [block(T, "cp", idx) / prob.cp[:, None]]
    b_rows = [np.ones(T.size)]
    if prob.dh is not None:
        w = 1.0 / (prob.cp * T)
        rows = block(T, "h", idx) - block(np.full(T.size, T_REF), "h", np.full(T.size, k_ref))
        A_rows.append(rows * w[:, None])
        b_rows.append(prob.dh * w)
    if prob.s is not None:
        w = 1.0 / prob.cp
        A_rows.append(block(T, "s", idx) * w[:, None])
        b_rows.append(prob.s * w)
    A = np.vstack(A_rows)
    b = np.concatenate(b_rows)

    # equality constraints: continuity at breakpoints, anchors at 298.15 K
    C_rows, d = [], []
    for k, Tb in enumerate(inner):
        Tv = np.array([Tb])
        for kind in ("cp", "h", "s"):
            C_rows.append(block(Tv, kind, np.array([k])) - block(Tv, kind, np.array([k + 1])))
            d.append(0.0)
    C_rows.append(block(Tref, "h", ref_ints))
    d.append(prob.h298)
    if prob.s298 is not None:
        C_rows.append(block(Tref, "s", ref_ints))
        d.append(prob.s298)
    C = np.vstack(C_rows)
    d = np.array(d)

    # column equilibration, then the null-space method
    scale = np.sqrt(np.sum(A ** 2, axis=0) + np.sum(C ** 2, axis=0))
    scale[scale == 0] = 1.0
    As, Cs = A / scale, C / scale
    cscale = np.linalg.norm(Cs, axis=1)
    Cs, d = Cs / cscale[:, None], d / cscale
    U, sv, Vt = np.linalg.svd(Cs)
    rank = int(np.sum(sv > sv[0] * 1e-12))
    if rank < Cs.shape[0]:
        raise FitError("the constraints (continuity at breakpoints, 298.15 K anchors) are not independent; "
                       "check that breakpoints are distinct and inside the range")
    y_p = Vt[:rank].T @ ((U.T @ d)[:rank] / sv[:rank])
    N = Vt[rank:].T
    AN = As @ N
    if AN.shape[0] < AN.shape[1]:
        raise FitError(f"{AN.shape[0]} observations cannot fix {AN.shape[1]} free coefficients; give more points")
    z, _, _, svr = np.linalg.lstsq(AN, b - As @ y_p, rcond=None)
    cond = float(svr[0] / svr[-1]) if svr[-1] > 0 else math.inf
    if not cond <= COND_LIMIT:
        raise FitError(f"the fit is ill-conditioned (condition number {cond:.2g} > {COND_LIMIT:.0g}); "
                       "the tabulated range is too narrow or the points too few for this form: "
                       "use the 7-coefficient form, fewer breakpoints, or a wider range of temperatures")
    x = (y_p + N @ z) / scale
    Ak = np.zeros((n_int, NCOEF))
    Ak[:, cols] = x.reshape(n_int, m)
    return scaled_to_raw(Ak), cond


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
    return _residuals(_Problem(T, cp, dh, s, 0.0, None, poly.form), poly)


def _residuals(prob: _Problem, poly: Polynomial) -> dict:
    v = poly.evaluate(prob.T)
    ref = poly.evaluate(np.array([T_REF]), want=("h",))["h"][0]
    rel = (v["cp"] * R_MOLAR - prob.cp) / prob.cp
    out = {"cp_max_rel": float(np.max(np.abs(rel))), "cp_rms_rel": float(np.sqrt(np.mean(rel ** 2))),
           "h_max_J_per_mol": None, "h_rms_J_per_mol": None,
           "s_max_J_per_molK": None, "s_rms_J_per_molK": None}
    if prob.dh is not None:
        dh = (v["h"] - ref) * R_MOLAR - prob.dh
        out["h_max_J_per_mol"] = float(np.max(np.abs(dh)))
        out["h_rms_J_per_mol"] = float(np.sqrt(np.mean(dh ** 2)))
    if prob.s is not None:
        ds = v["s"] * R_MOLAR - prob.s
        out["s_max_J_per_molK"] = float(np.max(np.abs(ds)))
        out["s_rms_J_per_molK"] = float(np.sqrt(np.mean(ds ** 2)))
    return out


def _misses(res: dict, target: dict) -> list[str]:
    out = []
    for k, lim in target.items():
        got = res.get(k)
        if got is None:
            raise FitError(f"target {k} needs the tabulated values it measures "
                           f"({'dh_J_per_mol' if k.startswith('h') else 's_J_per_molK'})")
        if got > lim:
            out.append(f"{k} {got:.3g} > {lim:.3g}")
    return out


def _score(res: dict, target: dict) -> float:
    return max(res[k] / lim for k, lim in target.items())


def _fit_on(prob: _Problem, bounds: np.ndarray) -> tuple[Polynomial, dict, float, np.ndarray]:
    coeffs, cond = _solve(prob, bounds)
    poly = Polynomial(bounds, coeffs, prob.form)
    dense = np.linspace(bounds[0], bounds[-1], 2001)
    if not np.all(poly.evaluate(dense, want=("cp",))["cp"] > 0):
        raise FitError("the fitted cp turns negative inside the range; use fewer coefficients or breakpoints")
    return poly, _residuals(prob, poly), cond, coeffs


def fit_cp_table(T_K, cp_J_per_molK, *, form: str = NINE, breakpoints=None,
                 h298_J_per_mol: float | None = None, s298_J_per_molK: float | None = None,
                 dh_J_per_mol=None, s_J_per_molK=None, target=None) -> FitResult:
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
    h298 = 0.0 if h298_J_per_mol is None else float(h298_J_per_mol)
    s298 = None if s298_J_per_molK is None else float(s298_J_per_molK)
    if not math.isfinite(h298) or (s298 is not None and not math.isfinite(s298)):
        raise FitError("h298_J_per_mol and s298_J_per_molK must be finite numbers")
    if s298 is None and s is None:
        raise FitError("s° needs a level: give s298_J_per_molK or tabulated s_J_per_molK")
    tgt = _target(target)
    prob = _Problem(T, cp, dh, s, h298, s298, form)
    lo, hi = float(T[0]), float(T[-1])

    def result(poly, res, cond, coeffs):
        pub = coeffs if form == NINE else coeffs[:, 2:]
        return FitResult(poly=poly, form=form, T_bounds=tuple(float(x) for x in poly.T_bounds),
                         coefficients=tuple(tuple(float(c) for c in row) for row in pub),
                         residuals=res, n_points=int(T.size), condition=cond, target=tgt)

    if breakpoints is not None:
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
        return result(*fit)

    # automatic breakpoints
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
            return result(*fit)
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
            return result(*best[2])
    if not tried:
        raise FitError("no fit could be made: " + (reasons[0] if reasons else "no usable breakpoints"))
    sc, bp, fit = min(tried, key=lambda t: t[0])
    raise FitError(f"no fit with up to {MAX_INTERVALS} intervals meets the residual target; best "
                   f"(breakpoints {list(bp)} K) has {'; '.join(_misses(fit[1], tgt))}")
