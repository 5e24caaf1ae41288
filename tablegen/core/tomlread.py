"""Reading TOML that users supply: size and nesting bounded before the parser sees it.

Python's TOML parser recurses once per level of nested arrays and inline tables, so
a file nested thousands deep would end in a RecursionError and pages of traceback;
a file of gigabytes would fill memory. Both are refused first, in one line naming the
file: at most :data:`MAX_DEPTH` levels (a book spec needs four) and
:data:`MAX_BYTES` bytes (a spec of 100 000 listed temperatures is about 1.5 MB).
"""

from __future__ import annotations

import os
import re
import tomllib
from pathlib import Path

from .errors import TablegenError

#: Largest TOML file read from a user (specs, chart specs, fuel and incompressible files).
MAX_BYTES = 4 << 20
#: Deepest nesting of arrays and inline tables accepted.
MAX_DEPTH = 16

_TOKEN = re.compile(r'"""|\'\'\'|["\'#\[\]{}]')
#: What ends a string or a comment, matched from just after its opening token.
_CLOSE = {
    '"""': re.compile(r'(?s)(?:[^"\\]|\\.|"(?!""))*"""'),
    "'''": re.compile(r"(?s).*?'{3}"),
    '"': re.compile(r'(?:[^"\\\n]|\\.)*"'),
    "'": re.compile(r"[^'\n]*'"),
    "#": re.compile(r"[^\n]*"),
}


def nesting_depth(text: str, stop_above: int = MAX_DEPTH) -> tuple[int, int]:
    """(deepest nesting of [ and { outside strings and comments, line where it is reached).

    Scanning stops as soon as the depth passes ``stop_above``. Table headers count while
    open ([[tables]] is 2); an unterminated string ends the scan (the parser reports it).
    """
    depth = deepest = 0
    line_at, i, n = 1, 0, len(text)
    while i < n:
        m = _TOKEN.search(text, i)
        if m is None:
            break
        t, i = m.group(), m.end()
        if t in _CLOSE:
            e = _CLOSE[t].match(text, i)
            i = e.end() if e else n
        elif t in "[{":
            depth += 1
            if depth > deepest:
                deepest, line_at = depth, text.count("\n", 0, m.start()) + 1
                if deepest > stop_above:
                    break
        else:
            depth = max(depth - 1, 0)
    return deepest, line_at


def loads(text: str, name: str, error=TablegenError) -> dict:
    """Parse TOML text after the nesting check; errors name the file."""
    depth, line = nesting_depth(text)
    if depth > MAX_DEPTH:
        raise error(f"{name}:{line}: arrays or inline tables nested more than {MAX_DEPTH} deep; "
                    f"at most {MAX_DEPTH} levels are allowed")
    try:
        return tomllib.loads(text)
    except tomllib.TOMLDecodeError as e:
        raise error(f"{name}: not valid TOML ({e})") from None


def read_text(path, name: str, error=TablegenError, *, missing: str = "no such file",
              max_bytes: int = MAX_BYTES, what: str = "TOML file") -> str:
    """A user's UTF-8 text file (a byte-order mark is fine), its size checked before reading."""
    p = Path(path)
    try:
        size = os.stat(p).st_size
    except FileNotFoundError:
        raise error(f"{name}: {missing}") from None
    except OSError as e:
        raise error(f"{name}: cannot be read ({e.strerror}); it must be a UTF-8 {what}") from None
    if size > max_bytes:
        raise error(f"{name}: {size} bytes; a {what} may have at most {max_bytes} bytes "
                    f"({max_bytes >> 20} MiB)")
    try:
        return p.read_text(encoding="utf-8-sig")
    except IsADirectoryError:
        raise error(f"{name}: is a folder; give the path of a {what}") from None
    except (OSError, UnicodeDecodeError) as e:
        raise error(f"{name}: cannot be read ({e}); it must be a UTF-8 {what}") from None


def read(path, name: str, error=TablegenError, *, missing: str = "no such file") -> dict:
    """A user's TOML file as a dict: size and nesting checked first, every problem one line."""
    return loads(read_text(path, name, error, missing=missing), name, error)
