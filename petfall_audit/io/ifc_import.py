"""Import storeys, windows and balconies from a building model in IFC (ISO 16739).

Reads IFC2X3, IFC4 and IFC4X3 files in the STEP text format (``.ifc``) with the optional
``ifcopenshell`` package (``pip install "petfall_audit[bim]"``). Three steps:

1. :func:`read_model` reads the model into a :class:`ModelRead`: the storeys (floors in elevation
   order, elevations in metres whatever the file's length unit), the windows, the balconies, the
   facades they sit on, every assumption it had to make and everything it left out, with why.
2. :func:`preview_model` turns it into the spreadsheet import's :class:`ImportPreview` against a
   building (same checks, same merge rules: :mod:`petfall_audit.io.schedule`).
3. :func:`apply_model` merges it (``apply_import``), or :func:`new_building` starts a building
   from it. Nothing is invented silently: what a model does not hold (what lies below, the
   guards' gaps, cats, how often a window is opened) is left for the user and listed in each
   opening's notes (:mod:`petfall_audit.io.survey`).

What is read, and how (see ``docs/ifc-import.md``):

- ``IfcBuildingStorey`` → floors: level 0 is the storey nearest the datum, the others are
  numbered up and down from it in elevation order; label = the storey's name; elevation = its
  ``Elevation`` (else its placement).
- ``IfcWindow`` → a window: kind from the panel operation of its type (else casement, assumed
  and noted); sill = bottom of the window above its storey; width = ``OverallWidth`` (else the
  extent of its body geometry).
- ``IfcSlab`` marked as a balcony (predefined type or object type ``BALCONY``, a property named
  like "balcony", or its name) → a balcony: its width along the facade and its projection from
  it, from the slab's body geometry; the facade from the ``IfcDoor`` that opens onto it.
- Facades: the outward horizontal direction of each opening (its host wall's axis, the side away
  from the middle of the plan); compass names where the model gives true north; positions along
  the facade as seen from outside, from its leftmost element.

Lengths in metres inside; the file's own unit only at the edge.
"""

from __future__ import annotations

import dataclasses
import math
import re
from collections.abc import Callable, Mapping, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any, Literal

import numpy as np

from petfall_audit.errors import ModelImportError
from petfall_audit.io._facades import FacadeDirection, group_directions, name_facades
from petfall_audit.io._ifc_elements import (
    _balcony,
    _balcony_reason,
    _door,
    _element_id,
    _Geometry,
    _label,
    _outward,
    _place_on_storey,
    _placement_z,
    _Raw,
    _tangent,
    _window,
)
from petfall_audit.io.schedule import (
    COLUMNS,
    ImportPreview,
    RawTable,
    apply_import,
    header_units,
    preview_import,
)
from petfall_audit.io.survey import survey_line
from petfall_audit.model import Building, BuildingInfo, Facade, OpeningKind
from petfall_audit.present.numbers import fmt_count, plural

__all__ = [
    "INSTALL_HINT",
    "MAX_MODEL_BYTES",
    "ModelStorey",
    "ModelOpening",
    "ModelRead",
    "read_model",
    "model_table",
    "floor_levels",
    "preview_model",
    "apply_model",
    "new_building",
]

INSTALL_HINT = (
    'reading IFC models needs the optional ifcopenshell package: pip install "petfall_audit[bim]" '
    "(or: pip install ifcopenshell)"
)
#: Largest model file read (bytes): far above a residential block's model, and bounded.
MAX_MODEL_BYTES = 2 * 1024**3
#: Most openings one import takes (the building file's own scale).
MAX_OPENINGS = 50_000
_SCHEMAS = ("IFC2X3", "IFC4", "IFC4X3")
_SAME_STOREY_M = 0.01  # storeys closer than this are one floor

#: What a model never holds: the survey line of every imported opening.
SURVEY_ITEMS = (
    "guard or infill gaps",
    "limiter",
    "screen",
    "netting",
    "how often it is opened",
    "whether cats live behind it",
)

