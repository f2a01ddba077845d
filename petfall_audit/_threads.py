"""More than one core for one building's simulation (private).

The falls of a building are simulated and summarised (doses, bands, percentiles) a block of
openings at a time, and the blocks do not depend on each other. numpy lets go of the
interpreter lock inside its array operations, so :func:`in_order_ahead` computes blocks in
worker threads, one per core (at most two), while the caller takes the finished ones in order.
Each block is computed exactly as it is one after another, so the results are the same bit for
bit; at most one block per worker is in flight besides the one the caller holds.

:func:`one_thread` turns this off where the cores are already shared out, as in ``batch``,
which runs one building per core.
"""

from __future__ import annotations

import os
import threading
from collections import deque
from collections.abc import Callable, Iterable, Iterator
from concurrent.futures import Future, ThreadPoolExecutor
from contextlib import contextmanager
from typing import TypeVar

__all__ = ["MAX_WORKERS", "in_order_ahead", "one_thread", "worker_count"]

T = TypeVar("T")
K = TypeVar("K")

_off = threading.local()


#: Most worker threads for one building (two cores do the work of one building well; beyond
#: that the summaries' Python parts dominate).
MAX_WORKERS = 2


def worker_count() -> int:
    """Worker threads :func:`in_order_ahead` uses here: one per core, at most
    :data:`MAX_WORKERS`, or none (the calling thread) within :func:`one_thread`."""
    if getattr(_off, "value", False):
        return 0
    cores = len(os.sched_getaffinity(0)) if hasattr(os, "sched_getaffinity") else os.cpu_count()
    n = min(MAX_WORKERS, cores or 1)
    return n if n > 1 else 0


@contextmanager
def one_thread() -> Iterator[None]:
    """Within this block, in this thread, simulate on the calling thread alone."""
    before = getattr(_off, "value", False)
    _off.value = True
    try:
        yield
    finally:
        _off.value = before


def in_order_ahead(compute: Callable[[K], T], keys: Iterable[K]) -> Iterator[T]:
    """``compute(key)`` for each key, yielded in the order of ``keys``, computed ahead in
    :func:`worker_count` threads (or on the calling thread when that is 0). An exception in
    ``compute`` reaches the caller at that key; a caller that stops early waits for the
    computations in flight, and no new one starts."""
    items = list(keys)
    workers = min(worker_count(), len(items))
    if workers < 2:
        for key in items:
            yield compute(key)
        return
    with ThreadPoolExecutor(max_workers=workers, thread_name_prefix="petfall-block") as pool:
        pending: deque[Future[T]] = deque()
        queued = iter(items)
        for key in queued:
            pending.append(pool.submit(compute, key))
            if len(pending) == workers:
                break
        while pending:
            current = pending.popleft().result()
            for key in queued:
                pending.append(pool.submit(compute, key))
                break
            yield current
