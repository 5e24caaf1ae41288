"""NIST-JANAF Thermochemical Tables, 4th edition (M. W. Chase, J. Phys. Chem. Ref.
Data Monograph 9, 1998), read from the text copies in the `janaf` package.

JANAF_INDEX maps library ids to the JANAF table index (looked up in the package's
own index by formula, name and phase; 'ref' is JANAF's phase tag for an element
in its reference state, the gas for N2, O2, H2, the noble gases and Cl2).
"""

from __future__ import annotations

from functools import lru_cache

import numpy as np

JANAF_INDEX = {
    "Ar": "Ar-001", "He": "He-001", "Ne": "Ne-001", "Kr": "Kr-001", "Xe": "Xe-001",
    "N2": "N-023", "O2": "O-029", "H2": "H-050", "Cl2": "Cl-073",
    "CO": "C-093", "CO2": "C-095", "H2O": "H-064", "OH": "H-038", "H": "H-001",
    "O": "O-001", "N": "N-002", "NO": "N-005", "NO2": "N-007", "N2O": "N-026",
    "NH3": "H-083", "SO2": "O-034", "SO3": "O-058", "H2S": "H-080", "COS": "C-094",
    "CS2": "C-099", "HCl": "Cl-026", "HCN": "C-052", "CH4": "C-067", "C2H4": "C-128",
    "C2H2": "C-127", "CH2O": "C-061",
}


@lru_cache(maxsize=None)
def table(species_id: str) -> dict:
    """T (K), Cp and S (J/(mol K)), H-H(298.15) (J/mol), ΔfH (J/mol) of one table."""
    import janaf
    df = janaf.Table(index=JANAF_INDEX[species_id]).df
    T = np.asarray(df["T(K)"].to_numpy(), float)
    keep = T > 0
    col = lambda name: np.asarray(df[name].to_numpy(), float)[keep]  # noqa: E731
    return {"T": T[keep], "Cp": col("Cp"), "S": col("S"), "dH": col("H-H(Tr)") * 1e3,
            "dfH298": float(col("delta-f H")[np.argmin(abs(T[keep] - 298.15))]) * 1e3}
