"""The audit's section "Since the earlier audit": totals, the openings that got better and
worse, new and removed openings, the fixes fitted. Strings come from
:mod:`petfall_audit.present.comparison` (the numbers of ``petfall-audit compare --format json``).
"""

from __future__ import annotations

from collections.abc import Callable, Sequence

from reportlab.platypus import CondPageBreak, Flowable, Paragraph, Spacer, Table, TableStyle

from petfall_audit.compare import Comparison
from petfall_audit.present.comparison import (
    METHOD,
    ComparisonRow,
    building_change_lines,
    comparison_rows,
    fitted_fix_rows,
    summary_lines,
)
from petfall_audit.report.fonts import markup
from petfall_audit.report.styles import HEADED_TABLE, Styles

__all__ = ["SINCE_TITLE", "WHAT_IF_TITLE", "build_since"]

SINCE_TITLE = "Since the earlier audit"
WHAT_IF_TITLE = "After the plan (what-if)"
#: Said under the what-if's title.
WHAT_IF_NOTE = (
    "What the building would be with the plan's fixes fitted, assessed with the same simulated "
    "cats as this audit. Fixes that rely on people (tenant guidance, keeping a window shut) "
    "are not shown here: an opening's fields cannot show them. Nothing has been fitted yet."
)


def _p(text: str, style: object) -> Paragraph:
    return Paragraph(markup(text), style)


def _what(r: ComparisonRow) -> str:
    parts = list(r.changes_text)
    if r.fitted_text:
        parts.append(r.fitted_text)
    return "; ".join(parts) or "–"


def _table(rows: Sequence[ComparisonRow], head: Sequence[str],
           cells: Callable[[ComparisonRow], Sequence[str]],
           fracs: Sequence[float], st: Styles, width: float) -> Table:
    data: list[list[object]] = [[_p(h, st.cell_bold) for h in head]]
    for r in rows:
        data.append([_p(x, st.cell) for x in cells(r)])
    t = Table(data, colWidths=[width * f for f in fracs], repeatRows=1, splitInRow=1)
    t.setStyle(TableStyle(HEADED_TABLE))
    return t


def _control_names() -> dict[str, str]:
    """Control id -> name in the shipped catalogue (empty when it cannot be read)."""
    from petfall_audit.errors import CatalogueError
    from petfall_audit.fixes import load_catalogue

    try:
        return {k.id: k.name for k in load_catalogue().controls}
    except (OSError, CatalogueError):
        return {}


def build_since(c: Comparison, st: Styles, width: float, *, what_if: bool = False
                ) -> list[Flowable]:
    """The section's flowables; ``what_if``: the section "After the plan (what-if)" (``c``
    compares this audit with its building after the plan)."""
    rows = comparison_rows(c, exact=what_if)
    out: list[Flowable] = [CondPageBreak(120), _p(WHAT_IF_TITLE if what_if else SINCE_TITLE,
                                                  st.h1)]
    if what_if:
        out.append(_p(WHAT_IF_NOTE, st.body))
    out += [Paragraph(markup(s), st.bullet, bulletText="•")
            for s in summary_lines(c, what_if=what_if)]
    matched = [r for r in rows if r.status == "changed"]
    worse = [r for r in matched if r.risk_change > 0]
    better = sorted((r for r in matched if r.risk_change <= 0), key=lambda r: (r.risk_change,
                                                                                r.id))
    head = ("Opening", "Band", "Risk before", "Risk after", "Change", "By fixes",
            "What changed")
    fracs = (0.1, 0.16, 0.1, 0.1, 0.09, 0.09, 0.36)

    def changed(r: ComparisonRow) -> tuple[str, ...]:
        return (r.id, r.band_text, r.risk_before_text, r.risk_after_text, r.change_text,
                r.by_fixes_text or "–", _what(r))

    groups = [("Openings that got worse", worse, "No opening got worse."),
              ("Openings that got better", better, "No opening got better.")]
    if what_if:
        groups = [("Openings the plan improves", better, "The plan improves no opening.")]
        head = (*head[:6], "What the fix changes")
    for title, group, empty in groups:
        out.append(_p(title, st.h2))
        out.append(_table(group, head, changed, fracs, st, width) if group
                   else _p(empty, st.body))
    if what_if:
        return out
    added = [r for r in rows if r.status == "added"]
    removed = [r for r in rows if r.status == "removed"]
    side_head = ("Opening", "Floor", "Kind", "Expected band", "Risk score", "Likelihood")
    side_fracs = (0.14, 0.1, 0.28, 0.18, 0.14, 0.16)
    out.append(_p("New openings", st.h2))
    out.append(_table(added, side_head, lambda r: (
        r.id, str(r.floor), r.kind_text, r.band_text, r.risk_after_text,
        r.likelihood_after_text), side_fracs, st, width) if added
        else _p("No opening was added.", st.body))
    out.append(_p("Removed openings", st.h2))
    out.append(_table(removed, side_head, lambda r: (
        r.id, str(r.floor), r.kind_text, r.band_text, r.risk_before_text,
        r.likelihood_before_text), side_fracs, st, width) if removed
        else _p("No opening was removed.", st.body))
    fitted = fitted_fix_rows(c, _control_names())
    if fitted:
        out.append(_p("Fixes fitted since", st.h2))
        data: list[list[object]] = [[_p(h, st.cell_bold) for h in (
            "Opening", "Fix", "Status", "Date", "Risk removed at the opening")]]
        data += [[_p(x, st.cell) for x in row] for row in fitted]
        t = Table(data, colWidths=[width * f for f in (0.12, 0.38, 0.16, 0.14, 0.2)],
                  repeatRows=1, splitInRow=1)
        t.setStyle(TableStyle(HEADED_TABLE))
        out.append(t)
    building = building_change_lines(c)
    if building:
        out.append(_p("Changed in the building", st.h2))
        out += [Paragraph(markup(s), st.bullet, bulletText="•") for s in building]
    out += [Spacer(1, 6), _p(METHOD, st.small)]
    return out
