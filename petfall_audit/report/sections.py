"""Small builders of the audit's story; each returns a list of flowables.

They only place strings from :mod:`petfall_audit.report.context` and drawings from
:mod:`petfall_audit.report.charts`; user text goes through :func:`fonts.markup`.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import replace
from xml.sax.saxutils import escape

from reportlab.lib.styles import ParagraphStyle
from reportlab.lib.units import mm
from reportlab.platypus import (
    CondPageBreak,
    Flowable,
    KeepTogether,
    NextPageTemplate,
    PageBreak,
    Paragraph,
    Spacer,
    Table,
    TableStyle,
)

from petfall_audit.figures import FacadeElevation, FallProfileFigure, FloorComparison
from petfall_audit.palette import band_style
from petfall_audit.present import fmt_length, fmt_number
from petfall_audit.report.charts import (
    band_legend,
    colour,
    facade_drawing,
    facade_scales,
    fall_profile_drawing,
    floor_chart,
    floors_per_chart,
    sensitivity_drawing,
    slice_floors,
)
from petfall_audit.report.context import AuditContext
from petfall_audit.report.fonts import markup
from petfall_audit.report.photos import build_photos
from petfall_audit.report.styles import HEADED_TABLE, HEADER_FILL, INK, TABLE_GRID, Styles

__all__ = [
    "build_cover",
    "build_summary",
    "build_method",
    "build_code_profile",
    "build_sensitivity",
    "build_facades",
    "build_floor_chart",
    "build_ranked_table",
    "build_details",
    "build_plan",
    "build_cautions",
    "build_notes_appendix",
    "build_signoff",
]



#: Said instead of an empty table when the building has no openings.
NO_OPENINGS = "No openings are recorded for this building: there is nothing to rank."


def _p(text: str, style: object) -> Paragraph:
    """A paragraph of literal (user or generated) text."""
    return Paragraph(markup(text), style)


#: Long text is cut into paragraphs of about this many characters (at a space where there is
#: one): reportlab re-wraps the rest of a paragraph each time it splits it over a page, so one
#: huge paragraph lays out in quadratic time, many small ones in linear time.
_CHUNK_CHARS = 1500


def _long_text(text: str, style: ParagraphStyle) -> list[Flowable]:
    """``text`` as paragraphs (one per line of the text, long lines cut in chunks) whose layout
    time grows linearly with the length of the text."""
    out: list[Flowable] = []
    for line in text.replace("\r\n", "\n").split("\n"):
        while len(line) > _CHUNK_CHARS:
            cut = line.rfind(" ", _CHUNK_CHARS // 2, _CHUNK_CHARS)
            cut = cut if cut > 0 else _CHUNK_CHARS
            piece, line = line[:cut], line[cut:].lstrip(" ")
            out.append(Paragraph(markup(piece), ParagraphStyle(
                "Joined", parent=style, spaceAfter=0)))
        out.append(Paragraph(markup(line) or "&nbsp;", style))
    return out


def _kv_table(rows: Sequence[tuple[str, str]], st: Styles, width: float,
              key_frac: float = 0.32) -> Table:
    data = [[_p(k, st.cell_bold), _p(v, st.cell)] for k, v in rows]
    t = Table(data, colWidths=[width * key_frac, width * (1 - key_frac)], splitInRow=1)
    t.setStyle(TableStyle([*TABLE_GRID, ("BACKGROUND", (0, 0), (0, -1), HEADER_FILL)]))
    return t


def _bullets(items: Sequence[str], st: Styles) -> list[Flowable]:
    return [Paragraph(markup(i), st.bullet, bulletText="•") for i in items]


def build_cover(ctx: AuditContext, st: Styles, width: float) -> list[Flowable]:
    """Title, building, address, auditor, date and scope."""
    out: list[Flowable] = [
        Spacer(1, 18 * mm),
        _p(ctx.title, st.title),
        _p(ctx.building_name, st.subtitle),
    ]
    if ctx.address:
        out.append(_p(ctx.address, st.body))
    out += [Spacer(1, 8 * mm), _kv_table(ctx.cover_facts, st, width), Spacer(1, 6 * mm),
            _p("Scope", st.h2), _p(ctx.scope, st.body)]
    if ctx.notes:
        out += [_p("Notes", st.h2), *_long_text(ctx.notes, st.body)]
    if ctx.issuer:
        out += [_p("Issued by", st.h2), _p("\n".join(ctx.issuer), st.body)]
    out += [Spacer(1, 6 * mm), _p(ctx.cautions[0], st.small), _p(ctx.cautions[1], st.small)]
    if ctx.font_note:
        out.append(_p(ctx.font_note, st.small))
    out.append(PageBreak())
    return out


def _band_cell(name: str, index: int, st: Styles, palette: str) -> Table:
    bs = band_style(index, palette)
    t = Table([[f"{bs.mark}", _p(name, st.cell)]], colWidths=[9 * mm, None])
    t.setStyle(TableStyle([
        ("BACKGROUND", (0, 0), (0, 0), colour(bs.fill)),
        ("TEXTCOLOR", (0, 0), (0, 0), colour(bs.text)),
        ("FONTNAME", (0, 0), (0, 0), st.cell_bold.fontName),
        ("FONTSIZE", (0, 0), (0, 0), 7),
        ("ALIGN", (0, 0), (0, 0), "CENTER"),
        ("BOX", (0, 0), (0, 0), 0.3, INK),
        ("LEFTPADDING", (0, 0), (-1, -1), 2), ("RIGHTPADDING", (0, 0), (-1, -1), 2),
        ("TOPPADDING", (0, 0), (-1, -1), 1), ("BOTTOMPADDING", (0, 0), (-1, -1), 1),
    ]))
    return t


def build_summary(ctx: AuditContext, st: Styles, width: float, palette: str) -> list[Flowable]:
    """Openings by band, the top risks, the plan's cost and effect."""
    out: list[Flowable] = [_p("Summary", st.h1), *_bullets(ctx.summary, st), _p(
        "Openings by expected injury band", st.h2)]
    rows = [[_p("Band", st.cell_bold), _p("Openings", st.cell_bold)]]
    rows += [[_band_cell(name, i, st, palette), _p(str(n), st.cell)]
             for i, (name, n) in enumerate(ctx.band_counts)]
    t = Table(rows, colWidths=[55 * mm, 25 * mm], hAlign="LEFT")
    t.setStyle(TableStyle(HEADED_TABLE))
    out += [t, _p("Highest risks", st.h2)]
    if not ctx.top_risks:
        out.append(_p(NO_OPENINGS, st.body))
        return out
    rows = [[_p(h, st.cell_bold) for h in ("Opening", "Kind", "Expected band", "Risk score")]]
    rows += [[_p(a, st.cell), _p(b, st.cell), _p(c, st.cell), _p(d, st.cell)]
             for a, b, c, d in ctx.top_risks]
    t = Table(rows, colWidths=[width * f for f in (0.25, 0.3, 0.25, 0.2)], repeatRows=1,
              splitInRow=1)
    t.setStyle(TableStyle(HEADED_TABLE))
    out.append(t)
    return out


