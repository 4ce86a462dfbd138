"""Load project.yaml, the sheets, materials and review comments into the model, with locations.

Every problem found is collected, so a user sees all of them in one run: :func:`read_project`
returns the project as far as it could be read together with the errors (the evaluator goes on
with the blocks that loaded and reports everything at the end); :func:`load_project` raises them.
Unknown keys are errors (a typo would otherwise silently take a default). Files are read through
a :class:`~calcdoc.sources.ProjectFiles`, which keeps every read inside the project folder.
"""

from __future__ import annotations

import datetime
import re
from pathlib import Path

from calcdoc.errors import InputError, InputErrors, Location
from calcdoc.kinds import registry
from calcdoc.kinds.base import did_you_mean
from calcdoc.located import Node, is_date, load_yaml, plain
from calcdoc.model import (BlockSpec, CheckSpec, Confirmation, Project, ReviewComment, Revision,
                           SheetSpec, Signature)
from calcdoc.sources import DiskFiles, FileProblem, ProjectFiles
from calcdoc.structure import (BLOCK, CHECK, PROJECT_FILE, REVIEW_FILE, SHEET_FILE, read,
                               read_checked)
from calcdoc.structure import _value as structure_value

PROJECT_KEYS = {k.name: k for k in PROJECT_FILE}
REVIEW_KEYS = {k.name: k for k in REVIEW_FILE}
from calcdoc.units import ABSOLUTE, UnitProblem, parse_quantity_text

__all__ = ["load_project", "read_project", "load_materials", "load_named_values", "LIBRARY_DIR",
           "builtin_material_files", "Collector", "project_files"]

LIBRARY_DIR = Path(__file__).parent / "materials"

_MATERIAL_PROPERTIES = {"conductivity": "W/(m*K)", "density": "kg/m^3",
                        "specific_heat": "J/(kg*K)", "emissivity": "1",
                        "resistance": "m^2*K/W", "vapour_resistance_factor": "1",
                        "equivalent_air_thickness": "m"}
# Range of each property: (lowest, whether the lowest itself is allowed, highest or None, the
# expected text of the error).
# μ is the layer's vapour resistance over that of still air of the same thickness: no material
# passes vapour more easily than the air it displaces, so μ < 1 is a typing error, not a material.
_PROPERTY_RANGE = {"conductivity": (0.0, False, None, "a conductivity above 0"),
                   "density": (0.0, False, None, "a density above 0"),
                   "specific_heat": (0.0, False, None, "a specific heat above 0"),
                   "emissivity": (0.0, False, 1.0, "an emissivity above 0 and at most 1"),
                   "resistance": (0.0, False, None, "a thermal resistance above 0"),
                   "vapour_resistance_factor": (1.0, True, None, "a vapour resistance factor "
                                                "of at least 1 (still air is 1)"),
                   "equivalent_air_thickness": (0.0, False, None, "an equivalent air layer "
                                                "thickness above 0")}
_MATERIAL_CURVE = "conductivity_curve"
_MATERIAL_TEXT = ("title", "source", "notes")
_MATERIAL_LAW = ("law", "aggregate")  # parameters of a temperature-dependent law, read by the law
_MATERIAL_CATEGORIES = ("envelope", "services", "fire")
_MATERIAL_KEYS = ("title", "category", "source", "confirmed", "notes", *_MATERIAL_PROPERTIES,
                  _MATERIAL_CURVE, *_MATERIAL_LAW)
_PROPERTY_KEYS = ("value", "source", "confirmed")


