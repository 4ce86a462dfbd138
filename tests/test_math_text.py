"""Formulas in the PDF set as text: the LaTeX → MathML → HTML walk of calcdoc/render/math.py.

What is checked comes from the typography of quantities (SI Brochure, BIPM, 9th ed. 2019,
ch. 5: quantity symbols italic, numbers and unit symbols upright, a space between the number and
the unit; from memory), from TeX's layout of formulas (The TeXbook, ch. 17–18 and Appendix G:
fractions, scripts, radicals, spacing between atoms; from memory) and from Unicode (U+2212 MINUS
SIGN, U+202F NARROW NO-BREAK SPACE). The structure is read back from the HTML as a linear
string: a fraction as (numerator)/(denominator), scripts as _{…} and ^{…}, a radicand as √{…}.
"""

from __future__ import annotations

import re
from html.parser import HTMLParser
from pathlib import Path

import pytest

from calcdoc.render.math import UnsupportedFormula, html_math, mathml, pdf_math

ROOT = Path(__file__).resolve().parent.parent


class _Linear(HTMLParser):
    """Read a formula's HTML back as a linear string, and note which text is italic."""

    _SCRIPT = re.compile(r"^[xyz][pb]?$")

    def __init__(self):
        super().__init__()
        self.out: list[str] = []
        self.closers: list[str] = []
        self.italic: list[str] = []
        self.in_italic = 0
        self.stack_part: list[int] = []  # inside a sub/sup stack: parts seen so far

    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        cls, style = a.get("class", ""), a.get("style", "")
        if tag == "i":
            self.in_italic += 1
            self.closers.append("</i>")
            return
        opening, closing = "", ""
        if cls == "nu":
            opening, closing = "(", ")/"
        elif cls == "de":
            opening, closing = "(", ")"
        elif cls == "rd":
            opening, closing = "{", "}"
        elif cls == "ov":
            opening, closing = "\u203e{", "}"
        elif cls == "ss":
            self.stack_part.append(0)
            self.out.append("\x00")  # where the subscript goes: it is written after
            closing = "</ss>"
        elif self._SCRIPT.match(cls):
            if self.stack_part and self.closers and self.closers[-1] == "</ss>":
                part = self.stack_part[-1]
                self.stack_part[-1] += 1
                opening = "^{" if part == 0 else "\x01_{"
            else:
                shift = re.search(r"vertical-align:(-?[\d.]+)", style)
                up = cls.endswith("p") or (shift is not None and float(shift.group(1)) > 0)
                opening = "^{" if up else "_{"
            closing = "}"
        self.out.append(opening)
        self.closers.append(closing)

    def handle_endtag(self, tag):
        closing = self.closers.pop()
        if closing == "</i>":
            self.in_italic -= 1
            return
        if closing == "</ss>":
            self.stack_part.pop()
            # write the stack as _{sub}^{sup}, the order TeX source gives them
            text = "".join(self.out)
            start = text.rindex("\x00")
            body = text[start + 1:]
            sup, _, sub = body.partition("\x01")
            self.out = [text[:start] + sub + sup]
            return
        self.out.append(closing)

    def handle_data(self, data):
        self.out.append(data)
        if self.in_italic:
            self.italic.append(data)

    def text(self) -> str:
        return re.sub(r"\s+", " ", "".join(self.out)).strip()


def linear(latex: str) -> tuple[str, list[str]]:
    """Return the formula's HTML as a linear string, and the pieces set in italic."""
    html = str(html_math(latex))
    assert html.startswith('<span class="m" title="'), html
    body = html[html.index(">") + 1:-len("</span>")]
    parser = _Linear()
    parser.feed(body)
    parser.close()
    return parser.text(), parser.italic


# ------------------------------------------------------------------ structure and typography

def test_fraction_is_numerator_over_denominator__texbook_ch17():
    text, italic = linear(r"U = \frac{1}{R_{T}}")
    assert text == "U = (1)/(R_{T})"
    assert italic == ["U", "R", "T"]  # quantity symbols italic, the number upright (SI, ch. 5)


def test_fraction_has_a_rule_and_sits_on_the_axis__texbook_appendix_g_rule_15():
    html = str(html_math(r"\frac{a}{b}"))
    # the rule is the denominator's top border (style.css .m .de); the block is lowered so
    # that the rule, not the denominator's baseline, meets the line's baseline region
    assert '<span class="fr" style="vertical-align:-' in html
    assert '<span class="de">' in html


def test_unit_is_upright_after_a_narrow_no_break_space__si_brochure_ch5():
    text, italic = linear(r"= 0.241\,\mathrm{W/(m^{2}\cdot K)}")
    assert text == "= 0.241 W/(m^{2}·K)"
    assert italic == []  # numbers and unit symbols upright (SI Brochure, 9th ed., ch. 5)
    assert "0.241\u202fW" in str(html_math(r"= 0.241\,\mathrm{W/(m^{2}\cdot K)}"))


