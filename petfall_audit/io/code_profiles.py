"""Read and check the code profiles shipped in ``resources/code_profiles/``.

One JSON file per profile (``england.json``...), of the shape :class:`ProfileFileModel` checks;
its JSON Schema is committed beside them as ``code_profile.schema.json``. Regenerate it after
changing a model::

    python -m petfall_audit.io.code_profiles

Loading never guesses: a malformed file raises :class:`~petfall_audit.errors.CodeProfileError`
listing every problem with its place (``rules[3].confidence: ...``). Units follow the field
names (``_mm`` millimetres, ``_m`` metres above ground, ``_m2`` square metres).
"""

from __future__ import annotations

import json
from pathlib import Path
from typing import Any, Literal

from pydantic import BaseModel, ConfigDict, Field, ValidationError, model_validator

from petfall_audit._resources import resource_path
from petfall_audit.code_profile import PROFILE_IDS, ROLES, CodeProfile, CodeRule, ProfileWords
from petfall_audit.errors import CodeProfileError, Place, Problem
from petfall_audit.io._json_schema import dumps_schema_text, schema_of

__all__ = [
    "PROFILE_FORMAT",
    "PROFILE_VERSION",
    "PROFILE_SCHEMA_FILENAME",
    "ProfileFileModel",
    "RuleModel",
    "profile_path",
    "parse_code_profile",
    "load_code_profile",
    "profile_json_schema",
    "dumps_profile_schema",
]

PROFILE_FORMAT = "petfall-audit-code-profile"
PROFILE_VERSION = 1
PROFILE_SCHEMA_FILENAME = "code_profile.schema.json"
_FOLDER = "code_profiles"
_MAX_BYTES = 1_000_000  # a profile is a few kilobytes; refuse anything absurd

ConfidenceName = Literal["read in the text", "read in a summary", "from memory; verify"]
RoleName = Literal[
    "guard_trigger",
    "guard_height",
    "guard_gap",
    "guard_bottom_gap",
    "guard_climb",
    "window_sill",
    "window_device",
    "non_releasable_device",
    "escape_opening",
    "escape_release",
    "attachment_fire",
    "exterior_permission",
    "animal_welfare",
]


class _Strict(BaseModel):
    model_config = ConfigDict(extra="forbid", strict=True, allow_inf_nan=False, frozen=True)


class RuleModel(_Strict):
    """An item of "rules": one rule, where it is written and how sure we are of it."""

    id: str = Field(min_length=1, max_length=60, pattern=r"^[a-z0-9_]+$")
    role: RoleName = Field(description="What the rule is about (see docs/code-profiles.md).")
    text: str = Field(min_length=1, max_length=600, description="What it asks, in plain words.")
    code: str = Field(default="", max_length=120, description="Code or regulation; empty: none.")
    clause: str = Field(default="", max_length=80, description="Clause, table or diagram.")
    edition: str = Field(default="", max_length=80, description="Edition the value was read in.")
    confidence: ConfidenceName = Field(description="How sure we are of the clause and value.")
    value_mm: float | None = Field(default=None, gt=0.0, le=5000.0, description="Length (mm).")
    value_m: float | None = Field(
        default=None, ge=0.0, le=500.0, description="Height above ground (m)."
    )
    area_m2: float | None = Field(default=None, gt=0.0, le=10.0, description="Area (m²).")

    @model_validator(mode="after")
    def _cited_with_edition(self) -> RuleModel:
        if self.code and not self.edition:
            raise ValueError("a rule that names a code must say which edition (\"edition\")")
        if self.clause and not self.code:
            raise ValueError("a clause needs the code it belongs to (\"code\")")
        return self


class WordsModel(_Strict):
    """The "words" section: the words people use there."""

    storey: Literal["storey", "story"] = "storey"
    storeys: Literal["storeys", "stories"] = "storeys"
    flat: Literal["flat", "apartment", "unit"] = "flat"
    flats: Literal["flats", "apartments", "units"] = "flats"


