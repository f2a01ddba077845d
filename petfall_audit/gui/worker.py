"""Recomputing the assessment off the GUI thread, quickly first, then in full.

:class:`Recomputer` runs ``assess(building, samples=, seed=, progress=)`` on a one-thread pool
with few cats per opening (:data:`INTERACTIVE_SAMPLES`), so that an edit shows its results at
once. When the quick result is in and the user pauses (:data:`REFINE_DELAY_MS`), the same
building is assessed again with the full count (:data:`REFINED_SAMPLES`, as the command line
and the audit report use) and the same seed, on a second one-thread pool, so that a quick run
never waits behind a refinement; its result replaces the quick one.

With the default assessment, every run is incremental (:class:`petfall_audit.reassess.
Reassessor`, one per sample count): it simulates only the openings whose falls the edits since
its previous run can have changed, and equals a full assessment exactly. When the full count's
incremental run of a request would simulate no more falls than a quick run (an edit of a few
openings), the request skips the quick run and the pause: its full results come at once
(``refined`` without ``finished``).

Each request gets a generation number; a newer request makes older runs stale: they stop at
their next progress report and their results are dropped. Results reach the GUI as signals
carrying plain Python objects, emitted in the GUI thread.

The worker threads never call Qt: a timer in the GUI thread collects finished runs and progress
(every few milliseconds, only while a run is pending), so every Qt call stays on the GUI thread.
"""

from __future__ import annotations

import threading
import time
import traceback
from collections.abc import Callable
from concurrent.futures import Future, ThreadPoolExecutor
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

from PySide6.QtCore import QObject, Qt, QTimer, Signal

from petfall_audit.model import Building

if TYPE_CHECKING:
    from petfall_audit.reassess import Reassessor

__all__ = [
    "Recomputer",
    "AssessFn",
    "INTERACTIVE_SAMPLES",
    "REFINED_SAMPLES",
    "REFINE_DELAY_MS",
    "default_assess",
]

AssessFn = Callable[..., Any]

#: Cat samples per opening while editing (results within ~150 ms on a 1,200-opening tower).
INTERACTIVE_SAMPLES = 256
#: Cat samples per opening of the refined results: the count of the command line and the report
#: (``petfall_audit.sampling.DEFAULT_SAMPLES``, not imported here to keep the start-up light).
REFINED_SAMPLES = 4000
#: Pause after a quick result before the refinement starts (ms): a burst of edits (typing,
#: spin-box arrows) does not start a full assessment after each step.
REFINE_DELAY_MS = 300
_POLL_MS = 4


def default_assess(building: Building, **kwargs: Any) -> Any:
    """:func:`petfall_audit.risk.assess`, imported on first use."""
    from petfall_audit.risk import assess

    return assess(building, **kwargs)


class _Cancelled(Exception):
    pass


@dataclass(frozen=True, slots=True)
class _Run:
    generation: int
    building: Building
    refined: bool
    future: Future[tuple[Any, float, bool]]  # result, compute time (s), full count


