"""The data component of the stated uncertainty: what the evidence says about a source.

For one species record (a data set's function of T) this module gives the
standard uncertainties of cp, of H(T) - H(298.15 K) and of S(T) - S(298.15 K),
and of S°(298.15 K) and the enthalpy of formation, from the best independent
evidence there is (docs/uncertainty.md, "1. Data"):

evaluation    the spread of the printed evaluation against independent
              evaluations of comparable quality (EVALUATION_TIER): for a
              NIST-JANAF refit the NASA 2002 air set and the ideal-gas parts of
              the reference equations of state (IAPWS-95 for water), never a
              set known to be less accurate while a comparable one covers the
              temperature; only where none does, the spread against the less
              accurate set, stated as an upper estimate; where no source
              compares at all, a default for the species' class ("estimated").
fit residual  for a refit, its stated residual against the table it was
              fitted to (its own component of the budget).
key values    CODATA key values (Cox, Wagman & Medvedev 1989) for S°(298.15 K)
              and the enthalpy of formation.

Every spread figure comes from gasdata/agreement.toml, gasdata/agreement-janaf.toml
or the shipped data sets compared with each other; ``held_out`` rebuilds the
figures without one reference, for the calibration (benchmarks/calibrate_uncertainty.py).
"""

from __future__ import annotations

import math
import re
import tomllib
from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from . import agreement_compiled
from .agreement import evaluation_of, tier_of
from ..core.errors import DataError, NameLookupError
from ..core.constants import R_MOLAR, T_REF

#: Temperature band edges (K) of reported figures and of computed spreads.
BAND_EDGES_K = (200.0, 300.0, 600.0, 1000.0, 1500.0, 2000.0, 3000.0, 6000.0, 20000.0)

#: Relative floor of every cp, dh and ds uncertainty, combined in quadrature: the
#: NASA reports state the gas constants their fits used, R = 8.31451 J/(mol K)
#: (TM-4513, 1993) and 8.314472 (TP-2002-211556), against 8.31446261815324 exact
#: since the 2019 SI, a difference of up to 5.7e-6 that no source spread can undercut.
CP_FLOOR_REL = 1.0e-5

SQRT3 = math.sqrt(3.0)

#: A band's figure holds up to half the comparison grid's step (tablegen.calc.agreement.STEP_K)
#: beyond the band's ends, so that 273.15 K is covered by a comparison that starts at
#: water's triple point, 273.16 K.
BAND_REACH_K = 5.0

#: Quality tier from which the class defaults are also a floor under a spread
#: (tablegen.calc.agreement.EVALUATION_TIER: 2 is the tier of NASA TM-4513, the set the
#: defaults were measured on, and of user data sets).
CLASS_FLOOR_TIER = 2

