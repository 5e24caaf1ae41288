"""A whole book checked in one call: a reference folder, matched table by table.

A REFERENCE-FOLDER holds one reference table per table of a book spec. A
tablegen book folder is one as it is: its JSON sidecar (schema
``tablegen-book/1``) lists each table's CSV, and the W3C CSV-on-the-Web metadata
file beside each CSV (``NAME.csv-metadata.json``) says which document, revision
and fingerprint the CSV belongs to. Other folders are matched by file name
(``<table>.csv`` or ``<table>.txt``), or by a mapping file::

    # reference file of each spec table, relative to the reference folder
    [tables]
    desk-air-si = "air-si-rev-B.csv"

Each table is judged on its own (:func:`tablegen.calc.compare.compare`); the book's
verdict is the worst of its tables. A folder whose files name different
revisions, documents or fingerprints mixes two issues: that is stated beside
the verdict (it does not change it; the values are judged as they are).

Pure computation: no printing, no file writing.
"""

from __future__ import annotations

import json
from dataclasses import dataclass, field
from pathlib import Path

from ..core.errors import DataError, InputError, NameLookupError, SpecError

SIDECAR_SCHEMA = "tablegen-book/1"
METADATA_SUFFIX = "-metadata.json"       # W3C CSVW: NAME.csv -> NAME.csv-metadata.json
FINGERPRINT_PREFIX = "urn:sha256:"


@dataclass(frozen=True, slots=True)
class FolderEntry:
    """The reference file of one spec table and what it says it is."""

    table: str
    path: str
    matched_by: str               # "book sidecar NAME.json", "mapping file NAME", "file name"
    identity: dict                # number, revision, fingerprint, issue_date (from CSVW metadata or sidecar)
    identity_from: str            # file the identity was read from ("" when none)


@dataclass(frozen=True, slots=True)
class ReferenceFolder:
    """A reference folder as read and matched."""

    path: str
    book: dict                    # the sidecar's document and fingerprint ({} without a sidecar)
    sidecar: str                  # file name of the sidecar used ("" when none)
    entries: tuple                # FolderEntry, in spec table order
    unmatched: tuple              # reference tables of the folder that no spec table uses
    notes: tuple                  # statements about the folder (mixed issues), for page 1 and stderr


def _read_json(path: Path) -> dict:
    try:
        data = json.loads(path.read_text(encoding="utf-8"))
    except (OSError, UnicodeDecodeError) as e:
        raise DataError(f"{path}: cannot read ({getattr(e, 'strerror', None) or e}); "
                        f"give a readable UTF-8 JSON file") from None
    except json.JSONDecodeError as e:
        raise DataError(f"{path}:{e.lineno}: not valid JSON ({e.msg}); repair or remove the file") from None
    if not isinstance(data, dict):
        raise DataError(f"{path}: not a JSON object; a sidecar or CSVW metadata file holds one object")
    return data


def _sidecars(folder: Path) -> list[tuple[Path, dict]]:
    out = []
    for p in sorted(folder.glob("*.json")):
        if p.name.endswith(METADATA_SUFFIX):
            continue
        try:
            head = p.read_text(encoding="utf-8")
        except (OSError, UnicodeDecodeError):
            continue
        if SIDECAR_SCHEMA not in head:          # another JSON file (a summary.json ...): not ours to judge
            continue
        data = _read_json(p)
        if data.get("schema") == SIDECAR_SCHEMA:
            out.append((p, data))
    return out


def _choose_sidecar(sidecars, book_name: str, tables, edition: str = "") -> tuple[Path, dict] | tuple[None, None]:
    """The sidecar of the same book name (and edition, for a spec with editions: one folder holds
    the sidecar of every edition), else the one that lists most of the spec's tables."""
    for p, d in sidecars:
        if d.get("name") == book_name and (d.get("edition") or {}).get("name", "") == edition:
            return p, d
    for p, d in sidecars:
        if d.get("name") == book_name:
            return p, d
    best, n_best = (None, None), 0
    for p, d in sidecars:
        n = len({t.get("name") for t in d.get("tables", [])} & set(tables))
        if n > n_best:
            best, n_best = (p, d), n
    return best


