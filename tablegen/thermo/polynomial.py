"""NASA polynomial forms of ideal-gas cp, h and s°, evaluated on arrays.

Both forms are held in the 9-coefficient layout of NASA/TP-2002-211556
(McBride, Zehe & Gordon, 2002), eq. (1)-(3), per interval::

    cp/R  = a1 T^-2 + a2 T^-1 + a3 + a4 T + a5 T^2 + a6 T^3 + a7 T^4
    h/RT  = -a1 T^-2 + a2 ln(T)/T + a3 + a4 T/2 + a5 T^2/3 + a6 T^3/4 + a7 T^4/5 + b1/T
    s/R   = -a1 T^-2/2 - a2 T^-1 + a3 ln T + a4 T + a5 T^2/2 + a6 T^3/3 + a7 T^4/4 + b2

The 7-coefficient form of NASA TM-4513 (McBride, Gordon & Reno, 1993) is the
special case a1 = a2 = 0 with (a3..a7, b1, b2) = (a1..a7) of that report, so one
evaluation path serves both; ``form`` remembers which one the data came in.

A linear combination of such polynomials on a common set of intervals is again
such a polynomial: that is what makes a fixed-composition mixture collapse into
one record whose evaluation cost does not grow with its number of species.
"""

from __future__ import annotations

import threading
from bisect import bisect_left
from math import log as _log
from dataclasses import dataclass, field

import numpy as np

from ..core.errors import DataError

#: Number of coefficients per interval in the 9-coefficient layout.
NCOEF = 9
#: Names of the two published forms (``Polynomial.form``, the gasdata ``form`` key, ``fit --form``).
SEVEN = "7-coefficient"      # NASA TM-4513 (1993)
NINE = "9-coefficient"       # NASA/TP-2002-211556 (2002)
FORMS = (SEVEN, NINE)
#: Points evaluated together: small enough that the temporaries stay in cache.
BLOCK = 32768
#: Up to this many points, and up to SMALL_PER_INTERVAL times the number of intervals,
#: evaluation takes the small-array path (each point's coefficients gathered, then the
#: blocked path's operations on all points at once). Below that it is faster, above it
#: slower: the blocked path pays its Python calls per interval, the small path its
#: gather per point (measured 2026-12-03: crossing near 450 points at 1 interval, 1,500
#: at 2, 4,100 at 8). Both give the same bits, so these are speed settings only.
SMALL = 4096
SMALL_PER_INTERVAL = 640
#: Up to this many points, a loop over plain floats: a dozen array operations cost more.
TINY = 16
# The small paths' table (Polynomial._tables) has one column of 26 numbers per interval:
# six Horner steps of cp, h and s (rows 3j..3j+2 for step j), then the factors of 1/T
# (rows 18-20), the terms after them (21-23) and the factors of ln T for h and s (24-25).
# In these steps every function takes, value for value, the operations of the blocked
# path (_eval_run): a leading zero pads cp's and s's shorter Horner, and an interval
# without negative powers adds zeros, so both paths give the same bits.
#: Row of each function in the small paths.
_ROW = {"cp": 0, "h": 1, "s": 2}


def seven_to_nine(c7) -> list[float]:
    """Map NASA TM-4513 coefficients (a1..a7) onto the 9-coefficient layout."""
    c7 = [float(x) for x in c7]
    if len(c7) != 7:
        raise DataError(f"a 7-coefficient interval needs 7 numbers, got {len(c7)}")
    return [0.0, 0.0, *c7[:5], c7[5], c7[6]]


def interval_of(inner, T) -> np.ndarray:
    """Index of the interval holding each temperature, given the inner breakpoints.

    The one breakpoint rule of tablegen (evaluation and fitting alike): a breakpoint
    belongs to the lower interval (common practice: T <= T_mid takes the low-temperature
    coefficients, as cantera's NASA polynomials do, from memory); beyond the ends, the end
    intervals. At a breakpoint both intervals agree to the continuity of the record.
    """
    return np.searchsorted(inner, T, side="left")


