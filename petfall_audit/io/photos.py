"""Photos of openings on disk: where a stored photo is, and how a chosen one joins the building.

A building file stores each photo as a path relative to the file's own folder, written with
forward slashes (``"photos/a11-guard.png"``), so the folder can be moved or shared as a whole.
Whether the file exists is not checked on loading; the app and the report say so where they
show it. A photo is only ever read from inside that folder, after every link is followed, and
only if it is a regular file (:func:`photo_problem`, :func:`read_photo`). No Qt here: the app
and the report both use this module.
"""

from __future__ import annotations

import errno
import filecmp
import os
import shutil
import stat
from pathlib import Path, PurePosixPath, PureWindowsPath
from typing import TYPE_CHECKING

from petfall_audit.errors import Place, Problem

if TYPE_CHECKING:
    from petfall_audit.model import Building

__all__ = ["PHOTO_SUFFIXES", "PHOTO_FOLDER", "MAX_PHOTO_BYTES", "photo_name", "photo_file",
           "photo_problem", "read_photo", "read_regular_file", "import_photo",
           "missing_photo_warnings", "carry_photos"]

#: File name endings of the photos the app accepts (compared in lower case).
PHOTO_SUFFIXES: tuple[str, ...] = (".jpg", ".jpeg", ".png")

#: Folder beside the building file that receives photos chosen from elsewhere.
PHOTO_FOLDER = "photos"

#: Largest photo file read (bytes): 64 MiB, well above a phone camera's largest JPEG.
MAX_PHOTO_BYTES = 64 * 2**20


def photo_name(stored: str) -> str:
    """The file name of a stored photo path (its last part, whichever slash it uses)."""
    return PureWindowsPath(stored).name or stored


def _parts(stored: str) -> tuple[str, ...] | None:
    """The parts of a stored relative path (either slash); ``None`` if it is absolute, has a
    drive, a NUL or a ``..`` part, or is empty."""
    if not stored or "\0" in stored or stored.startswith(("/", "\\")):
        return None
    parts = PureWindowsPath(stored)  # reads both "/" and "\" as separators
    if parts.is_absolute() or parts.drive or parts.root:
        return None
    names = tuple(p for p in parts.parts if p not in ("", "."))
    if not names or ".." in names:
        return None
    return names


def photo_problem(root: Path | None, stored: str) -> str | None:
    """Why the photo stored as ``stored`` may not be read for a building file in folder
    ``root``, in plain words; ``None`` when it may (a photo that does not exist yet may: it is
    reported as not found where it is shown).

    A photo must stay inside the building file's folder after every link is followed and be a
    regular file: ``..`` parts, absolute paths, links that lead out of the folder, folders,
    pipes and devices are refused."""
    names = _parts(stored)
    if names is None:
        return "expected a path inside the building file's folder, without '..' parts"
    if root is None:
        return None
    base = Path(root).resolve()
    try:
        real = Path(base, *names).resolve()
    except (OSError, RuntimeError):  # a loop of links
        return "the path is a loop of links"
    if real != base and base not in real.parents:
        return "the path leads out of the building file's folder (through a link)"
    try:
        st = real.stat()
    except FileNotFoundError:
        return None
    except OSError as exc:
        return f"cannot be read ({exc.strerror or exc})"
    if not stat.S_ISREG(st.st_mode):
        return "not a regular file (a folder, pipe or device)"
    return None


def photo_file(root: Path | None, stored: str) -> Path | None:
    """The file of the photo stored as ``stored`` for a building file in folder ``root``, with
    every link followed; ``None`` when the folder is not known or :func:`photo_problem` refuses
    the path (outside the folder, not a regular file). The file may not exist."""
    if root is None or photo_problem(root, stored) is not None:
        return None
    names = _parts(stored)
    assert names is not None  # checked by photo_problem
    return Path(Path(root).resolve(), *names).resolve()


def missing_photo_warnings(building: Building, root: Path) -> list[Problem]:
    """One located warning (``openings[3].photos[0]``) per photo that the building file in
    folder ``root`` names but that is not there, so it is found before the PDF audit prints
    "photo not found" in its place. Paths the file may not use are errors of loading, not
    warnings here."""
    out: list[Problem] = []
    for i, opening in enumerate(building.openings):
        for j, stored in enumerate(opening.photos):
            path = photo_file(root, stored)
            if path is not None and not path.exists():
                out.append(Problem(
                    Place("openings", i, f"photos[{j}]"),
                    f"{opening.id!r}: photo {stored!r} is not in the building file's folder; "
                    "the PDF audit prints 'photo not found' in its place",
                    severity="warning"))
    return out


