"""Shared pieces of the result views: the selection every view follows, a background task
runner and band styling for Qt (numbers and names: :mod:`petfall_audit.present`).

The views never reach the window: each is given a :class:`ViewContext` of the window's typed
state (:mod:`petfall_audit.editing.state`): the current results, the selection, the workspace
to push edits to, the display options and how to assess another building.
"""

from __future__ import annotations

import traceback
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from PySide6.QtCore import QEvent, QObject, QRunnable, Qt, QThreadPool, Signal, Slot
from PySide6.QtGui import QBrush, QColor, QFont
from PySide6.QtWidgets import QLabel, QWidget

from petfall_audit.editing.state import CurrentResults, Event, Selection, WindowState, Workspace
from petfall_audit.gui.adapters import ViewOptions
from petfall_audit.palette import BandStyle, band_style
from petfall_audit.present import Units, units_of

__all__ = [
    "Selection",
    "Task",
    "run_task",
    "wait_for_tasks",
    "stop_tasks",
    "band_brush",
    "band_qstyle",
    "StaleLabel",
    "ViewContext",
    "Assessor",
    "load_earlier_building",
    "WhileHidden",
]


# --- a view that is not on screen ----------------------------------------------------------------


class WhileHidden(QObject):
    """Holds the updates of a view that is not on screen until it is shown or the user pauses.

    The views sit in tabs of one window: only one of them is on screen, and redrawing all the
    others after every result would make the one the user looks at wait. ``follow(event, fn)``
    connects ``fn`` to ``event``; while the view is hidden in a shown window, a call is kept
    (the latest arguments of each ``fn``, in the order of the latest calls) and made when the
    view is shown, or once no new result has come for :data:`CATCH_UP_MS` (the hidden views
    then catch up one at a time, so that the window answers in between). The views follow
    new results and their out-of-date look this way; a selection or a change of units reaches
    every view at once. A view in a window that was never shown (a test, an export) updates
    at once.
    """

    #: Pause (ms) after the last held call before the hidden views catch up.
    CATCH_UP_MS = 400
    _queue: list[WhileHidden] = []  # views with held calls, oldest first
    _timer: Any = None

    def __init__(self, view: QWidget) -> None:
        super().__init__(view)
        self._view = view
        self._pending: dict[Callable[..., Any], tuple[Any, ...]] = {}
        view.installEventFilter(self)
        self.destroyed.connect(lambda *_: WhileHidden._forget(self))

    @property
    def holding(self) -> bool:
        """True while calls are kept: the window is on screen and the view is not."""
        return self._view.window().isVisible() and not self._view.isVisible()

    def follow(self, event: Any, fn: Callable[..., Any]) -> None:
        """Connect ``fn`` to ``event`` (an :class:`Event` or a Qt signal), held while hidden
        (through a relay owned by the view, so a Qt signal lets go of it with the view)."""
        event.connect(_Relay(self, fn).fire)

    def call(self, fn: Callable[..., Any], *args: Any) -> None:
        """``fn(*args)`` now, or when the view is shown or the user pauses."""
        self._pending.pop(fn, None)
        if not self.holding:
            fn(*args)
            return
        self._pending[fn] = args
        if self not in WhileHidden._queue:
            WhileHidden._queue.append(self)
        WhileHidden._restart(WhileHidden.CATCH_UP_MS)

    def flush(self) -> None:
        """Make the kept calls now."""
        WhileHidden._forget(self)
        while self._pending:
            fn = next(iter(self._pending))
            fn(*self._pending.pop(fn))

    def eventFilter(self, watched: QObject, event: QEvent) -> bool:  # noqa: N802 (Qt name)
        if watched is self._view and event.type() == QEvent.Type.Show and self._pending:
            self.flush()
        return False

    @staticmethod
    def _forget(hidden: WhileHidden) -> None:
        if hidden in WhileHidden._queue:
            WhileHidden._queue.remove(hidden)

    @staticmethod
    def _restart(msecs: int) -> None:
        if WhileHidden._timer is None:
            from PySide6.QtCore import QTimer

            timer = QTimer()
            timer.setSingleShot(True)
            timer.timeout.connect(WhileHidden._catch_up)
            WhileHidden._timer = timer
        WhileHidden._timer.start(msecs)

    @staticmethod
    def _catch_up() -> None:
        """One hidden view catches up; the next one after the window had its turn."""
        if WhileHidden._queue:
            WhileHidden._queue[0].flush()
        if WhileHidden._queue:
            WhileHidden._restart(0)


