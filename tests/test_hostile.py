"""Right or refused: every file a user or a stranger can hand calcdoc gives a result or a located
error (exit 2, nothing written), never a traceback, a hang, a wrong number or a write outside
the output folder. Each test names the class of bad input it covers."""

from __future__ import annotations

import errno
import json
import os
import subprocess
import sys
from pathlib import Path

import pytest

from calcdoc import build as build_module
from calcdoc.cli import main
from calcdoc.kinds import registry
from calcdoc.kinds.base import MAX_ITEMS, Items, Quantity, Record
from calcdoc.units import dimension_text
from conftest import write_project

LOSS = """\
id: L1
title: Fabric heat loss
blocks:
  - id: loss
    kind: formula
    title: Heat loss through the wall
    given:
      U: 0.3 W/(m^2*K)
      A: {value: 100 m^2, source: Elevation drawing (example)}
      dT: 23 K
    steps:
      - {name: Q, expr: "U * A * dT", unit: W, label: Fabric heat loss}
    checks:
      - {result: Q, at_most: 1 kW, source: Example heater capacity}
"""


def run(tmp_path, capsys, sheets=None, *, project_yaml=None, extra=None, command="build"):
    """Write a project, run a command on it, return (status, stderr lines); assert that
    nothing was written and that no traceback reached the user."""
    kwargs = {"extra": extra}
    if project_yaml is not None:
        kwargs["project_yaml"] = project_yaml
    root = write_project(tmp_path / "proj", sheets if sheets is not None else {"loss": LOSS},
                         **kwargs)
    out = tmp_path / "out"
    args = ["build", "proj", "--out", "out", "--no-pdf"] if command == "build" else \
        [command, "proj"]
    status = main(args)
    captured = capsys.readouterr()
    assert "Traceback" not in captured.err
    assert not out.exists(), "nothing may be written on bad input"
    assert root.is_dir()
    return status, captured.err.splitlines()


# --- the message format ------------------------------------------------------------------------


def test_message_format__location_line_and_caret_under_the_column(tmp_path, capsys):
    status, err = run(tmp_path, capsys, {"loss": LOSS.replace('"U * A * dT"', '"U ^ A"')})
    assert status == 2
    assert err == [
        "proj/sheets/loss.yaml:12:28: error: L1.loss.inputs.steps[0].expr: operator not allowed "
        "(expected + - * / **, got '^'); hint: write ** for a power, e.g. 'x ** 2'",
        "    12 |       - {name: Q, expr: \"U ^ A\", unit: W, label: Fabric heat loss}",
        "       |                            ^",
        "calcdoc: 1 error; nothing written"]


def test_message_paths__as_the_user_opens_them_from_inside_the_project(tmp_path, capsys):
    write_project(tmp_path / "proj", {"loss": LOSS.replace("dT: 23 K", "dT: 23 kg")})
    os.chdir(tmp_path / "proj")
    assert main(["check", "."]) == 2
    err = capsys.readouterr().err
    assert err.startswith("sheets/loss.yaml:12:25: error: L1.loss.steps[0] (Q): the "
                          "expression's unit does not match the step's unit")
    assert (tmp_path / "proj" / err.split(":")[0]).is_file()


def test_every_error_of_loading_and_evaluation_in_one_run(tmp_path, capsys):
    # A loader error in one sheet and an evaluation error in another: both in one run.
    bad_key = LOSS.replace("    title: Heat loss", "    titel: Heat loss")
    bad_step = LOSS.replace("id: L1", "id: L2").replace("dT: 23 K", "dT: 23 kg")
    status, err = run(tmp_path, capsys, {"a": bad_key, "b": bad_step})
    assert status == 2
    assert sum(": error: " in line for line in err) == 2
    assert any("unknown key 'titel'" in line for line in err)
    assert any("L2.loss.steps[0] (Q): the expression's unit does not match" in line
               for line in err)


# --- silent wrong answers ---------------------------------------------------------------------


