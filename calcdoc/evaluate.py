"""Reference resolution, cycle detection and evaluation of every block in dependency order."""

from __future__ import annotations

import math

from calcdoc.errors import InputError, InputErrors, Location, MissingInput
from calcdoc.expressions import ExpressionError
from calcdoc.kinds import get_kind
from calcdoc.data import phrase
from calcdoc.kinds.base import (ABSOLUTE, BlockOutput, InputContext, InvalidInput, Quantity,
                                ResolvedRef, convert_fields, did_you_mean)
from calcdoc.located import Node, plain
from calcdoc.model import (BlockSpec, CheckResult, EvaluatedBlock, EvaluatedSheet, Package,
                           Project)
from calcdoc.physics import PhysicsRangeError
from calcdoc.progress import current
from calcdoc.units import UnitProblem, dimension_text, same_dimension

__all__ = ["evaluate_project", "evaluate_folder", "parse_ref"]


def parse_ref(text, sheet_id: str) -> tuple[str, str, str] | None:
    """Return (sheet, block, result) for 'SHEET.block.result' or 'block.result'; else None."""
    if not isinstance(text, str):
        return None
    parts = text.split(".")
    if len(parts) == 3 and all(parts):
        return parts[0], parts[1], parts[2]
    if len(parts) == 2 and all(parts):
        return sheet_id, parts[0], parts[1]
    return None


def _refs_in(node: Node | None):
    """Yield every ``{ref: ...}`` value node under ``node``."""
    if node is None:
        return
    if node.is_map:
        if "ref" in node.value:
            yield node.value["ref"]
        for value in node.value.values():
            yield from _refs_in(value)
    elif node.is_list:
        for value in node.value:
            yield from _refs_in(value)


def _order(project: Project, errors: list[InputError],
           only: set[str] | None = None) -> list[BlockSpec]:
    """Return blocks in dependency order (document order where free); record bad refs, cycles."""
    blocks = {b.key: b for s in project.sheets for b in s.blocks}
    sheets = {s.id for s in project.sheets}
    deps: dict[str, list[str]] = {}
    for key, block in blocks.items():
        deps[key] = []
        for ref_node in _refs_in(block.inputs):
            parsed = parse_ref(ref_node.value, block.sheet_id)
            if parsed is None:
                errors.append(InputError(
                    ref_node.loc, f"{key}.inputs", "malformed reference",
                    "'SHEET.block.result' or 'block.result'", repr(plain(ref_node))[:80]))
                continue
            target = f"{parsed[0]}.{parsed[1]}"
            if target not in blocks and (target in project.unreadable
                                         or parsed[0] in project.unreadable):
                deps[key].append(target)  # its own error is reported; this block is skipped
                continue
            if target not in blocks:
                options = [k for k in blocks]
                hint = did_you_mean(target, options)
                what = (f"reference to unknown sheet '{parsed[0]}'" if parsed[0] not in sheets
                        else f"reference to unknown block '{target}'")
                errors.append(InputError(ref_node.loc, f"{key}.inputs", what,
                                         "an existing SHEET.block", repr(ref_node.value), hint))
                continue
            if target == key:
                errors.append(InputError(ref_node.loc, f"{key}.inputs",
                                         "a block refers to its own result",
                                         "a result of another block", repr(ref_node.value)))
                continue
            deps[key].append(target)

    order: list[str] = []
    state: dict[str, int] = {}  # 1 visiting, 2 done

    def visit(key: str, stack: list[str]):
        if key not in blocks:
            return
        if state.get(key) == 2:
            return
        if state.get(key) == 1:
            cycle = stack[stack.index(key):] + [key]
            first = blocks[cycle[0]]
            errors.append(InputError(first.loc, first.key, "circular references",
                                     "blocks that do not depend on themselves",
                                     " → ".join(cycle)))
            return
        state[key] = 1
        for dep in deps[key]:
            visit(dep, stack + [key])
        state[key] = 2
        order.append(key)

    roots = [k for k in blocks if only is None or k.split(".")[0] in only]
    for key in roots:  # a part of the package: its blocks and what they refer to
        visit(key, [])
    return [blocks[k] for k in order]


def evaluate_folder(folder) -> Package:
    """Load and evaluate a project; raise InputErrors listing every problem of both stages.

    Blocks that loaded are evaluated even when others did not, so that one run reports every
    error across loading, references and evaluation."""
    from calcdoc.project import read_project
    project, errors = read_project(folder)
    if project is None:
        raise InputErrors(errors)
    return evaluate_project(project, errors)


