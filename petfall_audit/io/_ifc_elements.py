"""Reading the elements of an IFC model: placements, windows, doors, balcony slabs (private).

Used by :mod:`petfall_audit.io.ifc_import`, which holds the rules in its docstring. Everything
here works on ifcopenshell entities and numpy arrays in metres (world coordinates; plan = x, y).
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING, Any

import numpy as np

from petfall_audit.model import OpeningKind
from petfall_audit.present.numbers import fmt_count

if TYPE_CHECKING:
    from petfall_audit.io.ifc_import import ModelStorey

_SIDE_TOLERANCE_M = 0.25  # an opening nearer the plan's middle line than this: side unclear
_DOOR_REACH_M = 0.5  # a balcony slab must reach this far beyond the door's line
_RAIL_HEIGHT_M = 1.1  # assumed rail height of a balcony without one in the model

@dataclass
class _Raw:
    """One window, door or balcony while it is read (plan in metres, world coordinates)."""

    element: Any
    ifc_class: str
    kind: OpeningKind
    storey: Any | None
    origin: np.ndarray  # 3-D, m
    along: np.ndarray  # unit horizontal direction of the element's own x axis
    wall_axis: np.ndarray  # unit horizontal direction of the host wall (or ``along``)
    width_m: float
    bottom_m: float
    assumptions: list[str]
    normal: np.ndarray | None = None
    level: int | None = None
    projection_m: float = 0.0
    perch_m: float | None = None
    span: tuple[float, float] | None = None  # along the facade, left and right (m)
    wall_origin: np.ndarray | None = None
    facade_index: int = -1
    wall: Any | None = None  # the host wall, whose body geometry gives the facade's ends


def _label(entity: Any) -> str:
    name = getattr(entity, "Name", None) or getattr(entity, "LongName", None) or ""
    return str(name).strip()


#: World matrices of the placements met while one model is read (file units), by entity id:
#: the windows of a storey share its chain of placements, which is resolved once.
_Placements = dict[int, np.ndarray]


def _world(placement: Any, cache: _Placements, depth: int = 0) -> np.ndarray:
    """World matrix (file units) of an ``IfcLocalPlacement`` chain, memoised in ``cache``."""
    import ifcopenshell.util.placement as util

    key = placement.id()
    found = cache.get(key)
    if found is not None:
        return found
    if depth > 64 or not placement.is_a("IfcLocalPlacement"):
        m = np.array(util.get_local_placement(placement), dtype=float)  # grids and the like
    else:
        local = np.array(util.get_axis2placement(placement.RelativePlacement), dtype=float)
        parent = placement.PlacementRelTo
        m = local if parent is None else _world(parent, cache, depth + 1) @ local
    cache[key] = m
    return m


def _placement(entity: Any, scale: float, cache: _Placements | None = None) -> np.ndarray | None:
    """The entity's world placement, translation in metres; ``None`` without a placement."""
    if getattr(entity, "ObjectPlacement", None) is None:
        return None
    try:
        m = _world(entity.ObjectPlacement, {} if cache is None else cache).copy()
    except Exception:  # a placement that cannot be resolved (damaged, unsupported)
        return None
    if m.shape != (4, 4) or not np.isfinite(m).all():
        return None
    m[:3, 3] *= scale
    return m


def _placement_z(entity: Any, scale: float) -> float | None:
    m = _placement(entity, scale)
    return None if m is None else float(m[2, 3])


def _horizontal(v: np.ndarray) -> np.ndarray | None:
    h = np.array([v[0], v[1]], dtype=float)
    length = float(np.hypot(h[0], h[1]))
    return None if length < 1e-6 else h / length


