"""The evaluated package as view data, and the static HTML site rendered from it.

:func:`package_view` turns an evaluated :class:`~calcdoc.model.Package` into plain dicts that the
templates print: nothing here computes a physical value. The same view feeds the site (MathML,
inline SVG) and the PDF (formula images), so both show the same numbers, the same line breaks in
long formulas and the same citation numbers.

Anchors are stable and readable: a block is ``SHEET.block`` and a result ``SHEET.block.result``
(a reviewer can link "EW1.wall.U"); a check row is ``SHEET.block.result.check``; a reference is
``ref-N``; a review comment is ``comment-N`` where it is shown and ``log-N`` in the comment log.
"""

from __future__ import annotations

import ast
import base64
import dataclasses
import functools
import re
from contextlib import contextmanager
from pathlib import Path

import jinja2
import markdown
import nh3
from markupsafe import Markup, escape

from calcdoc import __version__
from calcdoc import progress as _progress
from calcdoc.data import Value
from calcdoc.expressions import CONSTANTS, parse_expression, symbol_latex, to_latex
from calcdoc.render.math import fits_width, formula_width_pt, mathml, pdf_math, split_formula
from calcdoc.render.memo import MEMO, data_digest
from calcdoc.render.plots import Drawn, draw
from calcdoc.render.numbers import pretty_unit, pretty_written
from calcdoc.render.printed import PrintedStep, fill, print_check, print_curve, print_value
from calcdoc.provenance import values_to_confirm
from calcdoc.references import PROJECT, PUBLISHED, split
from calcdoc.render.status import signoff_state

__all__ = ["package_view", "render_site", "render_package_html", "environment", "TEMPLATES",
           "CAUTION", "PRELIMINARY", "sheet_page_name", "notes_html", "initials", "Citations"]

# Installed from a wheel, the templates are package data (calcdoc/templates, mapped from the
# repository's templates/ by pyproject.toml); in a checkout they are the repository's own. The
# package's copy is looked for first: beside an installed calcdoc, site-packages/templates may be
# another distribution's folder.
TEMPLATES = Path(__file__).resolve().parent.parent / "templates"
if not (TEMPLATES / "style.css").is_file():
    TEMPLATES = Path(__file__).resolve().parent.parent.parent / "templates"

CAUTION = ("These calculations support, and do not replace, the judgement of a licensed "
           "engineer and the requirements of the local building code and the authority having "
           "jurisdiction. Results depend on the inputs and methods stated; check both before "
           "relying on them.")

PRELIMINARY = "PRELIMINARY — NOT FOR CONSTRUCTION"

# Width of the right-hand side of a formula step before it is broken [pt]: about two thirds of
# the A4 text width, so that symbol, '=' and a long sum still read as one line of working.
STEP_WIDTH_PT = 290.0

_ALLOWED_TAGS = {"p", "em", "strong", "code", "pre", "ul", "ol", "li", "blockquote", "a", "br",
                 "h3", "h4", "h5", "table", "thead", "tbody", "tr", "th", "td", "sub", "sup",
                 "hr"}


def notes_html(text: str) -> Markup:
    """Return Markdown notes as sanitised HTML (no scripts, no styles, no images, no raw HTML)."""
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
    """Return the site page of a sheet: 'EW1' → 'sheet-EW1.html'."""
    return f"sheet-{sheet_id}.html"


class Citations:
    """Sources as the package prints them (calcdoc.references): published documents numbered
    in order of first use, one entry per document and edition, cited as [n, clause]; project
    information printed beside what it supports and listed apart; statements printed beside."""

    def __init__(self):
        self.numbers: dict[str, int] = {}
        self.uses: dict[int, list[str]] = {}
        self.project: dict[str, list[str]] = {}

    def cite(self, source, used_in: str = "", project: bool = True) -> dict | None:
        """Return how to print a source where it is used: {"text", "refs": [{"n", "where"}]}.

        ``project`` False: a library's own words (a material's typical value), printed beside
        but not listed as the project's information."""
        parts = split(source) if source else []
        if not parts:
            return None
        text, refs = [], []
        for part in parts:
            if part.kind == PUBLISHED:
                if part.document not in self.numbers:
                    self.numbers[part.document] = len(self.numbers) + 1
                n = self.numbers[part.document]
                if used_in and used_in not in self.uses.setdefault(n, []):
                    self.uses[n].append(used_in)
                refs.append({"n": n, "where": part.where})
            else:
                text.append(part.text)
                if part.kind == PROJECT and project:
                    uses = self.project.setdefault(part.text, [])
                    if used_in and used_in not in uses:
                        uses.append(used_in)
        return {"text": "; ".join(text), "refs": refs}

    def mark(self) -> tuple:
        """Where the citations stand now, for :meth:`since`."""
        return (set(self.numbers), {n: len(u) for n, u in self.uses.items()},
                {t: len(u) for t, u in self.project.items()})

    def since(self, mark: tuple) -> dict:
        """What was cited after ``mark`` (documents numbered, uses noted), as JSON data that
        :meth:`replay` applies again: a sheet whose view comes from the build cache cites
        exactly what it cited when the view was built."""
        documents, uses, project = mark
        return {"numbers": [[d, n] for d, n in self.numbers.items() if d not in documents],
                "uses": [[n, u[uses.get(n, 0):]] for n, u in self.uses.items()
                         if len(u) > uses.get(n, 0)],
                "project": [[t, u[project.get(t, 0):]] for t, u in self.project.items()
                            if t not in project or len(u) > project[t]]}

    def replay(self, cited: dict) -> None:
        for document, n in cited["numbers"]:
            self.numbers[document] = n
        for n, uses in cited["uses"]:
            self.uses.setdefault(n, []).extend(uses)
        for text, uses in cited["project"]:
            self.project.setdefault(text, []).extend(uses)

    def listing(self) -> list[dict]:
        return [{"n": n, "text": text, "uses": self.uses.get(n, [])}
                for text, n in sorted(self.numbers.items(), key=lambda kv: kv[1])]

    def project_information(self) -> list[dict]:
        return [{"text": text, "uses": uses} for text, uses in self.project.items()]


