"""What a block's ``compute`` wrote, to JSON and back, for the build cache (:mod:`calcdoc.cache`).

A :class:`~calcdoc.kinds.base.BlockOutput` is data only (results, steps, statements, notes,
warnings, series and figures, :mod:`calcdoc.data`), so it can be kept as JSON and given back
exactly: floats by their shortest repr (which reads back to the same bits), a long list of
floats (a curve, a field) and a NumPy array by their bytes in base64 (little-endian), tuples,
dicts and NumPy numbers tagged as what they were, each dataclass by its name from a closed
list. Anything else (a series carrying a solver's object, a fire curve handed on to the blocks
that refer to it) cannot be kept: :func:`encode_output` returns None and the block is simply
computed on every build. Nothing is unpickled; a name outside the list is refused on reading.
"""

from __future__ import annotations

import base64
import binascii
import dataclasses
import math
import sys
from array import array

import numpy as np
from markupsafe import Markup

from calcdoc.data import (Axis, Band, Box, Contours, FigureData, Line, Mark, Phrase, Point, Step,
                          Value)
from calcdoc.errors import Location
from calcdoc.kinds.base import BlockOutput, ResultSpec, ResultValue, Series
from calcdoc.references import Cite
from calcdoc.render.printed import Printed, PrintedStep

__all__ = ["encode_output", "restore_output", "encode_printed", "restore_printed",
           "encode_view", "restore_view", "Unstorable"]

FORMAT = 2
_CLASSES = {cls.__name__: cls for cls in (Value, Phrase, Step, Axis, Line, Band, Box, Mark, Point,
                                          Contours, FigureData, Series, ResultSpec, ResultValue,
                                          Cite, Printed, PrintedStep)}
_FIELDS = {name: frozenset(f.name for f in dataclasses.fields(cls))
           for name, cls in _CLASSES.items()}
_NUMERIC = "biuf"  # NumPy dtype kinds kept: bool, signed, unsigned, float
# A list of more floats than this is kept as its bytes: a thousand-point curve reads back in
# microseconds instead of a thousand numbers parsed (a 2-D field is hundreds of thousands)
_PACKED = 16


class Unstorable(ValueError):
    """A value outside what :func:`encode_output` keeps, or a stored form it does not read."""


def _encode(obj):
    kind = type(obj)
    if kind is float:
        # json writes NaN and ±inf as bare words it reads back; tag them all the same way
        return obj if math.isfinite(obj) else {"$": "float", "v": repr(obj)}
    if obj is None or kind in (str, int, bool):
        return obj
    if kind is list or kind is tuple:
        if not all(type(v) is float for v in obj):
            items = [_encode(v) for v in obj]
        elif len(obj) > _PACKED:  # a curve or a field (NaN outside a section): its bytes
            items = {"$": "f8", "v": _pack(array("d", obj))}
        elif _finite(obj):
            items = list(obj)
        else:  # NaN or ±inf among a few numbers: the words in their places
            items = {"$": "floats", "v": [v if math.isfinite(v) else repr(v) for v in obj]}
        return items if kind is list else {"$": "tuple", "v": items}
    if kind is dict:
        return {"$": "dict", "v": [[_encode(k), _encode(v)] for k, v in obj.items()]}
    name = kind.__name__
    if _CLASSES.get(name) is kind:
        fields = {f.name: _encode(getattr(obj, f.name)) for f in dataclasses.fields(obj)}
        if kind is Series and obj.obj is not None:
            raise Unstorable(f"series {obj.name} carries a {type(obj.obj).__name__}")
        return {"$": name, "f": fields}
    if isinstance(obj, np.generic) and obj.dtype.kind in _NUMERIC:
        return {"$": "np", "dtype": obj.dtype.str, "v": _encode(obj.item())}
    if isinstance(obj, np.ndarray) and obj.dtype.kind in _NUMERIC:
        dtype = obj.dtype.newbyteorder("<") if obj.dtype.itemsize > 1 else obj.dtype
        data = np.ascontiguousarray(obj, dtype=dtype).tobytes()
        return {"$": "nd", "dtype": dtype.str, "shape": list(obj.shape),
                "b": base64.b64encode(data).decode("ascii")}
    raise Unstorable(f"no stored form for {kind.__name__}")


_LEAVES = frozenset((str, int, float, bool, type(None)))  # as JSON gives them, kept as they are


