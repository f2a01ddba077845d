"""Likelihood that a resident cat falls from an opening within 12 months.

An adaptation of the likelihood scale of England's housing health and safety rating system
(HHSRS: "1 in N over 12 months"): instead of a national statistic per hazard profile, the yearly
rate of falls is a base rate for a cat with daily access to an unguarded opening, multiplied by
the factors of :data:`FACTORS` (cats present, how often it is open, the kind of opening, the
barrier's effectiveness against a cat, perch invitations and climbing aids):

    rate = base × access × kind × (share of cats the barriers let through) × perch invitations
    annual_probability = 1 − exp(−rate)

Whether a gap lets a cat through follows the head (:mod:`petfall_audit.barriers`, which also
decides whether a barrier holds the cats): the share of a profile's cats that pass a gap is the
share lighter than ``4.1 kg × (gap / 55 mm)³`` (a kitten profile passes gaps that stop adults).
Every factor, its value and its source are in ``docs/risk-model.md``.

Tilt-and-turn windows also carry an entrapment hazard, reported apart from falls.
"""

from __future__ import annotations

import operator
from collections.abc import Hashable, Mapping, Sequence
from dataclasses import dataclass, fields
from types import MappingProxyType

import numpy as np
import numpy.typing as npt

from petfall_audit.barriers import (
    HEAD_REF_MASS_KG,
    HEAD_WIDTH_REF_MM,
    gap_holds,
    gap_pass_share,
    limiter_holds,
    mass_cdf,
    net_holds,
)
from petfall_audit.model import (
    BALCONY_LIKE,
    CAT_PRESETS,
    CatProfile,
    CatsPresent,
    OpenFrequency,
    Opening,
    OpeningKind,
    Screen,
)
from petfall_audit.reasons import Reason

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
    "opening_likelihoods",
    "likelihood_of_rows",
]

#: Floor on the yearly probability so "1 in N" stays finite (effectively never).
MIN_ANNUAL_PROBABILITY = 1e-6

#: The entrapment hazard of a tilt-and-turn window (its words: present.explain).
ENTRAPMENT_HAZARD = Reason.of("tilt_turn_entrapment")


@dataclass(frozen=True, slots=True)
class Factor:
    """One likelihood factor: ``multiplier`` on the yearly fall rate and the ``source`` of the
    value. Its words are in :mod:`petfall_audit.present.explain` (the factor's key is the code of
    the :class:`~petfall_audit.reasons.Reason` a result carries)."""

    multiplier: float
    source: str


_MEM = "from memory (model assumption)"
_CP = "common practice, no source"

#: Every likelihood factor, in one table. Keys are stable identifiers.
FACTORS: Mapping[str, Factor] = MappingProxyType(
    {
        # base rate: a cat with daily access to an opening with no barrier at all
        "base": Factor(0.05, _MEM),
        # access
        "cats_yes": Factor(1.0, "audit input"),
        "cats_unknown": Factor(0.3, _MEM),
        "cats_no": Factor(0.02, _MEM),
        "open_never": Factor(0.01, _MEM),
        "open_rarely": Factor(0.1, _MEM),
        "open_seasonal": Factor(0.4, "season: Candela Andrade et al. 2025 (77 % in summer); "
                                "Karabağlı et al. (68 % April-July); value " + _MEM),
        "open_daily": Factor(0.8, _MEM),
        "open_always": Factor(1.0, _MEM),
        # kind of opening
        "kind_balcony": Factor(1.0, _CP),
        "kind_gallery": Factor(0.5, _MEM),
        "kind_window": Factor(0.7, _CP),
        "kind_tilt_turn": Factor(0.6, _MEM),
        "kind_top_hung": Factor(0.3, _MEM),
        "kind_fixed": Factor(0.0, _CP),
        # barriers: share of cats a barrier lets through when they try
        "guard_over": Factor(0.5, "codes size guards for children (IBC 1015, Approved "
                             "Document K); value " + _MEM),
        "guard_gap": Factor(1.0, _CP),
        "guard_gap_small": Factor(1.0, _CP),
        "sill_only": Factor(1.0, _CP),
        "net_fitted": Factor(0.03, "mesh: pet-net practice (30 mm standard, 20 mm for kittens); "
                             "residual " + _MEM),
        "net_mesh_large": Factor(1.0, _CP),
        "screen_pet": Factor(0.05, _MEM),
        "screen_insect": Factor(0.6, "Gheren et al. (86 % of falls from homes without screens); "
                                "value " + _MEM),
        "limiter_fitted": Factor(0.05, _MEM),
        "limiter_gap_large": Factor(1.0, "child limit: ASTM F2090 (102 mm); " + _CP),
        # perch invitations and climbing aids
        "flat_rail_top": Factor(1.5, _CP),
        "climbing_aids": Factor(1.5, _CP),
        "climbable_infill": Factor(1.2, "ADK 3.3 asks for guards not readily climbable "
                                   "(for children); value " + _MEM),
        "escape_window": Factor(1.0, "IRC R310; Approved Document B"),
    }
)


