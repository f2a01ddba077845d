"""File ▸ Export: the audit PDF, the tenant leaflet PDF, the results and the fix plan as CSV or
JSON, from the app.

Every export recomputes the building with the full number of simulated cats (the window uses
fewer while editing) and the plan at the budget set in the fix plan view, off the GUI thread with
progress, then calls the Qt-free writers: :func:`petfall_audit.report.write_audit`,
:func:`petfall_audit.report.write_leaflet`, :func:`petfall_audit.report.export_results` and
:mod:`petfall_audit.io.plan_export`. The leaflet's contact block comes from the settings.
"""

from __future__ import annotations

import re
from collections.abc import Callable, Sequence
from pathlib import Path
from typing import Any

from PySide6.QtCore import QObject, Qt, Signal
from PySide6.QtGui import QAction
from PySide6.QtWidgets import (
    QDialog,
    QFileDialog,
    QMenu,
    QMessageBox,
    QProgressDialog,
    QWidget,
)

from petfall_audit.gui.views.common import Task, run_task
from petfall_audit.io.atomic import same_file
from petfall_audit.model import Building

__all__ = ["ExportActions", "ExportPrompts", "EXPORTS", "report_inputs"]

#: kind -> (menu text, file filter, suffix)
EXPORTS: dict[str, tuple[str, str, str]] = {
    "audit_pdf": ("Audit report (&PDF)…", "PDF (*.pdf)", ".pdf"),
    "leaflet_pdf": ("Tenant &leaflet (PDF)…", "PDF (*.pdf)", ".pdf"),
    "results_csv": ("&Results as CSV…", "CSV (*.csv)", ".csv"),
    "results_json": ("Results as &JSON…", "JSON (*.json)", ".json"),
    "plan_csv": ("Fix &plan as CSV…", "CSV (*.csv)", ".csv"),
    "plan_json": ("Fix plan as J&SON…", "JSON (*.json)", ".json"),
}
_SUFFIX_NAME = {"audit_pdf": "audit", "leaflet_pdf": "leaflet", "results_csv": "results",
                "results_json": "results", "plan_csv": "plan", "plan_json": "plan"}


class ExportPrompts:
    """File chooser and messages of the exports (replace in tests)."""

    def save_path(self, parent: QWidget | None, title: str, suggested: Path,
                  file_filter: str) -> Path | None:
        name, _ = QFileDialog.getSaveFileName(parent, title, str(suggested), file_filter)
        return Path(name) if name else None

    def show_error(self, parent: QWidget | None, title: str, text: str) -> None:
        QMessageBox.warning(parent, title, text)

    def leaflet_choice(self, parent: QWidget | None, defaults: Sequence[Any],
                       current: Any) -> Any:
        """The leaflet's sections as the user chose and edited them (``None``: cancelled)."""
        from petfall_audit.gui.leaflet_dialog import LeafletDialog

        dialog = LeafletDialog(defaults, current, parent)
        return dialog.choice() if dialog.exec() == QDialog.DialogCode.Accepted else None


#: The budget of an export whose plan takes the default budget
#: (:func:`petfall_audit.fixes.default_budget` of the full assessment's options).
DEFAULT_BUDGET = "default"


def report_inputs(building: Building, *, samples: int, seed: int, budget: float | str | None,
                  progress: Callable[[int, int], None] | None = None) -> tuple[Any, Any]:
    """The full assessment of ``building`` and its plan at ``budget`` (``None``: no plan;
    :data:`DEFAULT_BUDGET`: the default budget, as the fix plan view proposes it)."""
    from petfall_audit.plan import make_plan
    from petfall_audit.risk import assess

    assessment = assess(building, samples=samples, seed=seed, progress=progress)
    if budget is None:
        return assessment, None
    if budget == DEFAULT_BUDGET:
        from petfall_audit.fixes import default_budget, load_catalogue, opening_options

        catalogue = load_catalogue()
        options = opening_options(assessment, catalogue)
        return assessment, make_plan(assessment, default_budget(options), catalogue=catalogue,
                                     options=options)
    return assessment, make_plan(assessment, float(budget))


