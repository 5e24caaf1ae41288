"""Writing an output folder as one set, never half-visible.

* :func:`publish_folder` -- a book, the demo books, a QA comparison: a folder that holds one
  issue. Every file of the set and a manifest (``tablegen-issue.sha256``: SHA-256 and name of
  each file, what the issue is) are written into a hidden staging folder beside the
  destination (same parent, so the same file system) and fsynced; then one
  ``renameat2(RENAME_EXCHANGE)`` swaps the staging folder and the destination, so the
  destination holds the complete old set or the complete new set at every moment. An
  advisory lock file beside it (``.NAME.tablegen-lock``) lets one run at a time publish
  there; staging left by a killed run is removed by the next run, which says so. Only a
  folder tablegen owns is replaced: one that is empty, or holds nothing but the files of an
  earlier issue (named in its manifest) or of this one. A folder with any other file is
  refused, so a swap never moves, hides or deletes a user's file.

Single files are written by tablegen.core.filewrite, and both use the OS layer of
tablegen.core.oswrite.

Every OS fault (no space, read-only, permission denied, name too long, a file where a
folder is needed) becomes one :class:`OutputError` naming the path and the cause, and
Ctrl-C or a termination signal becomes :class:`Interrupted` saying what was left.
DEVELOPERS.md ("Writing files") and docs/spec.md ("How a book folder is published") tell
the whole design.
"""

from __future__ import annotations

import contextlib
import errno
import os
import re
import stat
import sys
from pathlib import Path

from .errors import OutputBusyError, OutputExistsError, TablegenError, Terminated
from .oswrite import (WRITTEN, fault, fsync_dir, interrupted, show_path, signals_held, unlink_quietly,
                      write_new)

#: The manifest of a published folder; ``sha256sum -c tablegen-issue.sha256`` checks a copy.
MANIFEST = "tablegen-issue.sha256"
MANIFEST_HEAD = "# tablegen-issue/1"
#: Files a file browser leaves in a folder; they go with the folder's old issue.
LITTER = frozenset({".DS_Store", "Thumbs.db", "desktop.ini"})
_MANIFEST_LINE = re.compile(r"^([0-9a-f]{64})  ([^/\\\x00-\x1f]+)$")
_MANIFEST_MAX_BYTES = 1 << 20


def _count(n: int, word: str) -> str:
    return f"{n} {word}{'' if n == 1 else 's'}"


# ---------------------------------------------------------------- the swap
def _remove_tree(path: Path) -> None:
    import shutil
    shutil.rmtree(path)


class _NoExchange(Exception):
    """The platform or file system cannot swap two folders in one step."""


_RENAME_EXCHANGE = 2
_libc = None


def _exchange(a: Path, b: Path) -> None:
    """Swap two folders atomically: Linux renameat2(2) with RENAME_EXCHANGE (3.15 and later)."""
    global _libc
    if not sys.platform.startswith("linux"):
        raise _NoExchange
    import ctypes
    if _libc is None:
        _libc = ctypes.CDLL(None, use_errno=True)
    fn = getattr(_libc, "renameat2", None)      # glibc 2.28 and later, musl 1.2.5
    if fn is None:
        raise _NoExchange
    at_fdcwd = -100
    if fn(at_fdcwd, os.fsencode(a), at_fdcwd, os.fsencode(b), _RENAME_EXCHANGE) == 0:
        return
    err = ctypes.get_errno()
    if err in (errno.EINVAL, errno.ENOSYS, errno.ENOTSUP, errno.EOPNOTSUPP):
        raise _NoExchange
    raise OSError(err, os.strerror(err), str(b))


# ---------------------------------------------------------------- the lock
try:
    import fcntl
except ImportError:          # Windows
    fcntl = None


def _try_lock(fd: int) -> bool:
    if fcntl is not None:
        try:
            fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
            return True
        except BlockingIOError:
            return False
    import msvcrt
    try:
        msvcrt.locking(fd, msvcrt.LK_NBLCK, 1)
        return True
    except OSError:
        return False


