"""One CSV file per table: RFC 4180, UTF-8, header cells ``key [unit]``, full precision.

Values are written with Python's shortest round-trip representation, so a
reader gets back the exact double the table was printed from. Lines starting
with ``#`` are comments (tablegen's shared CSV convention); text in them that
comes from the user is neutralised against spreadsheet formula injection.
"""

from __future__ import annotations

import re

#: Characters that make a spreadsheet treat a cell as a formula (OWASP CSV injection).
_FORMULA_START = ("=", "+", "-", "@", "\t", "\r", "|", "%")


def neutralise(text: str) -> str:
    """User text made safe for a comment line of a CSV file.

    Double quotes become single quotes (a comment is never a quoted field), and every
    comma-separated piece that would start with a formula character gets a leading
    apostrophe, which spreadsheets show as text.
    """
    text = re.sub(r"[\r\n]+", " ", str(text)).replace('"', "'")
    pieces = text.split(",")
    out = []
    for p in pieces:
        s = p.lstrip()
        if s.startswith(_FORMULA_START):
            p = p[: len(p) - len(s)] + "'" + s
        out.append(p)
    return ",".join(out)


def _field(s: str) -> str:
    """RFC 4180 field: quoted if it holds a comma, quote or line break."""
    if any(c in s for c in ',"\r\n'):
        return '"' + s.replace('"', '""') + '"'
    return s


def render_table(book, t) -> str:
    """The CSV text of one table model (CRLF line ends, as RFC 4180 asks)."""
    d = book.document
    lines = [
        f"# tablegen {book.versions['tablegen']} table {t.name} of book {neutralise(d.title)}",
        f"# document {neutralise(d.number)} revision {neutralise(d.revision)} issued {d.issue_date}",
        f"# substance {neutralise(t.substance.name)} ({neutralise(t.substance.id)}); M = {t.substance.M!r} kg/kmol; "
        f"basis {t.basis}",
        f"# enthalpy datum: {t.datum_text}; P_ref_Pa = {t.P_ref_Pa!r}; anchor: {t.anchor_text}",
        f"# fingerprint sha256 {book.fingerprint}",
    ]
    extra = [repr(float(T)) for T, m in zip(t.T_K, t.marks) if "*" in m]
    if extra:
        lines.append(f"# extra rows at T_K = {' '.join(extra)}")
    xt = [repr(float(T)) for T, m in zip(t.T_K, t.marks) if "x" in m]
    if xt:
        lines.append(f"# extrapolated beyond the data range at T_K = {' '.join(xt)}")
    lines.append(",".join(_field(c.csv_header) for c in t.columns))
    cols = [c.values.tolist() for c in t.columns]
    for row in zip(*cols):
        lines.append(",".join(map(repr, row)))
    return "\r\n".join(lines) + "\r\n"
