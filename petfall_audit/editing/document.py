"""The open document: the current :class:`~petfall_audit.model.Building`, its file and its state.

No Qt. Views subscribe with :meth:`Document.on_changed` to a kind of change and are called with
the kind after it happened. Kinds:

- ``"building"`` (the building details), ``"floors"``, ``"facades"``, ``"surfaces"``,
  ``"openings"``, ``"profile"`` (the cat profile), ``"plan"`` (the fix plan's settings): the
  part of the model that changed;
- ``"path"``: the file the document belongs to; ``"dirty"``: the unsaved-changes flag;
- ``"*"`` subscribes to every kind.

The model is immutable; an edit replaces the building (see :mod:`petfall_audit.editing.commands`).
"""

from __future__ import annotations

from collections.abc import Callable, Iterable
from pathlib import Path

from petfall_audit.errors import Problem
from petfall_audit.io.atomic import FileStamp, changed_since, file_stamp
from petfall_audit.model import Building

__all__ = ["Document", "MODEL_KINDS", "PLAN_ONLY_KINDS", "KINDS", "ChangeCallback", "validate"]

#: Kinds of change to the model, one per part of a :class:`Building`.
MODEL_KINDS: tuple[str, ...] = ("building", "floors", "facades", "surfaces", "openings", "profile",
                                 "plan")
#: Kinds of change that leave the assessment as it is (only the fix plan follows them).
PLAN_ONLY_KINDS: frozenset[str] = frozenset({"plan"})
#: Every kind a document reports.
KINDS: tuple[str, ...] = (*MODEL_KINDS, "path", "dirty")

_FIELD_KIND = {
    "info": "building",
    "floors": "floors",
    "facades": "facades",
    "surfaces": "surfaces",
    "openings": "openings",
    "cat_profile": "profile",
    "injury": "profile",  # the assumptions about the cats: who falls, how they are hurt
    "plan": "plan",
}

ChangeCallback = Callable[[str], None]


def validate(building: Building) -> list[Problem]:
    """Every problem of ``building`` (the building file's own validation rules)."""
    from petfall_audit.io.building_file import validate_building

    return list(validate_building(building))


def changed_kinds(before: Building, after: Building) -> list[str]:
    """Kinds of change between two buildings, in :data:`MODEL_KINDS` order."""
    kinds = []
    for field_name, kind in _FIELD_KIND.items():
        a, b = getattr(before, field_name), getattr(after, field_name)
        if a is not b and a != b:
            kinds.append(kind)
    return kinds


class Document:
    """A building being edited, the file it came from (``path``) and whether it has unsaved edits.

    ``revision`` counts model changes; a background result computed for an older revision is
    stale.
    """

    def __init__(self, building: Building, path: Path | None = None) -> None:
        self._building = building
        self._path = path
        self._dirty = False
        self._revision = 0
        self._problems: tuple[int, list[Problem]] | None = None
        self._callbacks: dict[str, list[ChangeCallback]] = {}
        self._disk: tuple[Path, FileStamp | None] | None = None
        if path is not None:
            self.remember_disk_state()

    # --- state ---------------------------------------------------------------------------------

    @property
    def building(self) -> Building:
        """The current building (immutable)."""
        return self._building

    @property
    def path(self) -> Path | None:
        """The file this document was opened from or last saved to; ``None`` for a new one."""
        return self._path

    @path.setter
    def path(self, value: Path | None) -> None:
        if value != self._path:
            self._path = value
            self._emit(["path"])

    @property
    def dirty(self) -> bool:
        """True when the building has edits that are not saved."""
        return self._dirty

    @dirty.setter
    def dirty(self, value: bool) -> None:
        if bool(value) != self._dirty:
            self._dirty = bool(value)
            self._emit(["dirty"])

    @property
    def revision(self) -> int:
        """Number of model changes so far."""
        return self._revision

    @property
    def display_name(self) -> str:
        """The file name, or the building's name for an unsaved document."""
        if self._path is not None:
            return self._path.name
        return self._building.info.name or "Untitled"

    def remember_disk_state(self) -> None:
        """Record the file at :attr:`path` as it is now (call after opening or saving it), so
        :meth:`changed_on_disk` can tell whether someone else wrote it since."""
        self._disk = (self._path, file_stamp(self._path)) if self._path is not None else None

    def changed_on_disk(self) -> bool:
        """True when the document's file was written, created or removed by someone else
        since it was opened or last saved here: saving now would overwrite their work, so ask
        first. False for a new document and just after "Save as" to another file."""
        if self._path is None or self._disk is None or self._disk[0] != self._path:
            return False
        return changed_since(self._path, self._disk[1])

    def problems(self) -> list[Problem]:
        """Problems of the current building, computed once per revision."""
        if self._problems is None or self._problems[0] != self._revision:
            self._problems = (self._revision, validate(self._building))
        return list(self._problems[1])

    # --- changes -------------------------------------------------------------------------------

    def set_building(
        self, building: Building, *, problems: list[Problem] | None = None
    ) -> list[str]:
        """Replace the building and tell subscribers which parts changed; returns the kinds.

        ``problems``: the new building's problems when the caller has already computed them.
        """
        if building is self._building:
            return []
        kinds = changed_kinds(self._building, building)
        self._building = building
        self._revision += 1
        self._problems = (self._revision, list(problems)) if problems is not None else None
        self._emit(kinds)
        return kinds

    def on_changed(self, kind: str, callback: ChangeCallback) -> Callable[[], None]:
        """Call ``callback(kind)`` after each change of ``kind`` (``"*"``: every kind).

        Returns a function that unsubscribes.
        """
        if kind != "*" and kind not in KINDS:
            raise ValueError(f"kind must be one of {', '.join(KINDS)} or '*', got {kind!r}")
        self._callbacks.setdefault(kind, []).append(callback)

        def disconnect() -> None:
            callbacks = self._callbacks.get(kind, [])
            if callback in callbacks:
                callbacks.remove(callback)

        return disconnect

    def _emit(self, kinds: Iterable[str]) -> None:
        for kind in kinds:
            for callback in [*self._callbacks.get(kind, ()), *self._callbacks.get("*", ())]:
                callback(kind)
