"""Photos in the opening form, offscreen: adding copies outside photos beside the building file,
never over a different file; removing; both undoable; an unsaved building is saved first; a
missing photo shows a placeholder; double-click shows a photo larger."""

from __future__ import annotations

from pathlib import Path
from typing import Any

import pytest
from PIL import Image
from PySide6.QtCore import Qt

from petfall_audit.demo import sample_building
from petfall_audit.editing.document import Document
from petfall_audit.gui.dialogs import Prompts
from petfall_audit.gui.main_window import MainWindow
from petfall_audit.gui.widgets.photos import PhotoDialog, PhotoStrip
from petfall_audit.io.building_file import load_building, save_building

pytestmark = pytest.mark.gui

OPENING = "ST-0A"


class PhotoPrompts(Prompts):
    """Answers at once: the files to pick, whether to save first, where to save."""

    def __init__(self) -> None:
        self.pick: list[Path] = []
        self.save_first = True
        self.save_to: Path | None = None
        self.asked: list[str] = []
        self.errors: list[str] = []
        self.shown: list[tuple[Path, str]] = []

    def choose_photos(self, parent: Any, folder: Path | None) -> list[Path]:
        self.asked.append(f"choose in {folder}")
        return self.pick

    def ask_save_for_photos(self, parent: Any) -> bool:
        self.asked.append("save first?")
        return self.save_first

    def save_path(self, parent: Any, suggested: Path) -> Path | None:
        return self.save_to

    def ask_save_changes(self, parent: Any, name: str) -> str:
        return "discard"

    def show_error(self, parent: Any, title: str, text: str) -> None:
        self.errors.append(text)

    def show_photo(self, parent: Any, path: Path, caption: str) -> None:
        self.shown.append((path, caption))


def _photo(path: Path, colour: tuple[int, int, int] = (90, 120, 150)) -> Path:
    path.parent.mkdir(parents=True, exist_ok=True)
    Image.new("RGB", (64, 48), colour).save(path)
    return path


def _window(qtbot, path: Path | None) -> MainWindow:  # type: ignore[no-untyped-def]
    building = sample_building("walkup")
    if path is not None:
        path.parent.mkdir(parents=True, exist_ok=True)
        save_building(building, path)
    window = MainWindow(Document(building, path), prompts=PhotoPrompts(), samples=32,
                        refine_samples=0)
    qtbot.addWidget(window)
    window.openings_panel.select_ids([OPENING])
    return window


def _strip(window: MainWindow) -> PhotoStrip:
    return window.openings_panel.photos


def _photos(window: MainWindow) -> tuple[str, ...]:
    return window.document.building.opening(OPENING).photos


