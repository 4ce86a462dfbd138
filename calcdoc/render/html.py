"""The evaluated package as view data, and the static HTML site rendered from it.

:func:`package_view` turns an evaluated :class:`~calcdoc.model.Package` into plain dicts that the
templates print: nothing here computes a physical value. The same view feeds the site (MathML,
inline SVG) and the PDF (formula images), so both show the same numbers and the same citations.
"""

from __future__ import annotations

import re
from pathlib import Path

import jinja2
import markdown
import nh3
from markupsafe import Markup

from calcdoc import __version__
from calcdoc.render.math import mathml, svg_img
from calcdoc.units import latex_quantity

__all__ = ["package_view", "render_site", "render_package_html", "environment", "TEMPLATES",
           "CAUTION", "sheet_page_name"]

TEMPLATES = Path(__file__).resolve().parent.parent.parent / "templates"
if not TEMPLATES.is_dir():  # installed as a wheel: templates are package data
    TEMPLATES = Path(__file__).resolve().parent.parent / "templates"

CAUTION = ("These calculations support, and do not replace, the judgement of a licensed "
           "engineer and the requirements of the local building code and the authority having "
           "jurisdiction. Results depend on the inputs and methods stated; check both before "
           "relying on them.")

_ALLOWED_TAGS = {"p", "em", "strong", "code", "pre", "ul", "ol", "li", "blockquote", "a", "br",
                 "h3", "h4", "h5", "table", "thead", "tbody", "tr", "th", "td", "sub", "sup",
                 "hr"}


def notes_html(text: str) -> Markup:
    """Return Markdown notes as sanitised HTML (no scripts, no styles, no remote images)."""
    if not text:
        return Markup("")
    html = markdown.markdown(text, extensions=["tables"], output_format="html")
    return Markup(nh3.clean(html, tags=_ALLOWED_TAGS, attributes={"a": {"href", "title"}},
                            url_schemes={"http", "https", "mailto"}, link_rel="noopener"))


def initials(name: str) -> str:
    """Return a signatory's initials: 'A. Engineer' → 'AE'; short tokens are kept as given."""
    name = name.strip()
    if not name:
        return ""
    if " " not in name and "." not in name and len(name) <= 4:
        return name
    return "".join(part[0].upper() for part in re.split(r"[\s.]+", name) if part)


def sheet_page_name(sheet_id: str) -> str:
    return f"sheet-{sheet_id}.html"


class Citations:
    """Numbered sources: the first use of a source text takes the next number."""

    def __init__(self):
        self.numbers: dict[str, int] = {}
        self.uses: dict[int, list[str]] = {}

    def cite(self, source: str, where: str = "") -> int | None:
        source = (source or "").strip()
        if not source:
            return None
        if source not in self.numbers:
            self.numbers[source] = len(self.numbers) + 1
        n = self.numbers[source]
        if where and where not in self.uses.setdefault(n, []):
            self.uses[n].append(where)
        return n

    def listing(self) -> list[dict]:
        return [{"n": n, "text": text, "uses": self.uses.get(n, [])}
                for text, n in sorted(self.numbers.items(), key=lambda kv: kv[1])]


def _relation(relation: str) -> str:
    return "≤" if relation == "at_most" else "≥"


def _block_view(block, cites: Citations, math, comments_on, target: str) -> dict:
    out = block.output
    key = block.key
    inputs = []
    for r in block.inputs:
        inputs.append({"path": r.path, "meaning": r.meaning, "display": r.display,
                       "written": r.written, "origin": r.origin, "ref": r.ref,
                       "ref_href": _ref_href(r.ref, target) if r.ref else None,
                       "cite": cites.cite(r.source, key) if r.origin != "ref" else None,
                       "source": r.source,
                       "where": f"{r.loc.file}:{r.loc.line}" if r.loc and r.loc.line else ""})
    steps = []
    for s in out.steps:
        result = (latex_quantity(float(s.value_si), s.si_unit, s.display_unit, out.precision)
                  if not isinstance(s.value_si, (list, tuple)) else "")
        parts = [s.symbol, s.formula]
        if s.substituted and s.substituted != s.formula:
            parts.append(s.substituted)
        if result:
            parts.append(result)
        latex = " = ".join(parts)
        steps.append({"label": s.label, "latex": latex, "math": math(latex),
                      "display": s.display, "cite": cites.cite(s.source, key)})
    results = []
    for name, r in out.results.items():
        results.append({"name": name, "meaning": r.spec.meaning, "display": r.display,
                        "anchor": f"{key}.{name}", "absent": False})
    for name, why in out.absent.items():
        spec = out._specs.get(name)
        results.append({"name": name, "meaning": spec.meaning if spec else "", "display": why,
                        "anchor": f"{key}.{name}", "absent": True})
    checks = []
    for c in block.checks:
        checks.append({"result": c.result, "relation": _relation(c.relation),
                       "value": c.value_display, "limit": c.limit_display,
                       "margin": c.margin_display,
                       "utilisation": f"{c.utilisation:.2f}" if c.utilisation is not None
                       and c.utilisation != float("inf") else "—",
                       "passed": c.passed, "note": c.note,
                       "cite": cites.cite(c.source, key), "anchor": f"{key}.{c.result}",
                       "block": key, "block_title": block.spec.title})
    notes = [{"text": n["text"], "cite": cites.cite(n["source"], key)} for n in out.notes]
    warnings = [{"text": w["message"], "cite": cites.cite(w["source"], key)}
                for w in out.warnings]
    figures = []
    if block.kind.figures is not None:
        for fig in block.kind.figures(block):
            figures.append({"key": fig.key, "caption": fig.caption, "svg": Markup(fig.svg),
                            "img": Markup(_svg_data_img(fig.svg, fig.caption))})
    for ref in block.kind.references:
        cites.cite(ref, key)
    return {"key": key, "id": block.id, "title": block.spec.title, "kind": block.kind.name,
            "kind_title": block.kind.title, "inputs": inputs, "steps": steps,
            "results": results, "checks": checks, "notes": notes, "warnings": warnings,
            "figures": figures, "caution": block.kind.caution,
            "block_notes": notes_html(block.spec.notes),
            "comments": comments_on.get(key, []), "passed": block.passed,
            "series": list(out.series)}


