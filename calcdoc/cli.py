"""Command line only: parse arguments, call the library, map errors to exit codes.

Exit status: 0 success; 1 a check failed (``check --strict``), ``--final`` refused, or verify/diff
found a difference (a broken or overwritten signature among them), or verify over many packages
found one not verified (differing or refused); 2 bad input or usage (for
sign also a missing or wrong passphrase, an unreadable key, or an --out it may not replace),
with ``FILE:LINE:COL: error: ...`` on stderr and nothing written; 3 an internal fault (a defect
of calcdoc: reported as one, never as a traceback unless ``CALCDOC_DEBUG`` is set).
"""

from __future__ import annotations

import argparse
import io
import json
import os
import sys
import traceback
from pathlib import Path

from calcdoc import __version__
from calcdoc.errors import (EXIT_BAD_INPUT, EXIT_INTERNAL, FinalRefused, InputError,
                            InputErrors, render)

__all__ = ["main"]


def _print_errors(errors) -> None:
    for err in errors:
        print(render(err), file=sys.stderr)
    count = len(errors)
    print(f"calcdoc: {count} error{'s' if count != 1 else ''}; nothing written",
          file=sys.stderr)


def cmd_build(args) -> int:
    from calcdoc.build import build
    if args.final and args.sheet:
        print("calcdoc: error: --final issues the whole package; it cannot be used with "
              "--sheet (expected one of them, got both)", file=sys.stderr)
        return 2
    from calcdoc.progress import reporter
    with reporter():  # one updating line on stderr when it is a terminal
        report = build(args.project, args.out, pdf=not args.no_pdf, final=args.final,
                       previous=args.previous, sheets=args.sheet, cache=not args.no_cache,
                       jobs=args.jobs if args.jobs is not None else _available_cores())
    failed = [c for s in report.package.sheets for c in s.checks if not c.passed]
    times = ", ".join(f"{k} {v:.2f} s" for k, v in report.timings.items())
    print(f"built {report.out_dir} ({len(report.files)} files; {times})")
    if report.restored:
        from calcdoc.cache import cache_folder
        folder = cache_folder(report.out_dir)
        try:
            folder = folder.relative_to(Path.cwd())
        except ValueError:
            pass
        blocks = len(report.restored) + len(report.computed)
        print(f"{len(report.restored)} of {blocks} blocks unchanged: their results and working "
              f"taken from {folder} (--no-cache computes every block)")
    if failed:
        print(f"{len(failed)} check(s) FAIL: see the summary of results")
    return 0


def cmd_check(args) -> int:
    from calcdoc.archive import results_document
    from calcdoc.evaluate import evaluate_folder
    from calcdoc.progress import reporter
    from calcdoc.render.printed import fill, print_check, print_value
    with reporter():
        package = evaluate_folder(args.project)
    sig, system = package.project.precision, package.project.units

    def shown(c):
        return print_check(c, sig, system)
    failed = []
    if args.json:
        print(json.dumps(results_document(package), indent=1, ensure_ascii=False))
    for sheet in package.sheets:
        if not args.json:
            print(f"{sheet.id}  {sheet.spec.title}")
        for block in sheet.blocks:
            if not args.json:
                print(f"  {block.key}  {block.spec.title}")
                out = block.output
                for name, r in out.results.items():
                    value = out.value_of(name)
                    text = ", ".join(print_value(value, sig, system, index=i).text
                                     for i in range(len(r.value))) \
                        if isinstance(r.value, list) else print_value(value, sig, system).text
                    print(f"    {name} = {text}")
                for name, why in out.absent.items():
                    print(f"    {name}: {fill(why, sig, system)}")
                for w in out.warnings:
                    print(f"    warning: {fill(w['text'], sig, system)}")
            for c in block.checks:
                if not c.passed:
                    failed.append((block, c))
                if not args.json:
                    mark = "PASS" if c.passed else "FAIL"
                    rel = "<=" if c.relation == "at_most" else ">="
                    print(f"    check {c.result}: {shown(c).value} {rel} {shown(c).limit}"
                          f"  {mark}")
    if failed:
        out = sys.stderr if args.json else sys.stdout
        print(f"{len(failed)} check(s) failed:", file=out)
        for block, c in failed:
            print(f"  {block.key}.{c.result}: {shown(c).value} against {shown(c).limit}",
                  file=out)
    return 1 if failed and args.strict else 0


