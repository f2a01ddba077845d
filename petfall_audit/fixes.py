"""The control catalogue and the per-opening options it gives.

A control is data (``resources/controls.json``, editable by the user): where it applies (opening
kinds, floor heights), its effect as changes to an :class:`~petfall_audit.model.Opening`'s
fields (plus an optional likelihood multiplier for controls that change no field, such as tenant
guidance), an indicative cost, the conflict rules that apply to it and its fixed conditions.
The catalogue is read and checked in :mod:`petfall_audit.io.controls`; the conflict rules live
here in code, named by id in the data:

``escape_window``
    On an emergency escape window (``Opening.escape_window``) a control that is not releasable
    (fixed limiter, fixed screen, permanent net) is a conflict and never offered, under every
    code profile; a releasable one is offered with :func:`escape_condition` (the profile's
    escape-window rules, with their clauses).
``wind_load``
    On a floor higher than the catalogue's ``wind_rated_above_m`` (default 18 m): condition
    :data:`WIND_CONDITION`. In a building with a storey at or above the height of the profile's
    rule on attachments to external walls (England: Building Regulations 2010 reg. 7(2), 18 m):
    :func:`attachment_condition` on every floor, since the rule covers the whole building. A
    profile without such a rule adds none.
``exterior_permission``
    Every change to the exterior: condition :data:`PERMISSION_CONDITION`, plus the profile's own
    permission rule where it has one.
``fire_access``
    On an access gallery (usually an escape route): condition :data:`FIRE_ACCESS_CONDITION`.

A window device that cannot be released by hand (``releasable: false`` and a limiter or screen
effect) is offered only on the floors where the code profile allows one
(:meth:`~petfall_audit.code_profile.CodeProfile.allows_non_releasable`; the United States:
above 75 ft, ASTM F2006), with :func:`non_releasable_condition`.

The residual risk of opening *i* under control *c* is ``risk_score(likelihood(modified opening) ×
multiplier, band_probabilities[i])``: a barrier changes the likelihood, never the severity. All
(opening, control) pairs are evaluated as one list. Costs are in the catalogue's currency; heights
in metres above the building's datum.
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass

import numpy as np

from petfall_audit.code_profile import CodeProfile, CodeRule, building_profile, code_profile
from petfall_audit.errors import CatalogueError
from petfall_audit.guard_rules import why_code_compliant_is_not_cat_safe
from petfall_audit.io.controls import (
    BLOCKING_FIELDS,
    CATALOGUE_FORMAT,
    CATALOGUE_VERSION,
    HIERARCHY,
    RULES,
    Catalogue,
    Control,
    load_catalogue,
    parse_catalogue,
)
from petfall_audit.likelihood import assess_likelihood
from petfall_audit.model import (
    WINDOW_KINDS,
    Building,
    Opening,
    OpeningKind,
)
from petfall_audit.risk import Assessment, risk_score

__all__ = [
    "CATALOGUE_FORMAT",
    "CATALOGUE_VERSION",
    "HIERARCHY",
    "RULES",
    "BLOCKING_FIELDS",
    "WIND_CONDITION",
    "PERMISSION_CONDITION",
    "escape_condition",
    "attachment_condition",
    "non_releasable_condition",
    "profile_permission_conditions",
    "FIRE_ACCESS_CONDITION",
    "CatalogueError",
    "Control",
    "Catalogue",
    "Candidate",
    "Option",
    "load_catalogue",
    "parse_catalogue",
    "opening_heights_m",
    "tall_for_attachments",
    "candidates",
    "opening_options",
    "MIN_SHARE",
    "recommend",
    "recommendation_lines",
    "full_fix_cost",
    "DEFAULT_BUDGET_SHARE",
    "default_budget",
]

WIND_CONDITION = (
    "High floor: wind-rated fixings designed by a competent person (the wind load rises with "
    "height; common practice, no source)."
)
#: What every condition that rests on a rule without a clause (the generic profile) adds.
CHECK_LOCALLY = "check the local rule"


def _ref(rule: CodeRule | None) -> str:
    """``" (Approved Document B, volume 1, para 2.8)"`` or, for a missing rule or one that names
    no code, ``" (check the local rule)"``."""
    citation = rule.citation if rule is not None else ""
    return f" ({citation})" if citation else f" ({CHECK_LOCALLY})"


def escape_condition(profile: CodeProfile) -> str:
    """The condition of a releasable device on an emergency escape window under ``profile``:
    it releases by hand without a key or tool and keeps the escape opening, with the profile's
    clauses (none for the generic profile, which says to check locally)."""
    release = profile.rule("escape_release")
    opening = profile.rule("escape_opening")
    cites = [r.citation for r in (release, opening) if r is not None and r.cited]
    tail = f" ({'; '.join(dict.fromkeys(cites))})" if cites else " - check the local rule"
    return (
        "Escape window: the device must release by hand without a key or tool and open the full "
        "escape opening the code requires" + tail + "."
    )


def attachment_condition(profile: CodeProfile) -> str | None:
    """The profile's fire rule for attachments to the external walls of a tall building, as a
    condition (``None`` when the profile has no such rule: none is invented)."""
    rule = profile.rule("attachment_fire")
    if rule is None:
        return None
    return f"Tall building: {rule.text}{_ref(rule)}; this covers nets on every floor."


def non_releasable_condition(profile: CodeProfile) -> str:
    """The condition of a device that cannot be released by hand, where the profile allows it."""
    rule = profile.rule("non_releasable_device")
    text = rule.text if rule is not None else (
        "a device that cannot be released by hand only on a window that is not needed for escape"
    )
    return f"Not releasable by hand: {text}{_ref(rule)}."


def profile_permission_conditions(profile: CodeProfile) -> tuple[str, ...]:
    """The profile's own rules on permission for exterior changes, as conditions."""
    return tuple(
        f"{r.text[:1].upper()}{r.text[1:]}{_ref(r)}." for r in profile.rules_for(
            "exterior_permission")
    )


