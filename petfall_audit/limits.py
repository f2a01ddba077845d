"""Plausibility limits of a building's values (units in the names). No Qt.

The building file's loader, the field registry (:mod:`petfall_audit.field_registry`), the
editor and the schedule import all check against these same numbers.
"""

from __future__ import annotations

import dataclasses

__all__ = ["Limits", "LIMITS"]


@dataclasses.dataclass(frozen=True, slots=True)
class Limits:
    """Plausibility limits; values outside them are reported as absurd (units in the names)."""

    level_min: int = -20
    level_max: int = 300
    elevation_min_m: float = -100.0
    elevation_max_m: float = 1000.0
    altitude_min_m: float = -500.0
    altitude_max_m: float = 9000.0
    temperature_min_c: float = -60.0
    temperature_max_c: float = 60.0
    length_max_m: float = 1000.0  # facade length, position along it, distance out from it
    width_max_m: float = 100.0
    projection_max_m: float = 30.0
    perch_height_max_m: float = 3.0
    gap_max_mm: float = 2000.0
    mesh_max_mm: float = 500.0
    facade_tolerance_m: float = 0.01  # x_m + width_m may pass the facade end by this much
    catch_reach_m: float = 5.0  # beyond its projection, how far out an opening's fall may land
    mass_min_kg: float = 0.1  # a newborn kitten weighs about 100 g (common practice, no source)
    mass_max_kg: float = 30.0
    cda_min_m2: float = 0.005  # C_d·A of a newborn kitten scaled from an adult's (m^(2/3))
    cda_max_m2: float = 2.0
    righting_time_max_s: float = 5.0
    launch_speed_max_mps: float = 20.0
    # Text limits (characters), so that every file the loader accepts prints: a name or label
    # fits a table cell, a note a few pages.
    id_max_chars: int = 100
    name_max_chars: int = 200  # building name, auditor, floor, facade and surface labels
    address_max_chars: int = 500
    notes_max_chars: int = 20_000
    photo_path_max_chars: int = 500
    photos_max: int = 20  # photos per opening
    budget_max: float = 1e12  # in the plan's currency: more than any building's fixes cost
    samples_max: int = 1_000_000  # sampled cats of a saved plan (risk.MAX_SAMPLES or fewer)
    seed_max: int = 2**63 - 1
    fixes_max: int = 100_000  # fix records in one file


LIMITS = Limits()
