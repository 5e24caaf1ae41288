"""QA comparison of tablegen values against a reference table.

A REFERENCE is a CSV or whitespace-separated text table (the shared CSV
convention: header cells ``key [unit]``, key a property key of the ``state``
JSON, temperature column ``T``; lines starting with ``#`` are comments). This
module reads it, evaluates the same properties at the reference temperatures,
optionally fits an alignment constant per column (a constant offset for
datum-dependent energies and entropies, a scale factor for Pr and vr), and
judges every cell against a per-column tolerance.

Pure computation: no printing, no file writing (the command does that), no
reportlab. The renderers in ``tablegen.book.qa_report`` receive the finished
:class:`Comparison`.

Rules, stated once (docs/compare.md repeats them for the user):

* deviation Δ = tablegen (after alignment) - reference, in the reference
  column's unit; relative deviation Δ/|reference| (undefined where the
  reference value is 0);
* a cell is within tolerance when |Δ| <= rel·|reference| + abs + q/2, where
  rel and abs are the column's tolerance and q is one unit in the last printed
  place of the reference cell (a printed table is known no better than its
  rounding);
* an offset is fitted by least squares, c = mean(reference - tablegen); a scale
  factor by least squares on logarithms, ln f = mean(ln reference - ln tablegen),
  so every row weighs the same whatever its magnitude (Pr spans decades).
"""

from __future__ import annotations

import csv
import hashlib
import io
import math
import re
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from .errors import RangeError, TablegenError, UnitError
from .thermo.substance import R_MOLAR
from .units import PSI, Unit, unit

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

def _unit(text: str, dimension: str) -> Unit:
    """tablegen.units lookup (which knows the per-m³ and per-ft³ units of the volumetric basis)."""
    return unit(text, dimension)


#: Reference conditions of the volumetric basis when no spec gives them:
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

COMMENT = "#"
#: Largest reference table read: rows (a book table has at most 20 000) and bytes.
MAX_REFERENCE_ROWS = 20000
MAX_REFERENCE_BYTES = 8 << 20


# ---------------------------------------------------------------- reading
@dataclass(frozen=True, slots=True)
class RefColumn:
    """One property column of a reference table."""

    key: str
    unit: Unit | None             # None: a key this comparison cannot evaluate (e.g. h_vol)
    header: str                   # the header cell as written
    values_si: np.ndarray         # NaN where the cell is empty
    text: tuple                   # cell text as printed ("" for empty)
    quantum: np.ndarray           # one unit in the last printed place, in the column unit


@dataclass(frozen=True, slots=True)
class Reference:
    """A reference table as read: temperatures, columns, where each row came from."""

    path: str
    sha256: str
    layout: str                   # "csv" or "whitespace"
    T_unit: Unit
    T_header: str
    T_K: np.ndarray
    T_text: tuple
    lines: tuple                  # 1-based line number of each row in the file
    columns: tuple                # RefColumn, in file order
    comments: tuple               # comment lines, '#' stripped

    header_line: int = 0

    def column(self, key: str) -> RefColumn:
        """The first column of a key."""
        for c in self.columns:
            if c.key == key:
                return c
        raise KeyError(key)

    def columns_of(self, key: str) -> tuple:
        """Every column of a key (a table may give one property in SI and US units)."""
        return tuple(c for c in self.columns if c.key == key)

    @property
    def keys(self) -> tuple:
        """Distinct property keys in file order."""
        return tuple(dict.fromkeys(c.key for c in self.columns))

    @property
    def comparable_keys(self) -> tuple:
        return tuple(dict.fromkeys(c.key for c in self.columns if c.unit is not None))


#: Header of the row-mark column of tablegen's own CSV files (read, never compared).
MARK_KEY = "mark"

_HEADER_CELL = re.compile(r"^\s*([A-Za-z][A-Za-z0-9_]*)\s*\[([^\[\]]*)\]\s*$")
_HEADER_WS = re.compile(r"([A-Za-z][A-Za-z0-9_]*)\s*\[([^\[\]]*)\]")
_NUMBER = re.compile(r"^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$")


def _allowed_keys() -> str:
    return "T, " + ", ".join(KEY_DIMENSIONS)


def _quantum(text: str) -> float:
    """One unit in the last printed place of a number's text ('29.104' -> 0.001)."""
    m = _NUMBER.match(text)
    mant, exp = m.group(1), m.group(2)
    decimals = len(mant.split(".", 1)[1]) if "." in mant else 0
    e = int(exp[1:]) if exp else 0
    return 10.0 ** min(max(e - decimals, -400), 300)     # the cell is finite, so its exponent is too


