"""The building model: plain, immutable value objects in SI units.

Nothing here parses, validates against a file or imports Qt. Parsing and located validation
live in :mod:`petfall_audit.io`; the computation modules take these objects and numpy arrays.
Update an object with :func:`dataclasses.replace`.

Units: lengths in metres (``_m``) unless a name says millimetres (``_mm``), masses in kilograms,
areas in square metres, speeds in metres per second, times in seconds, temperatures in °C.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from enum import StrEnum

__all__ = [
    "OpeningKind",
    "SurfaceKind",
    "Screen",
    "OpenFrequency",
    "CatsPresent",
    "BuildingInfo",
    "Floor",
    "PlanSettings",
    "FixStatus",
    "FixRecord",
    "FIX_STATUSES_IN_PLACE",
    "Facade",
    "Surface",
    "Opening",
    "Fixed",
    "Normal",
    "Uniform",
    "LogNormal",
    "Distribution",
    "CatProfile",
    "CAT_PRESETS",
    "InjuryThresholds",
    "Building",
    "BALCONY_LIKE",
    "KIND_LABELS",
    "WINDOW_KINDS",
]


class OpeningKind(StrEnum):
    """What kind of opening a cat could fall from."""

    BALCONY = "balcony"
    TERRACE = "terrace"
    GALLERY = "gallery"  # walkway / access gallery
    WINDOW_CASEMENT = "window_casement"
    WINDOW_SLIDING = "window_sliding"
    WINDOW_HUNG = "window_hung"
    WINDOW_TILT_TURN = "window_tilt_turn"
    WINDOW_TOP_HUNG = "window_top_hung"  # awning / top-hung
    FIXED = "fixed"  # fixed glazing, never opens


#: Kinds that stand out from the facade and can catch a cat falling from above.
BALCONY_LIKE: frozenset[OpeningKind] = frozenset(
    {OpeningKind.BALCONY, OpeningKind.TERRACE, OpeningKind.GALLERY}
)
#: Each kind of opening in plain words.
KIND_LABELS: dict[OpeningKind, str] = {
    OpeningKind.BALCONY: "Balcony",
    OpeningKind.TERRACE: "Roof terrace",
    OpeningKind.GALLERY: "Walkway / access gallery",
    OpeningKind.WINDOW_CASEMENT: "Casement window",
    OpeningKind.WINDOW_SLIDING: "Sliding window",
    OpeningKind.WINDOW_HUNG: "Hung (sash) window",
    OpeningKind.WINDOW_TILT_TURN: "Tilt-and-turn window",
    OpeningKind.WINDOW_TOP_HUNG: "Top-hung (awning) window",
    OpeningKind.FIXED: "Fixed glazing",
}
#: Kinds that are windows in a wall (``projection_m`` is 0 for them).
WINDOW_KINDS: frozenset[OpeningKind] = frozenset(
    {
        OpeningKind.WINDOW_CASEMENT,
        OpeningKind.WINDOW_SLIDING,
        OpeningKind.WINDOW_HUNG,
        OpeningKind.WINDOW_TILT_TURN,
        OpeningKind.WINDOW_TOP_HUNG,
        OpeningKind.FIXED,
    }
)


class SurfaceKind(StrEnum):
    """What a falling cat meets at the bottom."""

    CONCRETE = "concrete"  # concrete or paving
    ASPHALT = "asphalt"
    GRAVEL = "gravel"
    LAWN = "lawn"  # lawn or bare soil
    PLANTING = "planting"  # planting bed, shrubs
    WATER = "water"
    ROOF = "roof"  # roof membrane
    DECK = "deck"  # timber deck


class Screen(StrEnum):
    NONE = "none"
    INSECT = "insect"
    PET_RESISTANT = "pet_resistant"


class OpenFrequency(StrEnum):
    NEVER = "never"
    RARELY = "rarely"
    SEASONAL = "seasonal"
    DAILY = "daily"
    ALWAYS = "always"


class CatsPresent(StrEnum):
    YES = "yes"
    NO = "no"
    UNKNOWN = "unknown"


@dataclass(frozen=True, slots=True)
class BuildingInfo:
    """Who and what is audited.

    ``site_altitude_m`` above mean sea level; ``air_temperature_c`` the design air temperature;
    ``audit_date`` an ISO 8601 date or empty; ``code_profile``: the jurisdiction whose code profile
    (its rules, with clause and confidence) applies to the building (see
    :mod:`petfall_audit.code_profile`; the physics never reads it).
    """

    name: str
    address: str = ""
    site_altitude_m: float = 0.0
    air_temperature_c: float = 15.0
    auditor: str = ""
    audit_date: str = ""
    notes: str = ""
    code_profile: str = "generic"


@dataclass(frozen=True, slots=True)
class PlanSettings:
    """The fix plan's settings kept with the audit: ``budget`` (``None`` = none set yet: the app
    proposes a default and says so) in ``currency`` (ISO 4217 code; empty = the control
    catalogue's); ``samples`` and ``seed`` of the assessment the plan was made from (``None`` =
    the defaults), so that the same plan comes out after reopening the file."""

    budget: float | None = None
    currency: str = ""
    samples: int | None = None
    seed: int | None = None


class FixStatus(StrEnum):
    """Where a recommended fix stands."""

    RECOMMENDED = "recommended"
    APPROVED = "approved"
    FITTED = "fitted"
    CHECKED = "checked"  # fitted, and checked on site
    DECLINED = "declined"


#: Statuses of a fix that is in place on the building.
FIX_STATUSES_IN_PLACE: frozenset[FixStatus] = frozenset({FixStatus.FITTED, FixStatus.CHECKED})


@dataclass(frozen=True, slots=True)
class FixRecord:
    """One recommended fix and what became of it: control ``control_id`` of the control
    catalogue on opening ``opening_id``, its ``status``, the ``date`` of that status (ISO 8601
    ``YYYY-MM-DD`` or empty) and a free ``note``."""

    opening_id: str
    control_id: str
    status: FixStatus = FixStatus.RECOMMENDED
    date: str = ""
    note: str = ""


@dataclass(frozen=True, slots=True)
class Floor:
    """A storey. ``elevation_m``: finished floor level above the building's datum."""

    level: int
    label: str
    elevation_m: float


