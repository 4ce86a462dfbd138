"""One LaTeX string per formula: MathML for the site, an SVG image for the PDF.

WeasyPrint draws no MathML, so the PDF gets each formula as an SVG picture made by ziamath (pure
Python), embedded as ``<img alt="LATEX" src="data:...">``; browsers lay MathML out natively, which
costs almost nothing to produce (latex2mathml).
"""

from __future__ import annotations

import base64
from functools import lru_cache

import latex2mathml.converter
import ziamath
from markupsafe import Markup, escape

__all__ = ["mathml", "svg_img"]


@lru_cache(maxsize=4096)
def mathml(latex: str, display: bool = False) -> Markup:
    """Return MathML markup for a LaTeX formula."""
    html = latex2mathml.converter.convert(latex, display="block" if display else "inline")
    return Markup(html)


@lru_cache(maxsize=4096)
def svg_img(latex: str, size: float = 10.5) -> Markup:
    """Return an ``<img>`` holding the formula drawn as SVG, with the LaTeX as its alt text."""
    svg = ziamath.Latex(latex, size=size).svg()
    data = base64.b64encode(svg.encode("utf-8")).decode("ascii")
    return Markup(f'<img class="math" alt="{escape(latex)}" '
                  f'src="data:image/svg+xml;base64,{data}">')
