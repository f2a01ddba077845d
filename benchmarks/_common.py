"""Shared helpers for the benchmark scripts: timing, memory, a large test building."""

from __future__ import annotations

import statistics
import sys
import time
import tracemalloc
from collections.abc import Callable
from pathlib import Path
from typing import Any

# Run from a source checkout without installing: put the repository root on the path.
_ROOT = Path(__file__).resolve().parent.parent
if str(_ROOT) not in sys.path:
    sys.path.insert(0, str(_ROOT))

from petfall_audit.model import (  # noqa: E402
    Building,
    BuildingInfo,
    Facade,
    Floor,
    Opening,
    OpeningKind,
    Surface,
    SurfaceKind,
)


def median_time_s(fn: Callable[[], Any], repeats: int = 5) -> float:
    """Median wall time (s) of ``repeats`` calls of ``fn`` (time.perf_counter)."""
    times = []
    for _ in range(repeats):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def peak_memory_bytes(fn: Callable[[], Any]) -> int:
    """Peak Python-tracked allocation (bytes, tracemalloc; numpy reports its buffers) of one
    call of ``fn``."""
    tracemalloc.start()
    try:
        fn()
        return tracemalloc.get_traced_memory()[1]
    finally:
        tracemalloc.stop()


def large_tower(floors: int = 60, openings_per_floor: int = 20) -> Building:
    """An invented tower: ``openings_per_floor`` openings per floor on two facades (alternating
    balconies and windows), a tall ground floor, a three-storey podium roof in front of the
    north facade, paving and a lawn below. Uses ``petfall_audit.demo.make_large_tower`` when it
    exists."""
    try:
        from petfall_audit.demo import make_large_tower  # type: ignore[attr-defined]
    except ImportError:
        pass
    else:
        return make_large_tower(floors, openings_per_floor)  # type: ignore[no-any-return]
    per_facade = max(1, openings_per_floor // 2)
    floor_list = [Floor(0, "Ground", 0.0)] + [
        Floor(i, f"Level {i}", 4.5 + 3.1 * (i - 1)) for i in range(1, floors)
    ]
    facades = (Facade("north", 4.0 * per_facade), Facade("south", 4.0 * per_facade))
    openings = []
    for fl in floor_list:
        for facade in facades:
            extra = (facade.id == "north") * (openings_per_floor % 2)
            for j in range(openings_per_floor // 2 + extra):
                balcony = j % 2 == 0
                openings.append(
                    Opening(
                        id=f"{facade.id[0].upper()}{fl.level:02d}-{j + 1:02d}",
                        floor=fl.level,
                        facade=facade.id,
                        kind=OpeningKind.BALCONY if balcony else OpeningKind.WINDOW_CASEMENT,
                        x_m=4.0 * j + (0.2 if balcony else 1.0),
                        width_m=3.6 if balcony else 1.2,
                        projection_m=1.5 if balcony else 0.0,
                        perch_height_m=1.1 if balcony else 0.9,
                    )
                )
    surfaces = (
        Surface("podium", SurfaceKind.ROOF, 4.5 + 3.1 * 2, facade="north", to_facade_m=8.0),
        Surface("paving", SurfaceKind.CONCRETE, 0.0, from_facade_m=0.0, to_facade_m=4.0),
        Surface("lawn", SurfaceKind.LAWN, -0.2, from_facade_m=4.0),
    )
    return Building(
        info=BuildingInfo(name="Invented benchmark tower", address="1 Example Row"),
        floors=tuple(floor_list),
        facades=facades,
        surfaces=surfaces,
        openings=tuple(openings),
    )