@dataclass(frozen=True, slots=True)
class Facade:
    """A named building face, ``length_m`` long; openings sit along it at ``x_m``."""

    id: str
    length_m: float
    label: str = ""


@dataclass(frozen=True, slots=True)
class Surface:
    """What lies below a facade (ground, podium roof, canopy, pond, lightwell...).

    ``elevation_m`` is the top of the surface above the datum; below 0 it is a sunken area
    (a lightwell, a basement area) whose rim is at the datum. Its outward extent runs from
    ``from_facade_m`` to ``to_facade_m`` (``None``: unbounded, e.g. the street beyond), and
    along the facade from ``x_from_m`` to ``x_to_m`` (metres along the facade, as openings'
    ``x_m``; ``None``: from the facade's start / to its end). ``facade`` is the facade it lies
    in front of, or ``None`` for every facade (then it has no extent along a facade).
    """

    id: str
    kind: SurfaceKind
    elevation_m: float
    facade: str | None = None
    from_facade_m: float = 0.0
    to_facade_m: float | None = None
    label: str = ""
    x_from_m: float | None = None
    x_to_m: float | None = None


@dataclass(frozen=True, slots=True)
class Opening:
    """A balcony, terrace, gallery or window on one floor and facade.

    Geometry: ``x_m`` is the left edge along the facade, ``width_m`` its width, ``projection_m``
    how far it stands out from the facade (0 for windows), ``perch_height_m`` the rail top or sill
    above its floor. Guard: ``largest_gap_mm`` (widest gap in the infill, ``None`` = solid),
    ``bottom_gap_mm`` (gap under the guard, ``None`` = none). ``limiter_gap_mm``: the opening a
    limiter allows (``None`` = no limiter). ``netting_mesh_mm``: mesh of fitted netting (``None`` =
    no netting).
    """

    id: str
    floor: int
    facade: str
    kind: OpeningKind
    x_m: float
    width_m: float
    projection_m: float = 0.0
    perch_height_m: float = 1.1
    largest_gap_mm: float | None = None
    bottom_gap_mm: float | None = None
    climbable_infill: bool = False
    flat_rail_top: bool = False
    climbing_aids: bool = False  # furniture, planters or bins next to the guard
    limiter_gap_mm: float | None = None
    screen: Screen = Screen.NONE
    netting_mesh_mm: float | None = None
    open_frequency: OpenFrequency = OpenFrequency.SEASONAL
    cats_present: CatsPresent = CatsPresent.UNKNOWN
    escape_window: bool = False
    notes: str = ""
    photos: tuple[str, ...] = ()


