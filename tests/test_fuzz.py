"""Fuzzing: whatever bytes a project or a PDF holds, calcdoc answers with exit status 0, 1 or 2
and never with a traceback or an internal fault (exit 3).

Three targets: the loader and evaluator (the starter project with its text mutated), the
formula evaluator (random expressions over given values of every temperature kind), and
verify's reading of a PDF (a real package with its bytes mutated, and rewritten with attachments
of random names). Bounded here to well under a minute; ``make fuzz`` runs the same tests with
many more examples (CALCDOC_FUZZ_SCALE).
"""

from __future__ import annotations

import contextlib
import io
import os
import tempfile
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from calcdoc.cli import main
from calcdoc.starter import write_starter

SCALE = float(os.environ.get("CALCDOC_FUZZ_SCALE", "1"))
def fuzz(n: int) -> settings:
    """Settings for a fuzz test of ``n`` examples (times CALCDOC_FUZZ_SCALE): derandomised in
    the suite, so that it is repeatable; random under ``make fuzz``."""
    return settings(max_examples=max(1, int(n * SCALE)), deadline=None,
                    derandomize=SCALE == 1, database=None,
                    suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large,
                                           HealthCheck.function_scoped_fixture])


def run_quietly(args: list[str]) -> tuple[int, str]:
    err = io.StringIO()
    with contextlib.redirect_stderr(err), contextlib.redirect_stdout(io.StringIO()):
        status = main(args)
    return status, err.getvalue()


def assert_answered(status: int, err: str) -> None:
    assert status in (0, 1, 2), err
    assert "internal error" not in err and "Traceback" not in err, err


# --- the loader and the evaluator -------------------------------------------------------------

STARTER: dict[str, str] | None = None


def starter_files() -> dict[str, str]:
    global STARTER
    if STARTER is None:
        with tempfile.TemporaryDirectory() as folder:
            root = Path(folder) / "p"
            write_starter(root)
            STARTER = {p.relative_to(root).as_posix(): p.read_text()
                       for p in sorted(root.rglob("*")) if p.is_file()}
            STARTER["review.yaml"] = ("reviewer: R. Reviewer\ncomments:\n  - {on: W1.wall, by: "
                                      "RR, date: 2026-11-26, text: Check, status: open}\n")
    return STARTER


TOKENS = [":", ": ", "- ", "-", "[", "]", "{", "}", ",", "&a ", "*a", "<<: *a", "!!binary ",
          "!!python/object ", "'", '"', "\n", "\n  ", " ", "\t", "#", "degC", "delta_degC", "K",
          "1e999", "-1e400", "..", "../", "/etc/passwd", "null", "~", "%", "K/0", "0", "-1",
          ".nan", ".inf", "2026-13-45", "ref: ", "{ref: W1}", "{ref: W1.wall.U}", "{named: x}",
          "material: ", "{material: nope}", "**", "^", "(", ")", "sqrt(", "x", "9" * 40,
          "yes", "on", "[[[[[[[[", "\u00e9", "\x00", "&b [*a, *a, *a]"]


@st.composite
def mutated_project(draw):
    files = dict(starter_files())
    for _ in range(draw(st.integers(1, 4))):
        name = draw(st.sampled_from(sorted(files)))
        text = files[name]
        at = draw(st.integers(0, len(text)))
        op = draw(st.sampled_from(["insert", "delete", "replace", "duplicate_line",
                                   "drop_line"]))
        if op == "insert":
            text = text[:at] + draw(st.sampled_from(TOKENS)) + text[at:]
        elif op == "delete":
            text = text[:at] + text[at + draw(st.integers(1, 30)):]
        elif op == "replace":
            text = text[:at] + draw(st.sampled_from(TOKENS)) + text[at + draw(st.integers(1, 8)):]
        else:
            lines = text.splitlines(keepends=True) or [""]
            k = draw(st.integers(0, len(lines) - 1))
            lines[k:k + 1] = [lines[k], lines[k]] if op == "duplicate_line" else []
            text = "".join(lines)
        files[name] = text
    return files


@fuzz(120)
@given(files=mutated_project())
def test_fuzz_loader_and_evaluator__always_answered(files):
    with tempfile.TemporaryDirectory() as folder:
        root = Path(folder) / "p"
        for name, text in files.items():
            (root / name).parent.mkdir(parents=True, exist_ok=True)
            (root / name).write_bytes(text.encode("utf-8", "surrogatepass"))
        assert_answered(*run_quietly(["check", str(root)]))


# --- the formula evaluator --------------------------------------------------------------------

