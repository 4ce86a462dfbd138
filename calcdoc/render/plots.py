"""Matplotlib figures as deterministic SVG text, in one plain house style.

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

import matplotlib
import numpy as np

matplotlib.use("svg")
from matplotlib.backends.backend_svg import FigureCanvasSVG  # noqa: E402
from matplotlib.figure import Figure  # noqa: E402

__all__ = ["figure", "svg_of", "LINE_STYLES", "COLOURS", "HATCHES", "mark_vertical",
           "mark_horizontal", "thin", "PLOT_POINTS"]

LINE_STYLES = ("-", "--", "-.", ":", (0, (5, 1, 1, 1, 1, 1)), (0, (1, 1)))
COLOURS = ("#1f3b73", "#b03a2e", "#2e7d32", "#6a1b9a", "#ef6c00", "#455a64")
# Single-line hatches: distinct in black and white, a few SVG lines each (dots and double
# densities draw hundreds of tiny paths per pattern tile)
HATCHES = ("/", "\\", "|", "-", "x", "+")

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


@contextmanager
def figure(key: str, width_mm: float = 160, height_mm: float = 80):
    """Yield a (fig, ax) pair drawn in the house style; ``key`` salts the SVG ids."""
    with matplotlib.rc_context({**_STYLE, "svg.hashsalt": key}):
        fig = Figure(figsize=(width_mm / 25.4, height_mm / 25.4))
        FigureCanvasSVG(fig)  # the layout measures text as the SVG output will
        ax = fig.subplots()
        yield fig, ax


def svg_of(fig) -> str:
    """Return the figure as SVG text with no date in its metadata."""
    buffer = io.StringIO()
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
