"""Re-audits: two audits of one building compared opening by opening (petfall_audit.compare).

The reference building pair (invented): a net fitted on one balcony, one window removed, one
added and one floor raised; every other opening untouched. The checks compare the comparison
with independent routes: assessing an opening alone with the whole assessment, and the risk
score's own definition (a sum over openings).
"""

from __future__ import annotations

import dataclasses
import json
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from petfall_audit.compare import BARRIER_FIELDS, compare_assessments, compare_buildings
from petfall_audit.io.building_file import load_building, save_building
from petfall_audit.model import (
    Building,
    BuildingInfo,
    CatsPresent,
    Facade,
    Floor,
    OpenFrequency,
    Opening,
    OpeningKind,
    Surface,
    SurfaceKind,
)
from petfall_audit.risk import assess

SAMPLES = 600
SEED = 7


def earlier_building() -> Building:
    """Five storeys on one facade; openings far apart along it, so none catches another's
    falls (each opening's result depends on itself and the ground only)."""
    floors = tuple(Floor(level=i, label=f"L{i}", elevation_m=3.0 * i) for i in range(5))
    common = {"facade": "S", "cats_present": CatsPresent.YES,
              "open_frequency": OpenFrequency.DAILY}
    return Building(
        info=BuildingInfo(name="Harbour View 3 (invented)", audit_date="2025-05-02"),
        floors=floors,
        facades=(Facade("S", 40.0, "South"),),
        surfaces=(Surface("ground", SurfaceKind.CONCRETE, 0.0),),
        openings=(
            Opening("B-2", floor=2, kind=OpeningKind.BALCONY, x_m=0.0, width_m=3.0,
                    projection_m=1.5, largest_gap_mm=100.0, **common),
            Opening("W-3", floor=3, kind=OpeningKind.WINDOW_CASEMENT, x_m=8.0, width_m=1.0,
                    perch_height_m=0.9, **common),
            Opening("W-1", floor=1, kind=OpeningKind.WINDOW_CASEMENT, x_m=14.0, width_m=1.0,
                    perch_height_m=0.9, **common),
            Opening("B-4", floor=4, kind=OpeningKind.BALCONY, x_m=20.0, width_m=3.0,
                    projection_m=1.5, largest_gap_mm=100.0, **common),
        ),
    )


def later_building() -> Building:
    """A year on: net (30 mm) on B-2, W-3 gone (bricked up), W-5 new on floor 2, floor 1
    raised by 0.4 m."""
    e = earlier_building()
    b2 = dataclasses.replace(e.opening("B-2"), netting_mesh_mm=30.0)
    w5 = Opening("W-5", floor=2, facade="S", kind=OpeningKind.WINDOW_SLIDING, x_m=30.0,
                 width_m=1.2, perch_height_m=0.8, cats_present=CatsPresent.YES)
    floors = tuple(dataclasses.replace(f, elevation_m=3.4) if f.level == 1 else f
                   for f in e.floors)
    return dataclasses.replace(
        e,
        info=dataclasses.replace(e.info, audit_date="2026-05-04"),
        floors=floors,
        openings=(b2, e.opening("W-1"), e.opening("B-4"), w5),
    )


@pytest.fixture(scope="module")
def comparison():  # type: ignore[no-untyped-def]
    return compare_buildings(earlier_building(), later_building(), samples=SAMPLES, seed=SEED)


def test_statuses_and_fields_are_exactly_the_changes_made(comparison) -> None:  # type: ignore[no-untyped-def]
    got = {o.id: (o.status, o.change_names) for o in comparison.openings}
    assert got == {
        "B-2": ("changed", ("netting_mesh_mm",)),
        "W-1": ("changed", ("floor_elevation_m",)),
        "B-4": ("unchanged", ()),
        "W-5": ("added", ()),
        "W-3": ("removed", ()),
    }
    net = comparison.opening("B-2").changes[0]
    assert (net.old, net.new, net.unit) == (None, 30.0, "mm")
    raised = comparison.opening("W-1").changes[0]
    assert (raised.old, raised.new, raised.unit) == (3.0, 3.4, "m")
    assert [c.field for c in comparison.building_changes] == ["floors[1].elevation_m"]
    # the removed opening has no later side, the added one no earlier side
    assert comparison.opening("W-3").after is None and comparison.opening("W-5").before is None


