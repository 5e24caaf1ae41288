"""One CSV file per table: RFC 4180, UTF-8, header cells ``key [unit]``, full precision.

Row 1 is the header and every later row is data, so ``pandas.read_csv(path)`` and a
spreadsheet open the file as it is. Values are written with Python's shortest
round-trip representation, so a reader gets back the exact double the table was
printed from. The last column, ``mark``, carries the row marks the PDF prints
(``*`` extra row, ``x`` extrapolated), empty for a plain row, so a filter finds them.

What the table was computed from goes beside it, where tools look for it: the
book's JSON sidecar and a W3C "CSV on the Web" metadata file per CSV
(:func:`metadata`). The spec key ``document.csv_comments`` puts ``#`` comment lines
above the header instead, for readers that expect them; text in them that comes
from the user is neutralised against spreadsheet formula injection.
"""

from __future__ import annotations

import re

#: Characters that make a spreadsheet treat a cell as a formula (OWASP CSV injection).
_FORMULA_START = ("=", "+", "-", "@", "\t", "\r", "|", "%")


def neutralise(text: str) -> str:
    """User text made safe for a comment line of a CSV file.

    Double quotes become single quotes (a comment is never a quoted field), and every
    piece between commas or semicolons (the separators spreadsheets split on) that would
    start with a formula character gets a leading apostrophe, which spreadsheets show as text.
    """
    text = re.sub(r"[\r\n]+", " ", str(text)).replace('"', "'")
    pieces = re.split(r"([,;])", text)
    out = []
    for p in pieces:
        s = p.lstrip()
        if p not in (",", ";") and s.startswith(_FORMULA_START):
            p = p[: len(p) - len(s)] + "'" + s
        out.append(p)
    return "".join(out)


def _field(s: str) -> str:
    """RFC 4180 field: quoted if it holds a comma, quote or line break."""
    if any(c in s for c in ',"\r\n'):
        return '"' + s.replace('"', '""') + '"'
    return s


#: Header of the row-mark column (no unit: it holds text codes).
MARK_HEADER = "mark"

#: The codes of the mark column, as the PDF prints and explains them.
MARK_CODES = {"*": "an extra row at a named temperature", "x": "extrapolated beyond the coefficient data",
              "c": "at or below the water dew point of the gas: water may condense at this temperature; "
                   "ideal-gas values do not hold"}


def comment_lines(book, t) -> list[str]:
    """The ``#`` lines of the optional comment form (document.csv_comments = true)."""
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
    ct = [repr(float(T)) for T, m in zip(t.T_K, t.marks) if "c" in m]
    if ct:
        lines.append(f"# at or below the water dew point (water may condense) at T_K = {' '.join(ct)}")
    if t.U_columns:
        lines.append("# U_<column>: expanded uncertainty (k = 2) of that column, same unit; "
                     "empty where none is stated (extrapolated rows)")
    if t.validity_columns:
        lines.append("# Z, realgas_<column>: the real gas at max_pressure (second-virial estimate), "
                     "where the ideal-gas values apply; not part of U")
    for key, label, value, unit, U in t.substance.figures:
        lines.append(f"# {key} = {value!r} {unit}" + ("" if U is None else f" (U k=2 {U!r})") +
                     f": {neutralise(label)}")
    for n in t.notes:
        lines.append(f"# note: {neutralise(n)}")
    return lines


def headers(t) -> list[str]:
    """Row 1 of the CSV: the value columns, the U columns, then ``mark``."""
    return ([c.csv_header for c in t.columns] + [h for h, _ in t.U_columns]
            + [h for h, _, _ in t.validity_columns] + [MARK_HEADER])


def render_table(book, t) -> str:
    """The CSV text of one table model (CRLF line ends, as RFC 4180 asks)."""
    lines = comment_lines(book, t) if book.document.csv_comments else []
    lines.append(",".join(_field(h) for h in headers(t)))
    cols = ([c.values.tolist() for c in t.columns] + [v.tolist() for _, v in t.U_columns]
            + [v.tolist() for _, v, _ in t.validity_columns])
    for row, mark in zip(zip(*cols), t.marks):
        lines.append(",".join(["" if x != x else repr(x) for x in row] + [_field(mark)]))
    return "\r\n".join(lines) + "\r\n"


def metadata_name(csv_name: str) -> str:
    """File name of the CSVW metadata of a CSV file (the W3C convention NAME.csv-metadata.json)."""
    return csv_name + "-metadata.json"


