"""Linear interpolation between printed rows: its largest error, and the grid step it allows.

The bound is found on a dense grid between each pair of rows (one evaluation for every
column of a table); ``auto_step`` picks the largest round step whose bound stays inside
a tolerance (``step_within`` the walk, which a book's automatic grid takes too). Also the keys the uncertainty budget knows (their SI units), shared with
tablegen/calc/uncertainty.py.
"""

from __future__ import annotations

import math

import numpy as np

from ..core.errors import InputError, NameLookupError, SpecError
from ..core.rounding import round_steps_down
from ..core.constants import P_STD

#: Keys the budget knows, with their SI units (for the JSON sidecar).
UNITS = {
    "cp": "J/(kg K)", "cv": "J/(kg K)", "k": "1", "h": "J/kg", "u": "J/kg", "s0": "J/(kg K)",
    "s": "J/(kg K)", "g0": "J/kg", "Pr": "1", "vr": "1", "a": "m/s", "v": "m3/kg", "rho": "kg/m3",
    "cp_molar": "J/(mol K)", "cv_molar": "J/(mol K)", "h_molar": "J/mol", "u_molar": "J/mol",
    "s0_molar": "J/(mol K)", "s_molar": "J/(mol K)", "g0_molar": "J/mol", "dh298_molar": "J/mol",
}
#: Keys whose value is an energy with an arbitrary datum (relative tolerances
#: of interpolation use cp T as their scale, not the value).
ENERGY_KEYS = frozenset({"h", "u", "g0", "h_molar", "u_molar", "g0_molar", "dh298_molar"})
#: Standard-state functions of T only: defined for the ideal gas at P°, so the
#: real gas's departure at pressure (the validity statement) does not apply to
#: them; its effect on their use at pressure is stated through s.
STANDARD_STATE_KEYS = frozenset({"s0", "s0_molar", "g0", "g0_molar", "Pr", "vr", "dh298_molar"})


def _check_keys(sub, keys):
    bad = [k for k in keys if k not in UNITS]
    if bad:
        raise NameLookupError(f"no uncertainty model for {', '.join(map(repr, bad))}; "
                            f"allowed: {', '.join(UNITS)}")


_NEEDS_P = ("s", "s_molar", "v", "rho")


def _values(substance, keys, T, P_Pa) -> dict:
    """The values of ``keys`` at T, from one evaluation of exactly what they need."""
    keys = tuple(keys)
    for k in keys:
        if k not in UNITS:
            raise NameLookupError(f"no property {k!r}; allowed: {', '.join(UNITS)}")
    P = P_Pa if any(k in _NEEDS_P for k in keys) else None
    p = substance.properties(T, P, keys=keys)
    return {k: np.asarray(p[k], float) * np.ones_like(T) for k in keys}


def interpolation_bound(substance, key: str, T_rows, *, P_Pa: float = P_STD, n_fine: int = 64) -> np.ndarray:
    """Largest error of linear interpolation in ``key`` between adjacent rows (see
    :func:`interpolation_bounds`, which does every key of a table in one evaluation)."""
    return interpolation_bounds(substance, (key,), T_rows, P_Pa=P_Pa, n_fine=n_fine)[key]


#: Row intervals whose fine grids are evaluated together: a table of 5,700 rows held some
#: 60 MB of fine-grid values at once; in chunks it holds a third of that. A value does not
#: depend on the chunk it is evaluated in (every evaluation path gives the same bits), so
#: the bounds equal those of one grid over the whole table.
BOUND_CHUNK = 2048


def _chunks(n: int) -> list[tuple[int, int]]:
    """(start, stop) of the interval chunks; a short last chunk joins the one before it."""
    edges = list(range(0, n, BOUND_CHUNK)) + [n]
    if len(edges) > 2 and edges[-1] - edges[-2] < BOUND_CHUNK // 2:
        del edges[-2]
    return list(zip(edges[:-1], edges[1:]))


