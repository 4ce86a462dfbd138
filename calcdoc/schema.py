"""A JSON Schema of a sheet file, generated from the kinds' declarations.

For editors and other tools that check YAML as it is typed. calcdoc's own validator stays the
authority (it also checks dimensions, ranges and references, which a schema cannot).
"""

from __future__ import annotations

from calcdoc.kinds import registry
from calcdoc.kinds.base import fields_schema

__all__ = ["sheet_schema"]

_SIGNATURE = {"type": "object", "additionalProperties": False, "required": ["by", "date", "rev"],
              "properties": {"by": {"type": "string"}, "date": {"type": "string"},
                             "rev": {"type": "string"}}}
_CHECK = {"type": "object", "additionalProperties": False, "required": ["result"],
          "properties": {"result": {"type": "string"}, "at_most": {}, "at_least": {},
                         "source": {"type": "string"}},
          "oneOf": [{"required": ["at_most"]}, {"required": ["at_least"]}]}
_BLOCK_COMMON = {"id": {"type": "string", "pattern": "^[a-z0-9_-]+$"},
                 "title": {"type": "string"}, "notes": {"type": "string"},
                 "checks": {"type": "array", "items": _CHECK},
                 "display": {"type": "object", "additionalProperties": {"type": "string"}}}


def _block_schema(kind) -> dict:
    inputs = fields_schema(kind.inputs, kind.exactly_one)
    properties = {**_BLOCK_COMMON, "kind": {"const": kind.name}}
    if kind.inputs_at_block_level:
        properties.update(inputs["properties"])
        required = ["id", "kind"] + inputs["required"]
    else:
        properties["inputs"] = inputs
        required = ["id", "kind"] + (["inputs"] if inputs["required"] else [])
    return {"title": kind.title, "type": "object", "additionalProperties": False,
            "required": required, "properties": properties}


def sheet_schema() -> dict:
    """Return the JSON Schema (draft 2020-12) of one sheet file."""
    kinds = registry()
    return {
        "$schema": "https://json-schema.org/draft/2020-12/schema",
        "title": "calcdoc sheet",
        "type": "object", "additionalProperties": False, "required": ["title", "blocks"],
        "properties": {
            "id": {"type": "string", "pattern": "^[A-Za-z0-9_-]+$"},
            "title": {"type": "string"},
            "notes": {"type": "string"},
            "signoff": {"type": "object", "additionalProperties": False,
                        "properties": {role: _SIGNATURE
                                       for role in ("prepared", "checked", "approved")}},
            "blocks": {"type": "array", "items": {
                "type": "object", "required": ["kind"],
                "properties": {"kind": {"enum": list(kinds)}},
                "allOf": [{"if": {"properties": {"kind": {"const": name}}},
                           "then": _block_schema(kind)} for name, kind in kinds.items()]}},
        },
    }
