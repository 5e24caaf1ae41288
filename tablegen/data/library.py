"""The coefficient library: gasdata files, records, names and validation.

A gasdata file (format in gasdata/README.md) is one ``[dataset]`` table and one
``[[species]]`` table per record. Shipped files hold hundreds of records, so a
file is split at its ``[[species]]`` headers and a record is parsed only when it
is asked for; the names of all records are read with one cheap scan. Everything
is loaded lazily and once.

User data (the user data folder and every ``--data`` path) may also come in the
two card formats of the NASA reports (tablegen.data.formats); the format is
told from the content. User records are all built and validated when the
library is made (tablegen.data.validate), so a bad file is refused before any
table is computed, with file, line, record and reason.
"""

from __future__ import annotations

import difflib
import math
import os
import re
import tomllib
from dataclasses import dataclass, field
from functools import cached_property
from pathlib import Path

import numpy as np

from ..core.constants import R_MOLAR
from ..core.errors import DataError, NameLookupError
from ..core.tomlread import MAX_DEPTH, nesting_depth, read_text
from ..thermo.polynomial import FORMS, SEVEN, Polynomial, seven_to_nine
from . import former_names
from . import formats, validate

#: Files in gasdata/ that are not coefficient sets.
NOT_DATASETS = {"atomic-weights.toml", "mixtures.toml", "defaults.toml", "agreement.toml",
                "critical.toml", "incompressible.toml", "uncertainty.toml", "codata1989.toml",
                "agreement-janaf.toml"}

#: Largest user data file read (a NASA thermo file of every species is about 2 MB).
MAX_DATA_BYTES = 32 << 20

#: Reference pressure of every polynomial once loaded (NASA 1993 and 2002 use 1 bar).
P_STD_PA = 100000.0

#: Relative tolerance of the molar-mass check of a record against its elements.
#: Common practice: weights are abridged to 5 significant figures, so 1e-4.
M_TOLERANCE = 1e-4


def gasdata_dir() -> Path:
    """The shipped gasdata folder, from a checkout or from an installed wheel."""
    here = Path(__file__).resolve().parent.parent
    for cand in (here / "_gasdata", here.parent / "gasdata"):
        if (cand / "atomic-weights.toml").is_file():
            return cand
    raise DataError("the shipped gasdata folder is missing; reinstall tablegen")


def user_data_dir() -> Path | None:
    """The user's own data folder: $TABLEGEN_DATA, else ~/.config/tablegen/gasdata."""
    env = os.environ.get("TABLEGEN_DATA")
    if env:
        return Path(env)
    p = Path.home() / ".config" / "tablegen" / "gasdata"
    return p if p.is_dir() else None


def norm_name(s: str) -> str:
    return s.strip().casefold()


@dataclass(frozen=True, slots=True)
class AtomicWeights:
    weights: dict
    citation: str

    def molar_mass(self, elements: dict, where: str = "") -> float:
        total = 0.0
        for el, n in elements.items():
            if el not in self.weights:
                raise DataError(f"{where}unknown element {el!r}; known: {', '.join(sorted(self.weights))}")
            total += self.weights[el] * n
        return total


@dataclass(frozen=True, slots=True)
class Record:
    """One species record of a dataset, validated, with its polynomial."""

    id: str
    name: str
    aliases: tuple
    elements: dict
    M: float                      # g/mol = kg/kmol
    phase: str
    form: str
    poly: Polynomial              # molar, reference pressure 1 bar
    h_formation_298: float | None  # J/mol, derived from the polynomial
    dataset: str
    citation: str
    source_note: str
    file: str
    line: int
    extra: dict = field(default_factory=dict)
    #: validation findings that did not refuse the record (tablegen.data.validate.Finding)
    warnings: tuple = ()

    @property
    def T_min(self) -> float:
        return self.poly.T_min

    @property
    def T_max(self) -> float:
        return self.poly.T_max

    @property
    def source_text(self) -> str:
        note = f" [{self.source_note}]" if self.source_note else ""
        return f"{self.citation}{note}"