# ---------------------------------------------------------------- class defaults
#: Species classes with default standard uncertainties ("estimated"), used where
#: no published value and no source spread exist: relative standard
#: uncertainties of cp, of H(T)-H(298.15) and of S(T)-S(298.15) in three bins
#: (<= 1000 K, 1000-3000 K, > 3000 K); S298 in J/(mol K) and dfH in J/mol.
#: Derived by tools/class_defaults.py: the NASA TM-4513 functions against the
#: JANAF tables, 4th ed. (Chase 1998), per class the mean over its species of
#: the largest difference in each bin, divided by sqrt(3), rounded up to two
#: significant digits and made non-decreasing with temperature (table in
#: docs/uncertainty.md; the choice of the mean is discussed there).  Where JANAF agrees to its printed digits (noble
#: gases, cp = 5/2 R; atoms below 1000 K), the gas-constant floor is used.  S298 and dfH defaults are
#: judgement (common practice for tabulated gases without a key value).
CLASS_DEFAULTS = {
    "noble gas": {"cp_rel": (5e-6, 5e-6, 5e-6), "dh_rel": (5e-6, 5e-6, 5e-6),
        "ds_rel": (5e-6, 5e-6, 5e-6), "S298": 0.005, "dfH": 0.0},
    "monatomic": {"cp_rel": (0.00018, 0.00046, 0.00046), "dh_rel": (8.8e-5, 0.00015, 0.00015),
        "ds_rel": (8.4e-5, 9.7e-5, 9.7e-5), "S298": 0.01, "dfH": 1000.0},
    "diatomic": {"cp_rel": (0.00063, 0.0017, 0.002), "dh_rel": (0.00039, 0.00058, 0.00058),
        "ds_rel": (0.00038, 0.00038, 0.00038), "S298": 0.05, "dfH": 1000.0},
    "diatomic radical": {"cp_rel": (0.003, 0.0058, 0.014), "dh_rel": (0.00097, 0.0027, 0.0044),
        "ds_rel": (0.0008, 0.0008, 0.0017), "S298": 0.1, "dfH": 2000.0},
    "small polyatomic": {"cp_rel": (0.0012, 0.0051, 0.013), "dh_rel": (0.00057, 0.0024, 0.0044),
        "ds_rel": (0.00052, 0.0016, 0.0023), "S298": 0.2, "dfH": 1000.0},
    "polyatomic radical": {"cp_rel": (0.0042, 0.014, 0.037), "dh_rel": (0.0033, 0.006, 0.016),
        "ds_rel": (0.0032, 0.0044, 0.0086), "S298": 0.5, "dfH": 4000.0},
    "hydrocarbon or larger": {"cp_rel": (0.0075, 0.023, 0.045), "dh_rel": (0.0043, 0.013, 0.025),
        "ds_rel": (0.0037, 0.0092, 0.016), "S298": 1.0, "dfH": 2000.0},
}
_CLASS_T = (1000.0, 3000.0)
NOBLE = frozenset({"He", "Ne", "Ar", "Kr", "Xe", "Rn"})


#: Atomic numbers of the elements that the shipped gases hold (for the
#: open-shell test: an odd number of electrons makes a radical).
ATOMIC_NUMBER = {"H": 1, "D": 1, "He": 2, "Li": 3, "B": 5, "C": 6, "N": 7, "O": 8, "F": 9, "Ne": 10,
                 "Na": 11, "Mg": 12, "Al": 13, "Si": 14, "P": 15, "S": 16, "Cl": 17, "Ar": 18,
                 "K": 19, "Ca": 20, "Br": 35, "Kr": 36, "I": 53, "Xe": 54}


def species_class(elements: dict, species_id: str = "") -> str:
    """Class of a species from its elements (for the default uncertainties).

    noble gas; monatomic; diatomic; diatomic radical (odd number of
    electrons); polyatomic radical (3-5 atoms, odd number of electrons);
    hydrocarbon or larger (closed-shell CxHy of 4 or 5 atoms, or any species of
    6 atoms or more); small polyatomic (the other species of 3-5 atoms).  The charge of an ion is read from a trailing + or - of its id.
    """
    atoms = {k: v for k, v in elements.items() if k not in ("E", "e", "e-")}
    n = sum(atoms.values())
    if n == 0:
        return "noble gas"        # the free electron: cp = 5/2 R exactly
    if n == 1:
        return "noble gas" if next(iter(atoms)) in NOBLE else "monatomic"
    if n >= 6:
        return "hydrocarbon or larger"
    charge = species_id.count("+") - species_id.count("-") if species_id.endswith(("+", "-")) else 0
    electrons = sum(ATOMIC_NUMBER.get(el, 0) * k for el, k in atoms.items()) - charge
    radical = all(el in ATOMIC_NUMBER for el in atoms) and electrons % 2 == 1
    if n == 2:
        return "diatomic radical" if radical else "diatomic"
    if not radical and set(atoms) == {"C", "H"} and n >= 4:
        return "hydrocarbon or larger"
    return "polyatomic radical" if radical else "small polyatomic"


