"""Build small IFC models inside the tests with ``ifcopenshell.api`` (invented buildings).

Coordinates are given in metres in plan (x, y) and height (z); the builder converts them to the
model's length unit through ``is_si=True`` placements and scales the window sizes itself. A wall
runs from ``start`` to ``end``; a window sits on it ``along_m`` from the start, ``sill_m`` above
its storey. Windows and doors follow the IFC convention: the local x axis along the wall, z up.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from pathlib import Path

import ifcopenshell
import ifcopenshell.api.aggregate
import ifcopenshell.api.context
import ifcopenshell.api.feature
import ifcopenshell.api.geometry
import ifcopenshell.api.owner
import ifcopenshell.api.owner.settings
import ifcopenshell.api.project
import ifcopenshell.api.pset
import ifcopenshell.api.root
import ifcopenshell.api.spatial
import ifcopenshell.api.type
import ifcopenshell.api.unit
import numpy as np

Point = tuple[float, float]


def _matrix(origin: Sequence[float], x_axis: Sequence[float]) -> np.ndarray:
    """4x4 placement: origin (m), x axis horizontal along ``x_axis``, z up, y = z × x."""
    x = np.array([x_axis[0], x_axis[1], 0.0], dtype=float)
    x /= np.linalg.norm(x)
    z = np.array([0.0, 0.0, 1.0])
    y = np.cross(z, x)
    m = np.eye(4)
    m[:3, 0], m[:3, 1], m[:3, 2] = x, y, z
    m[:3, 3] = origin
    return m


def _owner(f: ifcopenshell.file) -> None:
    person = ifcopenshell.api.owner.add_person(f, identification="A", family_name="Invented")
    org = ifcopenshell.api.owner.add_organisation(f, identification="B", name="Invented")
    ifcopenshell.api.owner.add_person_and_organisation(f, person=person, organisation=org)
    ifcopenshell.api.owner.add_application(f)
    settings = ifcopenshell.api.owner.settings
    settings.get_user = lambda file: (file.by_type("IfcPersonAndOrganization") or [None])[0]
    settings.get_application = lambda file: (file.by_type("IfcApplication") or [None])[0]


class IfcModelBuilder:
    """An IFC model of a building under construction (``schema`` IFC4 or IFC2X3).

    ``unit``: ``"mm"`` or ``"m"`` (the file's declared length unit). ``true_north_deg``: the
    bearing of the model's +y axis clockwise from true north, or ``None`` to leave true north
    out of the model.
    """

    def __init__(self, *, schema: str = "IFC4", unit: str = "mm",
                 true_north_deg: float | None = None, name: str = "Invented House") -> None:
        self.f = ifcopenshell.api.project.create_file(version=schema)
        self.schema = schema
        if schema == "IFC2X3":  # IFC2X3 requires an owner history on every rooted entity
            _owner(self.f)
        self.project = ifcopenshell.api.root.create_entity(
            self.f, ifc_class="IfcProject", name="Invented project")
        prefix = "MILLI" if unit == "mm" else None
        length = ifcopenshell.api.unit.add_si_unit(self.f, unit_type="LENGTHUNIT", prefix=prefix)
        ifcopenshell.api.unit.assign_unit(self.f, units=[length])
        self.scale = 1000.0 if unit == "mm" else 1.0  # file units per metre
        self.model_ctx = ifcopenshell.api.context.add_context(self.f, context_type="Model")
        self.body = ifcopenshell.api.context.add_context(
            self.f, context_type="Model", context_identifier="Body", target_view="MODEL_VIEW",
            parent=self.model_ctx)
        if true_north_deg is not None:
            # The model's +y axis points true_north_deg clockwise from north, so true north in
            # model coordinates is +y turned anticlockwise by that angle.
            a = math.radians(true_north_deg)
            self.model_ctx.TrueNorth = self.f.createIfcDirection((-math.sin(a), math.cos(a)))
        self.site = ifcopenshell.api.root.create_entity(self.f, ifc_class="IfcSite", name="Site")
        self.building = ifcopenshell.api.root.create_entity(
            self.f, ifc_class="IfcBuilding", name=name)
        ifcopenshell.api.aggregate.assign_object(
            self.f, products=[self.site], relating_object=self.project)
        ifcopenshell.api.aggregate.assign_object(
            self.f, products=[self.building], relating_object=self.site)
        for product in (self.site, self.building):
            ifcopenshell.api.geometry.edit_object_placement(self.f, product=product)
        self._window_types: dict[str, object] = {}
        self._wall_ends: dict[int, tuple[Point, Point]] = {}

    # --- spatial structure ---------------------------------------------------------------------

    def storey(self, name: str, elevation_m: float) -> ifcopenshell.entity_instance:
        storey = ifcopenshell.api.root.create_entity(
            self.f, ifc_class="IfcBuildingStorey", name=name)
        ifcopenshell.api.aggregate.assign_object(
            self.f, products=[storey], relating_object=self.building)
        ifcopenshell.api.geometry.edit_object_placement(
            self.f, product=storey, matrix=_matrix((0.0, 0.0, elevation_m), (1.0, 0.0)))
        storey.Elevation = elevation_m * self.scale
        return storey

    def _contain(self, element: ifcopenshell.entity_instance,
                 storey: ifcopenshell.entity_instance | None) -> None:
        if storey is not None:
            ifcopenshell.api.spatial.assign_container(
                self.f, products=[element], relating_structure=storey)

    # --- elements ------------------------------------------------------------------------------

    def wall(self, storey: ifcopenshell.entity_instance, start: Point, end: Point, *,
             height_m: float = 3.0, external: bool | None = True,
             body: bool = True) -> ifcopenshell.entity_instance:
        wall = ifcopenshell.api.root.create_entity(self.f, ifc_class="IfcWall", name="Wall")
        z = self._storey_z(storey)
        ifcopenshell.api.geometry.edit_object_placement(
            self.f, product=wall,
            matrix=_matrix((start[0], start[1], z), (end[0] - start[0], end[1] - start[1])))
        self._contain(wall, storey)
        if body:
            rep = ifcopenshell.api.geometry.add_wall_representation(
                self.f, context=self.body, length=math.dist(start, end), height=height_m,
                thickness=0.2)
            ifcopenshell.api.geometry.assign_representation(
                self.f, product=wall, representation=rep)
        if external is not None:
            pset = ifcopenshell.api.pset.add_pset(self.f, product=wall, name="Pset_WallCommon")
            ifcopenshell.api.pset.edit_pset(self.f, pset=pset, properties={"IsExternal": external})
        self._wall_ends[wall.id()] = (start, end)
        return wall

    def _storey_z(self, storey: ifcopenshell.entity_instance | None) -> float:
        if storey is None:
            return 0.0
        return float(storey.ObjectPlacement.RelativePlacement.Location.Coordinates[2]) / self.scale

    def _on_wall(self, wall: ifcopenshell.entity_instance, along_m: float,
                 z_m: float) -> np.ndarray:
        start, end = self._wall_ends[wall.id()]
        d = np.array(end, dtype=float) - np.array(start, dtype=float)
        u = d / np.linalg.norm(d)
        origin = (start[0] + u[0] * along_m, start[1] + u[1] * along_m, z_m)
        return _matrix(origin, u)

    def window(self, storey: ifcopenshell.entity_instance | None,
               wall: ifcopenshell.entity_instance, *, along_m: float, sill_m: float,
               width_m: float | None = 1.2, height_m: float = 1.5, name: str = "",
               operation: str | None = None, storey_z_m: float | None = None,
               geometry_width_m: float | None = None,
               external: bool | None = None) -> ifcopenshell.entity_instance:
        """A window in ``wall``. ``width_m=None`` leaves OverallWidth out (then give
        ``geometry_width_m`` for a body of that width). ``operation``: a panel operation type
        (e.g. ``TILTANDTURNLEFTHAND``) given through a window type. ``storey_z_m``: the height
        the sill is measured from when ``storey`` is ``None``."""
        window = ifcopenshell.api.root.create_entity(self.f, ifc_class="IfcWindow", name=name)
        base = self._storey_z(storey) if storey_z_m is None else storey_z_m
        ifcopenshell.api.geometry.edit_object_placement(
            self.f, product=window, matrix=self._on_wall(wall, along_m, base + sill_m))
        if width_m is not None:
            window.OverallWidth = width_m * self.scale
        window.OverallHeight = height_m * self.scale
        if geometry_width_m is not None:
            rep = ifcopenshell.api.geometry.add_wall_representation(
                self.f, context=self.body, length=geometry_width_m, height=height_m,
                thickness=0.1)
            ifcopenshell.api.geometry.assign_representation(
                self.f, product=window, representation=rep)
        self._contain(window, storey)
        opening = ifcopenshell.api.root.create_entity(
            self.f, ifc_class="IfcOpeningElement", name="Opening")
        ifcopenshell.api.geometry.edit_object_placement(
            self.f, product=opening, matrix=self._on_wall(wall, along_m, base + sill_m))
        ifcopenshell.api.feature.add_feature(self.f, feature=opening, element=wall)
        ifcopenshell.api.feature.add_filling(self.f, opening=opening, element=window)
        if operation is not None:
            self._typed(window, operation)
        if external is not None:
            pset = ifcopenshell.api.pset.add_pset(self.f, product=window, name="Pset_WindowCommon")
            ifcopenshell.api.pset.edit_pset(self.f, pset=pset, properties={"IsExternal": external})
        return window

    def _typed(self, window: ifcopenshell.entity_instance, operation: str) -> None:
        wtype = self._window_types.get(operation)
        if wtype is None:
            cls = "IfcWindowStyle" if self.schema == "IFC2X3" else "IfcWindowType"
            wtype = ifcopenshell.api.root.create_entity(
                self.f, ifc_class=cls, name=f"Type {operation.lower()}")
            if cls == "IfcWindowType":
                wtype.PredefinedType = "WINDOW"
                wtype.PartitioningType = "SINGLE_PANEL"
            else:
                wtype.ConstructionType = "NOTDEFINED"
                wtype.OperationType = "SINGLE_PANEL"
                wtype.ParameterTakesPrecedence = False
                wtype.Sizeable = False
            panel = self.f.create_entity(
                "IfcWindowPanelProperties",
                GlobalId=ifcopenshell.guid.new(), OperationType=operation,
                PanelPosition="MIDDLE")
            wtype.HasPropertySets = [panel]
            self._window_types[operation] = wtype
        ifcopenshell.api.type.assign_type(
            self.f, related_objects=[window], relating_type=wtype,
            should_map_representations=False)

    def door(self, storey: ifcopenshell.entity_instance, wall: ifcopenshell.entity_instance, *,
             along_m: float, width_m: float = 0.9, height_m: float = 2.1,
             name: str = "") -> ifcopenshell.entity_instance:
        door = ifcopenshell.api.root.create_entity(self.f, ifc_class="IfcDoor", name=name)
        ifcopenshell.api.geometry.edit_object_placement(
            self.f, product=door, matrix=self._on_wall(wall, along_m, self._storey_z(storey)))
        door.OverallWidth = width_m * self.scale
        door.OverallHeight = height_m * self.scale
        self._contain(door, storey)
        opening = ifcopenshell.api.root.create_entity(
            self.f, ifc_class="IfcOpeningElement", name="Opening")
        ifcopenshell.api.geometry.edit_object_placement(
            self.f, product=opening, matrix=self._on_wall(wall, along_m, self._storey_z(storey)))
        ifcopenshell.api.feature.add_feature(self.f, feature=opening, element=wall)
        ifcopenshell.api.feature.add_filling(self.f, opening=opening, element=door)
        return door

    def slab(self, storey: ifcopenshell.entity_instance, corners: Sequence[Point], *,
             depth_m: float = 0.2, name: str = "Slab", predefined_type: str | None = None,
             object_type: str | None = None,
             properties: dict[str, object] | None = None) -> ifcopenshell.entity_instance:
        """A slab whose top is at the storey's elevation, over the plan polygon ``corners``
        (metres, world x-y)."""
        slab = ifcopenshell.api.root.create_entity(
            self.f, ifc_class="IfcSlab", name=name, predefined_type=predefined_type)
        if object_type is not None:
            slab.ObjectType = object_type
        z = self._storey_z(storey)
        ifcopenshell.api.geometry.edit_object_placement(
            self.f, product=slab, matrix=_matrix((0.0, 0.0, z - depth_m), (1.0, 0.0)))
        rep = ifcopenshell.api.geometry.add_slab_representation(
            self.f, context=self.body, depth=depth_m, polyline=[tuple(c) for c in corners])
        ifcopenshell.api.geometry.assign_representation(self.f, product=slab, representation=rep)
        self._contain(slab, storey)
        if properties:
            pset = ifcopenshell.api.pset.add_pset(self.f, product=slab, name="Pset_Invented")
            ifcopenshell.api.pset.edit_pset(self.f, pset=pset, properties=properties)
        return slab

    def write(self, path: Path) -> Path:
        self.f.write(str(path))
        return path


def box_tower(builder: IfcModelBuilder, elevations_m: Sequence[float], *,
              width_m: float = 12.0, depth_m: float = 8.0, windows_per_face: int = 3,
              sill_m: float = 0.9, window_width_m: float = 1.2,
              faces: Sequence[str] = ("south", "north")) -> list[ifcopenshell.entity_instance]:
    """A rectangular plan ``width_m`` (along x) by ``depth_m`` (along y), one storey per
    elevation, ``windows_per_face`` windows on each named face ("south" is the y = 0 face,
    "north" the y = depth face, "west" x = 0, "east" x = width) evenly spaced."""
    windows = []
    corners = {
        "south": ((0.0, 0.0), (width_m, 0.0)),
        "east": ((width_m, 0.0), (width_m, depth_m)),
        "north": ((width_m, depth_m), (0.0, depth_m)),
        "west": ((0.0, depth_m), (0.0, 0.0)),
    }
    for k, elevation in enumerate(elevations_m):
        storey = builder.storey(f"Level {k}", elevation)
        for face in faces:
            start, end = corners[face]
            wall = builder.wall(storey, start, end)
            length = math.dist(start, end)
            step = length / windows_per_face
            for j in range(windows_per_face):
                along = step * j + (step - window_width_m) / 2
                windows.append(builder.window(
                    storey, wall, along_m=along, sill_m=sill_m, width_m=window_width_m,
                    name=f"W-{k:02d}-{face[0].upper()}{j + 1}"))
    return windows