def test_add_copies_outside_photos_into_the_photos_folder_and_undo(qtbot, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    window = _window(qtbot, tmp_path / "site" / "walkup.json")
    strip = _strip(window)
    assert strip.opening_id == OPENING and strip.list.count() == 0
    camera = _photo(tmp_path / "camera" / "guard.png")
    window.prompts.pick = [camera]
    assert strip.add_photos() is None
    assert window.prompts.asked == [f"choose in {tmp_path / 'site'}"]  # saved: no question
    assert _photos(window) == ("photos/guard.png",)
    copied = tmp_path / "site" / "photos" / "guard.png"
    assert copied.read_bytes() == camera.read_bytes()
    assert strip.list.count() == 1 and strip.list.item(0).text() == "guard.png"
    assert window.history.undo_label == f"Add 1 photo to {OPENING}"
    window.undo()
    assert _photos(window) == () and strip.list.count() == 0
    window.redo()
    assert _photos(window) == ("photos/guard.png",) and strip.list.count() == 1
    # Saved and loaded again, the path is relative to the building file.
    assert window.session.save()
    assert load_building(tmp_path / "site" / "walkup.json").opening(OPENING).photos == (
        "photos/guard.png",)


def test_a_different_photo_of_the_same_name_is_never_overwritten(qtbot, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    window = _window(qtbot, tmp_path / "site" / "walkup.json")
    strip = _strip(window)
    first = _photo(tmp_path / "day1" / "guard.png", (10, 20, 30))
    second = _photo(tmp_path / "day2" / "guard.png", (200, 20, 30))
    assert strip.add_files([first]) is None
    assert strip.add_files([second]) is None
    assert _photos(window) == ("photos/guard.png", "photos/guard-2.png")
    site = tmp_path / "site"
    assert (site / "photos" / "guard.png").read_bytes() == first.read_bytes()
    assert (site / "photos" / "guard-2.png").read_bytes() == second.read_bytes()
    # The same photo again is not added twice; no third copy is made.
    assert strip.add_files([first]) is not None
    assert len(list((site / "photos").iterdir())) == 2 and len(_photos(window)) == 2


def test_a_photo_already_beside_the_building_is_stored_where_it_is(qtbot, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    window = _window(qtbot, tmp_path / "site" / "walkup.json")
    inside = _photo(tmp_path / "site" / "survey" / "2026" / "rail.png")
    assert _strip(window).add_files([inside]) is None
    assert _photos(window) == ("survey/2026/rail.png",)
    assert not (tmp_path / "site" / "photos").exists()


def test_only_jpeg_and_png_files_are_taken(qtbot, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    window = _window(qtbot, tmp_path / "site" / "walkup.json")
    strip = _strip(window)
    notes = tmp_path / "notes.txt"
    notes.write_text("not a photo")
    reason = strip.add_files([notes])
    assert reason is not None and "notes.txt" in reason and "not a photo" in reason
    assert _photos(window) == () and not window.history.can_undo
    assert "not a photo" in strip.message.text()


def test_remove_selected_photos_and_undo(qtbot, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    window = _window(qtbot, tmp_path / "site" / "walkup.json")
    strip = _strip(window)
    files = [_photo(tmp_path / "in" / f"{n}.png", (40 * k, 80, 90))
             for k, n in enumerate(("a", "b", "c"))]
    assert strip.add_files(files) is None
    assert not strip.remove_button.isEnabled()  # nothing selected yet
    strip.list.item(1).setSelected(True)
    assert strip.remove_button.isEnabled()
    qtbot.mouseClick(strip.remove_button, Qt.MouseButton.LeftButton)
    assert _photos(window) == ("photos/a.png", "photos/c.png")
    assert (tmp_path / "site" / "photos" / "b.png").is_file()  # removing keeps the file
    assert window.history.undo_label == f"Remove 1 photo from {OPENING}"
    window.undo()
    assert _photos(window) == ("photos/a.png", "photos/b.png", "photos/c.png")
    assert [strip.list.item(i).text() for i in range(3)] == ["a.png", "b.png", "c.png"]


def test_an_unsaved_building_is_saved_first(qtbot, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    window = _window(qtbot, None)
    strip = _strip(window)
    photo = _photo(tmp_path / "camera" / "sill.png")
    window.prompts.pick = [photo]
    window.prompts.save_first = False
    assert strip.add_photos() is not None  # declined: nothing happens
    assert window.prompts.asked == ["save first?"] and _photos(window) == ()
    assert "save the building first" in strip.message.text()
    window.prompts.save_first = True
    window.prompts.save_to = tmp_path / "new" / "building.json"
    (tmp_path / "new").mkdir()
    assert strip.add_photos() is None
    assert window.document.path == tmp_path / "new" / "building.json"
    assert (tmp_path / "new" / "photos" / "sill.png").is_file()
    assert _photos(window) == ("photos/sill.png",)


def test_a_missing_photo_shows_a_placeholder_and_says_so(qtbot, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    window = _window(qtbot, tmp_path / "site" / "walkup.json")
    strip = _strip(window)
    kept = _photo(tmp_path / "site" / "photos" / "kept.png")
    assert strip.add_files([kept]) is None
    from petfall_audit.editing.commands import SetOpeningFields

    window.push(SetOpeningFields([OPENING], {"photos": ("photos/kept.png", "photos/lost.jpg")}))
    assert strip.list.count() == 2
    assert strip.list.item(1).toolTip().startswith("photo not found: photos/lost.jpg")
    assert not strip.list.item(1).icon().isNull()  # the placeholder
    assert "photo not found: lost.jpg" in strip.message.text()
    strip.view(1)
    assert window.prompts.errors and "photo not found: photos/lost.jpg" in window.prompts.errors[0]
    assert window.prompts.shown == []


def test_double_click_shows_the_photo_larger(qtbot, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    window = _window(qtbot, tmp_path / "site" / "walkup.json")
    strip = _strip(window)
    assert strip.add_files([_photo(tmp_path / "elsewhere" / "front.png")]) is None
    item = strip.list.item(0)
    strip.list.itemDoubleClicked.emit(item)
    shown = tmp_path / "site" / "photos" / "front.png"
    assert window.prompts.shown == [(shown, "front.png")]
    dialog = PhotoDialog(shown, "front.png")
    qtbot.addWidget(dialog)
    assert dialog.image.pixmap().size().width() == 64  # small photos are shown at full size


def test_several_openings_selected_show_no_photos(qtbot, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    window = _window(qtbot, tmp_path / "site" / "walkup.json")
    ids = [o.id for o in window.document.building.openings[:2]]
    window.openings_panel.select_ids(ids)
    strip = _strip(window)
    assert strip.opening_id is None and not strip.add_button.isEnabled()
    assert "one opening at a time" in strip.message.text()
