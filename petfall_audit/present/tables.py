"""Fixed-width tables for a terminal: the command line's ``assess`` and ``plan`` tables.

Openings worst first in the default order (:data:`petfall_audit.risk.DEFAULT_ORDER`, by risk
score) unless ``by="band"``; every number through :mod:`petfall_audit.present.numbers`.
"""

from __future__ import annotations

import math
import textwrap
from typing import TYPE_CHECKING, Literal

from petfall_audit.cautions import CAUTIONS, CAUTIONS_SHORT
from petfall_audit.injury import BANDS
from petfall_audit.present.explain import explain
from petfall_audit.present.numbers import (
    fmt_count,
    fmt_int,
    fmt_length,
    fmt_money,
    fmt_one_in,
    fmt_percent,
    fmt_risk,
    fmt_speed,
    length_unit,
    speed_unit,
)

if TYPE_CHECKING:
    from petfall_audit.fixes import Option
    from petfall_audit.plan import Plan
    from petfall_audit.risk import Assessment

__all__ = ["TEXT_WIDTH", "assessment_to_table", "plan_to_table", "plan_notes", "note_numbers",
           "whole_percents"]

#: Prose under the terminal table (hazards, cautions) is wrapped to this many columns.
TEXT_WIDTH = 80


def whole_percents(shares: list[float]) -> list[int]:
    """Shares (summing to 1) as whole percentages summing to 100 (largest remainder)."""
    raw = [100.0 * s for s in shares]
    out = [math.floor(r) for r in raw]
    by_remainder = sorted(range(len(raw)), key=lambda i: (out[i] - raw[i], i))
    for i in by_remainder[: max(0, 100 - sum(out))]:
        out[i] += 1
    return out


def assessment_to_table(a: Assessment, *, by: Literal["band", "risk"] = "risk",
                        limit: int | None = None, system: str = "metric") -> str:
    """A readable fixed-width table, worst first (``by`` ``"risk"``, the default order, or
    ``"band"``), with the hazards and the cautions below it, wrapped to :data:`TEXT_WIDTH`
    columns. ``limit`` shows only the first rows; ``system`` ``"metric"`` or ``"imperial"``."""
    rows = a.ranked(by)
    shown = rows if limit is None else rows[:limit]
    head = ("Rank", "Opening", "Floor", "Facade", "Expected band", "Min/Mod/Ser/Life %",
            f"Speed {speed_unit(system)}", f"Drop {length_unit(system)}", "Per year", "Risk")
    body = []
    for o in shown:
        pct = "/".join(str(p) for p in whole_percents([o.bands[n] for n in BANDS]))
        body.append((
            str(o.risk_rank if by == "risk" else o.rank), o.id, str(o.floor), o.facade,
            BANDS[o.expected_band], pct, fmt_speed(o.impact_speed_mps.p50, system, unit=False),
            fmt_length(o.drop_m.p50, system, unit=False), fmt_one_in(o.one_in_n),
            fmt_risk(o.risk),
        ))
    widths = [max(len(h), *(len(r[i]) for r in body)) if body else len(h)
              for i, h in enumerate(head)]
    right = {0, 2, 6, 7, 9}

    def fmt(cells: tuple[str, ...]) -> str:
        return "  ".join(c.rjust(w) if i in right else c.ljust(w)
                         for i, (c, w) in enumerate(zip(cells, widths, strict=True))).rstrip()

    info = a.building.info
    lines = [
        f"{info.name}: {len(a.openings)} openings, {fmt_int(a.samples)} cats sampled (seed "
        f"{a.seed}), {a.model_version}",
        "Ranked by " + ("risk score (the default order)" if by == "risk"
                        else "expected injury band, then likelihood"),
        "",
        fmt(head),
        fmt(tuple("-" * w for w in widths)),
        *(fmt(r) for r in body),
    ]
    if limit is not None and len(rows) > limit:
        lines.append(f"... {len(rows) - limit} more openings")
    hazards = [(o.id, h) for o in shown for h in o.hazards]
    if not rows:
        lines.append("(no openings recorded: nothing to assess)")
    if hazards:
        lines += ["", "Other hazards:"]
        for oid, h in hazards:
            lines += textwrap.wrap(f"{oid}: {explain(h, system)}", TEXT_WIDTH, initial_indent="  ",
                                   subsequent_indent="    ")
    note = ("Speed and drop are medians of the simulated cats; 'Per year' is the chance of a "
            "fall in 12 months, as 1 in N.")
    lines += ["", *textwrap.wrap(note, TEXT_WIDTH), "",
              *textwrap.wrap(CAUTIONS_SHORT, TEXT_WIDTH), ""]
    return "\n".join(lines)


