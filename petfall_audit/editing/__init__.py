"""Editing a building without Qt: the document, undoable commands, history, field parsing and
the recovery file. The desktop app (:mod:`petfall_audit.gui`) mirrors these onto widgets.

Every public name of :mod:`petfall_audit.editing.commands` is also available from here."""

from __future__ import annotations

from petfall_audit.editing import commands
from petfall_audit.editing.commands import *  # noqa: F403  (the commands' own __all__)
from petfall_audit.editing.document import Document
from petfall_audit.editing.history import History

__all__ = ["Document", "History", *commands.__all__]
