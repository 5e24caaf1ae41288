"""Agreement between the sources of each species' ideal-gas properties.

For every species held by more than one source (the shipped coefficient sets
and, inside its equation's range, the ideal-gas part of the CoolProp equation
of state), the worst and RMS differences of cp, h - h(298.15 K) and s° are
computed per temperature band. gasdata/agreement.toml ships the figures;
tools/agreement.py writes it from this module, and the tests recompute it.

Definitions (per pair: ``source`` compared ``against`` a reference set):
  cp:  (cp_source - cp_against) / cp_against
  dh:  [h(T) - h(298.15 K)]_source - [h(T) - h(298.15 K)]_against, J/mol
  s0:  s°_source(T) - s°_against(T), J/(mol K), both at 1 bar; for CoolProp,
       whose entropy zero is arbitrary, [s°(T) - s°(298.15 K)] instead
  h298 (data sets only): h_source(298.15 K) - h_against(298.15 K), J/mol, the
       difference of the enthalpies of formation
on a grid of STEP_K inside each band, clipped to the range both cover.
CoolProp's h and s° are integrals of its cp0 from 298.15 K (8-point
Gauss-Legendre on each grid step, exact to far below the figures' precision).
"""

from __future__ import annotations

import math
import tomllib
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from ..core.errors import DataError, NameLookupError
from ..core.constants import R_MOLAR, T_REF

#: Temperature bands of the figures, K.
BANDS_K = ((200.0, 1000.0), (1000.0, 2000.0), (2000.0, 3000.0), (3000.0, 6000.0))

#: Grid step inside a band, K.
STEP_K = 10.0

#: Order of preference for the ``against`` side of a pair: the evaluation of
#: the data themselves (JANAF) first, then the fitted sets, newest first.
AGAINST_ORDER = ("janaf1998", "nasa2002-air", "eos-ideal", "nasa1993", "nuig2015")

#: tablegen species id -> CoolProp fluid name (HEOS backend). The ideal-gas
#: part of each equation is used only inside the range CoolProp states for it.
COOLPROP_FLUIDS = {
    "N2": "Nitrogen", "O2": "Oxygen", "Ar": "Argon", "CO2": "CarbonDioxide", "H2O": "Water",
    "CO": "CarbonMonoxide", "H2": "Hydrogen", "SO2": "SulfurDioxide", "H2S": "HydrogenSulfide",
    "NH3": "Ammonia", "COS": "CarbonylSulfide", "C2H4": "Ethylene", "He": "Helium", "Ne": "Neon",
    "Kr": "Krypton", "Xe": "Xenon", "N2O": "NitrousOxide", "HCl": "HydrogenChloride",
    "CH4": "Methane", "C2H6": "Ethane", "C3H8": "Propane", "n-C4H10": "n-Butane",
    "i-C4H10": "IsoButane", "n-C5H12": "n-Pentane", "i-C5H12": "Isopentane",
    "neo-C5H12": "Neopentane", "n-C6H14": "n-Hexane", "n-C7H16": "n-Heptane",
    "n-C8H18": "n-Octane", "C3H6": "Propylene", "cyclo-C3H6": "Cyclopropane",
    "CH3OH": "Methanol", "C2H5OH": "Ethanol", "C6H6": "Benzene", "C7H8": "Toluene",
    "D2": "Deuterium",
}

#: Keys of one [[agreement]] table, in the order written.
KEYS = ("species", "source", "against", "band_K", "n_points", "cp_max_rel", "cp_rms_rel",
        "dh_max_J_per_mol", "dh_rms_J_per_mol", "s0_max_J_per_molK", "s0_rms_J_per_molK",
        "s0_relative_to_298", "h298_diff_J_per_mol", "beyond_range_of")

#: Significant figures written to the file (the figures describe differences
#: of 1e-5 and up; more digits would only record floating-point noise).
DIGITS = 4