class _Links:
    """Where an anchor lives: on a site page, or in the one PDF document."""

    def __init__(self, target: str, sheets: set[str] | None = None):
        self.target = target
        self.sheets = sheets  # the sheets this package holds (None: all)

    def anchor(self, key: str) -> str | None:
        """Return the link to a sheet, block or result key ('EW1', 'EW1.wall', 'EW1.wall.U');
        None for a sheet a partial package does not hold."""
        if self.sheets is not None and key.split(".")[0] not in self.sheets:
            return None
        if self.target == "site":
            return f"{sheet_page_name(key.split('.')[0])}#{key}"
        return f"#{key}"

    def index(self, fragment: str) -> str:
        """Return the link to a part of the front or back matter (references, comment log)."""
        return f"index.html#{fragment}" if self.target == "site" else f"#{fragment}"


_NUMERIC = re.compile(r"^[−+\-]?\d")


def _relation(relation: str) -> str:
    return "≤" if relation == "at_most" else "≥"


def _working_lines(segments: list[str], width: float) -> list[str]:
    """Pack the parts of a line of working ('formula', '= numbers', '= result') into lines no
    wider than ``width``: as many parts on a line as fit, a long part broken on its own."""
    lines: list[str] = []
    current = ""
    for segment in segments:
        trial = f"{current} {segment}".strip()
        if current and not _fits(trial, width):
            lines.append(current)
            current = segment
        else:
            current = trial
        if not _fits(current, width):
            pieces = split_formula(current, width)
            lines.extend(pieces[:-1])
            current = pieces[-1]
    if current:
        lines.append(current)
    return lines


def _fits(latex: str, width: float) -> bool:
    return fits_width(latex, width)


_SMALLEST = 0.66  # the smallest a line of working is set to fit its column, of its size


def _fitted(math, latex: str, width: float) -> Markup:
    """A line of working that cannot be broken (a wide fraction) and is wider than its column,
    set smaller to fit it (down to two thirds of its size) instead of running over."""
    shown = math(latex)
    if fits_width(latex, width):
        return shown
    # the scale is printed, so it is measured, unless the formula is surely wide enough to be
    # set at the smallest size
    scale = _SMALLEST if not fits_width(latex, width / _SMALLEST) else max(
        width / formula_width_pt(latex), _SMALLEST)
    return Markup(f'<span class="fit" style="font-size: {100 * scale:.0f}%">{shown}</span>')


def _step_view(step: PrintedStep, math) -> dict:
    """Return a step as a checker writes it, on one line where it fits: symbol = formula =
    numbers = result; a statement says what was done and gives its result."""
    if step.expr is not None:
        segments = []
        for latex in (step.latex_formula, step.latex_substituted, step.latex_result):
            if latex and ("= " + latex) not in segments:
                segments.append("= " + latex)
    else:
        segments = ["= " + step.latex_result]
    lines = _working_lines(segments, STEP_WIDTH_PT)
    rows = [{"kind": "working", "lines": [_fitted(math, line, STEP_WIDTH_PT) for line in lines]}]
    return {"symbol": math(step.latex_symbol), "rows": rows, "label": step.label,
            "statement": step.statement or "", "display": "", "name": step.name,
            "group": step.group, "item": step.item,
            "alt": " ".join([step.latex_symbol] + segments)}


_INDEXED = re.compile(r"^(?P<base>[A-Za-z][A-Za-z_]*?)_?(?P<index>\d+)$")
_OFFSETS = {0: "_j", -1: "_jm", 1: "_jp"}


def _generic_formula(steps: list[PrintedStep]) -> str | None:
    """Return the formula of a group of steps with the item's index as j ('R_j = d_j /
    lambda_j', 'θ_j = θ_{j-1} − q R_j'), or None when the rows do not share one formula."""
    def index_of(name: str) -> tuple[str, int] | None:
        match = _INDEXED.match(name)
        return (match["base"], int(match["index"])) if match else None

    shapes = set()
    for row, step in enumerate(steps, start=1):
        own = index_of(step.name)
        own_index = own[1] if own else row
        names: dict[str, str] = {}
        for name in [step.name] + list(step.values):
            found = index_of(name)
            if found is None:
                names[name] = name
                continue
            offset = found[1] - own_index
            if offset not in _OFFSETS:
                return None
            names[name] = found[0].rstrip("_") + _OFFSETS[offset]
        shapes.add((names[step.name], _rename(step.expr, names)))
    if len(shapes) != 1:
        return None
    name, expr = shapes.pop()
    symbols = steps[0].symbols
    left = symbols.get(name) or _generic_symbol(name)
    return f"{left} = " + to_latex(parse_expression(expr),
                                   lambda n: symbols.get(n) or _generic_symbol(n))


def _rename(expr: str, names: dict) -> str:
    tree = ast.parse(expr, mode="eval")
    for node in ast.walk(tree):
        if isinstance(node, ast.Name) and node.id in names:
            node.id = names[node.id]
    return ast.unparse(tree)