@dataclass(frozen=True, slots=True)
class LikelihoodResult:
    """Likelihood per opening, in building order.

    ``annual_probability``: chance over 12 months that a cat falls from there (0..1);
    ``one_in_n``: its inverse, for "1 in N" wording; ``rate_per_year``: the yearly fall rate
    before it is turned into a probability; ``factors`` and ``hazards`` per opening, as
    :class:`~petfall_audit.reasons.Reason` codes and values (words:
    :func:`petfall_audit.present.explain.explain`).
    """

    annual_probability: npt.NDArray[np.float64]
    one_in_n: npt.NDArray[np.float64]
    rate_per_year: npt.NDArray[np.float64]
    factors: tuple[tuple[Reason, ...], ...]
    hazards: tuple[tuple[Reason, ...], ...]


def _one(o: Opening, profile: CatProfile) -> tuple[float, tuple[Reason, ...], tuple[Reason, ...]]:
    """Yearly fall rate, factors and hazards of one opening."""
    words: list[Reason] = []

    def use(key: str, **values: float) -> float:
        words.append(Reason.of(key, **values))
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
    # barrier never gives a lower likelihood. The words say whether the barrier holds the
    # profile's cats (petfall_audit.barriers, the same test as the figures and guard rules).
    if o.netting_mesh_mm is not None:
        share = gap_pass_share(o.netting_mesh_mm, profile)
        net = FACTORS["net_fitted"].multiplier
        passing *= net + (1.0 - net) * share
        if net_holds(o, profile):
            use("net_fitted", mesh_m=o.netting_mesh_mm / 1000.0)
        else:
            use("net_mesh_large", mesh_m=o.netting_mesh_mm / 1000.0, share=share)
    if o.screen is Screen.PET_RESISTANT:
        passing *= use("screen_pet")
    elif o.screen is Screen.INSECT:
        passing *= use("screen_insect")
    if o.limiter_gap_mm is not None and o.kind not in BALCONY_LIKE:
        share = gap_pass_share(o.limiter_gap_mm, profile)
        lim = FACTORS["limiter_fitted"].multiplier
        passing *= lim + (1.0 - lim) * share
        if limiter_holds(o, profile):
            use("limiter_fitted", gap_m=o.limiter_gap_mm / 1000.0)
        else:
            use("limiter_gap_large", gap_m=o.limiter_gap_mm / 1000.0, share=share)
    if o.kind in BALCONY_LIKE:
        over = use("guard_over")
        gaps = [g for g in (o.largest_gap_mm, o.bottom_gap_mm) if g is not None]
        through = 0.0
        if gaps:
            gap = max(gaps)
            through = gap_pass_share(gap, profile)
            use("guard_gap_small" if gap_holds(gap, profile) else "guard_gap",
                gap_m=gap / 1000.0, share=through)
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

    hazards: list[Reason] = []
    if (
        o.kind is OpeningKind.WINDOW_TILT_TURN
        and o.open_frequency is not OpenFrequency.NEVER
        and o.cats_present is not CatsPresent.NO
        and o.screen is not Screen.PET_RESISTANT
        and not net_holds(o, profile)
    ):
        hazards.append(ENTRAPMENT_HAZARD)
    return rate, tuple(words), tuple(hazards)


def assess_likelihood(
    openings: Sequence[Opening], *, profile: CatProfile | None = None
) -> LikelihoodResult:
    """Likelihood of a fall within 12 months for each opening, in the order given.

    ``profile`` decides which gaps the cats pass (default: the adult preset)."""
    prof = CAT_PRESETS["adult"] if profile is None else profile
    return likelihood_of_rows(opening_likelihoods(openings, prof))


#: One opening's likelihood: yearly fall rate, factors and hazards (see :func:`opening_likelihood`).
OpeningLikelihood = tuple[float, tuple[Reason, ...], tuple[Reason, ...]]


def opening_likelihood(o: Opening, profile: CatProfile) -> OpeningLikelihood:
    """Yearly fall rate (1/year), factors and hazards of one opening: what
    :func:`assess_likelihood` combines (it depends on this opening and the profile only)."""
    return _one(o, profile)


#: Fields of an opening that say where it is or describe it for people: the likelihood reads
#: none of them (a test checks it), so openings that differ only there share one likelihood.
#: Any other field, a new one too, is part of :func:`likelihood_key`.
PLACEMENT_FIELDS = frozenset({"id", "floor", "facade", "x_m", "width_m", "projection_m",
                              "perch_height_m", "notes", "photos"})
_key_of = operator.attrgetter(*(f.name for f in fields(Opening)
                                if f.name not in PLACEMENT_FIELDS))


def likelihood_key(o: Opening) -> Hashable:
    """The values of ``o`` that its likelihood depends on (every field but
    :data:`PLACEMENT_FIELDS`): openings with equal keys have equal likelihoods."""
    key: Hashable = _key_of(o)
    return key


def opening_likelihoods(openings: Sequence[Opening],
                        profile: CatProfile) -> list[OpeningLikelihood]:
    """:func:`opening_likelihood` of each opening, in order, worked out once per distinct
    :func:`likelihood_key` (the openings of a building repeat: the same window on every floor)."""
    seen: dict[Hashable, OpeningLikelihood] = {}
    out: list[OpeningLikelihood] = []
    for o in openings:
        key = _key_of(o)
        row = seen.get(key)
        if row is None:
            row = seen[key] = _one(o, profile)
        out.append(row)
    return out


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
