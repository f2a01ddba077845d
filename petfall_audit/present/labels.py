"""Names for people: opening kinds, enum values, cat-profile presets and injury bands."""

from __future__ import annotations

from enum import StrEnum

from petfall_audit.injury import BANDS
from petfall_audit.model import (
    KIND_LABELS,
    CatsPresent,
    OpenFrequency,
    OpeningKind,
    Screen,
    SurfaceKind,
)

__all__ = ["ENUM_LABELS", "PRESET_LABELS", "BAND_LABELS", "enum_label", "kind_label",
           "preset_label", "band_label"]

#: Every enum value a user picks or reads, in plain words.
ENUM_LABELS: dict[StrEnum, str] = {
    **KIND_LABELS,  # type: ignore[dict-item]
    Screen.NONE: "No screen",
    Screen.INSECT: "Insect screen",
    Screen.PET_RESISTANT: "Pet-resistant screen",
    OpenFrequency.NEVER: "Never",
    OpenFrequency.RARELY: "Rarely",
    OpenFrequency.SEASONAL: "In warm months",
    OpenFrequency.DAILY: "Daily",
    OpenFrequency.ALWAYS: "Always open",
    CatsPresent.YES: "Yes",
    CatsPresent.NO: "No",
    CatsPresent.UNKNOWN: "Not known",
    SurfaceKind.CONCRETE: "Concrete / paving",
    SurfaceKind.ASPHALT: "Asphalt",
    SurfaceKind.GRAVEL: "Gravel",
    SurfaceKind.LAWN: "Lawn / soil",
    SurfaceKind.PLANTING: "Planting bed / shrubs",
    SurfaceKind.WATER: "Water",
    SurfaceKind.ROOF: "Roof membrane",
    SurfaceKind.DECK: "Timber deck",
}

#: The cat-profile presets in plain words.
PRESET_LABELS: dict[str, str] = {
    "adult": "Adult cats (about 4 kg)",
    "kitten": "Kittens and young cats",
    "heavy_adult": "Heavy adult cats (about 6 kg)",
}

#: The injury bands as a reader sees them (index = band number).
BAND_LABELS: tuple[str, ...] = tuple(b.capitalize() for b in BANDS)


def _plain(key: str) -> str:
    return key.replace("_", " ").capitalize()


def enum_label(value: StrEnum) -> str:
    """Plain-words label of an enum member."""
    return ENUM_LABELS.get(value, _plain(str(value.value)))


def kind_label(kind: OpeningKind | str) -> str:
    """Plain-words label of an opening kind (an :class:`OpeningKind` or its file value)."""
    try:
        return KIND_LABELS[OpeningKind(getattr(kind, "value", kind))]
    except ValueError:
        return _plain(str(kind))


def preset_label(preset: str | None) -> str:
    """Plain-words label of a cat-profile preset; ``None`` or empty: "Custom cat profile"."""
    if not preset:
        return "Custom cat profile"
    return PRESET_LABELS.get(preset, _plain(preset))


def band_label(band: int | None) -> str:
    """The injury band ``band`` (0..3) in words, capitalised; ``None`` or -1: "No result"."""
    if band is None or not 0 <= int(band) < len(BAND_LABELS):
        return "No result"
    return BAND_LABELS[int(band)]