def _generic_symbol(name: str) -> str:
    """The symbol of a name with the item's index: 'R_j' → R_{j}, 'theta_jm' → θ_{j-1}."""
    for suffix, index in (("_jm", "j-1"), ("_jp", "j+1"), ("_j", "j")):
        if name.endswith(suffix) and len(name) > len(suffix):
            base = symbol_latex(name[:-len(suffix)])
            if base.endswith("}") and "_{" in base:
                return base[:-1] + "," + index + "}"
            return base + "_{" + index + "}"
    if name in CONSTANTS:
        return CONSTANTS[name][2]
    return symbol_latex(name)


def _group_rows(run: list[PrintedStep], math, cites, key: str, width: float) -> list[dict]:
    rows = []
    for s in run:
        segments = ([f"= {s.latex_substituted}", f"= {s.latex_result}"]
                    if s.expr else [f"= {s.latex_result}"])
        rows.append({"item": s.item or s.label, "symbol": math(s.latex_symbol),
                     "working": [_fitted(math, line, width)
                                 for line in _working_lines(segments, width)],
                     "formula": None, "statement": s.statement or "",
                     "cite": cites.cite(s.source, key, project=False)})
    return rows


def _cycles(run: list[PrintedStep]) -> list[list[PrintedStep]] | None:
    """Split steps that alternate between several groups item by item (D_1, R_1, D_2, R_2)
    into one cycle per item, or None when they do not."""
    first = run[0].group
    width = next((k for k in range(1, len(run)) if run[k].group == first), len(run))
    if width < 2 or len(run) % width or len(run) // width < 2:
        return None
    pattern = [s.group for s in run[:width]]
    cycles = [run[k:k + width] for k in range(0, len(run), width)]
    for cycle in cycles:
        if [s.group for s in cycle] != pattern or len({s.item for s in cycle}) != 1:
            return None
    return cycles


def _once_per_sheet(steps: list[dict], printed: dict, key: str, links) -> list[dict]:
    """Working that a sheet has already printed, word for word and number for number, in an
    earlier block (the same openings' emissive powers in three blocks) is referred to, not
    printed again."""
    out = []
    for view in steps:
        if view.get("table"):
            signature = ("table", view.get("group"), repr([(r["item"], r["working"],
                                                            r["statement"]) for r in
                                                           view.get("rows", [])]),
                         repr(view.get("columns")))
        else:
            signature = ("step", view["label"], repr(view["rows"]), view["statement"])
        if signature in printed:
            earlier = printed[signature]
            out.append({"table": False, "label": view.get("label") or view.get("group"),
                        "rows": [], "symbol": "", "statement": "", "cite": None,
                        "same_as": earlier, "same_href": links.anchor(earlier)})
            continue
        printed[signature] = key
        out.append(view)
    return out


def _shared_statement(run: list[PrintedStep]) -> str | None:
    """The words of statements a group shares, with each named place shown by its name (the
    rows then give the values): None when the rows' words differ."""
    templates = {s.template for s in run}
    if len(templates) != 1 or None in templates or not run[0].filled:
        return None
    return re.sub(r"\{(\w+)\}", lambda m: m.group(1).replace("_", " "), run[0].template)


def _steps_view(printed: list[PrintedStep], math, cites, key: str,
                formula_kind: bool = False) -> list[dict]:
    """Return the block's steps for the page: single steps, and runs of steps that apply one
    formula to each item of a list as one table (the formula once, a row per item); formulas
    applied item by item in turn (a diameter, then a resistance, for each layer) are one
    table with a column for each."""
    out: list[dict] = []
    i = 0
    while i < len(printed):
        step = printed[i]
        j = i + 1
        while step.group and j < len(printed) and printed[j].group:
            j += 1
        run = printed[i:j] if step.group else [step]
        cycles = _cycles(run) if len(run) > 2 else None
        if cycles is not None:
            columns = []
            for k in range(len(cycles[0])):
                members = [cycle[k] for cycle in cycles]
                header = _generic_formula(members) if all(s.expr for s in members) else None
                columns.append({"group": members[0].group,
                                "header": math(header) if header else None,
                                "rows": _group_rows(members, math, cites, key,
                                                    STEP_WIDTH_PT / len(cycles[0]) - 40)})
            out.append({"table": True, "multi": True, "columns": columns,
                        "items": [cycle[0].item for cycle in cycles],
                        "group": " and ".join(c["group"] for c in columns)})
            i = j
            continue
        j = i + 1
        if step.group:
            while j < len(printed) and printed[j].group == step.group:
                j += 1
        run = printed[i:j]
        if step.group and len(run) > 1:
            header = _generic_formula(run) if all(s.expr for s in run) else None
            rows = _group_rows(run, math, cites, key, STEP_WIDTH_PT - 85)
            shared_words = _shared_statement(run) if not any(s.expr for s in run) else None
            if shared_words:  # the words once; each row its values
                for r, s in zip(rows, run):
                    r["statement"] = "; ".join(f"{k.replace('_', ' ')} {v}"
                                               for k, v in s.filled.items() if v != r["item"])
            if header is None:
                for r, s in zip(rows, run):
                    r["formula"] = math(s.latex_formula) if s.expr else None
            common = rows[0]["cite"] if all(r["cite"] == rows[0]["cite"] for r in rows) else None
            if common:
                for r in rows:
                    r["cite"] = None
            out.append({"table": True, "multi": False, "group": step.group, "rows": rows,
                        "cite": common, "header": math(header) if header else None,
                        "words": shared_words, "statements": not any(s.expr for s in run)})
        else:
            for s in run:
                view = _step_view(s, math)
                # the engineer's own formula cites project papers; a kind's working cites
                # standards, statements and library values
                view["cite"] = cites.cite(s.source, key, project=formula_kind)
                view["table"] = False
                out.append(view)
        i = j
    return out


