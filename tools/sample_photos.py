"""Draw the illustrative "photos" of the sample building block.json.

They are plain schematic drawings (a balcony guard with its gaps labelled, a window with its
limiter), not photographs, so the sample shows how photos appear in the app and the PDF audit.

Run: ``python tools/sample_photos.py [OUTDIR]`` (default: ``sample_buildings/photos``).
"""

from __future__ import annotations

import sys
from pathlib import Path

from PIL import Image, ImageDraw, ImageFont

W, H = 640, 440
INK = (34, 34, 34)
MUTED = (110, 110, 110)
WALL = (222, 218, 208)
SKY = (236, 242, 246)
STEEL = (70, 78, 88)
MARK = (150, 60, 10)  # dimension lines
PLANT = (96, 128, 80)


def _font(size: int) -> ImageFont.FreeTypeFont | ImageFont.ImageFont:
    return ImageFont.load_default(size=size)


def _canvas(title: str) -> tuple[Image.Image, ImageDraw.ImageDraw]:
    im = Image.new("RGB", (W, H), SKY)
    d = ImageDraw.Draw(im)
    d.rectangle([0, H - 34, W, H], fill=(250, 250, 248))
    d.text((12, H - 27), title, font=_font(15), fill=INK)
    d.text((W - 12, H - 27), "schematic, not to scale", font=_font(13), fill=MUTED, anchor="ra")
    return im, d


def _label(d: ImageDraw.ImageDraw, xy: tuple[int, int], text: str, anchor: str = "la") -> None:
    """Text on a white patch, legible over a drawing."""
    font = _font(14)
    box = d.textbbox(xy, text, font=font, anchor=anchor)
    d.rectangle([box[0] - 3, box[1] - 2, box[2] + 3, box[3] + 2], fill=(255, 255, 255))
    d.text(xy, text, font=font, fill=INK, anchor=anchor)


