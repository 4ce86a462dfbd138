"""The calculation package as a document: PDF pages, title block, attachments, safe HTML.

One small project is built once (site and PDF) and inspected many ways: page images from
pdftoppm, page text from pypdf, the HTML of the site. What is checked comes from the trade's
practice for calculation packages (common practice: every page of a calculation carries a title
block with project, package, sheet, revision, preparer and checker and "page N of M"; an
unapproved issue is marked as not for construction), from docs/format.md's contract, and from open
standards (CSS Values and Units: 1 px = 0.75 pt; PDF/A-3 keeps embedded files).
"""

from __future__ import annotations

import json
import logging
import re
import shutil
import subprocess
from pathlib import Path

import pytest

pypdf = pytest.importorskip("pypdf")

from calcdoc.build import build  # noqa: E402
from calcdoc.render.math import FORMULA_PT, split_formula, svg_img  # noqa: E402
from calcdoc.render.pdf import ConfinedFetcher, ResourceRefused, write_pdf  # noqa: E402

PROJECT = """\
project: {number: "T-201", title: Test cold room, client: Test client, site: Test site,
          organisation: Test engineers}
package: {number: TP-7, title: Test calculation package}
revisions:
  - {rev: P1, date: 2026-11-10, purpose: For review, by: AE, checked: BC, approved: ""}
  - {rev: P2, date: 2026-11-27, purpose: Issued for review after comments, by: AE,
     checked: BC, approved: ""}
"""

# 0.25 W/(m²·K) × 100 m² × 20 K = 500 W against a 400 W allowance: fails by hand arithmetic.
SHORT_SHEET = """\
id: S1
title: Wall <b>S-1</b> heat loss
signoff:
  prepared: {by: A. Engineer, date: 2026-11-20, rev: P2}
  checked: {by: B. Checker, date: 2026-11-24, rev: P2}
notes: |
  Build-up per detail 5/A-301 (example). <script>alert("notes")</script>
  <a href="javascript:alert(1)">a link</a> and <img src="http://example.com/x.png">
blocks:
  - id: loss
    kind: formula
    title: Fabric heat loss
    given:
      U: {value: 0.25 W/(m^2*K), source: Wall U-value schedule (example)}
      A: {value: 100 m^2, source: Drawing A-101 (example)}
      dT: 20 K
    steps:
      - {name: Q, expr: "U * A * dT", unit: W, label: Heat loss, source: "ISO 13790:2008, 8.3 (example of a published source)"}
    checks:
      - {result: Q, at_most: 400 W, source: Plant allowance (example)}
"""


def long_sheet(steps: int = 40) -> str:
    """A sheet of many steps, long enough to run over several pages."""
    lines = ["id: L1", "title: A long sheet over several pages", "signoff:",
             "  prepared: {by: A. Engineer, date: 2026-11-21, rev: P2}",
             "  checked: {by: B. Checker, date: 2026-11-25, rev: P2}",
             "blocks:", "  - id: chain", "    kind: formula", "    title: A chain of steps",
             "    given:", "      x_0: {value: 1.5 m, source: Survey (example)}",
             "      k: 1.01", "    steps:"]
    for i in range(1, steps + 1):
        lines.append(f"      - {{name: x_{i}, expr: \"x_{i - 1} * k + x_0 / {i + 1}\", "
                     f"unit: m, label: Step {i}}}")
    return "\n".join(lines) + "\n"


REVIEW = """\
reviewer: R. Reviewer
comments:
  - {on: S1.loss, by: RR, date: 2026-11-26, text: Confirm the wall area, status: open,
     response: ""}
  - {on: L1, by: RR, date: 2026-11-26, text: State the survey date, status: answered,
     response: Added to the notes}
"""


def write_project(root: Path) -> Path:
    (root / "sheets").mkdir(parents=True)
    (root / "project.yaml").write_text(PROJECT)
    (root / "sheets" / "s1.yaml").write_text(SHORT_SHEET)
    (root / "sheets" / "l1.yaml").write_text(long_sheet())
    (root / "review.yaml").write_text(REVIEW)
    return root


