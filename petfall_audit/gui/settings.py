"""Settings that persist between sessions, in an INI file inside the settings folder.

The folder is :func:`petfall_audit.editing.autosave.settings_dir` (``$PETFALL_AUDIT_HOME`` in
tests), so tests never touch a user's settings.
"""

from __future__ import annotations

from pathlib import Path

from PySide6.QtCore import QByteArray, QObject, QSettings, Signal

from petfall_audit.editing.autosave import settings_dir
from petfall_audit.palette import DEFAULT_PALETTE, palette_names

__all__ = ["AppSettings", "CONTACT_FIELDS", "MAX_RECENT"]

MAX_RECENT = 8
#: Contact block printed on tenant leaflets: key and label.
CONTACT_FIELDS: tuple[tuple[str, str], ...] = (
    ("organisation", "Organisation"),
    ("person", "Contact person"),
    ("phone", "Phone"),
    ("email", "Email"),
    ("website", "Website"),
    ("note", "Note for tenants"),
)


class AppSettings(QObject):
    """Typed access to the app's settings; ``changed(key)`` after each change."""

    changed = Signal(str)

    def __init__(self, path: Path | None = None, parent: QObject | None = None) -> None:
        super().__init__(parent)
        self.path = path or settings_dir() / "settings.ini"
        self._q = QSettings(str(self.path), QSettings.Format.IniFormat)

    def sync(self) -> None:
        """Write pending changes to disk."""
        self._q.sync()

    # --- display ---------------------------------------------------------------------------------

    @property
    def units(self) -> str:
        """``"metric"`` or ``"imperial"``."""
        value = str(self._q.value("display/units", "metric"))
        return value if value in ("metric", "imperial") else "metric"

    @units.setter
    def units(self, value: str) -> None:
        if value not in ("metric", "imperial"):
            raise ValueError(f"units must be 'metric' or 'imperial', got {value!r}")
        if value != self.units:
            self._q.setValue("display/units", value)
            self.changed.emit("units")

    @property
    def palette(self) -> str:
        """Name of the band palette (see ``resources/palette.json``)."""
        value = str(self._q.value("display/palette", DEFAULT_PALETTE))
        return value if value in palette_names() else DEFAULT_PALETTE

    @palette.setter
    def palette(self, value: str) -> None:
        if value not in palette_names():
            raise ValueError(f"palette must be one of {palette_names()}, got {value!r}")
        if value != self.palette:
            self._q.setValue("display/palette", value)
            self.changed.emit("palette")

    # --- recent files ----------------------------------------------------------------------------

    def recent_files(self) -> list[Path]:
        """Recently opened or saved files, newest first."""
        value = self._q.value("files/recent", [])
        if isinstance(value, str):
            value = [value] if value else []
        if not isinstance(value, list):
            return []
        return [Path(str(v)) for v in value]

    def add_recent(self, path: Path) -> None:
        """Put ``path`` first in the recent files."""
        path = Path(path).resolve()
        items = [p for p in self.recent_files() if p != path]
        items.insert(0, path)
        self._q.setValue("files/recent", [str(p) for p in items[:MAX_RECENT]])
        self.changed.emit("recent")

    def clear_recent(self) -> None:
        self._q.setValue("files/recent", [])
        self.changed.emit("recent")

    # --- leaflet contact block --------------------------------------------------------------------

    def contact(self) -> dict[str, str]:
        """The contact block for tenant leaflets (every key of :data:`CONTACT_FIELDS`)."""
        return {key: str(self._q.value(f"contact/{key}", "")) for key, _ in CONTACT_FIELDS}

    def set_contact(self, values: dict[str, str]) -> None:
        for key, _ in CONTACT_FIELDS:
            self._q.setValue(f"contact/{key}", values.get(key, ""))
        self.changed.emit("contact")

    # --- window -----------------------------------------------------------------------------------

    def window_state(self) -> tuple[QByteArray | None, QByteArray | None]:
        """Saved geometry and dock/toolbar state of the main window, if any."""
        geometry = self._q.value("window/geometry")
        state = self._q.value("window/state")
        return (geometry if isinstance(geometry, QByteArray) else None,
                state if isinstance(state, QByteArray) else None)

    def set_window_state(self, geometry: QByteArray, state: QByteArray) -> None:
        self._q.setValue("window/geometry", geometry)
        self._q.setValue("window/state", state)

    def splitter_state(self) -> QByteArray | None:
        """The saved split between the editors and the result views, if any."""
        value = self._q.value("window/splitter")
        return value if isinstance(value, QByteArray) else None

    def set_splitter_state(self, state: QByteArray) -> None:
        self._q.setValue("window/splitter", state)
