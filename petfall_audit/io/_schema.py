"""Pydantic v2 models of the building file (version 1) and its JSON Schema.

These models check the *shape* of a document: types, allowed values, unknown fields, required
fields and single-field limits. Cross-field and cross-reference checks (duplicate ids, missing
floors, surfaces above openings...) run on the built model in
:func:`petfall_audit.io.building_file.validate_building`. Both use the limits defined here.

Validation is strict: a number written as text, ``1`` for ``true`` or ``2.0`` for a floor level
is refused rather than converted. Units follow the field names (``_m`` metres, ``_mm``
millimetres, ``_c`` °C, ``_kg``, ``_m2`` m², ``_s`` seconds, ``_mps`` m/s).

Regenerate the committed schema after changing a model::

    python -m petfall_audit.io._schema
"""

from __future__ import annotations

import dataclasses
import datetime as _dt
import json
from typing import Annotated, Any, Literal, Union

from pydantic import (
    BaseModel,
    ConfigDict,
    Discriminator,
    Field,
    Tag,
    field_validator,
    model_validator,
)

from petfall_audit.model import (
    CAT_PRESETS,
    BuildingInfo,
    Facade,
    InjuryThresholds,
    Opening,
    Surface,
)

__all__ = [
    "FORMAT",
    "CURRENT_VERSION",
    "SCHEMA_FILENAME",
    "Limits",
    "LIMITS",
    "DocumentModel",
    "BuildingModel",
    "FloorModel",
    "FacadeModel",
    "SurfaceModel",
    "OpeningModel",
    "CatProfileModel",
    "CatProfileField",
    "InjuryModel",
    "OpeningKindName",
    "SurfaceKindName",
    "ScreenName",
    "OpenFrequencyName",
    "CatsPresentName",
    "PresetName",
    "CodeProfileName",
    "Distribution",
    "DISTRIBUTION_HELP",
    "NormalModel",
    "UniformModel",
    "LogNormalModel",
    "LogNormalParams",
    "CAT_PARAMETERS",
    "ALL_FIELD_NAMES",
    "is_iso_date",
    "building_json_schema",
]

FORMAT = "petfall-audit-building"
CURRENT_VERSION = 2
SCHEMA_FILENAME = "building.schema.json"


@dataclasses.dataclass(frozen=True, slots=True)
class Limits:
    """Plausibility limits; values outside them are reported as absurd (units in the names)."""

    level_min: int = -20
    level_max: int = 300
    elevation_min_m: float = -100.0
    elevation_max_m: float = 1000.0
    altitude_min_m: float = -500.0
    altitude_max_m: float = 9000.0
    temperature_min_c: float = -60.0
    temperature_max_c: float = 60.0
    length_max_m: float = 1000.0  # facade length, position along it, distance out from it
    width_max_m: float = 100.0
    projection_max_m: float = 30.0
    perch_height_max_m: float = 3.0
    gap_max_mm: float = 2000.0
    mesh_max_mm: float = 500.0
    facade_tolerance_m: float = 0.01  # x_m + width_m may pass the facade end by this much
    catch_reach_m: float = 5.0  # beyond its projection, how far out an opening's fall may land
    mass_min_kg: float = 0.1  # a newborn kitten weighs about 100 g (common practice, no source)
    mass_max_kg: float = 30.0
    cda_min_m2: float = 0.005  # C_d·A of a newborn kitten scaled from an adult's (m^(2/3))
    cda_max_m2: float = 2.0
    righting_time_max_s: float = 5.0
    launch_speed_max_mps: float = 20.0
    # Text limits (characters), so that every file the loader accepts prints: a name or label
    # fits a table cell, a note a few pages.
    id_max_chars: int = 100
    name_max_chars: int = 200  # building name, auditor, floor, facade and surface labels
    address_max_chars: int = 500
    notes_max_chars: int = 20_000
    photo_path_max_chars: int = 500
    photos_max: int = 20  # photos per opening
    budget_max: float = 1e12  # in the plan's currency: more than any building's fixes cost


LIMITS = Limits()


def _default(cls: type, name: str) -> Any:
    """The model dataclass's default for field ``name`` (enums as their string value)."""
    for f in dataclasses.fields(cls):
        if f.name == name:
            value = f.default
            return value.value if hasattr(value, "value") else value
    raise KeyError(name)


