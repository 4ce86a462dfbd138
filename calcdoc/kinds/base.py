"""What a calculation kind declares, and what its ``compute`` receives and writes.

A kind is declared once, as data: its inputs (:class:`Field` objects: name, dimension, default,
range, source of the default) and its results (:class:`ResultSpec`), with a ``compute(inp, out)``
function. The validator, ``calcdoc kinds``, the JSON Schema, the report's input tables and
results.json are all driven by that declaration.

``compute`` receives ``inp``, an :class:`Inputs` mapping of coherent SI floats (lists and dicts for
list and record fields, a material record for a material, an object for a fire), and ``out``, a
:class:`BlockOutput` on which it records data only: results, steps written in the formula
language over named operands, statements, notes and warnings with named values, series and
figures (:mod:`calcdoc.data`). It never formats a number for people and never draws: the view
layer under ``calcdoc/render`` does both, in one place.

Example (a complete kind)::

    KIND = Kind(
        name="surface_emission", title="Emission from a grey surface",
        summary="Emissive power of a grey diffuse surface (Stefan–Boltzmann law).",
        inputs=(Quantity("temperature", "surface temperature", unit="K", temperature=ABSOLUTE,
                         greater_than=0.0),
                Quantity("emissivity", "hemispherical emissivity", greater_than=0.0,
                         at_most=1.0)),
        results=(ResultSpec("E", "W/m^2", "emissive power"),),
        compute=compute)

    def compute(inp, out):
        E = inp.emissivity * SIGMA * inp.temperature ** 4
        out.step("E", "epsilon * sigma * T ** 4",
                 {"epsilon": out.input("emissivity"), "T": out.input("temperature")},
                 E, "W/m^2", label="Emissive power", source="Stefan–Boltzmann law", yields="E")

The step is checked when it is recorded: the expression, evaluated from its operands, must give
the value recorded, so the working printed in the package always re-does.
"""

from __future__ import annotations

import difflib
import math
from dataclasses import dataclass, field
from typing import Any, Callable

from calcdoc.data import FigureData, Phrase, Step, Value, phrase
from calcdoc.errors import CalcdocError, InputError, Location
from calcdoc.located import Node, plain
from calcdoc.units import ABSOLUTE, DIFFERENCE, UnitProblem, convert, dimension_text, parse_quantity_text, same_dimension
from calcdoc.render.numbers import display_unit_for, format_quantity, pretty_unit

__all__ = [
    "REQUIRED", "ABSOLUTE", "DIFFERENCE", "Field", "Quantity", "Choice", "Text", "Items",
    "Record", "MaterialField", "FreeMapping", "ResultSpec", "Kind", "Inputs", "InputContext",
    "InputRecord", "BlockOutput", "Step", "Series", "ResolvedRef", "did_you_mean", "Value",
    "Phrase", "phrase", "FigureData", "InvalidInput", "StepMismatch", "convert_fields",
    "MAX_ITEMS",
]

# Items of one list input of a block (layers, regions, surfaces, flanking elements, months,
# points of a conductivity curve): a wall has a dozen layers, a junction some tens of regions.
MAX_ITEMS = 1000


class _Required:
    def __repr__(self) -> str:
        return "REQUIRED"


REQUIRED: Any = _Required()


def did_you_mean(word: str, options) -> str | None:
    """Return a 'did you mean' hint for a mistyped key, or None."""
    close = difflib.get_close_matches(word, list(options), n=1, cutoff=0.6)
    return f"did you mean '{close[0]}'?" if close else None


# ----------------------------------------------------------------------------- records


@dataclass
class InputRecord:
    """One resolved input as data: path, the text as written, the SI value, how to show it,
    its source and where it was written. The view layer prints it."""

    path: str
    meaning: str
    written: str
    si: Any
    si_unit: str
    display_unit: str | None = None  # the unit to show it in; None: as written or SI
    source: str = ""
    origin: str = "given"  # given | default | ref | named | material
    ref: str | None = None
    loc: Location | None = None
    temperature: str | None = None
    written_unit: str | None = None  # the unit as written, when the value is a quantity
    shown: Phrase | None = None  # how to show an input that is not a number (a fire, points)
    item: str | None = None  # the name of the list item it belongs to (a layer's name)

    def value(self) -> Value:
        """Return the input as a :class:`Value`, printed as written where it can be."""
        as_written = self.written if self.written_unit is not None and (
            self.display_unit in (None, self.written_unit)) else None
        return Value(self.si, self.si_unit, self.display_unit or self.written_unit or None,
                     self.temperature, as_written, given=True)


@dataclass
class ResolvedRef:
    """What a ``{ref: ...}`` points at: a result's SI value (or a series' object), its unit,
    and the unit the result is shown in."""

    target: str
    value: Any
    si_unit: str
    temperature: str | None
    display_unit: str | None = None
    obj: Any = None