#: The evaluation each source stands for. A refit or a copy counts as the
#: evaluation it was made from: janaf1998 is the NIST-JANAF tables ("janaf", also
#: the id of the direct JANAF comparison in agreement-janaf.toml); eos-ideal and
#: CoolProp's cp0 are the ideal-gas parts of the reference equations of state
#: ("eos"; IAPWS-95 for water). Two sources of one evaluation are never
#: independent evidence of each other. A source not named here is its own.
EVALUATION_OF = {"janaf1998": "janaf", "janaf": "janaf", "eos-ideal": "eos", "coolprop": "eos",
                 "iapws95": "eos"}

#: Quality tier of each evaluation (1 is best), for the uncertainty budget
#: (docs/uncertainty.md): critically evaluated tables and reference equations
#: (NIST-JANAF 1998, NASA/TP-2002-211556, the reference equations' ideal-gas
#: parts) are tier 1; the 7-coefficient fits of NASA TM-4513, measured 1 % off
#: IAPWS-95 for H2O at 2000 K and 0.4 % off JANAF and CoolProp for CO2 at 1500 K
#: (gasdata/agreement.toml), tier 2; a mechanism's thermochemistry (nuig2015),
#: tier 3; a user's data set, tier 2 unless named here.
EVALUATION_TIER = {"janaf": 1, "eos": 1, "nasa2002-air": 1, "nasa1993": 2, "nuig2015": 3}


def evaluation_of(source: str) -> str:
    """The evaluation a source id stands for (EVALUATION_OF, else the id itself)."""
    return EVALUATION_OF.get(source, source)


def tier_of(evaluation: str) -> int:
    """Quality tier of an evaluation (EVALUATION_TIER; 2 for one not named there)."""
    return EVALUATION_TIER.get(evaluation, 2)


#: Two sources agree when, in every band both cover, cp differs by at most
#: AGREE_CP_REL and s° by at most AGREE_S0_J_PER_MOLK. Up to 3000 K the cp
#: limit is the 0.1 % promised for the default sources (docs/data-curation.md);
#: above 3000 K the evaluations rest on extrapolated anharmonic and
#: excited-state terms and 0.5 % is allowed (common practice: the stated
#: uncertainties of ideal-gas cp grow several-fold there).
AGREE_CP_REL = 1e-3
AGREE_CP_REL_HOT = 5e-3
HOT_K = 3000.0
AGREE_S0_J_PER_MOLK = 0.05

#: Preference order of the default rule's tie-break (see choose_default):
#: NIST-JANAF, the handbook that QA compares against, one self-consistent
#: network of enthalpies of formation for every flue-gas species; then the
#: newer NASA set, then the refits of the reference equations' ideal-gas parts
#: (reference quality where they hold, ahead of the 7-coefficient fits of TM-4513).
PREFERENCE = ("janaf1998", "nasa2002-air", "eos-ideal", "nasa1993", "nuig2015")


#: Upper temperature up to which the default rule compares the ranges of data sets
#: (2a): 6000 K, where the NASA and JANAF tabulations of the flue-gas species end;
#: beyond it lies the plasma range of the NASA 2002 air set.
RANGE_CAP_K = 6000.0


@dataclass(frozen=True, slots=True)
class Source:
    """One source of a species' properties, evaluable on arrays of T (K)."""

    id: str
    T_min: float
    T_max: float
    kind: str            # "dataset" or "coolprop"
    handle: object       # Record or CoolProp fluid name
    #: part of [T_min, T_max] where the source is the evaluation itself; outside it
    #: (an equation's ideal-gas part extrapolated beyond the equation's range) its
    #: figures are marked, and they count as evidence only about this source
    valid_K: tuple | None = None

    def values(self, T: np.ndarray) -> dict:
        """cp (J/(mol K)), dh = h - h(298.15) (J/mol), s0 (J/(mol K)) and h298."""
        if self.kind == "dataset":
            poly = self.handle.poly
            v = poly.evaluate(T)
            ref = poly.evaluate(np.array([T_REF]))
            return {"cp": v["cp"] * R_MOLAR, "dh": (v["h"] - ref["h"][0]) * R_MOLAR,
                    "s0": v["s"] * R_MOLAR, "s0_298": ref["s"][0] * R_MOLAR, "h298": ref["h"][0] * R_MOLAR}
        return coolprop_ideal(self.handle, T)


