"""Re-audits: two audits of one building compared opening by opening.

:func:`compare_buildings` assesses an earlier and a later building with the **same samples and
seed** (common random numbers: every opening of both audits meets the same simulated cats), so a
difference between the two results is a difference of the buildings, never of the draw.

Matching: openings are paired by id; ``renamed`` maps an earlier id to the later id of the same
opening (an opening renumbered between the audits). Each later opening is

- ``added``: no earlier opening pairs with it;
- ``removed`` (listed after the later ones, in the earlier order): an earlier opening that no
  later one pairs with;
- ``changed``: one of its fields (:data:`OPENING_FIELDS`), the elevation of its floor
  (``floor_elevation_m``) or the surfaces in front of its facade (``surfaces_below``) changed;
  or none did but its result did, because of something around it (``surroundings``: an opening
  below that catches falls, the cat profile, the injury thresholds, the site);
- ``unchanged`` otherwise (its result is then the same to the last digit).

Where the risk went, and what the fixes did (the method). ``R_before`` is the summed risk score
of the earlier audit, ``R_after`` of the later one. The *counterfactual* is the earlier building
with only the barrier changes applied: every paired opening takes the later values of the
fields a control fits (:data:`BARRIER_FIELDS`: nets, screens, limiters, infill, rail caps,
climbing aids), nothing else changes. A barrier changes the likelihood of a fall, never where a
cat lands or how hard (the physics does not read those fields; the plan's options are costed the
same way, :mod:`petfall_audit.fixes`), so its risk is the earlier band probabilities with the
likelihood of the counterfactual openings. With ``R_cf`` its summed risk::

    removed by barrier changes (fitted fixes)  = R_before - R_cf
    removed by every other change              = R_cf - R_after
    the two add up to R_before - R_after

per opening likewise (a removed opening's whole risk and an added one's, negative, count as
"other"). A barrier taken away between the audits shows as a negative amount removed. How often
an opening is opened (``open_frequency``) is use, not a fitting, and counts as "other".

Doubts (:attr:`Comparison.doubts`): signs that the two files may not be audits of one building,
which the comparison still makes but every output names: ``"no_common_openings"`` (both audits
have openings and none pairs, so every opening reads as added or removed),
``"different_address"`` (both give an address and they differ in more than case, spacing and
punctuation) and ``"different_name"`` (the buildings' names differ likewise); and a sign that
the two are given the other way round: ``"dates_reversed"`` (the earlier audit is dated after
the later one).

Renumbered openings (:func:`renumbered_openings`): an earlier opening left unpaired and a later
one left unpaired that sit at the same place (same floor, facade and kind, left edge and width
within :data:`SAME_PLACE_M`), each the only such match of the other, are most likely one opening
renumbered. They are only suggested: the comparison pairs them when ``renamed`` says so.

Which recorded fixes were fitted: the later building's fix records (``Building.fixes``) with
status ``fitted`` or ``checked`` are named on their opening (:attr:`OpeningComparison.fitted`).

Units: risk in the risk-score units of :func:`petfall_audit.risk.risk_score`; lengths in metres
(``_m``) or millimetres (``_mm``) as the field names say.
"""

from __future__ import annotations

import bisect
import dataclasses
import datetime
import math
from collections.abc import Callable, Mapping
from dataclasses import dataclass
from enum import Enum
from typing import Any, Literal

import numpy as np

from petfall_audit.fix_tracking import latest_records
from petfall_audit.io.controls import EFFECT_FIELDS
from petfall_audit.likelihood import assess_likelihood
from petfall_audit.model import FIX_STATUSES_IN_PLACE, Building, FixRecord, Opening, Surface
from petfall_audit.risk import Assessment, OpeningResult, assess, risk_score
from petfall_audit.sampling import DEFAULT_SAMPLES, DEFAULT_SEED