@dataclass
class Series:
    """A curve of results, e.g. temperature over time; ``obj`` is handed on to ``ref`` users."""

    name: str
    x: list
    y: list
    x_unit: str = "s"
    y_unit: str = "K"
    x_label: str = "time"
    label: str = ""
    obj: Any = None


@dataclass
class InputContext:
    """What input conversion needs: libraries, reference resolution and the error list."""

    materials: dict
    named: dict
    resolve_ref: Callable[[Node, str], ResolvedRef]
    errors: list = field(default_factory=list)
    records: list = field(default_factory=list)
    sheet_id: str = ""
    block_id: str = ""
    precision: int = 3
    section: str = "inputs"  # where the values sit in the block, for messages
    unit_system: str = "SI"  # display only

    def error(self, node_or_loc, path: str, what: str, expected=None, got=None, hint=None):
        loc = node_or_loc.loc if isinstance(node_or_loc, Node) else node_or_loc
        self.errors.append(InputError(loc, self.where(path), what, expected, got, hint))

    def where(self, path: str) -> str:
        base = f"{self.sheet_id}.{self.block_id}"
        if not path:
            return base
        return f"{base}.{self.section}.{path}" if self.section else f"{base}.{path}"


class InvalidInput(CalcdocError, ValueError):
    """Raised inside conversion after the error was recorded; the value is unusable."""


_Invalid = InvalidInput  # the name the field classes below use


# ----------------------------------------------------------------------------- fields


@dataclass(frozen=True)
class Field:
    """One declared input. Subclasses convert a YAML node into an SI value."""

    name: str
    meaning: str = ""
    default: Any = REQUIRED
    source: str = ""  # where the default comes from (standard and clause)

    @property
    def required(self) -> bool:
        return self.default is REQUIRED

    def type_text(self) -> str:
        return "value"

    def range_text(self) -> str:
        return ""

    def default_text(self) -> str:
        if self.default is REQUIRED:
            return "required"
        if self.default is None or self.default == "":
            return "optional"
        return str(self.default)

    def describe(self) -> dict:
        return {"name": self.name, "type": self.type_text(), "default": self.default_text(),
                "range": self.range_text(), "source": self.source, "meaning": self.meaning}

    def missing(self, ctx: InputContext, parent: Node, path: str):
        """Return the value for an absent input: its default, or record an error."""
        if self.default is REQUIRED:
            ctx.error(parent, path, f"missing input '{self.name}'",
                      f"{self.type_text()} ({self.meaning})" if self.meaning else self.type_text(),
                      "nothing")
            raise _Invalid
        if self.default is None:
            return None
        return self.from_default(ctx, parent, path)

    def from_default(self, ctx: InputContext, parent: Node, path: str):
        return self.default

    def convert(self, node: Node, ctx: InputContext, path: str):
        raise NotImplementedError

    def json_schema(self) -> dict:
        """Return a JSON Schema for the value as written (the validator stays the authority)."""
        return {"description": self.meaning}


_VALUE_KEYS = ("value", "source", "assumption")


def value_mapping(node: Node, ctx: "InputContext", path: str, name: str) -> tuple:
    """Return (value node, source text, origin) of a value written as itself or as
    ``{value, source}`` or ``{value, assumption}``: an assumption is the engineer's own, stated
    as such in the package (origin 'assumption'); a value with neither has origin 'given' and
    no source, which ``build --final`` refuses."""
    if not node.is_map:
        return node, "", "given"
    for key in sorted(set(node.value) - set(_VALUE_KEYS)):
        ctx.error(node.key_locs[key], path, f"unknown key '{key}'",
                  "value, source, assumption, ref or named", repr(key),
                  did_you_mean(key, list(_VALUE_KEYS) + ["ref", "named"]))
    if "value" not in node.value:
        ctx.error(node, path, f"'{name}' has no value", "{value: QUANTITY, source: TEXT}",
                  repr(plain(node)))
        raise _Invalid
    if "source" in node.value and "assumption" in node.value:
        ctx.error(node.key_locs["assumption"], path, "both a source and an assumption",
                  "a source (where the value comes from) or an assumption (the engineer's "
                  "own), not both", "both")
        raise _Invalid
    words = node.value.get("source") or node.value.get("assumption")
    text = "" if words is None or words.value is None else str(plain(words))
    return node.value["value"], text, "assumption" if "assumption" in node.value else "given"


def _is_mapping_with(node: Node, key: str) -> bool:
    return node.is_map and key in node.value