def test_offset_temperature_multiplied__silent_wrong_answer_refused(tmp_path, capsys):
    # 23 °C taken as 296.15 K would print Q = 8884 W where 690 W is meant.
    status, err = run(tmp_path, capsys, {"loss": LOSS.replace("dT: 23 K", "dT: 23 degC")})
    assert status == 2
    assert err[0] == (
        "proj/sheets/loss.yaml:12:34: error: L1.loss.steps[0] (Q): an absolute temperature is "
        "multiplied (expected a temperature difference, got dT = 23 °C); hint: write a "
        "difference as '23 K' or '23 delta_degC', or subtract two temperatures (T_i - T_e); "
        "an absolute temperature in a product, such as sigma * T ** 4, is written in K")


def test_every_temperature_input_and_result_is_declared_absolute_or_difference():
    # Offset temperatures must never be multiplied: every temperature a kind takes or gives
    # says which it is, so that degC is never read as a number of kelvin.
    undeclared = []

    def walk(fields, path):
        for f in fields:
            if isinstance(f, Quantity) and dimension_text(f.unit).startswith("temperature") \
                    and f.temperature is None:
                undeclared.append(f"{path}.{f.name}")
            if isinstance(f, (Items, Record)):
                walk(f.fields, f"{path}.{f.name}")

    for kind in registry().values():
        walk(kind.inputs, kind.name)
        undeclared += [f"{kind.name}.{r.name}" for r in kind.results
                       if dimension_text(r.unit).startswith("temperature")
                       and r.temperature is None]
    assert undeclared == []


# --- expressions that used to raise -----------------------------------------------------------


@pytest.mark.parametrize("expr, message", [
    ("(-1) ** 0.5 * U * A * dT", "no real value (expected a real number, got (-1) ** 0.5 (a "
                                 "negative value to a fractional power))"),
    ("0 ** -1 * U * A * dT", "division by zero (expected a non-zero base for a negative power, "
                             "got 0 ** -1)"),
    ("-" * 1000 + "U * A * dT", "expression too long (expected at most 500 characters (split "
                                "it into steps), got 1010 characters)"),
    ("+".join(["U*A*dT"] * 1000), "expression too long (expected at most 500 characters "
                                  "(split it into steps), got 6999 characters)"),
    ("(" * 60 + "U" + ")" * 60 + " * A * dT", "brackets nested too deeply (expected at most 40 "
                                              "levels, got 60 levels)"),
])
def test_expressions_that_cannot_be_evaluated__located_errors(tmp_path, capsys, expr, message):
    status, err = run(tmp_path, capsys, {"loss": LOSS.replace('"U * A * dT"', f'"{expr}"')})
    assert status == 2
    assert message in err[0]
    assert err[0].startswith("proj/sheets/loss.yaml:12:25: error: L1.loss.")


# --- malformed files --------------------------------------------------------------------------


@pytest.mark.parametrize("old, new, message", [
    ("dT: 23 K", "dT: 23 K/0", "proj/sheets/loss.yaml:10:11: error: L1.loss.inputs.given.dT: "
     "'dT' is not a quantity (expected a number and a unit, such as '240 m^2', got '23 K/0' "
     "(unknown unit 'K/0'))"),
    ("U: 0.3 W/(m^2*K)", "U: {ref: W1}", "proj/sheets/loss.yaml:8:16: error: L1.loss.inputs: "
     "malformed reference (expected 'SHEET.block.result' or 'block.result', got 'W1')"),
    ("kind: formula", "kind: [formula]", "proj/sheets/loss.yaml:5:11: error: "
     "L1.blocks[0].kind: not a kind name (expected one of "),
    ("{result: Q, at_most", "{at_most", "proj/sheets/loss.yaml:14:9: error: "
     "L1.loss.checks[0]: missing key 'result' (expected 'result', got nothing)"),
    ("dT: 23 K", "dT: .nan", "proj/sheets/loss.yaml:10:11: error: L1.loss.inputs.given.dT: 'dT' "
     "is not a finite number (expected a magnitude below 1e+100, got nan)"),
    ("dT: 23 K", "dT: !!python/object:os.system ls", "proj/sheets/loss.yaml:10:11: error: not "
     "valid YAML: could not determine a constructor for the tag "
     "'tag:yaml.org,2002:python/object:os.system'"),
    ("unit: W,", "unit: {a: 1},", "proj/sheets/loss.yaml:12:45: error: "
     "L1.loss.inputs.steps[0].unit: not a unit (expected a unit such as 'kW', got {'a': 1})"),
])
def test_malformed_values__located_errors(tmp_path, capsys, old, new, message):
    assert old in LOSS
    status, err = run(tmp_path, capsys, {"loss": LOSS.replace(old, new)})
    assert status == 2
    assert err[0].startswith(message)


