"""Bring building files of older versions up to the current one.

``MIGRATIONS`` maps a version ``n`` to a function that takes a document of version ``n`` and
returns the same building as version ``n + 1``. :func:`migrate` applies them in order. Version 1
is the first version. When the format changes: bump ``CURRENT_VERSION`` in ``_schema.py``, add
the step here, and commit a fixture of the old version under ``tests/fixtures/`` that must keep
loading.

Version 2 adds optional fields only: a surface's extent along its facade (``x_from_m``,
``x_to_m``), the ``"injury"`` section (the injury dose–response) and the building's
``"code_profile"``. A version-1 file means exactly what it meant: its surfaces run the whole
length of their facade, it uses the default dose–response and the generic code profile, so the
step from 1 to 2 changes nothing but the version number.
"""

from __future__ import annotations

import copy
from collections.abc import Callable
from typing import Any

from petfall_audit.errors import FileFormatError
from petfall_audit.io._schema import CURRENT_VERSION

__all__ = ["MIGRATIONS", "Migration", "migrate"]

Migration = Callable[[dict[str, Any]], dict[str, Any]]

def _v1_to_v2(doc: dict[str, Any]) -> dict[str, Any]:
    """Version 1 → 2: only optional fields were added; their absence keeps the old meaning."""
    return doc


#: ``{from_version: step}``; each step returns the document one version newer.
MIGRATIONS: dict[int, Migration] = {1: _v1_to_v2}


def migrate(doc: dict[str, Any], version: int) -> dict[str, Any]:
    """Return ``doc`` (of ``version``) migrated to ``CURRENT_VERSION``; ``doc`` is not changed.

    Raises :class:`FileFormatError` when a step is missing or a step fails.
    """
    if version == CURRENT_VERSION:
        return doc
    out = copy.deepcopy(doc)
    for step_from in range(version, CURRENT_VERSION):
        step = MIGRATIONS.get(step_from)
        if step is None:
            raise FileFormatError(
                f"unknown building file version {version}: this version of petfall-audit reads "
                f"versions {min(MIGRATIONS, default=CURRENT_VERSION)} to {CURRENT_VERSION}"
            )
        try:
            out = step(out)
            out["version"] = step_from + 1
        except Exception as exc:  # a step meets a document it cannot convert
            raise FileFormatError(
                f"cannot convert the building file from version {step_from} to "
                f"{step_from + 1}: {exc}"
            ) from exc
    return out