def _class_rel(cls: str, what: str, T: np.ndarray) -> np.ndarray:
    a, b, c = CLASS_DEFAULTS[cls][what]
    return np.where(T <= _CLASS_T[0], a, np.where(T <= _CLASS_T[1], b, c))


# ---------------------------------------------------------------- data files
def gasdata_file(name: str):
    from ..data.library import gasdata_dir
    p = gasdata_dir() / name
    return p if p.is_file() else None


@lru_cache(maxsize=1)
def codata_values() -> dict:
    """CODATA key values (Cox, Wagman & Medvedev 1989) from gasdata/codata1989.toml.

    Returns species id -> dict(dfH_J_per_mol, U_dfH, S298, U_S298) with the
    expanded uncertainties as stated (k = 2), SI.
    """
    p = gasdata_file("codata1989.toml")
    if p is None:
        return {}
    raw = tomllib.loads(p.read_text(encoding="utf-8"))
    out = {}
    for v in raw.get("value", []):
        out[v["species"]] = {
            "dfH": float(v["dfH_kJ_per_mol"]) * 1e3, "U_dfH": float(v["U_dfH_kJ_per_mol"]) * 1e3,
            "S298": float(v["S298_J_per_mol_K"]), "U_S298": float(v["U_S298_J_per_mol_K"]),
        }
    return out


AGREEMENT_KEYS = ("species", "source", "against", "band_K", "n_points", "cp_max_rel", "cp_rms_rel",
                  "dh_max_J_per_mol", "dh_rms_J_per_mol", "s0_max_J_per_molK", "s0_rms_J_per_molK")


#: Shipped agreement files, read together: the data-curation figures and the
#: JANAF comparison written by tools/janaf_agreement.py.
AGREEMENT_FILES = ("agreement.toml", "agreement-janaf.toml")


@lru_cache(maxsize=None)
def _read_agreement(path: str) -> tuple:
    from pathlib import Path
    p = Path(path)
    try:
        raw = tomllib.loads(p.read_text(encoding="utf-8"))
    except (OSError, UnicodeDecodeError, tomllib.TOMLDecodeError) as e:
        raise DataError(f"{p}: cannot read agreement figures ({e})") from None
    return tuple(_checked(raw.get("agreement", []), p))


def _checked(tables, p) -> list:
    rows = []
    for i, r in enumerate(tables):
        missing = [k for k in ("species", "source", "against", "band_K", "cp_max_rel",
                               "dh_max_J_per_mol", "s0_max_J_per_molK") if k not in r]
        if missing:
            raise DataError(f"{p}: agreement[{i}] lacks {', '.join(missing)}; "
                                f"allowed keys: {', '.join(AGREEMENT_KEYS)}")
        rows.append(dict(r))
    return rows


def load_agreement(path=None) -> tuple:
    """Agreement rows ([[agreement]] tables, format of gasdata/agreement.toml).

    With no path: every shipped agreement file (AGREEMENT_FILES) plus the
    spread of the shipped data sets against each other (:func:`shipped_spread`).
    """
    if path is not None:
        return _read_agreement(str(path))
    rows = list(shipped_spread())
    for name in AGREEMENT_FILES:
        p = gasdata_file(name)
        if p is not None:
            rows += _read_agreement(str(p))
    return tuple(rows)


_BLOCK = re.compile(r'^\[\[agreement\]\][ \t]*$', re.M)
_SPECIES = re.compile(r'^species\s*=\s*"([^"\\]*)"\s*$', re.M)


@lru_cache(maxsize=None)
def _blocks_by_species(path: str) -> dict:
    """{species: [text of its [[agreement]] tables]} of an agreement file, found by a
    pattern (one pass, no TOML parse); None where a table names no plain species."""
    from pathlib import Path
    p = Path(path)
    try:
        text = p.read_text(encoding="utf-8")
    except (OSError, UnicodeDecodeError) as e:
        raise DataError(f"{p}: cannot read agreement figures ({e})") from None
    starts = [m.start() for m in _BLOCK.finditer(text)]
    out: dict = {}
    for a, b in zip(starts, [*starts[1:], len(text)]):
        block = text[a:b]
        m = _SPECIES.search(block)
        out.setdefault(m.group(1) if m else None, []).append(block)
    return out


