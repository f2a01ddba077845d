"""The file session of one window, without Qt: new, open, save, save as, the recovery copy of
unsaved work and the offer to recover what apps that ended left behind.

The questions go to a :class:`SessionPrompts` (the app asks with dialogs, a test answers at
once); what happened goes to ``status(text)``. The window only supplies a timer for
:meth:`FileSession.edited` (write the recovery copy after the returned delay) and a way to open
a further window (``open_elsewhere``) for a second recovered building.
"""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path
from typing import Protocol

from petfall_audit.editing import autosave
from petfall_audit.editing.document import Document
from petfall_audit.editing.state import Event, Workspace
from petfall_audit.editing.words import problem_words
from petfall_audit.errors import BuildingFileError, ValidationFailed
from petfall_audit.model import Building

__all__ = ["SessionPrompts", "FileSession"]


class SessionPrompts(Protocol):
    """The questions a file session asks the user."""

    def ask_save_changes(self, name: str) -> str:
        """``"save"``, ``"discard"`` or ``"cancel"`` for the unsaved work of ``name``."""
        ...

    def ask_overwrite_changed(self, name: str) -> bool: ...

    def ask_recover(self, recovery: autosave.Recovery) -> bool: ...

    def open_path(self, folder: Path | None) -> Path | None: ...

    def save_path(self, suggested: Path) -> Path | None: ...

    def show_error(self, title: str, text: str) -> None: ...


