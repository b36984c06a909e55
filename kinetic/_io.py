"""Atomic file writes: the one helper every save in kinetic uses.

:func:`atomic_write` writes the new bytes to a temporary file in the target's
own folder, flushes and fsyncs it, then renames it over the target with
``os.replace`` (atomic on POSIX and Windows within one file system), so a
reader sees either the old file or the new one, never half of either; a
crash, a full device or a kill leaves the original untouched.

* The temporary file is named ``.<target name>.<pid>.<random>.kinetic-tmp``
  (:data:`TEMP_SUFFIX`), so it is recognisable; an interrupted save (kill -9,
  power loss) leaves one behind, and the next save of the same target removes
  those whose writing process is gone (or that are older than
  :data:`STALE_AFTER_S`). Files of saves still running are left alone.
* The file is created with mode 0666 minus the user's umask (like any file a
  program creates), not 0600.
* A failure raises :class:`AtomicWriteError` (an ``OSError``) with one line
  naming the file and the reason ("No space left on device"), after removing
  its own temporary file.
"""
from __future__ import annotations

import errno
import os
import secrets
import time
from pathlib import Path

from .errors import KineticError

__all__ = ["STALE_AFTER_S", "TEMP_SUFFIX", "AtomicWriteError", "atomic_write", "temp_files_of"]

#: Ending of every temporary file of :func:`atomic_write`.
TEMP_SUFFIX = ".kinetic-tmp"
#: A temporary file older than this [s] is stale even if its process id is in use
#: (process ids are reused); no single save takes anywhere near this long.
STALE_AFTER_S = 3600.0


class AtomicWriteError(KineticError, OSError):
    """A file could not be written; the original (if any) is unchanged.

    ``str()`` is the one-line message (no "[Errno N]" prefix); ``errno`` is kept.
    """

    def __str__(self) -> str:
        return self.strerror if isinstance(self.strerror, str) else super().__str__()


def _prefix(path: Path) -> str:
    return f".{path.name}."


def temp_files_of(path) -> list:
    """Temporary files of earlier saves of ``path`` still lying in its folder (Paths)."""
    path = Path(path)
    folder = path.parent if str(path.parent) else Path(".")
    pre = _prefix(path)
    try:
        names = os.listdir(folder)
    except OSError:
        return []
    return [folder / n for n in names if n.startswith(pre) and n.endswith(TEMP_SUFFIX)]


def _alive(pid: int) -> bool:
    if pid == os.getpid():
        return True
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except (PermissionError, OSError):
        return True  # exists, owned by someone else (or cannot tell): leave it
    return True


def _remove_stale(path: Path) -> None:
    """Remove temporary files of earlier interrupted saves of ``path`` (not those of running saves)."""
    pre = _prefix(path)
    now = time.time()
    for tmp in temp_files_of(path):
        middle = tmp.name[len(pre):-len(TEMP_SUFFIX)]
        pid_text = middle.split(".", 1)[0]
        try:
            pid = int(pid_text)
        except ValueError:
            continue
        try:
            age = now - tmp.stat().st_mtime
        except OSError:
            continue
        if not _alive(pid) or age > STALE_AFTER_S:
            try:
                tmp.unlink()
            except OSError:
                pass


def _reason(exc: OSError) -> str:
    if exc.strerror:
        return exc.strerror
    if exc.errno == errno.ENOSPC:
        return "No space left on device"
    return str(exc)


def atomic_write(path, data) -> Path:
    """Write ``data`` (bytes, or str written as UTF-8) to ``path`` atomically.

    Parameters
    ----------
    path : str or os.PathLike
        The target file; its folder must exist.
    data : bytes or str

    Returns
    -------
    Path
        The target.

    Raises
    ------
    AtomicWriteError
        One line naming the file and the reason; the original file, if
        any, is unchanged and no temporary file is left behind.
    ParameterError
        ``data`` is neither bytes nor str.

    Examples
    --------
    >>> import tempfile, os
    >>> folder = tempfile.mkdtemp()
    >>> p = atomic_write(os.path.join(folder, "a.txt"), "hello\\n")
    >>> p.read_text()
    'hello\\n'
    >>> temp_files_of(p)
    []
    """
    from .errors import ParameterError

    if isinstance(data, str):
        data = data.encode("utf-8")
    elif isinstance(data, (bytearray, memoryview)):
        data = bytes(data)
    if not isinstance(data, bytes):
        raise ParameterError(f"data must be bytes or str, got {type(data).__name__}")
    path = Path(path)
    name = os.fspath(path)
    if path.is_dir():
        raise AtomicWriteError(errno.EISDIR, f"{name}: is a folder; give a file name to write")
    folder = path.parent if str(path.parent) else Path(".")
    _remove_stale(path)
    tmp = folder / f"{_prefix(path)}{os.getpid()}.{secrets.token_hex(4)}{TEMP_SUFFIX}"
    try:
        # O_EXCL: never reuse a file; mode 0o666 is reduced by the umask, as for any new file.
        fd = os.open(tmp, os.O_WRONLY | os.O_CREAT | os.O_EXCL | getattr(os, "O_BINARY", 0), 0o666)
    except OSError as exc:
        raise AtomicWriteError(exc.errno, f"{name}: cannot write ({_reason(exc)})") from None
    try:
        try:
            view = memoryview(data)
            while view:
                n = os.write(fd, view)
                view = view[n:]
            os.fsync(fd)
        finally:
            os.close(fd)
        os.replace(tmp, path)
    except BaseException as exc:
        try:
            os.unlink(tmp)
        except OSError:
            pass
        if isinstance(exc, OSError):
            raise AtomicWriteError(exc.errno, f"{name}: cannot write ({_reason(exc)}); "
                                              "the original file is unchanged") from None
        raise
    try:  # make the rename itself durable (POSIX); not possible or needed everywhere
        dfd = os.open(folder, os.O_RDONLY)
    except OSError:
        return path
    try:
        os.fsync(dfd)
    except OSError:
        pass
    finally:
        os.close(dfd)
    return path
