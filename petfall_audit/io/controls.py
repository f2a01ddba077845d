"""Read and check the control catalogue (``resources/controls.json``).

The file's shape is the pydantic model :class:`CatalogueFileModel`; its JSON Schema is
committed beside the building schema as ``resources/controls.schema.json``. Regenerate it after
changing a model::

    python -m petfall_audit.io.controls

The rules that tie fields together (the escape-window rule must be named by a control that sets
a limiter, screen or net on windows; ``releasable`` must be said with that rule; ids are unique)
are checked after the shape, each problem located (``controls[6].releasable: ...``). Every
field a later version adds is optional, so an older catalogue keeps loading. Costs are in the
catalogue's currency; heights in metres above the building's datum.
"""

from __future__ import annotations

import json
from collections.abc import Mapping
from dataclasses import dataclass, replace
from pathlib import Path
from typing import Any, Literal

from pydantic import BaseModel, ConfigDict, Field, ValidationError

from petfall_audit._resources import resource_path
from petfall_audit.errors import CatalogueError, Problem
from petfall_audit.io._json_schema import dumps_schema_text, schema_of
from petfall_audit.io._schema import (
    OpenFrequencyName,
    OpeningKindName,
    ScreenName,
)
from petfall_audit.io.text_bytes import decode_text
from petfall_audit.model import (
    BALCONY_LIKE,
    WINDOW_KINDS,
    OpenFrequency,
    Opening,
    OpeningKind,
    Screen,
)

__all__ = [
    "CATALOGUE_FORMAT",
    "CATALOGUE_VERSION",
    "CATALOGUE_SCHEMA_FILENAME",
    "HIERARCHY",
    "RULES",
    "BLOCKING_FIELDS",
    "EFFECT_FIELDS",
    "Control",
    "Catalogue",
    "CatalogueFileModel",
    "ControlModel",
    "parse_catalogue",
    "load_catalogue",
    "catalogue_json_schema",
    "dumps_catalogue_schema",
]

CATALOGUE_FORMAT = "petfall-audit-controls"
CATALOGUE_VERSION = 1
CATALOGUE_SCHEMA_FILENAME = "controls.schema.json"
_MAX_BYTES = 4_000_000  # a catalogue is a few tens of kilobytes; refuse anything absurd
#: Hierarchy of controls, most effective first (ISO 45001:2018 8.1.2 order, adapted).
HIERARCHY: tuple[str, ...] = ("remove", "engineer", "inform")
HierarchyName = Literal["remove", "engineer", "inform"]
#: Conflict and condition rules that a control may name in ``conflicts`` (see
#: :mod:`petfall_audit.fixes` for what each does).
RULES: tuple[str, ...] = ("escape_window", "wind_load", "exterior_permission", "fire_access")
RuleName = Literal["escape_window", "wind_load", "exterior_permission", "fire_access"]
#: Opening fields whose change can stand in the way of escaping through a window: a limiter, a
#: screen or a net. A control that sets one is never offered on an emergency escape window
#: unless it is releasable by hand, whatever its catalogue entry says.
BLOCKING_FIELDS: frozenset[str] = frozenset({"limiter_gap_mm", "screen", "netting_mesh_mm"})


