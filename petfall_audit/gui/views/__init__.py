"""The result views of the main window: ranked openings, facade elevations, floor comparison,
fall profile, fix plan and the cat assumptions.

The window builds them once with :func:`build_views` from its typed state (a
:class:`~petfall_audit.gui.views.common.ViewContext`; no view reaches the window) and keeps
them, with the actions it made for them, as an :class:`InstalledViews` (``window.views``). Every
view follows one shared selection of openings, which the window also mirrors onto the openings
editor: a click in any view selects the opening everywhere.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from PySide6.QtGui import QAction

from petfall_audit.gui.views.common import ViewContext
from petfall_audit.gui.views.compare import CompareView
from petfall_audit.gui.views.facade import FacadeView
from petfall_audit.gui.views.floors import FloorsView
from petfall_audit.gui.views.plan import PlanView
from petfall_audit.gui.views.profile import ProfileView
from petfall_audit.gui.views.ranked import RankedView
from petfall_audit.gui.views.sensitivity import SensitivityView

__all__ = ["InstalledViews", "build_views", "VIEW_NAMES"]

#: Tab names of the views, in order.
VIEW_NAMES: tuple[str, ...] = ("Ranked openings", "Facade elevation", "Floor comparison",
                               "Fall profile", "Fix plan", "Cat assumptions", "Compare audits")


@dataclass
class InstalledViews:
    """The views a window built and the actions it made for them (``window.views``)."""

    context: ViewContext
    ranked: RankedView
    facade: FacadeView
    floors: FloorsView
    profile: ProfileView
    plan: PlanView
    sensitivity: SensitivityView
    compare: CompareView
    exports: Any
    import_action: QAction
    view_actions: list[QAction]

    def widget(self, name: str) -> Any:
        return dict(zip(VIEW_NAMES, self.widgets(), strict=True))[name]

    def widgets(self) -> tuple[Any, ...]:
        """The views in :data:`VIEW_NAMES` order."""
        return (self.ranked, self.facade, self.floors, self.profile, self.plan,
                self.sensitivity, self.compare)


def build_views(context: ViewContext) -> tuple[RankedView, FacadeView, FloorsView, ProfileView,
                                               PlanView, SensitivityView, CompareView]:
    """The result views on ``context`` (in :data:`VIEW_NAMES` order), built once by the
    window. Each follows the context's results, selection and options."""
    views = (RankedView(context), FacadeView(context), FloorsView(context),
             ProfileView(context), PlanView(context), SensitivityView(context),
             CompareView(context))
    known_ids = context.selection

    def keep_known(assessment: Any) -> None:  # after the views: a removed opening unselected
        known = {o.id for o in assessment.openings} if assessment is not None else set()
        kept = [i for i in known_ids.ids if i in known]
        if len(kept) != len(known_ids.ids):
            known_ids.set_ids(kept)

    context.assessment_changed.connect(keep_known)
    return views
