"""The registry of calculation kinds: every module in this package that defines ``KINDS``.

Adding a kind is adding a module here with ``KINDS = (Kind(...), ...)``; nothing else changes.
"""

from __future__ import annotations

import importlib
import pkgutil
from functools import lru_cache

from calcdoc.kinds.base import Kind

__all__ = ["registry", "get_kind"]


@lru_cache(maxsize=1)
def registry() -> dict[str, Kind]:
    """Return every kind by name, in module order."""
    kinds: dict[str, Kind] = {}
    for info in sorted(pkgutil.iter_modules(__path__), key=lambda m: m.name):
        if info.name == "base" or info.name.startswith("_"):
            continue
        module = importlib.import_module(f"{__name__}.{info.name}")
        for kind in getattr(module, "KINDS", ()):
            if kind.name in kinds:
                raise RuntimeError(f"kind {kind.name} is declared twice")
            kinds[kind.name] = kind
    return kinds


def get_kind(name: str) -> Kind | None:
    return registry().get(name)
