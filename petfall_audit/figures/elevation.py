"""Facades seen from outside: floor lines, one rectangle per opening with its expected injury
band, and what lies below and in front of the facade. Lengths in m above the building's datum."""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np
from numpy.typing import NDArray

from petfall_audit.barriers import is_protected
from petfall_audit.figures.floors import floors_by_elevation
from petfall_audit.model import BALCONY_LIKE, Building
from petfall_audit.present.labels import surface_label

if TYPE_CHECKING:
    from petfall_audit.risk import Assessment

__all__ = [
    "HEAD_HEIGHT_M",
    "FacadeElevation",
    "SURFACE_FILLS",
    "SurfaceBand",
    "CatchingBalcony",
    "FacadeContext",
    "storey_heights_m",
    "facade_elevations",
    "facade_context",
]

#: Fill of each surface kind on an elevation, screen and paper alike (muted, so the band colours
#: of the openings stand out).
SURFACE_FILLS: dict[str, str] = {
    "concrete": "#9A9A9A", "asphalt": "#5E5E5E", "gravel": "#B8AE9C", "lawn": "#8FA67A",
    "planting": "#6F8F5A", "water": "#7FA7C9", "roof": "#8C7F73", "deck": "#A58462",
}

#: Head height of a window or door drawn on an elevation (m). Drawing convention only.
HEAD_HEIGHT_M = 2.1
_FALLBACK_STOREY_M = 2.7  # drawing only, for a one-floor building


@dataclass(frozen=True, slots=True)
class FacadeElevation:
    """One facade seen from outside. Opening arrays are aligned with ``opening_ids``.

    ``bottom_m`` / ``top_m``: drawn extent of each opening above the datum (windows from the sill,
    balconies from the floor). ``guard_m``: rail top above the datum for balcony-like openings,
    NaN for windows. ``band``: expected injury band, -1 when unknown. ``rank``: 1 = worst.
    ``protected``: a barrier fitted to the opening holds the building's cat profile
    (:func:`petfall_audit.barriers.is_protected`); screen and paper hatch these openings.
    """

    facade_id: str
    label: str
    length_m: float
    floor_levels: NDArray[np.int_]
    floor_labels: tuple[str, ...]
    floor_elevation_m: NDArray[np.float64]
    ground_m: float
    roof_m: float
    opening_ids: tuple[str, ...]
    kinds: tuple[str, ...]
    x_m: NDArray[np.float64]
    width_m: NDArray[np.float64]
    bottom_m: NDArray[np.float64]
    top_m: NDArray[np.float64]
    guard_m: NDArray[np.float64]
    band: NDArray[np.int_]
    rank: NDArray[np.int_]
    protected: NDArray[np.bool_]
    surfaces: tuple[SurfaceBand, ...] = ()

    @property
    def protected_ids(self) -> frozenset[str]:
        """Ids of the openings drawn as protected."""
        return frozenset(i for i, p in zip(self.opening_ids, self.protected.tolist(), strict=True)
                         if p)


def storey_heights_m(building: Building) -> dict[int, float]:
    """Floor-to-floor height per level (m); the top floor repeats the one below it."""
    floors = floors_by_elevation(building)
    elev = np.array([f.elevation_m for f in floors], dtype=float)
    if elev.size == 0:
        return {}
    gaps = np.diff(elev)
    last = gaps[-1] if gaps.size else _FALLBACK_STOREY_M
    heights = np.append(gaps, last)
    return {f.level: float(h) for f, h in zip(floors, heights, strict=True)}


