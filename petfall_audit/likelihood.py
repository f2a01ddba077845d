"""Likelihood that a resident cat falls from an opening within 12 months.

An adaptation of the likelihood scale of England's housing health and safety rating system
(HHSRS: "1 in N over 12 months"): instead of a national statistic per hazard profile, the yearly
rate of falls is a base rate for a cat with daily access to an unguarded opening, multiplied by
the factors of :data:`FACTORS` (cats present, how often it is open, the kind of opening, the
barrier's effectiveness against a cat, perch invitations and climbing aids):

    rate = base × access × kind × (share of cats the barriers let through) × perch invitations
    annual_probability = 1 − exp(−rate)

Whether a gap lets a cat through follows the head: if the head passes, the body follows (common
practice, no source). Head width scales with the cube root of mass from a reference of
:data:`HEAD_WIDTH_REF_MM` at :data:`HEAD_REF_MASS_KG`, so the share of a profile's cats that pass
a gap is the share lighter than ``4.1 kg × (gap / 55 mm)³`` (a kitten profile passes gaps that
stop adults). Every factor, its value and its source are in ``docs/risk-model.md``.

Tilt-and-turn windows also carry an entrapment hazard, reported apart from falls.
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from types import MappingProxyType

import numpy as np
import numpy.typing as npt

from petfall_audit.model import (
    BALCONY_LIKE,
    CAT_PRESETS,
    CatProfile,
    CatsPresent,
    Distribution,
    Fixed,
    LogNormal,
    Normal,
    OpenFrequency,
    Opening,
    OpeningKind,
    Screen,
    Uniform,
)

__all__ = [
    "Factor",
    "FACTORS",
    "HEAD_WIDTH_REF_MM",
    "HEAD_REF_MASS_KG",
    "MIN_ANNUAL_PROBABILITY",
    "ENTRAPMENT_HAZARD",
    "LikelihoodResult",
    "mass_cdf",
    "gap_pass_share",
    "assess_likelihood",
    "OpeningLikelihood",
    "opening_likelihood",
    "likelihood_of_rows",
]

#: Width of the head a cat must get through a gap, mm, for a cat of :data:`HEAD_REF_MASS_KG`:
#: between the bony cranial width (42.8 ± 2.6 mm, European Shorthair CT, Vet Sci 2021;8:161) and
#: the zygomatic width (about 60-70 mm, from memory), since a cat tilts its head and soft tissue
#: gives. Model assumption.
HEAD_WIDTH_REF_MM = 55.0
#: Mean adult mass among cats that fell, kg (Candela Andrade et al. 2025, J Feline Med Surg).
HEAD_REF_MASS_KG = 4.1
#: Floor on the yearly probability so "1 in N" stays finite (effectively never).
MIN_ANNUAL_PROBABILITY = 1e-6

ENTRAPMENT_HAZARD = (
    "Tilt-and-turn window: a cat that climbs into the tilted gap can slip down and be trapped, "
    "with crush injuries to the hind body, at any height"
)


@dataclass(frozen=True, slots=True)
class Factor:
    """One likelihood factor: ``multiplier`` on the yearly fall rate, ``words`` shown to users
    (may hold ``{placeholders}``), ``source`` of the value."""

    multiplier: float
    words: str
    source: str


_MEM = "from memory (model assumption)"
_CP = "common practice, no source"

#: Every likelihood factor, in one table. Keys are stable identifiers.
FACTORS: Mapping[str, Factor] = MappingProxyType(
    {
        # base rate: a cat with daily access to an opening with no barrier at all
        "base": Factor(0.05, "Base rate: 1 in 20 a year for a cat with daily access to an "
                       "unguarded opening", _MEM),
        # access
        "cats_yes": Factor(1.0, "Cats live behind this opening", "audit input"),
        "cats_unknown": Factor(0.3, "Not known whether cats live here (counted as moderately "
                               "likely)", _MEM),
        "cats_no": Factor(0.02, "No cats reported behind it (a new tenant's cat could still "
                          "use it)", _MEM),
        "open_never": Factor(0.01, "Reported never opened (it still may be, for cleaning or by "
                             "a new tenant)", _MEM),
        "open_rarely": Factor(0.1, "Opened rarely", _MEM),
        "open_seasonal": Factor(0.4, "Open in the warm season, when most falls happen",
                                "season: Candela Andrade et al. 2025 (77 % in summer); "
                                "Karabağlı et al. (68 % April-July); value " + _MEM),
        "open_daily": Factor(0.8, "Open daily", _MEM),
        "open_always": Factor(1.0, "Open all the time", _MEM),
        # kind of opening
        "kind_balcony": Factor(1.0, "Balcony or terrace: cats spend unsupervised time beside "
                               "the guard", _CP),
        "kind_gallery": Factor(0.5, "Access gallery: cats reach it only when let out of the "
                               "flat", _MEM),
        "kind_window": Factor(0.7, "Opening window: cats sit on the sill and chase birds and "
                              "insects", _CP),
        "kind_tilt_turn": Factor(0.6, "Tilt-and-turn window: a fall needs it turned fully open",
                                 _MEM),
        "kind_top_hung": Factor(0.3, "Top-hung window: opens only at the bottom edge", _MEM),
        "kind_fixed": Factor(0.0, "Fixed glazing: does not open", _CP),
        # barriers: share of cats a barrier lets through when they try
        "guard_over": Factor(0.5, "Guard height stops a child, not a cat: cats jump onto the "
                             "rail top", "codes size guards for children (IBC 1015, Approved "
                             "Document K); value " + _MEM),
        "guard_gap": Factor(1.0, "Gaps of {gap_mm:.0f} mm in the guard let {share:.0%} of these "
                            "cats through (if the head passes, the body follows)", _CP),
        "guard_gap_small": Factor(1.0, "Gaps in the guard ({gap_mm:.0f} mm) are too narrow for "
                                  "these cats", _CP),
        "sill_only": Factor(1.0, "Nothing but the sill between the cat and the drop", _CP),
        "net_fitted": Factor(0.03, "Netting with {mesh_mm:.0f} mm mesh (cats still climb, bite "
                             "or push through loose edges: keep it taut and closed)",
                             "mesh: pet-net practice (30 mm standard, 20 mm for kittens); "
                             "residual " + _MEM),
        "net_mesh_large": Factor(1.0, "Netting mesh of {mesh_mm:.0f} mm lets {share:.0%} of "
                                 "these cats through", _CP),
        "screen_pet": Factor(0.05, "Pet-resistant screen", _MEM),
        "screen_insect": Factor(0.6, "Insect screen only: cats push or claw through it",
                                "Gheren et al. (86 % of falls from homes without screens); "
                                "value " + _MEM),
        "limiter_fitted": Factor(0.05, "Limiter set to {gap_mm:.0f} mm (left released now and "
                                 "then)", _MEM),
        "limiter_gap_large": Factor(1.0, "Limiter gap of {gap_mm:.0f} mm lets {share:.0%} of "
                                    "these cats through (child limiters of 100 mm do not stop "
                                    "cats)", "child limit: ASTM F2090 (102 mm); " + _CP),
        # perch invitations and climbing aids
        "flat_rail_top": Factor(1.5, "Flat, wide rail top invites the cat to sit on it", _CP),
        "climbing_aids": Factor(1.5, "Furniture, planters or bins next to the guard help the cat "
                                "up", _CP),
        "climbable_infill": Factor(1.2, "Climbable infill (horizontal rails) under the rail top",
                                   "ADK 3.3 asks for guards not readily climbable (for children);"
                                   " value " + _MEM),
        "escape_window": Factor(1.0, "Emergency escape window: only releasable devices that meet "
                                "the local code may be fitted", "IRC R310; Approved Document B"),
    }
)

@dataclass(frozen=True, slots=True)
class LikelihoodResult:
    """Likelihood per opening, in building order.

    ``annual_probability``: chance over 12 months that a cat falls from there (0..1);
    ``one_in_n``: its inverse, for "1 in N" wording; ``rate_per_year``: the yearly fall rate
    before it is turned into a probability; ``factors`` and ``hazards``: plain words per opening.
    """

    annual_probability: npt.NDArray[np.float64]
    one_in_n: npt.NDArray[np.float64]
    rate_per_year: npt.NDArray[np.float64]
    factors: tuple[tuple[str, ...], ...]
    hazards: tuple[tuple[str, ...], ...]


def _phi(z: float) -> float:
    return 0.5 * (1.0 + math.erf(z / math.sqrt(2.0)))


def mass_cdf(dist: Distribution, mass_kg: float) -> float:
    """Share of cats lighter than ``mass_kg`` (kg) under a profile's mass distribution."""
    x = float(mass_kg)
    if isinstance(dist, Fixed):
        return 1.0 if dist.value < x else 0.0
    if isinstance(dist, Uniform):
        if dist.max <= dist.min:
            return 1.0 if dist.min < x else 0.0
        return min(1.0, max(0.0, (x - dist.min) / (dist.max - dist.min)))
    if isinstance(dist, Normal):  # truncated at zero, like the sampler
        if dist.sd <= 0:
            return 1.0 if dist.mean < x else 0.0
        if x <= 0:
            return 0.0
        lo = _phi(-dist.mean / dist.sd)
        return (_phi((x - dist.mean) / dist.sd) - lo) / (1.0 - lo)
    if isinstance(dist, LogNormal):
        if dist.sd <= 0:
            return 1.0 if dist.mean < x else 0.0
        if x <= 0:
            return 0.0
        s2 = math.log1p((dist.sd / dist.mean) ** 2)
        mu = math.log(dist.mean) - 0.5 * s2
        return _phi((math.log(x) - mu) / math.sqrt(s2))
    raise TypeError(f"unknown distribution {dist!r}")


