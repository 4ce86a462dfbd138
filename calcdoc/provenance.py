"""Which values in a package are not yet confirmed against their printed source.

A library value recalled rather than read from its document is marked as data: a material
property with ``confirmed: false``, a rolled section of the catalogue (calcdoc/materials/
sections.yaml) with ``confirmed: false``, or a :class:`~calcdoc.references.Cite` with
``confirmed=False`` in a kind's source. The package lists every such value it uses under "Values
to confirm", with the document and table to check it against, and ``build --final`` refuses
while one is unconfirmed. A project confirms a value by giving its own (in its materials.yaml,
with its own source) or by recording who checked it against which document (project.yaml
``confirmations``).
"""

from __future__ import annotations

from dataclasses import dataclass

from calcdoc.data import Value
from calcdoc.references import Cite

__all__ = ["ToConfirm", "values_to_confirm", "MATERIAL_UNITS"]

MATERIAL_UNITS = {"conductivity": "W/(m*K)", "density": "kg/m^3",
                  "specific_heat": "J/(kg*K)", "emissivity": "1", "resistance": "m^2*K/W",
                  "vapour_resistance_factor": "1", "equivalent_air_thickness": "m"}


@dataclass(frozen=True)
class ToConfirm:
    """A value to confirm: its key (what a confirmation names), what it is, the value, the
    document and place to check it against, the blocks that use it, and the project's
    confirmation if there is one."""

    key: str
    what: str
    value: Value | str | None
    against: str
    used_in: tuple
    confirmation: object = None


def _sources_of(block):
    """Every source a block's report prints: inputs, steps, notes, warnings, the method."""
    for record in block.inputs:
        yield record.source
    for step in block.output.steps:
        yield step.source
    for item in block.output.notes + block.output.warnings:
        yield item.get("source", "")
    yield from block.kind.references


def _origins(block) -> list[str]:
    found: list[str] = []
    for step in block.output.steps:
        # a statement's named values are its operands (the points of a curve it integrates)
        named = step.statement.values.values() if step.statement is not None else ()
        for value in (*step.operands.values(), *named):
            if isinstance(value, Value) and value.origin and value.origin not in found:
                found.append(value.origin)
    return found


_SECTION_ORIGIN = "sections."


def _add_section(add, origin: str, block_key: str) -> None:
    """List a catalogue section a block's working uses, once for its five dimensions, while
    its catalogue entry is not confirmed ('sections.DESIGNATION.DIMENSION')."""
    from calcdoc.physics.sections import load_section_catalogue
    designation = origin[len(_SECTION_ORIGIN):].rsplit(".", 1)[0]
    section = load_section_catalogue().get(designation)
    if section is None or section.confirmed:
        return
    mm = [f"{symbol} {getattr(section, key) * 1e3:g}" for symbol, key in (
        ("h", "height"), ("b", "width"), ("t_w", "web_thickness"), ("t_f", "flange_thickness"),
        ("r", "root_radius"))]
    add(f"sections.{designation}", f"rolled section {designation}: dimensions",
        ", ".join(mm) + " (mm)", section.dimension_source, block_key)


def values_to_confirm(package) -> list[ToConfirm]:
    """Return every unconfirmed value the package uses, in the order first used, each with the
    project's confirmation where it has recorded one."""
    project = package.project
    confirmed = {c.value: c for c in project.confirmations}
    found: dict[str, ToConfirm] = {}

    def add(key, what, value, against, block_key):
        entry = found.get(key)
        used = (entry.used_in if entry else ()) + ((block_key,) if entry is None or
                                                   block_key not in entry.used_in else ())
        found[key] = ToConfirm(key, what, value, against, used, confirmed.get(key))

    for sheet in package.sheets:
        for block in sheet.blocks:
            # The library values a block's working uses: its steps' operands say so.
            for origin in _origins(block):
                if origin.startswith(_SECTION_ORIGIN):
                    _add_section(add, origin, block.key)
                    continue
                _, name, prop = origin.split(".", 2)
                entry = project.materials.get(name, {})
                cited = entry.get("sources", {}).get(prop, {})
                if cited.get("confirmed") is not False:
                    continue
                unit = MATERIAL_UNITS.get(prop)
                value = Value(entry[prop], unit, given=True) if unit and prop in entry else None
                add(origin, f"{entry.get('title', name)}: {prop.replace('_', ' ')}", value,
                    cited.get("source", ""), block.key)
            for source in _sources_of(block):
                if isinstance(source, Cite) and not source.confirmed:
                    add(source.key or str(source), source.value or str(source), None,
                        str(source), block.key)
    return list(found.values())