def facade_elevations(assessment: Assessment) -> list[FacadeElevation]:
    """One :class:`FacadeElevation` per facade that has openings, in building order."""
    building = assessment.building
    band_of = {o.id: int(o.expected_band) for o in assessment.openings}
    rank_of = {o.id: int(o.rank) for o in assessment.openings}
    storey = storey_heights_m(building)
    floors = floors_by_elevation(building)
    levels = np.array([f.level for f in floors], dtype=int)
    elev = np.array([f.elevation_m for f in floors], dtype=float)
    lowest_floor_m = float(elev.min(initial=0.0))
    roof = float(elev.max(initial=0.0)) + (storey[floors[-1].level] if floors else 0.0)
    floor_elev = {f.level: f.elevation_m for f in floors}
    out: list[FacadeElevation] = []
    for facade in building.facades:
        ops = [o for o in building.openings if o.facade == facade.id]
        if not ops:
            continue
        base = np.array([floor_elev[o.floor] for o in ops], dtype=float)
        h = np.array([storey[o.floor] for o in ops], dtype=float)
        perch = np.array([o.perch_height_m for o in ops], dtype=float)
        balcony = np.array([o.kind in BALCONY_LIKE for o in ops], dtype=bool)
        head = np.minimum(HEAD_HEIGHT_M, h - 0.2)
        sill = np.minimum(perch, head - 0.3)
        below = facade_context(building, facade.id).surfaces
        # the ground line of this facade: its own surfaces (a light well on another facade
        # does not lower it)
        ground = min([sb.elevation_m for sb in below] + [lowest_floor_m])
        out.append(
            FacadeElevation(
                facade_id=facade.id,
                label=facade.label or facade.id,
                length_m=float(facade.length_m),
                floor_levels=levels,
                floor_labels=tuple(f.label for f in floors),
                floor_elevation_m=elev,
                ground_m=float(ground),
                roof_m=roof,
                opening_ids=tuple(o.id for o in ops),
                kinds=tuple(str(o.kind) for o in ops),
                x_m=np.array([o.x_m for o in ops], dtype=float),
                width_m=np.array([o.width_m for o in ops], dtype=float),
                bottom_m=base + np.where(balcony, 0.0, sill),
                top_m=base + head,
                guard_m=np.where(balcony, base + np.minimum(perch, head), np.nan),
                band=np.array([band_of.get(o.id, -1) for o in ops], dtype=int),
                rank=np.array([rank_of.get(o.id, 0) for o in ops], dtype=int),
                protected=np.array([is_protected(o, building.cat_profile) for o in ops],
                                   dtype=bool),
                surfaces=below,
            )
        )
    return out


@dataclass(frozen=True, slots=True)
class SurfaceBand:
    """A surface below, seen on an elevation: its top ``elevation_m``, outward extent
    ``from_m``..``to_m`` (``None`` = unbounded), extent along the facade ``x_from_m``..``x_to_m``
    (``None`` = from its start / to its end) and plain-words ``label``."""

    id: str
    kind: str
    elevation_m: float
    from_m: float
    to_m: float | None
    label: str
    x_from_m: float | None = None
    x_to_m: float | None = None

    def span_along_m(self, length_m: float) -> tuple[float, float]:
        """Where it lies along a facade of ``length_m`` (m), clipped to the facade."""
        lo = 0.0 if self.x_from_m is None else max(0.0, self.x_from_m)
        hi = length_m if self.x_to_m is None else min(length_m, self.x_to_m)
        return lo, max(lo, hi)


@dataclass(frozen=True, slots=True)
class CatchingBalcony:
    """A balcony, terrace or gallery that can catch a cat falling from above: floor level
    ``slab_m`` above the datum, ``x_m`` / ``width_m`` along the facade, ``projection_m`` out."""

    id: str
    slab_m: float
    x_m: float
    width_m: float
    projection_m: float


@dataclass(frozen=True, slots=True)
class FacadeContext:
    """What lies below and in front of one facade (surfaces nearest the facade first)."""

    facade_id: str
    surfaces: tuple[SurfaceBand, ...]
    catching: tuple[CatchingBalcony, ...]


def facade_context(building: Building, facade_id: str) -> FacadeContext:
    """Surfaces that lie in front of ``facade_id`` (its own and those of every facade) and its
    balcony-like openings, which catch cats falling from higher up when they project far
    enough."""
    surfaces = sorted(
        (s for s in building.surfaces if s.facade in (None, facade_id)),
        key=lambda s: (s.from_facade_m, -s.elevation_m),
    )
    elev = {f.level: f.elevation_m for f in building.floors}
    catching = tuple(
        CatchingBalcony(o.id, float(elev.get(o.floor, 0.0)), o.x_m, o.width_m, o.projection_m)
        for o in building.openings
        if o.facade == facade_id and o.kind in BALCONY_LIKE and o.projection_m > 0
    )
    return FacadeContext(
        facade_id=facade_id,
        surfaces=tuple(
            SurfaceBand(s.id, str(s.kind), float(s.elevation_m), float(s.from_facade_m),
                        None if s.to_facade_m is None else float(s.to_facade_m),
                        surface_label(s.label, s.kind), s.x_from_m, s.x_to_m)
            for s in surfaces
        ),
        catching=catching,
    )
