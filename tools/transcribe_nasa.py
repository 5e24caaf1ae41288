"""Transcribe public NASA coefficient sets into tablegen's gasdata format.

Reads the machine-readable copies that the `cantera` package (PyPI) ships in
its data folder and writes, without changing any number:

* gasdata/nasa1993.toml   NASA TM-4513 7-coefficient set (nasa_gas.yaml, ~750 gases)
* gasdata/nasa2002-air.toml NASA/TP-2002-211556 9-coefficient air species (airNASA9.yaml)
* gasdata/nuig2015.toml   n-hexane, which TM-4513 lacks (n-hexane-NUIG-2015.yaml)
* gasdata/atomic-weights.toml  the element weights cantera carries (IUPAC)

Run from the project root:  python tools/transcribe_nasa.py
Needs: pip install cantera ruamel.yaml (tools only, never at run time).
"""

from __future__ import annotations

import sys
from pathlib import Path

import cantera
from ruamel.yaml import YAML

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))
from tablegen.core.constants import R_MOLAR  # noqa: E402
from tablegen.data.tomlout import table  # noqa: E402
from tablegen.thermo.polynomial import NINE, SEVEN, Polynomial, seven_to_nine  # noqa: E402

DATA = Path(cantera.__file__).parent / "data"

# Trade ids and names for the species a flue-gas or fuel table uses.  The key is
# the NASA name; unlisted species keep the NASA name with element case mended.
CURATED = {
    "Ar": ("Ar", "argon", []),
    "He": ("He", "helium", []),
    "Ne": ("Ne", "neon", []),
    "Kr": ("Kr", "krypton", []),
    "Xe": ("Xe", "xenon", []),
    "N2": ("N2", "nitrogen", []),
    "O2": ("O2", "oxygen", []),
    "H2": ("H2", "hydrogen", []),
    "CO": ("CO", "carbon monoxide", []),
    "CO2": ("CO2", "carbon dioxide", []),
    "H2O": ("H2O", "water vapour", ["water", "steam", "water vapor"]),
    "OH": ("OH", "hydroxyl radical", ["hydroxyl"]),
    "H": ("H", "atomic hydrogen", []),
    "O": ("O", "atomic oxygen", []),
    "N": ("N", "atomic nitrogen", []),
    "NO": ("NO", "nitric oxide", ["nitrogen monoxide"]),
    "NO2": ("NO2", "nitrogen dioxide", []),
    "N2O": ("N2O", "nitrous oxide", ["dinitrogen monoxide"]),
    "NH3": ("NH3", "ammonia", []),
    "SO2": ("SO2", "sulfur dioxide", ["sulphur dioxide"]),
    "SO3": ("SO3", "sulfur trioxide", ["sulphur trioxide"]),
    "H2S": ("H2S", "hydrogen sulfide", ["hydrogen sulphide"]),
    "COS": ("COS", "carbonyl sulfide", ["OCS", "carbonyl sulphide"]),
    "CS2": ("CS2", "carbon disulfide", ["carbon disulphide"]),
    "HCL": ("HCl", "hydrogen chloride", []),
    "HCN": ("HCN", "hydrogen cyanide", []),
    "CL2": ("Cl2", "chlorine", []),
    "CH4": ("CH4", "methane", []),
    "C2H6": ("C2H6", "ethane", []),
    "C3H8": ("C3H8", "propane", []),
    "C4H10,n-butane": ("n-C4H10", "n-butane", ["butane", "nC4H10", "C4H10"]),
    "C4H10,isobutane": ("i-C4H10", "isobutane", ["iC4H10", "2-methylpropane"]),
    "C5H12,n-pentane": ("n-C5H12", "n-pentane", ["pentane", "nC5H12"]),
    "C5H12,i-pentane": ("i-C5H12", "isopentane", ["iC5H12", "2-methylbutane"]),
    "CH3C(CH3)2CH3": ("neo-C5H12", "neopentane", ["2,2-dimethylpropane"]),
    "C7H16,n-heptane": ("n-C7H16", "n-heptane", ["heptane", "nC7H16"]),
    "C8H18,n-octane": ("n-C8H18", "n-octane", ["octane", "nC8H18"]),
    "C8H18,isooctane": ("i-C8H18", "isooctane", ["iC8H18", "2,2,4-trimethylpentane"]),
    "C2H4": ("C2H4", "ethylene", ["ethene"]),
    "C3H6,propylene": ("C3H6", "propylene", ["propene"]),
    "C3H6,cyclo-": ("cyclo-C3H6", "cyclopropane", []),
    "C2H2,acetylene": ("C2H2", "acetylene", ["ethyne"]),
    "C2H2,vinylidene": ("C2H2-vinylidene", "vinylidene", []),
    "CH3OH": ("CH3OH", "methanol", ["methyl alcohol"]),
    "C2H5OH": ("C2H5OH", "ethanol", ["ethyl alcohol"]),
    "HCHO,formaldehy": ("CH2O", "formaldehyde", ["HCHO", "methanal"]),
    "C6H6": ("C6H6", "benzene", []),
    "C7H8": ("C7H8", "toluene", []),
    "H2O2": ("H2O2", "hydrogen peroxide", []),
    "HO2": ("HO2", "hydroperoxyl radical", []),
    "O3": ("O3", "ozone", []),
    "NO3": ("NO3", "nitrate radical", []),
    "SO": ("SO", "sulfur monoxide", []),
    "S2": ("S2", "disulfur", []),
    "CH3": ("CH3", "methyl radical", []),
    "Electron": ("e-", "electron", ["electron"]),
}