__all__ = [
    "STATUSES",
    "DOUBTS",
    "OPENING_FIELDS",
    "BARRIER_FIELDS",
    "FieldChange",
    "OpeningComparison",
    "Comparison",
    "compare_buildings",
    "compare_assessments",
    "renumbered_openings",
    "audit_doubts",
    "SAME_PLACE_M",
    "field_unit",
    "fitted_records",
]

Status = Literal["added", "removed", "changed", "unchanged"]
#: The statuses of a compared opening.
STATUSES: tuple[Status, ...] = ("added", "removed", "changed", "unchanged")
Doubt = Literal["no_common_openings", "different_address", "different_name", "dates_reversed"]
#: Signs that two compared audits may not be of one building, or are the other way round
#: (module docstring).
DOUBTS: tuple[Doubt, ...] = ("no_common_openings", "different_address", "different_name",
                             "dates_reversed")
#: Fields of an opening compared between two audits (its id pairs them; notes and photos are
#: records, not the opening's state).
OPENING_FIELDS: tuple[str, ...] = tuple(
    f.name for f in dataclasses.fields(Opening) if f.name not in ("id", "notes", "photos")
)
#: Fields a fitted control changes (a fix), as opposed to changes of use or of the building.
BARRIER_FIELDS: frozenset[str] = frozenset(EFFECT_FIELDS) - {"open_frequency"}
#: Distance (m) within which two openings' left edges and widths count as the same place.
SAME_PLACE_M = 0.05
#: Relative difference of risk below which two results are the same.
_SAME_RTOL = 1e-9


def field_unit(name: str) -> str:
    """The unit a compared field's values are in: ``"m"``, ``"mm"`` or ``""`` (none)."""
    if name.endswith("_mm"):
        return "mm"
    if name.endswith("_m"):
        return "m"
    return ""


@dataclass(frozen=True, slots=True)
class FieldChange:
    """One field that differs: ``old`` and ``new`` values (SI or file values: enums as their
    file value, ``None`` for "none") and their ``unit`` (see :func:`field_unit`)."""

    field: str
    old: Any
    new: Any
    unit: str = ""


@dataclass(frozen=True, slots=True)
class OpeningComparison:
    """One opening of either audit.

    ``id``: its later id (the earlier one for a removed opening); ``earlier_id``: its earlier id
    (``None`` when added). ``before`` / ``after``: its result in the earlier / later audit
    (``None`` where it does not exist). ``removed_by_fixes`` / ``removed_by_other``: the risk
    (score units) removed by barrier changes and by every other change (module docstring);
    negative when risk grew. ``fitted``: control ids of the later file's fitted fix records.
    """

    id: str
    earlier_id: str | None
    status: Status
    changes: tuple[FieldChange, ...]
    before: OpeningResult | None
    after: OpeningResult | None
    removed_by_fixes: float = 0.0
    removed_by_other: float = 0.0
    fitted: tuple[str, ...] = ()

    @property
    def risk_before(self) -> float | None:
        return None if self.before is None else self.before.risk

    @property
    def risk_after(self) -> float | None:
        return None if self.after is None else self.after.risk

    @property
    def risk_change(self) -> float:
        """Later minus earlier risk (a missing side counts as 0); negative = better."""
        return (self.risk_after or 0.0) - (self.risk_before or 0.0)

    @property
    def change_names(self) -> tuple[str, ...]:
        return tuple(c.field for c in self.changes)