@dataclass(frozen=True)
class Quantity(Field):
    """A physical quantity held in ``unit`` (coherent SI), range-checked.

    ``temperature`` is ABSOLUTE or DIFFERENCE for temperatures; ``percent`` requires '%'.
    Accepts a quantity text, a bare number (dimensionless only), ``{value, source}``,
    ``{ref: ...}`` and ``{named: ...}``.
    """

    unit: str = "1"
    temperature: str | None = None
    percent: bool = False
    greater_than: float | None = None
    at_least: float | None = None
    less_than: float | None = None
    at_most: float | None = None
    display: str | None = None  # unit to show it in (default: the unit as written)

    def type_text(self) -> str:
        if self.temperature == ABSOLUTE:
            return "absolute temperature [K, degC, degF]"
        if self.temperature == DIFFERENCE:
            return "temperature difference [K, delta_degC, delta_degF]"
        if self.percent:
            return "fraction [%]"
        return dimension_text(self.unit)

    def range_text(self) -> str:
        parts = []
        shown = self.display or self.unit
        def fmt(v):
            unit = "%" if self.percent else shown
            text = f"{convert(v, self.unit, unit):g}"
            return f"{text} {pretty_unit(unit)}".rstrip()
        if self.greater_than is not None:
            parts.append(f"> {fmt(self.greater_than)}")
        if self.at_least is not None:
            parts.append(f">= {fmt(self.at_least)}")
        if self.less_than is not None:
            parts.append(f"< {fmt(self.less_than)}")
        if self.at_most is not None:
            parts.append(f"<= {fmt(self.at_most)}")
        return ", ".join(parts)

    def _display_unit(self, written_unit: str, system: str = "SI") -> str:
        if system == "US":
            return display_unit_for(self.unit, self.display or written_unit, self.temperature,
                                    "US")
        if self.display:
            return self.display
        if written_unit:
            return written_unit
        return self.unit

    def _check_range(self, value: float, ctx, node, path, written):
        bad = None
        if isinstance(value, float) and math.isnan(value):
            bad = "a number"
        elif self.greater_than is not None and not value > self.greater_than:
            bad = f"> {format_quantity(self.greater_than, self.unit, self.display, 6)}"
        elif self.at_least is not None and not value >= self.at_least:
            bad = f">= {format_quantity(self.at_least, self.unit, self.display, 6)}"
        elif self.less_than is not None and not value < self.less_than:
            bad = f"< {format_quantity(self.less_than, self.unit, self.display, 6)}"
        elif self.at_most is not None and not value <= self.at_most:
            bad = f"<= {format_quantity(self.at_most, self.unit, self.display, 6)}"
        if bad:
            ctx.error(node, path, f"'{self.name}' out of range", f"{self.name} {bad}", written)
            raise _Invalid

    def parse_text(self, text, ctx: InputContext, node: Node, path: str) -> tuple[float, str]:
        if isinstance(text, bool) or not isinstance(text, (str, int, float)):
            ctx.error(node, path, f"'{self.name}' is not a quantity",
                      f"{self.type_text()}, e.g. '{self.example()}'", repr(text))
            raise _Invalid
        if isinstance(text, (int, float)) and self.unit != "1":
            ctx.error(node, path, "a number without a unit",
                      f"{self.type_text()}, e.g. '{self.example()}'", repr(text))
            raise _Invalid
        try:
            return parse_quantity_text(str(text), self.unit, self.temperature, self.percent)
        except UnitProblem as problem:
            ctx.error(node, path, problem.what, problem.expected, problem.got, problem.hint)
            raise _Invalid from None

    def json_schema(self) -> dict:
        written = [{"type": "string", "description": f"a quantity, e.g. '{self.example()}'"}]
        if self.unit == "1" and not self.percent:
            written.append({"type": "number"})
        return {"description": f"{self.meaning} ({self.type_text()})", "anyOf": written + [
            {"type": "object", "required": ["value"], "additionalProperties": False,
             "properties": {"value": {"anyOf": written}, "source": {"type": "string"}}},
            _REF_SCHEMA, _NAMED_SCHEMA]}

    def describe(self) -> dict:
        d = super().describe()
        d.update({"si_unit": self.unit, "temperature": self.temperature or "",
                  "percent": self.percent})
        return d

    def example(self) -> str:
        if self.temperature == ABSOLUTE:
            return "20 degC"
        if self.temperature == DIFFERENCE:
            return "140 K"
        if self.percent:
            return "1.5 %"
        return f"1 {self.unit}" if self.unit != "1" else "0.9"

    def from_default(self, ctx, parent, path):
        value, written_unit = parse_quantity_text(str(self.default), self.unit, self.temperature,
                                                  self.percent)
        self._record(ctx, path, str(self.default), value, written_unit, self.source, "default",
                     loc=parent.loc)
        return value

    def _record(self, ctx, path, written, value, written_unit, source, origin, ref=None, loc=None):
        # An input is shown as the engineer wrote it (never rounded to the project precision),
        # unless it must be converted for display (US units, or a fixed display unit).
        shown = self._display_unit(written_unit, ctx.unit_system)
        ctx.records.append(InputRecord(
            path=path, meaning=self.meaning, written=written, si=value, si_unit=self.unit,
            display_unit=shown or None, source=source, origin=origin, ref=ref, loc=loc,
            temperature=self.temperature, written_unit=written_unit))

    def convert(self, node: Node, ctx: InputContext, path: str):
        source = ""
        origin = "given"
        if _is_mapping_with(node, "ref"):
            return self._from_ref(node, ctx, path)
        if _is_mapping_with(node, "named"):
            return self._from_named(node, ctx, path)
        value_node, source, origin = value_mapping(node, ctx, path, self.name)
        if not value_node.is_scalar:
            ctx.error(value_node, path, f"'{self.name}' is not a quantity",
                      f"{self.type_text()}, e.g. '{self.example()}'", repr(plain(value_node)))
            raise _Invalid
        value, written_unit = self.parse_text(value_node.value, ctx, value_node, path)
        self._check_range(value, ctx, value_node, path, repr(value_node.value))
        self._record(ctx, path, str(value_node.value), value, written_unit, source, origin,
                     loc=value_node.loc)
        return value

    def _from_ref(self, node, ctx, path):
        target = ctx.resolve_ref(node.value["ref"], path)  # raises InputError when unknown
        if target.obj is not None:
            ctx.error(node, path, f"'{self.name}' refers to a series",
                      f"a single result of {self.type_text()}", target.target)
            raise _Invalid
        if isinstance(target.value, list):
            ctx.error(node, path, f"'{self.name}' refers to a list result",
                      f"a single result of {self.type_text()}", target.target)
            raise _Invalid
        if not same_dimension(target.si_unit, self.unit) or (
                self.temperature and target.temperature and self.temperature != target.temperature):
            got = dimension_text(target.si_unit)
            if target.temperature:
                got = f"{target.temperature} temperature"
            ctx.error(node, path, "reference of the wrong dimension", self.type_text(),
                      f"{got} from {target.target}")
            raise _Invalid
        value = convert(target.value, target.si_unit, self.unit)
        self._check_range(value, ctx, node, path, f"{value:g} {self.unit} from {target.target}")
        ctx.records.append(InputRecord(
            path=path, meaning=self.meaning, written=f"ref {target.target}", si=value,
            si_unit=self.unit, display_unit=target.display_unit,
            source=f"result {target.target}", origin="ref", ref=target.target, loc=node.loc,
            temperature=self.temperature))
        return value

    def _from_named(self, node, ctx, path):
        name_node = node.value["named"]
        name = str(name_node.value)
        entry = ctx.named.get(name)
        if entry is None:
            ctx.error(name_node, path, f"unknown named value '{name}'",
                      "a name from `calcdoc kinds` (named values)", repr(name),
                      did_you_mean(name, ctx.named))
            raise _Invalid
        try:
            value, written_unit = parse_quantity_text(entry["value"], self.unit, self.temperature,
                                                      self.percent)
        except UnitProblem as problem:
            ctx.error(name_node, path, f"named value '{name}' has the wrong dimension",
                      problem.expected, problem.got)
            raise _Invalid from None
        self._check_range(value, ctx, node, path, entry["value"])
        ctx.records.append(InputRecord(
            path=path, meaning=self.meaning, written=entry["value"], si=value, si_unit=self.unit,
            display_unit=self._display_unit(written_unit, ctx.unit_system) or None,
            source=entry.get("source", ""), origin="named", loc=node.loc,
            temperature=self.temperature, written_unit=written_unit, ref=f"named {name}"))
        return value