def is_iso_date(text: str) -> bool:
    """True for an ISO 8601 calendar date written ``YYYY-MM-DD`` that exists."""
    if len(text) != 10:
        return False
    try:
        _dt.date.fromisoformat(text)
    except ValueError:
        return False
    return True


class _Strict(BaseModel):
    model_config = ConfigDict(extra="forbid", strict=True, allow_inf_nan=False, frozen=True)


_L = LIMITS
_Id = Annotated[
    str,
    Field(min_length=1, max_length=_L.id_max_chars, description="Identifier, unique in its list."),
]
_Name = Annotated[str, Field(max_length=_L.name_max_chars)]
_Notes = Annotated[str, Field(max_length=_L.notes_max_chars)]
_PhotoPath = Annotated[str, Field(max_length=_L.photo_path_max_chars)]
_Level = Annotated[int, Field(ge=_L.level_min, le=_L.level_max)]
_Elevation = Annotated[
    float,
    Field(ge=_L.elevation_min_m, le=_L.elevation_max_m, description="Metres above the datum."),
]
_Gap = Annotated[float, Field(ge=0.0, le=_L.gap_max_mm)]

# The allowed words, spelled out for the schema and the type checker; a test keeps them equal
# to the model's enums and presets.
OpeningKindName = Literal[
    "balcony",
    "terrace",
    "gallery",
    "window_casement",
    "window_sliding",
    "window_hung",
    "window_tilt_turn",
    "window_top_hung",
    "fixed",
]
SurfaceKindName = Literal[
    "concrete", "asphalt", "gravel", "lawn", "planting", "water", "roof", "deck"
]
ScreenName = Literal["none", "insect", "pet_resistant"]
OpenFrequencyName = Literal["never", "rarely", "seasonal", "daily", "always"]
CatsPresentName = Literal["yes", "no", "unknown"]
PresetName = Literal["adult", "kitten", "heavy_adult"]
CodeProfileName = Literal[
    "generic", "england", "us-ibc", "australia-ncc", "canada-nbc", "sweden-bbr"
]


class PlanSettingsModel(_Strict):
    """The "plan" object of the "building" section: the fix plan's settings kept with the audit."""

    budget: float | None = Field(
        default=None, ge=0.0, le=_L.budget_max,
        description="Budget for the fix plan; null or missing: none set (the app proposes a "
                    "default and the PDF audit says it is one).",
    )
    currency: str = Field(
        default="", pattern=r"^([A-Z]{3})?$",
        description="ISO 4217 code of the budget's currency; empty: the control catalogue's.",
    )


class BuildingModel(_Strict):
    """The "building" section: who and what is audited."""

    name: _Name = Field(description="Name of the building.")
    address: str = Field(
        default=_default(BuildingInfo, "address"), max_length=_L.address_max_chars,
        description="Postal address.",
    )
    site_altitude_m: float = Field(
        default=_default(BuildingInfo, "site_altitude_m"),
        ge=_L.altitude_min_m,
        le=_L.altitude_max_m,
        description="Site altitude above mean sea level (m).",
    )
    air_temperature_c: float = Field(
        default=_default(BuildingInfo, "air_temperature_c"),
        ge=_L.temperature_min_c,
        le=_L.temperature_max_c,
        description="Design air temperature (°C).",
    )
    auditor: _Name = Field(
        default=_default(BuildingInfo, "auditor"), description="Who carried out the audit."
    )
    audit_date: str = Field(
        default=_default(BuildingInfo, "audit_date"),
        pattern=r"^(\d{4}-\d{2}-\d{2})?$",
        description="Date of the audit, YYYY-MM-DD, or empty.",
    )
    notes: _Notes = Field(default=_default(BuildingInfo, "notes"), description="Free notes.")
    plan: PlanSettingsModel | None = Field(
        default=None, description="The fix plan's settings (optional; missing: none set)."
    )
    code_profile: CodeProfileName = Field(
        default=_default(BuildingInfo, "code_profile"),
        description="Jurisdiction whose code profile applies (resources/code_profiles/); absent: "
        "'generic', which cites no clause. Version 2.",
    )

    @field_validator("audit_date")
    @classmethod
    def _real_date(cls, value: str) -> str:
        if value and not is_iso_date(value):
            raise ValueError(f"no such date: {value!r}")
        return value


