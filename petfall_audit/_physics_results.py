"""The result types of the fall physics (private; re-exported by :mod:`petfall_audit.physics`).

They live apart from the functions that fill them so that the private physics modules can
build them without importing the public module that calls them.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

from petfall_audit.model import SurfaceKind

FloatArray = npt.NDArray[np.float64]

#: Id of the implicit ground at datum elevation 0 that catches whatever nothing else catches.
GROUND_ID = "ground"


#: The fields of :class:`FallResults` that hold one value per fall, ``(n_openings, n_samples)``.
FALL_ARRAYS = ("drop_m", "landing", "impact_speed_mps", "fall_time_s", "righted")


@dataclass(frozen=True, slots=True)
class FallResults:
    """Every opening × every sampled cat.

    ``opening_ids`` in building order. ``landing_ids``: every surface id (building order), then
    every balcony/terrace/gallery opening id (they can catch), then :data:`GROUND_ID`;
    ``landing_kinds`` per landing element (a catching balcony, terrace or gallery counts as
    concrete, as does the implicit ground: an assumption). Arrays ``(n_openings, n_samples)``:
    ``drop_m`` (m), ``landing`` (index into ``landing_ids``), ``impact_speed_mps`` (m/s: the
    speed itself, downward and outward parts together),
    ``fall_time_s`` (s), ``righted`` (fall time ≥ the cat's righting time). ``rho_kg_m3`` is the
    air density used (kg/m³).
    """

    opening_ids: tuple[str, ...]
    landing_ids: tuple[str, ...]
    landing_kinds: tuple[SurfaceKind, ...]
    drop_m: FloatArray
    landing: npt.NDArray[np.intp]
    impact_speed_mps: FloatArray
    fall_time_s: FloatArray
    righted: npt.NDArray[np.bool_]
    rho_kg_m3: float


@dataclass(frozen=True, slots=True)
class FallProfile:
    """Time series of one fall, for plots. ``t_s`` (s); ``height_m`` above the landing point (m);
    ``speed_mps`` downward (m/s); ``accel_mps2`` downward (m/s²); ``switch_time_s`` when the cat
    starts to spread out (``None`` if it never relaxes or lands first); ``impact_speed_mps``,
    ``fall_time_s`` and ``drop_m`` of this fall."""

    t_s: FloatArray
    height_m: FloatArray
    speed_mps: FloatArray
    accel_mps2: FloatArray
    switch_time_s: float | None
    impact_speed_mps: float
    fall_time_s: float
    drop_m: float