class _Geometry:
    """Body geometry on demand (world coordinates, metres), counting what failed."""

    def __init__(self) -> None:
        self._settings: Any = None
        self.failed = 0
        self.placements: _Placements = {}
        self._vertices: dict[int, np.ndarray | None] = {}

    def vertices(self, element: Any, *, count_failure: bool = True) -> np.ndarray | None:
        """World vertices (m) of the element's body, cached; ``None`` if it has none."""
        key = element.id()
        if key in self._vertices:
            return self._vertices[key]
        verts = self._build(element, count_failure)
        self._vertices[key] = verts
        return verts

    def _build(self, element: Any, count_failure: bool) -> np.ndarray | None:
        if getattr(element, "Representation", None) is None:
            return None
        import ifcopenshell.geom

        geom: Any = ifcopenshell.geom  # typed loosely: its shapes are a union of kinds
        if self._settings is None:
            self._settings = geom.settings()
            self._settings.set("use-world-coords", True)
        try:
            shape = geom.create_shape(self._settings, element)
        except Exception:  # geometry the kernel cannot build
            self.failed += count_failure
            return None
        verts = np.asarray(shape.geometry.verts, dtype=float).reshape(-1, 3)
        if verts.size == 0 or not np.isfinite(verts).all():
            self.failed += count_failure
            return None
        return verts


def _host_wall(element: Any) -> Any | None:
    for rel in getattr(element, "FillsVoids", None) or ():
        opening = rel.RelatingOpeningElement
        for void in getattr(opening, "VoidsElements", None) or ():
            return void.RelatingBuildingElement
    return None


def _is_external(element: Any, element_util: Any) -> bool | None:
    try:
        psets = element_util.get_psets(element)
    except Exception:  # property sets ifcopenshell cannot read
        return None
    for name, props in psets.items():
        if not (isinstance(name, str) and isinstance(props, dict)):
            continue
        if name.endswith("Common") and isinstance(props.get("IsExternal"), bool):
            return bool(props["IsExternal"])
    return None


def _element_id(element: Any) -> str:
    return str(element.Name or element.Tag or element.GlobalId)


def _window(w: Any, scale: float, geometry: _Geometry, element_util: Any,
            skipped: list[str]) -> _Raw | None:
    name = _element_id(w)
    if _is_external(w, element_util) is False:
        skipped.append(f"window {name!r}: marked internal (IsExternal false)")
        return None
    predefined = str(getattr(w, "PredefinedType", "") or "")
    wtype = element_util.get_type(w)
    type_predefined = str(getattr(wtype, "PredefinedType", "") or "") if wtype else ""
    if "SKYLIGHT" in (predefined, type_predefined) or "LIGHTDOME" in (predefined,
                                                                      type_predefined):
        skipped.append(f"window {name!r}: a roof light, not in a facade; add it by hand")
        return None
    m = _placement(w, scale, geometry.placements)
    if m is None:
        skipped.append(f"window {name!r}: no placement in the model")
        return None
    along = _horizontal(m[:3, 0])
    if along is None:
        skipped.append(f"window {name!r}: not in a vertical wall (its axis is vertical)")
        return None
    assumptions: list[str] = []
    kind, kind_note = _window_kind(w, wtype)
    if kind_note:
        assumptions.append(kind_note)
    width = _positive(w.OverallWidth, scale)
    bottom = float(m[2, 3])
    if width is None:
        verts = geometry.vertices(w)
        if verts is None:
            skipped.append(f"window {name!r}: no OverallWidth and no body geometry to measure")
            return None
        width = float(np.ptp(verts[:, :2] @ along))
        bottom = float(verts[:, 2].min())
        if width <= 0:
            skipped.append(f"window {name!r}: its body geometry has no width")
            return None
        assumptions.append("width measured from the window's body geometry (no OverallWidth)")
    wall = _host_wall(w)
    wall_axis, wall_origin = along, None
    if wall is not None:
        wm = _placement(wall, scale, geometry.placements)
        if wm is not None:
            axis = _horizontal(wm[:3, 0])
            if axis is not None:
                wall_axis, wall_origin = axis, wm[:3, 3]
    return _Raw(w, "IfcWindow", kind, _storey_of(w, wall, element_util), m[:3, 3].copy(),
                along, wall_axis, width, bottom, assumptions, wall_origin=wall_origin, wall=wall)


