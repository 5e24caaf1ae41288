"""JSON output shared by every command and document: plain data, sorted keys.

numpy scalars become Python numbers, non-finite numbers become null (JSON has
no NaN), keys are sorted and UTF-8 characters kept, so the same data always
gives the same bytes.
"""

from __future__ import annotations

import json
import math


def clean(v):
    """JSON-ready copy: numpy scalars to Python numbers, NaN and infinities to None."""
    if isinstance(v, dict):
        return {str(k): clean(x) for k, x in v.items()}
    if isinstance(v, (list, tuple)):
        return [clean(x) for x in v]
    if hasattr(v, "item") and not isinstance(v, (str, bytes)):
        v = v.item()
    if isinstance(v, float) and not math.isfinite(v):
        return None
    return v


def dumps(obj) -> str:
    """Two-space indented, sorted-key JSON text ending in a newline."""
    return json.dumps(clean(obj), indent=2, sort_keys=True, ensure_ascii=False) + "\n"
