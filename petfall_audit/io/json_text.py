"""JSON text that people can read and that is quick to write for a large building.

``json.dumps(..., indent=2)`` falls back to the pure-Python encoder and takes most of the time
of an export of a thousand openings. :func:`json_text` breaks objects and arrays over indented
lines only down to ``block_depth`` levels and writes every deeper value on one line with the
C encoder: an opening of the results is one line, easy to find, to read and to compare.
"""

from __future__ import annotations

import json
from typing import Any

__all__ = ["json_text"]

_INDENT = "  "


def json_text(value: Any, *, block_depth: int = 3, allow_nan: bool = True) -> str:
    """``value`` as UTF-8 JSON text ending in a newline: objects and arrays at depth below
    ``block_depth`` (the document itself is depth 0) one member per indented line, deeper ones
    on a single line. Equal values give equal bytes; ``json.loads`` reads it back unchanged.
    ``allow_nan=False``: ``ValueError`` for a NaN or an infinity (as ``json.dumps``)."""
    inline = json.JSONEncoder(ensure_ascii=False, separators=(", ", ": "), allow_nan=allow_nan)
    out: list[str] = []
    _write(value, 0, max(0, int(block_depth)), inline, out)
    out.append("\n")
    return "".join(out)


def _write(value: Any, depth: int, block_depth: int, inline: json.JSONEncoder,
           out: list[str]) -> None:
    is_dict = isinstance(value, dict)
    if depth >= block_depth or not (is_dict or isinstance(value, (list, tuple))) or not value:
        out.append(inline.encode(value))
        return
    pad = _INDENT * (depth + 1)
    out.append("{\n" if is_dict else "[\n")
    items = value.items() if is_dict else ((None, v) for v in value)
    first = True
    for key, item in items:
        if not first:
            out.append(",\n")
        first = False
        out.append(pad)
        if is_dict:
            out.append(inline.encode(_key(key)))
            out.append(": ")
        _write(item, depth + 1, block_depth, inline, out)
    out.append("\n" + _INDENT * depth + ("}" if is_dict else "]"))


def _key(key: Any) -> str:
    """A key as ``json.dumps`` writes it (numbers, booleans and None become strings)."""
    if isinstance(key, str):
        return key
    return str(next(iter(json.loads(json.dumps({key: None})))))