# How `calcdoc kinds` lists the kinds: by the trade that reaches for them.
KIND_GROUPS = (
    ("Building envelope", ("layered_wall", "interstitial_condensation", "thermal_bridge")),
    ("Building services", ("cylindrical_layers",)),
    ("Radiation", ("surface_emission", "radiation_exchange", "view_factor", "radiant_exposure")),
    ("Fire", ("fire_curve", "steel_member_heating", "wall_fire_exposure", "timber_member_fire")),
    ("Your own working", ("formula",)),
)


def cmd_kinds(args) -> int:
    from calcdoc.kinds import registry
    from calcdoc.project import load_named_values
    kinds = registry()
    if args.json:
        chosen = [kinds[args.kind]] if args.kind in kinds else list(kinds.values())
        if args.kind is not None and args.kind not in kinds:
            chosen = []
        if chosen:
            docs = [k.describe() for k in chosen]
            print(json.dumps(docs[0] if args.kind else docs, indent=1, ensure_ascii=False))
            return 0
    if args.kind is None:
        width = max(len(name) for name in kinds) + 2
        listed = set()
        for trade, names in KIND_GROUPS:
            print(f"{trade}:")
            for name in names:
                if name in kinds:
                    listed.add(name)
                    print(f"  {name:<{width}}{kinds[name].summary}")
        others = [name for name in kinds if name not in listed]
        if others:  # a kind added without a place in the groups still shows
            print("Other kinds:")
            for name in others:
                print(f"  {name:<{width}}{kinds[name].summary}")
        print("\nNamed values ({named: NAME}):")
        for name, entry in load_named_values().items():
            print(f"  {name:<28} {entry['value']:<14} {entry.get('title', '')}")
            print(f"  {'':<28} source: {entry.get('source', '')}")
        return 0
    kind = kinds.get(args.kind)
    if kind is None:
        from calcdoc.kinds.base import did_you_mean
        hint = did_you_mean(args.kind, kinds)
        print(f"calcdoc: error: unknown kind '{args.kind}' (expected one of "
              f"{', '.join(kinds)}, got {args.kind!r})" + (f"; hint: {hint}" if hint else ""),
              file=sys.stderr)
        return 2
    d = kind.describe()
    print(f"{kind.name} — {kind.title}\n{kind.summary}\n\nInputs:")

    def show(fields, indent="  "):
        for f in fields:
            print(f"{indent}{f['name']}: {f['type']}; {f['default']}"
                  + (f"; range {f['range']}" if f['range'] else ""))
            if f["meaning"]:
                print(f"{indent}    {f['meaning']}")
            if f["source"]:
                print(f"{indent}    default from: {f['source']}")
            if "fields" in f:
                show(f["fields"], indent + "    ")
    show(d["inputs"])
    for group in d["exactly_one"]:
        print(f"  exactly one of: {', '.join(group)}")
    print("\nResults:")
    if kind.open_results:
        print("  one result per step, named by the step, in the step's unit")
    for r in d["results"]:
        print(f"  {r['name']} [{r['unit']}]: {r['meaning']}")
    if kind.caution:
        print(f"\nCaution: {kind.caution}")
    return 0


def _library(project: str | None) -> dict:
    from calcdoc.project import Collector, LIBRARY_DIR, builtin_material_files, load_materials
    from calcdoc.project import project_files
    col = Collector()
    materials = load_materials(builtin_material_files(), LIBRARY_DIR, col)
    if project:
        files = project_files(project)
        if files.exists("materials.yaml"):
            materials.update(load_materials(["materials.yaml"], None, col, files))
    if col.errors:
        raise InputErrors(col.errors)
    return materials