def read_reference(path) -> Reference:
    """Read a REFERENCE table; every problem raises TablegenError naming file and line.

    Parameters
    ----------
    path : file path of a CSV (comma-separated, RFC 4180 quoting) or
        whitespace-separated text table. The first line that is not blank and
        not a ``#`` comment is the header: cells ``key [unit]``.

    Raises
    ------
    TablegenError (exit 2) for an unreadable file, a header cell not in the
    ``key [unit]`` form, an unknown or repeated key, a unit that does not fit
    the key, a row with the wrong number of cells or a cell that is not a number.
    """
    p = Path(path)
    name = str(path)
    try:
        size = p.stat().st_size
    except OSError:
        size = 0                       # the read below says what is wrong
    if size > MAX_REFERENCE_BYTES:
        raise TablegenError(f"{name}: {size} bytes; a reference table may have at most "
                            f"{MAX_REFERENCE_BYTES} bytes ({MAX_REFERENCE_BYTES >> 20} MiB) and "
                            f"{MAX_REFERENCE_ROWS} rows")
    try:
        raw = p.read_bytes()
    except FileNotFoundError:
        raise TablegenError(f"{name}: reference file not found; give the path of a CSV or text table") from None
    except IsADirectoryError:
        raise TablegenError(f"{name}: is a folder; give the path of a CSV or text table") from None
    except OSError as e:
        raise TablegenError(f"{name}: cannot read the reference file ({e.strerror})") from None
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError as e:
        line = raw[:e.start].count(b"\n") + 1
        raise TablegenError(f"{name}:{line}: not UTF-8 text; save the reference table as UTF-8") from None
    digest = hashlib.sha256(raw).hexdigest()

    comments, rows, header, header_line, layout = [], [], None, 0, "csv"
    for i, line in enumerate(text.splitlines(), start=1):
        s = line.strip()
        if not s:
            continue
        if s.startswith(COMMENT):
            comments.append(s[1:].strip())
            continue
        if header is None:
            header_line = i
            if "," in s:
                layout = "csv"
                header = [c for c in next(csv.reader([s]))]
            else:
                layout = "whitespace"
                header = _split_ws_header(s, name, i)
            continue
        if layout == "csv":
            cells = next(csv.reader([s]))
        else:
            cells = s.split()
        rows.append((i, [c.strip() for c in cells]))
        if len(rows) > MAX_REFERENCE_ROWS:
            raise TablegenError(f"{name}:{i}: more than {MAX_REFERENCE_ROWS} data rows; a reference table "
                                f"may have at most {MAX_REFERENCE_ROWS} rows (split it and compare each part)")
    if header is None:
        raise TablegenError(f"{name}: no header line; the first line that is not a '#' comment must name "
                            f"each column as key [unit], e.g. T [K],cp [kJ/(kg K)]")

    keys, units, seen = [], [], set()
    for cell in header:
        if cell.strip() == MARK_KEY:       # the row marks of a tablegen CSV: text, not compared
            keys.append(MARK_KEY)
            units.append(None)
            continue
        m = _HEADER_CELL.match(cell)
        if not m:
            raise TablegenError(f"{name}:{header_line}: header cell {cell.strip()!r} is not in the form "
                                f"key [unit], e.g. cp [kJ/(kg K)]")
        key, usym = m.group(1), m.group(2).strip()
        if key != "T" and key not in KEY_DIMENSIONS:
            if not re.fullmatch(r"[A-Za-z][A-Za-z0-9]*(_mean_[hs])?_vol", key) or key.split("_")[0] not in KEY_DIMENSIONS:
                raise TablegenError(f"{name}:{header_line}: unknown column key {key!r}; allowed: {_allowed_keys()}")
            u = None            # a tablegen key of the volumetric basis: units per m³ are not known here
        else:
            dim = "temperature" if key == "T" else KEY_DIMENSIONS[key]
            try:
                u = _unit(usym, dim)
            except UnitError as e:
                raise TablegenError(f"{name}:{header_line}: column {key!r}: {e}") from None
        ident = (key, u.symbol if u else usym)
        if ident in seen:
            raise TablegenError(f"{name}:{header_line}: column {cell.strip()!r} appears twice; give each once")
        seen.add(ident)
        keys.append(key)
        units.append(u)
    if "T" not in keys:
        raise TablegenError(f"{name}:{header_line}: no temperature column; one column must be T [K] "
                            f"(or T [°C], T [°F], T [°R])")
    if all(k in ("T", MARK_KEY) for k in keys):
        raise TablegenError(f"{name}:{header_line}: only a temperature column; add property columns, "
                            f"allowed keys: {', '.join(KEY_DIMENSIONS)}")
    if not rows:
        raise TablegenError(f"{name}: header but no data rows; add one row per temperature")

    n = len(keys)
    cells_by_col = [[] for _ in range(n)]
    for line, cells in rows:
        if len(cells) != n:
            hint = "; in a whitespace table write '-' for an empty cell" if layout == "whitespace" else ""
            raise TablegenError(f"{name}:{line}: {len(cells)} cells, but the header names {n} columns{hint}")
        for j, c in enumerate(cells):
            if keys[j] == MARK_KEY:
                cells_by_col[j].append(c)
                continue
            if c in ("", "-", "—") and keys[j] != "T":
                cells_by_col[j].append("")
                continue
            if not _NUMBER.match(c):
                raise TablegenError(f"{name}:{line}: cell {c!r} in column {keys[j]!r} is not a number; "
                                    f"write plain decimal numbers (an empty cell or '-' marks a gap)")
            if not math.isfinite(float(c)):
                raise TablegenError(f"{name}:{line}: cell {c!r} in column {keys[j]!r} is beyond the range "
                                    f"of a double (about 1.8e308); write a finite number")
            cells_by_col[j].append(c)

    lines = tuple(r[0] for r in rows)
    jT = keys.index("T")
    T_text = tuple(cells_by_col[jT])
    T_K = units[jT].to_si(np.array([float(c) for c in T_text]))
    for line, T in zip(lines, T_K):
        if not (math.isfinite(T) and T > 0):
            raise TablegenError(f"{name}:{line}: temperature {T:g} K is not above 0 K")
    columns = []
    for j, key in enumerate(keys):
        if key in ("T", MARK_KEY):   # the first T column is the temperature; others (T in °F ...) are ignored
            continue
        txt = tuple(cells_by_col[j])
        vals = np.array([float(c) if c else np.nan for c in txt])
        q = np.array([_quantum(c) if c else np.nan for c in txt])
        si = units[j].to_si(vals) if units[j] is not None else vals
        columns.append(RefColumn(key, units[j], header[j].strip(), si, txt, q))
    return Reference(name, digest, layout, units[jT], header[jT].strip(), T_K, T_text, lines,
                     tuple(columns), tuple(comments), header_line)