class Collector:
    """Collects located errors; checks mappings' keys and reads scalars safely."""

    def __init__(self):
        self.errors: list[InputError] = []

    def error(self, loc, where, what, expected=None, got=None, hint=None):
        self.errors.append(InputError(loc, where, what, expected, got, hint))

    def keys(self, node: Node, allowed, where: str, required=()):
        """Check a mapping's keys: unknown keys and missing required keys are errors."""
        if not node.is_map:
            self.error(node.loc, where, "not a mapping", "a mapping of " + ", ".join(allowed),
                       _shown(node))
            return False
        for key in node.value:
            if key not in allowed:
                self.error(node.key_locs[key], f"{where}.{key}" if where else key,
                           f"unknown key '{key}'", "one of " + ", ".join(allowed), repr(key),
                           did_you_mean(key, allowed))
        for key in required:
            if key not in node.value or node.value[key].value in (None, ""):
                self.error(node.loc, where, f"missing key '{key}'", f"'{key}'", "nothing")
        return True

    def text(self, node: Node | None, where: str, default: str = "") -> str:
        """Return a scalar as text; a mapping or a list where text belongs is an error."""
        if node is None or node.value is None:
            return default
        if not node.is_scalar:
            self.error(node.loc, where, "not text", "a single value",
                       "a mapping" if node.is_map else "a list")
            return default
        return _text(node)

    def date(self, node: Node | None, where: str) -> str:
        """Return a date as ISO text; anything but a date (or nothing) is an error."""
        if node is None or node.value in (None, ""):
            return ""
        if not node.is_scalar or not is_date(node.value):
            self.error(node.loc, where, "not a date", "a date YYYY-MM-DD", _shown(node))
            return ""
        return _text(node)


# Kept for callers outside this module that collect errors the same way.
_Collector = Collector


def _shown(node: Node) -> str:
    """A short text of what was written, for 'got ...' (never a whole file)."""
    text = repr(plain(node))
    return text if len(text) <= 80 else text[:77] + "..."


def _text(node: Node | None, default: str = "") -> str:
    if node is None or node.value is None:
        return default
    value = node.value
    if isinstance(value, (datetime.date, datetime.datetime)):
        return value.isoformat()[:10]
    if not node.is_scalar:
        return default
    return str(value)


def _read(files: ProjectFiles, name: str, col: Collector) -> Node | None:
    label = files.label(name)
    try:
        text = files.read_text(name)
    except FileNotFoundError:
        col.error(Location(label, name=name), "", "file not found", "an existing file", name)
        return None
    except FileProblem as problem:
        col.error(Location(label, name=name), "", problem.what, problem.expected, problem.got)
        return None
    try:
        return load_yaml(text, label, name)
    except InputError as err:
        col.errors.append(err)
    except InputErrors as errs:
        col.errors.extend(errs.errors)
    return None


def project_files(folder: str | Path | ProjectFiles) -> ProjectFiles:
    """Return the files of a project given as a folder or already as ProjectFiles."""
    return folder if isinstance(folder, ProjectFiles) else DiskFiles(folder)


# ----------------------------------------------------------------------------- libraries


def load_materials(paths: list, root, col: Collector, files: ProjectFiles | None = None) -> dict:
    """Return materials by name, each property converted to SI; later files override earlier.

    ``paths`` are library files on disk (``root`` their folder) or, with ``files``, names of
    project files. A property is written as a plain quantity (``0.035 W/(m*K)``) or as
    ``{value, source, confirmed}``. The record keeps each property's SI value under its own name
    (a float; ``conductivity_curve`` a list of ``[T in K, λ in W/(m·K)]`` pairs) and, under
    ``sources``, each property's source text and confirmed flag, those of the entry where the
    property gives none. ``source`` and ``confirmed`` of the record are the entry's
    (``confirmed`` is None when the entry does not say)."""
    materials: dict[str, dict] = {}
    for path in paths:
        if files is None:
            source = DiskFiles(Path(path).parent)
            name = Path(path).name
        else:
            source, name = files, str(path)
        tree = _read(source, name, col)
        if tree is None:
            continue
        if not tree.is_map:
            col.error(tree.loc, "", "not a mapping of materials", "NAME: {...}", _shown(tree))
            continue
        for material, entry in tree.value.items():
            record = _material(material, entry, col)
            if record is not None:
                record["file"] = tree.loc.name or tree.loc.file
                materials[material] = record
    return materials