Progress = Callable[[int, int], None]


# --- what the model holds -------------------------------------------------------------------------


@dataclass(frozen=True, slots=True)
class ModelStorey:
    """A storey read as a floor: ``elevation_m`` above the model's datum."""

    level: int
    label: str
    elevation_m: float
    global_id: str


@dataclass(frozen=True, slots=True)
class ModelOpening:
    """A window or balcony read from the model, in the building file's terms (metres).

    ``assumptions`` are the things the import decided for this opening that the model does not
    say; ``source`` names the element (class, GlobalId, name).
    """

    id: str
    level: int
    facade: str
    kind: OpeningKind
    x_m: float
    width_m: float
    projection_m: float
    perch_height_m: float
    global_id: str
    ifc_class: str
    name: str
    assumptions: tuple[str, ...] = ()

    def notes(self, source: str) -> str:
        """The opening's notes: where it came from, what was assumed, what is to survey."""
        what = f"{self.ifc_class} {self.name!r}" if self.name else self.ifc_class
        lines = [f"From the building model {source} ({what}, GlobalId {self.global_id})."]
        if self.assumptions:
            lines.append("Assumed: " + "; ".join(self.assumptions) + ".")
        lines.append(survey_line(SURVEY_ITEMS))
        return "\n".join(lines)


@dataclass(frozen=True, slots=True)
class ModelFacade:
    """A facade found in the model: ``length_m`` from its leftmost to its rightmost element."""

    id: str
    label: str
    length_m: float
    bearing_deg: float | None


@dataclass(frozen=True, slots=True)
class ModelRead:
    """A building model as read: storeys, facades, openings, and what the import assumed
    (``assumptions``, for the whole model) and left out (``skipped``, each with why).

    ``metres_per_unit``: the file's declared length unit in metres (0.001 for millimetres).
    """

    source: str
    schema: str
    length_unit: str
    metres_per_unit: float
    true_north: bool
    name: str
    address: str
    site_altitude_m: float | None
    storeys: tuple[ModelStorey, ...]
    facades: tuple[ModelFacade, ...]
    openings: tuple[ModelOpening, ...]
    assumptions: tuple[str, ...]
    skipped: tuple[str, ...]

    def summary(self) -> str:
        """One line: storeys, windows, balconies, facades."""
        windows = sum(o.kind is not OpeningKind.BALCONY for o in self.openings)
        balconies = len(self.openings) - windows
        return (
            f"{self.source} ({self.schema}, lengths in {self.length_unit}): "
            f"{fmt_count(len(self.storeys), 'storey')}, {fmt_count(windows, 'window')}, "
            f"{fmt_count(balconies, 'balcony', 'balconies')} on "
            f"{fmt_count(len(self.facades), 'facade')}; "
            f"{fmt_count(len(self.skipped), 'element')} left out"
        )


# --- opening the file -----------------------------------------------------------------------------


def _ifcopenshell() -> Any:
    try:
        import ifcopenshell
        import ifcopenshell.util.element
        import ifcopenshell.util.placement
        import ifcopenshell.util.unit
    except ImportError:
        raise ModelImportError(INSTALL_HINT) from None
    return ifcopenshell


