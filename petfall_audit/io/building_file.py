"""Read and write building files (JSON, versioned) and check a building for problems.

Loading never crashes and never guesses: a document that is not a building file, or one from a
newer version, raises :class:`FileFormatError`; any other problem is collected and all of them are
raised together as :class:`ValidationFailed`, each with its place (``openings[12].floor``) and a
message in plain words. Saving is atomic (see :mod:`petfall_audit.io.atomic`).

The file format is documented in ``docs/building-file.md``; its JSON Schema is
``resources/building.schema.json``.
"""

from __future__ import annotations

import contextlib
import dataclasses
import difflib
import json
import re
from collections.abc import Iterable, Sequence
from enum import Enum
from pathlib import Path
from typing import Any

from pydantic import BaseModel, TypeAdapter, ValidationError

from petfall_audit.errors import FileFormatError, Place, Problem, ValidationFailed
from petfall_audit.io._checks import Places, check_model, describe, number, unit_of
from petfall_audit.io._schema import (
    ALL_FIELD_NAMES,
    CAT_PARAMETERS,
    CURRENT_VERSION,
    FORMAT,
    BuildingModel,
    CatProfileField,
    CatProfileModel,
    DocumentModel,
    FacadeModel,
    FixRecordModel,
    FloorModel,
    InjuryModel,
    LogNormalModel,
    NormalModel,
    OpeningModel,
    SurfaceModel,
    UniformModel,
)
from petfall_audit.io.atomic import atomic_write_text
from petfall_audit.io.migrations import migrate
from petfall_audit.io.photos import photo_problem, read_regular_file
from petfall_audit.io.text_bytes import bom_encoding, decode_text
from petfall_audit.model import (
    CAT_PRESETS,
    Building,
    BuildingInfo,
    CatProfile,
    CatsPresent,
    Distribution,
    Facade,
    Fixed,
    FixRecord,
    FixStatus,
    Floor,
    InjuryThresholds,
    LogNormal,
    Normal,
    OpenFrequency,
    Opening,
    OpeningKind,
    PlanSettings,
    Screen,
    Surface,
    SurfaceKind,
    Uniform,
)

__all__ = [
    "FORMAT",
    "CURRENT_VERSION",
    "parse_building",
    "load_building",
    "building_to_dict",
    "dumps_building",
    "save_building",
    "validate_building",
    "MAX_FILE_BYTES",
]

#: Largest building file read (bytes): 64 MiB, ten times a 200-storey tower with 50 openings on
#: every floor.
MAX_FILE_BYTES = 64 * 2**20

_SECTIONS = ("building", "floors", "facades", "surfaces", "openings", "cat_profile", "injury",
             "fixes")
_LIST_SECTIONS: dict[str, type[BaseModel]] = {
    "floors": FloorModel,
    "facades": FacadeModel,
    "surfaces": SurfaceModel,
    "openings": OpeningModel,
    "fixes": FixRecordModel,
}

# --- public API ------------------------------------------------------------------------------


def parse_building(doc: object) -> Building:
    """Build a :class:`Building` from a decoded JSON document (dicts, lists, numbers, text).

    Raises :class:`FileFormatError` if ``doc`` is not a building file or is from a newer
    version, and :class:`ValidationFailed` with every located problem otherwise.
    """
    return _parse(doc, [])


def load_building(path: str | Path) -> Building:
    """Read the building file at ``path``.

    Raises :class:`FileFormatError` for an unreadable, empty or non-UTF-8 file, a file that is
    not a building file or one from a newer version; :class:`ValidationFailed` for invalid JSON
    (placed at its line and column) and for every problem in the building.
    """
    try:
        data = read_regular_file(Path(path), max_bytes=MAX_FILE_BYTES)
    except OSError as exc:
        raise FileFormatError(f"cannot read the file: {exc.strerror or exc}") from exc
    try:
        text = decode_text(data)  # a byte-order mark names its encoding, else UTF-8
    except UnicodeDecodeError as exc:
        name = (bom_encoding(data) or "utf-8").upper().replace("-SIG", "")
        raise FileFormatError(
            f"not a building file: not {name} text (byte {exc.start} cannot be decoded)"
        ) from exc
    if not text.strip():
        raise FileFormatError("not a building file: the file is empty")
    duplicates: list[tuple[dict[str, Any], list[str]]] = []
    try:
        doc = json.loads(text, object_pairs_hook=_pairs_hook(duplicates))
    except json.JSONDecodeError as exc:
        where = f"line {exc.lineno}, column {exc.colno}"
        raise ValidationFailed(
            [Problem(where, f"not valid JSON: {_json_message(exc.msg)}")]
        ) from exc
    except RecursionError as exc:
        raise FileFormatError("not a building file: the JSON is nested too deeply") from exc
    except ValueError as exc:  # e.g. an integer with thousands of digits
        raise FileFormatError(f"not valid JSON: {exc}") from exc
    early = _duplicate_key_problems(doc, duplicates) if duplicates else []
    building = _parse(doc, early, text_checked=_SURROGATE_ESCAPE.search(text) is None)
    folder = Path(path).parent
    refused = [
        Problem(Place("openings", i, f"photos[{k}]"), f"photo {describe(photo)} refused: {why}")
        for i, o in enumerate(building.openings)
        for k, photo in enumerate(o.photos)
        if (why := photo_problem(folder, photo)) is not None
    ]
    if refused:
        raise ValidationFailed(refused)
    return building


