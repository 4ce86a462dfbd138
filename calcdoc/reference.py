"""The format reference, docs/format.md, generated from the declarations.

Every key of project.yaml, a sheet, a block, a check and review.yaml comes from
:mod:`calcdoc.structure`; every input and result of every kind from its declaration; the commands
from the command line's parser. ``make docs`` writes the file; a test holds the committed file
to what this module makes, so the reference cannot drift from the program.

    python -m calcdoc.reference docs/format.md
"""

from __future__ import annotations

import sys
from pathlib import Path

from calcdoc.kinds import registry
from calcdoc.project import load_named_values
from calcdoc.structure import (BLOCK, CHECK, PROJECT_FILE, REVIEW_FILE, SHEET_FILE, describe)

__all__ = ["format_reference", "main"]

_VALUES = """\
## Values

An input value is one of:

- a quantity: a number and a unit in pint's syntax — `102.5 mm`, `0.035 W/(m*K)`, `21 degC`,
  `60 %`; a bare number only where the input is dimensionless;
- `{value: QUANTITY, source: TEXT}` — where the value comes from, printed beside it (a
  standard's designation first, `ISO 6946:2017, Table 7`, makes it a numbered reference; any
  other text is project information, listed apart);
- `{value: QUANTITY, assumption: TEXT}` — the engineer's own assumption, printed as one;
- `{ref: SHEET.block.result}` or, in the same sheet, `{ref: block.result}` — another block's
  result; a fire curve is taken by its series, `{ref: FC1.fire.temperature}`;
- `{material: NAME}` (or the bare name) where the input is a material — `calcdoc materials`
  lists the library; a project's `materials.yaml` adds or overrides entries;
- `{named: NAME}` — a published trade value (below).

`build --final` refuses a number given with neither a source nor an assumption.

Temperatures: every temperature input and result is either absolute or a difference. An
absolute temperature may be written in `K`, `degC` or `degF`; a difference only in `K`,
`delta_degC` or `delta_degF` (`140 degC` for a rise is refused, with a hint). Inside a compound
unit, `degC` and `degF` are per-degree differences: `0.5 W/(m*degC)` is 0.5 W/(m·K). In a
formula, an absolute temperature written in °C or °F may be added to a difference or
subtracted from another temperature; multiplying, dividing or raising it to a power is refused
(write the temperature in K for σT⁴). Fractions — humidity, moisture — are written with `%`.

A misspelt key, a wrong dimension, a value out of range or an unknown unit is an error at its
place in the file (`FILE:LINE:COL: error: WHERE: WHAT (expected X, got Y)`, the line and a caret
under it), every error of the run at once, exit status 2 and nothing written.
"""

_TAIL = """\
## results.json

The machine-readable record of a build, attached to the PDF: see
[results-json.md](results-json.md) (format 2: every result in SI at full precision, every check,
and every step as printed, re-doable from its printed numbers).

## Exit status

| status | meaning |
| --- | --- |
| 0 | success |
| 1 | a check failed (`check --strict`), `--final` refused, `verify`/`diff` found a difference, or `verify` of many packages found one that differs or was refused |
| 2 | bad input or usage: located messages on standard error, nothing written |
| 3 | an internal fault of calcdoc (a defect: please report it; `CALCDOC_DEBUG=1` shows the details) |

The limits on file size, nesting, expressions and calculation work are in
[limits.md](limits.md).
"""


def _escape(text: str) -> str:
    return str(text).replace("|", "\\|").replace("\n", " ")


def _keys_table(title: str, keys: tuple, intro: str = "") -> list[str]:
    lines = [f"### {title}", ""]
    if intro:
        lines += [intro, ""]
    lines += ["| key | type | required / default | meaning |", "| --- | --- | --- | --- |"]
    for row in describe(keys):
        need = "required" if row["required"] else (row["default"] or "optional")
        lines.append(f"| `{row['name']}` | {_escape(row['type'])} | {_escape(need)} | "
                     f"{_escape(row['meaning'])} |")
    return lines + [""]


