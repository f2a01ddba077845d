"""Whether a barrier holds the cats of a profile: the one definition of a "protected" opening.

The likelihood (which words describe a net or a limiter), the guard-rule explanations (an opening
whose barrier already holds a cat needs none) and the figures (the hatch on an elevation, screen
and paper alike) all ask this module.

Gap model: if the head passes, the body follows (common practice, no source). The head width a
cat must get through is :data:`HEAD_WIDTH_REF_MM` for a cat of :data:`HEAD_REF_MASS_KG` and scales
with the cube root of mass, so the share of a profile's cats that pass a gap of ``g`` mm is the
share lighter than ``4.1 kg × (g / 55 mm)³``. A barrier *holds* the profile's cats when at most
:data:`HOLDS_PASS_SHARE_MAX` of them fit through it. Lengths in millimetres (``_mm``).
"""

from __future__ import annotations

import math

from petfall_audit.model import (
    BALCONY_LIKE,
    CatProfile,
    Distribution,
    Fixed,
    LogNormal,
    Normal,
    Opening,
    Screen,
    Uniform,
)

__all__ = [
    "HEAD_WIDTH_REF_MM",
    "HEAD_REF_MASS_KG",
    "HOLDS_PASS_SHARE_MAX",
    "mass_cdf",
    "gap_pass_share",
    "gap_holds",
    "net_holds",
    "limiter_holds",
    "is_protected",
]

#: Width of the head a cat must get through a gap, mm, for a cat of :data:`HEAD_REF_MASS_KG`:
#: between the bony cranial width (42.8 ± 2.6 mm, European Shorthair CT, Vet Sci 2021;8:161) and
#: the zygomatic width (about 60-70 mm, from memory), since a cat tilts its head and soft tissue
#: gives. Model assumption.
HEAD_WIDTH_REF_MM = 55.0
#: Mean adult mass among cats that fell, kg (Candela Andrade et al. 2025, J Feline Med Surg).
HEAD_REF_MASS_KG = 4.1
#: Largest share (0..1) of a profile's cats that may fit through a barrier that still counts as
#: holding them (model assumption: one cat in twenty).
HOLDS_PASS_SHARE_MAX = 0.05


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


def gap_holds(gap_mm: float, profile: CatProfile) -> bool:
    """True when a gap (a net's mesh, a limiter's opening, a guard's gap) of ``gap_mm`` mm holds
    the profile's cats: at most :data:`HOLDS_PASS_SHARE_MAX` of them fit through."""
    return gap_pass_share(gap_mm, profile) <= HOLDS_PASS_SHARE_MAX


def net_holds(opening: Opening, profile: CatProfile) -> bool:
    """True when the opening has a net whose mesh holds the profile's cats."""
    return opening.netting_mesh_mm is not None and gap_holds(opening.netting_mesh_mm, profile)


def limiter_holds(opening: Opening, profile: CatProfile) -> bool:
    """True when the opening is a window with a limiter whose gap holds the profile's cats
    (a limiter recorded on a balcony-like opening is not a barrier)."""
    return (opening.kind not in BALCONY_LIKE and opening.limiter_gap_mm is not None
            and gap_holds(opening.limiter_gap_mm, profile))


def is_protected(opening: Opening, profile: CatProfile) -> bool:
    """True when a barrier fitted to the opening holds the profile's cats: a net with a fine
    enough mesh, a pet-resistant screen, or a window limiter with a narrow enough gap. A net of
    100 mm mesh or a child limiter of 150 mm is no protection; a guard alone never is (cats jump
    onto the rail top)."""
    return (net_holds(opening, profile) or opening.screen is Screen.PET_RESISTANT
            or limiter_holds(opening, profile))