@dataclass(frozen=True, slots=True)
class Control:
    """One control of the catalogue.

    ``kinds``: opening kinds it applies to; ``min_height_m`` / ``max_height_m``: floor height
    range above the datum (m, ``None`` = open). ``effect``: (field, value) pairs applied to the
    opening; ``likelihood_multiplier``: extra factor on the yearly fall probability (1 = none).
    ``adherence``: share of the time a control that relies on people is kept to (1 = always);
    the rest of the time the opening stays as it was.
    ``releasable``: for devices, whether a person releases it by hand without key or tool
    (``None`` for non-devices). Costs in the catalogue's currency: ``cost_fixed`` per opening,
    ``cost_per_m_width`` per metre of opening width, ``cost_per_m2`` per square metre covered.
    ``conflicts``: rule ids from :data:`RULES`; ``conditions``: text carried into every output.
    """

    id: str
    name: str
    hierarchy: str
    description: str
    kinds: frozenset[OpeningKind]
    effect: tuple[tuple[str, Any], ...] = ()
    likelihood_multiplier: float = 1.0
    adherence: float = 1.0
    releasable: bool | None = None
    min_height_m: float | None = None
    max_height_m: float | None = None
    cost_fixed: float = 0.0
    cost_per_m_width: float = 0.0
    cost_per_m2: float = 0.0
    conflicts: tuple[str, ...] = ()
    conditions: tuple[str, ...] = ()

    def apply(self, opening: Opening) -> Opening:
        """The opening as it would be with this control fitted."""
        return replace(opening, **dict(self.effect)) if self.effect else opening


@dataclass(frozen=True, slots=True)
class Catalogue:
    """The controls in catalogue order, their ``currency`` and the cost and rule settings.

    ``enclosure_height_m``: height of a balcony enclosure for costing nets (m);
    ``window_height_m``: window height for costing screens (m); ``wind_rated_above_m``: floor
    height above which nets need wind-rated fixings (m).
    """

    controls: tuple[Control, ...]
    currency: str = "EUR"
    description: str = ""
    enclosure_height_m: float = 2.4
    window_height_m: float = 1.2
    wind_rated_above_m: float = 18.0

    def control(self, control_id: str) -> Control:
        """The control with ``control_id``; ``KeyError`` if there is none."""
        for c in self.controls:
            if c.id == control_id:
                return c
        raise KeyError(control_id)

    def cost(self, control: Control, opening: Opening) -> float:
        """Indicative cost of ``control`` on ``opening`` in the catalogue's currency, to the cent.

        Covered area: ``(width + 2 × projection) × enclosure_height_m`` for balconies, terraces
        and galleries; ``width × window_height_m`` for windows."""
        if opening.kind in BALCONY_LIKE:
            area_m2 = (opening.width_m + 2.0 * opening.projection_m) * self.enclosure_height_m
        else:
            area_m2 = opening.width_m * self.window_height_m
        total = (
            control.cost_fixed
            + control.cost_per_m_width * opening.width_m
            + control.cost_per_m2 * area_m2
        )
        return round(total, 2)


# --- the file's shape ---------------------------------------------------------------------------


class _Strict(BaseModel):
    model_config = ConfigDict(extra="forbid", strict=True, allow_inf_nan=False, frozen=True)


_Text = Field(min_length=1, max_length=2000, pattern=r"\S")
_Mm = Field(default=None, ge=1.0, le=2000.0)
_Cost = Field(default=0.0, ge=0.0, le=1e9)


class AppliesToModel(_Strict):
    """Where a control applies: opening kinds and the floor heights (m above the datum)."""

    kinds: list[OpeningKindName] = Field(min_length=1, description="Opening kinds it fits.")
    min_height_m: float | None = Field(
        default=None, ge=0.0, le=1000.0, description="Lowest floor height (m); null: none."
    )
    max_height_m: float | None = Field(
        default=None, ge=0.0, le=1000.0, description="Highest floor height (m); null: none."
    )


class EffectModel(_Strict):
    """What the control changes on the opening; a field left out is not changed, ``null`` for
    a gap or mesh means none (e.g. infill panels close every gap)."""

    netting_mesh_mm: float | None = Field(default=None, ge=1.0, le=500.0,
                                          description="Mesh of the net fitted (mm).")
    limiter_gap_mm: float | None = Field(default=None, ge=1.0, le=2000.0,
                                         description="Opening the limiter allows (mm).")
    largest_gap_mm: float | None = Field(default=None, ge=1.0, le=2000.0,
                                         description="Widest gap left in the infill (mm).")
    bottom_gap_mm: float | None = Field(default=None, ge=1.0, le=2000.0,
                                        description="Gap left under the guard (mm).")
    screen: ScreenName | None = Field(default=None, description="Screen fitted.")
    open_frequency: OpenFrequencyName | None = Field(
        default=None, description="How often it is open afterwards.")
    climbable_infill: bool | None = Field(default=None, description="Infill a cat can climb.")
    flat_rail_top: bool | None = Field(default=None, description="Rail top a cat can sit on.")
    climbing_aids: bool | None = Field(default=None, description="Furniture by the guard.")