@dataclass(frozen=True, slots=True)
class Comparison:
    """Two audits compared (see the module docstring for the method).

    ``openings``: later openings in building order, then the removed ones. ``building_changes``:
    what changed outside the openings (floors, facades, surfaces, site, cat profile, injury
    thresholds). Totals in risk-score units. ``renumbered``: (earlier id, later id) of openings
    that look renumbered but were not paired (:func:`renumbered_openings`), a suggestion.
    """

    earlier: Assessment
    later: Assessment
    openings: tuple[OpeningComparison, ...]
    building_changes: tuple[FieldChange, ...]
    risk_before: float
    risk_after: float
    removed_by_fixes: float
    removed_by_other: float
    renumbered: tuple[tuple[str, str], ...] = ()

    @property
    def samples(self) -> int:
        return self.later.samples

    @property
    def seed(self) -> int:
        return self.later.seed

    @property
    def risk_removed(self) -> float:
        """Summed risk the later audit has less than the earlier (negative: more)."""
        return self.risk_before - self.risk_after

    def share(self, amount: float) -> float | None:
        """``amount`` as a share of the earlier risk (``None`` when the earlier risk is 0)."""
        return amount / self.risk_before if self.risk_before > 0 else None

    @property
    def share_removed(self) -> float | None:
        return self.share(self.risk_removed)

    @property
    def share_by_fixes(self) -> float | None:
        return self.share(self.removed_by_fixes)

    @property
    def share_by_other(self) -> float | None:
        return self.share(self.removed_by_other)

    @property
    def doubts(self) -> tuple[Doubt, ...]:
        """Signs that the two audits may not be of one building or are the other way round,
        in :data:`DOUBTS` order (:func:`audit_doubts`, the openings as this comparison paired
        them)."""
        return audit_doubts(self.earlier.building, self.later.building,
                            paired=bool(self.with_status("changed", "unchanged")))

    def with_status(self, *statuses: Status) -> list[OpeningComparison]:
        return [o for o in self.openings if o.status in statuses]

    def worst_first(self) -> list[OpeningComparison]:
        """Openings that are not unchanged, the largest rise of risk first, then the smallest
        fall; ties by id."""
        moved = [o for o in self.openings if o.status != "unchanged"]
        return sorted(moved, key=lambda o: (-o.risk_change, o.id))

    def opening(self, opening_id: str) -> OpeningComparison:
        for o in self.openings:
            if o.id == opening_id:
                return o
        raise KeyError(opening_id)


# --- comparing -------------------------------------------------------------------------------


def audit_doubts(earlier: Building, later: Building, *, paired: bool | None = None
                 ) -> tuple[Doubt, ...]:
    """Signs that ``earlier`` and ``later`` may not be audits of one building, or are the other
    way round, in :data:`DOUBTS` order (module docstring). ``paired``: whether any opening of
    the two pairs (default: any opening id in both)."""
    if paired is None:
        paired = bool({o.id for o in earlier.openings} & {o.id for o in later.openings})
    out: list[Doubt] = []
    if earlier.openings and later.openings and not paired:
        out.append("no_common_openings")
    a0, a1 = _address_key(earlier.info.address), _address_key(later.info.address)
    if a0 and a1 and a0 != a1:
        out.append("different_address")
    n0, n1 = _address_key(earlier.info.name), _address_key(later.info.name)
    if n0 and n1 and n0 != n1:
        out.append("different_name")
    d0, d1 = _date(earlier.info.audit_date), _date(later.info.audit_date)
    if d0 is not None and d1 is not None and d0 > d1:
        out.append("dates_reversed")
    return tuple(out)


def _date(text: str) -> datetime.date | None:
    """An audit date (ISO 8601 text), or ``None`` when it is empty or not a date."""
    try:
        return datetime.date.fromisoformat(text)
    except ValueError:
        return None


def _address_key(address: str) -> str:
    """An address or name without case, spacing or punctuation ("7 Tallowmere St." =
    "7 tallowmere st")."""
    return "".join(ch for ch in address.casefold() if ch.isalnum())


def _value(v: Any) -> Any:
    """A field value as written in a file (enums as their value, tuples as lists)."""
    if isinstance(v, Enum):
        return v.value
    return list(v) if isinstance(v, tuple) else v


def _differs(a: Any, b: Any) -> bool:
    if isinstance(a, float) and isinstance(b, float):
        return not (a == b or (math.isnan(a) and math.isnan(b)))
    return bool(a != b)


