"""The window's actions, menus and shortcuts: :func:`create_actions` returns them by name
(:class:`Actions`, its menus in :class:`Menus`), so nothing is ever looked up by its text."""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, field
from typing import TYPE_CHECKING

from PySide6.QtGui import QAction, QActionGroup, QKeySequence
from PySide6.QtWidgets import QMainWindow, QMenu

from petfall_audit.palette import palette_label, palette_names

__all__ = ["Actions", "Menus", "create_actions"]

if TYPE_CHECKING:
    from petfall_audit.gui.main_window import MainWindow

SK = QKeySequence.StandardKey


@dataclass
class Menus:
    """The menu bar's menus, and the submenus other parts fill."""

    file: QMenu
    edit: QMenu
    view: QMenu
    settings: QMenu
    help: QMenu
    recent: QMenu
    units: QMenu
    palette: QMenu


@dataclass
class Actions:
    new: QAction
    open: QAction
    save: QAction
    save_as: QAction
    quit: QAction
    undo: QAction
    redo: QAction
    copy_floor: QAction
    bulk_edit: QAction
    add_opening: QAction
    metric: QAction
    imperial: QAction
    contact: QAction
    cautions: QAction
    about: QAction
    guide: QAction
    import_schedule: QAction
    recent_menu: QMenu
    palette_group: QActionGroup
    #: The menus (set once the menu bar is built).
    menus: Menus = field(init=False)


def _action(window: QMainWindow, text: str, slot: Callable[[], object],
            shortcut: str | QKeySequence.StandardKey | None = None, tip: str = "") -> QAction:
    action = QAction(text, window)
    if shortcut is not None:
        action.setShortcut(QKeySequence(shortcut))
    if tip:
        action.setStatusTip(tip)
        action.setToolTip(tip)
    action.triggered.connect(lambda _checked=False: slot())
    window.addAction(action)
    return action


def create_actions(window: MainWindow) -> Actions:
    """Create the actions of ``window`` and its menu bar; the file actions act on its file
    session."""
    w = window
    f = window.session
    a = Actions(
        new=_action(w, "&New building", f.new, SK.New, "Start a new, empty building"),
        open=_action(w, "&Open…", f.open_dialog, SK.Open, "Open a building file"),
        save=_action(w, "&Save", f.save, SK.Save, "Save the building"),
        save_as=_action(w, "Save &as…", f.save_as, SK.SaveAs, "Save the building to a new file"),
        quit=_action(w, "&Quit", w.close, SK.Quit),
        undo=_action(w, "&Undo", w.undo, SK.Undo),
        redo=_action(w, "&Redo", w.redo, SK.Redo),
        copy_floor=_action(w, "&Copy a typical floor…", w.copy_floor_dialog, "Ctrl+D",
                           "Copy one floor's openings to a range of levels"),
        bulk_edit=_action(w, "Change &many openings…", w.bulk_edit_dialog, "Ctrl+E",
                          "Set one value on the selected openings or on all that match"),
        add_opening=_action(w, "&Add opening", w.add_opening, "Ctrl+Shift+N"),
        metric=_action(w, "&Metric (m, mm)", lambda: w.set_units("metric")),
        imperial=_action(w, "&Imperial (ft, in)", lambda: w.set_units("imperial")),
        contact=_action(w, "Contact details for &leaflets…", w.edit_contact),
        cautions=_action(w, "&Cautions…", w.show_cautions),
        about=_action(w, "&About…", w.show_about),
        guide=_action(w, "&How to audit a building", w.show_guide, SK.HelpContents,
                      "The workflow in five steps"),
        import_schedule=_action(w, "&Import schedule or model (CSV, XLSX, IFC)…",
                                w.import_schedule, "Ctrl+I",
                                "Add or update floors and openings from a window and balcony "
                                "schedule or a building model (IFC)"),
        recent_menu=QMenu("Open &recent", w),
        palette_group=QActionGroup(w),
    )
    a.import_schedule.setObjectName("import_schedule")
    a.guide.setObjectName("show_guide")
    # redo answers to Ctrl+Y and Ctrl+Shift+Z on every platform, beside the platform's own key
    redo_keys = [*QKeySequence.keyBindings(SK.Redo), QKeySequence("Ctrl+Y"),
                 QKeySequence("Ctrl+Shift+Z")]
    unique = {k.toString(): k for k in redo_keys if not k.isEmpty()}
    a.redo.setShortcuts(list(unique.values()))
    a.quit.setMenuRole(QAction.MenuRole.QuitRole)
    a.about.setMenuRole(QAction.MenuRole.AboutRole)
    units = QActionGroup(w)
    for action in (a.metric, a.imperial):
        action.setCheckable(True)
        units.addAction(action)

    bar = w.menuBar()
    file_menu = bar.addMenu("&File")
    file_menu.addActions([a.new, a.open])
    file_menu.addMenu(a.recent_menu)
    file_menu.addSeparator()
    file_menu.addActions([a.save, a.save_as])
    file_menu.addSeparator()
    file_menu.addAction(a.import_schedule)
    file_menu.addSeparator()
    file_menu.addAction(a.quit)

    edit_menu = bar.addMenu("&Edit")
    edit_menu.addActions([a.undo, a.redo])
    edit_menu.addSeparator()
    edit_menu.addActions([a.add_opening, a.copy_floor, a.bulk_edit])

    view_menu = bar.addMenu("&View")
    units_menu = view_menu.addMenu("&Units")
    units_menu.addActions([a.metric, a.imperial])
    palette_menu = view_menu.addMenu("Band &colours")
    for name in palette_names():
        action = QAction(palette_label(name), w)
        action.setCheckable(True)
        action.setData(name)
        action.triggered.connect(lambda _c=False, n=name: w.set_palette(n))
        a.palette_group.addAction(action)
        palette_menu.addAction(action)

    settings_menu = bar.addMenu("&Settings")
    settings_menu.addAction(a.contact)

    help_menu = bar.addMenu("&Help")
    help_menu.addActions([a.guide, a.cautions, a.about])
    a.menus = Menus(file=file_menu, edit=edit_menu, view=view_menu, settings=settings_menu,
                    help=help_menu, recent=a.recent_menu, units=units_menu,
                    palette=palette_menu)
    return a