@dataclass(frozen=True)
class Choice(Field):
    """One word from a fixed list."""

    options: tuple[str, ...] = ()

    def type_text(self) -> str:
        return "one of " + " | ".join(self.options)

    def json_schema(self) -> dict:
        return {"description": self.meaning, "enum": list(self.options)}

    def from_default(self, ctx, parent, path):
        ctx.records.append(InputRecord(path, self.meaning, str(self.default), self.default, "",
                                       source=self.source, origin="default", loc=parent.loc))
        return self.default

    def convert(self, node, ctx, path):
        value = node.value if node.is_scalar else None
        if not isinstance(value, str) or value not in self.options:
            ctx.error(node, path, f"'{self.name}' is not one of the choices",
                      " | ".join(self.options), repr(plain(node)),
                      did_you_mean(str(value), self.options) if isinstance(value, str) else None)
            raise _Invalid
        ctx.records.append(InputRecord(path, self.meaning, value, value, "", loc=node.loc))
        return value


@dataclass(frozen=True)
class Text(Field):
    """Free text (a name or a source); not recorded as an input row."""

    def type_text(self) -> str:
        return "text"

    def json_schema(self) -> dict:
        return {"description": self.meaning, "type": ["string", "number"]}

    def convert(self, node, ctx, path):
        if not node.is_scalar or node.value is None:
            ctx.error(node, path, f"'{self.name}' is not text", "text", repr(plain(node)))
            raise _Invalid
        return str(node.value)


