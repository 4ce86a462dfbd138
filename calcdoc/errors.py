"""One format for every diagnostic: ``FILE:LINE:COL: error: WHERE: WHAT (expected X, got Y)``.

Bad input never ends in a traceback: every problem found while loading or evaluating is an
:class:`InputError`, collected into an :class:`InputErrors` so that one run reports all of them.
Under the first line a message echoes the offending source line with a caret at the column, as
compilers do (:func:`render`); the source text comes from the registry that the YAML loader fills
(:func:`remember_source`), so the line shown is the line that was read, not the file as it is now.

Exit statuses (one table for the whole program): 0 success, 1 a check failed (``--strict``),
``--final`` refused or verify/diff found a difference, 2 bad input or usage, 3 an internal fault.
"""

from __future__ import annotations

from dataclasses import dataclass, field

__all__ = ["Location", "CalcdocError", "InputError", "InputErrors", "FinalRefused",
           "MissingInput",
           "remember_source", "source_line", "render", "EXIT_OK", "EXIT_DIFFERENCE",
           "EXIT_BAD_INPUT", "EXIT_INTERNAL"]

EXIT_OK = 0
EXIT_DIFFERENCE = 1
EXIT_BAD_INPUT = 2
EXIT_INTERNAL = 3

# Longest stretch of a source line echoed under a message; a long line is cut around the column.
_ECHO_WIDTH = 100


@dataclass(frozen=True, order=True)
class Location:
    """A place in an input file; line and column count from 1.

    ``file`` is the path as the user can open it from where they stand (it is what messages
    print); ``name`` is the file's path inside the project, the same wherever calcdoc runs (it is
    what the package prints)."""

    file: str
    line: int = 0
    col: int = 0
    name: str = field(default="", compare=False)

    def __str__(self) -> str:
        if self.line:
            return f"{self.file}:{self.line}:{self.col}"
        return self.file

    @property
    def in_project(self) -> str:
        """Return the file's path inside the project, or the message path where there is none."""
        return self.name or self.file


class CalcdocError(Exception):
    """Root of calcdoc's own errors."""


class InputError(CalcdocError, ValueError):
    """One problem with the user's input, located in its file."""

    def __init__(self, location: Location, where: str, what: str,
                 expected: str | None = None, got: str | None = None, hint: str | None = None):
        self.location = location
        self.where = where
        self.what = what
        self.expected = expected
        self.got = got
        self.hint = hint
        super().__init__(str(self))

    def __str__(self) -> str:
        text = f"{self.location}: error: "
        if self.where:
            text += f"{self.where}: "
        text += self.what
        if self.expected is not None or self.got is not None:
            text += f" (expected {self.expected}, got {self.got})"
        if self.hint:
            text += f"; hint: {self.hint}"
        return text


class InputErrors(CalcdocError, ValueError):
    """Every input error found in one run, in file order."""

    def __init__(self, errors: list[InputError]):
        unique = {str(e): e for e in errors}
        self.errors = sorted(unique.values(), key=lambda e: (e.location, str(e)))
        super().__init__(str(self))

    def __str__(self) -> str:
        return "\n".join(str(e) for e in self.errors)


class MissingInput(CalcdocError, ValueError):
    """An input that only some choices need is absent (``view_factor`` for a general
    enclosure): a kind raises it with the input's name and what it needs."""

    def __init__(self, name: str, expected: str):
        self.name, self.expected = name, expected
        super().__init__(f"missing input '{name}' (expected {expected})")


class FinalRefused(CalcdocError):
    """``build --final`` refused: the package is not ready to issue."""

    def __init__(self, reasons: list[str]):
        self.reasons = reasons
        super().__init__("\n".join(reasons))


# ----------------------------------------------------------------------------- source echo

_SOURCES: dict[str, list[str]] = {}


def remember_source(file: str, text: str) -> None:
    """Keep the text of an input file so that messages can echo its lines."""
    _SOURCES[file] = text.splitlines()


def source_line(location: Location) -> str | None:
    """Return the source line at ``location`` as it was read, or None when unknown."""
    lines = _SOURCES.get(location.file)
    if not lines or not 1 <= location.line <= len(lines):
        return None
    return lines[location.line - 1]


def render(error: InputError) -> str:
    """Return the message with the offending line and a caret under its column.

    ``    12 |       - {name: Q, expr: "U ^ A", unit: W}``
    ``       |                           ^``
    """
    text = str(error)
    line = source_line(error.location) if error.location.line else None
    if line is None:
        return text
    line = line.replace("\t", " ")
    col = max(error.location.col, 1)
    start = 0
    if len(line) > _ECHO_WIDTH:  # a window around the column, marked where it is cut
        start = max(0, min(col - 1 - _ECHO_WIDTH // 2, len(line) - _ECHO_WIDTH))
        shown = line[start:start + _ECHO_WIDTH]
        if start > 0:
            shown = "…" + shown[1:]
        if start + _ECHO_WIDTH < len(line):
            shown = shown[:-1] + "…"
    else:
        shown = line
    gutter = f"{error.location.line:>6} | "
    caret = " " * (len(gutter) - 2) + "| " + " " * (col - 1 - start) + "^"
    return f"{text}\n{gutter}{shown}\n{caret}"