def _decode(obj):
    if type(obj) in _LEAVES:
        return obj
    if type(obj) is list:
        if all(type(v) is float for v in obj):  # a curve; json gives floats only for floats
            return obj
        return [v if type(v) in _LEAVES else _decode(v) for v in obj]
    if type(obj) is not dict:
        raise Unstorable(f"unexpected {type(obj).__name__}")
    tag = obj.get("$")
    if tag == "float":
        value = obj["v"]
        if value not in ("nan", "inf", "-inf"):
            raise Unstorable(f"unexpected float {value!r}")
        return float(value)
    if tag == "f8":
        return _unpack(obj["v"]).tolist()
    if tag == "floats":
        values = _list(obj["v"])
        if not all(type(v) is float or v in ("nan", "inf", "-inf") for v in values):
            raise Unstorable("a list of floats expected")
        return [float(v) if type(v) is str else v for v in values]
    if tag == "tuple":
        items = _decode(obj["v"])
        if type(items) is not list:
            raise Unstorable("a tuple's items expected")
        return tuple(items)
    if tag == "dict":
        return {_decode(k): _decode(v) for k, v in (_pair(p) for p in _list(obj["v"]))}
    if tag == "np":
        dtype = _dtype(obj["dtype"])
        return dtype.type(_decode(obj["v"]))
    if tag == "nd":
        dtype = _dtype(obj["dtype"])
        shape = _list(obj["shape"])
        if not all(type(n) is int and n >= 0 for n in shape):
            raise Unstorable("an array's shape expected")
        data = _bytes(obj["b"])
        if len(data) != math.prod(shape) * dtype.itemsize:
            raise Unstorable("an array's bytes do not fill its shape")
        if dtype.kind == "b" and data.strip(b"\x00\x01"):
            raise Unstorable("booleans other than 0 and 1")
        return np.frombuffer(data, dtype=dtype).reshape(shape).astype(dtype.newbyteorder("="))
    cls = _CLASSES.get(tag) if isinstance(tag, str) else None
    fields = obj.get("f")
    if cls is None or type(fields) is not dict:
        raise Unstorable(f"unknown stored class {tag!r}")
    if fields.keys() != _FIELDS[tag]:
        raise Unstorable(f"{tag}: fields {sorted(fields)}, not {sorted(_FIELDS[tag])}")
    return cls(**{k: v if type(v) in _LEAVES else _decode(v) for k, v in fields.items()})


def _finite(items) -> bool:
    """Whether every float of ``items`` is finite (one C-level sum, not a test per number)."""
    try:
        return math.isfinite(math.fsum(items))  # NaN or ±inf in it: each one tagged
    except (OverflowError, ValueError):  # past the largest float, or inf - inf
        return all(math.isfinite(v) for v in items)


def _pack(values: array) -> str:
    """Floats as base64 of their IEEE 754 doubles, little-endian."""
    if sys.byteorder != "little":
        values.byteswap()
    return base64.b64encode(values.tobytes()).decode("ascii")


def _unpack(text) -> array:
    data = _bytes(text)
    if len(data) % 8:
        raise Unstorable("whole doubles expected")
    values = array("d")
    values.frombytes(data)
    if sys.byteorder != "little":
        values.byteswap()
    return values


def _bytes(text) -> bytes:
    if type(text) is not str:
        raise Unstorable("base64 text expected")
    try:
        return base64.b64decode(text, validate=True)
    except (binascii.Error, ValueError):
        raise Unstorable("base64 text expected") from None


def _list(value) -> list:
    if type(value) is not list:
        raise Unstorable("a list expected")
    return value


def _pair(value) -> list:
    if type(value) is not list or len(value) != 2:
        raise Unstorable("a key and a value expected")
    return value


def _dtype(text) -> np.dtype:
    if not isinstance(text, str):
        raise Unstorable("a dtype expected")
    try:
        dtype = np.dtype(text)
    except TypeError:
        raise Unstorable(f"unknown dtype {text!r}") from None
    if dtype.kind not in _NUMERIC:
        raise Unstorable(f"dtype {text!r} is not numeric")
    return dtype


# What compute writes on a BlockOutput; the rest (kind, key, display, records) is the block's.
_WRITTEN = ("results", "steps", "warnings", "notes", "series", "absent", "simulated_until",
            "figures")


def encode_output(out: BlockOutput) -> dict | None:
    """Return what ``compute`` wrote on ``out`` as JSON data, or None when part of it cannot
    be kept (a series' object, an attribute this module does not know)."""
    known = set(_WRITTEN) | {"kind", "block_key", "display_overrides", "records", "_declared",
                             "_index", "_indexed"}
    if set(vars(out)) - known:
        return None
    try:
        data = {name: _encode(getattr(out, name)) for name in _WRITTEN}
        data["declared"] = _encode(list(out._declared.values()))
    except Unstorable:
        return None
    data["format"] = FORMAT
    return data


def restore_output(out: BlockOutput, data) -> None:
    """Write on ``out`` (fresh, nothing computed) what :func:`encode_output` kept; raise
    Unstorable when ``data`` is not of that form (``out`` is then left unchanged)."""
    if not isinstance(data, dict) or data.get("format") != FORMAT or \
            set(data) != set(_WRITTEN) | {"declared", "format"}:
        raise Unstorable("not a stored block output")
    try:
        values = {name: _decode(data[name]) for name in _WRITTEN}
        declared = _decode(data["declared"])
    except (KeyError, TypeError, ValueError, AttributeError) as exc:
        raise Unstorable(str(exc)) from None
    shapes = {"results": dict, "steps": list, "warnings": list, "notes": list, "series": dict,
              "absent": dict, "figures": list}
    for name, shape in shapes.items():
        if type(values[name]) is not shape:
            raise Unstorable(f"{name}: {type(values[name]).__name__}")
    if not isinstance(declared, list) or not all(isinstance(r, ResultSpec) for r in declared):
        raise Unstorable("declared results")
    own = {r.name: r for r in out.kind.results}
    # the kind's own declarations stay the kind's objects; a block's own (formula) are added
    out._declared = {r.name: own[r.name] if own.get(r.name) == r else r for r in declared}
    for name, result in values["results"].items():
        if isinstance(result, ResultValue) and out._declared.get(name) == result.spec:
            values["results"][name] = ResultValue(out._declared[name], result.value)
    for name in _WRITTEN:
        setattr(out, name, values[name])