def _material_document(entry: dict) -> dict:
    """A material as plain data: each property in SI with its unit, source and confirmation."""
    from calcdoc.provenance import MATERIAL_UNITS
    properties = {}
    for prop, unit in MATERIAL_UNITS.items():
        if prop in entry:
            cited = entry.get("sources", {}).get(prop, {})
            properties[prop] = {"si": entry[prop], "si_unit": unit,
                                "source": cited.get("source", entry.get("source", "")),
                                "confirmed": cited.get("confirmed", entry.get("confirmed"))}
    doc = {"name": entry["name"], "title": entry.get("title", entry["name"]),
           "category": entry.get("category", ""), "source": entry.get("source", ""),
           "confirmed": entry.get("confirmed"), "properties": properties}
    if "conductivity_curve" in entry:
        cited = entry.get("sources", {}).get("conductivity_curve", {})
        doc["conductivity_curve"] = {"points_si": entry["conductivity_curve"],
                                     "units": ["K", "W/(m*K)"],
                                     "source": cited.get("source", entry.get("source", "")),
                                     "confirmed": cited.get("confirmed", entry.get("confirmed"))}
    if entry.get("law"):
        doc["law"] = entry["law"]
    return doc


def cmd_materials(args) -> int:
    from calcdoc.data import Value
    from calcdoc.kinds.base import did_you_mean
    from calcdoc.provenance import MATERIAL_UNITS
    from calcdoc.render.printed import print_curve, print_value
    materials = _library(args.project)
    if args.name is not None and args.name not in materials:
        hint = did_you_mean(args.name, materials)
        print(f"calcdoc: error: unknown material '{args.name}' (expected a material of the "
              f"library, see calcdoc materials, got {args.name!r})"
              + (f"; hint: {hint}" if hint else ""), file=sys.stderr)
        return 2
    chosen = [materials[args.name]] if args.name else sorted(
        materials.values(), key=lambda m: (m.get("category", ""), m["name"]))
    if args.json:
        docs = [_material_document(m) for m in chosen]
        print(json.dumps(docs[0] if args.name else docs, indent=1, ensure_ascii=False))
        return 0

    def shown(entry, prop):
        return print_value(Value(entry[prop], MATERIAL_UNITS[prop], given=True), 3).text

    if args.name is None:
        category = None
        for m in chosen:
            if m.get("category", "") != category:
                print(("\n" if category is not None else "") + f"{m.get('category') or 'other'}:")
                category = m.get("category", "")
            mark = "" if m.get("confirmed") is not False else "  [to confirm]"
            lam = shown(m, "conductivity") if "conductivity" in m else (
                "law" if m.get("law") else "—")
            print(f"  {m['name']:<28} {lam:<16} {m.get('title', '')}{mark}")
        print("\nEach value with its source: calcdoc materials NAME; "
              "[to confirm]: recalled, not yet checked against its printed source.")
        return 0
    m = chosen[0]
    print(f"{m['name']} — {m.get('title', '')}" + (f" ({m['category']})"
                                                   if m.get("category") else ""))
    for prop in MATERIAL_UNITS:
        if prop in m:
            cited = m.get("sources", {}).get(prop, {})
            flag = "" if cited.get("confirmed", m.get("confirmed")) is not False else \
                " [to confirm]"
            print(f"  {prop.replace('_', ' ')}: {shown(m, prop)}")
            print(f"      source: {cited.get('source', m.get('source', ''))}{flag}")
    if "conductivity_curve" in m:
        points = ", ".join(f"{theta.text}: {k.text}"
                           for theta, k in print_curve(m["conductivity_curve"]))
        print(f"  conductivity against temperature: {points}")
    if m.get("law"):
        print(f"  temperature-dependent law: {m['law']}")
    print(f"  source: {m.get('source', '')}")
    return 0


