"""Refit the ideal-gas parts of the reference equations of state into NASA 9-coefficient records.

Reads, at development time, the ideal-gas part (cp0) of the reference equation of
state of each natural-gas component as the CoolProp package implements it
(I. H. Bell et al., Ind. Eng. Chem. Res. 53 (2014) 2498), fits cp(T) with
tablegen.calc.fitting (the same processor-independent solver as tools/refit_janaf.py)
and writes gasdata/eos-ideal.toml. CoolProp is needed only to run this tool; the
written file is plain data.

Per record:

* range: 200 K to the larger of 1500 K and the upper temperature CoolProp states
  for the equation. Outside the equation's own range (eos_T_range_K) the
  ideal-gas part is extrapolated; the record says so, the agreement figures mark
  those bands (beyond_range_of) and the uncertainty budget never uses them as
  evidence about another source. Below the equation's lower limit (its triple
  point) the ideal-gas part of the dilute gas still holds: its Planck-Einstein
  terms vanish towards low temperature.
* cp fitted on a 10 K grid; h and s° by exact integration from anchors at
  298.15 K, because an equation of state's ideal-gas part fixes neither the
  enthalpy of formation nor the third-law entropy: ΔfH° and S°(298.15 K) are
  those of NIST-JANAF (the janaf1998 records, which hold JANAF's values exactly)
  where JANAF has the species, else of NASA TM-4513, else of the NUIG 2015 set;
  ``anchors_from`` names which.
* residuals against the ideal-gas part's cp and its integrals h - h(298.15 K) and
  s° - s°(298.15 K) at every grid point, from the coefficients as written (rounded
  to 15 significant figures), rounded up to two significant figures.
* the equation of state is cited from the BibTeX library CoolProp carries
  (CoolPropBibTeXLibrary.bib), by author, year, journal, volume and pages.

Left out: n-nonane, n-decane and isohexane, which CoolProp carries but for which
no shipped data set gives ΔfH° and S°(298.15 K) to anchor them.

Run from the project root:  python3 tools/refit_eos_ideal.py  [--only C2H6,C3H8]
"""

from __future__ import annotations

import re
import sys
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(ROOT / "tools"))
from refit_janaf import (COEFFICIENT_DIGITS, record_head, refit_arguments, round_significant,  # noqa: E402
                         stated_residuals, write_dataset)
from tablegen.calc.agreement import coolprop_ideal  # noqa: E402
from tablegen.data.library import library  # noqa: E402
from tablegen.calc.fitting import FitError, fit_cp_table, residuals_against  # noqa: E402
from tablegen.thermo.polynomial import NINE, Polynomial  # noqa: E402
from tablegen.core.constants import R_MOLAR, T_REF  # noqa: E402

#: tablegen species id -> CoolProp fluid: the components of natural gas in the
#: GERG-2008 set (ISO 20765-2) that the shipped data sets can anchor, and neopentane
#: (ISO 6976).
SPECIES = {
    "CH4": "Methane", "C2H6": "Ethane", "C3H8": "n-Propane", "n-C4H10": "n-Butane",
    "i-C4H10": "IsoButane", "n-C5H12": "n-Pentane", "i-C5H12": "Isopentane",
    "neo-C5H12": "Neopentane", "n-C6H14": "n-Hexane", "n-C7H16": "n-Heptane",
    "n-C8H18": "n-Octane", "H2S": "HydrogenSulfide", "N2": "Nitrogen", "CO2": "CarbonDioxide",
    "O2": "Oxygen", "CO": "CarbonMonoxide", "H2": "Hydrogen", "H2O": "Water", "He": "Helium",
    "Ar": "Argon",
}

#: Data sets whose 298.15 K values anchor the refits, in order of preference.
ANCHOR_SETS = ("janaf1998", "nasa1993", "nuig2015")

T_LO = 200.0
T_EXTEND = 1500.0
STEP_K = 10.0

#: Residual target: worst |Δcp|/cp 5e-5 at the grid points (a fifth of the 0.02-0.03 %
#: at which the best independent evaluations agree, so the refit adds little to their
#: spread) and |Δs°| 0.001 J/(mol K) against the integral of cp0, which is measured,
#: not fitted, and catches a fit that wiggles between the points.
TARGET = {"cp_max_rel": 5e-5, "s_max_J_per_molK": 1e-3}


def bibliography() -> dict:
    """BibTeX key -> 'Authors, Title, Journal Volume (Year) Pages' from CoolProp's library."""
    import CoolProp
    text = (Path(CoolProp.__file__).parent / "CoolPropBibTeXLibrary.bib").read_text(encoding="utf-8",
                                                                                  errors="replace")
    out = {}
    for m in re.finditer(r"@\w+\{([^,]+),(.*?)\n\}", text, re.S):
        fields = {k.lower(): re.sub(r"[{}]", "", v).strip()
                  for k, v in re.findall(r"(\w+)\s*=\s*(\{.*?\})\s*,?\s*\n", m.group(2) + "\n", re.S)}
        parts = [fields.get("author", "").replace(" and ", ", "), fields.get("title", "")]
        where = " ".join(x for x in (fields.get("journal", ""), fields.get("volume", "")) if x)
        if fields.get("year"):
            where += f" ({fields['year']})"
        if fields.get("pages"):
            where += f" {fields['pages']}"
        if fields.get("note"):
            where += f" ({fields['note']})"
        out[m.group(1).strip()] = ", ".join(p for p in (*parts, where.strip()) if p).replace("\\ss", "ß")
    return out


