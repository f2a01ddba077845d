"""The desktop app (PySide6). The only package that imports Qt.

Start it with :func:`petfall_audit.gui.app.run_app`; the window is
:class:`petfall_audit.gui.main_window.MainWindow`.
"""