def _book_identity(d: dict) -> dict:
    doc = d.get("document", {}) or {}
    return {"title": str(doc.get("title", "")), "number": str(doc.get("number", "")),
            "revision": str(doc.get("revision", "")), "issue_date": str(doc.get("issue_date", "")),
            "fingerprint": str((d.get("fingerprint") or {}).get("sha256", "")), "name": str(d.get("name", ""))}


def csvw_identity(csv_path: Path) -> tuple[dict, str]:
    """Document number, revision, issue date and fingerprint from a CSV's CSVW metadata file
    (W3C Tabular Metadata with Dublin Core terms and prov:wasDerivedFrom, as tablegen writes it);
    ({}, "") when there is none."""
    meta = csv_path.with_name(csv_path.name + METADATA_SUFFIX)
    if not meta.is_file():
        return {}, ""
    d = _read_json(meta)
    issued = d.get("dc:issued")
    fp = d.get("prov:wasDerivedFrom")
    fp = fp.get("@id", "") if isinstance(fp, dict) else str(fp or "")
    return ({"number": str(d.get("dc:identifier", "")), "revision": str(d.get("dc:hasVersion", "")),
             "issue_date": str(issued.get("@value", "") if isinstance(issued, dict) else issued or ""),
             "fingerprint": fp[len(FINGERPRINT_PREFIX):] if fp.startswith(FINGERPRINT_PREFIX) else fp},
            meta.name)


def read_mapping(path) -> dict:
    """``[tables] name = "file"`` of a mapping file (TOML)."""
    import tomllib
    p = Path(path)
    try:
        raw = tomllib.loads(p.read_text(encoding="utf-8"))
    except FileNotFoundError:
        raise InputError(f"--map {path}: no such file; give a TOML file with a [tables] table") from None
    except (OSError, UnicodeDecodeError) as e:
        raise InputError(f"--map {path}: cannot read ({getattr(e, 'strerror', None) or e})") from None
    except tomllib.TOMLDecodeError as e:
        raise SpecError(f"--map {path}: not valid TOML ({e}); write [tables] then name = \"file.csv\"") from None
    tables = raw.get("tables")
    extra = sorted(set(raw) - {"tables"})
    if not isinstance(tables, dict) or extra:
        raise SpecError(f"--map {path}: expected one [tables] table of name = \"file\" lines"
                        + (f", not {', '.join(extra)}" if extra else ""))
    for k, v in tables.items():
        if not isinstance(v, str) or not v.strip():
            raise SpecError(f"--map {path}: tables.{k} must be a file name in quotes")
    return dict(tables)


def read_folder(folder, book_name: str, tables, mapping: dict | None = None,
                mapping_name: str = "", edition: str = "") -> ReferenceFolder:
    """Match each spec table to its reference file in ``folder``.

    Parameters
    ----------
    folder : the reference folder
    book_name : the spec's name (its sidecar, if there, is preferred)
    tables : names of the spec tables to compare, in order
    mapping : table name -> file (relative to the folder), from :func:`read_mapping`
    edition : the edition of a spec with editions whose sidecar to prefer

    Raises
    ------
    TablegenError (exit 2) naming a table without a reference file, a mapping
    entry for a table the spec does not have, a file the sidecar or mapping names
    that is missing, or an unreadable sidecar or metadata file.
    """
    root = Path(folder)
    if not root.is_dir():
        raise InputError(f"{folder}: not a folder; give a reference folder or one reference table")
    tables = list(tables)
    mapping = dict(mapping or {})
    unknown = [k for k in mapping if k not in tables]
    if unknown:
        raise NameLookupError(f"--map {mapping_name}: table {unknown[0]!r} is not compared; "
                              f"compared tables: {', '.join(tables)}")
    side_path, side = _choose_sidecar(_sidecars(root), book_name, tables, edition)
    listed = {}
    if side is not None:
        for t in side.get("tables", []):
            if isinstance(t, dict) and t.get("name") and t.get("csv"):
                listed[str(t["name"])] = str(t["csv"])
    book = _book_identity(side) if side is not None else {}
    entries, missing = [], []
    for name in tables:
        if name in mapping:
            p, how = root / mapping[name], f"mapping file {Path(mapping_name).name}"
        elif name in listed:
            p, how = root / listed[name], f"book sidecar {side_path.name}"
        else:
            cands = [root / f"{name}.csv", root / f"{name}.txt"]
            hit = [c for c in cands if c.is_file()]
            if not hit:
                missing.append(name)
                continue
            p, how = hit[0], "file name"
        if not p.is_file():
            raise DataError(f"{p}: named by the {how} for table {name!r} but not found; "
                            f"restore the file or map the table to another with --map")
        ident, ident_from = csvw_identity(p)
        if not ident and book:
            ident, ident_from = {k: book[k] for k in ("number", "revision", "issue_date", "fingerprint")}, \
                side_path.name
        entries.append(FolderEntry(name, str(p), how, ident, ident_from))
    if missing:
        more = f" and {len(missing) - 1} more" if len(missing) > 1 else ""
        raise DataError(f"{folder}: no reference for table {missing[0]!r}{more} (looked for "
                        f"{missing[0]}.csv, {missing[0]}.txt" + (f" and the sidecar {side_path.name}"
                                                                if side_path else "")
                        + "); name its file in a --map file, or leave it out with --table")
    used = {Path(e.path).name for e in entries}
    unmatched = sorted(n for n in set(listed.values()) if n not in used)
    if side is None:
        unmatched = sorted(p.name for p in root.glob("*.csv") if p.name not in used)
    return ReferenceFolder(str(folder), book, side_path.name if side_path else "", tuple(entries),
                           tuple(unmatched), tuple(_mixed_issue_notes(book, side_path, entries)))