def _field_changes(old: object, new: object, names: tuple[str, ...],
                   prefix: str = "") -> list[FieldChange]:
    out = []
    for name in names:
        a, b = getattr(old, name), getattr(new, name)
        if _differs(a, b):
            out.append(FieldChange(prefix + name, _value(a), _value(b), field_unit(name)))
    return out


def _surfaces_below(b: Building, facade: str) -> tuple[Surface, ...]:
    return tuple(s for s in b.surfaces if s.facade in (None, facade))


def _elevation(b: Building, level: int) -> float | None:
    try:
        return b.floor(level).elevation_m
    except KeyError:
        return None


def _opening_changes(e: Building, eo: Opening, later: Building, lo: Opening) -> list[FieldChange]:
    out = _field_changes(eo, lo, OPENING_FIELDS)
    z0, z1 = _elevation(e, eo.floor), _elevation(later, lo.floor)
    if _differs(z0, z1):
        out.append(FieldChange("floor_elevation_m", z0, z1, "m"))
    s0, s1 = _surfaces_below(e, eo.facade), _surfaces_below(later, lo.facade)
    if s0 != s1:
        out.append(FieldChange("surfaces_below", [s.id for s in s0], [s.id for s in s1]))
    return out


def _by_id_changes(kind: str, old: tuple[Any, ...], new: tuple[Any, ...],
                   key: Callable[[Any], Any]) -> list[FieldChange]:
    """Items of a building list (floors, facades, surfaces) added, removed or changed."""
    a = {key(x): x for x in old}
    b = {key(x): x for x in new}
    out: list[FieldChange] = []
    for k in [*a, *(k for k in b if k not in a)]:
        if k not in b:
            out.append(FieldChange(f"{kind}[{k}]", "present", None))
        elif k not in a:
            out.append(FieldChange(f"{kind}[{k}]", None, "present"))
        else:
            names = tuple(f.name for f in dataclasses.fields(a[k]))
            out.extend(_field_changes(a[k], b[k], names, prefix=f"{kind}[{k}]."))
    return out


def _building_changes(e: Building, later: Building) -> list[FieldChange]:
    out = _field_changes(e.info, later.info, ("site_altitude_m", "air_temperature_c"))
    out += _by_id_changes("floors", e.floors, later.floors, lambda f: f.level)
    out += _by_id_changes("facades", e.facades, later.facades, lambda f: f.id)
    out += _by_id_changes("surfaces", e.surfaces, later.surfaces, lambda s: s.id)
    if e.cat_profile != later.cat_profile:
        out.append(FieldChange("cat_profile", e.cat_profile.preset or "custom",
                               later.cat_profile.preset or "custom"))
    names = tuple(f.name for f in dataclasses.fields(e.injury))
    out += _field_changes(e.injury, later.injury, names, prefix="injury.")
    return out


def _latest(b: Building) -> list[FixRecord]:
    return list(latest_records(b).values())


def fitted_records(c: Comparison) -> list[FixRecord]:
    """The later audit's fixes recorded as fitted or checked (their latest record)."""
    return [r for r in _latest(c.later.building) if r.status in FIX_STATUSES_IN_PLACE]


def _same_result(a: OpeningResult, b: OpeningResult) -> bool:
    scale = max(abs(a.risk), abs(b.risk), 1e-300)
    return (abs(a.risk - b.risk) <= _SAME_RTOL * scale and a.expected_band == b.expected_band
            and all(abs(a.bands[k] - b.bands[k]) <= _SAME_RTOL for k in a.bands))


def _with_barriers(eo: Opening, lo: Opening) -> Opening:
    """The earlier opening with the later one's barrier fields (the counterfactual)."""
    return dataclasses.replace(eo, **{n: getattr(lo, n) for n in sorted(BARRIER_FIELDS)})