def _open(path: Path) -> Any:
    """The parsed model; :class:`ModelImportError` in plain words for anything else."""
    if not path.is_file():
        what = "is a folder" if path.is_dir() else "no such file"
        raise ModelImportError(f"{path}: cannot read the model: {what}")
    size = path.stat().st_size
    if size == 0:
        raise ModelImportError(f"{path.name}: the file is empty")
    if size > MAX_MODEL_BYTES:
        raise ModelImportError(
            f"{path.name}: the file is {size / 1024**3:.1f} GB; models over "
            f"{MAX_MODEL_BYTES / 1024**3:.0f} GB are not read"
        )
    with path.open("rb") as handle:
        head = handle.read(4096)
        handle.seek(max(size - 4096, 0))
        tail = handle.read()
    if head.startswith(b"PK"):
        raise ModelImportError(
            f"{path.name}: a compressed model (.ifczip); unzip it and import the .ifc inside"
        )
    if not head.lstrip(b"\xef\xbb\xbf \t\r\n").startswith(b"ISO-10303-21;"):
        raise ModelImportError(
            f"{path.name}: not an IFC model (an .ifc file starts with 'ISO-10303-21;')"
        )
    if b"END-ISO-10303-21;" not in tail:
        raise ModelImportError(
            f"{path.name}: the IFC model is incomplete (it does not end with "
            "'END-ISO-10303-21;'); it may have been cut short while copying: export it again"
        )
    ifcopenshell = _ifcopenshell()
    try:
        model = ifcopenshell.open(str(path))
    except Exception as exc:  # the parser raises several kinds for a damaged file
        raise ModelImportError(f"{path.name}: the IFC model cannot be read ({exc})") from None
    schema = str(model.schema).upper()
    if not any(schema.startswith(s) for s in _SCHEMAS):
        raise ModelImportError(
            f"{path.name}: IFC schema {model.schema} is not supported (IFC2X3, IFC4, IFC4X3)"
        )
    return model


def _unit(model: Any) -> tuple[float, str]:
    import ifcopenshell.util.unit as unit

    try:
        scale = float(unit.calculate_unit_scale(model))
    except Exception as exc:  # a damaged unit assignment
        raise ModelImportError(f"the model's length unit cannot be read ({exc})") from None
    if not (math.isfinite(scale) and scale > 0):
        raise ModelImportError(f"the model's length unit is not usable ({scale!r} m)")
    names = {1.0: "metres", 0.001: "millimetres", 0.01: "centimetres", 0.3048: "feet",
             0.0254: "inches"}
    for value, name in names.items():
        if math.isclose(scale, value, rel_tol=1e-9):
            return scale, name
    return scale, f"units of {scale:g} m"


# --- reading --------------------------------------------------------------------------------------



