"""JSON Schemas of calcdoc's files, generated from the declarations.

The sheet's, the project's and the review file's keys come from :mod:`calcdoc.structure`; a
block's inputs from its kind's declaration. For editors and other tools that check YAML as it
is typed. calcdoc's own validator stays the authority (it also checks dimensions, ranges and
references, which a schema cannot).
"""

from __future__ import annotations

from calcdoc.kinds import registry
from calcdoc.kinds.base import fields_schema
from calcdoc.structure import BLOCK, PROJECT_FILE, REVIEW_FILE, SHEET_FILE, schema

__all__ = ["sheet_schema", "project_schema", "review_schema"]

_DRAFT = "https://json-schema.org/draft/2020-12/schema"


def _block_schema(kind) -> dict:
    inputs = fields_schema(kind.inputs, kind.exactly_one)
    block = schema(BLOCK.keys)
    properties = {**block["properties"], "kind": {"const": kind.name}}
    if kind.inputs_at_block_level:
        properties.pop("inputs")
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
    sheet = schema(SHEET_FILE)
    sheet["properties"]["blocks"] = {
        "type": "array", "description": "the calculation blocks in order",
        "items": {"type": "object", "required": ["id", "kind"],
                  "properties": {"kind": {"enum": list(kinds)}},
                  "allOf": [{"if": {"properties": {"kind": {"const": name}}},
                             "then": _block_schema(kind)} for name, kind in kinds.items()]}}
    return {"$schema": _DRAFT, "title": "calcdoc sheet", **sheet}


def project_schema() -> dict:
    """Return the JSON Schema of project.yaml."""
    return {"$schema": _DRAFT, "title": "calcdoc project", **schema(PROJECT_FILE)}


def review_schema() -> dict:
    """Return the JSON Schema of review.yaml."""
    return {"$schema": _DRAFT, "title": "calcdoc review comments", **schema(REVIEW_FILE)}