def _split_ws_header(s: str, name: str, line: int) -> list[str]:
    """Header of a whitespace table: cells 'key [unit]'; units may hold blanks."""
    cells = [f"{m.group(1)} [{m.group(2)}]" for m in _HEADER_WS.finditer(s)]
    rest = _HEADER_WS.sub("", s).strip()
    if rest or not cells:
        bad = rest.split()[0] if rest else s
        raise TablegenError(f"{name}:{line}: header text {bad!r} is not in the form key [unit]; "
                            f"separate columns by commas or blanks, e.g. T [K],cp [kJ/(kg K)]")
    return cells


# ------------------------------------------------------------ tolerances
@dataclass(frozen=True, slots=True)
class Tolerance:
    """|Δ| <= rel·|reference| + rel_change·|X(T) - X(298.15 K)| + abs_si + q/2.

    q is one unit in the last printed place of the reference cell; X(298.15 K)
    is tablegen's value (after alignment) at 298.15 K.
    """

    rel: float = 0.0
    abs_si: float = 0.0
    text: str = ""
    origin: str = "default"       # "default" or "--tolerance"
    rel_change: float = 0.0

    def bound_si(self, ref_si, quantum_si, change_si=0.0):
        return (self.rel * np.abs(ref_si) + self.rel_change * np.abs(change_si) + self.abs_si
                + 0.5 * quantum_si)


def default_tolerance(key: str, M_g_per_mol: float = 1.0, unit_=None, n_per_m3: float = 1.0) -> Tolerance:
    """The documented default of a column (M converts the per-mole floors to per kg,
    n_per_m3 (mol/m³ at the reference conditions) to per m³)."""
    if key in CHANGE_KEYS:
        kind = CHANGE_KEYS[key]
        floor = CHANGE_FLOOR_MOLAR[kind]
        if key.endswith("_molar"):
            floor_si = floor
        elif key.endswith("_vol"):
            floor_si = floor * n_per_m3
        else:
            floor_si = floor / (M_g_per_mol * 1e-3)
        shown = (f"{floor:g} J/mol" if kind == "energy" else f"{floor:g} J/(mol K)")
        if unit_ is not None and not key.endswith("_molar"):
            shown = f"{floor_si / unit_.factor:.2g} {unit_.symbol}"
        return Tolerance(0.0, floor_si, f"{CHANGE_REL * 100:g} % of change from 298.15 K + {shown}",
                         "default", CHANGE_REL)
    rel = DEFAULT_REL[key]
    return Tolerance(rel, 0.0, f"{rel * 100:g} %", "default")


#: Largest tolerances accepted: 100 % relative; 1e12 in SI units absolute (beyond any
#: property value a table holds, so a bound and its plot stay finite).
MAX_RELATIVE_PERCENT = 100.0
MAX_ABSOLUTE_SI = 1e12

_TOL_PART = re.compile(r"^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*(%?)\s*(.*?)\s*$")