def building_to_dict(building: Building) -> dict[str, object]:
    """The building as a JSON-ready document of the current version, every field written."""
    return {
        "format": FORMAT,
        "version": CURRENT_VERSION,
        "building": _building_section(building),
        "floors": [_plain(f) for f in building.floors],
        "facades": [_plain(f) for f in building.facades],
        "surfaces": [_plain(s) for s in building.surfaces],
        "openings": [_plain(o) for o in building.openings],
        "cat_profile": _profile_to_dict(building.cat_profile),
        "injury": _plain(building.injury),
        # written only once a fix is recorded, so a file without any reads as before
        **({"fixes": [_fix_to_dict(r) for r in building.fixes]} if building.fixes else {}),
    }


def dumps_building(building: Building) -> str:
    """The building file text: stable key order, indented by two spaces, one floor, facade,
    surface, opening or fix per line, ending with a newline (quick to write for a large
    building, which the app's recovery copy does while the user edits).

    Raises ``ValueError`` if a number is not finite (NaN or infinity cannot be written).
    """
    from petfall_audit.io.json_text import json_text

    return json_text(building_to_dict(building), block_depth=2, allow_nan=False)


def save_building(building: Building, path: str | Path) -> None:
    """Write ``building`` to ``path`` atomically (temporary file, fsync, rename).

    The building is written as it is, even if :func:`validate_building` finds problems in it, so
    that work in progress is never lost; loading will report those problems.
    """
    atomic_write_text(path, dumps_building(building))


def validate_building(building: Building) -> list[Problem]:
    """Every problem in a building model (limits, duplicates, references, order, geometry,
    cat profile), located like the file (``openings[3].floor``). Empty when all is well."""
    return _sorted_problems(check_model(building, Places.identity(building), frozenset()))


# --- parsing ---------------------------------------------------------------------------------


_SURROGATE = re.compile("[\ud800-\udfff]")
#: A JSON escape of a surrogate (``\\ud800`` to ``\\udfff``): strictly decoded UTF-8 (and
#: UTF-16 or UTF-32 after a byte-order mark) holds no lone surrogate itself, so a file's text
#: without one of these decodes to texts without any.
_SURROGATE_ESCAPE = re.compile(r"\\u[dD][89abcdefABCDEF]")
_MAX_SURROGATE_PROBLEMS = 20


def _surrogate_problems(doc: object) -> list[Problem]:
    """Every text (value or field name) in ``doc`` holding a lone surrogate (``"\\ud800"`` in
    JSON): not a character, it cannot be printed, saved or exported, so it is refused with its
    place. At most :data:`_MAX_SURROGATE_PROBLEMS` are listed."""
    problems: list[Problem] = []
    stack: list[tuple[object, tuple[Any, ...]]] = [(doc, ())]
    while stack and len(problems) < _MAX_SURROGATE_PROBLEMS:
        value, loc = stack.pop()
        if isinstance(value, str):
            m = _SURROGATE.search(value)
            if m:
                problems.append(Problem(
                    _where(loc),
                    f"text holds an invalid character (a lone surrogate, \\u{ord(m.group()):04x}, "
                    f"at character {m.start() + 1}): replace it"))
        elif isinstance(value, dict):
            for key, item in reversed(list(value.items())):
                if isinstance(key, str) and _SURROGATE.search(key):
                    problems.append(Problem(
                        _where(loc),
                        "a field name holds an invalid character (a lone surrogate): replace it"))
                    continue
                stack.append((item, (*loc, key)))
        elif isinstance(value, list):
            stack.extend((item, (*loc, i)) for i, item in reversed(list(enumerate(value))))
    return problems


