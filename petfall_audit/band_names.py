"""The injury bands' names, mildest first (the index is the band number 0..3).

A plain constant in a module of its own, so that ``batch`` can name its summary's columns and
start its worker processes before it imports numpy. :mod:`petfall_audit.injury` gives the same
name.
"""

from __future__ import annotations

__all__ = ["BANDS"]

#: Injury bands, mildest first; the index into this tuple is the band number 0..3.
BANDS: tuple[str, ...] = ("minor", "moderate", "serious", "life-threatening")