def build_method(ctx: AuditContext, st: Styles, width: float) -> list[Flowable]:
    """Method, assumptions and sources."""
    out: list[Flowable] = [CondPageBreak(90 * mm), _p("Method and assumptions", st.h1),
                           _kv_table(ctx.method, st, width, 0.2), _p("Assumptions", st.h2),
                           _kv_table(ctx.assumptions, st, width, 0.38),
                           *build_sensitivity(ctx, st, width),
                           *build_code_profile(ctx, st, width), _p("Sources", st.h2)]
    out += _bullets(ctx.sources, st)
    return out


def build_code_profile(ctx: AuditContext, st: Styles, width: float) -> list[Flowable]:
    """The building's code profile: its name, what it means, and its rules with their clause,
    edition and confidence."""
    if not ctx.code_profile_name:
        return []
    out: list[Flowable] = [_p(f"Building code: {ctx.code_profile_name}", st.h2),
                           _p(ctx.code_profile_lead, st.body)]
    if not ctx.code_rules:
        return out
    head = ["Topic", "Rule", "Clause and edition", "Confidence"]
    data: list[list[object]] = [[_p(h, st.cell_bold) for h in head]]
    for r in ctx.code_rules:
        data.append([_p(r.topic, st.cell), _p(r.rule, st.cell), _p(r.reference, st.cell),
                     _p(r.confidence, st.cell)])
    t = Table(data, colWidths=[width * f for f in (0.2, 0.42, 0.24, 0.14)], repeatRows=1,
              splitInRow=1)
    t.setStyle(TableStyle(HEADED_TABLE))
    return [*out, t]