class _Relay(QObject):
    """One followed call of a :class:`WhileHidden`, as a method of an object the view owns."""

    def __init__(self, hidden: WhileHidden, fn: Callable[..., Any]) -> None:
        super().__init__(hidden)
        self._hidden = hidden
        self._fn = fn

    def fire(self, *args: Any) -> None:
        self._hidden.call(self._fn, *args)


# --- an earlier audit ---------------------------------------------------------------------------


def load_earlier_building(prompts: Any, parent: QWidget,
                          path: Path | str | None = None) -> tuple[Any, Path] | str | None:
    """The building of an earlier audit's file and its path: ``path``, or the file the user
    picks (``None`` when they cancel); a plain message (``str``) when the file cannot be read."""
    from petfall_audit.errors import BuildingFileError
    from petfall_audit.io.building_file import load_building

    if path is None:
        path = prompts.open_path(parent)
        if path is None:
            return None
    try:
        return load_building(path), Path(path)
    except BuildingFileError as exc:
        return f"Cannot open {Path(path).name}: {exc}"


# --- background work --------------------------------------------------------------------------


class _TaskRelay(QObject):
    done = Signal(object)
    failed = Signal(str)
    progress = Signal(int, int)


class Task(QObject):
    """One function run on a pool thread. ``finished(result)``, ``failed(message)`` and
    ``progress(done, total)`` arrive queued in the GUI thread; ``cancel()`` drops the result."""

    finished = Signal(object)
    failed = Signal(str)
    progress = Signal(int, int)

    def __init__(self, parent: QObject | None = None) -> None:
        super().__init__(parent)
        self.cancelled = False
        self.running = True
        self._relay = _TaskRelay(self)
        self._relay.done.connect(self._on_done)
        self._relay.failed.connect(self._on_failed)
        self._relay.progress.connect(self._on_progress)

    def cancel(self) -> None:
        self.cancelled = True

    @Slot(object)
    def _on_done(self, result: object) -> None:
        self.running = False
        _LIVE.discard(self)
        if not self.cancelled:
            self.finished.emit(result)

    @Slot(str)
    def _on_failed(self, message: str) -> None:
        self.running = False
        _LIVE.discard(self)
        if not self.cancelled:
            self.failed.emit(message)

    @Slot(int, int)
    def _on_progress(self, done: int, total: int) -> None:
        if not self.cancelled:
            self.progress.emit(done, total)


class _Cancelled(Exception):
    pass


class _Runnable(QRunnable):
    def __init__(self, task: Task, fn: Callable[..., Any], with_progress: bool) -> None:
        super().__init__()
        self.setAutoDelete(True)
        self._task = task
        self._relay = task._relay
        self._fn = fn
        self._with_progress = with_progress

    def run(self) -> None:
        task, relay = self._task, self._relay

        def progress(done: int, total: int) -> None:
            if task.cancelled:
                raise _Cancelled
            relay.progress.emit(int(done), int(total))

        try:
            try:
                result = self._fn(progress) if self._with_progress else self._fn()
            except _Cancelled:
                relay.failed.emit("cancelled")
                return
            except Exception as exc:  # shown to the user; the window keeps working
                relay.failed.emit(traceback.format_exception_only(type(exc), exc)[-1].strip())
                return
            relay.done.emit(result)
        except RuntimeError:  # the receiver was deleted (the window closed): drop the result
            return


_POOL: QThreadPool | None = None
_LIVE: set[Task] = set()  # started and not yet reported back


def _pool() -> QThreadPool:
    global _POOL
    if _POOL is None:
        _POOL = QThreadPool()
        _POOL.setMaxThreadCount(1)  # one background job at a time beside the recomputer
    return _POOL


