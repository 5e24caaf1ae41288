"""The property keys a QA comparison knows: dimensions, labels, alignment kinds, defaults.

Shared by the reading, judging, hint and output modules of the comparison
(tablegen.calc.compare and its companions); plain data, no behaviour.
"""

from __future__ import annotations

import re

from ..core.units import PSI

#: A number as a reference table prints it (sign, digits, optional point and exponent).
NUMBER = re.compile(r"^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$")


def last_place(text: str) -> float:
    """One unit in the last printed place of a number's text ('29.104' -> 0.001)."""
    m = NUMBER.match(text)
    mant, exp = m.group(1), m.group(2)
    decimals = len(mant.split(".", 1)[1]) if "." in mant else 0
    e = int(exp[1:]) if exp else 0
    return 10.0 ** min(max(e - decimals, -400), 300)     # the cell is finite, so its exponent is too

#: Property key -> unit dimension, for every key a REFERENCE column may carry.
#: Pressure-dependent keys (s, v, rho) are left out: a reference table of
#: ideal-gas functions of T carries none of them.
KEY_DIMENSIONS = {
    "cp": "specific_entropy", "cv": "specific_entropy", "k": "dimensionless",
    "h": "specific_energy", "u": "specific_energy", "s0": "specific_entropy",
    "g0": "specific_energy", "Pr": "dimensionless", "vr": "dimensionless", "a": "speed",
    "cp_molar": "molar_entropy", "cv_molar": "molar_entropy", "h_molar": "molar_energy",
    "u_molar": "molar_energy", "s0_molar": "molar_entropy", "g0_molar": "molar_energy",
    "dh298_molar": "molar_energy",
    # mean heat capacities from T_m (the book's columns): [h(T) - h(T_m)]/(T - T_m) and
    # [s°(T) - s°(T_m)]/ln(T/T_m)
    "cp_mean_h": "specific_entropy", "cp_mean_s": "specific_entropy",
    "cp_mean_h_molar": "molar_entropy", "cp_mean_s_molar": "molar_entropy",
}
# volumetric basis (the book's _vol columns): per m³ at the reference conditions,
# n = P/(R T) moles in each m³ (ideal gas)
KEY_DIMENSIONS.update({
    "cp_vol": "volumetric_entropy", "cv_vol": "volumetric_entropy", "s0_vol": "volumetric_entropy",
    "cp_mean_h_vol": "volumetric_entropy", "cp_mean_s_vol": "volumetric_entropy",
    "h_vol": "volumetric_energy", "u_vol": "volumetric_energy", "g0_vol": "volumetric_energy",
})
MEAN_KEYS = ("cp_mean_h", "cp_mean_s", "cp_mean_h_molar", "cp_mean_s_molar", "cp_mean_h_vol", "cp_mean_s_vol")
VOL_KEYS = tuple(k for k in KEY_DIMENSIONS if k.endswith("_vol"))

#: name -> (T_K, P_Pa, text); the same as the table book's.
VOLUME_REFERENCES = {
    "normal": (273.15, 101325.0, "normal conditions, 0 °C and 101.325 kPa (DIN 1343)"),
    "standard-15C": (288.15, 101325.0, "standard conditions, 15 °C and 101.325 kPa (ISO 13443)"),
    "standard-60F": ((60 + 459.67) * 5 / 9, 14.696 * PSI, "standard conditions, 60 °F and 14.696 psia"),
}

#: How each key is printed in reports.
KEY_LABELS = {
    "cp": "cp", "cv": "cv", "k": "k", "h": "h", "u": "u", "s0": "s°", "g0": "g°",
    "Pr": "Pr", "vr": "vr", "a": "a", "cp_molar": "molar cp", "cv_molar": "molar cv",
    "h_molar": "molar h", "u_molar": "molar u", "s0_molar": "molar s°",
    "g0_molar": "molar g°", "dh298_molar": "H − H(298.15 K)",
    "cp_mean_h": "mean cp for h", "cp_mean_s": "mean cp for s°",
    "cp_mean_h_molar": "molar mean cp for h", "cp_mean_s_molar": "molar mean cp for s°",
    "cp_vol": "cp per m³", "cv_vol": "cv per m³", "s0_vol": "s° per m³", "h_vol": "h per m³",
    "u_vol": "u per m³", "g0_vol": "g° per m³", "cp_mean_h_vol": "mean cp for h per m³",
    "cp_mean_s_vol": "mean cp for s° per m³",
}

#: Columns that may be aligned, and how. Offsets: the enthalpy datum and the
#: entropy reference pressure shift h, u and s° by constants; dh298_molar is an
#: enthalpy difference whose zero a handbook may place elsewhere. Scales: the
#: Pr/vr anchor multiplies Pr and vr by constants. g° is left out: a change of
#: datum shifts it by a + bT, not by a constant.
ALIGNABLE = {
    "h": "offset", "u": "offset", "s0": "offset", "h_molar": "offset", "u_molar": "offset",
    "s0_molar": "offset", "dh298_molar": "offset", "Pr": "scale", "vr": "scale",
    "h_vol": "offset", "u_vol": "offset", "s0_vol": "offset",
}

#: Default tolerances, documented in docs/compare.md. The 0.5 % on cp is the
#: order of the spread between independent ideal-gas evaluations of the same gas
#: (NIST-JANAF against the Gurvich/TPIS tables behind NASA TM-4513) up to
#: 3000 K, from memory. k and a: a cp error moves k by about R/cv times as much
#: (0.4 for a diatomic gas), a by half of that, so 0.25 %. Pr and vr: ln Pr
#: moves by Δs°/R, about four times the relative s° change over a 2000 K span,
#: so 2 %. Mean cp: an average of cp, so 0.5 %.
DEFAULT_REL = {key: 0.005 for key in KEY_DIMENSIONS}
DEFAULT_REL.update({"k": 0.0025, "a": 0.0025, "Pr": 0.02, "vr": 0.02})

#: Energies and entropies are judged on their change from 298.15 K instead of
#: their value (a value of s° is mostly its third-law base, a value of h on the
#: formation datum mostly the enthalpy of formation; 0.5 % of either would hide
#: a wrong P° or datum): if |Δcp| <= 0.5 % cp everywhere, h - h(298.15 K) and
#: s° - s°(298.15 K), integrals of cp, agree within 0.5 % of themselves. The
#: floors allow for differences at 298.15 K itself: 0.02 J/(mol K) and 10 J/mol
#: per mole (NIST-JANAF and NASA TM-4513 differ by up to 0.009 J/(mol K) in
#: S°(298.15 K) for N2, O2, H2, Ar, CO, CO2; a wrong P° of 1 atm for 1 bar is
#: R ln 1.01325 = 0.109 J/(mol K) and stays visible). Converted per kg with M.
CHANGE_KEYS = {"h": "energy", "u": "energy", "h_molar": "energy", "u_molar": "energy",
               "dh298_molar": "energy", "s0": "entropy", "s0_molar": "entropy",
               "h_vol": "energy", "u_vol": "energy", "s0_vol": "entropy"}
CHANGE_REL = 0.005
CHANGE_FLOOR_MOLAR = {"energy": 10.0, "entropy": 0.02}     # J/mol, J/(mol K)
T_CHANGE_FROM = 298.15


def column_label(key: str) -> str:
    """A column named in words, with its key where the two differ: 'cp', 's° (s0)', 'molar h (h_molar)'."""
    label = KEY_LABELS.get(key, key)
    return key if label == key else f"{label} ({key})"
