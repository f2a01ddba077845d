"""Code profiles: the rules of the building's own jurisdiction.

A building names its profile in the building section of its file (``"code_profile"``; absent:
``"generic"``). A profile is data (``resources/code_profiles/<id>.json``, read and checked by
:mod:`petfall_audit.io.code_profiles`): the guard, window, escape-window and attachment rules of
one jurisdiction, each with its code, clause, edition and how sure we are of it, plus the
defaults of the place (units, currency, date style, words).

The physics never reads a profile. Everything stays indicative: the local code, in the
edition in force, prevails.

Rules are looked up by their *role* (:data:`ROLES`), so code never names a clause. Lengths in
millimetres (``value_mm``), heights in metres (``value_m``), areas in square metres
(``area_m2``).
"""

from __future__ import annotations

import functools
from dataclasses import dataclass
from typing import Literal

__all__ = [
    "PROFILE_IDS",
    "DEFAULT_PROFILE",
    "CONFIDENCE_LEVELS",
    "ROLES",
    "Confidence",
    "CodeRule",
    "ProfileWords",
    "CodeProfile",
    "code_profile",
    "building_profile",
]

#: The profiles shipped, in the order the app lists them.
PROFILE_IDS: tuple[str, ...] = (
    "generic",
    "england",
    "us-ibc",
    "australia-ncc",
    "canada-nbc",
    "sweden-bbr",
)
#: The profile of a building whose file names none: cites no clause and says so.
DEFAULT_PROFILE = "generic"

Confidence = Literal["read in the text", "read in a summary", "from memory; verify"]
#: How sure we are of a rule, surest first.
CONFIDENCE_LEVELS: tuple[str, ...] = (
    "read in the text",
    "read in a summary",
    "from memory; verify",
)

#: What a rule is about. The code looks rules up by role; a profile may leave any role out.
ROLES: dict[str, str] = {
    "guard_trigger": "when a guard is required",
    "guard_height": "guard height at balconies and other external edges",
    "guard_gap": "largest gap allowed in a guard (sphere rule)",
    "guard_bottom_gap": "gap allowed under a guard",
    "guard_climb": "rule against climbable guards",
    "window_sill": "window sills low enough to need fall protection",
    "window_device": "window opening limits and the devices that keep them",
    "non_releasable_device": "where a device that cannot be released by hand may go",
    "escape_opening": "the clear opening an emergency escape window keeps",
    "escape_release": "how a device on an escape window releases",
    "attachment_fire": "fire rule for attachments to external walls",
    "exterior_permission": "permission to change the exterior",
    "animal_welfare": "animal-welfare rule on cats and balconies",
}


#: The profile file's date styles and the :func:`petfall_audit.present.fmt_date` style of each
#: (the day-month order of the place, written out so that no reader mistakes 03/04 for 4 March).
_DATE_FORMATS: dict[str, str] = {"DD/MM/YYYY": "dmy", "MM/DD/YYYY": "mdy", "YYYY-MM-DD": "iso"}


@dataclass(frozen=True, slots=True)
class CodeRule:
    """One rule of a profile.

    ``code``, ``clause`` and ``edition`` say where it is written (all empty in the generic
    profile, which cites no clause); ``text``: what it asks, in plain words; ``confidence``: one
    of :data:`CONFIDENCE_LEVELS`. ``value_mm`` (mm), ``value_m`` (m above ground) and
    ``area_m2`` (m²): its governing figures, where it has them.
    """

    id: str
    role: str
    text: str
    confidence: str
    code: str = ""
    clause: str = ""
    edition: str = ""
    value_mm: float | None = None
    value_m: float | None = None
    area_m2: float | None = None

    @property
    def citation(self) -> str:
        """``"Approved Document K, Diagram 3.1"`` for running text; empty for no clause."""
        if not self.code:
            return ""
        if not self.clause:
            return self.code
        sep = " " if " " not in self.code else ", "
        return f"{self.code}{sep}{self.clause}"

    @property
    def cited(self) -> bool:
        """Whether the rule names a code (the generic profile's rules do not)."""
        return bool(self.code)


@dataclass(frozen=True, slots=True)
class ProfileWords:
    """The words people use there: ``storey`` ("storey" / "story"), ``storeys``, ``flat``
    ("flat" / "apartment"), ``flats``."""

    storey: str = "storey"
    storeys: str = "storeys"
    flat: str = "flat"
    flats: str = "flats"


@dataclass(frozen=True, slots=True)
class CodeProfile:
    """A jurisdiction's rules and defaults.

    ``units``: ``"metric"`` or ``"imperial"``; ``currency``: ISO 4217 code; ``date_style``: how
    dates are written there (``"DD/MM/YYYY"``, ``"MM/DD/YYYY"``, ``"YYYY-MM-DD"``).
    ``non_releasable_from_m``: floor height above ground (m) from which a device that cannot be
    released by hand may be fitted (0: on any floor; ``None``: nowhere) - never on an emergency
    escape window, whatever the profile says.
    """

    id: str
    name: str
    jurisdiction: str
    summary: str
    rules: tuple[CodeRule, ...]
    units: str = "metric"
    currency: str = "EUR"
    date_style: str = "YYYY-MM-DD"
    words: ProfileWords = ProfileWords()
    non_releasable_from_m: float | None = 0.0

    @property
    def date_format(self) -> str:
        """The profile's date style as a :func:`petfall_audit.present.fmt_date` style:
        ``"dmy"`` (14 March 2026), ``"mdy"`` (March 14, 2026) or ``"iso"``."""
        return _DATE_FORMATS.get(self.date_style, "iso")

    def rule(self, role: str) -> CodeRule | None:
        """The first rule with ``role`` (see :data:`ROLES`), or ``None`` if the profile has
        none."""
        for r in self.rules:
            if r.role == role:
                return r
        return None

    def rules_for(self, role: str) -> tuple[CodeRule, ...]:
        """Every rule with ``role``, in profile order."""
        return tuple(r for r in self.rules if r.role == role)

    @property
    def cites_clauses(self) -> bool:
        """Whether any rule names a code and clause (false for the generic profile)."""
        return any(r.cited for r in self.rules)

    def cite(self, role: str) -> str:
        """The citation of the rule with ``role``; empty when there is none or it names no
        code."""
        r = self.rule(role)
        return r.citation if r is not None else ""

    def allows_non_releasable(self, floor_height_m: float) -> bool:
        """Whether a device that cannot be released by hand may go on a floor ``floor_height_m``
        metres above ground (never on an escape window: that is checked apart)."""
        if self.non_releasable_from_m is None:
            return False
        return floor_height_m >= self.non_releasable_from_m - 1e-9


@functools.cache
def code_profile(profile_id: str = DEFAULT_PROFILE) -> CodeProfile:
    """The shipped profile ``profile_id`` (one of :data:`PROFILE_IDS`), read once.

    Raises ``KeyError`` for an unknown id and
    :class:`~petfall_audit.errors.CodeProfileError` for a malformed profile file."""
    if profile_id not in PROFILE_IDS:
        raise KeyError(profile_id)
    from petfall_audit.io.code_profiles import load_code_profile  # io reads the data

    return load_code_profile(profile_id)


def building_profile(building: object) -> CodeProfile:
    """The profile a :class:`~petfall_audit.model.Building` names (``info.code_profile``)."""
    info = getattr(building, "info", None)
    return code_profile(getattr(info, "code_profile", DEFAULT_PROFILE) or DEFAULT_PROFILE)
