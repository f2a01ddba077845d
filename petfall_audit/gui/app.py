"""Start the desktop app: ``run_app(path)`` from the command line, ``main()`` as a GUI script."""

from __future__ import annotations

import sys
from pathlib import Path

from PySide6.QtCore import QCoreApplication, QEvent, QTimer
from PySide6.QtWidgets import QApplication

from petfall_audit.editing.document import Document
from petfall_audit.gui.dialogs import APP_TITLE
from petfall_audit.gui.main_window import MainWindow, blank_building
from petfall_audit.gui.qt_messages import qt_messages_routed
from petfall_audit.gui.views.common import stop_tasks
from petfall_audit.model import Building

__all__ = ["run_app", "main", "sample_document", "create_window", "close_window"]


def _sample_building() -> Building:
    try:
        from petfall_audit.demo import sample_building

        return sample_building("tower")
    except (ImportError, KeyError, OSError):
        return blank_building()


def sample_document() -> Document:
    """The invented sample tower, unsaved, to explore the app with."""
    return Document(_sample_building())


def create_window(path: Path | None = None) -> MainWindow:
    """A main window on the file at ``path``, or on the sample building."""
    window = MainWindow(sample_document())
    if path is not None and not window.session.open_file(Path(path), confirm=False):
        window.status_label.setText(f"Could not open {path}; showing the sample building")
    return window


def close_window(window: MainWindow) -> None:
    """Close ``window`` for good: its background work stopped and waited for (closing does
    that), then the window and its views deleted while the application still exists, so that
    nothing of Qt is left for the interpreter to tear down at exit."""
    if window.isVisible():  # the application quit without the window closing
        window.session.autosave_now()  # unsaved work stays recoverable
        window.hide()
    window.recomputer.shutdown()
    stop_tasks()
    window.deleteLater()
    QCoreApplication.sendPostedEvents(None, QEvent.Type.DeferredDelete)
    QCoreApplication.processEvents()


def run_app(path: Path | None = None) -> int:
    """Run the app on ``path`` (or the sample building) until its window closes; exit code.
    Qt's notes stay off the terminal while it runs (its errors do not: see
    :mod:`petfall_audit.gui.qt_messages`)."""
    with qt_messages_routed():
        return _run(path)


def _run(path: Path | None) -> int:
    app = QApplication.instance() or QApplication(sys.argv[:1])
    app.setApplicationName(APP_TITLE)
    app.setOrganizationName("petfall-audit")
    window = create_window(path)
    window.show()
    QTimer.singleShot(0, window.session.offer_recovery)
    code = int(app.exec())
    windows, pending = [], [window]
    while pending:  # the windows opened for recovered work, and the ones they opened
        w = pending.pop()
        windows.append(w)
        pending.extend(w.extra_windows)
    for w in windows:
        close_window(w)
    return code


def main() -> int:
    """Entry point of the ``petfall-audit-gui`` script: ``petfall-audit-gui [FILE]``."""
    args = sys.argv[1:]
    return run_app(Path(args[0]) if args else None)


if __name__ == "__main__":  # pragma: no cover
    raise SystemExit(main())