def _cp0(fluid: str, T: np.ndarray) -> np.ndarray:
    from CoolProp.CoolProp import PropsSI
    # cp0 of the ideal-gas part depends on T only; a tiny density selects the
    # single-phase branch without a flash.
    return np.asarray(PropsSI("Cp0molar", "T", T, "Dmolar", np.full_like(T, 1e-6), fluid), dtype=float)


_GL_X, _GL_W = np.polynomial.legendre.leggauss(8)


def coolprop_ideal(fluid: str, T) -> dict:
    """The ideal-gas part of CoolProp's equation of state of ``fluid`` at T (K), molar SI:
    cp0, dh = H(T) - H(298.15 K) and s0 = S(T) - S(298.15 K) (at fixed pressure), the
    last two by 8-point Gauss-Legendre quadrature of cp0 between the sorted nodes.
    Needs CoolProp (a development and test dependency, never imported at run time)."""
    T = np.asarray(T, dtype=float)
    nodes = np.unique(np.concatenate([T, [T_REF]]))
    a, b = nodes[:-1], nodes[1:]
    half, mid = (b - a) / 2, (b + a) / 2
    pts = mid[:, None] + half[:, None] * _GL_X[None, :]
    cp_pts = _cp0(fluid, pts.ravel()).reshape(pts.shape)
    seg_h = half * (cp_pts @ _GL_W)
    seg_s = half * ((cp_pts / pts) @ _GL_W)
    H = np.concatenate([[0.0], np.cumsum(seg_h)])
    S = np.concatenate([[0.0], np.cumsum(seg_s)])
    k_ref = int(np.searchsorted(nodes, T_REF))
    where = np.searchsorted(nodes, T)
    return {"cp": _cp0(fluid, T), "dh": H[where] - H[k_ref], "s0": S[where] - S[k_ref],
            "s0_298": 0.0, "h298": None}


def sources_of(species: str, lib=None) -> list[Source]:
    """Every source that holds ``species`` (a species id), reference order first."""
    from ..data.library import library
    lib = lib or library()
    out = []
    order = [d for d in AGAINST_ORDER if d in lib.shipped] + [d for d in lib.shipped if d not in AGAINST_ORDER]
    for d in order:
        r = lib.datasets[d].get(species)
        if r is not None and r.id == species:
            valid = r.extra.get("eos_T_range_K")
            valid = None if valid is None else (max(float(valid[0]), r.T_min), min(float(valid[1]), r.T_max))
            out.append(Source(d, r.T_min, r.T_max, "dataset", r, valid))
    fluid = COOLPROP_FLUIDS.get(species)
    if fluid is not None and out:
        from CoolProp.CoolProp import AbstractState
        st = AbstractState("HEOS", fluid)
        out.append(Source("coolprop", max(float(st.Tmin()), BANDS_K[0][0]), float(st.Tmax()), "coolprop", fluid))
    return out


def _sig(x: float) -> float:
    # below 1e-9 (J/mol, J/(mol K) or relative) a difference is rounding noise
    return 0.0 if abs(x) < 1e-9 else float(f"{x:.{DIGITS}g}")