def test_review_comment_without_status__located_error(tmp_path, capsys):
    review = "reviewer: R\ncomments:\n  - {on: L1, text: Check the area}\n"
    status, err = run(tmp_path, capsys, extra={"review.yaml": review})
    assert status == 2
    assert err[0] == ("proj/review.yaml:3:5: error: review.comments[0]: missing key 'status' "
                      "(expected 'status', got nothing)")


def test_five_thousand_nested_brackets__refused_before_parsing_deeper(tmp_path, capsys):
    status, err = run(tmp_path, capsys, {"loss": "[" * 5000 + "]" * 5000})
    assert status == 2
    assert err[0] == ("proj/sheets/loss.yaml:1:41: error: nested too deeply (expected at most "
                      "40 levels of mappings and lists, got more than 40)")
    assert len(err[1]) < 120  # the echoed line is cut around the column


def test_alias_inside_the_value_it_names__refused_not_an_internal_error(tmp_path, capsys):
    # `&a [*a]` is a list that contains itself: reading it used to recurse until Python
    # stopped it (exit 3, "internal error"); so did a chain of aliases each nesting the last
    for text in ("id: &a [*a]\n",
                 "a0: &a0 [[[[[[[[[[1]]]]]]]]]]\n" + "".join(
                     f"a{i}: &a{i} [[[[[[[[[[*a{i - 1}]]]]]]]]]]\n" for i in range(1, 150))):
        status, err = run(tmp_path, capsys, {"loss": text})
        assert status == 2, err
        assert err[0].startswith("proj/sheets/loss.yaml:")
        assert ("error: nested too deeply (an alias nests its value where it is used) (expected "
                "at most 40 levels of mappings and lists, got more than 40)") in err[0]


def test_nested_aliases__expansion_bounded(tmp_path, capsys):
    # 443 bytes that a naive loader expands to 9^8 = 43 million values.
    lines = ['a: &a ["x","x","x","x","x","x","x","x","x"]']
    for prev, name in zip("abcdefg", "bcdefgh"):
        lines.append(f"{name}: &{name} [" + ",".join([f"*{prev}"] * 9) + "]")
    review = "\n".join(lines) + "\n"
    status, err = run(tmp_path, capsys, extra={"review.yaml": review})
    assert status == 2
    assert "too many values in one file (aliases count at every use) (expected at most 100000 " \
           "values, got more)" in err[0]


def test_invalid_date__located_error(tmp_path, capsys):
    project = """\
project: {number: "T-001", title: Test project}
package: {number: TP-001, title: Test package}
revisions:
  - {rev: P1, date: 2026-13-45, purpose: For review}
"""
    status, err = run(tmp_path, capsys, project_yaml=project)
    assert status == 2
    assert err[0] == ("proj/project.yaml:4:21: error: not a valid date (expected a date "
                      "YYYY-MM-DD, got '2026-13-45')")


@pytest.mark.parametrize("command", ["check", "build"])
def test_sheet_outside_the_project__refused_and_never_printed(tmp_path, capsys, command):
    (tmp_path / "outside.yaml").write_text("secret: the outside file's content\n" * 3)
    project = """\
project: {number: "T-001", title: Test project}
package: {number: TP-001, title: Test package, sheets: [sheets/loss.yaml, ../outside.yaml]}
revisions:
  - {rev: P1, date: 2026-11-10, purpose: For review}
"""
    status, err = run(tmp_path, capsys, project_yaml=project, command=command)
    assert status == 2
    assert err[0] == ("proj/project.yaml:2:75: error: package.sheets: a file outside the "
                      "project folder (expected a path inside the project folder, got "
                      "'../outside.yaml' ('..', '.' or an empty part in the path))")
    assert not any("secret" in line for line in err)


