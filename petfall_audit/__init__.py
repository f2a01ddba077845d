"""petfall_audit: audit a residential building for the risk that a resident cat falls.

The public API is listed in ``__all__``; everything else is private. Importing this package
never imports Qt, and the computation functions are loaded on first use so that
``import petfall_audit`` stays light. The package is typed (``py.typed``): a type checker sees
every public name with its real signature (the ``TYPE_CHECKING`` imports below).

Typical use::

    from petfall_audit import load_building, assess, make_plan
    building = load_building("sample_buildings/tower.json")
    assessment = assess(building, samples=4000, seed=1)
    plan = make_plan(assessment, budget=5000)
"""

from __future__ import annotations

from importlib import import_module
from typing import TYPE_CHECKING, Any

from petfall_audit.errors import (
    BuildingFileError,
    CatalogueError,
    FileFormatError,
    PetfallError,
    PlanError,
    Problem,
    ReportError,
    ScheduleImportError,
    ValidationFailed,
)
from petfall_audit.model import (
    CAT_PRESETS,
    Building,
    BuildingInfo,
    CatProfile,
    Facade,
    Floor,
    Opening,
    OpeningKind,
    Surface,
    SurfaceKind,
)

if TYPE_CHECKING:  # what the lazy names below are, for type checkers (never run)
    from petfall_audit.cautions import CAUTIONS as CAUTIONS
    from petfall_audit.fixes import load_catalogue as load_catalogue
    from petfall_audit.injury import BANDS as BANDS
    from petfall_audit.io.building_file import load_building as load_building
    from petfall_audit.io.building_file import parse_building as parse_building
    from petfall_audit.io.building_file import save_building as save_building
    from petfall_audit.io.building_file import validate_building as validate_building
    from petfall_audit.physics import air_density as air_density
    from petfall_audit.physics import fall_profile as fall_profile
    from petfall_audit.physics import fall_time as fall_time
    from petfall_audit.physics import impact_speed as impact_speed
    from petfall_audit.physics import simulate_falls as simulate_falls
    from petfall_audit.plan import Plan as Plan
    from petfall_audit.plan import make_plan as make_plan
    from petfall_audit.risk import MODEL_VERSION as MODEL_VERSION
    from petfall_audit.risk import Assessment as Assessment
    from petfall_audit.risk import assess as assess
    from petfall_audit.sampling import sample_cat_profile as sample_cat_profile

__version__ = "0.1.0"

# Public name -> module that defines it (imported on first access).
_LAZY: dict[str, str] = {
    "load_building": "petfall_audit.io.building_file",
    "save_building": "petfall_audit.io.building_file",
    "parse_building": "petfall_audit.io.building_file",
    "validate_building": "petfall_audit.io.building_file",
    "air_density": "petfall_audit.physics",
    "impact_speed": "petfall_audit.physics",
    "fall_time": "petfall_audit.physics",
    "fall_profile": "petfall_audit.physics",
    "simulate_falls": "petfall_audit.physics",
    "sample_cat_profile": "petfall_audit.sampling",
    "BANDS": "petfall_audit.injury",
    "assess": "petfall_audit.risk",
    "Assessment": "petfall_audit.risk",
    "MODEL_VERSION": "petfall_audit.risk",
    "load_catalogue": "petfall_audit.fixes",
    "make_plan": "petfall_audit.plan",
    "Plan": "petfall_audit.plan",
    "CAUTIONS": "petfall_audit.cautions",
}

__all__ = [
    "__version__",
    "Building",
    "BuildingInfo",
    "CatProfile",
    "CAT_PRESETS",
    "Facade",
    "Floor",
    "Opening",
    "OpeningKind",
    "Surface",
    "SurfaceKind",
    "PetfallError",
    "BuildingFileError",
    "CatalogueError",
    "FileFormatError",
    "PlanError",
    "Problem",
    "ReportError",
    "ScheduleImportError",
    "ValidationFailed",
    *_LAZY,
]


def __getattr__(name: str) -> Any:
    module = _LAZY.get(name)
    if module is None:
        raise AttributeError(f"module 'petfall_audit' has no attribute {name!r}")
    value = getattr(import_module(module), name)
    globals()[name] = value
    return value


def __dir__() -> list[str]:
    return sorted(__all__)
