"""What became of each recommended fix: records kept in the building file (``Building.fixes``).

A record names an opening, a control of the control catalogue, a status (recommended, approved,
fitted, checked, declined), the date of that status and a note. The plan's recommendations are
recorded with :func:`record_plan`; :func:`set_fix_status` moves one on. At the next audit,
:func:`apply_fitted` turns every fitted (or checked) fix into the opening's barrier: the
control's effect (:meth:`petfall_audit.fixes.Control.apply`) is written into the opening's
fields, so the new audit assesses the building as it now is.

Pure functions on immutable buildings: each returns a new :class:`Building`.
"""

from __future__ import annotations

import dataclasses
from collections.abc import Iterable
from dataclasses import dataclass

from petfall_audit.fixes import Catalogue, Option, load_catalogue
from petfall_audit.model import FIX_STATUSES_IN_PLACE, Building, FixRecord, FixStatus, Opening
from petfall_audit.plan import Plan

__all__ = ["NotApplied", "record_plan", "set_fix_status", "latest_records", "apply_fitted",
           "apply_plan"]


@dataclass(frozen=True, slots=True)
class NotApplied:
    """A fitted fix :func:`apply_fitted` could not turn into a barrier, and why."""

    record: FixRecord
    reason: str


def _key(r: FixRecord) -> tuple[str, str]:
    return (r.opening_id, r.control_id)


def latest_records(building: Building) -> dict[tuple[str, str], FixRecord]:
    """The last record of each (opening id, control id), in recorded order."""
    out: dict[tuple[str, str], FixRecord] = {}
    for r in building.fixes:
        out[_key(r)] = r
    return out


def record_plan(building: Building, actions: Plan | Iterable[Option], *, date: str = "",
                note: str = "") -> Building:
    """``building`` with a ``recommended`` record for every action of the plan (or every
    option given) that has no record yet; existing records are kept as they are."""
    options = actions.actions if isinstance(actions, Plan) else tuple(actions)
    known = latest_records(building)
    new = [FixRecord(o.opening_id, o.control_id, FixStatus.RECOMMENDED, date, note)
           for o in options if (o.opening_id, o.control_id) not in known]
    return dataclasses.replace(building, fixes=(*building.fixes, *new)) if new else building


def set_fix_status(building: Building, opening_id: str, control_id: str,
                   status: FixStatus | str, *, date: str = "", note: str | None = None
                   ) -> Building:
    """``building`` with the record of ``control_id`` on ``opening_id`` moved to ``status``
    (dated ``date``; ``note`` replaces its note unless ``None``); a new record when there is
    none."""
    st = FixStatus(status)
    fixes = list(building.fixes)
    for i in range(len(fixes) - 1, -1, -1):
        if _key(fixes[i]) == (opening_id, control_id):
            old = fixes[i]
            fixes[i] = dataclasses.replace(old, status=st, date=date,
                                           note=old.note if note is None else note)
            break
    else:
        fixes.append(FixRecord(opening_id, control_id, st, date, note or ""))
    return dataclasses.replace(building, fixes=tuple(fixes))


def apply_fitted(building: Building, catalogue: Catalogue | None = None
                 ) -> tuple[Building, tuple[NotApplied, ...]]:
    """``building`` with every fitted or checked fix written into its opening's fields (the
    control's effect from ``catalogue``, default the shipped one), and the fixes that could not
    be applied (opening gone, control not in the catalogue). A fix that changes no field (e.g.
    tenant guidance) leaves the opening as it is."""
    cat = load_catalogue() if catalogue is None else catalogue
    index = {o.id: i for i, o in enumerate(building.openings)}
    openings: list[Opening] = list(building.openings)
    skipped: list[NotApplied] = []
    for r in latest_records(building).values():
        if r.status not in FIX_STATUSES_IN_PLACE:
            continue
        if r.opening_id not in index:
            skipped.append(NotApplied(r, f"no opening {r.opening_id} in the building"))
            continue
        try:
            control = cat.control(r.control_id)
        except KeyError:
            skipped.append(NotApplied(r, f"no control {r.control_id} in the control catalogue"))
            continue
        i = index[r.opening_id]
        openings[i] = control.apply(openings[i])
    return dataclasses.replace(building, openings=tuple(openings)), tuple(skipped)


def apply_plan(building: Building, plan: Plan | Iterable[Option],
               catalogue: Catalogue | None = None) -> tuple[Building, tuple[Option, ...]]:
    """A what-if: a copy of ``building`` with every action of the plan fitted (the control's
    effect written into its opening), and the actions it leaves out: those that change no field
    (tenant guidance) or that rely on people keeping to them (adherence below 1), whose effect
    an opening's fields cannot show. ``building`` itself is not changed."""
    cat = load_catalogue() if catalogue is None else catalogue
    actions = plan.actions if isinstance(plan, Plan) else tuple(plan)
    index = {o.id: i for i, o in enumerate(building.openings)}
    openings: list[Opening] = list(building.openings)
    left: list[Option] = []
    for a in actions:
        try:
            control = cat.control(a.control_id)
        except KeyError:
            left.append(a)
            continue
        if (a.opening_id not in index or not control.effect or control.adherence < 1.0
                or control.likelihood_multiplier != 1.0):
            left.append(a)
            continue
        i = index[a.opening_id]
        openings[i] = control.apply(openings[i])
    return dataclasses.replace(building, openings=tuple(openings)), tuple(left)
