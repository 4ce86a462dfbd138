"""The PDF package typeset in parts on several cores and joined into one PDF.

WeasyPrint lays a document out on one core, and layout is most of its time (about four fifths
on the demo). The package falls into parts that never share a page: the cover with the
contents, each sheet (``break-before: page``), the appendices. Each part is typeset alone in a
worker process; the joined PDF reads as the single document would:

- running page numbers "N of M": a part is typeset with its page number hidden (the same text,
  invisible, so the title block keeps its size); the worker reports where that line sits on
  each page, and once the pages are counted a small document of page numbers set in the same
  face, size and place is laid over each page (as a form XObject);
- the contents page and the summary of results: their page numbers are written out from the
  anchors the parts report; the cover and contents are typeset last, after a first pass that
  counted their pages (a page-number count that changes the count is typeset again);
- links inside a part are WeasyPrint's own (named destinations); a link to another part is
  added as the same kind of annotation; one name tree of destinations covers the whole package;
- the outline is rebuilt from every part's bookmarks, in order;
- the cover part is typeset with the attachments, metadata, output intent and identifier of
  the PDF/A-3b package, and is the document the other parts' pages are added to.

Each part typeset is kept in the build cache (:mod:`calcdoc.cache`) under the digest of its HTML
and the stylesheet, with its layout as JSON (read back only in the shape checked by
:meth:`PartLayout.from_data`), so that a rebuild typesets only the parts whose HTML changed.

``--jobs 1`` does not come here: it typesets the one document (calcdoc/render/pdf.py), which is
the reference the tests compare this path with.
"""

from __future__ import annotations

import concurrent.futures
import math
import re
import shutil
import tempfile
from dataclasses import dataclass, field
from pathlib import Path

from calcdoc.progress import current
from calcdoc.render.workers import pool

__all__ = ["write_pdf_in_parts", "PartLayout", "plan_parts"]

PAGE_NUMBER_XOBJECT = "/CalcdocPageNumber"


@dataclass
class PartLayout:
    """What a typeset part tells the joiner, page by page (PDF points, origin bottom left)."""

    pdf: str
    pages: int
    anchors: list[list[tuple[str, float, float]]] = field(default_factory=list)
    links: list[list[tuple[str, tuple[float, float, float, float]]]] = field(default_factory=list)
    bookmarks: list = field(default_factory=list)
    page_numbers: list[dict | None] = field(default_factory=list)

    def data(self) -> dict:
        """Return the layout as JSON data (for the build cache), without the PDF's path."""
        return {"pages": self.pages, "anchors": self.anchors, "links": self.links,
                "bookmarks": self.bookmarks, "page_numbers": self.page_numbers}

    @classmethod
    def from_data(cls, data, pdf: str) -> PartLayout | None:
        """Return the layout of :meth:`data`, or None unless every field has its shape (a
        cache entry is read as a stranger's file)."""
        try:
            pages = data["pages"]
            ok = (type(pages) is int and 0 < pages <= 100_000
                  and all(len(data[k]) == pages for k in ("anchors", "links", "page_numbers"))
                  and all(_is_anchor(a) for page in data["anchors"] for a in page)
                  and all(_is_link(a) for page in data["links"] for a in page)
                  and all(line is None or _is_line(line) for line in data["page_numbers"])
                  and _is_outline(data["bookmarks"], pages))
        except (KeyError, TypeError, ValueError):
            return None
        if not ok:
            return None
        return cls(pdf, pages, data["anchors"], data["links"], data["bookmarks"],
                   data["page_numbers"])


def _number(x) -> bool:
    return type(x) in (int, float) and math.isfinite(x)


def _is_anchor(a) -> bool:
    return len(a) == 3 and isinstance(a[0], str) and _number(a[1]) and _number(a[2])


def _is_link(a) -> bool:
    return (len(a) == 2 and isinstance(a[0], str) and len(a[1]) == 4
            and all(map(_number, a[1])))


