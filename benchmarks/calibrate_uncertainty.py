"""Held-out calibration of the stated data uncertainty (run by hand:
python3 benchmarks/calibrate_uncertainty.py).

For each reference R (NIST-JANAF, the IAPWS-95 ideal-gas part, the ideal-gas
parts of CoolProp's reference equations of state) the data part of the budget is
rebuilt without R and checked against R (tablegen.calc.calibration): the share of R's
points inside U (k = 2) and the median of U / |deviation|. Printed: the default
sources of N2, O2, CO, Ar, CO2, H2O, SO2 over 200-3000 K, and, as a check of the
budget of a less accurate set, NASA TM-4513 (nasa1993) against CoolProp for 20
fluids. Needs the test extra (janaf, iapws, CoolProp). The figures go into
docs/uncertainty.md; tests/test_calibration.py asserts the targets.
"""

import sys
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))
from tablegen.calc import calibration as cal  # noqa: E402
from tablegen.data.library import library  # noqa: E402

NASA1993_FLUIDS = ("N2", "O2", "Ar", "CO2", "H2O", "CH4", "CO", "H2", "C2H6", "C3H8", "NH3", "SO2",
                   "He", "N2O", "H2S", "C2H4", "Ne", "HCl", "Kr", "Xe")
NOBLE = ("He", "Ne", "Ar", "Kr", "Xe")


def fmt(c):
    r = "n/a" if not np.isfinite(c.median_ratio) else f"{c.median_ratio:.3g}"
    return f"{c.coverage * 100:5.1f} % / {r:>6s}"


def main():
    lib = library()
    print("Default sources, each reference held out: points within U / median U÷|deviation|")
    print(f"{'species':8s} {'printed':10s} {'held out':9s} {'n':>3s}  {'cp':>16s}  {'dh':>16s}  {'ds':>16s}")
    for sid in cal.TARGET_SPECIES:
        for ref in cal.REFERENCES:
            ch = cal.held_out(sid, ref)
            if ch:
                print(f"{sid:8s} {lib.record(sid).dataset:10s} {ref:9s} {ch[0].n:3d}  "
                      + "  ".join(f"{fmt(c):>16s}" for c in ch))
    print()
    print("NASA TM-4513 (nasa1993) printed, CoolProp's ideal-gas parts held out")
    pooled = {q: [] for q in ("cp", "dh", "ds")}
    for sid in NASA1993_FLUIDS:
        ch = cal.held_out(sid, "eos", source="nasa1993")
        print(f"{sid:8s} n={ch[0].n:3d}  " + "  ".join(f"{c.quantity} {fmt(c)}" for c in ch))
        for c in ch:
            pooled[c.quantity].append(c)
    for q, cs in pooled.items():
        cov = sum(c.coverage * c.n for c in cs) / sum(c.n for c in cs)
        med = np.median([c.median_ratio for c in cs if c.species not in NOBLE])
        print(f"  {q}: {cov * 100:.1f} % of all points within U; median over fluids (noble gases "
              f"left out) of the median U÷|deviation|: {med:.2f}")


if __name__ == "__main__":
    main()