@dataclass(frozen=True)
class Record(Field):
    """A mapping with its own declared fields; ``exactly_one`` lists groups of exclusive keys."""

    fields: tuple[Field, ...] = ()
    exactly_one: tuple[tuple[str, ...], ...] = ()
    at_most_one: tuple[tuple[str, ...], ...] = ()

    def type_text(self) -> str:
        return "mapping of " + ", ".join(f.name for f in self.fields)

    def json_schema(self) -> dict:
        return {"description": self.meaning, **fields_schema(self.fields, self.exactly_one)}

    def describe(self) -> dict:
        d = super().describe()
        d["fields"] = _describe_fields(self.fields, self.exactly_one)
        return d

    def convert(self, node, ctx, path):
        if not node.is_map:
            ctx.error(node, path, f"'{self.name}' is not a mapping",
                      "a mapping of " + ", ".join(f.name for f in self.fields), repr(plain(node)))
            raise _Invalid
        return convert_fields(self.fields, node, ctx, path, self.exactly_one, self.at_most_one)


@dataclass(frozen=True)
class Items(Field):
    """A list of records, each with the declared ``fields``."""

    fields: tuple[Field, ...] = ()
    exactly_one: tuple[tuple[str, ...], ...] = ()
    at_most_one: tuple[tuple[str, ...], ...] = ()
    min_items: int = 0

    def type_text(self) -> str:
        return "list of {" + ", ".join(f.name for f in self.fields) + "}"

    def json_schema(self) -> dict:
        return {"description": self.meaning, "type": "array", "minItems": self.min_items,
                "items": fields_schema(self.fields, self.exactly_one)}

    def describe(self) -> dict:
        d = super().describe()
        d["fields"] = _describe_fields(self.fields, self.exactly_one)
        return d

    def from_default(self, ctx, parent, path):
        return list(self.default)

    def convert(self, node, ctx, path):
        if not node.is_list:
            ctx.error(node, path, f"'{self.name}' is not a list", self.type_text(),
                      repr(plain(node)))
            raise _Invalid
        if len(node.value) < self.min_items:
            ctx.error(node, path, f"'{self.name}' has too few items",
                      f"at least {self.min_items}", str(len(node.value)))
            raise _Invalid
        if len(node.value) > MAX_ITEMS:  # refused before thousands of items are converted
            ctx.error(node, path, f"'{self.name}' has too many items",
                      f"at most {MAX_ITEMS}", str(len(node.value)))
            raise _Invalid
        out, failed = [], False
        for i, item in enumerate(node.value):
            item_path = f"{path}[{i}]"
            if not item.is_map:
                ctx.error(item, item_path, "not a mapping", self.type_text(), repr(plain(item)))
                failed = True
                continue
            first = len(ctx.records)
            try:
                out.append(convert_fields(self.fields, item, ctx, item_path, self.exactly_one,
                                          self.at_most_one))
            except _Invalid:
                failed = True
                continue
            name = out[-1].get("name") or out[-1].get("id")
            item_source = out[-1].get("source") or ""
            for record in ctx.records[first:]:  # item tables name rows by the item's own name
                record.item = record.item or (str(name) if name else f"{self.name} {i + 1}")
                if not record.source and item_source:  # the item's source covers its fields
                    record.source = item_source
        if failed:
            raise _Invalid
        return out


@dataclass(frozen=True)
class MaterialField(Field):
    """A material from the library: ``brick_clay`` or ``{material: brick_clay}``.

    The value is the library record (a dict with at least ``name``, ``title``, ``source`` and the
    properties it has, each already in SI: ``conductivity`` W/(m·K), ``density`` kg/m³,
    ``specific_heat`` J/(kg·K), ``emissivity``, and ``law`` for temperature-dependent materials).
    """

    def type_text(self) -> str:
        return "material name from the library"

    def json_schema(self) -> dict:
        return {"description": self.meaning, "anyOf": [
            {"type": "string"},
            {"type": "object", "required": ["material"], "additionalProperties": False,
             "properties": {"material": {"type": "string"}}}]}

    def convert(self, node, ctx, path):
        name_node = node.value["material"] if _is_mapping_with(node, "material") else node
        name = name_node.value if name_node.is_scalar else None
        if not isinstance(name, str):  # a list, a mapping, a number: no name to look up
            ctx.error(name_node, path, "not a material name",
                      "a material in the library or materials.yaml", repr(plain(name_node)))
            raise _Invalid
        if name not in ctx.materials:
            ctx.error(name_node, path, f"unknown material '{name}'",
                      "a material in the library or materials.yaml", repr(plain(name_node)),
                      did_you_mean(str(name), ctx.materials) if isinstance(name, str) else None)
            raise _Invalid
        entry = ctx.materials[name]
        title = entry.get("title", name)
        if "conductivity" in entry:  # the property a reader checks first; the rest are listed
            shown = phrase(f"{title}, λ = {{lam}}",
                           lam=Value(entry["conductivity"], "W/(m*K)", given=True))
        elif entry.get("law"):
            shown = phrase(f"{title} (temperature-dependent law)")
        else:
            shown = phrase(title)
        ctx.records.append(InputRecord(path, self.meaning or "material", name, name, "",
                                       source=entry.get("source", ""), origin="material",
                                       loc=name_node.loc, shown=shown))
        return entry


