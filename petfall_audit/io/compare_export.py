"""A comparison of two audits (:mod:`petfall_audit.compare`) as a JSON-ready dict, CSV text or
a terminal table.

JSON keys: top level ``risk_before``, ``risk_after`` (summed risk scores), ``risk_removed``,
``removed_by_fixes``, ``removed_by_other`` and their shares of ``risk_before``, ``samples`` and
``seed`` (the same for both audits), ``earlier`` / ``later`` (name, audit date, number of
openings), ``doubts`` (signs that the two may not be audits of one building:
``no_common_openings``, ``different_address``, ``different_name``, or the two the other way
round:
``dates_reversed``; :attr:`Comparison.doubts`), ``renumbered`` (earlier id -> later id of
openings that look renumbered but were not paired, a suggestion), ``building_changes``,
``method``, ``cautions``; ``"openings"``: one object per opening
with ``id``, ``earlier_id``, ``status`` (``added``, ``removed``, ``changed``, ``unchanged``),
``changes`` (field names), ``field_changes`` (field, old, new, unit), ``risk_before``,
``risk_after``, ``band_before``, ``band_after`` (band names; ``null`` where the opening does not
exist on that side), ``before`` / ``after`` (band probabilities, expected band, likelihood,
1 in N, rank, risk rank; ``null`` likewise), ``removed_by_fixes``, ``removed_by_other`` and
``fitted`` (control ids of fixes recorded as fitted); ``fixes_fitted``: the later file's fixes
recorded as fitted or checked (opening, control, status, date, note, ``removed_at_opening``: the
risk the barrier changes removed at that opening). Numbers to 4 significant digits.
"""

from __future__ import annotations

import io
import shlex
import textwrap
from typing import Any

from petfall_audit.cautions import CAUTIONS, CAUTIONS_SHORT
from petfall_audit.compare import Comparison, FieldChange, OpeningComparison, fitted_records
from petfall_audit.injury import BANDS
from petfall_audit.io.csv_safe import csv_writer
from petfall_audit.io.results_export import round_significant as _r
from petfall_audit.model import FixRecord
from petfall_audit.present.comparison import (
    METHOD,
    RENUMBERED_NAMED,
    building_change_lines,
    comparison_rows,
    doubt_line,
    renumbered_line,
    summary_lines,
)
from petfall_audit.risk import OpeningResult

__all__ = ["METHOD", "comparison_fields", "comparison_to_dict",
           "comparison_json_text",
           "comparison_to_csv", "comparison_to_table", "CSV_COLUMNS"]

TEXT_WIDTH = 80
CSV_COLUMNS = (
    "id", "earlier_id", "status", "changes", "floor", "facade", "kind",
    "band_before", "band_after", "risk_before", "risk_after", "risk_change",
    "likelihood_before", "likelihood_after", "rank_before", "rank_after",
    "removed_by_fixes", "removed_by_other", "fitted",
)


def _value(v: Any) -> Any:
    return _r(v) if isinstance(v, float) else v


def _change(c: FieldChange) -> dict[str, Any]:
    return {"field": c.field, "old": _value(c.old), "new": _value(c.new), "unit": c.unit}


def _side(o: OpeningResult | None) -> dict[str, Any] | None:
    if o is None:
        return None
    return {
        "floor": o.floor,
        "facade": o.facade,
        "kind": str(o.kind),
        "risk": _r(o.risk),
        "expected_band": BANDS[o.expected_band],
        "bands": {name: _r(o.bands[name]) for name in BANDS},
        "likelihood": _r(o.annual_probability),
        "one_in_n": _r(o.one_in_n),
        "rank": o.rank,
        "risk_rank": o.risk_rank,
    }


def _band(o: OpeningResult | None) -> str | None:
    return None if o is None else BANDS[o.expected_band]


def _opening(o: OpeningComparison) -> dict[str, Any]:
    return {
        "id": o.id,
        "earlier_id": o.earlier_id,
        "status": o.status,
        "changes": list(o.change_names),
        "field_changes": [_change(c) for c in o.changes],
        "risk_before": None if o.before is None else _r(o.before.risk),
        "risk_after": None if o.after is None else _r(o.after.risk),
        "band_before": _band(o.before),
        "band_after": _band(o.after),
        "before": _side(o.before),
        "after": _side(o.after),
        "removed_by_fixes": _r(o.removed_by_fixes),
        "removed_by_other": _r(o.removed_by_other),
        "fitted": list(o.fitted),
    }


def _fitted(c: Comparison, r: FixRecord) -> dict[str, Any]:
    """A fitted fix and the risk removed by barrier changes at its opening."""
    try:
        removed = _r(c.opening(r.opening_id).removed_by_fixes)
    except KeyError:
        removed = None
    return {"opening": r.opening_id, "control": r.control_id, "status": r.status.value,
            "date": r.date, "note": r.note, "removed_at_opening": removed}


def _share(x: float | None) -> float | None:
    return None if x is None else _r(x)


def _audit(c: Comparison, which: str) -> dict[str, Any]:
    a = c.earlier if which == "earlier" else c.later
    info = a.building.info
    return {"name": info.name, "audit_date": info.audit_date, "openings": len(a.openings)}