@pytest.fixture(scope="module")
def built(tmp_path_factory):
    """Build the project once with its PDF; return (out_dir, WeasyPrint warnings)."""
    root = write_project(tmp_path_factory.mktemp("render") / "proj")
    out = root.parent / "out"
    records: list[logging.LogRecord] = []

    class Keep(logging.Handler):
        def emit(self, record):
            records.append(record)

    handler = Keep(level=logging.WARNING)
    logger = logging.getLogger("weasyprint")
    logger.addHandler(handler)
    try:
        build(root, out, pdf=True)
    finally:
        logger.removeHandler(handler)
    return out, [r.getMessage() for r in records if r.levelno >= logging.WARNING]


@pytest.fixture(scope="module")
def pages(built):
    out, _ = built
    reader = pypdf.PdfReader(out / "package.pdf")
    # the templates keep "✘ FAIL" and "1 of 2" together with no-break spaces
    return [page.extract_text().replace("\xa0", " ") for page in reader.pages]


# ------------------------------------------------------------------ PDF pages and title block

def test_every_pdf_page_carries_the_title_block_with_page_n_of_m(pages):
    total = len(pages)
    assert total >= 6, "cover, contents, two sheets (one over several pages), references"
    for n, text in enumerate(pages, start=1):
        assert "T-201" in text, f"page {n}: project number"
        assert "TP-7" in text, f"page {n}: package number"
        assert f"{n} of {total}" in text, f"page {n}: page N of M over the whole package"
        assert "REVISION" in text.upper() and "P2" in text, f"page {n}: current revision"


def test_continuation_pages_of_a_long_sheet_repeat_its_title_block(pages):
    on_l1 = [n for n, text in enumerate(pages, start=1)
             if re.search(r"SHEET\s+L1 A long sheet", text)]
    assert len(on_l1) >= 2, "the long sheet runs over more than one page"
    for n in on_l1:
        text = pages[n - 1]
        assert "AE 2026-11-21" in text, f"page {n}: preparer initials and date"
        assert "BC 2026-11-25" in text, f"page {n}: checker initials and date"


def test_every_page_is_marked_preliminary_until_the_revision_is_approved(pages):
    for n, text in enumerate(pages, start=1):
        assert "PRELIMINARY — NOT FOR CONSTRUCTION" in text, f"page {n}"


def test_cover_sheet_has_revision_history_oldest_first_seal_area_and_caution(pages):
    cover = pages[0]
    assert "Revision history" in cover
    history = cover[cover.index("Revision history"):]
    assert history.index("P1 2026-11-10 For review") < history.index("P2"), \
        "oldest revision first"
    assert "ENGINEER'S SEAL" in cover.upper() and "Signature" in cover
    assert "do not replace, the judgement of a licensed engineer" in " ".join(cover.split())
    assert "Test client" in cover and "Test site" in cover and "Test engineers" in cover


def test_summary_of_results_marks_a_failing_check_by_word_and_symbol(pages):
    front = pages[1] + pages[2]
    assert "Summary of results" in front
    assert "S1.loss.Q" in front
    assert "✘ FAIL" in front, "a failure reads in black and white: a word and a symbol"
    assert "1 of 1 checks FAIL" in front


def test_pdf_pages_render_to_images_with_the_title_block_drawn(built, tmp_path):
    pdftoppm = shutil.which("pdftoppm")
    if pdftoppm is None:
        pytest.skip("pdftoppm (poppler-utils) is not installed")
    from PIL import Image
    out, _ = built
    total = len(pypdf.PdfReader(out / "package.pdf").pages)
    for page in (1, 3, total):
        prefix = tmp_path / f"page{page}"
        subprocess.run([pdftoppm, "-r", "40", "-png", "-f", str(page), "-l", str(page),
                        str(out / "package.pdf"), str(prefix)], check=True)
        (image_path,) = tmp_path.glob(f"page{page}*.png")
        image = Image.open(image_path).convert("L")
        width, height = image.size
        # A4 at 40 dpi; the title block sits in the top margin (33 mm of 297 mm).
        assert abs(height / width - 297 / 210) < 0.01
        band = image.crop((0, 0, width, int(height * 33 / 297)))
        dark = sum(1 for v in band.tobytes() if v < 100)
        assert dark > width, f"page {page}: the title block's rules and text are drawn"


