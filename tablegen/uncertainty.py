"""Stated uncertainty of every printed column: the budget and its parts.

A budget holds, per property key and temperature, standard uncertainties of
independent components, and combines them into an expanded uncertainty
U = k·sqrt(Σ u²) with coverage factor k = 2 (JCGM 100:2008, the GUM, §6):

data          the source functions themselves: CODATA key values for S°(298.15 K)
              and the enthalpy of formation (gasdata/codata1989.toml); across
              temperature, the spread between independent sources
              (gasdata/agreement.toml, gasdata/agreement-janaf.toml and the
              shipped data sets against each other); otherwise a default for
              the species' class, marked "estimated".
composition   user-given uncertainties of mole or mass fractions, propagated by
              linear sensitivity (central differences on the collapsed mixture,
              the other fractions renormalised).
rounding      half a unit of the last printed digit, as a rectangular
              distribution (u = step / (2 sqrt 3)).
ideal-gas     departure of the real gas from the ideal-gas values at the
              stated maximum pressure, from the second virial coefficient
              (Tsonopoulos 1974), as a rectangular half-width (u = |δ|/sqrt 3).
interpolation the largest error of linear interpolation between printed rows;
              reported beside U, not inside it (a printed row carries none).

Correlation assumptions (stated in every budget): within one species the
errors of one source are fully correlated across temperature (a band figure is
applied whole); between species they are independent, so a mixture's standard
uncertainty is sqrt(Σ (y_i u_i)²); components are independent of each other;
h and s of one species are treated as independent where both enter (g°).

The molar-mass uncertainty (IUPAC standard atomic weights, below 1e-5
relative for the gases shipped) and that of R (exact since 2019) are neglected.
"""

from __future__ import annotations

import math
import tomllib
from dataclasses import dataclass, field
from functools import lru_cache

import numpy as np

from .errors import SpecError, TablegenError
from .thermo.substance import P_STD, R_MOLAR, T_REF

#: Coverage factor of every stated expanded uncertainty (about 95 % for a
#: normal distribution; JCGM 100:2008 §6.2).
COVERAGE = 2.0

#: Temperature band edges (K) of reported figures and of computed spreads.
BAND_EDGES_K = (200.0, 300.0, 600.0, 1000.0, 1500.0, 2000.0, 3000.0, 6000.0, 20000.0)

#: Relative floor of every cp, dh and ds uncertainty: the NASA fits used R = 8.31451
#: J/(mol K) (1993) or 8.314472 (2002) against 8.31446261815324 today, a
#: disagreement of up to 5.7e-6 that no source spread can undercut.
CP_FLOOR_REL = 1.0e-5

SQRT3 = math.sqrt(3.0)

#: Sources that are one tabulation: the janaf1998 refits stand for the JANAF
#: tables, so their figures and the direct JANAF comparison count as one partner.
SOURCE_FAMILY = {"janaf1998": "janaf"}

#: Fraction of the class default kept as a floor under a source spread.
SHARED_FLOOR = 1.0

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
    "monatomic": {"cp_rel": (1.8e-4, 4.6e-4, 4.6e-4), "dh_rel": (8.8e-5, 1.5e-4, 1.5e-4),
                  "ds_rel": (8.4e-5, 9.7e-5, 9.7e-5), "S298": 0.01, "dfH": 1000.0},
    "diatomic": {"cp_rel": (6.3e-4, 1.6e-3, 2.0e-3), "dh_rel": (3.9e-4, 5.8e-4, 5.8e-4),
                 "ds_rel": (3.8e-4, 3.8e-4, 3.8e-4), "S298": 0.05, "dfH": 1000.0},
    "diatomic radical": {"cp_rel": (3.0e-3, 5.8e-3, 1.4e-2), "dh_rel": (9.7e-4, 2.7e-3, 4.3e-3),
                         "ds_rel": (8.0e-4, 8.0e-4, 1.6e-3), "S298": 0.1, "dfH": 2000.0},
    "small polyatomic": {"cp_rel": (1.2e-3, 5.1e-3, 1.3e-2), "dh_rel": (5.7e-4, 2.4e-3, 4.4e-3),
                         "ds_rel": (5.1e-4, 1.6e-3, 2.3e-3), "S298": 0.2, "dfH": 1000.0},
    "polyatomic radical": {"cp_rel": (4.2e-3, 1.4e-2, 3.6e-2), "dh_rel": (3.3e-3, 6.0e-3, 1.6e-2),
                           "ds_rel": (3.1e-3, 4.4e-3, 8.6e-3), "S298": 0.5, "dfH": 4000.0},
    "hydrocarbon or larger": {"cp_rel": (7.5e-3, 2.3e-2, 4.5e-2), "dh_rel": (4.3e-3, 1.3e-2, 2.5e-2),
                              "ds_rel": (3.7e-3, 9.1e-3, 1.6e-2), "S298": 1.0, "dfH": 2000.0},
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
def _gasdata(name: str):
    from .data.library import gasdata_dir
    p = gasdata_dir() / name
    return p if p.is_file() else None


@lru_cache(maxsize=1)
def codata_values() -> dict:
    """CODATA key values (Cox, Wagman & Medvedev 1989) from gasdata/codata1989.toml.

    Returns species id -> dict(dfH_J_per_mol, U_dfH, S298, U_S298) with the
    expanded uncertainties as stated (k = 2), SI.
    """
    p = _gasdata("codata1989.toml")
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


@lru_cache(maxsize=1)
def critical_constants() -> dict:
    """Critical constants from gasdata/critical.toml: id -> (Tc K, Pc Pa, Vc m3/mol, omega, source)."""
    p = _gasdata("critical.toml")
    if p is None:
        return {}
    raw = tomllib.loads(p.read_text(encoding="utf-8"))
    return {e["id"]: (float(e["Tc_K"]), float(e["Pc_Pa"]), float(e["Vc_m3_per_mol"]),
                      float(e["omega"]), f'{e["source"]}: {e.get("source_note", "")}')
            for e in raw.get("species", [])}


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
        raise TablegenError(f"{p}: cannot read agreement figures ({e})") from None
    rows = []
    for i, r in enumerate(raw.get("agreement", [])):
        missing = [k for k in ("species", "source", "against", "band_K", "cp_max_rel",
                               "dh_max_J_per_mol", "s0_max_J_per_molK") if k not in r]
        if missing:
            raise TablegenError(f"{p}: agreement[{i}] lacks {', '.join(missing)}; "
                                f"allowed keys: {', '.join(AGREEMENT_KEYS)}")
        rows.append(dict(r))
    return tuple(rows)


