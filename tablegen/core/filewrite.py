"""Writing single output files: charts, exported and fitted records, never half-visible.

Each file is written under a hidden temporary name in its folder, fsynced and renamed into
place; without --force a file that appears meanwhile is never replaced (a hard link places
the new file). A folder published as one set is tablegen.core.outfiles.
"""

from __future__ import annotations

import errno
import os
from pathlib import Path

from .errors import OutputExistsError, Terminated
from .oswrite import WRITTEN, fault, fsync_dir, interrupted, signals_held, unlink_quietly, write_new

def check_files(paths, force: bool) -> None:
    """Refuse before writing anything: a folder where a file goes, or a file that exists without force."""
    paths = [Path(p) for p in paths]
    for p in paths:
        if p.is_dir():
            raise OutputExistsError(f"{p} is a folder; give the path of a file, e.g. {p / 'NAME'}")
        if p.parent.exists() and not p.parent.is_dir():
            raise OutputExistsError(f"{p.parent} is a file; give a path inside a folder")
    existing = [p for p in paths if os.path.lexists(p)]
    if existing and not force:
        raise OutputExistsError(_exists(existing))


def _exists(existing) -> str:
    if len(existing) == 1:
        return f"{existing[0]} already exists; pass --force to replace it, or choose another --out"
    return (f"{len(existing)} files already exist (first: {existing[0]}); pass --force to replace them, "
            f"or choose another --out")


def write_files(files: dict, force: bool) -> list[Path]:
    """Write ``{path: bytes or str}``, each under a temporary name and renamed; all checked first.

    On any fault or interruption every temporary file is removed and, without force,
    every file this call had already placed; with force a file already replaced stays
    replaced (each file is complete either way).
    """
    data = {Path(p): (d.encode("utf-8") if isinstance(d, str) else bytes(d)) for p, d in files.items()}
    check_files(data, force)
    temps, placed, current, done = {}, [], None, False
    try:
        try:
            for p in data:
                current = p
                p.parent.mkdir(parents=True, exist_ok=True)
                tmp = p.parent / f".{p.name}.tablegen-part-{os.urandom(4).hex()}"
                write_new(tmp, data[p])
                temps[p] = tmp
            for p in data:
                current = p
                with signals_held():
                    if force:
                        os.replace(temps[p], p)
                    else:
                        _place_new(temps[p], p)
                    placed.append(p)
                    del temps[p]
            for d in dict.fromkeys(p.parent for p in data):
                fsync_dir(d)
            done = True
        finally:
            if not done:
                for t in temps.values():
                    unlink_quietly(t)
                if not force:
                    for p in placed:
                        unlink_quietly(p)
    except OSError as e:
        left = "files already replaced stay replaced" if force and placed else "no file was written"
        raise fault(e, current, left, this_path=e.errno not in (errno.ENOTDIR, errno.EEXIST)) from None
    except (KeyboardInterrupt, Terminated) as e:
        left = "files already replaced stay replaced" if force and placed else "no file was written"
        raise interrupted(e, left) from None
    WRITTEN.extend(data)
    return list(data)


def _place_new(tmp: Path, path: Path) -> None:
    """Rename tmp to path unless path exists, even if it appears meanwhile (a hard link)."""
    try:
        os.link(tmp, path)
    except FileExistsError:
        raise OutputExistsError(_exists([path])) from None
    except OSError as e:
        if e.errno not in (errno.EPERM, errno.ENOTSUP, errno.EOPNOTSUPP, errno.EMLINK, errno.ENOSYS):
            raise
        if os.path.lexists(path):          # no hard links on this file system (FAT, some shares)
            raise OutputExistsError(_exists([path])) from None
        os.rename(tmp, path)
        return
    os.unlink(tmp)


def write_bytes(path, data: bytes) -> None:
    """Write one file (replacing it) through a temporary name, fsync and rename."""
    write_files({path: data}, force=True)
