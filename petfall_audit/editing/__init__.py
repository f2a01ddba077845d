"""Editing a building without Qt: the document, undoable commands, history, field parsing and
the recovery file. The desktop app (:mod:`petfall_audit.gui`) mirrors these onto widgets."""

from __future__ import annotations

from petfall_audit.editing.commands import (
    AddFacade,
    AddFloor,
    AddOpenings,
    AddSurface,
    BuildingCommand,
    Command,
    CopyFloorOpenings,
    EditRefused,
    RemoveFacade,
    RemoveFloor,
    RemoveOpenings,
    RemoveSurface,
    ReplaceBuilding,
    SetBuildingInfo,
    SetCatProfile,
    SetFacade,
    SetFloor,
    SetFloorElevations,
    SetOpeningFields,
    SetSurface,
)
from petfall_audit.editing.document import Document
from petfall_audit.editing.history import History

__all__ = [
    "Document",
    "History",
    "Command",
    "BuildingCommand",
    "EditRefused",
    "SetOpeningFields",
    "AddOpenings",
    "RemoveOpenings",
    "AddFloor",
    "RemoveFloor",
    "SetFloor",
    "SetFloorElevations",
    "CopyFloorOpenings",
    "SetBuildingInfo",
    "AddFacade",
    "RemoveFacade",
    "SetFacade",
    "AddSurface",
    "RemoveSurface",
    "SetSurface",
    "SetCatProfile",
    "ReplaceBuilding",
]
