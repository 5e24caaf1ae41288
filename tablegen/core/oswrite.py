"""The operating-system side of writing output: new files fsynced, folder syncs, signals held
for a few calls, and one line for every OS fault.

Shared by the two ways to write (tablegen.core.outfiles, a folder published as one set;
tablegen.core.filewrite, single files); DEVELOPERS.md ("Writing files") tells the design.
"""

from __future__ import annotations

import contextlib
import errno
import os
import signal
import threading
from pathlib import Path

from .errors import Interrupted, OutputError, Terminated

#: Paths written by this process's last command, for the message after an interruption.
WRITTEN: list = []
_HINTS = {
    errno.ENOSPC: "free space there or choose another --out",
    errno.EROFS: "the file system is read-only; choose another --out",
    errno.EACCES: "choose an --out you may write to",
    errno.EPERM: "choose an --out you may write to",
    errno.ENAMETOOLONG: "choose a shorter --out path",
    errno.ENOTDIR: "a part of the path is a file; choose another --out",
    errno.EISDIR: "a folder stands where a file goes; choose another --out",
    errno.EXDEV: "choose an --out folder inside a folder on the same drive",
}
if hasattr(errno, "EDQUOT"):
    _HINTS[errno.EDQUOT] = "your disk quota is used up; free space or choose another --out"


# ---------------------------------------------------------------- messages
def fault(e: OSError, path, state: str = "", *, this_path: bool = False) -> OutputError:
    """One line for an OS error: the path (the error's own unless this_path), the cause, what was left, what to do."""
    cause = e.strerror or str(e)
    own = None if this_path else getattr(e, "filename", None)
    where = show_path(Path(os.fsdecode(own))) if own else show_path(Path(path))
    hint = _HINTS.get(e.errno, "choose another --out")
    return OutputError(f"cannot write {where}: {cause}" + (f" ({state})" if state else "") + f"; {hint}")


def interrupted(e: BaseException, state: str) -> Interrupted:
    status = e.exit_status if isinstance(e, Terminated) else 130
    word = "terminated" if isinstance(e, Terminated) else "interrupted"
    return Interrupted(f"{word}; {state}", status)


def show_path(p: Path) -> str:
    """A path as the messages print it: relative to the working folder where it lies below it."""
    try:
        rel = os.path.relpath(p)
    except ValueError:          # another drive (Windows)
        return str(p)
    return str(p) if rel.startswith("..") else rel


# ---------------------------------------------------------------- low-level writing
def write_new(path: Path, data: bytes) -> None:
    """Create path (it must not exist), write data, fsync; mode 0666 less the umask; removed on failure."""
    fd = os.open(path, os.O_WRONLY | os.O_CREAT | os.O_EXCL | getattr(os, "O_BINARY", 0), 0o666)
    try:
        try:
            view = memoryview(data)
            while view:
                n = os.write(fd, view)
                view = view[n:]
            os.fsync(fd)
        finally:
            os.close(fd)
    except BaseException:
        unlink_quietly(path)
        raise


def fsync_dir(path: Path) -> None:
    """Make a rename in this folder durable (POSIX; Windows has no folder handles to sync)."""
    if os.name == "nt":
        return
    fd = os.open(path, os.O_RDONLY)
    try:
        os.fsync(fd)
    except OSError as e:
        if e.errno not in (errno.EINVAL, errno.ENOTSUP, errno.EOPNOTSUPP):   # cannot sync a folder there
            raise
    finally:
        os.close(fd)


def unlink_quietly(path: Path) -> None:
    with contextlib.suppress(OSError):
        os.unlink(path)


@contextlib.contextmanager
def signals_held():
    """Hold Ctrl-C and termination signals for a few system calls, so a run knows what it did.

    The handlers are swapped for one that notes the signal, and the signal is raised again
    once the block is done (main thread only: Python runs signal handlers there).
    """
    if threading.current_thread() is not threading.main_thread():
        yield
        return
    got, saved = [], {}
    for name in ("SIGINT", "SIGTERM", "SIGHUP"):
        sig = getattr(signal, name, None)
        if sig is not None and signal.getsignal(sig) is not None:
            saved[sig] = signal.signal(sig, lambda n, frame: got.append(n))
    try:
        yield
    finally:
        for sig, handler in saved.items():
            signal.signal(sig, handler)
        if got:
            signal.raise_signal(got[0])