@lru_cache(maxsize=None)
def _rows_of(path: str, species: str) -> tuple:
    """The agreement rows of one species in one file: one TOML parse of its tables only."""
    blocks = _blocks_by_species(path).get(species)
    if not blocks:
        return ()
    try:
        raw = tomllib.loads("".join(blocks))
    except tomllib.TOMLDecodeError as e:
        raise DataError(f"{path}: cannot read the agreement figures of {species} ({e})") from None
    return tuple(_checked(raw.get("agreement", []), path))


@lru_cache(maxsize=None)
def _spread_of(species: str) -> tuple:
    """shipped_spread() of one species (computed for it alone)."""
    from ..data.library import library
    lib = library()
    a, b = lib.datasets.get("nasa1993"), lib.datasets.get("nasa2002-air")
    if a is None or b is None or species not in b.exact:
        return ()
    return tuple(_spread_pair(a, b, species))


class AgreementIndex(dict):
    """The shipped agreement rows as a mapping species -> rows, read on first use of each
    species: a book reads the figures of its dozen species, not the 2,900 rows of every
    file (a whole parse cost more than the rest of a 100-page book). Rows as
    :func:`load_agreement` gives them; ``by_species(load_agreement())`` is the same map."""

    def __missing__(self, species):
        rows = list(_spread_of(species))
        compiled = _compiled()
        if compiled is not None:
            rows += agreement_compiled.rows_of(compiled, species)
            self[species] = rows
            return rows
        for name in AGREEMENT_FILES:
            p = gasdata_file(name)
            if p is not None:
                if None in _blocks_by_species(str(p)):
                    # a table without a plain species line: read the file as a whole
                    rows += [r for r in _read_agreement(str(p)) if r["species"] == species]
                else:
                    rows += _rows_of(str(p), species)
        self[species] = rows
        return rows

    def get(self, species, default=None):
        rows = self[species]
        return rows if rows else default


def _compiled():
    """gasdata/agreement-compiled.json when it was compiled from the agreement files there now."""
    from ..data.library import gasdata_dir
    return agreement_compiled.load(str(gasdata_dir()), AGREEMENT_FILES)


@lru_cache(maxsize=1)
def agreement_index() -> AgreementIndex:
    """The shipped agreement figures by species, read lazily (see :class:`AgreementIndex`)."""
    return AgreementIndex()


def by_species(rows) -> dict:
    out: dict = {}
    for r in rows:
        out.setdefault(r["species"], []).append(r)
    return out


def spread_figures(species: str, source: str, against: str, f_source, f_against, T_lo: float,
                   T_hi: float, *, edges=BAND_EDGES_K, n_per_band: int = 41) -> list:
    """Agreement figures (gasdata/agreement.toml format) of two sources of one species.

    Parameters
    ----------
    f_source, f_against : callables T_K array -> (cp J/(mol K), H(T)-H(298.15) J/mol,
        S(T)-S(298.15) J/(mol K)), the functions compared
    T_lo, T_hi : common range, K; bands are BAND_EDGES_K cut to it

    Returns
    -------
    list of dicts, one per band with at least two points.
    """
    rows = []
    cuts = sorted({T_lo, T_hi, *(e for e in edges if T_lo < e < T_hi)})
    for lo, hi in zip(cuts[:-1], cuts[1:]):
        T = np.linspace(lo, hi, n_per_band)
        a, b = f_source(T), f_against(T)
        dcp = (a[0] - b[0]) / b[0]
        dh = a[1] - b[1]
        ds = a[2] - b[2]
        rows.append({
            "species": species, "source": source, "against": against, "band_K": [float(lo), float(hi)],
            "n_points": int(T.size),
            "cp_max_rel": float(np.max(np.abs(dcp))), "cp_rms_rel": float(np.sqrt(np.mean(dcp ** 2))),
            "dh_max_J_per_mol": float(np.max(np.abs(dh))), "dh_rms_J_per_mol": float(np.sqrt(np.mean(dh ** 2))),
            "s0_max_J_per_molK": float(np.max(np.abs(ds))), "s0_rms_J_per_molK": float(np.sqrt(np.mean(ds ** 2))),
        })
    return rows