def _write(kind: str, assessment: Any, plan: Any, path: Path, contact: dict[str, str],
           photo_root: Path | None = None, *, budget_is_default: bool = False,
           leaflet: Any = None) -> list[Path]:
    from petfall_audit.io.atomic import atomic_write_text

    if kind == "audit_pdf":
        from petfall_audit.report import write_audit
        from petfall_audit.report.context import ReportOptions

        options = ReportOptions(budget_is_default=budget_is_default)
        return [write_audit(assessment, plan, path, photo_root=photo_root, options=options)]
    if kind == "leaflet_pdf":
        from petfall_audit.report import ContactBlock, write_leaflet

        return [write_leaflet(assessment, plan, path,
                              contact=ContactBlock.from_mapping(contact), choice=leaflet)]
    if kind in ("results_csv", "results_json"):
        from petfall_audit.report import export_results

        return export_results(assessment, None, path, "csv" if kind == "results_csv" else "json")
    if kind in ("plan_csv", "plan_json"):
        from petfall_audit.io import plan_export

        if plan is None:
            raise ValueError("there is no fix plan: set a budget in the fix plan view")
        if kind == "plan_csv":
            atomic_write_text(path, plan_export.plan_to_csv(plan))
        else:
            from petfall_audit.io.results_envelope import write_results_json

            write_results_json(path, plan=plan)
        return [path]
    raise ValueError(f"unknown export {kind!r}")


def _write_error(path: Path, exc: OSError) -> str:
    """Why ``path`` could not be written, in plain words (no temporary file names)."""
    if isinstance(exc, FileNotFoundError) or not path.parent.is_dir():
        why = "the folder does not exist"
    elif isinstance(exc, PermissionError):
        why = "permission denied (the folder or the file is read-only, or the file is open in "\
              "another program)"
    elif isinstance(exc, IsADirectoryError) or path.is_dir():
        why = "a folder of that name is in the way"
    else:
        why = exc.strerror or str(exc)
    return f"cannot write {path.name} in {path.parent}: {why}. Nothing was written."


def _plain(message: str) -> str:
    """A worker's failure without the exception class name in front."""
    return re.sub(r"^(?:[\w.]+(?:Error|Exception)): ", "", message)


