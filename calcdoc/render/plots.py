"""Matplotlib figures as deterministic SVG text, in one plain house style.

Every figure is drawn with the Agg-free SVG backend, with fixed metadata (no date), a per-figure
hash salt (stable ids) and real text (``svg.fonttype = none``), so that the same inputs give the
same bytes and the PDF keeps searchable labels. Black-and-white printable: lines differ by style
as well as colour.
"""

from __future__ import annotations

import io
from contextlib import contextmanager

import matplotlib

matplotlib.use("svg")
import matplotlib.pyplot as plt  # noqa: E402

__all__ = ["figure", "svg_of", "LINE_STYLES", "new_axes", "mark_vertical", "mark_horizontal"]

LINE_STYLES = ("-", "--", "-.", ":", (0, (5, 1, 1, 1, 1, 1)), (0, (1, 1)))
COLOURS = ("#1f3b73", "#b03a2e", "#2e7d32", "#6a1b9a", "#ef6c00", "#455a64")

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
}


@contextmanager
def figure(key: str, width_mm: float = 160, height_mm: float = 80):
    """Yield a (fig, ax) pair drawn in the house style; ``key`` salts the SVG ids."""
    with plt.rc_context({**_STYLE, "svg.hashsalt": key}):
        fig, ax = plt.subplots(figsize=(width_mm / 25.4, height_mm / 25.4))
        try:
            yield fig, ax
        finally:
            plt.close(fig)


def svg_of(fig) -> str:
    """Return the figure as SVG text with no date in its metadata."""
    buffer = io.StringIO()
    fig.tight_layout()
    fig.savefig(buffer, format="svg", metadata={"Date": None, "Creator": "calcdoc"})
    text = buffer.getvalue()
    start = text.find("<svg")
    return text[start:] if start > 0 else text


def new_axes(key: str, width_mm: float = 160, height_mm: float = 80):
    """Alias of :func:`figure` for readability at call sites."""
    return figure(key, width_mm, height_mm)


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