#: Opening fields a control may change.
EFFECT_FIELDS: tuple[str, ...] = tuple(EffectModel.model_fields)
#: Effect fields that take a value, never "none".
_NOT_NULL = frozenset({"screen", "open_frequency", "climbable_infill", "flat_rail_top",
                       "climbing_aids"})


class CostModel(_Strict):
    """Indicative cost per opening: fixed + per metre of width + per square metre covered."""

    fixed: float = _Cost
    per_m_width: float = _Cost
    per_m2: float = _Cost


class ControlModel(_Strict):
    """An item of "controls". Fields added later are optional, so older files keep loading."""

    id: str = Field(min_length=1, max_length=100, pattern=r"\S", description="Unique id.")
    name: str = Field(min_length=1, max_length=200, pattern=r"\S",
                      description="Name shown to people.")
    hierarchy: HierarchyName = Field(description="Rung of the hierarchy of controls.")
    description: str = Field(default="", max_length=4000, description="What it is, in words.")
    applies_to: AppliesToModel
    effect: EffectModel = Field(default_factory=EffectModel)
    likelihood_multiplier: float = Field(
        default=1.0, ge=0.0, le=1.0,
        description="Extra factor on the yearly fall probability (1: none).")
    adherence: float = Field(
        default=1.0, gt=0.0, le=1.0,
        description="Share of the time a control that relies on people is kept to.")
    releasable: bool | None = Field(
        default=None,
        description="A device a person releases by hand without key or tool; null: not a "
        "device. Required with the escape_window rule.")
    cost: CostModel
    conflicts: list[RuleName] = Field(default_factory=list,
                                      description="Conflict and condition rules that apply.")
    conditions: list[str] = Field(default_factory=list, max_length=50,
                                  description="Conditions carried into every output.")


class CostBasisModel(_Strict):
    """Sizes used to cost covered areas (m)."""

    enclosure_height_m: float = Field(default=2.4, gt=0.0, le=20.0,
                                      description="Height of a balcony enclosure (m).")
    window_height_m: float = Field(default=1.2, gt=0.0, le=20.0,
                                   description="Height of a window (m).")


class CatalogueFileModel(_Strict):
    """A control catalogue file."""

    model_config = ConfigDict(title="petfall-audit control catalogue")

    format: Literal["petfall-audit-controls"]
    version: Literal[1]
    description: str = Field(default="", max_length=4000)
    currency: str = Field(min_length=1, max_length=10, pattern=r"\S",
                          description="Currency of every cost (an ISO 4217 code).")
    cost_basis: CostBasisModel = Field(default_factory=CostBasisModel)
    wind_rated_above_m: float = Field(
        default=18.0, ge=0.0, le=1000.0,
        description="Floor height above which nets need wind-rated fixings (m).")
    controls: list[ControlModel] = Field(min_length=1, max_length=500)


# --- problems in plain words --------------------------------------------------------------------


def _where(loc: tuple[int | str, ...]) -> str:
    out = ""
    for part in loc:
        out += f"[{part}]" if isinstance(part, int) else (f".{part}" if out else str(part))
    return out


