"""One LaTeX string per formula: MathML for the site, text set with HTML and CSS for the PDF.

WeasyPrint draws no MathML. The PDF gets each formula as text (``html_math``): latex2mathml's
MathML walked into spans that WeasyPrint lays out like any text (italic symbols, upright numbers
and units, scripts, fractions, roots, scaled fences), so a reviewer can search and copy it, at a
fraction of the cost of drawing pictures. A formula using MathML that walk does not know falls back
(``pdf_math``) to an SVG picture made by ziamath, embedded as ``<img alt="LATEX" src="data:...">``.
Browsers lay MathML out natively, which costs almost nothing to produce.

The site and the PDF start from the same MathML: latex2mathml's output, tidied (units set close as
in ``W/(m²·K)``, unary signs marked prefix, redundant rows removed). ziamath's ``size`` is the font
size in SVG user units, which WeasyPrint reads as CSS pixels (1 px = 0.75 pt): a formula meant to
read like 10 pt text is drawn at 10 / 0.75 = 13.3 px.

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

from calcdoc.render.memo import memoised

__all__ = ["mathml", "svg_img", "html_math", "pdf_math", "UnsupportedFormula", "formula_width_pt",
           "fits_width", "split_formula", "FORMULA_PT"]

LOGGER = logging.getLogger("calcdoc.render")

# Plain paths instead of <symbol>/<use>: smaller, and nothing for WeasyPrint to resolve by id.
ziamath.config.svg2 = False

FORMULA_PT = 9.0  # formulas read like 9 pt text beside the 8.5 pt body of the PDF
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


@memoised("mathml")
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


@memoised("svg", encode=list, decode=tuple)
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


def fits_width(latex: str, width_pt: float, size_pt: float = FORMULA_PT) -> bool:
    """Return whether the drawn formula is at most ``width_pt`` wide: the decision
    ``formula_width_pt(latex) <= width_pt`` would give, at a fraction of its cost.

    Laying a formula out costs ziamath 15-40 ms, most of a site build. The glyph advances of
    ziamath's own font summed over the MathML (:func:`_metric_width_pt`) come within
    ``_METRIC_BAND`` of ziamath's width on the formulas long enough to meet a limit (short
    ones stray further, far from any limit), so only a formula whose estimate lies that
    close to the limit is laid out to decide."""
    estimate = _metric_width_pt(latex, size_pt)
    if estimate * (1 + _METRIC_BAND) <= width_pt:
        return True
    if estimate * (1 - _METRIC_BAND) > width_pt:
        return False
    return formula_width_pt(latex, size_pt) <= width_pt


def _fits(latex: str, width_pt: float, size_pt: float) -> bool:
    return fits_width(latex, width_pt, size_pt)


# ziamath's width over the estimate: 0.91 to 1.14 on the demo's 521 formulas, the far ones all
# short (a/2); on the 533 decisions a demo build makes, a band of 3 % already leaves no decision
# changed, and 6 % lays out 30 formulas of 533.
_METRIC_BAND = 0.06
# The estimate's scale: the median of ziamath's width over the plain sum of advances, which
# leaves out kerning, italic corrections and stretched fences (demo, 521 formulas).
_METRIC_SCALE = 1.065
_NAMED_SPACES = {"veryverythinmathspace": 1 / 18, "verythinmathspace": 2 / 18,
                 "thinmathspace": 3 / 18, "mediummathspace": 4 / 18,
                 "thickmathspace": 5 / 18, "verythickmathspace": 6 / 18,
                 "veryverythickmathspace": 7 / 18}


@lru_cache(maxsize=1)
def _math_font():
    """Return (advance of a character [em], script scale, space after a script [em]) of the
    font ziamath draws with (STIX Two Math, shipped inside ziamath)."""
    from pathlib import Path

    from fontTools.ttLib import TTFont
    from ziamath.styles import MathVariant, styledchr

    font = TTFont(str(Path(ziamath.__file__).parent / "fonts" / "STIXTwoMath-Regular.ttf"),
                  lazy=True)
    cmap, metrics = font.getBestCmap(), font["hmtx"].metrics
    em = font["head"].unitsPerEm
    constants = font["MATH"].table.MathConstants
    italic = MathVariant(italic=True)

    @lru_cache(maxsize=None)
    def advance(char: str, slanted: bool) -> float:
        glyph = cmap.get(ord(styledchr(char, italic) if slanted else char))
        return metrics[glyph][0] / em if glyph else 0.5

    return (advance, constants.ScriptPercentScaleDown / 100,
            constants.SpaceAfterScript.Value / em)


def _space_em(text: str | None) -> float:
    text = (text or "0").strip()
    if text in _NAMED_SPACES:
        return _NAMED_SPACES[text]
    match = re.fullmatch(r"(-?[\d.]+)(em)?", text)
    return float(match.group(1)) if match else 0.0


@memoised("metric")
def _metric_width_pt(latex: str, size_pt: float = FORMULA_PT) -> float:
    """Return about the width ziamath draws the formula [pt], from glyph advances and the
    spacing rules it applies (operator spaces, script scale, fraction padding)."""
    from ziamath import operators

    advance, script_scale, after_script = _math_font()

    def width(node: ET.Element, level: int, script: bool, fraction: bool) -> float:
        tag = node.tag.split("}")[-1]
        scale = script_scale ** min(level, 2)
        if tag in ("mi", "mn", "mtext"):
            text = node.text or ""
            slanted = tag == "mi" and len(text) == 1 and node.get("mathvariant") != "normal"
            return scale * sum(advance(c, slanted) for c in text)
        if tag == "mo":
            text = node.text or ""
            params = operators.get_params(text, node.get("form", "infix"))
            params.update(node.attrib)
            space = 0.0 if script else (_space_em(params.get("lspace"))
                                        + _space_em(params.get("rspace")))
            return scale * (sum(advance(c, False) for c in text) + space)
        if tag == "mspace":
            return scale * _space_em(node.get("width"))
        if tag in ("msub", "msup", "msubsup"):
            scripts = max(width(c, level + 1, True, fraction) for c in node[1:])
            return width(node[0], level, script, fraction) + scripts + scale * after_script
        if tag == "mfrac":  # a fraction inside a fraction or a script is set a size smaller
            inner = level + 1 if (script or fraction) else level
            return (max(width(node[0], inner, script, True), width(node[1], inner, script, True))
                    + script_scale ** min(inner, 2) * 2 * _NAMED_SPACES["thinmathspace"])
        if tag == "msqrt":
            return scale * advance("\u221a", False) + sum(width(c, level, script, fraction)
                                                           for c in node)
        return sum(width(c, level, script, fraction) for c in node)

    root = ET.fromstring(_mathml_text(latex))
    return size_pt * _METRIC_SCALE * width(root, 0, False, False)


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


# ------------------------------------------------------------------ formulas as text (PDF)
#
# The PDF draws a formula as text laid out with HTML and CSS: the same MathML the site shows,
# walked into spans (italic symbols, upright numbers and units, scripts, fractions as a numerator
# over a rule over a denominator, radicals with an overline, fences scaled to their contents).
# Text is searchable and copyable, and WeasyPrint sets it several times faster than it draws
# SVG paths. A formula using MathML the walk does not know is shown as the ziamath image.
#
# Vertical placement is computed here, not measured: each piece reports the top and bottom of
# its CSS box above and below its baseline [em], following the CSS 2.1 inline formatting model
# (an inline box is its line-height tall, centred on the font's ascent + descent; an inline
# block's baseline is that of its last line). That needs the face's ascent and descent only.
# Horizontal spacing follows TeX's table of spaces between atoms (The TeXbook, ch. 18).


class UnsupportedFormula(ValueError):
    """The formula uses MathML the text layout does not draw (the PDF shows it as an image)."""


# DejaVu Serif (the face of .m in style.css): ascent and descent from its hhea table, which
# equal its OS/2 win metrics; the axis is the centre of its minus sign (y 0.274–0.353 em).
_ASCENT, _DESCENT = 0.928, 0.236
_AXIS = 0.3135
_RULE = 0.06        # fraction rule and radical overline [em], as .fr/.rd in style.css
_PAD = 0.03         # space between a fraction's rule and numerator, denominator [em]
_LINE = 1.2         # line-height of .m, numerators and denominators
_SCRIPT_LINE = 1.0  # line-height of scripts and radicands
_SCRIPT_SIZE = {1: 0.72, 2: 0.6}  # font size at script level 1 and 2+ (of the formula's size)
_SUP_SHIFT, _SUB_SHIFT = 0.45, 0.22  # baseline shift of a superscript, subscript [em]
# Glyph extents in DejaVu Serif [em]: bottom and top of each stretchable character.
_GLYPH_Y = {"(": (-0.156, 0.760), ")": (-0.156, 0.760), "[": (-0.132, 0.760),
            "]": (-0.132, 0.760), "{": (-0.163, 0.760), "}": (-0.163, 0.760),
            "|": (-0.236, 0.764), "\u2016": (-0.236, 0.764), "\u230a": (-0.132, 0.760),
            "\u230b": (-0.132, 0.760), "\u2308": (-0.132, 0.760), "\u2309": (-0.132, 0.760),
            "\u221a": (-0.020, 0.811)}

_THIN, _MEDIUM, _THICK = "\u2006", "\u2009", "\u2005"  # 1/6, 1/5 and 1/4 em in DejaVu Serif
_SPACE_CHARS = ((1.0, "\u2003"), (0.33, "\u2004"), (0.25, "\u2005"), (0.2, "\u202f"),
                (0.167, "\u2006"), (0.1, "\u200a"))
_NAMED_WIDTHS = {"thinmathspace": 0.167, "mediummathspace": 0.222, "thickmathspace": 0.278}

_CLASSES = ("ord", "op", "bin", "rel", "open", "close", "punct", "inner")
# The TeXbook, ch. 18 (p. 170): space between atoms; 1 thin, 2 medium, 3 thick; a negative
# number is left out in scripts; None cannot occur (a binary operator there becomes ordinary).
_SPACE_TABLE = {
    "ord":   (0, 1, -2, -3, 0, 0, 0, -1),
    "op":    (1, 1, None, -3, 0, 0, 0, -1),
    "bin":   (-2, -2, None, None, -2, None, None, -2),
    "rel":   (-3, -3, None, 0, -3, 0, 0, -3),
    "open":  (0, 0, None, 0, 0, 0, 0, 0),
    "close": (0, 1, -2, -3, 0, 0, 0, -1),
    "punct": (-1, -1, None, -1, -1, -1, -1, -1),
    "inner": (-1, 1, -2, -3, -1, 0, -1, -1),
}
_SPACE_TEXT = {0: "", 1: _THIN, 2: _MEDIUM, 3: _THICK}

_BINARY = set("+\u2212-\u00b7\u22c5\u00d7\u00b1\u2213\u2217*\u2218\u00f7\u2229\u222a\u2227\u2228")
_RELATIONS = set("=<>\u2264\u2265\u2248\u2260\u2261\u223c\u2243\u2192\u2190\u2194\u21d2\u21d4"
                 "\u2208\u2209\u221d\u226a\u226b\u2282\u2286:")
_OPENING, _CLOSING = set("([{\u27e8\u230a\u2308"), set(")]}\u27e9\u230b\u2309")
_LARGE = set("\u2211\u220f\u222b\u222e\u22c3\u22c2")
_FUNCTIONS = {"sin", "cos", "tan", "cot", "sec", "csc", "arcsin", "arccos", "arctan", "sinh",
              "cosh", "tanh", "exp", "ln", "log", "lg", "lim", "min", "max", "sup", "inf",
              "det", "arg", "deg", "dim", "gcd", "sgn", "sign", "mod", "erf", "erfc"}
# Italic when single: Latin and Greek letters (not ℝ, ℓ and other letter-like symbols).
_LETTER = re.compile("[A-Za-z\u0391-\u03a9\u03b1-\u03c9"
                     "\u03d1\u03d5\u03d6\u03f1\u03f5\u0131\u0237]")
_PRIMES = {"\u2032", "\u2033", "\u2034"}
# Accents drawn as a combining mark after their letter: \dot, \ddot, \hat, \tilde, \vec,
# \check, \breve, \acute, \grave (as latex2mathml writes them); \bar and \overline as a rule.
_COMBINING = {"\u02d9": "\u0307", "\u00a8": "\u0308", "^": "\u0302", "\u02c6": "\u0302",
              "~": "\u0303", "\u02dc": "\u0303", "\u2192": "\u20d7", "\u02c7": "\u030c",
              "\u02d8": "\u0306", "\u00b4": "\u0301", "`": "\u0300"}
_OVERLINES = {"\u2015", "\u203e", "\u00af", "\u0305"}


class _Box:
    """A piece of the formula: its HTML, the top and bottom of its box above and below the
    baseline [em of its font], and its TeX class on the left and right for spacing."""

    __slots__ = ("html", "h", "d", "left", "right", "glue")

    def __init__(self, html: str, h: float, d: float, left: str = "ord",
                 right: str | None = None, glue: bool = False):
        self.html, self.h, self.d = html, h, d
        self.left, self.right, self.glue = left, right or left, glue


def _strut(line: float) -> tuple[float, float]:
    """Return the top and bottom of a line's strut above and below its baseline [em]."""
    half_leading = (line - (_ASCENT + _DESCENT)) / 2
    return _ASCENT + half_leading, _DESCENT + half_leading


