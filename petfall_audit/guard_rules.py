"""Guard and window rules written for people, and why meeting them does not make an opening
cat-safe.

Building codes size guards and window openings for small children: a rail high enough that a
person cannot topple over it, and gaps that a 100 mm (4 in) sphere cannot pass. A cat does not
topple over a rail, it jumps onto it; and an adult cat's head, which decides whether the body
follows, is far narrower than the child sphere. :data:`GUARD_RULES` lists the human rules with
their code and clause; :func:`why_code_compliant_is_not_cat_safe` turns them into plain-language
reasons for one opening.

Lengths in millimetres (``_mm``) unless a name says metres (``_m``). Clause numbers vary by
edition and local amendment: each rule's ``source`` says how sure we are; the local code prevails.
"""

from __future__ import annotations

from dataclasses import dataclass

from petfall_audit.model import BALCONY_LIKE, Opening, OpeningKind, Screen

__all__ = [
    "GuardRule",
    "GUARD_RULES",
    "CAT_CRANIAL_WIDTH_MM",
    "CAT_SAFE_MESH_MM",
    "rule",
    "why_code_compliant_is_not_cat_safe",
]

#: Cranial width of an adult cat's skull, mm: 4.28 ± 0.26 cm in European Shorthair cats
#: (CT study, n = 37; Vet Sci 2021;8:161). If the head passes a gap, the body follows (cats have no
#: rigid collarbone; common practice, no source).
CAT_CRANIAL_WIDTH_MM = 42.8
#: Mesh regarded as holding an adult cat, mm: 30 x 30 mm is the usual pet-net mesh (common
#: practice, no source).
CAT_SAFE_MESH_MM = 30.0

_VERIFY = "verify the clause against the edition in force locally"


@dataclass(frozen=True, slots=True)
class GuardRule:
    """One human guard or window rule.

    ``code`` and ``clause`` name where it is written; ``rule`` says what it asks in plain words;
    ``value_mm`` is its governing dimension in millimetres; ``source`` says how the clause was
    checked ("from memory; verify" where it was not read in the text).
    """

    id: str
    code: str
    clause: str
    rule: str
    value_mm: float
    source: str

    @property
    def citation(self) -> str:
        """``"IBC §1015.3"`` or ``"England, Approved Document K, Diagram 3.1"`` for running text."""
        sep = " " if " " not in self.code else ", "
        return f"{self.code}{sep}{self.clause}"


GUARD_RULES: tuple[GuardRule, ...] = (
    GuardRule(
        "ibc_guard_height",
        "IBC",
        "§1015.3",
        "guards at least 42 in (1067 mm) high",
        1067.0,
        f"International Building Code; value read in a code summary, {_VERIFY}",
    ),
    GuardRule(
        "ibc_guard_sphere",
        "IBC",
        "§1015.4",
        "no opening in a guard that passes a 4 in (102 mm) sphere",
        102.0,
        f"International Building Code; value read in a code summary, {_VERIFY}",
    ),
    GuardRule(
        "ibc_window_sill",
        "IBC",
        "§1015.8",
        "a window opening less than 36 in (914 mm) above the floor and more than 72 in (1829 mm) "
        "above grade must not pass a 4 in sphere, or needs a device to ASTM F2090",
        914.0,
        f"International Building Code (R-2/R-3 occupancies); read in a code summary, {_VERIFY}",
    ),
    GuardRule(
        "irc_guard_height",
        "IRC",
        "§R312.1.2",
        "guards at least 36 in (914 mm) high in dwellings",
        914.0,
        f"International Residential Code; read in a code summary, {_VERIFY}",
    ),
    GuardRule(
        "irc_guard_sphere",
        "IRC",
        "§R312.1.3",
        "no opening in a guard that passes a 4 in (102 mm) sphere",
        102.0,
        f"International Residential Code; read in a code summary, {_VERIFY}",
    ),
    GuardRule(
        "irc_window_sill",
        "IRC",
        "§R312.2.1",
        "a window sill less than 24 in (610 mm) above the floor and more than 72 in above grade "
        "needs a 4 in opening limit or a device to ASTM F2090",
        610.0,
        f"International Residential Code; read in a code summary, {_VERIFY}",
    ),
    GuardRule(
        "astm_f2090",
        "ASTM",
        "F2090",
        "window opening control devices for children: opening under 4 in (102 mm), released "
        "without tools",
        102.0,
        "ASTM F2090 scope, read in the standard's published scope",
    ),
    GuardRule(
        "adk_balcony_height",
        "England, Approved Document K",
        "Diagram 3.1",
        "external balcony and roof-edge guards 1100 mm high",
        1100.0,
        f"Approved Document K (2013); read in the document, {_VERIFY}",
    ),
    GuardRule(
        "adk_window_height",
        "England, Approved Document K",
        "Diagram 3.1",
        "guarding to opening windows 800 mm above the floor",
        800.0,
        f"Approved Document K (2013); read in the document, {_VERIFY}",
    ),
    GuardRule(
        "adk_sphere",
        "England, Approved Document K",
        "para 3.3",
        "where children under five may be present, no gap that passes a 100 mm sphere and no "
        "readily climbable rails",
        100.0,
        f"Approved Document K (2013); read in the document, {_VERIFY}",
    ),
    GuardRule(
        "ncc_balustrade",
        "Australia, NCC",
        "Housing Provisions 11.3",
        "balustrades at least 1000 mm high with no gap that passes a 125 mm sphere",
        125.0,
        "National Construction Code 2022; clause number from memory; verify",
    ),
    GuardRule(
        "bbr_railing",
        "Sweden, BBR",
        "8:2321",
        "railing gaps at most 100 mm and at most 50 mm under the railing (general advice)",
        100.0,
        f"Boverket's building rules, general advice; read in a summary, {_VERIFY}",
    ),
)

