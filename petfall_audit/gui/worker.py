"""Recomputing the assessment off the GUI thread.

:class:`Recomputer` runs ``assess(building, samples=, seed=, progress=)`` on a one-thread pool.
Each request gets a generation number; a newer request makes older runs stale: they stop at
their next progress report and their results are dropped. Results reach the GUI as signals
carrying plain Python objects, emitted in the GUI thread.

The worker thread never calls Qt: a timer in the GUI thread collects finished runs and progress
(every few milliseconds, only while a run is pending), so every Qt call stays on the GUI thread.
"""

from __future__ import annotations

import threading
import time
import traceback
from collections.abc import Callable
from concurrent.futures import Future, ThreadPoolExecutor
from typing import Any

from PySide6.QtCore import QObject, QTimer, Signal

from petfall_audit.model import Building

__all__ = ["Recomputer", "AssessFn", "INTERACTIVE_SAMPLES", "default_assess"]

AssessFn = Callable[..., Any]

#: Cat samples per opening while editing (the report uses the full count).
INTERACTIVE_SAMPLES = 256
_POLL_MS = 4


def default_assess(building: Building, **kwargs: Any) -> Any:
    """:func:`petfall_audit.risk.assess`, imported on first use."""
    from petfall_audit.risk import assess

    return assess(building, **kwargs)


class _Cancelled(Exception):
    pass


class Recomputer(QObject):
    """Schedules assessments; emits ``started``, ``progress``, ``finished`` and ``failed``.

    ``finished(generation, assessment, seconds)`` only for the newest request.
    """

    started = Signal(int)
    progress = Signal(int, int, int)  # generation, done, total
    finished = Signal(int, object, float)  # generation, assessment, compute time (s)
    failed = Signal(int, str)

    def __init__(self, assess: AssessFn | None = None, *, samples: int = INTERACTIVE_SAMPLES,
                 seed: int = 1, parent: QObject | None = None) -> None:
        super().__init__(parent)
        self.assess = assess or default_assess
        self.samples = samples
        self.seed = seed
        self.generation = 0
        self._pending: Building | None = None
        self._futures: list[tuple[int, Future[tuple[Any, float]]]] = []
        self._progress: tuple[int, int, int] | None = None
        self._lock = threading.Lock()
        self._pool = ThreadPoolExecutor(max_workers=1, thread_name_prefix="petfall-recompute")
        self._start_timer = QTimer(self)
        self._start_timer.setSingleShot(True)
        self._start_timer.setInterval(0)  # gather the changes of one event-loop turn
        self._start_timer.timeout.connect(self._start)
        self._poll = QTimer(self)
        self._poll.setInterval(_POLL_MS)
        self._poll.timeout.connect(self._collect)

    @property
    def running(self) -> bool:
        """True while a request has not delivered its result."""
        return self._pending is not None or bool(self._futures)

    def request(self, building: Building) -> None:
        """Recompute for ``building`` soon; any older run becomes stale."""
        self.generation += 1
        self._pending = building
        self._start_timer.start()

    def cancel(self) -> None:
        """Drop the pending and the running request."""
        self.generation += 1
        self._pending = None
        self._start_timer.stop()

    def wait(self, timeout_s: float = 30.0) -> bool:
        """Block until every started run has ended (for shutdown and tests)."""
        deadline = time.monotonic() + timeout_s
        for _gen, future in list(self._futures):
            remaining = deadline - time.monotonic()
            if remaining <= 0:
                return False
            try:
                future.exception(timeout=remaining)
            except TimeoutError:
                return False
        return True

    def shutdown(self) -> None:
        """Cancel and stop the worker thread (the window is closing)."""
        self.cancel()
        self._poll.stop()
        self._pool.shutdown(wait=True, cancel_futures=True)

    def _run(self, generation: int, building: Building) -> tuple[Any, float]:
        """In the worker thread: plain Python only."""
        if self.generation != generation:
            raise _Cancelled

        def progress(done: int, total: int) -> None:
            if self.generation != generation:
                raise _Cancelled
            with self._lock:
                self._progress = (generation, int(done), int(total))

        start = time.perf_counter()
        result = self.assess(building, samples=self.samples, seed=self.seed, progress=progress)
        return result, time.perf_counter() - start

    def _start(self) -> None:
        if self._pending is None:
            return
        building, self._pending = self._pending, None
        generation = self.generation
        self.started.emit(generation)
        self._futures.append((generation, self._pool.submit(self._run, generation, building)))
        if not self._poll.isActive():
            self._poll.start()

    def _collect(self) -> None:
        """In the GUI thread: pass on progress and the newest result; drop stale ones."""
        with self._lock:
            progress, self._progress = self._progress, None
        if progress is not None and progress[0] == self.generation:
            self.progress.emit(*progress)
        still: list[tuple[int, Future[tuple[Any, float]]]] = []
        for generation, future in self._futures:
            if not future.done():
                still.append((generation, future))
                continue
            if generation != self.generation or future.cancelled():
                continue  # stale: a newer edit is being computed
            exc = future.exception()
            if isinstance(exc, _Cancelled):
                continue
            if exc is not None:
                detail = traceback.format_exception_only(type(exc), exc)[-1].strip()
                self.failed.emit(generation, detail)
                continue
            result, seconds = future.result()
            self.finished.emit(generation, result, seconds)
        self._futures = still
        if not still and self._pending is None:
            self._poll.stop()