def _em(value: float) -> str:
    text = f"{value:.3f}".rstrip("0").rstrip(".")
    return "0" if text in ("", "-0") else text + "em"


def _tag(node: ET.Element) -> str:
    return node.tag.split("}")[-1]


def _scale(level: int) -> float:
    return _SCRIPT_SIZE.get(min(level, 2), 1.0)


def _space(width: float) -> str:
    """Return space characters about ``width`` em wide."""
    out = ""
    for size, char in _SPACE_CHARS:
        while width >= size - 0.02:
            out += char
            width -= size
    return out


def _width_em(text: str | None) -> float:
    text = (text or "0").strip()
    if text in _NAMED_WIDTHS:
        return _NAMED_WIDTHS[text]
    match = re.fullmatch(r"(-?[\d.]+)(em)?", text)
    if not match:
        raise UnsupportedFormula(f"space width {text!r}")
    return float(match.group(1))


def _text(node: ET.Element) -> str:
    if len(node):
        raise UnsupportedFormula(f"<{_tag(node)}> with children")
    return node.text or ""


def _token(node: ET.Element, line: float) -> _Box:
    """Return an mi, mn, mo or mtext as text, with its TeX class."""
    tag, text = _tag(node), _text(node)
    top, bottom = _strut(line)
    variant = node.get("mathvariant")
    if any(ord(ch) > 0xFFFF for ch in text):
        raise UnsupportedFormula("mathematical alphanumeric symbol")  # \mathbf, \mathbb, ...
    if variant not in (None, "normal", "italic"):
        raise UnsupportedFormula(f"mathvariant {variant}")
    shown = str(escape(text))
    if tag == "mn":
        return _Box(shown, top, bottom)
    if tag == "mtext":
        shown = shown.replace(" ", "\u00a0")
        return _Box(shown, top, bottom, glue=not text.strip())
    if tag == "mi":
        if text in (";", ","):
            return _Box(shown, top, bottom, "punct")
        if text == ":":
            return _Box(shown, top, bottom, "rel")
        if variant == "italic" or (variant is None and len(text) == 1 and _LETTER.match(text)):
            return _Box(f"<i>{shown}</i>", top, bottom)
        if variant is None and len(text) > 1:
            return _Box(shown, top, bottom, "op")  # \ln, \exp, \tan: upright, as operators
        return _Box(shown, top, bottom)
    # mo
    if node.get("minsize") or node.get("maxsize") or node.get("largeop") == "true":
        raise UnsupportedFormula("sized operator")
    text = {"*": "\u2217", "-": "\u2212"}.get(text, text)
    shown = str(escape(text))
    if "lspace" in node.attrib or "rspace" in node.attrib:
        before = _space(_width_em(node.get("lspace"))) if node.get("lspace") else ""
        after = _space(_width_em(node.get("rspace"))) if node.get("rspace") else ""
        return _Box(before + shown + after, top, bottom)
    if len(text) > 1 and text.isalpha():
        return _Box(shown, top, bottom, "op")  # \min, \max, \operatorname{sgn}
    if text in _LARGE:
        # a display-style large operator: larger, centred on the axis; its box reaches lower
        # and higher so that its limits set as scripts clear it
        return _Box(f'<span class="lo">{shown}</span>', top + 0.1, bottom + 0.12, "op")
    if text in _OPENING and node.get("form") != "postfix":
        return _Box(shown, top, bottom, "open")
    if text in _CLOSING:
        return _Box(shown, top, bottom, "close")
    if text in ("|", "\u2016"):
        kind = {"prefix": "open", "postfix": "close"}.get(node.get("form", ""), "ord")
        return _Box(shown, top, bottom, kind)
    if text in (",", ";"):
        return _Box(shown, top, bottom, "punct")
    if text in _RELATIONS:
        return _Box(shown, top, bottom, "rel")
    if text in _BINARY:
        return _Box(shown, top, bottom, "ord" if node.get("form") == "prefix" else "bin")
    return _Box(shown, top, bottom)