class FloorModel(_Strict):
    """An item of "floors": a storey."""

    level: _Level = Field(description="Level number (0 = ground floor; negative below).")
    label: _Name = Field(description="Label shown to people, e.g. 'Level 12'.")
    elevation_m: _Elevation = Field(description="Finished floor level above the datum (m).")


class FacadeModel(_Strict):
    """An item of "facades": a named building face."""

    id: _Id
    length_m: float = Field(gt=0.0, le=_L.length_max_m, description="Length of the face (m).")
    label: _Name = Field(default=_default(Facade, "label"), description="Label shown to people.")


class SurfaceModel(_Strict):
    """An item of "surfaces": what lies below a facade."""

    id: _Id
    kind: SurfaceKindName = Field(description="What the surface is made of.")
    elevation_m: _Elevation = Field(description="Top of the surface above the datum (m).")
    facade: str | None = Field(
        default=_default(Surface, "facade"),
        max_length=_L.id_max_chars,
        description="Id of the facade it lies in front of; null for every facade.",
    )
    from_facade_m: float = Field(
        default=_default(Surface, "from_facade_m"),
        ge=0.0,
        le=_L.length_max_m,
        description="Where it starts, out from the facade (m).",
    )
    to_facade_m: float | None = Field(
        default=_default(Surface, "to_facade_m"),
        ge=0.0,
        le=_L.length_max_m,
        description="Where it ends, out from the facade (m); null for unbounded.",
    )
    label: _Name = Field(default=_default(Surface, "label"), description="Label shown to people.")
    x_from_m: float | None = Field(
        default=None,
        ge=0.0,
        le=_L.length_max_m,
        description="Where it starts along its facade (m, as openings' x_m); null for the "
        "facade's start. Version 2.",
    )
    x_to_m: float | None = Field(
        default=None,
        ge=0.0,
        le=_L.length_max_m,
        description="Where it ends along its facade (m); null for the facade's end. Version 2.",
    )


class InjuryModel(_Strict):
    """The "injury" section: the injury dose–response (version 2; absent = the fitted
    defaults)."""

    moderate_g: float = Field(
        default=_default(InjuryThresholds, "moderate_g"), gt=0.0, le=10_000.0,
        description="Median dose (mean deceleration, g) of a moderate or worse injury.",
    )
    serious_g: float = Field(
        default=_default(InjuryThresholds, "serious_g"), gt=0.0, le=10_000.0,
        description="Median dose (g) of a serious or worse injury.",
    )
    life_threatening_g: float = Field(
        default=_default(InjuryThresholds, "life_threatening_g"), gt=0.0, le=10_000.0,
        description="Median dose (g) of a life-threatening injury.",
    )
    spread: float = Field(
        default=_default(InjuryThresholds, "spread"), ge=0.0, le=5.0,
        description="Spread of the log of the dose between cats hurt by the same fall "
        "(0: the band is a step function of the dose).",
    )

    @model_validator(mode="after")
    def _rising(self) -> InjuryModel:
        if not self.moderate_g < self.serious_g < self.life_threatening_g:
            raise ValueError(
                "the median doses must rise from moderate to serious to life-threatening, got "
                f"{self.moderate_g:g}, {self.serious_g:g} and {self.life_threatening_g:g} g"
            )
        return self


def _opening_default(name: str) -> Any:
    return _default(Opening, name)