def _bound_chunk(values, keys, ends, a, b, t, dt, lo, hi, best) -> None:
    """The largest interpolation error of each key in the intervals lo..hi-1, into ``best``:
    the fine grid, then a second grid around each interval's largest error."""
    a, b = a[lo:hi], b[lo:hi]
    grid = a[:, None] + (b - a)[:, None] * t[None, :]
    fine = values(keys, grid.ravel())
    for k in keys:
        fa, fb = ends[k][lo:hi], ends[k][lo + 1:hi + 1]

        def line(tt, fa=fa, fb=fb):
            return fa[:, None] + (fb - fa)[:, None] * tt

        e = np.abs(fine[k].reshape(grid.shape) - line(t[None, :]))
        i = np.argmax(e, axis=1)
        top = e[np.arange(e.shape[0]), i]
        t2 = np.clip(t[i][:, None] + np.linspace(-dt, dt, 33)[None, :], 0.0, 1.0)
        T2 = a[:, None] + (b - a)[:, None] * t2
        e2 = np.abs(values((k,), T2.ravel())[k].reshape(T2.shape) - line(t2))
        best[k][lo:hi] = np.maximum(top, e2.max(axis=1))


def interpolation_bounds(substance, keys, T_rows, *, P_Pa: float = P_STD, n_fine: int = 64,
                         values=None) -> dict:
    """Largest error of linear interpolation in each of ``keys`` between adjacent rows.

    For each interval [T_i, T_i+1] the functions are evaluated on a fine grid
    (n_fine + 1 points, the data's breakpoints and both sides of them added),
    the largest |f(T) - L(T)| found and refined on a second grid around it;
    the result is raised by 1e-5 relative and a few units of rounding so that
    it is a bound, not an estimate. The fine grid is evaluated once for all keys
    (only the functions they need); the refinement grid depends on where each key's
    error is largest, so it is evaluated per key.

    ``values(keys, T)`` gives the values to bound (default: the properties of the
    substance at ``P_Pa``); a table's columns pass their own (tablegen.spec.grids).

    Returns
    -------
    {key: array of len(T_rows) - 1 bounds, SI unit of the key}.
    """
    keys = tuple(keys)
    if values is None:
        def values(ks, T):
            return _values(substance, ks, T, P_Pa)
    Tr = np.asarray(T_rows, float)
    if Tr.ndim != 1 or Tr.size < 2 or not np.all(np.diff(Tr) > 0):
        raise InputError("interpolation bound: rows must be at least 2 increasing temperatures")
    a, b = Tr[:-1], Tr[1:]
    ends = values(keys, Tr)
    t = np.linspace(0.0, 1.0, n_fine + 1)
    dt = 1.0 / n_fine
    best = {k: np.empty(a.size) for k in keys}
    for lo, hi in _chunks(a.size):
        _bound_chunk(values, keys, ends, a, b, t, dt, lo, hi, best)
    bp = substance.poly.T_bounds[1:-1]
    out = {}
    for k in keys:
        fa, fb = ends[k][:-1], ends[k][1:]
        bk = best[k]
        # breakpoints of the collapsed polynomial: the function may jump there
        for Tb in bp:
            j = np.searchsorted(Tr, Tb, side="right") - 1
            if 0 <= j < a.size:
                tb = (np.array([Tb * (1 - 1e-12), Tb, Tb * (1 + 1e-12)]) - a[j]) / (b[j] - a[j])
                tb = np.clip(tb, 0.0, 1.0)
                f = values((k,), a[j] + (b[j] - a[j]) * tb)[k]
                bk[j] = max(bk[j], float(np.max(np.abs(f - (fa[j] + (fb[j] - fa[j]) * tb)))))
        scale = np.maximum(np.abs(fa), np.abs(fb))
        out[k] = bk * (1 + 1e-5) + 8 * np.finfo(float).eps * scale
    return out