_BY_ID = {r.id: r for r in GUARD_RULES}


def rule(rule_id: str) -> GuardRule:
    """The guard rule with ``rule_id``; ``KeyError`` if there is none."""
    return _BY_ID[rule_id]


_CAT_HEAD = (
    f"an adult cat's skull is about {CAT_CRANIAL_WIDTH_MM:.0f} mm across at the cranium "
    "(Vet Sci 2021;8:161), kittens' less, and where the head passes the body follows"
)


def _cite(*rule_ids: str) -> str:
    return "; ".join(f"{_BY_ID[i].citation}" for i in rule_ids)


def why_code_compliant_is_not_cat_safe(opening: Opening) -> list[str]:
    """Plain-language reasons, each naming its code and clause, why this opening's guard or window
    can meet the human rules and still let a cat fall. Empty when the opening already holds a cat
    (a fine net, a pet-resistant screen, a cat-sized limiter, or fixed glazing).
    """
    if opening.kind is OpeningKind.FIXED:
        return []
    if opening.netting_mesh_mm is not None and opening.netting_mesh_mm <= CAT_SAFE_MESH_MM:
        return []
    if opening.kind not in BALCONY_LIKE and (
        opening.screen is Screen.PET_RESISTANT
        or (opening.limiter_gap_mm is not None and opening.limiter_gap_mm < CAT_CRANIAL_WIDTH_MM)
    ):
        return []
    reasons: list[str] = []
    perch_mm = opening.perch_height_m * 1000.0
    if opening.kind in BALCONY_LIKE:
        h = rule("adk_balcony_height")
        reasons.append(
            f"A {h.value_mm:.0f} mm guard ({h.citation}; 42 in / 1067 mm under "
            f"{_cite('ibc_guard_height')}) stops a person leaning over; a cat jumps onto the rail "
            f"top from standing (this rail top is {perch_mm:.0f} mm up)"
            + (
                ", and a flat rail top invites it to sit and walk there."
                if opening.flat_rail_top
                else "."
            )
        )
        gap_mm = opening.largest_gap_mm
        if gap_mm is not None and gap_mm >= CAT_CRANIAL_WIDTH_MM:
            reasons.append(
                f"Gaps up to 100 mm meet the child rule ({_cite('adk_sphere')}; "
                f"{_cite('ibc_guard_sphere')}: 4 in sphere; {_cite('ncc_balustrade')}: 125 mm); "
                f"{_CAT_HEAD}: "
                + (
                    f"this guard's {gap_mm:.0f} mm gaps can meet the rule and still let a cat "
                    "through."
                    if gap_mm <= rule("ncc_balustrade").value_mm
                    else f"this guard's {gap_mm:.0f} mm gaps are wider than the child rules "
                    "allow, and a cat passes them easily."
                )
            )
        elif gap_mm is None:
            reasons.append(
                f"Solid infill meets every gap rule ({_cite('adk_sphere')}; "
                f"{_cite('ibc_guard_sphere')}), but the rules set no height a cat cannot jump."
            )
        bottom_mm = opening.bottom_gap_mm
        if bottom_mm is not None and bottom_mm >= CAT_CRANIAL_WIDTH_MM:
            reasons.append(
                f"Child rules allow a gap under the guard of up to 100 mm ({_cite('adk_sphere')})"
                f" or 50 mm ({_cite('bbr_railing')}, general advice); even 50 mm is too wide, "
                f"since {_CAT_HEAD}. This guard's bottom gap is {bottom_mm:.0f} mm."
            )
        if opening.climbable_infill:
            reasons.append(
                f"Rules against climbable rails ({_cite('adk_sphere')}) target small children "
                "and are not adopted everywhere; a cat climbs any rail or mesh it can grip."
            )
    else:
        sill = rule("adk_window_height")
        reasons.append(
            f"A sill or guard at {sill.value_mm:.0f} mm ({sill.citation}) or 36 in / 914 mm "
            f"({_cite('ibc_window_sill')}) keeps a child from toppling out; for a cat the sill is "
            f"a step (this sill is {perch_mm:.0f} mm up)."
        )
        gap = opening.limiter_gap_mm
        if gap is None:
            reasons.append(
                f"Window opening control devices for children ({_cite('astm_f2090')}; "
                f"{_cite('irc_window_sill')}) limit the opening to under 4 in (102 mm), or "
                f"100 mm in UK practice (common practice, no source); {_CAT_HEAD}, so a child "
                "limit is no cat limit, and this window has no limiter at all."
            )
        elif gap < rule("astm_f2090").value_mm:
            reasons.append(
                f"This limiter's {gap:.0f} mm gap meets the child limit of under 4 in / 102 mm "
                f"({_cite('astm_f2090')}; {_cite('ibc_window_sill')}), but {_CAT_HEAD}."
            )
        else:
            reasons.append(
                f"This limiter's {gap:.0f} mm gap is wider than even the child limit of under "
                f"4 in / 102 mm ({_cite('astm_f2090')}; {_cite('ibc_window_sill')}), and "
                f"{_CAT_HEAD}."
            )
        if opening.screen is Screen.INSECT:
            reasons.append(
                "An insect screen is not a barrier: no code asks it to hold a load, and a cat "
                "pushes or claws through it (common practice, no source)."
            )
    if opening.netting_mesh_mm is not None:
        reasons.append(
            f"The fitted net's {opening.netting_mesh_mm:.0f} mm mesh is wider than the usual "
            f"{CAT_SAFE_MESH_MM:.0f} mm pet-net mesh (common practice, no source); {_CAT_HEAD}."
        )
    return reasons