class OpeningModel(_Strict):
    """An item of "openings": a balcony, terrace, gallery or window."""

    id: _Id
    floor: _Level = Field(description="Level of the floor it is on.")
    facade: str = Field(max_length=_L.id_max_chars, description="Id of its facade.")
    kind: OpeningKindName = Field(description="Kind of opening.")
    x_m: float = Field(ge=0.0, le=_L.length_max_m, description="Left edge along the facade (m).")
    width_m: float = Field(gt=0.0, le=_L.width_max_m, description="Width along the facade (m).")
    projection_m: float = Field(
        default=_opening_default("projection_m"),
        ge=0.0,
        le=_L.projection_max_m,
        description="How far it stands out from the facade (m); 0 for windows.",
    )
    perch_height_m: float = Field(
        default=_opening_default("perch_height_m"),
        ge=0.0,
        le=_L.perch_height_max_m,
        description="Rail top or sill above its floor (m).",
    )
    largest_gap_mm: _Gap | None = Field(
        default=_opening_default("largest_gap_mm"),
        description="Widest gap in the guard's infill (mm); null for solid infill.",
    )
    bottom_gap_mm: _Gap | None = Field(
        default=_opening_default("bottom_gap_mm"),
        description="Gap under the guard (mm); null for none.",
    )
    climbable_infill: bool = Field(
        default=_opening_default("climbable_infill"),
        description="Horizontal rails or other footholds in the infill.",
    )
    flat_rail_top: bool = Field(
        default=_opening_default("flat_rail_top"),
        description="Rail top flat and wide enough to sit on.",
    )
    climbing_aids: bool = Field(
        default=_opening_default("climbing_aids"),
        description="Furniture, planters or bins next to the guard.",
    )
    limiter_gap_mm: _Gap | None = Field(
        default=_opening_default("limiter_gap_mm"),
        description="Opening a limiter allows (mm); null for no limiter.",
    )
    screen: ScreenName = Field(default=_opening_default("screen"), description="Screen fitted.")
    netting_mesh_mm: float | None = Field(
        default=_opening_default("netting_mesh_mm"),
        gt=0.0,
        le=_L.mesh_max_mm,
        description="Mesh of fitted netting (mm); null for no netting.",
    )
    open_frequency: OpenFrequencyName = Field(
        default=_opening_default("open_frequency"), description="How often it is open."
    )
    cats_present: CatsPresentName = Field(
        default=_opening_default("cats_present"), description="Whether cats live behind it."
    )
    escape_window: bool = Field(
        default=_opening_default("escape_window"),
        description="An emergency escape window: never block it.",
    )
    notes: _Notes = Field(default=_opening_default("notes"), description="Free notes.")
    photos: list[_PhotoPath] = Field(
        default_factory=list, max_length=_L.photos_max,
        description="Photo files, relative to the building file."
    )


# --- distributions ---------------------------------------------------------------------------


class NormalModel(_Strict):
    """{"mean": m, "sd": s}: a normal distribution (truncated at zero when sampled)."""

    mean: float
    sd: float = Field(ge=0.0)


class UniformModel(_Strict):
    """{"min": a, "max": b}: a uniform distribution on [a, b]."""

    min: float
    max: float


class LogNormalParams(_Strict):
    """Arithmetic mean and standard deviation of a log-normal quantity."""

    mean: float = Field(gt=0.0)
    sd: float = Field(ge=0.0)


class LogNormalModel(_Strict):
    """{"lognormal": {"mean": m, "sd": s}}: a log-normal distribution."""

    lognormal: LogNormalParams


def _distribution_tag(value: Any) -> str | None:
    if isinstance(value, bool):
        return None
    if isinstance(value, int | float):
        return "<number>"
    if isinstance(value, NormalModel):
        return "<normal>"
    if isinstance(value, UniformModel):
        return "<uniform>"
    if isinstance(value, LogNormalModel):
        return "<lognormal>"
    if isinstance(value, dict):
        if "lognormal" in value:
            return "<lognormal>"
        if "mean" in value or "sd" in value:
            return "<normal>"
        if "min" in value or "max" in value:
            return "<uniform>"
    return None


DISTRIBUTION_HELP = (
    'expected a number or a distribution ({"mean": …, "sd": …}, {"min": …, "max": …} '
    'or {"lognormal": {"mean": …, "sd": …}})'
)

Distribution = Annotated[
    Union[  # noqa: UP007 - tagged union members need Annotated
        Annotated[float, Tag("<number>")],
        Annotated[NormalModel, Tag("<normal>")],
        Annotated[UniformModel, Tag("<uniform>")],
        Annotated[LogNormalModel, Tag("<lognormal>")],
    ],
    Discriminator(
        _distribution_tag, custom_error_type="distribution", custom_error_message=DISTRIBUTION_HELP
    ),
]

#: The cat-profile parameters that take a distribution, in file order.
CAT_PARAMETERS: tuple[str, ...] = (
    "mass_kg",
    "cda_tense_m2",
    "cda_spread_m2",
    "relax_fraction",
    "righting_time_s",
    "launch_speed_mps",
)


def _no_default(schema: dict[str, Any]) -> None:
    schema.pop("default", None)


def _param(description: str) -> Any:
    # Left out: taken from the preset. ``null`` is not a value (the discriminator refuses it).
    return Field(default=None, description=description, json_schema_extra=_no_default)


