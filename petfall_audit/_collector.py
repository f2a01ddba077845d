"""The cyclic garbage collector's settings for a command-line process (private).

A command makes few reference cycles, but the libraries' start-up creates hundreds of thousands
of objects: at Python's default thresholds (a young collection every 700 new objects) the
collector's passes over them take tens of milliseconds of a short command, and the last
collection at exit walks them all once more just before the process ends. The command line
(:mod:`petfall_audit.cli`) and each ``batch`` worker process (:mod:`petfall_audit.batch`) use
these settings; the library itself and the app leave the collector as it is.
"""

from __future__ import annotations

import atexit
import gc
from collections.abc import Iterator
from contextlib import contextmanager

__all__ = ["COMMAND_GC_THRESHOLDS", "few_collections", "freeze_survivors", "set_up_worker"]

#: Collector thresholds while a command runs: rarely, but still on (memory stays bounded in a
#: long ``batch``).
COMMAND_GC_THRESHOLDS = (100_000, 20, 100)


@contextmanager
def few_collections() -> Iterator[None]:
    """Within this block the collector runs at :data:`COMMAND_GC_THRESHOLDS`; the thresholds
    are restored after."""
    before = gc.get_threshold()
    gc.set_threshold(*COMMAND_GC_THRESHOLDS)
    try:
        yield
    finally:
        gc.set_threshold(*before)


def freeze_survivors() -> None:
    """Move every object now alive out of the collector's reach, for a process about to end:
    the interpreter's last collection would only walk them before the memory is released."""
    gc.freeze()


def set_up_worker() -> None:
    """For a process that only runs commands' work and then ends (a ``batch`` worker): the
    collector at :data:`COMMAND_GC_THRESHOLDS` for the rest of the process, and the survivors
    frozen when it exits."""
    gc.set_threshold(*COMMAND_GC_THRESHOLDS)
    atexit.register(freeze_survivors)