def parse_tolerance(text: str, ref_units: dict) -> tuple[str, Tolerance]:
    """'cp=0.1%', 'h=0.5' (column unit), 'h=0.5 kJ/kg', 'dh298_molar=0.5%+2' -> (key, Tolerance).

    Parameters
    ----------
    ref_units : key -> Unit, or tuple of Units, of the compared columns (a bare
        number is in that unit; a key given in several units needs a unit or a %)
    """
    if "=" not in text:
        raise TablegenError(f"--tolerance {text!r}: write COLUMN=VALUE or COLUMN=VALUE%, e.g. cp=0.1% or h=0.5")
    key, val = (x.strip() for x in text.split("=", 1))
    if key not in ref_units:
        raise TablegenError(f"--tolerance {text!r}: column {key!r} is not compared; "
                            f"compared columns: {', '.join(ref_units)}")
    rel, abs_si = 0.0, 0.0
    parts = [x for x in val.split("+")] if val else [""]
    # '1e+3' holds a '+': rejoin pieces that end in an exponent marker
    merged = []
    for part in parts:
        if merged and re.search(r"\d[eE]$", merged[-1].strip()):
            merged[-1] += "+" + part
        else:
            merged.append(part)
    seen_rel = seen_abs = False
    for part in merged:
        m = _TOL_PART.match(part)
        if not m or not part.strip():
            raise TablegenError(f"--tolerance {text!r}: {part.strip()!r} is not a number; "
                                f"write e.g. {key}=0.1% or {key}=0.5 or {key}=0.5%+0.2")
        v = float(m.group(1))
        if not (math.isfinite(v) and v >= 0):
            raise TablegenError(f"--tolerance {text!r}: tolerances must be numbers >= 0")
        if m.group(2) and v > MAX_RELATIVE_PERCENT:
            raise TablegenError(f"--tolerance {text!r}: a relative tolerance is at most "
                                f"{MAX_RELATIVE_PERCENT:g} %")
        if m.group(2):
            if m.group(3) or seen_rel:
                raise TablegenError(f"--tolerance {text!r}: write one relative part, e.g. {key}=0.1%")
            rel, seen_rel = v / 100.0, True
        else:
            if seen_abs:
                raise TablegenError(f"--tolerance {text!r}: write one absolute part, e.g. {key}=0.5%+0.2")
            u = ref_units[key]
            if isinstance(u, tuple):
                if len(u) > 1 and not m.group(3):
                    raise TablegenError(f"--tolerance {text!r}: {key} is given in "
                                        f"{' and '.join(x.symbol for x in u)}; give the absolute part "
                                        f"with a unit, e.g. {key}={v:g}{u[0].symbol}")
                u = u[0]
            if m.group(3):
                try:
                    u = _unit(m.group(3), u.dimension)
                except UnitError as e:
                    raise TablegenError(f"--tolerance {text!r}: {e}") from None
            abs_si, seen_abs = v * u.factor, True
            if not abs_si <= MAX_ABSOLUTE_SI:
                raise TablegenError(f"--tolerance {text!r}: an absolute tolerance is at most "
                                    f"{MAX_ABSOLUTE_SI / u.factor:.3g} {u.symbol} ({MAX_ABSOLUTE_SI:g} in SI units)")
    return key, Tolerance(rel, abs_si, val, "--tolerance")


def parse_align(text: str, keys) -> tuple[str, str]:
    """'h=offset', 'Pr=scale' -> (key, kind); checked against the compared keys."""
    if "=" not in text:
        raise TablegenError(f"--align {text!r}: write COLUMN=offset or COLUMN=scale, e.g. h=offset or Pr=scale")
    key, kind = (x.strip() for x in text.split("=", 1))
    if key not in keys:
        raise TablegenError(f"--align {text!r}: column {key!r} is not compared; compared columns: {', '.join(keys)}")
    if key not in ALIGNABLE:
        allowed = ", ".join(f"{k}={v}" for k, v in ALIGNABLE.items())
        raise TablegenError(f"--align {text!r}: {key} cannot be aligned (a datum does not shift it by a constant); "
                            f"allowed: {allowed}")
    if kind != ALIGNABLE[key]:
        raise TablegenError(f"--align {text!r}: {key} aligns by {ALIGNABLE[key]}, not {kind!r}; "
                            f"write {key}={ALIGNABLE[key]}")
    return key, kind


# ------------------------------------------------------------- comparing
@dataclass(frozen=True, slots=True)
class Alignment:
    """A fitted constant: tablegen + value (offset, SI) or tablegen × value (scale)."""

    key: str
    kind: str                     # "offset" or "scale"
    value: float                  # SI for an offset, dimensionless for a scale
    value_in_unit: float          # the offset in the reference column's unit (scale: = value)
    unit: str
    n: int
    rms_before: float             # RMS of Δ before / after alignment, column unit
    rms_after: float
    meaning: str


