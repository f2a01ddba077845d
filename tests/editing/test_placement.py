"""Where a new opening goes (no Qt): the floor asked for, a free place, the rules respected."""

from __future__ import annotations

from petfall_audit.editing.document import validate
from petfall_audit.editing.placement import free_x_m, new_opening
from petfall_audit.model import (
    Building,
    BuildingInfo,
    Facade,
    Floor,
    Opening,
    OpeningKind,
    Surface,
    SurfaceKind,
)


def podium(levels: int = 5) -> Building:
    floors = (Floor(0, "Ground", 0.0), *(Floor(k, f"L{k}", 4.5 + 3.0 * (k - 1))
                                          for k in range(1, levels)))
    return Building(
        info=BuildingInfo(name="Podium tower (invented)"), floors=floors,
        facades=(Facade("front", 20.0), Facade("back", 20.0)),
        surfaces=(Surface("ground", SurfaceKind.CONCRETE, 0.0),
                  Surface("podium", SurfaceKind.CONCRETE, 4.5, facade="front",
                          from_facade_m=0.0, to_facade_m=6.0)))


def test_the_lowest_floor_below_a_podium_is_skipped() -> None:
    opening, problems = new_opening(podium())
    assert problems == [] and opening is not None
    # the podium roof at 4.5 m would stand above a ground-floor balcony at 0 m
    assert (opening.floor, opening.facade) == (1, "front")


def test_the_floor_asked_for_is_used_when_it_is_valid() -> None:
    opening, _ = new_opening(podium(), level=3, facade="back")
    assert opening is not None and (opening.floor, opening.facade) == (3, "back")
    # the back facade has no podium: its ground floor is fine too
    opening, _ = new_opening(podium(), level=0, facade="back")
    assert opening is not None and (opening.floor, opening.facade) == (0, "back")


def test_new_openings_do_not_overlap_and_the_result_is_valid() -> None:
    b = podium()
    for _ in range(4):
        opening, _ = new_opening(b, level=2, facade="front")
        assert opening is not None
        b = Building(info=b.info, floors=b.floors, facades=b.facades, surfaces=b.surfaces,
                     openings=(*b.openings, opening))
    spans = sorted((o.x_m, o.x_m + o.width_m) for o in b.openings)
    assert all(a[1] <= c[0] + 1e-9 for a, c in zip(spans, spans[1:], strict=False))
    assert len({o.id for o in b.openings}) == 4
    assert validate(b) == []


def test_free_place_fills_a_gap_and_falls_back_to_zero_on_a_full_facade() -> None:
    b = podium()
    taken = (Opening("a", 1, "front", OpeningKind.BALCONY, 0.0, 1.0, 1.0),
             Opening("b", 1, "front", OpeningKind.BALCONY, 3.0, 1.0, 1.0))
    b = Building(info=b.info, floors=b.floors, facades=b.facades, surfaces=b.surfaces,
                 openings=taken)
    assert free_x_m(b, 1, "front") == 1.0
    assert free_x_m(b, 1, "front", width_m=2.5) == 4.0
    assert free_x_m(b, 1, "front", width_m=25.0) == 0.0


def test_no_floor_or_facade_gives_a_reason() -> None:
    b = Building(info=BuildingInfo(name="Empty"), floors=(), facades=())
    opening, problems = new_opening(b)
    assert opening is None and "floor and a facade" in problems[0].message
