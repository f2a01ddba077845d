"""The recovery file: unsaved work written in the background, offered again after a crash. No Qt.

Files live in ``<settings folder>/recovery/``: ``<pid>.json`` is an ordinary building file and
``<pid>.meta.json`` says which file it belongs to and when it was written. The settings folder is
``$PETFALL_AUDIT_HOME`` if set, else the per-user configuration folder of the platform. A recovery
file whose process is still running belongs to another open window and is not offered.
"""

from __future__ import annotations

import json
import os
import sys
import time
from dataclasses import dataclass
from pathlib import Path

from petfall_audit.model import Building

__all__ = [
    "HOME_ENV",
    "settings_dir",
    "recovery_dir",
    "Recovery",
    "write_recovery",
    "find_recoveries",
    "load_recovery",
    "discard_recovery",
]

HOME_ENV = "PETFALL_AUDIT_HOME"
_APP = "petfall-audit"


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


@dataclass(frozen=True, slots=True)
class Recovery:
    """A recovery file found on disk: the building file, which file it belongs to, when written."""

    path: Path
    source_path: Path | None
    saved_at: float  # seconds since the epoch
    pid: int

    @property
    def saved_at_text(self) -> str:
        """Local time it was written, ``YYYY-MM-DD HH:MM``."""
        return time.strftime("%Y-%m-%d %H:%M", time.localtime(self.saved_at))


def _meta_path(path: Path) -> Path:
    return path.with_name(path.stem + ".meta.json")


def write_recovery(building: Building, source_path: Path | None, *, pid: int | None = None) -> Path:
    """Write ``building`` to this process's recovery file, atomically; returns its path."""
    from petfall_audit.io.atomic import atomic_write_text
    from petfall_audit.io.building_file import dumps_building

    pid = os.getpid() if pid is None else pid
    path = recovery_dir() / f"{pid}.json"
    atomic_write_text(path, dumps_building(building))
    meta = {
        "source_path": str(source_path) if source_path is not None else None,
        "saved_at": time.time(),
        "pid": pid,
        "building_name": building.info.name,
    }
    atomic_write_text(_meta_path(path), json.dumps(meta, indent=2))
    return path


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


def find_recoveries(*, include_running: bool = False) -> list[Recovery]:
    """Recovery files left by processes that ended (newest first)."""
    found = []
    for path in recovery_dir().glob("*.json"):
        if path.name.endswith(".meta.json"):
            continue
        try:
            meta = json.loads(_meta_path(path).read_text("utf-8"))
            pid = int(meta.get("pid", path.stem))
            saved_at = float(meta.get("saved_at", path.stat().st_mtime))
            source = meta.get("source_path")
        except (OSError, ValueError, TypeError, AttributeError):
            try:
                pid, saved_at, source = int(path.stem), path.stat().st_mtime, None
            except (OSError, ValueError):
                continue
        if not include_running and _alive(pid):
            continue
        found.append(Recovery(path=path, source_path=Path(source) if source else None,
                              saved_at=saved_at, pid=pid))
    found.sort(key=lambda r: r.saved_at, reverse=True)
    return found


def load_recovery(recovery: Recovery) -> Building:
    """The building saved in a recovery file."""
    from petfall_audit.io.building_file import load_building

    return load_building(recovery.path)


def discard_recovery(recovery: Recovery | None = None) -> None:
    """Delete a recovery file (default: this process's own)."""
    path = recovery.path if recovery is not None else recovery_dir() / f"{os.getpid()}.json"
    for p in (path, _meta_path(path)):
        try:
            p.unlink()
        except FileNotFoundError:
            pass
