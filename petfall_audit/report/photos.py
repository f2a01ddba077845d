"""Photos of an opening on its detail page: up to two side by side, each scaled to a modest
height with its file name below; a photo that cannot be read prints a plain note instead.

Photos are read with Pillow (which reportlab itself needs), turned upright as the camera
recorded, and scaled down to what the page shows (about 200 dpi) before they go into the PDF,
so a phone's 12-megapixel photos neither slow the layout nor bloat the file.
"""

from __future__ import annotations

import io
import warnings
from collections.abc import Sequence
from pathlib import Path
from typing import TYPE_CHECKING

from reportlab.lib.units import mm
from reportlab.platypus import Flowable, Image, Paragraph, Table, TableStyle

from petfall_audit.io.photos import read_regular_file
from petfall_audit.report.context import PhotoRef
from petfall_audit.report.fonts import markup
from petfall_audit.report.styles import RULE, Styles

if TYPE_CHECKING:
    from PIL import Image as PILImage

__all__ = ["MAX_PHOTOS", "PHOTO_HEIGHT_PT", "build_photos", "photo_flowable", "not_found_text"]

#: Photos printed per opening; more are counted in a note.
MAX_PHOTOS = 2
#: Height of a printed photo (pt): 55 mm.
PHOTO_HEIGHT_PT = 55 * mm
#: Print resolution the photos are scaled down to (dots per inch).
_DPI = 200
_GAP_PT = 4 * mm


def not_found_text(name: str) -> str:
    """What is printed instead of a photo that is missing or cannot be read."""
    return f"photo not found: {name}"


def _load(path: Path, max_w_pt: float, max_h_pt: float) -> tuple[io.BytesIO, int, int] | None:
    """The photo at ``path`` upright and scaled to at most the box ``max_w_pt`` × ``max_h_pt``
    at :data:`_DPI`, encoded for the PDF, with its pixel size; ``None`` if it cannot be read."""
    from PIL import Image as PILImage
    from PIL import ImageOps, UnidentifiedImageError

    max_px = (max(int(max_w_pt / 72 * _DPI), 1), max(int(max_h_pt / 72 * _DPI), 1))
    try:
        with warnings.catch_warnings():  # a huge photo is fine: it is scaled down at once
            warnings.simplefilter("ignore", PILImage.DecompressionBombWarning)
            data = read_regular_file(path)  # never a pipe or device: no hang
            with PILImage.open(io.BytesIO(data)) as im:
                if im.format not in ("JPEG", "PNG", "MPO"):  # MPO: some cameras' JPEG
                    return None
                is_png = im.format == "PNG"
                if not is_png:
                    im.draft("RGB", max_px)  # decode a JPEG at a reduced scale: fast
                pic = ImageOps.exif_transpose(im)
                pic.thumbnail(max_px)
                if pic.mode not in ("RGB", "L") or not is_png:
                    pic = _flatten(pic)
                out = io.BytesIO()
                if is_png:
                    pic.save(out, format="PNG", optimize=False)
                else:
                    pic.save(out, format="JPEG", quality=85)
                out.seek(0)
                return out, pic.width, pic.height
    except (OSError, ValueError, SyntaxError, UnidentifiedImageError,
            PILImage.DecompressionBombError):
        return None


def _flatten(pic: PILImage.Image) -> PILImage.Image:
    """``pic`` as RGB, transparent parts on white."""
    from PIL import Image as PILImage

    if pic.mode in ("RGBA", "LA", "P", "PA"):
        rgba = pic.convert("RGBA")
        white = PILImage.new("RGB", rgba.size, "white")
        white.paste(rgba, mask=rgba.getchannel("A"))
        return white
    return pic.convert("RGB")


def photo_flowable(ref: PhotoRef, max_w_pt: float, max_h_pt: float, st: Styles) -> Flowable:
    """The photo of ``ref`` fitted into ``max_w_pt`` × ``max_h_pt`` (aspect kept), or the
    "photo not found" note."""
    loaded = _load(ref.path, max_w_pt, max_h_pt) if ref.path is not None else None
    if loaded is None:  # a framed note where the photo would be
        note = Table([[Paragraph(markup(not_found_text(ref.name)), st.small)]],
                     colWidths=[min(max_w_pt, 70 * mm)], rowHeights=[min(max_h_pt, 18 * mm)],
                     hAlign="LEFT")
        note.setStyle(TableStyle([("BOX", (0, 0), (-1, -1), 0.5, RULE),
                                  ("VALIGN", (0, 0), (-1, -1), "MIDDLE")]))
        return note
    data, w_px, h_px = loaded
    scale = min(max_w_pt / w_px, max_h_pt / h_px)
    return Image(data, width=w_px * scale, height=h_px * scale)


def build_photos(photos: Sequence[PhotoRef], st: Styles, width: float,
                 height_pt: float = PHOTO_HEIGHT_PT) -> list[Flowable]:
    """Up to :data:`MAX_PHOTOS` photos side by side across ``width`` (pt), each at most
    ``height_pt`` high with its file name as caption; nothing when there are none."""
    if not photos:
        return []
    shown = list(photos[:MAX_PHOTOS])
    cell_w = (width - _GAP_PT * (MAX_PHOTOS - 1)) / MAX_PHOTOS
    cells = [[photo_flowable(ref, cell_w, height_pt, st),
              Paragraph(markup(ref.name), st.caption)] for ref in shown]
    while len(cells) < MAX_PHOTOS:
        cells.append([])
    table = Table([cells], colWidths=[cell_w + (_GAP_PT if i else 0) for i in range(MAX_PHOTOS)],
                  hAlign="LEFT")
    table.setStyle(TableStyle([
        ("VALIGN", (0, 0), (-1, -1), "BOTTOM"),
        ("LEFTPADDING", (0, 0), (-1, -1), 0),
        ("LEFTPADDING", (1, 0), (-1, -1), _GAP_PT),
        ("RIGHTPADDING", (0, 0), (-1, -1), 0),
        ("TOPPADDING", (0, 0), (-1, -1), 0),
        ("BOTTOMPADDING", (0, 0), (-1, -1), 0),
    ]))
    out: list[Flowable] = [table]
    if len(photos) > len(shown):
        more = len(photos) - len(shown)
        out.append(Paragraph(markup(
            f"{more} more photo{'s' if more != 1 else ''} of this opening in the building "
            f"file's folder: {', '.join(p.name for p in photos[len(shown):])}."), st.small))
    return out