PERMISSION_CONDITION = (
    "Permission from the owner or the building's governing body (landlord, owners' association, "
    "strata body) before changing the exterior."
)
FIRE_ACCESS_CONDITION = (
    "Access gallery: keep fire-service access, the escape route and smoke vents clear; ask the "
    "fire-safety adviser before enclosing or infilling it."
)


@dataclass(frozen=True, slots=True)
class Option:
    """One control offered for one opening.

    ``cost`` in the catalogue's currency; ``risk_before`` / ``risk_after``: the opening's risk
    score without and with the control (risk-score units of :mod:`petfall_audit.risk`);
    ``conditions``: every condition that goes with it, in plain words. ``catalogue_index``: the
    control's position in the catalogue (tie-breaks).
    """

    opening_id: str
    control_id: str
    control_name: str
    cost: float
    risk_before: float
    risk_after: float
    conditions: tuple[str, ...] = ()
    hierarchy: str = "engineer"
    catalogue_index: int = 0

    @property
    def risk_removed(self) -> float:
        """Risk score the control removes at this opening."""
        return self.risk_before - self.risk_after

    @property
    def share_removed(self) -> float:
        """Share (0..1) of the opening's risk the control removes."""
        return self.risk_removed / self.risk_before if self.risk_before > 0 else 0.0


# --- applicability, conflicts, conditions ------------------------------------------------------


def opening_heights_m(building: Building) -> np.ndarray:
    """Floor height above the datum of each opening, in building order (m, (n,))."""
    elevation = {f.level: f.elevation_m for f in building.floors}
    try:
        return np.array([elevation[o.floor] for o in building.openings], dtype=float)
    except KeyError as exc:
        raise ValueError(
            f"building: an opening is on floor {exc.args[0]}, which is not listed"
        ) from None


@dataclass(frozen=True, slots=True)
class Candidate:
    """An allowed (opening, control) pair before its risk is known.

    ``opening_index`` / ``control_index`` index the building's openings and the catalogue;
    ``modified``: the opening with the control fitted; ``cost`` in the catalogue's currency."""

    opening_index: int
    control_index: int
    modified: Opening
    cost: float
    conditions: tuple[str, ...]


def _window_device_fixed(c: Control) -> bool:
    """A limiter or screen that a person cannot release by hand."""
    return c.releasable is False and any(
        name in ("limiter_gap_mm", "screen") for name, _ in c.effect
    ) and bool(c.kinds & WINDOW_KINDS)


def _applies(
    openings: Sequence[Opening],
    heights_m: np.ndarray,
    catalogue: Catalogue,
    profile: CodeProfile,
) -> np.ndarray:
    """(n, m) mask: control j fits opening i by kind and height, no conflict forbids it, and the
    code profile allows it there (non-releasable window devices)."""
    kinds = np.array([o.kind.value for o in openings], dtype=str)
    escape = np.array([o.escape_window for o in openings], dtype=bool)
    h = np.asarray(heights_m, dtype=float)
    mask = np.zeros((len(openings), len(catalogue.controls)), dtype=bool)
    for j, c in enumerate(catalogue.controls):  # one vectorised column per control
        col = np.isin(kinds, [k.value for k in c.kinds])
        if c.min_height_m is not None:
            col &= h >= c.min_height_m
        if c.max_height_m is not None:
            col &= h <= c.max_height_m
        # never a fixed device or permanent net on an escape window: by the catalogue's rule,
        # and for any limiter, screen or net that is not releasable by hand, rule or not
        blocks_escape = "escape_window" in c.conflicts and c.releasable is False
        blocks_escape |= c.releasable is not True and any(
            name in BLOCKING_FIELDS for name, _ in c.effect
        )
        if blocks_escape:
            col &= ~escape
        if _window_device_fixed(c):
            allowed = [profile.allows_non_releasable(float(x)) for x in h.tolist()]
            col &= np.asarray(allowed, dtype=bool).reshape(h.shape)
        mask[:, j] = col
    return mask