def _input_view(r, block, cites, links, sig: int, system: str) -> dict:
    printed = None
    if r.shown is not None:
        display = fill(r.shown, sig, system)
    elif r.origin in ("material",) or isinstance(r.si, str):
        display = str(r.si)
    elif isinstance(r.si, (int, float)):
        printed = print_value(r.value(), sig, system)
        display = printed.text
    else:
        display = str(r.written)
    written = r.written
    if r.origin == "named" and r.ref:
        written = r.ref
    # "As written" only where it says something the value column does not.
    shown_written = pretty_written(written) if isinstance(written, str) else None
    if r.origin in ("given", "named", "assumption") and (shown_written == display or
                                                          written == display):
        written = ""
    if r.origin == "assumption":  # the engineer's own, said to be so
        cite = {"text": f"Assumption: {r.source}", "refs": []}
    elif r.origin == "ref":
        cite = None
    else:
        cite = cites.cite(r.source, block.key, project=r.origin not in (
            "material", "named", "default"))
    return {"path": r.path, "name": r.path.rsplit(".", 1)[-1], "meaning": r.meaning, "mark": "",
            "display": display, "printed": printed,
            "numeric": bool(_NUMERIC.match(str(display))), "written": written,
            "origin": r.origin, "ref": r.ref if r.origin == "ref" else None,
            "ref_href": links.anchor(_ref_key(r.ref, block)) if r.origin == "ref" else None,
            "cite": cite,
            "source": r.source, "item": r.item, "loc": r.loc,
            "where": f"{r.loc.in_project}:{r.loc.line}" if r.loc and r.loc.line else ""}


_LIST_PATH = re.compile(r"^(?P<list>[A-Za-z_]\w*)\[(?P<index>\d+)\]\.(?P<field>.+)$")


def _inputs_view(rows: list[dict], block_key: str, shared: dict, kind=None) -> dict:
    """Split a block's input rows into scalar rows and one table per list input: a row per
    item named by its own name, a column per field with the unit in the header where every
    cell shares it. A table the sheet already printed for another block is not printed again:
    ``shared`` maps each table's written location to the block that printed it."""
    scalars, tables = [], {}
    for row in rows:
        match = _LIST_PATH.match(row["path"])
        if not match or row["item"] is None:
            scalars.append(row)
            continue
        table = tables.setdefault(match["list"], {"name": match["list"], "items": {},
                                                  "fields": []})
        # a record inside an item (a layer's bridge) is one cell: its fields joined
        field_name = match["field"].split(".", 1)[0]
        if field_name not in table["fields"]:
            table["fields"].append(field_name)
        item = table["items"].setdefault(int(match["index"]), {"name": row["item"],
                                                                "cells": {}, "cites": [],
                                                                "paths": []})
        item["paths"].append(row["path"])
        if field_name in item["cells"]:  # a second field of a record: join it to the cell
            cell = dict(item["cells"][field_name])
            cell.update(display=f"{cell['display']}; {row['display']}", printed=None,
                        numeric=False)
            item["cells"][field_name] = cell
        else:
            item["cells"][field_name] = row
        # a library material's source is in the materials appendix; the row cites the rest
        if row["cite"] and row["origin"] != "material" and row["cite"] not in item["cites"]:
            item["cites"].append(row["cite"])
    views = []
    for table in tables.values():
        locations = tuple(str(c["loc"]) for item in table["items"].values()
                          for c in item["cells"].values())
        if locations in shared:
            views.append({"name": table["name"], "shared_with": shared[locations]})
            continue
        shared[locations] = block_key
        columns = []
        for field_name in table["fields"]:
            cells = [item["cells"].get(field_name) for item in table["items"].values()]
            units = {c["printed"].unit for c in cells if c and c["printed"] is not None}
            numeric = all(c is None or c["printed"] is not None for c in cells)
            unit = units.pop() if numeric and len(units) == 1 else None
            columns.append({"field": field_name, "title": field_name.replace(".", " ")
                            .replace("_", " "), "unit": pretty_unit(unit) if unit else "",
                            "bare": bool(unit)})
        items = []
        for item in table["items"].values():
            cells = []
            for column in columns:
                cell = item["cells"].get(column["field"])
                if cell is None:
                    cells.append({"text": "—", "numeric": False, "ref_href": None})
                else:
                    text = cell["printed"].number if column["bare"] else cell["display"]
                    cells.append({"text": text, "numeric": cell["numeric"],
                                  "ref_href": cell["ref_href"], "ref": cell["ref"],
                                  "path": cell["path"]})
            items.append({"name": item["name"], "cells": cells, "cites": item["cites"],
                          "paths": item["paths"], "mark": ""})
        first = items[0]["cites"] if items else []
        common = first if items and all(i["cites"] == first for i in items) else []
        declared = next((f for f in (kind.inputs if kind else ()) if f.name == table["name"]),
                        None)
        views.append({"name": table["name"], "title": table["name"].replace("_", " "),
                      "meaning": declared.meaning if declared is not None else "",
                      "columns": columns, "entries": items, "shared_with": None,
                      "common_cites": common})
    return {"scalars": scalars, "tables": views}