def _door(d: Any, scale: float, placements: _Placements) -> _Raw | None:
    import ifcopenshell.util.element as element_util

    m = _placement(d, scale, placements)
    if m is None:
        return None
    along = _horizontal(m[:3, 0])
    width = _positive(d.OverallWidth, scale)
    if along is None or width is None:
        return None
    wall = _host_wall(d)
    wall_axis, wall_origin = along, None
    if wall is not None:
        wm = _placement(wall, scale, placements)
        if wm is not None:
            axis = _horizontal(wm[:3, 0])
            if axis is not None:
                wall_axis, wall_origin = axis, wm[:3, 3]
    return _Raw(d, "IfcDoor", OpeningKind.BALCONY, _storey_of(d, wall, element_util),
                m[:3, 3].copy(), along, wall_axis, width, float(m[2, 3]), [],
                wall_origin=wall_origin, wall=wall)


def _positive(value: Any, scale: float) -> float | None:
    if value is None:
        return None
    v = float(value) * scale
    return v if math.isfinite(v) and v > 0 else None


def _storey_of(element: Any, wall: Any | None, element_util: Any) -> Any | None:
    """The storey holding ``element`` (through a space if need be), else its host wall's."""
    for candidate in (element, wall):
        if candidate is None:
            continue
        # the element's own containment (ifcopenshell.util would answer with its host wall's)
        rels = getattr(candidate, "ContainedInStructure", None) or ()
        container = rels[0].RelatingStructure if rels else None
        for _ in range(8):  # space -> storey; bounded against a cyclic model
            if container is None or container.is_a("IfcBuildingStorey"):
                break
            container = element_util.get_aggregate(container)
        if container is not None and container.is_a("IfcBuildingStorey"):
            if candidate is wall:
                return ("wall", container)
            return container
    return None


def _place_on_storey(raw: _Raw, storey_z: Mapping[int, float], storey_level: Mapping[int, int],
                     storeys: Sequence[ModelStorey], skipped: list[str]) -> None:
    """Set ``raw.level`` and its sill or threshold above that floor."""
    storey = raw.storey
    what = "window" if raw.ifc_class == "IfcWindow" else "door"
    name = _element_id(raw.element)
    if isinstance(storey, tuple):  # taken from the host wall
        storey = storey[1]
        raw.assumptions.append(
            f"the model puts it in no storey: placed on {_label(storey) or 'the storey'!r} "
            "where its wall stands")
    if storey is not None and storey.id() in storey_level:
        raw.level = storey_level[storey.id()]
        base = storey_z[storey.id()]
    else:
        below = [s for s in storeys if s.elevation_m <= raw.bottom_m + 0.05]
        if not below:
            skipped.append(f"{what} {name!r}: in no storey and below the lowest one")
            return
        floor = below[-1]
        raw.level = floor.level
        base = floor.elevation_m
        raw.assumptions.append(
            f"the model puts it in no storey: placed on {floor.label!r} by its height")
    raw.perch_m = round(raw.bottom_m - base, 6)


def _window_kind(w: Any, wtype: Any | None) -> tuple[OpeningKind, str]:
    """The kind from the panel operations of the window's type; casement (noted) if none."""
    operations: list[str] = []
    for holder in (wtype, w):
        for pset in (getattr(holder, "HasPropertySets", None) or ()) if holder else ():
            if pset.is_a("IfcWindowPanelProperties") and pset.OperationType:
                operations.append(str(pset.OperationType))
    for rel in getattr(w, "IsDefinedBy", None) or ():
        definition = getattr(rel, "RelatingPropertyDefinition", None)
        if definition is not None and definition.is_a("IfcWindowPanelProperties"):
            if definition.OperationType:
                operations.append(str(definition.OperationType))
    kinds = [k for k in (_OPERATION_KIND.get(op) for op in operations) if k is not None]
    if not kinds:
        said = f" ({', '.join(sorted(set(operations)))})" if operations else ""
        return OpeningKind.WINDOW_CASEMENT, (
            f"kind casement: the model does not say how it opens{said}")
    # the most open-able panel decides (a fixed light beside a casement is a casement window)
    kind = min(kinds, key=_KIND_RANK.index)
    note = ""
    if "BOTTOMHUNG" in operations and kind is OpeningKind.WINDOW_TILT_TURN:
        note = "bottom-hung panel read as tilt-and-turn (the same tilted gap)"
    elif any(op.startswith("PIVOT") for op in operations) and kind is OpeningKind.WINDOW_CASEMENT:
        note = "pivot panel read as casement"
    return kind, note