def test_sheet_that_links_outside_the_project__refused(tmp_path, capsys):
    (tmp_path / "outside.yaml").write_text("secret: 1\n")
    root = write_project(tmp_path / "proj", {"loss": LOSS})
    (root / "sheets" / "link.yaml").symlink_to(tmp_path / "outside.yaml")
    assert main(["check", "proj"]) == 2
    err = capsys.readouterr().err
    assert "proj/sheets/link.yaml: error: a file outside the project folder (expected a file " \
           "inside the project folder, got 'sheets/link.yaml' (a link to a file outside it))" \
           in err
    assert "secret" not in err


def test_file_too_large__refused(tmp_path, capsys):
    status, err = run(tmp_path, capsys, {"loss": LOSS + "#" * (1024 * 1024)})
    assert status == 2
    assert err[0] == ("proj/sheets/loss.yaml: error: file too large (expected at most 1024 KiB, "
                      "got 1024 KiB)")


# --- the output folder ------------------------------------------------------------------------


def test_out_under_a_file__refused(tmp_path, capsys):
    write_project(tmp_path / "proj", {"loss": LOSS})
    (tmp_path / "afile").write_text("x")
    assert main(["build", "proj", "--out", "afile/out", "--no-pdf"]) == 2
    err = capsys.readouterr().err
    assert err.startswith("afile/out: error: --out: cannot write the output folder (expected a "
                          "writable folder with free space, got ")
    assert (tmp_path / "afile").read_text() == "x"


@pytest.mark.skipif(os.geteuid() == 0, reason="root writes into read-only folders")
def test_out_in_a_read_only_folder__refused(tmp_path, capsys):  # pragma: no cover - as non-root
    write_project(tmp_path / "proj", {"loss": LOSS})
    (tmp_path / "ro").mkdir()
    (tmp_path / "ro").chmod(0o555)
    assert main(["build", "proj", "--out", "ro/out", "--no-pdf"]) == 2
    assert "cannot write the output folder" in capsys.readouterr().err


def test_full_disk_while_writing__refused_and_nothing_left(tmp_path, capsys, monkeypatch):
    write_project(tmp_path / "proj", {"loss": LOSS})
    assert main(["build", "proj", "--out", "out", "--no-pdf"]) == 0
    before = {p.name: p.read_bytes() for p in (tmp_path / "out").iterdir() if p.is_file()}
    real = Path.write_text

    def full(self, *args, **kwargs):
        if self.name == "results.json":
            raise OSError(errno.ENOSPC, "No space left on device", str(self))
        return real(self, *args, **kwargs)

    monkeypatch.setattr(Path, "write_text", full)
    capsys.readouterr()
    assert main(["build", "proj", "--out", "out", "--no-pdf"]) == 2
    err = capsys.readouterr().err
    assert "out: error: --out: cannot write the output folder (expected a writable folder with " \
           "free space, got No space left on device: " in err
    after = {p.name: p.read_bytes() for p in (tmp_path / "out").iterdir() if p.is_file()}
    assert after == before, "the earlier build stays as it was"
    assert [p.name for p in tmp_path.iterdir() if p.name.startswith(".out")] == []


def test_swap_is_one_exchange__the_output_folder_always_exists(tmp_path, monkeypatch):
    out, tmp = tmp_path / "out", tmp_path / "new"
    out.mkdir()
    (out / "old.txt").write_text("old")
    tmp.mkdir()
    (tmp / "new.txt").write_text("new")
    renames = []
    real = os.replace
    monkeypatch.setattr(build_module.os, "replace", lambda a, b: renames.append((a, b)) or
                        real(a, b))
    build_module.swap_in(tmp, out)
    assert (out / "new.txt").read_text() == "new" and not tmp.exists()
    if sys.platform.startswith("linux"):
        assert renames == [], "on Linux the folders are exchanged in one step, not renamed"