def compare(src: Source, ref: Source, species: str) -> list[dict]:
    """Figures of one pair, one dict per band both sources cover (≥ 2 grid points)."""
    lo_all, hi_all = max(src.T_min, ref.T_min), min(src.T_max, ref.T_max)
    rel298 = src.kind == "coolprop" or ref.kind == "coolprop"
    rows = []
    cuts = {x for band in BANDS_K for x in band}
    for s_ in (src, ref):
        if s_.valid_K is not None:
            cuts |= set(s_.valid_K)
    cuts = sorted(cuts)
    for lo, hi in zip(cuts[:-1], cuts[1:]):
        a, b = max(lo, lo_all), min(hi, hi_all)
        if b - a < STEP_K:
            continue
        beyond = [s_.id for s_ in (src, ref) if s_.valid_K is not None and
                  not (s_.valid_K[0] - 1e-9 <= a and b <= s_.valid_K[1] + 1e-9)]
        T = np.arange(math.ceil(a / STEP_K) * STEP_K, b + 1e-9, STEP_K)
        T = np.unique(np.concatenate([[a], T, [b]]))
        v, w = src.values(T), ref.values(T)
        rel = v["cp"] / w["cp"] - 1
        dh = v["dh"] - w["dh"]
        if rel298:
            ds = (v["s0"] - v["s0_298"]) - (w["s0"] - w["s0_298"])
        else:
            ds = v["s0"] - w["s0"]
        row = {
            "species": species, "source": src.id, "against": ref.id, "band_K": [float(a), float(b)],
            "n_points": int(T.size),
            "cp_max_rel": _sig(np.max(np.abs(rel))), "cp_rms_rel": _sig(np.sqrt(np.mean(rel ** 2))),
            "dh_max_J_per_mol": _sig(np.max(np.abs(dh))), "dh_rms_J_per_mol": _sig(np.sqrt(np.mean(dh ** 2))),
            "s0_max_J_per_molK": _sig(np.max(np.abs(ds))), "s0_rms_J_per_molK": _sig(np.sqrt(np.mean(ds ** 2))),
            "s0_relative_to_298": rel298,
        }
        if not rel298:
            row["h298_diff_J_per_mol"] = _sig(v["h298"] - w["h298"])
        if beyond:
            row["beyond_range_of"] = beyond
        rows.append(row)
    return rows


def species_with_several_sources(lib=None) -> list[str]:
    """Ids held by at least two shipped data sets, or by one and CoolProp."""
    from ..data.library import library
    lib = lib or library()
    count: dict[str, int] = {}
    for d in lib.shipped:
        for sid in lib.datasets[d].ids:
            count[sid] = count.get(sid, 0) + 1
    return sorted(s for s, n in count.items() if n >= 2 or (n == 1 and s in COOLPROP_FLUIDS))


def figures_for(species: str, lib=None) -> list[dict]:
    """All pair figures of one species: each source against each earlier one."""
    srcs = sources_of(species, lib)
    rows = []
    for j, src in enumerate(srcs):
        for ref in srcs[:j]:
            if evaluation_of(src.id) != evaluation_of(ref.id):   # a refit against its own source: no evidence
                rows.extend(compare(src, ref, species))
    return rows


def all_figures(lib=None) -> list[dict]:
    rows = []
    for sid in species_with_several_sources(lib):
        rows.extend(figures_for(sid, lib))
    return rows


# ------------------------------------------------------------- agreement rule
def agrees(rows: list[dict], a: str, b: str) -> bool | None:
    """Do sources a and b agree (every shared band within AGREE_*)? None if never compared."""
    # bands where one side is an equation's ideal-gas part beyond its range do not count
    pair = [r for r in rows if {r["source"], r["against"]} == {a, b} and not r.get("beyond_range_of")]
    if not pair:
        return None
    return all(r["cp_max_rel"] <= (AGREE_CP_REL if r["band_K"][1] <= HOT_K else AGREE_CP_REL_HOT)
               and r["s0_max_J_per_molK"] <= AGREE_S0_J_PER_MOLK for r in pair)