_OPERATION_KIND: dict[str, OpeningKind] = {
    "SIDEHUNGRIGHTHAND": OpeningKind.WINDOW_CASEMENT,
    "SIDEHUNGLEFTHAND": OpeningKind.WINDOW_CASEMENT,
    "REMOVABLECASEMENT": OpeningKind.WINDOW_CASEMENT,
    "PIVOTHORIZONTAL": OpeningKind.WINDOW_CASEMENT,
    "PIVOTVERTICAL": OpeningKind.WINDOW_CASEMENT,
    "TILTANDTURNRIGHTHAND": OpeningKind.WINDOW_TILT_TURN,
    "TILTANDTURNLEFTHAND": OpeningKind.WINDOW_TILT_TURN,
    "BOTTOMHUNG": OpeningKind.WINDOW_TILT_TURN,
    "TOPHUNG": OpeningKind.WINDOW_TOP_HUNG,
    "SLIDINGHORIZONTAL": OpeningKind.WINDOW_SLIDING,
    "SLIDINGVERTICAL": OpeningKind.WINDOW_HUNG,
    "FIXEDCASEMENT": OpeningKind.FIXED,
}
_KIND_RANK = (
    OpeningKind.WINDOW_TILT_TURN,
    OpeningKind.WINDOW_CASEMENT,
    OpeningKind.WINDOW_SLIDING,
    OpeningKind.WINDOW_HUNG,
    OpeningKind.WINDOW_TOP_HUNG,
    OpeningKind.FIXED,
)


def _outward(raws: Sequence[_Raw], assumptions: list[str]) -> None:
    """Set each opening's outward normal: perpendicular to its wall, away from the middle of
    the plan (the mean of the openings and their walls)."""
    if not raws:
        return
    points = [r.origin[:2] for r in raws] + [r.wall_origin[:2] for r in raws
                                             if r.wall_origin is not None]
    centre = np.mean(np.array(points), axis=0)
    unclear = 0
    for r in raws:
        n0 = np.array([r.wall_axis[1], -r.wall_axis[0]])
        mid = r.origin[:2] + r.along * (r.width_m / 2)
        side = float((mid - centre) @ n0)
        if abs(side) > _SIDE_TOLERANCE_M:
            r.normal = n0 if side > 0 else -n0
        else:
            r.normal = n0  # right of the wall's axis
            unclear += 1
            r.assumptions.append(
                "outside taken as the right-hand side of its wall's axis (it stands on the "
                "middle line of the plan)")
    assumptions.append(
        "the outside of each window and door is the side of its wall away from the middle of "
        "the plan; check the facades of a courtyard or an inner corner"
    )
    if unclear:
        assumptions.append(f"{fmt_count(unclear, 'opening')} on the plan's middle line: "
                           "side assumed")


def _balcony_reason(slab: Any, element_util: Any) -> str:
    """Why the slab is a balcony ("" if it is not marked as one)."""
    words = ("balcony", "balkon", "balcon")

    def says(text: Any) -> bool:
        return isinstance(text, str) and any(w in text.lower() for w in words)

    for holder in (slab, element_util.get_type(slab)):
        if holder is None:
            continue
        for attr in ("PredefinedType", "ObjectType", "ElementType"):
            if says(getattr(holder, attr, None)):
                return f"its {attr} says balcony"
    try:
        psets = element_util.get_psets(slab)
    except Exception:  # property sets ifcopenshell cannot read
        psets = {}
    for pset_name, props in psets.items():
        if not isinstance(props, dict):
            continue
        for key, value in props.items():
            if key == "id":
                continue
            if says(key) and value is True:
                return f"property {pset_name}.{key} is true"
            if says(value):
                return f"property {pset_name}.{key} says balcony"
    if says(slab.Name):
        return "its name says balcony"
    return ""


