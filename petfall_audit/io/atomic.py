"""Atomic file writes: a crash or a full disk never leaves a half-written file.

The text goes to a temporary file in the same folder, is flushed to disk (``fsync``) and then
renamed over the target with :func:`os.replace`, which is atomic on POSIX and Windows. Readers
see either the old file or the new one, never a mixture.
"""

from __future__ import annotations

import contextlib
import os
import secrets
from pathlib import Path

__all__ = ["atomic_write_text", "atomic_write_bytes"]


def atomic_write_bytes(path: str | Path, data: bytes) -> None:
    """Write ``data`` to ``path`` atomically; on any failure the old file stays and no temporary
    file is left behind. A new file gets the usual permissions (0o666 less the umask); an
    existing file keeps its permission bits."""
    target = Path(path)
    folder = target.parent
    tmp = folder / f".{target.name}.{secrets.token_hex(6)}.tmp"
    fd = os.open(tmp, os.O_WRONLY | os.O_CREAT | os.O_EXCL | getattr(os, "O_BINARY", 0), 0o666)
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
