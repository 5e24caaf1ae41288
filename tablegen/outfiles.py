"""Writing output files safely: all-or-nothing, never over a user's file.

Every command that writes files first plans all of them, checks that none
exists (unless --force), then writes each one to a temporary name in the same
folder and renames it into place, so an interrupted run leaves no half-written
file behind.
"""

from __future__ import annotations

import os
import tempfile
from pathlib import Path

from .errors import OutputExistsError, TablegenError


def check_targets(paths, force: bool) -> None:
    """Refuse before writing anything if a target exists and force is off."""
    existing = [str(p) for p in paths if Path(p).exists()]
    if existing and not force:
        more = f" and {len(existing) - 1} more" if len(existing) > 1 else ""
        raise OutputExistsError(f"{existing[0]}{more} already exists; pass --force to overwrite, "
                                f"or choose another --out folder")
    for p in paths:
        if Path(p).is_dir():
            raise OutputExistsError(f"{p} is a folder; a file of that name cannot be written")


def write_bytes(path, data: bytes) -> None:
    """Write data to path through a temporary file and an atomic rename."""
    path = Path(path)
    try:
        path.parent.mkdir(parents=True, exist_ok=True)
    except OSError as e:
        raise TablegenError(f"cannot create folder {path.parent}: {e.strerror}") from None
    fd, tmp = tempfile.mkstemp(prefix=f".{path.name}.", suffix=".part", dir=path.parent)
    try:
        with os.fdopen(fd, "wb") as f:
            f.write(data)
        os.chmod(tmp, 0o666 & ~_umask())   # mkstemp makes 0600; give the usual mode
        os.replace(tmp, path)
    except BaseException:
        try:
            os.unlink(tmp)
        except FileNotFoundError:
            pass
        raise


def _umask() -> int:
    mask = os.umask(0)
    os.umask(mask)
    return mask


def write_text(path, text: str) -> None:
    write_bytes(path, text.encode("utf-8"))


def write_all(files: dict, force: bool) -> list[Path]:
    """Write {path: bytes or str} after checking every target first."""
    paths = [Path(p) for p in files]
    check_targets(paths, force)
    for p, data in files.items():
        write_bytes(p, data.encode("utf-8") if isinstance(data, str) else data)
    return paths