_PLAIN_STRINGS = re.compile(r'^\[\s*(?:"[^"\\\n]*"\s*(?:,\s*"[^"\\\n]*"\s*)*,?\s*)?\]$')
_PLAIN_STRING = re.compile(r'"([^"\\\n]*)"')


def _aliases(array_text: str) -> list[str]:
    """The strings of a TOML array of aliases; plain ones read by a pattern, anything
    else (escapes, other quoting) by the TOML parser."""
    if _PLAIN_STRINGS.match(array_text):
        return _PLAIN_STRING.findall(array_text)
    try:
        return [str(x) for x in tomllib.loads("a = " + array_text)["a"]]
    except tomllib.TOMLDecodeError:
        return []


@dataclass(frozen=True, slots=True)
class Summary:
    """What a listing shows of a record, read without building or validating it."""

    id: str
    name: str
    aliases: tuple
    elements: dict
    M: float
    T_min: float
    T_max: float
    form: str
    dataset: str
    source_note: str


def _summary_of(rec: Record) -> Summary:
    return Summary(rec.id, rec.name, rec.aliases, rec.elements, rec.M, rec.T_min, rec.T_max, rec.form,
                   rec.dataset, rec.source_note)


class Dataset:
    """A gasdata file, parsed lazily record by record."""

    _HEADER = re.compile(r"^\[\[species\]\][ \t]*(#.*)?$", re.M)
    _ID = re.compile(r'^id\s*=\s*"([^"]*)"', re.M)
    _NAME = re.compile(r'^name\s*=\s*"([^"]*)"', re.M)
    _ALIASES = re.compile(r"^aliases\s*=\s*(\[[^\]\n]*\])", re.M)

    def __init__(self, path: Path, weights: AtomicWeights, *, user: bool = False, text: str | None = None):
        self.path = Path(path)
        self.weights = weights
        self.user = user
        self.label = str(self.path) if user else self.path.name
        self.notes: list[str] = []
        if text is None:
            try:
                text = self.path.read_text(encoding="utf-8")
            except (OSError, UnicodeDecodeError) as e:
                raise DataError(f"{self.path}: cannot read ({e}); a gasdata file must be UTF-8 text") from None
        if user:
            depth, line = nesting_depth(text)
            if depth > MAX_DEPTH:
                raise DataError(f"{self.path}:{line}: arrays or inline tables nested more than {MAX_DEPTH} "
                                f"deep; at most {MAX_DEPTH} levels are allowed")
        self.text = text
        starts = [m.start() for m in self._HEADER.finditer(self.text)]
        head = self.text[: starts[0]] if starts else self.text
        self._blocks = [(s, self.text[s: e]) for s, e in zip(starts, [*starts[1:], len(self.text)])]
        try:
            meta = tomllib.loads(head)
        except tomllib.TOMLDecodeError as e:
            raise DataError(f"{self.path}: not valid TOML before the first [[species]] ({e}); "
                            f"a gasdata file starts with a [dataset] table") from None
        ds = meta.get("dataset")
        if not isinstance(ds, dict) or "id" not in ds or "citation" not in ds:
            raise DataError(f"{self.path}: needs a [dataset] table with at least id and citation")
        self.meta = ds
        self.id = str(ds["id"])
        self.citation = str(ds["citation"])
        self.P_ref = float(ds.get("reference_pressure_Pa", P_STD_PA))
        self._cache: dict[int, Record] = {}

    def __repr__(self):
        return f"Dataset({self.id!r}, {len(self._blocks)} records)"

    @cached_property
    def names(self) -> dict[str, int]:
        """Normalised id, name and alias -> block index (ids win over aliases)."""
        ids, others = {}, {}
        for i, (_, block) in enumerate(self._blocks):
            m = self._ID.search(block)
            if not m:
                ids[norm_name(self._parse(i).id)] = i
                continue
            ids[norm_name(m.group(1))] = i
            n = self._NAME.search(block)
            if n:
                others.setdefault(norm_name(n.group(1)), i)
            a = self._ALIASES.search(block)
            if a:
                for alias in _aliases(a.group(1)):
                    others.setdefault(norm_name(alias), i)
        return {**others, **ids}

    @cached_property
    def ids(self) -> list[str]:
        out = []
        for i, (_, block) in enumerate(self._blocks):
            m = self._ID.search(block)
            out.append(m.group(1) if m else self._parse(i).id)
        return out

    def __len__(self):
        return len(self._blocks)

    @cached_property
    def exact(self) -> dict[str, int]:
        """Exact-case id -> block index (CS2 and Cs2 differ only in case)."""
        return {sid: i for i, sid in enumerate(self.ids)}

    @cached_property
    def ambiguous(self) -> dict[str, list[str]]:
        """Case-folded names shared by ids that differ only in case."""
        groups: dict[str, list[str]] = {}
        for sid in self.ids:
            groups.setdefault(norm_name(sid), []).append(sid)
        return {k: v for k, v in groups.items() if len(v) > 1}

    def get(self, name: str) -> Record | None:
        name = name.strip()
        i = self.exact.get(name)
        if i is None:
            key = norm_name(name)
            if key in self.ambiguous:
                raise NameLookupError(f"{name!r} is ambiguous in data set {self.id} (case matters here); "
                                      f"allowed: {', '.join(self.ambiguous[key])}")
            i = self.names.get(key)
        return None if i is None else self._parse(i)

    def records(self) -> list[Record]:
        return [self._parse(i) for i in range(len(self._blocks))]

    @cached_property
    def _whole(self) -> list | None:
        """Every raw record from one parse of the whole file (None if it does not parse:
        then the records are read one by one and the bad one is named)."""
        try:
            out = tomllib.loads(self.text).get("species", [])
        except tomllib.TOMLDecodeError:
            return None
        return out if isinstance(out, list) and len(out) == len(self._blocks) else None

    def summary(self, i: int) -> Summary:
        """A listing's view of record i: from the built record if there is one, else from
        one parse of the whole file (no polynomial, no validation)."""
        if i in self._cache:
            return _summary_of(self._cache[i])
        raw = self._whole[i] if self._whole is not None else None
        try:
            return Summary(
                id=str(raw["id"]), name=str(raw.get("name", raw["id"])),
                aliases=tuple(str(a) for a in raw.get("aliases", [])),
                elements={str(k): v for k, v in raw["elements"].items()},
                M=self.weights.molar_mass(raw["elements"], ""),
                T_min=float(raw["T_bounds_K"][0]), T_max=float(raw["T_bounds_K"][-1]),
                form=former_names.form(str(raw["form"])), dataset=self.id,
                source_note=str(raw.get("source_note", "")))
        except (TypeError, KeyError, IndexError, ValueError, DataError):
            return _summary_of(self._parse(i))      # builds it, or names what is wrong

    def _parse(self, i: int) -> Record:
        if i in self._cache:
            return self._cache[i]
        start, block = self._blocks[i]
        line = self.text.count("\n", 0, start) + 1
        where = f"{self.label}:{line}: "
        try:
            raw = tomllib.loads(block)["species"][0]
        except tomllib.TOMLDecodeError as e:
            raise DataError(f"{where}record is not valid TOML ({e})") from None
        rec = build_record(raw, dataset=self, where=where, line=line)
        self._cache[i] = rec
        return rec


