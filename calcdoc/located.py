"""YAML read with a safe loader into nodes that remember FILE:LINE:COL.

Every value a user writes keeps its location so that any later error can point at it. Dates come
back as ``datetime.date`` and bare numbers as int/float, exactly as YAML's safe constructor gives
them; callers normalise them once, in the loader.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

import yaml
import yaml.constructor

from calcdoc.errors import InputError, InputErrors, Location

__all__ = ["Node", "load_yaml", "plain"]


@dataclass
class Node:
    """A YAML value with its location; mappings also keep each key's location."""

    value: Any
    loc: Location
    key_locs: dict[str, Location] = field(default_factory=dict)

    @property
    def is_map(self) -> bool:
        return isinstance(self.value, dict)

    @property
    def is_list(self) -> bool:
        return isinstance(self.value, list)

    @property
    def is_scalar(self) -> bool:
        return not (self.is_map or self.is_list)

    def get(self, key: str) -> "Node | None":
        return self.value.get(key) if self.is_map else None


class _Constructor(yaml.constructor.SafeConstructor):
    pass


def _loc(path: str, mark) -> Location:
    return Location(path, mark.line + 1, mark.column + 1)


def _convert(node: yaml.Node, path: str, constructor: _Constructor, errors: list[InputError]) -> Node:
    loc = _loc(path, node.start_mark)
    if isinstance(node, yaml.MappingNode):
        constructor.flatten_mapping(node)
        out: dict[str, Node] = {}
        key_locs: dict[str, Location] = {}
        for key_node, value_node in node.value:
            # Keys are names as written: YAML 1.1 would read `on:` or `no:` as booleans.
            key = key_node.value if isinstance(key_node, yaml.ScalarNode) else \
                constructor.construct_object(key_node, deep=True)
            key_loc = _loc(path, key_node.start_mark)
            if not isinstance(key, str):
                key = str(key)
            if key in out:
                errors.append(InputError(key_loc, key, "duplicate key",
                                         "each key once", f"a second '{key}'"))
                continue
            out[key] = _convert(value_node, path, constructor, errors)
            key_locs[key] = key_loc
        return Node(out, loc, key_locs)
    if isinstance(node, yaml.SequenceNode):
        return Node([_convert(item, path, constructor, errors) for item in node.value], loc)
    return Node(constructor.construct_object(node, deep=True), loc)


def load_yaml(text: str, path: str) -> Node:
    """Return the located tree of one YAML document; raise InputError on bad YAML."""
    errors: list[InputError] = []
    try:
        root = yaml.compose(text, Loader=yaml.SafeLoader)
    except yaml.MarkedYAMLError as exc:
        mark = exc.problem_mark or exc.context_mark
        loc = _loc(path, mark) if mark else Location(path)
        raise InputError(loc, "", f"not valid YAML: {exc.problem or exc.context}") from None
    except yaml.YAMLError as exc:  # pragma: no cover - unmarked YAML errors are rare
        raise InputError(Location(path), "", f"not valid YAML: {exc}") from None
    if root is None:
        return Node({}, Location(path, 1, 1))
    try:
        tree = _convert(root, path, _Constructor(), errors)
    except yaml.constructor.ConstructorError as exc:
        mark = exc.problem_mark
        raise InputError(_loc(path, mark) if mark else Location(path), "",
                         f"not valid YAML: {exc.problem}") from None
    if errors:
        raise InputErrors(errors)
    return tree


def plain(node: Node | None) -> Any:
    """Return the node's value with locations stripped (for free-form text and archives)."""
    if node is None:
        return None
    if node.is_map:
        return {k: plain(v) for k, v in node.value.items()}
    if node.is_list:
        return [plain(v) for v in node.value]
    return node.value
