"""JSON text of the exports (petfall_audit.io.json_text): the standard library's parser reads
back exactly the value written, deep values sit on one line, and the bytes are repeatable."""

from __future__ import annotations

import json
from typing import Any

from hypothesis import given
from hypothesis import strategies as st

from petfall_audit.io.json_text import json_text

_scalars = (st.none() | st.booleans() | st.integers(-10**12, 10**12)
            | st.floats(allow_nan=False, allow_infinity=False) | st.text(max_size=12))
_values = st.recursive(
    _scalars,
    lambda inner: st.lists(inner, max_size=4) | st.dictionaries(st.text(max_size=6), inner,
                                                                max_size=4),
    max_leaves=30,
)


@given(_values, st.integers(0, 4))
def test_the_standard_parser_reads_back_the_value(value: Any, depth: int) -> None:
    text = json_text(value, block_depth=depth)
    assert text.endswith("\n")
    assert json.loads(text) == value
    assert json_text(value, block_depth=depth) == text


def test_each_opening_is_one_line_and_the_envelope_is_indented() -> None:
    doc = {"format": "x", "results": {"openings": [{"id": "A1", "bands": {"minor": 0.5}},
                                                   {"id": "Ä2", "factors": ["a", "b"]}]}}
    lines = json_text(doc).splitlines()
    assert lines[0] == "{"
    assert '  "format": "x",' in lines
    assert '      {"id": "A1", "bands": {"minor": 0.5}},' in lines
    assert '      {"id": "Ä2", "factors": ["a", "b"]}' in lines  # UTF-8, not \\u escapes


def test_keys_that_are_not_strings_are_written_as_the_standard_library_writes_them() -> None:
    value = {1: "a", 2.5: "b", False: "c", None: "d"}
    assert json.loads(json_text(value)) == json.loads(json.dumps(value))
