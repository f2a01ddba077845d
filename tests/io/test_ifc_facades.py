"""Facade directions from opening normals (petfall_audit.io._facades): plane geometry only."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import assume, given
from hypothesis import strategies as st

from petfall_audit.io._facades import bearing_deg, group_directions, name_facades


def _unit(angle_deg: float) -> tuple[float, float]:
    a = math.radians(angle_deg)
    return (math.cos(a), math.sin(a))


def test_bearings_by_hand() -> None:
    north = (0.0, 1.0)
    # with north along +y: +x is east (90°), -y south (180°), -x west (270°)
    assert bearing_deg((1.0, 0.0), north) == pytest.approx(90.0)
    assert bearing_deg((0.0, -1.0), north) == pytest.approx(180.0)
    assert bearing_deg((-1.0, 0.0), north) == pytest.approx(270.0)
    # north along +x: +y is then 90° anticlockwise of north, i.e. west (270°)
    assert bearing_deg((0.0, 1.0), (1.0, 0.0)) == pytest.approx(270.0)


def test_groups_wrap_round_the_circle() -> None:
    angles = np.radians([359.0, 1.0, 90.0, 92.0, 180.0])
    groups = group_directions(angles)
    assert groups[0] == groups[1] != groups[2]
    assert groups[2] == groups[3] != groups[4]
    assert len(set(groups.tolist())) == 3


def test_two_facades_on_one_compass_point_keep_their_bearing() -> None:
    normals = np.array([_unit(90 - 350), _unit(90 - 20)])  # bearings 350° and 20°
    groups = group_directions(np.arctan2(normals[:, 1], normals[:, 0]))
    ids = [f.id for f in name_facades(normals, groups, (0.0, 1.0))]
    assert ids == ["north-350", "north-020"]


@given(
    st.lists(st.floats(0, 359.9), min_size=1, max_size=12),
    st.floats(0, 359.9),
)
def test_turning_the_model_and_its_north_together_changes_no_bearing(
    angles_deg: list[float], turn_deg: float
) -> None:
    ordered = sorted(angles_deg)
    gaps = [b - a for a, b in zip(ordered, ordered[1:], strict=False)]
    gaps.append(ordered[0] + 360 - ordered[-1])
    assume(all(abs(g - 10.0) > 1e-6 for g in gaps))  # not on the grouping tolerance itself
    normals = np.array([_unit(a) for a in angles_deg])
    turned = np.array([_unit(a + turn_deg) for a in angles_deg])
    north, turned_north = _unit(90.0), _unit(90.0 + turn_deg)
    groups = group_directions(np.arctan2(normals[:, 1], normals[:, 0]))
    turned_groups = group_directions(np.arctan2(turned[:, 1], turned[:, 0]))
    assert len(set(groups.tolist())) == len(set(turned_groups.tolist()))
    for n, t in zip(normals, turned, strict=True):
        b0 = bearing_deg(tuple(n), north)
        b1 = bearing_deg(tuple(t), turned_north)
        assert math.isclose(math.cos(math.radians(b0 - b1)), 1.0, abs_tol=1e-9)
