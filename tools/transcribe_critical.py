"""Transcribe critical constants and acentric factors into gasdata/critical.toml.

The second-virial estimate of the ideal-gas model uncertainty
(tablegen/calc/uncertainty.py) needs, per species, the critical temperature Tc,
critical pressure Pc, critical molar volume Vc and acentric factor omega.
Two open sources are read, without changing any number:

1. CoolProp (PyPI package ``CoolProp``): the fluid constants of its reference
   equations of state (``AbstractState.T_critical()``, ``p_critical()``,
   ``rhomolar_critical()``, ``acentric_factor()``), for the species mapped in
   COOLPROP below.  Preferred where it has the fluid, because each constant
   belongs to a published reference equation of state.
2. cantera (PyPI package ``cantera``): data/critical-properties.yaml (compiled
   by C. Karakaya from the NIST Chemistry WebBook and Yaws, Matheson Gas Data
   Book, 7th ed., 2001), for species whose tablegen id, upper-cased, equals a
   name in that file and that CoolProp lacks.

Every entry names its source.  Run from the project root:
    python tools/transcribe_critical.py
Needs cantera, CoolProp and ruamel.yaml (tools only, never at run time).
"""

from __future__ import annotations

import sys
from pathlib import Path

import cantera
import CoolProp
from CoolProp import AbstractState
from ruamel.yaml import YAML

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))
from tablegen.data.library import library  # noqa: E402
from tablegen.data.tomlout import table  # noqa: E402

#: tablegen species id -> CoolProp fluid name
COOLPROP = {
    "N2": "Nitrogen", "O2": "Oxygen", "Ar": "Argon", "CO2": "CarbonDioxide", "H2O": "Water",
    "CH4": "Methane", "CO": "CarbonMonoxide", "H2": "Hydrogen", "He": "Helium", "Ne": "Neon",
    "Kr": "Krypton", "Xe": "Xenon", "C2H6": "Ethane", "C3H8": "Propane", "NH3": "Ammonia",
    "SO2": "SulfurDioxide", "N2O": "NitrousOxide", "H2S": "HydrogenSulfide", "C2H4": "Ethylene",
    "HCl": "HydrogenChloride", "n-C6H14": "n-Hexane", "CH3OH": "Methanol", "C2H5OH": "Ethanol",
    "COS": "CarbonylSulfide", "D2": "Deuterium", "F2": "Fluorine", "C3H6,propylene": "Propylene",
}

CANTERA_FILE = Path(cantera.__file__).parent / "data" / "critical-properties.yaml"


def main() -> int:
    lib = library()
    recs = {r.id: r for ds in lib.datasets.values() for r in ds.records()}
    ids = set(recs)
    # Formula -> how many records share it: an upper-cased formula cannot tell
    # isomers apart, so such ids are left to the explicit CoolProp map.
    formula = {}
    for r in recs.values():
        key = tuple(sorted(r.elements.items()))
        formula[key] = formula.get(key, 0) + 1
    yaml = YAML(typ="safe")
    ct = {e["name"]: e for e in yaml.load(CANTERA_FILE.read_text(encoding="utf-8"))["species"]}
    out = [
        "# Critical constants and acentric factors for the second-virial estimate of the\n"
        "# ideal-gas model uncertainty.  Written by tools/transcribe_critical.py; do not\n"
        "# edit numbers by hand.  Units: K, Pa, m3/mol; omega dimensionless.\n\n",
        table("source", {
            "coolprop": f"CoolProp {CoolProp.__version__} fluid constants of its reference equations of state "
                        "(I. H. Bell, J. Wronski, S. Quoilin and V. Lemort, Ind. Eng. Chem. Res. 53 (2014) 2498-2508)",
            "cantera": f"cantera {cantera.__version__} data/critical-properties.yaml (C. Karakaya, from the NIST "
                       "Chemistry WebBook and C. L. Yaws, Matheson Gas Data Book, 7th ed., 2001)",
        }) + "\n",
    ]
    n = 0
    for sid in sorted(ids):
        if sid in COOLPROP:
            a = AbstractState("HEOS", COOLPROP[sid])
            entry = {"id": sid, "Tc_K": float(a.T_critical()), "Pc_Pa": float(a.p_critical()),
                     "Vc_m3_per_mol": 1.0 / float(a.rhomolar_critical()),
                     "omega": float(a.acentric_factor()), "source": "coolprop",
                     "source_note": f"CoolProp fluid {COOLPROP[sid]}"}
        elif sid.upper() in ct and "," not in sid:
            rec = recs[sid]
            if formula[tuple(sorted(rec.elements.items()))] > 1:
                continue          # isomers share the formula
            if abs(float(ct[sid.upper()]["molecular-weight"]) - rec.M) > 0.01 * rec.M:
                continue          # same letters, other species (Cs2 is not CS2)
            cp = ct[sid.upper()]["critical-parameters"]
            if not all(k in cp for k in ("critical-temperature", "critical-pressure",
                                         "critical-molar-volume", "acentric-factor")):
                continue
            entry = {"id": sid, "Tc_K": float(cp["critical-temperature"]),
                     "Pc_Pa": float(cp["critical-pressure"]),
                     "Vc_m3_per_mol": float(cp["critical-molar-volume"]) * 1e-3,
                     "omega": float(cp["acentric-factor"]), "source": "cantera",
                     "source_note": f"cantera entry {ct[sid.upper()]['name']} "
                                    f"({ct[sid.upper()].get('descriptive-name', '')})"}
        else:
            continue
        out.append(table("species", entry, array=True) + "\n")
        n += 1
    (ROOT / "gasdata" / "critical.toml").write_text("".join(out), encoding="utf-8")
    print(f"wrote gasdata/critical.toml: {n} species", file=sys.stderr)
    return 0


if __name__ == "__main__":
    sys.exit(main())
