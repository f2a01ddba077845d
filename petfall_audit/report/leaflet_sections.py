"""The tenant leaflet's sections: what it says, which parts are printed, and the user's edits.

A charity chooses and edits the sections before printing (the app's leaflet dialog, the command
line's ``--leaflet-omit`` / ``--leaflet-text`` options). Sections are plain data
(:class:`LeafletSection`); :func:`default_sections` gives the shipped wording in the words of the
building's code profile ("storeys" / "stories", "flat" / "apartment"). The escape-window warning
and the cautions are not sections: every leaflet prints them.

The text form (:func:`sections_text`, :func:`parse_sections_text`) is what a user edits: a
section starts with a line ``[key] Title``, and each following non-blank line is one paragraph
or bullet (a leading ``- `` is dropped). Sections left out of the text are not printed.
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence
from dataclasses import dataclass, replace

from petfall_audit.code_profile import CodeProfile, code_profile
from petfall_audit.present import fmt_int

__all__ = [
    "SECTION_KEYS",
    "MEASURES",
    "LeafletSection",
    "LeafletChoice",
    "LeafletTextError",
    "default_sections",
    "choose_sections",
    "sections_text",
    "parse_sections_text",
]

#: The sections a leaflet can have, in their default order.
SECTION_KEYS: tuple[str, ...] = ("why", "checks", "building", "after_fall", "contact")
#: The name of the plan's measures (a line of the "building" section) in ``--leaflet-omit``.
MEASURES = "measures"
#: Limits on edited text (a leaflet is one or two pages).
MAX_TEXT_CHARS = 20_000
MAX_ITEMS = 40


class LeafletTextError(ValueError):
    """Edited leaflet text that cannot be read; the message names the line."""


@dataclass(frozen=True, slots=True)
class LeafletSection:
    """One part of the leaflet: ``key`` (one of :data:`SECTION_KEYS`), ``title``, ``items``
    (paragraphs, or bullets when ``bullets``). The "building" section gets the plan's measures
    in front of its items when they are chosen; the "contact" section prints the contact block,
    then its items."""

    key: str
    title: str
    items: tuple[str, ...] = ()
    bullets: bool = True


@dataclass(frozen=True, slots=True)
class LeafletChoice:
    """What to print: ``sections`` in order (``None``: the defaults) and whether the "building"
    section names the measures of the fix plan (``include_measures``)."""

    sections: tuple[LeafletSection, ...] | None = None
    include_measures: bool = True


CHECKS: tuple[str, ...] = (
    "Open windows only if a cat-proof screen or a limiter keeps the gap too small for a cat's "
    "head. Child window guards are not enough: a cat fits through much smaller gaps. On a "
    "window you may need to escape through, use only a screen or limiter you can open by hand, "
    "without a key or tool.",
    "Never leave a tilt-and-turn window tilted while your cat is alone: cats get stuck in the gap.",
    "On a balcony, a cat net with a small mesh (3 cm or less) gives good protection. Keep "
    "it tight and check it often: cats climb and bite nets. Ask first: see below.",
    "Move chairs, planters and bins away from the balcony rail, so your cat cannot climb up.",
    "Do not leave your cat alone on a balcony. Young cats and cats that chase birds are most at "
    "risk, especially on warm evenings and at night.",
)

AFTER_A_FALL: tuple[str, ...] = (
    "Take your cat to a veterinarian at once, even if it seems fine. Injuries to the chest and "
    "inside the body are common and often do not show at first.",
    "Move the cat gently, in a box or on a towel, and keep it warm and quiet.",
)


def default_sections(profile: CodeProfile | None = None) -> tuple[LeafletSection, ...]:
    """The shipped sections, in the words of ``profile`` (default: generic), with its
    animal-welfare rule on cats and balconies where it has one."""
    p = code_profile() if profile is None else profile
    w = p.words
    checks = CHECKS + tuple(
        f"The rules here say: {r.text} ({r.citation})." for r in p.rules_for("animal_welfare")
        if r.cited
    )
    return (
        LeafletSection(
            "why",
            f"Why cats fall, even from high {w.storeys}",
            (
                "Cats are agile, but they fall. A cat can leap at a bird or insect, lose its "
                "footing on a rail, or slip through a gap made for children's safety. Falls from "
                f"higher {w.storeys} are not safer: in recent veterinary studies, injuries grew "
                "worse with height.",
            ),
            bullets=False,
        ),
        LeafletSection("checks", "What to check at home", checks),
        LeafletSection(
            "building",
            "What the building is doing",
            (
                f"The building has surveyed the balconies and windows of every {w.flat} for "
                "fall risks to cats.",
                "Ask before fitting nets or anything else to the outside of the building: some "
                "fittings need permission, and escape windows must stay usable.",
            ),
        ),
        LeafletSection("after_fall", "If your cat falls", AFTER_A_FALL),
        LeafletSection("contact", "Questions? Contact", (), bullets=False),
    )


def choose_sections(
    sections: Sequence[LeafletSection], omit: Iterable[str] = ()
) -> LeafletChoice:
    """A choice that leaves out the sections named in ``omit`` (keys of :data:`SECTION_KEYS`,
    or :data:`MEASURES` for the plan's measures). Raises ``ValueError`` for an unknown name."""
    names = {n.strip() for n in omit if n.strip()}
    unknown = names - set(SECTION_KEYS) - {MEASURES}
    if unknown:
        known = ", ".join((*SECTION_KEYS, MEASURES))
        raise ValueError(f"unknown leaflet section {sorted(unknown)[0]!r} (one of {known})")
    kept = tuple(s for s in sections if s.key not in names)
    return LeafletChoice(kept, include_measures=MEASURES not in names)


def sections_text(sections: Sequence[LeafletSection]) -> str:
    """The sections as editable text (see the module notes)."""
    blocks = []
    for s in sections:
        lines = [f"[{s.key}] {s.title}"]
        lines += [f"- {i}" if s.bullets else i for i in s.items]
        blocks.append("\n".join(lines))
    return "\n\n".join(blocks) + "\n"


def parse_sections_text(
    text: str, defaults: Sequence[LeafletSection] | None = None
) -> tuple[LeafletSection, ...]:
    """Sections from edited text, in its order. A section keeps the bullet style of its default
    (``defaults``: :func:`default_sections`). Raises :class:`LeafletTextError` naming the line of
    an unknown or repeated key, text before the first section, or text that is too long."""
    if len(text) > MAX_TEXT_CHARS:
        raise LeafletTextError(
            f"the leaflet text is longer than {fmt_int(MAX_TEXT_CHARS)} characters: a leaflet "
            "is one or two pages"
        )
    base = {s.key: s for s in (default_sections() if defaults is None else defaults)}
    out: list[LeafletSection] = []
    current: LeafletSection | None = None
    items: list[str] = []

    def close() -> None:
        if current is not None:
            out.append(replace(current, items=tuple(items)))

    for n, raw in enumerate(text.splitlines(), start=1):
        line = raw.strip()
        if not line:
            continue
        if line.startswith("["):
            key, sep, title = line[1:].partition("]")
            key = key.strip()
            if not sep or key not in SECTION_KEYS:
                raise LeafletTextError(
                    f"line {n}: {line[:40]!r} is not a section start; write [key] Title with a "
                    f"key among {', '.join(SECTION_KEYS)}"
                )
            if any(s.key == key for s in out) or (current is not None and current.key == key):
                raise LeafletTextError(f"line {n}: the section [{key}] appears twice")
            close()
            default = base.get(key, LeafletSection(key, ""))
            current = replace(default, title=title.strip() or default.title)
            items = []
            continue
        if current is None:
            raise LeafletTextError(
                f"line {n}: text before the first section; start with a line such as "
                f"[{SECTION_KEYS[0]}] Title"
            )
        if len(items) >= MAX_ITEMS:
            raise LeafletTextError(f"line {n}: more than {MAX_ITEMS} lines in one section")
        items.append(line[2:].strip() if line.startswith("- ") else line)
    close()
    return tuple(out)
