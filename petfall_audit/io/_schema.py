"""Pydantic v2 models of the building file (version 1) and its JSON Schema.

Each field's description and limits come from the field registry
(:mod:`petfall_audit.field_registry`), so the schema, the editor and the schedule import agree.
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

from petfall_audit.field_registry import field_def, schema_constraints
from petfall_audit.io._json_schema import dumps_schema_text, schema_of
from petfall_audit.limits import LIMITS, Limits
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
    "FixRecordModel",
    "FixStatusName",
    "PlanSettingsModel",
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
_PhotoPath = Annotated[str, Field(max_length=_L.photo_path_max_chars)]

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
    samples: int | None = Field(
        default=None, ge=1, le=_L.samples_max,
        description="Sampled cats of the assessment the plan was made from; null or missing: "
                    "the default (4000). Version 2, optional.",
    )
    seed: int | None = Field(
        default=None, ge=0, le=_L.seed_max,
        description="Random seed of that assessment; null or missing: the default (1). "
                    "Version 2, optional.",
    )


FixStatusName = Literal["recommended", "approved", "fitted", "checked", "declined"]


class FixRecordModel(_Strict):
    """One item of "fixes": a recommended fix and what became of it."""

    opening: str = Field(min_length=1, max_length=_L.id_max_chars,
                         description="Id of the opening the fix is for.")
    control: str = Field(min_length=1, max_length=_L.id_max_chars,
                         description="Id of the control in the control catalogue.")
    status: FixStatusName = Field(
        default="recommended",
        description="recommended, approved, fitted, checked (fitted and checked on site) or "
                    "declined.",
    )
    date: str = Field(default="", pattern=r"^(\d{4}-\d{2}-\d{2})?$",
                      description="Date of the status, YYYY-MM-DD, or empty.")
    note: str = Field(default="", max_length=_L.notes_max_chars,
                      description="Free note (who approved it, the fitter...).")

    @field_validator("date")
    @classmethod
    def _real_date(cls, value: str) -> str:
        if value and not is_iso_date(value):
            raise ValueError(f"no such date: {value!r}")
        return value


def _rf(section: str, name: str, **extra: Any) -> Any:
    """A pydantic ``Field`` with the registry's description and limits of ``section.name``."""
    return Field(**{**schema_constraints(section, name), **extra})


def _info(name: str, **extra: Any) -> Any:
    return _rf("info", name, default=_default(BuildingInfo, name), **extra)


class BuildingModel(_Strict):
    """The "building" section: who and what is audited."""

    name: str = _rf("info", "name")
    address: str = _info("address")
    site_altitude_m: float = _info("site_altitude_m")
    air_temperature_c: float = _info("air_temperature_c")
    auditor: str = _info("auditor")
    audit_date: str = _info("audit_date", pattern=r"^(\d{4}-\d{2}-\d{2})?$")
    notes: str = _info("notes")
    plan: PlanSettingsModel | None = Field(
        default=None, description="The fix plan's settings (optional; missing: none set)."
    )
    code_profile: CodeProfileName = _info("code_profile")

    @field_validator("audit_date")
    @classmethod
    def _real_date(cls, value: str) -> str:
        if value and not is_iso_date(value):
            raise ValueError(f"no such date: {value!r}")
        return value


class FloorModel(_Strict):
    """An item of "floors": a storey."""

    level: int = _rf("floors", "level")
    label: str = _rf("floors", "label")
    elevation_m: float = _rf("floors", "elevation_m")


class FacadeModel(_Strict):
    """An item of "facades": a named building face."""

    id: str = _rf("facades", "id")
    length_m: float = _rf("facades", "length_m")
    label: str = _rf("facades", "label", default=_default(Facade, "label"))


def _surface(name: str, **extra: Any) -> Any:
    return _rf("surfaces", name, default=_default(Surface, name), **extra)


class SurfaceModel(_Strict):
    """An item of "surfaces": what lies below a facade."""

    id: str = _rf("surfaces", "id")
    kind: SurfaceKindName = _rf("surfaces", "kind")
    elevation_m: float = _rf("surfaces", "elevation_m")
    facade: str | None = _surface("facade")
    from_facade_m: float = _surface("from_facade_m")
    to_facade_m: float | None = _surface("to_facade_m")
    label: str = _surface("label")
    x_from_m: float | None = _surface("x_from_m")
    x_to_m: float | None = _surface("x_to_m")


def _injury(name: str) -> Any:
    return _rf("injury", name, default=_default(InjuryThresholds, name))


class InjuryModel(_Strict):
    """The "injury" section: the injury dose–response (version 2; absent = the fitted
    defaults)."""

    moderate_g: float = _injury("moderate_g")
    serious_g: float = _injury("serious_g")
    life_threatening_g: float = _injury("life_threatening_g")
    spread: float = _injury("spread")

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


def _op(name: str) -> Any:
    return _rf("openings", name, default=_opening_default(name))


class OpeningModel(_Strict):
    """An item of "openings": a balcony, terrace, gallery or window."""

    id: str = _rf("openings", "id")
    floor: int = _rf("openings", "floor")
    facade: str = _rf("openings", "facade")
    kind: OpeningKindName = _rf("openings", "kind")
    x_m: float = _rf("openings", "x_m")
    width_m: float = _rf("openings", "width_m")
    projection_m: float = _op("projection_m")
    perch_height_m: float = _op("perch_height_m")
    largest_gap_mm: float | None = _op("largest_gap_mm")
    bottom_gap_mm: float | None = _op("bottom_gap_mm")
    climbable_infill: bool = _op("climbable_infill")
    flat_rail_top: bool = _op("flat_rail_top")
    climbing_aids: bool = _op("climbing_aids")
    limiter_gap_mm: float | None = _op("limiter_gap_mm")
    screen: ScreenName = _op("screen")
    netting_mesh_mm: float | None = _op("netting_mesh_mm")
    open_frequency: OpenFrequencyName = _op("open_frequency")
    cats_present: CatsPresentName = _op("cats_present")
    escape_window: bool = _op("escape_window")
    notes: str = _op("notes")
    photos: list[_PhotoPath] = Field(
        default_factory=list, max_length=_L.photos_max,
        description=field_def("openings", "photos").description,
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
    fixes: list[FixRecordModel] = Field(
        default_factory=list, max_length=_L.fixes_max,
        description="The recommended fixes and what became of each (version 2, optional; "
                    "absent: none recorded).",
    )


def _field_names(*models: type[BaseModel]) -> frozenset[str]:
    return frozenset(name for m in models for name in m.model_fields)


#: Every field name the file knows, for "did you mean" hints.
ALL_FIELD_NAMES: frozenset[str] = _field_names(
    DocumentModel,
    BuildingModel,
    PlanSettingsModel,
    FixRecordModel,
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
    return schema_of(
        DocumentModel,
        f"petfall-audit building file, version {CURRENT_VERSION}. The schema checks the "
        "shape of a file; cross-references (floors, facades, duplicate ids) are checked "
        "by the loader. See docs/building-file.md.",
    )


def dumps_schema() -> str:
    """The schema as committed: indented, ending with a newline."""
    return dumps_schema_text(building_json_schema())


if __name__ == "__main__":  # pragma: no cover
    from petfall_audit._resources import resource_path
    from petfall_audit.io.atomic import atomic_write_text

    atomic_write_text(resource_path(SCHEMA_FILENAME), dumps_schema())