def _parse(doc: object, early: list[Problem], *, text_checked: bool = False) -> Building:
    """``text_checked``: the file's text was found to hold no surrogate (so no walk of ``doc``
    for one)."""
    if not isinstance(doc, dict):
        raise FileFormatError(
            f"not a building file: expected a JSON object at the top, got {describe(doc)}"
        )
    bad_text = [] if text_checked else _surrogate_problems(doc)
    if bad_text:
        raise ValidationFailed([*early, *bad_text])
    if "format" not in doc:
        raise FileFormatError(f'not a building file: "format" is missing (expected "{FORMAT}")')
    if doc["format"] != FORMAT:
        raise FileFormatError(
            f'not a building file: "format" is {describe(doc["format"])}, expected "{FORMAT}"'
        )
    if "version" not in doc:
        raise FileFormatError('the building file has no "version"')
    version = doc["version"]
    if not isinstance(version, int) or isinstance(version, bool):
        raise FileFormatError(f'"version" must be a whole number, got {describe(version)}')
    if version > CURRENT_VERSION:
        raise FileFormatError(
            f"this building file was written by a newer version ({version}) of petfall-audit; "
            f"this version reads up to {CURRENT_VERSION}"
        )
    doc = migrate(doc, version)  # FileFormatError for a version it cannot convert

    problems = list(early)
    validated = False
    try:
        model = DocumentModel.model_validate(doc)
        validated = True
    except ValidationError as exc:
        problems.extend(_pydantic_problems(exc))
        building, places, incomplete = _salvage(doc, exc)
    else:
        building = _to_building(model)
        places, incomplete = Places.identity(building), frozenset()
    problems.extend(check_model(building, places, incomplete))
    if problems:
        whole = building if validated and not early else None
        raise ValidationFailed(_sorted_problems(problems), building=whole)
    return building


def _salvage(doc: dict[str, Any], exc: ValidationError) -> tuple[Building, Places, frozenset[str]]:
    """The valid parts of an invalid document, so the cross-checks can still run on them.

    Items with a problem are left out; a section with any left-out item is *incomplete* and the
    checks that would need it are skipped rather than reporting guesses."""
    bad: set[tuple[str, int | None]] = set()
    for err in exc.errors(include_url=False):
        loc = err["loc"]
        if loc and isinstance(loc[0], str) and loc[0] in _SECTIONS:
            index = loc[1] if len(loc) > 1 and isinstance(loc[1], int) else None
            bad.add((loc[0], index if loc[0] in _LIST_SECTIONS else None))
    incomplete = {section for section, _ in bad}

    info = BuildingInfo(name="")
    plan = PlanSettings()
    if "building" not in incomplete:
        details = BuildingModel.model_validate(doc["building"])
        info, plan = _info(details), _plan_settings(details)
    lists: dict[str, list[Any]] = {}
    places: dict[str, list[int]] = {}
    for section, item_model in _LIST_SECTIONS.items():
        lists[section], places[section] = [], []
        if (section, None) in bad:
            continue
        for i, raw in enumerate(doc.get(section, [])):
            if (section, i) in bad:
                continue
            lists[section].append(_CONVERT[section](item_model.model_validate(raw)))
            places[section].append(i)
    profile = CAT_PRESETS["adult"]
    raw_profile = doc.get("cat_profile", "adult")
    if "cat_profile" not in incomplete:
        profile = _profile(raw_profile)
    elif isinstance(raw_profile, dict):
        # Keep the parameters that are fine, so their values are still checked.
        bad_keys = {
            err["loc"][2]
            for err in exc.errors(include_url=False)
            if len(err["loc"]) > 2 and err["loc"][0] == "cat_profile"
        }
        known = set(CatProfileModel.model_fields)
        kept = {k: v for k, v in raw_profile.items() if k in known and k not in bad_keys}
        with contextlib.suppress(ValidationError):
            profile = _profile(kept)
    building = Building(
        info=info,
        floors=tuple(lists["floors"]),
        facades=tuple(lists["facades"]),
        surfaces=tuple(lists["surfaces"]),
        openings=tuple(lists["openings"]),
        cat_profile=profile,
        injury=(_injury(InjuryModel.model_validate(doc["injury"]))
                if "injury" in doc and "injury" not in incomplete else InjuryThresholds()),
        plan=plan,
        fixes=tuple(lists["fixes"]),
    )
    return building, Places(places), frozenset(incomplete)


