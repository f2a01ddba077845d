"""Hypothesis strategies for building documents: random JSON values and mutated valid files."""

from __future__ import annotations

import copy
import json
from pathlib import Path
from typing import Any

from hypothesis import strategies as st

from petfall_audit._resources import sample_path

FIXTURE = Path(__file__).parent / "fixtures" / "building_v1.json"

#: Scalars a JSON reader can produce (Python's reader also lets NaN and Infinity through).
json_scalars = (
    st.none()
    | st.booleans()
    | st.integers(min_value=-(10**20), max_value=10**20)
    | st.floats(allow_nan=True, allow_infinity=True)
    | st.text(max_size=12)
)

#: Any JSON-ish value: scalars, lists and objects, nested a few levels.
json_values = st.recursive(
    json_scalars,
    lambda children: (
        st.lists(children, max_size=4) | st.dictionaries(st.text(max_size=10), children, max_size=4)
    ),
    max_leaves=12,
)

#: Numbers, plausible and absurd, of both JSON kinds.
numbers = (
    st.integers(min_value=-(10**6), max_value=10**6)
    | st.floats(min_value=-1e6, max_value=1e6)
    | st.sampled_from([0, -1, 0.0, -0.0, 1e308, -1e308, 2**63, 0.5, 3, 40])
)


def base_documents() -> list[dict[str, Any]]:
    """Valid documents to mutate: the version-1 fixture and the walk-up sample."""
    return [
        json.loads(FIXTURE.read_text(encoding="utf-8")),
        json.loads(sample_path("walkup").read_text(encoding="utf-8")),
    ]


def _places(node: Any) -> list[tuple[Any, Any]]:
    """Every (container, key) place in a document, the root's keys included."""
    out: list[tuple[Any, Any]] = []
    stack = [node]
    while stack:
        current = stack.pop()
        items = current.items() if isinstance(current, dict) else enumerate(current)
        for key, value in items:
            out.append((current, key))
            if isinstance(value, dict | list):
                stack.append(value)
    return out


MUTATIONS = ("drop", "retype", "unknown_key", "duplicate", "number", "swap_type_text")


@st.composite
def mutated_documents(draw: st.DrawFn, bases: list[dict[str, Any]] | None = None) -> Any:
    """A valid document with one to four random edits: a key or item dropped, a value replaced
    by a random JSON value, a text or a number, an unknown key inserted, a list item doubled
    (duplicate ids)."""
    doc = copy.deepcopy(draw(st.sampled_from(bases or base_documents())))
    for _ in range(draw(st.integers(min_value=1, max_value=4))):
        places = _places(doc)
        if not places:
            break
        container, key = draw(st.sampled_from(places))
        op = draw(st.sampled_from(MUTATIONS))
        if op == "drop":
            del container[key]
        elif op == "retype":
            container[key] = draw(json_values)
        elif op == "swap_type_text":
            container[key] = str(container[key])
        elif op == "number":
            container[key] = draw(numbers)
        elif op == "unknown_key":
            target = container if isinstance(container, dict) else container[key]
            if isinstance(target, dict):
                target[draw(st.text(min_size=1, max_size=10))] = draw(json_values)
        elif op == "duplicate":
            if isinstance(container, list):
                container.append(copy.deepcopy(container[key]))
            elif isinstance(container[key], list) and container[key]:
                container[key].append(copy.deepcopy(container[key][0]))
    return doc


@st.composite
def random_documents(draw: st.DrawFn) -> Any:
    """Documents with the right header and random sections, or anything at all."""
    if draw(st.booleans()):
        return draw(json_values)
    doc: dict[str, Any] = {"format": "petfall-audit-building", "version": 1}
    for section in ("building", "floors", "facades", "surfaces", "openings", "cat_profile"):
        if draw(st.booleans()):
            doc[section] = draw(json_values)
    return doc


#: Text a hostile or unlucky user puts in a building file: spreadsheet formulas, terminal
#: escape sequences, reportlab markup, a lone surrogate, control and bidirectional characters,
#: right-to-left and CJK script, words longer than a table cell, paths out of the folder.
HOSTILE_TEXTS: tuple[str, ...] = (
    "=HYPERLINK(\"http://example.invalid\",\"x\")", "+1+1", "-2+3", "@SUM(A1)", "\tcmd", "\r=1",
    "\x1b[2J\x1b[31mred", "\x1b]0;title\x07", "a\x00b", "\u202eevil\u202c",
    "<b>bold</b>&amp;<font>", "</para><para>",
    "\ud800", "x\udfffy", "שלום עולם", "東京タワー 展望台", "🐈‍⬛🙀", "\n\n\n",
    "W" * 199, "W" * 200, "W" * 201, "word " * 300, "x" * 20_000, "x" * 20_001, "../secret.png",
    "photos/../../x.png", "..\\x.png", "/etc/passwd", "C:\\x.png", "photos/ok.png",
    "photos/fifo.png", "", " ",
)


#: Fields of free text (no id, reference, word from a list or date).
FREE_TEXT_FIELDS = frozenset({"name", "label", "notes", "address", "auditor"})


@st.composite
def hostile_documents(draw: st.DrawFn, bases: list[dict[str, Any]] | None = None) -> Any:
    """A valid document with one to four edits, most of them putting hostile text (see
    :data:`HOSTILE_TEXTS`) or hostile photo paths where text was, the rest as in
    :func:`mutated_documents`."""
    doc = copy.deepcopy(draw(st.sampled_from(bases or base_documents())))
    for _ in range(draw(st.integers(min_value=1, max_value=4))):
        places = _places(doc) if isinstance(doc, dict | list) else []
        texts = [(c, k) for c, k in places if isinstance(c[k], str) and k not in ("format",)]
        free = [(c, k) for c, k in texts if k in FREE_TEXT_FIELDS]
        choice = draw(st.integers(min_value=0, max_value=9))
        if choice < 4 and free:  # free text: most such files still load
            container, key = draw(st.sampled_from(free))
            container[key] = draw(st.sampled_from(HOSTILE_TEXTS))
        elif choice < 6 and texts:  # any text, ids and references too
            container, key = draw(st.sampled_from(texts))
            container[key] = draw(st.sampled_from(HOSTILE_TEXTS) | st.text(max_size=30))
        elif choice < 7 and isinstance(doc, dict) and isinstance(doc.get("openings"), list) \
                and doc["openings"]:
            opening = draw(st.sampled_from(doc["openings"]))
            if isinstance(opening, dict):
                opening["photos"] = draw(st.lists(st.sampled_from(HOSTILE_TEXTS), max_size=3))
        else:
            doc = draw(mutated_documents([doc]))
    return doc