def _conditions(
    o: Opening,
    height_m: float,
    c: Control,
    catalogue: Catalogue,
    profile: CodeProfile,
    *,
    tall_building: bool,
) -> tuple[str, ...]:
    out: list[str] = []
    if "escape_window" in c.conflicts and o.escape_window:
        out.append(escape_condition(profile))
    if _window_device_fixed(c):
        out.append(non_releasable_condition(profile))
    if "wind_load" in c.conflicts:
        if height_m > catalogue.wind_rated_above_m:
            out.append(WIND_CONDITION)
        attachment = attachment_condition(profile)
        if tall_building and attachment is not None:
            out.append(attachment)
    if "fire_access" in c.conflicts and o.kind is OpeningKind.GALLERY:
        out.append(FIRE_ACCESS_CONDITION)
    if "exterior_permission" in c.conflicts:
        out.append(PERMISSION_CONDITION)
        out.extend(profile_permission_conditions(profile))
    out.extend(c.conditions)
    if c.adherence < 1.0:
        out.append(
            f"Counted as kept {c.adherence:.0%} of the time: a rule that relies on people "
            "removes less risk than a fitting."
        )
    return tuple(out)


def tall_for_attachments(top_storey_m: float, profile: CodeProfile) -> bool:
    """Whether a building whose highest storey is ``top_storey_m`` above ground (m) falls under
    the profile's rule on attachments to external walls (``False`` without such a rule)."""
    rule = profile.rule("attachment_fire")
    if rule is None:
        return False
    threshold_m = rule.value_m if rule.value_m is not None else 0.0
    return top_storey_m >= threshold_m - 1e-9


def candidates(
    openings: Sequence[Opening],
    heights_m: Sequence[float] | np.ndarray,
    catalogue: Catalogue,
    *,
    tall_building: bool | None = None,
    profile: CodeProfile | None = None,
) -> list[Candidate]:
    """Every allowed (opening, control) pair that changes something, openings in the order given
    and controls in catalogue order. Conflicting controls are left out; conditions attached.
    ``profile``: the code profile whose rules decide the conditions (default: generic);
    ``tall_building``: the building has a storey at or above the height of the profile's rule on
    attachments (default: judged from ``heights_m``)."""
    prof = code_profile() if profile is None else profile
    h = np.asarray(heights_m, dtype=float)
    if tall_building is None:
        tall_building = bool(h.size) and tall_for_attachments(float(h.max()), prof)
    mask = _applies(openings, h, catalogue, prof)
    out: list[Candidate] = []
    for i, j in zip(*np.nonzero(mask), strict=True):
        o, c = openings[i], catalogue.controls[j]
        modified = c.apply(o)
        if modified == o and c.likelihood_multiplier == 1.0:
            continue  # already in place: nothing to offer
        out.append(
            Candidate(
                int(i),
                int(j),
                modified,
                catalogue.cost(c, o),
                _conditions(
                    o, float(h[i]), c, catalogue, prof, tall_building=tall_building
                ),
            )
        )
    return out


# --- options and recommendations ---------------------------------------------------------------

#: Share of an opening's risk a recommended control must remove, unless none does (see
#: :func:`recommend`).
MIN_SHARE = 0.9
#: Relative tolerance under which a control is taken to remove no risk.
_NO_GAIN_RTOL = 1e-9


