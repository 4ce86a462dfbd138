"""The structure of project.yaml, a sheet, a block, a check and review.yaml, declared once.

Each file's keys are declared here as data (:class:`Key`: name, meaning, type, required or
default, choices, range, pattern, nested keys). From that one declaration come the loader's
checks (:func:`read`: unknown keys, missing keys, wrong types, every error located and collected),
the JSON Schema editors use (:func:`schema`) and the reference documentation (:func:`describe`).
A kind's inputs are declared the same way in its module; a block's ``inputs`` is where the two
meet.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from typing import Any

from calcdoc.kinds.base import did_you_mean
from calcdoc.located import Node, is_date, plain

__all__ = ["Key", "read", "schema", "describe", "PROJECT_FILE", "SHEET_FILE", "BLOCK", "CHECK",
           "REVIEW_FILE", "SIGNATURE", "SIGN_ROLES", "REVISION"]


@dataclass(frozen=True)
class Key:
    """One key of a mapping in a file.

    ``type`` is text | date | integer | choice | mapping | list | value (anything, read by its
    owner: a quantity, a kind's inputs). A mapping has ``keys``; a list has ``items`` (a Key
    whose ``keys`` declare each item, or a scalar type). ``what`` is the message when a value
    is refused (a choice not listed, an integer out of range, text not matching ``pattern``)."""

    name: str
    meaning: str
    type: str = "text"
    required: bool = False
    default: Any = None
    choices: tuple = ()
    low: int | None = None
    high: int | None = None
    pattern: str | None = None
    keys: tuple = ()
    items: "Key | None" = None
    exactly_one: tuple = ()
    what: str = ""
    expected: str = ""
    min_items: int = 0

    def names(self) -> tuple[str, ...]:
        return tuple(k.name for k in self.keys)


SIGN_ROLES = ("prepared", "checked", "approved")

SIGNATURE = Key("signature", "a signature", "mapping", keys=(
    Key("by", "who signed", required=True),
    Key("date", "when (YYYY-MM-DD)", "date", required=True),
    Key("rev", "the package revision the signature applies to", required=True)))

REVISION = Key("revision", "one revision, oldest first", "mapping", keys=(
    Key("rev", "revision mark, e.g. P1", required=True),
    Key("date", "date of issue (YYYY-MM-DD)", "date", required=True),
    Key("purpose", "purpose of issue", required=True),
    Key("by", "prepared by (initials)"),
    Key("checked", "checked by (initials)"),
    Key("approved", "approved by; empty: not approved (a preliminary package)")))

PROJECT_FILE = (
    Key("project", "the project", "mapping", required=True, keys=(
        Key("number", "project number", required=True),
        Key("title", "project title", required=True),
        Key("client", "client"),
        Key("site", "site"),
        Key("organisation", "the organisation issuing the package"))),
    Key("package", "the calculation package", "mapping", required=True, keys=(
        Key("number", "package number", required=True),
        Key("title", "package title", required=True),
        Key("sheets", "the sheet files in order (default: sheets/*.yaml sorted)", "list",
            items=Key("sheet", "a sheet file inside the project folder")))),
    Key("revisions", "revisions, oldest first; the last is the current one", "list",
        required=True, items=REVISION, min_items=1,
        what="revisions must be a list, oldest first",
        expected="a list of {rev, date, purpose, by, checked, approved}"),
    Key("units", "unit system for display (computation is always coherent SI)", "choice",
        default="SI", choices=("SI", "US"), what="unknown unit system", expected="SI | US"),
    Key("precision", "significant figures shown (results.json keeps full precision)",
        "integer", default=3, low=2, high=8, what="precision out of range",
        expected="a whole number of significant figures from 2 to 8"),
    Key("confirmations", "library values checked against their printed source by the "
        "project", "list", items=Key("confirmation", "one value confirmed", "mapping", keys=(
            Key("value", "the value, as 'Values to confirm' names it, e.g. "
                "materials.mineral_wool.conductivity", required=True),
            Key("by", "who checked it", required=True),
            Key("date", "when (YYYY-MM-DD)", "date", required=True),
            Key("against", "the document, edition and table it was checked against",
                required=True)))),
)

CHECK = Key("check", "a check of a result against a limit", "mapping",
            keys=(Key("result", "the result checked", required=True),
                  Key("at_most", "the largest value allowed (a quantity)", "value"),
                  Key("at_least", "the smallest value allowed (a quantity)", "value"),
                  Key("source", "where the limit comes from")),
            exactly_one=(("at_most", "at_least"),))

BLOCK = Key("block", "one calculation block", "mapping", keys=(
    Key("id", "unique in the sheet", required=True, pattern=r"^[a-z0-9_-]+$",
        what="block id has characters outside [a-z0-9_-]", expected="[a-z0-9_-]+"),
    Key("kind", "the calculation kind (calcdoc kinds lists them)", required=True),
    Key("title", "what the block calculates"),
    Key("inputs", "the kind's inputs (calcdoc kinds KIND explains them)", "value"),
    Key("checks", "checks of results against limits", "list", items=CHECK),
    Key("display", "display unit per result, e.g. {U: W/(m^2*K)}", "value"),
    Key("notes", "notes on the block (Markdown)")))

SHEET_FILE = (
    Key("id", "unique in the package (default: the file name)", pattern=r"^[A-Za-z0-9_-]+$",
        what="sheet id has characters outside [A-Za-z0-9_-]", expected="[A-Za-z0-9_-]+"),
    Key("title", "what the sheet calculates", required=True),
    Key("signoff", "signatures: prepared, checked, approved, each {by, date, rev}", "mapping",
        keys=tuple(Key(role, f"{role} by", "mapping", keys=SIGNATURE.keys)
                   for role in SIGN_ROLES)),
    Key("notes", "notes on the sheet (Markdown, sanitised)"),
    Key("blocks", "the calculation blocks in order", "list", required=True, items=BLOCK),
)

REVIEW_FILE = (
    Key("reviewer", "the reviewer's name"),
    Key("comments", "review comments", "list", items=Key("comment", "one comment", "mapping",
        keys=(Key("on", "a sheet (EW1) or a block (EW1.wall)", required=True),
              Key("by", "who commented"),
              Key("date", "when (YYYY-MM-DD)", "date"),
              Key("text", "the comment", required=True),
              Key("status", "the comment's state", "choice", required=True,
                  choices=("open", "answered", "closed"), what="unknown status",
                  expected="open | answered | closed"),
              Key("response", "the response"))),
        what="not a list", expected="a list of {on, by, date, text, status, response}"),
)


# ----------------------------------------------------------------------------- reading


def _shown(node: Node) -> str:
    text = repr(plain(node))
    return text if len(text) <= 80 else text[:77] + "..."


def read(node: Node, keys: tuple, where: str, col, extra: tuple = (),
         raw: tuple = ()) -> dict | None:
    """Return a mapping's values by the declaration ``keys`` (text as str, dates as ISO text,
    integers, choices, nested mappings as dicts, lists as lists, ``value`` keys as their Node),
    recording every problem on ``col``; None when ``node`` is not a mapping. ``extra`` names
    more keys to accept as Nodes (a kind's inputs written beside ``id`` and ``kind``); keys in
    ``raw`` come back as their Node, for the caller to read in its own words."""
    allowed = tuple(k.name for k in keys) + tuple(extra)
    required = tuple(k.name for k in keys if k.required)
    if not col.keys(node, allowed, where, required=required):
        return None
    out: dict = {}
    for key in keys:
        sub = node.value.get(key.name)
        here = f"{where}.{key.name}" if where else key.name
        if key.name in raw:
            out[key.name] = sub
            continue
        if sub is None or sub.value is None:
            out[key.name] = key.default
            continue
        out[key.name] = _value(key, sub, here, col)
    for name in extra:
        if name in node.value:
            out[name] = node.value[name]
    return out


def read_checked(node: Node, key: Key, where: str, col) -> dict | None:
    """Read a mapping declared by ``key``, its exactly-one groups included."""
    out = read(node, key.keys, where, col)
    if out is None:
        return None
    for group in key.exactly_one:
        present = [name for name in group if name in node.value]
        if len(present) != 1:
            col.error(node.loc, where, f"a {key.name} needs exactly one of " + " | ".join(group),
                      "exactly one", ", ".join(present) or "none")
            return None
    return out


def _value(key: Key, node: Node, where: str, col):
    if key.type == "value":
        return node
    if key.type == "mapping":
        return read_checked(node, key, where, col)
    if key.type == "list":
        if not node.is_list or len(node.value) < key.min_items:
            col.error(node.loc, where, key.what or "not a list",
                      key.expected or f"a list of {key.items.meaning if key.items else 'items'}",
                      _shown(node))
            return None
        items = []
        for i, item in enumerate(node.value):
            here = f"{where}[{i}]"
            if key.items is not None and key.items.type == "mapping":
                items.append(read_checked(item, key.items, here, col))
            elif key.items is not None:
                items.append(_value(key.items, item, here, col))
            else:
                items.append(item)
        return items
    if not node.is_scalar:
        col.error(node.loc, where, "not text" if key.type == "text" else f"not a {key.type}",
                  "a single value", "a mapping" if node.is_map else "a list")
        return None
    if key.type == "date":
        if not is_date(node.value):
            col.error(node.loc, where, "not a date", "a date YYYY-MM-DD", _shown(node))
            return None
        return col.text(node, where)
    if key.type == "integer":
        value = node.value
        if isinstance(value, bool) or not isinstance(value, int) or not (
                key.low is None or value >= key.low) or not (key.high is None or
                                                             value <= key.high):
            col.error(node.loc, where, key.what or "not a whole number in range",
                      key.expected or f"a whole number from {key.low} to {key.high}",
                      _shown(node))
            return None
        return value
    text = col.text(node, where)
    if key.type == "choice" and text not in key.choices:
        col.error(node.loc, where, key.what or f"'{key.name}' is not one of the choices",
                  key.expected or " | ".join(key.choices), repr(text),
                  did_you_mean(text, key.choices))
        return None
    if key.pattern and not re.match(key.pattern, text):
        col.error(node.loc, where, key.what or f"'{key.name}' has characters not allowed",
                  key.expected or key.pattern, repr(text))
        return None
    return text


# ----------------------------------------------------------------------------- schema and docs


def _key_schema(key: Key) -> dict:
    out: dict = {"description": key.meaning}
    if key.type in ("text", "date"):
        out["type"] = ["string", "number"] if key.type == "text" else "string"
        if key.pattern:
            out["pattern"] = key.pattern
    elif key.type == "integer":
        out.update({"type": "integer", "minimum": key.low, "maximum": key.high})
    elif key.type == "choice":
        out["enum"] = list(key.choices)
    elif key.type == "mapping":
        out.update(schema(key.keys))
        if key.exactly_one:
            out["oneOf"] = [{"required": [name]} for group in key.exactly_one for name in group]
    elif key.type == "list":
        out["type"] = "array"
        if key.min_items:
            out["minItems"] = key.min_items
        if key.items is not None:
            out["items"] = _key_schema(key.items)
    return out


def schema(keys: tuple) -> dict:
    """Return the JSON Schema (draft 2020-12) of a mapping with the declared keys."""
    return {"type": "object", "additionalProperties": False,
            "properties": {k.name: _key_schema(k) for k in keys},
            "required": [k.name for k in keys if k.required]}


def describe(keys: tuple, prefix: str = "") -> list[dict]:
    """Return one row per key, nested keys flattened with dotted names, for the reference."""
    rows = []
    for key in keys:
        name = f"{prefix}{key.name}"
        kind = key.type
        if key.type == "choice":
            kind = " | ".join(key.choices)
        elif key.type == "integer":
            kind = f"whole number {key.low} to {key.high}"
        elif key.type == "list" and key.items is not None and key.items.type != "mapping":
            kind = f"list of {key.items.type}"
        rows.append({"name": name, "type": kind, "required": key.required,
                     "default": "" if key.default is None else str(key.default),
                     "meaning": key.meaning})
        if key.type == "mapping":
            rows.extend(describe(key.keys, name + "."))
        elif key.type == "list" and key.items is not None and key.items.type == "mapping":
            rows.extend(describe(key.items.keys, name + "[]."))
    return rows
