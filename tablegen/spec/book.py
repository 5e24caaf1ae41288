"""Table-book specs: a TOML file parsed and validated once into frozen dataclasses.

Every rule broken names the key path and what is allowed, e.g.
``tables[2].grid.step: must be > 0``, and raises :class:`SpecError` (exit 2)
before anything is computed or written. Downstream code (the table model and
the renderers) sees only the dataclasses here, never raw TOML.

The format is documented field by field in docs/spec.md.
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from pathlib import Path

from ..core.errors import SpecError
from ..core.texts import bad_character
from .document import Document, parse_document
from .substances import made_from, parse_substances
from .tables import DEFAULT_KEYS, parse_table
from .values import PAPER_ALIASES, PAPERS, _check_keys, _choice, _fail, _get, _typename

#: Largest number of rows in one book (all tables together).
MAX_ROWS_PER_BOOK = 100000
#: Largest number of tables in one book.
MAX_TABLES = 200


@dataclass(frozen=True, slots=True, eq=False)
class BookSpec:
    name: str
    document: Document
    tables: tuple
    normalised: dict             # the spec as JSON-ready data, defaults applied
    data_paths: tuple = ()       # extra --data / [data] files
    substances: dict = field(default_factory=dict)
    edition: object = None       # tablegen.spec.editions.Edition of this build (None: no [editions], no --paper)
    all_tables: tuple = ()       # every table of the spec (an edition may print fewer): the data they use
                                 # enters the fingerprint every edition carries
    editions: tuple = ()         # names of every edition the spec declares, in its order


# ---------------------------------------------------------------- book
TOP_KEYS = ("document", "data", "substances", "defaults", "tables", "editions")


def load(path, *, source: str | None = None, data=(), edition: str | None = None,
         paper: str | None = None, extrapolate: bool = False) -> BookSpec:
    """Read and validate a spec file: the book as its first edition prints it (or the
    edition named), or as written when the spec declares no editions.

    Parameters
    ----------
    path : the TOML spec
    source, data : --source and --data from the command line (the spec's own
        [data] section adds to them; the command line's source wins)
    edition, paper : as :func:`load_editions`
    extrapolate : --extrapolate from the command line: every table may extrapolate
        (as ``extrapolate = true`` in each), and the document says so

    Raises
    ------
    SpecError naming the key path and the rule, for any broken rule.
    """
    return load_editions(path, source=source, data=data, editions=edition, paper=paper,
                         extrapolate=extrapolate)[0]


def load_editions(path, *, source: str | None = None, data=(), editions=None,
                  paper: str | None = None, extrapolate: bool = False) -> tuple:
    """Every edition of a spec (or those named, comma-separated) as a BookSpec each.

    Every edition is validated, whichever are asked for, so a spec that builds one
    edition builds them all. ``paper`` prints the editions on another paper for once
    (``--paper``); it is recorded in each edition and leaves the fingerprint alone.
    """
    p = Path(path)
    raw = read_toml(p, missing="spec file not found")
    return parse_editions(raw, name=book_name(p), base=p.parent, source=source, data=data, editions=editions,
                          paper=paper, extrapolate=extrapolate)


def parse_editions(raw: dict, *, name: str, base: Path | None = None, source: str | None = None, data=(),
                   editions=None, paper: str | None = None, extrapolate: bool = False) -> tuple:
    """Validate parsed TOML into one BookSpec per edition (see :func:`load_editions`)."""
    from . import editions as E
    if paper is not None:
        hit = [c for c in PAPERS if c.casefold() == PAPER_ALIASES.get(paper, paper).casefold()]
        if not hit:
            raise SpecError(f"--paper {paper!r}: not a paper tablegen prints on; allowed: {', '.join(PAPERS)}")
        paper = hit[0]
    book = parse(raw, name=name, base=base, source=source, data=data, extrapolate=extrapolate)
    if "editions" not in raw:
        if editions:
            raise SpecError(f"--edition {editions}: {name} declares no editions; build it without "
                            f"--edition, or declare [editions.NAME] tables (docs/spec.md, \"Editions\")")
        d = replace(book.document, paper=paper) if paper else book.document
        ed = E.Edition(name="", label="", suffix="", paper=d.paper, orientation=d.orientation,
                       two_sided=d.paper == "A5", font_size_pt=None,
                       paper_from="--paper" if paper else "spec")
        return (replace(book, document=d, edition=ed),)
    specs = E.parse(raw["editions"], [t.name for t in book.tables], PAPERS, _choice)
    built = []
    for i, es in enumerate(specs):
        try:
            one = parse(E.apply(raw, es, paper), name=name, base=base, source=source, data=data,
                        extrapolate=extrapolate)
        except SpecError as e:
            raise SpecError(f"editions.{es.name}: {e}") from None
        built.append((es, one, E.restrict(one, es)))
    names = E.csv_names([(es.name, tables) for es, _, tables in built])
    out = []
    for i, (es, one, tables) in enumerate(built):
        d = one.document
        ed = E.Edition(name=es.name, label=es.label, suffix=es.suffix, paper=d.paper, orientation=d.orientation,
                       two_sided=es.two_sided if es.two_sided is not None else d.paper == "A5",
                       font_size_pt=es.font_size_pt,
                       paper_from="--paper" if paper else ("edition" if es.paper else "spec"),
                       primary=i == 0, normalised=es.normalised)
        tables = tuple(replace(t, csv_name=names[(es.name, t.name)][0], shared_by=names[(es.name, t.name)][1])
                       for t in tables)
        out.append(replace(one, tables=tables, normalised=book.normalised, edition=ed,
                           editions=tuple(s.name for s in specs), all_tables=book.tables))
    picked = {e.name for e in E.selected([o.edition for o in out], editions)}
    return tuple(o for o in out if o.edition.name in picked)


_BOOK_NAME_BAD = set('/\\:*?"<>|')


def book_name(path: Path) -> str:
    """The book's name, the spec file's name without .toml; it names the files and the default folder."""
    name = path.stem
    if not name or not name[0].isalnum() or len(name) > 100 or bad_character(name) or \
            _BOOK_NAME_BAD & set(name):
        raise SpecError(f"{path.name}: the spec file's name gives the book name {name!r}, which names its "
                        f"files and output/{name}/; allowed: up to 100 characters, starting with a letter "
                        f"or digit, without control characters or / \\ : * ? \" < > |")
    return name


def read_toml(path, label: str = "", missing: str = "no such file") -> dict:
    """A TOML file as a dict, or a SpecError naming the file (a byte-order mark is fine).

    Its size and nesting are bounded before parsing (tablegen.core.tomlread).
    """
    from ..core import tomlread
    p = Path(path)
    name = f"{label} {p}" if label else str(p)
    text = tomlread.read_text(p, name, SpecError, missing=missing)
    return tomlread.loads(text, p.name, SpecError)


def parse(raw: dict, *, name: str, base: Path | None = None, source: str | None = None,
          data=(), extrapolate: bool = False) -> BookSpec:
    """Validate parsed TOML into a BookSpec (see :func:`load`)."""
    _check_keys(raw, TOP_KEYS, "")
    if "document" not in raw:
        _fail("document", "is required ([document] with title, number and revision)")
    doc = parse_document(raw["document"])
    if extrapolate:
        doc = replace(doc, extrapolate_all=True)
    dsec = raw.get("data", {})
    if not isinstance(dsec, dict):
        _fail("data", f"must be a table, not {_typename(dsec)}")
    _check_keys(dsec, ("files",), "data")
    files = _get(dsec, "files", list, "data", [])
    paths = []
    for i, f in enumerate(files):
        if not isinstance(f, str):
            _fail(f"data.files[{i}]", f"must be a path string, not {_typename(f)}")
        fp = (Path(base) / f) if base is not None and not Path(f).is_absolute() else Path(f)
        if not fp.exists():
            _fail(f"data.files[{i}]", f"{f!r} does not exist")
        paths.append(str(fp))
    data = tuple(data) + tuple(paths)
    src = source or doc.source
    if src is not None:
        from ..data.library import library
        known = library(data).datasets
        if src not in known:
            w = "document.source" if source is None else "--source"
            _fail(w, f"unknown data set {src!r}; allowed: {', '.join(sorted(known))}")
    comp_u: dict = {}
    subs = parse_substances(raw.get("substances", {}), "substances", src, data, comp_u)
    defaults = raw.get("defaults", {})
    if not isinstance(defaults, dict):
        _fail("defaults", f"must be a table, not {_typename(defaults)}")
    _check_keys(defaults, DEFAULT_KEYS, "defaults")
    tabs = raw.get("tables")
    if tabs is None:
        _fail("tables", "is required: give at least one [[tables]] entry")
    if not isinstance(tabs, list):
        _fail("tables", f"must be an array of tables ([[tables]]), not {_typename(tabs)}")
    if not tabs:
        _fail("tables", "is empty: give at least one [[tables]] entry")
    if len(tabs) > MAX_TABLES:
        _fail("tables", f"has {len(tabs)} tables; a book has at most {MAX_TABLES}")
    tables = []
    names = set()
    total = 0
    for i, t in enumerate(tabs):
        ts = parse_table(t, f"tables[{i}]", defaults, doc, subs, src, data)
        if ts.substance_ref in comp_u:
            ts = replace(ts, composition_u=comp_u[ts.substance_ref])
        if ts.name.casefold() in names:
            _fail(f"tables[{i}].name", f"{ts.name!r} is used by an earlier table; names must be unique")
        names.add(ts.name.casefold())
        total += ts.T_K.size
        if total > MAX_ROWS_PER_BOOK:
            _fail(f"tables[{i}]", f"brings the book to {total} rows; a book has at most {MAX_ROWS_PER_BOOK} rows")
        tables.append(ts)
    eds = ()
    if "editions" in raw:
        from . import editions as E
        eds = E.parse(raw["editions"], [t.name for t in tables], PAPERS, _choice)
    spec = BookSpec(name=name, document=doc, tables=tuple(tables), normalised={}, data_paths=data,
                    substances=subs, editions=tuple(e.name for e in eds))
    normalised = normalise(spec, src)
    if eds:
        # the editions are part of the spec: all of them enter the fingerprint every edition carries
        normalised["editions"] = {e.name: e.normalised for e in eds}
    object.__setattr__(spec, "normalised", normalised)
    return spec


def normalise(spec: BookSpec, source) -> dict:
    """The spec as plain JSON-ready data with every default applied, SI values.

    This is what the fingerprint hashes, so it holds no file paths or dates of the run.
    """
    d = spec.document
    doc = {k: getattr(d, k) for k in ("title", "subtitle", "number", "revision", "issue_date",
                                       "organisation", "prepared_by", "checked_by", "approved_by",
                                       "paper", "orientation", "units", "basis", "max_pressure_Pa",
                                       "uncertainty_columns", "validity_columns", "chart_placement",
                                       "csv_comments")}
    doc["reference"] = {"name": d.reference.name, "T_K": d.reference.T_K, "P_Pa": d.reference.P_Pa}
    if d.barometer_Pa is not None:          # only where given, so older specs keep their fingerprint
        doc["barometer_Pa"] = d.barometer_Pa
    if d.extrapolate_all:                   # likewise: only when the command line asked
        doc["extrapolate_all"] = True
    doc["source"] = source
    tables = []
    for t in spec.tables:
        s = t.substance
        tables.append({
            "name": t.name, "title": t.title, "substance": t.substance_ref, "substance_id": s.id,
            "units": t.units, "basis": t.basis, "temperature_units": list(t.temperature_units),
            "grid": t.grid, "rows": int(t.T_K.size), "T_K": [float(x) for x in t.T_K],
            "extra_rows": [{"T_K": e.T_K, "label": e.label} for e in t.extra_rows],
            "columns": [{"key": c.key, "system": c.system, "unit": c.unit,
                         "decimals": "auto" if c.auto and c.decimals is not None else c.decimals,
                         "significant": "auto" if c.auto and c.significant is not None else c.significant}
                        for c in t.columns],
            "datum": {"kind": s.datum.kind, "T_ref_K": s.datum.T_ref_K, "h_ref_J_per_kg": s.datum.h_ref_J_per_kg},
            "P_ref_Pa": s.P_ref_Pa,
            "anchor": {"T_K": s.anchor.T_K, "Pr": s.anchor.Pr, "vr": s.anchor.vr},
            "mean_cp_from_K": t.T_mean_ref_K, "extrapolate": t.extrapolate,
        })
        if t.substance_ref not in spec.substances:
            tables[-1].update(made_from(s))
        if t.charts:
            from dataclasses import asdict, is_dataclass
            tables[-1]["charts"] = [asdict(c) if is_dataclass(c) else repr(c) for c in t.charts]
    subs = {}
    for k, s in sorted(spec.substances.items()):
        subs[k] = {"id": s.id, "name": s.name, "kind": s.kind,
                   "mole_fractions": {c.id: c.mole_fraction for c in s.components}}
        made = made_from(s)
        if made:
            subs[k].update(made)
    for t in spec.tables:
        if t.composition_u is not None and t.substance_ref in subs:
            subs[t.substance_ref]["fraction_uncertainty"] = {"basis": t.composition_u[0],
                                                             "u": dict(sorted(t.composition_u[1].items()))}
    return {"name": spec.name, "document": doc, "substances": subs, "tables": tables}
