"""Paragraph and table styles. Black and mid-grey text on white so a grey printout reads;
the leaflet uses large type (14 pt body)."""

from __future__ import annotations

from dataclasses import dataclass

from reportlab.lib import colors
from reportlab.lib.enums import TA_CENTER, TA_LEFT
from reportlab.lib.styles import ParagraphStyle

from petfall_audit.report.fonts import fonts

__all__ = ["Styles", "audit_styles", "leaflet_styles", "INK", "MUTED", "RULE", "HEADER_FILL",
           "TABLE_GRID", "HEADED_TABLE"]

INK = colors.HexColor("#111111")
MUTED = colors.HexColor("#4d4d4d")  # still legible as grey print (contrast about 8:1 on white)
RULE = colors.HexColor("#8c8c8c")
HEADER_FILL = colors.HexColor("#e3e3e3")
#: The lines and padding of every table of the audit (a reportlab TableStyle command list).
TABLE_GRID: list[tuple[object, ...]] = [
    ("GRID", (0, 0), (-1, -1), 0.3, RULE),
    ("VALIGN", (0, 0), (-1, -1), "TOP"),
    ("LEFTPADDING", (0, 0), (-1, -1), 3),
    ("RIGHTPADDING", (0, 0), (-1, -1), 3),
    ("TOPPADDING", (0, 0), (-1, -1), 2),
    ("BOTTOMPADDING", (0, 0), (-1, -1), 2),
]
#: :data:`TABLE_GRID` with the first row shaded as a header.
HEADED_TABLE: list[tuple[object, ...]] = [*TABLE_GRID, ("BACKGROUND", (0, 0), (-1, 0), HEADER_FILL)]


@dataclass(frozen=True, slots=True)
class Styles:
    """The paragraph styles one document uses."""

    title: ParagraphStyle
    subtitle: ParagraphStyle
    h1: ParagraphStyle
    h2: ParagraphStyle
    body: ParagraphStyle
    small: ParagraphStyle
    caption: ParagraphStyle
    cell: ParagraphStyle
    cell_bold: ParagraphStyle
    caution: ParagraphStyle
    bullet: ParagraphStyle


def _make(scale: float) -> Styles:
    f = fonts()

    def style(name: str, size: float, *, bold: bool = False, colour: colors.Color = INK,
              space_before: float = 0, space_after: float = 4, align: int = TA_LEFT,
              leading: float = 1.25, **kw: object) -> ParagraphStyle:
        return ParagraphStyle(
            name, fontName=f.bold if bold else f.regular, fontSize=size * scale,
            leading=size * scale * leading, textColor=colour, spaceBefore=space_before * scale,
            spaceAfter=space_after * scale, alignment=align, **kw,
        )

    return Styles(
        title=style("Title", 24, bold=True, space_after=10, leading=1.2),
        subtitle=style("Subtitle", 13, colour=MUTED, space_after=6),
        h1=style("H1", 16, bold=True, space_before=6, space_after=8, keepWithNext=1),
        h2=style("H2", 12, bold=True, space_before=8, space_after=4, keepWithNext=1),
        body=style("Body", 9.5, space_after=5),
        small=style("Small", 8, colour=MUTED, space_after=3),
        caption=style("Caption", 8, colour=MUTED, space_before=2, space_after=8),
        cell=style("Cell", 7.5, space_after=0, leading=1.15),
        cell_bold=style("CellBold", 7.5, bold=True, space_after=0, leading=1.15),
        caution=style("Caution", 9, space_after=4, leftIndent=10, borderPadding=0),
        bullet=style("Bullet", 9.5, space_after=3, leftIndent=12, bulletIndent=2),
    )


def audit_styles() -> Styles:
    """Styles of the audit report (A4, 9.5 pt body)."""
    return _make(1.0)


def leaflet_styles() -> Styles:
    """Large-type styles of the tenant leaflet (about 14 pt body)."""
    s = _make(1.5)
    return Styles(
        title=ParagraphStyle("LTitle", parent=s.title, fontSize=30, leading=35,
                             alignment=TA_CENTER),
        subtitle=ParagraphStyle("LSubtitle", parent=s.subtitle, alignment=TA_CENTER),
        h1=s.h1, h2=s.h2, body=s.body, small=s.small, caption=s.caption, cell=s.cell,
        cell_bold=s.cell_bold, caution=s.caution, bullet=s.bullet,
    )