class ProfileFileModel(_Strict):
    """A code profile file."""

    model_config = ConfigDict(title="petfall-audit code profile")

    format: Literal["petfall-audit-code-profile"]
    version: Literal[1]
    id: str = Field(description="Profile id, the file's stem.")
    name: str = Field(min_length=1, max_length=120, description="Name shown to people.")
    jurisdiction: str = Field(min_length=1, max_length=120)
    summary: str = Field(min_length=1, max_length=1000, description="What the profile covers.")
    units: Literal["metric", "imperial"] = Field(description="Units a user there starts in.")
    currency: str = Field(pattern=r"^[A-Z]{3}$", description="ISO 4217 currency code.")
    date_style: Literal["DD/MM/YYYY", "MM/DD/YYYY", "YYYY-MM-DD"]
    words: WordsModel = Field(default_factory=WordsModel)
    non_releasable_from_m: float | None = Field(
        ge=0.0,
        le=500.0,
        description="Floor height above ground (m) from which a device that cannot be released "
        "by hand may go (0: any floor; null: nowhere). Never on an escape window.",
    )
    rules: list[RuleModel] = Field(min_length=1, max_length=100)

    @model_validator(mode="after")
    def _unique_ids(self) -> ProfileFileModel:
        seen: set[str] = set()
        for r in self.rules:
            if r.id in seen:
                raise ValueError(f"two rules have the id {r.id!r}")
            seen.add(r.id)
        return self


def profile_path(profile_id: str) -> Path:
    """Path of the shipped profile file ``profile_id`` (no check that it exists)."""
    return resource_path(_FOLDER) / f"{profile_id}.json"


def parse_code_profile(doc: Any, *, source: str = "") -> CodeProfile:
    """A :class:`~petfall_audit.code_profile.CodeProfile` from a decoded JSON document. Raises
    :class:`CodeProfileError` listing every located problem."""
    try:
        m = ProfileFileModel.model_validate(doc)
    except ValidationError as exc:
        problems = [
            Problem(Place.of_path(tuple(e["loc"])) if e["loc"] else "profile", e["msg"])
            for e in exc.errors(include_url=False)
        ]
        raise CodeProfileError(problems, source) from None
    if m.id not in PROFILE_IDS:
        raise CodeProfileError(
            [Problem("id", f"unknown profile {m.id!r} (one of {', '.join(PROFILE_IDS)})")], source
        )
    assert set(RoleName.__args__) == set(ROLES)  # type: ignore[attr-defined]
    rules = tuple(
        CodeRule(
            id=r.id, role=r.role, text=r.text, confidence=r.confidence, code=r.code,
            clause=r.clause, edition=r.edition, value_mm=r.value_mm, value_m=r.value_m,
            area_m2=r.area_m2,
        )
        for r in m.rules
    )
    return CodeProfile(
        id=m.id,
        name=m.name,
        jurisdiction=m.jurisdiction,
        summary=m.summary,
        rules=rules,
        units=m.units,
        currency=m.currency,
        date_style=m.date_style,
        words=ProfileWords(**m.words.model_dump()),
        non_releasable_from_m=m.non_releasable_from_m,
    )


def load_code_profile(profile_id: str, path: str | Path | None = None) -> CodeProfile:
    """Read the profile ``profile_id`` (default: the shipped file). Raises
    :class:`CodeProfileError` for a malformed, oversized or mismatched file and ``OSError``
    when it cannot be read."""
    p = profile_path(profile_id) if path is None else Path(path)
    if p.stat().st_size > _MAX_BYTES:
        raise CodeProfileError([Problem("file", "larger than 1 MB: not a code profile")], p.name)
    try:
        doc = json.loads(p.read_text(encoding="utf-8"))
    except json.JSONDecodeError as exc:
        raise CodeProfileError(
            [Problem(f"line {exc.lineno}, column {exc.colno}", exc.msg)], p.name
        ) from None
    profile = parse_code_profile(doc, source=p.name)
    if profile.id != profile_id:
        raise CodeProfileError(
            [Problem("id", f"the file says {profile.id!r}, expected {profile_id!r}")], p.name
        )
    return profile


def profile_json_schema() -> dict[str, Any]:
    """The JSON Schema (draft 2020-12) of a code profile file."""
    return schema_of(
        ProfileFileModel,
        "petfall-audit code profile, version 1: the rules of one jurisdiction "
        "with their clause, edition and confidence. See docs/code-profiles.md.",
    )


def dumps_profile_schema() -> str:
    """The schema as committed: indented, ending with a newline."""
    return dumps_schema_text(profile_json_schema())


if __name__ == "__main__":  # pragma: no cover
    from petfall_audit.io.atomic import atomic_write_text

    atomic_write_text(resource_path(_FOLDER) / PROFILE_SCHEMA_FILENAME, dumps_profile_schema())