@dataclass(frozen=True, slots=True)
class ColumnResult:
    """One compared column: arrays over the reference rows (NaN where no value)."""

    key: str
    unit: Unit
    header: str
    tolerance: Tolerance
    reference: np.ndarray         # column unit
    tablegen_raw: np.ndarray      # column unit, before alignment
    tablegen: np.ndarray          # column unit, after alignment
    deviation: np.ndarray         # tablegen - reference, column unit
    relative: np.ndarray          # deviation / |reference| (NaN where reference is 0 or empty)
    bound: np.ndarray             # allowed |deviation|, column unit
    present: np.ndarray           # bool: the reference has a value
    within: np.ndarray            # bool: present and |deviation| <= bound
    text: tuple                   # reference cell text
    alignment: Alignment | None
    stats: dict

    @property
    def n_out(self) -> int:
        return int(np.sum(self.present & ~self.within))


@dataclass(frozen=True, slots=True)
class Comparison:
    """The finished comparison: everything the report, CSV and JSON show."""

    substance: dict               # id, name, kind, M, sources, datum, P_ref_Pa, anchor, T range
    reference: Reference
    T_K: np.ndarray
    extrapolated: np.ndarray      # bool per row
    columns: tuple                # ColumnResult
    version: str
    options: dict = field(default_factory=dict)

    @property
    def n_cells(self) -> int:
        return int(sum(int(np.sum(c.present)) for c in self.columns))

    @property
    def n_out(self) -> int:
        return sum(c.n_out for c in self.columns)

    @property
    def passed(self) -> bool:
        return self.n_out == 0

    @property
    def verdict(self) -> str:
        if self.passed:
            return f"PASS: all {self.n_cells} compared cells are within tolerance"
        return f"FAIL: {self.n_out} of {self.n_cells} compared cells are out of tolerance"

    def out_cells(self) -> list[dict]:
        """Every out-of-tolerance cell, in file order (row, then column)."""
        out = []
        ref = self.reference
        for i in range(self.T_K.size):
            for c in self.columns:
                if c.present[i] and not c.within[i]:
                    out.append({"line": ref.lines[i], "T_K": float(self.T_K[i]), "T": ref.T_text[i],
                                "column": c.key, "unit": c.unit.symbol, "reference": float(c.reference[i]),
                                "reference_text": c.text[i], "tablegen": float(c.tablegen[i]),
                                "deviation": float(c.deviation[i]), "bound": float(c.bound[i]),
                                "relative": _f(c.relative[i])})
        return out


def _f(x):
    x = float(x)
    return x if math.isfinite(x) else None


def substance_info(sub) -> dict:
    return {"id": sub.id, "name": sub.name, "kind": sub.kind, "M": sub.M,
            "sources": [list(s) for s in sub.sources], "h_datum": sub.datum.describe(),
            "P_ref_Pa": sub.P_ref_Pa,
            "anchor": {"T_K": sub.anchor.T_K, "Pr": sub.anchor.Pr, "vr": sub.anchor.vr},
            "T_min_K": sub.T_min, "T_max_K": sub.T_max}


def mean_cp_from_default(sub) -> float:
    """T_m of the mean heat capacities when none is given: the datum temperature of a
    sensible datum, else 298.15 K (the table book's rule)."""
    return sub.datum.T_ref_K if sub.datum.kind == "sensible" else 298.15


def mean_cp(sub, T, T_m: float, key: str) -> np.ndarray:
    """Mean heat capacity from T_m to T, SI (J/(kg K) or J/(mol K) for *_molar).

    cp_mean_h = [h(T) - h(T_m)]/(T - T_m), cp_mean_s = [s°(T) - s°(T_m)]/ln(T/T_m);
    both tend to cp(T_m) as T -> T_m, which is used within 1e-9 relative of T_m.
    """
    T = np.asarray(T, float)
    p = sub.properties(T, extrapolate=True)
    pm = sub.properties(np.array([T_m]), extrapolate=True)
    sfx = "_molar" if key.endswith(("_molar", "_vol")) else ""
    cp_m = pm["cp" + sfx][0]
    if key.startswith("cp_mean_h"):
        d = T - T_m
        num = p["h" + sfx] - pm["h" + sfx][0]
    else:
        d = np.log(T / T_m)
        num = p["s0" + sfx] - pm["s0" + sfx][0]
    near = np.abs(T - T_m) <= 1e-9 * T_m
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.where(near, cp_m, num / np.where(near, 1.0, d))


