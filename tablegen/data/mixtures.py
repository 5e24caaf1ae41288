"""The mixtures shipped in gasdata/mixtures.toml (air and others), by any of their names."""

from __future__ import annotations

import tomllib
from functools import lru_cache

from .library import library
from .records import norm_name


@lru_cache(maxsize=None)
def shipped_mixtures() -> dict:
    """Shipped mixtures from gasdata/mixtures.toml: normalised name -> raw entry."""
    lib = library()
    raw = tomllib.loads((lib.root / "mixtures.toml").read_text(encoding="utf-8"))
    out = {}
    for m in raw.get("mixture", []):
        for n in (m["id"], m.get("name", ""), *m.get("aliases", [])):
            if n:
                out.setdefault(norm_name(n), m)
    return out
