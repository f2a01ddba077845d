"""The result views of the main window: ranked openings, facade elevations, floor comparison,
fall profile, fix plan and the cat assumptions, plus File ▸ Import schedule and File ▸ Export.

:func:`install_views` adds them to a :class:`~petfall_audit.gui.main_window.MainWindow` through
its public parts (``add_view``, ``view_tabs``, its menus, ``results_updated`` and the
recomputer's ``started`` signal). Every view follows one shared selection of openings, which is
also mirrored onto the openings editor: a click in any view selects the opening everywhere.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from PySide6.QtGui import QAction, QKeySequence
from PySide6.QtWidgets import QMenu

from petfall_audit.gui.views.common import ViewContext, stop_tasks
from petfall_audit.gui.views.compare import CompareView
from petfall_audit.gui.views.facade import FacadeView
from petfall_audit.gui.views.floors import FloorsView
from petfall_audit.gui.views.plan import PlanView
from petfall_audit.gui.views.profile import ProfileView
from petfall_audit.gui.views.ranked import RankedView
from petfall_audit.gui.views.sensitivity import SensitivityView

__all__ = ["InstalledViews", "install_views", "VIEW_NAMES"]

#: Tab names of the views, in order.
VIEW_NAMES: tuple[str, ...] = ("Ranked openings", "Facade elevation", "Floor comparison",
                               "Fall profile", "Fix plan", "Cat assumptions", "Compare audits")


@dataclass
class InstalledViews:
    """What :func:`install_views` added to a window (``window.views``)."""

    context: ViewContext
    ranked: RankedView
    facade: FacadeView
    floors: FloorsView
    profile: ProfileView
    plan: PlanView
    sensitivity: SensitivityView
    exports: Any
    import_action: QAction
    view_actions: list[QAction]
    compare: CompareView | None = None

    def widget(self, name: str) -> Any:
        return {"Ranked openings": self.ranked, "Facade elevation": self.facade,
                "Floor comparison": self.floors, "Fall profile": self.profile,
                "Fix plan": self.plan, "Cat assumptions": self.sensitivity,
                "Compare audits": self.compare}[name]


class _EditorSync:
    """Mirrors the shared selection onto the openings editor of the window and back; follows
    the editor when the window loads another document."""

    def __init__(self, window: Any, context: ViewContext) -> None:
        self.window = window
        self.context = context
        self.panel: Any = None
        self.syncing = False
        context.selection.changed.connect(self.to_panel)
        self.attach()

    def attach(self) -> None:
        panel = getattr(self.window, "openings_panel", None)
        if panel is None or panel is self.panel:
            return
        self.panel = panel
        panel.table.selectionModel().selectionChanged.connect(
            lambda *_args, p=panel: self.from_panel(p))

    def from_panel(self, panel: Any) -> None:
        if self.syncing or panel is not self.panel:
            return
        ids = panel.selected_ids()
        if set(ids) != set(self.context.selection.ids):
            self.context.select(ids)

    def to_panel(self, ids: Any) -> None:
        if self.panel is None or set(self.panel.selected_ids()) == set(ids):
            return
        self.syncing = True
        try:
            self.panel.select_ids(list(ids))
        finally:
            self.syncing = False


def _replace_ranked_tab(window: Any, ranked: RankedView) -> None:
    """Put the filterable ranked list where the window's plain one was (that one stays alive,
    hidden, for the window's own use)."""
    tabs = window.view_tabs
    table = getattr(window, "results_table", None)
    for i in range(tabs.count()):
        page = tabs.widget(i)
        if table is not None and (page is table or page.isAncestorOf(table)):
            tabs.removeTab(i)
            page.hide()
            tabs.insertTab(i, ranked, VIEW_NAMES[0])
            return
    window.add_view(VIEW_NAMES[0], ranked)


def _file_menu(window: Any) -> QMenu | None:
    for action in window.menuBar().actions():
        menu = action.menu()
        if menu is not None and action.text().replace("&", "") == "File":
            return menu  # type: ignore[no-any-return]
    return None


def _view_menu(window: Any) -> QMenu | None:
    for action in window.menuBar().actions():
        menu = action.menu()
        if menu is not None and action.text().replace("&", "") == "View":
            return menu  # type: ignore[no-any-return]
    return None


