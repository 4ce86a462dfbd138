"""Pure physics: SI floats and numpy arrays in and out; no YAML, no pint, no rendering."""

from __future__ import annotations

__all__ = ["PhysicsRangeError"]


class PhysicsRangeError(ValueError):
    """A physics function was given a value outside the range where its equation holds."""

    def __init__(self, quantity: str, value: object, expected: str):
        self.quantity = quantity
        self.value = value
        self.expected = expected
        super().__init__(quantity, value, expected)

    def __str__(self) -> str:
        return f"{self.quantity}: out of range (expected {self.expected}, got {self.value!r})"