def test_pdf_build_prints_no_weasyprint_warnings(built):
    _, warnings = built
    assert warnings == []


# ------------------------------------------------------------------ attachments (PDF/A-3)

def test_pdf_attaches_every_input_file_and_results_json(built):
    out, _ = built
    attachments = pypdf.PdfReader(out / "package.pdf").attachments
    for name in ("project.yaml", "review.yaml", "sheets/s1.yaml", "sheets/l1.yaml",
                 "results.json"):
        assert name in attachments, name
    (results,) = attachments["results.json"]
    assert json.loads(results) == json.loads((out / "results.json").read_text("utf-8"))
    (sheet,) = attachments["sheets/s1.yaml"]
    assert sheet.decode("utf-8") == SHORT_SHEET


def test_pdf_is_declared_pdf_a_3b(built):
    out, _ = built
    reader = pypdf.PdfReader(out / "package.pdf")
    xmp = reader.trailer["/Root"]["/Metadata"].get_object().get_data().decode("utf-8")
    # ISO 19005-3: the XMP identification schema names part 3, conformance level B
    assert 'pdfaid:part="3"' in xmp and 'pdfaid:conformance="B"' in xmp


# ------------------------------------------------------------------ safe HTML

def test_markdown_notes_are_sanitised_in_site_and_pdf_html(built):
    out, _ = built
    html = (out / "sheet-S1.html").read_text("utf-8")
    assert "<script" not in html
    assert 'alert("notes")' not in html
    assert "javascript:" not in html
    assert "example.com/x.png" not in html, "no remote image: the site works offline"
    assert "Build-up per detail 5/A-301" in html


def test_titles_are_escaped_by_the_templates(built):
    out, _ = built
    for page in ("index.html", "sheet-S1.html"):
        html = (out / page).read_text("utf-8")
        assert "Wall &lt;b&gt;S-1&lt;/b&gt; heat loss" in html, page
        assert "<b>S-1</b>" not in html, page


# ------------------------------------------------------------------ confined resource loading

def test_url_fetcher_refuses_a_file_outside_the_build_folder(tmp_path):
    inside = tmp_path / "build"
    inside.mkdir()
    outside = tmp_path / "secret.txt"
    outside.write_text("not for the PDF")
    fetcher = ConfinedFetcher(inside)
    with pytest.raises(ResourceRefused):
        fetcher.fetch(outside.as_uri())
    with pytest.raises(ResourceRefused):
        fetcher.fetch((inside / ".." / "secret.txt").as_uri())
    assert outside.as_uri() in fetcher.refused


def test_url_fetcher_refuses_http_and_serves_data_and_inside_files(tmp_path):
    (tmp_path / "style.css").write_text("p { color: black }")
    fetcher = ConfinedFetcher(tmp_path)
    for url in ("http://example.com/logo.png", "https://example.com/font.woff2",
                "ftp://example.com/x"):
        with pytest.raises(ResourceRefused):
            fetcher.fetch(url)
    assert fetcher.fetch((tmp_path / "style.css").as_uri()).read() == b"p { color: black }"
    assert fetcher.fetch("data:text/plain;base64,b2s=").read() == b"ok"


def test_pdf_build_fails_on_a_remote_image_instead_of_fetching_it(tmp_path):
    html = '<html><body><p>x</p><img src="http://example.com/seal.png"></body></html>'
    with pytest.raises(ResourceRefused):
        write_pdf(html, tmp_path, tmp_path / "x.pdf", [], "2026-11-10", "seed")
    assert not (tmp_path / "x.pdf").exists()


# ------------------------------------------------------------------ references and review