def opening_options(
    assessment: Assessment,
    catalogue: Catalogue | None = None,
    profile: CodeProfile | None = None,
) -> dict[str, list[Option]]:
    """Per opening id (building order, every opening present), the allowed options that lower its
    risk, ranked by residual risk, then cost, then catalogue order. Conflicting controls are never
    included. ``profile``: the code profile whose rules decide what is allowed and the conditions
    (default: the one the building names)."""
    cat = load_catalogue() if catalogue is None else catalogue
    building = assessment.building
    prof = building_profile(building) if profile is None else profile
    openings = building.openings
    result: dict[str, list[Option]] = {o.id: [] for o in openings}
    top_m = max((f.elevation_m for f in building.floors), default=0.0)
    tall = tall_for_attachments(top_m, prof)
    cands = candidates(
        openings, opening_heights_m(building), cat, tall_building=tall, profile=prof
    )
    if not cands:
        return result
    oi = np.array([c.opening_index for c in cands], dtype=np.intp)
    ci = np.array([c.control_index for c in cands], dtype=np.intp)
    mult = np.array([cat.controls[j].likelihood_multiplier for j in ci.tolist()])
    adherence = np.array([cat.controls[j].adherence for j in ci.tolist()])
    lik = assess_likelihood([c.modified for c in cands], profile=building.cat_profile)
    p_kept = np.asarray(lik.annual_probability) * mult
    p_now = np.asarray(assessment.likelihood.annual_probability, dtype=float)[oi]
    p_after = adherence * p_kept + (1.0 - adherence) * p_now
    bands = np.asarray(assessment.band_probabilities, dtype=float)
    after = np.asarray(risk_score(p_after, bands[oi]), dtype=float)
    before_all = np.asarray(assessment.risk, dtype=float)
    before = before_all[oi]
    useful = after < before * (1.0 - _NO_GAIN_RTOL)
    cost = np.array([c.cost for c in cands], dtype=float)
    rank = np.lexsort((ci, cost, after, oi))
    for k in rank[useful[rank]].tolist():
        cand, control = cands[k], cat.controls[ci[k]]
        result[openings[cand.opening_index].id].append(
            Option(
                opening_id=openings[cand.opening_index].id,
                control_id=control.id,
                control_name=control.name,
                cost=cand.cost,
                risk_before=float(before[k]),
                risk_after=float(after[k]),
                conditions=cand.conditions,
                hierarchy=control.hierarchy,
                catalogue_index=int(ci[k]),
            )
        )
    return result


def recommend(
    options: Mapping[str, Sequence[Option]], *, min_share: float = MIN_SHARE
) -> dict[str, Option | None]:
    """The recommended option per opening (``None`` where none is offered).

    Rule: among the options that remove at least ``min_share`` of the opening's risk, the one with
    the most risk removed per unit cost (a free option counts as best); if none removes that much,
    the one that removes the most. Ties: lower residual risk, then cheaper, then catalogue order.
    The share floor keeps a token measure (a leaflet) from beating a real barrier on ratio alone.
    """
    if not 0.0 <= min_share <= 1.0:
        raise ValueError(f"min_share must be in [0, 1], got {min_share!r}")
    out: dict[str, Option | None] = {}
    for oid, opts in options.items():
        if not opts:
            out[oid] = None
            continue
        effective = [o for o in opts if o.share_removed >= min_share - 1e-12]
        if effective:

            def ratio(o: Option) -> float:
                return math.inf if o.cost <= 0 else o.risk_removed / o.cost

            out[oid] = min(
                effective, key=lambda o: (-ratio(o), o.risk_after, o.cost, o.catalogue_index)
            )
        else:
            out[oid] = min(opts, key=lambda o: (o.risk_after, o.cost, o.catalogue_index))
    return out


def full_fix_cost(options: Mapping[str, Sequence[Option]]) -> float:
    """What fitting every opening's most effective option costs together (the catalogue's
    currency): beyond it more money removes no more risk. Ties: the cheaper option."""
    total = 0.0
    for opts in options.values():
        if opts:
            total += float(min(opts, key=lambda o: (-o.risk_removed, o.cost)).cost)
    return total


#: Share of :func:`full_fix_cost` proposed as the budget until one is set for the audit.
DEFAULT_BUDGET_SHARE = 0.05


def default_budget(options: Mapping[str, Sequence[Option]]) -> float:
    """The budget proposed until one is set: :data:`DEFAULT_BUDGET_SHARE` of
    :func:`full_fix_cost`, rounded up to hundreds (0 when nothing can be fixed). The app's fix
    plan view and its exports propose this one."""
    return float(math.ceil(DEFAULT_BUDGET_SHARE * full_fix_cost(options) / 100.0) * 100.0)


def recommendation_lines(
    opening: Opening,
    option: Option | None,
    *,
    currency: str = "EUR",
    code: CodeProfile | None = None,
) -> list[str]:
    """Plain-language recommendation for one opening: the control, its cost and residual risk,
    its conditions, and why a code-compliant guard or window is not enough for a cat (with the
    code and clause of each human rule of the code profile ``code``; default: generic)."""
    lines: list[str] = []
    if option is None:
        lines.append(f"{opening.id}: no control in the catalogue applies or lowers the risk here.")
    else:
        lines.append(
            f"{opening.id}: {option.control_name} - about {option.cost:,.0f} {currency}; risk "
            f"{option.risk_before:.3g} -> {option.risk_after:.3g} "
            f"({option.share_removed:.0%} less)."
        )
        lines.extend(f"Condition: {c}" for c in option.conditions)
    reasons = why_code_compliant_is_not_cat_safe(opening, code=code)
    if reasons:
        lines.append("Why meeting the building code is not enough for a cat:")
        lines.extend(f"- {r}" for r in reasons)
    return lines
