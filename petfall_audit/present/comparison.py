"""A comparison of two audits (:mod:`petfall_audit.compare`) in words, for the terminal table,
the PDF section "Since the earlier audit" and the app's comparison view alike.

Every number is rounded as the JSON export rounds it (4 significant digits,
:func:`petfall_audit.io.results_export.round_significant`) before it is formatted, so the table,
the PDF and the app show the numbers of ``petfall-audit compare --format json``.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass

from petfall_audit.compare import Comparison, OpeningComparison, fitted_records
from petfall_audit.io.results_export import round_significant
from petfall_audit.model import BuildingInfo
from petfall_audit.present.changes import (
    fix_status_label,
    fmt_field_change,
    fmt_risk_change,
    status_label,
)
from petfall_audit.present.labels import band_label, kind_label
from petfall_audit.present.numbers import (
    fmt_count,
    fmt_date,
    fmt_one_in,
    fmt_percent,
    fmt_risk,
    plural,
)
from petfall_audit.safe_text import cut

__all__ = [
    "METHOD",
    "RENUMBERED_NAMED",
    "ComparisonRow",
    "comparison_rows",
    "summary_lines",
    "doubt_line",
    "doubt_words",
    "renumbered_line",
    "building_change_lines",
    "fitted_fix_rows",
    "fmt_exported_risk",
]

#: How the risk removed is split, in words (also the JSON's ``"method"``).
METHOD = (
    "Both audits assessed with the same sampled cats (same samples and seed), so a difference "
    "is a difference of the building, not of chance. Risk removed by fixes: the earlier risk "
    "minus the risk of the earlier building with only the later barriers (nets, screens, "
    "limiters, infill, rail caps, climbing aids) applied; every other change (openings added or "
    "removed, floors, surfaces, use, cat profile) accounts for the rest."
)


def _rounded(x: float | None, exact: bool = False) -> float | None:
    return x if exact or x is None else round_significant(x)


def fmt_exported_risk(x: float | None, exact: bool = False) -> str:
    """A risk score as the JSON export gives it (4 significant digits), formatted; ``exact``:
    as computed (to read beside the fix plan's own numbers)."""
    return fmt_risk(_rounded(x, exact))


@dataclass(frozen=True, slots=True)
class ComparisonRow:
    """One compared opening as text. ``status``, ``band_before`` / ``band_after`` (band index or
    ``None``), ``risk_change`` (later minus earlier, score units) and ``removed_by_fixes`` are
    kept as values for sorting and filtering."""

    id: str
    earlier_id: str | None
    status: str
    status_text: str
    floor: int
    facade: str
    kind_text: str
    where_text: str
    band_before: int | None
    band_after: int | None
    band_text: str
    risk_before_text: str
    risk_after_text: str
    change_text: str
    by_fixes_text: str
    likelihood_before_text: str
    likelihood_after_text: str
    changes_text: tuple[str, ...]
    fitted_text: str
    risk_change: float
    removed_by_fixes: float


def _band_move(o: OpeningComparison) -> str:
    if o.before is None or o.after is None:
        side = o.after if o.before is None else o.before
        return band_label(None if side is None else side.expected_band)
    b, a = band_label(o.before.expected_band), band_label(o.after.expected_band)
    return b if a == b else f"{b} → {a}"


def _row(o: OpeningComparison, system: str, exact: bool) -> ComparisonRow:
    side = o.after if o.after is not None else o.before
    assert side is not None
    change = _rounded(o.risk_change, exact)
    by_fix = _rounded(o.removed_by_fixes, exact) or 0.0
    return ComparisonRow(
        id=o.id,
        earlier_id=o.earlier_id,
        status=o.status,
        status_text=status_label(o.status),
        floor=side.floor,
        facade=side.facade,
        kind_text=kind_label(side.kind),
        where_text=f"{kind_label(side.kind)}, floor {side.floor}, facade {side.facade}",
        band_before=None if o.before is None else o.before.expected_band,
        band_after=None if o.after is None else o.after.expected_band,
        band_text=_band_move(o),
        risk_before_text=fmt_exported_risk(o.risk_before, exact),
        risk_after_text=fmt_exported_risk(o.risk_after, exact),
        change_text=fmt_risk_change(change),
        by_fixes_text=fmt_risk(by_fix) if by_fix else "",
        likelihood_before_text="" if o.before is None else fmt_one_in(o.before.one_in_n),
        likelihood_after_text="" if o.after is None else fmt_one_in(o.after.one_in_n),
        changes_text=tuple(fmt_field_change(c.field, c.old, c.new, system) for c in o.changes),
        fitted_text=("Fitted as recorded: " + ", ".join(o.fitted)) if o.fitted else "",
        risk_change=float(o.risk_change),
        removed_by_fixes=float(o.removed_by_fixes),
    )


def comparison_rows(c: Comparison, system: str = "metric", *, exact: bool = False
                    ) -> list[ComparisonRow]:
    """Every compared opening, worst change first (the largest rise of risk, then the smallest
    fall; unchanged openings last), ties by id. ``exact``: numbers as computed, not as the JSON
    rounds them."""
    order = {"unchanged": 1}
    ranked = sorted(c.openings, key=lambda o: (order.get(o.status, 0), -o.risk_change, o.id))
    return [_row(o, system, exact) for o in ranked]


def _one_line(text: str) -> str:
    """User text quoted in a sentence: on one line, cut to a readable length."""
    return cut(" ".join(text.split()))


def doubt_line(c: Comparison) -> str:
    """Why the two audits may not be of one building, or may be the other way round
    (:attr:`Comparison.doubts`), in a sentence each, or ``""`` when nothing suggests it."""
    return doubt_words(c.doubts, c.earlier.building.info, c.later.building.info)


def doubt_words(doubts: tuple[str, ...], e: BuildingInfo, la: BuildingInfo) -> str:
    """:func:`doubt_line` for ``doubts`` (:func:`petfall_audit.compare.audit_doubts`) of an
    earlier audit ``e`` and a later one ``la``; also for views that compare two audits without
    a whole comparison (the floor comparison)."""
    reasons = []
    if "no_common_openings" in doubts:
        reasons.append("no opening id of the earlier audit is in the later one, so every "
                       "opening counts as new or removed")
    if "different_address" in doubts:
        reasons.append(f"they give different addresses, “{_one_line(e.address)}” and "
                       f"“{_one_line(la.address)}”")
    if "different_name" in doubts:
        reasons.append(f"the names differ, “{_one_line(e.name)}” and "
                       f"“{_one_line(la.name)}”")
    sentences = []
    if reasons:
        sentences.append("These may be audits of two different buildings: "
                         + ", and ".join(reasons)
                         + ". Check that both files are audits of the same building.")
    if "dates_reversed" in doubts:
        sentences.append(f"The earlier audit is dated {fmt_date(e.audit_date)}, after the later "
                         f"one ({fmt_date(la.audit_date)}): check that the two files are not "
                         "the other way round.")
    return " ".join(sentences)


#: Renumbered pairs named in :func:`renumbered_line`; the rest are counted.
RENUMBERED_NAMED = 8


def renumbered_line(c: Comparison) -> str:
    """The openings that look renumbered but were not paired (:attr:`Comparison.renumbered`)
    in one sentence, or ``""``."""
    pairs = c.renumbered
    if not pairs:
        return ""
    named = ", ".join(f"{_one_line(a)} as {_one_line(b)}" for a, b in pairs[:RENUMBERED_NAMED])
    more = len(pairs) - RENUMBERED_NAMED
    return (f"{fmt_count(len(pairs), 'opening')} {plural(len(pairs), 'looks', 'look')} "
            "renumbered since the earlier audit (same floor, facade, kind and place) and "
            f"{plural(len(pairs), 'counts', 'count')} as removed and new: {named}"
            + (f", and {more} more" if more > 0 else "") + ".")


def summary_lines(c: Comparison, *, what_if: bool = False, doubt: bool = True) -> list[str]:
    """The totals in sentences; ``what_if``: the later side is the building with the plan's
    fixes fitted (a what-if), not a later audit, and the numbers are as computed (to read
    beside the fix plan's). ``doubt``: with :func:`doubt_line` as the second sentence (a
    caller that shows it on its own passes ``False``)."""
    e, la = c.earlier.building.info, c.later.building.info
    exact = what_if

    def risk(x: float | None) -> str:
        return fmt_exported_risk(x, exact)

    removed = _rounded(c.risk_removed, exact) or 0.0
    share = _rounded(c.share_removed)
    cats = f"{fmt_count(c.samples, 'sampled cat')} (seed {c.seed})"
    def of(x: float | None, tail: str = "") -> str:
        """`` (12% of the earlier risk)``, or nothing when the earlier risk is 0 (a share of
        nothing is no number)."""
        return "" if x is None else f" ({fmt_percent(abs(_rounded(x) or 0.0))}{tail})"

    if what_if:
        first = (f"{e.name} as audited on {fmt_date(e.audit_date)}, and the same building with "
                 f"the plan's fixes fitted (a what-if), both assessed with {cats}.")
        fixes = (f"Removed by the plan's fixes: {risk(c.removed_by_fixes)}"
                 f"{of(c.share_by_fixes, ' of the risk')}.")
    else:
        first = (f"Earlier audit: {e.name}, {fmt_date(e.audit_date)}; later audit: {la.name}, "
                 f"{fmt_date(la.audit_date)}. Both assessed with {cats}.")
        other = _rounded(c.removed_by_other) or 0.0
        other_text = (f"every other change removed {risk(other)}" if other >= 0
                      else f"every other change added {risk(-other)}")
        fixes = (f"Removed by barriers fitted since: {risk(c.removed_by_fixes)}"
                 f"{of(c.share_by_fixes, ' of the earlier risk')}; "
                 f"{other_text}{of(c.share_by_other)}.")
    moved = ("" if share is None else
             f", {fmt_percent(abs(share))} {'less' if removed >= 0 else 'more'}")
    lines = [
        first,
        f"Summed risk score: {risk(c.risk_before)} before, "
        f"{risk(c.risk_after)} after ({fmt_risk_change(-removed)}{moved}).",
        fixes,
    ]
    warning = "" if what_if or not doubt else doubt_line(c)
    if warning:
        lines.insert(1, warning)
    renumbered = "" if what_if else renumbered_line(c)
    if not what_if:
        lines.append("Openings: " + ", ".join(
            fmt_count(len(c.with_status(s)), status_label(s).lower(), status_label(s).lower())
            for s in ("changed", "added", "removed", "unchanged")) + ".")
    if renumbered:
        lines.append(renumbered)
    return lines


def building_change_lines(c: Comparison, system: str = "metric") -> list[str]:
    """What changed outside the openings, one line each."""
    return [fmt_field_change(x.field, x.old, x.new, system) for x in c.building_changes]


def fitted_fix_rows(c: Comparison, control_names: Mapping[str, str] | None = None
                    ) -> list[tuple[str, str, str, str, str]]:
    """The later audit's fixes recorded as fitted or checked: (opening, control name, status,
    date, risk the barrier changes removed at the opening), in recorded order."""
    names = control_names or {}
    out = []
    for r in fitted_records(c):
        try:
            removed = fmt_exported_risk(c.opening(r.opening_id).removed_by_fixes)
        except KeyError:
            removed = "opening no longer recorded"
        out.append((r.opening_id, names.get(r.control_id, r.control_id),
                    fix_status_label(r.status.value), fmt_date(r.date), removed))
    return out
