"""One LaTeX string per formula: MathML for the site, an SVG image for the PDF.

WeasyPrint draws no MathML, so the PDF gets each formula as an SVG picture made by ziamath (pure
Python), embedded as ``<img alt="LATEX" src="data:...">``; browsers lay MathML out natively, which
costs almost nothing to produce (latex2mathml).

The site and the PDF draw the same MathML: latex2mathml's output, tidied (units set close as in
``W/(m²·K)``, unary signs marked prefix, redundant rows removed), shown by the browser or laid out
by ziamath. ziamath's ``size`` is the font size in SVG user units, which WeasyPrint reads as CSS
pixels (1 px = 0.75 pt): a formula meant to read like 10 pt text is drawn at 10 / 0.75 = 13.3 px.

Long right-hand sides are broken before a top-level ``+`` or ``−`` (then before ``·``), as a
checker would write a long sum by hand; the break points are chosen from ziamath's measured widths
(a token count settles the short ones), so the site and the PDF break a formula in the same places.
"""

from __future__ import annotations

import base64
import logging
import re
import xml.etree.ElementTree as ET
from functools import lru_cache

import latex2mathml.converter
import ziamath
from markupsafe import Markup, escape

__all__ = ["mathml", "svg_img", "formula_width_pt", "split_formula", "FORMULA_PT"]

LOGGER = logging.getLogger("calcdoc.render")

# Plain paths instead of <symbol>/<use>: smaller, and nothing for WeasyPrint to resolve by id.
ziamath.config.svg2 = False

FORMULA_PT = 10.0  # formulas read like 10 pt text beside the 9 pt body of the PDF
_PX_PER_PT = 4.0 / 3.0

_SINGLE_MATHRM = re.compile(r"\\mathrm\{([A-Za-z])\}")
_PRIMES_THEN_SUP = re.compile(r"('+)\^\{")
_NS = "http://www.w3.org/1998/Math/MathML"
_UNIT_OPERATORS = {"\u00b7": "0.06em", "\u22c5": "0.06em", "/": "0"}


def _is_upright(node: ET.Element) -> bool:
    tag = node.tag.split("}")[-1]
    if tag == "mi":
        return node.get("mathvariant") == "normal" or len(node.text or "") > 1
    if tag in ("msup", "msub", "mrow") and len(node):
        return _is_upright(node[0])
    return False


def _tighten_units(root: ET.Element) -> None:
    """Set a unit's '·' and '/' close, as units are printed (W/(m²·K)), not as operators."""
    for mo in root.iter(f"{{{_NS}}}mo"):
        if (mo.text or "") == "/":  # a solidus is an ordinary symbol in TeX: no space around it
            mo.set("lspace", "0")
            mo.set("rspace", "0")
    for row in root.iter(f"{{{_NS}}}mrow"):
        children = list(row)
        upright = [c for c in children if _is_upright(c)]
        operators = [c for c in children if c.tag == f"{{{_NS}}}mo"]
        if not upright or not operators:
            continue
        if all(_is_upright(c) or (c.tag == f"{{{_NS}}}mo" and (c.text or "") in "()/\u00b7\u22c5")
               for c in children):
            for mo in operators:
                space = _UNIT_OPERATORS.get(mo.text or "")
                if space is not None:
                    mo.set("lspace", space)
                    mo.set("rspace", space)


_ROW_LIKE = {f"{{{_NS}}}{t}" for t in ("mrow", "mstyle", "math", "msqrt")}


def _flatten(node: ET.Element) -> None:
    """Remove redundant <mrow> nesting, in place.

    ziamath lays every <mrow> out twice (once to find the height stretchy operators must reach),
    so each level of nesting doubles the cost; latex2mathml nests a row for every TeX group.
    A row with one child is that child; a row inside a row is spliced in, unless it begins or
    ends with an operator (its form, prefix or postfix, and a fence's stretch depend on the row).
    """
    for child in list(node):
        _flatten(child)
    mrow = f"{{{_NS}}}mrow"
    mo = f"{{{_NS}}}mo"
    changed = True
    while changed:
        changed = False
        for i, child in enumerate(list(node)):
            if child.tag != mrow or child.attrib:
                continue
            kids = list(child)
            if len(kids) == 1 and kids[0].tag != mo:
                node.remove(child)
                node.insert(i, kids[0])
                changed = True
                break
            if (node.tag in _ROW_LIKE and len(kids) > 1 and kids[0].tag != mo
                    and kids[-1].tag != mo):
                node.remove(child)
                for k, kid in enumerate(kids):
                    node.insert(i + k, kid)
                changed = True
                break