def test_citations_link_to_the_numbered_references_on_site_and_in_pdf(built):
    out, _ = built
    sheet = (out / "sheet-S1.html").read_text("utf-8")
    index = (out / "index.html").read_text("utf-8")
    cited = set(re.findall(r'href="index\.html#ref-(\d+)"', sheet))
    assert cited, "the sheet cites its published sources as [n, clause]"
    for n in cited:
        assert f'id="ref-{n}"' in index
    # a published document is a numbered reference, cited with the clause...
    assert re.search(r'\[\d+, 8\.3 \(example of a published source\)\]', sheet)
    entry = re.search(r'<li id="ref-\d+"[^>]*>.*?ISO 13790:2008.*?</li>', index, re.S).group(0)
    assert 'href="sheet-S1.html#S1.loss"' in entry, "each reference lists where it is used"
    # ...project information is printed beside the input and listed apart, never numbered
    assert not re.search(r'<li id="ref-\d+"[^>]*>[^<]*Drawing A-101', index)
    listing = index[index.index('id="project-information"'):]
    assert "Drawing A-101 (example)" in listing and 'href="sheet-S1.html#S1.loss"' in listing


def test_review_comment_is_shown_at_its_block_and_counted_open_on_the_index(built):
    out, _ = built
    sheet = (out / "sheet-S1.html").read_text("utf-8")
    block = sheet[sheet.index('id="S1.loss"'):]
    assert "Confirm the wall area" in block[:block.index("Inputs")]
    index = (out / "index.html").read_text("utf-8")
    row = re.search(r"<tr[^>]*>\s*<td><a href=\"sheet-S1.html\">.*?</tr>", index, re.S).group(0)
    assert "●&#xA0;1" in row or "● 1" in row
    assert 'id="log-1"' in index and 'id="log-2"' in index, "the comment log lists both"


# ------------------------------------------------------------------ formulas

def test_formula_images_are_sized_in_pt_from_css_px(tmp_path):
    # CSS Values and Units Level 3 §5.2: 1 px = 1/96 in and 1 pt = 1/72 in, so 1 px = 0.75 pt.
    import base64
    img = svg_img("M")
    width_pt = float(re.search(r"width:([\d.]+)pt", img).group(1))
    svg = base64.b64decode(re.search(r"base64,([^\"]+)", img).group(1)).decode()
    width_px = float(re.search(r'width="([\d.]+)"', svg).group(1))
    assert width_pt == pytest.approx(width_px * 0.75, abs=0.01)
    # Drawn at FORMULA_PT, a capital M stands one cap height tall, about 0.65–0.72 em in text
    # faces (from memory), inside ziamath's 1 px margin above and below.
    height_px = float(re.search(r'height="([\d.]+)"', svg).group(1))
    cap_height_pt = height_px * 0.75 - 2 * 0.75
    assert 0.6 * FORMULA_PT < cap_height_pt < 0.75 * FORMULA_PT


def test_formula_images_carry_their_latex_as_alt_text():
    img = svg_img(r"Q = U A \Delta T")
    assert 'alt="Q = U A \\Delta T"' in img


def test_a_long_sum_is_broken_before_a_plus_and_never_inside_a_group():
    terms = [rf"{0.1 + i:.3f}\,\mathrm{{m^{{2}}\cdot K/W}}" for i in range(12)]
    latex = "= " + " + ".join(terms) + r" + \frac{1}{2 + 3 + 4}"
    lines = split_formula(latex, 300.0)
    assert len(lines) > 1
    assert all(line.startswith("{} + ") for line in lines[1:])
    assert r"\frac{1}{2 + 3 + 4}" in lines[-1]
    assert "".join(line.removeprefix("{} ") + " " for line in lines).split() == \
        latex.split()