def _is_line(line) -> bool:
    return (isinstance(line, dict)
            and all(_number(line[k]) for k in ("x", "y", "width", "height", "font_size"))
            and all(isinstance(f, str) and re.fullmatch(r"[\w .-]{1,80}", f)
                    for f in line["font_family"])
            and type(line["font_weight"]) is int and 1 <= line["font_weight"] <= 1000
            and line["font_style"] in ("normal", "italic", "oblique")
            and len(line["color"]) == 4 and all(0 <= c <= 1 for c in line["color"]
                                                if _number(c)) and all(map(_number, line["color"])))


def _is_outline(tree, pages: int, depth: int = 0) -> bool:
    return depth < 50 and isinstance(tree, list) and all(
        len(item) == 4 and isinstance(item[0], str) and len(item[1]) == 3
        and type(item[1][0]) is int and 0 <= item[1][0] < pages
        and _number(item[1][1]) and _number(item[1][2])
        and _is_outline(item[2], pages, depth + 1) and isinstance(item[3], str)
        for item in tree)


def plan_parts(view: dict) -> list[dict]:
    """Return the parts of the package in reading order: cover and contents, each sheet, the
    appendices."""
    return ([{"front": True, "sheets": (), "back": False}]
            + [{"front": False, "sheets": (s["id"],), "back": False} for s in view["sheets"]]
            + [{"front": False, "sheets": (), "back": True}])


# ----------------------------------------------------------------------------- typesetting


def _page_number_line(page) -> dict | None:
    """Return where the page number's line sits on a laid-out page, with its face (CSS px)."""
    from weasyprint.formatting_structure import boxes

    def walk(box, line):
        if isinstance(box, boxes.LineBox):
            line = box
        element = getattr(box, "element", None)
        if (line is not None and box.element_tag == "span" and element is not None
                and "pageno" in (element.get("class") or "").split()):
            style = box.style
            return {"x": line.position_x, "y": line.position_y, "width": line.width,
                    "height": line.height, "font_size": style["font_size"],
                    "font_family": list(style["font_family"]),
                    "font_weight": style["font_weight"], "font_style": style["font_style"],
                    "color": tuple(style["color"])}
        for child in getattr(box, "children", ()):
            found = walk(child, line)
            if found:
                return found
        return None

    return walk(page._page_box, None)


def typeset_part(html: str, build_dir: str, target: str, options: dict,
                 attachments: list | None = None, finisher=None) -> PartLayout:
    """Typeset one part to ``target`` and return its layout (runs in a worker process)."""
    from calcdoc.render.pdf import attachments_for, print_document

    folder = Path(build_dir)
    source, fetcher = print_document(html, folder)
    files = attachments_for(attachments, folder, fetcher) if attachments is not None else None
    document = source.render(**options)
    anchors_here = {name for page in document.pages for name in page.anchors}
    layout = PartLayout(target, len(document.pages))
    scale = 0.75  # CSS px to PDF points
    for page in document.pages:
        height = page.height * scale
        layout.anchors.append([(name, x * scale, height - y * scale)
                               for name, (x, y, _, _) in page.anchors.items()])
        elsewhere, kept = [], []
        for link in page.links:
            kind, name, rect, _ = link
            if kind == "internal" and name not in anchors_here:
                x0, y0, x1, y1 = rect
                elsewhere.append((name, (x0 * scale, height - y0 * scale,
                                         x1 * scale, height - y1 * scale)))
            else:
                kept.append(link)
        page.links[:] = kept  # WeasyPrint would drop them with an error in the log
        layout.links.append(elsewhere)
        layout.page_numbers.append(_page_number_line(page))
    layout.bookmarks = document.make_bookmark_tree(scale, transform_pages=True)
    document.write_pdf(target, attachments=files, finisher=finisher, **options)
    return layout


# ----------------------------------------------------------------------------- joining