class CardDataset(Dataset):
    """A user file in the NASA TM-4513 (tm-4513) or NASA/TP-2002-211556 (tp-2002) card format.

    Every record is read when the file is opened; records are built (and
    validated) on demand like those of a TOML file. The data set id is the
    file name without its extension; a comment line ``! citation: ...`` before
    the first record gives its citation.
    """

    def __init__(self, path: Path, weights: AtomicWeights, fmt: str, text: str):
        self.path = Path(path)
        self.weights = weights
        self.user = True
        self.label = str(self.path)
        self.text = text
        self.format = fmt
        reader = formats.read_tm4513 if fmt == formats.TM4513 else formats.read_tp2002
        self._raws, self.notes = reader(text, self.label)
        cite = re.search(r"^\s*[!#]\s*citation:\s*(.+?)\s*$", text, re.M | re.I)
        report = "NASA TM-4513" if fmt == formats.TM4513 else "NASA/TP-2002-211556"
        self.id = self.path.stem
        self.citation = cite.group(1) if cite else f"user data file {self.path.name} ({report} format)"
        self.meta = {"id": self.id, "citation": self.citation, "format": fmt}
        self.P_ref = P_STD_PA
        self._cache = {}
        self._blocks = self._raws

    def __repr__(self):
        return f"CardDataset({self.id!r}, {self.format}, {len(self._raws)} records)"

    @cached_property
    def names(self) -> dict[str, int]:
        ids, others, first = {}, {}, {}
        for i, r in enumerate(self._raws):
            sid = r.raw["id"]
            if sid in first:
                raise DataError(f"{self.label}:{r.line}: {sid}: this species appears twice in the "
                                f"file (first on line {self._raws[first[sid]].line})")
            first[sid] = i
            ids[norm_name(sid)] = i
            others.setdefault(norm_name(r.raw["name"]), i)
        return {**others, **ids}

    @cached_property
    def ids(self) -> list[str]:
        return [r.raw["id"] for r in self._raws]

    def summary(self, i: int) -> Summary:
        return _summary_of(self._parse(i))     # user files are built and validated on load

    def _parse(self, i: int) -> Record:
        if i in self._cache:
            return self._cache[i]
        r = self._raws[i]
        rec = build_record(dict(r.raw), dataset=self, where=f"{self.label}:{r.line}: ", line=r.line)
        self._cache[i] = rec
        return rec