def _plain(error: Mapping[str, Any]) -> str:
    """A pydantic error in plain words."""
    kind = str(error.get("type", ""))
    ctx = error.get("ctx") or {}
    got = error.get("input")
    loc = tuple(error.get("loc", ()))
    if kind == "extra_forbidden":
        if "effect" in loc:
            return f"not a field a control can change (one of {', '.join(EFFECT_FIELDS)})"
        return "unknown field; remove it or check its spelling"
    if kind == "missing":
        return "required, but missing"
    if kind == "literal_error":
        what = "opening kind" if "kinds" in loc else "rule" if "conflicts" in loc else "value"
        return f"unknown {what} {got!r} (one of {ctx.get('expected', '')})"
    if kind in ("float_type", "float_parsing", "int_type", "finite_number"):
        return f"expected a number, got {got!r}"
    if kind == "bool_type":
        return f"expected true or false, got {got!r}"
    if kind in ("string_type", "string_too_short", "string_pattern_mismatch"):
        return f"expected a non-empty text, got {got!r}"
    if kind in ("list_type", "too_short"):
        return "expected a non-empty list"
    if kind in ("model_type", "model_attributes_type", "dict_type"):
        return "expected an object"
    if kind == "greater_than_equal":
        return f"must be at least {ctx.get('ge')}, got {got!r}"
    if kind == "greater_than":
        return f"must be more than {ctx.get('gt')}, got {got!r}"
    if kind == "less_than_equal":
        return f"must be at most {ctx.get('le')}, got {got!r}"
    if kind in ("string_too_long", "too_long"):
        return "too long"
    return str(error.get("msg", "not valid"))


def _rules(model: CatalogueFileModel) -> list[Problem]:
    """Rules that tie fields together, each problem located."""
    problems: list[Problem] = []
    seen: set[str] = set()
    window_kinds = {k.value for k in WINDOW_KINDS}
    for i, c in enumerate(model.controls):
        where = f"controls[{i}]"
        if c.id in seen:
            problems.append(Problem(f"{where}.id", f"duplicate id {c.id!r}"))
        seen.add(c.id)
        if "escape_window" in c.conflicts and c.releasable is None:
            problems.append(Problem(f"{where}.releasable",
                                    "required (true or false) with the escape_window rule"))
        touches = c.effect.model_fields_set & BLOCKING_FIELDS
        if touches and "escape_window" not in c.conflicts and set(c.applies_to.kinds) & (
                window_kinds):
            problems.append(Problem(
                f"{where}.conflicts",
                f"a control that sets {', '.join(sorted(touches))} on windows must name the "
                "escape_window rule, so that it is never fitted as a fixed device on an "
                "emergency escape window"))
        for name in sorted(c.effect.model_fields_set & _NOT_NULL):
            if getattr(c.effect, name) is None:
                problems.append(Problem(f"{where}.effect.{name}", "cannot be null"))
        low, high = c.applies_to.min_height_m, c.applies_to.max_height_m
        if low is not None and high is not None and low > high:
            problems.append(Problem(f"{where}.applies_to.min_height_m",
                                    f"is above max_height_m ({low:g} m > {high:g} m)"))
    return problems


_ENUMS: dict[str, type[Screen] | type[OpenFrequency]] = {
    "screen": Screen, "open_frequency": OpenFrequency,
}


def _control(m: ControlModel) -> Control:
    effect = tuple(
        (name, _ENUMS[name](value) if name in _ENUMS else value)
        for name in EFFECT_FIELDS if name in m.effect.model_fields_set
        for value in (getattr(m.effect, name),)
    )
    return Control(
        id=m.id,
        name=m.name,
        hierarchy=m.hierarchy,
        description=m.description,
        kinds=frozenset(OpeningKind(k) for k in m.applies_to.kinds),
        effect=effect,
        likelihood_multiplier=m.likelihood_multiplier,
        adherence=m.adherence,
        releasable=m.releasable,
        min_height_m=m.applies_to.min_height_m,
        max_height_m=m.applies_to.max_height_m,
        cost_fixed=float(m.cost.fixed),
        cost_per_m_width=float(m.cost.per_m_width),
        cost_per_m2=float(m.cost.per_m2),
        conflicts=tuple(m.conflicts),
        conditions=tuple(m.conditions),
    )


