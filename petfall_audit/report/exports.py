"""CSV and JSON exports of the ranked results and the plan, reusing the ``io`` exporters.

JSON: the results envelope of :mod:`petfall_audit.io.results_envelope` (``"results"``: the
assessment, ``"plan"``: the plan or null), the same document as every other results JSON.
CSV: the ranked results in ``path``; the plan, if any, beside it as ``<stem>-plan.csv``.
"""

from __future__ import annotations

from pathlib import Path
from typing import TYPE_CHECKING, Any, Literal

from petfall_audit.io.atomic import atomic_write_text

if TYPE_CHECKING:
    from petfall_audit.plan import Plan
    from petfall_audit.risk import Assessment

__all__ = ["export_results", "plan_csv_path"]


def plan_csv_path(path: str | Path) -> Path:
    """Where the plan CSV goes beside a results CSV at ``path``."""
    p = Path(path)
    return p.with_name(f"{p.stem}-plan{p.suffix or '.csv'}")


def _plan_export() -> Any:
    from petfall_audit.io import plan_export

    return plan_export


def export_results(assessment: Assessment, plan: Plan | None, path: str | Path,
                   fmt: Literal["csv", "json"]) -> list[Path]:
    """Write the ranked results (and the plan) as ``fmt``; return the files written."""
    from petfall_audit.io import results_export

    path = Path(path)
    if fmt == "json":
        from petfall_audit.io.results_envelope import write_results_json

        return [write_results_json(path, assessment=assessment, plan=plan)]
    if fmt == "csv":
        atomic_write_text(path, results_export.assessment_to_csv(assessment))
        written = [path]
        if plan is not None:
            written.append(plan_csv_path(path))
            atomic_write_text(written[-1], _plan_export().plan_to_csv(plan))
        return written
    raise ValueError(f"fmt must be 'csv' or 'json', got {fmt!r}")
