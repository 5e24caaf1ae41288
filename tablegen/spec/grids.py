"""Book specs, the grid of a table: segments, a list, or an automatic step from a tolerance."""

from __future__ import annotations

import math

import numpy as np

from ..core.errors import DataRangeError, TablegenError
from ..core.rounding import round_steps_from_top
from .values import _check_keys, _fail, _get, _positive_number, _temp_unit, _temperature, _typename

#: Largest number of rows one table may have. A printed table of 20 000 rows
#: is already some 400 A4 pages; more is a mistake in the grid, not a book.
MAX_ROWS_PER_TABLE = 20000


GRID_KEYS = ("segments", "list", "start", "stop", "tolerance")
SEGMENT_KEYS = ("start", "stop", "step")


def _segment(seg, where) -> tuple[np.ndarray, dict]:
    if not isinstance(seg, dict):
        _fail(where, f"must be a table {{start = ..., stop = ..., step = ...}}, not {_typename(seg)}")
    _check_keys(seg, SEGMENT_KEYS, where)
    a, ua = _temp_unit(_get(seg, "start", str, where, required=True), f"{where}.start")
    if not ua.to_si(a) > 0:
        _fail(f"{where}.start", f"is {ua.to_si(a):g} K; temperatures must be above 0 K")
    b, ub = _temp_unit(_get(seg, "stop", str, where, required=True), f"{where}.stop")
    st, us = _temp_unit(_get(seg, "step", str, where, required=True), f"{where}.step")
    if ub.symbol != ua.symbol:
        _fail(f"{where}.stop", f"is in {ub.symbol} but start is in {ua.symbol}; give both in one unit")
    if not (st > 0):
        _fail(f"{where}.step", f"must be > 0, got {st:g}")
    # A step is a temperature difference: 10 °C = 10 K, 10 °F = 10 °R.
    step_native = st * us.factor / ua.factor
    for val, key in ((a, "start"), (b, "stop")):
        if not ua.to_si(val) > 0:
            _fail(f"{where}.{key}", f"is {ua.to_si(val):g} K; temperatures must be above 0 K")
    if not b > a:
        _fail(f"{where}.stop", f"must be above start ({b:g} {ua.symbol} <= {a:g} {ua.symbol})")
    n = (b - a) / step_native
    if n + 1 > MAX_ROWS_PER_TABLE:
        _fail(f"{where}.step", f"gives {int(n) + 1} rows; a table has at most {MAX_ROWS_PER_TABLE} rows")
    count = int(math.floor(n + 1e-9)) + 1
    vals = a + step_native * np.arange(count)
    if abs(vals[-1] - b) > 1e-9 * max(1.0, abs(b)):
        vals = np.append(vals, b)
    T = ua.to_si(vals)
    return T, {"start_K": ua.to_si(a), "stop_K": ua.to_si(b), "step_K": st * us.factor,
               "unit": ua.symbol, "rows": int(T.size)}


