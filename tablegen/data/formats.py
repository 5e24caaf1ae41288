"""Reading and writing the two fixed-column coefficient formats of the NASA reports.

Readers and writers follow the format descriptions printed in the reports:

* **tm-4513**: the 7-coefficient, two-interval card format of NASA TM-4513
  (B. J. McBride, S. Gordon and M. A. Reno, 1993). Four 80-column lines a
  species, the line number (1-4) in column 80::

      line 1  cols  1-18  species name          A18
              cols 19-24  date code             A6
              cols 25-44  formula, 4 x (A2, F3.0): element symbol, count
              col  45     phase: G gas (C, L or S condensed)
              cols 46-55  lowest temperature, K F10.3
              cols 56-65  highest temperature, K F10.3
              cols 66-79  molecular weight      (a code letter before it is ignored)
      line 2  5 E15.8     a1..a5 of the upper interval (1000 K to highest)
      line 3  5 E15.8     a6, a7 of the upper; a1, a2, a3 of the lower interval
      line 4  5 E15.8     a4..a7 of the lower interval; H(298.15 K)/R in K

  The common temperature of the two intervals is 1000 K in every record of
  that report, so the format has no field for it.

* **tp-2002**: the 9-coefficient, multi-interval format of NASA/TP-2002-211556
  (B. J. McBride, M. J. Zehe and S. Gordon, 2002), Appendix C::

      record 1  species name (first word), then comments and data source
      record 2  cols  1-2   number of intervals      I2
                cols  4-9   reference code           A6
                cols 11-50  formula, 5 x (A2, F6.2)
                cols 51-52  zero for gas, nonzero for condensed  I2
                cols 53-65  molecular weight         F13.7
                cols 66-80  heat of formation at 298.15 K, J/mol  F15.5
      then per interval:
      record 3  cols  1-22  temperature range        2F11.3
                col  23     number of coefficients (7)
                cols 24-63  exponents of T           8F5.1 (-2 -1 0 1 2 3 4 0)
                cols 66-80  H(298.15) - H(0), J/mol  F15.3
      record 4  cols  1-80  a1..a5                   5D16.8
      record 5  cols  1-32  a6, a7; cols 33-48 blank; cols 49-80 b1, b2

Lines starting with ``!`` or ``#`` are comment lines (an extension of ours:
neither report has a comment field wide enough for a mixture's composition);
the header and trailer lines ``thermo``, ``END PRODUCTS`` and ``END REACTANTS``
of NASA data files and a line of global temperatures after ``thermo`` are
skipped. Fortran reads a fixed field with an explicit decimal point whatever
the decimals, so the writers use every digit a field holds.

Readers return raw records in the gasdata layout (the keys a gasdata TOML
``[[species]]`` table has) with the line each record starts on; validation is
the library's job (tablegen.data.validate).
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass

from ..core.errors import DataError
from ..thermo.polynomial import NINE, SEVEN
from . import former_names

#: Names of the two card layouts, after the reports that define them (``export --format``, ``fit --format``).
TM4513 = "tm-4513"
TP2002 = "tp-2002"
CARD_FORMATS = (TM4513, TP2002)

#: The exponents of T in eq. (1) of NASA/TP-2002-211556, then the unused 8th slot.
TP2002_EXPONENTS = (-2.0, -1.0, 0.0, 1.0, 2.0, 3.0, 4.0, 0.0)

#: Common temperature of the two intervals of a TM-4513 record, K.
TM4513_COMMON_T = 1000.0

#: File extensions read from a data folder (a file named with --data is read
#: whatever its name); the former extensions too (tablegen.data.former_names).
FOLDER_EXTENSIONS = (".toml", ".dat", ".inp", ".thermo", *former_names.EXTENSIONS)

_MARKERS = re.compile(r"^\s*(thermo\b|end\b)", re.I)
_SYMBOL = re.compile(r"^[A-Za-z][A-Za-z]?$")


@dataclass(frozen=True, slots=True)
class RawRecord:
    """One record as read from a card file: gasdata keys plus checks."""

    line: int
    raw: dict


def _where(path, line: int, name: str | None = None) -> str:
    return f"{path}:{line}: " + (f"{name}: " if name else "")


def _float(text: str, where: str, what: str, cols: tuple[int, int], fmt: str) -> float:
    t = text.strip()
    if not t:
        raise DataError(f"{where}{what} (columns {cols[0]}-{cols[1]}) is blank; the format needs a "
                        f"number in {fmt} there")
    if " " in t:
        raise DataError(f"{where}{what} (columns {cols[0]}-{cols[1]}) holds {t!r}, which spans two "
                        f"fields; check the column widths ({fmt} fields)")
    try:
        v = float(t.replace("D", "E").replace("d", "e"))
    except ValueError:
        raise DataError(f"{where}{what} (columns {cols[0]}-{cols[1]}) is not a number: {t!r}; "
                        f"the format needs {fmt} there (check the value and the column widths)") from None
    if not math.isfinite(v):
        raise DataError(f"{where}{what} (columns {cols[0]}-{cols[1]}) is not finite: {t!r}")
    return v


def _resolution(text: str) -> float:
    """Half a unit in the last written decimal of a count field (0 for integers)."""
    t = text.strip()
    if "." not in t:
        return 0.0
    dec = len(t.split(".", 1)[1])
    v = float(t)
    if dec == 0 or abs(v - round(v)) < 1e-12:
        return 0.0
    return 0.5 * 10.0 ** (-dec)


def _formula(text: str, slots: int, width: int, first_col: int, where: str, fmt: str):
    """Element symbols and counts of a formula field -> (elements, resolution)."""
    elements, res = {}, {}
    for k in range(slots):
        a = first_col + k * (2 + width)
        sym = text[a - 1: a + 1].strip()
        cnt = text[a + 1: a + 1 + width]
        if not sym and not cnt.strip():
            continue
        n = 0.0 if not cnt.strip() else _float(cnt, where, f"count of element {k + 1}",
                                                (a + 2, a + 1 + width), fmt)
        if n == 0.0:
            continue
        if not _SYMBOL.match(sym):
            raise DataError(f"{where}element symbol {k + 1} (columns {a}-{a + 1}) is {sym!r}; "
                            f"a symbol is one or two letters")
        sym = sym[0].upper() + sym[1:].lower()
        if sym in elements:
            raise DataError(f"{where}element {sym} appears twice in the formula")
        elements[sym] = int(round(n)) if abs(n - round(n)) < 1e-9 else n
        res[sym] = _resolution(cnt)
    if not elements:
        raise DataError(f"{where}the formula field (columns {first_col}-{first_col + slots * (2 + width) - 1}) "
                        f"holds no element")
    return elements, res


def _is_comment(line: str) -> bool:
    s = line.strip()
    return not s or s[0] in "!#"


def _lines(text: str) -> list[str]:
    return text.replace("\r\n", "\n").replace("\r", "\n").split("\n")


def _skip_header(lines: list[str], i: int) -> int:
    """Skip a 'thermo' line and the line of global temperatures after it."""
    if i < len(lines) and lines[i].strip().lower().startswith("thermo"):
        i += 1
        if i < len(lines):
            parts = lines[i].split()
            try:
                [float(p) for p in parts[:3]]
                if parts and len(lines[i].rstrip()) < 80:
                    i += 1
            except ValueError:
                pass
    return i


# --------------------------------------------------------------------- tm-4513
def read_tm4513(text: str, path) -> tuple[list[RawRecord], list[str]]:
    """Read a TM-4513 card file.

    Returns
    -------
    (records, notes): raw gas-phase records and notes on skipped records.

    Raises
    ------
    DataError naming file, line and record for any malformed line.
    """
    def one(lines, i):
        rec, phase = _tm4513_record(lines, i, path)
        return rec, phase, 4

    return _read_cards(text, path, one, "no TM-4513 record found; a record is 4 lines of 80 columns "
                                        "numbered 1-4 in column 80")


def _read_cards(text, path, one, none_found: str):
    """Records of a card file, one after the other; non-gas records counted in one note.

    ``one(lines, i)`` reads the record starting at line i and returns (record,
    phase, number of lines it took).
    """
    lines = _lines(text)
    out, notes = [], []
    i = 0
    while i < len(lines):
        i = _skip_header(lines, i)
        if i >= len(lines):
            break
        if _is_comment(lines[i]) or _MARKERS.match(lines[i]):
            i += 1
            continue
        rec, phase, n_lines = one(lines, i)
        if phase == "gas":
            out.append(rec)
        else:
            notes.append((i + 1, rec.raw["id"], phase))
        i += n_lines
    if not out and not notes:
        raise DataError(f"{path}: {none_found}")
    return out, _skipped(path, notes)


def _card(lines, i, n, path, name):
    where = _where(path, i + 1, name)
    if i >= len(lines) or not lines[i].strip():
        raise DataError(f"{_where(path, i + 1, name)}line {n} of the record is missing; a TM-4513 record "
                        f"has 4 lines numbered 1-4 in column 80")
    ln = lines[i].rstrip("\n")
    if len(ln.rstrip()) > 80:
        raise DataError(f"{where}line is {len(ln.rstrip())} columns wide; the TM-4513 format has 80 columns")
    if len(ln) < 80 or ln[79] != str(n):
        got = ln[79] if len(ln) >= 80 else "nothing (line too short)"
        raise DataError(f"{where}column 80 should hold the line number {n} but holds {got!r}; "
                        f"check the column widths (80 columns, line number in column 80)")
    return ln.ljust(80), where


def _tm4513_record(lines, i, path) -> tuple[RawRecord, str]:
    first, where = _card(lines, i, 1, path, None)
    name = first[0:18].strip()
    if not name:
        raise DataError(f"{where}the species name (columns 1-18) is blank")
    sid = name.split()[0]
    where = _where(path, i + 1, sid)
    date = first[18:24].strip()
    elements, res = _formula(first, 4, 3, 25, where, "(A2, F3.0)")
    ph = first[44].strip().upper()
    if ph not in ("G", "C", "L", "S"):
        raise DataError(f"{where}phase (column 45) is {first[44]!r}; allowed: G for gas, C, L or S for condensed")
    T_lo = _float(first[45:55], where, "lowest temperature", (46, 55), "F10.3")
    T_hi = _float(first[55:65], where, "highest temperature", (56, 65), "F10.3")
    mw_text = first[65:79].split()
    if mw_text and re.fullmatch(r"[A-Za-z]", mw_text[0]):
        mw_text = mw_text[1:]
    if len(mw_text) != 1:
        raise DataError(f"{where}molecular weight (columns 66-79) should be one number, found "
                        f"{first[65:79].strip()!r}")
    M = _float(mw_text[0], where, "molecular weight", (66, 79), "F13.5")
    c = []
    for n in (2, 3, 4):
        ln, w = _card(lines, i + n - 1, n, path, sid)
        for k in range(5):
            c.append(_float(ln[15 * k: 15 * k + 15], w, f"coefficient field {k + 1}",
                            (15 * k + 1, 15 * k + 15), "E15.8"))
        if ln[75:79].strip():
            raise DataError(f"{w}columns 76-79 should be blank but hold {ln[75:79].strip()!r}; "
                            f"check the column widths (5 fields of E15.8)")
    upper, lower, h298R = c[0:7], c[7:14], c[14]
    if not T_lo < TM4513_COMMON_T < T_hi:
        raise DataError(f"{where}temperature range {T_lo:g}-{T_hi:g} K does not contain the common "
                        f"temperature {TM4513_COMMON_T:g} K of the TM-4513 format; the two intervals "
                        f"must be contiguous at 1000 K")
    raw = {
        "id": sid, "name": name, "elements": elements, "molar_mass_g_per_mol": M,
        "phase": "gas" if ph == "G" else "condensed", "form": SEVEN,
        "T_bounds_K": [T_lo, TM4513_COMMON_T, T_hi], "coefficients": [lower, upper],
        "source_note": date,
        "_checks": {"h298_over_R_K": h298R, "count_resolution": res, "format": TM4513},
    }
    return RawRecord(i + 1, raw), raw["phase"]


# --------------------------------------------------------------------- tp-2002
def read_tp2002(text: str, path) -> tuple[list[RawRecord], list[str]]:
    """Read a NASA/TP-2002-211556 coefficient file; see :func:`read_tm4513`."""
    def one(lines, i):
        rec, n_lines = _tp2002_record(lines, i, path)
        return rec, rec.raw["phase"], n_lines

    return _read_cards(text, path, one, "no NASA/TP-2002-211556 record found")


def _skipped(path, notes) -> list[str]:
    """One note for the records that are not ideal-gas polynomials."""
    if not notes:
        return []
    line, sid, _ = notes[0]
    more = f" and {len(notes) - 1} more" if len(notes) > 1 else ""
    return [f"{path}:{line}: skipped {len(notes)} record(s) that are not ideal-gas polynomials "
            f"(condensed phases or single-temperature species): {sid}{more}"]


def _line80(lines, i, path, name, what):
    if i >= len(lines) or _is_comment(lines[i]) or _MARKERS.match(lines[i]):
        raise DataError(f"{_where(path, i + 1, name)}{what} is missing (end of record or file reached); "
                        f"check the number of intervals on the record's second line")
    ln = lines[i].rstrip()
    if len(ln) > 80:
        raise DataError(f"{_where(path, i + 1, name)}line is {len(ln)} columns wide; the format has 80 columns")
    return ln.ljust(80), _where(path, i + 1, name)


def _tp2002_record(lines, i, path) -> tuple[RawRecord, int]:
    head = lines[i].rstrip()
    words = head.split()
    sid = words[0]
    comment = head[len(head) - len(head.lstrip()) + len(sid):].strip()
    start = i + 1
    ln, where = _line80(lines, i + 1, path, sid, "the second record (intervals, formula, molecular weight)")
    n_text = ln[0:2].strip()
    try:
        n_int = int(n_text)
    except ValueError:
        raise DataError(f"{where}number of intervals (columns 1-2) is {n_text!r}; it must be an integer "
                        f"(I2); check the column widths") from None
    if n_int < 0:
        raise DataError(f"{where}number of intervals is {n_int}; it cannot be negative")
    if n_int == 0:
        # a species given at one temperature only (the report's reactant records): no
        # polynomial, so nothing to tabulate; its one temperature line follows
        raw = {"id": sid, "name": sid, "phase": "single-temperature"}
        return RawRecord(start, raw), 3
    refcode = ln[3:9].strip()
    elements, res = _formula(ln, 5, 6, 11, where, "(A2, F6.2)")
    ph_text = ln[50:52].strip() or "0"
    try:
        ph = int(float(ph_text))
    except ValueError:
        raise DataError(f"{where}phase (columns 51-52) is {ph_text!r}; 0 for gas, nonzero for condensed") from None
    M = _float(ln[52:65], where, "molecular weight", (53, 65), "F13.7")
    hf = _float(ln[65:80], where, "heat of formation", (66, 80), "F15.5")
    bounds, rows, h0 = [], [], []
    j = i + 2
    for k in range(n_int):
        what = f"interval {k + 1} of {n_int}"
        r3, w3 = _line80(lines, j, path, sid, f"the temperature-range line of {what}")
        T_lo = _float(r3[0:11], w3, f"{what}: lowest temperature", (1, 11), "F11.3")
        T_hi = _float(r3[11:22], w3, f"{what}: highest temperature", (12, 22), "F11.3")
        nc = r3[22].strip()
        if nc != "7":
            raise DataError(f"{w3}{what}: number of coefficients (column 23) is {nc!r}; "
                            f"the format always has 7; check the column widths")
        exps = tuple(_float(r3[23 + 5 * m: 28 + 5 * m], w3, f"{what}: exponent {m + 1}",
                            (24 + 5 * m, 28 + 5 * m), "F5.1") for m in range(8))
        if any(abs(a - b) > 1e-9 for a, b in zip(exps, TP2002_EXPONENTS)):
            raise DataError(f"{w3}{what}: exponents {list(exps)} are not those of eq. (1) "
                            f"{list(TP2002_EXPONENTS)}; only that form is read")
        dh0 = r3[65:80].strip()
        h0.append(_float(dh0, w3, f"{what}: H(298.15)-H(0)", (66, 80), "F15.3") if dh0 else 0.0)
        r4, w4 = _line80(lines, j + 1, path, sid, f"the first coefficient line of {what}")
        a = [_float(r4[16 * m: 16 * m + 16], w4, f"{what}: coefficient a{m + 1}", (16 * m + 1, 16 * m + 16),
                    "D16.8") for m in range(5)]
        r5, w5 = _line80(lines, j + 2, path, sid, f"the second coefficient line of {what}")
        a += [_float(r5[16 * m: 16 * m + 16], w5, f"{what}: coefficient a{m + 6}", (16 * m + 1, 16 * m + 16),
                     "D16.8") for m in range(2)]
        if r5[32:48].strip():
            raise DataError(f"{w5}{what}: columns 33-48 should be blank but hold {r5[32:48].strip()!r}; "
                            f"check the column widths (a6, a7, blank, b1, b2 in D16.8 fields)")
        a += [_float(r5[48 + 16 * m: 64 + 16 * m], w5, f"{what}: integration constant b{m + 1}",
                     (49 + 16 * m, 64 + 16 * m), "D16.8") for m in range(2)]
        if bounds:
            if abs(T_lo - bounds[-1]) > 1e-6 * bounds[-1]:
                raise DataError(f"{w3}{what} starts at {T_lo:g} K but interval {k} ends at {bounds[-1]:g} K; "
                                f"intervals must be contiguous")
        else:
            bounds.append(T_lo)
        if not T_hi > T_lo:
            raise DataError(f"{w3}{what}: temperature range {T_lo:g}-{T_hi:g} K is not increasing")
        bounds.append(T_hi)
        rows.append(a)
        j += 3
    raw = {
        "id": sid, "name": sid, "elements": elements, "molar_mass_g_per_mol": M,
        "phase": "gas" if ph == 0 else "condensed", "form": NINE,
        "T_bounds_K": bounds, "coefficients": rows,
        "source_note": " ".join(x for x in (refcode, comment) if x),
        "_checks": {"h_formation_J_per_mol": hf, "count_resolution": res, "format": TP2002},
    }
    if any(h0):
        raw["dh298_0_J_per_mol"] = h0[0]
    return RawRecord(start, raw), j - i


# -------------------------------------------------------------------- detect
def detect(path, text: str) -> str:
    """Format of a data file: "toml", TM4513 ("tm-4513") or TP2002 ("tp-2002").

    By content first (a ``[dataset]`` table, a line numbered 1 in column 80,
    a second record line with an interval count), then by extension.
    """
    from pathlib import Path
    if re.search(r"^\s*\[dataset\]", text, re.M):
        return "toml"
    lines = _lines(text)
    i = _skip_header(lines, 0)
    while i < len(lines) and (_is_comment(lines[i]) or _MARKERS.match(lines[i])):
        i += 1
        i = _skip_header(lines, i)
    if i < len(lines):
        ln = lines[i].rstrip()
        if len(ln) >= 80 and ln[79] == "1":
            return TM4513
        nxt = lines[i + 1] if i + 1 < len(lines) else ""
        if re.match(r"^(\s\d|\d\d)\s", nxt[:3] + " "):
            return TP2002
    ext = Path(path).suffix.lower()
    if ext == ".toml":
        return "toml"
    if ext in former_names.EXTENSIONS:
        return former_names.EXTENSIONS[ext]
    raise DataError(f"{path}: cannot tell the format of this file; allowed: a gasdata TOML file "
                    f"(with a [dataset] table), the NASA TM-4513 card format (80 columns, line numbers "
                    f"in column 80) or the NASA/TP-2002-211556 format (see docs/user-data.md)")


# ------------------------------------------------------------------- writing
def fixed(x: float, width: int, max_decimals: int = 12) -> str:
    """x right-aligned in ``width`` columns with as many decimals as fit."""
    for d in range(max_decimals, -1, -1):
        s = f"{x:.{d}f}"
        if len(s) <= width:
            return s.rjust(width)
    raise DataError(f"{x!r} does not fit in a field of {width} columns")


def _count(n: float, width: int) -> str:
    """An element count in ``width`` columns: an integer, else the most decimals
    that fit (trailing zeros dropped, a leading zero dropped only when needed,
    as Fortran reads ".42"); a leading blank is kept where there is room."""
    if abs(n - round(n)) < 1e-12 and len(str(int(round(n)))) <= width:
        return str(int(round(n))).rjust(width)
    for d in range(12, 0, -1):
        s = f"{n:.{d}f}".rstrip("0")
        if float(s) == 0.0 or float(s) == round(float(s)):
            # rounded to zero or to a whole number: a reader would take it as exact
            if len(s.lstrip("-")) <= width:
                break
            continue
        short = s.replace("0.", ".", 1) if s.lstrip("-").startswith("0.") else s
        for t in (s, short):
            if len(t) <= width:
                return (short if len(short) < len(t) and len(t) == width else t).rjust(width)
    raise DataError(f"element count {n!r} does not fit a field of {width} columns")


def _e(x: float, width: int, letter: str = "E") -> str:
    dec = width - 7          # sign, digit, point, E, sign, two exponent digits
    s = f"{x:{width}.{dec}E}"
    if len(s) > width:       # three-digit exponent: one decimal fewer
        s = f"{x:{width}.{dec - 1}E}"
    if len(s) > width:
        raise DataError(f"{x!r} does not fit in a field of {width} columns")
    return s.replace("E", letter)


def _formula_text(elements: dict, slots: int, width: int, fmt: str) -> str:
    items = [(e, n) for e, n in elements.items() if n != 0]
    if len(items) > slots:
        raise DataError(f"the formula has {len(items)} elements but the {fmt} formula field holds {slots}")
    out = ""
    for e, n in items:
        if len(e) > 2:
            raise DataError(f"element symbol {e!r} does not fit the 2-column symbol field")
        out += e.upper().ljust(2)
        out += _count(float(n), width)
    for _ in range(slots - len(items)):
        out += "  " + (" " * (width - 1) + "0" if width <= 3 else fixed(0.0, width, 2))
    return out


def write_tm4513(rec: dict, comments=()) -> str:
    """A TM-4513 card record (4 lines) from a dict with id, elements, M,
    T_bounds_K (3 values, middle 1000 K) and coefficients (2 rows of 7, lower
    interval first), optional date (6 characters), h298_over_R_K."""
    sid = str(rec["id"])
    if len(sid) > 18 or " " in sid:
        raise DataError(f"species name {sid!r} does not fit the 18-column name field of TM-4513 "
                        f"(no spaces); give a shorter --id")
    b = [float(x) for x in rec["T_bounds_K"]]
    lower, upper = (list(map(float, r)) for r in rec["coefficients"])
    date = str(rec.get("date", ""))[:6]
    l1 = (sid.ljust(18) + date.ljust(6) + _formula_text(rec["elements"], 4, 3, "TM-4513") + "G"
          + fixed(b[0], 10, 3) + fixed(b[2], 10, 3) + " " + fixed(float(rec["M"]), 12) + " ")
    vals = upper + lower + [float(rec.get("h298_over_R_K", 0.0))]
    out = [f"! {c}" for c in comments]
    out.append(l1 + "1")
    for n in range(3):
        out.append("".join(_e(v, 15) for v in vals[5 * n: 5 * n + 5]) + "    " + str(n + 2))
    for n, ln in enumerate(out[len(comments):], start=1):
        if len(ln) != 80:   # a number too large for its fixed-width field
            raise DataError(f"record {sid!r} cannot be written as a TM-4513 card: line {n} would be "
                            f"{len(ln)} characters; allowed: 80 (a value overflows its field)")
    return "\n".join(out) + "\n"


def write_tp2002(rec: dict, comments=()) -> str:
    """A NASA/TP-2002-211556 record from a dict with id, comment, refcode,
    elements, M, h_formation_J_per_mol, T_bounds_K, coefficients (rows of 9)."""
    sid = str(rec["id"])
    if len(sid) > 18 or " " in sid:
        raise DataError(f"species name {sid!r} does not fit the 18-column name field (no spaces); "
                        f"give a shorter --id")
    b = [float(x) for x in rec["T_bounds_K"]]
    rows = [list(map(float, r)) for r in rec["coefficients"]]
    if len(rows) > 99:
        raise DataError("more than 99 intervals do not fit the I2 interval count")
    out = [f"! {c}" for c in comments]
    # fixed columns are counted in bytes by Fortran readers: ASCII only on record lines
    comment = str(rec.get("comment", "")).replace("λ", "lambda").encode("ascii", "replace").decode()
    out.append((sid.ljust(18) + comment[:62]).rstrip())
    out.append(f"{len(rows):2d} " + str(rec.get("refcode", ""))[:6].ljust(6) + " "
               + _formula_text(rec["elements"], 5, 6, "TP-2002-211556") + " 0"
               + " " + fixed(float(rec["M"]), 12) + fixed(float(rec.get("h_formation_J_per_mol", 0.0)), 15, 5))
    exps = "".join(f"{e:5.1f}" for e in TP2002_EXPONENTS)
    for k, r in enumerate(rows):
        out.append(fixed(b[k], 11, 3) + fixed(b[k + 1], 11, 3) + "7" + exps + "  "
                   + fixed(float(rec.get("dh298_0_J_per_mol", 0.0)), 15, 3))
        out.append("".join(_e(v, 16, "D") for v in r[0:5]))
        out.append("".join(_e(v, 16, "D") for v in r[5:7]) + " " * 16 + "".join(_e(v, 16, "D") for v in r[7:9]))
    return "\n".join(out) + "\n"