def _block_view(block, cites: Citations, math, comments_on, links: _Links, sig: int,
                system: str, figures, shared: dict) -> dict:
    """Return one block as view data; its figures as SVG text on the site (``links`` to site
    pages), as images in the PDF."""
    out = block.output
    key = block.key
    # Citations are numbered in reading order: method, inputs, assumptions, steps, warnings, checks.
    method = [c for c in (cites.cite(ref, key) for ref in block.kind.references) if c]
    inputs = [_input_view(r, block, cites, links, sig, system) for r in block.inputs]
    input_tables = _inputs_view(inputs, key, shared, block.kind)
    notes, repeated = [], []
    printed_notes = shared.setdefault("notes", {})  # note → the block of the sheet that has it
    for n in out.notes:
        text = fill(n["text"], sig, system)
        if (text, str(n.get("source", ""))) in printed_notes:
            repeated.append(printed_notes[text, str(n.get("source", ""))])
            continue
        printed_notes[text, str(n.get("source", ""))] = key
        notes.append({"text": text, "cite": cites.cite(n.get("source", ""), key), "href": None})
    for earlier in dict.fromkeys(repeated):  # said once per sheet, then referred to
        count = repeated.count(earlier)
        notes.append({"text": f"As for {earlier}: {count} more statement"
                      f"{'s' if count != 1 else ''} of method and assumptions.", "cite": None,
                      "href": links.anchor(earlier)})
    steps = _once_per_sheet(_steps_view(figures.steps(block), math, cites, key,
                                        block.kind.open_results),
                            shared.setdefault("steps", {}), key, links)
    results = []
    for name, r in out.results.items():
        value = out.value_of(name)
        if isinstance(r.value, list):
            display = ", ".join(print_value(value, sig, system, index=i).text
                                for i in range(len(r.value)))
        else:
            display = print_value(value, sig, system).text
        results.append({"name": name, "meaning": r.spec.meaning, "display": display,
                        "anchor": f"{key}.{name}", "absent": False, "mark": ""})
    for name, why in out.absent.items():
        spec = out.declared(name)
        results.append({"name": name, "meaning": spec.meaning if spec else "",
                        "display": fill(why, sig, system), "anchor": f"{key}.{name}",
                        "absent": True, "mark": ""})
    drawn = figures(block)
    for name, series in out.series.items():
        if name in out.results or name in out.absent:
            continue
        results.append({"name": name, "meaning": series.label or f"{series.y_unit} over "
                        f"{series.x_label}", "display": f"curve of {len(series.x)} points"
                        + (" (figure)" if drawn else ""),
                        "anchor": f"{key}.{name}", "absent": False, "mark": ""})
    warnings = [{"text": fill(w["text"], sig, system), "cite": cites.cite(w.get("source", ""),
                                                                          key)}
                for w in out.warnings]
    checks = []
    seen_anchors: set[str] = set()
    for c in block.checks:
        anchor = f"{key}.{c.result}.check"
        if anchor in seen_anchors:  # two checks on one result (at least and at most)
            anchor = f"{anchor}-{c.relation}"
        seen_anchors.add(anchor)
        shown = print_check(c, sig, system)
        checks.append({"result": c.result, "relation": _relation(c.relation),
                       "relation_key": c.relation, "mark": "",
                       "value": shown.value, "limit": shown.limit, "margin": shown.margin,
                       "utilisation": shown.utilisation,
                       "passed": c.passed, "note": shown.note, "source": c.source,
                       "cite": cites.cite(c.source, key), "anchor": anchor,
                       "href": links.anchor(anchor),
                       "result_href": links.anchor(f"{key}.{c.result}"),
                       "block": key, "block_href": links.anchor(key),
                       "block_title": block.spec.title, "sheet": block.spec.sheet_id})
    block_figures, law_figures = [], []
    for fig in drawn:
        site = links.target == "site"  # only the form the target prints is made
        item = {"key": fig.key, "caption": fig.caption,
                "svg": Markup(fig.svg) if site else None,
                "img": None if site else _svg_data_img(fig.svg, fig.caption), "block": key,
                "block_href": links.anchor(key), "half": fig.half}
        # Material-law plots belong to the materials appendix, not to the block.
        (law_figures if fig.appendix else block_figures).append(item)
    return {"key": key, "id": block.id, "title": block.spec.title, "kind": block.kind.name,
            "kind_title": block.kind.title, "method": method, "inputs": inputs,
            "input_scalars": input_tables["scalars"], "input_tables": input_tables["tables"],
            "steps": steps, "results": results, "checks": checks, "notes": notes,
            "warnings": warnings, "figures": block_figures, "law_figures": law_figures,
            "caution": block.kind.caution,
            "block_notes": notes_html(block.spec.notes),
            "comments": comments_on.get(key, []), "passed": block.passed,
            "failed": sum(1 for c in checks if not c["passed"]),
            "series": list(out.series)}


LAW_FIGURE_SUFFIX = "-laws"
_MATERIAL_COLUMNS = (("conductivity", "W/(m*K)"), ("density", "kg/m^3"),
                     ("specific_heat", "J/(kg*K)"), ("emissivity", "1"))


def _curve_text(curve) -> str:
    """Return a conductivity curve as printed in the materials appendix: each point θ λ, the
    unit once (the pipe kinds average it over each layer; the constant λ is its declared value)."""
    if not curve:
        return ""
    points = [f"{theta.text} {k.number}" for theta, k in print_curve(curve)]
    return "λ(θ): " + "; ".join(points) + " W/(m·K)"


