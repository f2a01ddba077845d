"""Band colours shared by the window and the PDF, read from ``resources/palette.json``.

Each injury band (index into :data:`petfall_audit.injury.BANDS`, 0 = least severe) has a fill
colour, a text colour that reads on it and a text mark. Colours are ``#RRGGBB`` strings;
:func:`rgb` turns one into floats in 0..1 for reportlab.
"""

from __future__ import annotations

import json
from dataclasses import dataclass
from functools import lru_cache

from petfall_audit._resources import resource_path

__all__ = ["BandStyle", "DEFAULT_PALETTE", "palette_names", "palette_label", "band_styles",
           "band_style", "rgb"]

DEFAULT_PALETTE = "standard"


@dataclass(frozen=True, slots=True)
class BandStyle:
    """How one band looks: ``fill`` and ``text`` colours (``#RRGGBB``) and a text ``mark``."""

    fill: str
    text: str
    mark: str


@lru_cache(maxsize=1)
def _load() -> dict[str, object]:
    data: dict[str, object] = json.loads(resource_path("palette.json").read_text("utf-8"))
    return data


def _palettes() -> dict[str, dict[str, object]]:
    palettes = _load()["palettes"]
    assert isinstance(palettes, dict)
    return palettes


def palette_names() -> list[str]:
    """Names of the shipped palettes, the default first."""
    names = list(_palettes())
    names.sort(key=lambda n: n != DEFAULT_PALETTE)
    return names


def palette_label(name: str) -> str:
    """A palette's label for a settings menu."""
    return str(_palettes()[name].get("label", name))


def _style(entry: object) -> BandStyle:
    assert isinstance(entry, dict)
    return BandStyle(fill=str(entry["fill"]), text=str(entry["text"]), mark=str(entry["mark"]))


def band_styles(palette: str = DEFAULT_PALETTE) -> tuple[BandStyle, ...]:
    """Styles of every band, least severe first; an unknown palette name falls back to default."""
    pal = _palettes().get(palette) or _palettes()[DEFAULT_PALETTE]
    bands = pal["bands"]
    assert isinstance(bands, list)
    return tuple(_style(b) for b in bands)


def band_style(index: int | None, palette: str = DEFAULT_PALETTE) -> BandStyle:
    """Style of band ``index``; ``None`` or out of range gives the neutral "no result" style."""
    styles = band_styles(palette)
    if index is None or not 0 <= index < len(styles):
        pal = _palettes().get(palette) or _palettes()[DEFAULT_PALETTE]
        return _style(pal["none"])
    return styles[index]


def rgb(colour: str) -> tuple[float, float, float]:
    """``"#RRGGBB"`` as red, green, blue floats in 0..1."""
    text = colour.lstrip("#")
    if len(text) != 6:
        raise ValueError(f"colour must look like #RRGGBB, got {colour!r}")
    return (int(text[0:2], 16) / 255, int(text[2:4], 16) / 255, int(text[4:6], 16) / 255)