def _info(m: BuildingModel) -> BuildingInfo:
    return BuildingInfo(**m.model_dump(exclude={"plan"}))


def _plan_settings(m: BuildingModel) -> PlanSettings:
    if m.plan is None:
        return PlanSettings()
    return PlanSettings(budget=m.plan.budget, currency=m.plan.currency, samples=m.plan.samples,
                        seed=m.plan.seed)


def _building_section(building: Building) -> dict[str, object]:
    """The "building" section: the details, and the plan's settings once any is set (so that
    a building without them is written as before)."""
    out = _plain(building.info)
    if building.plan != PlanSettings():
        plan = _plain(building.plan)
        for key in ("samples", "seed"):  # written once set (version 2, optional)
            if plan[key] is None:
                del plan[key]
        out["plan"] = plan
    return out


def _fix(m: FixRecordModel) -> FixRecord:
    return FixRecord(opening_id=m.opening, control_id=m.control, status=FixStatus(m.status),
                     date=m.date, note=m.note)


def _fix_to_dict(r: FixRecord) -> dict[str, object]:
    return {"opening": r.opening_id, "control": r.control_id, "status": r.status.value,
            "date": r.date, "note": r.note}


def _floor(m: FloorModel) -> Floor:
    return Floor(level=m.level, label=m.label, elevation_m=float(m.elevation_m))


def _facade(m: FacadeModel) -> Facade:
    return Facade(id=m.id, length_m=float(m.length_m), label=m.label)


def _surface(m: SurfaceModel) -> Surface:
    return Surface(
        id=m.id,
        kind=SurfaceKind(m.kind),
        elevation_m=float(m.elevation_m),
        facade=m.facade,
        from_facade_m=float(m.from_facade_m),
        to_facade_m=None if m.to_facade_m is None else float(m.to_facade_m),
        label=m.label,
        x_from_m=None if m.x_from_m is None else float(m.x_from_m),
        x_to_m=None if m.x_to_m is None else float(m.x_to_m),
    )


def _opening(m: OpeningModel) -> Opening:
    values = m.model_dump()
    values["kind"] = OpeningKind(m.kind)
    values["screen"] = Screen(m.screen)
    values["open_frequency"] = OpenFrequency(m.open_frequency)
    values["cats_present"] = CatsPresent(m.cats_present)
    values["photos"] = tuple(m.photos)
    return Opening(**values)


_CONVERT: dict[str, Any] = {
    "floors": _floor,
    "facades": _facade,
    "surfaces": _surface,
    "openings": _opening,
    "fixes": _fix,
}


def _distribution(value: Any) -> Distribution:
    if isinstance(value, NormalModel):
        return Normal(float(value.mean), float(value.sd))
    if isinstance(value, UniformModel):
        return Uniform(float(value.min), float(value.max))
    if isinstance(value, LogNormalModel):
        return LogNormal(float(value.lognormal.mean), float(value.lognormal.sd))
    return Fixed(float(value))


def _profile_from(value: str | CatProfileModel) -> CatProfile:
    if isinstance(value, str):
        return CAT_PRESETS[value]
    base = CAT_PRESETS[value.preset or "adult"]
    params: dict[str, Any] = {}
    for name in CAT_PARAMETERS:
        given = getattr(value, name)
        params[name] = getattr(base, name) if given is None else _distribution(given)
    relax = base.relax_probability if value.relax_probability is None else value.relax_probability
    return CatProfile(**params, relax_probability=float(relax), preset=value.preset)


_PROFILE_ADAPTER: TypeAdapter[Any] = TypeAdapter(CatProfileField)


def _profile(raw: Any) -> CatProfile:
    return _profile_from(_PROFILE_ADAPTER.validate_python(raw))


def _to_building(m: DocumentModel) -> Building:
    return Building(
        info=_info(m.building),
        floors=tuple(_floor(f) for f in m.floors),
        facades=tuple(_facade(f) for f in m.facades),
        surfaces=tuple(_surface(s) for s in m.surfaces),
        openings=tuple(_opening(o) for o in m.openings),
        cat_profile=_profile_from(m.cat_profile),
        injury=_injury(m.injury),
        plan=_plan_settings(m.building),
        fixes=tuple(_fix(r) for r in m.fixes),
    )


