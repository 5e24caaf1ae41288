"""Building a book: spec -> model -> PDF, CSV and JSON bytes -> files.

Every file is produced in memory first; only when all of them exist are the
targets checked (none may exist without force) and written, each under a
temporary name and renamed, so a failed or interrupted build leaves no
half-written file and never touches a user's file without --force.
"""

from __future__ import annotations

import sys
from pathlib import Path

from ..outfiles import check_targets, write_bytes


def render_files(spec, out_dir, progress=None) -> tuple[dict, object]:
    """{path: bytes} of every output of a book, and the book model.

    ``progress(done, total, what)`` is called as tables are evaluated and rendered.
    """
    from . import csvout, jsonout, model, pdf
    out_dir = Path(out_dir)
    n = len(spec.tables)
    total = n + 2
    tables = []
    for i, t in enumerate(spec.tables):
        tables.append(model.build_table(t, spec.document))
        if progress:
            progress(i + 1, total, t.name)
    book = model.build_book(spec, tables=tuple(tables))
    files = {}
    from ..jsonout import dumps
    names = file_names(spec)
    for t, ts, name, meta in zip(book.tables, spec.tables, names["csv"], names["csv_metadata"]):
        files[out_dir / name] = csvout.render_table(book, t).encode("utf-8")
        files[out_dir / meta] = dumps(csvout.metadata(book, t, name, editions=ts.shared_by)).encode("utf-8")
    pdf_bytes = pdf.render(book)
    if progress:
        progress(n + 1, total, "PDF")
    files[out_dir / names["pdf"]] = pdf_bytes
    files[out_dir / names["json"]] = jsonout.render(book, names).encode("utf-8")
    if progress:
        progress(total, total, "JSON")
    return files, book


def file_names(spec) -> dict:
    """Names of a book's files in its output folder.

    Without editions: ``<spec>.pdf``, ``<spec>.json``, ``<table>.csv``. With editions,
    one folder holds one issue of every edition: ``<spec>-<edition>.pdf`` and
    ``<spec>-<edition>.json`` per edition, and the CSV names of
    :func:`tablegen.editions.csv_names` (``<table>.csv``, or ``<table>-<edition>.csv``
    for an edition that prints the table with other rows or columns). The booklet of
    an edition (``--impose booklet``) is ``<stem>-booklet.pdf`` beside its PDF.
    """
    ed = spec.edition
    stem = f"{spec.name}-{ed.name}" if ed is not None and ed.name else spec.name
    csv = [t.csv_name or f"{t.name}.csv" for t in spec.tables]
    from .csvout import metadata_name
    return {"pdf": f"{stem}.pdf", "json": f"{stem}.json", "booklet": f"{stem}-booklet.pdf", "csv": csv,
            "csv_metadata": [metadata_name(n) for n in csv]}


def merge(into: dict, files: dict) -> dict:
    """Add one edition's files to the set; a file two editions share must have the same bytes."""
    for p, data in files.items():
        if p in into and into[p] != data:      # pragma: no cover - the names follow the content
            raise AssertionError(f"{p}: two editions write different bytes to one file")
        into[p] = data
    return into


def write(files: dict, force: bool) -> list[Path]:
    """Check all targets, then write each atomically."""
    paths = list(files)
    check_targets(paths, force)
    for p in paths:
        write_bytes(p, files[p])
    return paths


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