GIVEN = {"U": "0.3 W/(m^2*K)", "A": "12 m^2", "dT": "23 K", "T": "296 K", "ti": "20 degC",
         "te": "-5 degF", "d": "4 delta_degC", "n": "3", "z": "0", "big": "1e90 m",
         "neg": "-2 W"}

leaves = st.one_of(st.sampled_from(sorted(GIVEN) + ["pi", "sigma"]),
                   st.sampled_from(["0", "1", "2", "0.5", "-1", "1e300", "3.5"]))


def combine(children):
    binary = st.tuples(children, st.sampled_from(["+", "-", "*", "/", "**"]), children).map(
        lambda t: f"({t[0]} {t[1]} {t[2]})")
    unary = children.map(lambda c: f"-{c}")
    call = st.tuples(st.sampled_from(["sqrt", "exp", "log", "log10", "sin", "abs"]),
                     children).map(lambda t: f"{t[0]}({t[1]})")
    pair = st.tuples(st.sampled_from(["min", "max"]), children, children).map(
        lambda t: f"{t[0]}({t[1]}, {t[2]})")
    return st.one_of(binary, unary, call, pair)


expressions = st.recursive(leaves, combine, max_leaves=12)


@fuzz(200)
@given(expr=expressions, unit=st.sampled_from(["1", "W", "K", "degC", "delta_degC", "m",
                                               "W/m^2", "kW"]))
def test_fuzz_formula_expressions__always_answered(expr, unit):
    given_text = "".join(f"      {k}: {v}\n" for k, v in GIVEN.items())
    sheet = (f"id: F1\ntitle: Fuzz\nblocks:\n  - id: f\n    kind: formula\n    given:\n"
             f"{given_text}    steps:\n      - {{name: r, expr: \"{expr}\", unit: \"{unit}\"}}\n")
    with tempfile.TemporaryDirectory() as folder:
        root = Path(folder) / "p"
        (root / "sheets").mkdir(parents=True)
        (root / "project.yaml").write_text(
            'project: {number: "F-1", title: Fuzz}\npackage: {number: F, title: Fuzz}\n'
            "revisions:\n  - {rev: P1, date: 2026-11-10, purpose: Fuzz}\n")
        (root / "sheets" / "f.yaml").write_text(sheet)
        assert_answered(*run_quietly(["check", str(root)]))


# --- verify's reading of a PDF ----------------------------------------------------------------

@pytest.fixture(scope="module")
def package_pdf(tmp_path_factory) -> bytes:
    folder = tmp_path_factory.mktemp("fuzz-pdf")
    write_starter(folder / "p")
    status, err = run_quietly(["build", str(folder / "p"), "--out", str(folder / "out")])
    assert status == 0, err
    return (folder / "out" / "package.pdf").read_bytes()


@st.composite
def mutated_bytes(draw, data: bytes):
    out = bytearray(data)
    for _ in range(draw(st.integers(1, 12))):
        op = draw(st.sampled_from(["flip", "truncate", "insert", "delete"]))
        at = draw(st.integers(0, max(len(out) - 1, 0)))
        if op == "flip" and out:
            out[at] ^= draw(st.integers(1, 255))
        elif op == "truncate":
            del out[at:]
        elif op == "insert":
            out[at:at] = draw(st.binary(min_size=1, max_size=40))
        else:
            del out[at:at + draw(st.integers(1, 200))]
    return bytes(out)


@fuzz(40)
@given(data=st.data())
def test_fuzz_verify_of_a_mutated_pdf__always_answered(package_pdf, data):
    mutated = data.draw(mutated_bytes(package_pdf))
    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "x.pdf"
        path.write_bytes(mutated)
        before = set(Path(folder).rglob("*"))
        assert_answered(*run_quietly(["verify", str(path)]))
        assert set(Path(folder).rglob("*")) == before


@fuzz(25)
@given(names=st.lists(st.text(min_size=0, max_size=30), min_size=1, max_size=4))
def test_fuzz_verify_of_attachments_with_any_names__nothing_written(package_pdf, names):
    from pypdf import PdfReader, PdfWriter
    writer = PdfWriter(clone_from=PdfReader(io.BytesIO(package_pdf)))
    for name in names:
        try:
            writer.add_attachment(name, b"x")
        except Exception:  # noqa: BLE001 - pypdf refuses some names itself; not our concern
            return
    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "x.pdf"
        with open(path, "wb") as handle:
            writer.write(handle)
        before = set(Path(folder).rglob("*"))
        assert_answered(*run_quietly(["verify", str(path)]))
        assert set(Path(folder).rglob("*")) == before
