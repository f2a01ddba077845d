"""Undo and redo of commands on one document. No Qt.

``push(cmd)`` runs the command and records it; ``undo()``/``redo()`` walk the record. The history
remembers which step matches the saved file (``set_clean()``) and keeps the document's dirty flag
in step with it. Consecutive commands with the same ``merge_key`` merge into one undo step.
"""

from __future__ import annotations

from collections.abc import Callable

from petfall_audit.editing.commands import Command
from petfall_audit.editing.document import Document

__all__ = ["History"]


class History:
    """Undo/redo stacks for ``doc``, at most ``limit`` undo steps."""

    def __init__(self, doc: Document, *, limit: int = 200) -> None:
        if limit < 1:
            raise ValueError(f"limit must be at least 1, got {limit}")
        self.doc = doc
        self.limit = limit
        self._done: list[Command] = []
        self._undone: list[Command] = []
        self._clean: int | None = 0  # len(self._done) at the saved state; None: unreachable
        self._callbacks: list[Callable[[], None]] = []

    # --- queries ---------------------------------------------------------------------------------

    @property
    def can_undo(self) -> bool:
        return bool(self._done)

    @property
    def can_redo(self) -> bool:
        return bool(self._undone)

    @property
    def undo_label(self) -> str:
        """Label of the step that ``undo()`` would revert, or ``""``."""
        return self._done[-1].label if self._done else ""

    @property
    def redo_label(self) -> str:
        """Label of the step that ``redo()`` would repeat, or ``""``."""
        return self._undone[-1].label if self._undone else ""

    @property
    def is_clean(self) -> bool:
        """True when the document is as it was when last saved (or opened)."""
        return self._clean == len(self._done)

    def labels(self) -> list[str]:
        """Labels of the done steps, oldest first."""
        return [c.label for c in self._done]

    # --- actions ----------------------------------------------------------------------------------

    def push(self, cmd: Command) -> None:
        """Run ``cmd`` on the document and record it. If it raises, nothing is recorded."""
        cmd.do(self.doc)
        top = self._done[-1] if self._done else None
        if (top is not None and not self._undone and not self.is_clean and top.merge(cmd)):
            pass
        else:
            if self._clean is not None and self._clean > len(self._done):
                self._clean = None  # the saved state was undone and is now replaced
            self._done.append(cmd)
            if len(self._done) > self.limit:
                del self._done[0]
                if self._clean is not None:
                    self._clean -= 1
                    if self._clean < 0:
                        self._clean = None
        self._undone.clear()
        self._changed()

    def undo(self) -> bool:
        """Revert the last step; False if there is none."""
        if not self._done:
            return False
        cmd = self._done.pop()
        cmd.undo(self.doc)
        self._undone.append(cmd)
        self._changed()
        return True

    def redo(self) -> bool:
        """Repeat the last undone step; False if there is none."""
        if not self._undone:
            return False
        cmd = self._undone.pop()
        cmd.do(self.doc)
        self._done.append(cmd)
        self._changed()
        return True

    def set_clean(self) -> None:
        """Mark the current step as the saved one (after a save)."""
        self._clean = len(self._done)
        self._changed()

    def forget_clean(self) -> None:
        """No step matches a saved file any more (a recovered document): the document is dirty."""
        self._clean = None
        self._changed()

    def clear(self) -> None:
        """Forget every step (a new or reopened document); the current state is clean."""
        self._done.clear()
        self._undone.clear()
        self._clean = 0
        self._changed()

    def on_changed(self, callback: Callable[[], None]) -> Callable[[], None]:
        """Call ``callback()`` after every push, undo, redo, save or clear.

        Returns a function that unsubscribes."""
        self._callbacks.append(callback)
        return lambda: self._callbacks.remove(callback) if callback in self._callbacks else None

    def _changed(self) -> None:
        self.doc.dirty = not self.is_clean
        for callback in list(self._callbacks):
            callback()
