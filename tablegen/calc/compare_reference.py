"""The REFERENCE table of ``tablegen compare``: read, checked, in SI.

A REFERENCE is a CSV or whitespace-separated text table (the shared CSV
convention: header cells ``key [unit]``, key a property key of the ``state``
JSON, temperature column ``T``; lines starting with ``#`` are comments).
:func:`read_reference` splits it with :mod:`tablegen.core.table_reader` (so a
quoted CSV cell may hold a line break), checks every header cell and cell, and
gives a :class:`Reference`; :mod:`tablegen.calc.compare` judges tablegen's
values against it. Every problem raises TablegenError naming file and line.
"""

from __future__ import annotations

import hashlib
import math
import re
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from .compare_keys import KEY_DIMENSIONS, NUMBER, last_place
from ..core.errors import DataError, NameLookupError, UnitError
from ..core.table_reader import MARK_COLUMN, header_fields, split_table
from ..core.units import Unit, unit as _unit

#: Largest reference table read: rows (a book table has at most 20 000) and bytes.
MAX_REFERENCE_ROWS = 20000
MAX_REFERENCE_BYTES = 8 << 20


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
        """The first column of a key (NameLookupError naming the keys the table has)."""
        for c in self.columns:
            if c.key == key:
                return c
        raise NameLookupError(f"the reference has no column {key!r}; "
                              f"allowed: {', '.join(dict.fromkeys(c.key for c in self.columns))}")

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
MARK_KEY = MARK_COLUMN
#: Prefix of the uncertainty columns of tablegen's own CSV files (U_cp ...; read, never compared).
UNCERTAINTY_PREFIX = "U_"

_HEADER_WS = re.compile(r"([A-Za-z][A-Za-z0-9_]*)\s*\[([^\[\]]*)\]")


def _allowed_keys() -> str:
    return "T, " + ", ".join(KEY_DIMENSIONS)


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
    name = str(path)
    text, digest = _read_file(path, name)
    table = split_table(text, name, max_rows=MAX_REFERENCE_ROWS)
    if not table.header_line:
        raise DataError(f"{name}: no header line; the first line that is not a '#' comment must name "
                        f"each column as key [unit], e.g. T [K],cp [kJ/(kg K)]")
    header_line, layout, rows = table.header_line, table.layout, table.rows
    header = list(table.header) if layout == "csv" else _split_ws_header(table.header_text, name, header_line)
    if table.more_rows:
        raise DataError(f"{name}:{rows[-1][0]}: more than {MAX_REFERENCE_ROWS} data rows; a reference "
                        f"table may have at most {MAX_REFERENCE_ROWS} rows (split it and compare each part)")
    comments = [ln.strip()[1:].strip() for _, ln in table.comments]
    keys, units = _header_keys(header, name, header_line)
    if "T" not in keys:
        raise DataError(f"{name}:{header_line}: no temperature column; one column must be T [K] "
                        f"(or T [°C], T [°F], T [°R])")
    if all(k in ("T", MARK_KEY) for k in keys):
        raise DataError(f"{name}:{header_line}: only a temperature column; add property columns, "
                        f"allowed keys: {', '.join(KEY_DIMENSIONS)}")
    if not rows:
        raise DataError(f"{name}: header but no data rows; add one row per temperature")

    cells_by_col = _cells_by_column(rows, keys, layout, name)
    lines = tuple(r[0] for r in rows)
    jT = keys.index("T")
    T_text = tuple(cells_by_col[jT])
    T_K = units[jT].to_si(np.array([float(c) for c in T_text]))
    for line, T in zip(lines, T_K):
        if not (math.isfinite(T) and T > 0):
            raise DataError(f"{name}:{line}: temperature {T:g} K is not above 0 K")
    columns = []
    for j, key in enumerate(keys):
        if key in ("T", MARK_KEY):   # the first T column is the temperature; others (T in °F ...) are ignored
            continue
        txt = tuple(cells_by_col[j])
        vals = np.array([float(c) if c else np.nan for c in txt])
        q = np.array([last_place(c) if c else np.nan for c in txt])
        si = units[j].to_si(vals) if units[j] is not None else vals
        columns.append(RefColumn(key, units[j], header[j].strip(), si, txt, q))
    return Reference(name, digest, layout, units[jT], header[jT].strip(), T_K, T_text, lines,
                     tuple(columns), tuple(comments), header_line)


