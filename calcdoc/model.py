"""Plain dataclasses for the project as written (specs) and as evaluated (results)."""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from calcdoc.errors import Location
from calcdoc.located import Node

__all__ = ["Revision", "Signature", "Confirmation", "CheckSpec", "BlockSpec", "SheetSpec", "ReviewComment",
           "Project", "CheckResult", "EvaluatedBlock", "EvaluatedSheet", "Package"]


@dataclass
class Revision:
    rev: str
    date: str
    purpose: str
    by: str = ""
    checked: str = ""
    approved: str = ""


@dataclass
class Signature:
    role: str  # prepared | checked | approved
    by: str
    date: str
    rev: str


@dataclass
class CheckSpec:
    result: str
    relation: str  # at_most | at_least
    limit_node: Node
    source: str
    loc: Location


@dataclass
class BlockSpec:
    id: str
    kind: str
    title: str
    inputs: Node | None
    checks: list[CheckSpec]
    display: dict[str, str]
    notes: str
    loc: Location
    sheet_id: str = ""

    @property
    def key(self) -> str:
        return f"{self.sheet_id}.{self.id}"


@dataclass
class SheetSpec:
    id: str
    title: str
    path: Path
    relpath: str
    signoff: dict[str, Signature]
    notes: str
    blocks: list[BlockSpec]
    loc: Location


@dataclass
class ReviewComment:
    on: str
    by: str
    date: str
    text: str
    status: str  # open | answered | closed
    response: str
    loc: Location


@dataclass
class Confirmation:
    """A library value the project checked against its printed source."""

    value: str
    by: str
    date: str
    against: str
    loc: Location


@dataclass
class Project:
    root: Path | None
    number: str
    title: str
    client: str
    site: str
    organisation: str
    package_number: str
    package_title: str
    revisions: list[Revision]
    units: str
    precision: int
    sheets: list[SheetSpec]
    materials: dict[str, dict]
    named: dict[str, dict]
    reviewer: str = ""
    comments: list[ReviewComment] = field(default_factory=list)
    input_files: list[str] = field(default_factory=list)  # names inside the project
    files: Any = None  # calcdoc.sources.ProjectFiles the project was read from
    unreadable: set[str] = field(default_factory=set)  # sheets and blocks that did not load
    confirmations: list[Confirmation] = field(default_factory=list)
    project_materials: set[str] = field(default_factory=set)  # names the project defines

    @property
    def revision(self) -> Revision:
        return self.revisions[-1]


@dataclass
class CheckResult:
    """A check as data: value, limit and margin in SI, the unit the result is shown in and
    whether it is a temperature; the view layer prints them."""

    result: str
    relation: str
    value_si: float | None
    limit_si: float
    si_unit: str
    margin_si: float | None
    utilisation: float | None
    passed: bool
    source: str
    display_unit: str | None = None
    temperature: str | None = None
    note: Any = None  # a Phrase: why the value does not exist
    whole: bool = False  # a whole-number result (a month, 1/0): printed as a whole number


@dataclass
class EvaluatedBlock:
    spec: BlockSpec
    kind: Any  # calcdoc.kinds.base.Kind
    inputs: list  # InputRecord
    output: Any  # calcdoc.kinds.base.BlockOutput
    checks: list[CheckResult]

    @property
    def id(self) -> str:
        return self.spec.id

    @property
    def key(self) -> str:
        return self.spec.key

    @property
    def passed(self) -> bool:
        return all(c.passed for c in self.checks)

    def printed_steps(self, sig: int, system: str = "SI") -> list:
        """Return the block's steps as printed (calcdoc.render.printed), worked out once."""
        cache = self.__dict__.setdefault("_printed", {})
        if (sig, system) not in cache:
            from calcdoc.render.printed import print_step
            cache[sig, system] = [print_step(s, sig, system) for s in self.output.steps]
        return cache[sig, system]


@dataclass
class EvaluatedSheet:
    spec: SheetSpec
    blocks: list[EvaluatedBlock]

    @property
    def id(self) -> str:
        return self.spec.id

    @property
    def checks(self) -> list[CheckResult]:
        return [c for b in self.blocks for c in b.checks]


@dataclass
class Package:
    project: Project
    sheets: list[EvaluatedSheet]
    partial: bool = False  # only some sheets (build --sheet): not the package as issued

    def block(self, key: str) -> EvaluatedBlock | None:
        for sheet in self.sheets:
            for block in sheet.blocks:
                if block.key == key:
                    return block
        return None