def test_dead_temporary_folders_are_removed__live_and_foreign_ones_kept(tmp_path):
    out = tmp_path / "out"
    live = tmp_path / (build_module._temporary_prefix(out) + "abc")
    prefix = build_module._temporary_prefix(out)
    pid = os.getpid()
    dead = tmp_path / prefix.replace(f"-{pid}-", "-999999999-").replace(
        f"-{build_module._start_time(pid)}-", "-1-") .__add__("xyz")
    foreign = tmp_path / ".out.building-0000000000000000-1-1-zz"
    for folder in (live, dead, foreign):
        folder.mkdir()
    removed = build_module.remove_dead_temporaries(out)
    if not build_module._boot_id():  # pragma: no cover - no /proc: nothing can be proven
        assert removed == []
        return
    assert removed == [dead]
    assert live.is_dir() and foreign.is_dir() and not dead.exists()


# --- verify and diff on a stranger's files ----------------------------------------------------


@pytest.fixture
def built(tmp_path, capsys):
    write_project(tmp_path / "proj", {"loss": LOSS})
    assert main(["build", "proj", "--out", "out", "--no-pdf"]) == 0
    capsys.readouterr()
    return tmp_path / "out"


@pytest.mark.parametrize("content, message", [
    (b"", "not a PDF (expected a PDF package written by calcdoc, got an empty file)"),
    (os.urandom(4000).replace(b"%", b"x"), "not a PDF (expected a PDF package written by "
                                           "calcdoc, got a file that does not start with "
                                           "%PDF-)"),
    (b"%PDF-1.7\n1 0 obj\n<< /Type /Cat", "not a readable PDF (expected a PDF package written "
                                           "by calcdoc, got "),
])
def test_verify_of_random_empty_or_truncated_file__exit_2(tmp_path, capsys, content, message):
    (tmp_path / "x.pdf").write_bytes(content)
    assert main(["verify", "x.pdf"]) == 2
    err = capsys.readouterr().err
    assert err.startswith(f"x.pdf: error: {message}")
    assert "Traceback" not in err


def test_verify_of_results_json_that_is_a_list__exit_2(built, capsys):
    (built / "results.json").write_text("[]")
    assert main(["verify", "out"]) == 2
    assert capsys.readouterr().err.startswith(
        "out/results.json: error: not a calcdoc results.json (expected the results contract of "
        "docs/format.md, got a list at the top)")


def test_diff_of_an_empty_manifest__exit_2(built, capsys):
    (built / "manifest.json").write_text("{}")
    assert main(["diff", "out", "out"]) == 2
    assert capsys.readouterr().err.startswith(
        "out/manifest.json: error: not a calcdoc manifest (expected manifest.json as calcdoc "
        "writes it, got no mapping of inputs to SHA-256 digests)")


def test_verify_names_every_changed_missing_and_unlisted_file(built, capsys):
    (built / "index.html").write_text("<p>edited</p>")
    (built / "sheet-L1.html").unlink()
    (built / "extra.txt").write_text("x")
    assert main(["verify", "out"]) == 1
    out = capsys.readouterr().out.splitlines()
    assert out[:3] == ["changed: index.html (its SHA-256 differs from manifest.json)",
                       "missing: sheet-L1.html (listed in manifest.json)",
                       "unlisted: extra.txt (not in manifest.json)"]
    assert out[-1] == "out: NOT verified — 3 difference(s) listed above"


def test_verify_of_a_manifest_naming_files_outside__exit_2(built, capsys):
    manifest = json.loads((built / "manifest.json").read_text())
    manifest["outputs"]["../../etc/passwd"] = "0" * 64
    (built / "manifest.json").write_text(json.dumps(manifest))
    assert main(["verify", "out"]) == 2
    assert "a file name outside the build folder" in capsys.readouterr().err