@dataclass(frozen=True)
class FreeMapping(Field):
    """Names chosen by the user mapped to quantities of any dimension (the formula kind's
    ``given``). Each value converts to ``(value_si, si_unit, temperature)``; ``convert_value``
    is supplied by the kind."""

    convert_value: Callable | None = None

    def type_text(self) -> str:
        return "mapping of NAME: quantity"

    def json_schema(self) -> dict:
        return {"description": self.meaning, "type": "object",
                "additionalProperties": Quantity("value", "a quantity of any dimension",
                                                 unit="1").json_schema()}

    def convert(self, node, ctx, path):
        if not node.is_map:
            ctx.error(node, path, f"'{self.name}' is not a mapping", self.type_text(),
                      repr(plain(node)))
            raise _Invalid
        out, failed = {}, False
        for key, value in node.value.items():
            try:
                out[key] = self.convert_value(key, value, ctx, f"{path}.{key}",
                                              node.key_locs[key])
            except _Invalid:
                failed = True
        if failed:
            raise _Invalid
        return out


_REF_SCHEMA = {"type": "object", "required": ["ref"], "additionalProperties": False,
               "properties": {"ref": {"type": "string",
                                      "pattern": r"^[A-Za-z0-9_-]+(\.[A-Za-z0-9_-]+){1,2}$"}}}
_NAMED_SCHEMA = {"type": "object", "required": ["named"], "additionalProperties": False,
                 "properties": {"named": {"type": "string"}}}


def fields_schema(fields, exactly_one=()) -> dict:
    """Return the JSON Schema of a mapping with these declared fields (unknown keys refused)."""
    grouped = {name for group in exactly_one for name in group}
    schema = {"type": "object", "additionalProperties": False,
              "properties": {f.name: f.json_schema() for f in fields},
              "required": [f.name for f in fields if f.required and f.name not in grouped]}
    if exactly_one:
        schema["allOf"] = [{"oneOf": [{"required": [name]} for name in group]}
                           for group in exactly_one]
    return schema


def _describe_fields(fields, exactly_one=()) -> list[dict]:
    """Describe fields; a field in an exactly-one group says so instead of 'required'."""
    out = []
    for f in fields:
        d = f.describe()
        for group in exactly_one:
            if f.name in group and f.required:
                d["default"] = "exactly one of " + " | ".join(group)
        out.append(d)
    return out


def convert_fields(fields, node: Node, ctx: InputContext, path: str,
                   exactly_one=(), at_most_one=()) -> "Inputs":
    """Convert a mapping node against declared fields; record every error, then raise _Invalid."""
    names = [f.name for f in fields]
    failed = False
    for key in node.value:
        if key not in names:
            ctx.error(node.key_locs[key], _join(path, key), f"unknown key '{key}'",
                      "one of " + ", ".join(names), repr(key), did_you_mean(key, names))
            failed = True
    # A key written as null (`material:` with nothing after it) is absent, as it is for a
    # field of its own; counted as present it would pass the group and leave no value at all.
    given = {k for k, v in node.value.items() if v is not None and v.value is not None}
    for group in exactly_one:
        present = [k for k in group if k in given]
        if len(present) != 1:
            ctx.error(node, path, "exactly one of " + " | ".join(group) + " is needed",
                      "exactly one", ", ".join(present) if present else "none")
            failed = True
    for group in at_most_one:
        present = [k for k in group if k in given]
        if len(present) > 1:
            ctx.error(node, path, "at most one of " + " | ".join(group),
                      "at most one", ", ".join(present))
            failed = True
    out = Inputs()
    exclusive = {k for g in exactly_one + at_most_one for k in g}
    for f in fields:
        sub = node.value.get(f.name)
        try:
            if sub is None or sub.value is None and not isinstance(f, Text):
                if f.name in exclusive and f.default is REQUIRED:
                    out[f.name] = None
                else:
                    out[f.name] = f.missing(ctx, node, _join(path, f.name))
            else:
                out[f.name] = f.convert(sub, ctx, _join(path, f.name))
        except _Invalid:
            failed = True
        except InputError as err:
            ctx.errors.append(err)
            failed = True
    if failed:
        raise _Invalid
    return out


def _join(path: str, key: str) -> str:
    return f"{path}.{key}" if path else key


