"""Demo buildings: the shipped samples and a large generated tower for benchmarks.

Every building here is invented; none stands for a real place.
"""

from __future__ import annotations

from petfall_audit._resources import sample_path
from petfall_audit.model import (
    CAT_PRESETS,
    Building,
    BuildingInfo,
    CatsPresent,
    Facade,
    Floor,
    OpenFrequency,
    Opening,
    OpeningKind,
    Screen,
    Surface,
    SurfaceKind,
)

__all__ = ["make_large_tower", "sample_building"]

_GROUND_STOREY_M = 4.5
_STOREY_M = 3.1
_BAY_M = 4.0  # width of one bay along a facade; one opening per bay
_FACADES = ("north", "east", "south", "west")
_CATS = (CatsPresent.YES, CatsPresent.NO, CatsPresent.UNKNOWN, CatsPresent.NO, CatsPresent.YES)
_FREQUENCY = (OpenFrequency.DAILY, OpenFrequency.SEASONAL, OpenFrequency.RARELY)


def sample_building(name: str = "tower") -> Building:
    """Load the shipped sample building ``name`` ("tower", "walkup" or "block")."""
    from petfall_audit.io.building_file import load_building

    return load_building(sample_path(name))


def make_large_tower(floors: int = 60, openings_per_floor: int = 20) -> Building:
    """An invented tower of ``floors`` storeys with ``openings_per_floor`` openings on each.

    Deterministic (no randomness): the same arguments give an equal building. The openings are
    spread over four facades, one per 4 m bay (below the podium the south
    face's share moves to the north face), and mix balconies (stacked, some netted) with
    windows of every opening kind. A 4.5 m ground floor, then 3.1 m storeys; ground surfaces
    under every facade and a podium roof in front of the south facade up to level 2. Used by the
    benchmarks; it passes :func:`petfall_audit.io.building_file.validate_building`.
    """
    if floors < 1:
        raise ValueError(f"floors must be at least 1, got {floors}")
    if openings_per_floor < 1:
        raise ValueError(f"openings_per_floor must be at least 1, got {openings_per_floor}")
    per_facade = -(-openings_per_floor // len(_FACADES))  # ceiling division
    facade_length_m = per_facade * _BAY_M + 2.0

    floor_list = tuple(
        Floor(
            level,
            "Ground floor" if level == 0 else f"Level {level}",
            0.0 if level == 0 else round(_GROUND_STOREY_M + _STOREY_M * (level - 1), 3),
        )
        for level in range(floors)
    )
    facades = tuple(Facade(f, facade_length_m, f.capitalize()) for f in _FACADES)
    podium_m = floor_list[min(2, floors - 1)].elevation_m - 0.2  # roof just below level 2's floor
    surfaces = (
        Surface("north_ground", SurfaceKind.CONCRETE, 0.0, "north", label="Paving"),
        Surface("east_bed", SurfaceKind.PLANTING, 0.0, "east", 0.0, 2.0, "Planting bed"),
        Surface("east_lawn", SurfaceKind.LAWN, 0.0, "east", 2.0, None, "Lawn"),
        Surface("south_podium", SurfaceKind.ROOF, podium_m, "south", 0.0, 8.0, "Podium roof"),
        Surface("south_street", SurfaceKind.ASPHALT, 0.0, "south", 8.0, None, "Street"),
        Surface("west_ground", SurfaceKind.GRAVEL, 0.0, "west", label="Gravel"),
    )
    window_kinds = (
        OpeningKind.WINDOW_CASEMENT,
        OpeningKind.WINDOW_SLIDING,
        OpeningKind.WINDOW_HUNG,
        OpeningKind.WINDOW_TILT_TURN,
        OpeningKind.WINDOW_TOP_HUNG,
        OpeningKind.FIXED,
    )
    openings: list[Opening] = []
    for floor in floor_list:
        level = floor.level
        for k in range(openings_per_floor):
            facade = _FACADES[k % len(_FACADES)]
            bay = k // len(_FACADES)
            x_m = 1.0 + bay * _BAY_M
            balcony = bay % 2 == 0 and level > 0
            if facade == "south" and level < 2:
                # The podium covers the south face below level 2: these homes look north, from
                # a window in the free right-hand part of the bay.
                facade, balcony, x_m = "north", False, x_m + 2.6
            common = dict(
                id=f"L{level:03d}-{k:03d}",
                floor=level,
                facade=facade,
                open_frequency=_FREQUENCY[(level + k) % len(_FREQUENCY)],
                cats_present=_CATS[(3 * level + k) % len(_CATS)],
            )
            if balcony:
                openings.append(
                    Opening(
                        **common,  # type: ignore[arg-type]
                        kind=OpeningKind.BALCONY,
                        x_m=x_m,
                        width_m=2.4,
                        projection_m=1.5,
                        perch_height_m=1.1,
                        largest_gap_mm=95.0 if bay % 4 == 0 else None,
                        bottom_gap_mm=50.0,
                        flat_rail_top=level % 3 == 0,
                        climbing_aids=(level + bay) % 7 == 0,
                        netting_mesh_mm=30.0 if (level + k) % 5 == 0 else None,
                    )
                )
            else:
                kind = window_kinds[(level + k) % len(window_kinds)]
                openings.append(
                    Opening(
                        **common,  # type: ignore[arg-type]
                        kind=kind,
                        x_m=x_m,
                        width_m=1.2,
                        perch_height_m=0.9,
                        limiter_gap_mm=100.0 if kind is OpeningKind.WINDOW_TOP_HUNG else None,
                        screen=Screen.INSECT if (level + k) % 6 == 0 else Screen.NONE,
                    )
                )
    info = BuildingInfo(
        name=f"Benchmark Tower ({floors} floors × {openings_per_floor} openings)",
        address="1 Sample Quay, Nowhere Harbour (invented)",
        site_altitude_m=20.0,
        air_temperature_c=20.0,
        auditor="generated",
        notes="Generated for benchmarks; not a real building.",
    )
    return Building(
        info=info,
        floors=floor_list,
        facades=facades,
        surfaces=surfaces,
        openings=tuple(openings),
        cat_profile=CAT_PRESETS["adult"],
    )
