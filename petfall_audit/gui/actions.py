"""The window's actions, menus and shortcuts."""

from __future__ import annotations

from dataclasses import dataclass

from PySide6.QtGui import QAction, QActionGroup, QKeySequence
from PySide6.QtWidgets import QMainWindow, QMenu

from petfall_audit.palette import palette_label, palette_names

__all__ = ["Actions", "create_actions"]

SK = QKeySequence.StandardKey


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
    recent_menu: QMenu
    palette_group: QActionGroup


def _action(window: QMainWindow, text: str, slot, shortcut=None, tip: str = "") -> QAction:  # type: ignore[no-untyped-def]
    action = QAction(text, window)
    if shortcut is not None:
        action.setShortcut(QKeySequence(shortcut))
    if tip:
        action.setStatusTip(tip)
        action.setToolTip(tip)
    action.triggered.connect(lambda _checked=False: slot())
    window.addAction(action)
    return action


def create_actions(window) -> Actions:  # type: ignore[no-untyped-def]
    """Create the actions of ``window`` (a MainWindow) and its menu bar."""
    w = window
    a = Actions(
        new=_action(w, "&New building", w.new_document, SK.New, "Start a new, empty building"),
        open=_action(w, "&Open…", w.open_dialog, SK.Open, "Open a building file"),
        save=_action(w, "&Save", w.save, SK.Save, "Save the building"),
        save_as=_action(w, "Save &as…", w.save_as, SK.SaveAs, "Save the building to a new file"),
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
        recent_menu=QMenu("Open &recent", w),
        palette_group=QActionGroup(w),
    )
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
    help_menu.addActions([a.cautions, a.about])
    return a