def load_agreement(path=None) -> tuple:
    """Agreement rows ([[agreement]] tables, format of gasdata/agreement.toml).

    With no path: every shipped agreement file (AGREEMENT_FILES) plus the
    spread of the shipped data sets against each other (:func:`shipped_spread`).
    """
    if path is not None:
        return _read_agreement(str(path))
    rows = list(shipped_spread())
    for name in AGREEMENT_FILES:
        p = _gasdata(name)
        if p is not None:
            rows += _read_agreement(str(p))
    return tuple(rows)


def _by_species(rows) -> dict:
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
    from .data.library import library
    lib = library()
    rows = []
    a, b = lib.datasets.get("nasa1993"), lib.datasets.get("nasa2002-air")
    if a is None or b is None:
        return ()
    for sid in b.ids:
        ra, rb = a.get(sid), b.get(sid)
        if ra is None or rb is None or ra.id != rb.id:
            continue
        lo, hi = max(ra.T_min, rb.T_min), min(ra.T_max, rb.T_max)
        if lo < T_REF < hi:
            fa, fb = record_functions(ra), record_functions(rb)
            rows += spread_figures(sid, "nasa1993", "nasa2002-air", fa, fb, lo, hi)
            rows += spread_figures(sid, "nasa2002-air", "nasa1993", fb, fa, lo, hi)
    return tuple(rows)


# ------------------------------------------------------------- species data part
@dataclass(frozen=True, slots=True)
class SpeciesData:
    """Standard uncertainties (molar, SI) of one species' source functions at T."""

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


def _record_for(comp_id: str, dataset: str):
    from .data import library as L
    for lib in [*L._LIB.values(), L.library()]:
        ds = lib.datasets.get(dataset)
        if ds is not None:
            r = ds.get(comp_id)
            if r is not None:
                return r
    raise TablegenError(f"uncertainty: record {comp_id!r} of data set {dataset!r} is not loaded")


def species_data(rec, T: np.ndarray, agreement) -> SpeciesData:
    """Data-component standard uncertainties of one species record at T (K)."""
    cls = species_class(rec.elements, rec.id)
    e = rec.poly.evaluate(np.concatenate([[T_REF], T]))
    cp = e["cp"][1:] * R_MOLAR
    dh = (e["h"][1:] - e["h"][0]) * R_MOLAR
    ds = (e["s"][1:] - e["s"][0]) * R_MOLAR
    h298, s298 = e["h"][0] * R_MOLAR, e["s"][0] * R_MOLAR
    Tc = np.maximum(T, T_REF)
    u_cp = np.full(T.shape, np.nan)
    u_dh = np.full(T.shape, np.nan)
    u_ds = np.full(T.shape, np.nan)
    basis = set()
    mine = agreement.get(rec.id, ()) if isinstance(agreement, dict) else \
        [r for r in agreement if r["species"] == rec.id]
    # Per partner (a source family: a refit counts as its table), the narrowest
    # band that holds T gives the most local figure; partners combine by max.
    per_family: dict = {}
    own = SOURCE_FAMILY.get(rec.dataset, rec.dataset)
    for r in mine:
        fs, fa = SOURCE_FAMILY.get(r["source"], r["source"]), SOURCE_FAMILY.get(r["against"], r["against"])
        if own not in (fs, fa) or fs == fa:
            continue                      # not about the printed source, or a refit against its table
        other = r["against"] if fs == own else r["source"]
        fam = SOURCE_FAMILY.get(other, other)
        lo, hi = r["band_K"]
        m = (T >= lo) & (T <= hi)
        if not np.any(m):
            continue
        basis.add(f"spread against {other}")
        w, c, h_, s_ = per_family.setdefault(fam, [np.full(T.shape, np.inf), np.full(T.shape, np.nan),
                                                   np.full(T.shape, np.nan), np.full(T.shape, np.nan)])
        take = m & (hi - lo < w)
        w[take] = hi - lo
        # The largest difference in a band is taken as the half-width of a
        # rectangular distribution of the printed source's error.
        c[take] = r["cp_max_rel"] / SQRT3 * cp[take]
        h_[take] = r["dh_max_J_per_mol"] / SQRT3
        s_[take] = r["s0_max_J_per_molK"] / SQRT3
    for _, c, h_, s_ in per_family.values():
        u_cp = np.fmax(u_cp, c)
        u_dh = np.fmax(u_dh, h_)
        u_ds = np.fmax(u_ds, s_)
    est = np.isnan(u_cp)
    if np.any(est):
        basis.add(f"class default ({cls}), estimated")
    c_cp = _class_rel(cls, "cp_rel", Tc) * cp
    c_dh = _class_rel(cls, "dh_rel", Tc) * np.abs(dh)
    c_ds = _class_rel(cls, "ds_rel", Tc) * np.abs(ds)
    # Sources that agree closely often share their underlying data, so a spread
    # may raise a figure above the class floor but not lower it below.
    f = SHARED_FLOOR
    u_cp = np.where(est, c_cp, np.fmax(u_cp, f * c_cp))
    u_dh = np.where(est, c_dh, np.fmax(u_dh, f * c_dh))
    u_ds = np.where(est, c_ds, np.fmax(u_ds, f * c_ds))
    u_cp = np.hypot(u_cp, CP_FLOOR_REL * cp)
    u_dh = np.hypot(u_dh, CP_FLOOR_REL * np.abs(dh))
    u_ds = np.hypot(u_ds, CP_FLOOR_REL * np.abs(ds))
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
                       Sb, Hb, tuple(sorted(basis)))