def _mixed_issue_notes(book: dict, side_path, entries) -> list[str]:
    """One statement per file whose document, revision or fingerprint differs from the book's
    (or, without a sidecar, from the first file's)."""
    notes = []
    base = {k: book[k] for k in ("number", "revision", "fingerprint")} if book else None
    base_from = side_path.name if book else ""
    for e in entries:
        if not e.identity or e.identity_from == base_from:
            continue
        if base is None:
            base, base_from = {k: e.identity.get(k, "") for k in ("number", "revision", "fingerprint")}, \
                e.identity_from
            continue
        diff = [(k, e.identity.get(k, ""), base[k]) for k in ("number", "revision", "fingerprint")
                if e.identity.get(k, "") != base[k]]
        if diff:
            what = "; ".join(f"{_WORD[k]} {_short(k, a)} where {base_from} has {_short(k, b)}"
                             for k, a, b in diff)
            notes.append(f"{e.identity_from} (table {e.table}) names {what}: the reference folder "
                         f"mixes two issues")
    return notes


_WORD = {"number": "document", "revision": "revision", "fingerprint": "fingerprint"}


def _short(key: str, value: str) -> str:
    if not value:
        return "none"
    return value[:16] + "…" if key == "fingerprint" and len(value) > 16 else value


# ------------------------------------------------------------- the book
@dataclass(frozen=True, slots=True)
class TableComparison:
    """One spec table against its reference file."""

    name: str
    title: str
    entry: FolderEntry
    comparison: object            # tablegen.calc.compare.Comparison


@dataclass(frozen=True, slots=True)
class BookComparison:
    """A book spec against a reference folder: every table, one verdict."""

    spec: dict                    # file, name, title, number, revision, issue_date, fingerprint
    folder: ReferenceFolder
    tables: tuple                 # TableComparison, in spec order
    version: str
    options: dict = field(default_factory=dict)

    @property
    def n_cells(self) -> int:
        return sum(t.comparison.n_cells for t in self.tables)

    @property
    def n_out(self) -> int:
        return sum(t.comparison.n_out for t in self.tables)

    @property
    def passed(self) -> bool:
        return all(t.comparison.passed for t in self.tables)

    @property
    def n_failed_tables(self) -> int:
        return sum(1 for t in self.tables if not t.comparison.passed)

    @property
    def verdict(self) -> str:
        n = len(self.tables)
        if self.passed:
            return f"PASS: all {n} tables, all {self.n_cells} compared cells within tolerance"
        return (f"FAIL: {self.n_failed_tables} of {n} tables, {self.n_out} of {self.n_cells} compared cells "
                f"out of tolerance")

    @property
    def same_fingerprint(self) -> bool | None:
        """The reference book was computed from the same spec and data (None: not known)."""
        fp = self.folder.book.get("fingerprint") if self.folder.book else ""
        if not fp or not self.spec.get("fingerprint"):
            return None
        return fp == self.spec["fingerprint"]