def _join(boxes: list[_Box], level: int, line: float) -> _Box:
    """Return the boxes set in a row, with TeX's spaces between atoms."""
    atoms = [b for b in boxes if not b.glue]
    # The TeXbook, Appendix G, rules 5 and 6: a binary operator with nothing to its left to
    # operate on, or before a relation, closing or punctuation, is an ordinary symbol.
    previous = None
    for k, box in enumerate(atoms):
        if box.left == "bin":
            following = atoms[k + 1].left if k + 1 < len(atoms) else None
            if previous in (None, "bin", "op", "rel", "open", "punct") or \
                    following in ("rel", "close", "punct", None):
                box.left = box.right = "ord"
        previous = box.right
    html, previous = [], None
    top, bottom = _strut(line)
    h, d = top, bottom
    for box in boxes:
        if not box.glue:
            if previous is not None:
                space = _SPACE_TABLE[previous][_CLASSES.index(box.left)]
                if space is None:
                    space = 0
                if space < 0:
                    space = 0 if level else -space
                html.append(_SPACE_TEXT[space])
            previous = box.right
        html.append(box.html)
        h, d = max(h, box.h), max(d, box.d)
    return _Box("".join(html), h, d)


def _children(node: ET.Element) -> list[ET.Element]:
    """Return the children of a row, with <mstyle> (no styling of its own here) spliced in."""
    out = []
    for child in node:
        if _tag(child) == "mstyle":
            if set(child.attrib) - {"displaystyle", "scriptlevel"}:
                raise UnsupportedFormula("styled sub-formula")
            out.extend(_children(child))
        else:
            out.append(child)
    return out