def build_sensitivity(ctx: AuditContext, st: Styles, width: float) -> list[Flowable]:
    """How much the result depends on the cat: the lead sentence, the swing chart with its
    caption, and what the analysis measures (nothing without a sensitivity context)."""
    sens = ctx.sensitivity
    if sens is None:
        return []
    chart = sensitivity_drawing(sens.figure, sens.labels, sens.ranges, sens.values, width)
    return [CondPageBreak(chart.height + 40 * mm), _p(sens.title, st.h2), _p(sens.lead, st.body),
            KeepTogether([chart, _p(sens.caption, st.caption)]), _p(sens.definition, st.small)]


def build_facades(elevations: Sequence[FacadeElevation], ctx: AuditContext, st: Styles,
                  width: float, height: float, palette: str) -> list[Flowable]:
    """One vector elevation per facade, coloured and marked by band."""
    out: list[Flowable] = []
    for elev in elevations:
        title = _p(f"Facade: {elev.label}", st.h1)
        drawing = facade_drawing(elev, width, height - 40 * mm, palette)
        sy, sx = facade_scales(elev, width, height - 40 * mm)
        caption = _p(
            f"Elevation of facade {elev.label} ({fmt_length(elev.length_m)} long, "
            f"{len(elev.opening_ids)} openings). Fill and mark show each opening's expected "
            "injury band; #n marks the highest-risk openings; a thick line marks a balcony rail."
            + (" Cross-hatching marks an opening whose net, pet-resistant screen or limiter "
               "holds these cats." if bool(elev.protected.any()) else "")
            + (f" Widths drawn {fmt_number(sx / sy)}× the height scale for legibility."
               if sx > 1.05 * sy else " Drawn to scale."),
            st.caption)
        out += [PageBreak(), title, band_legend(ctx.band_names, width, palette),
                Spacer(1, 3 * mm), drawing, caption]
    return out


def build_floor_chart(fc: FloorComparison, ctx: AuditContext, st: Styles, width: float,
                      height: float, palette: str) -> list[Flowable]:
    """Floor-by-floor comparison chart."""
    chart_h = height - 45 * mm
    per = floors_per_chart(chart_h)
    n = len(fc.levels)
    count_max = int(fc.n_openings.max(initial=1)) or 1
    out: list[Flowable] = []
    # a tall building: several charts, the top floors first, on the same scale
    for part, stop in enumerate(range(n, 0, -per)):
        start = max(0, stop - per)
        title = "Floor comparison" if n <= per else (
            f"Floor comparison ({part + 1} of {math.ceil(n / per)})")
        out += [PageBreak(), _p(title, st.h1), band_legend(ctx.band_names, width, palette),
                Spacer(1, 3 * mm),
                floor_chart(slice_floors(fc, start, stop), width, chart_h, palette,
                            count_max=count_max)]
    if not out:  # no floors
        out += [PageBreak(), _p("Floor comparison", st.h1)]
    out.append(_p("Openings on each floor by expected injury band, and the floor's highest "
                  "median impact speed. Severity is not lower on higher floors.", st.caption))
    return out


_RANK_COLS = ("#", "Floor", "Opening", "Kind", "Drop (m)", "v p5", "v p50", "v p95")


def _fits_plain(text: str) -> bool:
    """True when ``text`` can go into a table cell as a plain string (drawn literally, much
    faster than a Paragraph): one line, and no run that needs the CJK font."""
    return "\n" not in text and markup(text) == escape(text)


