"""The shipped agreement figures compiled into one compact JSON file, read by every budget.

gasdata/agreement.toml and agreement-janaf.toml (about 780 kB of TOML, some 2,900 rows)
are the sources, reviewed and diffed as text; parsing the TOML cost a book's first budget
tens of milliseconds. ``tools/compile_agreement.py`` writes
gasdata/agreement-compiled.json from them: the SHA-256 of each source, the row keys
once, and per species its rows as lists in that key order (null where a row has no such
key). It is read only while each source's SHA-256 matches, so a stale file is never
used (the TOML is read instead), and tests/test_curation.py fails when it is stale.
"""

from __future__ import annotations

import hashlib
import json
from functools import lru_cache
from pathlib import Path

from ..core.errors import DataError

#: The compiled file, beside its sources in gasdata/.
COMPILED = "agreement-compiled.json"


def compile_rows(sources: dict) -> dict:
    """The compiled form of ``sources`` ({file name: (bytes, rows)}, in reading order)."""
    keys = sorted({k for _, rows in sources.values() for r in rows for k in r if k != "species"})
    by_species: dict = {}
    for _, rows in sources.values():
        for r in rows:
            by_species.setdefault(r["species"], []).append([r.get(k) for k in keys])
    return {"about": "compiled from the files of 'sources' by tools/compile_agreement.py; do not edit",
            "sources": {name: hashlib.sha256(data).hexdigest() for name, (data, _) in sources.items()},
            "keys": keys, "rows": by_species}


def to_bytes(compiled: dict) -> bytes:
    """The file's bytes: sorted keys, one line, so the same sources give the same file."""
    return (json.dumps(compiled, sort_keys=True, separators=(",", ":"), ensure_ascii=False) + "\n").encode()


@lru_cache(maxsize=1)
def load(folder: str, names: tuple) -> dict | None:
    """The compiled file in ``folder`` as read (see :func:`rows_of`), or None if it is missing
    or was compiled from other bytes of the sources ``names`` than those there now."""
    p = Path(folder) / COMPILED
    try:
        compiled = json.loads(p.read_bytes())
    except FileNotFoundError:
        return None
    except (OSError, ValueError) as e:
        raise DataError(f"{p}: cannot read the compiled agreement figures ({e}); allowed: a file "
                        f"written by tools/compile_agreement.py, or none") from None
    for name in names:
        src = Path(folder) / name
        want = compiled.get("sources", {}).get(name)
        if src.is_file() != (want is not None):
            return None
        if want is not None and hashlib.sha256(src.read_bytes()).hexdigest() != want:
            return None
    return compiled


def rows_of(compiled: dict, species: str) -> list:
    """The rows of one species as the TOML files give them (dicts, absent keys left out)."""
    keys = compiled["keys"]
    return [{"species": species, **{k: v for k, v in zip(keys, row) if v is not None}}
            for row in compiled["rows"].get(species, ())]
