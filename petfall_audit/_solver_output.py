"""Keeping the MILP solver's own prints off the terminal, without hiding anything else (private).

The HiGHS build inside scipy prints some diagnostic lines with C ``printf`` whatever its
options say (``disp=False`` only silences its log), e.g.
``HighsMipSolverData::transformNewIntegerFeasibleSolution tmpSolver.run();``. They would land
in JSON or CSV written to standard output, in the terminal of the desktop app and in test
output.

:func:`solver_output_filtered` points file descriptors 1 and 2 at a temporary file while the
solver runs, then restores them and writes back every line that is *not* the solver's
(anything another thread or library printed meanwhile, a real error included), to the
descriptor it was meant for. Only the solver's lines are dropped: those naming HiGHS.
"""

from __future__ import annotations

import os
import re
import sys
import tempfile
import threading
from collections.abc import Iterator
from contextlib import contextmanager
from typing import IO

__all__ = ["solver_output_filtered", "is_solver_chatter"]

#: A line the solver printed on its own: it names the solver (its classes are ``Highs*``).
_CHATTER = re.compile(r"\bHi[Gg][Hh][Ss]|\bHighs\w*")

_lock = threading.RLock()
_depth = 0


def is_solver_chatter(line: str) -> bool:
    """True if ``line`` is one of the MILP solver's own diagnostic prints."""
    return bool(_CHATTER.search(line))


def _flush_c_stdio() -> None:
    """Flush the C library's stdio buffers (where the solver's ``printf`` waits)."""
    try:
        import ctypes

        ctypes.CDLL(None).fflush(None)
    except (OSError, AttributeError, TypeError):  # no C library handle on this platform
        pass


def _flush_python() -> None:
    for stream in (sys.stdout, sys.stderr, sys.__stdout__, sys.__stderr__):
        try:
            if stream is not None:
                stream.flush()
        except (OSError, ValueError):  # a closed or broken stream: nothing to keep
            pass


def _write_back(held: IO[bytes], fd: int) -> None:
    held.flush()
    held.seek(0)
    kept = [line for line in held.read().splitlines(keepends=True)
            if not is_solver_chatter(line.decode("utf-8", errors="replace"))]
    data = b"".join(kept)
    while data:
        written = os.write(fd, data)
        data = data[written:]


@contextmanager
def solver_output_filtered() -> Iterator[None]:
    """Run the body with descriptors 1 and 2 held; afterwards everything but the solver's own
    lines reaches them (see the module docstring). Re-entrant and thread-safe (one solve holds
    the descriptors at a time); if the descriptors cannot be redirected, the body runs as is."""
    global _depth
    with _lock:
        if _depth:
            _depth += 1
            try:
                yield
            finally:
                _depth -= 1
            return
        saved: list[int] = []
        held: list[IO[bytes]] = []
        try:
            _flush_python()
            _flush_c_stdio()
            for fd in (1, 2):
                held.append(tempfile.TemporaryFile())
                saved.append(os.dup(fd))
            for fd, file in zip((1, 2), held, strict=True):
                os.dup2(file.fileno(), fd)
        except (OSError, ValueError):
            for fd, copy in zip((1, 2), saved, strict=False):
                os.dup2(copy, fd)
                os.close(copy)
            for file in held:
                file.close()
            yield
            return
        _depth = 1
        try:
            yield
        finally:
            _depth = 0
            _flush_python()
            _flush_c_stdio()
            for fd, copy in zip((1, 2), saved, strict=True):
                os.dup2(copy, fd)
                os.close(copy)
            for fd, file in zip((1, 2), held, strict=True):
                try:
                    _write_back(file, fd)
                except OSError:  # the real descriptor is gone (a closed pipe): nothing to do
                    pass
                finally:
                    file.close()
