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

The files are read by tablegen.data.datasets and each record is built by
tablegen.data.records; this module holds the library of all of them.
"""

from __future__ import annotations

import difflib
import os
import tomllib
from pathlib import Path

from ..core.errors import DataError, NameLookupError
from . import formats
from .datasets import Dataset, open_dataset
from .records import AtomicWeights, Record, Summary, norm_name, summary_of

#: Files in gasdata/ that are not coefficient sets.
NOT_DATASETS = {"atomic-weights.toml", "mixtures.toml", "defaults.toml", "agreement.toml",
                "critical.toml", "incompressible.toml", "uncertainty.toml", "codata1989.toml",
                "agreement-janaf.toml"}


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
            ds.names     # building the names refuses duplicate ids here
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
                    out.append(summary_of(self.record(sid)))
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
