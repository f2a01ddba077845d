"""PDF audit report, tenant leaflet and data exports (reportlab only; never imports Qt).

Layout is kept apart from data: :mod:`.context` turns results into strings, :mod:`.sections`
and :mod:`.charts` place them, :mod:`.template` draws the page frame.
"""

from __future__ import annotations

from petfall_audit.report.audit import write_audit
from petfall_audit.report.context import ContactBlock, ReportOptions
from petfall_audit.report.exports import export_results
from petfall_audit.report.leaflet import write_leaflet

__all__ = ["write_audit", "write_leaflet", "export_results", "ContactBlock", "ReportOptions"]