def _row(node: ET.Element, level: int, line: float) -> _Box:
    """Return the contents of ``node`` (a row, or one element) laid out as a row."""
    if _tag(node) in ("mrow", "mstyle", "math") and not _is_fenced(node):
        return _join([_node(c, level, line) for c in _children(node)], level, line)
    return _join([_node(node, level, line)], level, line)


def _is_fenced(node: ET.Element) -> bool:
    kids = list(node)
    return (_tag(node) == "mrow" and len(kids) >= 2
            and all(_tag(k) == "mo" and k.get("fence") == "true" and k.get("stretchy") == "true"
                    for k in (kids[0], kids[-1])))


def _stretched(char: str, height: float, centre: float | None = None,
               top: float | None = None) -> tuple[str, float, float]:
    """Return ``char`` scaled vertically to ``height`` em, centred on ``centre`` or with its
    top at ``top`` [em above the baseline], and the top and bottom of its ink.

    The glyph sits in an inline block of line-height 0, so it takes no room in the line; that
    block is one point, (ascent − descent)/2 above its baseline, about which scaleY turns."""
    y0, y1 = _GLYPH_Y[char]
    k = height / (y1 - y0)
    origin = (_ASCENT - _DESCENT) / 2
    if top is None:
        shift = centre - origin - k * ((y0 + y1) / 2 - origin)
    else:
        shift = top - origin - k * (y1 - origin)
    html = (f'<span class="st" style="transform:scaleY({k:.3f});vertical-align:{_em(shift)}">'
            f"{escape(char)}</span>")
    return html, shift + origin + k * (y1 - origin), -(shift + origin + k * (y0 - origin))