def open_dataset(path: Path, weights: AtomicWeights, *, user: bool) -> Dataset:
    """A data file in any of the accepted formats (told from the content)."""
    path = Path(path)
    if not user:
        return Dataset(path, weights)
    text = read_text(path, str(path), DataError, max_bytes=MAX_DATA_BYTES, what="data file")
    fmt = formats.detect(path, text)
    if fmt == "toml":
        return Dataset(path, weights, user=True, text=text)
    return CardDataset(path, weights, fmt, text)


def _req(raw: dict, key: str, types, where: str):
    if key not in raw:
        raise DataError(f"{where}record lacks {key!r}")
    v = raw[key]
    if not isinstance(v, types) or isinstance(v, bool):
        raise DataError(f"{where}{key!r} has the wrong type ({type(v).__name__})")
    return v


def build_record(raw: dict, *, dataset: Dataset, where: str, line: int) -> Record:
    """Validate one raw record and build its polynomial (molar, 1 bar).

    User data (``dataset.user``) are refused on any finding of
    tablegen.data.validate.check_polynomial that is an error; for shipped data
    those findings are kept in ``Record.warnings`` (``tablegen species --check``
    lists them) so that a shipped set never stops a table being made.
    """
    checks = raw.pop("_checks", {}) if isinstance(raw, dict) else {}
    hf = raw.get("h_formation_298_J_per_mol") if isinstance(raw, dict) else None
    if "h_formation_J_per_mol" not in checks and isinstance(hf, (int, float)) and not isinstance(hf, bool):
        checks = {**checks, "h_formation_J_per_mol": float(hf)}
    sid = _req(raw, "id", str, where)
    where = f"{where}{sid}: "
    elements = _req(raw, "elements", dict, where)
    form = former_names.form(_req(raw, "form", str, where))
    if form not in FORMS:
        raise DataError(f"{where}form {form!r} is not known; allowed: {', '.join(FORMS)}")
    bounds = [float(x) for x in _req(raw, "T_bounds_K", list, where)]
    rows = _req(raw, "coefficients", list, where)
    if len(rows) != len(bounds) - 1 or not rows:
        raise DataError(f"{where}{len(bounds)} bounds need {len(bounds) - 1} coefficient rows, found {len(rows)}")
    n_expect = 7 if form == SEVEN else 9
    c9 = []
    for k, r in enumerate(rows):
        if not isinstance(r, list) or len(r) != n_expect:
            raise DataError(f"{where}interval {k + 1} needs {n_expect} coefficients for {form}")
        try:
            r = [float(x) for x in r]
        except (TypeError, ValueError):
            raise DataError(f"{where}interval {k + 1} has a non-numeric coefficient") from None
        if not all(math.isfinite(x) for x in r):
            raise DataError(f"{where}interval {k + 1} has a non-finite coefficient")
        c9.append(seven_to_nine(r) if form == SEVEN else r)
    c9 = np.array(c9)
    if bounds != sorted(bounds) or len(set(bounds)) != len(bounds):
        raise DataError(f"{where}temperature bounds {bounds} must increase: the intervals must be "
                        f"contiguous and in order")
    if dataset.P_ref != P_STD_PA:
        # s°(1 bar) = s°(P_ref) + R ln(P_ref / 1 bar): shift the s/R constant
        c9[:, 8] += math.log(dataset.P_ref / P_STD_PA)
    try:
        poly = Polynomial(np.array(bounds), c9, form)
    except DataError as e:
        raise DataError(f"{where}{e}") from None
    M_el = dataset.weights.molar_mass(elements, where)
    M = float(raw.get("molar_mass_g_per_mol", M_el))
    # A card format rounds a fractional element count (a mixture written as one
    # record) to its field; the molar-mass check allows for that rounding, and
    # the printed molar mass is then the better value.
    res = checks.get("count_resolution", {})
    u_M = sum(dataset.weights.weights[e] * r for e, r in res.items() if e in dataset.weights.weights)
    if not (math.isfinite(M) and M > 0) or abs(M - M_el) > M_TOLERANCE * max(M_el, 1e-3) + u_M:
        raise DataError(f"{where}molar mass {M:.8g} g/mol does not match its elements "
                        f"({M_el:.8g} g/mol from {', '.join(f'{e} {n:g}' for e, n in elements.items())}); "
                        f"allowed difference {M_TOLERANCE * max(M_el, 1e-3) + u_M:.2g} g/mol")
    if u_M > 0:
        M_el = M
    found = validate.check_polynomial(poly, user=bool(getattr(dataset, "user", False)))
    errors = [f for f in found if f.severity == "error"]
    if errors and getattr(dataset, "user", False):
        raise DataError(f"{where}{errors[0].text}")
    found += validate.check_printed_enthalpy(poly, checks, R_MOLAR)
    for f in found:
        if f.severity == "warning" and getattr(dataset, "user", False):
            dataset.notes.append(f"{where}{f.text}")
    h298 = None
    if poly.T_min <= 298.15 <= poly.T_max:
        h298 = float(poly.evaluate(np.array([298.15]), want=("h",))["h"][0]) * R_MOLAR
    known = {"id", "name", "aliases", "elements", "molar_mass_g_per_mol", "phase", "form", "T_bounds_K",
             "coefficients", "h_formation_298_J_per_mol", "source", "source_note"}
    return Record(
        id=sid,
        name=str(raw.get("name", sid)),
        aliases=tuple(str(a) for a in raw.get("aliases", [])),
        elements={str(k): v for k, v in elements.items()},
        M=M_el,
        phase=str(raw.get("phase", "gas")),
        form=form,
        poly=poly,
        h_formation_298=h298,
        dataset=dataset.id,
        citation=dataset.citation,
        source_note=str(raw.get("source_note", "")),
        file=str(dataset.path),
        line=line,
        extra={k: v for k, v in raw.items() if k not in known},
        warnings=tuple(found),
    )


