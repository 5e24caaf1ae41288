"""The solver of the NASA-polynomial fits: a constrained least-squares problem in the
scaled variable tau = T/1000 K, solved the same to the bit on every processor.

The scaled basis of cp/R, h/(R T_SCALE) and s/R (NASA/TP-2002-211556 eq. 1-3
in tau), its conversion to raw-T coefficients, and the null-space method of the
equality constraints (continuity at the breakpoints, anchors at 298.15 K) in
exactly rounded arithmetic. tablegen.calc.fitting states the problem (the
tabulation, the target, the breakpoints) and judges the result.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from fractions import Fraction
from functools import lru_cache
from decimal import Context, Decimal

import numpy as np

from ..core.errors import FitError
from ..thermo.polynomial import NCOEF, NINE, interval_of
from ..core.constants import R_MOLAR, T_REF

#: The scaled variable is tau = T / T_SCALE.
T_SCALE = 1000.0

#: Largest condition number of the column-equilibrated reduced design matrix
#: accepted. Rounding in double precision (eps = 2.2e-16) then perturbs the
#: coefficients by at most about 2e-16 * 1e10 = 2e-6 of their size, well below
#: the 1e-5 that the 5-significant-figure tabulations support.
COND_LIMIT = 1e10


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


# ---------------------------------------------------------------- the solver
@dataclass(frozen=True, slots=True)
class Problem:
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


def _block(Tv, kind, ints, maps, m):
    """Rows for values of `kind` at temperatures Tv in intervals ints."""
    n_int = len(maps)
    B = _basis(Tv / T_SCALE, kind) * _UNIT[kind]
    rows = np.zeros((Tv.size, n_int * m))
    for k in range(n_int):
        sel = ints == k
        if np.any(sel):
            rows[sel, k * m:(k + 1) * m] = _matmul(B[sel], maps[k])
    return rows


def _observations(prob: Problem, maps, m, idx, k_ref) -> tuple[np.ndarray, np.ndarray]:
    """The weighted observation rows A and their values b (dimensionless residuals)."""
    T = prob.T

    def block(Tv, kind, ints):
        return _block(Tv, kind, ints, maps, m)

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
    return A, b


def _constraints(prob: Problem, maps, m, inner, k_ref) -> tuple[np.ndarray, np.ndarray]:
    """The equality constraints C x = d: continuity at the breakpoints, anchors at 298.15 K."""
    ref_ints = np.array([k_ref])
    Tref = np.array([T_REF])

    def block(Tv, kind, ints):
        return _block(Tv, kind, ints, maps, m)

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
    return C, d


def solve(prob: Problem, bounds: np.ndarray) -> tuple[np.ndarray, float]:
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
    k_ref = int(interval_of(inner, T_REF))
    A, b = _observations(prob, maps, m, idx, k_ref)
    C, d = _constraints(prob, maps, m, inner, k_ref)

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

