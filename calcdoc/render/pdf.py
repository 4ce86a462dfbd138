"""The paginated PDF package: the package HTML and the print stylesheet through WeasyPrint.

The PDF is PDF/A-3b (the variant that keeps attachments), with every input file attached so that
``calcdoc verify`` can re-run it years later, and with a fixed identifier and fixed dates so that
a rebuild of the same inputs is byte-identical. Resource loading is confined: only ``data:`` URLs
and files inside the build folder are served; anything else fails the build.
"""

from __future__ import annotations

import datetime
import hashlib
from pathlib import Path

import weasyprint
from weasyprint.urls import FatalURLFetchingError, URLFetcher

__all__ = ["write_pdf", "ConfinedFetcher"]


class ConfinedFetcher(URLFetcher):
    """Serve ``data:`` URLs and files inside one folder; refuse everything else."""

    def __init__(self, folder: Path, **kwargs):
        super().__init__(allowed_protocols={"data", "file"}, **kwargs)
        self.folder = folder.resolve()
        self.refused: list[str] = []

    def fetch(self, url, headers=None):
        if url.startswith("data:"):
            return super().fetch(url, headers)
        if url.startswith("file://"):
            path = Path(url[len("file://"):].split("?")[0].split("#")[0]).resolve()
            if path == self.folder or self.folder in path.parents:
                if not path.is_file():
                    raise FatalURLFetchingError(f"missing asset {path}")
                return super().fetch(url, headers)
        self.refused.append(url)
        raise FatalURLFetchingError(f"resource outside the build folder refused: {url}")


def write_pdf(html: str, work_dir: Path, target: Path, attachments: list[tuple[str, bytes]],
              revision_date: str, digest_seed: str) -> None:
    """Render ``html`` (with style.css in ``work_dir``) to ``target`` as PDF/A-3b."""
    fetcher = ConfinedFetcher(work_dir)
    when = _fixed_datetime(revision_date)
    files = [weasyprint.Attachment(string=data, name=name, description=f"calcdoc input {name}",
                                   created=when, modified=when, relationship="Source",
                                   url_fetcher=fetcher, base_url=str(work_dir))
             for name, data in attachments]
    document = weasyprint.HTML(string=html, base_url=str(work_dir) + "/", url_fetcher=fetcher)
    identifier = hashlib.sha256(digest_seed.encode()).hexdigest()[:32].encode()
    document.write_pdf(target, attachments=files, pdf_variant="pdf/a-3b",
                       pdf_identifier=identifier, uncompressed_pdf=False)


def _fixed_datetime(date_text: str) -> datetime.datetime:
    try:
        day = datetime.date.fromisoformat(date_text)
    except ValueError:
        day = datetime.date(2000, 1, 1)
    return datetime.datetime(day.year, day.month, day.day, tzinfo=datetime.timezone.utc)