def test_risk_removed_by_the_net_equals_the_balcony_assessed_alone(comparison) -> None:  # type: ignore[no-untyped-def]
    # independent route: the balcony as the only opening of the building, assessed in full
    # without and with the net (same cats), the difference of its risk scores
    e, later = earlier_building(), later_building()
    alone_before = assess(dataclasses.replace(e, openings=(e.opening("B-2"),)),
                          samples=SAMPLES, seed=SEED).result("B-2").risk
    alone_after = assess(dataclasses.replace(later, openings=(later.opening("B-2"),)),
                         samples=SAMPLES, seed=SEED).result("B-2").risk
    row = comparison.opening("B-2")
    assert alone_before > alone_after > 0
    assert row.removed_by_fixes == pytest.approx(alone_before - alone_after, rel=1e-9)
    assert row.risk_before - row.risk_after == pytest.approx(alone_before - alone_after,
                                                             rel=1e-9)
    assert row.removed_by_other == pytest.approx(0.0, abs=1e-9 * alone_before)


def test_totals_and_split_add_up_to_the_sum_over_openings(comparison) -> None:  # type: ignore[no-untyped-def]
    # the building's risk score is the sum of its openings' (risk.py's definition)
    e = assess(earlier_building(), samples=SAMPLES, seed=SEED)
    la = assess(later_building(), samples=SAMPLES, seed=SEED)
    assert comparison.risk_before == pytest.approx(sum(o.risk for o in e.openings), rel=1e-12)
    assert comparison.risk_after == pytest.approx(sum(o.risk for o in la.openings), rel=1e-12)
    assert comparison.removed_by_fixes + comparison.removed_by_other == pytest.approx(
        comparison.risk_before - comparison.risk_after, rel=1e-9)
    # only the net is a barrier change: the fixes removed exactly what the net removed
    assert comparison.removed_by_fixes == pytest.approx(
        comparison.opening("B-2").removed_by_fixes, rel=1e-12)
    # the removed window's whole risk is "other", and the added one's counts against it
    w3, w5 = comparison.opening("W-3"), comparison.opening("W-5")
    assert w3.removed_by_other == w3.risk_before and w5.removed_by_other == -w5.risk_after
    share = comparison.share_by_fixes
    assert share is not None and 0 < share < 1


def test_a_file_compared_with_itself_is_unchanged_with_zero_difference(tmp_path: Path) -> None:
    path = tmp_path / "harbour.json"
    save_building(earlier_building(), path)
    c = compare_buildings(load_building(path), load_building(path), samples=SAMPLES, seed=SEED)
    assert {o.status for o in c.openings} == {"unchanged"}
    assert c.risk_before == c.risk_after
    assert c.removed_by_fixes == 0.0 and c.removed_by_other == 0.0
    assert c.building_changes == ()


def test_sample_building_compared_with_itself_is_unchanged() -> None:
    root = Path(__file__).resolve().parents[1] / "sample_buildings"
    b = load_building(root / "block.json")
    c = compare_buildings(b, b, samples=200, seed=3)
    assert all(o.status == "unchanged" for o in c.openings)
    assert len(c.openings) == len(b.openings)
    assert c.risk_removed == 0.0


def test_a_renamed_opening_pairs_with_its_new_id() -> None:
    e, later = earlier_building(), later_building()
    renamed = dataclasses.replace(later, openings=tuple(
        dataclasses.replace(o, id="B-4a") if o.id == "B-4" else o for o in later.openings))
    c = compare_buildings(e, renamed, renamed={"B-4": "B-4a"}, samples=SAMPLES, seed=SEED)
    row = c.opening("B-4a")
    assert (row.status, row.earlier_id) == ("unchanged", "B-4")
    assert "B-4" not in {o.id for o in c.openings}
    with pytest.raises(ValueError, match="no earlier opening"):
        compare_buildings(e, renamed, renamed={"X": "B-4a"}, samples=SAMPLES, seed=SEED)


def test_different_samples_are_refused() -> None:
    e = earlier_building()
    with pytest.raises(ValueError, match="same samples and seed"):
        compare_assessments(assess(e, samples=100, seed=1), assess(e, samples=100, seed=2))


