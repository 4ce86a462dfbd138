"""Sources as engineers cite them: published documents, project information, statements.

A package's numbered references hold published documents only — standards, handbooks, papers —
one entry per document and edition, cited in the text as [n, clause]. A source is split into the
document and the place in it (:func:`split`): ``"ISO 6946:2017, 6.8, Table 7"`` is document
``ISO 6946:2017`` at ``6.8, Table 7``. Project information (a client's brief, a drawing, a product
data sheet, a site measurement) is printed beside the input it supports and listed apart; a
statement of practice or a named law is printed beside what it supports and not numbered.

A value recalled rather than read from its printed source says so as data, never in its source
text: :class:`Cite` with ``confirmed=False``. The package lists such values under "Values to
confirm", and ``build --final`` refuses while one is unconfirmed (FORMAT, issue "values to
confirm").
"""

from __future__ import annotations

import re
from dataclasses import dataclass

__all__ = ["Cite", "SourceParts", "split", "PUBLISHED", "PROJECT", "STATEMENT", "PUBLICATIONS"]

PUBLISHED = "published"
PROJECT = "project"
STATEMENT = "statement"


@dataclass(frozen=True)
class Cite:
    """A place in a published document: ``document`` with its edition (``ISO 6946:2017``) and
    ``where`` in it (``6.8, Table 7``). ``confirmed`` is False for a value or clause recalled and
    not yet checked against the printed document; ``key`` names it for a project's
    confirmation, and ``value`` says what is to be confirmed (``R_si = 0.25 m²·K/W``)."""

    document: str
    where: str = ""
    confirmed: bool = True
    key: str = ""
    value: str = ""

    def __str__(self) -> str:
        return f"{self.document}, {self.where}" if self.where else self.document


@dataclass(frozen=True)
class SourceParts:
    """A source split: its class (published, project, statement), the document and the place
    in it (published), or the text (project information and statements)."""

    kind: str
    document: str
    where: str
    text: str


# A standard's designation at the start of a source: body, number with parts, optional year.
_STANDARD = re.compile(
    r"^(?P<doc>(?:BS\s+EN\s+ISO|BS\s+EN|EN\s+ISO|BS\s+ISO|ISO|EN|BS|DIN|ASTM|NFPA|PD|CEN/TS)"
    r"\s+[A-Z]?\s?\d+(?:[-.]\d+)*(?::\s?\d{4})?)(?P<rest>.*)$")

# Published documents cited by their authors or titles: the start of the text → the entry.
PUBLICATIONS = {
    "Churchill and Chu": "Churchill and Chu, Int. J. Heat Mass Transfer 18 (1975) 1049–1053",
    "CIBSE Guide A": "CIBSE Guide A, Environmental design (2015)",
    "ECCS": "ECCS Technical Committee 3, Fire resistance of steel structures (1995)",
    "Howell": "Howell, A catalog of radiation heat transfer configuration factors",
    "Incropera": "Incropera, DeWitt, Bergman and Lavine, Fundamentals of heat and mass transfer",
    "SCI P363": "SCI P363, Steel building design: design data (Blue Book)",
    "Euronorm 19-57": "Euronorm 19-57, IPE beams",
    "Euronorm 53-62": "Euronorm 53-62, wide-flange beams",
    "VDI 2055": "VDI 2055, Thermal insulation of heated and refrigerated equipment",
    "ASHRAE Handbook": "ASHRAE Handbook — Fundamentals",
}

_STATEMENT = re.compile(r"^(common practice|calcdoc|first law|fourier's law|stefan–boltzmann "
                        r"law|stefan-boltzmann law|newton's law|brent's method)", re.IGNORECASE)


def _tidy(rest: str) -> str:
    return rest.strip().lstrip(",;:").strip()


def split(source: str | Cite) -> list[SourceParts]:
    """Return the parts of a source: one per document it cites (a source may name several,
    separated by ';'). Project information and statements come back as one part each."""
    if isinstance(source, Cite):
        return [SourceParts(PUBLISHED, source.document, source.where, str(source))]
    text = (source or "").strip()
    if not text:
        return []
    if _STATEMENT.match(text):
        return [SourceParts(STATEMENT, "", "", text)]
    pieces = [p.strip() for p in text.split(";") if p.strip()]
    parts = [_published(p) for p in pieces]
    if all(p is not None for p in parts):
        return parts
    if parts[0] is not None:  # a document first, then words about it: keep them with it
        first = parts[0]
        rest = "; ".join(pieces[1:])
        return [SourceParts(PUBLISHED, first.document, "; ".join(x for x in (first.where, rest)
                                                                    if x), text)]
    return [SourceParts(PROJECT, "", "", text)]


def _published(text: str) -> SourceParts | None:
    match = _STANDARD.match(text)
    if match:
        document = re.sub(r"\s+", " ", match.group("doc")).replace(": ", ":")
        return SourceParts(PUBLISHED, document, _tidy(match.group("rest")), text)
    for prefix, entry in PUBLICATIONS.items():
        if text.startswith(prefix):
            rest = _tidy(text[len(prefix):])
            # the entry's own details (journal, year) are in the entry; keep a clause or table
            where = _tidy(re.sub(r"^[^,]*\(\d{4}\)[^,]*", "", rest))
            return SourceParts(PUBLISHED, entry, where, text)
    return None
