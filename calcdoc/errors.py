"""One format for every diagnostic: ``FILE:LINE:COL: error: WHERE: WHAT (expected X, got Y)``.

Bad input never ends in a traceback: every problem found while loading or evaluating is an
:class:`InputError`, collected into an :class:`InputErrors` so that one run reports all of them.
"""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["Location", "CalcdocError", "InputError", "InputErrors", "FinalRefused"]


@dataclass(frozen=True, order=True)
class Location:
    """A place in an input file; line and column count from 1."""

    file: str
    line: int = 0
    col: int = 0

    def __str__(self) -> str:
        if self.line:
            return f"{self.file}:{self.line}:{self.col}"
        return self.file


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


class FinalRefused(CalcdocError):
    """``build --final`` refused: the package is not ready to issue."""

    def __init__(self, reasons: list[str]):
        self.reasons = reasons
        super().__init__("\n".join(reasons))