def record_functions(rec):
    """(cp, H-H298, S-S298) molar functions of a library record, for :func:`spread_figures`."""
    ref = rec.poly.evaluate(np.array([T_REF]), want=("h", "s"))
    h0, s0 = float(ref["h"][0]), float(ref["s"][0])

    def f(T):
        e = rec.poly.evaluate(np.asarray(T, float))
        return e["cp"] * R_MOLAR, (e["h"] - h0) * R_MOLAR, (e["s"] - s0) * R_MOLAR
    return f


@lru_cache(maxsize=1)
def shipped_spread() -> tuple:
    """Spread of every species shipped in two data sets (nasa1993 against nasa2002-air).

    The stand-in for gasdata/agreement.toml until that file is shipped; only
    shipped data, no optional package, so it works wherever tablegen runs.
    """
    from ..data.library import library
    lib = library()
    rows = []
    a, b = lib.datasets.get("nasa1993"), lib.datasets.get("nasa2002-air")
    if a is None or b is None:
        return ()
    for sid in b.ids:
        rows += _spread_pair(a, b, sid)
    return tuple(rows)


def _spread_pair(a, b, sid) -> list:
    """The two spread rows (each set against the other) of one species in two data sets."""
    ra, rb = a.get(sid), b.get(sid)
    if ra is None or rb is None or ra.id != rb.id:
        return []
    lo, hi = max(ra.T_min, rb.T_min), min(ra.T_max, rb.T_max)
    if not lo < T_REF < hi:
        return []
    fa, fb = record_functions(ra), record_functions(rb)
    return (spread_figures(sid, "nasa1993", "nasa2002-air", fa, fb, lo, hi)
            + spread_figures(sid, "nasa2002-air", "nasa1993", fb, fa, lo, hi))


# ------------------------------------------------------------- species data part
@dataclass(frozen=True, slots=True)
class SpeciesData:
    """Standard uncertainties (molar, SI) of one species' source functions at T.

    cp, dh, ds: the evaluation (spread against other evaluations, class default,
    gas-constant floor); fit_cp, fit_dh, fit_ds: the refit's residual against its
    own table (zero for a set published as coefficients).
    """

    id: str
    dataset: str
    cls: str
    cp: np.ndarray            # J/(mol K)
    dh: np.ndarray            # of H(T) - H(298.15), J/mol
    ds: np.ndarray            # of S(T) - S(298.15), J/(mol K)
    S298: float               # J/(mol K)
    dfH: float                # J/mol
    estimated: np.ndarray     # bool: a class default was used for cp/dh/ds at T
    S298_basis: str
    dfH_basis: str
    T_basis: tuple            # texts naming what gave the figures across T
    fit_cp: np.ndarray = None
    fit_dh: np.ndarray = None
    fit_ds: np.ndarray = None
    upper: np.ndarray = None  # bool: only a less accurate evaluation compares at T


def record_for(comp_id: str, dataset: str):
    """The loaded library record of species ``comp_id`` in data set ``dataset``."""
    from ..data import library as L
    for lib in [*L._LIB.values(), L.library()]:
        ds = lib.datasets.get(dataset)
        if ds is not None:
            r = ds.get(comp_id)
            if r is not None:
                return r
    raise NameLookupError(f"uncertainty: record {comp_id!r} of data set {dataset!r} is not loaded")