def gap_pass_share(gap_mm: float, profile: CatProfile) -> float:
    """Share (0..1) of the profile's cats whose head fits through a gap of ``gap_mm`` mm."""
    if gap_mm <= 0:
        return 0.0
    limit_kg = HEAD_REF_MASS_KG * (gap_mm / HEAD_WIDTH_REF_MM) ** 3
    return mass_cdf(profile.mass_kg, limit_kg)


def _words(key: str, **values: float) -> str:
    return FACTORS[key].words.format(**values)


def _one(o: Opening, profile: CatProfile) -> tuple[float, tuple[str, ...], tuple[str, ...]]:
    """Yearly fall rate, factors and hazards of one opening."""
    words: list[str] = []

    def use(key: str, **values: float) -> float:
        words.append(_words(key, **values))
        return FACTORS[key].multiplier

    rate = FACTORS["base"].multiplier
    rate *= use(f"cats_{CatsPresent(o.cats_present).value}")
    if o.kind is OpeningKind.FIXED:
        rate *= use("kind_fixed")
        return rate, tuple(words), ()
    rate *= use(f"open_{OpenFrequency(o.open_frequency).value}")
    kind_key = {
        OpeningKind.BALCONY: "kind_balcony",
        OpeningKind.TERRACE: "kind_balcony",
        OpeningKind.GALLERY: "kind_gallery",
        OpeningKind.WINDOW_TILT_TURN: "kind_tilt_turn",
        OpeningKind.WINDOW_TOP_HUNG: "kind_top_hung",
    }.get(o.kind, "kind_window")
    rate *= use(kind_key)

    # barriers, each a share of cats let through; a cat must defeat all of them
    passing = 1.0
    # A barrier lets through the cats that fit through its gap plus, of the others, the
    # residual share that still defeat it: continuous and rising with the gap, so a coarser
    # barrier never gives a lower likelihood. The words say which of the two dominates.
    if o.netting_mesh_mm is not None:
        share = gap_pass_share(o.netting_mesh_mm, profile)
        net = FACTORS["net_fitted"].multiplier
        passing *= net + (1.0 - net) * share
        if share < 0.5:
            use("net_fitted", mesh_mm=o.netting_mesh_mm)
        else:
            use("net_mesh_large", mesh_mm=o.netting_mesh_mm, share=share)
    if o.screen is Screen.PET_RESISTANT:
        passing *= use("screen_pet")
    elif o.screen is Screen.INSECT:
        passing *= use("screen_insect")
    if o.limiter_gap_mm is not None and o.kind not in BALCONY_LIKE:
        share = gap_pass_share(o.limiter_gap_mm, profile)
        lim = FACTORS["limiter_fitted"].multiplier
        passing *= lim + (1.0 - lim) * share
        if share < 0.5:
            use("limiter_fitted", gap_mm=o.limiter_gap_mm)
        else:
            use("limiter_gap_large", gap_mm=o.limiter_gap_mm, share=share)
    if o.kind in BALCONY_LIKE:
        over = use("guard_over")
        gaps = [g for g in (o.largest_gap_mm, o.bottom_gap_mm) if g is not None]
        through = 0.0
        if gaps:
            gap = max(gaps)
            through = gap_pass_share(gap, profile)
            use("guard_gap" if through >= 0.05 else "guard_gap_small", gap_mm=gap, share=through)
        passing *= 1.0 - (1.0 - over) * (1.0 - through)
    elif o.netting_mesh_mm is None and o.screen is Screen.NONE and o.limiter_gap_mm is None:
        use("sill_only")
    rate *= passing

    # perch invitations and climbing aids (a cat that reaches the rail top or sill more often)
    if o.flat_rail_top:
        rate *= use("flat_rail_top")
    if o.climbing_aids:
        rate *= use("climbing_aids")
    if o.climbable_infill:
        rate *= use("climbable_infill")
    if o.escape_window:
        use("escape_window")

    hazards: list[str] = []
    if (
        o.kind is OpeningKind.WINDOW_TILT_TURN
        and o.open_frequency is not OpenFrequency.NEVER
        and o.cats_present is not CatsPresent.NO
        and o.screen is not Screen.PET_RESISTANT
        and not (o.netting_mesh_mm is not None and gap_pass_share(o.netting_mesh_mm, profile) < 0.5)
    ):
        hazards.append(ENTRAPMENT_HAZARD)
    return rate, tuple(words), tuple(hazards)