# --- cat profile -------------------------------------------------------------------------------


@dataclass(frozen=True, slots=True)
class Fixed:
    """A parameter that takes one value."""

    value: float


@dataclass(frozen=True, slots=True)
class Normal:
    """Normal distribution, truncated at zero by the sampler (quantities are positive)."""

    mean: float
    sd: float


@dataclass(frozen=True, slots=True)
class Uniform:
    """Uniform distribution on [min, max]."""

    min: float
    max: float


@dataclass(frozen=True, slots=True)
class LogNormal:
    """Log-normal distribution given by the arithmetic ``mean`` and ``sd`` of the quantity."""

    mean: float
    sd: float


Distribution = Fixed | Normal | Uniform | LogNormal


@dataclass(frozen=True, slots=True)
class CatProfile:
    """The population of cats at risk.

    ``cda_tense_m2`` / ``cda_spread_m2``: drag coefficient × frontal area in the tense and the
    spread-out posture (m²). ``relax_probability``: chance that a cat spreads out at all.
    ``relax_fraction``: fraction of the tense terminal speed at which it does. ``righting_time_s``:
    time it needs to turn feet-down. ``launch_speed_mps``: horizontal speed leaving the perch.
    ``preset`` names the preset the profile started from (``None`` if fully custom).
    """

    mass_kg: Distribution
    cda_tense_m2: Distribution
    cda_spread_m2: Distribution
    relax_probability: float
    relax_fraction: Distribution
    righting_time_s: Distribution
    launch_speed_mps: Distribution
    preset: str | None = None

    @property
    def is_deterministic(self) -> bool:
        """True when every sample is the same cat."""
        params = (
            self.mass_kg,
            self.cda_tense_m2,
            self.cda_spread_m2,
            self.relax_fraction,
            self.righting_time_s,
            self.launch_speed_mps,
        )
        return all(isinstance(p, Fixed) for p in params) and self.relax_probability in (0.0, 1.0)


# Sources for the presets (see docs/risk-model.md):
# - mean adult mass 4.1 kg among cats that fell: Candela Andrade et al. 2025, J Feline Med Surg;
#   the spread (sd 1.1 kg, log-normal) is common practice, no source.
# - tense / spread terminal speeds about 24 / 17 m/s, relaxing at about three quarters of the
#   tense terminal speed: fact of the trade, no source. C_d·A follows from
#   v_t = sqrt(2 m g / (rho C_d A))
#   at 4.1 kg and rho = 1.225 kg/m³: 0.114 m² tense, 0.227 m² spread.
# - kitten and heavy-adult masses: assumptions (a kitten weighs about 1 kg at three months, common
#   practice, no source; 6.0 kg is near the 6.1 kg ideal-weight mean of males of the heaviest
#   breed class, Kienzle & Moik 2011, Br J Nutr); their C_d·A scale with mass^(2/3) (isometric).
# - righting time about 0.3 s: popular science, unverified (from memory); the kitten's longer
#   righting time is an assumption.
# - chance of relaxing and launch speeds: assumptions of this model (from memory), adjustable.
CAT_PRESETS: dict[str, CatProfile] = {
    "adult": CatProfile(
        mass_kg=LogNormal(4.1, 1.1),
        cda_tense_m2=Normal(0.114, 0.012),
        cda_spread_m2=Normal(0.227, 0.023),
        relax_probability=0.7,
        relax_fraction=Uniform(0.65, 0.85),
        righting_time_s=Uniform(0.25, 0.4),
        launch_speed_mps=Uniform(0.0, 2.5),
        preset="adult",
    ),
    "kitten": CatProfile(
        mass_kg=LogNormal(1.5, 0.5),
        cda_tense_m2=Normal(0.058, 0.008),
        cda_spread_m2=Normal(0.116, 0.015),
        relax_probability=0.5,
        relax_fraction=Uniform(0.65, 0.85),
        righting_time_s=Uniform(0.3, 0.5),
        launch_speed_mps=Uniform(0.0, 2.0),
        preset="kitten",
    ),
    "heavy_adult": CatProfile(
        mass_kg=LogNormal(6.0, 1.0),
        cda_tense_m2=Normal(0.147, 0.015),
        cda_spread_m2=Normal(0.294, 0.03),
        relax_probability=0.7,
        relax_fraction=Uniform(0.65, 0.85),
        righting_time_s=Uniform(0.25, 0.4),
        launch_speed_mps=Uniform(0.0, 2.0),
        preset="heavy_adult",
    ),
}