def auto_step(substance, keys, T_lo: float, T_hi: float, tolerance, *, P_Pa: float = P_STD) -> float:
    """Largest round temperature step (1, 2, 2.5, 5 × 10^n K) whose rows keep linear
    interpolation within ``tolerance`` for every key.

    Parameters
    ----------
    tolerance : float (relative: to |value|, or to cp·T for energies with a
        datum) or mapping key -> absolute tolerance in the key's SI unit
    Rows are T_lo, T_lo + step, ... and T_hi.

    Raises
    ------
    SpecError if the tolerance is not positive or no step down to 0.01 K meets it.
    """
    keys = tuple(keys)
    _check_keys(substance, keys)
    if not (T_hi > T_lo > 0):
        raise SpecError(f"automatic step: range {T_lo}-{T_hi} K must be increasing and above 0 K")
    try:
        tol = {k: float(tolerance[k]) for k in keys if k in tolerance} if isinstance(tolerance, dict) \
            else None
        plain = None if isinstance(tolerance, dict) else float(tolerance)
    except (TypeError, ValueError):
        raise SpecError(f"automatic step: tolerance {tolerance!r} is not a number; allowed: a positive "
                        f"relative tolerance or a mapping of column to absolute tolerance") from None
    if isinstance(tolerance, dict):
        missing = [k for k in keys if k not in tol]
        if missing:
            raise SpecError(f"automatic step: no tolerance for {', '.join(missing)}")
        rel = False
    else:
        tol = {k: plain for k in keys}
        rel = True
    if not all(math.isfinite(v) and v > 0 for v in tol.values()):
        raise SpecError("automatic step: tolerance must be a positive number")

    def rows_for(step):
        rows = np.arange(T_lo, T_hi, step)
        return np.append(rows[rows < T_hi - 1e-9 * T_hi], T_hi)

    found = step_within(substance, keys, round_steps_down(T_hi - T_lo), rows_for, tol, relative=rel, P_Pa=P_Pa)
    if found is not None:
        return float(found[0])
    raise SpecError(f"automatic step: no step down to 0.01 K keeps interpolation within {tolerance!r}")


def step_within(substance, keys, steps, rows_for, tol: dict, *, relative: bool, P_Pa: float = P_STD,
                values=None, max_rows: int = 200000):
    """The first of ``steps`` (largest first) whose rows keep the bound of linear
    interpolation (:func:`interpolation_bounds`) within ``tol`` for every key.

    Parameters
    ----------
    steps : candidate steps, largest first, in the unit ``rows_for`` reads
    rows_for : step -> increasing row temperatures, K
    tol : key -> tolerance: relative (``relative``: to |value|, or to cp·T for the
        energies with a datum, ENERGY_KEYS, at each interval's middle) or absolute, SI
    values : ``values(keys, T)``, as :func:`interpolation_bounds`
    max_rows : the walk stops at a step that gives more rows

    Returns
    -------
    (step, worst) with worst the largest ratio of bound to its scale (relative) or the
    largest bound (absolute) over every key and interval; None if no step does.
    """
    keys = tuple(keys)
    if values is None:
        def values(ks, T):
            return _values(substance, ks, T, P_Pa)
    for step in steps:
        rows = rows_for(step)
        if rows.size > max_rows:
            break
        if rows.size < 2:
            continue
        mid = 0.5 * (rows[1:] + rows[:-1])
        cp_keys = tuple(dict.fromkeys("cp_molar" if k.endswith("_molar") else "cp"
                                      for k in keys if relative and k in ENERGY_KEYS))
        at_rows = values(keys, rows)
        at_mid = values(tuple(dict.fromkeys(keys + cp_keys)), mid)
        scales = {}
        for k in keys:
            if not relative:
                scales[k] = 1.0
            elif k in ENERGY_KEYS:
                scales[k] = at_mid["cp_molar" if k.endswith("_molar") else "cp"] * mid
            else:
                scales[k] = np.abs(at_mid[k])
        # the error at the midpoints is a true error, below the bound: a step it already
        # breaks is passed over without the dense evaluation (speed only, same choice)
        if any(np.any(np.abs(at_mid[k] - 0.5 * (at_rows[k][1:] + at_rows[k][:-1])) > tol[k] * scales[k])
               for k in keys):
            continue
        bnd = interpolation_bounds(substance, keys, rows, P_Pa=P_Pa, values=values)
        ok, worst = True, 0.0
        for k in keys:
            scale = scales[k]
            ok = ok and bool(np.all(bnd[k] <= tol[k] * scale))
            with np.errstate(divide="ignore", invalid="ignore"):
                worst = max(worst, float(np.max(bnd[k] / scale)))
            if not ok:
                break
        if ok:
            return step, worst
    return None


# ----------------------------------------------------------------- rounding
