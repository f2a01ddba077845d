"""The report service: an assessment and a plan turned into plain strings and numbers.

Layout code (``sections``, ``charts``, ``leaflet``) only places what this module returns; every
number is formatted here, through :mod:`petfall_audit.present`. Strings are plain text (user text
untouched); the layout escapes them. Units: speeds in m/s (0.1), heights in m (0.1) (the
tables' headers name the unit), costs to the unit of the plan's currency.
"""

from __future__ import annotations

import datetime as _dt
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field, replace
from pathlib import Path
from typing import TYPE_CHECKING, Any

from petfall_audit.cautions import CAUTIONS, CAUTIONS_SHORT
from petfall_audit.code_profile import CodeProfile, building_profile
from petfall_audit.io.photos import photo_file, photo_name
from petfall_audit.model import (
    Building,
    CatProfile,
    Distribution,
    Fixed,
    InjuryThresholds,
    LogNormal,
    Normal,
    Uniform,
)
from petfall_audit.present import (
    DRAG_AREA_NOTE,
    PARAMETER_LABELS,
    fmt_count,
    fmt_date,
    fmt_int,
    fmt_length,
    fmt_money,
    fmt_number,
    fmt_one_in,
    fmt_percent,
    fmt_risk,
    fmt_speed,
    kind_label,
    preset_label,
)
from petfall_audit.present.code import CodeRuleRow, code_profile_lead, code_rule_rows
from petfall_audit.present.explain import explain_all
from petfall_audit.present.labels import landing_names
from petfall_audit.present.tables import note_numbers, plan_notes
from petfall_audit.report.leaflet_sections import (
    LeafletChoice,
    LeafletSection,
    default_sections,
)

if TYPE_CHECKING:
    from petfall_audit.compare import Comparison
    from petfall_audit.plan import Plan
    from petfall_audit.risk import Assessment

__all__ = [
    "ContactBlock",
    "ReportOptions",
    "RankedRow",
    "PlanRow",
    "PlanControlRow",
    "DetailContext",
    "CodeRuleRow",
    "NoteRow",
    "PhotoRef",
    "AuditContext",
    "LeafletContext",
    "SensitivityContext",
    "build_sensitivity_context",
    "build_audit_context",
    "build_leaflet_context",
]

# --- options ------------------------------------------------------------------------------------


@dataclass(frozen=True, slots=True)
class ContactBlock:
    """Who issues a leaflet or report: shown literally, empty fields left out. The keys match
    the app's contact settings (organisation, person, phone, email, website, note)."""

    organisation: str = ""
    person: str = ""
    address: str = ""
    phone: str = ""
    email: str = ""
    website: str = ""
    note: str = ""

    @classmethod
    def from_text(cls, text: str) -> ContactBlock:
        """A contact from free text: the first line is the organisation, the rest the address
        block (a literal ``\\n`` or ``|`` also breaks lines, for the command line)."""
        parts = [p.strip() for p in text.replace("\\n", "\n").replace("|", "\n").splitlines()]
        parts = [p for p in parts if p]
        if not parts:
            return cls()
        return cls(organisation=parts[0], address="\n".join(parts[1:]))

    @classmethod
    def from_mapping(cls, values: Mapping[str, str]) -> ContactBlock:
        """A contact from a mapping such as the app's contact settings; unknown keys ignored."""
        known = {k: str(v) for k, v in values.items() if k in cls.__dataclass_fields__}
        return cls(**known)

    def lines(self) -> tuple[str, ...]:
        """Non-empty lines, organisation first."""
        vals = [self.organisation, self.person, *self.address.splitlines(), self.phone,
                self.email, self.website, *self.note.splitlines()]
        return tuple(v for v in (x.strip() for x in vals) if v)

    @property
    def is_empty(self) -> bool:
        return not self.lines()


@dataclass(frozen=True, slots=True)
class ReportOptions:
    """Options of the audit report. ``generated_on``: ISO date, default today. ``scope``: free
    text; a default scope sentence is written when empty. ``photo_root``: see below."""

    top_n: int = 5
    scope: str = ""
    palette: str = "standard"
    generated_on: str = ""
    issuer: ContactBlock = field(default_factory=ContactBlock)
    #: Folder of the building file: the openings' photo paths are relative to it. ``None``
    #: (not known): each photo is listed as not found.
    photo_root: Path | None = None
    #: At most this many cats per simulation of the sensitivity section (``None``: as many as
    #: the assessment); ``0`` leaves the section out.
    sensitivity_samples: int | None = None
    #: The plan's budget is a default the app proposed, not one set for this audit.
    budget_is_default: bool = False
    #: This audit compared with an earlier one (:func:`petfall_audit.compare.compare_assessments`,
    #: the later side this audit): adds the section "Since the earlier audit".
    comparison: Comparison | None = None
    #: This audit compared with its building after the plan (a what-if, the later side):
    #: adds the section "After the plan (what-if)".
    what_if: Comparison | None = None