def citation(fluid: str, bib: dict) -> str:
    import CoolProp.CoolProp as CP
    keys = [k.strip() for k in CP.get_BibTeXKey(fluid, "EOS").split(",") if k.strip()]
    text = "; ".join(bib.get(k, k) for k in keys)
    cp0 = [k.strip() for k in CP.get_BibTeXKey(fluid, "CP0").split(",") if k.strip()]
    if cp0:
        text += "; ideal-gas part: " + "; ".join(bib.get(k, k) for k in cp0)
    return text


def anchors(lib, sid: str):
    """(data set, h(298.15 K) J/mol, s°(298.15 K) J/(mol K), base record) of the first anchor set."""
    for d in ANCHOR_SETS:
        r = lib.datasets[d].get(sid) if d in lib.datasets else None
        if r is not None and r.id == sid:
            e = r.poly.evaluate(np.array([T_REF]))
            return d, float(e["h"][0] * R_MOLAR), float(e["s"][0] * R_MOLAR), r
    raise SystemExit(f"{sid}: no shipped data set gives ΔfH° and S°(298.15 K)")


def fit_one(sid: str, fluid: str, lib, bib: dict) -> dict:
    import CoolProp.CoolProp as CP
    T_min_eos, T_max_eos = float(CP.PropsSI("Tmin", fluid)), float(CP.PropsSI("Tmax", fluid))
    T_hi = max(T_EXTEND, T_max_eos)
    T = np.arange(T_LO, T_hi + 1e-9, STEP_K)
    ref = coolprop_ideal(fluid, T)
    src, h298, s298, base = anchors(lib, sid)
    fit, last = None, None
    for bp in ([1000.0], None):     # the NASA breakpoint first, then the search
        try:
            fit = fit_cp_table(T, ref["cp"], breakpoints=bp, h298_J_per_mol=h298, s298_J_per_molK=s298,
                               target=TARGET, check_dh_J_per_mol=ref["dh"], check_s_J_per_molK=s298 + ref["s0"])
            break
        except FitError as e:
            last = e
    if fit is None:
        raise SystemExit(f"{sid}: no acceptable fit ({last})")
    coefficients = [[round_significant(c) for c in row] for row in fit.coefficients]
    poly = Polynomial(np.array(fit.T_bounds), np.array(coefficients), NINE)
    res = residuals_against(poly, T, ref["cp"], dh_J_per_mol=ref["dh"], s_J_per_molK=s298 + ref["s0"])
    beyond = []
    if T_min_eos > T_LO:
        beyond.append(f"below {T_min_eos:g} K")
    if T_hi > T_max_eos:
        beyond.append(f"above {T_max_eos:g} K")
    note = (f"ideal-gas part of the reference equation of state (CoolProp fluid {fluid}), refit "
            f"{T_LO:g}-{T_hi:g} K; the equation holds {T_min_eos:g}-{T_max_eos:g} K"
            + (f", its ideal-gas part is extrapolated {' and '.join(beyond)}" if beyond else "")
            + f"; ΔfH° and S°(298.15 K) from {src}")
    rec = {
        **record_head(base, fit.T_bounds, coefficients, round(h298, 6)),
        "source": "eos-ideal",
        "source_note": note,
        "equation_of_state": citation(fluid, bib),
        "coolprop_fluid": fluid,
        "eos_T_range_K": [T_min_eos, T_max_eos],
        "anchors_from": src,
        "fit_T_range_K": [float(T[0]), float(T[-1])],
        "fit_n_points": int(T.size),
        "fit_method": "cp0 fitted; h and s° by exact integration from the anchors at 298.15 K",
        "fit_target": {("s0_max_J_per_molK" if k == "s_max_J_per_molK" else k): v for k, v in TARGET.items()},
        "fit_residuals": stated_residuals(res),
    }
    print(f"{sid:9s} {fluid:15s} bounds {fit.T_bounds}  {fit.describe()}", file=sys.stderr)
    return rec


def main(argv=None) -> int:
    import CoolProp
    out, only = refit_arguments(argv, "Refit the reference equations' ideal-gas parts into "
                                      "gasdata/eos-ideal.toml", "eos-ideal.toml", SPECIES)
    lib = library()
    bib = bibliography()
    records = [fit_one(sid, fluid, lib, bib) for sid, fluid in SPECIES.items() if not only or sid in only]
    header = {
        "id": "eos-ideal",
        "title": ("Ideal-gas parts of the reference equations of state of natural-gas components, "
                  "refit to the NASA 9-coefficient form"),
        "citation": ("the reference equation of state named in each record (equation_of_state), its "
                     "ideal-gas part as implemented in CoolProp: " + bib.get("Bell-IECR-2014", "CoolProp")
                     + "; NASA 9-coefficient refit by tablegen"),
        "published": "see each record's equation_of_state",
        "reference_pressure_Pa": 100000.0,
        "gas_constant_of_fit_J_per_mol_K": R_MOLAR,
        "values_from": f"CoolProp {CoolProp.__version__} (PyPI), cp0 of each fluid's equation of state",
        "fitted_by": ("tools/refit_eos_ideal.py with tablegen.calc.fitting (constrained least squares in a "
                      "Chebyshev basis per interval, processor-independent arithmetic)"),
        "coefficient_digits": COEFFICIENT_DIGITS,
        "note_field": ("equation of state, its range, where the ideal-gas part is extrapolated, and the "
                       "set whose 298.15 K values anchor h and s°"),
        "residuals_note": ("fit_residuals are the worst and rms differences from the ideal-gas part's cp0 "
                           "and its integrals h - h(298.15 K) and s° - s°(298.15 K) on the fitted 10 K grid, "
                           "rounded up to two significant figures"),
    }
    write_dataset(out, header, records, "tools/refit_eos_ideal.py from the CoolProp package")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