def _uses_held_out(row: dict, printed: str, held_out: str | None) -> bool:
    """Does an agreement row rest on the values of the held-out evaluation?

    A row is left out when one of its two sources belongs to the held-out
    evaluation, unless that source is the printed data set itself (a refit's
    comparisons with others describe the printed functions, not the table it
    was fitted to).
    """
    if held_out is None:
        return False
    return any(evaluation_of(p) == held_out and p != printed for p in (row["source"], row["against"]))


def _spreads(rec, T, cp, rows, held_out):
    """Per partner evaluation: the most local band figure at each T (u of cp, dh, ds)."""
    own = evaluation_of(rec.dataset)
    per: dict = {}
    for r in rows:
        fs, fa = evaluation_of(r["source"]), evaluation_of(r["against"])
        if own not in (fs, fa) or fs == fa or _uses_held_out(r, rec.dataset, held_out):
            continue                # not about the printed evaluation, or a refit against its table
        other = r["against"] if fs == own else r["source"]
        if other in r.get("beyond_range_of", ()):
            continue                # a partner beyond its equation's range is no evidence
        lo, hi = r["band_K"]
        m = (T >= lo - BAND_REACH_K) & (T <= hi + BAND_REACH_K)
        if not np.any(m):
            continue
        w, c, h_, s_ = per.setdefault(evaluation_of(other), [np.full(T.shape, np.inf)] +
                                      [np.full(T.shape, np.nan) for _ in range(3)])
        take = m & (hi - lo < w)
        w[take] = hi - lo
        # The largest difference in a band is taken as the half-width of a
        # rectangular distribution of the printed source's error.
        c[take] = r["cp_max_rel"] / SQRT3 * cp[take]
        h_[take] = r["dh_max_J_per_mol"] / SQRT3
        s_[take] = r["s0_max_J_per_molK"] / SQRT3
    return per