class Library:
    """All datasets: shipped, then the user data folder, then --data paths."""

    def __init__(self, extra_paths=(), *, include_user_dir: bool = True, strict: bool = True):
        self.root = gasdata_dir()
        self.weights = self._load_weights()
        self.datasets: dict[str, Dataset] = {}
        self.messages: list[str] = []
        self.user_order: list[str] = []
        #: with strict=False: refusals of user files and records, instead of raising
        self.load_errors: list[str] = []
        self.strict = strict
        #: (data set asked for, species id) -> data set the record came from, for each
        #: species a ``source`` did not hold (read and cleared by take_fallbacks)
        self.fallbacks: dict = {}
        #: every user data file read (user folder, --data, a spec's [data]), in order
        self.user_files: list[Path] = []
        for p in sorted(self.root.glob("*.toml")):
            if p.name not in NOT_DATASETS:
                self._add(p, announce=False)
        self.shipped = list(self.datasets)
        self.defaults = self._load_defaults()
        paths = []
        ud = user_data_dir() if include_user_dir else None
        if ud is not None and ud.is_dir():
            paths.append(ud)
        paths.extend(Path(p) for p in extra_paths)
        for p in paths:
            if p.is_dir():
                for f in sorted(p.iterdir()):
                    if f.is_file() and not f.name.startswith(".") and \
                            f.suffix.lower() in formats.FOLDER_EXTENSIONS:
                        self._add(f, announce=True)
            elif p.is_file():
                self._add(p, announce=True)
            else:
                raise DataError(f"--data {p}: no such file or folder; give a coefficient file or a folder of them")

    def _load_weights(self) -> AtomicWeights:
        raw = tomllib.loads((self.root / "atomic-weights.toml").read_text(encoding="utf-8"))
        return AtomicWeights({k: float(v) for k, v in raw["weights"].items()}, raw["source"]["citation"])

    def _load_defaults(self) -> dict:
        p = self.root / "defaults.toml"
        if not p.is_file():
            return {}
        return tomllib.loads(p.read_text(encoding="utf-8")).get("species", {})

    def _add(self, path: Path, announce: bool):
        if not announce:
            ds = Dataset(path, self.weights)
            self.datasets[ds.id] = ds
            return
        self.user_files.append(Path(path))
        try:
            ds = open_dataset(path, self.weights, user=True)
            names = ds.names  # noqa: F841  (duplicate ids are refused here)
        except DataError as e:
            if self.strict:
                raise
            self.load_errors.append(str(e))
            return
        good = self._validate_user(ds)
        if ds.id in self.datasets:
            self.messages.append(f"data set {ds.id!r} from {path} replaces the one already loaded")
            if ds.id in self.user_order:
                self.user_order.remove(ds.id)
        self.messages.extend(ds.notes)
        for rec in good:
            self._announce_replacement(rec, ds)
        self.datasets[ds.id] = ds
        self.user_order.append(ds.id)

    def _validate_user(self, ds: Dataset) -> list[Record]:
        """Build and validate every record of a user file (strict: raise on the first bad one)."""
        good, first = [], {}
        for i in range(len(ds)):
            try:
                rec = ds._parse(i)
                key = rec.id
                if key in first:
                    raise DataError(f"{ds.label}:{rec.line}: {rec.id}: this species appears twice in the "
                                    f"file (first on line {first[key]}); keep one record a species")
                first[key] = rec.line
                good.append(rec)
            except DataError as e:
                if self.strict:
                    raise
                self.load_errors.append(str(e))
        return good

    def _announce_replacement(self, rec: Record, ds: Dataset):
        """Note each record (shipped or earlier user) that a name of this one resolved to
        before this file was loaded (called before the file joins the search)."""
        seen = set()
        for name in dict.fromkeys([rec.id, rec.name, *rec.aliases]):
            old = self._resolves_to(name)
            if old is None or old in seen:
                continue
            seen.add(old)
            kind = "user" if old[0] in self.user_order else "shipped"
            via = "" if name == rec.id else f" (by the name {name!r})"
            self.messages.append(f"{rec.file}:{rec.line}: user record {rec.id!r} replaces the {kind} "
                                 f"{old[0]} record {old[1]!r}{via}")

    def _resolves_to(self, name: str) -> tuple[str, str] | None:
        """(data set, id) that ``record(name)`` gives, found without building records.

        Mirrors record() without a source: user data sets, then the search
        order, then the species' default source.
        """
        def find(d):
            ds = self.datasets[d]
            i = ds.exact.get(name.strip())
            if i is None:
                key = norm_name(name)
                if key in getattr(ds, "ambiguous", {}):
                    return None
                i = ds.names.get(key)
            return None if i is None else ds.ids[i]

        for d in reversed(self.user_order):
            sid = find(d)
            if sid is not None:
                return d, sid
        for d in self.search_order:
            sid = find(d)
            if sid is not None:
                pref = self.defaults.get(sid, {}).get("source")
                if pref and pref in self.datasets and pref != d:
                    p = self.datasets[pref]
                    if sid in p.exact or norm_name(sid) in p.names:
                        return pref, p.ids[p.exact.get(sid, p.names.get(norm_name(sid)))]
                return d, sid
        return None

    @property
    def search_order(self) -> list[str]:
        """Datasets in the order a name is looked up: user data first."""
        shipped_pref = [d for d in ("nasa1993", "nuig2015") if d in self.datasets]
        rest = [d for d in self.shipped if d not in shipped_pref]
        return [*reversed(self.user_order), *shipped_pref, *rest]

    def record(self, name: str, source: str | None = None) -> Record:
        """Resolve a species name to a record.

        Order: a user data set that holds it; else the named ``source`` data set;
        else the species' default source (gasdata/defaults.toml); else the
        search order above.
        """
        for d in reversed(self.user_order):
            r = self.datasets[d].get(name)
            if r is not None:
                return r
        if source is not None:
            if source not in self.datasets:
                raise NameLookupError(f"unknown data set {source!r}; known: {', '.join(sorted(self.datasets))}")
            r = self.datasets[source].get(name)
            if r is not None:
                return r
        base = self._first(name)
        if base is not None:
            pref = self.defaults.get(base.id, {}).get("source")
            if pref and pref in self.datasets and pref != base.dataset:
                r = self.datasets[pref].get(base.id)
                if r is not None:
                    base = r
            if source is not None:
                self.fallbacks.setdefault((source, base.id), base.dataset)
            return base
        raise NameLookupError(self._unknown(name))

    def _first(self, name: str) -> Record | None:
        for d in self.search_order:
            r = self.datasets[d].get(name)
            if r is not None:
                return r
        return None

    def has(self, name: str) -> bool:
        return any(norm_name(name) in self.datasets[d].names for d in self.search_order)

    def _unknown(self, name: str) -> str:
        pool = {}
        for d in self.search_order:
            for key, i in self.datasets[d].names.items():
                pool.setdefault(key, self.datasets[d].ids[i])
        close = difflib.get_close_matches(norm_name(name), list(pool), n=5, cutoff=0.6)
        ids = list(dict.fromkeys(pool[c] for c in close))
        hint = f"closest matches: {', '.join(ids)}" if ids else "run 'tablegen species' for the list"
        return f"unknown substance {name!r}; {hint}"

    def all_summaries(self) -> list[Summary]:
        """all_records() as summaries, without building a record (the species listing)."""
        seen, out = set(), []
        for d in self.search_order:
            for sid in self.datasets[d].ids:
                if sid in seen:
                    continue
                seen.add(sid)
                where = self._resolves_to(sid)
                if where is None:
                    out.append(_summary_of(self.record(sid)))
                    continue
                ds = self.datasets[where[0]]
                out.append(ds.summary(ds.exact[where[1]]))
        return out

    def all_records(self) -> list[Record]:
        """One record per species id, in the order a name would resolve."""
        seen, out = set(), []
        for d in self.search_order:
            for sid in self.datasets[d].ids:
                if sid not in seen:
                    seen.add(sid)
                    out.append(self.record(sid))
        return out


_LIB: dict = {}


def take_fallbacks() -> list[str]:
    """Notes on the species a requested data set did not hold, since the last call.

    ``--source nasa2002-air`` holds no argon, so air takes its Ar from Ar's default
    source; the command line prints these notes after a command succeeds, so that
    no table mixes data sets silently.
    """
    out = []
    for lib in _LIB.values():
        for (src, sid), got in lib.fallbacks.items():
            out.append(f"data set {src} holds no {sid}; {sid} was taken from {got} (its default source)")
        lib.fallbacks.clear()
    return list(dict.fromkeys(out))


def library(extra_paths=(), *, strict: bool = True) -> Library:
    """The process-wide library for a given list of --data paths, built once.

    strict=False (``tablegen species --check``) collects the refusals of user
    files in ``Library.load_errors`` instead of raising the first one.
    """
    key = (tuple(str(Path(p).resolve()) for p in extra_paths), strict)
    if key not in _LIB:
        lib = Library(extra_paths, strict=strict)
        _LIB[key] = lib
    return _LIB[key]