# --- formatting ---------------------------------------------------------------------------------


def _bare_length(x_m: float) -> str:
    """A length in a table whose header names the unit (m, to 0.1)."""
    return fmt_length(x_m, unit=False)


def _bare_speed(v_mps: float) -> str:
    """A speed in a table whose header names the unit (m/s, to 0.1)."""
    return fmt_speed(v_mps, unit=False)


def _dist_text(d: Distribution, unit: str, digits: int = 2) -> str:
    def n(x: float) -> str:
        return fmt_number(x, digits)

    if isinstance(d, Fixed):
        return f"{n(d.value)} {unit}".strip()
    if isinstance(d, Normal):
        return f"normal, mean {n(d.mean)} {unit}, sd {n(d.sd)}".replace("  ", " ")
    if isinstance(d, LogNormal):
        return f"log-normal, mean {n(d.mean)} {unit}, sd {n(d.sd)}".replace("  ", " ")
    if isinstance(d, Uniform):
        return f"uniform {n(d.min)}–{n(d.max)} {unit}".strip()
    return str(d)


# --- rows ---------------------------------------------------------------------------------------


@dataclass(frozen=True, slots=True)
class RankedRow:
    """One line of the ranked table. ``band`` indexes ``injury.BANDS``."""

    rank: str
    floor: str
    opening_id: str
    kind: str
    drop_m: str
    v_p5: str
    v_p50: str
    v_p95: str
    band_probs: tuple[str, ...]
    band: int
    band_name: str
    likelihood: str
    risk: str
    control: str
    cost: str


@dataclass(frozen=True, slots=True)
class PlanRow:
    """One action of the plan; ``notes``: 1-based numbers of its ``conditions`` in
    :attr:`AuditContext.plan_notes`."""

    opening_id: str
    control: str
    cost: str
    risk_before: str
    risk_after: str
    conditions: tuple[str, ...]
    notes: tuple[int, ...] = ()


@dataclass(frozen=True, slots=True)
class PlanControlRow:
    """The plan's actions of one control together: how many openings, their total cost, the
    risk score they remove and the numbers of the control's conditions."""

    control: str
    openings: str
    cost: str
    risk_removed: str
    notes: tuple[int, ...]


@dataclass(frozen=True, slots=True)
class PhotoRef:
    """A photo of an opening: ``name`` (the caption: its file name) and ``path``, the file to
    print (``None`` when the building file's folder is not known). The file may be missing."""

    name: str
    path: Path | None


@dataclass(frozen=True, slots=True)
class DetailContext:
    """One top opening's detail page. ``facts``: (label, value) pairs."""

    opening_id: str
    title: str
    band: int
    facts: tuple[tuple[str, str], ...]
    band_probs: tuple[tuple[str, str], ...]
    factors: tuple[str, ...]
    hazards: tuple[str, ...]
    code_notes: tuple[str, ...]
    control: str
    notes: str
    photos: tuple[PhotoRef, ...] = ()


@dataclass(frozen=True, slots=True)
class NoteRow:
    """An opening's notes for the appendix: ``opening`` (id), ``place`` (floor and facade) and
    ``notes`` (the auditor's text, untouched)."""

    opening: str
    place: str
    notes: str


@dataclass(frozen=True, slots=True)
class AuditContext:
    """Everything the audit layout prints, as strings."""

    title: str
    building_name: str
    address: str
    auditor: str
    audit_date: str
    generated_on: str
    scope: str
    notes: str
    header: str
    footer: str
    cover_facts: tuple[tuple[str, str], ...]
    band_names: tuple[str, ...]
    band_counts: tuple[tuple[str, int], ...]
    summary: tuple[str, ...]
    top_risks: tuple[tuple[str, str, str, str], ...]
    method: tuple[tuple[str, str], ...]
    assumptions: tuple[tuple[str, str], ...]
    sources: tuple[str, ...]
    ranked: tuple[RankedRow, ...]
    details: tuple[DetailContext, ...]
    plan_summary: tuple[str, ...]
    plan_rows: tuple[PlanRow, ...]
    plan_controls: tuple[PlanControlRow, ...]
    plan_notes: tuple[str, ...]
    cautions: tuple[str, ...]
    limits: tuple[str, ...]
    signoff: tuple[str, ...]
    issuer: tuple[str, ...]
    font_note: str
    sensitivity: SensitivityContext | None = None
    code_profile_name: str = ""
    code_profile_lead: str = ""
    code_rules: tuple[CodeRuleRow, ...] = ()
    opening_notes: tuple[NoteRow, ...] = ()


