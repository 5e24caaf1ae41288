"""Gasdata files as data sets: the TOML files, parsed lazily record by record, and the
two card formats of the NASA reports (tablegen.data.formats), told from the content."""

from __future__ import annotations

import re
import tomllib
from functools import cached_property
from pathlib import Path

from ..core.errors import DataError, NameLookupError
from ..core.tomlread import MAX_DEPTH, nesting_depth, read_text
from . import former_names
from . import formats
from .records import P_STD_PA, AtomicWeights, Record, Summary, build_record, norm_name, summary_of

#: Largest user data file read (a NASA thermo file of every species is about 2 MB).
MAX_DATA_BYTES = 32 << 20


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
            return summary_of(self._cache[i])
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
            return summary_of(self._parse(i))      # builds it, or names what is wrong

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
        return summary_of(self._parse(i))     # user files are built and validated on load

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


