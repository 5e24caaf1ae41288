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
from fractions import Fraction
from functools import lru_cache
from decimal import Context, Decimal

import numpy as np

from ..core.errors import FitError
from ..thermo.polynomial import NCOEF, NINE, SEVEN, Polynomial, interval_of
from ..thermo.substance import R_MOLAR, T_REF

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
    t = np.asarray(tau, dtype=float).reshape(-1, 1)
    # products and math.log rather than ** and np.log: the same bits on every
    # processor (numpy picks SIMD kernels for log and pow by CPU)
    z = np.zeros_like(t)
    one = np.ones_like(t)
    lt = np.array([_ln(v) for v in t[:, 0].tolist()]).reshape(-1, 1)
    t2 = t * t
    t3 = t2 * t
    t4 = t3 * t
    t5 = t4 * t
    inv = 1.0 / t
    inv2 = inv * inv
    if kind == "cp":
        cols = [inv2, inv, one, t, t2, t3, t4, z, z]
    elif kind == "h":
        cols = [-inv, lt, t, t2 / 2, t3 / 3, t4 / 4, t5 / 5, one, z]
    else:
        cols = [-inv2 / 2, -inv, lt, t, t2 / 2, t3 / 3, t4 / 4, z, one]
    return np.hstack(cols)


_LN_CONTEXT = Context(prec=34)


@lru_cache(maxsize=65536)
def _ln(x: float) -> float:
    """ln x from decimal arithmetic (correctly rounded to 34 digits, then to double): the
    same bits on every machine, where libm's log may differ in the last bit by CPU."""
    return float(Decimal(x).ln(_LN_CONTEXT))


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
    dh_check: np.ndarray | None = None     # tabulated, measured against, not fitted
    s_check: np.ndarray | None = None


# The solve below is written so that its result does not depend on the processor:
# every sum is exactly rounded (math.fsum), every product an IEEE multiply, logs come
# from Python's math.log, and no BLAS or LAPACK routine touches the coefficients (their
# kernels, chosen per CPU, sum in different orders; with a condition number of 1e7 that
# changed the tenth digit of the JANAF refits between machines). The systems are small
# (at most a few hundred rows by a few dozen columns), so exact sums cost milliseconds.

def _dot(a: np.ndarray, b: np.ndarray) -> float:
    """Exactly rounded dot product of two 1-D arrays (order-independent)."""
    return math.fsum((a * b).tolist())


def _matmul(A: np.ndarray, B: np.ndarray) -> np.ndarray:
    """A @ B summed over the inner index in a fixed order by elementwise operations
    only (no BLAS kernel, whose summation order depends on the CPU): the same bits
    on every machine."""
    A = np.asarray(A, dtype=float)
    B = np.asarray(B, dtype=float)
    acc = A[:, 0:1] * B[0:1, :]
    for k in range(1, A.shape[1]):
        acc += A[:, k:k + 1] * B[k:k + 1, :]
    return acc


def _householder(M: np.ndarray) -> tuple[list, np.ndarray]:
    """Householder QR of M (m >= n): the reflectors and R (n, n).

    Q^T = H_n ... H_1 with H_k = I - 2 v_k v_k^T / (v_k^T v_k) (Golub & Van Loan,
    Matrix Computations, 4th ed., algorithm 5.2.1), sums exactly rounded.
    """
    W = np.array(M, dtype=float, copy=True)
    m, n = W.shape
    refl = []
    for k in range(n):
        x = W[k:, k].copy()
        norm = math.sqrt(math.fsum((x * x).tolist()))
        if norm == 0.0:
            refl.append(None)
            continue
        v = x
        v[0] += math.copysign(norm, x[0])
        vv = math.fsum((v * v).tolist())
        for j in range(k, n):
            w = 2.0 * _dot(v, W[k:, j]) / vv
            W[k:, j] -= w * v
        refl.append((k, v, vv))
    return refl, np.triu(W[:n, :n])


def _apply_qt(refl: list, r: np.ndarray) -> np.ndarray:
    """Q^T r for the reflectors of ``_householder``."""
    y = np.array(r, dtype=float, copy=True)
    for item in refl:
        if item is None:
            continue
        k, v, vv = item
        y[k:] -= (2.0 * _dot(v, y[k:]) / vv) * v
    return y


