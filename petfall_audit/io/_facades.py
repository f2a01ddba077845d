"""Facades from the outward directions of openings in plan (numpy only; metres, radians).

A direction is the angle of the outward horizontal normal in the model's plan coordinates,
anticlockwise from the model's +x axis. Openings whose normals lie within a tolerance of one
another face the same way and form one facade. A facade is named by its compass bearing when the
model states true north, otherwise by its angle from the model's +y axis (which is not north).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

__all__ = ["FacadeDirection", "group_directions", "name_facades", "bearing_deg", "COMPASS"]

FloatArray = npt.NDArray[np.float64]
IntArray = npt.NDArray[np.intp]

#: Eight compass points, clockwise from north, as facade ids.
COMPASS = (
    "north", "north-east", "east", "south-east", "south", "south-west", "west", "north-west",
)


@dataclass(frozen=True, slots=True)
class FacadeDirection:
    """A facade found in the model: ``normal`` (unit outward vector in plan), ``bearing_deg``
    clockwise from true north (``None`` when the model has no true north), ``angle_deg`` clockwise
    from the model's +y axis, and its id and label."""

    id: str
    label: str
    normal: tuple[float, float]
    angle_deg: float
    bearing_deg: float | None


def group_directions(angles_rad: FloatArray, tolerance_deg: float = 10.0) -> IntArray:
    """Group index of each angle: angles closer than ``tolerance_deg`` to a neighbour (around the
    circle) share a group. Groups are numbered in order of their first member."""
    a = np.mod(np.asarray(angles_rad, dtype=float), 2 * math.pi)
    n = a.size
    groups = np.full(n, -1, dtype=np.intp)
    if n == 0:
        return groups
    order = np.argsort(a, kind="stable")
    sorted_a = a[order]
    tol = math.radians(tolerance_deg)
    gaps = np.diff(sorted_a) > tol
    run = np.concatenate(([0], np.cumsum(gaps)))
    if run[-1] > 0 and (sorted_a[0] + 2 * math.pi - sorted_a[-1]) <= tol:
        run[run == run[-1]] = 0  # the last run wraps round to the first
    groups[order] = run
    # renumber by first appearance so the order follows the model
    _, first = np.unique(groups, return_index=True)
    rank = {int(groups[i]): k for k, i in enumerate(sorted(first))}
    return np.array([rank[int(g)] for g in groups], dtype=np.intp)


def bearing_deg(normal: tuple[float, float], north: tuple[float, float]) -> float:
    """Bearing (degrees clockwise from ``north``, in [0, 360)) of the plan vector ``normal``."""
    nx, ny = north
    east = (ny, -nx)
    b = math.degrees(math.atan2(
        normal[0] * east[0] + normal[1] * east[1], normal[0] * nx + normal[1] * ny))
    return round(b % 360.0, 6) % 360.0


def _mean_normal(normals: FloatArray) -> tuple[float, float]:
    m = normals.mean(axis=0)
    length = float(np.hypot(m[0], m[1]))
    if length < 1e-9:
        m = normals[0]
        length = float(np.hypot(m[0], m[1]))
    return (float(m[0] / length), float(m[1] / length))


def name_facades(
    normals: FloatArray, groups: IntArray, true_north: tuple[float, float] | None
) -> list[FacadeDirection]:
    """One :class:`FacadeDirection` per group (in group order). With ``true_north`` (the
    direction of true north in plan coordinates) the ids are compass points (``north-east``),
    with the bearing added when two facades would share a point (``north-350``); without it,
    ``face-090`` by the angle from the model's +y axis."""
    count = int(groups.max()) + 1 if groups.size else 0
    means = [_mean_normal(normals[groups == g]) for g in range(count)]
    angles = [bearing_deg(m, (0.0, 1.0)) for m in means]
    if true_north is None:
        return [
            FacadeDirection(
                id=f"face-{round(a) % 360:03d}",
                label=f"Face turned {round(a) % 360}° clockwise from the model's +y axis "
                "(the model gives no true north)",
                normal=m,
                angle_deg=a,
                bearing_deg=None,
            )
            for m, a in zip(means, angles, strict=True)
        ]
    bearings = [bearing_deg(m, true_north) for m in means]
    points = [COMPASS[round(b / 45.0) % 8] for b in bearings]
    result = []
    for m, a, b, point in zip(means, angles, bearings, points, strict=True):
        shared = points.count(point) > 1
        ident = f"{point}-{round(b) % 360:03d}" if shared else point
        result.append(
            FacadeDirection(
                id=ident,
                label=f"{point.capitalize()} (facing {round(b) % 360}° from true north)",
                normal=m,
                angle_deg=a,
                bearing_deg=b,
            )
        )
    return result
