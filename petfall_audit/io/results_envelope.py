"""The one envelope of every results JSON the tool writes.

``assess --format json``, each ``batch`` result file, ``report -o x.json``, ``plan --format
json``, the app's JSON exports and ``portfolio-plan.json`` are all this document, described by
``resources/results.schema.json`` and docs/results-json.md::

    {"format": "petfall-audit-results", "version": 1, "software_version": "...",
     "contents": ["results", "plan"],          # which of the three parts are filled in
     "results": <assessment> | null,           # petfall_audit.io.results_export
     "plan": <a building's fix plan> | null,   # petfall_audit.io.plan_export
     "portfolio": <an estate's plan> | null,   # petfall_audit.io.portfolio_export
     ...,                                      # with "comparison" in contents: the keys of
                                               # petfall_audit.io.compare_export at top level
     "caution": "<one line>", "cautions": ["...", ...]}

The parts keep the keys they always had, so a reader of ``doc["results"]["openings"]`` or
``doc["plan"]["actions"]`` works on every file.
"""

from __future__ import annotations

from collections.abc import Mapping
from pathlib import Path
from typing import TYPE_CHECKING, Any

from petfall_audit import __version__
from petfall_audit.cautions import CAUTIONS, CAUTIONS_SHORT

if TYPE_CHECKING:
    from petfall_audit.plan import Plan
    from petfall_audit.portfolio import PortfolioPlan
    from petfall_audit.risk import Assessment

__all__ = ["RESULTS_FORMAT", "RESULTS_VERSION", "RESULTS_SCHEMA", "results_document",
           "results_json_text", "write_results_json"]

RESULTS_FORMAT = "petfall-audit-results"
RESULTS_VERSION = 1
#: File name of the envelope's JSON Schema in ``resources/``.
RESULTS_SCHEMA = "results.schema.json"


def results_document(*, assessment: Assessment | None = None, plan: Plan | None = None,
                     portfolio: PortfolioPlan | None = None,
                     comparison: Mapping[str, Any] | None = None) -> dict[str, Any]:
    """The envelope holding whichever of ``assessment``, ``plan`` and ``portfolio`` are given
    (at least one), or the keys of a ``comparison`` of two audits alone
    (:func:`petfall_audit.io.compare_export.comparison_fields`), which stand at the top level:
    ``openings``, ``risk_before``, ``risk_after``, ..."""
    if comparison is not None:
        if assessment is not None or plan is not None or portfolio is not None:
            raise ValueError("a comparison of two audits is a results document of its own")
        return {
            "format": RESULTS_FORMAT,
            "version": RESULTS_VERSION,
            "software_version": __version__,
            "contents": ["comparison"],
            "results": None,
            "plan": None,
            "portfolio": None,
            **comparison,
            "caution": CAUTIONS_SHORT,
            "cautions": list(CAUTIONS),
        }
    if assessment is None and plan is None and portfolio is None:
        raise ValueError("a results document needs an assessment, a plan, a portfolio or a "
                         "comparison")
    # each export is imported only when its part is there: an assessment alone never loads
    # the planner and its solver
    parts: dict[str, Any] = {"results": None, "plan": None, "portfolio": None}
    if assessment is not None:
        from petfall_audit.io.results_export import assessment_to_dict

        parts["results"] = assessment_to_dict(assessment)
    if plan is not None:
        from petfall_audit.io.plan_export import plan_to_dict

        parts["plan"] = plan_to_dict(plan)
    if portfolio is not None:
        from petfall_audit.io.portfolio_export import portfolio_to_dict

        parts["portfolio"] = portfolio_to_dict(portfolio)
    return {
        "format": RESULTS_FORMAT,
        "version": RESULTS_VERSION,
        "software_version": __version__,
        "contents": [k for k, v in parts.items() if v is not None],
        **parts,
        "caution": CAUTIONS_SHORT,
        "cautions": list(CAUTIONS),
    }


def results_json_text(*, assessment: Assessment | None = None, plan: Plan | None = None,
                      portfolio: PortfolioPlan | None = None) -> str:
    """:func:`results_document` as UTF-8 JSON text ending in a newline, one opening, action or
    building per line (:func:`~petfall_audit.io.json_text.json_text`; the same input gives the
    same bytes)."""
    from petfall_audit.io.json_text import json_text

    return json_text(results_document(assessment=assessment, plan=plan, portfolio=portfolio))


def write_results_json(path: str | Path, *, assessment: Assessment | None = None,
                       plan: Plan | None = None, portfolio: PortfolioPlan | None = None) -> Path:
    """Write the envelope to ``path`` atomically (a crash never leaves half a file)."""
    from petfall_audit.io.atomic import atomic_write_text

    path = Path(path)
    atomic_write_text(path, results_json_text(assessment=assessment, plan=plan,
                                              portfolio=portfolio))
    return path