def test_an_opening_whose_surroundings_changed_is_changed() -> None:
    # a balcony added right below a window catches its falls: the window's own fields are the
    # same, its result is not
    e = earlier_building()
    below = Opening("B-0", floor=2, facade="S", kind=OpeningKind.BALCONY, x_m=7.5, width_m=2.0,
                    projection_m=1.5, cats_present=CatsPresent.YES)
    later = dataclasses.replace(e, openings=(*e.openings, below))
    c = compare_buildings(e, later, samples=SAMPLES, seed=SEED)
    assert c.opening("W-3").change_names == ("surroundings",)
    assert c.opening("B-0").status == "added"


def test_barrier_fields_are_the_fields_controls_fit() -> None:
    # the controls of the shipped catalogue change these fields (resources/controls.json)
    doc = json.loads((Path(__file__).resolve().parents[1] / "resources" / "controls.json")
                     .read_text(encoding="utf-8"))
    fitted = {k for c in doc["controls"] for k in c.get("effect", {})} - {"open_frequency"}
    assert fitted <= BARRIER_FIELDS
    assert "netting_mesh_mm" in BARRIER_FIELDS and "open_frequency" not in BARRIER_FIELDS


def test_only_barriers_changed_leaves_nothing_to_every_other_change() -> None:
    # the later tower differs from the earlier one only in its balconies' guards (barrier
    # fields): every other change is exactly 0, not the rounding of two large sums (the window
    # read "every other change added 3.18e-11")
    from petfall_audit.demo import sample_building
    from petfall_audit.model import OpeningKind
    from petfall_audit.present.comparison import summary_lines

    later = sample_building("tower")
    balconies = [o for o in later.openings if o.kind is OpeningKind.BALCONY][:15]
    worse = {o.id: dataclasses.replace(o, largest_gap_mm=130.0, climbable_infill=True)
             for o in balconies}
    earlier = dataclasses.replace(
        later, openings=tuple(worse.get(o.id, o) for o in later.openings))
    c = compare_buildings(earlier, later, samples=300, seed=SEED)
    assert c.removed_by_other == 0.0
    assert all(r.removed_by_other == 0.0 for r in c.openings)
    assert c.removed_by_fixes > 0
    assert c.removed_by_fixes == pytest.approx(c.risk_before - c.risk_after, rel=1e-12)
    text = " ".join(summary_lines(c))
    assert "every other change removed 0 (0%)" in text
    assert "e-" not in text  # no number in scientific notation


def _with_address(b: Building, address: str) -> Building:
    return dataclasses.replace(b, info=dataclasses.replace(b.info, address=address))


def _every_id_renumbered(b: Building) -> Building:
    return dataclasses.replace(b, openings=tuple(
        dataclasses.replace(o, id=f"N{i}") for i, o in enumerate(b.openings)))


def test_audits_sharing_no_opening_are_doubted_as_two_buildings() -> None:
    from petfall_audit.present.comparison import doubt_line, summary_lines

    e = earlier_building()
    other = _every_id_renumbered(later_building())
    c = compare_buildings(e, other, samples=SAMPLES, seed=SEED)
    assert c.doubts == ("no_common_openings",)
    line = doubt_line(c)
    assert "two different buildings" in line and "new or removed" in line
    assert line in summary_lines(c)
    # the same openings paired by their new ids: no doubt left
    pairs = {o.id: f"N{i}" for i, o in enumerate(e.openings) if i < 2}
    paired = compare_buildings(e, _every_id_renumbered(e), renamed=pairs, samples=SAMPLES,
                               seed=SEED)
    assert paired.doubts == () and doubt_line(paired) == ""
    assert not any("different buildings" in s for s in summary_lines(paired))


def test_a_different_address_is_doubted_but_not_its_spelling() -> None:
    from petfall_audit.present.comparison import doubt_line

    e = _with_address(earlier_building(), "12 Pelling Row, Marsh End")
    same = _with_address(e, "  12 pelling row  marsh end.")
    moved = _with_address(e, "14 Pelling Row,\nMarsh End")
    assert compare_buildings(e, same, samples=SAMPLES, seed=SEED).doubts == ()
    assert compare_buildings(e, _with_address(e, ""), samples=SAMPLES, seed=SEED).doubts == ()
    c = compare_buildings(e, moved, samples=SAMPLES, seed=SEED)
    assert c.doubts == ("different_address",)
    line = doubt_line(c)
    assert "“12 Pelling Row, Marsh End” and “14 Pelling Row, Marsh End”" in line
    assert "\n" not in line