# ---------------------------------------------------------------- virial model
#: Tsonopoulos (1974) correlation of the second virial coefficient,
#: B Pc/(R Tc) = f0(Tr) + omega f1(Tr) + f2(Tr), as {power of 1/Tr: coefficient}.
#: C. Tsonopoulos, An empirical correlation of second virial coefficients,
#: AIChE J. 20 (1974) 263-272.
TSONOPOULOS_F0 = {0: 0.1445, 1: -0.330, 2: -0.1385, 3: -0.0121, 8: -0.000607}
TSONOPOULOS_F1 = {0: 0.0637, 2: 0.331, 3: -0.423, 8: -0.008}
#: Polar term f2 = a/Tr^6 - b/Tr^8: water a = -0.0109, b = 0 (C. Tsonopoulos and
#: J. L. Heidman, Fluid Phase Equilib. 57 (1990) 261-276; from memory).
POLAR_AB = {"H2O": (-0.0109, 0.0)}
#: Polar species without polar parameters here: their B estimate is stated
#: with the wider relative uncertainty.
POLAR_WITHOUT_TERM = frozenset({"NH3", "SO2", "H2S", "HCl", "HF", "HCN", "CH3OH", "C2H5OH", "NO2",
                                "SO3", "COS", "CH2O", "CH3Cl", "CH2Cl2", "CHCl3", "C3H6O"})
#: Expanded (k = 2) uncertainty of the B estimate: relative part and absolute
#: part (m3/mol).  Common practice for corresponding-states B correlations away
#: from the critical region (Tr > 0.6); checked against CoolProp in the tests.
B_U_REL, B_U_REL_POLAR, B_U_ABS = 0.10, 0.25, 3.0e-6
#: Relative expanded uncertainty of the temperature derivatives of B (a
#: correlation's slope and curvature are less certain than its value;
#: judgement, checked against CoolProp in the tests), nonpolar and polar.
DB_U_REL, DB_U_REL_POLAR = 0.25, 0.40


def _series(coef: dict, Tr: np.ndarray):
    f = sum(c * Tr ** -n for n, c in coef.items())
    d1 = sum(-n * c * Tr ** -(n + 1) for n, c in coef.items())
    d2 = sum(n * (n + 1) * c * Tr ** -(n + 2) for n, c in coef.items())
    return f, d1, d2


def second_virial(T, Tc, Pc, omega, a=0.0, b=0.0):
    """B(T) and its first two temperature derivatives, m3/mol (Tsonopoulos 1974).

    Range: gases above about 0.6 Tc; no quantum correction (H2, He, Ne are
    estimated with their classical critical constants).
    """
    T = np.asarray(T, float)
    Tr = T / Tc
    coef = {}
    for table, w in ((TSONOPOULOS_F0, 1.0), (TSONOPOULOS_F1, omega), ({6: a, 8: -b}, 1.0)):
        for n, c in table.items():
            coef[n] = coef.get(n, 0.0) + w * c
    f, d1, d2 = _series(coef, Tr)
    s = R_MOLAR * Tc / Pc
    return s * f, s * d1 / Tc, s * d2 / Tc ** 2


@dataclass(frozen=True, slots=True)
class VirialEstimate:
    """Mixture second virial coefficient and the departures it gives per pascal."""

    B: np.ndarray          # m3/mol
    dB: np.ndarray         # m3/(mol K)
    d2B: np.ndarray        # m3/(mol K2)
    U_B: np.ndarray        # expanded uncertainty of B, m3/mol
    U_dB: np.ndarray       # expanded uncertainty of dB/dT
    U_d2B: np.ndarray      # expanded uncertainty of d2B/dT2
    covered: float         # mole fraction with critical data
    missing: tuple         # species without critical data
    Vc: float              # mixture critical volume estimate, m3/mol

    def Z(self, T, P):
        return 1.0 + self.B * P / (R_MOLAR * T)


def virial_mixture(components, T: np.ndarray) -> VirialEstimate | None:
    """B of a mixture: B = Σ Σ y_i y_j B_ij over species with critical constants.

    Combining rules (J. M. Prausnitz, R. N. Lichtenthaler and E. G. de Azevedo,
    Molecular Thermodynamics of Fluid-Phase Equilibria, 3rd ed., 1999, ch. 5):
    Tc_ij = sqrt(Tc_i Tc_j) (k_ij = 0), Vc_ij = ((Vc_i^(1/3) + Vc_j^(1/3))/2)^3,
    Zc_ij = (Zc_i + Zc_j)/2, Pc_ij = Zc_ij R Tc_ij / Vc_ij, omega_ij = (omega_i + omega_j)/2,
    no polar term in cross coefficients.  Species without critical data are
    left out and the rest renormalised (stated in the budget).
    """
    crit = critical_constants()
    known = [(c.id, c.mole_fraction, crit[c.id]) for c in components if c.id in crit]
    missing = tuple(c.id for c in components if c.id not in crit)
    if not known:
        return None
    tot = sum(y for _, y, _ in known)
    B = np.zeros_like(T)
    dB = np.zeros_like(T)
    d2B = np.zeros_like(T)
    UB = np.zeros_like(T)
    UdB = np.zeros_like(T)
    Ud2B = np.zeros_like(T)
    Vc_mix = 0.0
    for i, (si, yi, ci) in enumerate(known):
        for j, (sj, yj, cj) in enumerate(known):
            w = yi * yj / tot ** 2
            if i == j:
                Tc, Pc, Vc, om = ci[:4]
                a, b = POLAR_AB.get(si, (0.0, 0.0))
                polar = si in POLAR_WITHOUT_TERM
            else:
                Tc = math.sqrt(ci[0] * cj[0])
                Vc = ((ci[2] ** (1 / 3) + cj[2] ** (1 / 3)) / 2) ** 3
                Zc = (ci[1] * ci[2] / (R_MOLAR * ci[0]) + cj[1] * cj[2] / (R_MOLAR * cj[0])) / 2
                Pc = Zc * R_MOLAR * Tc / Vc
                om = (ci[3] + cj[3]) / 2
                a = b = 0.0
                polar = si in POLAR_WITHOUT_TERM or sj in POLAR_WITHOUT_TERM
            rel = B_U_REL_POLAR if polar else B_U_REL
            rd = DB_U_REL_POLAR if polar else DB_U_REL
            b0, b1, b2 = second_virial(T, Tc, Pc, om, a, b)
            B += w * b0
            dB += w * b1
            d2B += w * b2
            UB += w * (rel * np.abs(b0) + B_U_ABS)
            UdB += w * (rd * np.abs(b1) + B_U_ABS / T)
            Ud2B += w * (rd * np.abs(b2) + B_U_ABS / T ** 2)
            Vc_mix += w * Vc
    return VirialEstimate(B, dB, d2B, UB, UdB, Ud2B, float(tot), missing, float(Vc_mix))


