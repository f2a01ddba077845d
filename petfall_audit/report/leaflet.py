"""The tenant leaflet: one or two pages of plain language in large type (:func:`write_leaflet`)."""

from __future__ import annotations

from pathlib import Path
from typing import TYPE_CHECKING, BinaryIO

from reportlab.lib.units import mm
from reportlab.platypus import Flowable, KeepTogether, Paragraph, Spacer, Table, TableStyle

from petfall_audit.cautions import CAUTIONS_SHORT
from petfall_audit.report.context import ContactBlock, LeafletContext, build_leaflet_context
from petfall_audit.report.fonts import markup
from petfall_audit.report.leaflet_sections import (
    AFTER_A_FALL,
    CHECKS,
    LeafletChoice,
    LeafletSection,
)
from petfall_audit.report.styles import HEADER_FILL, INK, Styles, leaflet_styles
from petfall_audit.report.template import AuditDocTemplate, write_pdf_atomic

if TYPE_CHECKING:
    from petfall_audit.plan import Plan
    from petfall_audit.risk import Assessment

__all__ = ["write_leaflet", "leaflet_story", "CHECKS", "AFTER_A_FALL"]

#: Printed on every leaflet, whatever sections are chosen.
ESCAPE_WARNING = ("Never block an escape window. Nets, locks and limiters must not stop anyone "
                  "from getting out in a fire.")


def _p(text: str, style: object) -> Paragraph:
    return Paragraph(markup(text), style)


def _bullets(items: tuple[str, ...], st: Styles) -> list[Flowable]:
    return [Paragraph(markup(i), st.bullet, bulletText="•") for i in items]


def _section(s: LeafletSection, ctx: LeafletContext, st: Styles, width: float
             ) -> list[Flowable]:
    body = _bullets(s.items, st) if s.bullets else [_p(i, st.body) for i in s.items]
    if s.key == "after_fall":
        box = Table([[[_p(s.title, st.h1), *body]]], colWidths=[width])
        box.setStyle(TableStyle([("BOX", (0, 0), (-1, -1), 2, INK),
                                 ("BACKGROUND", (0, 0), (-1, -1), HEADER_FILL),
                                 ("LEFTPADDING", (0, 0), (-1, -1), 8),
                                 ("RIGHTPADDING", (0, 0), (-1, -1), 8)]))
        return [Spacer(1, 3 * mm), box, Spacer(1, 3 * mm)]
    if s.key == "contact":
        if not ctx.contact and not s.items:
            return []
        block = [_p("\n".join(ctx.contact), st.body)] if ctx.contact else []
        return [KeepTogether([_p(s.title, st.h1), *block, *body])]
    return [_p(s.title, st.h1), *body]


def leaflet_story(ctx: LeafletContext, st: Styles, width: float) -> list[Flowable]:
    """The leaflet's flowables: the chosen sections in order, then the escape-window warning
    and the cautions, which every leaflet carries."""
    story: list[Flowable] = [_p("Keep your cat safe at home", st.title),
                             _p(ctx.building_name, st.subtitle)]
    if ctx.address:
        story.append(_p(ctx.address, st.subtitle))
    story.append(Spacer(1, 4 * mm))
    warned = False
    for s in ctx.sections:
        story += _section(s, ctx, st, width)
        if s.key == "building":
            story.append(_p(ESCAPE_WARNING, st.body))
            warned = True
    if not warned:
        story.append(_p(ESCAPE_WARNING, st.body))
    story.append(_p(f"{CAUTIONS_SHORT} Issued {ctx.date}.", st.small))
    return story


def write_leaflet(assessment: Assessment, plan: Plan | None, path: str | Path, *,
                  contact: ContactBlock | None = None, date: str = "",
                  choice: LeafletChoice | None = None) -> Path:
    """Write the tenant leaflet PDF to ``path`` and return it: the sections of ``choice``
    (default: all, with the plan's measures), issued on the audit date (``date``, ISO,
    overrides it)."""
    ctx = build_leaflet_context(assessment, plan, contact=contact or ContactBlock(), date=date,
                                choice=choice)

    def make_doc(out: BinaryIO) -> AuditDocTemplate:
        return AuditDocTemplate(out, header=markup(ctx.building_name),
                                footer=markup("Information for residents. " + CAUTIONS_SHORT),
                                title=f"Cat safety: {ctx.building_name}", subject="Tenant leaflet")

    return write_pdf_atomic(path, make_doc,
                            lambda doc: leaflet_story(ctx, leaflet_styles(), doc.width))