def _page_numbers_html(lines: list[dict | None], total: int) -> str:
    """Return a document of ``len(lines)`` A4 pages, each with only its page number, set
    where and as the part's hidden one."""
    from markupsafe import escape

    pages = []
    for number, line in enumerate(lines, start=1):
        text = ""
        if line is not None:
            r, g, b, a = line["color"]
            family = ", ".join(f"'{escape(f)}'" for f in line["font_family"])
            text = (f'<div class="n" style="left:{line["x"]:.4f}px;top:{line["y"]:.4f}px;'
                    f'width:{line["width"]:.4f}px;height:{line["height"]:.4f}px;'
                    f'line-height:{line["height"]:.4f}px;font-size:{line["font_size"]:.4f}px;'
                    f'font-family:{family};font-weight:{line["font_weight"]};'
                    f'font-style:{line["font_style"]};'
                    f'color:rgba({r * 255:.0f},{g * 255:.0f},{b * 255:.0f},{a})">'
                    f'{number} of {total}</div>')
        pages.append(f'<div class="p">{text}</div>')
    return ("<!DOCTYPE html><html><head><meta charset=\"utf-8\"><style>"
            "@page { size: A4; margin: 0 } html, body { margin: 0 }"
            ".p { position: relative; height: 297mm; break-after: page; overflow: hidden }"
            ".p:last-child { break-after: auto }"
            ".n { position: absolute; white-space: nowrap; margin: 0; padding: 0 }"
            "</style></head><body>" + "".join(pages) + "</body></html>")


def _join(front: PartLayout, body: list[PartLayout], numbers_pdf: str, target: Path,
          identifier: bytes) -> None:
    from pypdf import PdfReader, PdfWriter
    from pypdf.generic import (ArrayObject, ByteStringObject, DecodedStreamObject,
                               DictionaryObject, FloatObject, NameObject, NumberObject,
                               TextStringObject)

    writer = PdfWriter(clone_from=front.pdf)
    catalog = writer._root_object
    for key in ("/Outlines", "/PageMode"):
        if key in catalog:
            del catalog[key]
    for part in body:
        for page in PdfReader(part.pdf).pages:
            writer.add_page(page)
    parts = [front] + body
    pages = writer.pages

    def number_stream(text: bytes):
        stream = DecodedStreamObject()
        stream.set_data(text)
        return writer._add_object(stream)

    # the page numbers: each page's number as a form XObject drawn after the page
    numbers = PdfReader(numbers_pdf)
    opening = number_stream(b"q\n")
    closing = number_stream(b"Q\nq " + PAGE_NUMBER_XOBJECT.encode() + b" Do Q\n")
    for page, overlay in zip(pages, numbers.pages):
        form = DecodedStreamObject()
        form.set_data(overlay.get_contents().get_data())
        form.update({NameObject("/Type"): NameObject("/XObject"),
                     NameObject("/Subtype"): NameObject("/Form"),
                     NameObject("/BBox"): ArrayObject(FloatObject(v) for v in overlay.mediabox),
                     NameObject("/Resources"): overlay["/Resources"].clone(writer)})
        form = writer._add_object(form.flate_encode())
        resources = DictionaryObject(page["/Resources"].get_object())
        xobjects = DictionaryObject(resources["/XObject"].get_object()) \
            if "/XObject" in resources else DictionaryObject()
        xobjects[NameObject(PAGE_NUMBER_XOBJECT)] = form
        resources[NameObject("/XObject")] = xobjects
        page[NameObject("/Resources")] = resources
        contents = page.get("/Contents")
        existing = list(contents.get_object()) if isinstance(contents.get_object(), list) \
            else [contents]
        page[NameObject("/Contents")] = ArrayObject([opening] + existing + [closing])

    # destinations: one name tree for the package, the first anchor of a name winning
    dests: dict[str, ArrayObject] = {}
    offset = 0
    for part in parts:
        for index, anchors in enumerate(part.anchors):
            for name, x, y in anchors:
                if name not in dests:
                    dests[name] = ArrayObject([pages[offset + index].indirect_reference,
                                               NameObject("/XYZ"), FloatObject(x),
                                               FloatObject(y), NumberObject(0)])
        offset += part.pages
    # links to another part, as WeasyPrint writes its own (PDF/A: printable, /F 4); a link
    # to a name no part has is dropped, as WeasyPrint drops it in one document
    offset = 0
    for part in parts:
        for index, links in enumerate(part.links):
            page = pages[offset + index]
            for name, (x0, y0, x1, y1) in links:
                if name not in dests:
                    continue
                annotation = DictionaryObject({
                    NameObject("/Type"): NameObject("/Annot"),
                    NameObject("/Subtype"): NameObject("/Link"),
                    NameObject("/Rect"): ArrayObject(FloatObject(v) for v in (x0, y0, x1, y1)),
                    NameObject("/BS"): DictionaryObject({NameObject("/W"): NumberObject(0)}),
                    NameObject("/Dest"): TextStringObject(name),
                    NameObject("/F"): NumberObject(4)})
                if "/Annots" not in page:
                    page[NameObject("/Annots")] = ArrayObject()
                page["/Annots"].get_object().append(writer._add_object(annotation))
        offset += part.pages
    names = ArrayObject()
    for name in sorted(dests, key=lambda n: TextStringObject(n).original_bytes):  # byte order
        names.append(TextStringObject(name))
        names.append(dests[name])
    name_tree = catalog["/Names"].get_object() if "/Names" in catalog else DictionaryObject()
    name_tree[NameObject("/Dests")] = DictionaryObject({NameObject("/Names"): names})
    catalog[NameObject("/Names")] = name_tree

    # the outline: every part's bookmarks in order, as one tree
    def add(tree, parent, offset):
        for label, (page_index, x, y), children, state in tree:
            from pypdf.generic import Fit
            item = writer.add_outline_item(title=label, page_number=offset + page_index,
                                           parent=parent,
                                           fit=Fit.xyz(left=x, top=y, zoom=0),
                                           is_open=state != "closed")
            add(children, item, offset)

    offset = 0
    for part in parts:
        add(part.bookmarks, None, offset)
        offset += part.pages
    # each part brought its own copies of what every part has (the output intent's ICC
    # profile, colour spaces): kept once (the demo: 3.0 MB -> 1.6 MB; the fonts stay one
    # subset per part)
    dedupe = getattr(writer, "compress_identical_objects", None)
    if dedupe is not None:
        dedupe()
    writer._ID = ArrayObject([ByteStringObject(identifier), ByteStringObject(identifier)])
    with open(target, "wb") as out:
        writer.write(out)


