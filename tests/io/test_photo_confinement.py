"""Photos are read only from inside the building file's folder, after following links, and only
from regular files: the rest is refused as a located problem, and a pipe never hangs a report
(OWASP "Path Traversal"; POSIX open(2) with O_NONBLOCK does not wait for a FIFO's writer)."""

from __future__ import annotations

import dataclasses
import os
import threading
from pathlib import Path

import pytest
from PIL import Image
from pypdf import PdfReader

from petfall_audit.demo import sample_building
from petfall_audit.errors import ValidationFailed
from petfall_audit.io.building_file import load_building, save_building
from petfall_audit.io.photos import photo_file, photo_problem, read_photo, read_regular_file
from petfall_audit.model import Building
from petfall_audit.report import ReportOptions, write_audit
from petfall_audit.risk import assess

needs_fifo = pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="no FIFOs on this platform")


def _layout(tmp_path: Path) -> tuple[Path, Path]:
    """``tmp_path/site/`` holds the building; ``tmp_path/secret.png`` is outside it."""
    site = tmp_path / "site"
    (site / "photos").mkdir(parents=True)
    secret = tmp_path / "secret.png"
    Image.new("RGB", (40, 30), (200, 10, 10)).save(secret)
    return site, secret


def _with_photo(photo: str) -> Building:
    b = sample_building("walkup")
    ops = list(b.openings)
    ops[0] = dataclasses.replace(ops[0], photos=(photo,))
    return dataclasses.replace(b, openings=tuple(ops))


@pytest.mark.parametrize("photo", ["../secret.png", "photos/../../secret.png",
                                   "..\\secret.png", "photos\\..\\..\\secret.png",
                                   "/etc/passwd", "\\\\server\\share\\x.png", "C:x.png"])
def test_paths_out_of_the_folder_are_refused_at_load_with_their_place(
        tmp_path: Path, photo: str) -> None:
    site, _ = _layout(tmp_path)
    save_building(_with_photo(photo), site / "b.json")
    with pytest.raises(ValidationFailed) as err:
        load_building(site / "b.json")
    assert [p.where for p in err.value.problems] == ["openings[0].photos[0]"]
    assert photo_file(site, photo) is None


def test_a_link_leading_out_of_the_folder_is_refused_and_never_embedded(tmp_path: Path) -> None:
    site, secret = _layout(tmp_path)
    (site / "photos" / "link.png").symlink_to(secret)
    save_building(_with_photo("photos/link.png"), site / "b.json")
    with pytest.raises(ValidationFailed) as err:
        load_building(site / "b.json")
    (problem,) = err.value.problems
    assert problem.where == "openings[0].photos[0]" and "out of the building" in problem.message
    assert photo_file(site, "photos/link.png") is None
    with pytest.raises(OSError):
        read_photo(site, "photos/link.png")
    # The report, given such a building directly, prints a note instead of the outside image.
    b = _with_photo("photos/link.png")
    out = tmp_path / "a.pdf"
    write_audit(assess(b, samples=16, seed=1), None, out, top_n=len(b.openings),
                options=ReportOptions(photo_root=site))
    assert not any(page.images for page in PdfReader(out).pages)


def test_a_link_inside_the_folder_is_followed(tmp_path: Path) -> None:
    site, _ = _layout(tmp_path)
    Image.new("RGB", (40, 30)).save(site / "photos" / "real.png")
    (site / "photos" / "alias.png").symlink_to(site / "photos" / "real.png")
    save_building(_with_photo("photos/alias.png"), site / "b.json")
    assert load_building(site / "b.json").openings[0].photos == ("photos/alias.png",)
    assert photo_file(site, "photos/alias.png") == (site / "photos" / "real.png").resolve()
    assert read_photo(site, "photos/alias.png")[:4] == b"\x89PNG"


def test_a_folder_named_like_a_photo_is_refused(tmp_path: Path) -> None:
    site, _ = _layout(tmp_path)
    (site / "photos" / "dir.png").mkdir()
    assert photo_problem(site, "photos/dir.png") is not None
    save_building(_with_photo("photos/dir.png"), site / "b.json")
    with pytest.raises(ValidationFailed):
        load_building(site / "b.json")


def test_a_missing_photo_still_loads(tmp_path: Path) -> None:
    site, _ = _layout(tmp_path)
    save_building(_with_photo("photos/later.png"), site / "b.json")
    assert load_building(site / "b.json").openings[0].photos == ("photos/later.png",)


@needs_fifo
def test_a_fifo_is_refused_at_load_and_never_hangs_a_report(tmp_path: Path) -> None:
    site, _ = _layout(tmp_path)
    fifo = site / "photos" / "fifo.png"
    os.mkfifo(fifo)
    save_building(_with_photo("photos/fifo.png"), site / "b.json")
    with pytest.raises(ValidationFailed) as err:
        load_building(site / "b.json")
    assert "not a regular file" in err.value.problems[0].message
    with pytest.raises(OSError):
        read_regular_file(fifo)  # opened without waiting for a writer
    b = _with_photo("photos/fifo.png")
    assessment = assess(b, samples=16, seed=1)
    done: list[bool] = []

    def run() -> None:
        write_audit(assessment, None, tmp_path / "a.pdf", top_n=len(b.openings),
                    options=ReportOptions(photo_root=site))
        done.append(True)

    worker = threading.Thread(target=run, daemon=True)
    worker.start()
    worker.join(120)
    if worker.is_alive():  # release the hung reader so the test run can end
        fd = os.open(fifo, os.O_WRONLY | os.O_NONBLOCK)
        os.close(fd)
    assert done == [True], "the report hung on a FIFO"
