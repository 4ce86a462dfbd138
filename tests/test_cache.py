"""The build cache and the view made once: a warm build writes the same bytes as a cold one.

What is checked is the contract of issue 15 and docs/format.md's `build` command, not numbers:
a rebuild with the cache (`<out>.cache` beside the output folder) must give byte-identical site
files, results.json, manifest and PDF to a build without it (common practice for build caches:
a cache may save time, never change an output); an entry that is corrupted, or made by another
version of the program, is ignored; a sheet that did not change is not typeset again.
Sheets are copies of the demo's (EW1, FW1 and HG1, which takes its U-values from the other two
by reference), the invented scenario of projects/cold-store.
"""

from __future__ import annotations

import json
import shutil
from pathlib import Path

import pytest

from calcdoc.build import build
from calcdoc.cache import BuildCache, cache_folder
from calcdoc.cli import main
from calcdoc.render.memo import MEMO, data_digest

DEMO = Path(__file__).resolve().parent.parent / "projects" / "cold-store"
SHEETS = ["ew1.yaml", "fw1.yaml", "heat-gains.yaml"]


def small_project(root: Path) -> Path:
    """Three of the demo's sheets, HG1 referring to EW1 and FW1."""
    (root / "sheets").mkdir(parents=True)
    text = (DEMO / "project.yaml").read_text(encoding="utf-8")
    head, rest = text.split("  sheets:\n", 1)
    listed = "".join(f"    - sheets/{name}\n" for name in SHEETS)
    rest = rest[rest.index("revisions:"):]
    (root / "project.yaml").write_text(head + "  sheets:\n" + listed + rest, encoding="utf-8")
    for name in SHEETS:
        shutil.copy(DEMO / "sheets" / name, root / "sheets" / name)
    return root


def change_one_sheet(root: Path) -> None:
    """Thicken EW1's PIR board: EW1 and HG1 (which takes EW1's U) change, FW1 does not."""
    path = root / "sheets" / "ew1.yaml"
    text = path.read_text(encoding="utf-8")
    old = "{name: PIR cavity board, thickness: 50 mm"
    assert old in text
    path.write_text(text.replace(old, "{name: PIR cavity board, thickness: 60 mm"),
                    encoding="utf-8")


def files_of(folder: Path) -> dict[str, bytes]:
    return {str(p.relative_to(folder)): p.read_bytes() for p in sorted(folder.rglob("*"))
            if p.is_file()}


@pytest.fixture(scope="module")
def warm_and_cold(tmp_path_factory):
    """(warm build after one sheet changed, cold build of the same, computed per sheet)."""
    base = tmp_path_factory.mktemp("cache")
    root = small_project(base / "proj")
    build(root, base / "out", pdf=True)
    change_one_sheet(root)
    build(root, base / "out", pdf=True)
    computed = dict(MEMO.computed)
    build(root, base / "cold", pdf=True, cache=False)
    return base / "out", base / "cold", computed


def test_warm_rebuild_is_byte_identical_to_a_cold_build__site_results_manifest_pdf(
        warm_and_cold):
    warm, cold, _ = warm_and_cold
    warm_files, cold_files = files_of(warm), files_of(cold)
    assert sorted(warm_files) == sorted(cold_files)
    for name in ("results.json", "manifest.json", "package.pdf", "package.html", "index.html"):
        assert name in warm_files
    different = [name for name in warm_files if warm_files[name] != cold_files[name]]
    assert different == []


def test_warm_rebuild_typesets_only_the_changed_sheet_and_what_refers_to_it(warm_and_cold):
    _, _, computed = warm_and_cold
    assert computed.get("FW1", 0) == 0  # unchanged, nothing it uses changed: all from cache
    assert computed.get("EW1", 0) > 0 and computed.get("HG1", 0) > 0


def test_cache_folder_is_beside_the_output_folder_not_inside(warm_and_cold):
    warm, _, _ = warm_and_cold
    folder = cache_folder(warm)
    assert folder.parent == warm.parent and (folder / "sheets").is_dir()
    assert not any(p.name.endswith(".cache") for p in warm.rglob("*"))
    assert not cache_folder(warm.parent / "cold").exists()  # --no-cache writes nothing


def _html_build(root: Path, out: Path, **kwargs) -> dict[str, bytes]:
    build(root, out, pdf=False, **kwargs)
    return files_of(out)


def test_corrupted_and_foreign_entries_are_ignored_and_replaced(tmp_path):
    root = small_project(tmp_path / "proj")
    out = tmp_path / "out"
    reference = _html_build(root, tmp_path / "ref", cache=False)
    _html_build(root, out)
    entries = sorted((cache_folder(out) / "sheets").iterdir())
    assert len(entries) == len(SHEETS)
    # a flipped byte in the content: the digest no longer holds
    raw = bytearray(entries[0].read_bytes())
    raw[-5] ^= 0x01
    entries[0].write_bytes(bytes(raw))
    # an entry another version wrote, its digest intact: wrong salt
    header, _, content = entries[1].read_bytes().partition(b"\n")
    fields = json.loads(header)
    fields["salt"] = "0" * 64
    entries[1].write_bytes(json.dumps(fields).encode() + b"\n" + content)
    # the content swapped for a poisoned answer, with a matching digest but under a header
    # copied from another entry (another key)
    poisoned = json.dumps({"mathml": {'["x"]': "<math>poisoned</math>"}}).encode()
    header3 = json.loads(entries[2].read_bytes().partition(b"\n")[0])
    other = json.loads(entries[0].read_bytes().partition(b"\n")[0])
    import hashlib
    header3["key"] = other["key"]
    header3["sha256"] = hashlib.sha256(poisoned).hexdigest()
    entries[2].write_bytes(json.dumps(header3).encode() + b"\n" + poisoned)

    cache = BuildCache(cache_folder(out))
    keys = [p.stem for p in entries]
    assert [cache.load_sheet(k) for k in keys] == [None, None, None]
    assert _html_build(root, out) == reference
    assert all(BuildCache(cache_folder(out)).load_sheet(p.stem) is not None
               for p in sorted((cache_folder(out) / "sheets").iterdir()))


def test_no_cache_option_builds_without_reading_or_writing_a_cache(tmp_path):
    root = small_project(tmp_path / "proj")
    out = tmp_path / "out"
    assert main(["build", str(root), "--out", str(out), "--no-pdf", "--no-cache"]) == 0
    assert not cache_folder(out).exists()
    assert main(["build", str(root), "--out", str(out), "--no-pdf"]) == 0
    assert (cache_folder(out) / "sheets").is_dir()


def test_figure_digest_tells_data_apart_and_equal_data_alike():
    import numpy as np
    from calcdoc.data import Axis
    a = Axis("time", "s")
    assert data_digest(np.array([1.0, 2.0]), a) == data_digest(np.array([1.0, 2.0]), a)
    assert data_digest(np.array([1.0, 2.0])) != data_digest(np.array([1.0, 2.0000001]))
    assert data_digest([1.0]) != data_digest((1.0,)) != data_digest([1])
    assert data_digest(object()) is None  # unknown data: drawn without a cache