# The report's name of the dataset and what TM-4513 calls its note field.
CITE_1993 = ("B. J. McBride, S. Gordon and M. A. Reno, Coefficients for Calculating "
             "Thermodynamic and Transport Properties of Individual Species, "
             "NASA TM-4513, October 1993")
CITE_2002 = ("B. J. McBride, M. J. Zehe and S. Gordon, NASA Glenn Coefficients for "
             "Calculating Thermodynamic Properties of Individual Species, "
             "NASA/TP-2002-211556, September 2002")
CITE_NUIG = ("K. Zhang, C. Banyon, C. Togbe, P. Dagaut, J. Bugler and H. J. Curran, "
             "An experimental and kinetic modeling study of n-hexane oxidation, "
             "Combustion and Flame 162 (2015) 4194-4207 (thermochemistry file of the mechanism)")


def trade_id(nasa_name: str, composition: dict) -> str:
    """Mend the all-capitals element symbols of NASA names (CL -> Cl, AL -> Al)."""
    name = nasa_name
    for el in composition:
        if len(el) == 2 and el != "E":
            name = name.replace(el.upper(), el)
    return name


def weights() -> dict[str, float]:
    w = {}
    for sym in cantera.Element.element_symbols:
        try:
            w[sym] = float(cantera.Element(sym).weight)
        except cantera.CanteraError:  # elements with no stable isotope have no weight
            continue
    for iso in ("D", "T"):
        try:
            w[iso] = float(cantera.Element(iso).weight)
        except Exception:  # noqa: BLE001 - isotope not defined in this cantera
            pass
    w["E"] = float(cantera.Element("E").weight)
    return w


def molar_mass(composition: dict, w: dict) -> float:
    return sum(w[el] * n for el, n in composition.items())


def record(sp: dict, w: dict, source_key: str, used: set) -> dict:
    name = sp["name"]
    comp = {str(k): (int(v) if float(v).is_integer() else float(v))
            for k, v in sp["composition"].items()}
    if name in CURATED:
        sid, common, aliases = CURATED[name]
    else:
        sid, common, aliases = trade_id(name, comp), name, []
    if sid in used:
        raise SystemExit(f"duplicate id {sid}")
    used.add(sid)
    aliases = [a for a in dict.fromkeys([*aliases, name]) if a != sid]
    th = sp["thermo"]
    model = th["model"]
    form = {"NASA7": SEVEN, "NASA9": NINE}[model]          # cantera's model names -> ours
    bounds = [float(x) for x in th["temperature-ranges"]]
    data = [[float(x) for x in row] for row in th["data"]]
    if form == SEVEN and len(bounds) == 3 and bounds[1] >= bounds[2]:
        raise SystemExit(f"{name}: odd bounds {bounds}")
    if form == SEVEN and len(data) == 1:
        # one interval over the whole range (monatomic gases with constant cp)
        bounds = [bounds[0], bounds[-1]]
    c9 = [seven_to_nine(r) for r in data] if form == SEVEN else data
    poly = Polynomial(bounds, c9, form)
    import numpy as np
    h298 = float(poly.evaluate(np.array([298.15]), want=("h",))["h"][0]) * R_MOLAR
    rec = {
        "id": sid,
        "name": common,
        "aliases": aliases,
        "elements": comp,
        "molar_mass_g_per_mol": molar_mass(comp, w),
        "phase": "gas",
        "form": form,
        "T_bounds_K": bounds,
        "coefficients": data,
        "h_formation_298_J_per_mol": round(h298, 3),
        "source": source_key,
        "source_note": str(sp["thermo"].get("note", sp.get("note", ""))).strip(),
    }
    if poly.T_min > 298.15:
        rec["h_formation_298_J_per_mol"] = None  # cannot be evaluated inside range
    return {k: v for k, v in rec.items() if v is not None}