def cmd_schema(args) -> int:
    from calcdoc.schema import project_schema, review_schema, sheet_schema
    made = {"sheet": sheet_schema, "project": project_schema, "review": review_schema}
    print(json.dumps(made[args.file](), indent=1, ensure_ascii=False))
    return 0


def cmd_new(args) -> int:
    from calcdoc.starter import write_starter
    written = write_starter(Path(args.dir))
    print(f"wrote a starter project in {args.dir} ({len(written)} files); "
          f"build it with: calcdoc build {args.dir}")
    return 0


def cmd_verify(args) -> int:
    from calcdoc.verify_many import find_packages, holds_packages, is_single_package
    several = len(args.path) > 1 or args.json or args.jobs is not None or args.scheduler
    if not several:
        path = Path(args.path[0])
        # one package as before; a folder with none under it gets the one-package message
        if is_single_package(path) or not holds_packages(path):
            return _verify_one(args.path[0])
    return _verify_many(args, find_packages(args.path))


def _verify_one(path: str) -> int:
    from calcdoc.archive import verify
    notes: list[str] = []
    lines = verify(Path(path), notes=notes)
    for line in notes + lines:
        print(line)
    if lines:
        print(f"{path}: NOT verified — {len(lines)} difference(s) listed above")
        return 1
    if Path(path).is_dir():
        print(f"{path}: verified — every file matches its SHA-256 in manifest.json, the "
              f"PDF carries the same inputs and results, and a fresh evaluation of the archived "
              f"inputs gives the recorded results")
    elif notes:
        print(f"{path}: verified — the signatures hold (see above) and a fresh evaluation "
              f"of the attached inputs gives the attached results")
    else:
        print(f"{path}: verified — a fresh evaluation of the attached inputs gives the "
              f"attached results (the pages themselves are covered by no digest: verify the "
              f"build folder's manifest for that)")
    return 0


def _verify_many(args, found) -> int:
    """Every package found, as independent tasks: one line each (or --json, a list of the
    same records) and a total. Exit 0 only when every one is verified, else 1."""
    from calcdoc.progress import reporter
    from calcdoc.verify_many import STATUSES, link_record, verify_packages
    jobs = args.jobs if args.jobs is not None else _available_cores()
    with reporter() as progress:
        records = verify_packages(
            found.packages, jobs=jobs, scheduler=args.scheduler,
            on_done=lambda done, total: progress.show(f"verify: {done} of {total} packages"))
    records += [link_record(path) for path in found.links]
    totals = {status: sum(r.status == status for r in records) for status in STATUSES}
    if args.json:
        print(json.dumps([r.record() for r in records], indent=1, ensure_ascii=False))
    else:
        width = max(len(r.path) for r in records)
        for r in records:
            why = ""
            if r.status == "differs":
                why = f"{len(r.differences)} difference(s), first: {r.differences[0]}"
            elif r.reason:  # the first message, without the path the line already names
                why = r.reason.splitlines()[0].removeprefix(f"{r.path}: error: ")
            print(f"{r.status:<8}  {r.path:<{width}}  {why}".rstrip())
        shown = ", ".join(f"{n} {s}" for s, n in totals.items())
        print(f"{len(records)} package{'s' if len(records) != 1 else ''}: {shown}")
    return 0 if totals["verified"] == len(records) else 1


def _available_cores() -> int:
    try:
        return len(os.sched_getaffinity(0))
    except (AttributeError, OSError):
        return os.cpu_count() or 1


def cmd_serve(args) -> int:
    from calcdoc.serve import serve
    return serve(args.project, port=args.port, out=args.out)


def cmd_sign(args) -> int:
    from calcdoc.seal import passphrase_from_environment, sign_package
    key = Path(args.key)
    sealed = sign_package(Path(args.package), key, Path(args.out),
                          passphrase_from_environment(key))
    print(f"signed {args.package} as {sealed.signer} (signature field {sealed.field_name}): "
          f"wrote {sealed.out}")
    return 0