def build_ranked_table(ctx: AuditContext, st: Styles, width: float, palette: str
                       ) -> list[Flowable]:
    """The full ranked table on landscape pages (``width``: landscape frame width, pt); the
    header repeats on every page; opening ids sit in a column wide enough never to wrap.
    Cells are plain strings where possible: a tower has thousands of them."""
    from reportlab.pdfbase.pdfmetrics import stringWidth

    if not ctx.ranked:
        return [_p("Ranked openings", st.h1), _p(NO_OPENINGS, st.body)]
    bands = ctx.band_names
    font, size = st.cell.fontName, st.cell.fontSize

    def text_w(t: str, f: str = font, sz: float = size) -> float:
        return float(stringWidth(t, f, sz))

    head = [*_RANK_COLS, *(f"P {b}" for b in bands), "Likelihood (12 months)", "Risk score",
            "Recommended control", "Cost"]
    hstyle = ParagraphStyle("RankHead", parent=st.cell_bold, fontSize=6.5, leading=7.5)
    band_w = [max(text_w(b, hstyle.fontName, hstyle.fontSize) + 8, 13 * mm) for b in bands]
    id_w = min(max([text_w(r.opening_id) for r in ctx.ranked] + [12 * mm]) + 8, 40 * mm)
    floor_w = min(max([text_w(r.floor) for r in ctx.ranked] + [10 * mm]) + 8, 30 * mm)
    kind_w = min(max([text_w(r.kind) for r in ctx.ranked] + [14 * mm]) + 8, 35 * mm)
    marks = [f"{r.rank}  {band_style(r.band, palette).mark}" for r in ctx.ranked]
    rank_w = max([text_w(m) for m in marks] + [12 * mm]) + 8
    cols = [rank_w, floor_w, id_w, kind_w, 10 * mm, 9 * mm, 9 * mm, 9 * mm, *band_w,
            18 * mm, 12 * mm, 0.0, 17 * mm]
    cols[-2] = max(width - sum(cols), 30 * mm)

    def cell(text: str, col_w: float) -> object:
        if _fits_plain(text) and text_w(text) <= col_w - 6:
            return text
        return _p(text, st.cell)

    data: list[list[object]] = [[_p(h, hstyle) for h in head]]
    style = [*HEADED_TABLE,
             ("FONT", (0, 1), (-1, -1), font, size, size * 1.15)]
    for r, row in enumerate(ctx.ranked, start=1):
        bs = band_style(row.band, palette)
        data.append([
            marks[r - 1], cell(row.floor, cols[1]), cell(row.opening_id, cols[2]),
            cell(row.kind, cols[3]), row.drop_m, row.v_p5, row.v_p50, row.v_p95, *row.band_probs,
            row.likelihood, row.risk, cell(row.control, cols[-2]) if row.control else "",
            row.cost,
        ])
        style += [("BACKGROUND", (0, r), (0, r), colour(bs.fill)),
                  ("TEXTCOLOR", (0, r), (0, r), colour(bs.text))]
    t = Table(data, colWidths=cols, repeatRows=1, splitInRow=1)
    t.setStyle(TableStyle(style))
    return [
        NextPageTemplate("landscape"), PageBreak(), _p("Ranked openings", st.h1),
        _p("All openings by risk score, highest first (equal scores: the worse expected band "
           "first, then the opening id), the order the app and the exports use. v = impact "
           "speed (m/s) at the 5th, 50th and 95th percentile of the sampled cats (v p50, the "
           "median, is the impact speed the app's tables show); drop = median drop; P = "
           "probability of each injury band; the mark in the first column is the expected "
           "band. Control and cost come from the fix plan (– when the plan does not treat the "
           "opening or no budget was given).", st.small),
        t, NextPageTemplate("page"),
    ]


def build_details(ctx: AuditContext, profiles: dict[str, FallProfileFigure], st: Styles,
                  width: float, palette: str) -> list[Flowable]:
    """One page per top opening: facts, band probabilities, factors and its fall profile."""
    out: list[Flowable] = []
    small = replace(st, bullet=ParagraphStyle("DetailBullet", parent=st.bullet, fontSize=8.5,
                                              leading=10.5, spaceAfter=1.5))
    for det in ctx.details:
        bs = band_style(det.band, palette)
        out += [PageBreak(), _p(f"Opening {det.title}", st.h1)]
        probs = Table([[_p(n.capitalize(), st.cell_bold) for n, _ in det.band_probs],
                       [_p(p, st.cell) for _, p in det.band_probs]], repeatRows=0,
                      hAlign="LEFT")
        probs.setStyle(TableStyle(HEADED_TABLE))
        out += [_kv_table(det.facts, st, width, 0.36), Spacer(1, 2 * mm),
                _p(f"Injury band probabilities (expected band marked {bs.mark}):", st.small), probs]
        if det.photos:
            out += [_p("Photos", st.h2), *build_photos(det.photos, st, width)]
        fig = profiles.get(det.opening_id)
        if fig is not None:
            out += [Spacer(1, 3 * mm), KeepTogether([
                fall_profile_drawing(fig, width, 115), _p(fig.caption, st.caption)])]
        if det.control:
            out += [_p("Recommended control", st.h2), _p(det.control, st.body)]
        if det.factors:
            out += [_p("Why it ranks here", st.h2), *_bullets(det.factors, small)]
        if det.hazards:
            out += [_p("Other hazards", st.h2), *_bullets(det.hazards, small)]
        if det.code_notes:
            out += [_p("Code-compliant is not cat-safe", st.h2), *_bullets(det.code_notes, small)]
        if det.notes:
            out += [_p("Auditor's notes", st.h2), *_long_text(det.notes, st.body)]
    return out