@dataclass(frozen=True, slots=True, eq=False)
class Polynomial:
    """Piecewise NASA polynomial in molar, dimensionless form (cp/R, h/R, s/R).

    Parameters
    ----------
    T_bounds : array of n+1 increasing temperatures in K
    coeffs : array (n, 9) in the 9-coefficient layout
    form : "7-coefficient" (SEVEN) or "9-coefficient" (NINE), the form the data were published in
    """

    T_bounds: np.ndarray
    coeffs: np.ndarray
    form: str = NINE
    _inner: np.ndarray = field(init=False, repr=False)
    _h: np.ndarray = field(init=False, repr=False)
    _s: np.ndarray = field(init=False, repr=False)
    _has_neg: bool = field(init=False, repr=False)
    _steps: np.ndarray = field(init=False, repr=False)
    _steps_py: tuple = field(init=False, repr=False)
    _py: tuple = field(init=False, repr=False)
    _inner_list: list = field(init=False, repr=False)
    _lo: float = field(init=False, repr=False)
    _hi: float = field(init=False, repr=False)

    def __post_init__(self):
        b = np.ascontiguousarray(self.T_bounds, dtype=float)
        c = np.ascontiguousarray(self.coeffs, dtype=float)
        if c.ndim != 2 or c.shape[1] != NCOEF or b.shape != (c.shape[0] + 1,):
            raise DataError(
                f"polynomial needs n+1 bounds and n rows of 9 coefficients, "
                f"got {b.shape[0]} bounds and {c.shape} coefficients")
        if not np.all(np.diff(b) > 0) or b[0] <= 0:
            raise DataError(f"interval bounds must be positive and increasing: {b.tolist()}")
        object.__setattr__(self, "T_bounds", b)
        object.__setattr__(self, "coeffs", c)
        object.__setattr__(self, "_inner", b[1:-1].copy())
        # Pre-scaled columns so evaluation is pure Horner, no divisions.
        a1, a2, a3, a4, a5, a6, a7, b1, b2 = c.T
        h = np.stack([-a1, a2, a3, a4 / 2, a5 / 3, a6 / 4, a7 / 5, b1])     # h/R
        s = np.stack([-a1 / 2, -a2, a3, a4, a5 / 2, a6 / 3, a7 / 4, b2])     # s/R
        object.__setattr__(self, "_h", np.ascontiguousarray(h))
        object.__setattr__(self, "_s", np.ascontiguousarray(s))
        object.__setattr__(self, "_has_neg", bool(np.any(c[:, :2] != 0.0)))
        object.__setattr__(self, "_inner_list", b[1:-1].tolist())
        object.__setattr__(self, "_lo", float(b[0]))
        object.__setattr__(self, "_hi", float(b[-1]))

    # ------------------------------------------------------------------ basics
    @property
    def T_min(self) -> float:
        return self._lo

    @property
    def T_max(self) -> float:
        return self._hi

    @property
    def n_intervals(self) -> int:
        return int(self.coeffs.shape[0])

    def interval_index(self, T: np.ndarray) -> np.ndarray:
        """Interval of each temperature (:func:`interval_of`)."""
        return interval_of(self._inner, T)

    # -------------------------------------------------------------- evaluation
    def _tables(self):
        """The small paths' table and the one-state tuples, made on first use (a library
        builds hundreds of polynomials that are never evaluated)."""
        c, h, s = self.coeffs, self._h, self._s
        a1, a2, a3, a4, a5, a6, a7 = c[:, :7].T
        z = np.zeros_like(a1)
        steps = np.stack([
            z, h[6], z,             # acc = step0 T
            a7, h[5], s[6],         # acc += step1, then acc *= T, acc += step j for j = 2..5
            a6, h[4], s[5],
            a5, h[3], s[4],
            a4, h[2], s[3],
            a3, h[7], s[7],
            a1, z, s[0],            # E = (1/T) rows 18-20 + rows 21-23, E *= 1/T
            a2, h[0], s[1],
            h[1], s[2],             # F = ln T rows 24-25: h gets E + F, s gets F then E
        ])
        object.__setattr__(self, "_steps", np.ascontiguousarray(steps))
        object.__setattr__(self, "_steps_py", tuple(tuple(col) for col in steps.T.tolist()))
        # one state: per interval one flat tuple of plain floats (unpacked in one step):
        # has negative powers, cp a1..a7, h as in _h, s as in _s
        py = tuple((bool(c[k, 0] != 0.0 or c[k, 1] != 0.0), *c[k, :7].tolist(), *h[:, k].tolist(),
                    *s[:, k].tolist()) for k in range(c.shape[0]))
        object.__setattr__(self, "_py", py)

    def point(self, T: float) -> tuple[float, float, float]:
        """cp/R, h/R (K) and s/R at one temperature, in plain floats: the path for a
        program that asks for one state at a time (no array is made)."""
        try:
            py = self._py
        except AttributeError:
            self._tables()
            py = self._py
        (neg, a1, a2, a3, a4, a5, a6, a7, h0, h1, h2, h3, h4, h5, h6, h7,
         s0, s1, s2, s3, s4, s5, s6, s7) = py[bisect_left(self._inner_list, T)]
        lnT = _log(T)
        cp = a3 + T * (a4 + T * (a5 + T * (a6 + T * a7)))
        hv = (h2 + T * (h3 + T * (h4 + T * (h5 + T * h6)))) * T + h7
        sv = (s3 + T * (s4 + T * (s5 + T * s6))) * T + s7 + s2 * lnT
        if neg:
            inv = 1.0 / T
            cp += inv * (a2 + a1 * inv)
            hv += h0 * inv + h1 * lnT
            sv += inv * (s1 + s0 * inv)
        return cp, hv, sv

    def _evaluate_small(self, T: np.ndarray, want) -> dict[str, np.ndarray]:
        """Up to SMALL points: each point's column of the steps table gathered, then the
        blocked path's operations on all points and the three functions at once (rows of
        one flat array), a couple of dozen array operations whatever the number of
        intervals. Every operation is elementwise, so a value depends on its own
        temperature only, bit for bit the value of the blocked path."""
        m = T.size
        if m <= TINY:
            return self._evaluate_tiny(T, want)
        try:
            steps = self._steps
        except AttributeError:
            self._tables()
            steps = self._steps
        G = steps.take(interval_of(self._inner, T), axis=1).ravel()   # row r at [r m, (r+1) m)
        w = 3 * m
        T3 = np.concatenate((T, T, T))
        acc = np.multiply(G[:w], T3)
        acc += G[w:2 * w]
        for j in range(2, 6):
            acc *= T3
            acc += G[j * w:(j + 1) * w]
        F = np.multiply(G[8 * w:].reshape(2, m), np.log(T))             # ln T terms of h, s
        if self._has_neg:
            inv = np.divide(1.0, T3)
            E = np.multiply(G[6 * w:7 * w], inv)
            E += G[7 * w:8 * w]
            E *= inv
            E[m:2 * m] += F[0]
            acc[2 * m:] += F[1]
            acc += E
        else:
            acc[2 * m:] += F[1]
        return {key: acc[_ROW[key] * m:(_ROW[key] + 1) * m] for key in want}

    def _evaluate_tiny(self, T: np.ndarray, want) -> dict[str, np.ndarray]:
        """Up to TINY points: the small path's operations in plain floats (IEEE doubles
        either way, so the same bits), with ln T from np.log as the array paths take it
        (math.log differs from it in the last bit for a few temperatures in 10^5 on
        machines where numpy has its own vector logarithm)."""
        try:
            cols = self._steps_py
        except AttributeError:
            self._tables()
            cols = self._steps_py
        inner, neg = self._inner_list, self._has_neg
        cps, hs, ss = [], [], []
        for t, lnT in zip(T.tolist(), np.log(T).tolist()):
            (c0, h0, s0, c1, h1, s1, c2, h2, s2, c3, h3, s3, c4, h4, s4, c5, h5, s5,
             ic, ih, is_, jc, jh, js, fh, fs) = cols[bisect_left(inner, t)]
            inv = 1.0 / t
            cp = ((((c0 * t + c1) * t + c2) * t + c3) * t + c4) * t + c5
            hv = ((((h0 * t + h1) * t + h2) * t + h3) * t + h4) * t + h5
            sv = ((((s0 * t + s1) * t + s2) * t + s3) * t + s4) * t + s5
            sv += fs * lnT
            if neg:
                cp += (ic * inv + jc) * inv
                hv += (ih * inv + jh) * inv + fh * lnT
                sv += (is_ * inv + js) * inv
            cps.append(cp)
            hs.append(hv)
            ss.append(sv)
        rows = np.array((cps, hs, ss))
        return {key: rows[_ROW[key]] for key in want}

    def evaluate(self, T, *, want=("cp", "h", "s"), out=None) -> dict[str, np.ndarray]:
        """cp/R, h/R (in K) and s/R at temperatures T (K), arrays broadcast.

        No range check here: callers (``Substance``) refuse or mark
        out-of-range temperatures before calling. Large arrays are worked in
        blocks that stay in the processor cache; inside a block each interval
        is evaluated with scalar coefficients on its own contiguous run of
        points (sorted input: slices; unsorted: a counting sort by interval).
        Small arrays gather each point's coefficients instead (TINY, SMALL). Every
        path does the same operations on each point: a value depends on its own
        temperature only, not on the size or order of the array it is in.

        ``out``: arrays of T's shape (C-contiguous) to write some of the results into,
        by key; the others are rows of one new block (so they are freed together: a
        script's allocator then keeps the block's pages between calls instead of
        returning them to the system each time).
        """
        T = np.asarray(T, dtype=float)
        shape = T.shape
        T = T.ravel()
        given = out or {}
        if T.size <= SMALL and T.size <= SMALL_PER_INTERVAL * self.coeffs.shape[0]:
            vals = self._evaluate_small(T, want)
            if out is None:
                return vals if len(shape) == 1 else {k: v.reshape(shape) for k, v in vals.items()}
            for k, v in given.items():
                np.copyto(v.reshape(-1), vals[k])
            return {k: given[k] if k in given else v.reshape(shape) for k, v in vals.items()}
        new = [k for k in want if k not in given]
        block = dict(zip(new, np.empty((len(new), T.size)))) if new else {}
        out = {k: given[k].reshape(-1) if k in given else block[k] for k in want}
        # one set of scratch rows per thread, kept between calls (log, 1/T, two temporaries,
        # gathered T and three gathered results): no temporary array per term and no
        # fresh memory pages per call, which cost more than the arithmetic
        scratch = _scratch()
        for a in range(0, T.size, BLOCK):
            b = min(a + BLOCK, T.size)
            part = {k: v[a:b] for k, v in out.items()}
            self._evaluate_block(T[a:b], part, scratch)
        return {k: given[k] if k in given else v.reshape(shape) for k, v in out.items()}

    def _evaluate_block(self, T, out, scratch):
        n = self.n_intervals
        if n == 1:
            self._eval_run(T, 0, out, scratch)
            return
        if T.size < 2 or not np.any(T[1:] < T[:-1]):
            # sorted input (every table grid): each interval is a slice
            edges = [0, *np.searchsorted(T, self._inner, side="right").tolist(), T.size]  # T == breakpoint: lower interval (interval_of)
            for k in range(n):
                if edges[k] < edges[k + 1]:
                    sl = slice(edges[k], edges[k + 1])
                    self._eval_run(T[sl], k, {key: v[sl] for key, v in out.items()}, scratch)
            return
        # a breakpoint belongs to the lower interval: count the bounds strictly below T
        # (a few vector compares beat a binary search per point)
        idx = np.zeros(T.shape, np.uint8 if n < 256 else np.int32)
        for b in self._inner:
            idx += T > b
        # unsorted: the points of each interval (index lists are cheaper than a sort),
        # evaluated as one run with scalar coefficients, results scattered back
        rows = {"cp": 5, "h": 6, "s": 7}
        for k in range(n):
            sel = np.flatnonzero(idx == k)
            if sel.size:
                m = sel.size
                Tk = np.take(T, sel, out=scratch[4, :m])
                part = {key: scratch[rows[key], :m] for key in out}
                self._eval_run(Tk, k, part, scratch)
                for key in out:
                    out[key][sel] = part[key]

    def _eval_run(self, T, k, out, scratch):
        neg = self._has_neg and bool(self.coeffs[k, 0] != 0.0 or self.coeffs[k, 1] != 0.0)
        m = T.size
        lnT = np.log(T, out=scratch[0, :m]) if "s" in out or ("h" in out and neg) else None
        inv = np.divide(1.0, T, out=scratch[1, :m]) if neg else None
        tmp, tmp2 = scratch[2, :m], scratch[3, :m]
        c, h, s = self.coeffs[k], self._h[:, k], self._s[:, k]
        # The operations and their order are those of the small paths and of
        # Polynomial.point (plain floats): the array paths give the same bits; point()
        # takes math.log, which can differ from np.log in the last bit.
        if "cp" in out:
            v = out["cp"]
            _horner(v, T, (c[2], c[3], c[4], c[5], c[6]))
            if neg:                            # + inv (a2 + a1 inv)
                np.multiply(inv, c[0], out=tmp)
                tmp += c[1]
                tmp *= inv
                v += tmp
        if "h" in out:
            # h/R = b1 + T (a3 + T (a4/2 + ...)) [+ (-a1/T + a2 ln T)]
            v = out["h"]
            _horner(v, T, (h[2], h[3], h[4], h[5], h[6]))
            v *= T
            v += h[7]
            if neg:
                np.multiply(inv, h[0], out=tmp)
                np.multiply(lnT, h[1], out=tmp2)
                tmp += tmp2
                v += tmp
        if "s" in out:
            v = out["s"]
            _horner(v, T, (s[3], s[4], s[5], s[6]))
            v *= T
            v += s[7]
            np.multiply(lnT, s[2], out=tmp)
            v += tmp
            if neg:                            # + inv (s1 + s0 inv)
                np.multiply(inv, s[0], out=tmp)
                tmp += s[1]
                tmp *= inv
                v += tmp


    # ------------------------------------------------------------- algebra
    def on_bounds(self, bounds: np.ndarray) -> np.ndarray:
        """Coefficients of this polynomial re-expressed on a finer set of bounds.

        ``bounds`` must contain this polynomial's inner breakpoints and lie
        inside its range; each new interval takes the coefficients of the
        interval that holds its midpoint.
        """
        mid = 0.5 * (bounds[1:] + bounds[:-1])
        return self.coeffs[self.interval_index(mid)]

    def boundary_jumps(self) -> list[dict[str, float]]:
        """Relative jumps of cp, h and s° at each inner breakpoint.

        Returned per breakpoint: T_K and the jump of each function divided by
        the magnitude of its value (h relative to |h| + cp·T so a value near
        zero does not blow the ratio up).
        """
        jumps = []
        for k, Tb in enumerate(self._inner):
            lo = self._point(k, Tb)
            hi = self._point(k + 1, Tb)
            scale_h = abs(lo["h"]) + abs(lo["cp"]) * Tb
            jumps.append({
                "T_K": float(Tb),
                "cp": abs(hi["cp"] - lo["cp"]) / abs(lo["cp"]),
                "h": abs(hi["h"] - lo["h"]) / scale_h,
                "s": abs(hi["s"] - lo["s"]) / abs(lo["s"]),
            })
        return jumps

    def _point(self, k: int, T: float) -> dict[str, float]:
        one = Polynomial(np.array([T * 0.5, T * 2.0]), self.coeffs[k:k + 1], self.form)
        v = one.evaluate(np.array([T]))
        return {key: float(val[0]) for key, val in v.items()}