def model_departures(est: VirialEstimate, T: np.ndarray, P: float) -> dict:
    """Real minus ideal-gas values at (T, P) from B (molar SI): Z, cp, cv, h, u, s.

    Low-density virial relations (e.g. Prausnitz et al. 1999, ch. 5):
    Z - 1 = B P/(R T);  h - h° = P (B - T B');  u - u° = -P T B';
    s - s°(T, P) = -P B';  cp - cp° = -P T B'';  cv - cv° = -P (2 B' + T B'').
    """
    return {
        "Z": est.B * P / (R_MOLAR * T),
        "h": P * (est.B - T * est.dB),
        "u": -P * T * est.dB,
        "s": -P * est.dB,
        "cp": -P * T * est.d2B,
        "cv": -P * (2 * est.dB + T * est.d2B),
    }


def departure_bounds(est: VirialEstimate, T: np.ndarray, P: float) -> dict:
    """Upper bounds of |real - ideal| at (T, P): the estimate plus its expanded
    uncertainty (from U_B, U_dB, U_d2B), molar SI, keys as model_departures."""
    return {
        "Z": (np.abs(est.B) + est.U_B) * P / (R_MOLAR * T),
        "h": P * (np.abs(est.B - T * est.dB) + est.U_B + T * est.U_dB),
        "u": P * T * (np.abs(est.dB) + est.U_dB),
        "s": P * (np.abs(est.dB) + est.U_dB),
        "cp": P * T * (np.abs(est.d2B) + est.U_d2B),
        "cv": P * (2 * np.abs(est.dB) + T * np.abs(est.d2B) + 2 * est.U_dB + T * est.U_d2B),
    }


def vapour_pressure_estimate(T, Tc, Pc, omega):
    """Vapour pressure from the acentric factor: log10(Psat/Pc) = 7/3 (1+omega)(1 - Tc/T).

    W. C. Edmister, Petroleum Refiner 37 (1958) 173 (from memory); a rough
    estimate (about 10 % near Tr = 0.7), used only for a caution.
    """
    T = np.asarray(T, float)
    return Pc * 10.0 ** (7.0 / 3.0 * (1.0 + omega) * (1.0 - Tc / T))


# ----------------------------------------------------------------- the budget
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
#: Standard-state functions of T only: the ideal-gas model term does not apply
#: to them (they are defined for the ideal gas at P°); its effect on their use
#: at pressure is stated through s.
STANDARD_STATE_KEYS = frozenset({"s0", "s0_molar", "g0", "g0_molar", "Pr", "vr", "dh298_molar"})
COMPONENTS = ("data", "composition", "rounding", "ideal-gas model")


@dataclass(frozen=True, slots=True)
class Band:
    """Largest stated uncertainty of one key in one temperature band."""

    key: str
    T_lo_K: float
    T_hi_K: float
    U_max: float                  # expanded, k = 2, SI unit of the key
    U_rel_max: float              # relative to |value| (NaN for energies with a datum)
    components: dict              # component -> largest expanded part in the band
    interpolation_max: float      # largest interpolation error between rows, or NaN
    estimated: bool               # any class default used in the band


@dataclass(frozen=True, slots=True, eq=False)
class Budget:
    """An uncertainty budget of one substance on a temperature grid.

    Use :func:`budget` to make one.  ``u[key][component]`` are standard
    uncertainties (arrays over ``T_K``, SI); :meth:`U` the combined expanded one.
    """

    substance_id: str
    T_K: np.ndarray
    keys: tuple
    P_max_Pa: float
    values: dict
    u: dict
    estimated: np.ndarray
    interpolation: dict
    statements: tuple
    assumptions: tuple
    sources: tuple
    edges: tuple = BAND_EDGES_K
    extra: dict = field(default_factory=dict)

    def U(self, key: str, component: str | None = None) -> np.ndarray:
        """Expanded uncertainty (k = 2), SI unit of ``key``; one component if named."""
        parts = self._parts(key)
        if component is not None:
            if component not in parts:
                raise TablegenError(f"uncertainty component {component!r} is not known; "
                                    f"allowed: {', '.join(parts)}")
            return COVERAGE * parts[component]
        return COVERAGE * np.sqrt(sum(v ** 2 for v in parts.values()))

    def _parts(self, key):
        if key not in self.u:
            raise TablegenError(f"no uncertainty for {key!r} in this budget; "
                                f"allowed: {', '.join(self.keys)}")
        return self.u[key]

    def bands(self, key: str) -> tuple:
        """Per temperature band: the largest U, its parts and the interpolation bound."""
        U = self.U(key)
        parts = self._parts(key)
        val = self.values[key]
        T = self.T_K
        inter = self.interpolation.get(key)
        out = []
        cuts = sorted({float(T.min()), float(T.max()), *(e for e in self.edges if T.min() < e < T.max())})
        for i, (lo, hi) in enumerate(zip(cuts[:-1], cuts[1:])):
            m = (T >= lo) & ((T < hi) if i < len(cuts) - 2 else (T <= hi))
            if not np.any(m):
                continue
            with np.errstate(divide="ignore", invalid="ignore"):
                rel = np.nan if key in ENERGY_KEYS else float(np.max(U[m] / np.abs(val[m])))
            im = np.nan
            if inter is not None:
                mids = 0.5 * (T[1:] + T[:-1])
                mm = (mids >= lo) & (mids <= hi)
                if np.any(mm):
                    im = float(np.max(inter[mm]))
            out.append(Band(key, lo, hi, float(np.max(U[m])), rel,
                            {c: float(np.max(COVERAGE * v[m])) for c, v in parts.items()},
                            im, bool(np.any(self.estimated[m]))))
        return tuple(out)

    def summary(self, key: str, *, unit_factor: float = 1.0, unit: str = "") -> str:
        """One line for a table's notes: the largest U per band, relative where
        that is meaningful, else in ``unit`` (SI value of one unit: unit_factor)."""
        parts = []
        for b in self.bands(key):
            if np.isfinite(b.U_rel_max):
                fig = f"{b.U_rel_max * 100:.2g} %"
            else:
                fig = f"{b.U_max / unit_factor:.2g} {unit}".rstrip()
            est = " (estimated)" if b.estimated else ""
            parts.append(f"{fig} at {b.T_lo_K:g}-{b.T_hi_K:g} K{est}")
        return f"{key}: U (k = 2) at most " + ", ".join(parts)

    def columns(self) -> dict:
        """U_<key> arrays for a CSV (expanded, k = 2, SI unit of the key)."""
        return {f"U_{k}": self.U(k) for k in self.keys}

    def to_json(self) -> dict:
        """The budget as plain JSON data for the book's sidecar (figures to 3 digits)."""
        def r3(x):
            return None if not np.isfinite(x) else float(f"{x:.3g}")
        keys = {}
        for k in self.keys:
            keys[k] = {
                "unit": UNITS.get(k, ""),
                "bands": [{
                    "T_lo_K": b.T_lo_K, "T_hi_K": b.T_hi_K, "U": r3(b.U_max),
                    "U_rel": r3(b.U_rel_max), "estimated": b.estimated,
                    "components": {c: r3(v) for c, v in b.components.items()},
                    "interpolation_max": r3(b.interpolation_max),
                } for b in self.bands(k)],
            }
        return {
            "substance": self.substance_id, "coverage_factor": COVERAGE,
            "P_max_Pa": self.P_max_Pa, "T_range_K": [float(self.T_K.min()), float(self.T_K.max())],
            "keys": keys, "statements": list(self.statements), "assumptions": list(self.assumptions),
            "sources": list(self.sources),
        }


