"""Figures drawn from the data kinds record (:class:`calcdoc.data.FigureData`), as deterministic
SVG text in one plain house style.

Every figure is drawn with the SVG backend, with fixed metadata (no date), a per-figure hash salt
(stable ids) and real text (``svg.fonttype = none``), so that the same inputs give the same bytes
and the PDF keeps searchable labels. Black-and-white printable: lines differ by style as well as
colour, and hatches are sparse single lines. Figures are plain ``matplotlib.figure.Figure``
objects, not pyplot's: no global figure registry to fill and close. Long series are thinned for
drawing only (:func:`thin`); results.json keeps the full series.
"""

from __future__ import annotations

import io
from contextlib import contextmanager
from dataclasses import dataclass

import numpy as np

__all__ = ["figure", "svg_of", "LINE_STYLES", "COLOURS", "HATCHES", "mark_vertical",
           "mark_horizontal", "thin", "PLOT_POINTS", "draw", "Drawn"]

LINE_STYLES = ("-", "--", "-.", ":", (0, (5, 1, 1, 1, 1, 1)), (0, (1, 1)))
COLOURS = ("#1f3b73", "#b03a2e", "#2e7d32", "#6a1b9a", "#ef6c00", "#455a64")
# Single-line hatches: distinct in black and white, a few SVG lines each (dots and double
# densities draw hundreds of tiny paths per pattern tile)
HATCHES = ("/", "\\", "|", "-", "x", "+")

FIGURE_HEIGHT_MM = 56.0
"""Tallest figure drawn [mm]."""

HALF_WIDTH_MM, HALF_HEIGHT_MM = 86.0, 52.0
"""A graph drawn to stand beside another: half the PDF's text width [mm]."""

FIELD_HEIGHT_MM = 100.0
"""Tallest figure of a field drawn to scale (a section with its isotherms) [mm]: it is read
closely, at the PDF's full text width."""

PLOT_POINTS = 400
"""Most points drawn for one line; a figure about 160 mm wide shows no more."""

_STYLE = {
    "svg.fonttype": "none",
    "font.family": "DejaVu Sans",
    "font.size": 8.5,
    "axes.titlesize": 9,
    "axes.labelsize": 8.5,
    "axes.grid": True,
    "grid.color": "#cccccc",
    "grid.linewidth": 0.5,
    "axes.edgecolor": "#333333",
    "axes.linewidth": 0.7,
    "lines.linewidth": 1.4,
    "legend.fontsize": 7.5,
    "legend.frameon": False,
    "xtick.labelsize": 7.5,
    "ytick.labelsize": 7.5,
    "hatch.linewidth": 0.6,
}


def drawing_library():
    """Return matplotlib, set to draw SVG: imported on the first figure drawn (half a second),
    not for a build whose figures all come from the cache, nor for ``check``."""
    import matplotlib
    matplotlib.use("svg")
    return matplotlib


@contextmanager
def figure(key: str, width_mm: float = 160, height_mm: float = 80):
    """Yield a (fig, ax) pair drawn in the house style; ``key`` salts the SVG ids."""
    matplotlib = drawing_library()
    from matplotlib.backends.backend_svg import FigureCanvasSVG
    from matplotlib.figure import Figure
    with matplotlib.rc_context({**_STYLE, "svg.hashsalt": key}):
        fig = Figure(figsize=(width_mm / 25.4, height_mm / 25.4))
        FigureCanvasSVG(fig)  # the layout measures text as the SVG output will
        ax = fig.subplots()
        yield fig, ax


def svg_of(fig, layout: bool = True) -> str:
    """Return the figure as SVG text with no date in its metadata; ``layout`` False keeps a
    layout the caller has already fixed."""
    buffer = io.StringIO()
    if layout:
        fig.tight_layout()
    # tight_layout leaves a placeholder layout engine behind, and savefig then draws the whole
    # figure once more, invisibly, before drawing it for real; the layout is already fixed
    fig.set_layout_engine(None)
    fig.savefig(buffer, format="svg", metadata={"Date": None, "Creator": "calcdoc"})
    text = buffer.getvalue()
    start = text.find("<svg")
    return text[start:] if start > 0 else text