def _back_substitute(R: np.ndarray, y: np.ndarray, lower: bool = False) -> np.ndarray:
    """Solve R z = y (R upper triangular) or R^T z = y (``lower``)."""
    n = R.shape[0]
    z = np.zeros(n)
    T = R.T if lower else R
    order = range(n) if lower else range(n - 1, -1, -1)
    for i in order:
        done = np.arange(n) < i if lower else np.arange(n) > i
        z[i] = (y[i] - _dot(T[i, done], z[done])) / T[i, i]
    return z


def _null_space(C: np.ndarray, d: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """x_p with C x_p = d and an orthonormal basis N of the null space of C."""
    p, n = C.shape
    refl, R = _householder(C.T)
    diag = np.abs(np.diag(R))
    if p and not diag.min() > diag.max() * 1e-12:
        raise FitError("the constraints (continuity at breakpoints, 298.15 K anchors) are not independent; "
                       "check that breakpoints are distinct and inside the range")
    # Q = H_1 ... H_p applied to the identity, column by column
    Q = np.empty((n, n))
    for j in range(n):
        e = np.zeros(n)
        e[j] = 1.0
        for item in reversed(refl):
            if item is None:
                continue
            k, v, vv = item
            e[k:] -= (2.0 * _dot(v, e[k:]) / vv) * v
        Q[:, j] = e
    u = _back_substitute(R, d, lower=True)            # R^T u = d
    x_p = _matmul(Q[:, :p], u[:, None])[:, 0]
    return x_p, Q[:, p:]


def _pow2(x: float) -> float:
    """The power of two nearest x (> 0): scaling by it is exact."""
    return math.ldexp(1.0, math.frexp(x)[1] - 1)


@lru_cache(maxsize=256)
def _chebyshev_to_tau(lo: float, hi: float, n: int) -> tuple:
    """P[j][i]: coefficient of tau^i in T_j(x), x = (2 tau - lo - hi)/(hi - lo), exactly.

    T_j are the Chebyshev polynomials of the first kind (T_0 = 1, T_1 = x,
    T_j+1 = 2x T_j - T_j-1), mapped onto [lo, hi] as numpy.polynomial does with
    its domain and window; the expansion is done in rational arithmetic so that
    it is exact and the same on every machine.
    """
    a, b = Fraction(lo), Fraction(hi)
    alpha, beta = 2 / (b - a), -(a + b) / (b - a)
    x = [beta, alpha]                         # x as a polynomial in tau
    prev, cur = [Fraction(1)], x
    out = [prev, cur][:n]
    while len(out) < n:
        nxt = [Fraction(0)] * (len(cur) + 1)
        for i, c in enumerate(cur):
            for k, xc in enumerate(x):
                nxt[i + k] += 2 * c * xc
        for i, c in enumerate(prev):
            nxt[i] -= c
        prev, cur = cur, nxt
        out.append(cur)
    return tuple(tuple(float(c) for c in row) + (0.0,) * (n - len(row)) for row in out)


def _shape_map(lo: float, hi: float, form: str) -> np.ndarray:
    """Matrix (9, m) taking the fit's unknowns of one interval to scaled coefficients A.

    The unknowns are c_0..c_{n-1} of a Chebyshev series on the interval and the two
    integration constants B1, B2. In the 9-coefficient form the cp shape is
    cp/R = tau^-2 sum c_j T_j(x) (tau^2 cp/R is a polynomial of degree 6 in tau); in the
    7-coefficient form cp/R = sum c_j T_j(x) (degree 4). Either spans exactly the space
    of the published form, but its columns are nearly orthogonal on the interval where
    the powers tau^-2..tau^4 are not.
    """
    n = 7 if form == NINE else 5
    P = _chebyshev_to_tau(lo, hi, n)
    # 9-form: the coefficient of tau^i in T_j multiplies tau^(i-2), which is A[i];
    # 7-form: it multiplies tau^i, which is A[2 + i]
    first = 0 if form == NINE else 2
    Mp = np.zeros((NCOEF, n + 2))
    for j in range(n):
        for i in range(n):
            Mp[first + i, j] = P[j][i]
    Mp[7, n] = 1.0
    Mp[8, n + 1] = 1.0
    return Mp


def _solve(prob: _Problem, bounds: np.ndarray) -> tuple[np.ndarray, float]:
    """Raw-T coefficients (n, 9) on ``bounds`` and the condition of the fit."""
    n_int = bounds.size - 1
    n_shape = 7 if prob.form == NINE else 5     # coefficients that shape cp
    m = n_shape + 2
    inner = bounds[1:-1]
    T = prob.T
    idx = interval_of(inner, T)
    for k in range(n_int):
        n_k = int(np.count_nonzero(idx == k))
        if n_k < n_shape:
            raise FitError(
                f"interval {bounds[k]:g}-{bounds[k + 1]:g} K holds {n_k} tabulated temperatures; "
                f"a {prob.form} interval needs at least {n_shape}: give more points or fewer breakpoints")
    maps = [_shape_map(bounds[k] / T_SCALE, bounds[k + 1] / T_SCALE, prob.form) for k in range(n_int)]

    def block(Tv, kind, ints):
        """Rows for values of `kind` at temperatures Tv in intervals ints."""
        B = _basis(Tv / T_SCALE, kind) * _UNIT[kind]
        rows = np.zeros((Tv.size, n_int * m))
        for k in range(n_int):
            sel = ints == k
            if np.any(sel):
                rows[sel, k * m:(k + 1) * m] = _matmul(B[sel], maps[k])
        return rows

    k_ref = int(interval_of(inner, T_REF))
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

    # column equilibration by powers of two (exact), then the null-space method
    scale = np.array([_pow2(math.sqrt(math.fsum((A[:, j] ** 2).tolist()) + math.fsum((C[:, j] ** 2).tolist())))
                      if np.any(A[:, j]) or np.any(C[:, j]) else 1.0 for j in range(A.shape[1])])
    As, Cs = A / scale, C / scale
    cscale = np.array([_pow2(math.sqrt(math.fsum((row ** 2).tolist()))) for row in Cs])
    Cs, d = Cs / cscale[:, None], d / cscale
    if Cs.shape[0] >= Cs.shape[1]:
        raise FitError("the constraints leave no coefficient free; use fewer breakpoints")
    y_p, N = _null_space(Cs, d)
    AN = _matmul(As, N)
    if AN.shape[0] < AN.shape[1]:
        raise FitError(f"{AN.shape[0]} observations cannot fix {AN.shape[1]} free coefficients; give more points")
    refl, R = _householder(AN)
    diag = np.abs(np.diag(R))
    # condition number, for the refusal rule and the report only (LAPACK here is harmless:
    # it decides nothing but a refusal far from the values met in practice)
    sv = np.linalg.svd(R, compute_uv=False)
    cond = float(sv[0] / sv[-1]) if sv[-1] > 0 else math.inf
    if not diag.min() > 0 or not cond <= COND_LIMIT:
        raise FitError(f"the fit is ill-conditioned (condition number {cond:.2g} > {COND_LIMIT:.0g}); "
                       "the tabulated range is too narrow or the points too few for this form: "
                       "use the 7-coefficient form, fewer breakpoints, or a wider range of temperatures")
    r = b - _matmul(As, y_p[:, None])[:, 0]
    z = _back_substitute(R, _apply_qt(refl, r)[:R.shape[0]])
    x = (y_p + _matmul(N, z[:, None])[:, 0]) / scale
    Ak = np.zeros((n_int, NCOEF))
    for k in range(n_int):
        Ak[k] = _matmul(maps[k], x[k * m:(k + 1) * m, None])[:, 0]
    raw = scaled_to_raw(Ak)
    cancel = _cancellation(bounds, raw, T, idx)
    if not cancel <= COND_LIMIT:
        raise FitError(f"the fit is ill-conditioned (the published form loses {math.log10(cancel):.0f} "
                       "digits to cancellation); the tabulated range is too narrow for this form: use the "
                       "7-coefficient form, fewer breakpoints, or a wider range of temperatures")
    return raw, max(cond, cancel)


def _cancellation(bounds: np.ndarray, raw: np.ndarray, T: np.ndarray, idx: np.ndarray) -> float:
    """Worst ratio sum|a_i T^i| / |cp/R| at the tabulated points: the factor by which the
    published (raw-T) form amplifies rounding when it is evaluated."""
    worst = 1.0
    powers = np.arange(-2, 5)
    for k in range(bounds.size - 1):
        Tk = T[idx == k]
        if not Tk.size:
            continue
        terms = raw[k, :7][None, :] * Tk[:, None] ** powers[None, :]
        val = np.abs(terms.sum(axis=1))
        worst = max(worst, float(np.max(np.abs(terms).sum(axis=1) / np.maximum(val, 1e-300))))
    return worst


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


def _fit_on(prob: _Problem, bounds: np.ndarray) -> tuple[Polynomial, dict, float, np.ndarray]:
    coeffs, cond = _solve(prob, bounds)
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
    tgt = _target(target)
    prob = _Problem(T, cp, dh, s, h298, s298, form, dh_check, s_check)
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