def _materials_view(package, cites: "Citations", links) -> list[dict]:
    """Return every library material the package uses, with its properties, source and users."""
    used: dict[str, list[str]] = {}
    for sheet in package.sheets:
        for block in sheet.blocks:
            for record in block.inputs:
                if record.origin == "material" and block.key not in used.setdefault(
                        record.si, []):
                    used[record.si].append(block.key)
    rows = []
    for name in sorted(used):
        entry = package.project.materials.get(name, {})
        properties = {column: print_value(Value(entry[column], unit, given=True), 3).text
                      for column, unit in _MATERIAL_COLUMNS if column in entry}
        rows.append({"name": name, "title": entry.get("title", name),
                     "properties": properties, "law": entry.get("law", ""),
                     "curve": _curve_text(entry.get("conductivity_curve")),
                     "file": entry.get("file", ""),
                     "cite": [cites.cite(entry.get("source", ""), k, project=name in
                                          package.project.project_materials)
                              for k in used[name]][0],
                     "to_confirm": any(c.get("confirmed") is False
                                       for c in entry.get("sources", {}).values()),
                     "used_in": [{"key": k, "href": links.anchor(k)} for k in used[name]]})
    return rows


class Drawings:
    """Each block's figures and printed steps made once per build, for both the site and the
    PDF; a figure is drawn once for its data (the same data in two blocks, or in the build
    cache, is drawn once) and kept in :data:`~calcdoc.render.memo.MEMO`."""

    def __init__(self, sig: int, system: str):
        self.sig, self.system = sig, system
        self.drawn: dict[str, list] = {}
        self.printed: dict[str, list] = {}
        self._digests: dict[int, tuple] = {}  # id(data) → (data, digest): worked out once
        self._pending: dict[str, tuple] = {}  # digest → (sheet, future): being drawn ahead

    def __call__(self, block) -> list:
        if block.key not in self.drawn:
            self.drawn[block.key] = [self._draw(f) for f in block.output.figures]
        return self.drawn[block.key]

    def _digest(self, data) -> str | None:
        known = self._digests.get(id(data))
        if known is None or known[0] is not data:
            known = self._digests[id(data)] = (data, data_digest(data, self.sig, self.system))
        return known[1]

    def _draw(self, data) -> Drawn:
        digest = self._digest(data)
        if digest is None:  # data of a shape the digest does not know: drawn every time
            return draw(data, self.sig, self.system)
        if digest in self._pending:
            self._collect(digest)
        return Drawn(**MEMO.lookup("figure", digest, lambda: dataclasses.asdict(
            draw(data, self.sig, self.system))))

    @contextmanager
    def drawing_ahead(self, package, jobs: int):
        """Draw every figure of the package not yet in the memo on ``jobs`` processes while
        this one goes on (typesetting the views); a view that asks for a figure still being
        drawn waits for it. Each is drawn as this process would have drawn it (the same
        function of the same data). On leaving, every figure is in the memo. Yields how many
        figures are drawn ahead (none with one job or fewer than two to draw)."""
        wanted: dict[str, tuple] = {}
        table = MEMO.tables.setdefault("figure", {})
        for sheet in package.sheets:
            for block in sheet.blocks:
                for data in block.output.figures:
                    digest = self._digest(data)
                    if digest is not None and digest not in table and digest not in wanted:
                        wanted[digest] = (sheet.spec.id, data)
        if jobs < 2 or len(wanted) < 2:
            yield 0
            return
        from calcdoc.render.plots import drawing_library
        from calcdoc.render.workers import pool
        drawing_library()  # imported once here: forked workers start with it
        with pool(min(jobs, len(wanted))) as workers:
            self._pending = {digest: (sheet_id, workers.submit(
                _draw_figure, (data, self.sig, self.system)))
                for digest, (sheet_id, data) in wanted.items()}
            try:
                yield len(wanted)
                for digest in list(self._pending):  # those no view asked for
                    self._collect(digest)
            finally:
                for _, future in self._pending.values():
                    future.cancel()
                self._pending = {}

    def _collect(self, digest: str) -> None:
        """Put a figure drawn ahead into the memo, waiting for it if need be."""
        sheet_id, future = self._pending.pop(digest)
        MEMO.tables.setdefault("figure", {})[digest] = future.result()
        MEMO.computed[sheet_id] = MEMO.computed.get(sheet_id, 0) + 1

    def steps(self, block) -> list:
        """The block's steps with their numbers printed, made once for the site and the PDF."""
        if block.key not in self.printed:
            self.printed[block.key] = block.printed_steps(self.sig, self.system)
        return self.printed[block.key]


def _draw_figure(task: tuple) -> dict:
    """Draw one figure in a worker process (:meth:`Drawings.drawing_ahead`); its memo
    answer."""
    data, sig, system = task
    return dataclasses.asdict(draw(data, sig, system))


def _ref_key(ref: str, block) -> str:
    """Return the full key of a ``ref`` (a two-part ref names a block of the same sheet)."""
    return ref if ref.count(".") >= 2 else f"{block.spec.sheet_id}.{ref}"


def _svg_data_img(svg: str, alt: str) -> Markup:
    data = base64.b64encode(svg.encode("utf-8")).decode("ascii")
    return Markup(f'<img class="figure" alt="{escape(alt)}" '
                  f'src="data:image/svg+xml;base64,{data}">')


def _signoff_view(signoff: dict, current_rev: str) -> dict:
    return {role: {"by": s.by, "initials": initials(s.by), "date": s.date, "rev": s.rev,
                   "current": s.rev == current_rev}
            for role, s in signoff.items()}