def _check_keys(sub, keys):
    bad = [k for k in keys if k not in UNITS]
    if bad:
        raise TablegenError(f"no uncertainty model for {', '.join(map(repr, bad))}; "
                            f"allowed: {', '.join(UNITS)}")


def budget(substance, T_K, keys=("cp", "h", "s0", "Pr", "vr"), *, P_max_Pa: float = P_STD,
           composition_u: dict | None = None, composition_basis: str = "mole",
           printed_step: dict | None = None, agreement=None, T_rows=None,
           composition_inputs: dict | None = None) -> Budget:
    """The uncertainty budget of ``substance`` at temperatures ``T_K``.

    Parameters
    ----------
    substance : Substance (datum, P_ref and anchor as printed)
    T_K : temperatures, K (within the data range)
    keys : property keys (see UNITS)
    P_max_Pa : largest pressure the values are used at (ideal-gas model term)
    composition_u : species id -> standard uncertainty of its fraction
    composition_basis : "mole" or "mass": the basis of those fractions
    printed_step : key -> value of one unit of the last printed digit, SI; keys
        absent get the step :func:`digits_for` chooses from the data
        uncertainty (decades of the SI unit)
    agreement : agreement rows to use instead of the shipped ones
    T_rows : printed rows, if the interpolation bound is wanted (default T_K
        when it has at least 2 points)
    composition_inputs : input label -> {species id: signed change of its mole
        fraction for one standard uncertainty of that input}, for a composition
        computed from uncertain inputs (a flue gas: tablegen.burn_inputs); each input
        is a component of its own, "composition: LABEL"

    Raises
    ------
    TablegenError for unknown keys, bad pressures or composition entries;
    RangeError for temperatures outside the data range.
    """
    keys = tuple(keys)
    _check_keys(substance, keys)
    T = np.atleast_1d(np.asarray(T_K, float))
    if T.ndim != 1 or T.size == 0:
        raise TablegenError("uncertainty: T_K must be a non-empty list of temperatures")
    if not (isinstance(P_max_Pa, (int, float)) and math.isfinite(P_max_Pa) and P_max_Pa > 0):
        raise TablegenError(f"uncertainty: P_max {P_max_Pa!r} Pa must be a positive number")
    P = float(P_max_Pa)
    props = substance.properties(T, P)
    values = {k: np.asarray(props[k], float) * np.ones_like(T) for k in keys}
    rows = _by_species(load_agreement() if agreement is None else tuple(agreement))

    # ---- data component, per species, combined over the mixture
    Mk = substance.M * 1e-3
    sq = {q: np.zeros_like(T) for q in ("cp", "h", "dh", "s", "lnPr")}
    est = np.zeros(T.shape, bool)
    sources, assumptions = [], []
    datum = substance.datum
    Ta = substance.anchor.T_K
    for c in substance.components:
        rec = _record_for(c.id, c.source)
        sd = species_data(rec, T, rows)
        y = c.mole_fraction
        if datum.kind == "formation":
            uh = np.hypot(sd.dh, sd.dfH)
        elif abs(datum.T_ref_K - T_REF) < 1e-9:
            uh = sd.dh
        else:
            uh = np.hypot(sd.dh, species_data(rec, np.array([datum.T_ref_K]), rows).dh[0])
        if abs(Ta - T_REF) < 1e-9:
            uds_a = 0.0
        else:
            uds_a = species_data(rec, np.array([Ta]), rows).ds[0]
        sq["cp"] += (y * sd.cp) ** 2
        sq["h"] += (y * uh) ** 2
        sq["dh"] += (y * sd.dh) ** 2
        sq["s"] += (y * np.hypot(sd.ds, sd.S298)) ** 2
        sq["lnPr"] += (y * np.hypot(sd.ds, uds_a) / R_MOLAR) ** 2
        est |= sd.estimated
        sources.append(f"{c.id} ({c.source}): across T {', '.join(sd.T_basis)}; "
                       f"S°(298.15 K) {sd.S298_basis}; enthalpy of formation {sd.dfH_basis}")
    u_m = {q: np.sqrt(v) for q, v in sq.items()}
    cv_m = props["cv_molar"]
    k_ = props["k"]
    data_u = {
        "cp_molar": u_m["cp"], "cv_molar": u_m["cp"], "h_molar": u_m["h"], "u_molar": u_m["h"],
        "dh298_molar": u_m["dh"], "s0_molar": u_m["s"], "s_molar": u_m["s"],
        "g0_molar": np.hypot(u_m["h"], T * u_m["s"]),
        "Pr": props["Pr"] * u_m["lnPr"], "vr": props["vr"] * u_m["lnPr"],
        "k": R_MOLAR * u_m["cp"] / cv_m ** 2,
        "v": np.zeros_like(T), "rho": np.zeros_like(T),
    }
    data_u["a"] = props["a"] * 0.5 * data_u["k"] / k_
    for k in ("cp", "cv", "h", "u", "s0", "s", "g0"):
        data_u[k] = data_u[f"{k}_molar"] / Mk
    u = {k: {"data": data_u[k]} for k in keys}

    # ---- composition
    if composition_u is not None and not isinstance(composition_u, dict):
        raise TablegenError("uncertainty: composition uncertainties must be a mapping of species to "
                            "standard uncertainties of their fractions, e.g. {'H2O': 0.005}")
    if composition_u:
        comp = composition_sensitivity(substance, T, keys, composition_u, composition_basis, P)
        for k in keys:
            u[k]["composition"] = comp[k]
    for label, dy in (composition_inputs or {}).items():
        part = input_sensitivity(substance, T, keys, dy, P)
        for k in keys:
            u[k][f"composition: {label}"] = part[k]

    # ---- ideal-gas model
    statements = []
    vir = virial_mixture(substance.components, T)
    if vir is not None:
        up = departure_bounds(vir, T, P)
        cp_m = props["cp_molar"]
        model = {
            "cp_molar": up["cp"], "cv_molar": up["cv"], "h_molar": up["h"], "u_molar": up["u"],
            "s_molar": up["s"], "v": up["Z"] * props["v"], "rho": up["Z"] * props["rho"],
            "k": k_ * (up["cp"] / cp_m + up["cv"] / cv_m),
        }
        model["a"] = props["a"] * 0.5 * model["k"] / k_
        for kk in ("cp", "cv", "h", "u", "s"):
            model[kk] = model[f"{kk}_molar"] / Mk
        for k in keys:
            if k not in STANDARD_STATE_KEYS:
                u[k]["ideal-gas model"] = model[k] / SQRT3
        statements += model_statements(substance, vir, T, P, props)
    else:
        statements.append(f"{substance.id}: no critical constants for any component "
                          f"(gasdata/critical.toml): the ideal-gas model term is not estimated")

    # ---- rounding
    printed_step = dict(printed_step or {})
    for k, v in printed_step.items():
        try:
            ok = math.isfinite(float(v)) and float(v) > 0
        except (TypeError, ValueError):
            ok = False
        if not ok:
            raise TablegenError(f"uncertainty: printed step of {k!r} is {v!r}; allowed: a positive number (SI)")
    for k in keys:
        # digits follow the data uncertainty (not the pressure- or
        # composition-dependent parts, which differ between users of a table)
        U_now = COVERAGE * u[k]["data"]
        if k in printed_step:
            step = np.full_like(T, float(printed_step[k]))
        else:
            step = 10.0 ** (-digits_for(U_now).astype(float))
        u[k]["rounding"] = step / (2 * SQRT3)

    # ---- interpolation (beside U)
    rows_T = T if T_rows is None else np.asarray(T_rows, float)
    inter = {}
    if rows_T.size >= 2 and np.all(np.diff(rows_T) > 0):
        for k in keys:
            inter[k] = interpolation_bound(substance, k, rows_T, P_Pa=P)
    if inter:
        worst = []
        for k in keys:
            b = inter[k]
            unit = "" if UNITS[k] == "1" else f" {UNITS[k]}"
            worst.append(f"{k} {float(np.max(b)):.2g}{unit}")
        statements.append("linear interpolation between adjacent printed rows adds at most: "
                          + "; ".join(worst) + " (largest over the table; per band in the figures)")

    if np.any(est):
        statements.append("figures marked 'estimated' rest on class defaults, not on a comparison of sources")
    assumptions += [
        f"expanded uncertainties U with coverage factor k = {COVERAGE:g} (about 95 %), JCGM 100:2008",
        "within a species the errors of one source are fully correlated across temperature; "
        "between species they are independent: u_mix^2 = sum (y_i u_i)^2",
        "a band's largest difference between two sources is the half-width of a rectangular distribution",
        "CODATA uncertainties are taken as k = 2; a difference of the printed source from the CODATA "
        "value is added as a rectangular half-width",
        "h and s of one species treated as independent in g0 = h - T s0",
        "rounding: half a unit of the last printed digit, rectangular",
        f"ideal-gas model: departures at P_max = {P / 1e5:g} bar from the second virial coefficient "
        "(Tsonopoulos 1974), their bound taken as a rectangular half-width; not applied to the "
        "standard-state functions s0, g0, Pr, vr, dh298",
        "molar-mass and gas-constant uncertainties neglected",
        "these figures state how far the tables can be trusted; they are no design margin: for boilers, "
        "flue gas, toxic, asphyxiant or condensing gases follow local codes and licensed engineering practice",
    ]
    if composition_u:
        assumptions.append(f"composition: the given {composition_basis}-fraction uncertainties are "
                           "independent standard uncertainties; the other fractions renormalised")
    if composition_inputs:
        assumptions.append("composition from uncertain inputs (" + ", ".join(composition_inputs) + "): each "
                           "input's effect on all mole fractions together, propagated through the combustion "
                           "calculation (JCGM 100:2008, 5.1.2), independent between inputs")
    return Budget(substance.id, T, keys, P, values, u, est, inter, tuple(statements),
                  tuple(assumptions), tuple(sources))