def _injury(m: InjuryModel) -> InjuryThresholds:
    return InjuryThresholds(**{k: float(v) for k, v in m.model_dump().items()})


# --- writing ---------------------------------------------------------------------------------


_FIELD_NAMES: dict[type, tuple[str, ...]] = {}


def _plain(obj: Any) -> dict[str, object]:
    names = _FIELD_NAMES.get(type(obj))
    if names is None:  # the fields of a model class, looked up once
        names = _FIELD_NAMES[type(obj)] = tuple(f.name for f in dataclasses.fields(obj))
    out: dict[str, object] = {}
    for name in names:
        value = getattr(obj, name)
        if isinstance(value, Enum):
            value = value.value
        elif isinstance(value, tuple):
            value = list(value)
        out[name] = value
    return out


def _distribution_to_json(d: Distribution) -> object:
    if isinstance(d, Fixed):
        return d.value
    if isinstance(d, Normal):
        return {"mean": d.mean, "sd": d.sd}
    if isinstance(d, Uniform):
        return {"min": d.min, "max": d.max}
    return {"lognormal": {"mean": d.mean, "sd": d.sd}}


def _profile_to_dict(p: CatProfile) -> dict[str, object]:
    out: dict[str, object] = {"preset": p.preset}
    for name in ("mass_kg", "cda_tense_m2", "cda_spread_m2"):
        out[name] = _distribution_to_json(getattr(p, name))
    out["relax_probability"] = p.relax_probability
    for name in ("relax_fraction", "righting_time_s", "launch_speed_mps"):
        out[name] = _distribution_to_json(getattr(p, name))
    return out


# --- JSON details ----------------------------------------------------------------------------


class _DupDict(dict[str, Any]):
    """A JSON object in which some keys appeared more than once."""


def _pairs_hook(found: list[tuple[dict[str, Any], list[str]]]) -> Any:
    def hook(pairs: list[tuple[str, Any]]) -> dict[str, Any]:
        keys = [k for k, _ in pairs]
        if len(set(keys)) == len(keys):
            return dict(pairs)
        obj = _DupDict(pairs)
        found.append((obj, sorted({k for k in keys if keys.count(k) > 1})))
        return obj

    return hook


def _duplicate_key_problems(
    doc: Any, found: list[tuple[dict[str, Any], list[str]]]
) -> list[Problem]:
    """Locate the objects that repeat a key; JSON readers differ on which copy wins."""
    by_id = {id(obj): keys for obj, keys in found}
    problems: list[Problem] = []
    stack: list[tuple[Any, tuple[str | int, ...]]] = [(doc, ())]
    while stack:
        node, loc = stack.pop()
        if isinstance(node, dict):
            for key in by_id.get(id(node), ()):
                problems.append(
                    Problem(
                        _where((*loc, key)),
                        f"field {key!r} is given more than once; give each field once",
                    )
                )
            stack.extend((v, (*loc, k)) for k, v in node.items())
        elif isinstance(node, list):
            stack.extend((v, (*loc, i)) for i, v in enumerate(node))
    return problems


_JSON_MESSAGES = {
    "Expecting value": "expected a value",
    "Expecting ',' delimiter": "expected a comma between items",
    "Expecting ':' delimiter": "expected ':' after a field name",
    "Expecting property name enclosed in double quotes": "expected a field name in double quotes",
    "Extra data": "more text after the end of the document",
    "Unterminated string starting at": "text not closed by a double quote",
    "Invalid control character at": "a control character (such as a tab or newline) inside text",
    "Invalid \\escape": "an invalid backslash escape inside text",
    "Illegal trailing comma before end of object": "a comma before the closing '}'",
    "Illegal trailing comma before end of array": "a comma before the closing ']'",
}


def _json_message(msg: str) -> str:
    return _JSON_MESSAGES.get(msg, msg[:1].lower() + msg[1:])


# --- problem wording -------------------------------------------------------------------------

_IDENT = re.compile(r"^[A-Za-z_][A-Za-z0-9_]*$")