def cmd_diff(args) -> int:
    from calcdoc.archive import diff
    changes = diff(Path(args.old), Path(args.new))
    if args.json:
        print(json.dumps(changes.record(), indent=1, ensure_ascii=False))
    else:
        for line in changes.lines():
            print(line)
        if not changes:
            print("no differences in inputs, results or checks")
    return 1 if changes else 0


def _whole_number(text: str) -> int:
    """argparse type: a whole number of at least 1."""
    try:
        value = int(text)
    except ValueError:
        value = 0
    if value < 1:
        raise argparse.ArgumentTypeError(f"expected a whole number of at least 1, got {text!r}")
    return value


def parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(prog="calcdoc", description="Calculation sheets in YAML, "
                                "evaluated with units checked, issued as HTML and PDF.")
    p.add_argument("--version", action="version", version=f"calcdoc {__version__}")
    sub = p.add_subparsers(dest="command", required=True)
    b = sub.add_parser("build", help="evaluate and write the site, PDF, results and manifest")
    b.add_argument("project")
    b.add_argument("--out", help="output folder (default build/<project name>)")
    b.add_argument("--no-pdf", action="store_true", help="skip the PDF")
    b.add_argument("--no-cache", action="store_true",
                   help="neither read nor write the build cache (<out>.cache beside the "
                        "output folder): compute, typeset and draw everything afresh "
                        "(--final always computes every block afresh)")
    b.add_argument("--jobs", type=_whole_number, metavar="N",
                   help="draw the figures and typeset the PDF's parts (cover and contents, "
                        "each sheet, the appendices) on N processes, and join the parts "
                        "(default: the cores available; 1: one process, the PDF typeset as "
                        "one document)")
    b.add_argument("--sheet", action="append", metavar="ID",
                   help="build only this sheet (repeat for more), with what it refers to")
    b.add_argument("--previous", metavar="BUILD",
                   help="the build (folder or PDF) of the previous issued revision: mark what "
                        "changed since")
    b.add_argument("--final", action="store_true",
                   help="refuse unless approved, checked, passing and with no open comment")
    b.set_defaults(func=cmd_build)
    c = sub.add_parser("check", help="evaluate and print results and failed checks; no files")
    c.add_argument("project")
    c.add_argument("--json", action="store_true", help="print results.json instead")
    c.add_argument("--strict", action="store_true", help="exit 1 when a check fails")
    c.set_defaults(func=cmd_check)
    k = sub.add_parser("kinds", help="list kinds, or one kind's inputs and results")
    k.add_argument("kind", nargs="?")
    k.add_argument("--json", action="store_true",
                   help="every kind (or one) with its inputs and results, as JSON")
    k.set_defaults(func=cmd_kinds)
    sc = sub.add_parser("schema", help="print the JSON Schema of a sheet, project.yaml or "
                        "review.yaml, for editors")
    sc.add_argument("file", nargs="?", choices=("sheet", "project", "review"), default="sheet")
    sc.set_defaults(func=cmd_schema)
    mt = sub.add_parser("materials", help="list the materials library, or show one material")
    mt.add_argument("name", nargs="?")
    mt.add_argument("--json", action="store_true", help="print the materials as JSON")
    mt.add_argument("--project", help="include a project's own materials.yaml")
    mt.set_defaults(func=cmd_materials)
    n = sub.add_parser("new", help="write a small starter project")
    n.add_argument("dir")
    n.set_defaults(func=cmd_new)
    v = sub.add_parser("verify", help="re-evaluate archived builds or PDFs and compare; a "
                       "folder holding many is searched, each package verified as a task")
    v.add_argument("path", nargs="+", help="a build folder, a PDF, or a folder holding them")
    v.add_argument("--jobs", type=_whole_number, metavar="N",
                   help="verify N packages at a time (default: the cores available)")
    v.add_argument("--scheduler", metavar="ADDRESS",
                   help="verify on the Dask distributed cluster at ADDRESS (tcp://host:8786); "
                        "its workers must see the same paths")
    v.add_argument("--json", action="store_true",
                   help="print every package's status, differences and error as JSON")
    v.set_defaults(func=cmd_verify)
    sv = sub.add_parser("serve", help="preview the site on 127.0.0.1, rebuilt and reloaded as "
                        "the project's files change")
    sv.add_argument("project")
    sv.add_argument("--port", type=int, default=8000,
                    help="port on 127.0.0.1 (default 8000; 0 picks a free one)")
    sv.add_argument("--out", help="the site's folder (default: a temporary folder, removed "
                    "when the preview stops)")
    sv.set_defaults(func=cmd_serve)
    s = sub.add_parser("sign", help="add a digital signature (PAdES) to a PDF package; the "
                       "key's passphrase is read from CALCDOC_KEY_PASSPHRASE")
    s.add_argument("package", help="the PDF package to sign")
    s.add_argument("--key", required=True, help="PKCS#12 file (.p12, .pfx) with the private key "
                   "and its certificate")
    s.add_argument("--out", required=True, help="the signed copy to write (a new file)")
    s.set_defaults(func=cmd_sign)
    d = sub.add_parser("diff", help="what changed between two builds")
    d.add_argument("old")
    d.add_argument("new")
    d.add_argument("--json", action="store_true",
                   help="print the changes as JSON: inputs, results and checks lists")
    d.set_defaults(func=cmd_diff)
    return p