@dataclass(frozen=True, slots=True)
class LeafletContext:
    """The leaflet's strings: ``sections`` as printed (measures and contact filled in),
    ``date``: the audit date in the profile's date style (the day the leaflet is made when the
    audit has no date)."""

    building_name: str
    address: str
    sections: tuple[LeafletSection, ...]
    contact: tuple[str, ...]
    date: str

    def section(self, key: str) -> LeafletSection | None:
        """The printed section ``key``, or ``None`` when it was left out."""
        return next((s for s in self.sections if s.key == key), None)


# --- builders -----------------------------------------------------------------------------------


def _band_names() -> tuple[str, ...]:
    from petfall_audit.injury import BANDS

    return tuple(str(b) for b in BANDS)


def _plan_by_opening(plan: Plan | None) -> dict[str, Any]:
    if plan is None:
        return {}
    return {a.opening_id: a for a in plan.actions}


def _floor_labels(assessment: Assessment) -> dict[int, str]:
    return {f.level: f.label or str(f.level) for f in assessment.building.floors}


def _ranked_rows(assessment: Assessment, plan: Plan | None, bands: tuple[str, ...]
                 ) -> tuple[RankedRow, ...]:
    actions = _plan_by_opening(plan)
    currency = getattr(plan, "currency", "") if plan is not None else ""
    labels = _floor_labels(assessment)
    rows = []
    for o in assessment.ranked():
        act = actions.get(o.id)
        rows.append(
            RankedRow(
                rank=str(o.risk_rank),
                floor=labels.get(o.floor, str(o.floor)),
                opening_id=o.id,
                kind=kind_label(o.kind),
                drop_m=_bare_length(o.drop_m.p50),
                v_p5=_bare_speed(o.impact_speed_mps.p5),
                v_p50=_bare_speed(o.impact_speed_mps.p50),
                v_p95=_bare_speed(o.impact_speed_mps.p95),
                band_probs=tuple(fmt_percent(float(o.bands.get(b, 0.0))) for b in bands),
                band=int(o.expected_band),
                band_name=bands[int(o.expected_band)] if 0 <= o.expected_band < len(bands) else "",
                likelihood=fmt_one_in(float(o.one_in_n)),
                risk=fmt_risk(float(o.risk)),
                control=act.control_name if act is not None else "–",
                cost=fmt_money(float(act.cost), currency) if act is not None else "–",
            )
        )
    return tuple(rows)


def _landing_text(landing: dict[str, float], names: dict[str, str] | None = None) -> str:
    """Landing elements with their share of the falls, most likely first."""
    if not landing:
        return "–"
    names = names or {}
    return ", ".join(f"{names.get(k, k)} {fmt_percent(float(p))}" for k, p in landing.items())


def _code_notes(assessment: Assessment, opening_id: str) -> tuple[str, ...]:
    from petfall_audit.guard_rules import why_code_compliant_is_not_cat_safe

    building = assessment.building
    return tuple(
        why_code_compliant_is_not_cat_safe(building.opening(opening_id),
                                           code=building_profile(building),
                                           cat=building.cat_profile)
    )


def _guard_source(profile: CodeProfile) -> str:
    cat = ("wider than an adult cat's skull (about 43 mm cranial width, Vet Sci 2021;8:161).")
    if not profile.cites_clauses:
        return ("Guard rules for people (common figures, no clause: check the local rule): "
                f"sized for children's heads (about 100 mm), {cat}")
    codes = ", ".join(dict.fromkeys(r.code for r in profile.rules if r.cited))
    return (f"Rules for people in the building's code profile ({codes}): guards and window "
            f"limits sized for children's heads, {cat}")


def _opening_notes(building: Building) -> tuple[NoteRow, ...]:
    labels = {f.level: f.label or str(f.level) for f in building.floors}
    facades = {f.id: f.label or f.id for f in building.facades}
    return tuple(
        NoteRow(o.id, f"{labels.get(o.floor, str(o.floor))}, {facades.get(o.facade, o.facade)}",
                o.notes.strip())
        for o in building.openings if o.notes.strip()
    )


