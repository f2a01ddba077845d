"""A code profile for people: its rules as rows (topic, rule, clause and edition, confidence)
and the sentence that says what the profile means, for the app's building panel and the PDF's
method section alike."""

from __future__ import annotations

from dataclasses import dataclass

from petfall_audit.code_profile import (
    CONFIDENCE_LEVELS,
    PROFILE_IDS,
    ROLES,
    CodeProfile,
    code_profile,
)

__all__ = [
    "GENERIC_LEAD",
    "CodeRuleRow",
    "code_rule_rows",
    "code_profile_lead",
    "profile_choices",
]

#: What the generic profile means, said wherever its rules are listed.
GENERIC_LEAD = (
    "No jurisdiction was chosen for this building (the generic code profile): the figures below "
    "are common ones without a clause. Local rules must be checked against the building code "
    "in force where the building stands."
)
#: How each confidence level reads.
_CONFIDENCE_WORDS = dict(zip(CONFIDENCE_LEVELS, (
    "read in the text", "read in a summary", "from memory: verify"), strict=True))


@dataclass(frozen=True, slots=True)
class CodeRuleRow:
    """One rule of a code profile for people: ``topic`` (what it is about), ``rule`` (what it
    asks), ``reference`` (code, clause and edition, or "no clause") and ``confidence``."""

    topic: str
    rule: str
    reference: str
    confidence: str


def _capital(text: str) -> str:
    return text[:1].upper() + text[1:]


def code_rule_rows(profile: CodeProfile) -> tuple[CodeRuleRow, ...]:
    """The profile's rules in profile order, as rows."""
    rows = []
    for r in profile.rules:
        ref = r.citation or "no clause: check the local rule"
        if r.cited and r.edition:
            ref = f"{ref} ({r.edition})"
        rows.append(CodeRuleRow(_capital(ROLES.get(r.role, r.role)), _capital(r.text), ref,
                                _CONFIDENCE_WORDS.get(r.confidence, r.confidence)))
    return tuple(rows)


def code_profile_lead(profile: CodeProfile) -> str:
    """What the profile covers and how far to trust it (the generic one: :data:`GENERIC_LEAD`)."""
    if not profile.cites_clauses:
        return GENERIC_LEAD
    return (
        f"{profile.summary} The rules below are the ones this audit cites, each with its clause, "
        "the edition it was read in and how sure we are of it; the code in force locally, in its "
        "current edition, prevails."
    )


def profile_choices() -> tuple[tuple[str, str], ...]:
    """(id, name) of every shipped profile, in the order the app lists them."""
    return tuple((pid, code_profile(pid).name) for pid in PROFILE_IDS)
