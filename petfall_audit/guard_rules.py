"""Why meeting the guard and window rules of the building's code does not make an opening
cat-safe.

Building codes size guards and window openings for small children: a rail high enough that a
person cannot topple over it, and gaps that a 100 mm (4 in) sphere cannot pass. A cat does not
topple over a rail, it jumps onto it; and an adult cat's head, which decides whether the body
follows, is far narrower than the child sphere. The human rules come from the building's code
profile (:mod:`petfall_audit.code_profile`: one jurisdiction, each rule with its clause, edition
and confidence); :func:`why_code_compliant_is_not_cat_safe` turns them into plain-language
reasons for one opening, citing only the rules of that profile. The generic profile cites no
clause and says that the local rule must be checked.

Lengths in millimetres (``_mm``) unless a name says metres (``_m``). The local code, in the
edition in force, prevails.
"""

from __future__ import annotations

from petfall_audit.barriers import gap_holds, is_protected
from petfall_audit.code_profile import CodeProfile, CodeRule, code_profile
from petfall_audit.model import BALCONY_LIKE, CAT_PRESETS, CatProfile, Opening, OpeningKind, Screen
from petfall_audit.present.numbers import fmt_length

__all__ = [
    "CAT_CRANIAL_WIDTH_MM",
    "CAT_SAFE_MESH_MM",
    "UNCITED",
    "why_code_compliant_is_not_cat_safe",
]

#: Cranial width of an adult cat's skull, mm: 4.28 ± 0.26 cm in European Shorthair cats
#: (CT study, n = 37; Vet Sci 2021;8:161). If the head passes a gap, the body follows (cats have no
#: rigid collarbone; common practice, no source).
CAT_CRANIAL_WIDTH_MM = 42.8
#: Mesh regarded as holding an adult cat, mm: 30 x 30 mm is the usual pet-net mesh (common
#: practice, no source).
CAT_SAFE_MESH_MM = 30.0
#: What stands in place of a clause for a rule that names no code (the generic profile).
UNCITED = "a common figure, no clause: check the local rule"


def _mm(value_mm: float, system: str) -> str:
    """A small length for people, in the profile's units ("100 mm" / "3.9 in")."""
    return fmt_length(value_mm / 1000.0, system, small=True)


def _cat_head(system: str) -> str:
    return (
        f"an adult cat's skull is about {_mm(CAT_CRANIAL_WIDTH_MM, system)} across at the "
        "cranium (Vet Sci 2021;8:161), kittens' less, and where the head passes the body follows"
    )


def _ref(r: CodeRule) -> str:
    """The rule's citation for running text, or :data:`UNCITED` for a rule that names no code."""
    return r.citation if r.cited else UNCITED


def _figure(r: CodeRule, system: str, fallback: str) -> str:
    """``"1100 mm (Approved Document K, Diagram 3.1)"``: the rule's figure and its reference
    (``fallback`` for a rule without a figure)."""
    value = _mm(r.value_mm, system) if r.value_mm is not None else fallback
    return f"{value} ({_ref(r)})"


def _figure_ref(r: CodeRule, system: str) -> str:
    """``"100 mm, Approved Document K, para 3.3"``: figure and reference inside parentheses."""
    return f"{_mm(r.value_mm, system)}, {_ref(r)}" if r.value_mm is not None else _ref(r)