def parse_grid(raw, where, sub, columns_for_auto, extrapolate):
    if not isinstance(raw, dict):
        _fail(where, f"must be a table with 'segments', 'list', or 'start', 'stop' and 'tolerance', "
                     f"not {_typename(raw)}")
    _check_keys(raw, GRID_KEYS, where)
    kinds = [k for k in ("segments", "list", "tolerance") if k in raw]
    if len(kinds) != 1:
        _fail(where, "give exactly one of 'segments' (start, stop, step), 'list' (temperatures) "
                     "or 'tolerance' (with start and stop)")
    kind = kinds[0]
    if kind != "tolerance":
        for k in ("start", "stop"):
            if k in raw:
                _fail(f"{where}.{k}", "belongs to an automatic grid (with 'tolerance'); "
                                      "inside 'segments' give start, stop, step per segment")
    if kind == "segments":
        segs = _get(raw, "segments", list, where)
        if not segs:
            _fail(f"{where}.segments", "is empty; give at least one {start, stop, step}")
        parts, desc = [], []
        for i, s in enumerate(segs):
            T, d = _segment(s, f"{where}.segments[{i}]")
            parts.append(T)
            desc.append(d)
            if sum(p.size for p in parts) > MAX_ROWS_PER_TABLE:
                _fail(f"{where}.segments", f"give more than {MAX_ROWS_PER_TABLE} rows; "
                                           f"a table has at most {MAX_ROWS_PER_TABLE} rows")
        return np.concatenate(parts), {"kind": "segments", "segments": desc}
    if kind == "list":
        lst = _get(raw, "list", list, where)
        if not lst:
            _fail(f"{where}.list", "is empty; give at least one temperature")
        if len(lst) > MAX_ROWS_PER_TABLE:
            _fail(f"{where}.list", f"has {len(lst)} rows; a table has at most {MAX_ROWS_PER_TABLE} rows")
        T = np.array([_temperature(v, f"{where}.list[{i}]") for i, v in enumerate(lst)])
        return T, {"kind": "list", "T_K": T.tolist()}
    # automatic step from an interpolation tolerance
    tol = _positive_number(raw, "tolerance", where, None)
    if tol >= 0.1:
        _fail(f"{where}.tolerance", f"{tol:g} is a relative error and must be below 0.1 (e.g. 1e-4)")
    a, ua = _temp_unit(_get(raw, "start", str, where, required=True), f"{where}.start")
    b, ub = _temp_unit(_get(raw, "stop", str, where, required=True), f"{where}.stop")
    if ub.symbol != ua.symbol:
        _fail(f"{where}.stop", f"is in {ub.symbol} but start is in {ua.symbol}; give both in one unit")
    if not ua.to_si(a) > 0:
        _fail(f"{where}.start", f"is {ua.to_si(a):g} K; temperatures must be above 0 K")
    if not b > a:
        _fail(f"{where}.stop", f"must be above start ({b:g} {ua.symbol} <= {a:g} {ua.symbol})")
    step, worst = _auto_step(sub, a, b, ua, columns_for_auto, tol, extrapolate, where)
    n = int(math.floor((b - a) / step + 1e-9)) + 1
    vals = a + step * np.arange(n)
    if abs(vals[-1] - b) > 1e-9 * max(1.0, abs(b)):
        vals = np.append(vals, b)
    T = ua.to_si(vals)
    return T, {"kind": "auto", "start_K": ua.to_si(a), "stop_K": ua.to_si(b), "unit": ua.symbol,
               "tolerance": tol, "step": step, "step_K": step * ua.factor,
               "worst_interpolation_error": worst, "rows": int(T.size)}


#: How a spec asks for extrapolation, named where a temperature is outside the data range
#: (build and compare read a spec and both take --extrapolate for every table).
EXTRAPOLATE_HOW = "extrapolate = true in this table or in [defaults], or --extrapolate for every table"


def fail_range(where: str, e: TablegenError):
    """_fail with a range error, naming the spec's way to extrapolate."""
    _fail(where, str(e.offering(EXTRAPOLATE_HOW) if isinstance(e, DataRangeError) else e))


def _auto_step(sub, a, b, ua, keys, tol, extrapolate, where):
    """Largest round step (in the grid's unit) whose rows keep linear interpolation
    within the relative ``tol`` for every printed column, and the worst bound.

    The bound is tablegen.calc.interpolation's (a dense evaluation between each pair of
    rows, not an estimate), relative to |f|, or to cp·T for the energies with a datum
    (h, u, g0), which pass through zero.
    """
    from ..calc.interpolation import step_within
    from .columns import column_values_SI
    keys = tuple(dict.fromkeys(k for k in keys if k != "T")) or ("cp",)

    def rows_for(step):
        n = int(math.floor((b - a) / step + 1e-9)) + 1
        if n > MAX_ROWS_PER_TABLE:
            return np.empty(n)        # only its size is read: too many rows
        vals = a + step * np.arange(n)
        if abs(vals[-1] - b) > 1e-9 * max(1.0, abs(b)):
            vals = np.append(vals, b)
        return ua.to_si(vals)

    def values(ks, T):
        return column_values_SI(sub, T, ks, extrapolate=extrapolate)

    try:
        found = step_within(sub, keys, round_steps_from_top(b - a), rows_for, dict.fromkeys(keys, tol),
                            relative=True, values=values, max_rows=MAX_ROWS_PER_TABLE)
    except TablegenError as e:
        fail_range(where, e)
    if found is None:
        _fail(f"{where}.tolerance", f"{tol:g} needs more than {MAX_ROWS_PER_TABLE} rows "
                                    f"(a table has at most {MAX_ROWS_PER_TABLE}); loosen it or narrow the range")
    return found