def _material(name: str, entry: Node, col: Collector) -> dict | None:
    where = f"materials.{name}"
    if not entry.is_map:
        col.error(entry.loc, where, "not a mapping", "{title, conductivity, source, ...}",
                  _shown(entry))
        return None
    record: dict = {"name": name, "title": name, "source": "", "confirmed": None}
    # The entry's own texts first: a property without a source or flag takes the entry's.
    for key, value in entry.value.items():
        if key in _MATERIAL_TEXT:
            record[key] = col.text(value, f"{where}.{key}")
        elif key in _MATERIAL_LAW:
            record[key] = plain(value)
        elif key == "category":
            category = col.text(value, f"{where}.category")
            if category not in _MATERIAL_CATEGORIES:
                col.error(value.loc, f"{where}.category", f"unknown category '{category}'",
                          "one of " + ", ".join(_MATERIAL_CATEGORIES), _shown(value),
                          did_you_mean(category, _MATERIAL_CATEGORIES))
            record["category"] = category
        elif key == "confirmed":
            record["confirmed"] = _flag(value, f"{where}.confirmed", col)
        elif key not in _MATERIAL_PROPERTIES and key != _MATERIAL_CURVE:
            col.error(entry.key_locs[key], f"{where}.{key}", f"unknown key '{key}'",
                      "one of " + ", ".join(_MATERIAL_KEYS), repr(key),
                      did_you_mean(key, _MATERIAL_KEYS))
    sources: dict[str, dict] = {}
    for key, value in entry.value.items():
        if key not in _MATERIAL_PROPERTIES and key != _MATERIAL_CURVE:
            continue
        written = _property_record(value, f"{where}.{key}", key == _MATERIAL_CURVE, col)
        if written is None:
            continue
        value_node, source, confirmed = written
        si = _curve(value_node, f"{where}.{key}", col) if key == _MATERIAL_CURVE else \
            _property_value(key, value_node, f"{where}.{key}", col)
        if si is None:
            continue
        record[key] = si
        sources[key] = {"source": source or record["source"],
                        "confirmed": record["confirmed"] if confirmed is None else confirmed}
    record["sources"] = sources
    if "vapour_resistance_factor" in entry.value and "equivalent_air_thickness" in entry.value:
        col.error(entry.key_locs["equivalent_air_thickness"], where,
                  "both a vapour resistance factor and an equivalent air layer thickness",
                  "one of vapour_resistance_factor (μ, a material) | equivalent_air_thickness "
                  "(s_d, a thin product)", "both")
    unsourced = [key for key, cited in sources.items() if not cited["source"]]
    if not record["source"] and (unsourced or not sources):
        col.error(entry.loc, where, "material without a source",
                  "a source text (standard, handbook or product data)",
                  "none for " + ", ".join(unsourced) if unsourced else "none")
    if not record["source"] and sources and not unsourced:
        # Every property is cited on its own: the entry's citation lists them, once each.
        record["source"] = "; ".join(dict.fromkeys(c["source"] for c in sources.values()))
    return record


def _flag(node: Node, where: str, col: Collector) -> bool | None:
    if isinstance(node.value, bool):
        return node.value
    col.error(node.loc, where, "not true or false", "true or false", _shown(node))
    return None


def _property_record(node: Node, where: str, curve: bool,
                     col: Collector) -> tuple[Node, str, bool | None] | None:
    """Return (value node, source text, confirmed flag) of a property in either written form."""
    if not node.is_map:
        return node, "", None
    ok = True
    for key in node.value:
        if key not in _PROPERTY_KEYS:
            col.error(node.key_locs[key], f"{where}.{key}", f"unknown key '{key}'",
                      "one of " + ", ".join(_PROPERTY_KEYS), repr(key),
                      did_you_mean(key, _PROPERTY_KEYS))
            ok = False
    value = node.value.get("value")
    if value is None or value.value is None:
        col.error(node.loc, where, "missing key 'value'",
                  "{value, source, confirmed}" + (" with value a list of pairs" if curve else ""),
                  "nothing")
        return None
    confirmed = None
    if "confirmed" in node.value:
        confirmed = _flag(node.value["confirmed"], f"{where}.confirmed", col)
        ok = ok and confirmed is not None
    return (value, _text(node.value.get("source")), confirmed) if ok else None