def read_model(path: str | Path, *, progress: Progress | None = None) -> ModelRead:
    """Read the IFC model at ``path`` (see the module docstring for what is read and how).

    Raises :class:`ModelImportError` when ifcopenshell is missing, the file is not an IFC model,
    cannot be parsed, or holds no storey. ``progress(done, total)`` is called per element.
    """
    path = Path(path)
    model = _open(path)
    import ifcopenshell.util.element as element_util

    scale, unit_name = _unit(model)
    assumptions: list[str] = []
    skipped: list[str] = []
    storeys, storey_z, storey_level = _storeys(model, scale, assumptions, skipped)
    if not storeys:
        raise ModelImportError(f"{path.name}: the model has no storey (IfcBuildingStorey)")

    windows = list(model.by_type("IfcWindow"))
    doors = list(model.by_type("IfcDoor"))
    slabs = [s for s in model.by_type("IfcSlab") if _balcony_reason(s, element_util)]
    total = len(windows) + len(doors) + len(slabs)
    if len(windows) + len(slabs) > MAX_OPENINGS:
        raise ModelImportError(
            f"{path.name}: {len(windows) + len(slabs)} windows and balconies; at most "
            f"{MAX_OPENINGS} are imported at once"
        )
    done = 0

    def tick() -> None:
        nonlocal done
        done += 1
        if progress is not None and (done % 200 == 0 or done == total):
            progress(done, total)

    geometry = _Geometry()
    raws: list[_Raw] = []
    for w in windows:
        tick()
        raw = _window(w, scale, geometry, element_util, skipped)
        if raw is not None:
            raws.append(raw)
    door_raws: list[_Raw] = []
    for d in doors:
        tick()
        raw = _door(d, scale, geometry.placements)
        if raw is not None:
            door_raws.append(raw)

    for raw in (*raws, *door_raws):
        _place_on_storey(raw, storey_z, storey_level, storeys, skipped)
    raws = [r for r in raws if r.level is not None]
    door_raws = [r for r in door_raws if r.level is not None]
    _outward(raws + door_raws, assumptions)

    balconies: list[_Raw] = []
    used_doors: set[int] = set()
    for s in slabs:
        tick()
        raw = _balcony(s, scale, geometry, element_util, door_raws, raws, used_doors,
                       storey_z, storey_level, storeys, skipped)
        if raw is not None:
            balconies.append(raw)
    free_doors = [d for i, d in enumerate(door_raws) if i not in used_doors
                  and d.level is not None and d.level > 0]
    if free_doors:
        skipped.append(
            f"{fmt_count(len(free_doors), 'door')} above the lowest floor "
            f"{plural(len(free_doors), 'opens', 'open')} onto no balcony slab and "
            f"{plural(len(free_doors), 'was', 'were')} left out (a door onto a Juliet balcony "
            "is not in the model as a balcony: add it by hand)"
        )
    if geometry.failed:
        skipped.append(f"{fmt_count(geometry.failed, 'element')} whose body geometry could "
                       "not be read")

    everything = raws + balconies
    true_north = _true_north(model)
    facades, facade_of = _facades(everything, true_north, assumptions, geometry)
    openings = _openings(everything, facade_of, facades)
    if true_north is None and facades:
        assumptions.append(
            "the model gives no true north: facades are named by their angle from the model's "
            "+y axis; rename them if you know their compass direction"
        )
    name, address, altitude = _building_info(model, scale)
    return ModelRead(
        source=path.name,
        schema=str(model.schema),
        length_unit=unit_name,
        metres_per_unit=scale,
        true_north=true_north is not None,
        name=name,
        address=address,
        site_altitude_m=altitude,
        storeys=tuple(storeys),
        facades=tuple(facades),
        openings=tuple(openings),
        assumptions=tuple(assumptions),
        skipped=tuple(skipped),
    )


def _storeys(
    model: Any, scale: float, assumptions: list[str], skipped: list[str]
) -> tuple[list[ModelStorey], dict[int, float], dict[int, int]]:
    """Floors in elevation order, and per storey entity id its placement height (m) and level."""
    found: list[tuple[float, float, Any]] = []  # elevation, placement z, storey
    for s in model.by_type("IfcBuildingStorey"):
        placed = _placement_z(s, scale)
        if s.Elevation is not None and math.isfinite(float(s.Elevation)):
            elevation = float(s.Elevation) * scale
            if placed is not None and abs(placed - elevation) > 0.01:
                assumptions.append(
                    f"storey {_label(s)!r}: its elevation ({elevation:.3f} m) and its placement "
                    f"({placed:.3f} m) differ; the floor takes the elevation, sills are measured "
                    "from the placement"
                )
        elif placed is not None:
            elevation = placed
        else:
            skipped.append(f"storey {_label(s)!r}: no elevation and no placement")
            continue
        found.append((elevation, elevation if placed is None else placed, s))
    found.sort(key=lambda t: t[0])
    floors: list[ModelStorey] = []
    storey_z: dict[int, float] = {}
    members: list[list[Any]] = []
    for elevation, placed, s in found:
        if floors and elevation - floors[-1].elevation_m < _SAME_STOREY_M:
            members[-1].append(s)
            assumptions.append(
                f"storeys {_label(members[-1][0])!r} and {_label(s)!r} stand at the same "
                "elevation: read as one floor"
            )
        else:
            floors.append(ModelStorey(0, _label(s) or "", round(elevation, 6), s.GlobalId))
            members.append([s])
        storey_z[s.id()] = placed
    if not floors:
        return [], {}, {}
    ground = min(range(len(floors)), key=lambda i: (abs(floors[i].elevation_m), -i))
    numbered = [
        dataclasses.replace(f, level=i - ground, label=f.label or _default_label(i - ground))
        for i, f in enumerate(floors)
    ]
    storey_level = {s.id(): i - ground for i, group in enumerate(members) for s in group}
    return numbered, storey_z, storey_level


