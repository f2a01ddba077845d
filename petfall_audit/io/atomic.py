"""Atomic file writes: a crash or a full disk never leaves a half-written file.

The text goes to a temporary file in the same folder, is flushed to disk (``fsync``) and then
renamed over the target with :func:`os.replace`, which is atomic on POSIX and Windows. Readers
see either the old file or the new one, never a mixture.
"""

from __future__ import annotations

import contextlib
import errno
import os
import secrets
from pathlib import Path

__all__ = ["atomic_write_text", "atomic_write_bytes", "check_writable_path"]


def atomic_write_bytes(path: str | Path, data: bytes) -> None:
    """Write ``data`` to ``path`` atomically; on any failure the old file stays and no temporary
    file is left behind. A new file gets the usual permissions (0o666 less the umask); an
    existing file keeps its permission bits.

    Errors name ``path``, never the temporary file: ``FileNotFoundError`` when its folder does
    not exist, ``IsADirectoryError`` when ``path`` is a folder, the system's ``OSError``
    otherwise (for example ``PermissionError`` for a read-only folder)."""
    target = Path(path)
    folder = target.parent
    check_writable_path(target)
    tmp = folder / f".{target.name}.{secrets.token_hex(6)}.tmp"
    try:
        fd = os.open(tmp, os.O_WRONLY | os.O_CREAT | os.O_EXCL | getattr(os, "O_BINARY", 0),
                     0o666)
    except OSError as exc:
        raise type(exc)(exc.errno, exc.strerror, str(target)) from None
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(data)
            fh.flush()
            os.fsync(fh.fileno())
        with contextlib.suppress(FileNotFoundError):
            os.chmod(tmp, os.stat(target).st_mode & 0o7777)
        os.replace(tmp, target)
    except BaseException:
        with contextlib.suppress(OSError):
            os.unlink(tmp)
        raise
    _fsync_folder(folder)


def check_writable_path(path: str | Path) -> None:
    """Raise a clear ``OSError`` naming ``path`` if no file can be written there: its folder is
    missing (``FileNotFoundError``) or a file (``NotADirectoryError``), or ``path`` is a folder
    (``IsADirectoryError``). Write permission is left to the write itself."""
    target = Path(path)
    folder = target.parent
    if target.is_dir():
        raise IsADirectoryError(errno.EISDIR, "is a folder, not a file name", str(target))
    if folder.exists() and not folder.is_dir():
        raise NotADirectoryError(errno.ENOTDIR, f"'{folder}' is a file, not a folder", str(target))
    if not folder.is_dir():
        raise FileNotFoundError(errno.ENOENT, f"the folder '{folder}' does not exist", str(target))


def atomic_write_text(path: str | Path, text: str, *, encoding: str = "utf-8") -> None:
    """Write ``text`` to ``path`` atomically (encoded with ``encoding``, newlines as given)."""
    atomic_write_bytes(path, text.encode(encoding))


def _fsync_folder(folder: Path) -> None:
    """Make the rename itself durable where the platform allows it (POSIX); best effort."""
    if os.name != "posix":  # pragma: no cover - Windows cannot open a folder for fsync
        return
    try:
        fd = os.open(folder, os.O_RDONLY)
    except OSError:  # pragma: no cover
        return
    try:
        os.fsync(fd)
    except OSError:  # pragma: no cover
        pass
    finally:
        os.close(fd)
