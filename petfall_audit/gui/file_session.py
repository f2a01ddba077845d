"""The thin Qt part of a window's file session (:mod:`petfall_audit.editing.session`): the
questions asked with the window's dialogs, the timer that writes the recovery copy, and the
File ▸ Open recent menu."""

from __future__ import annotations

import time
from collections.abc import Callable
from pathlib import Path

from PySide6.QtCore import QObject, QTimer
from PySide6.QtWidgets import QMenu, QWidget

from petfall_audit.editing.autosave import Recovery
from petfall_audit.editing.document import MODEL_KINDS, Document
from petfall_audit.editing.session import FileSession
from petfall_audit.gui.dialogs import Prompts
from petfall_audit.gui.settings import AppSettings

__all__ = ["DialogPrompts", "AutosaveTimer", "fill_recent_menu"]


class DialogPrompts:
    """A file session's questions, asked with ``prompts`` over ``parent``."""

    def __init__(self, prompts: Prompts, parent: QWidget) -> None:
        self.prompts = prompts
        self.parent = parent

    def ask_save_changes(self, name: str) -> str:
        return self.prompts.ask_save_changes(self.parent, name)

    def ask_overwrite_changed(self, name: str) -> bool:
        return self.prompts.ask_overwrite_changed(self.parent, name)

    def ask_recover(self, recovery: Recovery) -> bool:
        return self.prompts.ask_recover(self.parent, recovery)

    def open_path(self, folder: Path | None) -> Path | None:
        return self.prompts.open_path(self.parent, folder)

    def save_path(self, suggested: Path) -> Path | None:
        return self.prompts.save_path(self.parent, suggested)

    def show_error(self, title: str, text: str) -> None:
        self.prompts.show_error(self.parent, title, text)


class AutosaveTimer(QObject):
    """Writes ``session``'s recovery copy when its schedule says, after each model change of
    the document it shows; forgets the copy once the work is saved."""

    def __init__(self, session: FileSession, parent: QObject | None = None) -> None:
        super().__init__(parent)
        self.session = session
        self.timer = QTimer(self)
        self.timer.setSingleShot(True)
        self.timer.timeout.connect(self.session.autosave_now)
        self._disconnect: Callable[[], None] = lambda: None
        session.workspace.loaded.connect(self._follow)
        self._follow(session.document)

    def _follow(self, doc: Document) -> None:
        self._disconnect()
        self._disconnect = doc.on_changed("*", self._on_changed)

    def _on_changed(self, kind: str) -> None:
        if kind in MODEL_KINDS:
            self.timer.start(int(self.session.edited(time.monotonic()) * 1000))
        elif kind == "dirty" and not self.session.document.dirty:
            self.timer.stop()
            self.session.all_saved()

    def write_now(self) -> Path | None:
        self.timer.stop()
        return self.session.autosave_now()

    def stop(self) -> None:
        self.timer.stop()
        self._disconnect()


def fill_recent_menu(menu: QMenu, settings: AppSettings,
                     open_file: Callable[[Path], object]) -> None:
    """Fill File ▸ Open recent with the remembered files (``open_file(path)`` on a choice)."""
    menu.clear()
    recent = settings.recent_files()
    for path in recent:
        action = menu.addAction(str(path))
        action.triggered.connect(lambda _c=False, p=path: open_file(p))
    if not recent:
        menu.addAction("(none yet)").setEnabled(False)
    else:
        menu.addSeparator()
        menu.addAction("Clear list", settings.clear_recent)