def _ref_href(ref: str, target: str) -> str:
    """Return the link to a result anchor: another page on the site, in-document in the PDF."""
    if target == "site":
        return f"{sheet_page_name(ref.split('.')[0])}#{ref}"
    return f"#{ref}"


def _svg_data_img(svg: str, alt: str) -> str:
    import base64
    from markupsafe import escape
    data = base64.b64encode(svg.encode("utf-8")).decode("ascii")
    return f'<img class="figure" alt="{escape(alt)}" src="data:image/svg+xml;base64,{data}">'


def package_view(package, target: str = "site") -> dict:
    """Return the whole package as view data for the templates (``target``: site | pdf)."""
    project = package.project
    math = mathml if target == "site" else svg_img
    cites = Citations()
    comments_on: dict[str, list[dict]] = {}
    comments = []
    for i, c in enumerate(project.comments, start=1):
        item = {"n": i, "on": c.on, "by": c.by, "date": c.date, "text": c.text,
                "status": c.status, "response": c.response}
        comments.append(item)
        comments_on.setdefault(c.on, []).append(item)
    sheets = []
    for index, sheet in enumerate(package.sheets):
        blocks = [_block_view(b, cites, math, comments_on, target) for b in sheet.blocks]
        spec = sheet.spec
        signoff = {role: {"by": s.by, "initials": initials(s.by), "date": s.date, "rev": s.rev}
                   for role, s in spec.signoff.items()}
        checks = [c for b in blocks for c in b["checks"]]
        sheet_comments = comments_on.get(spec.id, [])
        all_comments = sheet_comments + [c for b in blocks for c in b["comments"]]
        sheets.append({
            "id": spec.id, "title": spec.title, "file": spec.relpath,
            "page": sheet_page_name(spec.id), "notes": notes_html(spec.notes),
            "signoff": signoff, "blocks": blocks, "checks": checks,
            "failed": sum(1 for c in checks if not c["passed"]),
            "comments": sheet_comments,
            "open_comments": sum(1 for c in all_comments if c["status"] == "open"),
            "checked_current": "checked" in spec.signoff
            and spec.signoff["checked"].rev == project.revision.rev,
            "index": index,
        })
    for i, sheet in enumerate(sheets):
        sheet["previous"] = sheets[i - 1] if i > 0 else None
        sheet["next"] = sheets[i + 1] if i + 1 < len(sheets) else None
    revision = project.revision
    all_checks = [c for s in sheets for c in s["checks"]]
    return {
        "calcdoc_version": __version__,
        "project": {"number": project.number, "title": project.title, "client": project.client,
                    "site": project.site, "organisation": project.organisation},
        "package": {"number": project.package_number, "title": project.package_title},
        "revision": {"rev": revision.rev, "date": revision.date, "purpose": revision.purpose,
                     "by": revision.by, "checked": revision.checked,
                     "approved": revision.approved},
        "revisions": [vars(r) for r in project.revisions],
        "preliminary": not revision.approved.strip(),
        "sheets": sheets,
        "checks": all_checks,
        "failed": sum(1 for c in all_checks if not c["passed"]),
        "references": cites.listing(),
        "comments": comments,
        "open_comments": sum(1 for c in comments if c["status"] == "open"),
        "reviewer": project.reviewer,
        "caution": CAUTION,
        "target": target,
    }


def environment() -> jinja2.Environment:
    env = jinja2.Environment(loader=jinja2.FileSystemLoader(str(TEMPLATES)),
                             autoescape=jinja2.select_autoescape(["html", "xml"]),
                             undefined=jinja2.StrictUndefined, trim_blocks=True,
                             lstrip_blocks=True, keep_trailing_newline=True)
    env.globals["sheet_page_name"] = sheet_page_name
    return env


def render_site(view: dict, out_dir: Path) -> list[Path]:
    """Write index.html, one page per sheet and the stylesheet; return the files written."""
    env = environment()
    written = []
    (out_dir / "assets").mkdir(parents=True, exist_ok=True)
    css = out_dir / "assets" / "style.css"
    css.write_text((TEMPLATES / "style.css").read_text(encoding="utf-8"), encoding="utf-8")
    written.append(css)
    index = out_dir / "index.html"
    index.write_text(env.get_template("index.html").render(view=view, page=None),
                     encoding="utf-8")
    written.append(index)
    template = env.get_template("sheet.html")
    for sheet in view["sheets"]:
        path = out_dir / sheet["page"]
        path.write_text(template.render(view=view, sheet=sheet, page=sheet["page"]),
                        encoding="utf-8")
        written.append(path)
    return written


def render_package_html(view: dict) -> str:
    """Return the one HTML document that WeasyPrint paginates into the PDF package."""
    return environment().get_template("package.html").render(view=view)