@pytest.mark.parametrize("name, why", [
    ("../../escaped.txt", "'..', '.' or an empty part in the path"),
    ("/tmp/escaped-absolute.txt", "an absolute path"),
    ("sheets\\evil.yaml", "a backslash in the name"),
])
def test_verify_of_a_crafted_pdf__attachment_names_refused_nothing_written(
        tmp_path, capsys, name, why):
    from pypdf import PdfWriter
    writer = PdfWriter()
    writer.add_blank_page(100, 100)
    writer.add_attachment("results.json", b'{"format_version": 1}')
    writer.add_attachment(name, b"owned")
    with open(tmp_path / "crafted.pdf", "wb") as handle:
        writer.write(handle)
    before = set(tmp_path.rglob("*"))
    assert main(["verify", "crafted.pdf"]) == 2
    err = capsys.readouterr().err
    assert err.startswith("crafted.pdf: error: attachments with unsafe or duplicate names "
                          f"refused (expected plain relative names, each once, got {name!r} "
                          f"({why}))")
    assert set(tmp_path.rglob("*")) == before
    assert not Path("/tmp/escaped-absolute.txt").exists()


# --- faults -----------------------------------------------------------------------------------


def test_internal_fault__reported_as_one_exit_3(tmp_path, capsys, monkeypatch):
    import dataclasses

    from calcdoc import evaluate
    from calcdoc.kinds import get_kind
    write_project(tmp_path / "proj", {"loss": LOSS})

    def broken(inp, out):
        raise RuntimeError("a defect")

    faulty = dataclasses.replace(get_kind("formula"), compute=broken)
    monkeypatch.setattr(evaluate, "get_kind", lambda name: faulty)
    assert main(["check", "proj"]) == 3
    err = capsys.readouterr().err
    assert err.startswith("calcdoc: internal error: RuntimeError: a defect (at test_hostile.py:")
    assert "please report it with the command and the input files" in err
    assert "Traceback" not in err


@pytest.mark.parametrize("command", [["kinds"], ["check", "proj"]])
def test_output_cut_short_by_a_pipe__no_broken_pipe_error(tmp_path, command):
    write_project(tmp_path / "proj", {"loss": LOSS})
    script = f"import sys; from calcdoc.cli import main; sys.exit(main({command!r}))"
    proc = subprocess.run(f"{sys.executable} -c {script!r} | head -1", shell=True,
                          capture_output=True, text=True, cwd=tmp_path, timeout=120)
    assert proc.stderr == ""
    assert len(proc.stdout.splitlines()) == 1


def test_limits_page_quotes_the_enforced_limits():
    # docs/limits.md states the limits; they must be the ones the code enforces.
    from calcdoc import archive, located, physics, seal, sources
    from calcdoc.kinds import condensation, formula
    from calcdoc.physics import bridge2d
    text = (Path(__file__).resolve().parent.parent / "docs" / "limits.md").read_text()
    for phrase in (f"| {sources.MAX_FILE_BYTES // (1024 * 1024)} MiB |",
                   f"| {located.MAX_DEPTH} levels |", f"| {located.MAX_VALUES:,} |".replace(",", " "),
                   f"| {located.MAX_EVENTS:,} |".replace(",", " "),
                   f"| {formula.MAX_EXPRESSION_CHARS} characters |",
                   f"| {formula.MAX_EXPRESSION_DEPTH} levels |",
                   f"| {physics.MAX_TIME_STEPS:,} |".replace(",", " "),
                   f"| {physics.MAX_CELLS:,} |".replace(",", " "),
                   f"| {int(physics.MAX_DURATION // 3600)} h |",
                   f"are sliced) | {condensation.MAX_SLICES} |",
                   f"conductivity curve) | {MAX_ITEMS:,} |".replace(",", " "),
                   f"| {bridge2d.DEFAULT_MAX_CELLS:,} |".replace(",", " "),
                   f"| {archive.MAX_ARCHIVE_BYTES // (1024 * 1024)} MiB |",
                   f"| {archive.MAX_JSON_BYTES // (1024 * 1024)} MiB |",
                   f"| {archive.MAX_ATTACHMENTS:,} |".replace(",", " "),
                   f"checked by `verify` | {seal.MAX_SIGNATURES} |",
                   f"read by `sign` | {seal.MAX_KEY_BYTES // (1024 * 1024)} MiB |"):
        assert phrase in text, phrase