def _default_label(level: int) -> str:
    return "Ground" if level == 0 else f"Level {level}"



def _true_north(model: Any) -> tuple[float, float] | None:
    for ctx in model.by_type("IfcGeometricRepresentationContext"):
        if ctx.is_a() != "IfcGeometricRepresentationContext":
            continue  # sub-contexts inherit the parent's
        north = getattr(ctx, "TrueNorth", None)
        if north is None:
            continue
        ratios = [float(v) for v in north.DirectionRatios[:2]]
        length = math.hypot(*ratios)
        if length > 1e-9 and all(math.isfinite(v) for v in ratios):
            return (ratios[0] / length, ratios[1] / length)
    return None


def _facades(raws: Sequence[_Raw], true_north: tuple[float, float] | None,
             assumptions: list[str],
             geometry: _Geometry) -> tuple[list[ModelFacade], list[FacadeDirection]]:
    """Facades by outward direction; sets each raw's span along its facade."""
    if not raws:
        return [], []
    normals = np.array([r.normal for r in raws], dtype=float)
    groups = group_directions(np.arctan2(normals[:, 1], normals[:, 0]))
    directions = name_facades(normals, groups, true_north)
    facades: list[ModelFacade] = []
    for g, direction in enumerate(directions):
        members = [r for r, k in zip(raws, groups, strict=True) if k == g]
        t = _tangent(np.array(direction.normal))
        starts: list[float] = []
        ends: list[float] = []
        walls: dict[int, Any] = {}
        for r in members:
            if r.span is None:
                a = float(r.origin[:2] @ t)
                b = a + r.width_m * float(r.along @ t)
                r.span = (min(a, b), max(a, b))
            starts.append(r.span[0])
            ends.append(r.span[1])
            if r.wall_origin is not None:
                starts.append(float(r.wall_origin[:2] @ t))
            if r.wall is not None:
                walls[r.wall.id()] = r.wall
        for wall in walls.values():  # the walls' own ends, where their geometry is readable
            verts = geometry.vertices(wall, count_failure=False)
            if verts is not None:
                along = verts[:, :2] @ t
                starts.append(float(along.min()))
                ends.append(float(along.max()))
        origin = min(starts)
        for r in members:
            assert r.span is not None
            r.span = (r.span[0] - origin, r.span[1] - origin)
            r.facade_index = g
        length = max(ends) - origin
        facades.append(ModelFacade(direction.id, direction.label, round(length, 3),
                                   direction.bearing_deg))
    assumptions.append(
        "positions along each facade are measured as seen from outside, from its leftmost "
        "window, door or wall end in the model; its length reaches the rightmost one")
    return facades, directions


def _openings(raws: Sequence[_Raw], directions: Sequence[FacadeDirection],
              facades: Sequence[ModelFacade]) -> list[ModelOpening]:
    names = [_element_id(r.element) for r in raws]
    counts: dict[str, int] = {}
    for n in names:
        counts[n] = counts.get(n, 0) + 1
    result: list[ModelOpening] = []
    taken: set[str] = set()
    for r, name in zip(raws, names, strict=True):
        ident = _clean_id(name) if counts[name] == 1 else _clean_id(str(r.element.GlobalId))
        if not ident or ident in taken:
            ident = _clean_id(str(r.element.GlobalId))
        taken.add(ident)
        assert r.span is not None and r.level is not None and r.perch_m is not None
        facade = facades[r.facade_index]
        result.append(ModelOpening(
            id=ident,
            level=r.level,
            facade=facade.id,
            kind=r.kind,
            x_m=round(r.span[0], 6),
            width_m=round(r.span[1] - r.span[0], 6),
            projection_m=r.projection_m,
            perch_height_m=r.perch_m,
            global_id=str(r.element.GlobalId),
            ifc_class=r.ifc_class,
            name=str(r.element.Name or ""),
            assumptions=tuple(r.assumptions),
        ))
    result.sort(key=lambda o: (o.level, o.facade, o.x_m))
    return result


