"""Building a book: spec -> model -> PDF, CSV and JSON bytes -> one published set.

Every file is produced in memory first; only then is the set published into its
folder by :func:`tablegen.core.outfiles.publish_folder` (staged beside it and swapped in
whole), so a failed or interrupted build leaves the folder's previous issue as it
was and never touches a user's file.
"""

from __future__ import annotations

import sys


def file_names(spec) -> dict:
    """Names of the files of a book: ``pdf``, ``json``, ``booklet``, ``csv`` and ``csv_metadata`` (lists).

    Without editions: ``<spec>.pdf``, ``<spec>.json``, ``<table>.csv``. With editions,
    one folder holds one issue of every edition: ``<spec>-<edition>.pdf`` and
    ``<spec>-<edition>.json`` per edition, and the CSV names of
    :func:`tablegen.spec.editions.csv_names` (``<table>.csv``, or ``<table>-<edition>.csv``
    for an edition that prints the table with other rows or columns). The booklet of
    an edition (``--impose booklet``) is ``<stem>-booklet.pdf`` beside its PDF.
    """
    from .csvout import metadata_name
    ed = spec.edition
    stem = f"{spec.name}-{ed.name}" if ed is not None and ed.name else spec.name
    csv = [t.csv_name or f"{t.name}.csv" for t in spec.tables]
    return {"pdf": f"{stem}.pdf", "json": f"{stem}.json", "booklet": f"{stem}-booklet.pdf", "csv": csv,
            "csv_metadata": [metadata_name(n) for n in csv]}


def all_names(spec, booklet: bool = False) -> list[str]:
    n = file_names(spec)
    return [n["pdf"], n["json"], *n["csv"], *n["csv_metadata"], *([n["booklet"]] if booklet else [])]


def merge(into: dict, files: dict) -> dict:
    """Add one edition's files to the set; a file two editions share must have the same bytes."""
    for name, data in files.items():
        if name in into and into[name] != data:      # pragma: no cover - the names follow the content
            raise AssertionError(f"{name}: two editions write different bytes to one file")
        into[name] = data
    return into


def render_files(spec, progress=None) -> tuple[dict, object]:
    """{file name: bytes} of every output of a book, and the book model.

    ``progress(done, total, what)`` is called as tables are evaluated and rendered.
    """
    from ..core.jsonout import dumps
    from . import csvout, jsonout, model, pdf
    n = len(spec.tables)
    total = n + 2
    tables = []
    for i, t in enumerate(spec.tables):
        tables.append(model.build_table(t, spec.document))
        if progress:
            progress(i + 1, total, t.name)
    book = model.build_book(spec, tables=tuple(tables))
    files = {}
    names = file_names(spec)
    for t, ts, name, meta in zip(book.tables, spec.tables, names["csv"], names["csv_metadata"]):
        files[name] = csvout.render_table(book, t).encode("utf-8")
        files[meta] = dumps(csvout.metadata(book, t, name, editions=ts.shared_by)).encode("utf-8")
    pdf_bytes = pdf.render(book)
    if progress:
        progress(n + 1, total, "PDF")
    files[names["pdf"]] = pdf_bytes
    files[names["json"]] = jsonout.render(book, {k: names[k] for k in ("pdf", "csv", "csv_metadata")}
                                          ).encode("utf-8")
    if progress:
        progress(total, total, "JSON")
    return files, book


def issue_text(book) -> str:
    """One line naming an issue of a book, for its folder's manifest and later refusals."""
    d = book.document
    return (f"book {book.name}: document {d.number}, revision {d.revision}, issued {d.issue_date}, "
            f"fingerprint {book.fingerprint}")


def pdf_pages(pdf: bytes) -> int:
    import re
    m = re.search(rb"/Type /Pages /Count (\d+)", pdf) or re.search(rb"/Count (\d+)", pdf)
    return int(m.group(1)) if m else 0


class Bar:
    """A one-line progress bar on stderr (only used on a terminal)."""

    def __init__(self, label: str, stream=None):
        self.label = label
        self.stream = stream or sys.stderr

    def __call__(self, done: int, total: int, what: str):
        width = 28
        fill = int(width * done / max(total, 1))
        self.stream.write(f"\r{self.label} [{'#' * fill}{'.' * (width - fill)}] {done}/{total} {what[:24]:<24}")
        if done >= total:
            self.stream.write("\n")
        self.stream.flush()


def progress_for(args, n_tables: int, label: str):
    """A progress bar for books of more than a few tables, on a terminal, without --quiet."""
    if getattr(args, "quiet", False) or n_tables <= 3 or not sys.stderr.isatty():
        return None
    return Bar(label)
