"""The costly pure pieces of a view, computed once per build and shared by the site and the PDF.

Typesetting a formula (latex2mathml, ziamath, the PDF's text layout) and drawing a figure
(matplotlib) are most of a build's rendering time, and each is a pure function of a short text
or of a figure's data. :data:`MEMO` keeps each answer under a key made of those inputs only, in
tables of JSON values, so that:

- within a build the site and the PDF ask once for the same formula or figure;
- while the view of one sheet is built (:meth:`Memo.recording`) every answer it used is noted,
  and the build cache (:mod:`calcdoc.cache`) stores those answers per sheet and hands them back
  to the next build, which then typesets and draws only what changed.

An answer comes back from a cache exactly as it was computed (JSON keeps strings and floats
exactly), so a warm build writes the same bytes as a cold one.
"""

from __future__ import annotations

import dataclasses
import functools
import hashlib
import json
from array import array as _doubles
from contextlib import contextmanager
from typing import Any, Callable

import numpy as np

__all__ = ["Memo", "MEMO", "memoised", "data_digest"]


class Memo:
    """Tables of answers (space → key → JSON value) and the answers each sheet used."""

    def __init__(self):
        self.tables: dict[str, dict[str, Any]] = {}
        self.used: dict[str, dict[str, dict[str, Any]]] = {}  # sheet → space → key → value
        self.computed: dict[str, int] = {}  # sheet → answers computed (not found) for it
        self._current: dict[str, dict[str, Any]] | None = None
        self._sheet: str | None = None

    def lookup(self, space: str, key: str, compute: Callable[[], Any]) -> Any:
        """Return the stored answer, computing it (a JSON value) the first time."""
        table = self.tables.setdefault(space, {})
        try:
            value = table[key]
        except KeyError:
            value = table[key] = compute()
            if self._sheet is not None:
                self.computed[self._sheet] = self.computed.get(self._sheet, 0) + 1
        if self._current is not None:
            self._current.setdefault(space, {})[key] = value
        return value

    @contextmanager
    def recording(self, sheet: str):
        """Note every answer used while the view of ``sheet`` is built."""
        outer = self._current, self._sheet
        self._current, self._sheet = self.used.setdefault(sheet, {}), sheet
        try:
            yield
        finally:
            self._current, self._sheet = outer

    def seed(self, answers: dict[str, dict[str, Any]]) -> None:
        """Add answers from a cache (answers already present are kept: they are the same)."""
        for space, entries in answers.items():
            table = self.tables.setdefault(space, {})
            for key, value in entries.items():
                table.setdefault(key, value)

    def clear(self) -> None:
        self.tables.clear()
        self.used.clear()
        self.computed.clear()


MEMO = Memo()
"""The process's memo: :func:`calcdoc.build.build` clears it at the start of each build."""


def memoised(space: str, encode: Callable = lambda v: v, decode: Callable = lambda v: v):
    """Decorate a pure function of strings and numbers: its answers are kept in ``MEMO`` under
    ``space`` (``encode`` makes an answer a JSON value, ``decode`` gives it back)."""
    def wrap(fn):
        @functools.wraps(fn)
        def inner(*args):
            # strings and numbers: repr tells them apart (a Markup as the text it is)
            key = repr(tuple(str(a) if isinstance(a, str) else a for a in args))
            return decode(MEMO.lookup(space, key, lambda: encode(fn(*args))))
        inner.uncached = fn
        return inner
    return wrap


_FIELD_NAMES: dict[type, tuple | bool] = {}  # a data class's field names (False: not one)


def _canonical(obj: Any) -> Any:
    """A JSON form of figure data that two equal data give alike (floats exactly, arrays by
    their bytes); TypeError for anything else, which is then drawn without a cache."""
    kind = type(obj)  # the common plain types first: a figure holds thousands of them
    if kind is float:
        return ["f", obj.hex()]
    if kind is str or obj is None or kind is bool:
        return obj
    if kind is int:
        return ["i", obj]
    if kind is list or kind is tuple:
        if len(obj) > 8 and all(type(v) is float for v in obj):  # a curve: its bytes
            packed = _doubles("d", obj).tobytes()
            return [kind.__name__ + "-f", hashlib.sha256(packed).hexdigest()]
        return [kind.__name__, [_canonical(v) for v in obj]]
    names = _FIELD_NAMES.get(kind)
    if names is None:
        names = _FIELD_NAMES[kind] = tuple(f.name for f in dataclasses.fields(obj)) if (
            dataclasses.is_dataclass(obj) and not isinstance(obj, type)) else False
    if names:
        return [kind.__name__, {name: _canonical(getattr(obj, name)) for name in names}]
    if isinstance(obj, np.ndarray):
        array = np.ascontiguousarray(obj)
        if array.dtype == object:
            return ["nd-object", [_canonical(v) for v in array.tolist()]]
        return ["nd", array.dtype.str, list(array.shape),
                hashlib.sha256(array.tobytes()).hexdigest()]
    if isinstance(obj, (bool, np.bool_)):
        return bool(obj)
    if isinstance(obj, (int, np.integer)):
        return ["i", int(obj)]
    if isinstance(obj, (float, np.floating)):
        return ["f", float(obj).hex()]
    if obj is None or isinstance(obj, str):
        return obj
    if isinstance(obj, (list, tuple)):
        return [type(obj).__name__, [_canonical(v) for v in obj]]
    if isinstance(obj, dict):
        return ["dict", [[_canonical(k), _canonical(v)] for k, v in obj.items()]]
    raise TypeError(f"no canonical form for {type(obj).__name__}")


def data_digest(*parts: Any) -> str | None:
    """Return the SHA-256 of the parts' canonical form, or None when one has none."""
    try:
        text = json.dumps(_canonical(list(parts)), separators=(",", ":"), ensure_ascii=False)
    except TypeError:
        return None
    return hashlib.sha256(text.encode("utf-8")).hexdigest()