def choose_default(species: str, rows: list[dict], candidates: list[str],
                   T_max: dict | None = None) -> tuple[str, str, bool]:
    """Default data set of a species by the written rule; (source, reason, sources_agree).

    Rule (gasdata/defaults.toml header, docs/data-curation.md):
      1. Two sources agree when, in every band both cover, cp differs by at
         most 0.1 % (0.5 % above 3000 K) and s° by at most 0.05 J/(mol K);
         bands where one is an equation's ideal-gas part beyond the
         equation's range do not count.
      2. Among the data sets that hold the species, take the one that agrees
         with the most other evaluations (data sets and the CoolProp equation
         of state, an independent reference; two sources of one evaluation,
         such as eos-ideal and CoolProp, count once and are not compared).
      2a. A data set whose range ends below another candidate's is taken only
         where every candidate of the widest range agrees with no other
         evaluation: a default never narrows the temperature range a user
         gets while a wider source is supported by another evaluation.
      3. On a tie, or where no source agrees with another, take the first in
         PREFERENCE: one consistent thermochemical network (JANAF) for as many
         species as possible, so the enthalpies of formation of a mixture's
         species come from one evaluation.
    ``sources_agree`` is False when the chosen set agrees with no other
    source: the species' uncertainty must then be stated wider.
    """
    ids = list(dict.fromkeys([*candidates, *[r["source"] for r in rows], *[r["against"] for r in rows]]))
    if len(ids) == 1:
        return candidates[0], "the only source", False
    mates = {c: [o for o in ids if o != c and agrees(rows, c, o)] for c in candidates}
    # agreement with two sources of one evaluation (eos-ideal and coolprop) counts once
    count = {c: len({evaluation_of(o) for o in m}) for c, m in mates.items()}
    eligible = list(candidates)
    narrow = []
    if T_max:
        widest = max(T_max[c] for c in candidates)
        wide = [c for c in candidates if T_max[c] >= widest - 1e-9]
        if any(count[c] > 0 for c in wide):
            narrow = [c for c in candidates if c not in wide]
            eligible = wide
    best_n = max(count[c] for c in eligible)
    top = [c for c in eligible if count[c] == best_n]
    rank = {d: k for k, d in enumerate(PREFERENCE)}
    pick = min(top, key=lambda c: (rank.get(c, len(rank)), c))
    within = (f"cp within {AGREE_CP_REL * 100:g} % to {HOT_K:g} K and {AGREE_CP_REL_HOT * 100:g} % above, "
              f"s° within {AGREE_S0_J_PER_MOLK:g} J/(mol K)")
    others = [o for o in ids if o != pick]
    disagree = [o for o in others if agrees(rows, pick, o) is False]
    if best_n == 0:
        return pick, (f"no two sources agree ({within}; compared: {', '.join(ids)}): the first of the "
                      f"preference order is taken and the uncertainty must be stated wider"), False
    reason = f"agrees with {', '.join(mates[pick])} ({within} in every shared band)"
    tied = [c for c in top if c != pick]
    if tied:
        reason += f"; tied with {', '.join(tied)}, taken by the preference order"
    if disagree:
        reason += f"; differs from {', '.join(disagree)}"
    if narrow:
        reason += (f"; {', '.join(narrow)} not taken: its range ends below {T_max[pick]:g} K while "
                   f"{pick} agrees with another evaluation")
    return pick, reason, True


# ------------------------------------------------------------- shipped file
def shipped_path() -> Path:
    from ..data.library import gasdata_dir
    return gasdata_dir() / "agreement.toml"


def load_shipped(path: Path | None = None) -> list[dict]:
    """The [[agreement]] tables of gasdata/agreement.toml (empty if the file is absent)."""
    p = path or shipped_path()
    if not p.is_file():
        return []
    try:
        return tomllib.loads(p.read_text(encoding="utf-8")).get("agreement", [])
    except tomllib.TOMLDecodeError as e:
        raise DataError(f"{p}: not valid TOML ({e})") from None


def for_species(species: str, path: Path | None = None) -> list[dict]:
    """Shipped figures of one species id; NameLookupError if it has none."""
    rows = [r for r in load_shipped(path) if r["species"] == species]
    if not rows:
        known = sorted({r["species"] for r in load_shipped(path)})
        raise NameLookupError(f"no agreement figures for {species!r}; species with several sources: "
                              f"{', '.join(known)}")
    return rows