def assess_likelihood(
    openings: Sequence[Opening], *, profile: CatProfile | None = None
) -> LikelihoodResult:
    """Likelihood of a fall within 12 months for each opening, in the order given.

    ``profile`` decides which gaps the cats pass (default: the adult preset)."""
    prof = CAT_PRESETS["adult"] if profile is None else profile
    return likelihood_of_rows([opening_likelihood(o, prof) for o in openings])


#: One opening's likelihood: yearly fall rate, factors and hazards (see :func:`opening_likelihood`).
OpeningLikelihood = tuple[float, tuple[str, ...], tuple[str, ...]]


def opening_likelihood(o: Opening, profile: CatProfile) -> OpeningLikelihood:
    """Yearly fall rate (1/year), factors and hazards of one opening: what
    :func:`assess_likelihood` combines (it depends on this opening and the profile only)."""
    return _one(o, profile)


def likelihood_of_rows(rows: Sequence[OpeningLikelihood]) -> LikelihoodResult:
    """The :class:`LikelihoodResult` of openings given by their :func:`opening_likelihood`."""
    rate = np.array([r[0] for r in rows], dtype=float)
    p = np.maximum(-np.expm1(-rate), MIN_ANNUAL_PROBABILITY)
    return LikelihoodResult(
        annual_probability=p,
        one_in_n=1.0 / p,
        rate_per_year=rate,
        factors=tuple(r[1] for r in rows),
        hazards=tuple(r[2] for r in rows),
    )