@dataclass(frozen=True, slots=True)
class InjuryThresholds:
    """The injury dose–response: how the chance of each band grows with the dose.

    The dose is the mean deceleration of the stop in g (:mod:`petfall_audit.injury`). For a
    fall of dose ``D``, the chance that the injury is band ``b`` or worse is
    ``Φ((ln D − ln θ_b) / spread)``, with ``θ_b`` the *median dose* of the band (``moderate_g``,
    ``serious_g``, ``life_threatening_g``: half of the cats hurt by a fall of that dose are hurt
    that badly or worse) and ``spread`` the standard deviation of ``ln D`` between cats hurt by
    the same fall (dimensionless; 0 makes the band a step function of the dose). The defaults
    are fitted to published case series (``docs/risk-model.md``, :mod:`petfall_audit.calibration`).
    """

    moderate_g: float = 24.3
    serious_g: float = 72.9
    life_threatening_g: float = 186.0
    spread: float = 0.83

    def __post_init__(self) -> None:
        t = (self.moderate_g, self.serious_g, self.life_threatening_g)
        if not all(math.isfinite(x) for x in t) or not 0.0 < t[0] < t[1] < t[2]:
            raise ValueError(
                "the median doses must be above 0 and rise from moderate to serious to "
                f"life-threatening, got {t[0]:g}, {t[1]:g} and {t[2]:g} g"
            )
        if not (math.isfinite(self.spread) and 0.0 <= self.spread <= 5.0):
            raise ValueError(f"the spread must lie between 0 and 5, got {self.spread:g}")


@dataclass(frozen=True, slots=True)
class Building:
    """A whole audited building. Tuples keep it hashable and immutable."""

    info: BuildingInfo
    floors: tuple[Floor, ...] = ()
    facades: tuple[Facade, ...] = ()
    surfaces: tuple[Surface, ...] = ()
    openings: tuple[Opening, ...] = ()
    cat_profile: CatProfile = field(default_factory=lambda: CAT_PRESETS["adult"])
    injury: InjuryThresholds = field(default_factory=InjuryThresholds)
    plan: PlanSettings = field(default_factory=PlanSettings)
    #: The recommended fixes and their status (file version 2, optional), in recorded order.
    fixes: tuple[FixRecord, ...] = ()

    def floor(self, level: int) -> Floor:
        """The floor at ``level``; ``KeyError`` if there is none."""
        for f in self.floors:
            if f.level == level:
                return f
        raise KeyError(level)

    def opening(self, opening_id: str) -> Opening:
        """The opening with ``opening_id``; ``KeyError`` if there is none."""
        for o in self.openings:
            if o.id == opening_id:
                return o
        raise KeyError(opening_id)

    def facade(self, facade_id: str) -> Facade:
        """The facade with ``facade_id``; ``KeyError`` if there is none."""
        for f in self.facades:
            if f.id == facade_id:
                return f
        raise KeyError(facade_id)