def _details(assessment: Assessment, plan: Plan | None, top_n: int, bands: tuple[str, ...],
             photo_root: Path | None = None) -> tuple[DetailContext, ...]:
    actions = _plan_by_opening(plan)
    currency = getattr(plan, "currency", "") if plan is not None else ""
    labels = _floor_labels(assessment)
    names = landing_names(assessment.building)
    facade_names = {f.id: f.label or f.id for f in assessment.building.facades}
    out = []
    for o in assessment.ranked()[: max(top_n, 0)]:
        op = assessment.building.opening(o.id)
        act = actions.get(o.id)
        facts = (
            ("Floor", labels.get(o.floor, str(o.floor))),
            ("Facade", facade_names.get(str(o.facade), str(o.facade))),
            ("Kind", kind_label(o.kind)),
            ("Rail top or sill above floor", fmt_length(op.perch_height_m)),
            ("Drop: p5 / median / p95",
             f"{_bare_length(o.drop_m.p5)} / {_bare_length(o.drop_m.p50)} / "
             f"{_bare_length(o.drop_m.p95)} m"),
            ("Impact speed: p5 / median / p95",
             f"{_bare_speed(o.impact_speed_mps.p5)} / {_bare_speed(o.impact_speed_mps.p50)} / "
             f"{_bare_speed(o.impact_speed_mps.p95)} m/s"),
            ("Landing", _landing_text(dict(o.landing), names)),
            ("Likelihood of a fall (12 months)",
             fmt_one_in(float(o.one_in_n))),
            ("Risk score (rank)", f"{fmt_risk(float(o.risk))} (#{o.risk_rank})"),
            ("Expected band", bands[o.expected_band] if 0 <= o.expected_band < len(bands) else "–"),
        )
        control = ""
        if act is not None:
            cost = fmt_money(float(act.cost), currency)
            before, after = fmt_risk(float(act.risk_before)), fmt_risk(float(act.risk_after))
            control = f"{act.control_name} — indicative cost {cost}; risk {before} → {after}"
        out.append(
            DetailContext(
                opening_id=o.id,
                title=f"#{o.risk_rank}  {o.id} — {kind_label(o.kind)}, "
                      f"{labels.get(o.floor, str(o.floor))}",
                band=int(o.expected_band),
                facts=facts,
                band_probs=tuple((b, fmt_percent(float(o.bands.get(b, 0.0)))) for b in bands),
                factors=explain_all(o.factors),
                hazards=explain_all(o.hazards),
                code_notes=_code_notes(assessment, o.id),
                control=control,
                notes=op.notes,
                photos=tuple(PhotoRef(photo_name(p), photo_file(photo_root, p))
                             for p in op.photos),
            )
        )
    return tuple(out)


def budget_origin(plan: Plan, saved_budget: float | None, *, is_default: bool = False) -> str:
    """Where the plan's budget came from, in words: the one saved with the audit, a default, or
    one chosen for this report."""
    if saved_budget is not None and abs(float(plan.budget) - saved_budget) < 0.005:
        return "the budget saved with the audit"
    if is_default:
        return ("a default the app proposed (5 % of what fixing every opening would cost); no "
                "budget has been set for this audit")
    if saved_budget is None:
        return "chosen for this report; no budget is saved with the audit"
    return (f"chosen for this report; the audit's saved budget is "
            f"{fmt_money(saved_budget, plan.currency)}")


def _plan_parts(plan: Plan | None, saved_budget: float | None = None, *,
                budget_is_default: bool = False, profile: CodeProfile | None = None
                ) -> tuple[tuple[str, ...], tuple[PlanRow, ...]]:
    if plan is None:
        return (("No budget was given, so no fix plan was made.",), ())
    cur = plan.currency
    before, after = float(plan.risk_before), float(plan.risk_after)
    cut = (1 - after / before) if before > 0 else 0.0
    origin = budget_origin(plan, saved_budget, is_default=budget_is_default)
    summary: tuple[str, ...] = (
        f"Budget {fmt_money(float(plan.budget), cur)} ({origin}); the plan spends "
        f"{fmt_money(float(plan.total_cost), cur)} on "
        f"{fmt_count(len(plan.actions), 'control')}.",
        f"Total risk score {fmt_risk(before)} before and {fmt_risk(after)} after "
        f"({fmt_percent(cut)} lower).",
    )
    if profile is not None and cur and profile.currency != cur:
        summary += (
            f"Costs are in {cur}, the control catalogue's currency, not converted; the "
            f"building's code profile ({profile.name}) prices in {profile.currency}: put local "
            "prices in the catalogue before planning a real budget.",
        )
    notes = plan_notes(plan)
    rows = tuple(
        PlanRow(
            opening_id=a.opening_id,
            control=a.control_name,
            cost=fmt_money(float(a.cost), cur),
            risk_before=fmt_risk(float(a.risk_before)),
            risk_after=fmt_risk(float(a.risk_after)),
            conditions=tuple(str(c) for c in a.conditions),
            notes=note_numbers(a, notes),
        )
        for a in plan.actions
    )
    return summary, rows