def _where(loc: Sequence[Any]) -> Place:
    """``('openings', 12, 'floor')`` -> the place ``openings[12].floor``; union tags
    (``<...>``) dropped; a key that is not a plain name is quoted (``["a b"]``); no parts: the
    whole document."""

    def key(part: Any) -> str:
        text = str(part)
        return text if _IDENT.match(text) else f"[{json.dumps(text, ensure_ascii=False)}]"

    parts = [p for p in loc
             if not (isinstance(p, str) and p.startswith("<") and p.endswith(">"))]
    if not parts:
        return Place("(document)")
    section = "" if isinstance(parts[0], int) else key(parts.pop(0))
    index = parts.pop(0) if parts and isinstance(parts[0], int) else None
    field = ""
    for part in parts:
        if isinstance(part, int) and not isinstance(part, bool):
            field += f"[{part}]"
        else:
            name = key(part)
            field += f".{name}" if field and not name.startswith("[") else name
    return Place(section, index, field)


def _pydantic_problems(exc: ValidationError) -> list[Problem]:
    problems: list[Problem] = []
    for err in exc.errors(include_url=False):
        loc = tuple(err["loc"])
        kind = err["type"]
        value = err.get("input")
        ctx = err.get("ctx") or {}
        got = f", got {describe(value)}"
        unit = unit_of(loc)
        where = _where(loc)
        if kind == "extra_forbidden":
            key = str(loc[-1]) if loc else "?"
            hint = difflib.get_close_matches(key, sorted(ALL_FIELD_NAMES), n=1)
            message = f"unknown field {key!r}" + (f" (did you mean {hint[0]!r}?)" if hint else "")
        elif kind == "missing":
            message = "required field is missing"
        elif kind in ("float_type", "float_parsing"):
            message = "expected a number" + got
        elif kind in ("int_type", "int_parsing", "int_from_float"):
            message = "expected a whole number" + got
        elif kind in ("bool_type", "bool_parsing"):
            message = "expected true or false" + got
        elif kind == "string_type":
            message = "expected text" + got
        elif kind == "finite_number":
            message = "expected a finite number" + got
        elif kind == "literal_error":
            message = f"expected {ctx.get('expected', 'one of the allowed values')}" + got
        elif kind in ("model_type", "dict_type", "model_attributes_type"):
            message = "expected an object {…}" + got
        elif kind in ("list_type", "tuple_type"):
            message = "expected a list […]" + got
        elif kind == "greater_than_equal":
            message = f"must be at least {number(ctx['ge'])}{unit}" + got
        elif kind == "greater_than":
            message = f"must be greater than {number(ctx['gt'])}{unit}" + got
        elif kind == "less_than_equal":
            message = f"must be at most {number(ctx['le'])}{unit}" + got
        elif kind == "less_than":
            message = f"must be less than {number(ctx['lt'])}{unit}" + got
        elif kind == "string_too_short":
            message = "must not be empty"
        elif kind == "string_too_long":
            message = f"must be at most {ctx.get('max_length')} characters long"
        elif kind == "too_long":
            message = (f"at most {ctx.get('max_length')} items allowed, "
                       f"got {ctx.get('actual_length')}")
        elif kind == "string_pattern_mismatch":
            message = "expected a date written YYYY-MM-DD (or empty)" + got
        elif kind in ("distribution", "cat_profile"):
            message = str(err["msg"]) + got
        elif kind == "value_error":
            message = str(ctx.get("error", err["msg"]))
        else:  # pragma: no cover - a pydantic error type not met in the tests
            message = str(err["msg"]).replace("Input should be", "should be")
        problems.append(Problem(where, message))
    return problems


_SECTION_RANK = {name: i for i, name in enumerate(("format", "version", *_SECTIONS))}
_SECTION_FIELDS: dict[str, list[str]] = {
    "building": list(BuildingModel.model_fields),
    **{name: list(model.model_fields) for name, model in _LIST_SECTIONS.items()},
    "cat_profile": list(CatProfileModel.model_fields),
}


def _sorted_problems(problems: Iterable[Problem]) -> list[Problem]:
    """Problems in file order: by section, item index and field; stable within a field."""

    def key(p: Problem) -> tuple[int, int, int]:
        place = p.place
        if not _IDENT.match(place.section):  # the whole document, a line of the JSON text
            return (-1, 0, 0)
        head = place.field.replace("[", ".").split(".", 1)[0]
        fields = _SECTION_FIELDS.get(place.section, [])
        rank = fields.index(head) if head in fields else (-1 if not head else len(fields))
        return (_SECTION_RANK.get(place.section, len(_SECTION_RANK)), place.index or 0, rank)

    return sorted(problems, key=key)