def compare(sub, ref: Reference, *, columns=None, tolerances=None, align=None,
            extrapolate: bool = False, T_mean_ref_K: float | None = None, volume_reference=None,
            version: str = "", options=None) -> Comparison:
    """Compare a substance with a reference table.

    Parameters
    ----------
    sub : Substance with the datum, P° and anchor the reference uses
    ref : Reference from :func:`read_reference`
    columns : keys to compare (default: every property column of the reference)
    tolerances : key -> Tolerance (others take :func:`default_tolerance`)
    align : key -> "offset" | "scale"
    extrapolate : allow reference temperatures outside the data range (marked)
    T_mean_ref_K : T_m of the mean heat capacities (default :func:`mean_cp_from_default`)
    volume_reference : (T_K, P_Pa, text) of the volumetric basis (default: normal conditions)

    Raises
    ------
    TablegenError naming the file and line of a temperature outside the data
    range, a column that is not in the reference, or a scale fit over
    non-positive values.
    """
    tolerances = dict(tolerances or {})
    align = dict(align or {})
    keys = list(columns) if columns else list(ref.keys)
    for k in keys:
        if k not in ref.keys:
            raise TablegenError(f"--columns: {k!r} is not a column of {ref.path}; "
                                f"its columns: {', '.join(ref.keys)}")
        if k not in ref.comparable_keys:
            raise TablegenError(f"{ref.path}:{ref.header_line}: column {k!r} cannot be evaluated here; "
                                f"compare the other "
                                f"columns with --columns {','.join(ref.comparable_keys)}")
    if len(set(keys)) != len(keys):
        raise TablegenError("--columns: a column is named twice; name each once")
    for k in list(tolerances) + list(align):
        if k not in keys:
            raise TablegenError(f"column {k!r} has a tolerance or alignment but is not compared; "
                                f"compared columns: {', '.join(keys)}")

    # A converted temperature may miss a range end by rounding (-73.15 °C is
    # 199.99999999999997 K): within 1e-9 relative it counts as the end itself.
    T = ref.T_K.copy()
    for end in (sub.T_min, sub.T_max):
        T[np.abs(T - end) <= 1e-9 * end] = end
    if not extrapolate:
        out = (T < sub.T_min) | (T > sub.T_max)
        if np.any(out):
            i = int(np.argmax(out))
            inK = "" if ref.T_unit.symbol == "K" else f" ({T[i]:g} K)"
            more = int(np.sum(out)) - 1
            inK += f" (and {more} more row{'s' if more > 1 else ''})" if more else ""
            raise RangeError(f"{ref.path}:{ref.lines[i]}: T = {ref.T_text[i]} {ref.T_unit.symbol}{inK} "
                             f"is outside the data range {sub.T_min:g}-{sub.T_max:g} K "
                             f"of {sub.id}; allowed: {sub.T_min:g} to {sub.T_max:g} K, or --extrapolate "
                             f"(every extrapolated value is marked)")
    p = dict(sub.properties(T, extrapolate=extrapolate))
    options = dict(options or {})
    n_per_m3 = 1.0
    if any(k in VOL_KEYS for k in keys):
        vT, vP, vtext = volume_reference or VOLUME_REFERENCES["normal"]
        n_per_m3 = vP / (R_MOLAR * vT)
        options["volume_reference"] = {"T_K": vT, "P_Pa": vP, "text": vtext, "n_mol_per_m3": n_per_m3}
    if any(k in MEAN_KEYS for k in keys):
        T_m = float(T_mean_ref_K) if T_mean_ref_K is not None else mean_cp_from_default(sub)
        options["T_mean_ref_K"] = T_m
        for k in MEAN_KEYS:
            if k in keys:
                p[k] = mean_cp(sub, T, T_m, k) * (n_per_m3 if k.endswith("_vol") else 1.0)
    for k in VOL_KEYS:
        if k in keys and k not in MEAN_KEYS:
            p[k] = p[k[:-4] + "_molar"] * n_per_m3
    extrap = np.asarray(p.get("extrapolated", np.zeros(T.shape, bool)), bool)

    results = []
    selected = [rc for rc in ref.columns if rc.key in keys]
    selected.sort(key=lambda rc: keys.index(rc.key))
    for rc in selected:
        key = rc.key
        u = rc.unit
        present = np.isfinite(rc.values_si)
        ref_si = rc.values_si
        calc_si = np.asarray(p[key], float)
        alignment = None
        aligned_si = calc_si
        if key in align:
            alignment, aligned_si = _fit(key, align[key], ref_si, calc_si, present, u, ref, sub, rc)
        tol = tolerances.get(key) or default_tolerance(key, sub.M, u, n_per_m3)
        change_si = 0.0
        if tol.rel_change:
            p0 = sub.properties(np.array([T_CHANGE_FROM]), extrapolate=True)
            at0 = (float(p0[key[:-4] + "_molar"][0]) * n_per_m3 if key.endswith("_vol")
                   else float(np.asarray(p0[key])[0]))
            if alignment is not None:
                at0 = at0 + alignment.value if alignment.kind == "offset" else at0 * alignment.value
            change_si = aligned_si - at0
        dev_si = np.where(present, aligned_si - ref_si, np.nan)
        with np.errstate(divide="ignore", invalid="ignore"):
            rel = np.where(present & (ref_si != 0), dev_si / np.abs(ref_si), np.nan)
        quantum_si = np.where(present, rc.quantum * u.factor, np.nan)
        bound_si = np.where(present, tol.bound_si(ref_si, quantum_si, change_si), np.nan)
        within = present & (np.abs(np.nan_to_num(dev_si, nan=np.inf)) <= np.nan_to_num(bound_si, nan=-1))
        ref_u, raw_u, cal_u = (u.from_si(x) for x in (ref_si, calc_si, aligned_si))
        dev_u = dev_si / u.factor
        bound_u = bound_si / u.factor
        results.append(ColumnResult(
            key=key, unit=u, header=rc.header, tolerance=tol,
            reference=np.where(present, ref_u, np.nan), tablegen_raw=raw_u, tablegen=cal_u,
            deviation=dev_u, relative=rel, bound=bound_u, present=present, within=within,
            text=rc.text, alignment=alignment,
            stats=_stats(dev_u, rel, bound_u, present, within, T, ref)))
    if not any(np.any(r.present) for r in results):
        raise TablegenError(f"{ref.path}: the compared columns hold no values (every cell is a gap); "
                            f"there is nothing to judge")
    from . import __version__
    return Comparison(substance_info(sub), ref, T, extrap, tuple(results),
                      version or __version__, options)