class CatProfileModel(_Strict):
    """The "cat_profile" as an object: an optional preset plus parameter overrides."""

    preset: PresetName | None = Field(
        default="adult",
        description="Preset the missing parameters come from; null for a fully custom profile.",
    )
    mass_kg: Distribution = _param("Body mass (kg).")
    cda_tense_m2: Distribution = _param("Drag coefficient × frontal area, tense posture (m²).")
    cda_spread_m2: Distribution = _param("Drag coefficient × frontal area, spread out (m²).")
    relax_probability: float | None = Field(
        default=None,
        ge=0.0,
        le=1.0,
        description="Chance that the cat spreads out at all (0 to 1).",
        json_schema_extra=_no_default,
    )
    relax_fraction: Distribution = _param(
        "Fraction of the tense terminal speed at which it spreads out (between 0 and 1)."
    )
    righting_time_s: Distribution = _param("Time it needs to turn feet-down (s).")
    launch_speed_mps: Distribution = _param("Horizontal speed leaving the perch (m/s).")


def _profile_tag(value: Any) -> str | None:
    if isinstance(value, str):
        return "<preset>"
    if isinstance(value, dict | CatProfileModel):
        return "<parameters>"
    return None


PROFILE_HELP = (
    "expected a preset name (" + ", ".join(CAT_PRESETS) + ") or an object of cat parameters"
)

CatProfileField = Annotated[
    Union[  # noqa: UP007
        Annotated[PresetName, Tag("<preset>")],
        Annotated[CatProfileModel, Tag("<parameters>")],
    ],
    Discriminator(_profile_tag, custom_error_type="cat_profile", custom_error_message=PROFILE_HELP),
]


class DocumentModel(_Strict):
    """A whole building file, version 2."""

    model_config = ConfigDict(title="petfall-audit building file")

    format: Literal["petfall-audit-building"] = Field(
        description="Always 'petfall-audit-building'."
    )
    version: Literal[2] = Field(description="File format version.")
    building: BuildingModel
    floors: list[FloorModel] = Field(default_factory=list)
    facades: list[FacadeModel] = Field(default_factory=list)
    surfaces: list[SurfaceModel] = Field(default_factory=list)
    openings: list[OpeningModel] = Field(default_factory=list)
    cat_profile: CatProfileField = Field(
        default="adult",
        description="A preset name or an object of parameters (missing ones from the preset).",
    )
    injury: InjuryModel = Field(
        default_factory=InjuryModel,
        description="The injury dose–response (version 2); absent: the fitted defaults.",
    )


def _field_names(*models: type[BaseModel]) -> frozenset[str]:
    return frozenset(name for m in models for name in m.model_fields)


#: Every field name the file knows, for "did you mean" hints.
ALL_FIELD_NAMES: frozenset[str] = _field_names(
    DocumentModel,
    BuildingModel,
    PlanSettingsModel,
    FloorModel,
    FacadeModel,
    SurfaceModel,
    OpeningModel,
    CatProfileModel,
    InjuryModel,
    NormalModel,
    UniformModel,
    LogNormalModel,
)


def building_json_schema() -> dict[str, Any]:
    """The JSON Schema (draft 2020-12) of the current building file version."""
    schema = DocumentModel.model_json_schema(mode="validation")
    title = schema.get("title", "")
    _drop_titles(schema)
    description = (
        f"petfall-audit building file, version {CURRENT_VERSION}. The schema checks the "
        "shape of a file; cross-references (floors, facades, duplicate ids) are checked "
        "by the loader. See docs/building-file.md."
    )
    return {
        "$schema": "https://json-schema.org/draft/2020-12/schema",
        "title": title,
        "description": description,
        **{k: v for k, v in schema.items() if k != "description"},
    }


def _drop_titles(node: Any) -> None:
    """Remove the generated titles ("Site Altitude M"); the descriptions say more.

    (No field of the file is itself called "title", so every "title" key is a schema title.)"""
    if isinstance(node, dict):
        node.pop("title", None)
        for value in node.values():
            _drop_titles(value)
    elif isinstance(node, list):
        for item in node:
            _drop_titles(item)


def dumps_schema() -> str:
    """The schema as committed: indented, keys in generation order, ending with a newline."""
    return json.dumps(building_json_schema(), indent=2, ensure_ascii=False) + "\n"


if __name__ == "__main__":  # pragma: no cover
    from petfall_audit._resources import resource_path
    from petfall_audit.io.atomic import atomic_write_text

    atomic_write_text(resource_path(SCHEMA_FILENAME), dumps_schema())