def _read_file(path, name: str) -> tuple[str, str]:
    """The text of a reference file and the SHA-256 of its bytes (size, existence, UTF-8 checked)."""
    p = Path(path)
    try:
        size = p.stat().st_size
    except OSError:
        size = 0                       # the read below says what is wrong
    if size > MAX_REFERENCE_BYTES:
        raise DataError(f"{name}: {size} bytes; a reference table may have at most "
                        f"{MAX_REFERENCE_BYTES} bytes ({MAX_REFERENCE_BYTES >> 20} MiB) and "
                        f"{MAX_REFERENCE_ROWS} rows")
    try:
        raw = p.read_bytes()
    except FileNotFoundError:
        raise DataError(f"{name}: reference file not found; give the path of a CSV or text table") from None
    except IsADirectoryError:
        raise DataError(f"{name}: is a folder; give the path of a CSV or text table") from None
    except OSError as e:
        raise DataError(f"{name}: cannot read the reference file ({e.strerror})") from None
    try:
        text = raw.decode("utf-8-sig")
    except UnicodeDecodeError as e:
        line = raw[:e.start].count(b"\n") + 1
        raise DataError(f"{name}:{line}: not UTF-8 text; save the reference table as UTF-8") from None
    digest = hashlib.sha256(raw).hexdigest()
    return text, digest


def _header_keys(header, name: str, header_line: int) -> tuple[list, list]:
    """Key and unit of each header cell (mark and U_ columns: MARK_KEY, unit None)."""
    keys, units, seen = [MARK_KEY] * len(header), [None] * len(header), set()
    for j, key, usym in header_fields(header, name, header_line):
        cell = header[j]
        if key.startswith(UNCERTAINTY_PREFIX) and key[len(UNCERTAINTY_PREFIX):] in KEY_DIMENSIONS:
            continue                       # a tablegen CSV's U_<key> column: read, never compared
        if key != "T" and key not in KEY_DIMENSIONS:
            if not re.fullmatch(r"[A-Za-z][A-Za-z0-9]*(_mean_[hs])?_vol", key) or key.split("_")[0] not in KEY_DIMENSIONS:
                raise DataError(f"{name}:{header_line}: unknown column key {key!r}; allowed: {_allowed_keys()}")
            u = None            # a tablegen key of the volumetric basis: units per m³ are not known here
        else:
            dim = "temperature" if key == "T" else KEY_DIMENSIONS[key]
            try:
                u = _unit(usym, dim)
            except UnitError as e:
                raise UnitError(f"{name}:{header_line}: column {key!r}: {e}") from None
        ident = (key, u.symbol if u else usym)
        if ident in seen:
            raise DataError(f"{name}:{header_line}: column {cell.strip()!r} appears twice; give each once")
        seen.add(ident)
        keys[j], units[j] = key, u
    return keys, units


def _cells_by_column(rows, keys, layout: str, name: str) -> list[list]:
    """The cell texts of each column, checked: the right count per row, numbers where numbers belong."""
    n = len(keys)
    cells_by_col = [[] for _ in range(n)]
    for line, cells in rows:
        if len(cells) != n:
            hint = "; in a whitespace table write '-' for an empty cell" if layout == "whitespace" else ""
            raise DataError(f"{name}:{line}: {len(cells)} cells, but the header names {n} columns{hint}")
        for j, c in enumerate(cells):
            if keys[j] == MARK_KEY:
                cells_by_col[j].append(c)
                continue
            if c in ("", "-", "—") and keys[j] != "T":
                cells_by_col[j].append("")
                continue
            if not NUMBER.match(c):
                raise DataError(f"{name}:{line}: cell {c!r} in column {keys[j]!r} is not a number; "
                                f"write plain decimal numbers (an empty cell or '-' marks a gap)")
            if not math.isfinite(float(c)):
                raise DataError(f"{name}:{line}: cell {c!r} in column {keys[j]!r} is beyond the range "
                                f"of a double (about 1.8e308); write a finite number")
            cells_by_col[j].append(c)
    return cells_by_col


def _split_ws_header(s: str, name: str, line: int) -> list[str]:
    """Header of a whitespace table: cells 'key [unit]'; units may hold blanks."""
    cells = [f"{m.group(1)} [{m.group(2)}]" for m in _HEADER_WS.finditer(s)]
    rest = _HEADER_WS.sub("", s).strip()
    if rest or not cells:
        bad = rest.split()[0] if rest else s
        raise DataError(f"{name}:{line}: header text {bad!r} is not in the form key [unit]; "
                        f"separate columns by commas or blanks, e.g. T [K],cp [kJ/(kg K)]")
    return cells