class ExportActions(QObject):
    """The export actions of ``window`` and the File ▸ Export menu that holds them.

    ``budget()`` gives the plan's budget (``None``: no plan, :data:`DEFAULT_BUDGET`: the
    default one, worked out with the export); ``budget_is_default()`` whether
    it is a default the app proposed. ``finished(paths)`` or ``failed(message)`` after each
    export."""

    finished = Signal(object)  # list[Path]
    failed = Signal(str)

    def __init__(self, window: Any, *, budget: Callable[[], float | str | None],
                 budget_is_default: Callable[[], bool] = lambda: False,
                 prompts: ExportPrompts | None = None, samples: int | None = None,
                 parent: QObject | None = None) -> None:
        super().__init__(parent or window)
        from petfall_audit.sampling import DEFAULT_SAMPLES

        self.window = window
        self.prompts = prompts or ExportPrompts()
        self.samples = samples or DEFAULT_SAMPLES
        self._budget = budget
        self._budget_is_default = budget_is_default
        self.task: Task | None = None
        #: The leaflet's sections as last chosen in this session (``None``: the defaults).
        self.leaflet_choice: Any = None
        self._dialog: QProgressDialog | None = None
        self.actions: dict[str, QAction] = {}
        self.menu = QMenu("&Export", window)
        self.menu.setObjectName("export_menu")
        for kind, (text, _filter, _suffix) in EXPORTS.items():
            action = QAction(text, window)
            action.setObjectName(f"export_{kind}")
            action.triggered.connect(lambda _c=False, k=kind: self.export(k))
            self.actions[kind] = action
            self.menu.addAction(action)
            if kind == "leaflet_pdf":
                self.menu.addSeparator()
        self.actions["audit_pdf"].setShortcut("Ctrl+P")
        self.actions["audit_pdf"].setStatusTip(
            "Recompute with the full number of simulated cats and write the PDF audit")

    @property
    def running(self) -> bool:
        return self.task is not None and self.task.running

    def export(self, kind: str, path: Path | None = None) -> Task | None:
        """Export ``kind`` (a key of :data:`EXPORTS`) to ``path`` (asks if ``None``, and for the
        leaflet first asks for its sections); runs off the GUI thread and returns the task, or
        ``None`` if nothing was started."""
        if self.running:
            self.prompts.show_error(self.window, "Export", "An export is already running.")
            return None
        text, file_filter, suffix = EXPORTS[kind]
        doc = self.window.document
        if path is None and kind == "leaflet_pdf":
            from petfall_audit.code_profile import building_profile
            from petfall_audit.report.leaflet_sections import default_sections

            defaults = default_sections(building_profile(doc.building))
            choice = self.prompts.leaflet_choice(self.window, defaults, self.leaflet_choice)
            if choice is None:
                return None
            self.leaflet_choice = choice
        if path is None:
            stem = (doc.path.stem if doc.path else (doc.building.info.name or "building"))
            folder = doc.path.parent if doc.path else Path.home()
            suggested = folder / f"{stem}-{_SUFFIX_NAME[kind]}{suffix}"
            path = self.prompts.save_path(self.window, text.replace("&", "").rstrip("…"),
                                          suggested, file_filter)
            if path is None:
                return None
            if not Path(path).suffix:  # "audit" typed without an extension
                path = Path(path).with_suffix(suffix)
        path = Path(path)
        if doc.path is not None and same_file(path, doc.path):
            self.prompts.show_error(self.window, "Export",
                                    f"{path.name} is this building's own file. Choose another "
                                    "file name, so that the audit is kept.")
            return None
        budget = self._budget()
        is_default = bool(self._budget_is_default())
        if kind.startswith("plan") and budget is None:
            self.prompts.show_error(self.window, "Export", "Set a budget in the fix plan first.")
            return None
        building = doc.building
        samples, seed = self.samples, self.window.recomputer.seed
        contact = dict(self.window.settings.contact())
        photo_root = doc.path.parent if doc.path is not None else None  # photos are beside it
        pdf = kind.endswith("_pdf")
        leaflet = self.leaflet_choice

        def work(progress: Callable[[int, int], None]) -> list[Path]:
            assessment, plan = report_inputs(building, samples=samples, seed=seed,
                                             budget=budget, progress=progress)
            try:
                return _write(kind, assessment, plan, path, contact, photo_root,
                              budget_is_default=is_default, leaflet=leaflet)
            except OSError as exc:  # the writers leave no partial file behind
                raise OSError(_write_error(path, exc)) from None

        self.task = run_task(work, parent=self, with_progress=True)
        self.task.finished.connect(self._on_finished)
        self.task.failed.connect(self._on_failed)
        if pdf:
            dialog = QProgressDialog(f"Writing {path.name}: simulating {samples} cats per "
                                     "opening…", "Cancel", 0, 0, self.window)
            dialog.setWindowTitle("Export")
            dialog.setWindowModality(Qt.WindowModality.WindowModal)
            dialog.setMinimumDuration(300)
            dialog.canceled.connect(self._on_cancel)
            self.task.progress.connect(self._on_progress)
            self._dialog = dialog
        self.window.status_label.setText(f"Exporting {path.name}…")
        return self.task

    def _on_cancel(self) -> None:
        if self.task is not None:
            self.task.cancel()
        self._close_dialog()
        self.window.status_label.setText("Export cancelled")

    def _on_progress(self, done: int, total: int) -> None:
        if self._dialog is not None:
            self._dialog.setRange(0, max(total, 1) + 1)  # the last step lays out the PDF
            self._dialog.setValue(done)

    def _close_dialog(self) -> None:
        if self._dialog is not None:
            self._dialog.reset()
            self._dialog.deleteLater()
            self._dialog = None

    def _on_finished(self, paths: list[Path]) -> None:
        self._close_dialog()
        self.window.status_label.setText("Exported " + ", ".join(p.name for p in paths))
        self.finished.emit(paths)

    def _on_failed(self, message: str) -> None:
        self._close_dialog()
        if self.task is not None and self.task.cancelled:
            self.window.status_label.setText("Export cancelled")
        else:
            message = _plain(message)
            self.window.status_label.setText(f"! Export failed: {message}")
            self.prompts.show_error(self.window, "Export failed", message)
        self.failed.emit(message)