def write_set(path: Path, header: dict, records: list[dict]) -> None:
    text = [
        "# tablegen gasdata file: one [dataset] table, then one [[species]] table a record.",
        "# Transcribed by tools/transcribe_nasa.py; do not edit numbers by hand.",
        "# Format: gasdata/README.md.",
        "",
        table("dataset", header),
    ]
    for r in records:
        text.append("")
        text.append(table("species", r, array=True))
    path.write_text("\n".join(text), encoding="utf-8")


def main() -> None:
    yaml = YAML(typ="safe")
    w = weights()
    out = ROOT / "gasdata"

    nasa = yaml.load((DATA / "nasa_gas.yaml").read_text())
    used: set = set()
    recs = [record(sp, w, "nasa1993", used) for sp in nasa["species"]]
    write_set(out / "nasa1993.toml", {
        "id": "nasa1993",
        "title": "NASA Lewis 7-coefficient ideal-gas polynomials (TM-4513)",
        "citation": CITE_1993,
        "published": "1993-10",
        "reference_pressure_Pa": 100000.0,
        "gas_constant_of_fit_J_per_mol_K": 8.31451,
        "transcribed_from": f"cantera {cantera.__version__} data/nasa_gas.yaml (ck2yaml of nasa_gas.dat)",
        "note_field": "source and date of the data behind each fit, as given in the report",
        "licence": "US Government work, public domain",
    }, recs)

    air = yaml.load((DATA / "airNASA9.yaml").read_text())
    used = set()
    recs = [record(sp, w, "nasa2002-air", used) for sp in air["species"]]
    write_set(out / "nasa2002-air.toml", {
        "id": "nasa2002-air",
        "title": "NASA Glenn 9-coefficient polynomials, air species (TP-2002-211556)",
        "citation": CITE_2002,
        "published": "2002-09",
        "reference_pressure_Pa": 100000.0,
        "gas_constant_of_fit_J_per_mol_K": 8.314472,
        "transcribed_from": f"cantera {cantera.__version__} data/airNASA9.yaml",
        "note_field": "references of the data behind each fit, as given in the report",
        "licence": "US Government work, public domain",
    }, recs)

    hex_ = yaml.load((DATA / "example_data" / "n-hexane-NUIG-2015.yaml").read_text())
    sp = next(s for s in hex_["species"] if s["name"] == "NC6H14")
    sp = dict(sp, name="C6H14,n-hexane")
    CURATED["C6H14,n-hexane"] = ("n-C6H14", "n-hexane", ["hexane", "nC6H14", "C6H14", "NC6H14"])
    rec = record(sp, w, "nuig2015", set())
    rec["source_note"] = "thermochemistry of the NUIG n-hexane mechanism, 2015"
    write_set(out / "nuig2015.toml", {
        "id": "nuig2015",
        "title": "n-hexane 7-coefficient polynomial of the NUIG 2015 mechanism",
        "citation": CITE_NUIG,
        "published": "2015",
        "reference_pressure_Pa": 101325.0,
        "transcribed_from": f"cantera {cantera.__version__} data/example_data/n-hexane-NUIG-2015.yaml",
        "note_field": "where the fit comes from",
        "licence": "published with the paper for research use",
    }, [rec])

    aw = ["# Element weights in g/mol, transcribed by tools/transcribe_nasa.py from the",
          "# element table of cantera, which carries the IUPAC (CIAAW) standard atomic",
          "# weights in their abridged/conventional form; D and the electron as cantera has them.",
          "",
          table("source", {
              "citation": "IUPAC Commission on Isotopic Abundances and Atomic Weights, "
                          "standard atomic weights, abridged values (table of 2021 as carried by cantera)",
              "transcribed_from": f"cantera {cantera.__version__} Element table",
          }),
          table("weights", dict(sorted(w.items())))]
    (out / "atomic-weights.toml").write_text("\n".join(aw), encoding="utf-8")
    print("wrote", len(nasa["species"]), "NASA 1993 records,", len(air["species"]), "air records, n-hexane, weights")


if __name__ == "__main__":
    main()
