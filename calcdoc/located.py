"""YAML read with a safe loader into nodes that remember FILE:LINE:COL.

Every value a user writes keeps its location so that any later error can point at it. Dates come
back as ``datetime.date`` and bare numbers as int/float, exactly as YAML's safe constructor gives
them; callers normalise them once, in the loader.

A YAML file is text from a stranger: before it is composed, one pass over its events (which
PyYAML parses without recursion) refuses nesting deeper than :data:`MAX_DEPTH` and more than
:data:`MAX_EVENTS` events, and conversion counts every value it produces, so that a few hundred
bytes of nested aliases cannot expand into gigabytes (:data:`MAX_VALUES`).
"""

from __future__ import annotations

import datetime
from dataclasses import dataclass, field
from typing import Any

import yaml
import yaml.constructor

from calcdoc.errors import InputError, InputErrors, Location, remember_source

__all__ = ["Node", "load_yaml", "plain", "is_date", "MAX_DEPTH", "MAX_VALUES", "MAX_EVENTS"]

MAX_DEPTH = 40
"""Deepest nesting of mappings and lists in one file; a sheet needs about eight."""

MAX_VALUES = 100_000
"""Most values one file may expand to, aliases counted at every use."""

MAX_EVENTS = 200_000
"""Most YAML events (scalars, collection starts and ends) in one file."""


@dataclass
class Node:
    """A YAML value with its location; mappings also keep each key's location.

    ``style`` is the scalar's quoting as written (None plain, ``'`` or ``"`` quoted, ``|`` or
    ``>`` block), so that a column inside a value can be located (:meth:`loc_at`)."""

    value: Any
    loc: Location
    key_locs: dict[str, Location] = field(default_factory=dict)
    style: str | None = None

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

    def loc_at(self, offset: int) -> Location:
        """Return the location of character ``offset`` of a one-line scalar as written."""
        if self.style in ("|", ">") or offset <= 0:
            return self.loc
        shift = offset + (1 if self.style in ("'", '"') else 0)
        loc = self.loc
        return Location(loc.file, loc.line, loc.col + shift, loc.name)


# libyaml's parser when PyYAML was built with it (the wheels are): the same events and nodes
# with the same marks, several times faster than the pure-Python parser. A file it refuses is
# read again with the pure-Python one, whose messages (and limits) are the ones calcdoc words.
_FAST_LOADER = getattr(yaml, "CSafeLoader", None)


class _Constructor(yaml.constructor.SafeConstructor):
    pass


class _TooBig(Exception):
    def __init__(self, loc: Location, what: str, expected: str, got: str):
        self.error = InputError(loc, "", what, expected, got)


def _loc(path: str, mark, name: str) -> Location:
    return Location(path, mark.line + 1, mark.column + 1, name)


def _prescan(text: str, path: str, name: str, loader=yaml.SafeLoader) -> None:
    """Refuse nesting deeper than MAX_DEPTH and more than MAX_EVENTS events, before composing."""
    depth = 0
    count = 0
    for event in yaml.parse(text, Loader=loader):
        count += 1
        if count > MAX_EVENTS:
            raise _TooBig(_loc(path, event.start_mark, name), "too many values in one file",
                          f"at most {MAX_EVENTS} YAML events", "more")
        if isinstance(event, (yaml.MappingStartEvent, yaml.SequenceStartEvent)):
            depth += 1
            if depth > MAX_DEPTH:
                raise _TooBig(_loc(path, event.start_mark, name), "nested too deeply",
                              f"at most {MAX_DEPTH} levels of mappings and lists",
                              f"more than {MAX_DEPTH}")
        elif isinstance(event, (yaml.MappingEndEvent, yaml.SequenceEndEvent)):
            depth -= 1