def test_a_what_if_is_never_doubted() -> None:
    from petfall_audit.present.comparison import summary_lines

    e = _with_address(earlier_building(), "12 Pelling Row")
    c = compare_buildings(e, _with_address(_every_id_renumbered(e), "elsewhere"),
                          samples=SAMPLES, seed=SEED)
    assert len(c.doubts) == 2
    assert not any("different buildings" in s for s in summary_lines(c, what_if=True))
    assert any("different buildings" in s for s in summary_lines(c))


def test_audits_given_the_other_way_round_are_doubted(comparison) -> None:  # type: ignore[no-untyped-def]
    from petfall_audit.present.comparison import doubt_line

    assert comparison.doubts == ()  # 2025-05-02 then 2026-05-04: in order
    swapped = compare_buildings(later_building(), earlier_building(), samples=SAMPLES, seed=SEED)
    assert swapped.doubts == ("dates_reversed",)
    line = doubt_line(swapped)
    assert "dated 2026-05-04, after the later one (2025-05-02)" in line
    assert "other way round" in line and "different buildings" not in line
    undated = dataclasses.replace(later_building(), info=dataclasses.replace(
        later_building().info, audit_date=""))
    assert compare_buildings(undated, earlier_building(), samples=SAMPLES,
                             seed=SEED).doubts == ()


def test_a_rename_onto_an_id_that_still_pairs_is_refused() -> None:
    # W-3 renamed to B-2 while the earlier B-2 still pairs with the later B-2: one of the two
    # earlier openings would drop out of the comparison without a word
    e = earlier_building()
    later = dataclasses.replace(e, openings=tuple(o for o in e.openings if o.id != "W-3"))
    with pytest.raises(ValueError, match="two earlier openings .*W-3.* would pair with the "
                                         "later opening B-2"):
        compare_buildings(e, later, renamed={"W-3": "B-2"}, samples=SAMPLES, seed=SEED)
    with pytest.raises(ValueError, match="would pair with the later opening W-1"):
        compare_buildings(e, later, renamed={"B-4": "W-1", "W-3": "B-2", "B-2": "B-4"},
                          samples=SAMPLES, seed=SEED)
    # a swap of two ids pairs each with the other, every earlier opening accounted for
    c = compare_buildings(e, later, renamed={"B-2": "B-4", "B-4": "B-2"}, samples=SAMPLES,
                          seed=SEED)
    assert {o.earlier_id for o in c.openings} == {o.id for o in e.openings}


_IDS = ("B-2", "W-3", "W-1", "B-4", "Z-9")


@pytest.fixture(scope="module")
def two_assessments():  # type: ignore[no-untyped-def]
    e = earlier_building()
    later = dataclasses.replace(e, openings=tuple(o for o in e.openings if o.id != "W-3"))
    return assess(e, samples=200, seed=SEED), assess(later, samples=200, seed=SEED)