def model_statements(substance, vir: VirialEstimate, T: np.ndarray, P: float, props) -> list:
    """Sentences such as 'ideal-gas values within 0.1 % up to X bar above Y K'."""
    out = []
    T_lo, T_hi = float(T.min()), float(T.max())
    Tg = np.linspace(T_lo, T_hi, 400) if T_hi > T_lo else np.array([T_lo])
    vg = virial_mixture(substance.components, Tg)
    cp_g = substance.properties(Tg)["cp_molar"]
    # departures per pascal (upper bounds): Z and cp relative
    bnd = departure_bounds(vg, Tg, 1.0)
    per_pa = np.maximum(bnd["Z"], bnd["cp"] / cp_g)
    cands = sorted({T_lo, *(t for t in (300.0, 500.0, 1000.0) if T_lo < t < T_hi)})
    for tol in (0.001, 0.01):
        parts = []
        for Y in cands:
            m = Tg >= Y - 1e-9
            X = tol / float(np.max(per_pa[m]))
            parts.append(f"up to {_round_down(X / 1e5)} bar above {Y:g} K")
        out.append(f"ideal-gas values (Z, cp) within {tol * 100:g} % " + ", ".join(parts))
    dep = model_departures(vir, T, P)
    Mk = substance.M * 1e-3
    out.append(
        f"at {P / 1e5:g} bar over {T_lo:g}-{T_hi:g} K the real gas departs from these values by up to "
        f"|Z-1| {np.max(np.abs(dep['Z'])) * 100:.2g} %, cp {np.max(np.abs(dep['cp']) / props['cp_molar']) * 100:.2g} %, "
        f"h {np.max(np.abs(dep['h'])) / Mk / 1e3:.2g} kJ/kg, s {np.max(np.abs(dep['s'])) / Mk:.2g} J/(kg K) "
        f"(second virial coefficient, Tsonopoulos 1974)")
    rho_vc = P * vir.Vc / (R_MOLAR * T * np.maximum(1 + vir.B * P / (R_MOLAR * T), 0.1))
    if np.any(rho_vc > 0.1):
        bad = float(T[rho_vc > 0.1].max())
        out.append(f"caution: at {P / 1e5:g} bar below about {bad:.0f} K the density exceeds a tenth of the "
                   f"critical density, beyond the range of the second-virial estimate; the ideal-gas "
                   f"departures stated there are indicative only")
    if vir.missing:
        out.append(f"no critical constants for {', '.join(vir.missing)} (mole fraction "
                   f"{1 - vir.covered:.3g}): the virial estimate uses the other components")
    crit = critical_constants()
    for c in substance.components:
        if c.id == "H2O" and getattr(substance, "dew_point_P_Pa", None) is not None:
            # the one water dew point of the substance (IAPWS-IF97), the figure every document prints
            from .saturation import dew_point_text
            out.append(f"caution: water dew point {dew_point_text(substance.dew_point_K, substance.dew_point_P_Pa)}: "
                       f"at and below it water may condense, and ideal-gas values and this budget do not hold "
                       f"there (rows marked c)")
            continue
        if c.id not in crit:
            continue
        Tc, Pc, _, om, _ = crit[c.id]
        low = Tg[(Tg < Tc) & (c.mole_fraction * P > vapour_pressure_estimate(Tg, Tc, Pc, om))]
        if low.size:
            out.append(f"caution: below about {float(low.max()):.0f} K the partial pressure of {c.id} at "
                       f"{P / 1e5:g} bar exceeds its estimated vapour pressure; it may condense, and "
                       f"ideal-gas values and this budget do not hold there")
    return out