def combine(polys, weights, extra_s: float = 0.0) -> Polynomial:
    """Weighted sum of polynomials on the union of their breakpoints.

    Parameters
    ----------
    polys : sequence of Polynomial
    weights : mole fractions (any real weights)
    extra_s : constant added to s/R (the ideal mixing term -Σ y ln y)

    Returns
    -------
    Polynomial valid on the intersection of the ranges.
    """
    lo = max(p.T_min for p in polys)
    hi = min(p.T_max for p in polys)
    if not lo < hi:
        raise DataError("the components' temperature ranges do not overlap")
    inner = sorted({float(t) for p in polys for t in p._inner if lo < t < hi})
    bounds = np.array([lo, *inner, hi])
    coeffs = np.zeros((bounds.size - 1, NCOEF))
    for p, w in zip(polys, weights):
        coeffs += float(w) * p.on_bounds(bounds)
    coeffs[:, 8] += extra_s
    form = SEVEN if all(p.form == SEVEN for p in polys) else NINE
    return Polynomial(bounds, coeffs, form)


_SCRATCH = threading.local()


def _scratch() -> np.ndarray:
    """This thread's scratch rows (8, BLOCK), each starting on a 64-byte boundary (vector
    loads that straddle cache lines cost twice): made once per thread, not per call."""
    try:
        return _SCRATCH.rows
    except AttributeError:
        buf = np.empty(8 * BLOCK + 8)
        skip = (-buf.ctypes.data % 64) // 8
        _SCRATCH.rows = buf[skip:skip + 8 * BLOCK].reshape(8, BLOCK)
        return _SCRATCH.rows


def _horner(out, T, coefs):
    """out = coefs[0] + T (coefs[1] + T (... + T coefs[-1])), in place."""
    np.multiply(T, coefs[-1], out=out)
    for a in coefs[-2:0:-1]:
        out += a
        out *= T
    out += coefs[0]
