"""QA comparison of tablegen values against a reference table: the judge.

Given a REFERENCE as read by :func:`tablegen.calc.compare_reference.read_reference`,
this module evaluates the same properties at the reference temperatures,
optionally fits an alignment constant per column (a constant offset for
datum-dependent energies and entropies, a scale factor for Pr and vr), and
judges every cell against a per-column tolerance.

Pure computation: no printing, no file writing (the command does that), no
reportlab. The renderers in ``tablegen.book.qa_report`` receive the finished
:class:`Comparison`.

Rules, stated once (docs/compare.md repeats them for the user):

* deviation Δ = tablegen (after alignment) - reference, in the reference
  column's unit; relative deviation Δ/|reference| (undefined where the
  reference value is 0);
* a cell is within tolerance when |Δ| <= rel·|reference| + abs + q/2, where
  rel and abs are the column's tolerance and q is one unit in the last printed
  place of the reference cell (a printed table is known no better than its
  rounding);
* an offset is fitted by least squares, c = mean(reference - tablegen); a scale
  factor by least squares on logarithms, ln f = mean(ln reference - ln tablegen),
  so every row weighs the same whatever its magnitude (Pr spans decades).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from .compare_keys import KEY_LABELS, MEAN_KEYS, T_CHANGE_FROM, VOL_KEYS, VOLUME_REFERENCES
from .compare_reference import Reference
from .compare_tolerance import Tolerance, default_tolerance, wide_reason
from ..core.errors import DataError, FitError, InputError, NameLookupError, RangeError
from ..core.units import Unit
from ..core.constants import R_MOLAR


# ------------------------------------------------------------- comparing
@dataclass(frozen=True, slots=True)
class Alignment:
    """A fitted constant: tablegen + value (offset, SI) or tablegen × value (scale)."""

    key: str
    kind: str                     # "offset" or "scale"
    value: float                  # SI for an offset, dimensionless for a scale
    value_in_unit: float          # the offset in the reference column's unit (scale: = value)
    unit: str
    n: int
    rms_before: float             # RMS of Δ before / after alignment, column unit
    rms_after: float
    meaning: str


@dataclass(frozen=True, slots=True)
class ColumnResult:
    """One compared column: arrays over the reference rows (NaN where no value)."""

    key: str
    unit: Unit
    header: str
    tolerance: Tolerance
    reference: np.ndarray         # column unit
    tablegen_raw: np.ndarray      # column unit, before alignment
    tablegen: np.ndarray          # column unit, after alignment
    deviation: np.ndarray         # tablegen - reference, column unit
    relative: np.ndarray          # deviation / |reference| (NaN where reference is 0 or empty)
    bound: np.ndarray             # allowed |deviation|, column unit
    present: np.ndarray           # bool: the reference has a value
    within: np.ndarray            # bool: present and |deviation| <= bound
    text: tuple                   # reference cell text
    alignment: Alignment | None
    stats: dict

    @property
    def n_out(self) -> int:
        return int(np.sum(self.present & ~self.within))


@dataclass(frozen=True, slots=True)
class Comparison:
    """The finished comparison: everything the report, CSV and JSON show."""

    substance: dict               # id, name, kind, M, sources, datum, P_ref_Pa, anchor, T range
    reference: Reference
    T_K: np.ndarray
    extrapolated: np.ndarray      # bool per row
    columns: tuple                # ColumnResult
    version: str
    options: dict = field(default_factory=dict)
    wide: tuple = ()              # {column, tolerance, reason} of each tolerance accepted as wide
    hints: tuple = ()             # tablegen.calc.compare_hints.Hint, in column order

    @property
    def n_cells(self) -> int:
        return int(sum(int(np.sum(c.present)) for c in self.columns))

    @property
    def n_out(self) -> int:
        return sum(c.n_out for c in self.columns)

    @property
    def passed(self) -> bool:
        return self.n_out == 0

    @property
    def verdict(self) -> str:
        if self.passed:
            return f"PASS: all {self.n_cells} compared cells are within tolerance"
        return f"FAIL: {self.n_out} of {self.n_cells} compared cells are out of tolerance"

    def out_cells(self) -> list[dict]:
        """Every out-of-tolerance cell, in file order (row, then column)."""
        out = []
        ref = self.reference
        for i in range(self.T_K.size):
            for c in self.columns:
                if c.present[i] and not c.within[i]:
                    out.append({"line": ref.lines[i], "T_K": float(self.T_K[i]), "T": ref.T_text[i],
                                "column": c.key, "unit": c.unit.symbol, "reference": float(c.reference[i]),
                                "reference_text": c.text[i], "tablegen": float(c.tablegen[i]),
                                "deviation": float(c.deviation[i]), "bound": float(c.bound[i]),
                                "relative": _f(c.relative[i])})
        return out


def _f(x):
    x = float(x)
    return x if math.isfinite(x) else None


def substance_info(sub) -> dict:
    return {"id": sub.id, "name": sub.name, "kind": sub.kind, "M": sub.M,
            "sources": [list(s) for s in sub.sources], "h_datum": sub.datum.describe(),
            "P_ref_Pa": sub.P_ref_Pa,
            "anchor": {"T_K": sub.anchor.T_K, "Pr": sub.anchor.Pr, "vr": sub.anchor.vr},
            "T_min_K": sub.T_min, "T_max_K": sub.T_max}


def mean_cp_from_default(sub) -> float:
    """T_m of the mean heat capacities when none is given: the datum temperature of a
    sensible datum, else 298.15 K (the table book's rule)."""
    return sub.datum.T_ref_K if sub.datum.kind == "sensible" else 298.15


def mean_cp(sub, T, T_m: float, key: str) -> np.ndarray:
    """Mean heat capacity from T_m to T, SI (J/(kg K) or J/(mol K) for *_molar).

    cp_mean_h = [h(T) - h(T_m)]/(T - T_m), cp_mean_s = [s°(T) - s°(T_m)]/ln(T/T_m);
    both tend to cp(T_m) as T -> T_m, which is used within 1e-9 relative of T_m.
    """
    T = np.asarray(T, float)
    p = sub.properties(T, extrapolate=True)
    pm = sub.properties(np.array([T_m]), extrapolate=True)
    sfx = "_molar" if key.endswith(("_molar", "_vol")) else ""
    cp_m = pm["cp" + sfx][0]
    if key.startswith("cp_mean_h"):
        d = T - T_m
        num = p["h" + sfx] - pm["h" + sfx][0]
    else:
        d = np.log(T / T_m)
        num = p["s0" + sfx] - pm["s0" + sfx][0]
    near = np.abs(T - T_m) <= 1e-9 * T_m
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.where(near, cp_m, num / np.where(near, 1.0, d))


def compare(sub, ref: Reference, *, columns=None, tolerances=None, align=None,
            extrapolate: bool = False, T_mean_ref_K: float | None = None, volume_reference=None,
            version: str = "", options=None, allow_wide: bool = False, spec_table: bool = False) -> Comparison:
    """Compare a substance with a reference table.

    Parameters
    ----------
    sub : Substance with the datum, P° and anchor the reference uses
    ref : Reference from :func:`read_reference`
    columns : keys to compare (default: every property column of the reference)
    tolerances : key -> Tolerance (others take :func:`default_tolerance`)
    align : key -> "offset" | "scale"
    extrapolate : allow reference temperatures outside the data range (marked)
    T_mean_ref_K : T_m of the mean heat capacities (default :func:`mean_cp_from_default`)
    volume_reference : (T_K, P_Pa, text) of the volumetric basis (default: normal conditions)
    allow_wide : accept a tolerance wider than 20 % or than the column's range
        (:func:`tablegen.calc.compare_tolerance.wide_reason`); it is then listed in ``wide``
    spec_table : the substance is a spec table (hints then name spec settings, not options)

    Raises
    ------
    TablegenError naming the file and line of a temperature outside the data
    range, a column that is not in the reference, or a scale fit over
    non-positive values.
    """
    tolerances = dict(tolerances or {})
    align = dict(align or {})
    keys = _compared_keys(ref, columns, tolerances, align)
    T = _temperatures(sub, ref, extrapolate)
    options = dict(options or {})
    p, n_per_m3 = _evaluate(sub, T, keys, extrapolate, T_mean_ref_K, volume_reference, options)
    extrap = np.asarray(p.get("extrapolated", np.zeros(T.shape, bool)), bool)

    selected = [rc for rc in ref.columns if rc.key in keys]
    selected.sort(key=lambda rc: keys.index(rc.key))
    results = [_judge_column(rc, p, sub, ref, T, tolerances, align, n_per_m3) for rc in selected]
    if not any(np.any(r.present) for r in results):
        raise DataError(f"{ref.path}: the compared columns hold no values (every cell is a gap); "
                        f"there is nothing to judge")
    wide = _wide(results, allow_wide)
    from .. import __version__
    from .compare_hints import comparison_hints
    h298 = float(sub.properties(np.array([T_CHANGE_FROM]), extrapolate=True)["h"][0])
    context = {"M": sub.M, "n_per_m3": n_per_m3, "P_ref_Pa": sub.P_ref_Pa, "h298_J_per_kg": h298,
               "anchor": {"T_K": sub.anchor.T_K, "Pr": sub.anchor.Pr, "vr": sub.anchor.vr},
               "spec": bool(spec_table), "T_text": ref.T_text, "T_unit": ref.T_unit.symbol}
    return Comparison(substance_info(sub), ref, T, extrap, tuple(results),
                      version or __version__, options, wide, comparison_hints(results, context))


def _compared_keys(ref: Reference, columns, tolerances: dict, align: dict) -> list:
    """The keys to compare, checked against the reference's columns and the options."""
    keys = list(columns) if columns else list(ref.keys)
    for k in keys:
        if k not in ref.keys:
            raise NameLookupError(f"--columns: {k!r} is not a column of {ref.path}; "
                                  f"its columns: {', '.join(ref.keys)}")
        if k not in ref.comparable_keys:
            raise InputError(f"{ref.path}:{ref.header_line}: column {k!r} cannot be evaluated here; "
                             f"compare the other "
                             f"columns with --columns {','.join(ref.comparable_keys)}")
    if len(set(keys)) != len(keys):
        raise InputError("--columns: a column is named twice; name each once")
    for k in list(tolerances) + list(align):
        if k not in keys:
            raise InputError(f"column {k!r} has a tolerance or alignment but is not compared; "
                             f"compared columns: {', '.join(keys)}")
    return keys


def _temperatures(sub, ref: Reference, extrapolate: bool) -> np.ndarray:
    """The reference temperatures, K, refused outside the data range unless extrapolating."""
    # A converted temperature may miss a range end by rounding (-73.15 °C is
    # 199.99999999999997 K): within 1e-9 relative it counts as the end itself.
    T = ref.T_K.copy()
    for end in (sub.T_min, sub.T_max):
        T[np.abs(T - end) <= 1e-9 * end] = end
    if not extrapolate:
        out = (T < sub.T_min) | (T > sub.T_max)
        if np.any(out):
            i = int(np.argmax(out))
            inK = "" if ref.T_unit.symbol == "K" else f" ({T[i]:g} K)"
            more = int(np.sum(out)) - 1
            inK += f" (and {more} more row{'s' if more > 1 else ''})" if more else ""
            raise RangeError(f"{ref.path}:{ref.lines[i]}: T = {ref.T_text[i]} {ref.T_unit.symbol}{inK} "
                             f"is outside the data range {sub.T_min:g}-{sub.T_max:g} K "
                             f"of {sub.id}; allowed: {sub.T_min:g} to {sub.T_max:g} K, or --extrapolate "
                             f"(every extrapolated value is marked)")
    return T


def _evaluate(sub, T, keys, extrapolate, T_mean_ref_K, volume_reference, options: dict):
    """tablegen's properties at T, SI, with the mean and volumetric keys the comparison needs.

    Returns the property dict and the amount per m³ of the volumetric basis (1
    when no volumetric key is compared); ``options`` gains what was assumed.
    """
    p = dict(sub.properties(T, extrapolate=extrapolate))
    n_per_m3 = 1.0
    if any(k in VOL_KEYS for k in keys):
        vT, vP, vtext = volume_reference or VOLUME_REFERENCES["normal"]
        n_per_m3 = vP / (R_MOLAR * vT)
        options["volume_reference"] = {"T_K": vT, "P_Pa": vP, "text": vtext, "n_mol_per_m3": n_per_m3}
    if any(k in MEAN_KEYS for k in keys):
        T_m = float(T_mean_ref_K) if T_mean_ref_K is not None else mean_cp_from_default(sub)
        options["T_mean_ref_K"] = T_m
        for k in MEAN_KEYS:
            if k in keys:
                p[k] = mean_cp(sub, T, T_m, k) * (n_per_m3 if k.endswith("_vol") else 1.0)
    for k in VOL_KEYS:
        if k in keys and k not in MEAN_KEYS:
            p[k] = p[k[:-4] + "_molar"] * n_per_m3
    return p, n_per_m3


def _judge_column(rc, p, sub, ref: Reference, T, tolerances: dict, align: dict, n_per_m3: float) -> ColumnResult:
    """One reference column against tablegen: alignment, tolerance bound, verdict per cell."""
    key = rc.key
    u = rc.unit
    present = np.isfinite(rc.values_si)
    ref_si = rc.values_si
    calc_si = np.asarray(p[key], float)
    alignment = None
    aligned_si = calc_si
    if key in align:
        alignment, aligned_si = _fit(key, align[key], ref_si, calc_si, present, u, ref, sub, rc)
    tol = tolerances.get(key) or default_tolerance(key, sub.M, u, n_per_m3)
    change_si = 0.0
    if tol.rel_change:
        p0 = sub.properties(np.array([T_CHANGE_FROM]), extrapolate=True)
        at0 = (float(p0[key[:-4] + "_molar"][0]) * n_per_m3 if key.endswith("_vol")
               else float(np.asarray(p0[key])[0]))
        if alignment is not None:
            at0 = at0 + alignment.value if alignment.kind == "offset" else at0 * alignment.value
        change_si = aligned_si - at0
    dev_si = np.where(present, aligned_si - ref_si, np.nan)
    with np.errstate(divide="ignore", invalid="ignore"):
        rel = np.where(present & (ref_si != 0), dev_si / np.abs(ref_si), np.nan)
    quantum_si = np.where(present, rc.quantum * u.factor, np.nan)
    bound_si = np.where(present, tol.bound_si(ref_si, quantum_si, change_si), np.nan)
    within = present & (np.abs(np.nan_to_num(dev_si, nan=np.inf)) <= np.nan_to_num(bound_si, nan=-1))
    ref_u, raw_u, cal_u = (u.from_si(x) for x in (ref_si, calc_si, aligned_si))
    dev_u = dev_si / u.factor
    bound_u = bound_si / u.factor
    return ColumnResult(
        key=key, unit=u, header=rc.header, tolerance=tol,
        reference=np.where(present, ref_u, np.nan), tablegen_raw=raw_u, tablegen=cal_u,
        deviation=dev_u, relative=rel, bound=bound_u, present=present, within=within,
        text=rc.text, alignment=alignment,
        stats=_stats(dev_u, rel, bound_u, present, within, T, ref))


def _wide(results, allow: bool) -> tuple:
    """Tolerances too wide to judge with (refused unless allowed; listed when allowed)."""
    out = []
    for r in results:
        why = wide_reason(r.tolerance, r.reference[r.present] * r.unit.factor, r.unit)
        if why is None:
            continue
        if not allow:
            raise RangeError(f"--tolerance {r.key}={r.tolerance.text}: {why}, so it cannot tell a right "
                             f"table from a wrong one; give a tighter tolerance, or pass --allow-wide "
                             f"(the report then states it on page 1)")
        out.append({"column": r.key, "tolerance": r.tolerance.text, "reason": why})
    return tuple(out)


def _fit(key, kind, ref_si, calc_si, present, u, ref, sub, rc):
    n = int(np.sum(present))
    if n == 0:
        raise FitError(f"--align {key}={kind}: column {key!r} of {ref.path} has no values to fit")
    r, c = ref_si[present], calc_si[present]
    rms_before = float(np.sqrt(np.mean((c - r) ** 2))) / u.factor
    if kind == "offset":
        value = float(np.mean(r - c))
        aligned = calc_si + value
        vu = value / u.factor
        from .compare_hints import format_constant
        why = ("another zero of the entropy scale or another reference pressure P° shifts"
               if key.startswith("s0") else "another enthalpy datum shifts")
        meaning = (f"{KEY_LABELS[key]}, aligned by offset {format_constant(vu, None, 9)} {u.symbol} "
                   f"(least squares over {n} rows): {why} {KEY_LABELS[key]} by a constant")
    else:
        if np.any(r <= 0):
            i = int(np.flatnonzero(present)[np.argmax(r <= 0)])
            raise FitError(f"{ref.path}:{ref.lines[i]}: {key} value {rc.text[i]} is not "
                           f"positive; a scale fit needs positive {key} values")
        value = float(np.exp(np.mean(np.log(r) - np.log(c))))
        aligned = calc_si * value
        vu = value
        a = sub.anchor
        scaled = a.Pr * value if key == "Pr" else a.vr * value
        meaning = (f"{key}, aligned by scale factor {value:.9g} (least squares on ln {key} over {n} rows): "
                   f"the same as the anchor {key} = {scaled:.9g} at {a.T_K:g} K")
    rms_after = float(np.sqrt(np.mean((aligned[present] - r) ** 2))) / u.factor
    return Alignment(key, kind, value, vu, u.symbol if kind == "offset" else "-", n,
                     rms_before, rms_after, meaning), aligned


def _stats(dev, rel, bound, present, within, T, ref) -> dict:
    n = int(np.sum(present))
    if n == 0:
        return {"n": 0, "n_out": 0}
    d = dev[present]
    idx = np.flatnonzero(present)
    i = int(idx[np.argmax(np.abs(d))])
    out = {"n": n, "n_out": int(np.sum(present & ~within)),
           "max_abs": float(np.abs(dev[i])), "max_signed": float(dev[i]),
           "max_at_T_K": float(T[i]), "max_at_T": ref.T_text[i], "max_at_line": ref.lines[i],
           "mean": float(np.mean(d)), "mean_abs": float(np.mean(np.abs(d))),
           "rms": float(np.sqrt(np.mean(d ** 2)))}
    r = rel[present]
    ok = np.isfinite(r)
    if np.any(ok):
        j = int(idx[ok][np.argmax(np.abs(r[ok]))])
        out.update(max_rel=float(abs(rel[j])), max_rel_at_T_K=float(T[j]), max_rel_at_line=ref.lines[j],
                   rms_rel=float(np.sqrt(np.mean(r[ok] ** 2))))
    with np.errstate(divide="ignore", invalid="ignore"):
        use = np.abs(d) / bound[present]
    use = np.where(np.isfinite(use), use, np.where(np.abs(d) > 0, np.inf, 0.0))
    out["max_use_of_tolerance"] = float(np.max(use))
    return out
