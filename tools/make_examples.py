"""Write the example files the documentation and the --help examples name (docs/examples/).

* janaf-n2.csv, janaf-co2.csv   NIST-JANAF Thermochemical Tables, 4th ed. (M. W. Chase, Jr.,
                                1998), tables N-023 and C-095, as carried by the `janaf`
                                package: reference tables for `compare` and tabulations for `fit`
* earlier-issue.csv             CO2 as an earlier controlled issue would print it: tablegen's
                                own values, rounded to the printed digits
* air-rev-b.txt                 dry air as a whitespace table, sensible enthalpy from 0 °C and
                                Pr, vr on another scale (Pr = vr = 1 at 0 °C), rounded
* riverside-fluegas-rev3.csv    an invented works' flue-gas sheet, made the same way
* my-gases.toml                 the invented Fenmoor fuel blend of the demo as one record, from
                                the NASA TM-4513 set (`tablegen export --source nasa1993`)
* site/                         a user data folder for `species --check`: a good record of an
                                invented site gas, and a card file whose second record is a
                                deliberately broken copy of NASA TM-4513 CH4 (it is refused)

The files made from tablegen's own values stand for earlier issues in the examples;
they are no reference data. plant-tables.toml, harwick-gt2-charts.toml and
fuels/heavy-oil.toml are written by hand (specs and a fuel file, not data).

Run from the project root:  python3 tools/make_examples.py   (needs the `janaf` package)
Same package versions in, same bytes out.
"""

from __future__ import annotations

import contextlib
import io
import sys
from pathlib import Path

import janaf
import numpy as np

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))
import tablegen  # noqa: E402
from tablegen.cli import main as cli  # noqa: E402
from tablegen.data import formats  # noqa: E402
from tablegen.core.filewrite import write_bytes  # noqa: E402
from tablegen.thermo.substance import Anchor, Datum  # noqa: E402

OUT = ROOT / "docs" / "examples"
FENMOOR = "CH4=0.86,C2H6=0.025,C3H8=0.005,CO2=0.075,N2=0.035"   # the demo's invented blend
SITE_GAS = "CH4=0.92,C2H6=0.04,C3H8=0.01,CO2=0.01,N2=0.02"      # an invented site gas


def _write(name: str, text: str) -> None:
    path = OUT / name
    path.parent.mkdir(parents=True, exist_ok=True)
    write_bytes(path, text.encode("utf-8"))
    print(f"wrote {path.relative_to(ROOT)}", file=sys.stderr)


def _janaf_version() -> str:
    return getattr(getattr(janaf, "_version", None), "__version__", "unknown")


def janaf_csv(index: str, T_lo: float, T_hi: float) -> str:
    t = janaf.Table(index)
    df = t.df
    T = np.asarray(df["T(K)"].to_numpy(), float)
    keep = (T >= T_lo) & (T <= T_hi)
    col = {k: np.asarray(df[k].to_numpy(), float)[keep] for k in ("Cp", "S", "H-H(Tr)")}
    lines = [f"# source: NIST-JANAF Thermochemical Tables, 4th ed. (M. W. Chase, Jr., J. Phys. Chem. Ref. "
             f"Data Monograph 9, 1998), table {index}, {t.name}",
             f"# values as printed there, read from the janaf package {_janaf_version()} by tools/make_examples.py",
             "T [K],cp_molar [J/(mol K)],s0_molar [J/(mol K)],dh298_molar [kJ/mol]"]
    for i, T_K in enumerate(T[keep]):
        lines.append(f"{T_K:g},{col['Cp'][i]:.3f},{col['S'][i]:.3f},{col['H-H(Tr)'][i]:.3f}")
    return "\n".join(lines) + "\n"


def earlier_issue() -> str:
    sub = tablegen.substance("CO2")
    T = np.arange(300.0, 2001.0, 100.0)
    p = sub.properties(T)
    lines = ["# CO2, issue A of an invented works' property sheet: tablegen's own values rounded to the",
             "# printed digits (cp 4 decimals, h 2), written by tools/make_examples.py; an example, not reference data",
             "T [K],cp [kJ/(kg K)],h [kJ/kg]"]
    for i, T_K in enumerate(T):
        lines.append(f"{T_K:g},{p['cp'][i] / 1e3:.4f},{p['h'][i] / 1e3:.2f}")
    return "\n".join(lines) + "\n"