class Lock:
    """An advisory lock on one output folder: ``.NAME.tablegen-lock`` in its parent.

    The kernel releases the lock when its process ends, however it ends, so a lock left
    by a killed run never blocks: the next run takes it (and the file's text, the dead
    holder's process id, says who left it). The holder deletes the file on release.
    """

    def __init__(self, dest: Path):
        self.dest = dest
        self.path = dest.parent / f".{dest.name}.tablegen-lock"
        self.fd = None
        self.previous = ""        # text of a lock file left by a run that ended without releasing it

    def __enter__(self):
        for _ in range(100):
            try:
                fd = os.open(self.path, os.O_RDWR | os.O_CREAT, 0o666)
            except OSError as e:
                raise fault(e, self.path, f"the lock beside {show_path(self.dest)}/; nothing was written") from None
            try:
                locked = _try_lock(fd)
            except BaseException:
                os.close(fd)
                raise
            if not locked:
                holder = _read_text(fd)
                os.close(fd)
                who = f"process {holder}" if holder else "another process"
                raise OutputBusyError(f"{show_path(self.dest)}/ is being written by another tablegen run ({who}); "
                                      f"wait for it to finish, or choose another --out folder")
            try:           # the file may have been released and deleted between open and lock
                same = os.path.samestat(os.fstat(fd), os.stat(self.path))
            except FileNotFoundError:
                same = False
            if same:
                break
            os.close(fd)
        else:  # pragma: no cover - a hundred releases in a row between open and lock
            raise OutputBusyError(f"{show_path(self.dest)}/ is being written by other tablegen runs; try again")
        self.fd = fd
        try:
            self.previous = _read_text(fd)
            with contextlib.suppress(OSError):      # who holds it: for the messages of other runs only
                import platform
                os.ftruncate(fd, 0)
                os.lseek(fd, 0, os.SEEK_SET)
                os.write(fd, f"{os.getpid()} on {platform.node()}\n".encode())
        except BaseException:
            self.__exit__()
            raise
        return self

    def __exit__(self, *exc):
        if os.name != "nt":            # Windows cannot delete an open file; the next run reuses it
            unlink_quietly(self.path)
        os.close(self.fd)
        self.fd = None
        return False


def _read_text(fd: int) -> str:
    try:
        os.lseek(fd, 0, os.SEEK_SET)
        return os.read(fd, 200).decode("utf-8", "replace").strip()
    except OSError:
        return ""


# ---------------------------------------------------------------- the folder
def manifest(files: dict, about=()) -> bytes:
    """The manifest of a set: comment lines, then ``<sha256>  <name>`` per file in name order."""
    import hashlib

    from .. import __version__
    head = [f"{MANIFEST_HEAD}: the files of one issue, published together as one set by tablegen {__version__}"]
    head += [f"# {' '.join(str(a).split())}" for a in about]
    head.append(f"# check a copy with: sha256sum -c {MANIFEST}")
    body = [f"{hashlib.sha256(files[n]).hexdigest()}  {n}" for n in sorted(files)]
    return ("\n".join(head + body) + "\n").encode("utf-8")


def read_manifest(folder: Path) -> tuple[dict, list[str]] | None:
    """({name: sha256}, comment lines) of a folder's manifest, or None if it has none tablegen wrote."""
    try:
        with open(folder / MANIFEST, "rb") as f:
            raw = f.read(_MANIFEST_MAX_BYTES + 1)
    except (FileNotFoundError, IsADirectoryError, NotADirectoryError):
        return None
    if len(raw) > _MANIFEST_MAX_BYTES:
        return None
    try:
        lines = raw.decode("utf-8").splitlines()
    except UnicodeDecodeError:
        return None
    if not lines or not lines[0].startswith(MANIFEST_HEAD):
        return None
    names, notes = {}, []
    for ln in lines[1:]:
        if ln.startswith("#"):
            notes.append(ln[1:].strip())
            continue
        m = _MANIFEST_LINE.match(ln)
        if not m or m.group(2) in (".", ".."):
            return None
        names[m.group(2)] = m.group(1)
    return names, notes


def _real(dest) -> Path:
    p = Path(os.path.realpath(os.path.abspath(os.fspath(dest))))
    return p


def _refuse_location(dest: Path, what: str):
    above = dest.parent
    while not os.path.lexists(above) and above.parent != above:
        above = above.parent
    if not os.path.isdir(above):
        raise OutputExistsError(f"{show_path(above)} is a file; give --out a path inside a folder")
    if dest.parent == dest or os.path.ismount(dest):
        raise OutputExistsError(f"{dest} is the top of a drive; a {what} is published by renaming a folder "
                                f"inside it: give --out a folder within it, e.g. {dest / 'NAME'}")
    cwd = Path(os.path.realpath(os.getcwd()))
    if cwd == dest or dest in cwd.parents:
        raise OutputExistsError(f"{show_path(dest)}/ is the folder you are working in (or holds it); a {what} "
                                f"folder is replaced as a whole: run tablegen from outside it")


def _foreign(folder: Path, allowed) -> list[str]:
    """Entries of folder that may not be replaced: not allowed by name, or not a plain file."""
    out = []
    for e in sorted(os.listdir(folder)):
        if e in LITTER:
            continue
        p = folder / e
        if e not in allowed or p.is_symlink() or not p.is_file():
            out.append(e)
    return out