_SIGNS = {"\u2212", "-", "+", "\u00b1"}
_CLOSING = {")", "]", "|", "\u2016", "}"}


def _mark_prefix_signs(root: ET.Element) -> None:
    """Mark a sign that starts a row or follows an operator as prefix (−4, (−4 °C), = −3.85).

    latex2mathml leaves the form to be inferred, which browsers do by position only and ziamath
    not at all, so a unary minus after '(' or '=' would be spaced like a subtraction."""
    mo = f"{{{_NS}}}mo"
    for row in root.iter():
        if row.tag.split("}")[-1] not in ("mrow", "mstyle", "math", "msqrt"):
            continue
        previous = None
        for child in row:
            if (child.tag == mo and (child.text or "") in _SIGNS and "form" not in child.attrib
                    and (previous is None or (previous.tag == mo
                                              and (previous.text or "") not in _CLOSING))):
                child.set("form", "prefix")
            previous = child


@lru_cache(maxsize=8192)
def _mathml_text(latex: str) -> str:
    """Return the MathML (display style, inline) that both the site and the PDF draw."""
    # latex2mathml drops mathvariant for a one-letter \mathrm{K}, which then shows as an italic
    # symbol K; an extra group keeps the unit upright.
    fixed = _SINGLE_MATHRM.sub(r"\\mathrm{{\1}}", latex)
    fixed = re.sub(r"(?<!\\)&", r"\\&", fixed)  # latex2mathml passes a bare & through as is
    # TeX joins primes and a superscript (R''^{*}); latex2mathml calls it a double superscript
    fixed = _PRIMES_THEN_SUP.sub(lambda m: "^{" + r"\prime" * len(m.group(1)) + " ", fixed)
    try:
        text = latex2mathml.converter.convert(r"\displaystyle " + fixed, display="inline")
        root = ET.fromstring(text)
    except Exception as exc:  # noqa: BLE001 - any converter failure: show the source, never crash
        LOGGER.warning("formula shown as LaTeX source (%s: %s): %s", type(exc).__name__, exc,
                       latex)
        root = ET.Element(f"{{{_NS}}}math", {"display": "inline"})
        ET.SubElement(root, f"{{{_NS}}}mtext").text = latex
    _tighten_units(root)
    _flatten(root)
    _mark_prefix_signs(root)
    root.set("alttext", latex)
    return _serialise(root, top=True)


def _serialise(node: ET.Element, top: bool = False) -> str:
    """Return MathML text with unprefixed tags.

    Not ET.tostring: its namespace prefixes come from a registry global to the process, which
    other libraries rewrite (WeasyPrint registers its own), turning <math> into <ns0:math>."""
    tag = node.tag.split("}")[-1]
    attrs = "".join(f' {k}="{escape(v)}"' for k, v in node.attrib.items())
    if top:
        attrs = f' xmlns="{_NS}"' + attrs
    inner = (str(escape(node.text)) if node.text else "") + "".join(
        _serialise(child) + (str(escape(child.tail)) if child.tail else "") for child in node)
    if not inner and not len(node):
        return f"<{tag}{attrs} />"
    return f"<{tag}{attrs}>{inner}</{tag}>"


def mathml(latex: str) -> Markup:
    """Return inline MathML for a LaTeX formula in display style, with the LaTeX as ``alttext``.

    Display style (full-size fractions) as in the PDF's images, but inline, so that a formula
    sits on the baseline of its table cell instead of being centred as a block."""
    if not latex.strip():
        return Markup("")
    return Markup(_mathml_text(latex))


@lru_cache(maxsize=8192)
def _svg(latex: str, size_pt: float) -> tuple[str, float, float, float]:
    """Return (svg, width_pt, height_pt, depth_pt) of the formula; depth is below the baseline."""
    svg = ziamath.Math(_mathml_text(latex), size=size_pt * _PX_PER_PT).svg()
    box = re.search(r'viewBox="([-\d.]+) ([-\d.]+) ([-\d.]+) ([-\d.]+)"', svg)
    _, y0, w, h = (float(v) for v in box.groups())
    depth_px = h + y0  # the baseline is y = 0 of the viewBox
    return svg, w / _PX_PER_PT, h / _PX_PER_PT, depth_px / _PX_PER_PT