def _fenced(node: ET.Element, level: int, line: float) -> _Box:
    """Return ``\\left( … \\right)``: the fences scaled to cover the contents, on the axis."""
    kids = _children(node)
    opening, closing = kids[0], kids[-1]
    if any(_tag(k) == "mo" and k.get("fence") == "true" for k in kids[1:-1]):
        raise UnsupportedFormula(r"\middle")
    inner = _join([_node(c, level, line) for c in kids[1:-1]], level, line)
    top, bottom = _strut(line)
    html = []
    h, d = inner.h, inner.d
    tall = inner.h > top + 0.03 or inner.d > bottom + 0.03
    for fence in (opening, closing):
        char = {"-": "\u2212"}.get(_text(fence), _text(fence))
        if not char:  # \left. or \right.
            html.append("")
            continue
        if char not in _GLYPH_Y:
            raise UnsupportedFormula(f"fence {char!r}")
        if not tall:
            html.append(str(escape(char)))
            continue
        # As TeX sizes a delimiter (The TeXbook, Appendix G, rule 19): symmetric about the
        # axis, covering most of the contents' larger extent from it; the boxes here include
        # the line's leading (about 0.1 em above the ink, 0.05 em below), taken off first.
        extent = 2 * max(inner.h - 0.12 - _AXIS, inner.d - 0.06 + _AXIS) * 0.95
        glyph, gh, gd = _stretched(char, max(extent, 1.0), centre=_AXIS)
        html.append(glyph)
        h, d = max(h, gh), max(d, gd)
    return _Box(html[0] + inner.html + html[1], h, d, "open", "close")


