"""petfall_audit: audit a residential building for the risk that a resident cat falls.

The public API is listed in ``__all__``; everything else is private. Importing this package
never imports Qt.
"""

from __future__ import annotations

from petfall_audit.errors import (
    BuildingFileError,
    FileFormatError,
    PetfallError,
    Problem,
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

__version__ = "0.1.0"

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
    "FileFormatError",
    "ValidationFailed",
    "Problem",
]