def package_view(package, target: str = "site", drawings: "Drawings | None" = None,
                 changes=None, kept_views=None) -> dict:
    """Return the whole package as view data for the templates (``target``: site | pdf).

    ``kept_views`` (:class:`calcdoc.build.KeptViews`) gives back the blocks' views of a sheet
    whose every input, block and context is as when they were built (the citations it made
    replayed), and keeps those built afresh; not used when ``changes`` are marked."""
    if target not in ("site", "pdf"):
        raise ValueError(f"target must be site or pdf, got {target!r}")
    project = package.project
    sig, system = project.precision, project.units
    drawings = drawings or Drawings(sig, system)
    math = mathml if target == "site" else pdf_math
    links = _Links(target, {s.id for s in package.sheets} if package.partial else None)
    cites = Citations()
    current = project.revision.rev
    keys = {s.id for s in package.sheets} | {b.key for s in package.sheets for b in s.blocks}
    comments_on: dict[str, list[dict]] = {}
    comments = []
    for i, c in enumerate(project.comments, start=1):
        item = {"n": i, "on": c.on, "by": c.by, "date": c.date, "text": c.text,
                "status": c.status, "response": c.response, "found": c.on in keys,
                "href": links.anchor(c.on) if c.on in keys else None,
                "comment_href": (f"{sheet_page_name(c.on.split('.')[0])}#comment-{i}"
                                 if target == "site" else f"#comment-{i}")
                if c.on in keys else None}
        comments.append(item)
        comments_on.setdefault(c.on, []).append(item)
    sheets = []
    stage = "PDF" if target == "pdf" else "site"
    for index, sheet in enumerate(package.sheets):
        _progress.current().show(f"{stage}: sheet {sheet.spec.id} ({index + 1} of "
                                 f"{len(package.sheets)}), typesetting its blocks", force=True)
        shared: dict = {}  # a list input written once and used by several blocks prints once
        kept = key = None
        if kept_views is not None and not changes:
            # everything a block's view depends on besides the sheet and its blocks' own keys
            context = [target, sorted(links.sheets) if links.sheets is not None else None,
                       sorted(cites.numbers.items()), current,
                       [comments_on.get(k, []) for k in [sheet.id] + [b.key for b in
                                                                      sheet.blocks]]]
            key = kept_views.key(sheet, context)
            kept = kept_views.load(key, sheet.id, target) if key is not None else None
        if kept is not None:
            blocks, cited = kept
            cites.replay(cited)
        else:
            before = cites.mark()
            with MEMO.recording(sheet.spec.id):
                blocks = [_block_view(b, cites, math, comments_on, links, sig, system,
                                      drawings, shared) for b in sheet.blocks]
            if key is not None:
                kept_views.keep(key, target, blocks, cites.since(before))
        if changes:
            _mark_changes(blocks, changes.keys(), current)
        spec = sheet.spec
        signoff = _signoff_view(spec.signoff, current)
        checks = [c for b in blocks for c in b["checks"]]
        sheet_comments = comments_on.get(spec.id, [])
        all_comments = sheet_comments + [c for b in blocks for c in b["comments"]]
        state = signoff_state(spec.signoff, current)
        sheets.append({
            "id": spec.id, "title": spec.title, "file": spec.relpath,
            "page": sheet_page_name(spec.id), "href": links.anchor(spec.id),
            "notes": notes_html(spec.notes),
            "signoff": signoff, "signoff_state": state.words,
            "signed_off": state.ok,
            "blocks": blocks, "checks": checks,
            "failed": sum(1 for c in checks if not c["passed"]),
            "comments": sheet_comments,
            "comment_count": len(all_comments),
            "open_comments": sum(1 for c in all_comments if c["status"] == "open"),
            "checked_current": "checked" in signoff and signoff["checked"]["current"],
            # the caution of each kind on the sheet, printed once after its blocks
            "cautions": list(dict.fromkeys(b["caution"] for b in blocks if b["caution"])),
            "index": index,
        })
    for i, sheet in enumerate(sheets):
        sheet["previous"] = sheets[i - 1] if i > 0 else None
        sheet["next"] = sheets[i + 1] if i + 1 < len(sheets) else None
    revision = project.revision
    all_checks = [c for s in sheets for c in s["checks"]]
    materials = _materials_view(package, cites, links)
    law_figures: dict[str, dict] = {}  # the same law in several blocks is plotted once
    for f in (f for s in sheets for b in s["blocks"] for f in b["law_figures"]):
        entry = law_figures.setdefault(f["caption"], {**f, "used_in": []})
        entry["used_in"].append({"key": f["block"], "href": f["block_href"]})
    law_figures = list(law_figures.values())
    references = cites.listing()
    for r in references:
        r["uses"] = [{"key": key, "href": links.anchor(key)} for key in r["uses"]]
    project_information = cites.project_information()
    for r in project_information:
        r["uses"] = [{"key": key, "href": links.anchor(key)} for key in r["uses"]]
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
        "preliminary_text": PRELIMINARY,
        "sheets": sheets,
        "sheet_count": len(sheets),
        "checks": all_checks,
        "failed": sum(1 for c in all_checks if not c["passed"]),
        "references": references,
        "project_information": project_information,
        **_confirmation_view(package, links, sig, system),
        "references_href": links.index("references"),
        "index_prefix": links.index(""),
        "comments": comments,
        "comment_log_href": links.index("comment-log"),
        "open_comments": sum(1 for c in comments if c["status"] == "open"),
        "reviewer": project.reviewer,
        "materials": materials,
        "law_figures": law_figures,
        "materials_href": links.index("materials"),
        "caution": CAUTION,
        "target": target,
        "changes": changes.groups() if changes else [],
        "changed_since": changes.old_revision if changes else None,
        "partial": [s.id for s in package.sheets] if package.partial else None,
    }