def _fit(key, kind, ref_si, calc_si, present, u, ref, sub, rc):
    n = int(np.sum(present))
    if n == 0:
        raise TablegenError(f"--align {key}={kind}: column {key!r} of {ref.path} has no values to fit")
    r, c = ref_si[present], calc_si[present]
    rms_before = float(np.sqrt(np.mean((c - r) ** 2))) / u.factor
    if kind == "offset":
        value = float(np.mean(r - c))
        aligned = calc_si + value
        vu = value / u.factor
        meaning = (f"tablegen {KEY_LABELS[key]} + {vu:.9g} {u.symbol} (least squares over {n} rows); "
                   f"a different enthalpy datum or entropy reference pressure shifts {KEY_LABELS[key]} by a constant")
    else:
        if np.any(r <= 0):
            i = int(np.flatnonzero(present)[np.argmax(r <= 0)])
            raise TablegenError(f"{ref.path}:{ref.lines[i]}: {key} value {rc.text[i]} is not "
                                f"positive; a scale fit needs positive {key} values")
        value = float(np.exp(np.mean(np.log(r) - np.log(c))))
        aligned = calc_si * value
        vu = value
        a = sub.anchor
        scaled = a.Pr * value if key == "Pr" else a.vr * value
        meaning = (f"tablegen {key} × {value:.9g} (least squares on ln {key} over {n} rows); "
                   f"equivalent to the anchor {key} = {scaled:.9g} at {a.T_K:g} K")
    rms_after = float(np.sqrt(np.mean((aligned[present] - r) ** 2))) / u.factor
    return Alignment(key, kind, value, vu, u.symbol if kind == "offset" else "-", n,
                     rms_before, rms_after, meaning), aligned


def _stats(dev, rel, bound, present, within, T, ref) -> dict:
    n = int(np.sum(present))
    if n == 0:
        return {"n": 0, "n_out": 0}
    d = dev[present]
    idx = np.flatnonzero(present)
    i = int(idx[np.argmax(np.abs(d))])
    out = {"n": n, "n_out": int(np.sum(present & ~within)),
           "max_abs": float(np.abs(dev[i])), "max_signed": float(dev[i]),
           "max_at_T_K": float(T[i]), "max_at_T": ref.T_text[i], "max_at_line": ref.lines[i],
           "mean": float(np.mean(d)), "mean_abs": float(np.mean(np.abs(d))),
           "rms": float(np.sqrt(np.mean(d ** 2)))}
    r = rel[present]
    ok = np.isfinite(r)
    if np.any(ok):
        j = int(idx[ok][np.argmax(np.abs(r[ok]))])
        out.update(max_rel=float(abs(rel[j])), max_rel_at_T_K=float(T[j]), max_rel_at_line=ref.lines[j],
                   rms_rel=float(np.sqrt(np.mean(r[ok] ** 2))))
    with np.errstate(divide="ignore", invalid="ignore"):
        use = np.abs(d) / bound[present]
    use = np.where(np.isfinite(use), use, np.where(np.abs(d) > 0, np.inf, 0.0))
    out["max_use_of_tolerance"] = float(np.max(use))
    return out


# ------------------------------------------------------------ formatting
def format_like(value: float, text: str) -> str:
    """A number printed to the places of a reference cell's text ('29.104' -> 3 decimals)."""
    if not math.isfinite(value):
        return "—"
    if not text:
        return f"{value:.6g}"
    m = _NUMBER.match(text)
    mant, exp = m.group(1), m.group(2)
    decimals = len(mant.split(".", 1)[1]) if "." in mant else 0
    if exp:
        return f"{value:.{decimals}e}"
    return f"{value:.{decimals}f}"