def test_degree_celsius_and_minus_sign__si_brochure_ch5_and_unicode_u2212():
    text, _ = linear(r"= -2.61\,\mathrm{{}^{\circ}C}")
    # SI Brochure ch. 5: the value of a Celsius temperature is written with a space before
    # °C (from memory); Unicode U+2212 MINUS SIGN, not the hyphen (common practice)
    assert text == "= \u22122.61 °C"


def test_power_of_ten_with_times_sign_and_raised_exponent__common_practice():
    text, _ = linear(r"= 1.91 \times 10^{-7}")
    assert text == "= 1.91 × 10^{\u22127}"  # "1.91 × 10⁻⁷" as written by hand (common practice)


def test_subscript_and_superscript_together_are_stacked__texbook_appendix_g_rule_18():
    text, italic = linear(r"T_{k-1}^{4}")
    assert text == "T_{k\u22121}^{4}"
    assert '<span class="ss"' in str(html_math(r"T_{k-1}^{4}"))
    assert italic == ["T", "k"]
    text, _ = linear(r"t^*_{max,c}")
    assert text == "t_{max,c}^{\u2217}"  # the asterisk operator, set as a superscript


def test_prime_is_set_at_full_size_before_the_subscript__common_practice():
    text, _ = linear(r"\theta_{si}^{\prime}")
    assert text == "θ\u2032_{si}"
    text, _ = linear(r"R''^{*}_{1}")
    assert text == "R\u2032\u2032_{1}^{\u2217}"


def test_square_root_draws_a_radical_and_an_overline__texbook_appendix_g_rule_11():
    text, _ = linear(r"\sqrt{1+Y^{2}}")
    assert text == "√{1 + Y^{2}}"
    assert '<span class="rd">' in str(html_math(r"\sqrt{1+Y^{2}}"))


def test_greek_symbols_are_italic_as_quantities__si_brochure_ch5():
    text, italic = linear(r"= \varepsilon \sigma \left(T^{4} - T_{sur}^{4}\right)")
    assert text == "= εσ(T^{4} − T_{sur}^{4})"
    assert italic[0] == "εσ"
    text, _ = linear(r"\Delta\theta_{a,t}")
    assert text == "Δθ_{a,t}"


def test_function_names_are_upright__texbook_ch18():
    text, italic = linear(r"= 610.5\,\mathrm{Pa} \cdot \exp\left(\frac{17.269\, \theta_{i}}"
                          r"{237.3 + \theta_{i}}\right)")
    assert text == "= 610.5 Pa · exp((17.269 θ_{i})/(237.3 + θ_{i}))"
    assert "exp" not in "".join(italic)
    text, italic = linear(r"x = \ln\frac{p_{v}}{610.5}")
    assert text == "x = ln (p_{v})/(610.5)"
    text, _ = linear(r"= \max\left(0.2\cdot10^{-3}\,q_{t,d}/O;\ t_{lim}\right)")
    assert text == "= max(0.2 · 10^{\u22123} q_{t,d}/O; t_{lim})"


def test_binary_minus_is_spaced_and_a_sign_is_not__texbook_appendix_g_rule_5():
    html = str(html_math(r"= 12 - \left(-4\right)"))
    # binary: a space each side; unary (after an opening fence): none
    assert "12\u2009\u2212\u2009(\u22124)" in html


def test_fences_grow_only_around_tall_contents__texbook_appendix_g_rule_19():
    assert 'class="st"' not in str(html_math(r"\left(x + y\right)"))
    tall = str(html_math(r"\left(\frac{a}{b}\right)"))
    scales = [float(k) for k in re.findall(r"scaleY\(([\d.]+)\)", tall)]
    assert len(scales) == 2 and all(k > 1.2 for k in scales)


def test_accents_dot_and_overline__common_practice():
    text, _ = linear(r"\dot h_{net}")
    assert text == "h\u0307_{net}"  # h with a combining dot above
    text, _ = linear(r"\overline{Nu}_{D}")
    assert text == "\u203e{Nu}_{D}"


def test_sum_with_its_index_as_a_subscript__texbook_ch17():
    text, _ = linear(r"= R_{si} + \sum_{j} R_{j} + R_{se}")
    assert text == "= R_{si} + ∑_{j} R_{j} + R_{se}"


def test_formula_keeps_its_latex_as_the_title():
    html = str(html_math(r"U = \frac{1}{R_{T}}"))
    assert html.startswith('<span class="m" title="U = \\frac{1}{R_{T}}">')


def test_markup_characters_are_escaped():
    text, _ = linear(r"a < b")
    assert text == "a < b"
    assert "&lt;" in str(html_math(r"a < b"))


@pytest.mark.parametrize("latex", [r"\begin{matrix} a & b \end{matrix}", r"\mathbf{x}",
                                   r"\sqrt[3]{x}", r"a\!b"])
def test_latex_the_text_layout_does_not_draw_falls_back_to_the_image(latex):
    with pytest.raises(UnsupportedFormula):
        html_math(latex)
    shown = str(pdf_math(latex))
    assert shown.startswith('<img class="math" alt="')


