"""The shipped JSON Schemas (building file, control catalogue, code profile) made from their
pydantic models the same way: draft 2020-12, our own description, no generated titles."""

from __future__ import annotations

import json
from typing import Any

from pydantic import BaseModel

__all__ = ["schema_of", "dumps_schema_text"]


def _drop_titles(node: Any) -> None:
    """Remove the generated titles ("Site Altitude M"); the descriptions say more. (No field of
    these files is itself called "title", so every "title" key is a schema title.)"""
    if isinstance(node, dict):
        node.pop("title", None)
        for value in node.values():
            _drop_titles(value)
    elif isinstance(node, list):
        for item in node:
            _drop_titles(item)


def schema_of(model: type[BaseModel], description: str) -> dict[str, Any]:
    """The JSON Schema of ``model`` (as it validates a file) with ``description`` at its top."""
    schema = model.model_json_schema(mode="validation")
    title = schema.pop("title", "")
    _drop_titles(schema)
    return {
        "$schema": "https://json-schema.org/draft/2020-12/schema",
        "title": title,
        "description": description,
        **{k: v for k, v in schema.items() if k != "description"},
    }


def dumps_schema_text(schema: dict[str, Any]) -> str:
    """A schema as committed: indented, keys in generation order, ending with a newline."""
    return json.dumps(schema, indent=2, ensure_ascii=False) + "\n"