def _plan_controls(plan: Plan | None, rows: tuple[PlanRow, ...]) -> tuple[PlanControlRow, ...]:
    """One row per control in the plan, the costliest first."""
    if plan is None:
        return ()
    groups: dict[str, list[int]] = {}
    for i, a in enumerate(plan.actions):
        groups.setdefault(a.control_name, []).append(i)
    out = []
    for name, idx in groups.items():
        acts = [plan.actions[i] for i in idx]
        cost = sum(float(a.cost) for a in acts)
        out.append((cost, PlanControlRow(
            control=name,
            openings=str(len(acts)),
            cost=fmt_money(cost, plan.currency),
            risk_removed=fmt_risk(sum(float(a.risk_before - a.risk_after) for a in acts)),
            notes=tuple(sorted({n for i in idx for n in rows[i].notes})),
        )))
    return tuple(r for _, r in sorted(out, key=lambda t: -t[0]))


def _method(assessment: Assessment) -> tuple[tuple[str, str], ...]:
    return (
        ("Fall physics",
         "Vertical fall with quadratic air drag, solved in closed form: from rest the speed after "
         "a drop h is v = v_t·√(1 − exp(−2gh/v_t²)), with terminal speed v_t = √(2mg/(ρ·C_d·A)) "
         f"({DRAG_AREA_NOTE}); "
         "a cat that spreads out changes to a lower terminal speed part-way down (Taylor, "
         "Classical Mechanics, 2005, §2.4; checked against a numerical integrator)."),
        ("Where the cat lands",
         "The cat leaves the rail top or sill with a small outward speed; its outward travel "
         "decides whether a balcony, canopy or podium below catches it, which sets the drop. A "
         "surface catches only where it lies, out from the facade and along it; a cat over a "
         "lightwell or basement area when it passes the rim falls into it. The impact speed "
         "counts the outward part as well as the downward one."),
        ("Air density",
         "ICAO / ISO 2533 standard atmosphere at the site altitude, corrected to the design air "
         "temperature with the ideal-gas law."),
        ("Injury bands",
         "The dose of a fall is its mean deceleration v²/(2s), from the highest speed reached "
         "(a cat that spreads out and slows a little is not credited with it) and the stopping "
         "distance s set by the landing surface and whether the cat has turned feet-down. Cats "
         "hurt by the same fall are hurt very differently, so each band is a probability that "
         "rises smoothly with the dose (an ordinal probit on its logarithm). Its four parameters "
         "were fitted to published veterinary case series (Berlin 2025, 1,125 cats; Zagreb "
         "2004; Alexandria 2018; a 37-cat clinic series): the shares that died or were put to "
         "sleep read as life-threatening, limb fractures and shock as serious or worse, heights "
         "in storeys as 3 m each, hard ground as in the Berlin series. Clinic series miss cats "
         "killed outright, so the highest band is calibrated on deaths among treated cats. With "
         "every cat profile and surface, a higher floor is never shown as safer."),
        ("Likelihood",
         "Annual chance that a resident cat gets out and falls, from access (cats present, how "
         "often open), the barrier's effect on a cat rather than a child, perch invitations and "
         "window type; shown as \"1 in N over 12 months\"."),
        ("Risk score",
         "An adaptation of the Housing Health and Safety Rating System (England): harm-class "
         "weights applied to the injury-band probabilities, divided by the likelihood N. The "
         "adaptation to cats is ours; scores rank openings and are not HHSRS categories."),
        ("Uncertainty",
         f"{fmt_int(assessment.samples)} sampled cats (seed {assessment.seed}), the same cats "
         "for every "
         f"opening so differences between openings are not noise; percentiles p5, p50, p95. "
         f"Model version {assessment.model_version}."),
    )


def _injury_text(t: InjuryThresholds) -> str:
    fitted = t == InjuryThresholds()
    return (f"{fmt_number(t.moderate_g)} / {fmt_number(t.serious_g)} / "
            f"{fmt_number(t.life_threatening_g)} g, spread "
            f"{fmt_number(t.spread, 2)} (" + ("fitted to the case series" if fitted
                                   else "set for this building; the fitted values differ") + ")")