def _allowed(folder: Path, names) -> set:
    found = read_manifest(folder)
    return (set(found[0]) if found else set()) | set(names) | {MANIFEST}


def _foreign_message(dest: Path, foreign, what: str) -> str:
    return (f"{show_path(dest)}/ holds {_count(len(foreign), 'file')} that tablegen did not publish there "
            f"(first: {foreign[0]}); a {what} folder is replaced as a whole, so it must be new, empty or "
            f"hold only an earlier issue: move them out or choose another --out folder")


def _inspect(dest: Path, names, force: bool, what: str) -> bool:
    """Whether dest holds an issue to be replaced; refuse whatever may not be replaced.

    Returns False for a folder that does not exist or is empty (but for a file browser's
    litter), True for one that holds only the files of an earlier issue or of this set.
    """
    try:
        st = os.lstat(dest)
    except FileNotFoundError:
        return False
    except OSError as e:
        raise fault(e, dest, "nothing was written") from None
    if not stat.S_ISDIR(st.st_mode):
        raise OutputExistsError(f"{show_path(dest)} is a file, not a folder; a {what} is written into a folder: "
                                f"give --out the path of a folder")
    try:
        content = [e for e in sorted(os.listdir(dest)) if e not in LITTER]
        if not content:
            return False
        found = read_manifest(dest)
        foreign = _foreign(dest, _allowed(dest, names))
    except OSError as e:
        raise fault(e, dest, "nothing was written") from None
    if foreign:
        raise OutputExistsError(_foreign_message(dest, foreign, what))
    if not force:
        issue = next((n[len("issue: "):] for n in (found[1] if found else []) if n.startswith("issue: ")), "")
        issue = re.sub(r"(fingerprint [0-9a-f]{16})[0-9a-f]+", r"\1…", issue)
        if issue:
            raise OutputExistsError(f"{show_path(dest)}/ holds an earlier issue ({issue}); pass --force to replace "
                                    f"it with this one, or choose another --out folder")
        listed = [e for e in content if e != MANIFEST] or content
        raise OutputExistsError(f"{_count(len(listed), 'file')} of the {what} already exist in {show_path(dest)}/ "
                                f"(first: {listed[0]}); pass --force to replace them, or choose another "
                                f"--out folder")
    return True


def check_folder(dest, names, *, force: bool, what: str = "book") -> None:
    """Refuse early (before anything is computed) what :func:`publish_folder` would refuse."""
    dest = _real(dest)
    _check_names(names)
    _refuse_location(dest, what)
    _inspect(dest, names, force, what)


def _check_names(names) -> None:
    for n in names:
        if n in (MANIFEST, ".", "..") or "/" in n or "\\" in n or n in LITTER or not n:
            raise TablegenError(f"{n!r} cannot be the name of a file of a set; a set holds plain names, "
                                f"and {MANIFEST} is its manifest")


_STALE = r"\.{}\.tablegen-(stage|old)-[0-9a-f]{{8}}"


def _clean_stale(dest: Path, previous_holder: str) -> list[str]:
    """Remove what a killed run left beside dest; put back an issue a fallback swap had moved aside."""
    pat = re.compile(_STALE.format(re.escape(dest.name)))
    removed, restored = [], False
    for entry in sorted(os.listdir(dest.parent)):
        m = pat.fullmatch(entry)
        if not m:
            continue
        path = dest.parent / entry
        if m.group(1) == "old" and not os.path.lexists(dest):
            os.rename(path, dest)
            restored = True
            continue
        _remove_tree(path)
        removed.append(entry)
    if not (removed or restored):
        return []
    who = f" (process {previous_holder})" if previous_holder else ""
    did = []
    if restored:
        did.append(f"put back the previous issue of {show_path(dest)}/ that it had moved aside")
    if removed:
        did.append(f"removed its {'staging folder' if len(removed) == 1 else f'{len(removed)} staging folders'} "
                   f"{', '.join(removed)}")
    return [f"note: an earlier run into {show_path(dest)}/ was interrupted{who}; " + " and ".join(did)]


