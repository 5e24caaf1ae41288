"""The inverse of a substance's properties: T from h, u, s°, Pr or vr, on arrays.

A tabulation uniform in the inverted function gives the start (cubic Hermite
interpolant of T(f), one division finds the cell), then Newton steps kept inside
each point's grid-cell bracket, with a bisection fallback; converged points leave
the iteration. :meth:`tablegen.thermo.substance.Substance.T_from` is the entry point.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..core.constants import R_MOLAR
from ..core.errors import NameLookupError, RangeError

#: Properties that ``T_from`` can invert (all monotonic in T for an ideal gas).
INVERTIBLE = ("h", "u", "s0", "Pr", "vr", "h_molar", "u_molar", "s0_molar")
#: Relative tolerance of the inverse functions (in T).
INVERSE_RTOL = 1e-10
#: A point leaves the inverse iteration when its Newton step is below this part of T
#: (above the rounding noise of the published forms, about 1e-11 in narrow intervals)
#: (Newton converges quadratically: the next step would be far below INVERSE_RTOL).
INVERSE_STEP_RTOL = 1e-11
#: Newton passes after which an inverse call gives up (each pass has a bisection
#: fallback, so 60 passes resolve the 2^-60 part of a grid cell).
MAX_INVERSE_PASSES = 60
#: Cells of the tabulation an inverse starts from (uniform in the inverted function).
INVERSE_CELLS = 4096


def target(sub, key: str, T: np.ndarray):
    """Monotonic increasing f(T) for ``key`` and df/dT, from the polynomial alone.

    Only the two functions the key needs are evaluated (cp and h, or cp and s):
    an inverse pass costs a fraction of a ``properties`` call.
    """
    molar = key.endswith("_molar")
    Mk = 1.0 if molar else sub.M * 1e-3
    base = key[:-6] if molar else key
    if base in ("h", "u"):
        raw = sub.poly.evaluate(T, want=("cp", "h"))
        cp = raw["cp"] * (R_MOLAR / Mk)
        f = raw["h"] * (R_MOLAR / Mk) + sub._constants()["h_off"] / Mk
        if base == "h":
            return f, cp
        return f - (R_MOLAR / Mk) * T, cp - R_MOLAR / Mk
    if base not in ("s0", "Pr", "vr"):
        raise NameLookupError(f"cannot solve for T from {key!r}; allowed: {', '.join(INVERTIBLE)}")
    raw = sub.poly.evaluate(T, want=("cp", "s"))
    cpR, sR = raw["cp"], raw["s"]
    c = sub._constants()
    if base == "s0":
        return (sR - c["lnP"]) * (R_MOLAR / Mk), cpR * (R_MOLAR / Mk) / T
    lnPr = math.log(sub.anchor.Pr) + (sR - c["sR_anchor"])
    if base == "Pr":
        return lnPr, cpR / T
    # -ln vr = -ln vr_a - ln(T/T_a) + ln Pr - ln Pr_a; d/dT = (cp/R - 1)/T = cv/(R T)
    return (-math.log(sub.anchor.vr) - np.log(T / sub.anchor.T_K) + lnPr - math.log(sub.anchor.Pr),
            (cpR - 1.0) / T)

def grid(sub, key: str):
    """The tabulation the inverse starts from, uniform in f = f(T) so that a value's
    cell is found by one division instead of a binary search.

    Returns (f0, df_cell, T cells (n+1), f at the cell ends, cubic coefficients (4, n)
    of T(t) on each cell, t in [0, 1] the fraction of the cell in f). The cubic is the
    Hermite interpolant of the inverse function with slopes from cp (error about
    1e-12 relative at 4096 cells).
    """
    g = sub._cache.get(("grid", key))
    if g is None:
        # a fine geometric tabulation first; its cells bracket the uniform-f points
        Tq = np.unique(np.concatenate([np.geomspace(sub.T_min, sub.T_max, 8193), sub.poly.T_bounds]))
        fq, _ = target(sub, key, Tq)
        fq = np.maximum.accumulate(fq)      # small jumps at breakpoints: keep it monotonic
        n = INVERSE_CELLS
        fu = np.linspace(fq[0], fq[-1], n + 1)
        jq = np.clip(np.searchsorted(fq, fu, side="right") - 1, 0, Tq.size - 2)
        Tu = Tq[jq] + (Tq[jq + 1] - Tq[jq]) * np.clip(
            (fu - fq[jq]) / np.where(fq[jq + 1] > fq[jq], fq[jq + 1] - fq[jq], 1.0), 0.0, 1.0)
        for _ in range(3):                  # polish the cell ends (Newton, kept in their cells)
            f, df = target(sub, key, Tu)
            Tu = np.clip(Tu - (f - fu) / df, Tq[jq], Tq[jq + 1])
        Tu[0], Tu[-1] = sub.T_min, sub.T_max
        Tu = np.maximum.accumulate(Tu)
        f, df = target(sub, key, Tu)
        f = np.maximum.accumulate(f)
        span = np.diff(f)
        dT = np.diff(Tu)
        with np.errstate(divide="ignore", invalid="ignore"):
            m0 = np.where(df[:-1] > 0, span / df[:-1], dT)
            m1 = np.where(df[1:] > 0, span / df[1:], dT)
        # T(t) = T0 + m0 t + (3 dT - 2 m0 - m1) t^2 + (m0 + m1 - 2 dT) t^3
        cub = np.stack([Tu[:-1], m0, 3 * dT - 2 * m0 - m1, m0 + m1 - 2 * dT])
        g = (float(fu[0]), float(fu[1] - fu[0]), Tu, f, cub)
        sub._cache[("grid", key)] = g
    return g


def solve(sub, key: str, y: np.ndarray, *, report: bool = False):
    """T (K) where ``key`` of substance ``sub`` takes the values ``y`` (checked real numbers,
    ln Pr and -ln vr already taken for Pr and vr): the work of :meth:`Substance.T_from`,
    which documents the method and its tolerances.
    """
    shape = y.shape
    y = y.ravel()
    f0, dcell, Tg, fg, cub = grid(sub, key)
    if not np.all(np.isfinite(y)) or np.any(y < fg[0] - 1e-12 * abs(fg[0])) or \
            np.any(y > fg[-1] + 1e-12 * abs(fg[-1])):
        lo, hi = sub.T_min, sub.T_max
        raise RangeError(f"{sub.id}: a value of {key} lies outside what the data range "
                         f"{lo:g}-{hi:g} K gives; allowed: values between {key}({lo:g} K) and {key}({hi:g} K)")
    n = Tg.size - 1
    x = (y - f0) / dcell
    j = np.clip(x.astype(np.intp), 0, n - 1)
    # the cell ends' f are the polished values, not exactly uniform: step to the cell
    # that holds y where rounding put it in a neighbour
    j -= (y < fg[j]) & (j > 0)
    j += (y > fg[j + 1]) & (j < n - 1)
    t = np.clip(x - j, 0.0, 1.0)
    T = cub[3, j]
    T *= t
    T += cub[2, j]
    T *= t
    T += cub[1, j]
    T *= t
    T += cub[0, j]
    lo, hi = Tg[j], Tg[j + 1]
    np.clip(T, lo, hi, out=T)
    todo = None                     # None: every point (no index arrays on the first pass)
    passes, left, last_step = 0, [], 0.0
    while todo is None or todo.size:
        if passes == MAX_INVERSE_PASSES:
            raise RangeError(f"{sub.id}: T from {key} did not converge in {passes} passes (a value "
                             f"may fall in a jump of the data at a breakpoint)")
        passes += 1
        sel = slice(None) if todo is None else todo
        Tt, yt, lt, ht = T[sel], y[sel], lo[sel], hi[sel]
        f, df = target(sub, key, Tt)
        r = f - yt
        lt = np.where(r < 0, Tt, lt)
        ht = np.where(r > 0, Tt, ht)
        with np.errstate(divide="ignore", invalid="ignore"):
            Tn = Tt - r / df
        # a Newton step that lands outside the bracket is replaced by bisection; one
        # that lands on the bracket end it came from is a converged step, kept
        inside = (Tn >= lt) & (Tn <= ht) & np.isfinite(Tn)
        if not np.all(inside):
            Tn = np.where(inside, Tn, 0.5 * (lt + ht))
        step = np.abs(Tn - Tt)
        T[sel] = Tn
        lo[sel], hi[sel] = lt, ht
        done = (step <= INVERSE_STEP_RTOL * Tn) | (ht - lt <= INVERSE_RTOL * Tn)
        if step.size:
            last_step = max(last_step, float(np.max(step / Tn)))
        idx = np.arange(y.size) if todo is None else todo
        todo = idx[~done]
        left.append(int(todo.size))
    T = T.reshape(shape)
    if report:
        return T, InverseReport(passes=passes, remaining=tuple(left), max_last_step_rel=last_step)
    return T


@dataclass(frozen=True, slots=True)
class InverseReport:
    """How an inverse call went (compare scipy.optimize's RootResults).

    passes : Newton passes over the points still iterating
    remaining : points still iterating after each pass (the last is 0)
    max_last_step_rel : largest |ΔT|/T of the steps taken in the passes
    """

    passes: int
    remaining: tuple
    max_last_step_rel: float

    @property
    def converged(self) -> bool:
        return not self.remaining or self.remaining[-1] == 0


def bad_value(sub, key, values):
    raise RangeError(f"{sub.id}: {key} values must be positive")
