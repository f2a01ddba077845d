"""The shipped sample buildings: they load, round-trip, pass the schema and show what they claim."""

from __future__ import annotations

import json
from pathlib import Path

import jsonschema
import pytest

from petfall_audit._resources import resource_path, sample_names, sample_path
from petfall_audit.demo import sample_building
from petfall_audit.io._schema import SCHEMA_FILENAME
from petfall_audit.io.building_file import (
    dumps_building,
    load_building,
    save_building,
    validate_building,
)
from petfall_audit.model import (
    BALCONY_LIKE,
    Building,
    CatsPresent,
    OpeningKind,
    SurfaceKind,
)

SAMPLES = ("block", "tower", "walkup")


def test_the_three_samples_are_shipped() -> None:
    assert tuple(sample_names()) == SAMPLES


@pytest.mark.parametrize("name", SAMPLES)
def test_sample_round_trip(name: str, tmp_path: Path) -> None:
    building = load_building(sample_path(name))
    assert validate_building(building) == []
    out = tmp_path / f"{name}.json"
    save_building(building, out)
    assert load_building(out) == building
    # The committed file is in the canonical form the program writes.
    assert sample_path(name).read_text(encoding="utf-8") == dumps_building(building)
    assert sample_building(name) == building


@pytest.mark.parametrize("name", SAMPLES)
def test_schema_validates_sample(name: str) -> None:
    schema = json.loads(resource_path(SCHEMA_FILENAME).read_text(encoding="utf-8"))
    jsonschema.Draft202012Validator(schema).validate(
        json.loads(sample_path(name).read_text(encoding="utf-8"))
    )


@pytest.mark.parametrize("name", SAMPLES)
def test_every_sample_exercises_the_whole_vocabulary_of_an_audit(name: str) -> None:
    b = load_building(sample_path(name))
    assert {o.cats_present for o in b.openings} == set(CatsPresent)
    assert any(o.limiter_gap_mm is not None for o in b.openings)
    assert any(o.notes for o in b.openings) and b.info.notes and b.info.address
    storey_heights = {
        round(upper.elevation_m - lower.elevation_m, 2)
        for lower, upper in zip(b.floors[:-1], b.floors[1:], strict=True)
    }
    assert len(storey_heights) > 1  # floor-to-floor heights vary; never a flat 3 m
    for facade in {o.facade for o in b.openings}:  # every facade with openings has ground below
        assert any(s.facade in (facade, None) and s.to_facade_m is None for s in b.surfaces), facade


def _levels(b: Building) -> list[int]:
    return [f.level for f in b.floors]


def test_tower() -> None:
    b = load_building(sample_path("tower"))
    assert len(b.floors) == 32
    level_3 = b.floor(3).elevation_m
    podium = [s for s in b.surfaces if s.kind is SurfaceKind.ROOF]
    assert len(podium) == 1
    roof = podium[0]
    # A podium roof at level 3, about 12 m deep, in front of the street facade.
    assert roof.facade == "street" and roof.to_facade_m == pytest.approx(12.0)
    assert level_3 - 0.5 <= roof.elevation_m <= level_3
    planting = [s for s in b.surfaces if s.kind is SurfaceKind.PLANTING]
    assert planting and all(s.facade not in (None, "street") for s in planting)
    assert planting[0].from_facade_m == 0.0  # at the foot of the facade
    kinds = {o.kind for o in b.openings}
    assert OpeningKind.BALCONY in kinds and kinds & {OpeningKind.WINDOW_SLIDING}
    assert b.floor(1).elevation_m - b.floor(0).elevation_m > 4.0  # tall ground floor
    assert min(o.floor for o in b.openings if o.facade == "street") == 3


def test_walkup() -> None:
    b = load_building(sample_path("walkup"))
    assert len(b.floors) == 6
    assert sum(o.kind is OpeningKind.WINDOW_TILT_TURN for o in b.openings) >= 10
    courtyard = {s.kind for s in b.surfaces if s.facade == "courtyard"}
    assert {SurfaceKind.LAWN, SurfaceKind.GRAVEL} <= courtyard
    escape = [o for o in b.openings if o.escape_window]
    assert escape and all(o.kind is not OpeningKind.FIXED for o in escape)
    assert all(o.netting_mesh_mm is None and o.limiter_gap_mm is None for o in escape)


def test_block() -> None:
    b = load_building(sample_path("block"))
    assert len(b.floors) == 12
    balconies = [o for o in b.openings if o.kind is OpeningKind.BALCONY]
    # Stacked: the same position on many floors.
    stacks: dict[tuple[str, float], set[int]] = {}
    for o in balconies:
        stacks.setdefault((o.facade, o.x_m), set()).add(o.floor)
    assert max(len(floors) for floors in stacks.values()) >= 10
    assert any(o.netting_mesh_mm == 30.0 for o in balconies)
    assert any(o.netting_mesh_mm is None for o in balconies)
    assert any((o.largest_gap_mm or 0) > 100 for o in balconies)  # wider than the child rule
    # A few windows above a deeper balcony.
    deep = [
        o for o in b.openings if o.kind in BALCONY_LIKE and o.projection_m >= 3.0 and o.floor > 0
    ]
    assert deep
    above = [
        o
        for o in b.openings
        if o.kind is OpeningKind.WINDOW_CASEMENT
        and o.facade == deep[0].facade
        and o.floor > deep[0].floor
        and o.x_m < deep[0].x_m + deep[0].width_m
        and deep[0].x_m < o.x_m + o.width_m
    ]
    assert len(above) >= 2
    assert any(o.escape_window for o in b.openings)