def _line_box(node: ET.Element, level: int, line: float) -> tuple[str, float, float]:
    """Return a row set as one line box: its HTML and the top and bottom of the line."""
    row = _row(node, level, line)
    top, bottom = _strut(line)
    return row.html, max(top, row.h), max(bottom, row.d)


def _fraction(node: ET.Element, level: int) -> _Box:
    """Return a fraction: numerator over a rule over denominator, the rule on the axis."""
    if node.get("linethickness") not in (None, "", "1", "medium"):
        raise UnsupportedFormula("fraction without a rule")
    if len(node) != 2:
        raise UnsupportedFormula("fraction without two parts")
    num, num_top, num_bottom = _line_box(node[0], level, _LINE)
    den, den_top, den_bottom = _line_box(node[1], level, _LINE)
    # the inline block's baseline is the denominator's; raise it to put the rule on the axis
    raise_by = _AXIS - (den_top + _PAD + _RULE / 2)
    h = raise_by + den_top + _PAD + _RULE + _PAD + num_bottom + num_top
    d = den_bottom - raise_by
    html = (f'<span class="fr" style="vertical-align:{_em(raise_by)}">'
            f'<span class="nu">{num}</span><span class="de">{den}</span></span>')
    return _Box(html, h, d)


def _radical(node: ET.Element, level: int) -> _Box:
    """Return a square root: a radical sign reaching the overline on the radicand."""
    if len(node) == 1:
        content = node[0]
    else:  # <msqrt> is a row of its children
        content = ET.Element(f"{{{_NS}}}mrow")
        content.extend(list(node))
    html, top, bottom = _line_box(content, level, _SCRIPT_LINE)
    overline_top = top + 0.04 + _RULE  # .rd: padding-top 0.04em, border-top _RULE
    sign, _, sign_bottom = _stretched("\u221a", overline_top + bottom - 0.06, top=overline_top)
    # clearance above the overline, as TeX leaves one rule's thickness (Appendix G, rule 11);
    # twice that here, so that a fraction's rule above a root stays apart from its overline
    return _Box(f'{sign}<span class="rd">{html}</span>', overline_top + 2 * _RULE,
                max(bottom, sign_bottom))