def format_dev(value: float) -> str:
    """A deviation to two significant figures."""
    if not math.isfinite(value):
        return "—"
    if value == 0:
        return "0"
    return f"{value:+.2g}".replace("e-0", "e-").replace("e+0", "e")


def _neutral(text: str) -> str:
    """Neutralise text against spreadsheet formula injection; numbers stay numbers."""
    s = str(text)
    if _NUMBER.match(s) or re.fullmatch(r"-?(inf|nan)", s):
        return s
    return "'" + s if s[:1] in ("=", "+", "-", "@", "\t", "\r", "|", "%") else s


def deviations_csv(cmp: Comparison) -> str:
    """RFC 4180 CSV, one row per reference row, full precision, reference units.

    Per compared column: <key>.reference, <key>.tablegen (after alignment),
    <key>.deviation, <key>.relative, <key>.bound and <key>.status (within,
    OUT, or empty where the reference has no value).
    """
    ref = cmp.reference
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\r\n")
    head = ["line [-]", f"T [{ref.T_unit.symbol}]", "T_K [K]", "extrapolated [-]"]
    for c in cmp.columns:
        s = c.unit.symbol
        head += [f"{c.key}.reference [{s}]", f"{c.key}.tablegen [{s}]", f"{c.key}.deviation [{s}]",
                 f"{c.key}.relative [-]", f"{c.key}.bound [{s}]", f"{c.key}.status [-]"]
    w.writerow(head)
    for i in range(cmp.T_K.size):
        row = [str(ref.lines[i]), ref.T_text[i], repr(float(cmp.T_K[i])), "yes" if cmp.extrapolated[i] else "no"]
        for c in cmp.columns:
            if c.present[i]:
                row += [c.text[i], repr(float(c.tablegen[i])), repr(float(c.deviation[i])),
                        "" if not math.isfinite(c.relative[i]) else repr(float(c.relative[i])),
                        repr(float(c.bound[i])), "within" if c.within[i] else "OUT"]
            else:
                row += ["", repr(float(c.tablegen[i])), "", "", "", ""]
        w.writerow([_neutral(x) for x in row])
    return buf.getvalue()


def summary(cmp: Comparison) -> dict:
    """The JSON summary (sorted keys when dumped); values in the reference's units."""
    ref = cmp.reference
    cols = []
    for c in cmp.columns:
        t = c.tolerance
        cols.append({"key": c.key, "unit": c.unit.symbol, "header": c.header,
                     "tolerance": {"text": t.text, "relative": t.rel, "absolute": t.abs_si / c.unit.factor,
                                   "relative_to_change_from_298.15K": t.rel_change,
                                   "origin": t.origin, "rounding_allowance": "half a unit in the last printed "
                                   "place of each reference cell"},
                     "stats": c.stats,
                     "alignment": None if c.alignment is None else _alignment_json(c.alignment)})
    return {
        "verdict": "pass" if cmp.passed else "fail",
        "verdict_text": cmp.verdict,
        "exit_status": 0 if cmp.passed else 1,
        "cells_compared": cmp.n_cells,
        "cells_out_of_tolerance": cmp.n_out,
        "substance": cmp.substance,
        "reference": {"file": ref.path, "sha256": ref.sha256, "layout": ref.layout, "rows": len(ref.lines),
                      "T_unit": ref.T_unit.symbol, "T_min_K": float(np.min(ref.T_K)),
                      "T_max_K": float(np.max(ref.T_K)), "columns": list(ref.keys),
                      "comments": list(ref.comments)},
        "extrapolated_rows": [ref.lines[i] for i in np.flatnonzero(cmp.extrapolated)],
        "columns": cols,
        "alignments": [_alignment_json(c.alignment) for c in cmp.columns if c.alignment is not None],
        "out_of_tolerance": cmp.out_cells(),
        "rules": RULES,
        "caution": CAUTION,
        "tablegen_version": cmp.version,
        "options": cmp.options,
    }


def _alignment_json(a: Alignment) -> dict:
    return {"column": a.key, "kind": a.kind, "value": a.value_in_unit, "unit": a.unit, "n": a.n,
            "rms_before": a.rms_before, "rms_after": a.rms_after, "meaning": a.meaning}


RULES = ("deviation = tablegen (after alignment) − reference, in the reference column's unit; "
         "a cell is within tolerance when |deviation| ≤ relative tolerance × |reference| + absolute tolerance "
         "+ half a unit in the last printed place of the reference cell (default tolerances of h, u and s° "
         "take their relative part from the change since 298.15 K instead of the value); offsets are fitted by least squares "
         "(mean of reference − tablegen), scale factors by least squares on logarithms")

CAUTION = ("This comparison checks agreement with the given reference only: it does not show that either "
           "table is correct, and it does not replace review under the applicable codes and licensed "
           "engineering practice.")