def _property_value(key: str, node: Node, where: str, col: Collector) -> float | None:
    try:
        value = parse_quantity_text(str(node.value), _MATERIAL_PROPERTIES[key])[0]
    except UnitProblem as p:
        col.error(node.loc, where, p.what, p.expected, p.got, p.hint)
        return None
    low, low_allowed, high, expected = _PROPERTY_RANGE[key]
    if not (value >= low if low_allowed else value > low) or (high is not None and value > high):
        col.error(node.loc, where, "out of range", expected, _shown(node))
        return None
    return value


def _curve(node: Node, where: str, col: Collector) -> list[list[float]] | None:
    """Return a conductivity curve as [T in K, λ in W/(m·K)] pairs, temperatures increasing."""
    if not node.is_list:
        col.error(node.loc, where, "not a list of [temperature, conductivity] pairs",
                  "[[T1, λ1], [T2, λ2], ...] with absolute temperatures, increasing",
                  _shown(node))
        return None
    points: list[list[float]] = []
    written: list[str] = []
    failed = False
    for i, item in enumerate(node.value):
        here = f"{where}[{i}]"
        if not item.is_list or len(item.value) != 2 or not all(v.is_scalar for v in item.value):
            col.error(item.loc, here, "not a [temperature, conductivity] pair",
                      "a pair such as [\"10 degC\", \"0.035 W/(m*K)\"]", _shown(item))
            failed = True
            continue
        t_node, k_node = item.value
        temperature = _curve_quantity(t_node, "K", ABSOLUTE, here, col)
        conductivity = _curve_quantity(k_node, "W/(m*K)", None, here, col)
        if temperature is None or conductivity is None:
            failed = True
            continue
        if not temperature > 0:
            col.error(t_node.loc, here, "out of range", "an absolute temperature above 0 K",
                      _shown(t_node))
            failed = True
            continue
        if not conductivity > 0:
            col.error(k_node.loc, here, "out of range", "a conductivity above 0",
                      _shown(k_node))
            failed = True
            continue
        if points and not temperature > points[-1][0]:
            col.error(t_node.loc, here, "temperatures not increasing",
                      f"a temperature above {written[-1]}, the one before", _shown(t_node))
            failed = True
            continue
        points.append([temperature, conductivity])
        written.append(str(t_node.value))
    if len(node.value) < 2:
        count = len(node.value)
        col.error(node.loc, where, "too few points",
                  "at least two [temperature, conductivity] pairs",
                  f"{count} pair" + ("" if count == 1 else "s"))
        return None
    return None if failed else points


def _curve_quantity(node: Node, unit: str, temperature: str | None, where: str,
                    col: Collector) -> float | None:
    try:
        return parse_quantity_text(str(node.value), unit, temperature)[0]
    except UnitProblem as p:
        col.error(node.loc, where, p.what, p.expected, p.got, p.hint)
        return None


def load_named_values() -> dict:
    """Return calcdoc's library of named trade values: name → {value, title, source}."""
    col = Collector()
    tree = _read(DiskFiles(LIBRARY_DIR), "named.yaml", col)
    if col.errors:
        raise InputErrors(col.errors)
    return {name: {k: _text(v) for k, v in entry.value.items()} for name, entry in
            (tree.value.items() if tree else [])}


# Library files that are not materials: the named trade values and the steel section catalogue.
_NOT_MATERIALS = ("named.yaml", "sections.yaml")


def builtin_material_files() -> list[Path]:
    return sorted(p for p in LIBRARY_DIR.glob("*.yaml") if p.name not in _NOT_MATERIALS)


# ----------------------------------------------------------------------------- project


def load_project(folder: str | Path | ProjectFiles) -> Project:
    """Return the Project in ``folder``; raise InputErrors listing every problem found."""
    project, errors = read_project(folder)
    if errors:
        raise InputErrors(errors)
    return project


