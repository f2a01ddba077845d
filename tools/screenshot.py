"""Render the main window and every result view of a building to PNG files, offscreen.

Usage::

    python tools/screenshot.py OUTDIR [BUILDING_FILE] [--size 1366x768] [--scale 1]

Without a building file the invented sample tower is used. Writes ``main-window.png`` and one
``view-<name>.png`` per view (the window at the given size with that view's tab shown and the
editors hidden, as with View > Show results only; the facade view once per facade), and prints
the paths. The pictures show the full assessment (the quick one is refined first). ``--scale 2``
renders as on a high-DPI screen.
"""

from __future__ import annotations

import argparse
import os
import sys
from pathlib import Path

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
sys.path.insert(0, str(Path(__file__).resolve().parents[1]))


def _slug(text: str) -> str:
    return "".join(c if c.isalnum() else "-" for c in text.lower()).strip("-")


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("outdir", type=Path)
    parser.add_argument("building", type=Path, nargs="?")
    parser.add_argument("--size", default="1366x768", help="window size WxH in pixels")
    parser.add_argument("--scale", default="1", help="device pixel ratio (2 for high DPI)")
    parser.add_argument("--select", default=None,
                        help="opening id to select (default: the worst one)")
    args = parser.parse_args(argv)
    os.environ["QT_SCALE_FACTOR"] = str(args.scale)
    home = args.outdir / ".settings"
    os.environ.setdefault("PETFALL_AUDIT_HOME", str(home))  # never touch the user's settings

    from PySide6.QtCore import QEventLoop, QTimer
    from PySide6.QtWidgets import QApplication

    from petfall_audit.editing.document import Document
    from petfall_audit.gui.app import close_window, sample_document
    from petfall_audit.gui.main_window import MainWindow
    from petfall_audit.gui.views import VIEW_NAMES
    from petfall_audit.gui.views.common import wait_for_tasks

    app = QApplication.instance() or QApplication(sys.argv[:1])
    app.setApplicationName("petfall-audit screenshots")
    width, height = (int(v) for v in args.size.lower().split("x"))
    if args.building is not None:
        from petfall_audit.io.building_file import load_building

        doc = Document(load_building(args.building), args.building)
    else:
        doc = sample_document()
    window = MainWindow(doc)
    views = window.views
    window.resize(width, height)
    window.show()

    def pump(ms: int = 150) -> None:
        loop = QEventLoop()
        QTimer.singleShot(ms, loop.quit)
        loop.exec()

    for _ in range(200):  # wait for the full results (at most about 30 s)
        pump(150)
        if (not window.results_stale and views.context.assessment is not None
                and window.results_samples == window.recomputer.final_samples):
            break
    a = views.context.assessment
    if a is None:
        print("no results: cannot render the views", file=sys.stderr)
        return 1
    chosen = args.select or (a.ranked()[0].id if a.openings else None)
    if chosen:
        views.context.select([chosen])
    for _ in range(100):
        pump(100)
        wait_for_tasks(100)
        if views.plan.plan is not None and views.plan.curve is not None:
            break
    pump(200)

    args.outdir.mkdir(parents=True, exist_ok=True)
    written: list[Path] = []

    def grab(name: str) -> None:
        pump(150)
        path = args.outdir / f"{name}.png"
        window.grab().save(str(path))
        written.append(path)

    window.view_tabs.setCurrentWidget(views.ranked)
    grab("main-window")
    results_only = next(a for a in views.view_actions if a.objectName() == "results_only")
    results_only.setChecked(True)  # the views as with View > Show results only
    for name in VIEW_NAMES:
        widget = views.widget(name)
        window.view_tabs.setCurrentWidget(widget)
        if widget is views.facade:
            for i in range(views.facade.facade_box.count()):
                views.facade.facade_box.setCurrentIndex(i)
                views.facade.fit_if_auto()
                grab(f"view-facade-{_slug(str(views.facade.facade_box.itemData(i)))}")
        else:
            if widget is views.sensitivity and a.openings:
                # it computes once it is shown (large buildings) and after the other views' work
                for _ in range(300):
                    pump(100)
                    if views.sensitivity.section is not None:
                        break
            grab(f"view-{_slug(name)}")
    for path in written:
        print(path)
    window.document.dirty = False  # nothing to save: close without asking
    window.close()
    close_window(window)
    return 0


def _main_quietly() -> int:
    """:func:`main` with Qt's notes (platform plugin, fonts) kept off the terminal."""
    from petfall_audit.gui.qt_messages import qt_messages_routed

    with qt_messages_routed():
        return main()


if __name__ == "__main__":
    raise SystemExit(_main_quietly())