def _round_down(x: float) -> str:
    """Two significant digits, rounded down (a limit stated conservatively)."""
    if x <= 0 or not math.isfinite(x):
        return "0"
    e = math.floor(math.log10(x)) - 1
    v = math.floor(x / 10 ** e) * 10 ** e
    return f"{v:.{max(0, -e)}f}"


# ------------------------------------------------------------- composition part
def _rebuild(substance, fractions: dict, basis: str):
    from .thermo.build import mixture_substance
    parts = [(_record_for(c.id, c.source), fractions[c.id]) for c in substance.components]
    m = mixture_substance(parts, basis, id=substance.id, name=substance.name, what="uncertainty")
    return m.with_options(datum=substance.datum, P_ref_Pa=substance.P_ref_Pa, anchor=substance.anchor)


def _perturbed(fr: dict, sid: str, delta: float) -> dict:
    out = dict(fr)
    out[sid] = fr[sid] + delta
    tot = sum(out.values())
    return {k: v / tot for k, v in out.items()}


def input_sensitivity(substance, T, keys, dy: dict, P: float = P_STD) -> dict:
    """Standard uncertainty per key from one input that moves all mole fractions together.

    ``dy`` = {species: signed change of its mole fraction for one standard
    uncertainty of the input}; the properties at y + ε dy and y − ε dy give the
    linear change (ε small enough to keep every fraction positive), so
    u = |X(y + ε dy) − X(y − ε dy)| / (2 ε).
    """
    fr = {c.id: c.mole_fraction for c in substance.components}
    bad = [k for k in dy if k not in fr]
    if bad:
        raise TablegenError(f"uncertainty: {bad[0]!r} is not a component of {substance.id}; "
                            f"allowed: {', '.join(fr)}")
    scale = max((abs(v) / fr[k] for k, v in dy.items() if v), default=0.0)
    if scale == 0.0:
        return {k: np.zeros_like(T) for k in keys}
    eps = min(1.0, 0.5 / scale)

    def at(sign):
        y = {k: v + sign * eps * dy.get(k, 0.0) for k, v in fr.items()}
        tot = sum(y.values())
        return _rebuild(substance, {k: v / tot for k, v in y.items()}, "mole").properties(T, P)
    hi, lo = at(1.0), at(-1.0)
    return {k: np.abs(np.asarray(hi[k], float) - np.asarray(lo[k], float)) / (2 * eps) for k in keys}


def composition_sensitivity(substance, T, keys, composition_u: dict, basis: str = "mole",
                            P: float = P_STD) -> dict:
    """Standard uncertainty per key from fraction uncertainties (linear sensitivity).

    Each listed fraction x_j is moved by ±δ, the fractions renormalised to a sum
    of 1 (so the others scale), the mixture rebuilt and the property evaluated;
    c_j = (X(+δ) - X(-δ)) / (2δ) and u² = Σ (c_j u_j)², the u_j independent.
    """
    if basis not in ("mole", "mass"):
        raise TablegenError(f"uncertainty: composition basis {basis!r} is not known; allowed: mole, mass")
    fr = {c.id: (c.mole_fraction if basis == "mole" else c.mass_fraction) for c in substance.components}
    out = {k: np.zeros_like(T) for k in keys}
    for sid, uj in composition_u.items():
        if sid not in fr:
            raise TablegenError(f"uncertainty: {sid!r} is not a component of {substance.id}; "
                                f"allowed: {', '.join(fr)}")
        try:
            uj = float(uj)
        except (TypeError, ValueError):
            raise TablegenError(f"uncertainty: the uncertainty of {sid!r} is not a number ({uj!r})") from None
        if not (math.isfinite(uj) and 0 <= uj < 1):
            raise TablegenError(f"uncertainty: the uncertainty of {sid!r} is {uj!r}; allowed: 0 <= u < 1")
        if uj == 0:
            continue
        d = min(1e-4, 0.5 * fr[sid]) if fr[sid] > 0 else 1e-4
        lo = fr[sid] - d
        hi_p = _rebuild(substance, _perturbed(fr, sid, d), basis).properties(T, P)
        if lo > 0:
            lo_p = _rebuild(substance, _perturbed(fr, sid, -d), basis).properties(T, P)
            span = 2 * d
        else:
            lo_p = substance.properties(T, P)
            span = d
        for k in keys:
            c = (np.asarray(hi_p[k], float) - np.asarray(lo_p[k], float)) / span
            out[k] += (c * uj) ** 2
    return {k: np.sqrt(v) for k, v in out.items()}


