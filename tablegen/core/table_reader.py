"""The rows of a ``key [unit]`` table as text: header, data rows and comments, each with its line.

One reader for the tables users hand in (the shared CSV convention: row 1 the
header, ``#`` comment lines, blank lines ignored): ``tablegen compare``'s
REFERENCE and ``tablegen fit``'s cp(T) table. It splits the text only; what the
header cells mean (keys, units) and which cells must be numbers is the caller's.

A CSV table is read by one :func:`csv.reader` over the whole text, so a quoted
cell may hold a comma or a line break (RFC 4180), and every line number is the
file's own (``reader.line_num``). A line that starts a row and is blank or a
``#`` comment never reaches the CSV parser (a quote in a comment opens no cell);
inside a quoted cell, such a line is part of the cell. A whitespace-separated
table (a header without commas, where the caller allows it) is split line by line.
"""

from __future__ import annotations

import csv
import re
from dataclasses import dataclass

from .errors import DataError

COMMENT = "#"
#: A header cell: a key (a letter, then letters, digits, '_') and its unit in brackets.
_HEADER_CELL = re.compile(r"^\s*([A-Za-z][A-Za-z0-9_]*)\s*\[([^\[\]]*)\]\s*$")


@dataclass(frozen=True, slots=True)
class TableText:
    """A table split into text: what :func:`split_table` found, nothing interpreted."""

    layout: str                   # "csv" or "whitespace"
    header: tuple | None          # header cells (CSV); None: no header, or a whitespace table
    header_text: str              # the header line, stripped ("" when there is none)
    header_line: int              # 1-based line of the header (0 when there is none)
    rows: tuple                   # (line, cells) of each data row, line where the row starts
    comments: tuple               # (line, line text as written) of each comment line
    more_rows: bool = False       # reading stopped at max_rows + 1 rows


def header_cell(cell: str) -> tuple[str, str] | None:
    """Key and unit symbol of a header cell ``key [unit]`` (blanks stripped); None if not that form."""
    m = _HEADER_CELL.match(cell)
    return (m.group(1), m.group(2).strip()) if m else None


class _Lines:
    """The lines of the text as :func:`csv.reader` pulls them.

    A line that starts a row (``at_row_start``, set by the loop after each row)
    and is blank or a comment is handed on as an empty line, so the parser skips
    it and ``reader.line_num`` still counts it; the comment is kept aside.
    """

    def __init__(self, lines, strip: bool):
        self._lines = iter(lines)
        self._strip = strip
        self.at_row_start = True
        self.comments: list = []
        self.n = 0

    def __iter__(self):
        return self

    def __next__(self) -> str:
        line = next(self._lines)
        self.n += 1
        if not self.at_row_start:
            return line + "\n"
        s = line.strip()
        if not s or s.startswith(COMMENT):
            if s:
                self.comments.append((self.n, line))
            return "\n"
        self.at_row_start = False
        return (s if self._strip else line) + "\n"


#: Header of the row-mark column a tablegen CSV ends with: text, never a property.
MARK_COLUMN = "mark"


def header_fields(header, where: str, line: int, example: str = "cp [kJ/(kg K)]"):
    """(column index, key, unit text) of every header cell but the row-mark column.

    A cell not of the form ``key [unit]`` is refused with ``where:line`` and ``example``.
    """
    for j, cell in enumerate(header):
        if cell.strip() == MARK_COLUMN:
            continue
        key_unit = header_cell(cell)
        if key_unit is None:
            raise DataError(f"{where}:{line}: header cell {cell.strip()!r} is not in the form key [unit], "
                            f"e.g. {example}")
        yield j, key_unit[0], key_unit[1]


def split_table(text: str, name: str, *, whitespace: bool = True, strip: bool = True,
                max_rows: int | None = None) -> TableText:
    """Split the text of a table into header, rows and comments.

    Parameters
    ----------
    text : the whole file, decoded
    name : the file as the user named it, the start of a message
    whitespace : a header line without a comma makes a whitespace-separated table
        (else every table is CSV)
    strip : strip blanks around each line and cell (else cells are kept as written)
    max_rows : stop after this many data rows plus one, and set ``more_rows``

    Raises
    ------
    DataError naming file and line for a row the CSV parser refuses (a cell longer
    than its field limit) or a quote that is never closed.
    """
    lines = text.splitlines()
    first = next((s for s in (ln.strip() for ln in lines) if s and not s.startswith(COMMENT)), None)
    if first is not None and whitespace and "," not in first:
        return _split_whitespace(lines, max_rows)
    src = _Lines(lines, strip)
    reader = csv.reader(src)
    header, header_line, rows, start, span = None, 0, [], 1, (0, 0)
    try:
        for cells in reader:
            src.at_row_start = True
            line, start = start, reader.line_num + 1
            if not cells:
                continue
            span = (line, reader.line_num)
            if strip:
                cells = [c.strip() for c in cells]
            if header is None:
                header, header_line = tuple(cells), line
                continue
            rows.append((line, cells))
            if max_rows is not None and len(rows) > max_rows:
                break
    except csv.Error as e:
        raise DataError(f"{name}:{start}: the row cannot be read as CSV ({e}); "
                        f"check the quotes and the length of its cells") from None
    # An unclosed quote takes every line after it into one cell, up to the end of the file.
    if span[1] == len(lines) > span[0] and "".join(lines[span[0] - 1:]).count('"') % 2:
        raise DataError(f"{name}:{span[0]}: a quote opened in this row is never closed; close it "
                        f"(a quote inside a quoted cell is written twice: \"\")")
    more = max_rows is not None and len(rows) > max_rows
    return TableText("csv", header, lines[header_line - 1].strip() if header_line else "", header_line,
                     tuple(rows), tuple(src.comments), more)


def _split_whitespace(lines, max_rows) -> TableText:
    """A whitespace-separated table: one row per line, cells split at blanks."""
    header_text, header_line, rows, comments = "", 0, [], []
    for i, line in enumerate(lines, start=1):
        s = line.strip()
        if not s:
            continue
        if s.startswith(COMMENT):
            comments.append((i, line))
            continue
        if not header_line:
            header_text, header_line = s, i
            continue
        rows.append((i, s.split()))
        if max_rows is not None and len(rows) > max_rows:
            break
    more = max_rows is not None and len(rows) > max_rows
    return TableText("whitespace", None, header_text, header_line, tuple(rows), tuple(comments), more)