def _assumptions(profile: CatProfile, assessment: Assessment) -> tuple[tuple[str, str], ...]:
    info = assessment.building.info
    return (
        ("Cat profile", preset_label(profile.preset)),
        (PARAMETER_LABELS["mass_kg"], _dist_text(profile.mass_kg, "kg", 1)),
        (PARAMETER_LABELS["cda_tense_m2"], _dist_text(profile.cda_tense_m2, "m²", 3)),
        (PARAMETER_LABELS["cda_spread_m2"], _dist_text(profile.cda_spread_m2, "m²", 3)),
        (PARAMETER_LABELS["relax_probability"], fmt_percent(profile.relax_probability)),
        ("Spreads out at (fraction of tense terminal speed)",
         _dist_text(profile.relax_fraction, "", 2)),
        (PARAMETER_LABELS["righting_time_s"], _dist_text(profile.righting_time_s, "s", 2)),
        (PARAMETER_LABELS["launch_speed_mps"], _dist_text(profile.launch_speed_mps, "m/s", 1)),
        ("Injury bands: median dose of moderate / serious / life-threatening, spread",
         _injury_text(assessment.thresholds)),
        ("Site altitude / design air temperature",
         f"{fmt_number(info.site_altitude_m, 0, 'm')} / "
         f"{fmt_number(info.air_temperature_c, 0, '°C')} "
         f"(air density {fmt_number(float(assessment.rho_kg_m3), 3, 'kg/m³')})"),
    )


SOURCES: tuple[str, ...] = (
    "Candela Andrade et al. 2025, J Feline Med Surg (1125 cats, Berlin): mean mass 4.1 kg; "
    "severity linked to height and surface; 74 % landed on hard ground; 13.3 % died or were put "
    "to sleep, 47.2 % had limb fractures (fitted).",
    "Vnuk et al. 2004, J Feline Med Surg 6:305 (119 cats, Zagreb): more severe and more chest "
    "injuries from the 7th storey up; 96.5 % survived, 46.2 % limb fractures (fitted).",
    "Zaghloul & Samy 2018, Alex J Vet Sci 59:43 (45 cats, 2nd-5th storey): 77.8 % survived, "
    "60 % fractures or luxations (fitted).",
    "A retrospective series of 37 cats from one clinic (published summary): shock in 35.1 %, "
    "66 % of those from the 6th storey up (fitted); Gheren et al., Braz J Vet Med (43 cats, "
    "Rio de Janeiro): compared.",
    "Karabağlı et al., Pak Vet J (160 cats, Istanbul): injury score rose steadily with height.",
    "Merbl et al. 2013, Isr J Vet Med 68:28 (107 cats): survival falls with height.",
    "ISO 2533:1975 standard atmosphere; EN 1177:2018 and ASTM F1292 playground surfacing limits "
    "(HIC 1000, 200 g, 4.6 kg headform).",
    "Housing Health and Safety Rating System (Housing Act 2004, England): harm-class weights and "
    "the \"1 in N over 12 months\" likelihood.",
    "Tense and spread-out terminal speeds (about 24 and 17 m/s) and the relaxing point: common "
    "practice, no source; adjustable in the cat profile.",
)

LIMITS: tuple[str, ...] = (
    "Veterinary case series undercount cats killed outright and rely on owner-reported heights; "
    "band probabilities inherit that bias.",
    "There are no published cat-specific surface factors: lawn, soil and planting are treated as "
    "one severity class softer than paving, water as uncertain (drowning).",
    "Costs are indicative catalogue values; get quotes. Nets on high floors need wind-load design; "
    "exterior changes may need the owner's or the governing body's permission.",
    "The model does not see furniture moved next to a guard after the audit, a window left open "
    "by a visitor, or a cat's individual habits.",
)


def _default_scope(assessment: Assessment) -> str:
    b = assessment.building
    kinds = sorted({kind_label(o.kind).lower() for o in b.openings})
    outside = ("Common areas, roofs without access and the building's structure are outside "
               "this audit.")
    if not b.openings:
        return ("No openings are recorded for this building "
                f"({fmt_count(len(b.floors), 'floor')}, {fmt_count(len(b.facades), 'facade')}), "
                f"so no fall was assessed. {outside}")
    return (
        f"All {fmt_count(len(b.openings), 'recorded opening')} ({', '.join(kinds)}) on "
        f"{fmt_count(len(b.floors), 'floor')} and {fmt_count(len(b.facades), 'facade')}, "
        "assessed for the risk that a resident cat "
        f"falls from them. {outside}"
    )


