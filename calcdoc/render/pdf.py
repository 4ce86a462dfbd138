"""The paginated PDF package: the package HTML and the print stylesheet through WeasyPrint.

The PDF is PDF/A-3b (the variant that keeps attachments), with every input file attached so that
``calcdoc verify`` can re-run it years later, and with a fixed identifier and fixed dates so that
a rebuild of the same inputs is byte-identical. WeasyPrint writes the PDF/A parts (XMP
identification, the sRGB output intent with its ICC profile, embedded font programs, each file
specification's /AFRelationship); calcdoc names the relationships (the inputs are the Source of
the document, results.json its Data) and lists each file once in the catalog's /AF. Resource
loading is confined: only ``data:`` URLs and files inside the build folder are served; anything
else fails the build.
"""

from __future__ import annotations

import datetime
import hashlib
import logging
from pathlib import Path
from urllib.parse import unquote, urlsplit

import weasyprint
from weasyprint.urls import FatalURLFetchingError, URLFetcher

from calcdoc.progress import weasyprint_pages

__all__ = ["write_pdf", "in_parts", "print_document", "ConfinedFetcher", "ResourceRefused"]

LOGGER = logging.getLogger("calcdoc.pdf")


class ResourceRefused(FatalURLFetchingError):
    """A resource outside the build folder, or missing, was asked for: the build fails."""


class ConfinedFetcher(URLFetcher):
    """Serve ``data:`` URLs and files inside one folder; refuse everything else."""

    def __init__(self, folder: Path, **kwargs):
        super().__init__(allowed_protocols={"data", "file"}, **kwargs)
        self.folder = folder.resolve()
        self.refused: list[str] = []

    def fetch(self, url, headers=None):
        """Return the resource at ``url``; raise :class:`ResourceRefused` for anything else."""
        if url.startswith("data:"):
            return super().fetch(url, headers)
        parts = urlsplit(url)
        if parts.scheme == "file" and parts.netloc in ("", "localhost"):
            path = Path(unquote(parts.path)).resolve()
            if self.folder in path.parents:
                if not path.is_file():
                    self._refuse(url, "missing asset")
                return super().fetch(url, headers)
        self._refuse(url, "resource outside the build folder refused")

    def _refuse(self, url: str, why: str):
        self.refused.append(url)
        LOGGER.error("%s: %s", why, url)
        raise ResourceRefused(f"{why}: {url}")


def write_pdf(html: str, work_dir: Path, target: Path, attachments: list[tuple[str, bytes]],
              revision_date: str, digest_seed: str, jobs: int = 1,
              render_part=None, parts: list[dict] | None = None, store=None) -> None:
    """Render ``html`` to ``target`` as PDF/A-3b; its relative links (assets/style.css) are
    resolved in ``work_dir``, the build folder, and nothing outside it is served.

    With ``jobs`` > 1 and ``parts`` (the package's parts, :func:`calcdoc.render.parts.plan_parts`)
    the parts are typeset on ``jobs`` processes and joined (:mod:`calcdoc.render.parts`);
    ``render_part(part, page_of)`` returns a part's HTML; ``store``, the build cache, keeps
    each part typeset."""
    files = attachment_arguments(attachments, revision_date)
    options = pdf_options(digest_seed)
    if in_parts(jobs, parts):
        from calcdoc.render.parts import write_pdf_in_parts
        write_pdf_in_parts(render_part, parts, work_dir, target, files, options,
                           _list_associated_files_once, jobs, store)
        return
    with weasyprint_pages():  # 'PDF: laying out page N' on a terminal
        document, fetcher = print_document(html, work_dir)
        document.write_pdf(target, attachments=attachments_for(files, work_dir, fetcher),
                           finisher=_list_associated_files_once, **options)


def print_document(html: str, work_dir: Path) -> tuple[weasyprint.HTML, ConfinedFetcher]:
    """Return ``html`` as a WeasyPrint document whose resources are fetched from ``work_dir``
    alone, with its fetcher (which the attachments use too)."""
    fetcher = ConfinedFetcher(work_dir)
    return weasyprint.HTML(string=html, base_url=str(work_dir) + "/",
                           url_fetcher=fetcher), fetcher


def in_parts(jobs: int, parts: list[dict] | None) -> bool:
    """Whether the package is typeset in parts: more than one process, and sheets to share."""
    return jobs > 1 and bool(parts) and len(parts) > 2


def attachment_arguments(attachments: list[tuple[str, bytes]], revision_date: str) -> list[dict]:
    """Return the keyword arguments of each ``weasyprint.Attachment`` of the package (plain
    data, so that a worker process can be given them)."""
    when = _fixed_datetime(revision_date)
    return [{"string": data, "name": name, "description": _describe(name), "created": when,
             "modified": when, "relationship": _relationship(name)}
            for name, data in attachments]


def attachments_for(files: list[dict], work_dir: Path, fetcher) -> list:
    """Return the ``weasyprint.Attachment`` objects of :func:`attachment_arguments`."""
    return [weasyprint.Attachment(url_fetcher=fetcher, base_url=str(work_dir), **a)
            for a in files]


def pdf_options(digest_seed: str) -> dict:
    """Return WeasyPrint's PDF options for the package: PDF/A-3b, compressed, with an
    identifier fixed by the results (a rebuild of the same inputs is byte-identical)."""
    identifier = hashlib.sha256(digest_seed.encode()).hexdigest()[:32].encode()
    return {"pdf_variant": "pdf/a-3b", "pdf_identifier": identifier, "uncompressed_pdf": False}


def _relationship(name: str) -> str:
    """PDF/A-3 (ISO 19005-3 6.8) asks how each attached file relates to the document: the input
    files are the Source it was made from, results.json the Data it shows."""
    return "Data" if name == "results.json" else "Source"


def _list_associated_files_once(document, pdf) -> None:
    """WeasyPrint 70 puts every attachment into the catalog's /AF twice (once from the
    EmbeddedFiles name tree, once from its file specification); keep the first of each, in
    order, so that the array names each associated file once."""
    listed = pdf.catalog.get("AF")
    if listed:
        pdf.catalog["AF"] = type(listed)(dict.fromkeys(listed))


def _fixed_datetime(date_text: str) -> datetime.datetime:
    try:
        day = datetime.date.fromisoformat(date_text)
    except ValueError:
        day = datetime.date(2000, 1, 1)
    return datetime.datetime(day.year, day.month, day.day, tzinfo=datetime.timezone.utc)


def _describe(name: str) -> str:
    if name == "results.json":
        return "calcdoc results (results.json, coherent SI)"
    return f"calcdoc input file {name}"