class _QuietPipe(io.TextIOBase):
    """Standard output that stops writing, without an error, once the reader has gone
    (``calcdoc kinds | head -1``); the command still finishes and returns its own status."""

    def __init__(self, stream):
        self.stream = stream
        self.closed_by_reader = False

    def write(self, text):
        if not self.closed_by_reader:
            try:
                self.stream.write(text)
            except BrokenPipeError:
                self._reader_gone()
        return len(text)

    def flush(self):
        if not self.closed_by_reader:
            try:
                self.stream.flush()
            except BrokenPipeError:
                self._reader_gone()

    def _reader_gone(self):
        self.closed_by_reader = True
        try:  # later writes by the interpreter at exit must not fail either
            devnull = os.open(os.devnull, os.O_WRONLY)
            os.dup2(devnull, self.stream.fileno())
        except (OSError, ValueError):
            pass


def main(argv: list[str] | None = None) -> int:
    real_stdout = sys.stdout
    sys.stdout = _QuietPipe(real_stdout)
    try:
        return _run(argv)
    finally:
        sys.stdout.flush()
        sys.stdout = real_stdout


def _run(argv: list[str] | None) -> int:
    try:
        args = parser().parse_args(argv)
    except SystemExit as exit_:  # argparse: --help (0) or a usage error (2)
        return int(exit_.code or 0)
    try:
        return args.func(args)
    except InputErrors as errs:
        _print_errors(errs.errors)
        return EXIT_BAD_INPUT
    except InputError as err:
        _print_errors([err])
        return EXIT_BAD_INPUT
    except FinalRefused as refused:
        print("calcdoc: --final refused:", file=sys.stderr)
        for reason in refused.reasons:
            print(f"  - {reason}", file=sys.stderr)
        return 1
    except KeyboardInterrupt:
        print("calcdoc: interrupted; nothing written", file=sys.stderr)
        return 130
    except Exception as exc:  # noqa: BLE001 - a defect: say so plainly, never a traceback
        if os.environ.get("CALCDOC_DEBUG"):
            traceback.print_exc()
        where = traceback.extract_tb(exc.__traceback__)[-1]
        print(f"calcdoc: internal error: {type(exc).__name__}: {exc} "
              f"(at {Path(where.filename).name}:{where.lineno})", file=sys.stderr)
        print("calcdoc: this is a defect in calcdoc, not in your input; please report it with "
              "the command and the input files (set CALCDOC_DEBUG=1 for the details); "
              "nothing was written", file=sys.stderr)
        return EXIT_INTERNAL


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