class Inputs(dict):
    """Converted inputs: a dict that also allows ``inp.thickness``."""

    def __getattr__(self, name):
        try:
            return self[name]
        except KeyError:
            raise AttributeError(name) from None


# ----------------------------------------------------------------------------- results


@dataclass(frozen=True)
class ResultSpec:
    """One declared result: name, coherent SI unit, meaning; ``list`` for list results;
    ``whole`` for a result that is a whole number by definition (a month 1–12, a yes/no as 1/0),
    printed as such rather than to the project's significant figures."""

    name: str
    unit: str
    meaning: str = ""
    temperature: str | None = None
    display: str | None = None
    list: bool = False
    whole: bool = False

    def display_unit(self, system: str = "SI") -> str:
        return display_unit_for(self.unit, self.display, self.temperature, system)


@dataclass
class ResultValue:
    spec: ResultSpec
    value: Any


class StepMismatch(CalcdocError, AssertionError):
    """A kind recorded a step whose expression does not give the value it recorded: a defect
    of the kind (the printed working would not re-do), never of the input."""


class BlockOutput:
    """What ``compute`` writes, all of it data: results, steps, series, notes, warnings,
    figures. Nothing here is formatted for people; the view layer does that."""

    def __init__(self, kind: "Kind", display: dict | None = None, block_key: str = "",
                 records: list | None = None):
        self.kind = kind
        self.block_key = block_key  # 'SHEET.block', for messages
        self.display_overrides = display or {}
        self.records = records if records is not None else []
        self.results: dict[str, ResultValue] = {}
        self.steps: list[Step] = []
        self.warnings: list[dict] = []
        self.notes: list[dict] = []
        self.series: dict[str, Series] = {}
        self.absent: dict[str, Phrase] = {}  # result name → why it does not exist
        self.simulated_until: float | None = None
        self.figures: list[FigureData] = []
        self._declared = {r.name: r for r in kind.results}

    # ---- results

    def declared(self, name: str) -> ResultSpec | None:
        """Return the declaration of a result (a kind's, or one the block declared), or None."""
        return self._declared.get(name)

    def declared_results(self) -> list[ResultSpec]:
        return list(self._declared.values())

    def display_unit(self, name: str) -> str | None:
        """Return the unit a result is shown in: the block's ``display:`` or the declaration's."""
        spec = self._declared.get(name)
        return self.display_overrides.get(name) or (spec.display if spec else None)

    def result(self, name: str, value, unit: str | None = None, meaning: str = "",
               temperature: str | None = None, display: str | None = None):
        """Record a result. Kinds with open results (formula) pass ``unit`` for new names."""
        spec = self._declared.get(name)
        if spec is None:
            if unit is None:
                raise KeyError(f"result '{name}' is not declared by kind {self.kind.name}")
            spec = ResultSpec(name, unit, meaning, temperature, display)
            self._declared[name] = spec
        if isinstance(value, (list, tuple)):
            value = [float(v) for v in value]
        else:
            value = float(value)
        self.results[name] = ResultValue(spec, value)

    def value_of(self, name: str) -> Value:
        """Return a recorded result as a :class:`Value`, to use as an operand of a later step."""
        r = self.results[name]
        return Value(r.value, r.spec.unit, self.display_unit(name), r.spec.temperature,
                     given=r.spec.whole)

    def not_reached(self, name: str, why: str, **values):
        """Record that a result does not exist (e.g. a time not reached) and why, in words."""
        self.absent[name] = phrase(why, **values)

    # ---- inputs

    def input(self, path: str) -> Value:
        """Return the input at ``path`` (``layers[0].thickness``) as a :class:`Value`."""
        # An index rather than a scan: a kind asks for every item of a list, and a scan per
        # item made a list of thousands (flanking elements) take minutes.
        if getattr(self, "_indexed", None) != len(self.records):
            self._index: dict = {}
            for record in self.records:
                self._index.setdefault(record.path, record)
            self._indexed = len(self.records)
        record = self._index.get(path)
        if record is None:
            raise KeyError(f"{self.block_key}: no input recorded at {path}")
        return record.value()

    # ---- steps

    def step(self, name: str, expr: str, operands: dict, value, unit: str = "1", *,
             display: str | None = None, temperature: str | None = None, label="",
             source: str = "", yields: str | None = None, symbols: dict | None = None,
             group: str | None = None, item: str | None = None) -> Value:
        """Record a step ``name = expr`` over ``operands`` (name → :class:`Value` or a plain
        dimensionless float) with its SI ``value``; return the result as a :class:`Value`.

        The expression is checked at once: it must parse in the formula language, name only
        the operands given, and give ``value`` from them (relative 1e-9), so that the printed
        working always re-does. ``yields`` also records the block result of that name."""
        from calcdoc.expressions import evaluate_float, names_in, parse_expression
        operands = {k: v if isinstance(v, Value) else Value(float(v), given=True)
                    for k, v in operands.items()}
        tree = parse_expression(expr)
        missing = [n for n in names_in(tree) if n not in operands]
        if missing:
            raise StepMismatch(f"{self.block_key}: step {name}: operands {missing} not given")
        if yields is not None:
            spec = self._declared.get(yields)
            self.result(yields, value, unit=None if spec else unit, temperature=temperature,
                        display=display)
            spec = self._declared[yields]
            unit, temperature = spec.unit, spec.temperature
            display = self.display_unit(yields) or display
        whole = yields is not None and self._declared[yields].whole
        result = Value(value if isinstance(value, (list, tuple)) else float(value), unit,
                       display, temperature, given=whole)
        if not isinstance(value, (list, tuple)):
            try:
                again = evaluate_float(tree, {k: v.si for k, v in operands.items()})
            except (ArithmeticError, ValueError):
                again = math.nan
            if not math.isclose(again, float(value), rel_tol=1e-9, abs_tol=1e-12):
                raise StepMismatch(f"{self.block_key}: step {name} = {expr} gives {again!r} "
                                   f"from its operands, not the recorded {float(value)!r}")
        self.steps.append(Step(name, result, expr, operands, None, label, source, yields,
                               dict(symbols or {}), group, item))
        return result

    def statement(self, name: str, text: str, value, unit: str = "1", *,
                  values: dict | None = None, display: str | None = None,
                  temperature: str | None = None, label="", source: str = "",
                  yields: str | None = None, symbols: dict | None = None,
                  group: str | None = None, item: str | None = None,
                  uses: dict | None = None) -> Value:
        """Record a step that is not a closed-form evaluation (an iteration, a solver's output,
        a table look-up): what was done, in words with named values, and its result.

        ``uses`` names values the solver took as they stand without the words printing them
        (a library conductivity of each region of a section): kept as the step's operands, so
        that the package lists those still to confirm; nothing evaluates them."""
        if yields is not None:
            spec = self._declared.get(yields)
            self.result(yields, value, unit=None if spec else unit, temperature=temperature,
                        display=display)
            spec = self._declared[yields]
            unit, temperature = spec.unit, spec.temperature
            display = self.display_unit(yields) or display
        whole = yields is not None and self._declared[yields].whole
        result = Value(value if isinstance(value, (list, tuple)) else float(value), unit,
                       display, temperature, given=whole)
        self.steps.append(Step(name, result, None, dict(uses or {}),
                               phrase(text, **(values or {})), label, source, yields,
                               dict(symbols or {}), group, item))
        return result

    # ---- words and figures

    def warn(self, message: str, source: str = "", **values):
        self.warnings.append({"text": phrase(message, **values), "source": source})

    def note(self, text: str, source: str = "", **values):
        """Record an assumption or a statement of method, printed with its source."""
        self.notes.append({"text": phrase(text, **values), "source": source})

    def figure(self, figure: FigureData):
        self.figures.append(figure)

    def add_series(self, name: str, x, y, x_unit: str = "s", y_unit: str = "K",
                   x_label: str = "time", label: str = "", obj=None):
        self.series[name] = Series(name, [float(v) for v in x], [float(v) for v in y], x_unit,
                                   y_unit, x_label, label, obj)


