"""The PDF audit report: :func:`write_audit`."""

from __future__ import annotations

from pathlib import Path
from typing import TYPE_CHECKING, BinaryIO

from reportlab.platypus import Flowable

from petfall_audit.figures import (
    FallProfileFigure,
    facade_elevations,
    fall_profile_figure,
    floor_comparison,
)
from petfall_audit.report import sections as sec
from petfall_audit.report.context import AuditContext, ReportOptions, build_audit_context
from petfall_audit.report.fonts import markup
from petfall_audit.report.since import build_since
from petfall_audit.report.styles import audit_styles
from petfall_audit.report.template import AuditDocTemplate, write_pdf_atomic

if TYPE_CHECKING:
    from petfall_audit.plan import Plan
    from petfall_audit.risk import Assessment

__all__ = ["write_audit", "audit_story"]


def audit_story(assessment: Assessment, plan: Plan | None, ctx: AuditContext,
                options: ReportOptions, width: float, height: float,
                wide_width: float | None = None) -> list[Flowable]:
    """The report's flowables in order; ``width`` / ``height`` of the portrait page frame and
    ``wide_width`` of the landscape frame used by the ranked table (pt)."""
    st = audit_styles()
    pal = options.palette
    profiles: dict[str, FallProfileFigure] = {
        d.opening_id: fall_profile_figure(assessment, d.opening_id) for d in ctx.details
    }
    story: list[Flowable] = []
    story += sec.build_cover(ctx, st, width)
    story += sec.build_summary(ctx, st, width, pal)
    if options.comparison is not None:
        story += build_since(options.comparison, st, width)
    story += sec.build_method(ctx, st, width)
    story += sec.build_facades(facade_elevations(assessment), ctx, st, width, height, pal)
    if assessment.openings:  # an empty chart says nothing
        story += sec.build_floor_chart(floor_comparison(assessment, ctx.band_names), ctx, st,
                                       width, height, pal)
    story += sec.build_ranked_table(ctx, st, wide_width or width, pal)
    story += sec.build_details(ctx, profiles, st, width, pal)
    story += sec.build_plan(ctx, st, width)
    if options.what_if is not None:
        story += build_since(options.what_if, st, width, what_if=True)
    story += sec.build_cautions(ctx, st)
    story += sec.build_notes_appendix(ctx, st)
    story += sec.build_signoff(ctx, st, width)
    return story


def write_audit(assessment: Assessment, plan: Plan | None, path: str | Path, *, top_n: int = 5,
                options: ReportOptions | None = None, photo_root: str | Path | None = None
                ) -> Path:
    """Write the audit PDF to ``path`` and return it. ``top_n`` openings get a detail page
    (overrides ``options.top_n``); ``plan`` may be ``None`` (no budget given). ``photo_root``:
    the building file's folder, where the openings' photos are (overrides
    ``options.photo_root`` when given)."""
    from dataclasses import replace

    opts = replace(options or ReportOptions(), top_n=top_n)
    if photo_root is not None:
        opts = replace(opts, photo_root=Path(photo_root))
    ctx = build_audit_context(assessment, plan, options=opts)

    def make_doc(out: BinaryIO) -> AuditDocTemplate:
        return AuditDocTemplate(out, header=markup(ctx.header), footer=markup(ctx.footer),
                                title=f"{ctx.title}: {ctx.building_name}", author=ctx.auditor,
                                subject="Cat fall risk audit", first_page_header=False)

    return write_pdf_atomic(path, make_doc, lambda doc: audit_story(
        assessment, plan, ctx, opts, doc.width, doc.height, doc.landscape_width))