def read_project(folder: str | Path | ProjectFiles) -> tuple[Project | None, list[InputError]]:
    """Return the project as far as it could be read, and every error found on the way.

    Blocks that could not be read are left out and their keys listed in ``project.unreadable``,
    so that the evaluator skips what depends on them instead of reporting a second error."""
    files = project_files(folder)
    col = Collector()
    if not files.exists("project.yaml"):
        label = files.label("project.yaml")
        return None, [InputError(Location(label), "", "no project.yaml here",
                                 "a project folder with project.yaml",
                                 files.label(".") if hasattr(files, "root") else label)]
    tree = _read(files, "project.yaml", col)
    if tree is None:
        return None, col.errors
    data = read(tree, PROJECT_FILE, "", col, raw=("revisions",)) or {}
    about = data.get("project") or {}
    package = data.get("package") or {}
    revisions = _revisions(data.get("revisions"), col)
    units = data.get("units") or "SI"
    precision = data.get("precision") or 3
    sheets_node = tree.value.get("package").get("sheets") if tree.is_map and \
        tree.value.get("package") is not None and tree.value["package"].is_map else None

    sheet_names = _sheet_names(files, sheets_node, col)
    materials = load_materials(builtin_material_files(), LIBRARY_DIR, col)
    project_materials: set[str] = set()
    if files.exists("materials.yaml"):
        own = load_materials(["materials.yaml"], None, col, files)
        project_materials = set(own)
        materials.update(own)
    named = load_named_values()

    known_kinds = registry()
    sheets: list[SheetSpec] = []
    seen_ids: dict[str, Location] = {}
    unreadable: set[str] = set()
    for name in sheet_names:
        sheet = _sheet(files, name, col, known_kinds, unreadable)
        if sheet is None:
            continue
        if sheet.id in seen_ids:
            col.error(sheet.loc, f"{sheet.id}", "sheet id used twice",
                      "a unique sheet id", f"{sheet.id} (also at {seen_ids[sheet.id]})")
            continue
        seen_ids[sheet.id] = sheet.loc
        sheets.append(sheet)

    reviewer, comments = "", []
    input_files = ["project.yaml"] + sheet_names
    if files.exists("materials.yaml"):
        input_files.append("materials.yaml")
    if files.exists("review.yaml"):
        input_files.append("review.yaml")
        reviewer, comments = _review(files, col)
        targets = {s.id for s in sheets} | {b.key for s in sheets for b in s.blocks}
        for c in comments:
            if c.on not in targets and not _under(c.on, unreadable):
                col.error(c.loc, "review.comments.on", f"comment on unknown sheet or block "
                          f"'{c.on}'", "an existing SHEET or SHEET.block", repr(c.on),
                          did_you_mean(c.on, targets))

    project = Project(root=getattr(files, "root", None), number=about.get("number") or "",
                      title=about.get("title") or "", client=about.get("client") or "",
                      site=about.get("site") or "", organisation=about.get("organisation") or "",
                      package_number=package.get("number") or "",
                      package_title=package.get("title") or "",
                      revisions=revisions, units=units, precision=precision, sheets=sheets,
                      materials=materials, named=named, reviewer=reviewer, comments=comments,
                      input_files=input_files, files=files, unreadable=unreadable,
                      confirmations=_confirmations(tree, data, col),
                      project_materials=project_materials)
    return project, col.errors


def _confirmations(tree: Node, data: dict, col: Collector) -> list[Confirmation]:
    items = data.get("confirmations") or []
    nodes = tree.value["confirmations"].value if items else []
    return [Confirmation(c["value"], c["by"], c["date"], c["against"], node.loc)
            for c, node in zip(items, nodes) if c]


def _under(key: str, unreadable: set[str]) -> bool:
    return key in unreadable or key.split(".")[0] in unreadable


def _revisions(node: Node | None, col: Collector) -> list[Revision]:
    if node is None:
        return [Revision("-", "", "")]
    items = structure_value(PROJECT_KEYS["revisions"], node, "revisions", col) or []
    out = [Revision(**{k: v or "" for k, v in item.items()}) for item in items if item]
    return out or [Revision("-", "", "")]