def _split_primes(node: ET.Element | None) -> tuple[str, ET.Element | None]:
    """Return the primes a superscript starts with, and the rest of it (None if nothing)."""
    if node is None:
        return "", None
    kids = list(node) if _tag(node) == "mrow" else [node]
    primes = ""
    while kids and _tag(kids[0]) in ("mi", "mo") and (kids[0].text or "") in _PRIMES \
            and not len(kids[0]):
        primes += kids.pop(0).text
    if not primes:
        return "", node
    if not kids:
        return primes, None
    rest = ET.Element(f"{{{_NS}}}mrow")
    rest.extend(kids)
    return primes, rest


def _scripts(base: _Box, sub: ET.Element | None, sup: ET.Element | None, level: int,
             line: float) -> _Box:
    """Return ``base`` with a subscript and/or superscript, set smaller, raised and lowered."""
    primes, sup = _split_primes(sup)
    html, h, d = base.html, base.h, base.d
    if primes:
        html += primes  # a prime is set at full size: its glyph already sits high
    top, bottom = _strut(line)
    up = _SUP_SHIFT + max(0.0, base.h - top)      # clear a tall base (a fence, a fraction)
    down = _SUB_SHIFT + max(0.0, base.d - bottom)
    size = _scale(level + 1) / _scale(level)
    size_class = "x" if level == 0 else ("y" if level == 1 else "z")
    s_top, s_bottom = _strut(_SCRIPT_LINE)
    rows = {}
    for name, part in (("sub", sub), ("sup", sup)):
        if part is not None:
            row = _row(part, level + 1, _SCRIPT_LINE)
            rows[name] = (row.html, max(s_top, row.h) * size, max(s_bottom, row.d) * size)
    if "sub" in rows and "sup" in rows:
        (sb, sb_top, sb_bottom), (sp, sp_top, sp_bottom) = rows["sub"], rows["sup"]
        gap = max(0.0, up - (-down + sb_top + sp_bottom))
        pad = f' style="padding-bottom:{_em(gap / size)}"' if gap > 0.005 else ""
        html += (f'<span class="ss" style="vertical-align:{_em(-down)}">'
                 f'<span class="{size_class}"{pad}>{sp}</span>'
                 f'<span class="{size_class}">{sb}</span></span>')
        h = max(h, -down + sb_top + gap + sp_bottom + sp_top)
        d = max(d, down + sb_bottom)
    elif "sup" in rows:
        sp, sp_top, sp_bottom = rows["sup"]
        html += _script_span(size_class, "p", up, _SUP_SHIFT, size, sp)
        h, d = max(h, up + sp_top), max(d, sp_bottom - up)
    elif "sub" in rows:
        sb, sb_top, sb_bottom = rows["sub"]
        html += _script_span(size_class, "b", -down, -_SUB_SHIFT, size, sb)
        h, d = max(h, sb_top - down), max(d, down + sb_bottom)
    return _Box(html, h, d, base.left, base.right)


def _script_span(size_class: str, kind: str, shift: float, usual: float, size: float,
                 html: str) -> str:
    """Return a superscript (kind "p") or subscript ("b") raised by ``shift`` em; the usual
    shift is the class's (style.css), any other is written on the element."""
    if abs(shift - usual) < 0.005 and size_class in ("x", "y"):
        return f'<span class="{size_class}{kind}">{html}</span>'
    return f'<span class="{size_class}" style="vertical-align:{_em(shift / size)}">{html}</span>'


def _accent(node: ET.Element, level: int, line: float) -> _Box:
    """Return an accented symbol: a combining mark on one letter, or an overline."""
    base, mark = node[0], _text(node[1]) if _tag(node[1]) == "mo" else None
    if mark in _OVERLINES:
        html, top, bottom = _line_box(base, level, _SCRIPT_LINE)
        return _Box(f'<span class="ov">{html}</span>', top + _RULE, bottom)
    if mark in _COMBINING and _tag(base) in ("mi", "mn") and len(_text(base)) == 1:
        box = _token(base, line)
        combining = _COMBINING[mark]
        box.html = (box.html.replace("</i>", combining + "</i>") if box.html.endswith("</i>")
                    else box.html + combining)
        return box
    raise UnsupportedFormula("accent or over-script")


