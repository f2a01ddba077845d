"""Figure data for the PDF report and the on-screen views: plain dataclasses of numpy arrays.

No drawing happens here: the report draws these arrays with reportlab, the window with
pyqtgraph. Lengths in metres above the building's datum, speeds in m/s, accelerations in m/s²,
times in s, likelihoods as yearly probabilities (0..1), costs in the catalogue's currency.

- :mod:`.elevation`: facades seen from outside (:func:`facade_elevations`) and what lies below
  and in front of them (:func:`facade_context`).
- :mod:`.floors`: per-floor summaries (:func:`level_summary`, :func:`floor_comparison`,
  :func:`align_levels`).
- :mod:`.falls`: the representative cat and its falls (:func:`representative_cat`,
  :func:`fall_profile_figure`, :func:`posture_paths`, :func:`impact_speed_curve`).
- :mod:`.budget`: budgets for the risk-against-budget curve (:func:`budget_grid`,
  :func:`knee_budget`).
- :mod:`.sensitivity`: how much the top risks rest on the cat profile
  (:func:`sensitivity_figure`).
"""

from __future__ import annotations

from petfall_audit.figures.budget import budget_grid, knee_budget
from petfall_audit.figures.elevation import (
    HEAD_HEIGHT_M,
    SURFACE_FILLS,
    CatchingBalcony,
    FacadeContext,
    FacadeElevation,
    SurfaceBand,
    facade_context,
    facade_elevations,
    storey_heights_m,
)
from petfall_audit.figures.falls import (
    FallProfileFigure,
    FallTrace,
    ImpactCurve,
    PosturePath,
    RepresentativeCat,
    fall_profile_figure,
    impact_speed_curve,
    posture_paths,
    representative_cat,
)
from petfall_audit.figures.floors import (
    FloorComparison,
    FloorSummary,
    LevelSummary,
    align_levels,
    floor_comparison,
    floors_by_elevation,
    level_summary,
)
from petfall_audit.figures.sensitivity import (
    SWING_DEFINITION,
    SensitivityFigure,
    sensitivity_figure,
    sensitivity_figure_from_result,
)

__all__ = [
    "HEAD_HEIGHT_M",
    "SURFACE_FILLS",
    "CatchingBalcony",
    "FacadeContext",
    "FacadeElevation",
    "FallProfileFigure",
    "FallTrace",
    "FloorComparison",
    "FloorSummary",
    "ImpactCurve",
    "LevelSummary",
    "PosturePath",
    "RepresentativeCat",
    "SWING_DEFINITION",
    "SensitivityFigure",
    "SurfaceBand",
    "align_levels",
    "budget_grid",
    "facade_context",
    "facade_elevations",
    "fall_profile_figure",
    "floor_comparison",
    "floors_by_elevation",
    "impact_speed_curve",
    "knee_budget",
    "level_summary",
    "posture_paths",
    "representative_cat",
    "sensitivity_figure",
    "sensitivity_figure_from_result",
    "storey_heights_m",
]