def run_task(fn: Callable[..., Any], *, parent: QObject | None = None,
             with_progress: bool = False) -> Task:
    """Run ``fn()`` (or ``fn(progress)`` with ``with_progress``) off the GUI thread.

    ``fn`` must take and return plain Python objects; connect to the returned task's signals
    before control returns to the event loop."""
    task = Task(parent)
    _LIVE.add(task)
    _pool().start(_Runnable(task, fn, with_progress))
    return task


def wait_for_tasks(msecs: int = 30000) -> bool:
    """Block until the view tasks are done (shutdown and tests)."""
    return _POOL is None or bool(_POOL.waitForDone(msecs))


def stop_tasks(msecs: int = 30000) -> bool:
    """Cancel every view task (those that report progress stop at the next report) and wait
    for the pool thread to end them; True if it did within ``msecs`` (the window is closing)."""
    for task in list(_LIVE):
        task.cancel()
    _LIVE.clear()
    if _POOL is None:
        return True
    _POOL.clear()  # tasks not started yet never start
    return bool(_POOL.waitForDone(msecs))


# --- bands ----------------------------------------------------------------------------------------


def band_qstyle(band: int | None, palette: str) -> BandStyle:
    """The palette style of ``band`` (-1 or ``None``: no result)."""
    return band_style(None if band is None or band < 0 else int(band), palette)


def band_brush(band: int | None, palette: str, pattern: Qt.BrushStyle | None = None) -> QBrush:
    """Solid fill of ``band``, or ``pattern`` drawn in the band's text colour."""
    style = band_qstyle(band, palette)
    if pattern is None:
        return QBrush(QColor(style.fill))
    return QBrush(QColor(style.text), pattern)


class StaleLabel(QLabel):
    """A one-line note over a view: what it shows, or that it is being recomputed."""

    def __init__(self, text: str = "", parent: QWidget | None = None) -> None:
        super().__init__(text, parent)
        self.setWordWrap(True)
        self.setTextFormat(Qt.TextFormat.PlainText)
        self.setObjectName("view_note")

    def set_stale(self, stale: bool) -> None:
        font = QFont(self.font())
        font.setItalic(stale)
        self.setFont(font)


@dataclass(frozen=True)
class Assessor:
    """How the window assesses a building, for a view that assesses another one (an earlier
    audit): ``assess(building, samples=..., seed=...)`` with the full count of falls."""

    assess: Callable[..., Any]
    seed: int
    samples: int


class ViewContext:
    """What a view is given: the current results, the selection, the display options and the
    workspace to push edits to (all typed; none of them is the window).

    ``assessment_changed(assessment)`` after each new result and ``stale_changed(bool)`` when
    a recomputation starts or ends are the results' own events."""

    def __init__(self, state: WindowState, options: ViewOptions, assessor: Assessor) -> None:
        self.state = state
        self.results: CurrentResults = state.results
        self.selection: Selection = state.selection
        self.workspace: Workspace = state.workspace
        self.options = options
        self.assessor = assessor
        self.plan: Any = None  # the fix plan view's current plan

    @property
    def assessment_changed(self) -> Event[Any]:
        return self.results.assessment_changed

    @property
    def stale_changed(self) -> Event[bool]:
        return self.results.stale_changed

    @property
    def assessment(self) -> Any:
        return self.results.assessment

    @property
    def stale(self) -> bool:
        return self.results.stale

    @property
    def units(self) -> Units:
        return units_of(self.options.units)

    @property
    def palette(self) -> str:
        return str(self.options.palette)

    def push(self, cmd: Any) -> str | None:
        """Push an edit to the workspace's history; the refusal reason or ``None``."""
        return self.workspace.push(cmd, self.options.units)

    def select(self, ids: Sequence[str]) -> None:
        self.selection.set_ids(ids)

    def derived(self) -> ViewContext:
        """A context of its own results and selection (e.g. an earlier audit shown beside this
        one), with the same options, workspace and assessor."""
        state = WindowState(workspace=self.workspace,
                            results=CurrentResults(self.results.final_samples),
                            options=self.state.options, selection=Selection())
        return ViewContext(state, self.options, self.assessor)

    def set_assessment(self, assessment: Any) -> None:
        """Show ``assessment`` in this context (a derived one: the window's own results come
        from its recomputation)."""
        self.results.set_assessment(assessment, getattr(assessment, "samples", None))