def _refs(notes: Sequence[int]) -> str:
    return ", ".join(str(n) for n in notes) if notes else "–"


def build_plan(ctx: AuditContext, st: Styles, width: float) -> list[Flowable]:
    """The budgeted plan: summary lines, the controls with their counts and costs, each condition
    once as a numbered note, then one row per action that refers to the notes by number."""
    out: list[Flowable] = [PageBreak(), _p("Fix plan", st.h1), *_bullets(ctx.plan_summary, st)]
    if not ctx.plan_rows:
        return out
    head = ["Control", "Openings", "Cost", "Risk removed", "Conditions (see below)"]
    data: list[list[object]] = [[_p(h, st.cell_bold) for h in head]]
    for c in ctx.plan_controls:
        data.append([_p(c.control, st.cell), _p(c.openings, st.cell), _p(c.cost, st.cell),
                     _p(c.risk_removed, st.cell), _p(_refs(c.notes), st.cell)])
    t = Table(data, colWidths=[width * f for f in (0.4, 0.12, 0.14, 0.14, 0.2)], repeatRows=1,
              splitInRow=1)
    t.setStyle(TableStyle(HEADED_TABLE))
    out += [_p("Controls in the plan", st.h2), t]
    if ctx.plan_notes:
        out.append(_p("Conditions", st.h2))
        out += [Paragraph(markup(n), st.bullet, bulletText=f"{i}.")
                for i, n in enumerate(ctx.plan_notes, start=1)]
    head = ["Opening", "Control", "Cost", "Risk before", "Risk after", "Conditions"]
    data = [[_p(h, st.cell_bold) for h in head]]
    for r in ctx.plan_rows:
        data.append([_p(r.opening_id, st.cell), _p(r.control, st.cell), _p(r.cost, st.cell),
                     _p(r.risk_before, st.cell), _p(r.risk_after, st.cell),
                     _p(_refs(r.notes), st.cell)])
    t = Table(data, colWidths=[width * f for f in (0.14, 0.38, 0.12, 0.12, 0.12, 0.12)],
              repeatRows=1, splitInRow=1)
    t.setStyle(TableStyle(HEADED_TABLE))
    out += [_p("Actions by opening", st.h2), t]
    return out


def build_cautions(ctx: AuditContext, st: Styles) -> list[Flowable]:
    """Cautions and the model's limits."""
    return [CondPageBreak(80 * mm), _p("Cautions", st.h1), *_bullets(ctx.cautions, st),
            _p("Limits of this audit", st.h2), *_bullets(ctx.limits, st)]


def build_notes_appendix(ctx: AuditContext, st: Styles) -> list[Flowable]:
    """Appendix: every opening's notes, in building order (the detail pages show only the top
    openings'); nothing when no opening has notes."""
    if not ctx.opening_notes:
        return []
    out: list[Flowable] = [CondPageBreak(60 * mm), _p("Appendix: notes on the openings", st.h1),
                           _p("The auditor's notes on every opening, as recorded.", st.small)]
    for row in ctx.opening_notes:
        out += [_p(f"{row.opening} ({row.place})", st.h2), *_long_text(row.notes, st.body)]
    return out


def build_signoff(ctx: AuditContext, st: Styles, width: float) -> list[Flowable]:
    """Blank sign-off block for the auditor and a reviewer."""
    labels = ctx.signoff
    rows = [[_p(labels[i], st.cell_bold), "", _p(labels[i + 1], st.cell_bold), "",
             _p(labels[i + 2], st.cell_bold), ""] for i in range(0, len(labels), 3)]
    t = Table(rows, colWidths=[w * width for w in (0.13, 0.22, 0.12, 0.22, 0.08, 0.23)],
              rowHeights=[14 * mm] * len(rows))
    t.setStyle(TableStyle([*TABLE_GRID, ("VALIGN", (0, 0), (-1, -1), "MIDDLE")]))
    return [KeepTogether([_p("Sign-off", st.h1), _p(
        "The signatories confirm that the openings were inspected as recorded in this report. "
        "This sign-off does not certify structural adequacy or code compliance.", st.body), t])]