def air_rev_b() -> str:
    sub = tablegen.substance("air").with_options(datum=Datum("sensible", 273.15),
                                                 anchor=Anchor(T_K=273.15, Pr=1.0, vr=1.0))
    T = np.arange(250.0, 1501.0, 50.0)
    p = sub.properties(T)
    lines = ["# Dry air, rev. B of an invented plant's air table: h from 0 °C, Pr = vr = 1 at 0 °C;",
             "# tablegen's own values rounded (written by tools/make_examples.py); an example, not reference data",
             f"{'T [K]':>8}  {'h [kJ/kg]':>10}  {'Pr [-]':>10}  {'vr [-]':>10}"]
    for i, T_K in enumerate(T):
        lines.append(f"{T_K:8g}  {p['h'][i] / 1e3:10.2f}  {p['Pr'][i]:10.5g}  {p['vr'][i]:10.5g}")
    return "\n".join(lines) + "\n"


def riverside() -> str:
    sub = tablegen.substance("CO2=0.09,H2O=0.18,N2=0.71,O2=0.02").with_options(
        datum=Datum("sensible", 273.15), anchor=Anchor(T_K=273.15, Pr=1.0, vr=1.0))
    T_C = np.arange(0.0, 1001.0, 50.0)
    p = sub.properties(T_C + 273.15)
    lines = ["# Riverside works, flue-gas sheet rev. 3 (invented example): tablegen's own values rounded,",
             "# h from 0 °C, Pr = 1 at 0 °C (written by tools/make_examples.py); an example, not reference data",
             "T [°C],cp [kJ/(kg K)],h [kJ/kg],s0 [kJ/(kg K)],Pr [-]"]
    for i, t in enumerate(T_C):
        lines.append(f"{t:g},{p['cp'][i] / 1e3:.4f},{p['h'][i] / 1e3:.2f},{p['s0'][i] / 1e3:.4f},{p['Pr'][i]:.5g}")
    return "\n".join(lines) + "\n"


def exported(substance: str, rid: str) -> str:
    out = io.StringIO()
    with contextlib.redirect_stdout(out):
        code = cli(["export", substance, "--source", "nasa1993", "--format", "toml", "--id", rid, "--quiet"])
    if code != 0:
        raise SystemExit(f"export of {substance} failed")
    return out.getvalue()


def old_cards() -> str:
    """CO and a broken CH4 in the TM-4513 card format, from gasdata/nasa1993.toml."""
    from tablegen.data.library import library
    lib = library()
    ch4 = lib.record("CH4", source="nasa1993").poly.coeffs[1, 2:]
    cards = ["! Card file of an invented site's older records (TM-4513 format), for `species --check`.",
             f"! CO is NASA TM-4513's record; CH4 a deliberately broken copy (upper-interval a5 changed from "
             f"{ch4[4]:.4e}",
             "! to -1.0e-13, so cp turns negative above about 3800 K): tablegen refuses it.",
             "! citation: NASA TM-4513 (1993) records, the second one altered on purpose"]
    text = "\n".join(cards) + "\n"
    for sid in ("CO", "CH4"):
        rec = lib.record(sid, source="nasa1993")
        c = rec.poly.coeffs
        lower, upper = list(c[0, 2:]), list(c[1, 2:])
        if sid == "CH4":
            upper[4] = -1.0e-13
        text += formats.write_tm4513({"id": sid, "elements": rec.elements, "M": rec.M,
                                      "T_bounds_K": [float(x) for x in rec.poly.T_bounds],
                                      "coefficients": [lower, upper], "date": "site",
                                      "h298_over_R_K": rec.h_formation_298 / 8.314462618})
    return text


def main() -> int:
    _write("janaf-n2.csv", janaf_csv("N-023", 200.0, 3000.0))
    _write("janaf-co2.csv", janaf_csv("C-095", 200.0, 6000.0))
    _write("earlier-issue.csv", earlier_issue())
    _write("air-rev-b.txt", air_rev_b())
    _write("riverside-fluegas-rev3.csv", riverside())
    _write("my-gases.toml", exported(FENMOOR, "FENMOOR-GAS"))
    _write("site/site-2031.toml", exported(SITE_GAS, "SITE-GAS"))
    _write("site/old.dat", old_cards())
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