def _confirmation_view(package, links, sig: int, system: str) -> dict:
    """The values to confirm before issue, and those the project has confirmed."""
    to_confirm, confirmed = [], []
    for item in values_to_confirm(package):
        value = item.value if isinstance(item.value, str) or item.value is None else \
            print_value(item.value, sig, system).text
        row = {"key": item.key, "what": item.what, "value": value or "—",
               "against": item.against,
               "used_in": [{"key": k, "href": links.anchor(k)} for k in item.used_in]}
        if item.confirmation is None:
            to_confirm.append(row)
        else:
            c = item.confirmation
            confirmed.append({**row, "against": c.against, "by": c.by, "date": c.date})
    return {"values_to_confirm": to_confirm, "confirmed_values": confirmed,
            "values_to_confirm_href": links.index("values-to-confirm")}


def _mark_changes(blocks: list[dict], changed: set[str], revision: str) -> None:
    """Mark each input, result and check that changed since the previous issued revision with
    the current revision, for the margin."""
    for b in blocks:
        for row in b["inputs"]:
            row["mark"] = revision if f"{b['key']}.{row['path']}" in changed else ""
        for table in b["input_tables"]:
            for item in table.get("entries") or []:
                item["mark"] = revision if any(f"{b['key']}.{p}" in changed
                                               for p in item["paths"]) else ""
        for r in b["results"]:
            r["mark"] = revision if r["anchor"] in changed else ""
        for c in b["checks"]:
            c["mark"] = revision if f"{b['key']}.{c['result']}.check.{c['relation_key']}" \
                in changed else ""
        b["mark"] = revision if b["key"] in changed else ""


@functools.cache
def environment() -> jinja2.Environment:
    """Return the template environment: autoescaped, strict about undefined names (one per
    process, so that each template is compiled once)."""
    env = jinja2.Environment(loader=jinja2.FileSystemLoader(str(TEMPLATES)),
                             autoescape=jinja2.select_autoescape(["html", "xml"],
                                                                 default_for_string=True),
                             undefined=jinja2.StrictUndefined, trim_blocks=True,
                             lstrip_blocks=True, keep_trailing_newline=True)
    env.globals["sheet_page_name"] = sheet_page_name
    return env


# What a sheet's page shows of the package besides its own sheet and the sidebar (a page sees
# only these, so a page kept in the build cache under them and its sheet is that page)
SHEET_PAGE_VIEW = ("calcdoc_version", "caution", "index_prefix", "package", "partial",
                   "preliminary", "preliminary_text", "project", "revision", "sheet_count",
                   "target")
# the sheet's own entries a page shows, besides its blocks' views (kept under their own key)
_SHEET_PAGE_FIELDS = ("id", "title", "file", "page", "href", "notes", "signoff",
                      "signoff_state", "signed_off", "failed", "comments", "comment_count",
                      "open_comments", "checked_current", "cautions", "index")


def render_site(view: dict, out_dir: Path, kept_pages=None) -> list[Path]:
    """Write index.html, one page per sheet and the stylesheet; return the files written.

    ``kept_pages`` (:class:`calcdoc.build.KeptPages`) gives back a sheet's page when its
    blocks' views, its own entries, the sidebar, its neighbours and the package entries it
    shows are as when it was written, and keeps those written afresh."""
    env = environment()
    written = []
    (out_dir / "assets").mkdir(parents=True, exist_ok=True)
    css = out_dir / "assets" / "style.css"
    css.write_text((TEMPLATES / "style.css").read_text(encoding="utf-8"), encoding="utf-8")
    written.append(css)
    # every page lists every sheet in its sidebar: each entry is written once, not once a page
    nav_item = env.get_template("_nav.html").module.nav_item
    entries = [str(nav_item(s, False)) for s in view["sheets"]]
    index = out_dir / "index.html"
    index.write_text(env.get_template("index.html").render(
        view=view, page="index.html", nav=_nav(entries, None, view["sheets"])),
        encoding="utf-8")
    written.append(index)
    template = env.get_template("sheet.html")
    page_view = {name: view[name] for name in SHEET_PAGE_VIEW}
    for sheet in view["sheets"]:
        _progress.current().show(f"site: writing {sheet['page']}")
        path = out_dir / sheet["page"]
        nav = _nav(entries, sheet["index"], view["sheets"])
        key = text = None
        if kept_pages is not None:
            seen = [page_view, {name: sheet[name] for name in _SHEET_PAGE_FIELDS},
                    [[s["id"], s["title"], s["page"]] if s else None
                     for s in (sheet["previous"], sheet["next"])],
                    str(nav["before"]), str(nav["after"])]
            key = kept_pages.key(sheet["id"], seen)
            text = kept_pages.load(key, sheet["id"]) if key is not None else None
        if text is None:
            text = template.render(view=page_view, sheet=sheet, page=sheet["page"], nav=nav)
            if key is not None:
                kept_pages.keep(key, text)
        path.write_text(text, encoding="utf-8")
        written.append(path)
    return written


def _nav(entries: list[str], current: int | None, sheets: list[dict]) -> dict:
    """The sidebar's sheet entries of one page: those before and after its own, and its own
    (drawn with its blocks by the template)."""
    if current is None:
        return {"before": Markup("".join(entries)), "current": None, "after": Markup("")}
    return {"before": Markup("".join(entries[:current])), "current": sheets[current],
            "after": Markup("".join(entries[current + 1:]))}


def render_package_html(view: dict, part: dict | None = None,
                        page_of: dict[str, int] | None = None) -> str:
    """Return the one HTML document that WeasyPrint paginates into the PDF package, or one
    part of it: ``part`` {"front": bool, "sheets": ids, "back": bool} selects the cover and
    contents, sheets and appendices typeset alone; ``page_of`` gives the contents' page
    numbers written out (anchor → page), for a part whose targets are in other parts."""
    return environment().get_template("package.html").render(view=view, part=part,
                                                             page_of=page_of)