# ----------------------------------------------------------------------------- kind


@dataclass(frozen=True)
class Kind:
    """A calculation kind: declared inputs and results, compute, and optional figures."""

    name: str
    title: str
    summary: str
    inputs: tuple[Field, ...]
    results: tuple[ResultSpec, ...]
    compute: Callable[[Inputs, BlockOutput], None]
    exactly_one: tuple[tuple[str, ...], ...] = ()
    at_most_one: tuple[tuple[str, ...], ...] = ()
    caution: str = ""
    open_results: bool = False  # results named by the user (formula)
    # Physics parameter names → input paths, for locating a PhysicsRangeError: a path may hold
    # '{index}' for the element of a list the error names ("thickness": "layers[{index}]...").
    input_names: dict = field(default_factory=dict)
    inputs_at_block_level: bool = False  # inputs written beside id/kind, not under `inputs:`
    references: tuple[str, ...] = ()

    def result_spec(self, name: str) -> ResultSpec | None:
        for r in self.results:
            if r.name == name:
                return r
        return None

    def describe(self) -> dict:
        return {"name": self.name, "title": self.title, "summary": self.summary,
                "inputs": _describe_fields(self.inputs, self.exactly_one),
                "exactly_one": [list(g) for g in self.exactly_one],
                "results": [{"name": r.name, "unit": pretty_unit(r.unit), "si_unit": r.unit,
                             "meaning": r.meaning, "temperature": r.temperature or "",
                             "list": r.list} for r in self.results],
                "caution": self.caution}