# ------------------------------------------------------------- writing
AGREEMENT_HEADER = """\
# tablegen agreement figures: how far the sources of each species' ideal-gas
# properties agree. Written by tools/agreement.py (tablegen/calc/agreement.py); do
# not edit by hand: the tests recompute every figure and compare.
#
# How they were made: for every species held by more than one source (the
# shipped coefficient sets nasa1993, janaf1998, nasa2002-air, nuig2015, and
# the ideal-gas part cp0 of the CoolProp {coolprop} equation of state of the
# fluid inside the temperature range CoolProp states for that equation), each
# source is compared with each source before it in the order janaf1998,
# nasa2002-air, nasa1993, nuig2015 ("against"), on a {step:g} K grid inside
# each band 200-1000, 1000-2000, 2000-3000 and 3000-6000 K clipped to the
# range both cover (band_K gives the part actually compared; n_points the
# grid points). Figures, max and rms over the grid:
#   cp_*_rel          (cp_source - cp_against) / cp_against
#   dh_*_J_per_mol    difference of h(T) - h(298.15 K)
#   s0_*_J_per_molK   difference of s°(T) at 1 bar; where s0_relative_to_298
#                     is true (CoolProp, whose entropy zero is arbitrary), the
#                     difference of s°(T) - s°(298.15 K)
#   h298_diff_J_per_mol  (data sets only) difference of h(298.15 K), that is
#                     of the enthalpies of formation
# CoolProp h and s° are integrals of its cp0 from 298.15 K (8-point
# Gauss-Legendre per grid step). janaf1998 stands for the NIST-JANAF tables
# through its refit, which adds at most the fit_residuals stated in each of
# its records (cp within 0.04 %). Figures are rounded to {digits} significant
# figures.
"""

DEFAULTS_HEADER = """\
# tablegen default source per species. Written by tools/agreement.py from
# gasdata/agreement.toml by the rule below; do not edit by hand. A user's data
# set, a spec's source or --source NAME overrides these defaults.
#
# The rule (also in docs/data-curation.md):
#  1. Two sources agree when, in every temperature band both cover
#     (agreement.toml), cp differs by at most {cp:g} % ({cp_hot:g} % above {hot:g} K) and
#     s° by at most {s0:g} J/(mol K).
#     Bands where one source is an equation's ideal-gas part beyond the
#     equation's range (beyond_range_of in agreement.toml) do not count.
#  2. Among the data sets that hold the species, the default is the one that
#     agrees with the most other evaluations, counting the other data sets and
#     the CoolProp equation of state's ideal-gas part (an independent
#     reference); two sources of one evaluation (eos-ideal, the refit of the
#     CoolProp ideal-gas parts, and CoolProp itself) count once.
#     A data set whose range ends below another's (compared up to 6000 K) is
#     taken only where every data set of the widest range agrees with no
#     other evaluation.
#  3. On a tie, or where no source agrees with another, the first of
#       {pref}
#     NIST-JANAF first: the handbook QA compares against, and one
#     self-consistent network of enthalpies of formation for every flue-gas
#     species, so a mixture's species share one evaluation; then the newer
#     NASA set; then the reference equations' ideal-gas parts (eos-ideal),
#     ahead of the 7-coefficient fits of TM-4513.
#  sources_agree = false marks a default that agrees with no other source:
#  the sources disagree and the stated uncertainty must be wider.
"""


def defaults_from(rows: list[dict], lib=None) -> dict:
    """{species id: {source, reason, sources_agree, candidates}} for species in two or more data sets."""
    from ..data.library import library
    lib = lib or library()
    out = {}
    for sid in sorted({r["species"] for r in rows}):
        srcs = [s for s in sources_of(sid, lib) if s.kind == "dataset"]
        cands = [s.id for s in srcs]
        if len(cands) < 2:
            continue
        mine = [r for r in rows if r["species"] == sid]
        src, reason, ok = choose_default(sid, mine, cands, {s.id: min(s.T_max, RANGE_CAP_K) for s in srcs})
        out[sid] = {"source": src, "reason": reason, "sources_agree": ok, "candidates": cands}
    return out


def render_agreement(rows: list[dict]) -> str:
    import CoolProp
    from ..data.tomlout import table
    text = [AGREEMENT_HEADER.format(coolprop=CoolProp.__version__, step=STEP_K, digits=DIGITS)]
    for r in rows:
        text.append(table("agreement", {k: r[k] for k in KEYS if k in r}, array=True))
    return "\n".join(text)


def render_defaults(defaults: dict) -> str:
    from ..data.tomlout import _key, table
    text = [DEFAULTS_HEADER.format(cp=AGREE_CP_REL * 100, cp_hot=AGREE_CP_REL_HOT * 100, hot=HOT_K,
                                   s0=AGREE_S0_J_PER_MOLK, pref=", ".join(PREFERENCE))]
    for sid, d in defaults.items():
        text.append(table(f"species.{_key(sid)}", d))
    return "\n".join(text)
