"""The main window: editors for the building above, result views below, cautions always shown.

The window composes itself once from typed, Qt-free state (:class:`~petfall_audit.editing.state.
WindowState`: the workspace with the document and its history, the display options, the
selection and the current results): the editors and the six result views
(:mod:`petfall_audit.gui.views`) are each given the parts they show, never the window. Files and
the recovery copy are the window's :class:`~petfall_audit.editing.session.FileSession`
(``window.session``). Every edit is a command on the document's history; each change of the
model starts a recomputation off the GUI thread and marks the shown results as out of date until
the new ones arrive. Quick results (few simulated falls per opening) come first; the full
assessment replaces them when the user pauses (see :mod:`petfall_audit.gui.worker`).

The editors sit in scroll areas, so the splitter between them and the views can give the views
most of the height; the user's split is remembered.
"""

from __future__ import annotations

import threading
from collections.abc import Callable
from pathlib import Path
from typing import Any

from PySide6.QtCore import QModelIndex, Qt, QTimer, Signal
from PySide6.QtGui import QAction, QCloseEvent, QKeySequence, QShowEvent
from PySide6.QtWidgets import (
    QFrame,
    QLabel,
    QMainWindow,
    QProgressBar,
    QScrollArea,
    QSplitter,
    QTabWidget,
    QToolBar,
    QVBoxLayout,
    QWidget,
)

from petfall_audit.cautions import CAUTIONS_SHORT
from petfall_audit.editing import autosave
from petfall_audit.editing.commands import CopyFloorOpenings, SetOpeningFields
from petfall_audit.editing.document import MODEL_KINDS, Document
from petfall_audit.editing.fields import OPENING_FIELDS, field_spec
from petfall_audit.editing.history import History
from petfall_audit.editing.query import applicable_openings
from petfall_audit.editing.session import FileSession
from petfall_audit.editing.state import CurrentResults, DisplayOptions, WindowState, Workspace
from petfall_audit.gui.actions import create_actions
from petfall_audit.gui.adapters import ViewOptions
from petfall_audit.gui.dialogs import APP_TITLE, Prompts
from petfall_audit.gui.file_session import AutosaveTimer, DialogPrompts, fill_recent_menu
from petfall_audit.gui.guide import GuideDialog
from petfall_audit.gui.settings import AppSettings
from petfall_audit.gui.views import VIEW_NAMES, InstalledViews, build_views
from petfall_audit.gui.views.common import Assessor, ViewContext, stop_tasks
from petfall_audit.gui.views.ranked import ID_ROLE
from petfall_audit.gui.widgets.building import BuildingPanel
from petfall_audit.gui.widgets.field_form import ERROR_STYLE, set_style
from petfall_audit.gui.widgets.floors import FloorsPanel
from petfall_audit.gui.widgets.openings import OpeningsPanel
from petfall_audit.gui.widgets.site import SitePanel
from petfall_audit.gui.worker import (
    INTERACTIVE_SAMPLES,
    REFINE_DELAY_MS,
    REFINED_SAMPLES,
    AssessFn,
    Recomputer,
)
from petfall_audit.model import (
    Building,
    BuildingInfo,
    Facade,
    Floor,
    Surface,
    SurfaceKind,
)

__all__ = ["MainWindow", "blank_building", "EDITOR_SHARE"]

#: Share of the splitter's height given to the editors by default (the views get the rest):
#: at 1366×768 about 230 px, the openings table shows six rows and the views about 410 px.
EDITOR_SHARE = 0.36
#: How long (ms) results may take before the status bar shows a progress bar.
PROGRESS_DELAY_MS = 250


def blank_building() -> Building:
    """A new building to start from: one floor, one facade, paving below."""
    return Building(
        info=BuildingInfo(name="New building"),
        floors=(Floor(level=0, label="Ground floor", elevation_m=0.0),),
        facades=(Facade(id="front", length_m=20.0, label="Front"),),
        surfaces=(Surface(id="ground", kind=SurfaceKind.CONCRETE, elevation_m=0.0,
                          label="Paving at ground level"),),
    )


