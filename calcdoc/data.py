"""The evaluated package as data: what a calculation records, before anyone formats it.

A kind's ``compute`` writes only these: numbers in coherent SI with a note of how to show them
(:class:`Value`), sentences with named places for numbers (:class:`Phrase`), calculation steps
written in the formula language over named operands (:class:`Step`), and figures as series,
bands and marks (:class:`FigureData`). Everything a reader sees — significant figures, units,
typeset formulas, drawn figures — is made from these by the view layer under ``calcdoc/render``,
so a display rule lives in one module.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

__all__ = ["ABSOLUTE", "DIFFERENCE", "Value", "library_value", "Phrase", "Step", "FigureData", "Axis", "Line",
           "Band", "Box", "Mark", "Point", "Contours", "phrase"]

ABSOLUTE = "absolute"
DIFFERENCE = "difference"


@dataclass(frozen=True)
class Value:
    """A number (or a list of numbers) in a coherent SI ``unit``, and how to show it.

    ``display`` is the unit to show it in (None: the SI unit, or °C for an absolute
    temperature); ``temperature`` says whether a temperature is absolute or a difference;
    ``written`` is the text the engineer wrote, for an input shown as written; ``given`` marks a
    number taken as it stands — an input, a library value, a table value, a constant — which is
    printed in full rather than rounded to the project's significant figures."""

    si: Any
    unit: str = "1"
    display: str | None = None
    temperature: str | None = None
    written: str | None = None
    given: bool = False
    origin: str | None = None  # the library value it is: 'materials.NAME.PROPERTY'


def library_value(material: dict, prop: str, unit: str) -> Value:
    """Return a material's property as an operand that remembers where it came from, so that
    the package can list it if it is still to be confirmed."""
    return Value(float(material[prop]), unit, given=True,
                 origin=f"materials.{material['name']}.{prop}")


@dataclass(frozen=True)
class Phrase:
    """Words with named places for numbers: ``Phrase("below the dew point ({dew})", {"dew":
    Value(...)})``. The view fills each place with the value as it prints numbers."""

    template: str
    values: dict = field(default_factory=dict)

    def __str__(self) -> str:  # for messages and logs; the report formats through the view
        return self.template


def phrase(template: str, **values) -> Phrase:
    """Return a :class:`Phrase`; a place whose value is a plain float is dimensionless."""
    return Phrase(template, {k: v if isinstance(v, Value) else Value(v) for k, v in
                             values.items()})


@dataclass
class Step:
    """One line of working as a checker writes it: ``name = expr = numbers = result``.

    ``expr`` is in the formula language (numbers, operand names, ``+ - * / **``, parentheses,
    sqrt, exp, log, log10, sin, cos, tan, abs, min, max, pi, sigma) over ``operands``. A step
    that is not a closed-form evaluation (an iteration, a solver's output, a table look-up) has
    no ``expr`` and says what was done in ``statement``; its ``operands``, if any, are values
    it took as they stand (a library value), kept for the list of values to confirm. ``yields`` names the block result the
    step gives; ``symbols`` overrides the typeset symbol of a name (LaTeX); ``group`` and
    ``item`` mark a formula applied to each item of a list (a resistance per layer), which the
    report may print as one table."""

    name: str
    result: Value
    expr: str | None = None
    operands: dict = field(default_factory=dict)
    statement: Phrase | None = None
    label: Phrase | str = ""
    source: str = ""
    yields: str | None = None
    symbols: dict = field(default_factory=dict)
    group: str | None = None
    item: str | None = None


# ----------------------------------------------------------------------------- figures


@dataclass(frozen=True)
class Axis:
    """An axis: its words, the SI unit of the numbers on it, and the unit to show them in."""

    label: str
    unit: str = "1"
    display: str | None = None
    limits: tuple | None = None  # (low, high) in SI, or None for automatic


@dataclass(frozen=True)
class Line:
    """A curve through (x, y) in the axes' SI units; ``style`` picks a line style and colour
    from the house set (0 solid, 1 dashed, ...); ``marker`` draws the points."""

    x: tuple
    y: tuple
    label: Phrase | str = ""
    style: int = 0
    marker: bool = False


@dataclass(frozen=True)
class Band:
    """A vertical band from x0 to x1 (a layer of a wall), shaded by ``shade`` (0 white, 1 grey
    hatched, 2 grey, 3 hatched the other way, 4 peach, 5 blue cross-hatched, 6 pale yellow,
    7 vertical lines, 8 dark grey hatched, 9 pale green with horizontal lines, 10 pale pink
    crossed, 11 dark grey) and named inside."""

    x0: float
    x1: float
    label: Phrase | str = ""
    shade: int = 0


@dataclass(frozen=True)
class Box:
    """A rectangle (an opening, a region of a section), shaded and named; the name is drawn
    at its centre, or at ``label_at`` (x, y in the axes' SI units) where something else sits
    at the centre. ``legend`` is what the shade means (a material), given in the legend beside
    a swatch of the shade, once for all boxes with the same words: the key of a section whose
    thin regions cannot hold their names."""

    x0: float
    y0: float
    x1: float
    y1: float
    label: str = ""
    shade: int = 0
    label_at: tuple | None = None
    legend: Phrase | str = ""


@dataclass(frozen=True)
class Mark:
    """A horizontal (``axis="y"``) or vertical (``axis="x"``) reference line with its words."""

    axis: str
    at: float
    label: Phrase | str = ""
    style: int = 1


@dataclass(frozen=True)
class Point:
    """A marked point with its words (the worst point, the coldest surface point)."""

    x: float
    y: float
    label: Phrase | str = ""


@dataclass(frozen=True)
class Contours:
    """Lines of equal value of a field on a grid (isotherms): ``values[j][i]`` at ``(x[i],
    y[j])``, in ``unit`` shown in ``display``; ``levels`` in SI, or None for automatic."""

    x: tuple
    y: tuple
    values: tuple
    unit: str = "K"
    display: str | None = None
    levels: tuple | None = None
    label: str = ""


@dataclass(frozen=True)
class FigureData:
    """A figure as data: axes, curves, bands, boxes, marks, points and contours, a caption.

    ``appendix`` sends it to the materials appendix (a material's temperature law) instead of
    the block; ``equal_aspect`` draws both axes to one scale (a plan, a section); ``size`` is
    the width and height in mm. The words of a line, band, mark or point may be a
    :class:`Phrase` (``t = {t}``): the view fills its numbers as it prints any other.
    ``legend`` is a place for the legend (``"best"``, ``"upper left"``, ...), None for none, or
    ``"outside"``: beside the plot on the right, where a section drawn to scale leaves room;
    the words of the points then go into the legend too, instead of over the drawing."""

    key: str
    caption: Phrase | str
    x: Axis
    y: Axis
    lines: tuple = ()
    bands: tuple = ()
    boxes: tuple = ()
    marks: tuple = ()
    points: tuple = ()
    contours: Contours | None = None
    legend: str | None = "best"
    equal_aspect: bool = False
    size: tuple = (160.0, 80.0)
    appendix: bool = False