class FileSession:
    """Opens and saves the ``workspace``'s document and keeps its recovery copy.

    ``new_building()`` makes the building of File ▸ New; ``remember(path)`` adds a file to the
    recent list; ``open_elsewhere(document)`` shows a further recovered document in a window of
    its own and returns that window's session. ``status(text)`` reports what was done
    (``"! …"`` for a problem).
    """

    def __init__(self, workspace: Workspace, prompts: SessionPrompts, *,
                 new_building: Callable[[], Building],
                 remember: Callable[[Path], None] = lambda _path: None,
                 open_elsewhere: Callable[[Document], FileSession] | None = None,
                 idle_s: float = autosave.IDLE_DELAY_S,
                 max_wait_s: float = autosave.MAX_WAIT_S) -> None:
        self.workspace = workspace
        self.prompts = prompts
        self.status: Event[str] = Event()
        self.recovery = autosave.RecoveryCopy()
        self.schedule = autosave.AutosaveSchedule(idle_s, max_wait_s)
        self._new_building = new_building
        self._remember = remember
        self.open_elsewhere = open_elsewhere

    @property
    def document(self) -> Document:
        return self.workspace.document

    # --- replacing the document -------------------------------------------------------------

    def confirm_discard(self) -> bool:
        """True if the current work may be replaced: saved, or the user chose to save/discard."""
        if not self.document.dirty:
            return True
        answer = self.prompts.ask_save_changes(self.document.display_name)
        if answer == "save":
            return self.save()
        return answer == "discard"

    def new(self) -> bool:
        """Start a new building (after asking about unsaved work)."""
        if not self.confirm_discard():
            return False
        self.recovery.discard()
        self.workspace.load(Document(self._new_building()))
        return True

    def open_dialog(self) -> bool:
        """Ask for a building file and open it."""
        folder = self.document.path.parent if self.document.path else None
        if not self.confirm_discard():
            return False
        path = self.prompts.open_path(folder)
        return self.open_file(path, confirm=False) if path else False

    def open_file(self, path: Path, *, confirm: bool = True) -> bool:
        """Open the building file at ``path``; problems are shown, the current work kept."""
        from petfall_audit.io.building_file import load_building

        if confirm and not self.confirm_discard():
            return False
        try:
            building = load_building(path)
        except ValidationFailed as exc:  # the problems in words, at most ten
            known = exc.building if isinstance(exc.building, Building) else None
            self.prompts.show_error("Cannot open the building file", f"{Path(path).name}:\n"
                                    + problem_words(exc.problems, known, limit=10, sep="\n"))
            return False
        except BuildingFileError as exc:
            self.prompts.show_error("Cannot open the building file", f"{Path(path).name}:\n{exc}")
            return False
        self.recovery.discard()
        self.workspace.load(Document(building, Path(path)))
        self._remember(Path(path))
        self.status.emit(f"Opened {Path(path).name}")
        return True

    # --- saving -----------------------------------------------------------------------------

    def save(self) -> bool:
        """Save to the document's file (asks for one if it has none)."""
        from petfall_audit.io.building_file import save_building

        doc = self.document
        if doc.path is None:
            return self.save_as()
        path = doc.path
        if doc.changed_on_disk() and not self.prompts.ask_overwrite_changed(path.name):
            return False
        try:
            save_building(doc.building, path)
        except (OSError, ValueError) as exc:
            self.prompts.show_error("Cannot save", f"{path}:\n{exc}")
            return False
        doc.remember_disk_state()
        self.workspace.history.set_clean()
        self.recovery.discard()
        self._remember(path)
        self.status.emit(f"Saved {path.name}")
        return True

    def save_as(self, path: Path | None = None) -> bool:
        """Save to ``path`` (asked for when ``None``); the document's file from then on."""
        doc = self.document
        if path is None:
            name = doc.building.info.name or "building"
            suggested = doc.path or Path.home() / f"{name}.json"
            path = self.prompts.save_path(suggested)
            if path is None:
                return False
        old = doc.path
        if old is not None and not self._carry_photos(old.parent, Path(path).parent):
            return False
        doc.path = Path(path)
        if not self.save():
            doc.path = old
            return False
        return True

    def _carry_photos(self, old_root: Path, new_root: Path) -> bool:
        """Before a Save As into another folder: the photos go with the file
        (:func:`petfall_audit.io.photos.carry_photos`); a photo that had to take another name
        changes its opening in one undoable step. False (nothing saved) when a photo cannot be
        copied."""
        from petfall_audit.editing.commands import ReplaceBuilding
        from petfall_audit.io.photos import carry_photos

        doc = self.document
        try:
            carried, missing = carry_photos(doc.building, old_root, new_root)
        except OSError as exc:
            self.prompts.show_error("Cannot save", f"The photos could not be copied to "
                                    f"{new_root}:\n{exc}")
            return False
        if carried is not doc.building:
            self.workspace.push(ReplaceBuilding(carried, label="Photos renamed in the new folder"))
        if missing:
            from petfall_audit.present.numbers import fmt_count

            self.status.emit(f"! {fmt_count(len(missing), 'photo')} not found, so not copied: "
                             + ", ".join(missing[:3]) + ("…" if len(missing) > 3 else ""))
        return True

    # --- recovery ---------------------------------------------------------------------------

    def edited(self, now_s: float) -> float:
        """The model changed at ``now_s`` (monotonic seconds): the delay (s) after which to
        call :meth:`autosave_now`."""
        return self.schedule.edited(now_s)

    def all_saved(self) -> None:
        """The work is saved (or undone back to the saved state): no recovery copy needed."""
        self.schedule.written()
        self.recovery.discard()

    def autosave_now(self) -> Path | None:
        """Write the recovery copy of unsaved work now (or remove it if all is saved)."""
        self.schedule.written()
        doc = self.document
        if not doc.dirty:
            self.recovery.discard()
            return None
        try:
            return self.recovery.write(doc.building, doc.path)
        except (OSError, ValueError) as exc:
            self.status.emit(f"! Recovery copy not written: {exc}")
            return None

    def offer_recovery(self) -> bool:
        """Offer, one by one, the unsaved work that apps which ended left behind; True if any
        was recovered. The first accepted copy opens here (unless this window has unsaved
        work), the others through ``open_elsewhere``. A copy is deleted only once the user has
        decided about it, and a recovered copy only after its window has written its own."""
        recovered = False
        for rec in autosave.find_recoveries():
            if not rec.path.exists():  # another window decided about it meanwhile
                continue
            elsewhere = recovered or self.document.dirty
            if elsewhere and self.open_elsewhere is None:
                break  # nowhere to show it: the copy stays for the next start
            if not self.prompts.ask_recover(rec):
                autosave.discard_recovery(rec)
                continue
            try:
                building = autosave.load_recovery(rec)
            except BuildingFileError as exc:
                self.prompts.show_error(
                    "Cannot recover",
                    f"The recovery copy from {rec.saved_at_text} is damaged and cannot be "
                    f"opened; it has been discarded.\n\n{exc}")
                autosave.discard_recovery(rec)
                continue
            doc = Document(building, rec.source_path)
            target: FileSession = self
            if elsewhere and self.open_elsewhere is not None:
                target = self.open_elsewhere(doc)
            else:
                self.workspace.load(doc)
            target.workspace.history.forget_clean()
            if target.autosave_now() is not None:  # its own copy first, then the old one goes
                autosave.discard_recovery(rec)
            recovered = True
        return recovered

    def close(self) -> None:
        """The window closes with its work saved or discarded: its recovery copy goes."""
        self.recovery.discard()