def parse_catalogue(doc: Any, *, source: str = "") -> Catalogue:
    """A :class:`Catalogue` from a parsed JSON document. Raises :class:`CatalogueError` listing
    every problem with its place (``controls[3].cost.per_m_width: ...``)."""
    if not isinstance(doc, Mapping) or doc.get("format") != CATALOGUE_FORMAT:
        raise CatalogueError(
            [Problem("format", f"not a control catalogue (expected {CATALOGUE_FORMAT!r})")], source
        )
    version = doc.get("version")
    if version != CATALOGUE_VERSION:
        raise CatalogueError(
            [Problem("version", f"unsupported version {version!r} (expected {CATALOGUE_VERSION})")],
            source,
        )
    try:
        model = CatalogueFileModel.model_validate(dict(doc))
    except ValidationError as exc:
        problems = [Problem(_where(tuple(e["loc"])) or "catalogue", _plain(e))
                    for e in exc.errors(include_url=False)]
        for i, c in enumerate(doc.get("controls") or []):
            if isinstance(c, Mapping):  # the blocking rule is a safety rule: say it at once
                problems += [p for p in _rules_of_raw(c, i) if p not in problems]
        raise CatalogueError(problems, source) from None
    problems = _rules(model)
    if problems:
        raise CatalogueError(problems, source)
    return Catalogue(
        controls=tuple(_control(c) for c in model.controls),
        currency=model.currency,
        description=model.description,
        enclosure_height_m=model.cost_basis.enclosure_height_m,
        window_height_m=model.cost_basis.window_height_m,
        wind_rated_above_m=model.wind_rated_above_m,
    )


def _rules_of_raw(raw: Mapping[str, Any], index: int) -> list[Problem]:
    """The cross-field rules of one control whose shape is valid, when another part of the
    file is not (so that every problem is listed at once)."""
    try:
        one = ControlModel.model_validate(dict(raw))
    except ValidationError:
        return []
    shell = CatalogueFileModel.model_construct(controls=[one])
    return [Problem(p.where.replace("controls[0]", f"controls[{index}]", 1), p.message)
            for p in _rules(shell)]


def load_catalogue(path: str | Path | None = None) -> Catalogue:
    """Read a control catalogue file (default: the shipped ``resources/controls.json``).

    Raises :class:`CatalogueError` for a malformed or oversized file and ``OSError`` when it
    cannot be read."""
    p = resource_path("controls.json") if path is None else Path(path)
    if p.stat().st_size > _MAX_BYTES:
        raise CatalogueError([Problem("file", "larger than 4 MB: not a control catalogue")],
                             p.name)
    try:
        text = decode_text(p.read_bytes())
    except UnicodeDecodeError as exc:
        raise CatalogueError([Problem("file", f"not UTF-8 text (byte {exc.start} cannot be "
                                              "decoded)")], p.name) from None
    try:
        doc = json.loads(text)
    except json.JSONDecodeError as exc:
        raise CatalogueError([Problem(f"line {exc.lineno}", exc.msg)], p.name) from None
    return parse_catalogue(doc, source=p.name)


def catalogue_json_schema() -> dict[str, Any]:
    """The JSON Schema (draft 2020-12) of a control catalogue file."""
    return schema_of(
        CatalogueFileModel,
        f"petfall-audit control catalogue, version {CATALOGUE_VERSION}: the "
        "controls against cat falls, where each applies, its effect on an opening, its cost and "
        "the rules that go with it. Cross-field rules (escape windows, unique ids) are checked "
        "by the loader. See docs/fixes.md.",
    )


def dumps_catalogue_schema() -> str:
    """The schema as committed: indented, ending with a newline."""
    return dumps_schema_text(catalogue_json_schema())


if __name__ == "__main__":  # pragma: no cover
    from petfall_audit.io.atomic import atomic_write_text

    atomic_write_text(resource_path(CATALOGUE_SCHEMA_FILENAME), dumps_catalogue_schema())