# ----------------------------------------------------------------------------- the whole


def _anchor_pages(layouts: list[PartLayout]) -> dict[str, int]:
    """Return each anchor's page number in the joined package (the first anchor of a name)."""
    page_of: dict[str, int] = {}
    offset = 0
    for layout in layouts:
        for index, anchors in enumerate(layout.anchors):
            for name, _, _ in anchors:
                page_of.setdefault(name, offset + index + 1)
        offset += layout.pages
    return page_of


def write_pdf_in_parts(render_html, parts: list[dict], build_dir: Path, target: Path,
                       attachments: list[dict], options: dict, finisher, jobs: int,
                       store=None) -> int:
    """Typeset the package in parts on ``jobs`` processes and join them into ``target``;
    return the number of pages.

    ``render_html(part, page_of)`` returns a part's HTML; ``attachments`` are the keyword
    arguments of each ``weasyprint.Attachment``; ``options`` WeasyPrint's PDF options;
    ``store`` a :class:`calcdoc.cache.BuildCache` that keeps each part typeset, so that a
    rebuild typesets only the parts whose HTML changed."""
    # inside the build folder being written, which the build removes whatever happens
    work = Path(tempfile.mkdtemp(prefix=".parts-", dir=build_dir))
    css = (build_dir / "assets" / "style.css").read_bytes() if store is not None else b""
    # a part's own identifier is never seen (its pages are taken, its catalog dropped): fixed,
    # so that a part typeset for one package is the same bytes in the next
    part_options = {**options, "pdf_identifier": b"0" * 32}
    try:
        def pdf_path(i):
            return str(work / f"part-{i:05d}.pdf")

        def from_cache(html: str, path: str) -> tuple[str | None, PartLayout | None]:
            if store is None:
                return None, None
            key = store.part_key(html, css)
            hit = store.load_part(key)
            layout = PartLayout.from_data(hit[0], path) if hit else None
            if layout is not None:
                Path(path).write_bytes(hit[1])
            return key, layout

        def keep(key: str | None, layout: PartLayout) -> None:
            if store is not None:
                store.store_part(key, layout.data(), Path(layout.pdf).read_bytes())

        # the contents' page numbers of the last build, if any: when no page moved, the cover
        # and contents typeset with them (and the attachments) alongside the sheets is final
        guess = store.page_guess() if store is not None else None
        html_of = [render_html(part, guess if i == 0 and guess else {})
                   for i, part in enumerate(parts)]
        layouts, keys, todo = {}, {}, []
        for i in range(len(parts)):
            if i == 0 and guess:  # with the attachments: never kept under its HTML alone
                keys[i], layouts[i] = None, None
            else:
                keys[i], layouts[i] = from_cache(html_of[i], pdf_path(i))
            if layouts[i] is None:
                todo.append(i)
        # the cover and contents (with no page numbers written, to count its pages, unless
        # there is a guess) with the rest, the longest first so that the cores finish together
        todo.sort(key=lambda i: -len(html_of[i]))
        tasks = [(html_of[i], str(build_dir), pdf_path(i), options, attachments, finisher)
                 if i == 0 and guess else (html_of[i], str(build_dir), pdf_path(i), part_options)
                 for i in todo]
        for i, layout in _typeset_many(tasks, todo, jobs, len(parts)):
            layouts[i] = layout
            if keys[i] is not None:
                keep(keys[i], layout)
        body = [layouts[i] for i in range(1, len(parts))]
        # the cover and contents again with the page numbers written out and the attachments,
        # until the numbers written are those where the anchors then fall (the first time,
        # unless writing them moved something to another page)
        front = layouts[0]
        if not (guess and _anchor_pages([front] + body) == guess):
            current().show("PDF: the cover and contents with their page numbers")
            for _ in range(4):
                page_of = _anchor_pages([front] + body)
                front = typeset_part(render_html(parts[0], page_of), str(build_dir),
                                     pdf_path(0), options, attachments, finisher)
                if _anchor_pages([front] + body) == page_of:
                    break
            else:
                raise RuntimeError("the contents' page numbers do not settle")
        if store is not None:
            store.store_page_guess(_anchor_pages([front] + body))
        total = front.pages + sum(b.pages for b in body)
        lines = [line for layout in [front] + body for line in layout.page_numbers]
        numbers_html = _page_numbers_html(lines, total)
        key, numbers = from_cache(numbers_html, str(work / "numbers.pdf"))
        if numbers is None:
            numbers = typeset_part(numbers_html, str(build_dir), str(work / "numbers.pdf"),
                                   part_options)
            keep(key, numbers)
        current().show(f"PDF: joining the parts ({total} pages)")
        _join(front, body, numbers.pdf, target, options["pdf_identifier"])
        return total
    finally:
        shutil.rmtree(work, ignore_errors=True)


def _typeset_many(tasks: list[tuple], labels: list[int], jobs: int, total: int):
    """Yield (label, layout) for each task of :func:`typeset_part`, as they finish, on up to
    ``jobs`` processes (in this process when there is one task)."""
    progress = current()
    if len(tasks) <= 1:
        for label, task in zip(labels, tasks):
            yield label, typeset_part(*task)
        return
    with pool(min(jobs, len(tasks))) as workers:
        futures = {workers.submit(typeset_part, *task): label
                   for label, task in zip(labels, tasks)}
        done = total - len(tasks)
        for future in concurrent.futures.as_completed(futures):
            done += 1
            progress.show(f"PDF: {done} of {total} parts typeset on {jobs} processes")
            yield futures[future], future.result()
