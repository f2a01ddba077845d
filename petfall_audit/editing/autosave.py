"""Recovery copies: unsaved work written in the background, offered again after a crash. No Qt.

Each window keeps one copy of its unsaved work in ``<settings folder>/recovery/``:
``<file key>.<slot>.json`` is an ordinary building file and ``<file key>.<slot>.meta.json`` says
which file it belongs to, when it was written and which running app wrote it. The file key comes
from the building file's path (``untitled`` for a building never saved), the slot from the window,
so copies of different files, or of two windows, never overwrite each other.

A running app holds a lock on ``<owner>.lock`` for as long as it runs; the operating system drops
the lock when the process ends, however it ends, so a copy whose owner's lock can be taken was
left by an app that is gone (a reused process id cannot hide it). Only such copies are offered,
each on its own; a copy is deleted only when the user has decided about it, or by the window that
wrote it once its work is saved or discarded.

When to write: :class:`AutosaveSchedule` waits for a short pause in editing but never longer than
``max_wait_s`` after the first unsaved edit, so steady editing is written too.
The settings folder is ``$PETFALL_AUDIT_HOME`` if set, else the per-user configuration folder of
the platform.
"""

from __future__ import annotations

import atexit
import hashlib
import json
import os
import sys
import time
import uuid
from dataclasses import dataclass
from pathlib import Path
from typing import IO

from petfall_audit.model import Building

__all__ = [
    "HOME_ENV",
    "IDLE_DELAY_S",
    "MAX_WAIT_S",
    "settings_dir",
    "recovery_dir",
    "owner_token",
    "file_key",
    "Recovery",
    "RecoveryCopy",
    "AutosaveSchedule",
    "write_recovery",
    "find_recoveries",
    "load_recovery",
    "discard_recovery",
]

HOME_ENV = "PETFALL_AUDIT_HOME"
_APP = "petfall-audit"
#: Pause in editing (s) after which the recovery copy is written.
IDLE_DELAY_S = 0.3
#: Longest wait (s) after the first unsaved edit, however steady the editing.
MAX_WAIT_S = 0.8


def settings_dir() -> Path:
    """Folder for settings and recovery files (created if missing)."""
    env = os.environ.get(HOME_ENV)
    if env:
        folder = Path(env)
    elif sys.platform == "win32":
        folder = Path(os.environ.get("APPDATA") or Path.home() / "AppData" / "Roaming") / _APP
    elif sys.platform == "darwin":
        folder = Path.home() / "Library" / "Application Support" / _APP
    else:
        folder = Path(os.environ.get("XDG_CONFIG_HOME") or Path.home() / ".config") / _APP
    folder.mkdir(parents=True, exist_ok=True)
    return folder


def recovery_dir() -> Path:
    """Folder of the recovery files (created if missing)."""
    folder = settings_dir() / "recovery"
    folder.mkdir(parents=True, exist_ok=True)
    return folder


class AutosaveSchedule:
    """When to write the recovery copy: ``idle_s`` after the last edit, but no later than
    ``max_wait_s`` after the first edit not yet written. Times are seconds on any clock."""

    def __init__(self, idle_s: float = IDLE_DELAY_S, max_wait_s: float = MAX_WAIT_S) -> None:
        if idle_s < 0 or max_wait_s < 0:
            raise ValueError("autosave delays must not be negative")
        self.idle_s = idle_s
        self.max_wait_s = max(max_wait_s, idle_s)
        self._first_unwritten: float | None = None

    @property
    def pending(self) -> bool:
        """True while an edit is waiting to be written."""
        return self._first_unwritten is not None

    def edited(self, now: float) -> float:
        """Note an edit at ``now``; returns the delay (s) from ``now`` to the next write."""
        if self._first_unwritten is None:
            self._first_unwritten = now
        deadline = min(now + self.idle_s, self._first_unwritten + self.max_wait_s)
        return max(0.0, deadline - now)

    def written(self) -> None:
        """The copy was written (or there is nothing left to write)."""
        self._first_unwritten = None


@dataclass(frozen=True, slots=True)
class Recovery:
    """A recovery copy found on disk: the building file, which file it belongs to, when it was
    written, and the process and app that wrote it."""

    path: Path
    source_path: Path | None
    saved_at: float  # seconds since the epoch
    pid: int
    owner: str = ""
    building_name: str = ""

    @property
    def saved_at_text(self) -> str:
        """Local time it was written, ``YYYY-MM-DD HH:MM``."""
        return time.strftime("%Y-%m-%d %H:%M", time.localtime(self.saved_at))


def _meta_path(path: Path) -> Path:
    return path.with_name(path.stem + ".meta.json")


# --- the running app's lock --------------------------------------------------------------------

_owner: tuple[str, IO[bytes]] | None = None


def _lock(handle: IO[bytes]) -> bool:
    """Take an exclusive lock on an open file without waiting; True if taken."""
    try:
        if sys.platform == "win32":  # pragma: no cover - exercised on Windows only
            import msvcrt

            msvcrt.locking(handle.fileno(), msvcrt.LK_NBLCK, 1)
        else:
            import fcntl

            fcntl.flock(handle.fileno(), fcntl.LOCK_EX | fcntl.LOCK_NB)
    except OSError:
        return False
    return True


