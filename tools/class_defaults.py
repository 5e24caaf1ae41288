"""Derive the class-default uncertainties of tablegen/calc/evidence.py from JANAF.

For each species class, the shipped NASA TM-4513 functions (gasdata/nasa1993.toml)
are compared with the JANAF Thermochemical Tables, 4th edition (M. W. Chase,
J. Phys. Chem. Ref. Data Monograph 9, 1998), as shipped by the `janaf` package
(PyPI), at the tabulated temperatures from 200 K.  Per species and temperature
bin (<= 1000 K, 1000-3000 K, > 3000 K) the largest relative difference of cp,
of H(T)-H(298.15) and of S(T)-S(298.15) is taken; the class figure is the
mean of those maxima over the class's species, divided by sqrt(3) (the maximum as half-width of a rectangular
distribution).  dh and ds differences are relative to |dh| and |ds| at the
same temperature, from 100 K away from 298.15 K (where both vanish).  CoolProp is not
used here, so the calibration test against CoolProp stays independent.

The figures in CLASS_DEFAULTS are these, rounded up to two significant digits
and made non-decreasing with temperature (running maximum over the bins);
where JANAF agrees to its printed digits (noble gases), the gas-constant
floor 5e-6 is used.

Run from the project root:  python tools/class_defaults.py   (prints a table)
Needs: janaf (tools only, never at run time).
"""

from __future__ import annotations

import math
import sys
import warnings
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))
from tablegen.data.library import library  # noqa: E402
from tablegen.calc.evidence import species_class  # noqa: E402

from tablegen.core.constants import R_MOLAR as R  # noqa: E402
#: tablegen id -> JANAF table index (janaf package)
JANAF = {
    "Ar": "Ar-001", "He": "He-001", "Ne": "Ne-001",
    "O": "O-001", "N": "N-002", "H": "H-001", "C": "C-003",
    "N2": "N-023", "O2": "O-029", "H2": "H-050", "CO": "C-093", "HCl": "Cl-026", "HF": "F-005",
    "OH": "H-038", "NO": "N-005", "CH": "C-043", "CN": "C-080",
    "CO2": "C-095", "H2O": "H-064", "NH3": "H-083", "SO2": "O-034", "N2O": "N-026", "H2S": "H-080",
    "HCN": "C-052", "SO3": "O-058", "COS": "C-094", "CH2O": "C-061",
    "NO2": "N-007", "HO2": "H-043", "CH3": "C-062", "HCO": "C-054",
    "CH4": "C-067", "C2H2": "C-127", "C2H4": "C-128",
}
BINS = ((200.0, 1000.0), (1000.0, 3000.0), (3000.0, 6000.0))


#: Floor of the figures: the gas constants of the fits (uncertainty.CP_FLOOR_REL / 2).
FLOOR = 5e-6


def round_up2(x: float) -> float:
    """x rounded up to two significant digits."""
    if x <= 0:
        return 0.0
    e = math.floor(math.log10(x)) - 1
    return float(f"{math.ceil(x / 10 ** e - 1e-9) * 10 ** e:.2g}")


def derive(per_class: dict | None = None) -> dict:
    """class -> {"cp_rel", "dh_rel", "ds_rel"}: three bins each, as CLASS_DEFAULTS holds them
    (mean of maxima / sqrt 3, rounded up to two significant digits, at least FLOOR,
    non-decreasing with temperature)."""
    per_class = per_class if per_class is not None else measure()
    out: dict = {}
    for cls in sorted({c for c, _ in per_class}):
        figs = {}
        for j, what in enumerate(("cp_rel", "dh_rel", "ds_rel")):
            vals, run = [], 0.0
            for b in range(len(BINS)):
                rows = per_class.get((cls, b))
                u = float(np.nanmean([r[1 + j] for r in rows])) / math.sqrt(3) if rows else 0.0
                run = max(run, max(round_up2(u), FLOOR))
                vals.append(run)
            figs[what] = tuple(vals)
        out[cls] = figs
    return out


def measure() -> dict:
    """(class, bin) -> [(species, max |dcp|/cp, max |ddh|/|dh|, max |dds|/|ds|, last T)]."""
    import janaf
    warnings.filterwarnings("ignore")
    lib = library()
    per_class: dict = {}
    for sid, idx in JANAF.items():
        rec = lib.record(sid, source="nasa1993")   # TM-4513 itself, not the species' default
        df = janaf.Table(idx).df
        T = df["T(K)"].to_numpy()
        cp = df["Cp"].to_numpy()
        dh = df["H-H(Tr)"].to_numpy() * 1e3
        S = df["S"].to_numpy()
        m = (T >= max(200.0, rec.T_min)) & (T <= rec.T_max) & np.isfinite(cp)
        i298 = int(np.argmin(np.abs(T - 298.15)))
        ds = S - S[i298]
        e = rec.poly.evaluate(np.concatenate([[298.15], T[m]]))
        mcp = e["cp"][1:] * R
        mdh = (e["h"][1:] - e["h"][0]) * R
        mds = (e["s"][1:] - e["s"][0]) * R
        cls = species_class(rec.elements, rec.id)
        for b, (lo, hi) in enumerate(BINS):
            k = (T[m] > lo - 1e-9) & (T[m] <= hi)
            if k.sum() < 2:
                continue
            Tk = T[m][k]
            # JANAF prints cp and S to 0.001 J/(mol K) and H - H(298.15) to
            # 0.001 kJ/mol: half a unit of that (twice for S(T) - S(298.15))
            # is table rounding, not disagreement, and is taken off.
            f_cp = np.max(np.maximum(np.abs(mcp[k] - cp[m][k]) - 0.0005, 0) / cp[m][k])
            far = np.abs(Tk - 298.15) >= 100.0      # dh, ds vanish at 298.15 K
            if np.any(far):
                f_dh = np.max(np.maximum(np.abs(mdh[k][far] - dh[m][k][far]) - 0.5, 0)
                              / np.abs(dh[m][k][far]))
                f_ds = np.max(np.maximum(np.abs(mds[k][far] - ds[m][k][far]) - 0.001, 0)
                              / np.abs(ds[m][k][far]))
            else:
                f_dh = f_ds = 0.0
            per_class.setdefault((cls, b), []).append((sid, f_cp, f_dh, f_ds, Tk[-1]))
    return per_class


def main() -> int:
    per_class = measure()
    print("class, bin, n, u_cp_rel, u_dh_rel, u_ds_rel (mean of maxima / sqrt 3), species")
    for (cls, b), rows in sorted(per_class.items()):
        arr = np.array([r[1:4] for r in rows])
        u = np.nanmean(arr, axis=0) / math.sqrt(3)
        print(f"{cls:22s} {BINS[b][0]:.0f}-{BINS[b][1]:.0f} K  n={len(rows):2d}  "
              f"{u[0]:.2e} {u[1]:.2e} {u[2]:.2e}  "
              + " ".join(f"{r[0]}:{r[1]:.1e}" for r in rows))
    print("\nCLASS_DEFAULTS figures (rounded up to two digits, floor 5e-6, non-decreasing):")
    for cls, figs in derive(per_class).items():
        print(f"  {cls:22s} " + "  ".join(f"{k} {v}" for k, v in figs.items()))
    return 0


if __name__ == "__main__":
    sys.exit(main())