def install_views(window: Any, *, export_prompts: Any = None, import_prompts: Any = None
                  ) -> InstalledViews:
    """Add the result views and the import and export actions to ``window``; returns them (also
    kept as ``window.views``)."""
    from petfall_audit.gui.export_actions import ExportActions
    from petfall_audit.gui.import_dialog import import_schedule

    context = ViewContext(window, window)
    ranked = RankedView(context)
    facade = FacadeView(context)
    floors = FloorsView(context)
    profile = ProfileView(context)
    plan = PlanView(context)
    sensitivity = SensitivityView(context)
    compare = CompareView(context)
    _replace_ranked_tab(window, ranked)
    for name, widget in zip(VIEW_NAMES[1:], (facade, floors, profile, plan, sensitivity,
                                             compare), strict=True):
        window.add_view(name, widget)
    sync = _EditorSync(window, context)
    plan.what_if_button.clicked.connect(lambda _c=False: (  # the plan's what-if, beside
        compare.show_what_if(plan.plan, plan.catalogue),
        window.view_tabs.setCurrentWidget(compare)))

    def on_results(assessment: Any) -> None:
        sync.attach()
        context.set_assessment(assessment)

    window.results_updated.connect(on_results)
    window.recomputer.started.connect(lambda _gen: context.set_stale())
    current = window.results_model.assessment
    if current is not None and not window.results_stale:
        context.set_assessment(current)

    # menus: File ▸ Import schedule…, File ▸ Export ▸ …; View ▸ one shortcut per view
    exports = ExportActions(
        window, prompts=export_prompts,
        budget=lambda: float(plan.budget.value()) if plan.catalogue is not None else None,
        budget_is_default=lambda: plan.budget_is_default)
    import_action = QAction("&Import schedule or model (CSV, XLSX, IFC)…", window)
    import_action.setObjectName("import_schedule")
    import_action.setShortcut(QKeySequence("Ctrl+I"))
    import_action.setStatusTip("Add or update floors and openings from a window and balcony "
                               "schedule or a building model (IFC)")
    import_action.triggered.connect(
        lambda _c=False: import_schedule(window, prompts=import_prompts))
    file_menu = _file_menu(window)
    if file_menu is not None:
        quit_action = getattr(getattr(window, "actions_", None), "quit", None)
        if quit_action in file_menu.actions():  # just above Quit
            file_menu.insertAction(quit_action, import_action)
            file_menu.insertMenu(quit_action, exports.menu)
            file_menu.insertSeparator(quit_action)
        else:
            file_menu.addAction(import_action)
            file_menu.addMenu(exports.menu)
    else:
        window.addAction(import_action)
    view_actions: list[QAction] = []
    view_menu = _view_menu(window)
    if view_menu is not None:
        view_menu.addSeparator()
    tabs = window.view_tabs
    for n, name in enumerate(VIEW_NAMES, start=1):
        widget = {1: ranked, 2: facade, 3: floors, 4: profile, 5: plan, 6: sensitivity,
                  7: compare}[n]
        action = QAction(f"Show {name.lower()}", window)
        action.setShortcut(QKeySequence(f"Ctrl+{n}"))
        action.triggered.connect(lambda _c=False, w=widget: (tabs.setCurrentWidget(w),
                                                             w.setFocus()))
        window.addAction(action)
        if view_menu is not None:
            view_menu.addAction(action)
        view_actions.append(action)
    results_only = QAction("Show &results only", window)
    results_only.setObjectName("results_only")
    results_only.setCheckable(True)
    results_only.setShortcut(QKeySequence("Ctrl+0"))
    results_only.setStatusTip("Hide the editors to give the result views the whole window")
    results_only.toggled.connect(lambda on: window.editor_tabs.setVisible(not on))
    window.addAction(results_only)
    if view_menu is not None:
        view_menu.addAction(results_only)
    view_actions.append(results_only)
    on_close = getattr(window, "on_close", None)
    if on_close is not None:  # closing the window stops the views' background work
        on_close.append(stop_tasks)
    tabs.setCurrentWidget(ranked)

    views = InstalledViews(context=context, ranked=ranked, facade=facade, floors=floors,
                           profile=profile, plan=plan, sensitivity=sensitivity, exports=exports,
                           import_action=import_action, view_actions=view_actions,
                           compare=compare)
    window.views = views
    return views