def read_photo(root: Path | None, stored: str, *, max_bytes: int = MAX_PHOTO_BYTES) -> bytes:
    """The bytes of the photo stored as ``stored`` for a building file in folder ``root``.

    The file is opened without blocking and checked to be a regular file on the open handle,
    so a pipe or device swapped in never hangs the caller. Raises ``OSError`` with a plain
    message when the photo is refused (see :func:`photo_problem`), missing, larger than
    ``max_bytes`` or unreadable."""
    problem = photo_problem(root, stored)
    path = photo_file(root, stored)
    if problem is not None or path is None:
        raise OSError(errno.EACCES, problem or "the building file's folder is not known", stored)
    return read_regular_file(path, max_bytes=max_bytes)


def read_regular_file(path: Path, *, max_bytes: int = MAX_PHOTO_BYTES) -> bytes:
    """The bytes of ``path`` if it is a regular file of at most ``max_bytes``; opened without
    blocking and checked on the open handle, so a pipe or device never hangs the caller.
    Raises ``OSError`` otherwise."""
    flags = os.O_RDONLY | getattr(os, "O_NONBLOCK", 0) | getattr(os, "O_BINARY", 0)
    fd = os.open(path, flags)
    try:
        st = os.fstat(fd)
        if not stat.S_ISREG(st.st_mode):
            raise OSError(errno.EACCES, "not a regular file (a folder, pipe or device)",
                          str(path))
        if st.st_size > max_bytes:
            raise OSError(errno.EFBIG, f"larger than {max_bytes // 2**20} MiB", str(path))
        with os.fdopen(fd, "rb", closefd=False) as fh:
            data = fh.read(max_bytes + 1)
    finally:
        os.close(fd)
    if len(data) > max_bytes:
        raise OSError(errno.EFBIG, f"larger than {max_bytes // 2**20} MiB", str(path))
    return data


def _copy_new(src: Path, target: Path) -> bool:
    """Copy ``src`` to ``target`` if no file is there (never overwrites); True if copied."""
    target.parent.mkdir(parents=True, exist_ok=True)
    with src.open("rb") as fin:
        try:
            fout = target.open("xb")  # "x": never overwrite a file
        except FileExistsError:
            return False
        try:
            with fout:
                shutil.copyfileobj(fin, fout)
        except OSError:
            target.unlink(missing_ok=True)
            raise
    return True


def _carry_one(src: Path, new_root: Path, stored: str) -> str:
    """Photo file ``src`` (stored as ``stored``) placed for a building file in ``new_root``:
    at the same relative path when that is free or holds the same photo, else as
    :func:`import_photo` places it. The path to store."""
    names = _parts(stored)
    if names is not None and photo_problem(new_root, stored) is None:
        target = Path(new_root, *names)
        if _copy_new(src, target) or (target.is_file()
                                      and filecmp.cmp(src, target, shallow=False)):
            return "/".join(names)
    return import_photo(src, new_root)


def carry_photos(building: Building, old_root: Path, new_root: Path
                 ) -> tuple[Building, tuple[str, ...]]:
    """``building``, whose file was in folder ``old_root``, saved into folder ``new_root`` with
    its photos: each photo found under ``old_root`` is copied to the same relative path under
    ``new_root`` (an identical file there is kept; a different one is never overwritten: the
    copy then takes a free name in ``photos/``, as :func:`import_photo` does) and its stored
    path follows. Returns the building (the same object when no path changed) and the stored
    paths of the photos that were not found (left as they are). ``OSError`` when a photo
    cannot be copied."""
    from dataclasses import replace

    from petfall_audit.io.atomic import same_file

    if same_file(old_root, new_root):
        return building, ()
    missing: list[str] = []
    openings = []
    for opening in building.openings:
        photos = []
        for stored in opening.photos:
            src = photo_file(old_root, stored)
            if src is None or not src.is_file():
                missing.append(stored)
                photos.append(stored)
            else:
                photos.append(_carry_one(src, new_root, stored))
        moved = tuple(photos) != tuple(opening.photos)
        openings.append(replace(opening, photos=tuple(photos)) if moved else opening)
    if all(a is b for a, b in zip(openings, building.openings, strict=True)):
        return building, tuple(missing)
    return replace(building, openings=tuple(openings)), tuple(missing)


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
        if _copy_new(src, target):
            break
        # a file of that name appeared in between: try the next name
    else:  # pragma: no cover - ten thousand photos of the same name
        raise OSError(f"{src.name}: no free name left in {PHOTO_FOLDER}/")
    return f"{PHOTO_FOLDER}/{target.name}"
