"""How many cats an assessment samples, and with which seed, by default and at most.

Plain constants in a module of their own, so that a command can check its arguments and
start its worker processes before it imports numpy and scipy (``batch --jobs``).
:mod:`petfall_audit.sampling` and :mod:`petfall_audit.risk` give the same names.
"""

from __future__ import annotations

__all__ = ["DEFAULT_SAMPLES", "DEFAULT_SEED", "MAX_SAMPLES"]

#: Cats sampled per opening by the command line, the report and the app's full results.
DEFAULT_SAMPLES = 4000
#: Seed of the samples (same seed, same cats).
DEFAULT_SEED = 1
#: Most sampled cats one assessment takes (each block of the simulation holds at least one
#: opening's falls of every cat: 8 MB per array at this count).
MAX_SAMPLES = 1_000_000