def _dim_h(d: ImageDraw.ImageDraw, x0: int, x1: int, y: int, label: str) -> None:
    """A horizontal dimension line with ticks and a label above it."""
    d.line([x0, y, x1, y], fill=MARK, width=2)
    for x in (x0, x1):
        d.line([x, y - 6, x, y + 6], fill=MARK, width=2)
    d.text(((x0 + x1) // 2, y - 8), label, font=_font(15), fill=MARK, anchor="md")


def _dim_v(d: ImageDraw.ImageDraw, x: int, y0: int, y1: int, label: str) -> None:
    """A vertical dimension line with ticks and a label to its right."""
    d.line([x, y0, x, y1], fill=MARK, width=2)
    for y in (y0, y1):
        d.line([x - 6, y, x + 6, y], fill=MARK, width=2)
    d.text((x + 10, (y0 + y1) // 2), label, font=_font(15), fill=MARK, anchor="lm")


def balcony_guard(title: str, *, gap_label: str, bottom_label: str, rails: bool,
                  planter: bool) -> Image.Image:
    """Elevation of a balcony guard seen from the balcony: balusters (or horizontal rails),
    the widest gap, the gap under the guard and the rail top."""
    im, d = _canvas(title)
    floor_y, top_y, left, right = 330, 120, 40, 500
    d.rectangle([0, floor_y, W, floor_y + 40], fill=WALL, outline=INK)  # slab edge
    bottom = floor_y - 18
    d.rectangle([left, top_y, right, top_y + (16 if planter else 8)], fill=STEEL)  # rail top
    for x in (left, right):
        d.rectangle([x - 4, top_y, x + 4, floor_y], fill=STEEL)  # posts
    if rails:
        for y in range(top_y + 40, bottom - 24, 48):
            d.rectangle([left, y, right, y + 5], fill=STEEL)
        d.rectangle([left, bottom, right, bottom + 4], fill=STEEL)
        _dim_v(d, 300, top_y + 45 + 48, top_y + 40 + 2 * 48, gap_label)
        _label(d, (left + 10, top_y + 16), "horizontal rails: footholds for a cat")
    else:
        for x in range(left + 26, right, 26):
            d.rectangle([x - 3, top_y, x + 3, bottom], fill=STEEL)
        d.rectangle([left, bottom, right, bottom + 4], fill=STEEL)
        _dim_h(d, left + 26 * 12 + 3, left + 26 * 13 - 3, top_y - 12, gap_label)
    _dim_v(d, right + 22, bottom + 4, floor_y, bottom_label)
    _dim_v(d, right + 70, top_y, floor_y, "1.1 m")
    if planter:
        d.rectangle([230, 250, 330, floor_y], fill=(170, 120, 80), outline=INK)  # planter
        d.ellipse([222, 200, 338, 262], fill=PLANT, outline=INK)
        _label(d, (280, 192), "planter against the guard", "md")
        _label(d, (left + 8, top_y - 30), "flat rail top: a seat for a cat")
    return im


def balcony_plan(title: str) -> Image.Image:
    """Plan of a balcony: the facade, the slab standing out 1.6 m, the guard on three sides
    and the planter and chair next to the guard."""
    im, d = _canvas(title)
    d.rectangle([0, 20, W, 90], fill=WALL, outline=INK)  # the building
    d.text((W // 2, 55), "flat (door to the balcony)", font=_font(15), fill=INK, anchor="mm")
    x0, x1, y0, y1 = 120, 520, 90, 330
    d.rectangle([x0, y0, x1, y1], fill=(250, 250, 248), outline=INK)  # slab
    d.line([x0, y0, x0, y1, x1, y1, x1, y0], fill=STEEL, width=8)  # guard on three sides
    d.rectangle([300, y1 - 44, 400, y1 - 8], fill=(170, 120, 80), outline=INK)  # planter
    d.text((350, y1 - 52), "planter", font=_font(14), fill=INK, anchor="md")
    d.ellipse([x1 - 80, 180, x1 - 30, 230], outline=INK, width=3)  # a chair
    d.text((x1 - 90, 205), "chair", font=_font(14), fill=INK, anchor="rm")
    _dim_v(d, x1 + 30, y0, y1, "1.6 m")
    _dim_h(d, x0, x1, y1 + 40, "4.0 m")
    d.text((x0 + 10, y0 + 14), "guard 1.1 m high, balusters 90 mm apart", font=_font(14),
           fill=INK)
    return im


def hung_window(title: str) -> Image.Image:
    """A hung sash window from inside, the lower sash raised to its limiter stop."""
    im, d = _canvas(title)
    d.rectangle([0, 0, W, H - 34], fill=WALL)
    x0, x1, y0, y1 = 200, 440, 40, 360
    d.rectangle([x0, y0, x1, y1], fill=SKY, outline=INK, width=4)  # frame
    mid = (y0 + y1) // 2
    open_px = 34
    d.rectangle([x0 + 8, y0 + 8, x1 - 8, mid + 10], outline=STEEL, width=6)  # upper sash
    d.rectangle([x0 + 8, mid - 10 - open_px, x1 - 8, y1 - 8 - open_px], outline=STEEL,
                width=6)  # lower sash, raised to the stop
    d.rectangle([x0 + 5, y1 - 8 - open_px + 4, x1 - 5, y1 - 5], fill=(255, 255, 255))
    _label(d, ((x0 + x1) // 2, y1 - 8 - open_px // 2), "open", "mm")
    _dim_v(d, x1 + 24, y1 - 8 - open_px, y1 - 8, "limiter stop: 100 mm")
    d.rectangle([x0 - 20, y1, x1 + 20, y1 + 10], fill=(250, 250, 248), outline=INK)  # sill
    d.rectangle([x1 - 30, y1 - 8 - open_px - 22, x1 - 16, y1 - 8 - open_px], fill=MARK)
    _label(d, (x1 - 40, y1 - 8 - open_px - 12), "restrictor (limiter)", "rb")
    _dim_v(d, x0 - 60, y1 + 10, H - 40, "sill 1.0 m above floor")
    return im


def main(argv: list[str]) -> int:
    root = Path(__file__).resolve().parents[1]
    out = Path(argv[0]) if argv else root / "sample_buildings" / "photos"
    out.mkdir(parents=True, exist_ok=True)
    pictures = {
        "a11-balcony-guard.png": balcony_guard(
            "A11 balcony guard, seen from the balcony", gap_label="90 mm",
            bottom_label="40 mm", rails=False, planter=True),
        "a11-balcony-plan.png": balcony_plan("A11 balcony from above"),
        "c08-horizontal-rails.png": balcony_guard(
            "C08 balcony guard: horizontal rails", gap_label="120 mm", bottom_label="80 mm",
            rails=True, planter=False),
        "w08-k-limiter.png": hung_window("W08-K hung sash window with limiter"),
    }
    for name, im in pictures.items():
        path = out / name
        im.quantize(colors=32, dither=Image.Dither.NONE).save(path, optimize=True)
        print(f"wrote {path} ({path.stat().st_size // 1024} KB)")
    return 0


if __name__ == "__main__":
    raise SystemExit(main(sys.argv[1:]))
