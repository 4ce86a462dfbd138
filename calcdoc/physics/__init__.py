"""Pure physics: SI floats and numpy arrays in and out; no YAML, no pint, no rendering."""

from __future__ import annotations

from calcdoc.errors import CalcdocError

__all__ = ["PhysicsRangeError", "MAX_TIME_STEPS", "MAX_CELLS", "MAX_CELL_STEPS", "MAX_DURATION"]

# The work a time-stepping calculation may ask for. Each is far beyond a real package (four
# hours at 1 s steps is 14 400 steps; a 300 mm wall at 1 mm cells is 300 cells) and keeps one
# block's calculation, with its check at half the step and half the cell, to seconds.
MAX_TIME_STEPS = 100_000
MAX_CELLS = 5_000
MAX_CELL_STEPS = 20_000_000
MAX_DURATION = 24 * 3600.0  # s: a fire exposure longer than a day is no design fire


class PhysicsRangeError(CalcdocError, ValueError):
    """A physics function was given a value outside the range where its equation holds.

    ``quantity`` is the function's own parameter name (``thickness``, ``emissivity``);
    ``index`` says which element of a list argument it was, where it was one. The kind that
    called the function maps the name to the input in the YAML (``Kind.input_names``), and the
    evaluator locates the error there: one place, not one per kind."""

    def __init__(self, quantity: str, value: object, expected: str, index: int | None = None):
        self.quantity = quantity
        self.value = value
        self.expected = expected
        self.index = index
        super().__init__(quantity, value, expected)

    def __str__(self) -> str:
        return f"{self.quantity}: out of range (expected {self.expected}, got {self.value!r})"
