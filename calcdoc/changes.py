"""What changed between two evaluated packages, as an engineer writes a revision note.

``PIR cavity board thickness 50 mm → 100 mm; EW1.wall.U 0.241 → 0.183 W/(m²·K) (−24 %); check
EW1.wall.U at most 0.28 W/(m²·K) now passes``: inputs as written, named by their list item;
results as the package prints them with the change in per cent; checks that flip; sheets and
blocks added or removed. ``calcdoc diff`` prints it; ``build --previous`` marks each changed
row in the margin and lists the changes under the current revision on the cover.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

from calcdoc.render.printed import print_check, print_value

__all__ = ["Change", "Changes", "compare_packages"]


@dataclass(frozen=True)
class Change:
    """One change: what (its key in the package), in words, old and new as printed."""

    kind: str  # input | result | check | sheet | block
    key: str  # 'EW1.wall', 'EW1.wall.U', 'EW1.wall.layers[3].thickness', 'EW1.wall.U.check'
    what: str
    old: str
    new: str
    percent: float | None = None

    def text(self) -> str:
        if self.kind in ("sheet", "block"):
            return f"{self.what}: {self.old or 'added'}" if not self.new else \
                f"{self.what}: {self.new}"
        line = f"{self.what}: {self.old} → {self.new}"
        if self.percent is not None:
            line += f" ({self.percent:+.0f} %)".replace("-", "−")
        return line

    def record(self) -> dict:
        out = {"key": self.key, "what": self.what, "old": self.old, "new": self.new}
        if self.percent is not None:
            out["percent"] = self.percent
        return out


@dataclass
class Changes:
    old_revision: str
    new_revision: str
    inputs: list = field(default_factory=list)
    results: list = field(default_factory=list)
    checks: list = field(default_factory=list)
    structure: list = field(default_factory=list)  # sheets and blocks added or removed

    def __bool__(self) -> bool:
        return bool(self.inputs or self.results or self.checks or self.structure)

    def keys(self) -> set[str]:
        """Every changed row of the new package: input, result and check keys."""
        return {c.key for c in self.inputs + self.results + self.checks + self.structure}

    def lines(self) -> list[str]:
        out = []
        if self.old_revision != self.new_revision:
            out.append(f"Revision {self.old_revision} → {self.new_revision}")
        for title, items in (("Sheets and blocks", self.structure), ("Inputs", self.inputs),
                             ("Results", self.results), ("Checks", self.checks)):
            if items:
                out.append(title)
                out.extend(f"  {c.text()}" for c in items)
        return out

    def groups(self) -> list[tuple[str, list[str]]]:
        """The changes by heading, for the cover: [(heading, [line, ...]), ...]."""
        return [(title, [c.text() for c in items]) for title, items in (
            ("Sheets and blocks", self.structure), ("Inputs", self.inputs),
            ("Results", self.results), ("Checks", self.checks)) if items]

    def record(self) -> dict:
        return {"old_revision": self.old_revision, "new_revision": self.new_revision,
                "sheets_and_blocks": [c.record() for c in self.structure],
                "inputs": [c.record() for c in self.inputs],
                "results": [c.record() for c in self.results],
                "checks": [c.record() for c in self.checks]}


def _inputs(package, sig, system) -> dict[str, tuple[str, str]]:
    """Every input as written: key → (words naming it, value as written or printed)."""
    out = {}
    for sheet in package.sheets:
        for block in sheet.blocks:
            for record in block.inputs:
                key = f"{block.key}.{record.path}"
                field_name = record.path.rsplit(".", 1)[-1].replace("_", " ")
                named = f"{block.key} {record.item} {field_name}" if record.item else \
                    f"{block.key} {field_name}"
                if isinstance(record.si, (int, float)) and not isinstance(record.si, bool):
                    shown = record.written if record.origin in ("given", "named") and \
                        record.written else print_value(record.value(), sig, system).text
                else:
                    shown = str(record.written or record.si)
                if record.origin == "default":
                    shown = f"{shown} (default)"
                out[key] = (named, shown)
    return out


def _results(package, sig, system) -> dict[str, tuple[str, float | None]]:
    out = {}
    for sheet in package.sheets:
        for block in sheet.blocks:
            o = block.output
            for name, r in o.results.items():
                value = o.value_of(name)
                if isinstance(r.value, list):
                    shown = ", ".join(print_value(value, sig, system, index=i).text
                                      for i in range(len(r.value)))
                    out[f"{block.key}.{name}"] = (shown, None)
                else:
                    out[f"{block.key}.{name}"] = (print_value(value, sig, system).text, r.value)
            for name in o.absent:
                out[f"{block.key}.{name}"] = ("not reached", None)
    return out


def _checks(package, sig, system) -> dict[str, tuple[str, bool]]:
    out = {}
    for sheet in package.sheets:
        for block in sheet.blocks:
            for c in block.checks:
                relation = "at most" if c.relation == "at_most" else "at least"
                shown = print_check(c, sig, system)
                words = f"check {block.key}.{c.result} {relation} {shown.limit}"
                out[f"{block.key}.{c.result}.check.{c.relation}"] = (words, c.passed)
    return out


def compare_packages(old, new) -> Changes:
    """Return what changed from the evaluated package ``old`` to ``new``, printed as ``new``
    prints (its precision and unit system)."""
    sig, system = new.project.precision, new.project.units
    changes = Changes(old.project.revision.rev, new.project.revision.rev)
    old_sheets = {s.id: s for s in old.sheets}
    new_sheets = {s.id: s for s in new.sheets}
    for sid in new_sheets.keys() - old_sheets.keys():
        changes.structure.append(Change("sheet", sid, f"sheet {sid}", "", "added"))
    for sid in old_sheets.keys() - new_sheets.keys():
        changes.structure.append(Change("sheet", sid, f"sheet {sid}", "removed", ""))
    old_blocks = {b.key for s in old.sheets for b in s.blocks}
    new_blocks = {b.key for s in new.sheets for b in s.blocks}
    for key in sorted(new_blocks - old_blocks):
        if key.split(".")[0] in old_sheets:
            changes.structure.append(Change("block", key, f"block {key}", "", "added"))
    for key in sorted(old_blocks - new_blocks):
        if key.split(".")[0] in new_sheets:
            changes.structure.append(Change("block", key, f"block {key}", "removed", ""))

    common = old_blocks & new_blocks
    oi, ni = _inputs(old, sig, system), _inputs(new, sig, system)
    for key in ni:
        if not any(key.startswith(b + ".") for b in common):
            continue
        if key not in oi:
            changes.inputs.append(Change("input", key, ni[key][0], "—", ni[key][1]))
        elif oi[key][1] != ni[key][1]:
            changes.inputs.append(Change("input", key, ni[key][0], oi[key][1], ni[key][1]))
    for key in oi:
        if key not in ni and any(key.startswith(b + ".") for b in common):
            changes.inputs.append(Change("input", key, oi[key][0], oi[key][1], "—"))

    orr, nr = _results(old, sig, system), _results(new, sig, system)
    for key in nr:
        if key not in orr or not any(key.startswith(b + ".") for b in common):
            continue
        (old_text, old_si), (new_text, new_si) = orr[key], nr[key]
        if old_text == new_text:
            continue
        percent = None
        if old_si not in (None, 0) and new_si is not None and math.isfinite(old_si):
            spec = next((b.output.declared(key.rsplit(".", 1)[1]) for s in new.sheets
                         for b in s.blocks if key.startswith(b.key + ".")), None)
            if spec is None or spec.temperature != "absolute":
                percent = 100.0 * (new_si - old_si) / abs(old_si)
        changes.results.append(Change("result", key, key, old_text, new_text, percent))

    oc, nc = _checks(old, sig, system), _checks(new, sig, system)
    for key, (words, passed) in nc.items():
        if key in oc and oc[key][1] != passed:
            changes.checks.append(Change("check", key, words, "passed" if oc[key][1]
                                         else "FAILED", "passes" if passed else "FAILS"))
        elif key not in oc and any(key.startswith(b + ".") for b in common):
            changes.checks.append(Change("check", key, words, "—",
                                         "passes" if passed else "FAILS"))
    return changes
