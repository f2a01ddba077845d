"""Names for people: opening kinds, enum values, cat-profile presets and injury bands."""

from __future__ import annotations

from enum import StrEnum

from petfall_audit.injury import BANDS
from petfall_audit.model import (
    KIND_LABELS,
    Building,
    CatsPresent,
    OpenFrequency,
    OpeningKind,
    Screen,
    SurfaceKind,
)

__all__ = ["DRAG_AREA_NOTE", "ENUM_LABELS", "PRESET_LABELS", "BAND_LABELS", "PARAMETER_LABELS",
           "SPEED_TERMS", "enum_label", "kind_label", "preset_label", "band_label", "surface_label",
           "surface_kind_label", "landing_names", "HIERARCHY_LABELS", "hierarchy_label",
           "budget_axis_label"]

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

#: The cat-profile parameters in plain words (the sensitivity chart and the assumptions table).
#: The drag terms name their symbol in brackets; :data:`DRAG_AREA_NOTE` says what it is.
PARAMETER_LABELS: dict[str, str] = {
    "mass_kg": "Body mass",
    "cda_tense_m2": "Air drag when tense (C_d·A)",
    "cda_spread_m2": "Air drag when spread out (C_d·A)",
    "relax_probability": "Chance of spreading out",
    "relax_fraction": "Spreading-out point",
    "righting_time_s": "Righting time",
    "launch_speed_mps": "Outward launch speed",
}

#: What C_d·A is, in words, wherever the symbol is shown.
DRAG_AREA_NOTE = ("C_d·A, the drag area, is the cat's drag coefficient times its frontal area "
                  "(m²): the larger it is, the more the air slows the cat")

#: The speeds shown for one opening, each with what it means, so that the several figures a
#: reader meets for one opening (range, median, one typical cat, the curve) are told apart.
SPEED_TERMS: dict[str, str] = {
    "impact_median": "Impact speed (median): half of the simulated cats land faster, half "
                     "slower; the speed the tables show",
    "impact_range": "Impact speed range (5th–95th percentile): nine in ten simulated cats land "
                    "within it",
    "typical_fall": "Typical fall: one cat with the profile's median body falling the median "
                    "drop; it lands a little faster or slower than the median of all cats",
    "curve": "Speed on the curve: the cat with the profile's median body falling each drop "
             "(an opening's mark sits at its median drop); the median of all simulated cats "
             "can differ slightly",
}

#: The hierarchy of controls (:data:`petfall_audit.fixes.HIERARCHY`) in plain words.
HIERARCHY_LABELS: dict[str, str] = {
    "remove": "Remove the exposure",
    "engineer": "Fitted barrier",
    "inform": "Guidance for residents",
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


def surface_kind_label(kind: StrEnum | str) -> str:
    """Plain name of a surface kind given as a :class:`SurfaceKind` or its file value."""
    try:
        return enum_label(SurfaceKind(str(getattr(kind, "value", kind))))
    except ValueError:
        return _plain(str(kind))


def surface_label(label: str, kind: StrEnum | str | None = None) -> str:
    """What a surface is called for a reader: its own label, else the plain name of its kind
    ("Roof membrane"), never a file id such as ``podium_roof``."""
    if label.strip():
        return label.strip()
    return surface_kind_label(kind) if kind else "Surface"


def landing_names(building: Building) -> dict[str, str]:
    """What to call each place a cat can land, by its id: a surface by its label (or its
    kind's name), an opening below as "balcony S03-T1", the ground as "the ground"."""
    names = {o.id: f"{kind_label(o.kind).lower()} {o.id}" for o in building.openings}
    names.update({s.id: surface_label(s.label, s.kind) for s in building.surfaces})
    names.setdefault("ground", "the ground")
    return names


def hierarchy_label(level: str) -> str:
    """Plain words of a control's place in the hierarchy of controls (``"engineer"`` ->
    ``"Fitted barrier"``)."""
    return HIERARCHY_LABELS.get(level, _plain(level))


def budget_axis_label(currency: str) -> str:
    """The budget axis of a risk-against-budget curve, which is logarithmic:
    ``"budget (EUR, log scale)"`` (no currency: ``"budget (log scale)"``)."""
    return f"budget ({currency}, log scale)" if currency else "budget (log scale)"