def test_site_formulas_stay_plain_mathml_after_a_pdf_was_made(built):
    # WeasyPrint rewrites ElementTree's global namespace registry while writing PDF metadata;
    # a later site build must still write <math>, which browsers know, never <ns0:math>.
    from calcdoc.render.math import mathml
    text = str(mathml(r"U = \frac{1}{R_{T}}"))
    assert text.startswith('<math xmlns="http://www.w3.org/1998/Math/MathML"')
    assert "ns0:" not in text


def test_every_in_document_link_of_the_pdf_has_its_anchor(tmp_path):
    # Contents, summary of results, citations [n], comment log and refs between sheets are
    # in-document links: each must name an id of the one package document.
    from calcdoc.evaluate import evaluate_project
    from calcdoc.project import load_project
    from calcdoc.render.html import package_view, render_package_html
    package = evaluate_project(load_project(write_project(tmp_path / "proj")))
    html = render_package_html(package_view(package, "pdf"))
    ids = set(re.findall(r'\sid="([^"]+)"', html))
    targets = set(re.findall(r'href="#([^"]+)"', html))
    assert {"S1.loss.Q.check", "ref-1", "summary", "references", "comment-log", "L1",
            "S1.loss"} <= targets
    assert targets - ids == set()
    assert not re.search(r'href="(?!#|data:)', html.split("</head>", 1)[1]), \
        "the package document links only within itself"


def test_an_approved_revision_prints_no_preliminary_mark(tmp_path):
    root = tmp_path / "proj"
    (root / "sheets").mkdir(parents=True)
    (root / "project.yaml").write_text(PROJECT.replace(
        'purpose: Issued for review after comments, by: AE,\n     checked: BC, approved: ""',
        "purpose: For construction, by: AE,\n     checked: BC, approved: C. Approver"))
    (root / "sheets" / "s1.yaml").write_text(SHORT_SHEET.replace("400 W", "600 W"))
    out = tmp_path / "out"
    build(root, out, pdf=True)
    for n, page in enumerate(pypdf.PdfReader(out / "package.pdf").pages, start=1):
        text = page.extract_text()
        assert "PRELIMINARY" not in text, f"page {n}"
        assert "T-201" in text and "TP-7" in text
    assert "Approved by C. Approver" in " ".join(
        pypdf.PdfReader(out / "package.pdf").pages[0].extract_text().split())


def test_a_long_value_to_confirm_wraps_inside_its_column_in_the_pdf(tmp_path):
    """A value of several numbers (a rolled section's dimensions, as SB1 of the demo uses) once
    ran over the next column, the document to check it against. Laid out with the package's
    stylesheet, every line of the cell stays inside the cell (common practice for a table: a
    cell's text never overlaps its neighbour)."""
    import weasyprint
    from weasyprint.formatting_structure import boxes

    from calcdoc.render.html import TEMPLATES
    value = "h 355, b 171.5, t_w 7.4, t_f 11.5, r 10.2 (mm)"
    html = ('<html><body class="pdf"><table class="to-confirm"><thead><tr><th>Value</th>'
            '<th class="num">As used</th><th>Check against</th><th>Used in</th></tr></thead>'
            f'<tbody><tr><td>rolled section UB 356x171x51: dimensions</td>'
            f'<td class="num" id="v">{value}</td><td>BS 4-1:2005</td><td>SB1.beam</td></tr>'
            '</tbody></table></body></html>')
    css = weasyprint.CSS(filename=str(TEMPLATES / "style.css"))
    page = weasyprint.HTML(string=html).render(stylesheets=[css]).pages[0]

    def find(box):
        if getattr(box, "element", None) is not None and box.element.get("id") == "v" \
                and isinstance(box, boxes.TableCellBox):
            return box
        for child in getattr(box, "children", ()):
            found = find(child)
            if found:
                return found
    cell = find(page._page_box)
    lines = [b for b in cell.descendants() if isinstance(b, boxes.LineBox)]
    assert len(lines) > 1  # it wraps
    right = cell.content_box_x() + cell.width
    for line in lines:
        ends = [b.position_x + b.margin_width() for b in line.descendants()
                if isinstance(b, boxes.TextBox)]
        assert max(ends) <= right + 0.01, (max(ends), right)