def _fields(rows: list[dict], prefix: str = "") -> list[str]:
    lines = []
    for f in rows:
        default = f["default"]
        if f.get("source") and default not in ("required", "optional"):
            default = f"{default} ({f['source']})"
        extra = f"; {f['range']}" if f.get("range") else ""
        lines.append(f"| `{prefix}{f['name']}` | {_escape(f['type'])}{_escape(extra)} | "
                     f"{_escape(default)} | {_escape(f['meaning'])} |")
        if "fields" in f:
            lines.extend(_fields(f["fields"], f"{prefix}{f['name']}[]." if
                                 f["type"].startswith("list") else f"{prefix}{f['name']}."))
    return lines


def _kind(kind) -> list[str]:
    d = kind.describe()
    lines = [f"### `{kind.name}` — {kind.title}", "", kind.summary, "",
             "| input | type and range | default (source) | meaning |",
             "| --- | --- | --- | --- |"]
    lines += _fields(d["inputs"])
    lines.append("")
    for group in d["exactly_one"]:
        lines.append(f"Exactly one of: {', '.join(f'`{n}`' for n in group)}.")
    if d["exactly_one"]:
        lines.append("")
    if kind.open_results:
        lines += ["Results: one per step, named by the step, in the step's unit.", ""]
    else:
        lines += ["| result | unit | meaning |", "| --- | --- | --- |"]
        for r in d["results"]:
            kind_of = f" ({r['temperature']} temperature)" if r["temperature"] else ""
            lines.append(f"| `{r['name']}` | {_escape(r['unit']) or '1'} | "
                         f"{_escape(r['meaning'])}{kind_of} |")
        lines.append("")
    if kind.caution:
        lines += [f"Caution printed with it: {kind.caution}", ""]
    return lines


def _commands() -> list[str]:
    from calcdoc.cli import parser
    lines = ["## Commands", "", "| command | does |", "| --- | --- |"]
    sub = next(a for a in parser()._subparsers._group_actions)  # noqa: SLF001 - argparse
    for name, command in sub.choices.items():
        usage = " ".join(command.format_usage().replace("usage: ", "").split())
        help_text = next((c.help for c in sub._choices_actions if c.dest == name), "")
        lines.append(f"| `{_escape(usage)}` | {_escape(help_text)} |")
    return lines + [""]


def format_reference() -> str:
    """Return docs/format.md as generated from the program's own declarations."""
    lines = ["# calcdoc input format", "",
             "Generated from the program's declarations (`make docs`); a test keeps it current.",
             "",
             "A project is a folder: `project.yaml` (the project, the package and its "
             "revisions), `sheets/*.yaml` (one calculation sheet per file), optionally "
             "`materials.yaml` (the project's own materials, in the library's form: "
             "`calcdoc materials NAME` shows one) and `review.yaml` (the reviewer's "
             "comments). `calcdoc schema [sheet|project|review]` prints a JSON Schema of each "
             "for an editor.", "", "## Files", ""]
    lines += _keys_table("project.yaml", PROJECT_FILE)
    lines += _keys_table("A sheet", SHEET_FILE)
    lines += _keys_table("A block", BLOCK.keys, "The kind's inputs go under `inputs`; the "
                         "`formula` kind writes `given` and `steps` beside `id` and `kind`.")
    lines += _keys_table("A check", CHECK.keys, "Exactly one of `at_most` and `at_least`, a "
                         "quantity of the result's dimension (absolute or a difference, as the "
                         "result is).")
    lines += _keys_table("review.yaml", REVIEW_FILE)
    lines += _VALUES.splitlines() + [""]
    lines += ["## Kinds", ""]
    for kind in registry().values():
        lines += _kind(kind)
    lines += ["## Named values", "", "`{named: NAME}` takes a published trade value:", "",
              "| name | value | what | source |", "| --- | --- | --- | --- |"]
    for name, entry in load_named_values().items():
        lines.append(f"| `{name}` | {_escape(entry.get('value', ''))} | "
                     f"{_escape(entry.get('title', ''))} | {_escape(entry.get('source', ''))} |")
    lines.append("")
    lines += _commands()
    lines += _TAIL.splitlines()
    return "\n".join(lines).rstrip() + "\n"


def main(argv: list[str] | None = None) -> int:
    args = sys.argv[1:] if argv is None else argv
    text = format_reference()
    if args:
        Path(args[0]).write_text(text, encoding="utf-8")
    else:
        sys.stdout.write(text)
    return 0


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
