"""Atomic file writes: a crash or a full disk never leaves a half-written file.

The text goes to a temporary file in the same folder, is flushed to disk (``fsync``) and then
renamed over the target with :func:`os.replace`, which is atomic on POSIX and Windows. Readers
see either the old file or the new one, never a mixture.

- Saving through a symbolic link writes the file it points to; the link stays.
- The temporary file is readable by its owner only while it is written (mode 0o600); the final
  file gets the old file's permissions, or the usual ones (0o666 less the umask) when new.
- A temporary file left by a crash (``.<name>.<12 hex digits>.tmp`` beside the file, older than
  :data:`STALE_TEMP_S`) is removed at the next save of that file.
- Every error names the file being written, never the temporary file.

:class:`FileStamp` and :func:`changed_since` tell whether a file changed on disk since it was
read, so that a program can ask before it overwrites someone else's save.
"""

from __future__ import annotations

import contextlib
import errno
import hashlib
import os
import re
import secrets
import threading
import time
from dataclasses import dataclass
from pathlib import Path

__all__ = ["atomic_write_text", "atomic_write_bytes", "check_writable_path", "same_file",
           "file_key",
           "FileStamp",
           "file_stamp", "changed_since", "STALE_TEMP_S"]

#: A temporary file of a save older than this (seconds) is a leftover of a crash.
STALE_TEMP_S = 15 * 60

_umask_lock = threading.Lock()


def _umask() -> int:
    with _umask_lock:
        mask = os.umask(0o022)
        os.umask(mask)
    return mask


def _target_of(path: Path) -> Path:
    """The file a save to ``path`` writes: the end of its chain of links, if it is one."""
    if path.is_symlink():
        return Path(os.path.realpath(path))
    return path


def _sweep_leftovers(folder: Path, name: str) -> None:
    """Remove stale temporary files of earlier saves of ``name`` in ``folder`` (best effort)."""
    pattern = re.compile(rf"^\.{re.escape(name)}\.[0-9a-f]{{12}}\.tmp$")
    now = time.time()
    with contextlib.suppress(OSError):
        for entry in os.scandir(folder):
            if not pattern.match(entry.name):
                continue
            with contextlib.suppress(OSError):
                st = entry.stat(follow_symlinks=False)
                if entry.is_file(follow_symlinks=False) and now - st.st_mtime > STALE_TEMP_S:
                    os.unlink(entry.path)


def atomic_write_bytes(path: str | Path, data: bytes) -> None:
    """Write ``data`` to ``path`` atomically; on any failure the old file stays and no temporary
    file is left behind. A new file gets the usual permissions (0o666 less the umask); an
    existing file keeps its permission bits. A symbolic link is followed: its target is
    written.

    Errors name ``path``, never the temporary file: ``FileNotFoundError`` when its folder does
    not exist, ``IsADirectoryError`` when ``path`` is a folder, ``PermissionError`` for a
    folder that cannot be written, the system's ``OSError`` otherwise (for example
    ``errno.ENOSPC`` for a full disk)."""
    shown = str(path)
    check_writable_path(path)
    target = _target_of(Path(path))
    folder = target.parent
    _sweep_leftovers(folder, target.name)
    tmp = folder / f".{target.name}.{secrets.token_hex(6)}.tmp"
    try:
        fd = os.open(tmp, os.O_WRONLY | os.O_CREAT | os.O_EXCL | getattr(os, "O_BINARY", 0),
                     0o600)
    except OSError as exc:
        raise type(exc)(exc.errno, exc.strerror, shown) from None
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(data)
            fh.flush()
            os.fsync(fh.fileno())
        try:
            mode = os.stat(target).st_mode & 0o7777
        except FileNotFoundError:
            mode = 0o666 & ~_umask()
        os.chmod(tmp, mode)
        os.replace(tmp, target)
    except BaseException as exc:
        with contextlib.suppress(OSError):
            os.unlink(tmp)
        if isinstance(exc, OSError) and exc.errno is not None:
            raise type(exc)(exc.errno, exc.strerror or str(exc), shown) from None
        raise
    _fsync_folder(folder)


def file_key(path: str | Path) -> object:
    """What names one file however it is spelt or linked: its device and inode when it exists,
    else its resolved path (a file not written yet)."""
    try:
        st = os.stat(path)
    except OSError:
        return str(Path(path).resolve())
    return (st.st_dev, st.st_ino)


def same_file(a: str | Path, b: str | Path) -> bool:
    """Whether paths ``a`` and ``b`` name one file (:func:`file_key`), so that an output is
    never written over an input."""
    return file_key(a) == file_key(b)


def check_writable_path(path: str | Path) -> None:
    """Raise a clear ``OSError`` naming ``path`` if no file can be written there: its folder is
    missing (``FileNotFoundError``) or a file (``NotADirectoryError``), ``path`` is a folder
    (``IsADirectoryError``), or the folder cannot be written (``PermissionError``). Checked
    before any long work, so that it never ends in "cannot write"."""
    target = _target_of(Path(path))
    folder = target.parent
    if target.is_dir():
        raise IsADirectoryError(errno.EISDIR, "is a folder, not a file name", str(path))
    if folder.exists() and not folder.is_dir():
        raise NotADirectoryError(errno.ENOTDIR, f"'{folder}' is a file, not a folder", str(path))
    if not folder.is_dir():
        raise FileNotFoundError(errno.ENOENT, f"the folder '{folder}' does not exist", str(path))
    if not os.access(folder, os.W_OK | os.X_OK):
        raise PermissionError(errno.EACCES, f"the folder '{folder}' cannot be written",
                              str(path))
    probe = folder / f".{target.name}.{secrets.token_hex(6)}.tmp"
    try:  # access() says yes to an administrator even on a read-only disk: try for real
        os.close(os.open(probe, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o600))
    except OSError as exc:
        raise PermissionError(errno.EACCES,
                              f"the folder '{folder}' cannot be written ({exc.strerror})",
                              str(path)) from None
    with contextlib.suppress(OSError):
        os.unlink(probe)


def atomic_write_text(path: str | Path, text: str, *, encoding: str = "utf-8") -> None:
    """Write ``text`` to ``path`` atomically (encoded with ``encoding``, newlines as given)."""
    atomic_write_bytes(path, text.encode(encoding))


@dataclass(frozen=True, slots=True)
class FileStamp:
    """What a file was when it was read: its size (bytes), modification time (ns) and the
    SHA-256 of its content."""

    size: int
    mtime_ns: int
    sha256: str


def file_stamp(path: str | Path) -> FileStamp | None:
    """The stamp of the file at ``path`` now; ``None`` if there is none (or it cannot be
    read)."""
    try:
        target = _target_of(Path(path))
        st = os.stat(target)
        digest = hashlib.sha256()
        with open(target, "rb") as fh:
            for block in iter(lambda: fh.read(1 << 20), b""):
                digest.update(block)
    except OSError:
        return None
    return FileStamp(st.st_size, st.st_mtime_ns, digest.hexdigest())


def changed_since(path: str | Path, stamp: FileStamp | None) -> bool:
    """True when the file at ``path`` is not the one ``stamp`` recorded: written (with other
    content), created or removed since. A file touched but with the same content has not
    changed."""
    now = file_stamp(path)
    if now is None or stamp is None:
        return (now is None) != (stamp is None)
    return now.sha256 != stamp.sha256


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