def metadata(book, t, csv_name: str, editions: tuple = ()) -> dict:
    """W3C CSV on the Web metadata of one table's CSV (Tabular Metadata, W3C Recommendation
    17 December 2015): the table schema (column names, titles, datatypes, units) and what
    the values were computed from (document, revision, fingerprint, substance, datum).

    Units are annotated with ``schema:unitText`` on each column (schema.org); provenance
    with Dublin Core terms and ``prov:wasDerivedFrom``, whose ``@id`` is
    ``urn:sha256:`` + the fingerprint printed in the PDF footer. ``editions``: the
    editions of the book that print this same file (schema.org ``bookEdition``), so one
    folder can hold the files of every edition of one issue.
    """
    from .definitions import DEFINITIONS
    d = book.document
    cols = []
    names = column_names(t)
    for c, name in zip(t.columns, names):
        cols.append({"name": name, "titles": c.csv_header, "datatype": "double",
                     "schema:unitText": c.unit, "dc:description": DEFINITIONS[c.key][1]})
    for h, _ in t.U_columns:
        cols.append({"name": h.split(" ", 1)[0], "titles": h, "datatype": "double", "null": "",
                     "schema:unitText": h.split("[", 1)[1].rstrip("]") if "[" in h else "",
                     "dc:description": "expanded uncertainty (k = 2) of the column named, same unit; "
                                       "empty where none is stated"})
    for h, _, text in t.validity_columns:
        cols.append({"name": h.split(" ", 1)[0], "titles": h, "datatype": "double", "null": "",
                     "schema:unitText": h.split("[", 1)[1].rstrip("]") if "[" in h else "",
                     "dc:description": text})
    cols.append({"name": MARK_HEADER, "titles": MARK_HEADER, "datatype": "string", "null": "",
                 "dc:description": "row mark as printed in the PDF: " +
                                   "; ".join(f"{k} {v}" for k, v in MARK_CODES.items()) +
                                   "; empty for a plain row"})
    s = t.substance
    extra = {"schema:bookEdition": list(editions)} if editions else {}
    return {**extra,
        "@context": ["http://www.w3.org/ns/csvw", {"@language": "en"}],
        "url": csv_name,
        "dc:title": t.title,
        "dc:identifier": d.number,
        "dc:hasVersion": d.revision,
        "dc:issued": {"@value": d.issue_date, "@type": "xsd:date"},
        "dc:isPartOf": d.title,
        "dc:publisher": d.organisation,
        "dc:subject": f"{s.name} ({s.id})",
        "dc:description": (f"ideal-gas properties of {s.name}, basis {t.basis}; enthalpy datum: "
                           f"{t.datum_text}; P° = {t.P_ref_Pa!r} Pa; anchor: {t.anchor_text}; "
                           f"M = {s.M!r} kg/kmol"),
        "dc:source": [f"{a}: {b} ({c})" for a, b, c in _sources_of(book, s)],
        "prov:wasDerivedFrom": {"@id": f"urn:sha256:{book.fingerprint}",
                                "rdfs:label": "canonical JSON of the book spec followed by the name and "
                                              "SHA-256 of each coefficient data file"},
        "prov:wasGeneratedBy": f"tablegen {book.versions['tablegen']}",
        "rdfs:comment": list(t.notes),
        "schema:additionalProperty": [
            {"@type": "schema:PropertyValue", "schema:propertyID": key, "schema:name": label,
             "schema:value": value, "schema:unitText": unit,
             **({} if U is None else {"schema:description": f"expanded uncertainty U (k = 2) {U!r} {unit}"})}
            for key, label, value, unit, U in s.figures],
        "dialect": {"header": True, "delimiter": ",", "encoding": "utf-8",
                    "lineTerminators": ["\r\n"], "doubleQuote": True},
        "tableSchema": {"columns": cols, "primaryKey": cols[0]["name"]},
    }


_T_NAMES = {"K": "T_K", "°C": "T_degC", "°F": "T_degF", "°R": "T_degR"}


def column_names(t) -> list[str]:
    """CSVW column names of the value columns: the CSV key (``T_K``, ``T_degC`` ... for
    temperatures), with ``_SI`` / ``_US`` added where a table gives a key in both systems."""
    base = [_T_NAMES.get(c.unit, "T") if c.key == "T" else c.csv_key for c in t.columns]
    twice = {b for b in base if base.count(b) > 1}
    return [f"{b}_{c.system}" if b in twice else b for b, c in zip(base, t.columns)]


def _sources_of(book, substance):
    for s in book.substances:
        if s.id == substance.id:
            return s.sources
    return ()