class Recomputer(QObject):
    """Schedules assessments; emits ``started``, ``progress``, ``finished`` and ``failed`` for
    the quick run of each request, then ``refining`` and ``refined`` for its full one.

    ``finished(generation, assessment, seconds)`` and ``refined(...)`` only for the newest
    request. ``refine_samples`` at or below ``samples`` turns the refinement off.
    """

    started = Signal(int)
    progress = Signal(int, int, int)  # generation, done, total (quick run or refinement)
    # With the default assessment, a request whose full results come as cheaply as quick ones
    # emits ``refined`` only (see the module docstring).
    finished = Signal(int, object, float)  # generation, assessment, compute time (s)
    failed = Signal(int, str)
    refining = Signal(int)  # generation: the full assessment has started
    refined = Signal(int, object, float)  # generation, full assessment, compute time (s)
    _done = Signal()  # a run ended (emitted from its worker thread, delivered in the GUI's)
    _kick = Signal()  # start the pending run once the current event-loop turn is over

    def __init__(self, assess: AssessFn | None = None, *, samples: int = INTERACTIVE_SAMPLES,
                 refine_samples: int = REFINED_SAMPLES, refine_delay_ms: int = REFINE_DELAY_MS,
                 seed: int = 1, parent: QObject | None = None) -> None:
        super().__init__(parent)
        #: the assessment of every run; the default runs incrementally (see ``incremental``)
        self.assess = assess or default_assess
        self._reassessors: dict[tuple[int, int], Reassessor] = {}
        self._reassessors_lock = threading.Lock()
        self.samples = samples
        self.refine_samples = refine_samples
        self.seed = seed
        self.generation = 0
        self._pending: Building | None = None
        self._to_refine: Building | None = None
        self._runs: list[_Run] = []
        self._progress: tuple[int, int, int] | None = None
        self._lock = threading.Lock()
        self._pool = ThreadPoolExecutor(max_workers=1, thread_name_prefix="petfall-recompute")
        self._refine_pool = ThreadPoolExecutor(max_workers=1,
                                               thread_name_prefix="petfall-refine")
        self._closed = False
        # the changes of one event-loop turn are gathered into one run, started by a posted
        # call: it comes before the window repaints (and before zero-delay timers), so the
        # computation runs while the window shows the results as out of date
        self._start_due = False
        self._kick.connect(self._start, Qt.ConnectionType.QueuedConnection)
        self._refine_timer = QTimer(self)
        self._refine_timer.setSingleShot(True)
        self._refine_timer.setInterval(max(int(refine_delay_ms), 0))
        self._refine_timer.timeout.connect(self._start_refinement)
        self._poll = QTimer(self)
        self._poll.setInterval(_POLL_MS)
        self._poll.timeout.connect(self._collect)
        self._done.connect(self._collect)  # at once, not at the next poll

    @property
    def incremental(self) -> bool:
        """True while the runs use the default assessment, recomputing only what changed."""
        return self.assess is default_assess

    @property
    def refines(self) -> bool:
        """True if quick results are followed by a full assessment."""
        return self.refine_samples > self.samples

    @property
    def final_samples(self) -> int:
        """Cats per opening of the results once every run is done."""
        return max(self.samples, self.refine_samples)

    @property
    def running(self) -> bool:
        """True while the newest request has not delivered its quick result."""
        return self._pending is not None or any(
            r.generation == self.generation and not r.refined for r in self._runs)

    @property
    def refining_now(self) -> bool:
        """True while a refinement of the newest request is due or running."""
        return self._to_refine is not None or any(
            r.generation == self.generation and r.refined for r in self._runs)

    def request(self, building: Building) -> None:
        """Recompute for ``building`` soon; any older run (and refinement) becomes stale."""
        if self._closed:
            return
        self.generation += 1
        self._pending = building
        self._to_refine = None
        self._refine_timer.stop()
        if not self._start_due:
            self._start_due = True
            self._kick.emit()

    def cancel(self) -> None:
        """Drop the pending and the running request, and its refinement."""
        self.generation += 1
        self._pending = None
        self._to_refine = None
        self._refine_timer.stop()

    def wait(self, timeout_s: float = 30.0) -> bool:
        """Block until every started run has ended (for shutdown and tests)."""
        deadline = time.monotonic() + timeout_s
        for run in list(self._runs):
            remaining = deadline - time.monotonic()
            if remaining <= 0:
                return False
            try:
                run.future.exception(timeout=remaining)
            except TimeoutError:
                return False
        return True

    def shutdown(self) -> None:
        """Cancel, and stop the worker threads once their runs end (the window is closing).

        A run stops at its next progress report; this returns when both threads have ended."""
        self._closed = True
        self.cancel()
        self._poll.stop()
        self._pool.shutdown(wait=True, cancel_futures=True)
        self._refine_pool.shutdown(wait=True, cancel_futures=True)
        self._runs = []

    def _reassessor(self, samples: int) -> Reassessor:
        """The incremental assessor of ``samples`` cats (and the current seed)."""
        from petfall_audit.reassess import Reassessor

        key = (int(samples), int(self.seed))
        with self._reassessors_lock:
            r = self._reassessors.get(key)
            if r is None:
                r = self._reassessors[key] = Reassessor(samples=key[0], seed=key[1])
            return r

    def _full_at_once(self, building: Building) -> bool:
        """True if the full count's incremental run of ``building`` simulates no more falls
        than a quick run would (in a worker thread)."""
        if not (self.incremental and self.refines):
            return False
        full = self._reassessor(self.refine_samples)
        if not full.remembers:
            return False
        quick_falls = len(building.openings) * self.samples
        return full.to_simulate(building) * self.refine_samples <= quick_falls

    def _run(self, generation: int, building: Building, samples: int,
             respond: bool = False) -> tuple[Any, float, bool]:
        """In a worker thread: plain Python only. ``respond``: the quick run of a request,
        which may give the full results at once."""
        if self.generation != generation:
            raise _Cancelled

        def progress(done: int, total: int) -> None:
            if self.generation != generation:
                raise _Cancelled
            with self._lock:
                self._progress = (generation, int(done), int(total))

        start = time.perf_counter()
        if respond and self._full_at_once(building):
            samples = self.refine_samples
        if self.incremental:
            result = self._reassessor(samples).assess(building, progress=progress)
        else:
            result = self.assess(building, samples=samples, seed=self.seed, progress=progress)
        return result, time.perf_counter() - start, samples >= self.final_samples

    def _submit(self, building: Building, *, refined: bool) -> None:
        pool, samples = ((self._refine_pool, self.refine_samples) if refined
                         else (self._pool, self.samples))
        generation = self.generation
        future = pool.submit(self._run, generation, building, samples, not refined)
        future.add_done_callback(self._tell_done)
        self._runs.append(_Run(generation, building, refined, future))
        if not self._poll.isActive():
            self._poll.start()

    def _tell_done(self, _future: Future[Any]) -> None:
        """In the worker thread: wake the GUI thread to collect the result."""
        try:
            self._done.emit()
        except RuntimeError:  # the window closed meanwhile: nothing to tell
            pass

    def _start(self) -> None:
        self._start_due = False
        if self._pending is None or self._closed:
            return
        building, self._pending = self._pending, None
        self.started.emit(self.generation)
        self._submit(building, refined=False)

    def _start_refinement(self) -> None:
        if self._to_refine is None or self._closed:
            return
        building, self._to_refine = self._to_refine, None
        self.refining.emit(self.generation)
        self._submit(building, refined=True)

    def _collect(self) -> None:
        """In the GUI thread: pass on progress and the newest results; drop stale ones."""
        with self._lock:
            progress, self._progress = self._progress, None
        if progress is not None and progress[0] == self.generation:
            self.progress.emit(*progress)
        still: list[_Run] = []
        for run in self._runs:
            if not run.future.done():
                still.append(run)
                continue
            if run.generation != self.generation or run.future.cancelled():
                continue  # stale: a newer edit is being computed
            exc = run.future.exception()
            if isinstance(exc, _Cancelled):
                continue
            if exc is not None:
                detail = traceback.format_exception_only(type(exc), exc)[-1].strip()
                self.failed.emit(run.generation, detail)
                continue
            result, seconds, full = run.future.result()
            if run.refined or (full and self.refines):
                self.refined.emit(run.generation, result, seconds)
            else:
                self.finished.emit(run.generation, result, seconds)
                if self.refines and run.generation == self.generation:
                    self._to_refine = run.building
                    self._refine_timer.start()
        self._runs = still
        if not still and self._pending is None:
            self._poll.stop()