def compare_assessments(earlier: Assessment, later: Assessment, *,
                        renamed: Mapping[str, str] | None = None) -> Comparison:
    """Compare two assessments made with the same samples and seed (``ValueError`` if not).

    ``renamed``: earlier id -> later id of openings renumbered between the audits."""
    if (earlier.samples, earlier.seed) != (later.samples, later.seed):
        raise ValueError(
            "the two audits must be assessed with the same samples and seed to be compared "
            f"(got {earlier.samples}/{earlier.seed} and {later.samples}/{later.seed})"
        )
    e_b, l_b = earlier.building, later.building
    rename = dict(renamed or {})
    unknown = sorted(k for k in rename if k not in {o.id for o in e_b.openings})
    if unknown:
        raise ValueError(f"renamed: no earlier opening called {', '.join(unknown)}")
    later_ids = {o.id for o in l_b.openings}
    missing = sorted(v for v in rename.values() if v not in later_ids)
    if missing:
        raise ValueError(f"renamed: no later opening called {', '.join(missing)}")
    to_later = {o.id: rename.get(o.id, o.id) for o in e_b.openings}
    pairs: dict[str, list[str]] = {}
    for k, v in to_later.items():
        pairs.setdefault(v, []).append(k)
    twice = sorted(v for v, ks in pairs.items() if len(ks) > 1 and v in later_ids)
    if twice:
        v = twice[0]
        raise ValueError(f"renamed: two earlier openings ({' and '.join(pairs[v])}) would pair "
                         f"with the later opening {v}; rename the other one too, or pair it "
                         "with another id")
    from_later = {v: k for k, v in to_later.items() if v in later_ids}
    e_index = {o.id: i for i, o in enumerate(e_b.openings)}

    # the counterfactual: the earlier building with the later barriers, earlier bands
    cf_openings = list(e_b.openings)
    for lo in l_b.openings:
        eid = from_later.get(lo.id)
        if eid is not None:
            i = e_index[eid]
            cf_openings[i] = _with_barriers(cf_openings[i], lo)
    lik = assess_likelihood(cf_openings, profile=e_b.cat_profile)
    cf_risk = np.asarray(risk_score(lik.annual_probability, earlier.band_probabilities), float)
    fitted: dict[str, list[str]] = {}
    for rec in _latest(l_b):
        if rec.status in FIX_STATUSES_IN_PLACE:
            fitted.setdefault(rec.opening_id, []).append(rec.control_id)

    rows: list[OpeningComparison] = []
    for lo in l_b.openings:
        after = later.result(lo.id)
        eid = from_later.get(lo.id)
        fits = tuple(fitted.get(lo.id, ()))
        if eid is None:
            rows.append(OpeningComparison(lo.id, None, "added", (), None, after,
                                          0.0, -after.risk, fits))
            continue
        eo = e_b.openings[e_index[eid]]
        before = earlier.result(eid)
        changes = _opening_changes(e_b, eo, l_b, lo)
        same = _same_result(before, after)
        if not changes and not same:
            changes = [FieldChange("surroundings", None, None)]
        status: Status = "changed" if changes else "unchanged"
        cf = float(cf_risk[e_index[eid]])
        by_fix = _without_noise(before.risk - cf, before.risk, after.risk)
        by_other = _without_noise(cf - after.risk, before.risk, after.risk)
        if status == "unchanged":
            by_fix = by_other = 0.0
        rows.append(OpeningComparison(lo.id, eid, status, tuple(changes), before, after,
                                      by_fix, by_other, fits))
    for eo in e_b.openings:
        if to_later[eo.id] not in later_ids:
            before = earlier.result(eo.id)
            rows.append(OpeningComparison(eo.id, eo.id, "removed", (), before, None,
                                          0.0, before.risk))
    risk_before = float(np.sum(earlier.risk))
    risk_after = float(np.sum(later.risk))
    by_fixes = float(sum(r.removed_by_fixes for r in rows))
    return Comparison(
        earlier=earlier,
        later=later,
        openings=tuple(rows),
        building_changes=tuple(_building_changes(e_b, l_b)),
        risk_before=risk_before,
        risk_after=risk_after,
        removed_by_fixes=by_fixes,
        removed_by_other=_without_noise((risk_before - risk_after) - by_fixes,
                                        risk_before, risk_after),
        renumbered=tuple(renumbered_openings(e_b, l_b, renamed=rename).items()),
    )


