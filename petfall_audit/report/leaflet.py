"""The tenant leaflet: one or two pages of plain language in large type (:func:`write_leaflet`)."""

from __future__ import annotations

from pathlib import Path
from typing import TYPE_CHECKING, BinaryIO

from reportlab.lib.units import mm
from reportlab.platypus import Flowable, KeepTogether, Paragraph, Spacer, Table, TableStyle

from petfall_audit.cautions import CAUTIONS_SHORT
from petfall_audit.report.context import ContactBlock, LeafletContext, build_leaflet_context
from petfall_audit.report.fonts import markup
from petfall_audit.report.styles import HEADER_FILL, INK, Styles, leaflet_styles
from petfall_audit.report.template import AuditDocTemplate, write_pdf_atomic

if TYPE_CHECKING:
    from petfall_audit.plan import Plan
    from petfall_audit.risk import Assessment

__all__ = ["write_leaflet", "CHECKS", "AFTER_A_FALL"]

CHECKS: tuple[str, ...] = (
    "Open windows only if a cat-proof screen or a limiter keeps the gap too small for a cat's "
    "head. Child window guards are not enough: a cat fits through much smaller gaps. On a "
    "window you may need to escape through, use only a screen or limiter you can open by hand, "
    "without a key or tool.",
    "Never leave a tilt-and-turn window tilted while your cat is alone: cats get stuck in the gap.",
    "On a balcony, a cat net with a small mesh (3 cm or less) gives good protection. Keep "
    "it tight and check it often: cats climb and bite nets. Ask first: see below.",
    "Move chairs, planters and bins away from the balcony rail, so your cat cannot climb up.",
    "Do not leave your cat alone on a balcony. Young cats and cats that chase birds are most at "
    "risk, especially on warm evenings and at night.",
)

AFTER_A_FALL: tuple[str, ...] = (
    "Take your cat to a veterinarian at once, even if it seems fine. Injuries to the chest and "
    "inside the body are common and often do not show at first.",
    "Move the cat gently, in a box or on a towel, and keep it warm and quiet.",
)


def _p(text: str, style: object) -> Paragraph:
    return Paragraph(markup(text), style)


def _bullets(items: tuple[str, ...], st: Styles) -> list[Flowable]:
    return [Paragraph(markup(i), st.bullet, bulletText="•") for i in items]


def leaflet_story(ctx: LeafletContext, st: Styles, width: float) -> list[Flowable]:
    """The leaflet's flowables."""
    story: list[Flowable] = [_p("Keep your cat safe at home", st.title),
                             _p(ctx.building_name, st.subtitle)]
    if ctx.address:
        story.append(_p(ctx.address, st.subtitle))
    story += [
        Spacer(1, 4 * mm),
        _p("Why cats fall, even from high floors", st.h1), _p(ctx.high_floor_text, st.body),
        _p("What to check at home", st.h1), *_bullets(CHECKS, st),
        _p("What the building is doing", st.h1), *_bullets(ctx.building_actions, st),
        _p("Never block an escape window. Nets, locks and limiters must not stop anyone from "
           "getting out in a fire.", st.body),
    ]
    box = Table([[[_p("If your cat falls", st.h1), *_bullets(AFTER_A_FALL, st)]]],
                colWidths=[width])
    box.setStyle(TableStyle([("BOX", (0, 0), (-1, -1), 2, INK),
                             ("BACKGROUND", (0, 0), (-1, -1), HEADER_FILL),
                             ("LEFTPADDING", (0, 0), (-1, -1), 8),
                             ("RIGHTPADDING", (0, 0), (-1, -1), 8)]))
    story += [Spacer(1, 3 * mm), box, Spacer(1, 3 * mm)]
    if ctx.contact:
        story.append(KeepTogether([_p("Questions? Contact", st.h1),
                                   _p("\n".join(ctx.contact), st.body)]))
    story.append(_p(f"{CAUTIONS_SHORT} Issued {ctx.date}.", st.small))
    return story


def write_leaflet(assessment: Assessment, plan: Plan | None, path: str | Path, *,
                  contact: ContactBlock | None = None, date: str = "") -> Path:
    """Write the tenant leaflet PDF to ``path`` and return it."""
    ctx = build_leaflet_context(assessment, plan, contact=contact or ContactBlock(), date=date)

    def make_doc(out: BinaryIO) -> AuditDocTemplate:
        return AuditDocTemplate(out, header=markup(ctx.building_name),
                                footer=markup("Information for residents. " + CAUTIONS_SHORT),
                                title=f"Cat safety: {ctx.building_name}", subject="Tenant leaflet")

    return write_pdf_atomic(path, make_doc,
                            lambda doc: leaflet_story(ctx, leaflet_styles(), doc.width))