def _sheet_names(files: ProjectFiles, node: Node | None, col: Collector) -> list[str]:
    if node is None:
        return files.sheet_names()
    if not node.is_list:
        col.error(node.loc, "package.sheets", "not a list", "a list of sheet files", _shown(node))
        return []
    names = []
    for item in node.value:
        if not item.is_scalar or not isinstance(item.value, str):
            col.error(item.loc, "package.sheets", "not a file name",
                      "a sheet file such as sheets/ew1.yaml", _shown(item))
            continue
        name = item.value.strip()
        if name.startswith("./"):
            name = name[2:]
        try:
            files.check(name)
        except FileProblem as problem:
            col.error(item.loc, "package.sheets", problem.what, problem.expected, problem.got)
            continue
        if not files.exists(name):
            col.error(item.loc, "package.sheets", "sheet file not found",
                      "a file inside the project folder", repr(item.value))
            continue
        if name in names:
            col.error(item.loc, "package.sheets", "sheet file listed twice", "each file once",
                      repr(item.value))
            continue
        names.append(name)
    return names


def _sheet(files: ProjectFiles, name: str, col: Collector, kinds,
           unreadable: set[str]) -> SheetSpec | None:
    tree = _read(files, name, col)
    stem = Path(name).stem
    if tree is None:
        unreadable.add(stem)
        return None
    id_node = tree.value.get("id") if tree.is_map else None
    sheet_id = _text(id_node, stem) if id_node is not None and id_node.is_scalar else stem
    data = read(tree, SHEET_FILE, sheet_id, col, raw=("blocks",))
    if data is None or data.get("id") is None and id_node is not None:
        unreadable.add(stem)
        return None
    v = tree.value
    sheet_id = data.get("id") or stem
    signoff = {role: Signature(role, sig["by"] or "", sig["date"] or "", sig["rev"] or "")
               for role, sig in (data.get("signoff") or {}).items()
               if sig and sig.get("by") and sig.get("date") and sig.get("rev")}
    blocks = []
    bnode = v.get("blocks")
    seen: dict[str, Location] = {}
    if bnode is not None and not bnode.is_list:
        col.error(bnode.loc, f"{sheet_id}.blocks", "not a list", "a list of blocks",
                  _shown(bnode))
    elif bnode is not None:
        for i, item in enumerate(bnode.value):
            before = len(col.errors)
            block = _block(item, sheet_id, i, col, kinds)
            if block is None or len(col.errors) > before:
                block_id = item.value.get("id") if item.is_map else None
                if block_id is not None and block_id.is_scalar:
                    unreadable.add(f"{sheet_id}.{block_id.value}")
                continue
            if block.id in seen:
                col.error(block.loc, f"{sheet_id}.{block.id}", "block id used twice in the sheet",
                          "a unique block id", f"{block.id} (also at {seen[block.id]})")
                unreadable.add(block.key)
                continue
            seen[block.id] = block.loc
            blocks.append(block)
    return SheetSpec(id=sheet_id, title=data.get("title") or "", path=Path(name), relpath=name,
                     signoff=signoff, notes=data.get("notes") or "", blocks=blocks,
                     loc=tree.loc)