def thin(x, y, max_points: int = PLOT_POINTS) -> tuple[np.ndarray, np.ndarray]:
    """Return at most ``max_points`` points of the line (x, y) that draw the same picture.

    The interior is cut into (max_points - 2) / 2 runs of consecutive points, and each run keeps
    its lowest and its highest point in their order; the first and last points are kept. Peaks,
    troughs and the ends are therefore drawn exactly (a gas peak, a crossing of a limit), and at
    a figure's width a run is well under a millimetre. For drawing only: results and
    results.json keep every point. Deterministic (ties keep the earlier point).
    """
    x = np.asarray(x, dtype=float)
    y = np.asarray(y, dtype=float)
    n = len(x)
    if n <= max(max_points, 4):
        return x, y
    runs = max((max_points - 2) // 2, 1)
    edges = np.linspace(1, n - 1, runs + 1).astype(int)
    keep = [0, n - 1]
    for start, stop in zip(edges[:-1], edges[1:]):
        if stop > start:
            part = y[start:stop]
            keep.append(start + int(np.argmin(part)))
            keep.append(start + int(np.argmax(part)))
    index = np.unique(np.array(keep))
    return x[index], y[index]


def mark_vertical(ax, x: float, label: str, style: str = ":"):
    """Draw a labelled vertical line (a required period, a minimum separation)."""
    ax.axvline(x, color="#000000", linestyle=style, linewidth=0.9)
    ax.annotate(label, xy=(x, 1.0), xycoords=("data", "axes fraction"), xytext=(3, -10),
                textcoords="offset points", fontsize=7.5, ha="left", va="top")


def mark_horizontal(ax, y: float, label: str, style: str = "--"):
    """Draw a labelled horizontal line (a limit, a critical temperature)."""
    ax.axhline(y, color="#000000", linestyle=style, linewidth=0.9)
    ax.annotate(label, xy=(0.0, y), xycoords=("axes fraction", "data"), xytext=(3, 3),
                textcoords="offset points", fontsize=7.5, ha="left", va="bottom")


# ----------------------------------------------------------------------------- figures from data

_SHADES = ({"facecolor": "#ffffff", "hatch": None}, {"facecolor": "#ebebeb", "hatch": "//"},
           {"facecolor": "#d9d9d9", "hatch": None}, {"facecolor": "#f2f2f2", "hatch": "\\\\"},
           {"facecolor": "#f6e0d3", "hatch": None}, {"facecolor": "#e3ecf7", "hatch": "xx"},
           # further shades for the many materials of a section, still distinct in grey
           {"facecolor": "#fff3c4", "hatch": None}, {"facecolor": "#ffffff", "hatch": "||"},
           {"facecolor": "#c8c8c8", "hatch": "\\\\"}, {"facecolor": "#e6f0dc", "hatch": "--"},
           {"facecolor": "#f4e4f0", "hatch": "++"}, {"facecolor": "#b8b8b8", "hatch": None})


@dataclass(frozen=True)
class Drawn:
    """A drawn figure: its key, caption, SVG text and whether it belongs to the appendix."""

    key: str
    caption: str
    svg: str
    appendix: bool = False
    half: bool = False  # drawn half the text width, to stand beside another


def _scale(unit: str, display: str | None):
    """Return (a, b) with shown = a + b·SI for a linear (possibly offset) unit conversion."""
    if not display or display == unit:
        return 0.0, 1.0
    from calcdoc.units import convert
    a = convert(0.0, unit, display)
    return a, convert(1.0, unit, display) - a


def _axis_text(axis) -> str:
    from calcdoc.render.numbers import pretty_unit
    shown = pretty_unit(axis.display or axis.unit) if (axis.display or axis.unit) not in (
        "1", "") else ""
    return f"{axis.label} ({shown})" if shown else axis.label


def _legend_beside(fig, ax, handles, to_scale: bool) -> None:
    """Lay out a plot with its legend beside it on the right, the two centred together: the
    plot takes the room its tick labels, axis words and the legend leave; a plot drawn to scale
    keeps its aspect and the figure loses the height it does not fill. By hand, because
    tight_layout neither makes room for a legend outside the axes nor measures the margins of a
    plot drawn to scale."""
    legend = fig.legend(handles=handles, loc="center left", borderaxespad=0.0)
    legend.set_in_layout(False)
    width, height = fig.get_size_inches()
    inches = fig.dpi_scale_trans.inverted()
    key = legend.get_window_extent().transformed(inches).width
    pad = 4.0 / 72.0  # 4 pt
    tight = ax.get_tightbbox().transformed(inches)  # applies the aspect first
    box = ax.get_window_extent().transformed(inches)  # the plot as drawn, aspect applied
    left, right = box.x0 - tight.x0 + pad, tight.x1 - box.x1
    bottom, top = box.y0 - tight.y0 + pad, tight.y1 - box.y1 + pad
    plot_w = width - left - right - 2 * pad - key
    plot_h = height - bottom - top
    if to_scale:
        (x0, x1), (y0, y1) = ax.get_xlim(), ax.get_ylim()
        ratio = abs(y1 - y0) / abs(x1 - x0)
        plot_w = min(plot_w, plot_h / ratio)
        plot_h = plot_w * ratio
        height = min(height, plot_h + bottom + top)
        fig.set_size_inches(width, height)
    shift = max(0.0, (width - (left + plot_w + right + pad + key + pad)) / 2.0)
    ax.set_position(((shift + left) / width, bottom / height, plot_w / width, plot_h / height))
    legend.set_bbox_to_anchor(((shift + left + plot_w + right + pad) / width,
                               (bottom + plot_h / 2) / height), fig.transFigure)


def draw(data, sig: int = 3, system: str = "SI") -> Drawn:
    """Return a figure drawn from its data: bands and boxes first, then contours, curves, marks
    and points with their words, axes in the display units the data asks for."""
    from matplotlib.patches import Rectangle

    from calcdoc.render.printed import fill
    drawing_library()
    ax_x, bx_x = _scale(data.x.unit, data.x.display)
    ax_y, bx_y = _scale(data.y.unit, data.y.display)

    def sx(v):
        return ax_x + bx_x * np.asarray(v, dtype=float)

    def sy(v):
        return ax_y + bx_y * np.asarray(v, dtype=float)

    def words(label) -> str:  # a label may be a Phrase with numbers in it
        return fill(label, sig, system)

    width, height = data.size
    # The package's figures are kept small, so that a block and its figures share a page: a
    # plan drawn to scale is shrunk as a whole; a graph of curves is drawn half the text width
    # (its words keep their size), to stand two to a row; a section with bands, full width.
    # half width: a graph of curves, a section of at most three layers, or a plan drawn to
    # scale that is at least half again as wide as it is high (it stays legible at 86 mm)
    half = data.contours is None and len(data.bands) <= 3 and (
        not data.equal_aspect or width >= 1.5 * height)
    if data.equal_aspect:
        tallest = FIELD_HEIGHT_MM if data.contours is not None else FIGURE_HEIGHT_MM
        scale = min(1.0, tallest / height, (HALF_WIDTH_MM / width) if half else 1.0)
        width, height = width * scale, height * scale
    elif half:
        width, height = HALF_WIDTH_MM, min(height, HALF_HEIGHT_MM)
    else:
        height = min(height, FIGURE_HEIGHT_MM)
    outside = data.legend == "outside"
    handles = []  # the legend's entries: the boxes' key, then the curves, then points
    with figure(data.key, width, height) as (fig, ax):
        for band in data.bands:
            shade = _SHADES[band.shade % len(_SHADES)]
            ax.axvspan(float(sx(band.x0)), float(sx(band.x1)), edgecolor="#777777",
                       linewidth=0.6, zorder=0, **shade)
            if band.label:
                ax.text(float(sx((band.x0 + band.x1) / 2)), 0.5, words(band.label),
                        transform=ax.get_xaxis_transform(), rotation=90, ha="center",
                        va="center", fontsize=6.5, zorder=3,
                        bbox={"facecolor": "white", "edgecolor": "none", "pad": 1.0})
        for box in data.boxes:
            shade = _SHADES[box.shade % len(_SHADES)]
            x0, x1 = float(sx(box.x0)), float(sx(box.x1))
            y0, y1 = float(sy(box.y0)), float(sy(box.y1))
            ax.add_patch(Rectangle((x0, y0), x1 - x0, y1 - y0, edgecolor="#000000",
                                   linewidth=0.7, zorder=1, **shade))
            if box.label:
                lx, ly = ((x0 + x1) / 2, (y0 + y1) / 2) if box.label_at is None else (
                    float(sx(box.label_at[0])), float(sy(box.label_at[1])))
                ax.text(lx, ly, box.label, ha="center", va="center",
                        fontsize=7, zorder=3,
                        bbox={"facecolor": "white", "edgecolor": "none", "pad": 0.8})
            key = words(box.legend)
            if key and key not in [h.get_label() for h in handles]:
                handles.append(Rectangle((0, 0), 1, 1, edgecolor="#000000", linewidth=0.7,
                                         label=key, **shade))
        if data.contours is not None:
            c = data.contours
            az, bz = _scale(c.unit, c.display)
            values = az + bz * np.asarray(c.values, dtype=float)
            levels = None if c.levels is None else az + bz * np.asarray(c.levels, dtype=float)
            # solid below zero too: a dashed isotherm would read as a different kind of line
            lines = ax.contour(sx(c.x), sy(c.y), values, levels=levels, colors="#333333",
                               linewidths=0.6, linestyles="solid", zorder=2)
            ax.clabel(lines, fmt=lambda v: f"{v:g}", fontsize=6)
        for line in data.lines:
            x, y = thin(sx(line.x), sy(line.y))
            drawn, = ax.plot(x, y, color=COLOURS[line.style % len(COLOURS)],
                             linestyle=LINE_STYLES[line.style % len(LINE_STYLES)],
                             marker="o" if line.marker else None, markersize=3, zorder=4,
                             label=words(line.label) or None)
            if line.label:
                handles.append(drawn)
        for mark in data.marks:
            style = LINE_STYLES[mark.style % len(LINE_STYLES)]
            if mark.axis == "y":
                mark_horizontal(ax, float(sy(mark.at)), words(mark.label), style)
            else:
                mark_vertical(ax, float(sx(mark.at)), words(mark.label), style)
        for point in data.points:
            px, py = float(sx(point.x)), float(sy(point.y))
            drawn, = ax.plot([px], [py], marker="X", markersize=8, color=COLOURS[1],
                             linestyle="none", zorder=5)
            if point.label and outside:  # named in the legend beside, not over the drawing
                drawn.set_label(words(point.label))
                handles.append(drawn)
            elif point.label:
                # The words sit in the free corner away from the data, with a leader line, so
                # that they cover nothing they name.
                ax.annotate(words(point.label), xy=(px, py), xytext=(0.98, 0.98),
                            textcoords="axes fraction", ha="right", va="top", fontsize=7,
                            arrowprops={"arrowstyle": "-", "color": "#555555",
                                        "linewidth": 0.6},
                            bbox={"facecolor": "white", "edgecolor": "#999999", "pad": 1.5},
                            zorder=6)
        if data.x.limits is not None:
            ax.set_xlim(*(float(v) for v in sx(data.x.limits)))
        if data.y.limits is not None:
            ax.set_ylim(*(float(v) for v in sy(data.y.limits)))
        if data.equal_aspect:
            ax.set_aspect("equal")
        ax.set_xlabel(_axis_text(data.x))
        ax.set_ylabel(_axis_text(data.y))
        if handles and outside:
            _legend_beside(fig, ax, handles, data.equal_aspect)
        elif handles and data.legend:
            ax.legend(handles=handles, loc=data.legend)
        svg = svg_of(fig, layout=not (handles and outside))
    return Drawn(data.key, fill(data.caption, sig, system), svg, data.appendix, half)