def build_audit_context(assessment: Assessment, plan: Plan | None, *,
                        options: ReportOptions | None = None) -> AuditContext:
    """Strings and numbers of the audit report for ``assessment`` and (optional) ``plan``."""
    from petfall_audit.report.fonts import fonts

    opts = options or ReportOptions()
    info = assessment.building.info
    profile = building_profile(assessment.building)
    bands = _band_names()
    generated = fmt_date(opts.generated_on or _dt.date.today().isoformat(), profile.date_format)
    date = fmt_date(info.audit_date, profile.date_format) if info.audit_date else generated
    counts = assessment.band_counts()
    ranked = _ranked_rows(assessment, plan, bands)
    by_risk = assessment.ranked()
    top = tuple(
        (o.id, kind_label(o.kind), bands[o.expected_band] if 0 <= o.expected_band < len(bands)
         else "–", fmt_risk(float(o.risk)))
        for o in by_risk[: max(opts.top_n, 0)]
    )
    plan_summary, plan_rows = _plan_parts(plan, assessment.building.plan.budget,
                                          budget_is_default=opts.budget_is_default,
                                          profile=profile)
    worst_v = max((o.impact_speed_mps.p95 for o in assessment.openings), default=float("nan"))
    summary = (
        f"{len(assessment.openings)} openings assessed on "
        f"{len(assessment.building.floors)} floors.",
        f"The highest 95th-percentile impact speed is {fmt_speed(float(worst_v))}.",
        *plan_summary,
    )
    name = info.name or "Unnamed building"
    header = f"{name} — cat fall risk audit — {date}"
    return AuditContext(
        title="Cat fall risk audit",
        building_name=name,
        address=info.address,
        auditor=info.auditor,
        audit_date=date,
        generated_on=generated,
        scope=opts.scope or _default_scope(assessment),
        notes=info.notes,
        header=header,
        footer=CAUTIONS_SHORT,
        cover_facts=(
            ("Building", name),
            ("Address", info.address or "–"),
            ("Auditor", info.auditor or "–"),
            ("Audit date", date),
            ("Report generated", generated),
            ("Code profile", profile.name),
            ("Openings / floors / facades",
             f"{len(assessment.building.openings)} / {len(assessment.building.floors)} / "
             f"{len(assessment.building.facades)}"),
        ),
        band_names=bands,
        band_counts=tuple(zip(bands, counts, strict=True)),
        summary=summary,
        top_risks=top,
        method=_method(assessment),
        assumptions=_assumptions(assessment.building.cat_profile, assessment),
        sources=(*SOURCES[:-1], _guard_source(profile), SOURCES[-1]),
        ranked=ranked,
        details=_details(assessment, plan, opts.top_n, bands, opts.photo_root),
        plan_summary=plan_summary,
        plan_rows=plan_rows,
        plan_controls=_plan_controls(plan, plan_rows),
        plan_notes=plan_notes(plan),
        cautions=CAUTIONS,
        limits=LIMITS,
        signoff=("Audited by", "Signature", "Date", "Reviewed by", "Signature", "Date"),
        issuer=opts.issuer.lines(),
        font_note=fonts().note,
        sensitivity=(build_sensitivity_context(assessment, max_samples=opts.sensitivity_samples)
                     if opts.sensitivity_samples != 0 else None),
        code_profile_name=profile.name,
        code_profile_lead=code_profile_lead(profile),
        code_rules=code_rule_rows(profile),
        opening_notes=_opening_notes(assessment.building),
    )


def build_leaflet_context(assessment: Assessment, plan: Plan | None, *,
                          contact: ContactBlock, date: str = "",
                          choice: LeafletChoice | None = None) -> LeafletContext:
    """Plain-language strings of the tenant leaflet: the sections of ``choice`` (default: all,
    with the plan's measures) in the words of the building's code profile. ``date`` (ISO)
    overrides the issue date, which is the audit date, or today when the audit has none."""
    info = assessment.building.info
    profile = building_profile(assessment.building)
    pick = choice or LeafletChoice()
    sections = default_sections(profile) if pick.sections is None else pick.sections
    printed: list[LeafletSection] = []
    for s in sections:
        if s.key == "building" and pick.include_measures and plan is not None and plan.actions:
            names = sorted({_sentence_case(a.control_name) for a in plan.actions})
            measures = f"The building plans these measures: {_join(names)}."
            s = replace(s, items=(*s.items[:1], measures, *s.items[1:]))  # after the survey
        printed.append(s)
    issued = date or info.audit_date or _dt.date.today().isoformat()
    return LeafletContext(
        building_name=info.name or "Your building",
        address=info.address,
        sections=tuple(printed),
        contact=contact.lines(),
        date=fmt_date(issued, profile.date_format),
    )


def _sentence_case(name: str) -> str:
    """A catalogue name for use mid-sentence: first letter lowered unless it starts an acronym."""
    if len(name) > 1 and name[0].isupper() and not name[1].isupper():
        return name[0].lower() + name[1:]
    return name


