"""Photos of openings on disk: where a stored photo is, and how a chosen one joins the building.

A building file stores each photo as a path relative to the file's own folder, written with
forward slashes (``"photos/a11-guard.png"``), so the folder can be moved or shared as a whole.
Whether the file exists is not checked on loading; the app and the report say so where they
show it. No Qt here: the app and the report both use this module.
"""

from __future__ import annotations

import filecmp
import shutil
from pathlib import Path, PurePosixPath, PureWindowsPath

__all__ = ["PHOTO_SUFFIXES", "PHOTO_FOLDER", "photo_name", "photo_file", "import_photo"]

#: File name endings of the photos the app accepts (compared in lower case).
PHOTO_SUFFIXES: tuple[str, ...] = (".jpg", ".jpeg", ".png")

#: Folder beside the building file that receives photos chosen from elsewhere.
PHOTO_FOLDER = "photos"


def photo_name(stored: str) -> str:
    """The file name of a stored photo path (its last part, whichever slash it uses)."""
    return PureWindowsPath(stored).name or stored


def photo_file(root: Path | None, stored: str) -> Path | None:
    """The file of the photo stored as ``stored`` for a building file in folder ``root``;
    ``None`` when the folder is not known or the stored path is absolute."""
    if root is None or not stored:
        return None
    parts = PureWindowsPath(stored)  # reads both "/" and "\" as separators
    if parts.is_absolute() or parts.drive or stored.startswith(("/", "\\")):
        return None
    return Path(root, *parts.parts)


def _relative_to(path: Path, root: Path) -> str | None:
    try:
        return PurePosixPath(*path.relative_to(root).parts).as_posix()
    except ValueError:
        return None


def import_photo(source: str | Path, root: str | Path) -> str:
    """Make the photo file ``source`` part of the building whose file is in folder ``root`` and
    return the relative path to store in the opening.

    A photo already inside ``root`` (or below it) is stored as its path from there. A photo from
    elsewhere is copied into ``root/photos/`` (created if needed); an identical file already
    there is reused, and a different file of the same name is never overwritten: the copy takes
    the next free name (``guard-2.jpg``, ``guard-3.jpg``, …).

    Raises ``ValueError`` for a file that is not a JPEG or PNG by its name and ``OSError`` when
    it cannot be read or copied.
    """
    src = Path(source)
    if src.suffix.lower() not in PHOTO_SUFFIXES:
        raise ValueError(f"{src.name}: not a photo (only JPEG and PNG files: "
                         f"{', '.join(PHOTO_SUFFIXES)})")
    if not src.is_file():
        raise FileNotFoundError(f"{src.name}: file not found")
    folder = Path(root).resolve()
    inside = _relative_to(src.resolve(), folder)
    if inside is not None:
        return inside
    target_dir = folder / PHOTO_FOLDER
    target_dir.mkdir(parents=True, exist_ok=True)
    stem, suffix = src.stem, src.suffix
    for n in range(1, 10_000):
        target = target_dir / (f"{stem}{suffix}" if n == 1 else f"{stem}-{n}{suffix}")
        if target.exists():
            if target.is_file() and filecmp.cmp(src, target, shallow=False):
                break  # the same photo was added before: share it
            continue
        with src.open("rb") as fin:
            try:
                fout = target.open("xb")  # "x": never overwrite a file
            except FileExistsError:  # appeared in between: try the next name
                continue
            try:
                with fout:
                    shutil.copyfileobj(fin, fout)
            except OSError:
                target.unlink(missing_ok=True)
                raise
        break
    else:  # pragma: no cover - ten thousand photos of the same name
        raise OSError(f"{src.name}: no free name left in {PHOTO_FOLDER}/")
    return f"{PHOTO_FOLDER}/{target.name}"