def _node(node: ET.Element, level: int, line: float) -> _Box:
    """Return one MathML element as a box."""
    tag = _tag(node)
    if tag in ("mi", "mn", "mo", "mtext"):
        return _token(node, line)
    if tag == "mspace":
        width = _width_em(node.get("width"))
        if width < 0:
            raise UnsupportedFormula("negative space")
        top, bottom = _strut(line)
        # \, (between a number and its unit): the narrow no-break space of SI typesetting
        text = "\u202f" if 0.15 <= width <= 0.2 else _space(width)
        return _Box(text, top, bottom, glue=True)
    if tag == "mrow":
        if _is_fenced(node):
            return _fenced(node, level, line)
        kids = _children(node)
        if not kids:
            top, bottom = _strut(line)
            return _Box("", top, bottom)  # {}: an empty ordinary atom, as in TeX
        return _join([_node(c, level, line) for c in kids], level, line)
    if tag == "mstyle":
        return _join([_node(c, level, line) for c in _children(node)], level, line)
    if tag == "mfrac":
        return _fraction(node, level)
    if tag == "msqrt":
        return _radical(node, level)
    if tag in ("msub", "msup", "msubsup", "munder", "mover", "munderover"):
        if len(node) != {"msub": 2, "msup": 2, "mover": 2, "munder": 2}.get(tag, 3):
            raise UnsupportedFormula(f"<{tag}> without its parts")
        base_node = node[0]
        if tag == "mover" and not (_tag(base_node) == "mo" and _limits_base(base_node)):
            return _accent(node, level, line)
        if tag in ("munder", "munderover") and not (_tag(base_node) == "mo"
                                                      and _limits_base(base_node)):
            raise UnsupportedFormula("under-script")
        if _tag(base_node) == "mrow" and not len(base_node) and tag == "msup" and \
                _degree(node[1]):
            top, bottom = _strut(line)
            return _Box("\u00b0", top, bottom)  # {}^{\circ}: the degree sign
        base = _node(base_node, level, line)
        sub = node[1] if tag in ("msub", "msubsup", "munder", "munderover") else None
        sup = {"msup": 1, "mover": 1, "msubsup": 2, "munderover": 2}.get(tag)
        return _scripts(base, sub, node[sup] if sup else None, level, line)
    raise UnsupportedFormula(f"<{tag}>")


def _limits_base(node: ET.Element) -> bool:
    text = node.text or ""
    return text in _LARGE or text in _FUNCTIONS


def _degree(node: ET.Element) -> bool:
    kids = list(node) if _tag(node) == "mrow" else [node]
    return len(kids) == 1 and _tag(kids[0]) in ("mo", "mi") and \
        (kids[0].text or "") in ("\u2218", "\u00b0")


@lru_cache(maxsize=8192)
def html_math(latex: str) -> Markup:
    """Return the formula as HTML text for the PDF, with the LaTeX as its ``title``.

    Raises UnsupportedFormula for MathML the text layout does not draw; ``pdf_math`` then
    shows the image instead."""
    if not latex.strip():
        return Markup("")
    root = ET.fromstring(_mathml_text(latex))
    if root.find(f"{{{_NS}}}mtext") is not None and len(root) == 1:
        raise UnsupportedFormula("LaTeX the MathML converter could not read")
    try:
        row = _join([_node(c, 0, _LINE) for c in _children(root)], 0, _LINE)
    except UnsupportedFormula:
        raise
    except (IndexError, KeyError, TypeError, ValueError) as exc:  # MathML of a shape not met
        raise UnsupportedFormula(f"{type(exc).__name__}: {exc}") from exc
    # adjacent italic letters (a subscript "si", "E A") as one run: fewer boxes to lay out
    html = _ITALIC_JOIN.sub(r"\1", row.html)
    return Markup(f'<span class="m" title="{escape(latex)}">{html}</span>')


_ITALIC_JOIN = re.compile("</i>([\u2005\u2006\u2009\u202f]*)<i>")


@memoised("pdf", encode=str, decode=Markup)
def pdf_math(latex: str) -> Markup:
    """Return the formula for the PDF: text where ``html_math`` draws it, else the image."""
    try:
        return html_math(latex)
    except UnsupportedFormula:
        return svg_img(latex)
