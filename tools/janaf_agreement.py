"""Agreement of the NASA TM-4513 functions with the JANAF tables, per species and band.

Writes gasdata/agreement-janaf.toml in the agreement format of
gasdata/agreement.toml ([[agreement]] tables: species, source, against,
band_K, n_points, cp_max_rel, cp_rms_rel, dh_max_J_per_mol, dh_rms_J_per_mol,
s0_max_J_per_molK, s0_rms_J_per_molK), comparing every gaseous species of
gasdata/nasa1993.toml that the JANAF Thermochemical Tables, 4th edition
(M. W. Chase, J. Phys. Chem. Ref. Data Monograph 9, 1998; the copy shipped by
the `janaf` package on PyPI) hold under the same Hill formula, at JANAF's
tabulated temperatures from 200 K:

* cp relative difference; dh = [H(T) - H(298.15)] difference, J/mol;
  s0 = [S(T) - S(298.15)] difference, J/(mol K) (absolute S°(298.15) is the
  business of the CODATA key values).
* A formula matches when JANAF has exactly one gas table for it and the two
  S°(298.15) agree within 3 J/(mol K) (a different isomer or state would not);
  ions are skipped.

Run from the project root:  python tools/janaf_agreement.py
Needs: janaf (tools only, never at run time).
"""

from __future__ import annotations

import sys
import warnings
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))
from tablegen.data.library import library  # noqa: E402
from tablegen.data.tomlout import table  # noqa: E402
from tablegen.calc.evidence import BAND_EDGES_K  # noqa: E402

from tablegen.core.constants import R_MOLAR as R  # noqa: E402
S_MATCH = 3.0   # J/(mol K): identity check of a formula match


def hill(elements: dict) -> str:
    def part(el):
        n = elements[el]
        return el if n == 1 else f"{el}{int(n) if float(n).is_integer() else n}"
    els = list(elements)
    if "C" in elements:
        order = ["C"] + (["H"] if "H" in elements else []) + sorted(e for e in els if e not in ("C", "H"))
    else:
        order = sorted(els)
    return "".join(part(e) for e in order)


def main() -> int:
    import janaf
    import polars as pl
    warnings.filterwarnings("ignore")
    db = janaf.db.filter(pl.col("phase").is_in(["g", "ref"]))
    by_formula: dict = {}
    for idx, formula, phase in db.select(["index", "formula", "phase"]).rows():
        by_formula.setdefault(formula, []).append(idx)
    lib = library()
    ds_nasa = lib.datasets["nasa1993"]
    out = [
        "# Agreement of gasdata/nasa1993.toml with the JANAF tables (4th ed., 1998), per species\n"
        "# and temperature band.  Written by tools/janaf_agreement.py; do not edit by hand.\n"
        "# Format: that of gasdata/agreement.toml.\n\n",
        table("source", {"citation": "M. W. Chase, Jr., NIST-JANAF Thermochemical Tables, 4th ed., "
                                      "J. Phys. Chem. Ref. Data Monograph 9, 1998",
                         "copy": f"janaf package {getattr(janaf, '__version__', '')} (PyPI)"}) + "\n",
    ]
    n = 0
    for rec in ds_nasa.records():
        if rec.id.endswith(("+", "-")) or rec.phase != "gas" or any(k in ("E", "e") for k in rec.elements):
            continue
        idxs = by_formula.get(hill(rec.elements), [])
        gas = [i for i in idxs]
        if len(gas) != 1:
            continue
        try:
            df = janaf.Table(gas[0]).df
        except Exception:      # a table the package cannot parse: leave it out
            continue
        T = df["T(K)"].to_numpy().astype(float)
        cp = df["Cp"].to_numpy().astype(float)
        H = df["H-H(Tr)"].to_numpy().astype(float) * 1e3
        S = df["S"].to_numpy().astype(float)
        ok = np.isfinite(T) & np.isfinite(cp) & np.isfinite(H) & np.isfinite(S)
        T, cp, H, S = T[ok], cp[ok], H[ok], S[ok]
        j298 = np.flatnonzero(np.abs(T - 298.15) < 1e-6)
        if j298.size != 1:
            continue
        e298 = rec.poly.evaluate(np.array([298.15]))
        if abs(e298["s"][0] * R - S[j298[0]]) > S_MATCH:
            continue
        m = (T >= max(200.0, rec.T_min)) & (T <= rec.T_max) & (cp > 0)
        T, cp, H, S = T[m], cp[m], H[m], S[m] - S[j298[0]]
        e = rec.poly.evaluate(np.concatenate([[298.15], T]))
        mcp = e["cp"][1:] * R
        mdh = (e["h"][1:] - e["h"][0]) * R
        mds = (e["s"][1:] - e["s"][0]) * R
        cuts = sorted({float(T.min()), float(T.max()), *(x for x in BAND_EDGES_K if T.min() < x < T.max())})
        for lo, hi in zip(cuts[:-1], cuts[1:]):
            k = (T >= lo) & (T <= hi)
            if k.sum() < 2:
                continue
            dcp = mcp[k] / cp[k] - 1
            dh = mdh[k] - H[k]
            dS = mds[k] - S[k]
            out.append(table("agreement", {
                "species": rec.id, "source": "nasa1993", "against": "janaf", "band_K": [lo, hi],
                "n_points": int(k.sum()),
                "cp_max_rel": float(f"{np.max(np.abs(dcp)):.4g}"),
                "cp_rms_rel": float(f"{np.sqrt(np.mean(dcp ** 2)):.4g}"),
                "dh_max_J_per_mol": float(f"{np.max(np.abs(dh)):.4g}"),
                "dh_rms_J_per_mol": float(f"{np.sqrt(np.mean(dh ** 2)):.4g}"),
                "s0_max_J_per_molK": float(f"{np.max(np.abs(dS)):.4g}"),
                "s0_rms_J_per_molK": float(f"{np.sqrt(np.mean(dS ** 2)):.4g}"),
            }, array=True) + "\n")
        n += 1
    (ROOT / "gasdata" / "agreement-janaf.toml").write_text("".join(out), encoding="utf-8")
    print(f"wrote gasdata/agreement-janaf.toml: {n} species", file=sys.stderr)
    import compile_agreement      # the compact copy every budget reads
    return compile_agreement.main()


if __name__ == "__main__":
    sys.exit(main())