def comparison_fields(c: Comparison) -> dict[str, Any]:
    """The comparison's own keys (in the module docstring), which the results envelope carries
    at its top level."""
    return {
        "model_version": c.later.model_version,
        "samples": c.samples,
        "seed": c.seed,
        "earlier": _audit(c, "earlier"),
        "later": _audit(c, "later"),
        "risk_before": _r(c.risk_before),
        "risk_after": _r(c.risk_after),
        "risk_removed": _r(c.risk_removed),
        "removed_by_fixes": _r(c.removed_by_fixes),
        "removed_by_other": _r(c.removed_by_other),
        "share_removed": _share(c.share_removed),
        "share_by_fixes": _share(c.share_by_fixes),
        "share_by_other": _share(c.share_by_other),
        "doubts": list(c.doubts),
        "renumbered": dict(c.renumbered),
        "counts": {s: len(c.with_status(s)) for s in ("added", "removed", "changed",
                                                       "unchanged")},
        "building_changes": [_change(x) for x in c.building_changes],
        "fixes_fitted": [_fitted(c, r) for r in fitted_records(c)],
        "method": METHOD,
        "openings": [_opening(o) for o in c.openings],
    }


def comparison_to_dict(c: Comparison) -> dict[str, Any]:
    """The comparison in the one results envelope (:mod:`petfall_audit.io.results_envelope`),
    ``"contents": ["comparison"]``, its keys at the top level."""
    from petfall_audit.io.results_envelope import results_document

    return results_document(comparison=comparison_fields(c))


def comparison_json_text(c: Comparison) -> str:
    """:func:`comparison_to_dict` as UTF-8 JSON text ending in a newline, one opening per line
    (:func:`~petfall_audit.io.json_text.json_text`)."""
    from petfall_audit.io.json_text import json_text

    return json_text(comparison_to_dict(c), block_depth=2)


def comparison_to_csv(c: Comparison) -> str:
    """One row per opening (later openings in building order, then the removed ones); the
    totals and the cautions first, as ``#`` comment lines."""
    buf = io.StringIO()
    for line in CAUTIONS:
        buf.write(f"# {line}\n")
    for note in (doubt_line(c), renumbered_line(c)):
        if note:
            buf.write(f"# {note}\n")
    w = csv_writer(buf)
    w.writerow(CSV_COLUMNS)
    for o in c.openings:
        b, a = o.before, o.after
        side = a if a is not None else b
        assert side is not None
        w.writerow([
            o.id, o.earlier_id or "", o.status, ";".join(o.change_names), side.floor,
            side.facade, str(side.kind), _band(b) or "", _band(a) or "",
            "" if b is None else _r(b.risk), "" if a is None else _r(a.risk),
            _r(o.risk_change),
            "" if b is None else _r(b.annual_probability),
            "" if a is None else _r(a.annual_probability),
            "" if b is None else b.risk_rank, "" if a is None else a.risk_rank,
            _r(o.removed_by_fixes), _r(o.removed_by_other), ";".join(o.fitted),
        ])
    return buf.getvalue()


def comparison_to_table(c: Comparison, *, system: str = "metric") -> str:
    """A readable fixed-width table of the openings that are not unchanged, the largest rise of
    risk first, with what changed in each, the totals above and the cautions below."""
    rows = [r for r in comparison_rows(c, system) if r.status != "unchanged"]
    head = ("Opening", "Status", "Band", "Risk before", "Risk after", "Change", "By fixes")
    body = [(r.id, r.status_text, r.band_text, r.risk_before_text, r.risk_after_text,
             r.change_text, r.by_fixes_text) for r in rows]
    widths = [max(len(h), *(len(r[i]) for r in body)) if body else len(h)
              for i, h in enumerate(head)]
    right = {3, 4, 5, 6}

    def fmt(cells: tuple[str, ...]) -> str:
        return "  ".join(x.rjust(wd) if i in right else x.ljust(wd)
                         for i, (x, wd) in enumerate(zip(cells, widths, strict=True))).rstrip()

    lines: list[str] = []
    for s in summary_lines(c):
        lines += textwrap.wrap(s, TEXT_WIDTH)
    if c.renumbered:  # the command line's way to pair them
        if len(c.renumbered) <= RENUMBERED_NAMED:
            pairs = " ".join(f"--rename {shlex.quote(f'{a}={b}')}" for a, b in c.renumbered)
            how = f"To pair them, compare again with {pairs}"
        else:
            how = ("To pair them, compare again with --rename OLD=NEW for each (--format json "
                   "lists them under renumbered)")
        lines += textwrap.wrap(how, TEXT_WIDTH, break_on_hyphens=False)
    lines += ["", fmt(head), fmt(tuple("-" * wd for wd in widths)), *(fmt(r) for r in body)]
    if not rows:
        lines.append("(every opening is unchanged)")
    if any(r.changes_text or r.fitted_text for r in rows):
        lines += ["", "What changed:"]
        for r in rows:
            for text in (*r.changes_text, *((r.fitted_text,) if r.fitted_text else ())):
                lines += textwrap.wrap(f"{r.id}: {text}", TEXT_WIDTH, initial_indent="  ",
                                       subsequent_indent="    ")
    building = building_change_lines(c, system)
    if building:
        lines += ["", "Changed in the building:"]
        for text in building:
            lines += textwrap.wrap(text, TEXT_WIDTH, initial_indent="  ",
                                   subsequent_indent="    ")
    lines += ["", *textwrap.wrap(METHOD, TEXT_WIDTH), "",
              *textwrap.wrap(CAUTIONS_SHORT, TEXT_WIDTH), ""]
    return "\n".join(lines)