def _block(node: Node, sheet_id: str, index: int, col: Collector, kinds) -> BlockSpec | None:
    where = f"{sheet_id}.blocks[{index}]"
    if not node.is_map:
        col.error(node.loc, where, "not a mapping", "a block {id, kind, title, inputs, ...}",
                  _shown(node))
        return None
    kind_node = node.get("kind")
    kind_name = kind_node.value if kind_node is not None and kind_node.is_scalar else None
    if kind_node is not None and not isinstance(kind_name, str):
        col.error(kind_node.loc, f"{where}.kind", "not a kind name", "one of " + ", ".join(kinds),
                  _shown(kind_node))
        return None
    declared = kinds.get(kind_name) if kind_name is not None else None
    if kind_name is not None and declared is None:
        block_id = _text(node.get("id"), f"blocks[{index}]")
        col.error(kind_node.loc, f"{sheet_id}.{block_id}.kind", f"unknown kind '{kind_name}'",
                  "one of " + ", ".join(kinds), repr(kind_name), did_you_mean(kind_name, kinds))
        return None  # its other keys cannot be judged without the kind
    keys = BLOCK.keys
    extra: tuple = ()
    if declared is not None and declared.inputs_at_block_level:
        keys = tuple(k for k in BLOCK.keys if k.name != "inputs")
        extra = tuple(f.name for f in declared.inputs)
    before = len(col.errors)
    data = read(node, keys, where, col, extra=extra, raw=("checks", "display", "inputs"))
    if data is None or not data.get("id") or len(col.errors) > before:
        return None
    v = node.value
    block_id = data["id"]
    checks = _checks(v.get("checks"), f"{sheet_id}.{block_id}", col)
    display = {}
    dnode = v.get("display")
    if dnode is not None:
        if not dnode.is_map:
            col.error(dnode.loc, f"{sheet_id}.{block_id}.display", "not a mapping",
                      "RESULT: unit", _shown(dnode))
        else:
            display = {k: col.text(x, f"{sheet_id}.{block_id}.display.{k}")
                       for k, x in dnode.value.items()}
    inputs = v.get("inputs")
    if declared is not None and declared.inputs_at_block_level:
        names = {f.name for f in declared.inputs}
        inputs = Node({k: x for k, x in v.items() if k in names}, node.loc,
                      {k: x for k, x in node.key_locs.items() if k in names})
    if inputs is not None and inputs.value is not None and not inputs.is_map:
        col.error(inputs.loc, f"{sheet_id}.{block_id}.inputs", "not a mapping",
                  "a mapping of input names to values", _shown(inputs))
        return None
    return BlockSpec(id=block_id, kind=kind_name, title=data.get("title") or block_id,
                     inputs=inputs if inputs is not None and inputs.value is not None else None,
                     checks=checks, display=display, notes=data.get("notes") or "",
                     loc=node.loc, sheet_id=sheet_id)


def _checks(cnode: Node | None, key: str, col: Collector) -> list[CheckSpec]:
    if cnode is None or cnode.value is None:
        return []
    if not cnode.is_list:
        col.error(cnode.loc, f"{key}.checks", "not a list",
                  "a list of {result, at_most | at_least, source}", _shown(cnode))
        return []
    checks = []
    for j, c in enumerate(cnode.value):
        before = len(col.errors)
        data = read_checked(c, CHECK, f"{key}.checks[{j}]", col)
        if data is None or len(col.errors) > before:
            continue
        relation = "at_most" if data.get("at_most") is not None else "at_least"
        checks.append(CheckSpec(result=data["result"], relation=relation,
                                limit_node=c.value[relation], source=data.get("source") or "",
                                loc=c.loc))
    return checks


def _review(files: ProjectFiles, col: Collector):
    tree = _read(files, "review.yaml", col)
    if tree is None:
        return "", []
    data = read(tree, REVIEW_FILE, "review", col, raw=("comments",))
    if data is None:
        return "", []
    comments = []
    cnode = data.get("comments")
    if cnode is None or cnode.value is None:
        return data.get("reviewer") or "", []
    if not cnode.is_list:
        col.error(cnode.loc, "review.comments", "not a list",
                  "a list of {on, by, date, text, status, response}", _shown(cnode))
        return data.get("reviewer") or "", []
    comment_key = REVIEW_KEYS["comments"].items
    for i, c in enumerate(cnode.value):
        before = len(col.errors)
        item = read_checked(c, comment_key, f"review.comments[{i}]", col)
        if item is None or len(col.errors) > before:
            continue
        comments.append(ReviewComment(on=item["on"], by=item.get("by") or "",
                                      date=item.get("date") or "", text=item["text"],
                                      status=item["status"], response=item.get("response") or "",
                                      loc=c.loc))
    return data.get("reviewer") or "", comments