def species_data(rec, T: np.ndarray, agreement, *, held_out: str | None = None) -> SpeciesData:
    """Data-component standard uncertainties of one species record at T (K).

    Parameters
    ----------
    rec : library record (tablegen.data.records.Record)
    T : temperatures, K
    agreement : agreement rows (a list, or a mapping species id -> rows)
    held_out : an evaluation (tablegen.calc.agreement.EVALUATION_OF values, e.g.
        "janaf", "eos") whose values are left out of the evidence, for a
        calibration against it; the fit residual of a refit of it too

    Rule, per temperature: among the partner evaluations that compare there,
    those of the best quality tier give the figure (the largest of them); a
    partner of a tier below the printed evaluation's is used only where no
    other compares (``upper`` marks those temperatures); no partner at all:
    the class default (``estimated``).
    """
    T = np.asarray(T, float)
    cls = species_class(rec.elements, rec.id)
    e = rec.poly.evaluate(np.concatenate([[T_REF], T]))
    cp = e["cp"][1:] * R_MOLAR
    dh = (e["h"][1:] - e["h"][0]) * R_MOLAR
    ds = (e["s"][1:] - e["s"][0]) * R_MOLAR
    h298, s298 = e["h"][0] * R_MOLAR, e["s"][0] * R_MOLAR
    Tc = np.maximum(T, T_REF)
    mine = agreement.get(rec.id, ()) if isinstance(agreement, dict) else \
        [r for r in agreement if r["species"] == rec.id]
    per = _spreads(rec, T, cp, mine, held_out)
    own_tier = tier_of(evaluation_of(rec.dataset))
    u = [np.full(T.shape, np.nan) for _ in range(3)]
    tier_used = np.full(T.shape, 0)
    basis = set()
    for tier in sorted({tier_of(f) for f in per}):
        fams = [f for f in per if tier_of(f) == tier]
        open_ = np.isnan(u[0])
        for f in fams:
            w, c, h_, s_ = per[f]
            got = open_ & ~np.isnan(c)
            if np.any(got):
                basis.add(f"spread against {f}" + (" (a less accurate evaluation: upper estimate)"
                                                   if tier > own_tier else ""))
            for k, v in enumerate((c, h_, s_)):
                u[k] = np.where(open_, np.fmax(u[k], v), u[k])
        tier_used = np.where(open_ & ~np.isnan(u[0]), tier, tier_used)
    u_cp, u_dh, u_ds = u
    est = np.isnan(u_cp)
    if np.any(est):
        basis.add(f"class default ({cls}), estimated")
    c_cp = _class_rel(cls, "cp_rel", Tc) * cp
    c_dh = _class_rel(cls, "dh_rel", Tc) * np.abs(dh)
    c_ds = _class_rel(cls, "ds_rel", Tc) * np.abs(ds)
    if own_tier >= CLASS_FLOOR_TIER:
        # The class defaults are the measured departure of TM-4513 functions from
        # NIST-JANAF (tools/class_defaults.py): for a set of that quality they are
        # also a floor, since such a set and its closest partner often share their
        # underlying data and agree better than either is right. They say nothing
        # of a tier-1 evaluation, which gets no floor but the gas constant's.
        u_cp, u_dh, u_ds = np.fmax(u_cp, c_cp), np.fmax(u_dh, c_dh), np.fmax(u_ds, c_ds)
    u_cp = np.where(est, c_cp, u_cp)
    u_dh = np.where(np.isnan(u_dh), c_dh, u_dh)
    u_ds = np.where(np.isnan(u_ds), c_ds, u_ds)
    u_cp = np.hypot(u_cp, CP_FLOOR_REL * cp)
    u_dh = np.hypot(u_dh, CP_FLOOR_REL * np.abs(dh))
    u_ds = np.hypot(u_ds, CP_FLOOR_REL * np.abs(ds))
    fit = fit_residual(rec, cp, held_out)
    if fit is not None:
        basis.add("fit residual of the refit")
    else:
        fit = (np.zeros_like(T),) * 3
    cd = codata_values().get(rec.id)
    d = CLASS_DEFAULTS[cls]
    if cd is not None:
        # CODATA value with its stated U (k = 2), widened by the difference of
        # the printed source from it, taken as a rectangular half-width.
        uS = math.hypot(cd["U_S298"] / 2, (s298 - cd["S298"]) / SQRT3)
        uH = math.hypot(cd["U_dfH"] / 2, (h298 - cd["dfH"]) / SQRT3)
        Sb = Hb = "CODATA key value (Cox, Wagman & Medvedev 1989)"
    else:
        # a reference element (N2, Cl2, ...): its fit gives 0 within 1 J/mol
        element_ref = len(rec.elements) == 1 and abs(h298) < 1.0 and cls != "monatomic"
        uS, uH = d["S298"], 0.0 if element_ref else d["dfH"]
        Sb = f"class default ({cls}), estimated"
        Hb = "zero by definition (reference element)" if element_ref else Sb
    return SpeciesData(rec.id, rec.dataset, cls, u_cp, u_dh, u_ds, float(uS), float(uH), est,
                       Sb, Hb, tuple(sorted(basis)), *fit, upper=tier_used > own_tier)


def fit_residual(rec, cp: np.ndarray, held_out: str | None = None):
    """(u_cp, u_dh, u_ds) of a refit's stated residual against its table, or None.

    The record's ``fit_residuals`` (worst differences at the table's points,
    rounded up) are taken as half-widths of rectangular distributions over the
    whole fitted range. Left out when the table fitted is the held-out reference.
    """
    fr = rec.extra.get("fit_residuals") if isinstance(rec.extra, dict) else None
    if not fr or (held_out is not None and evaluation_of(rec.dataset) == held_out):
        return None
    one = np.ones_like(cp)
    return (float(fr["cp_max_rel"]) / SQRT3 * cp, float(fr["h_max_J_per_mol"]) / SQRT3 * one,
            float(fr["s0_max_J_per_molK"]) / SQRT3 * one)
