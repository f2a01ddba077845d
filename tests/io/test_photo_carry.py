"""Photos go with a building file saved into another folder (petfall_audit.io.photos.carry_photos,
the app's Save As, and the command line's writes to another folder)."""

from __future__ import annotations

import dataclasses
from pathlib import Path

import pytest

from petfall_audit.cli import main
from petfall_audit.io.building_file import load_building, save_building
from petfall_audit.io.photos import carry_photos
from petfall_audit.model import Building, Opening, OpeningKind
from tests.test_compare import earlier_building

PNG = b"\x89PNG\r\n\x1a\n" + b"a guard, photographed"


def _with_photos(*photos: str) -> Building:
    b = earlier_building()
    first = dataclasses.replace(b.openings[0], photos=tuple(photos))
    return dataclasses.replace(b, openings=(first, *b.openings[1:]))


@pytest.fixture()
def old_root(tmp_path: Path) -> Path:
    root = tmp_path / "2025"
    (root / "photos").mkdir(parents=True)
    (root / "photos" / "b2.png").write_bytes(PNG)
    return root


def test_photos_are_copied_to_the_same_place_in_the_new_folder(old_root: Path,
                                                               tmp_path: Path) -> None:
    b = _with_photos("photos/b2.png", "photos/gone.png")
    new_root = tmp_path / "2026"
    new_root.mkdir()
    carried, missing = carry_photos(b, old_root, new_root)
    assert carried is b  # the same paths: nothing in the building changed
    assert missing == ("photos/gone.png",)
    assert (new_root / "photos" / "b2.png").read_bytes() == PNG
    assert carry_photos(b, old_root, old_root) == (b, ())  # the same folder: nothing to do


def test_a_different_photo_of_that_name_is_never_overwritten(old_root: Path,
                                                             tmp_path: Path) -> None:
    b = _with_photos("photos/b2.png")
    new_root = tmp_path / "2026"
    (new_root / "photos").mkdir(parents=True)
    (new_root / "photos" / "b2.png").write_bytes(b"another building's photo")
    carried, missing = carry_photos(b, old_root, new_root)
    assert missing == ()
    assert (new_root / "photos" / "b2.png").read_bytes() == b"another building's photo"
    stored = carried.openings[0].photos
    assert stored == ("photos/b2-2.png",)
    assert (new_root / "photos" / "b2-2.png").read_bytes() == PNG
    # an identical photo already there is shared, not copied again
    again, _ = carry_photos(b, old_root, new_root)
    assert again.openings[0].photos == ("photos/b2-2.png",)
    assert sorted(p.name for p in (new_root / "photos").iterdir()) == ["b2-2.png", "b2.png"]


def test_save_as_into_another_folder_takes_the_photos(old_root: Path, tmp_path: Path) -> None:
    from tests.editing.test_session import session_on

    path = old_root / "court.json"
    save_building(_with_photos("photos/b2.png"), path)
    session, user, statuses = session_on(load_building(path), path)
    new_root = tmp_path / "2026"
    new_root.mkdir()
    assert session.save_as(new_root / "court.json")
    assert (new_root / "photos" / "b2.png").read_bytes() == PNG
    assert load_building(new_root / "court.json").openings[0].photos == ("photos/b2.png",)
    assert user.errors == []


def test_the_next_audit_in_a_new_folder_takes_the_photos(old_root: Path, tmp_path: Path,
                                                          capsys: pytest.CaptureFixture[str]
                                                          ) -> None:
    path = old_root / "court.json"
    save_building(_with_photos("photos/b2.png", "photos/gone.png"), path)
    nxt = tmp_path / "2026" / "court.json"
    nxt.parent.mkdir()
    assert main(["fixes", str(path), "--apply-fitted", "-o", str(nxt)]) == 0
    assert (nxt.parent / "photos" / "b2.png").read_bytes() == PNG
    assert "photo 'photos/gone.png' not found, so not copied" in capsys.readouterr().err
    assert load_building(nxt).openings[0].photos == ("photos/b2.png", "photos/gone.png")


def test_a_building_without_photos_is_returned_as_it_is(tmp_path: Path) -> None:
    b = dataclasses.replace(earlier_building(), openings=(
        Opening("W-9", floor=1, facade="S", kind=OpeningKind.WINDOW_CASEMENT, x_m=1.0,
                width_m=1.0),))
    assert carry_photos(b, tmp_path, tmp_path / "elsewhere") == (b, ())


def test_save_as_renames_a_clashing_photo_in_one_undoable_step(old_root: Path,
                                                               tmp_path: Path) -> None:
    from tests.editing.test_session import session_on

    path = old_root / "court.json"
    save_building(_with_photos("photos/b2.png"), path)
    session, _user, _ = session_on(load_building(path), path)
    new_root = tmp_path / "2026"
    (new_root / "photos").mkdir(parents=True)
    (new_root / "photos" / "b2.png").write_bytes(b"another building's photo")
    assert session.save_as(new_root / "court.json")
    assert session.document.building.openings[0].photos == ("photos/b2-2.png",)
    assert load_building(new_root / "court.json").openings[0].photos == ("photos/b2-2.png",)
    assert (new_root / "photos" / "b2.png").read_bytes() == b"another building's photo"
    history = session.workspace.history
    assert history.can_undo
    history.undo()
    assert session.document.building.openings[0].photos == ("photos/b2.png",)