def why_code_compliant_is_not_cat_safe(
    opening: Opening, *, code: CodeProfile | None = None, cat: CatProfile | None = None
) -> list[str]:
    """Plain-language reasons why this opening's guard or window can meet the human rules of the
    code profile ``code`` (default: the generic profile) and still let a cat fall. Each reason
    cites the profile's rule with its clause (or says that the generic figure has none and the
    local rule must be checked); no other jurisdiction is cited. Empty when the opening already
    holds the cats of ``cat`` (default: the adult preset) or does not open: the one test
    :func:`petfall_audit.barriers.is_protected` that the likelihood and the figures use.
    Lengths read in the profile's units.
    """
    p = code_profile() if code is None else code
    system = p.units
    cats = CAT_PRESETS["adult"] if cat is None else cat
    if opening.kind is OpeningKind.FIXED or is_protected(opening, cats):
        return []
    head = _cat_head(system)
    reasons: list[str] = []
    perch = _mm(opening.perch_height_m * 1000.0, system)
    if opening.kind in BALCONY_LIKE:
        height = p.rule("guard_height")
        rail = (
            ", and a flat rail top invites it to sit and walk there."
            if opening.flat_rail_top
            else "."
        )
        if height is not None:
            reasons.append(
                f"A guard of {_figure(height, system, 'the required height')} stops a person "
                f"leaning over; a cat jumps onto the rail top from standing (this rail top is "
                f"{perch} up){rail}"
            )
        else:
            reasons.append(
                "A guard high enough for people stops a person leaning over (no guard-height "
                "rule is on file for this code profile: check the local rule); a cat jumps onto "
                f"the rail top from standing (this rail top is {perch} up){rail}"
            )
        gap_rule = p.rule("guard_gap")
        gap_mm = opening.largest_gap_mm
        if gap_rule is not None and gap_mm is not None and not gap_holds(gap_mm, cats):
            limit_mm = gap_rule.value_mm
            within = limit_mm is None or gap_mm <= limit_mm
            reasons.append(
                f"The child rule on gaps ({_figure_ref(gap_rule, system)}) "
                f"is sized for children; {head}: "
                + (
                    f"this guard's {_mm(gap_mm, system)} gaps can meet the rule and still let a "
                    "cat through."
                    if within
                    else f"this guard's {_mm(gap_mm, system)} gaps are wider than the child "
                    "rule allows, and a cat passes them easily."
                )
            )
        elif gap_mm is not None and not gap_holds(gap_mm, cats):
            reasons.append(
                f"This guard's {_mm(gap_mm, system)} gaps let a cat through ({head}); no gap "
                "rule is on file for this code profile: check the local rule."
            )
        elif gap_mm is None:
            cited = f" ({_ref(gap_rule)})" if gap_rule is not None else ""
            reasons.append(
                f"Solid infill meets every gap rule{cited}, but no rule sets a height a cat "
                "cannot jump."
            )
        bottom_mm = opening.bottom_gap_mm
        if bottom_mm is not None and not gap_holds(bottom_mm, cats):
            bottom_rule = p.rule("guard_bottom_gap") or gap_rule
            allowed = (
                f"Child rules allow a gap under the guard of up to "
                f"{_figure(bottom_rule, system, 'a child-sized sphere')}"
                if bottom_rule is not None
                else "No rule on the gap under a guard is on file for this code profile (check "
                "the local rule)"
            )
            reasons.append(
                f"{allowed}; that is still too wide, since {head}. This guard's bottom gap is "
                f"{_mm(bottom_mm, system)}."
            )
        if opening.climbable_infill:
            climb = p.rule("guard_climb")
            reasons.append(
                (
                    f"Rules against climbable guards ({_ref(climb)}) target small children"
                    if climb is not None
                    else "Rules against climbable guards, where a code has one, target small "
                    "children"
                )
                + "; a cat climbs any rail or mesh it can grip."
            )
    else:
        sill = p.rule("window_sill")
        if sill is not None:
            reasons.append(
                f"A sill or guard at {_figure(sill, system, 'the required height')} keeps a "
                f"child from toppling out; for a cat the sill is a step (this sill is {perch} up)."
            )
        else:
            reasons.append(
                "A sill high enough to keep a child from toppling out (no window-sill rule is on "
                "file for this code profile: check the local rule) is a step for a cat (this "
                f"sill is {perch} up)."
            )
        device = p.rule("window_device")
        device_mm = device.value_mm if device is not None else None
        child = (
            f"the child limit of {_figure(device, system, 'a child-sized gap')}"
            if device is not None
            else "a child limit (no rule on window devices is on file for this code profile: "
            "check the local rule)"
        )
        gap = opening.limiter_gap_mm
        if gap is None:
            reasons.append(
                f"Window opening limits for children keep the opening under {child}; {head}, so "
                "a child limit is no cat limit, and this window has no limiter at all."
            )
        elif device_mm is None or gap <= device_mm:
            reasons.append(
                f"This limiter's {_mm(gap, system)} gap can meet {child}, but {head}."
            )
        else:
            reasons.append(
                f"This limiter's {_mm(gap, system)} gap is wider than even {child}, and {head}."
            )
        if opening.screen is Screen.INSECT:
            reasons.append(
                "An insect screen is not a barrier: no code asks it to hold a load, and a cat "
                "pushes or claws through it (common practice, no source)."
            )
    if opening.netting_mesh_mm is not None:
        reasons.append(
            f"The fitted net's {_mm(opening.netting_mesh_mm, system)} mesh is wider than the "
            f"usual {_mm(CAT_SAFE_MESH_MM, system)} pet-net mesh (common practice, no source); "
            f"{head}."
        )
    return reasons