class MainWindow(QMainWindow):
    """The app's window for one document at a time.

    ``prompts`` asks the user questions (replace it in tests); ``assess`` computes results
    (default :func:`petfall_audit.risk.assess`) with ``samples`` cats per opening, then again
    with ``refine_samples`` once the user pauses for ``refine_delay_ms`` (a count at or below
    ``samples`` turns this off). ``export_prompts`` and ``import_prompts`` ask where to export
    and what to import (replace them in tests).
    """

    results_updated = Signal(object)  # the new assessment (quick or refined)
    results_refined = Signal(object)  # the full assessment, after results_updated
    results_failed = Signal(str)

    def __init__(self, document: Document | None = None, *, settings: AppSettings | None = None,
                 prompts: Prompts | None = None, assess: AssessFn | None = None,
                 samples: int = INTERACTIVE_SAMPLES, refine_samples: int = REFINED_SAMPLES,
                 refine_delay_ms: int = REFINE_DELAY_MS,
                 autosave_delay_ms: int = int(autosave.IDLE_DELAY_S * 1000),
                 autosave_max_wait_ms: int = int(autosave.MAX_WAIT_S * 1000),
                 export_prompts: Any = None, import_prompts: Any = None,
                 parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.settings = settings or AppSettings(parent=self)
        self.prompts = prompts or Prompts()
        self.import_prompts = import_prompts
        self.recomputer = Recomputer(assess, samples=samples, refine_samples=refine_samples,
                                     refine_delay_ms=refine_delay_ms, parent=self)
        self.recomputer.finished.connect(self._on_results)
        self.recomputer.failed.connect(self._on_results_failed)
        self.recomputer.progress.connect(self._on_progress)
        self.recomputer.refining.connect(self._on_refining)
        self.recomputer.refined.connect(self._on_refined)
        self.last_compute_s: float | None = None
        #: What the window shows, each concern in its own typed object (no Qt).
        self.state = WindowState(
            workspace=Workspace(document or Document(blank_building())),
            results=CurrentResults(self.recomputer.final_samples),
            options=DisplayOptions(self.settings.units, self.settings.palette))
        self.options = ViewOptions(self.state.options, self)
        #: Open, save, recovery: the file session of this window.
        self.session = FileSession(self.state.workspace, DialogPrompts(self.prompts, self),
                                   new_building=blank_building, remember=self.settings.add_recent,
                                   open_elsewhere=self._open_extra_window,
                                   idle_s=autosave_delay_ms / 1000,
                                   max_wait_s=autosave_max_wait_ms / 1000)
        self.session.status.connect(self._show_status)
        self.autosave_timer = AutosaveTimer(self.session, self)
        #: Windows opened for further recovered work (kept alive here).
        self.extra_windows: list[MainWindow] = []
        self._split_restored = False
        self._fitted = False
        self._panels: list[Any] = []
        self._disconnects: list[Callable[[], None]] = []
        self._syncing_selection = False
        self.guide: GuideDialog | None = None  # Help ▸ How to audit a building, once opened
        self.setObjectName("main_window")
        self.resize(1280, 820)

        self.actions_ = create_actions(self)
        self.menus = self.actions_.menus
        self._build_layout()
        self.views = self._build_views(export_prompts)
        self.actions_.recent_menu.aboutToShow.connect(
            lambda: fill_recent_menu(self.actions_.recent_menu, self.settings,
                                     self.session.open_file))
        self.settings.changed.connect(self._on_settings_changed)
        self._on_settings_changed("units")
        self._on_settings_changed("palette")
        geometry, state = self.settings.window_state()
        if geometry is not None:
            self.restoreGeometry(geometry)
        if state is not None:
            self.restoreState(state)
        self._fit_screen()
        self._own_size = self.size()
        split = self.settings.splitter_state()
        if split is not None and self.splitter.restoreState(split):
            self._split_restored = True
        self.state.workspace.loaded.connect(self._on_loaded)
        self.state.selection.changed.connect(self._selection_to_editor)
        self._on_loaded(self.document)
        QTimer.singleShot(WARM_UP_DELAY_MS, _warm_up_unit_parser)

    # --- the state --------------------------------------------------------------------------------

    @property
    def document(self) -> Document:
        return self.state.workspace.document

    @property
    def history(self) -> History:
        return self.state.workspace.history

    @property
    def results_stale(self) -> bool:
        return self.state.results.stale

    @property
    def results_samples(self) -> int | None:
        """Simulated falls per opening behind the shown results (``None`` before the first)."""
        return self.state.results.samples

    @property
    def results_state(self) -> QLabel:
        """The line above the ranked openings: ranked, recomputing, or why it failed."""
        return self.views.ranked.state_note

    # --- layout ----------------------------------------------------------------------------------

    def _build_layout(self) -> None:
        a = self.actions_
        bar = QToolBar("Main")
        bar.setObjectName("main_toolbar")
        bar.addActions([a.new, a.open, a.save])
        bar.addSeparator()
        bar.addActions([a.undo, a.redo])
        bar.addSeparator()
        bar.addActions([a.copy_floor, a.bulk_edit])
        self.addToolBar(bar)

        self.editor_tabs = QTabWidget()
        self.editor_tabs.setObjectName("editor_tabs")
        self.view_tabs = QTabWidget()
        self.view_tabs.setObjectName("view_tabs")

        splitter = QSplitter(Qt.Orientation.Vertical)
        splitter.setObjectName("main_splitter")
        splitter.setChildrenCollapsible(False)
        splitter.addWidget(self.editor_tabs)
        splitter.addWidget(self.view_tabs)
        splitter.setStretchFactor(0, 0)  # a taller window grows the views
        splitter.setStretchFactor(1, 1)
        self.splitter = splitter

        self.cautions_banner = QLabel(
            f"<b>Caution:</b> {CAUTIONS_SHORT} <a href='#cautions'>Read the cautions</a>")
        self.cautions_banner.setObjectName("cautions_banner")
        self.cautions_banner.setWordWrap(True)
        self.cautions_banner.setTextFormat(Qt.TextFormat.RichText)
        self.cautions_banner.setStyleSheet(
            "QLabel#cautions_banner { background: #F3F0E4; border-top: 1px solid #B3AE7E; "
            "padding: 4px 8px; }")
        self.cautions_banner.linkActivated.connect(lambda _link: self.show_cautions())

        central = QWidget()
        layout = QVBoxLayout(central)
        layout.setContentsMargins(4, 4, 4, 0)
        layout.setSpacing(2)
        layout.addWidget(splitter, 1)
        layout.addWidget(self.cautions_banner)
        self.setCentralWidget(central)

        self.status_label = QLabel()
        self.progress = QProgressBar()
        self.progress.setMaximumWidth(180)
        self.progress.setTextVisible(False)
        self.progress.hide()
        # shown only when results take a while: on a quick edit it would flash and lay the
        # status bar out twice
        self._progress_timer = QTimer(self)
        self._progress_timer.setSingleShot(True)
        self._progress_timer.setInterval(PROGRESS_DELAY_MS)
        self._progress_timer.timeout.connect(self.progress.show)
        self.samples_label = QLabel()
        self.samples_label.setObjectName("samples_label")
        status = self.statusBar()
        status.addWidget(self.status_label, 1)
        status.addPermanentWidget(self.progress)
        status.addPermanentWidget(self.samples_label)

    def _build_views(self, export_prompts: Any) -> InstalledViews:
        """The result views, once, from the window's state; their tabs, File ▸ Export and the
        View menu's shortcuts."""
        from petfall_audit.gui.export_actions import ExportActions

        r = self.recomputer
        context = ViewContext(self.state, self.options,
                              Assessor(r.assess, r.seed, r.final_samples))
        widgets = build_views(context)
        for name, widget in zip(VIEW_NAMES, widgets, strict=True):
            widget.setObjectName(widget.objectName() or f"view_{name}")
            self.view_tabs.addTab(widget, name)
        ranked, facade, floors, profile, plan, sensitivity, compare = widgets

        def what_if() -> None:  # the plan's what-if, beside the audit
            compare.show_what_if(plan.plan, plan.catalogue)
            self.show_view(compare)

        plan.what_if_button.clicked.connect(lambda _c=False: what_if())
        ranked.table.doubleClicked.connect(self._on_result_activated)

        exports = ExportActions(
            self, prompts=export_prompts,
            budget=plan.export_budget,
            budget_is_default=lambda: plan.budget_is_default)
        file_menu, quit_action = self.menus.file, self.actions_.quit
        file_menu.insertMenu(quit_action, exports.menu)  # below Import, above Quit
        file_menu.insertSeparator(quit_action)

        view_actions: list[QAction] = []
        self.menus.view.addSeparator()
        for n, (name, widget) in enumerate(zip(VIEW_NAMES, widgets, strict=True), start=1):
            action = QAction(f"Show {name.lower()}", self)
            action.setShortcut(QKeySequence(f"Ctrl+{n}"))
            action.triggered.connect(lambda _c=False, w=widget: self.show_view(w))
            self.addAction(action)
            self.menus.view.addAction(action)
            view_actions.append(action)
        results_only = QAction("Show &results only", self)
        results_only.setObjectName("results_only")
        results_only.setCheckable(True)
        results_only.setShortcut(QKeySequence("Ctrl+0"))
        results_only.setStatusTip("Hide the editors to give the result views the whole window")
        results_only.toggled.connect(lambda on: self.editor_tabs.setVisible(not on))
        self.addAction(results_only)
        self.menus.view.addAction(results_only)
        view_actions.append(results_only)
        self.view_tabs.setCurrentWidget(ranked)
        return InstalledViews(context=context, ranked=ranked, facade=facade, floors=floors,
                              profile=profile, plan=plan, sensitivity=sensitivity,
                              compare=compare, exports=exports,
                              import_action=self.actions_.import_schedule,
                              view_actions=view_actions)

    def show_view(self, view: QWidget) -> None:
        """Bring the result view ``view`` to the front, with the keyboard focus."""
        self.view_tabs.setCurrentWidget(view)
        view.setFocus()

    def showEvent(self, event: QShowEvent) -> None:
        super().showEvent(event)
        if not self._fitted:  # the frame is known now: the whole window inside the screen
            self._fitted = True
            if self.size() == self._own_size:  # unless the caller chose a size since
                self._fit_screen()
        if not self._split_restored:  # the first time: the default share, once laid out
            self._split_restored = True
            self.set_editor_share(EDITOR_SHARE)
            QTimer.singleShot(0, lambda: self.set_editor_share(EDITOR_SHARE))

    def set_editor_share(self, share: float) -> None:
        """Give the editors ``share`` (0–1) of the splitter's height, the views the rest."""
        total = sum(self.splitter.sizes()) or max(self.splitter.height(), 600)
        editors = int(share * total + 0.5)  # pixels, to the nearest
        self.splitter.setSizes([editors, total - editors])

    def _fit_screen(self) -> None:
        """Keep the window, its frame included, inside the screen's free area (a small screen,
        or one scaled to 150 %)."""
        screen = self.screen()
        if screen is None:
            return
        free = screen.availableGeometry()
        frame = self.frameGeometry()
        extra_w = max(frame.width() - self.width(), 0)
        extra_h = max(frame.height() - self.height(), 0)
        width = min(self.width(), free.width() - extra_w)
        height = min(self.height(), free.height() - extra_h)
        if (width, height) != (self.width(), self.height()):
            self.resize(width, height)
        frame = self.frameGeometry()
        if not free.contains(frame):
            self.move(max(free.left(), min(frame.left(), free.right() - frame.width() + 1)),
                      max(free.top(), min(frame.top(), free.bottom() - frame.height() + 1)))

    # --- the document -----------------------------------------------------------------------------

    def load_document(self, doc: Document) -> None:
        """Show ``doc`` (its history starts empty)."""
        self.state.workspace.load(doc)

    def _on_loaded(self, doc: Document) -> None:
        """Another document is shown: new editors on it, its results computed."""
        for disconnect in self._disconnects:
            disconnect()
        for panel in self._panels:
            panel.detach()
        current = self.editor_tabs.currentIndex()
        while self.editor_tabs.count():
            w = self.editor_tabs.widget(0)
            self.editor_tabs.removeTab(0)
            if w is not None:
                w.deleteLater()
        a = self.actions_
        history = self.history
        self.openings_panel = OpeningsPanel(doc, history, self.options, host=self,
                                            place_hint=self._place_hint)
        self.floors_panel = FloorsPanel(doc, history, self.options, actions=[a.copy_floor])
        self.site_panel = SitePanel(doc, history, self.options)
        self.building_panel = BuildingPanel(doc, history, self.options)
        self.building_panel.code_profile_picked.connect(self.set_units)
        self._panels = [self.openings_panel, self.floors_panel, self.site_panel,
                        self.building_panel]
        for panel, name in ((self.openings_panel, "Openings"), (self.floors_panel, "Floors"),
                            (self.site_panel, "Facades and surfaces below"),
                            (self.building_panel, "Building and cats")):
            self.editor_tabs.addTab(_scrolled(panel), name)
        self.editor_tabs.setCurrentIndex(max(current, 0))
        panel = self.openings_panel
        panel.table.selectionModel().selectionChanged.connect(
            lambda *_args, p=panel: self._selection_from_editor(p))
        self._disconnects = [doc.on_changed("*", self._on_doc_changed),
                             history.on_changed(self._update_undo_actions),
                             self.state.workspace.pushed.connect(self._on_pushed)]
        self._update_title()
        self._update_undo_actions()
        self._start_in_profile_units(doc)
        self.recompute()

    def show_editor(self, panel: QWidget) -> None:
        """Bring the editor tab that holds ``panel`` to the front."""
        for i in range(self.editor_tabs.count()):
            page = self.editor_tabs.widget(i)
            if page is panel or (isinstance(page, QScrollArea) and page.widget() is panel):
                self.editor_tabs.setCurrentIndex(i)
                return

    def _on_doc_changed(self, kind: str) -> None:
        if kind in MODEL_KINDS:
            self.recompute()
        elif kind in ("dirty", "path"):
            self._update_title()

    def _selection_from_editor(self, panel: OpeningsPanel) -> None:
        if self._syncing_selection or panel is not self.openings_panel:
            return
        ids = panel.selected_ids()
        if set(ids) != set(self.state.selection.ids):
            self.state.selection.set_ids(ids)

    def _selection_to_editor(self, ids: tuple[str, ...]) -> None:
        panel = self.openings_panel
        if set(panel.selected_ids()) == set(ids):
            return
        self._syncing_selection = True
        try:
            panel.select_ids(list(ids))
        finally:
            self._syncing_selection = False

    def _update_title(self) -> None:
        self.setWindowTitle(f"{self.document.display_name}[*] — {APP_TITLE}")
        self.setWindowModified(self.document.dirty)

    def _update_undo_actions(self) -> None:
        h = self.history
        self.actions_.undo.setEnabled(h.can_undo)
        self.actions_.redo.setEnabled(h.can_redo)
        for action, verb, can, label in ((self.actions_.undo, "Undo", h.can_undo, h.undo_label),
                                         (self.actions_.redo, "Redo", h.can_redo, h.redo_label)):
            # the menu names the edit; the toolbar button keeps its short name (a button that
            # grew with every edit moved the buttons beside it and relaid the whole window)
            # and names the edit in its tooltip
            action.setText(f"&{verb} {label}" if can else f"&{verb}")
            action.setIconText(verb)
            action.setToolTip(f"{verb} {label}" if can else f"Nothing to {verb.lower()}")

    def undo(self) -> None:
        self.history.undo()

    def redo(self) -> None:
        self.history.redo()

    def push(self, cmd: Any) -> str | None:
        """Push an edit; on refusal show why in the status bar and return the reason."""
        return self.state.workspace.push(cmd, self.options.units)

    def _on_pushed(self, outcome: tuple[str, str | None]) -> None:
        label, reason = outcome
        if reason is not None:
            self.status_label.setText(f"! Not changed: {reason}")
            set_style(self.status_label, ERROR_STYLE)
        else:
            set_style(self.status_label, "")
            self.status_label.setText(label)

    def _show_status(self, text: str) -> None:
        set_style(self.status_label, ERROR_STYLE if text.startswith("!") else "")
        self.status_label.setText(text)

    # --- recomputation ----------------------------------------------------------------------------

    def recompute(self) -> None:
        """Start computing results for the current building; the shown ones become stale."""
        self.state.results.set_stale()
        self.progress.setRange(0, 0)
        self._show_progress()
        self.recomputer.request(self.document.building)

    def _show_progress(self) -> None:
        """The progress bar appears if the results take longer than :data:`PROGRESS_DELAY_MS`."""
        if not self.progress.isVisible() and not self._progress_timer.isActive():
            self._progress_timer.start()

    def _hide_progress(self) -> None:
        self._progress_timer.stop()
        self.progress.hide()

    def _on_progress(self, _generation: int, done: int, total: int) -> None:
        self.progress.setRange(0, max(total, 1))
        self.progress.setValue(done)

    def _show_samples(self, state: str) -> None:
        """The status-bar note on the simulated falls behind the results: ``state`` is
        ``"quick"``, ``"refining"`` or ``"final"``."""
        r = self.recomputer
        full = r.final_samples
        if state == "final":
            n = self.results_samples or full
            self.samples_label.setText(f"{n} simulated falls per opening")
            self.samples_label.setToolTip("As many as the command line and the audit report use."
                                          if n >= REFINED_SAMPLES else
                                          "The audit report recomputes with more.")
        elif state == "refining":
            self.samples_label.setText(f"{r.samples} simulated falls per opening: refining…")
            self.samples_label.setToolTip(f"Recomputing with {full} simulated falls per opening; "
                                          "the results are replaced when done.")
        else:
            self.samples_label.setText(f"{r.samples} simulated falls per opening (quick)")
            self.samples_label.setToolTip(f"Pause editing and the results are recomputed with "
                                          f"{full} simulated falls per opening.")

    def _on_results(self, _generation: int, assessment: Any, seconds: float) -> None:
        self.last_compute_s = seconds
        self.state.results.set_assessment(assessment, self.recomputer.samples)
        self._show_samples("quick" if self.recomputer.refines else "final")
        self._hide_progress()
        self.results_updated.emit(assessment)

    def _on_refining(self, _generation: int) -> None:
        self._show_samples("refining")
        self.progress.setRange(0, 0)
        self._show_progress()

    def _on_refined(self, _generation: int, assessment: Any, _seconds: float) -> None:
        self.state.results.set_assessment(assessment, self.recomputer.refine_samples)
        self._show_samples("final")
        self._hide_progress()
        self.results_updated.emit(assessment)
        self.results_refined.emit(assessment)

    def _on_results_failed(self, _generation: int, message: str) -> None:
        self._hide_progress()
        self.state.results.set_failed(message)
        self.results_failed.emit(message)

    def _on_result_activated(self, index: QModelIndex) -> None:
        opening_id = index.data(ID_ROLE)
        if opening_id is None:
            return
        self.show_editor(self.openings_panel)
        self.openings_panel.select_ids([opening_id])

    # --- files ------------------------------------------------------------------------------------

    def save_as(self, path: Path | None = None) -> bool:
        """Save to a new file (the photo strip saves a new building before adding photos)."""
        return self.session.save_as(path)

    def _open_extra_window(self, doc: Document) -> FileSession:
        """A new window on ``doc`` (a further recovered building), shown beside this one;
        its file session."""
        window = MainWindow(doc, settings=self.settings, prompts=self.prompts,
                            assess=self.recomputer.assess, samples=self.recomputer.samples,
                            refine_samples=self.recomputer.refine_samples)
        self.extra_windows.append(window)
        window.show()
        return window.session

    def import_schedule(self) -> None:
        from petfall_audit.gui.import_dialog import import_schedule

        import_schedule(self, prompts=self.import_prompts)

    # --- edits with dialogs -----------------------------------------------------------------------

    def add_opening(self) -> None:
        self.show_editor(self.openings_panel)
        self.openings_panel.add_opening()

    def _place_hint(self) -> tuple[int | None, str | None]:
        """The floor chosen in the floors table (if any) for a new opening; no facade."""
        return self.floors_panel.selected_level(), None

    def _current_level(self) -> int | None:
        level = self.floors_panel.selected_level()
        if level is None:
            ids = self.openings_panel.selected_ids()
            if ids:
                level = self.document.building.opening(ids[0]).floor
        return level

    def copy_floor_dialog(self) -> None:
        req = self.prompts.copy_floor(self, self.document.building, self._current_level())
        if req is not None:
            self.copy_floor(req.level, req.to_levels, id_pattern=req.id_pattern,
                            replace_existing=req.replace_existing)

    def copy_floor(self, level: int, to_levels: Any, *, id_pattern: str | None = None,
                   replace_existing: bool = False) -> str | None:
        """Copy the openings of floor ``level`` to ``to_levels``; the reason if refused."""
        kwargs = {} if id_pattern is None else {"id_pattern": id_pattern}
        try:
            cmd = CopyFloorOpenings(level, to_levels, replace_existing=replace_existing, **kwargs)
        except ValueError as exc:
            reason: str | None = str(exc)
        else:
            reason = self.push(cmd)
        if reason is not None:
            self.prompts.show_error(self, "Floor not copied", reason)
        return reason

    def bulk_edit_dialog(self) -> None:
        req = self.prompts.bulk_edit(self, self.document.building,
                                     self.openings_panel.selected_ids(), self.options.units)
        if req is not None:
            self.bulk_edit(req.ids, req.field, req.value)

    def bulk_edit(self, ids: Any, field: str, value: Any) -> str | None:
        """Set ``field`` to ``value`` on the openings ``ids`` as one undo step.

        Openings the value does not fit (a limiter on a balcony) are left as they are and the
        status bar says so; if it fits none of them, nothing changes."""
        ids = tuple(ids)
        label = field_spec(OPENING_FIELDS, field).noun
        fits, skipped, why = applicable_openings(self.document.building, ids, field, value)
        reason: str | None
        if ids and not fits:
            reason = f"{why}: none of the {len(ids)} chosen openings is one; nothing was changed"
        else:
            try:
                cmd = SetOpeningFields(fits, {field: value},
                                       label=f"Set {label} on {len(fits)} openings")
            except ValueError as exc:
                reason = str(exc)
            else:
                reason = self.push(cmd)
        if reason is not None:
            self.prompts.show_error(self, "Openings not changed", reason)
            return reason
        if skipped:
            self.status_label.setText(
                f"Set {label} on {len(fits)} openings; {len(skipped)} left as they were "
                f"({why})")
        self.openings_panel.select_ids(ids)
        return None

    # --- settings and help ------------------------------------------------------------------------

    def set_units(self, units: str) -> None:
        self.settings.units = units

    def _start_in_profile_units(self, doc: Document) -> None:
        """A building that names a jurisdiction opens in that place's units (the generic
        profile keeps the user's choice)."""
        from petfall_audit.code_profile import DEFAULT_PROFILE, PROFILE_IDS, code_profile

        pid = doc.building.info.code_profile
        if pid != DEFAULT_PROFILE and pid in PROFILE_IDS:
            self.set_units(code_profile(pid).units)

    def set_palette(self, name: str) -> None:
        self.settings.palette = name

    def _on_settings_changed(self, key: str) -> None:
        if key == "units":
            self.options.units = self.settings.units
            self.actions_.metric.setChecked(self.settings.units == "metric")
            self.actions_.imperial.setChecked(self.settings.units == "imperial")
        elif key == "palette":
            self.options.palette = self.settings.palette
            for action in self.actions_.palette_group.actions():
                action.setChecked(action.data() == self.settings.palette)

    def edit_contact(self) -> None:
        values = self.prompts.edit_contact(self, self.settings.contact())
        if values is not None:
            self.settings.set_contact(values)

    def show_cautions(self) -> None:
        self.prompts.show_cautions(self)

    def show_about(self) -> None:
        self.prompts.show_cautions(self, about=True)

    def show_guide(self) -> None:
        """Help ▸ How to audit a building: the workflow in five steps, beside the window."""
        if self.guide is None:
            self.guide = GuideDialog(self)
        self.guide.show()
        self.guide.raise_()

    # --- closing ----------------------------------------------------------------------------------

    def closeEvent(self, event: QCloseEvent) -> None:
        if not self.session.confirm_discard():
            event.ignore()
            return
        self.autosave_timer.stop()
        self.recomputer.shutdown()  # waits for the worker threads to end
        stop_tasks()  # and the views' background work
        self.session.close()
        self.settings.set_window_state(self.saveGeometry(), self.saveState())
        self.settings.set_splitter_state(self.splitter.saveState())
        self.settings.sync()
        event.accept()


#: Pause after the window opens before the unit parser loads its tables in the background.
WARM_UP_DELAY_MS = 1500
_warmed_up = threading.Event()


def _warm_up_unit_parser() -> None:
    """Load the unit parser's tables on a background thread, once per process, so that the first
    length typed does not stall the window for about a second."""
    if _warmed_up.is_set():
        return
    _warmed_up.set()

    def load() -> None:
        from petfall_audit.units import parse_length_m

        for text in ("1 m", "1 mm", "1 ft", "1 in"):
            parse_length_m(text)

    threading.Thread(target=load, name="petfall-units-warm-up", daemon=True).start()


def _scrolled(panel: QWidget) -> QScrollArea:
    """``panel`` in a frameless scroll area, so that the editors can shrink below its size."""
    area = QScrollArea()
    area.setWidgetResizable(True)
    area.setFrameShape(QFrame.Shape.NoFrame)
    area.setWidget(panel)
    return area