class _Converter:
    def __init__(self, path: str, name: str):
        self.path, self.name = path, name
        self.constructor = _Constructor()
        self.errors: list[InputError] = []
        self.count = 0

    def loc(self, mark) -> Location:
        return _loc(self.path, mark, self.name)

    def scalar(self, node: yaml.Node):
        try:
            return self.constructor.construct_object(node, deep=True)
        except yaml.constructor.ConstructorError as exc:
            raise InputError(self.loc(exc.problem_mark or node.start_mark), "",
                             f"not valid YAML: {exc.problem}") from None
        except (ValueError, OverflowError, TypeError) as exc:
            text = str(node.value)[:60]
            if node.tag == "tag:yaml.org,2002:timestamp":
                raise InputError(self.loc(node.start_mark), "", "not a valid date",
                                 "a date YYYY-MM-DD", repr(text)) from None
            raise InputError(self.loc(node.start_mark), "", "not a valid value",
                             "a number, a date or text", f"{text!r} ({exc})") from None

    def convert(self, node: yaml.Node, depth: int = 0) -> Node:
        self.count += 1
        if self.count > MAX_VALUES:
            raise _TooBig(self.loc(node.start_mark), "too many values in one file (aliases "
                          "count at every use)", f"at most {MAX_VALUES} values", "more")
        # the prescan bounds nesting as written; an alias nests its value where it is used,
        # and one inside the value it names (`&a [*a]`) would nest without end
        if depth > MAX_DEPTH:
            raise _TooBig(self.loc(node.start_mark), "nested too deeply (an alias nests its "
                          "value where it is used)",
                          f"at most {MAX_DEPTH} levels of mappings and lists",
                          f"more than {MAX_DEPTH}")
        loc = self.loc(node.start_mark)
        if isinstance(node, yaml.MappingNode):
            try:
                self.constructor.flatten_mapping(node)
            except yaml.constructor.ConstructorError as exc:
                raise InputError(self.loc(exc.problem_mark or node.start_mark), "",
                                 f"not valid YAML: {exc.problem}") from None
            out: dict[str, Node] = {}
            key_locs: dict[str, Location] = {}
            for key_node, value_node in node.value:
                # Keys are names as written: YAML 1.1 would read `on:` or `no:` as booleans.
                if isinstance(key_node, yaml.ScalarNode):
                    key = key_node.value
                else:
                    raise InputError(self.loc(key_node.start_mark), "",
                                     "a key must be a plain name", "a name such as 'title'",
                                     "a mapping or a list")
                key_loc = self.loc(key_node.start_mark)
                if key in out:
                    self.errors.append(InputError(key_loc, key, "duplicate key",
                                                  "each key once", f"a second '{key}'"))
                    continue
                out[key] = self.convert(value_node, depth + 1)
                key_locs[key] = key_loc
            return Node(out, loc, key_locs)
        if isinstance(node, yaml.SequenceNode):
            return Node([self.convert(item, depth + 1) for item in node.value], loc)
        return Node(self.scalar(node), loc, style=getattr(node, "style", None))


def load_yaml(text: str, path: str, name: str = "") -> Node:
    """Return the located tree of one YAML document; raise InputError(s) on bad YAML.

    ``path`` labels the file in messages; ``name`` is its path inside the project."""
    remember_source(path, text)
    root = None
    try:
        if _FAST_LOADER is not None:
            try:
                _prescan(text, path, name, _FAST_LOADER)
                root = yaml.compose(text, Loader=_FAST_LOADER)
            except yaml.YAMLError:
                root = None  # read again below, for the pure-Python parser's message
            else:
                if root is None:
                    return Node({}, Location(path, 1, 1, name))
        if root is None:
            _prescan(text, path, name)
            root = yaml.compose(text, Loader=yaml.SafeLoader)
    except _TooBig as big:
        raise big.error from None
    except yaml.MarkedYAMLError as exc:
        mark = exc.problem_mark or exc.context_mark
        loc = _loc(path, mark, name) if mark else Location(path, name=name)
        raise InputError(loc, "", f"not valid YAML: {exc.problem or exc.context}") from None
    except yaml.YAMLError as exc:  # pragma: no cover - unmarked YAML errors are rare
        raise InputError(Location(path, name=name), "", f"not valid YAML: {exc}") from None
    if root is None:
        return Node({}, Location(path, 1, 1, name))
    converter = _Converter(path, name)
    try:
        tree = converter.convert(root)
    except _TooBig as big:
        raise big.error from None
    if converter.errors:
        raise InputErrors(converter.errors)
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


def is_date(value: Any) -> bool:
    """Return whether a scalar is a date as YAML reads it, or ISO date text."""
    if isinstance(value, datetime.datetime):
        return True
    if isinstance(value, datetime.date):
        return True
    if isinstance(value, str):
        try:
            datetime.date.fromisoformat(value.strip())
        except ValueError:
            return False
        return True
    return False