def formula_width_pt(latex: str, size_pt: float = FORMULA_PT) -> float:
    """Return the width of the drawn formula [pt]."""
    return _svg(latex, size_pt)[1]


@lru_cache(maxsize=8192)
def svg_img(latex: str, size_pt: float = FORMULA_PT) -> Markup:
    """Return an ``<img>`` holding the formula drawn as SVG, with the LaTeX as its alt text.

    The image is sized in pt (its height follows from the SVG's aspect ratio) and lowered by its
    depth, so that its baseline sits on the line's baseline like text."""
    if not latex.strip():
        return Markup("")
    svg, width, _, depth = _svg(latex, size_pt)
    data = base64.b64encode(svg.encode("utf-8")).decode("ascii")
    return Markup(f'<img class="math" alt="{escape(latex)}" '
                  f'style="width:{width:.2f}pt;vertical-align:{-depth:.2f}pt" '
                  f'src="data:image/svg+xml;base64,{data}">')


def _fits(latex: str, width_pt: float, size_pt: float) -> bool:
    # Laying a formula out costs ziamath ~15 ms; the token count settles most formulas for free.
    return (_estimate_width_pt(latex, size_pt) <= width_pt
            or formula_width_pt(latex, size_pt) <= width_pt)


def _top_level_breaks(latex: str, operators: tuple[str, ...]) -> list[int]:
    """Return the positions of binary ``operators`` outside every group and ``\\left…\\right``."""
    breaks, depth, i, previous = [], 0, 0, ""
    n = len(latex)
    while i < n:
        ch = latex[i]
        if latex.startswith(r"\left", i) and not latex[i + 5:i + 6].isalpha():
            depth += 1
            i += 5
            continue
        if latex.startswith(r"\right", i) and not latex[i + 6:i + 7].isalpha():
            depth -= 1
            i += 6
            continue
        if ch == "\\":
            j = i + 1
            while j < n and latex[j].isalpha():
                j += 1
            word = latex[i:max(j, i + 2)]
            if depth == 0 and word in operators and previous:
                breaks.append(i)
            previous = word
            i = max(j, i + 2)
            continue
        if ch == "{":
            depth += 1
        elif ch == "}":
            depth -= 1
        elif depth == 0 and ch in operators and previous.strip() and previous.strip()[-1] not in (
                "+", "-", "=", "(", "{", "^", "_") and previous not in ("\\cdot", "\\times"):
            breaks.append(i)
        if not ch.isspace():
            previous = ch
        i += 1
    return breaks


def split_formula(latex: str, width_pt: float, size_pt: float = FORMULA_PT) -> list[str]:
    """Return ``latex`` as lines no wider than ``width_pt`` where a break point allows.

    Lines after the first start with the operator they were broken before (``{} + …``), so that
    the operator keeps its binary spacing. A single term wider than the line stays whole."""
    if _fits(latex, width_pt, size_pt):
        return [latex]
    for operators in (("+", "-"), ("\\cdot", "\\times")):
        cuts = _top_level_breaks(latex, operators)
        if not cuts:
            continue
        pieces, start = [], 0
        for cut in cuts:
            pieces.append(latex[start:cut].strip())
            start = cut
        pieces.append(latex[start:].strip())
        lines: list[str] = []
        current = ""
        for piece in pieces:
            trial = f"{current} {piece}".strip() if current else piece
            shown = trial if not lines else "{} " + trial
            if current and not _fits(shown, width_pt, size_pt):
                lines.append(current)
                current = piece
            else:
                current = trial
        lines.append(current)
        return [line if k == 0 else "{} " + line for k, line in enumerate(lines)]
    return [latex]


def _estimate_width_pt(latex: str, size_pt: float = FORMULA_PT) -> float:
    """Return a cheap upper bound of the drawn width [pt] from the MathML's tokens."""
    root = ET.fromstring(_mathml_text(latex))
    chars = operators = 0
    for node in root.iter():
        tag = node.tag.split("}")[-1]
        if tag in ("mi", "mn", "mo", "mtext") and node.text:
            chars += len(node.text)
            operators += tag == "mo"
        elif tag in ("msqrt", "mroot"):
            chars += 1
    return size_pt * (1.5 + 0.62 * chars + 0.45 * operators)