@settings(max_examples=60, deadline=None,
          suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(st.dictionaries(st.sampled_from(_IDS[:4]), st.sampled_from(_IDS), max_size=4))
def test_every_earlier_opening_is_accounted_for_once_or_the_rename_refused(
        two_assessments, renamed: dict[str, str]) -> None:  # type: ignore[no-untyped-def]
    a0, a1 = two_assessments
    try:
        c = compare_assessments(a0, a1, renamed=renamed)
    except ValueError:
        return  # refused in words (an unknown id, or two openings paired with one)
    earlier_ids = [o.earlier_id for o in c.openings if o.earlier_id is not None]
    assert sorted(earlier_ids) == sorted(o.id for o in a0.building.openings)
    later_ids = [o.id for o in c.openings if o.status != "removed"]
    assert sorted(later_ids) == sorted(o.id for o in a1.building.openings)


def _renumbered(b: Building, ids: dict[str, str], **changes: object) -> Building:
    return dataclasses.replace(b, openings=tuple(
        dataclasses.replace(o, id=ids[o.id], **changes) if o.id in ids else o
        for o in b.openings))


def test_openings_at_the_same_place_are_suggested_as_renumbered() -> None:
    from petfall_audit.compare import SAME_PLACE_M, renumbered_openings

    e = earlier_building()
    later = _renumbered(e, {"W-1": "W-1a", "B-4": "B-4a"})
    assert renumbered_openings(e, later) == {"W-1": "W-1a", "B-4": "B-4a"}
    c = compare_buildings(e, later, samples=SAMPLES, seed=SEED)
    assert c.renumbered == (("W-1", "W-1a"), ("B-4", "B-4a"))  # earlier building order
    # paired by the user: no longer suggested, and the pair compares unchanged
    paired = compare_buildings(e, later, renamed={"W-1": "W-1a"}, samples=SAMPLES, seed=SEED)
    assert paired.renumbered == (("B-4", "B-4a"),)
    assert paired.opening("W-1a").status == "unchanged"
    # not the same place: moved along the facade, another kind, another floor
    w1 = e.opening("W-1")
    moved = _renumbered(e, {"W-1": "W-1a"}, x_m=w1.x_m + 2 * SAME_PLACE_M)
    assert renumbered_openings(e, moved) == {}
    nudged = _renumbered(e, {"W-1": "W-1a"}, x_m=w1.x_m + SAME_PLACE_M / 2)
    assert renumbered_openings(e, nudged) == {"W-1": "W-1a"}
    other_kind = _renumbered(e, {"W-1": "W-1a"}, kind=OpeningKind.WINDOW_SLIDING)
    assert renumbered_openings(e, other_kind) == {}
    # two new openings at that place: which one is meant cannot be told, none is suggested
    twin = dataclasses.replace(later.opening("W-1a"), id="W-1b")
    twice = dataclasses.replace(later, openings=(*later.openings, twin))
    assert renumbered_openings(e, twice) == {"B-4": "B-4a"}


def _brute_renumbered(e: Building, la: Building) -> dict[str, str]:
    """The definition, pair by pair (no renames given): the reference for the indexed search."""
    later_ids = {o.id for o in la.openings}
    olds = [o for o in e.openings if o.id not in later_ids]
    earlier_ids = {o.id for o in e.openings}
    news = [o for o in la.openings if o.id not in earlier_ids]

    def same(a: Opening, b: Opening) -> bool:
        return ((a.floor, a.facade, a.kind) == (b.floor, b.facade, b.kind)
                and abs(a.x_m - b.x_m) <= 0.05 and abs(a.width_m - b.width_m) <= 0.05)

    out = {}
    for a in olds:
        m = [b for b in news if same(a, b)]
        if len(m) == 1 and sum(same(x, m[0]) for x in olds) == 1:
            out[a.id] = m[0].id
    return out


_places = st.tuples(st.integers(0, 2), st.sampled_from([0.0, 0.03, 0.06, 1.0, 1.04, 2.0]),
                   st.sampled_from([1.0, 1.04, 1.2]))


@settings(max_examples=80, deadline=None)
@given(st.lists(_places, max_size=8), st.lists(_places, max_size=8))
def test_renumbered_suggestions_follow_their_definition(old: list[tuple[int, float, float]],
                                                        new: list[tuple[int, float, float]]
                                                        ) -> None:
    from petfall_audit.compare import renumbered_openings

    def building(prefix: str, places: list[tuple[int, float, float]]) -> Building:
        b = earlier_building()
        return dataclasses.replace(b, openings=tuple(
            Opening(f"{prefix}{i}", floor=f, facade="S", kind=OpeningKind.WINDOW_CASEMENT,
                    x_m=x, width_m=w) for i, (f, x, w) in enumerate(places)))

    e, la = building("E", old), building("L", new)
    assert list(renumbered_openings(e, la).items()) == list(_brute_renumbered(e, la).items())


def test_another_name_is_doubted_and_a_share_of_no_risk_is_not_printed() -> None:
    from petfall_audit.present.comparison import doubt_line, summary_lines

    e = earlier_building()
    renamed = dataclasses.replace(e, info=dataclasses.replace(e.info, name="Gull Wharf"))
    respaced = dataclasses.replace(e, info=dataclasses.replace(
        e.info, name="  harbour view 3 (INVENTED)"))
    assert compare_buildings(e, respaced, samples=SAMPLES, seed=SEED).doubts == ()
    c = compare_buildings(e, renamed, samples=SAMPLES, seed=SEED)
    assert c.doubts == ("different_name",)
    assert "the names differ, “Harbour View 3 (invented)” and “Gull Wharf”" in doubt_line(c)
    # an earlier audit without risk (no openings yet): no "0% more" of nothing
    bare = dataclasses.replace(e, openings=())
    grown = compare_buildings(bare, e, samples=SAMPLES, seed=SEED)
    assert grown.share_removed is None
    text = " ".join(summary_lines(grown))
    assert "%" not in text, text
    assert "0 before" in text and "every other change added" in text