_ID_JUNK = re.compile(r"[\x00-\x1f\x7f]+")


def _clean_id(text: str) -> str:
    return _ID_JUNK.sub(" ", text).strip()[:80]


def _building_info(model: Any, scale: float) -> tuple[str, str, float | None]:
    name, address, altitude = "", "", None
    for b in model.by_type("IfcBuilding"):
        name = _label(b)
        addr = getattr(b, "BuildingAddress", None)
        if addr is not None:
            parts = [*(getattr(addr, "AddressLines", None) or ()),
                     getattr(addr, "Town", None), getattr(addr, "PostalCode", None),
                     getattr(addr, "Country", None)]
            address = ", ".join(str(p).strip() for p in parts if p)
        break
    if not name:
        for p in model.by_type("IfcProject"):
            name = _label(p)
            break
    for s in model.by_type("IfcSite"):
        if getattr(s, "RefElevation", None) is not None:
            value = float(s.RefElevation) * scale
            altitude = value if math.isfinite(value) else None
        break
    return name, address, altitude


# --- into the building ----------------------------------------------------------------------------

_FIELDS = ("id", "floor", "floor_elevation_m", "floor_label", "facade", "kind", "x_m", "width_m",
           "projection_m", "perch_height_m", "notes")
_HEADERS = {c.field: c.header for c in COLUMNS}


def floor_levels(model: ModelRead, building: Building) -> dict[int, int]:
    """Model level -> building level: a storey at a floor's elevation (±5 cm) takes that
    floor's level; when every storey matches or the building has no floor, the rest follow the
    model's numbering shifted to fit."""
    if not building.floors:
        return {s.level: s.level for s in model.storeys}
    mapping: dict[int, int] = {}
    for s in model.storeys:
        for f in building.floors:
            if abs(f.elevation_m - s.elevation_m) <= 0.05:
                mapping[s.level] = f.level
                break
    if mapping:
        shift = {m - s for s, m in mapping.items()}
        offset = shift.pop() if len(shift) == 1 else 0
    else:
        offset = 0
    for s in model.storeys:
        mapping.setdefault(s.level, s.level + offset)
    return mapping


def model_table(
    model: ModelRead, building: Building, *, facade_map: Mapping[str, str] | None = None
) -> tuple[RawTable, dict[str, str], list[ModelOpening]]:
    """The model's openings as a schedule table for :func:`preview_import`, its mapping, and
    the opening of each table row (row 2 onwards, like a spreadsheet).

    ``facade_map`` renames the model's facades (e.g. ``{"north": "street"}``). An opening the
    building already has keeps its notes, with the model's notes added once."""
    facade_map = dict(facade_map or {})
    levels = floor_levels(model, building)
    storey = {s.level: s for s in model.storeys}
    existing = {o.id: o for o in building.openings}
    headers = tuple(_HEADERS[f] for f in _FIELDS)
    rows: list[tuple[int, tuple[str, ...]]] = []
    for number, o in enumerate(model.openings, start=2):
        notes = o.notes(model.source)
        old = existing.get(o.id)
        if old is not None:
            notes = _merged_notes(old.notes, notes)
        s = storey[o.level]
        values = {
            "id": o.id,
            "floor": str(levels[o.level]),
            "floor_elevation_m": _number(s.elevation_m),
            "floor_label": s.label,
            "facade": facade_map.get(o.facade, o.facade),
            "kind": o.kind.value,
            "x_m": _number(o.x_m),
            "width_m": _number(o.width_m),
            "projection_m": _number(o.projection_m),
            "perch_height_m": _number(o.perch_height_m),
            "notes": notes,
        }
        rows.append((number, tuple(values[f] for f in _FIELDS)))
    table = RawTable(headers=headers, rows=tuple(rows), source=model.source)
    return table, {_HEADERS[f]: f for f in _FIELDS}, list(model.openings)


