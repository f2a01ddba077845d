"""Photos of the top openings in the PDF audit: printed on their detail pages, upright and scaled
down; a missing or unreadable one prints a note instead; the command line finds them beside the
building file."""

from __future__ import annotations

import dataclasses
import shutil
from pathlib import Path

import pytest
from PIL import Image
from pypdf import PdfReader

from petfall_audit._resources import sample_path
from petfall_audit.cli import main
from petfall_audit.demo import sample_building
from petfall_audit.model import Building
from petfall_audit.report import ReportOptions, write_audit
from petfall_audit.report.photos import PHOTO_HEIGHT_PT
from petfall_audit.risk import assess

SAMPLES = 64  # the layout does not depend on how many cats were simulated


def _detail_page(reader: PdfReader, opening_id: str) -> int:
    """Index of the first page of ``opening_id``'s detail section."""
    for i, page in enumerate(reader.pages):
        if f"{opening_id} — " in page.extract_text() and "Opening #" in page.extract_text():
            return i
    raise AssertionError(f"no detail page for {opening_id}")


def _with_photos(building: Building, photos: dict[str, tuple[str, ...]]) -> Building:
    return dataclasses.replace(building, openings=tuple(
        dataclasses.replace(o, photos=photos.get(o.id, o.photos)) for o in building.openings))


def _top_id(building: Building) -> str:
    return assess(building, samples=SAMPLES, seed=1).ranked("risk")[0].id


def _write(building: Building, out: Path, root: Path | None, top_n: int = 1) -> PdfReader:
    assessment = assess(building, samples=SAMPLES, seed=1)
    write_audit(assessment, None, out, top_n=top_n, options=ReportOptions(photo_root=root))
    return PdfReader(out)


def test_sample_photos_print_on_the_detail_pages(tmp_path: Path) -> None:
    building = sample_building("block")
    reader = _write(building, tmp_path / "audit.pdf", sample_path("block").parent, top_n=5)
    page = reader.pages[_detail_page(reader, "A11")]
    assert len(page.images) == 2  # A11 has two photos: both side by side
    text = page.extract_text()
    assert "a11-balcony-guard.png" in text and "a11-balcony-plan.png" in text
    assert "photo not found" not in "".join(p.extract_text() for p in reader.pages)
    w08 = reader.pages[_detail_page(reader, "W08-K")]
    assert len(w08.images) == 1 and "w08-k-limiter.png" in w08.extract_text()


def test_missing_and_unreadable_photos_print_a_note(tmp_path: Path) -> None:
    base = sample_building("walkup")
    top = _top_id(base)
    (tmp_path / "photos").mkdir()
    (tmp_path / "photos" / "broken.png").write_bytes(b"not an image at all")
    building = _with_photos(base, {top: ("photos/gone.jpg", "photos/broken.png")})
    reader = _write(building, tmp_path / "audit.pdf", tmp_path)
    page = reader.pages[_detail_page(reader, top)]
    text = page.extract_text()
    assert "photo not found: gone.jpg" in text
    assert "photo not found: broken.png" in text
    assert len(page.images) == 0


def test_without_the_building_folder_photos_are_listed_as_not_found(tmp_path: Path) -> None:
    base = sample_building("walkup")
    top = _top_id(base)
    building = _with_photos(base, {top: ("photos/front.jpg",)})
    reader = _write(building, tmp_path / "audit.pdf", None)
    assert "photo not found: front.jpg" in reader.pages[_detail_page(reader, top)].extract_text()


def test_two_photos_at_most_the_rest_are_named(tmp_path: Path) -> None:
    base = sample_building("walkup")
    top = _top_id(base)
    names = ("a.png", "b.png", "c.png")
    (tmp_path / "photos").mkdir()
    for k, name in enumerate(names):  # different pictures (the PDF stores equal ones once)
        Image.new("RGB", (40, 30), (60 * k, 90, 120)).save(tmp_path / "photos" / name)
    building = _with_photos(base, {top: tuple(f"photos/{n}" for n in names)})
    reader = _write(building, tmp_path / "audit.pdf", tmp_path)
    page = reader.pages[_detail_page(reader, top)]
    assert len(page.images) == 2
    assert "1 more photo of this opening" in page.extract_text()
    assert "c.png" in page.extract_text()


def test_a_phone_photo_prints_upright_and_scaled_down(tmp_path: Path) -> None:
    """A camera stores a portrait photo as landscape pixels plus an EXIF orientation tag
    (274 = 6: rotate 90° clockwise to view; EXIF 2.32, CIPA DC-008, tag Orientation)."""
    base = sample_building("walkup")
    top = _top_id(base)
    (tmp_path / "photos").mkdir()
    exif = Image.Exif()
    exif[274] = 6
    Image.new("RGB", (3000, 2000), (120, 140, 160)).save(
        tmp_path / "photos" / "phone.jpg", exif=exif.tobytes(), quality=80)
    building = _with_photos(base, {top: ("photos/phone.jpg",)})
    reader = _write(building, tmp_path / "audit.pdf", tmp_path)
    (image,) = reader.pages[_detail_page(reader, top)].images
    width_px, height_px = image.image.size
    assert height_px > width_px  # upright: portrait, as the camera meant it
    # Scaled to the printed size (55 mm high) at about 200 dpi, not the camera's 3000 px.
    assert height_px <= PHOTO_HEIGHT_PT / 72 * 200 + 1
    assert (tmp_path / "audit.pdf").stat().st_size < 400_000


def test_cli_report_reads_photos_beside_the_building_file(tmp_path: Path) -> None:
    folder = tmp_path / "site visit"
    shutil.copytree(sample_path("block").parent / "photos", folder / "photos")
    shutil.copy(sample_path("block"), folder / "block.json")
    out = tmp_path / "audit.pdf"
    assert main(["report", str(folder / "block.json"), "-o", str(out), "--samples",
                 str(SAMPLES), "--top", "5"]) == 0
    reader = PdfReader(out)
    assert len(reader.pages[_detail_page(reader, "A11")].images) == 2
    # Moved without its photos folder: the report still comes out, naming what is missing.
    shutil.rmtree(folder / "photos")
    assert main(["report", str(folder / "block.json"), "-o", str(out), "--samples",
                 str(SAMPLES), "--top", "5"]) == 0
    text = PdfReader(out).pages[_detail_page(PdfReader(out), "A11")].extract_text()
    assert "photo not found: a11-balcony-guard.png" in text


@pytest.mark.parametrize("stored", ["photos/x.png", "photos\\x.png"])
def test_stored_paths_with_either_slash_find_the_file(tmp_path: Path, stored: str) -> None:
    from petfall_audit.io.photos import photo_file

    assert photo_file(tmp_path, stored) == tmp_path / "photos" / "x.png"
    assert photo_file(None, stored) is None