def _join(items: Sequence[str]) -> str:
    """"a, b and c"; semicolons when an item has a comma of its own ("net, 30 mm mesh")."""
    items = list(items)
    if len(items) <= 1:
        return "".join(items)
    sep = "; " if any("," in i for i in items) else ", "
    last = "; and " if sep == "; " else " and "
    return sep.join(items[:-1]) + last + items[-1]


# --- sensitivity to the cat profile ---------------------------------------------------------------


@dataclass(frozen=True, slots=True)
class SensitivityContext:
    """The "how much the result depends on the cat" section: the ``figure`` the chart draws,
    its bar labels (``labels``: parameter; ``ranges``: low–high value; ``values``: signed swing)
    and the text around it."""

    title: str
    lead: str
    definition: str
    caption: str
    figure: Any  # petfall_audit.figures.SensitivityFigure
    labels: tuple[str, ...]
    ranges: tuple[str, ...]
    values: tuple[str, ...]


#: Title of the sensitivity section.
SENSITIVITY_TITLE = "How much the result depends on the cat"
#: Below this largest swing (%) the result is said to rest little on the cat assumptions.
_SMALL_SWING_PCT = 5.0


def _mid_sentence(label: str) -> str:
    """"Body mass" → "body mass"; "C_d·A tense" stays."""
    return label[0].lower() + label[1:] if len(label) > 1 and label[1].islower() else label


def _versus_base(pct: float, base: str) -> str:
    """A change in % against ``base``: "28% below it", "2% above it", "about it"."""
    if abs(pct) < 0.5:
        return f"about {base}"
    return f"{fmt_number(abs(pct), 0)}% {'above' if pct > 0 else 'below'} {base}"


def build_sensitivity_context(assessment: Assessment, *, max_samples: int | None = None
                              ) -> SensitivityContext | None:
    """The sensitivity section of ``assessment`` (``None`` without openings). Runs the
    one-at-a-time analysis unless ``assessment.sensitivity`` is filled in; ``max_samples``
    caps the cats per simulation (the caption then says so)."""
    from petfall_audit.figures.sensitivity import SWING_DEFINITION, sensitivity_figure
    from petfall_audit.present import fmt_change_pct

    fig = sensitivity_figure(assessment, max_samples=max_samples)
    if fig is None or not fig.parameters:
        return None
    k = len(fig.opening_ids)
    tops = f"the {k} highest-risk openings" if k > 1 else "the highest-risk opening"
    big = float(fig.swing_pct[0])
    if fig.base_risk <= 0:
        lead = ("No opening carries a risk score above zero, so the cat profile has nothing "
                "to move.")
    elif abs(big) < _SMALL_SWING_PCT:
        lead = (f"No parameter of the cat profile moves the summed risk score of {tops} by "
                f"{fmt_number(_SMALL_SWING_PCT, 0)}% or more: the result rests little on the cat "
                "assumptions.")
    else:
        how = ("0.2 below and above the profile's value"
               if fig.parameters[0] == "relax_probability"
               else "the 10th to the 90th percentile of the sampled cats")
        start = _versus_base(float(fig.low_pct[0]), "its value with the profile as set")
        end = _versus_base(float(fig.high_pct[0]), "it")
        lead = (f"The result depends most on the {_mid_sentence(fig.labels[0])}: from "
                f"{fig.low_text[0]} to {fig.high_text[0]} ({how}) the summed risk score of "
                f"{tops} goes from {start} to {end}, a swing of {fmt_number(abs(big), 0)}% "
                f"of that value. Check this part of the cat profile "
                "against the cats that live in the building before relying on the ranking.")
    caption = (
        f"Change of the summed risk score of {tops} ({', '.join(fig.opening_ids)}; "
        f"{fmt_risk(fig.base_risk)} with the profile as set) with each parameter at its low "
        "value (light bar) and its high value (dark bar), largest swing first, each with its "
        f"swing (high minus low). {fmt_int(fig.samples)} sampled cats per simulation, with the "
        "assessment's seed.")
    if fig.reduced:
        caption += (f" To keep the report quick the analysis used {fmt_int(fig.samples)} "
                    f"instead of {fmt_int(fig.assessment_samples)} cats, so its top openings can "
                    "differ slightly from the ranked table.")
    return SensitivityContext(
        title=SENSITIVITY_TITLE,
        lead=lead,
        definition=SWING_DEFINITION,
        caption=caption,
        figure=fig,
        labels=fig.labels,
        ranges=fig.range_text,
        values=tuple(fmt_change_pct(float(v)) for v in fig.swing_pct),
    )