def encode_printed(steps: list) -> list | None:
    """Return a block's steps as printed (:func:`calcdoc.render.printed.print_step`) as JSON
    data, or None when one cannot be kept."""
    try:
        return _encode(list(steps))
    except Unstorable:
        return None


def restore_printed(data) -> list:
    """Return the printed steps :func:`encode_printed` kept; raise Unstorable otherwise."""
    try:
        steps = _decode(data)
    except (KeyError, TypeError, ValueError, AttributeError) as exc:
        raise Unstorable(str(exc)) from None
    if type(steps) is not list or not all(type(s) is PrintedStep for s in steps):
        raise Unstorable("not a list of printed steps")
    return steps


# the data classes a view holds: a number as printed, where an input was written, a source
_VIEW_CLASSES = {cls.__name__: cls for cls in (Printed, Location, Cite)}
_VIEW_FIELDS = {name: frozenset(f.name for f in dataclasses.fields(cls))
                for name, cls in _VIEW_CLASSES.items()}


def _encode_view(value):
    kind = type(value)
    if kind is str or kind is int or kind is float or kind is bool or value is None:
        return value
    if kind is Markup:  # HTML made by calcdoc, printed as it stands
        return {"$m": str(value)}
    if kind is list:
        return [_encode_view(v) for v in value]
    if kind is tuple:
        return {"$t": [_encode_view(v) for v in value]}
    if kind is dict:
        if not all(type(k) is str and not k.startswith("$") for k in value):
            raise Unstorable("a view's mapping with keys other than names")
        return {k: _encode_view(v) for k, v in value.items()}
    if _VIEW_CLASSES.get(kind.__name__) is kind:
        return {"$c": kind.__name__, "f": {f.name: _encode_view(getattr(value, f.name))
                                           for f in dataclasses.fields(value)}}
    raise Unstorable(f"no stored form for {kind.__name__} in a view")


def _restore_view(value):
    kind = type(value)
    if kind in _LEAVES:
        return value
    if kind is list:
        return [v if type(v) in _LEAVES else _restore_view(v) for v in value]
    if kind is not dict:
        raise Unstorable(f"unexpected {kind.__name__}")
    if len(value) == 1 and "$m" in value:
        if type(value["$m"]) is not str:
            raise Unstorable("markup text expected")
        return Markup(value["$m"])
    if len(value) == 1 and "$t" in value:
        return tuple(_restore_view(v) for v in _list(value["$t"]))
    if len(value) == 2 and "$c" in value:
        name, fields = value["$c"], value.get("f")
        cls = _VIEW_CLASSES.get(name) if type(name) is str else None
        if cls is None or type(fields) is not dict or fields.keys() != _VIEW_FIELDS[name]:
            raise Unstorable(f"unknown stored class {name!r} in a view")
        return cls(**{k: _restore_view(v) for k, v in fields.items()})
    if any(k.startswith("$") for k in value):
        raise Unstorable("unknown tag in a view")
    return {k: v if type(v) in _LEAVES else _restore_view(v) for k, v in value.items()}


def encode_view(blocks: list, cited: dict) -> dict | None:
    """Return the views of a sheet's blocks (:func:`calcdoc.render.html.package_view`: names,
    numbers, text, Markup, lists, tuples) and what they cited as JSON data, or None when part
    of it cannot be kept."""
    try:
        return {"format": FORMAT, "blocks": _encode_view(blocks), "cited": _encode_view(cited)}
    except Unstorable:
        return None


def restore_view(data) -> tuple[list, dict]:
    """Return the blocks' views and citations :func:`encode_view` kept; raise Unstorable
    otherwise."""
    if not isinstance(data, dict) or set(data) != {"format", "blocks", "cited"} \
            or data["format"] != FORMAT:
        raise Unstorable("not a stored view")
    blocks, cited = _restore_view(data["blocks"]), _restore_view(data["cited"])
    if type(blocks) is not list or not all(type(b) is dict for b in blocks):
        raise Unstorable("a list of block views expected")
    if type(cited) is not dict or set(cited) != {"numbers", "uses", "project"} or not all(
            type(v) is list and all(type(p) is list and len(p) == 2 for p in v)
            for v in cited.values()):
        raise Unstorable("citations expected")
    return blocks, cited
