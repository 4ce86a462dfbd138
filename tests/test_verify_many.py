"""``calcdoc verify`` over many packages: an archive of builds and PDFs re-verified as
independent tasks on a process pool or a Dask cluster, one line per package and a total.

The archive is built once from the starter project (``calcdoc new``): intact copies of its
build folder and PDF, one copy with a result edited after the build, and packages a stranger
could hand over (a file that is not a PDF, a manifest that is not JSON, a manifest naming a file
outside its folder). Each bad package gets its own line and never stops the others."""

from __future__ import annotations

import json
import os
import shutil
from pathlib import Path

import pytest

from calcdoc.cli import main

INTACT = ["a-build", "b-build", "c.pdf"]


@pytest.fixture(scope="module")
def archive(tmp_path_factory):
    """A folder holding three intact packages, one tampered and three hostile ones."""
    root = tmp_path_factory.mktemp("archive")
    here = os.getcwd()
    os.chdir(root)
    try:
        assert main(["new", "starter"]) == 0
        assert main(["build", "starter", "--out", "built"]) == 0
    finally:
        os.chdir(here)
    packages = root / "packages"
    packages.mkdir()
    shutil.copytree(root / "built", packages / "a-build")
    shutil.copytree(root / "built", packages / "b-build")
    shutil.copy(root / "built" / "package.pdf", packages / "c.pdf")
    tampered = packages / "d-tampered"
    shutil.copytree(root / "built", tampered)
    results = json.loads((tampered / "results.json").read_text("utf-8"))
    result = results["sheets"][0]["blocks"][0]["results"]["U"]
    result["si"] *= 0.5  # a halved U-value: the kind of edit verify exists to catch
    (tampered / "results.json").write_text(json.dumps(results, indent=1), "utf-8")
    hostile = packages / "hostile"
    hostile.mkdir()
    (hostile / "random.pdf").write_bytes(os.urandom(2000).replace(b"%", b"x"))
    (hostile / "not-json").mkdir()
    (hostile / "not-json" / "manifest.json").write_text('{"outputs": ')
    outside = hostile / "outside"
    shutil.copytree(root / "built", outside)
    manifest = json.loads((outside / "manifest.json").read_text("utf-8"))
    manifest["outputs"]["../../escaped.txt"] = "0" * 64
    (outside / "manifest.json").write_text(json.dumps(manifest), "utf-8")
    return packages


def _snapshot(folder: Path) -> dict[str, bytes]:
    return {str(p.relative_to(folder)): p.read_bytes() if p.is_file() else b""
            for p in sorted(folder.rglob("*"))}


def _expected_statuses(archive: Path) -> dict[str, str]:
    return {str(archive / "a-build"): "verified", str(archive / "b-build"): "verified",
            str(archive / "c.pdf"): "verified", str(archive / "d-tampered"): "differs",
            str(archive / "hostile" / "not-json"): "refused",
            str(archive / "hostile" / "outside"): "refused",
            str(archive / "hostile" / "random.pdf"): "refused"}


def _lines(out: str) -> dict[str, tuple[str, str]]:
    """path → (status, reason) from verify's table (all lines but the total)."""
    rows = {}
    for line in out.splitlines()[:-1]:
        status, rest = line.split(None, 1)
        path, _, why = rest.partition("  ")
        rows[path.strip()] = (status, why.strip())
    return rows


def test_verify_many_on_two_processes__each_package_its_own_line_and_a_total(
        archive, tmp_path, capsys, monkeypatch):
    monkeypatch.setenv("TMPDIR", str(tmp_path / "tmp"))
    (tmp_path / "tmp").mkdir()
    before = _snapshot(archive)
    assert main(["verify", str(archive), "--jobs", "2"]) == 1
    out = capsys.readouterr().out
    rows = _lines(out)
    assert {path: status for path, (status, _) in rows.items()} == _expected_statuses(archive)
    assert list(rows) == sorted(rows), "lines in the order the archive is read (by name)"
    assert rows[str(archive / "d-tampered")][1].startswith("3 difference(s), first: changed: "
                                                           "results.json")
    assert rows[str(archive / "hostile" / "random.pdf")][1].startswith("not a PDF")
    assert "not JSON" in rows[str(archive / "hostile" / "not-json")][1]
    assert "outside the build folder" in rows[str(archive / "hostile" / "outside")][1]
    assert out.splitlines()[-1] == "7 packages: 3 verified, 1 differs, 3 refused"
    # hostile packages read, nothing written: not in the archive, not beside it, not in /tmp
    assert _snapshot(archive) == before
    assert not (archive.parent / "escaped.txt").exists()
    assert list(tmp_path.iterdir()) == [tmp_path / "tmp"]


def test_verify_many_all_intact__exit_0(archive, capsys):
    paths = [str(archive / name) for name in INTACT]
    assert main(["verify", *paths, "--jobs", "2"]) == 0
    out = capsys.readouterr().out.splitlines()
    assert [line.split()[:2] for line in out[:-1]] == [["verified", p] for p in paths]
    assert out[-1] == "3 packages: 3 verified, 0 differs, 0 refused"


def test_verify_many_json__a_list_of_the_same_records(archive, capsys):
    assert main(["verify", str(archive), "--json", "--jobs", "1"]) == 1
    records = json.loads(capsys.readouterr().out)
    assert isinstance(records, list)
    assert {r["path"]: r["status"] for r in records} == _expected_statuses(archive)
    tampered = next(r for r in records if r["status"] == "differs")
    assert any("W1.wall.U" in d for d in tampered["differences"])
    assert all(r["reason"] for r in records if r["status"] == "refused")


def test_verify_many_on_a_dask_local_cluster__same_table(archive, capsys):
    distributed = pytest.importorskip("distributed")
    with distributed.LocalCluster(n_workers=1, threads_per_worker=2, processes=False,
                                  dashboard_address=None) as cluster:
        status = main(["verify", str(archive), "--scheduler", cluster.scheduler_address])
    assert status == 1
    out = capsys.readouterr().out
    rows = _lines(out)
    assert {path: s for path, (s, _) in rows.items()} == _expected_statuses(archive)
    assert out.splitlines()[-1] == "7 packages: 3 verified, 1 differs, 3 refused"


@pytest.mark.parametrize("args, message", [
    (["--jobs", "0"], "expected a whole number of at least 1, got '0'"),
    (["--scheduler", "tcp://127.0.0.1:1"], "cannot reach the scheduler"),
])
def test_verify_many_bad_usage__exit_2(archive, capsys, args, message):
    assert main(["verify", str(archive / "a-build"), str(archive / "c.pdf"), *args]) == 2
    assert message in capsys.readouterr().err


def test_verify_many_path_that_does_not_exist__exit_2_nothing_verified(archive, capsys):
    assert main(["verify", str(archive / "a-build"), "no-such-package"]) == 2
    captured = capsys.readouterr()
    assert captured.out == ""
    assert captured.err.startswith("no-such-package: error: not found")


def test_verify_one_path__output_unchanged(archive, capsys):
    assert main(["verify", str(archive / "a-build")]) == 0
    out = capsys.readouterr().out.splitlines()
    assert out == [f"{archive / 'a-build'}: verified — every file matches its SHA-256 in "
                   f"manifest.json, the PDF carries the same inputs and results, and a fresh "
                   f"evaluation of the archived inputs gives the recorded results"]
