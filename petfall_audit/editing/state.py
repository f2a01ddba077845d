"""What a window shows, as typed objects without Qt: the document being edited and its
history (:class:`Workspace`), the display options, the selected openings and the current
assessment. The desktop window builds its views from these, one object per concern (a view
takes only what it shows), and a test can drive every one of them without a screen.

Each object tells about its changes through :class:`Event` (``event.connect(fn)``), called
synchronously in the thread that made the change (the GUI thread in the app).
"""

from __future__ import annotations

from collections.abc import Callable, Iterable
from dataclasses import dataclass, field
from typing import Any, Generic, TypeVar

from petfall_audit.editing.commands import Command, EditRefused
from petfall_audit.editing.document import PLAN_ONLY_KINDS, Document
from petfall_audit.editing.history import History
from petfall_audit.editing.words import problem_words
from petfall_audit.model import PlanSettings

__all__ = ["Event", "Selection", "DisplayOptions", "CurrentResults", "Workspace",
           "WindowState", "push_command"]

T = TypeVar("T")


class Event(Generic[T]):
    """A list of callbacks called with one value on :meth:`emit` (``Event[None]``: no value).

    Shaped like a Qt signal (``connect``/``disconnect``/``emit``) so views connect to either.
    """

    def __init__(self) -> None:
        self._callbacks: list[Callable[..., Any]] = []

    def connect(self, callback: Callable[..., Any]) -> Callable[[], None]:
        """Call ``callback(value)`` (or ``callback()`` for ``Event[None]``) on each emit;
        returns a function that disconnects it."""
        self._callbacks.append(callback)
        return lambda: self.disconnect(callback)

    def disconnect(self, callback: Callable[..., Any]) -> None:
        if callback in self._callbacks:
            self._callbacks.remove(callback)

    def emit(self, *value: Any) -> None:
        for callback in list(self._callbacks):
            callback(*value)


def push_command(history: History, cmd: Command, system: str = "metric") -> str | None:
    """Push ``cmd``; return ``None`` on success or the plain-words reason it was refused (its
    numbers in the units of ``system``)."""
    try:
        history.push(cmd)
    except EditRefused as exc:
        return problem_words(exc.problems, exc.building or history.doc.building, system=system)
    except ValueError as exc:
        return str(exc)
    return None


class Selection:
    """The openings selected in any view; ``changed(ids)`` with a tuple of ids, first =
    current."""

    def __init__(self) -> None:
        self.changed: Event[tuple[str, ...]] = Event()
        self._ids: tuple[str, ...] = ()

    @property
    def ids(self) -> tuple[str, ...]:
        return self._ids

    @property
    def current(self) -> str | None:
        """The first selected opening, or ``None``."""
        return self._ids[0] if self._ids else None

    def set_ids(self, ids: Iterable[str]) -> None:
        """Select ``ids`` (order kept, duplicates dropped); emits only on a change."""
        new = tuple(dict.fromkeys(str(i) for i in ids))
        if new != self._ids:
            self._ids = new
            self.changed.emit(new)


class DisplayOptions:
    """Display units (``"metric"``/``"imperial"``) and band palette; ``changed()`` on a
    change."""

    def __init__(self, units: str = "metric", palette: str = "standard") -> None:
        self.changed: Event[None] = Event()
        self._units = units
        self._palette = palette

    @property
    def units(self) -> str:
        return self._units

    @units.setter
    def units(self, value: str) -> None:
        if value != self._units:
            self._units = value
            self.changed.emit()

    @property
    def palette(self) -> str:
        return self._palette

    @palette.setter
    def palette(self, value: str) -> None:
        if value != self._palette:
            self._palette = value
            self.changed.emit()


class CurrentResults:
    """The assessment the views show, whether it is out of date, and how many simulated falls
    per opening are behind it.

    ``stale_changed(bool)`` when a recomputation starts or ends, then ``assessment_changed(a)``
    with each new result; ``failed(message)`` when a recomputation could not be done.
    ``final_samples``: the count of the full assessment (the command line's and the report's).
    """

    def __init__(self, final_samples: int) -> None:
        self.assessment_changed: Event[Any] = Event()
        self.stale_changed: Event[bool] = Event()
        self.failed: Event[str] = Event()
        self.final_samples = int(final_samples)
        self.assessment: Any = None
        self.samples: int | None = None
        self.stale = True
        self.failure: str | None = None

    @property
    def is_final(self) -> bool:
        """True when the shown results come from the full number of simulated falls."""
        return self.samples is not None and self.samples >= self.final_samples

    def set_assessment(self, assessment: Any, samples: int | None) -> None:
        """Show ``assessment`` (from ``samples`` falls per opening); it is current."""
        self.assessment = assessment
        self.samples = samples
        self.failure = None
        self.stale = False
        self.stale_changed.emit(False)
        self.assessment_changed.emit(assessment)

    def set_stale(self) -> None:
        """A recomputation started: the shown results are out of date."""
        if not self.stale:
            self.stale = True
            self.stale_changed.emit(True)

    def set_failed(self, message: str) -> None:
        self.failure = message
        self.failed.emit(message)


class Workspace:
    """The document being edited and its history; ``loaded(document)`` when another document
    replaces it (a new history starts), ``plan_settings_changed(settings)`` when the saved
    plan settings change (loaded, edited, undone), ``pushed((label, reason))`` after each edit
    pushed through :meth:`push` (``reason`` is ``None`` when it was done)."""

    def __init__(self, document: Document) -> None:
        self.loaded: Event[Document] = Event()
        self.pushed: Event[tuple[str, str | None]] = Event()
        self.plan_settings_changed: Event[PlanSettings] = Event()
        self.document = document
        self.history = History(document)
        self._disconnect = document.on_changed("*", self._on_changed)

    def load(self, document: Document) -> None:
        """Edit ``document`` from now on (its history starts empty)."""
        self._disconnect()
        self.document = document
        self.history = History(document)
        self._disconnect = document.on_changed("*", self._on_changed)
        self.loaded.emit(document)
        self.plan_settings_changed.emit(document.building.plan)

    @property
    def plan_settings(self) -> PlanSettings:
        return self.document.building.plan

    def push(self, cmd: Command, system: str = "metric") -> str | None:
        """Push an edit; the plain-words reason if it was refused (numbers in the units of
        ``system``), else ``None``."""
        reason = push_command(self.history, cmd, system)
        self.pushed.emit((cmd.label, reason))
        return reason

    def _on_changed(self, kind: str) -> None:
        if kind in PLAN_ONLY_KINDS:
            self.plan_settings_changed.emit(self.document.building.plan)


@dataclass
class WindowState:
    """Everything a window shows, each concern in its own object."""

    workspace: Workspace
    results: CurrentResults
    options: DisplayOptions = field(default_factory=DisplayOptions)
    selection: Selection = field(default_factory=Selection)