# ------------------------------------------------------------- interpolation
def _values(substance, key, T, P_Pa):
    p = substance.properties(T, P_Pa if key in ("s", "s_molar", "v", "rho") else None)
    if key not in p:
        raise TablegenError(f"no property {key!r}; allowed: {', '.join(UNITS)}")
    return np.asarray(p[key], float) * np.ones_like(T)


def interpolation_bound(substance, key: str, T_rows, *, P_Pa: float = P_STD, n_fine: int = 64) -> np.ndarray:
    """Largest error of linear interpolation in ``key`` between adjacent rows.

    For each interval [T_i, T_i+1] the function is evaluated on a fine grid
    (n_fine + 1 points, the data's breakpoints and both sides of them added),
    the largest |f(T) - L(T)| found and refined on a second grid around it;
    the result is raised by 1e-5 relative and a few units of rounding so that
    it is a bound, not an estimate.

    Returns
    -------
    array of len(T_rows) - 1 bounds, SI unit of ``key``.
    """
    Tr = np.asarray(T_rows, float)
    if Tr.ndim != 1 or Tr.size < 2 or not np.all(np.diff(Tr) > 0):
        raise TablegenError("interpolation bound: rows must be at least 2 increasing temperatures")
    a, b = Tr[:-1], Tr[1:]
    fa, fb = _values(substance, key, a, P_Pa), _values(substance, key, b, P_Pa)
    t = np.linspace(0.0, 1.0, n_fine + 1)
    grid = a[:, None] + (b - a)[:, None] * t[None, :]

    def err(tt, Tg):
        f = _values(substance, key, Tg.ravel(), P_Pa).reshape(Tg.shape)
        return np.abs(f - (fa[:, None] + (fb - fa)[:, None] * tt))

    e = err(t[None, :], grid)
    i = np.argmax(e, axis=1)
    best = e[np.arange(e.shape[0]), i]
    dt = 1.0 / n_fine
    t2 = np.clip(t[i][:, None] + np.linspace(-dt, dt, 33)[None, :], 0.0, 1.0)
    e2 = err(t2, a[:, None] + (b - a)[:, None] * t2)
    best = np.maximum(best, e2.max(axis=1))
    # breakpoints of the collapsed polynomial: the function may jump there
    bp = substance.poly.T_bounds[1:-1]
    for Tb in bp:
        j = np.searchsorted(Tr, Tb, side="right") - 1
        if 0 <= j < a.size:
            tb = (np.array([Tb * (1 - 1e-12), Tb, Tb * (1 + 1e-12)]) - a[j]) / (b[j] - a[j])
            tb = np.clip(tb, 0.0, 1.0)
            f = _values(substance, key, a[j] + (b[j] - a[j]) * tb, P_Pa)
            best[j] = max(best[j], float(np.max(np.abs(f - (fa[j] + (fb[j] - fa[j]) * tb)))))
    scale = np.maximum(np.abs(fa), np.abs(fb))
    return best * (1 + 1e-5) + 8 * np.finfo(float).eps * scale


def _nice_steps(span: float) -> list:
    out = []
    for e in range(-2, int(math.floor(math.log10(max(span, 1e-2)))) + 1):
        for m in (1.0, 2.0, 2.5, 5.0):
            s = m * 10.0 ** e
            if s <= span:
                out.append(s)
    return sorted(set(out), reverse=True)


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
    for step in _nice_steps(T_hi - T_lo):
        rows = np.arange(T_lo, T_hi, step)
        rows = np.append(rows[rows < T_hi - 1e-9 * T_hi], T_hi)
        if rows.size > 200000:
            break
        ok = True
        for k in keys:
            bnd = interpolation_bound(substance, k, rows, P_Pa=P_Pa)
            if rel:
                mid = 0.5 * (rows[1:] + rows[:-1])
                if k in ENERGY_KEYS:
                    p = substance.properties(mid)
                    scale = (p["cp_molar"] if k.endswith("_molar") else p["cp"]) * mid
                else:
                    scale = np.abs(_values(substance, k, mid, P_Pa))
                ok = bool(np.all(bnd <= tol[k] * scale))
            else:
                ok = bool(np.all(bnd <= tol[k]))
            if not ok:
                break
        if ok:
            return float(step)
    raise SpecError(f"automatic step: no step down to 0.01 K keeps interpolation within {tolerance!r}")


# ----------------------------------------------------------------- rounding
def digits_for(U, *, unit_factor: float = 1.0) -> np.ndarray:
    """Decimals to print so that rounding stays below the uncertainty.

    Rule: the last printed digit has the value 10^-d, the largest power of ten
    not above U/2.  Then half a unit of it is at most U/4 (rounding adds at most
    4 % to the combined uncertainty: no thrown-away precision) and more than
    U/40 (at most about one digit inside the uncertainty: no false precision).

    Parameters
    ----------
    U : expanded uncertainty, array_like, in SI
    unit_factor : SI value of one printed unit (e.g. 1000 for kJ/kg), so the
        decimals apply to the printed number

    Returns
    -------
    integer array of decimals (negative: round to tens, hundreds, ...);
    a zero or non-finite U gives 12 decimals (no uncertainty to round to).
    """
    U = np.asarray(U, float) / float(unit_factor)
    with np.errstate(divide="ignore", invalid="ignore"):
        d = -np.floor(np.log10(U / 2.0))
    d = np.where(np.isfinite(d), d, 12.0)
    return np.clip(d, -12, 12).astype(int)


# ------------------------------------------------------------ properties hook
def uncertainty_columns(substance, T, P=None) -> dict:
    """U_<key> for every key the budget knows, for ``Substance.properties(uncertainty=True)``."""
    T = np.asarray(T, float)
    flat = T.ravel()
    Pm = P_STD if P is None else float(np.max(P))
    keys = [k for k in UNITS if P is not None or k not in ("s", "s_molar", "v", "rho")]
    order = np.argsort(flat)
    b = budget(substance, flat[order], keys, P_max_Pa=Pm, T_rows=np.array([]))
    inv = np.empty_like(order)
    inv[order] = np.arange(order.size)
    return {f"U_{k}": b.U(k)[inv].reshape(T.shape) for k in keys}
