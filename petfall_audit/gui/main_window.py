"""The main window: editors for the building above, result views below, cautions always shown.

Views are tabs in the lower area; more can be added with :meth:`MainWindow.add_view`. Every edit
is a command on the document's history; each change of the model starts a recomputation off the
GUI thread, marks the shown results as out of date until the new ones arrive, and schedules a
recovery copy of the unsaved work. Quick results (few simulated falls per opening) come first;
the full assessment replaces them when the user pauses (see :mod:`petfall_audit.gui.worker`).

The editors sit in scroll areas, so the splitter between them and the views can give the views
most of the height; the user's split is remembered.
"""

from __future__ import annotations

import threading
import time
from pathlib import Path
from typing import Any

from PySide6.QtCore import QModelIndex, Qt, QTimer, Signal
from PySide6.QtGui import QCloseEvent, QShowEvent
from PySide6.QtWidgets import (
    QAbstractItemView,
    QFrame,
    QHeaderView,
    QLabel,
    QMainWindow,
    QProgressBar,
    QScrollArea,
    QSplitter,
    QTableView,
    QTabWidget,
    QToolBar,
    QVBoxLayout,
    QWidget,
)

from petfall_audit.cautions import CAUTIONS_SHORT
from petfall_audit.editing import autosave
from petfall_audit.editing.commands import CopyFloorOpenings, SetOpeningFields
from petfall_audit.editing.document import MODEL_KINDS, PLAN_ONLY_KINDS, Document
from petfall_audit.editing.fields import OPENING_FIELDS, field_spec
from petfall_audit.editing.history import History
from petfall_audit.editing.query import applicable_openings
from petfall_audit.editing.words import problem_words
from petfall_audit.errors import BuildingFileError, ValidationFailed
from petfall_audit.gui.actions import create_actions
from petfall_audit.gui.adapters import ResultsTableModel, ViewOptions, push_command
from petfall_audit.gui.dialogs import APP_TITLE, Prompts
from petfall_audit.gui.settings import AppSettings
from petfall_audit.gui.widgets.building import BuildingPanel
from petfall_audit.gui.widgets.field_form import ERROR_STYLE
from petfall_audit.gui.widgets.floors import FloorsPanel
from petfall_audit.gui.widgets.openings import OpeningsPanel
from petfall_audit.gui.widgets.site import SitePanel
from petfall_audit.gui.widgets.tables import keep_columns_fitted
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
    ``samples`` turns this off).
    """

    results_updated = Signal(object)  # the new assessment (quick or refined)
    results_refined = Signal(object)  # the full assessment, after results_updated
    results_failed = Signal(str)
    plan_settings_changed = Signal(object)  # the document's PlanSettings (loaded or edited)

    def __init__(self, document: Document | None = None, *, settings: AppSettings | None = None,
                 prompts: Prompts | None = None, assess: AssessFn | None = None,
                 samples: int = INTERACTIVE_SAMPLES, refine_samples: int = REFINED_SAMPLES,
                 refine_delay_ms: int = REFINE_DELAY_MS,
                 autosave_delay_ms: int = int(autosave.IDLE_DELAY_S * 1000),
                 autosave_max_wait_ms: int = int(autosave.MAX_WAIT_S * 1000),
                 parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.settings = settings or AppSettings(parent=self)
        self.prompts = prompts or Prompts()
        self.options = ViewOptions(self.settings.units, self.settings.palette, self)
        self.recomputer = Recomputer(assess, samples=samples, refine_samples=refine_samples,
                                     refine_delay_ms=refine_delay_ms, parent=self)
        self.recomputer.finished.connect(self._on_results)
        self.recomputer.failed.connect(self._on_results_failed)
        self.recomputer.progress.connect(self._on_progress)
        self.recomputer.refining.connect(self._on_refining)
        self.recomputer.refined.connect(self._on_refined)
        self.last_compute_s: float | None = None
        #: Simulated falls per opening behind the shown results (``None`` before the first).
        self.results_samples: int | None = None
        self._split_restored = False
        #: This window's recovery copy and when to write it (a pause, or at most a second).
        self.recovery = autosave.RecoveryCopy()
        self._autosave_schedule = autosave.AutosaveSchedule(autosave_delay_ms / 1000,
                                                            autosave_max_wait_ms / 1000)
        self._autosave_timer = QTimer(self)
        self._autosave_timer.setSingleShot(True)
        self._autosave_timer.timeout.connect(self.autosave_now)
        #: Windows opened for further recovered work (kept alive here).
        self.extra_windows: list[MainWindow] = []
        #: Makes the window for a further recovered document (the app sets one with its views).
        self.window_factory: Any = None
        self._panels: list[Any] = []
        #: Called when the window closes, after the recomputation has stopped (the views stop
        #: their own background work here).
        self.on_close: list[Any] = []
        self._disconnects: list[Any] = []
        self.setObjectName("main_window")
        self.resize(1280, 820)

        self.actions_ = create_actions(self)
        self._build_layout()
        self.actions_.recent_menu.aboutToShow.connect(self._fill_recent_menu)
        self.settings.changed.connect(self._on_settings_changed)
        self._on_settings_changed("units")
        self._on_settings_changed("palette")
        geometry, state = self.settings.window_state()
        if geometry is not None:
            self.restoreGeometry(geometry)
        if state is not None:
            self.restoreState(state)
        split = self.settings.splitter_state()
        if split is not None and self.splitter.restoreState(split):
            self._split_restored = True
        self.load_document(document or Document(blank_building()))
        QTimer.singleShot(WARM_UP_DELAY_MS, _warm_up_unit_parser)

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

        self.results_model = ResultsTableModel(self.options, self)
        self.results_table = QTableView()
        self.results_table.setObjectName("results_table")
        self.results_table.setModel(self.results_model)
        self.results_table.setSelectionBehavior(QAbstractItemView.SelectionBehavior.SelectRows)
        self.results_table.setEditTriggers(QAbstractItemView.EditTrigger.NoEditTriggers)
        self.results_table.verticalHeader().hide()
        self.results_table.verticalHeader().setDefaultSectionSize(22)
        header = self.results_table.horizontalHeader()
        header.setSectionResizeMode(QHeaderView.ResizeMode.Interactive)
        header.setStretchLastSection(True)
        keep_columns_fitted(self.results_table)
        self.results_table.doubleClicked.connect(self._on_result_activated)
        self.results_state = QLabel("Computing results…")
        self.results_state.setObjectName("results_state")
        results = QWidget()
        results_layout = QVBoxLayout(results)
        results_layout.setContentsMargins(2, 2, 2, 2)
        results_layout.addWidget(self.results_state)
        results_layout.addWidget(self.results_table, 1)
        self.add_view("Ranked openings", results)

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
        self.samples_label = QLabel()
        self.samples_label.setObjectName("samples_label")
        status = self.statusBar()
        status.addWidget(self.status_label, 1)
        status.addPermanentWidget(self.progress)
        status.addPermanentWidget(self.samples_label)

    def showEvent(self, event: QShowEvent) -> None:
        super().showEvent(event)
        if not self._split_restored:  # the first time: the default share, once laid out
            self._split_restored = True
            self.set_editor_share(EDITOR_SHARE)
            QTimer.singleShot(0, lambda: self.set_editor_share(EDITOR_SHARE))

    def set_editor_share(self, share: float) -> None:
        """Give the editors ``share`` (0–1) of the splitter's height, the views the rest."""
        total = sum(self.splitter.sizes()) or max(self.splitter.height(), 600)
        editors = int(share * total + 0.5)  # pixels, to the nearest
        self.splitter.setSizes([editors, total - editors])

    def add_view(self, name: str, widget: QWidget) -> int:
        """Add a result view as a tab of the lower area; returns its tab index."""
        widget.setObjectName(widget.objectName() or f"view_{name}")
        return self.view_tabs.addTab(widget, name)

    # --- the document -----------------------------------------------------------------------------

    def load_document(self, doc: Document) -> None:
        """Show ``doc`` (its history starts empty); rebuilds the editors."""
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
        self.document = doc
        self.history = History(doc)
        a = self.actions_
        self.openings_panel = OpeningsPanel(doc, self.history, self.options, host=self,
                                            place_hint=self._place_hint)
        self.floors_panel = FloorsPanel(doc, self.history, self.options, actions=[a.copy_floor])
        self.site_panel = SitePanel(doc, self.history, self.options)
        self.building_panel = BuildingPanel(doc, self.history, self.options)
        self.building_panel.code_profile_picked.connect(self.set_units)
        self._panels = [self.openings_panel, self.floors_panel, self.site_panel,
                        self.building_panel]
        for panel, name in ((self.openings_panel, "Openings"), (self.floors_panel, "Floors"),
                            (self.site_panel, "Facades and surfaces below"),
                            (self.building_panel, "Building and cats")):
            self.editor_tabs.addTab(_scrolled(panel), name)
        self.editor_tabs.setCurrentIndex(max(current, 0))
        self._disconnects = [doc.on_changed("*", self._on_doc_changed),
                             self.history.on_changed(self._update_undo_actions)]
        self._update_title()
        self._update_undo_actions()
        self._start_in_profile_units(doc)
        self.plan_settings_changed.emit(doc.building.plan)
        self.recompute()

    def show_editor(self, panel: QWidget) -> None:
        """Bring the editor tab that holds ``panel`` to the front."""
        for i in range(self.editor_tabs.count()):
            page = self.editor_tabs.widget(i)
            if page is panel or (isinstance(page, QScrollArea) and page.widget() is panel):
                self.editor_tabs.setCurrentIndex(i)
                return

    def _on_doc_changed(self, kind: str) -> None:
        if kind in PLAN_ONLY_KINDS:
            self.plan_settings_changed.emit(self.document.building.plan)
        elif kind in MODEL_KINDS:
            self.recompute()
        if kind in MODEL_KINDS:
            delay_s = self._autosave_schedule.edited(time.monotonic())
            self._autosave_timer.start(int(delay_s * 1000))
        elif kind in ("dirty", "path"):
            self._update_title()
            if kind == "dirty" and not self.document.dirty:
                self._autosave_timer.stop()
                self._autosave_schedule.written()
                self.recovery.discard()

    def _update_title(self) -> None:
        self.setWindowTitle(f"{self.document.display_name}[*] — {APP_TITLE}")
        self.setWindowModified(self.document.dirty)

    def _update_undo_actions(self) -> None:
        h = self.history
        self.actions_.undo.setEnabled(h.can_undo)
        self.actions_.redo.setEnabled(h.can_redo)
        self.actions_.undo.setText(f"&Undo {h.undo_label}" if h.can_undo else "&Undo")
        self.actions_.redo.setText(f"&Redo {h.redo_label}" if h.can_redo else "&Redo")

    def undo(self) -> None:
        self.history.undo()

    def redo(self) -> None:
        self.history.redo()

    def push(self, cmd: Any) -> str | None:
        """Push an edit; on refusal show why in the status bar and return the reason."""
        reason = push_command(self.history, cmd, self.options.units)
        if reason is not None:
            self.status_label.setText(f"! Not changed: {reason}")
            self.status_label.setStyleSheet(ERROR_STYLE)
        else:
            self.status_label.setStyleSheet("")
            self.status_label.setText(cmd.label)
        return reason

    # --- recomputation ----------------------------------------------------------------------------

    def recompute(self) -> None:
        """Start computing results for the current building; the shown ones become stale."""
        self.results_model.set_stale(True)
        self.results_state.setText("Results are out of date: recomputing…")
        self.progress.setRange(0, 0)
        self.progress.show()
        self.recomputer.request(self.document.building)

    @property
    def results_stale(self) -> bool:
        return self.results_model.stale

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
        self.results_samples = self.recomputer.samples
        self._show_samples("quick" if self.recomputer.refines else "final")
        self.results_model.set_assessment(assessment)
        self.progress.hide()
        self._show_ranked(assessment)
        self.results_updated.emit(assessment)

    def _show_ranked(self, assessment: Any) -> None:
        self.results_state.setStyleSheet("")  # a failure shown before is over
        n = len(getattr(assessment, "openings", ()))
        self.results_state.setText(
            f"{n} openings ranked, worst first (by risk score, as in the PDF and the exports). "
            f"Double-click a row to edit the opening.")

    def _on_refining(self, _generation: int) -> None:
        self._show_samples("refining")
        self.progress.setRange(0, 0)
        self.progress.show()

    def _on_refined(self, _generation: int, assessment: Any, seconds: float) -> None:
        # after the quick results, or at once when an edit changed few openings' falls
        self.last_compute_s = seconds
        self.results_samples = self.recomputer.refine_samples
        self._show_samples("final")
        self.progress.hide()
        self._show_ranked(assessment)
        self.results_model.set_assessment(assessment)
        self.results_updated.emit(assessment)
        self.results_refined.emit(assessment)

    def _on_results_failed(self, _generation: int, message: str) -> None:
        self.progress.hide()
        self.results_state.setText(f"! Results could not be computed: {message}")
        self.results_state.setStyleSheet(ERROR_STYLE)
        self.results_failed.emit(message)

    def _on_result_activated(self, index: QModelIndex) -> None:
        opening_id = self.results_model.row_result(index.row()).id
        self.show_editor(self.openings_panel)
        self.openings_panel.select_ids([opening_id])

    # --- files ------------------------------------------------------------------------------------

    def confirm_discard(self) -> bool:
        """True if the current work may be replaced: saved, or the user chose to save/discard."""
        if not self.document.dirty:
            return True
        answer = self.prompts.ask_save_changes(self, self.document.display_name)
        if answer == "save":
            return self.save()
        return answer == "discard"

    def new_document(self) -> bool:
        if not self.confirm_discard():
            return False
        self.recovery.discard()
        self.load_document(Document(blank_building()))
        return True

    def open_dialog(self) -> bool:
        folder = self.document.path.parent if self.document.path else None
        if not self.confirm_discard():
            return False
        path = self.prompts.open_path(self, folder)
        return self.open_file(path, confirm=False) if path else False

    def open_file(self, path: Path, *, confirm: bool = True) -> bool:
        """Open the building file at ``path``; problems are shown, the current work kept."""
        from petfall_audit.io.building_file import load_building

        if confirm and not self.confirm_discard():
            return False
        try:
            building = load_building(path)
        except ValidationFailed as exc:
            known = exc.building if isinstance(exc.building, Building) else None
            self.prompts.show_error(self, "Cannot open the building file",
                                    f"{Path(path).name}:\n"
                                    + problem_words(exc.problems, known, limit=10, sep="\n"))
            return False
        except BuildingFileError as exc:
            self.prompts.show_error(self, "Cannot open the building file",
                                    f"{Path(path).name}:\n{exc}")
            return False
        self.recovery.discard()
        self.load_document(Document(building, Path(path)))
        self.settings.add_recent(Path(path))
        self.status_label.setText(f"Opened {Path(path).name}")
        return True

    def save(self) -> bool:
        """Save to the document's file (asks for one if it has none)."""
        from petfall_audit.io.building_file import save_building

        if self.document.path is None:
            return self.save_as()
        path = self.document.path
        if self.document.changed_on_disk() and not self.prompts.ask_overwrite_changed(
                self, path.name):
            return False
        try:
            save_building(self.document.building, path)
        except (OSError, ValueError) as exc:
            self.prompts.show_error(self, "Cannot save", f"{path}:\n{exc}")
            return False
        self.document.remember_disk_state()
        self.history.set_clean()
        self.recovery.discard()
        self.settings.add_recent(path)
        self.status_label.setStyleSheet("")
        self.status_label.setText(f"Saved {path.name}")
        return True

    def save_as(self, path: Path | None = None) -> bool:
        if path is None:
            name = self.document.building.info.name or "building"
            suggested = (self.document.path or Path.home() / f"{name}.json")
            path = self.prompts.save_path(self, suggested)
            if path is None:
                return False
        old = self.document.path
        self.document.path = Path(path)
        if not self.save():
            self.document.path = old
            return False
        return True

    def _fill_recent_menu(self) -> None:
        menu = self.actions_.recent_menu
        menu.clear()
        recent = self.settings.recent_files()
        for path in recent:
            action = menu.addAction(str(path))
            action.triggered.connect(lambda _c=False, p=path: self.open_file(p))
        if not recent:
            menu.addAction("(none yet)").setEnabled(False)
        else:
            menu.addSeparator()
            menu.addAction("Clear list", self.settings.clear_recent)

    # --- recovery ---------------------------------------------------------------------------------

    def autosave_now(self) -> Path | None:
        """Write the recovery copy of unsaved work now (or remove it if all is saved)."""
        self._autosave_timer.stop()
        self._autosave_schedule.written()
        if not self.document.dirty:
            self.recovery.discard()
            return None
        try:
            return self.recovery.write(self.document.building, self.document.path)
        except (OSError, ValueError) as exc:
            self.status_label.setText(f"! Recovery copy not written: {exc}")
            return None

    def offer_recovery(self) -> bool:
        """Offer, one by one, the unsaved work that apps which ended left behind; True if any
        was recovered. The first accepted copy opens here (unless this window has unsaved work),
        the others in windows of their own. A copy is deleted only once the user has decided
        about it, and a recovered copy only after its window has written its own."""
        recovered = False
        for rec in autosave.find_recoveries():
            if not rec.path.exists():  # another window decided about it meanwhile
                continue
            if not self.prompts.ask_recover(self, rec):
                autosave.discard_recovery(rec)
                continue
            try:
                building = autosave.load_recovery(rec)
            except BuildingFileError as exc:
                self.prompts.show_error(
                    self, "Cannot recover",
                    f"The recovery copy from {rec.saved_at_text} is damaged and cannot be "
                    f"opened; it has been discarded.\n\n{exc}")
                autosave.discard_recovery(rec)
                continue
            doc = Document(building, rec.source_path)
            if recovered or self.document.dirty:
                target = self._open_extra_window(doc)
            else:
                self.load_document(doc)
                target = self
            target.history.forget_clean()
            if target.autosave_now() is not None:  # its own copy first, then the old one goes
                autosave.discard_recovery(rec)
            recovered = True
        return recovered

    def _open_extra_window(self, doc: Document) -> MainWindow:
        """A new window on ``doc`` (a further recovered building), shown beside this one."""
        if self.window_factory is not None:
            window: MainWindow = self.window_factory(doc)
        else:
            window = MainWindow(doc, settings=self.settings, prompts=self.prompts,
                                samples=self.recomputer.samples,
                                refine_samples=self.recomputer.refine_samples)
        window.window_factory = self.window_factory
        self.extra_windows.append(window)
        window.show()
        return window

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

    # --- closing ----------------------------------------------------------------------------------

    def closeEvent(self, event: QCloseEvent) -> None:
        if not self.confirm_discard():
            event.ignore()
            return
        self._autosave_timer.stop()
        self.recomputer.shutdown()  # waits for the worker threads to end
        for stop in self.on_close:
            stop()
        self.recovery.discard()
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