_MODEL_LINES = ("From the building model ", "Assumed: ")


def _merged_notes(old: str, new: str) -> str:
    """Notes of an opening the building has already: the model's lines (source, assumptions)
    replace those of an earlier import, the user's own lines stay, and the survey line stays as
    the user left it (it is not brought back once deleted, nor added to a surveyed opening)."""
    model_lines = [line for line in new.splitlines() if line.startswith(_MODEL_LINES)]
    kept = [line for line in old.splitlines() if not line.startswith(_MODEL_LINES)]
    had_model = len(kept) != len(old.splitlines())
    if had_model:
        return "\n".join([*model_lines, *kept])
    return "\n".join([*kept, *model_lines]) if kept else "\n".join(model_lines)


def _number(value: float) -> str:
    return repr(float(round(value, 6)))


def preview_model(
    model: ModelRead, building: Building, *, facade_map: Mapping[str, str] | None = None
) -> ImportPreview:
    """What importing ``model`` into ``building`` would do, with the spreadsheet import's
    checks; a problem's row is the opening's place in :attr:`ModelRead.openings` plus 2."""
    table, mapping, _ = model_table(model, building, facade_map=facade_map)
    return preview_import(table, mapping, building, units=header_units(table.headers))


def apply_model(
    building: Building,
    model: ModelRead,
    preview: ImportPreview,
    *,
    mode: Literal["merge", "replace"] = "merge",
    accept_valid_rows: bool = False,
    facade_map: Mapping[str, str] | None = None,
) -> Building:
    """Apply ``preview`` (from :func:`preview_model`) like the spreadsheet import; facades it
    creates take the model's labels."""
    result = apply_import(building, preview, mode=mode, accept_valid_rows=accept_valid_rows)
    facade_map = dict(facade_map or {})
    labels = {facade_map.get(f.id, f.id): f.label for f in model.facades}
    created = {f.id for f in preview.facades}
    return dataclasses.replace(
        result,
        facades=tuple(
            dataclasses.replace(f, label=labels[f.id]) if f.id in created and f.id in labels
            else f
            for f in result.facades
        ),
    )


def new_building(model: ModelRead) -> tuple[Building, ImportPreview]:
    """A new building from the model: its floors, facades and openings, no surface below (the
    model does not hold one) and notes that say what is missing. The preview lists anything
    the import refused."""
    notes = (
        f"Started from the building model {model.source} ({model.schema}). Not in the model, "
        "to add before the audit is assessed: what lies below each facade (surfaces), and for "
        "each opening the guard or infill gaps, limiters, screens, netting, how often it is "
        "opened and whether cats live behind it."
    )
    info = BuildingInfo(
        name=model.name or Path(model.source).stem,
        address=model.address,
        site_altitude_m=model.site_altitude_m if model.site_altitude_m is not None else 0.0,
        notes=notes if model.site_altitude_m is not None else notes + " Site altitude not in "
        "the model: 0 m assumed.",
    )
    seed = Building(
        info=info,
        facades=tuple(Facade(f.id, max(f.length_m, 0.001), f.label) for f in model.facades),
    )
    preview = preview_model(model, seed)
    if not preview.openings:
        return seed, preview
    building = apply_import(seed, preview, mode="merge", accept_valid_rows=True)
    return building, preview


def opening_of_row(model: ModelRead, row: int) -> ModelOpening | None:
    """The model opening behind a preview row (``None`` for the file-level row 0 or 1)."""
    index = row - 2
    return model.openings[index] if 0 <= index < len(model.openings) else None
