"""Results that explain themselves without words: a stable code and the values the words need.

The computation (likelihood, risk, guard rules) says *what* it found as a :class:`Reason`; the
presentation layer (:func:`petfall_audit.present.explain.explain`) turns it into a sentence in
the reader's units, so the app, the PDF, the command line and the exports read the same.
Values are SI numbers named with their unit (``gap_m``, ``drop_m``, ``speed_mps``), shares
0..1 (``share``), or short texts (ids, enum values).
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass

__all__ = ["Reason", "ReasonValue"]

#: A value carried by a reason: an SI number or a short text (an id, an enum value).
ReasonValue = float | int | str


@dataclass(frozen=True, slots=True)
class Reason:
    """One explained finding: ``code`` (stable, lower_snake) and ``items``, its values as sorted
    ``(name, value)`` pairs (use :meth:`of` to build one and :attr:`values` to read them)."""

    code: str
    items: tuple[tuple[str, ReasonValue], ...] = ()

    @classmethod
    def of(cls, code: str, **values: ReasonValue) -> Reason:
        """``Reason.of("net_fitted", mesh_m=0.03)``."""
        return cls(code, tuple(sorted(values.items())))

    @property
    def values(self) -> Mapping[str, ReasonValue]:
        """The values by name."""
        return dict(self.items)

    def number(self, name: str) -> float:
        """The value ``name`` as a float (``KeyError`` if absent)."""
        return float(self.values[name])

    def to_json(self) -> dict[str, object]:
        """``{"code": ..., "values": {...}}`` for an export."""
        return {"code": self.code, "values": dict(self.items)}