def evaluate_project(project: Project, errors: list[InputError] | None = None,
                     only: set[str] | None = None, store=None) -> Package:
    """Return the evaluated package; raise InputErrors listing every problem found (and
    ``errors`` found before, e.g. by the loader). ``only`` names the sheets wanted: they and
    the blocks they refer to are evaluated, the package holds only them. ``store``, a
    :class:`calcdoc.cache.BuildCache`, gives back what a block's compute wrote in an earlier
    build with the same key (and keeps what it writes now): inputs are still read, resolved
    and range-checked, and checks still made, every time."""
    errors = list(errors or [])
    if only is not None:
        known = {s.id for s in project.sheets}
        unknown = sorted(only - known)
        if unknown:
            raise InputErrors([InputError(Location(str(project.files.label("project.yaml"))
                                                   if project.files else "project.yaml"),
                                          "--sheet", f"unknown sheet '{unknown[0]}'",
                                          "one of " + ", ".join(sorted(known)),
                                          repr(unknown[0]), did_you_mean(unknown[0], known))])
        errors = [e for e in errors if not e.location.name.startswith("sheets/") or any(
            s.relpath == e.location.name and s.id in only for s in project.sheets)]
    ordered = _order(project, errors, only)
    done: dict[str, EvaluatedBlock] = {}
    failed: set[str] = set()
    stored = _Stored(store, project) if store is not None else None

    failed.update(project.unreadable)
    progress = current()
    for number, spec in enumerate(ordered, 1):
        progress.show(f"evaluate: block {number} of {len(ordered)}, {spec.key} ({spec.kind})")
        block = _evaluate_block(spec, project, done, failed, errors, stored)
        if block is None:
            failed.add(spec.key)
        else:
            done[spec.key] = block

    if errors:
        raise InputErrors(errors)
    sheets = [EvaluatedSheet(s, [done[b.key] for b in s.blocks]) for s in project.sheets
              if only is None or s.id in only]
    package = Package(project, sheets, partial=only is not None)
    _check_confirmations(package)
    return package


def _check_confirmations(package: Package) -> None:
    """A confirmation must name a value the package uses that needs one (a typo would
    otherwise leave the real value unconfirmed, unnoticed)."""
    from calcdoc.provenance import values_to_confirm
    project = package.project
    if not project.confirmations:
        return
    keys = [item.key for item in values_to_confirm(package)]
    errors = [InputError(c.loc, "confirmations.value", "confirms a value the package does not "
                         "use or that needs no confirmation", "one of " + (", ".join(keys)
                                                                           or "none"),
                         repr(c.value), did_you_mean(c.value, keys))
              for c in project.confirmations if c.value not in keys]
    if errors:
        raise InputErrors(errors)


class _DependsOnFailed(Exception):
    pass


def _resolver(spec: BlockSpec, done: dict, failed: set):
    def resolve(ref_node: Node, path: str) -> ResolvedRef:
        parsed = parse_ref(ref_node.value, spec.sheet_id)
        if parsed is None:  # reported when the evaluation order was made
            raise _DependsOnFailed
        sheet, block, result = parsed
        key = f"{sheet}.{block}"
        if key in failed or sheet in failed or key not in done:
            raise _DependsOnFailed
        target = done[key]
        out = target.output
        name = f"{key}.{result}"
        if result in out.series and result not in out.results:
            s = out.series[result]
            return ResolvedRef(name, None, s.y_unit, ABSOLUTE if s.y_unit == "K" else None,
                               obj=s.obj)
        if result in out.results:
            r = out.results[result]
            return ResolvedRef(name, r.value, r.spec.unit, r.spec.temperature,
                               out.display_unit(result))
        if result in out.absent:
            raise InputError(ref_node.loc, f"{spec.key}.inputs.{path}",
                             f"referenced result {name} does not exist", "an existing result",
                             out.absent[result].template)
        options = list(out.results) + list(out.series)
        raise InputError(ref_node.loc, f"{spec.key}.inputs.{path}",
                         f"unknown result '{result}' of {key}",
                         "one of " + ", ".join(options), repr(result),
                         did_you_mean(result, options))
    return resolve