def _balcony(slab: Any, scale: float, geometry: _Geometry, element_util: Any,
             doors: Sequence[_Raw], windows: Sequence[_Raw], used_doors: set[int],
             storey_z: Mapping[int, float], storey_level: Mapping[int, int],
             storeys: Sequence[ModelStorey], skipped: list[str]) -> _Raw | None:
    name = _element_id(slab)
    verts = geometry.vertices(slab)
    if verts is None:
        skipped.append(f"balcony slab {name!r}: no body geometry to measure")
        return None
    plan = verts[:, :2]
    top = float(verts[:, 2].max())
    assumptions = [f"read as a balcony because {_balcony_reason(slab, element_util)}"]
    # the door that opens onto it: same floor, the slab beyond its line and across its width
    best: tuple[float, int] | None = None
    for i, d in enumerate(doors):
        if d.normal is None or abs(d.bottom_m - top) > 0.3:
            continue
        s = (plan - d.origin[:2]) @ d.normal
        t = _tangent(d.normal)
        a = float(d.origin[:2] @ t)
        b = a + d.width_m * float(d.along @ t)
        lo, hi = min(a, b), max(a, b)
        along = plan @ t
        overlap = min(hi, float(along.max())) - max(lo, float(along.min()))
        if s.max() > _DOOR_REACH_M and s.min() > -0.5 and overlap > 0:
            if best is None or overlap > best[0]:
                best = (overlap, i)
    if best is not None:
        door = doors[best[1]]
        used_doors.add(best[1])
        normal = door.normal
        assert normal is not None
        level = door.level
        front = float(door.origin[:2] @ normal)
        assumptions.append(
            f"on the facade of the door {_element_id(door.element)!r} that opens onto it; "
            "projection measured from the door's line")
    else:
        guess = _facing_without_door(plan, windows)
        if guess is None:
            skipped.append(f"balcony slab {name!r}: no door opens onto it and no window shows "
                           "which facade it is on")
            return None
        normal, front = guess
        below = [s for s in storeys if s.elevation_m <= top + 0.3]
        level = below[-1].level if below else None
        assumptions.append(
            "no door opens onto it: facade and projection taken from the windows of the "
            "nearest facade line")
        storey = element_util.get_container(slab)
        if storey is not None and storey.id() in storey_level:
            level = storey_level[storey.id()]
    if level is None:
        skipped.append(f"balcony slab {name!r}: below the lowest storey")
        return None
    projection = float((plan @ normal).max()) - front
    t = _tangent(normal)
    along = plan @ t
    assumptions.append(
        f"rail height {_RAIL_HEIGHT_M:g} m (the model has no railing height): measure it")
    raw = _Raw(slab, "IfcSlab", OpeningKind.BALCONY, None,
               np.array([*plan.min(axis=0), top]), t, t, float(np.ptp(along)), top,
               assumptions, normal=np.asarray(normal), level=level,
               projection_m=max(round(projection, 6), 0.0), perch_m=_RAIL_HEIGHT_M)
    raw.span = (float(along.min()), float(along.max()))
    return raw


def _facing_without_door(plan: np.ndarray,
                         windows: Sequence[_Raw]) -> tuple[np.ndarray, float] | None:
    """The window facade the slab stands out from most, and the line of that facade."""
    best: tuple[float, np.ndarray, float] | None = None
    for n in {(round(float(w.normal[0]), 3), round(float(w.normal[1]), 3))
              for w in windows if w.normal is not None}:
        normal = np.array(n) / np.hypot(*n)
        front = max(float(w.origin[:2] @ normal) for w in windows
                    if w.normal is not None and float(w.normal @ normal) > 0.99)
        out = float((plan @ normal).max()) - front
        inside = float((plan @ normal).min()) - front
        if out > 0 and inside > -0.5 and (best is None or out > best[0]):
            best = (out, normal, front)
    return None if best is None else (best[1], best[2])


def _tangent(normal: np.ndarray) -> np.ndarray:
    """Along the facade, left to right as seen from outside (looking along ``-normal``)."""
    return np.array([-normal[1], normal[0]])