@pytest.mark.parametrize("expression, shown", [
    ("sqrt(a**2 + b_2**2)", "√{a^{2} + b_{2}^{2}}"),
    ("exp(-x / tau)", "exp((−x)/(τ))"),
    ("log(p_v / 610.5)", "ln((p_{v})/(610.5))"),
    ("log10(Ra_D)", "log_{10}(Ra_{D})"),
    ("sin(phi) * cos(theta_si) + tan(alpha)", "sin(ϕ) · cos(θ_{si}) + tan(α)"),
    ("abs(Q_in - Q_out) / Q_in", "(|Q_{in} − Q_{out}|)/(Q_{in})"),
    ("min(a, b) + max(c, 2.5e-8)", "min(a, b) + max(c, 2.5 × 10^{−8})"),
    ("-(a + b) ** 2", "−(a + b)^{2}"),
    ("epsilon_eff / (1/eps_1 + 1/eps_2 - 1)", "(ϵ_{eff})/((1)/(eps_{1}) + (1)/(eps_{2}) − 1)"),
])
def test_every_construct_of_the_formula_kind_is_drawn_as_text(expression, shown):
    # the LaTeX the formula kind writes for an engineer's expression (kinds/formula.py)
    from calcdoc.kinds.formula import parse_expression, symbol_latex, to_latex
    text, _ = linear(to_latex(parse_expression(expression), symbol_latex))
    assert text == shown


# ------------------------------------------------------------------ in the package

SHEET = """\
id: S1
title: Wall U-value
signoff:
  prepared: {by: A. Engineer, date: 2026-11-20, rev: P1}
blocks:
  - id: wall
    kind: formula
    title: Transmittance from the total resistance
    given:
      R_T: {value: 4.15 m^2*K/W, source: Resistance schedule (example)}
    steps:
      - {name: U, expr: "1 / R_T", unit: W/(m^2*K), label: Thermal transmittance}
"""


def test_pdf_holds_the_formula_as_searchable_text__hand_calculation(tmp_path):
    pypdf = pytest.importorskip("pypdf")
    from calcdoc.build import build
    from conftest import write_project

    root = write_project(tmp_path / "proj", {"s1": SHEET})
    out = tmp_path / "out"
    build(root, out, pdf=True)
    text = " ".join(p.extract_text() for p in pypdf.PdfReader(out / "package.pdf").pages)
    text = re.sub(r"\s+", " ", text)
    step = text[text.index("Thermal transmittance"):]
    # U = 1 / R_T = 1 / 4.15 m²·K/W = 0.24096… → 0.241 W/(m²·K) (hand calculation, 3 s.f.)
    assert re.search(r"U = 1 RT = 1 4\.15 m2·K/W = 0\.241 W/\(m2·K\)", step), step[:200]
    # the site keeps MathML (latex2mathml), which browsers lay out themselves
    sheet = (out / "sheet-S1.html").read_text("utf-8")
    assert "<math" in sheet and 'class="m"' not in sheet


def test_demo_package_draws_every_formula_as_text():
    # Fallbacks to the image are counted over every formula line of the demo's PDF view.
    from calcdoc.evaluate import evaluate_project
    from calcdoc.project import load_project
    from calcdoc.render.html import package_view

    view = package_view(evaluate_project(load_project(ROOT / "projects" / "cold-store")), "pdf")
    shown = []
    for sheet in view["sheets"]:
        for block in sheet["blocks"]:
            for step in block["steps"]:
                if step.get("table") and step.get("multi"):
                    for column in step["columns"]:
                        shown.append(str(column["header"] or ""))
                        for row in column["rows"]:
                            shown.append(str(row["symbol"]))
                            shown.extend(str(line) for line in row["working"])
                elif step.get("table"):
                    shown.append(str(step["header"] or ""))
                    for row in step["rows"]:
                        shown.append(str(row["symbol"]))
                        shown.extend(str(line) for line in row["working"])
                else:
                    shown.append(str(step["symbol"]))
                    shown.extend(str(line) for row in step["rows"] for line in row["lines"])
    shown = [s for s in shown if s]
    images = [s for s in shown if s.startswith("<img")]
    assert len(shown) > 400  # the demo has about 500 formula lines
    assert images == [], f"{len(images)} of {len(shown)} formulas fell back to the image"


def test_site_formulas_are_unchanged_mathml():
    assert str(mathml(r"U = \frac{1}{R_{T}}")).startswith(
        '<math xmlns="http://www.w3.org/1998/Math/MathML"')


def test_stylesheet_script_shifts_match_the_layout_model():
    # math.py computes heights from the shifts the classes .xp/.xb/.yp/.yb apply (style.css)
    from calcdoc.render import math as m
    css = (ROOT / "templates" / "style.css").read_text("utf-8")
    for cls, shift, size in (("xp", m._SUP_SHIFT, 0.72), ("xb", -m._SUB_SHIFT, 0.72),
                             ("yp", m._SUP_SHIFT, 0.6 / 0.72), ("yb", -m._SUB_SHIFT, 0.6 / 0.72)):
        written = float(re.search(rf"\.m \.{cls} {{ vertical-align: (-?[\d.]+)em; }}", css)
                        .group(1))
        assert written == pytest.approx(shift / size, abs=0.001), cls
    assert m._SCRIPT_SIZE == {1: 0.72, 2: 0.6}