def owner_token() -> str:
    """This app's token; the first call creates ``<token>.lock`` and holds its lock until the
    process ends."""
    global _owner
    if _owner is None:
        token = uuid.uuid4().hex[:16]
        handle = open(recovery_dir() / f"{token}.lock", "wb")  # noqa: SIM115 - held open
        _lock(handle)
        atexit.register(handle.close)  # the lock goes with the process in any case
        _owner = (token, handle)
    return _owner[0]


def _owner_running(owner: str, pid: int) -> bool:
    """True if the app ``owner`` (process ``pid``) still runs."""
    if _owner is not None and owner == _owner[0]:
        return True
    if not owner:  # a copy without an owner token: only the process id tells, if known
        return pid > 0 and _alive(pid)
    lock = recovery_dir() / f"{owner}.lock"
    try:
        handle = open(lock, "rb+")  # noqa: SIM115 - closed below
    except FileNotFoundError:
        return False
    except OSError:
        return True  # cannot tell: do not offer (or delete) another app's work
    with handle:
        return not _lock(handle)


def _alive(pid: int) -> bool:
    if pid == os.getpid():
        return True
    if sys.platform == "win32":  # no cheap check without extra packages: treat as ended
        return False
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except PermissionError:
        return True
    except OSError:
        return False
    return True


# --- writing, finding, discarding ---------------------------------------------------------------


def file_key(source_path: Path | None) -> str:
    """The part of a recovery copy's name that says which file it belongs to: a short hash of the
    file's absolute path, or ``untitled``."""
    if source_path is None:
        return "untitled"
    text = str(Path(source_path).expanduser().absolute())
    return hashlib.sha256(text.encode("utf-8", "surrogatepass")).hexdigest()[:16]


def write_recovery(building: Building, source_path: Path | None, *, slot: str | None = None,
                   owner: str | None = None) -> Path:
    """Write ``building`` as the recovery copy of ``source_path`` in window ``slot`` (default:
    a new slot), atomically, owned by ``owner`` (default: this app); returns its path."""
    from petfall_audit.io.atomic import atomic_write_text
    from petfall_audit.io.building_file import dumps_building

    owner = owner_token() if owner is None else owner
    slot = slot or uuid.uuid4().hex[:12]
    path = recovery_dir() / f"{file_key(source_path)}.{slot}.json"
    atomic_write_text(path, dumps_building(building))
    meta = {
        "source_path": str(source_path) if source_path is not None else None,
        "saved_at": time.time(),
        "pid": os.getpid(),
        "owner": owner,
        "building_name": building.info.name,
    }
    atomic_write_text(_meta_path(path), json.dumps(meta, indent=2))
    return path


def _read(path: Path) -> Recovery | None:
    try:
        meta = json.loads(_meta_path(path).read_text("utf-8"))
        if not isinstance(meta, dict):
            raise TypeError("not an object")
        source = meta.get("source_path")
        return Recovery(path=path, source_path=Path(source) if source else None,
                        saved_at=float(meta.get("saved_at", path.stat().st_mtime)),
                        pid=int(meta.get("pid", 0)), owner=str(meta.get("owner", "")),
                        building_name=str(meta.get("building_name", "")))
    except (OSError, ValueError, TypeError, AttributeError):
        try:  # the note is missing or damaged: the copy is still offered
            pid = int(path.stem) if path.stem.isdigit() else 0
            return Recovery(path=path, source_path=None, saved_at=path.stat().st_mtime, pid=pid)
        except OSError:
            return None


def find_recoveries(*, include_running: bool = False) -> list[Recovery]:
    """Recovery copies left by apps that ended (with ``include_running``, every copy), newest
    first. Lock files of ended apps are swept."""
    found = []
    for path in recovery_dir().glob("*.json"):
        if path.name.endswith(".meta.json"):
            continue
        rec = _read(path)
        if rec is None:
            continue
        if not include_running and _owner_running(rec.owner, rec.pid):
            continue
        found.append(rec)
    found.sort(key=lambda r: r.saved_at, reverse=True)
    _sweep_locks()
    return found


def _sweep_locks() -> None:
    """Delete the lock files of apps that ended (their copies still read as ended)."""
    own = _owner[0] if _owner is not None else None
    for lock in recovery_dir().glob("*.lock"):
        token = lock.stem
        if token == own or _owner_running(token, 0):
            continue
        try:
            lock.unlink()
        except OSError:
            pass


def load_recovery(recovery: Recovery) -> Building:
    """The building saved in a recovery copy."""
    from petfall_audit.io.building_file import load_building

    return load_building(recovery.path)


def discard_recovery(recovery: Recovery | Path) -> None:
    """Delete one recovery copy and its note (nothing else)."""
    path = recovery.path if isinstance(recovery, Recovery) else Path(recovery)
    for p in (path, _meta_path(path)):
        try:
            p.unlink()
        except FileNotFoundError:
            pass


class RecoveryCopy:
    """One window's recovery copy: written for the file the window shows, replaced when it
    shows another, deleted when its work is saved or discarded. Never touches other copies."""

    def __init__(self) -> None:
        self.slot = uuid.uuid4().hex[:12]
        self.path: Path | None = None

    def write(self, building: Building, source_path: Path | None) -> Path:
        """Write the copy of ``building`` (the unsaved state of ``source_path``)."""
        path = write_recovery(building, source_path, slot=self.slot)
        if self.path is not None and self.path != path:  # the window moved to another file
            discard_recovery(self.path)
        self.path = path
        return path

    def discard(self) -> None:
        """Delete this window's copy, if it wrote one."""
        if self.path is not None:
            discard_recovery(self.path)
            self.path = None