def plan_notes(plan: Plan | None) -> tuple[str, ...]:
    """Every distinct condition of the plan once, in the order the plan first meets them: the
    numbered notes the terminal table and the PDF audit refer to (note 1 is the first)."""
    if plan is None:
        return ()
    return tuple(dict.fromkeys(str(c) for a in plan.actions for c in a.conditions))


def note_numbers(action: Option, notes: tuple[str, ...]) -> tuple[int, ...]:
    """The 1-based numbers in ``notes`` (:func:`plan_notes`) of ``action``'s conditions."""
    number = {c: i + 1 for i, c in enumerate(notes)}
    return tuple(sorted({number[str(c)] for c in action.conditions}))


def plan_to_table(plan: Plan) -> str:
    """A plain-text table for a terminal: summary, one line per action with the numbers of its
    conditions, each condition once as a numbered note below, then the cautions; prose wrapped
    to :data:`TEXT_WIDTH` columns."""
    cur = plan.currency
    share = plan.risk_removed / plan.risk_before if plan.risk_before > 0 else 0.0
    lines = [
        f"Fix plan: budget {fmt_money(plan.budget, cur)}, cost {fmt_money(plan.total_cost, cur)}"
        f", {fmt_count(len(plan.actions), 'action')}",
        f"Risk score {fmt_risk(plan.risk_before)} -> {fmt_risk(plan.risk_after)} "
        f"({fmt_percent(share)} removed)",
    ]
    if plan.gap > 0:
        lines.append(f"The solver stopped at its time limit: this plan is within "
                     f"{fmt_percent(plan.gap, 2)} of the best possible.")
    lines.append("")
    if plan.actions:
        notes = plan_notes(plan)
        rows = [(a.opening_id, a.control_name, fmt_money(a.cost), fmt_risk(a.risk_before),
                 fmt_risk(a.risk_after), ",".join(str(n) for n in note_numbers(a, notes)) or "-")
                for a in plan.actions]
        # a two-line head keeps the columns narrow: "Risk" over "before" and "after"
        over = ("", "", "", "Risk", "Risk", "")
        head = ("Opening", "Control", "Cost", "before", "after", "Notes")
        widths = [max(len(h), len(o), *(len(r[i]) for r in rows))
                  for i, (h, o) in enumerate(zip(head, over, strict=True))]
        # the control's name wraps within what the other columns leave of the text width
        room = TEXT_WIDTH - sum(widths) + widths[1] - 2 * (len(head) - 1)
        widths[1] = max(min(widths[1], room), len(head[1]), 16)

        def line(cells: tuple[str, ...]) -> str:
            return "  ".join(c.ljust(w) if i in (0, 1, 5) else c.rjust(w)
                             for i, (c, w) in enumerate(zip(cells, widths, strict=True))
                             ).rstrip()

        lines += [line(over), line(head), line(tuple("-" * w for w in widths))]
        for row in rows:
            name = textwrap.wrap(row[1], widths[1]) or [""]
            lines.append(line((row[0], name[0], *row[2:])))
            lines += [line(("", more, "", "", "", "")) for more in name[1:]]
        if notes:
            lines += ["", "Notes (the conditions of the fixes above):"]
            for i, c in enumerate(notes, start=1):
                lines += textwrap.wrap(c, TEXT_WIDTH, initial_indent=f"{i:>3}. ",
                                       subsequent_indent="     ")
    else:
        lines.append("No action fits the budget or lowers the risk.")
    lines.append("")
    lines.append("Cautions:")
    for c in CAUTIONS:
        lines += textwrap.wrap(c, TEXT_WIDTH, initial_indent="- ", subsequent_indent="  ")
    return "\n".join(lines) + "\n"
