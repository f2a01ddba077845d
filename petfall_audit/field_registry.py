"""One registry of the building's fields: name, label, unit kind, limits, aliases, help. No Qt.

Everything that names or checks a field derives from here:

* the editor's fields (:mod:`petfall_audit.editing.fields`: labels, help, units, optional);
* the undo labels (:func:`field_words`: "Set rail or sill height of S-05-2");
* the schedule columns, their header synonyms and their messages
  (:mod:`petfall_audit.io.schedule.columns`, fed by :data:`SCHEDULE_COLUMNS`);
* the building file's JSON Schema (:mod:`petfall_audit.io._schema` takes each field's
  description and limits from :func:`schema_field`).

Units are SI and follow the names (``_m`` metres, ``_mm`` millimetres, ``_c`` °C, ``_g`` g).
``kind`` says how a value is shown and typed: ``length`` (m), ``gap`` (mm), ``int``, ``text``,
``id``, ``ref`` (the id of another item), ``enum``, ``bool``, ``temperature`` (°C), ``dose``
(a mean deceleration in g) or ``number``.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from dataclasses import dataclass
from enum import StrEnum
from typing import Any, Literal

from petfall_audit.limits import LIMITS
from petfall_audit.model import CatsPresent, OpenFrequency, OpeningKind, Screen, SurfaceKind

__all__ = [
    "UnitKind",
    "Section",
    "FieldDef",
    "ScheduleColumnDef",
    "FIELDS",
    "SCHEDULE_COLUMNS",
    "ENUM_SYNONYMS",
    "field_def",
    "section_fields",
    "field_words",
    "schema_constraints",
]

UnitKind = Literal["text", "id", "int", "length", "gap", "enum", "bool", "temperature", "ref",
                   "dose", "number"]
Section = Literal["openings", "floors", "facades", "surfaces", "info", "injury"]


@dataclass(frozen=True, slots=True)
class FieldDef:
    """One field of the building.

    ``label``: the field's name on a form or table header ("Rail or sill height"); ``words``:
    the field in a sentence ("rail or sill height"; default: the label in lower case), used by
    undo labels and messages. ``description``: for a reader of the file (the JSON Schema, with
    units); ``help``: a tooltip for a person. ``minimum`` / ``maximum`` in the field's SI unit,
    ``exclusive_minimum``: the value must be *more* than ``minimum``. ``max_chars``: the longest
    text. ``aliases``: other names people give the field (schedule headers). ``optional``: may be
    empty (``None``). ``editor``: how the app edits a text field (``""`` one line, ``"lines"``,
    ``"date"``).
    """

    section: Section
    name: str
    label: str
    kind: UnitKind
    description: str = ""
    help: str = ""
    words: str = ""
    enum: type[StrEnum] | None = None
    optional: bool = False
    minimum: float | None = None
    maximum: float | None = None
    exclusive_minimum: bool = False
    max_chars: int | None = None
    aliases: tuple[str, ...] = ()
    editor: str = ""

    @property
    def noun(self) -> str:
        """The field in a sentence: ``words``, or the label in lower case."""
        return self.words or self.label.lower()


_L = LIMITS


def _f(section: Section, name: str, label: str, kind: UnitKind, **kw: Any) -> FieldDef:
    return FieldDef(section, name, label, kind, **kw)


_ID = dict(minimum=None, max_chars=_L.id_max_chars, description="Identifier, unique in its list.")
_NAME = dict(max_chars=_L.name_max_chars)

FIELDS: tuple[FieldDef, ...] = (
    # --- openings ---
    _f("openings", "id", "Id", "id", help="Unique name of the opening, e.g. S-05-2", **_ID,
       aliases=("opening", "opening id", "ref", "reference", "opening ref", "tag", "mark",
                "window id", "window ref", "unit ref")),
    _f("openings", "floor", "Floor", "int", help="Level number of the floor it is on",
       description="Level of the floor it is on.", minimum=_L.level_min, maximum=_L.level_max,
       aliases=("level", "storey", "story", "floor level", "floor no", "floor number")),
    _f("openings", "facade", "Facade", "ref", description="Id of its facade.",
       max_chars=_L.id_max_chars,
       aliases=("façade", "elevation name", "face", "side", "orientation")),
    _f("openings", "kind", "Kind", "enum", enum=OpeningKind, description="Kind of opening.",
       aliases=("type", "opening type", "window type", "category")),
    _f("openings", "x_m", "Position along facade", "length", words="position along the facade",
       help="Left edge, from the facade's start", description="Left edge along the facade (m).",
       minimum=0.0, maximum=_L.length_max_m,
       aliases=("x", "position", "offset", "distance from left", "left edge", "x m")),
    _f("openings", "width_m", "Width", "length", description="Width along the facade (m).",
       minimum=0.0, exclusive_minimum=True, maximum=_L.width_max_m,
       aliases=("opening width", "clear width", "w")),
    _f("openings", "projection_m", "Projection", "length",
       help="How far a balcony stands out from the facade (0 for windows)",
       description="How far it stands out from the facade (m); 0 for windows.",
       minimum=0.0, maximum=_L.projection_max_m,
       aliases=("depth", "balcony depth", "outstand")),
    _f("openings", "perch_height_m", "Rail or sill height", "length",
       help="Height of the rail top or sill above the floor",
       description="Rail top or sill above its floor (m).",
       minimum=0.0, maximum=_L.perch_height_max_m,
       aliases=("perch height", "rail height", "guard height", "sill height",
                "balustrade height", "handrail height", "height", "rail", "sill", "rail top",
                "top of rail", "guard")),
    _f("openings", "largest_gap_mm", "Largest gap in guard", "gap", words="largest gap",
       optional=True, help="Widest gap in the infill; empty for solid infill",
       description="Widest gap in the guard's infill (mm); null for solid infill.",
       minimum=0.0, maximum=_L.gap_max_mm,
       aliases=("largest gap", "max gap", "baluster gap", "infill gap", "gap",
                "baluster spacing")),
    _f("openings", "bottom_gap_mm", "Gap under guard", "gap", words="gap under the guard",
       optional=True, help="Gap between the floor and the guard; empty for none",
       description="Gap under the guard (mm); null for none.",
       minimum=0.0, maximum=_L.gap_max_mm,
       aliases=("bottom gap", "toe gap", "gap at floor")),
    _f("openings", "climbable_infill", "Climbable infill", "bool",
       description="Horizontal rails or other footholds in the infill.",
       aliases=("climbable", "horizontal rails")),
    _f("openings", "flat_rail_top", "Flat rail top a cat can sit on", "bool",
       words="flat rail top", description="Rail top flat and wide enough to sit on.",
       aliases=("flat rail top", "flat top", "wide rail top", "flat handrail")),
    _f("openings", "climbing_aids", "Furniture or planters by the guard", "bool",
       words="climbing aids", description="Furniture, planters or bins next to the guard.",
       aliases=("climbing aids", "furniture near guard", "planters")),
    _f("openings", "limiter_gap_mm", "Limiter opening", "gap", optional=True,
       help="Opening a limiter allows; empty for no limiter",
       description="Opening a limiter allows (mm); null for no limiter.",
       minimum=0.0, maximum=_L.gap_max_mm,
       aliases=("limiter gap", "restrictor gap", "limiter", "restrictor", "opening limiter")),
    _f("openings", "screen", "Screen", "enum", enum=Screen, description="Screen fitted.",
       aliases=("insect screen", "fly screen", "mesh screen")),
    _f("openings", "netting_mesh_mm", "Netting mesh", "gap", optional=True,
       help="Mesh size of fitted netting; empty for no netting",
       description="Mesh of fitted netting (mm); null for no netting.",
       minimum=0.0, exclusive_minimum=True, maximum=_L.mesh_max_mm,
       aliases=("net mesh", "netting", "mesh", "mesh size", "net")),
    _f("openings", "open_frequency", "How often open", "enum", enum=OpenFrequency,
       description="How often it is open.",
       aliases=("open frequency", "opened", "frequency", "usage")),
    _f("openings", "cats_present", "Cats live behind it", "enum", enum=CatsPresent,
       words="cats present", description="Whether cats live behind it.",
       aliases=("cats present", "cats", "cat", "has cats", "cat in flat")),
    _f("openings", "escape_window", "Emergency escape window", "bool",
       help="Never fit anything that blocks it",
       description="An emergency escape window: never block it.",
       aliases=("escape window", "emergency escape", "egress", "egress window", "escape")),
    _f("openings", "notes", "Notes", "text", optional=True, editor="lines",
       description="Free notes.", max_chars=_L.notes_max_chars,
       aliases=("note", "comments", "comment", "remarks")),
    _f("openings", "photos", "Photos", "text", optional=True,
       description="Photo files, relative to the building file."),
    # --- floors ---
    _f("floors", "level", "Level", "int", minimum=_L.level_min, maximum=_L.level_max,
       description="Level number (0 = ground floor; negative below)."),
    _f("floors", "label", "Name", "text", optional=True, **_NAME,
       description="Label shown to people, e.g. 'Level 12'.",
       aliases=("floor name", "level name", "level label")),
    _f("floors", "elevation_m", "Floor level above datum", "length", words="elevation",
       description="Finished floor level above the datum (m).",
       minimum=_L.elevation_min_m, maximum=_L.elevation_max_m,
       aliases=("floor height", "ffl", "finished floor level", "level elevation",
                "floor level elevation", "elevation")),
    # --- facades ---
    _f("facades", "id", "Id", "id", **_ID),
    _f("facades", "label", "Name", "text", optional=True, **_NAME,
       description="Label shown to people."),
    _f("facades", "length_m", "Length", "length", description="Length of the face (m).",
       minimum=0.0, exclusive_minimum=True, maximum=_L.length_max_m),
    # --- surfaces ---
    _f("surfaces", "id", "Id", "id", **_ID),
    _f("surfaces", "label", "Name", "text", optional=True, **_NAME,
       description="Label shown to people."),
    _f("surfaces", "kind", "Surface", "enum", enum=SurfaceKind, words="surface kind",
       description="What the surface is made of."),
    _f("surfaces", "elevation_m", "Top above datum", "length", words="height of its top",
       description="Top of the surface above the datum (m).",
       minimum=_L.elevation_min_m, maximum=_L.elevation_max_m),
    _f("surfaces", "facade", "In front of facade", "ref", optional=True, words="facade",
       help="Empty: in front of every facade", max_chars=_L.id_max_chars,
       description="Id of the facade it lies in front of; null for every facade."),
    _f("surfaces", "from_facade_m", "From (out from facade)", "length",
       words="start out from the facade", minimum=0.0, maximum=_L.length_max_m,
       description="Where it starts, out from the facade (m)."),
    _f("surfaces", "to_facade_m", "To (out from facade)", "length", optional=True,
       words="end out from the facade", minimum=0.0, maximum=_L.length_max_m,
       help="Empty: reaches on without end (the street beyond)",
       description="Where it ends, out from the facade (m); null for unbounded."),
    _f("surfaces", "x_from_m", "Along facade from", "length", optional=True,
       words="start along the facade", minimum=0.0, maximum=_L.length_max_m,
       help="Empty: from the facade's start. A podium or canopy under part of the facade "
       "starts here",
       description="Where it starts along its facade (m, as openings' x_m); null for the "
       "facade's start. Version 2."),
    _f("surfaces", "x_to_m", "Along facade to", "length", optional=True,
       words="end along the facade", minimum=0.0, maximum=_L.length_max_m,
       help="Empty: to the facade's end",
       description="Where it ends along its facade (m); null for the facade's end. Version 2."),
    # --- building details ---
    _f("info", "name", "Building", "text", words="name", **_NAME,
       description="Name of the building."),
    _f("info", "address", "Address", "text", optional=True, max_chars=_L.address_max_chars,
       description="Postal address."),
    _f("info", "site_altitude_m", "Site altitude above sea level", "length",
       words="site altitude", minimum=_L.altitude_min_m, maximum=_L.altitude_max_m,
       description="Site altitude above mean sea level (m)."),
    _f("info", "air_temperature_c", "Design air temperature", "temperature",
       words="air temperature", minimum=_L.temperature_min_c, maximum=_L.temperature_max_c,
       description="Design air temperature (°C)."),
    _f("info", "auditor", "Auditor", "text", optional=True, **_NAME,
       description="Who carried out the audit."),
    _f("info", "audit_date", "Audit date", "text", optional=True, editor="date",
       help="The day of the audit; clear it for none",
       description="Date of the audit, YYYY-MM-DD, or empty."),
    _f("info", "notes", "Notes", "text", optional=True, editor="lines",
       max_chars=_L.notes_max_chars, description="Free notes."),
    _f("info", "code_profile", "Code profile", "text",
       description="Jurisdiction whose code profile applies (resources/code_profiles/); absent: "
       "'generic', which cites no clause. Version 2."),
    # --- injury model ---
    _f("injury", "moderate_g", "Moderate or worse: median dose", "dose",
       words="moderate dose", minimum=0.0, exclusive_minimum=True, maximum=10_000.0,
       help="Half of the cats hurt by a fall of this dose (mean deceleration, g) are hurt "
       "moderately or worse",
       description="Median dose (mean deceleration, g) of a moderate or worse injury."),
    _f("injury", "serious_g", "Serious or worse: median dose", "dose", words="serious dose",
       minimum=0.0, exclusive_minimum=True, maximum=10_000.0,
       description="Median dose (g) of a serious or worse injury."),
    _f("injury", "life_threatening_g", "Life-threatening: median dose", "dose",
       words="life-threatening dose", minimum=0.0, exclusive_minimum=True, maximum=10_000.0,
       description="Median dose (g) of a life-threatening injury."),
    _f("injury", "spread", "Spread between cats", "number", minimum=0.0, maximum=5.0,
       help="How differently cats are hurt by the same fall (0: every cat alike)",
       description="Spread of the log of the dose between cats hurt by the same fall "
       "(0: the band is a step function of the dose)."),
)

_BY_KEY: dict[tuple[str, str], FieldDef] = {(f.section, f.name): f for f in FIELDS}


def field_def(section: str, name: str) -> FieldDef:
    """The field ``name`` of ``section``; ``KeyError`` if the registry has none."""
    return _BY_KEY[(section, name)]


def section_fields(section: str, names: Iterable[str] | None = None) -> tuple[FieldDef, ...]:
    """The fields of ``section``, all in registry order or the given ``names`` in that order."""
    if names is None:
        return tuple(f for f in FIELDS if f.section == section)
    return tuple(field_def(section, n) for n in names)


def _words(section: str, name: str) -> str:
    try:
        return field_def(section, name).noun
    except KeyError:  # a field the registry does not show (e.g. photos of a cat profile)
        for suffix in ("_mm", "_m2", "_mps", "_m", "_kg", "_s", "_c", "_g"):
            if name.endswith(suffix):
                name = name[: -len(suffix)]
                break
        return name.replace("_", " ")


def field_words(section: str, names: Iterable[str]) -> str:
    """The fields in a sentence: ``"width"``, ``"width and projection"``,
    ``"width, projection and notes"``."""
    words = [_words(section, n) for n in names]
    if len(words) <= 1:
        return "".join(words)
    return ", ".join(words[:-1]) + " and " + words[-1]


def schema_constraints(section: str, name: str) -> dict[str, Any]:
    """The pydantic ``Field`` arguments of a field: its description and limits."""
    f = field_def(section, name)
    out: dict[str, Any] = {}
    if f.kind == "id":
        out["min_length"] = 1
    if f.minimum is not None:
        out["gt" if f.exclusive_minimum else "ge"] = f.minimum
    if f.maximum is not None:
        out["le"] = f.maximum
    if f.max_chars is not None:
        out["max_length"] = f.max_chars
    if f.description:
        out["description"] = f.description
    return out


# --- the schedule's columns ---------------------------------------------------------------------


@dataclass(frozen=True, slots=True)
class ScheduleColumnDef:
    """A column of a window and balcony schedule, of the registry's ``field``.

    ``key``: the name the mapping uses (the opening field, or ``floor_elevation_m`` /
    ``floor_label`` for the floor of the row); ``header``: the template's header (default unit
    in brackets); ``required``: a schedule must hold it; ``example``: the template's example
    cell; ``blank``: what an empty cell means, in words (``""``: nothing said). ``words``: the
    column in a sentence (default: the field's).
    """

    key: str
    field: FieldDef
    header: str
    required: bool = False
    example: str = ""
    blank: str = ""
    words: str = ""
    help: str = ""

    @property
    def noun(self) -> str:
        """The column in a sentence."""
        return self.words or self.field.noun

    @property
    def aliases(self) -> tuple[str, ...]:
        """Headers that name this column: the field's own names and aliases."""
        # a floor column is named for the floor ("floor label"), never by the bare field label
        own = (self.field.label,) if self.field.section == "openings" else ()
        base = (self.key, *own, *self.field.aliases)
        if self.words:
            base = (self.words, *base)
        return base


def _col(key: str, header: str, **kw: Any) -> ScheduleColumnDef:
    section, name = ("floors", key.removeprefix("floor_")) if key.startswith("floor_") else (
        "openings", key)
    name = {"elevation": "elevation_m"}.get(name, name)
    return ScheduleColumnDef(key, field_def(section, name), header, **kw)


#: The schedule's columns in template order.
SCHEDULE_COLUMNS: tuple[ScheduleColumnDef, ...] = (
    _col("id", "Opening ID", required=True, example="N-01-B1",
         help="unique reference of the balcony or window"),
    _col("floor", "Floor", required=True, example="1",
         help="floor level number (or a floor label the building already has)"),
    _col("floor_elevation_m", "Floor elevation (m)", example="3.6", words="floor elevation",
         help="finished floor level above the datum; creates or updates the floor"),
    _col("floor_label", "Floor label", example="Level 1", words="floor label",
         help="name of the floor, when the row creates it"),
    _col("facade", "Facade", required=True, example="north",
         help="facade id; an unknown facade is created"),
    _col("kind", "Type", required=True, example="balcony", help="what kind of opening"),
    _col("x_m", "Position along facade (m)", example="2.4", blank="0",
         help="left edge along the facade"),
    _col("width_m", "Width (m)", required=True, example="3.2",
         help="width of the balcony or window"),
    _col("projection_m", "Projection (m)", example="1.5",
         help="how far a balcony stands out (0 for windows)"),
    _col("perch_height_m", "Rail or sill height (m)", example="1.1", blank="1.1 m",
         help="rail top or sill above the floor"),
    _col("largest_gap_mm", "Largest gap (mm)", example="95", blank="solid",
         help="widest gap in the guard infill"),
    _col("bottom_gap_mm", "Bottom gap (mm)", example="40", blank="none",
         help="gap under the guard"),
    _col("climbable_infill", "Climbable infill", example="no",
         help="yes if the infill has horizontal rails a cat can climb"),
    _col("flat_rail_top", "Flat rail top", example="yes",
         help="yes if the rail top is flat and wide enough to sit on"),
    _col("climbing_aids", "Climbing aids", example="no",
         help="yes if furniture, planters or bins stand next to the guard"),
    _col("limiter_gap_mm", "Limiter gap (mm)", example="", blank="no limiter",
         help="opening the limiter allows"),
    _col("screen", "Screen", example="none", help="screen fitted to the opening"),
    _col("netting_mesh_mm", "Netting mesh (mm)", example="", blank="no netting",
         help="mesh of fitted netting"),
    _col("open_frequency", "How often open", example="daily", help="how often it stands open"),
    _col("cats_present", "Cats present", example="yes", help="whether cats live behind it"),
    _col("escape_window", "Emergency escape window", example="no",
         help="yes if it is an emergency escape window"),
    _col("notes", "Notes", example="example row: replace or delete", help="free text"),
)

#: Values people write for an enum, in the words of the trade: {written: file value}.
ENUM_SYNONYMS: Mapping[str, str] = {
    # opening kinds
    "casement": "window_casement",
    "casement window": "window_casement",
    "sliding": "window_sliding",
    "sliding window": "window_sliding",
    "slider": "window_sliding",
    "hung": "window_hung",
    "sash": "window_hung",
    "sash window": "window_hung",
    "double hung": "window_hung",
    "single hung": "window_hung",
    "hung window": "window_hung",
    "tilt and turn": "window_tilt_turn",
    "tilt turn": "window_tilt_turn",
    "tilt & turn": "window_tilt_turn",
    "tilt-turn": "window_tilt_turn",
    "top hung": "window_top_hung",
    "awning": "window_top_hung",
    "awning window": "window_top_hung",
    "fixed glazing": "fixed",
    "fixed light": "fixed",
    "roof terrace": "terrace",
    "walkway": "gallery",
    "access gallery": "gallery",
    "deck access": "gallery",
    "juliet balcony": "balcony",
    # screens
    "pet resistant": "pet_resistant",
    "pet screen": "pet_resistant",
    "pet proof": "pet_resistant",
    "fly screen": "insect",
    "insect screen": "insect",
    "no": "none",
    "": "none",
    # cats present / frequency
    "y": "yes",
    "n": "no",
    "?": "unknown",
    "dont know": "unknown",
    "not known": "unknown",
    "seasonally": "seasonal",
    "summer": "seasonal",
    "every day": "daily",
    "permanently": "always",
    "rare": "rarely",
    "never opened": "never",
}