class _Stored:
    """The build cache as evaluation uses it: the key of each block evaluated so far."""

    def __init__(self, store, project: Project):
        from calcdoc.render.memo import data_digest
        self.store = store
        self.library = data_digest(project.materials, project.named)
        self.keys: dict[str, str | None] = store.block_keys
        self.restored: list[str] = store.restored_blocks
        self.computed: list[str] = store.computed_blocks

    def key(self, spec: BlockSpec, records, project: Project) -> str | None:
        targets = []
        for ref_node in _refs_in(spec.inputs):
            parsed = parse_ref(ref_node.value, spec.sheet_id)
            targets.append(self.keys.get(f"{parsed[0]}.{parsed[1]}") if parsed else None)
        key = self.store.block_key(spec, records, self.library, targets, project.precision,
                                   project.units)
        self.keys[spec.key] = key
        return key

    def restore(self, key: str | None, out: BlockOutput) -> bool:
        from calcdoc.stored import Unstorable, restore_output
        data = self.store.load_json("blocks", key) if key else None
        if data is None:
            return False
        try:
            restore_output(out, data)
        except Unstorable:
            return False
        return True

    def keep(self, key: str | None, out: BlockOutput) -> None:
        from calcdoc.stored import encode_output
        data = encode_output(out) if key else None
        if data is not None:  # written when the whole build has succeeded (calcdoc.build)
            self.store.pending_blocks[key] = data


def _evaluate_block(spec: BlockSpec, project: Project, done, failed, errors, stored=None):
    kind = get_kind(spec.kind)
    if kind is None:
        return None  # reported by the loader
    ctx = InputContext(materials=project.materials, named=project.named,
                       resolve_ref=_resolver(spec, done, failed), sheet_id=spec.sheet_id,
                       block_id=spec.id, precision=project.precision,
                       unit_system=project.units)
    node = spec.inputs if spec.inputs is not None else Node({}, spec.loc)
    try:
        inp = convert_fields(kind.inputs, node, ctx, "", kind.exactly_one, kind.at_most_one)
    except (InvalidInput, _DependsOnFailed):
        errors.extend(ctx.errors)
        return None
    except InputError as err:
        errors.extend(ctx.errors + [err])
        return None
    if ctx.errors:  # pragma: no cover - convert_fields raises when it records errors
        errors.extend(ctx.errors)
        return None
    for result, unit in spec.display.items():
        declared = kind.result_spec(result)
        if declared is None and not kind.open_results:
            errors.append(InputError(spec.loc, f"{spec.key}.display.{result}",
                                     f"unknown result '{result}'",
                                     "one of " + ", ".join(r.name for r in kind.results),
                                     repr(result),
                                     did_you_mean(result, [r.name for r in kind.results])))
        elif declared is not None:
            try:
                ok = same_dimension(unit, declared.unit)
            except UnitProblem:
                ok = False
            if not ok:
                errors.append(InputError(spec.loc, f"{spec.key}.display.{result}",
                                         "display unit of the wrong dimension",
                                         dimension_text(declared.unit), repr(unit)))
    out = BlockOutput(kind, spec.display, spec.key, ctx.records)
    key = stored.key(spec, ctx.records, project) if stored is not None else None
    if key is not None and stored.restore(key, out):
        stored.restored.append(spec.key)
        return _finish(spec, kind, ctx, out, project, errors)
    recorded = len(ctx.records)
    try:
        kind.compute(inp, out)
    except MissingInput as exc:  # an input needed only for some choices is absent
        errors.append(InputError(spec.loc, f"{spec.key}.inputs", f"missing input '{exc.name}'",
                                 exc.expected, "nothing"))
        return None
    except PhysicsRangeError as exc:
        if exc.value is None:  # pragma: no cover - kinds raise MissingInput for this
            errors.append(InputError(spec.loc, f"{spec.key}.inputs",
                                     f"missing input '{exc.quantity}'", exc.expected, "nothing"))
            return None
        path = _input_path(exc, kind)
        errors.append(InputError(_locate(path, ctx.records, spec), f"{spec.key}.inputs.{path}",
                                 "outside the range of the method", exc.expected,
                                 _got(exc, path, ctx.records)))
        return None
    except InputError as err:
        errors.append(err)
        return None
    except ExpressionError as exc:
        # A kind writes its working as expressions over its items: a sum over a list long
        # enough (flanking elements, layers) passes the expression limits only as a refusal.
        errors.append(InputError(spec.loc, spec.key, "too many items for the working to be "
                                 "printed", f"an expression of {exc.expected}",
                                 exc.got, "split the block, or give its lists fewer items"))
        return None
    if stored is not None:
        stored.computed.append(spec.key)
        if len(ctx.records) == recorded:  # compute read its inputs and wrote only on out
            stored.keep(key, out)
    return _finish(spec, kind, ctx, out, project, errors)