#: Relative size below which a difference of risk sums is the sums' rounding, not a change.
_NOISE_REL = 1e-9


def _without_noise(amount: float, *scale: float) -> float:
    """``amount`` (a difference of risk sums, score units), or 0 where it is no larger than
    their floating-point rounding (:data:`_NOISE_REL` of the largest of ``scale``): "every
    other change added 3.18e-11" is no change."""
    limit = _NOISE_REL * max((abs(x) for x in scale), default=0.0)
    return 0.0 if abs(amount) <= limit else amount


def _place(o: Opening) -> tuple[int, str, str]:
    return (o.floor, o.facade, str(o.kind))


def renumbered_openings(earlier: Building, later: Building, *,
                        renamed: Mapping[str, str] | None = None) -> dict[str, str]:
    """Earlier id -> later id of openings that look renumbered between the audits: an earlier
    opening that pairs with none (by id or ``renamed``) and a later one that pairs with none,
    on the same floor, facade and kind, with left edge and width within :data:`SAME_PLACE_M`
    of each other, each the other's only such match. In earlier building order. Openings are
    only compared within their floor, facade and kind, so a large building stays quick."""
    rename = dict(renamed or {})
    later_ids = {o.id for o in later.openings}
    taken = {rename.get(o.id, o.id) for o in earlier.openings} & later_ids
    lone_e = [o for o in earlier.openings if rename.get(o.id, o.id) not in later_ids]
    groups: dict[tuple[int, str, str], tuple[list[Opening], list[Opening]]] = {}
    for o in lone_e:
        groups.setdefault(_place(o), ([], []))[0].append(o)
    for o in later.openings:
        if o.id not in taken and _place(o) in groups:
            groups[_place(o)][1].append(o)

    def near(a: Opening, among: list[Opening], xs: list[float]) -> list[Opening]:
        """The openings of ``among`` (sorted by left edge ``xs``) at ``a``'s place."""
        lo = bisect.bisect_left(xs, a.x_m - SAME_PLACE_M)
        hi = bisect.bisect_right(xs, a.x_m + SAME_PLACE_M)
        return [b for b in among[lo:hi] if abs(a.width_m - b.width_m) <= SAME_PLACE_M]

    found: dict[str, str] = {}
    for olds, news in groups.values():
        olds.sort(key=lambda o: o.x_m)
        news.sort(key=lambda o: o.x_m)
        old_xs, new_xs = [o.x_m for o in olds], [o.x_m for o in news]
        for a in olds:
            matches = near(a, news, new_xs)
            if len(matches) == 1 and len(near(matches[0], olds, old_xs)) == 1:
                found[a.id] = matches[0].id
    return {o.id: found[o.id] for o in lone_e if o.id in found}


def compare_buildings(
    earlier: Building,
    later: Building,
    *,
    renamed: Mapping[str, str] | None = None,
    samples: int = DEFAULT_SAMPLES,
    seed: int = DEFAULT_SEED,
    progress: Callable[[int, int], None] | None = None,
) -> Comparison:
    """Assess ``earlier`` and ``later`` with the same ``samples`` and ``seed`` and compare them
    opening by opening (module docstring). ``progress(done, total)`` over both assessments."""

    def part(offset: int, total: int) -> Callable[[int, int], None] | None:
        if progress is None:
            return None
        return lambda done, n: progress(offset + done, total)

    n0, n1 = len(earlier.openings), len(later.openings)
    a0 = assess(earlier, samples=samples, seed=seed, progress=part(0, n0 + n1))
    a1 = assess(later, samples=samples, seed=seed, progress=part(n0, n0 + n1))
    return compare_assessments(a0, a1, renamed=renamed)