def publish_folder(dest, files: dict, *, force: bool, about=(), what: str = "book") -> list[str]:
    """Publish ``{name: bytes}`` as the one set in folder dest; returns notes to print.

    Parameters
    ----------
    dest : the folder (created with its parents if missing)
    files : plain file names -> contents
    force : replace an earlier issue (without it only a new or empty folder is written)
    about : one-line texts for the manifest; the first one that starts with ``issue: ``
        names the issue in later refusals
    what : "book", "comparison", ... for messages

    Raises
    ------
    OutputExistsError, OutputBusyError, OutputError (exit 2) and Interrupted (130, 143),
    each one line; after any of them dest holds what it held before, or, for a fault after
    the swap (a failing fsync of the parent folder), the complete new set.
    """
    dest = _real(dest)
    files = {n: (d.encode("utf-8") if isinstance(d, str) else bytes(d)) for n, d in files.items()}
    _check_names(files)
    _refuse_location(dest, what)
    state = {"published": False}
    try:
        notes = _publish(dest, files, force, about, what, state)
    except (KeyboardInterrupt, Terminated) as e:
        shown = show_path(dest)
        raise interrupted(e, f"{shown}/ holds the new issue, complete" if state["published"]
                           else f"nothing was published; {shown}/ is as it was") from None
    WRITTEN.extend(dest / n for n in sorted([*files, MANIFEST]))
    return notes


def _publish(dest: Path, files: dict, force: bool, about, what: str, state: dict) -> list[str]:
    shown = show_path(dest)
    try:
        dest.parent.mkdir(parents=True, exist_ok=True)
    except OSError as e:
        raise fault(e, dest.parent, "nothing was written") from None
    notes = []
    with Lock(dest) as lock:
        try:
            notes += _clean_stale(dest, lock.previous)
        except OSError as e:
            raise fault(e, dest.parent, f"while removing what an interrupted run left beside {shown}/; "
                                        f"nothing was written") from None
        had = _inspect(dest, files, force, what)
        stage = dest.parent / f".{dest.name}.tablegen-stage-{os.urandom(4).hex()}"
        leftover, current = None, None
        try:
            try:
                os.mkdir(stage)
                for name in [*sorted(files), MANIFEST]:
                    current = name            # a fault names the file as the user will find it
                    write_new(stage / name, files[name] if name in files else manifest(files, about))
                current = None
                if had:
                    os.chmod(stage, stat.S_IMODE(os.stat(dest).st_mode))
                fsync_dir(stage)
                allowed = _allowed(dest, files) if had else set()
                with signals_held():
                    leftover = _swap(stage, dest, had)
                    state["published"] = True
                    if leftover is not None:
                        # a file saved into dest while this run staged its set must not go with the old issue
                        foreign = _foreign(leftover, allowed)
                        if foreign:
                            _swap_back(leftover, dest, stage)
                            leftover, state["published"] = None, False
                            raise OutputExistsError(_foreign_message(dest, foreign, what))
            except OSError as e:
                raise fault(e, dest / current if current else dest, f"nothing was published; {shown}/ is as it was",
                            this_path=current is not None) from None
            try:
                fsync_dir(dest.parent)
            except OSError as e:
                raise fault(e, dest.parent, f"{shown}/ holds the new issue, but the disk did not confirm "
                                            f"it is stored: check the drive") from None
        finally:
            if not state["published"]:
                with contextlib.suppress(OSError):
                    if os.path.isdir(stage):
                        _remove_tree(stage)
            elif leftover is not None:
                try:
                    _remove_tree(leftover)
                except OSError as e:
                    notes.append(f"note: could not remove the previous issue from {show_path(leftover)} "
                                 f"({e.strerror}); the next run into {shown}/ removes it")
    return notes


def _swap(stage: Path, dest: Path, had: bool) -> Path | None:
    """Make the staged set the folder dest in one step; the path of the old set to delete, if any."""
    if not had:
        for e in LITTER:
            unlink_quietly(dest / e)
        try:
            os.rename(stage, dest)        # POSIX: replaces a missing or empty folder in one step
            return None
        except OSError:
            if not (os.name == "nt" and os.path.isdir(dest)):
                raise
            os.rmdir(dest)
            os.rename(stage, dest)
            return None
    try:
        _exchange(stage, dest)
        return stage                      # now holds the old issue
    except _NoExchange:
        pass
    # No atomic exchange here (some network drives, macOS, Windows): move the old issue
    # aside, then the new one in. A run killed between the two renames leaves the old
    # issue in .NAME.tablegen-old-*, which the next run puts back.
    old = dest.parent / f".{dest.name}.tablegen-old-{stage.name[-8:]}"
    os.rename(dest, old)
    try:
        os.rename(stage, dest)
    except BaseException:
        os.rename(old, dest)
        raise
    return old


def _swap_back(old: Path, dest: Path, stage: Path) -> None:
    """Undo :func:`_swap`: the old issue back in dest, the new one back in stage."""
    if old == stage:
        _exchange(stage, dest)
        return
    os.rename(dest, stage)
    os.rename(old, dest)