def _finish(spec: BlockSpec, kind, ctx, out: BlockOutput, project: Project, errors):
    """The block's checks against what it computed (or what the cache gave back)."""
    checks = []
    for check in spec.checks:
        result = _check(check, spec, out, project, errors)
        if result is not None:
            checks.append(result)
    return EvaluatedBlock(spec=spec, kind=kind, inputs=ctx.records, output=out, checks=checks)


def _got(exc, path: str = "", records=()) -> str | None:
    """The value refused, as the engineer wrote it where the error is their input's."""
    value = getattr(exc, "value", None)
    for r in records:
        if r.path == path and r.written and isinstance(value, (int, float)) and \
                isinstance(r.si, (int, float)) and math.isclose(float(r.si), float(value),
                                                                rel_tol=1e-9):
            return repr(r.written)
    if value is None:
        return None
    return f"{value:.4g}" if isinstance(value, (int, float)) else str(value)


def _input_path(exc: PhysicsRangeError, kind) -> str:
    """Return the input a physics error is about: the kind's mapping of the function's own
    parameter name, with the list index filled in where the error names one."""
    path = kind.input_names.get(exc.quantity, exc.quantity)
    if "{index}" in path:
        path = path.format(index=exc.index if exc.index is not None else 0)
    return path


def _locate(path: str, records, spec) -> Location:
    """Return where the input at ``path`` was written (the block, when it took its default)."""
    for r in records:
        if r.loc is not None and r.path == path:
            return r.loc
    for r in records:
        if r.loc is not None and r.path.endswith("." + path):
            return r.loc
    return spec.loc


def _check(check, spec: BlockSpec, out: BlockOutput, project: Project, errors):
    where = f"{spec.key}.checks.{check.result}"
    declared = out.declared(check.result)
    if declared is None:
        options = [r.name for r in out.declared_results()]
        errors.append(InputError(check.loc, where, f"check on unknown result '{check.result}'",
                                 "one of " + ", ".join(options), repr(check.result),
                                 did_you_mean(check.result, options)))
        return None
    if declared.list:
        errors.append(InputError(check.loc, where, "a check needs a single-valued result",
                                 "a scalar result", f"the list result {check.result}"))
        return None
    ctx = InputContext(materials=project.materials, named=project.named,
                       resolve_ref=lambda n, p: (_ for _ in ()).throw(InputError(
                           n.loc, where, "a check limit cannot be a reference",
                           "a quantity or {named: ...}", repr(n.value))),
                       sheet_id=spec.sheet_id, block_id=spec.id, precision=project.precision,
                       section="")
    field = Quantity(check.result, meaning="limit", unit=declared.unit,
                     temperature=declared.temperature)
    try:
        limit = field.convert(check.limit_node, ctx, f"checks.{check.result}")
    except (InvalidInput, InputError) as exc:
        errors.extend(ctx.errors or [exc])
        return None
    source = check.source or (ctx.records[0].source if ctx.records else "")
    shown = out.display_unit(check.result)

    if check.result not in out.results:
        why = out.absent.get(check.result) or phrase("not computed")
        until = out.simulated_until
        if check.relation == "at_least" and until is not None:
            if until + 1e-9 < limit:
                errors.append(InputError(
                    check.limit_node.loc, where,
                    f"the check limit is beyond the simulated duration ({why.template})",
                    f"a limit within {until / 60:g} min", f"{limit / 60:g} min"))
                return None
            return CheckResult(check.result, check.relation, None, limit, declared.unit, None,
                               None, True, source, shown, declared.temperature, note=why)
        return CheckResult(check.result, check.relation, None, limit, declared.unit, None, None,
                           False, source, shown, declared.temperature, note=why)

    value = out.results[check.result].value
    margin = limit - value if check.relation == "at_most" else value - limit
    utilisation = None
    if declared.temperature != ABSOLUTE and limit > 0 and value is not None:
        utilisation = value / limit if check.relation == "at_most" else (
            limit / value if value > 0 else math.inf)
    return CheckResult(check.result, check.relation, value, limit, declared.unit, margin,
                       utilisation, margin >= 0, source, shown, declared.temperature,
                       whole=declared.whole)
