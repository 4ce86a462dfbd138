"""The build cache and the view made once: a warm build writes the same bytes as a cold one.

What is checked is the contract of issue 15 and docs/format.md's `build` command, not numbers:
a rebuild with the cache (`<out>.cache` beside the output folder) must give byte-identical site
files, results.json, manifest and PDF to a build without it (common practice for build caches:
a cache may save time, never change an output); an entry that is corrupted, made by another
version of the program, or written by anyone but this user's calcdoc (its authentication code),
is ignored; a sheet that did not change is not typeset again, a block whose inputs did not change
not computed again, and a package built with --final computes every block.
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
    report = build(root, base / "out", pdf=True)
    computed = dict(MEMO.computed)
    computed["blocks"] = (report.computed, report.restored)
    computed["views"] = report.views_kept
    computed["pages"] = report.pages_kept
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


def test_warm_rebuild_computes_only_the_changed_block_and_the_block_that_refers_to_it(
        warm_and_cold):
    _, _, computed = warm_and_cold
    ran, given_back = computed["blocks"]
    assert sorted(ran) == ["EW1.wall", "HG1.gains"]  # EW1 changed; HG1 takes EW1's U
    assert given_back == ["FW1.wall"]


def test_warm_rebuild_builds_the_views_of_the_changed_sheets_only(warm_and_cold):
    """FW1's blocks' views (numbers formatted, steps typeset, figures) come back whole, for
    the site and the PDF; EW1's and HG1's are built again (and the outputs are still the cold
    build's bytes: test above)."""
    _, _, computed = warm_and_cold
    assert computed["views"] == ["FW1"]
    # its site page is kept too, and written again only when something on it changed: FW1's
    # sidebar lists EW1 and HG1, whose entries (titles, failing checks, open comments) did not
    assert computed["pages"] == ["FW1"]


def test_view_entry_reads_back_only_what_it_knows():
    from markupsafe import Markup

    from calcdoc.render.printed import Printed
    from calcdoc.stored import Unstorable, encode_view, restore_view
    blocks = [{"key": "EW1.wall", "html": Markup("<b>U</b>"), "text": "<b>U</b>",
               "pair": (1, 2.5), "shown": Printed("0.273", "W/(m^2*K)"), "none": None}]
    cited = {"numbers": [["ISO 6946:2017", 1]], "uses": [[1, ["EW1.wall"]]], "project": []}
    data = json.loads(json.dumps(encode_view(blocks, cited)))
    again, cited_again = restore_view(data)
    assert again == blocks and cited_again == cited
    assert type(again[0]["html"]) is Markup and type(again[0]["text"]) is str  # escaped
    assert type(again[0]["pair"]) is tuple
    assert encode_view([{"$m": "key of a tag"}], cited) is None
    assert encode_view([{"obj": object()}], cited) is None
    for forged in ({"$c": "Popen", "f": {"args": "rm -rf /"}},
                   {"$c": "Printed", "f": {"number": "1"}},  # a field missing
                   {"$x": "unknown tag"}, {"$m": 1}):
        with pytest.raises(Unstorable):
            restore_view({"format": data["format"], "blocks": [{"v": forged}],
                          "cited": cited})


def test_every_block_of_the_demo_is_kept_and_given_back_exactly():
    """What a block's compute wrote, through JSON and back, is the same data to the last bit
    (floats by their hex form, arrays by their bytes, each class by its name); only a block
    handing on a solver object (the fire curve FC1 hands to the blocks it heats) is not kept.
    Its steps as printed come back equal too."""
    from calcdoc.evaluate import evaluate_folder
    from calcdoc.kinds.base import BlockOutput
    from calcdoc.stored import (_WRITTEN, encode_output, encode_printed, restore_output,
                                restore_printed)
    package = evaluate_folder(DEMO)
    not_kept = []
    for sheet in package.sheets:
        for block in sheet.blocks:
            out = block.output
            data = encode_output(out)
            if data is None:
                not_kept.append(block.spec.key)
                continue
            again = BlockOutput(block.kind, block.spec.display, block.spec.key,
                                block.inputs)
            restore_output(again, json.loads(json.dumps(data, sort_keys=True)))
            for name in _WRITTEN:
                assert data_digest(getattr(again, name)) == data_digest(getattr(out, name)), \
                    (block.spec.key, name)
                assert data_digest(getattr(out, name)) is not None
            assert again.declared_results() == out.declared_results()
            assert all(a is b for a, b in zip(again.declared_results(), block.kind.results))
    assert not_kept == ["FC1.fire"]
    # the steps as printed (kept beside each block) come back equal, field by field
    sig, system = package.project.precision, package.project.units
    for sheet in package.sheets:
        for block in sheet.blocks:
            printed = block.printed_steps(sig, system)
            data = json.loads(json.dumps(encode_printed(printed), sort_keys=True))
            assert restore_printed(data) == printed, block.spec.key


def test_stored_form_reads_back_only_the_classes_it_knows():
    from calcdoc.stored import Unstorable, _decode
    for forged in ({"$": "Popen", "f": {"args": "rm -rf /"}},
                   {"$": "Value", "f": {"si": 1.0}},  # fields missing
                   {"$": "nd", "dtype": "O", "shape": [1], "b": "AA=="},  # object array
                   {"$": "nd", "dtype": "<f8", "shape": [2], "b": "AAAAAAAAAAA="},  # 1 of 2
                   {"$": "nd", "dtype": "|b1", "shape": [1], "b": "Ag=="},  # a boolean 2
                   {"$": "f8", "v": "AAAA"},  # 3 bytes, not whole doubles
                   {"$": "f8", "v": "not base64!"},
                   {"$": "float", "v": "1e308"},
                   {"$": "floats", "v": [1.0, "1e308"]},
                   {"$": "tuple", "v": {"$": "dict", "v": []}},
                   {"plain": "mapping"}):
        with pytest.raises(Unstorable):
            _decode(forged)


def test_block_entry_not_written_by_this_users_calcdoc_is_ignored(tmp_path, monkeypatch):
    """A result changed in an entry whose header (key, salt, SHA-256) is made to match, as
    anyone with the folder could: its authentication code does not hold, the block is computed
    afresh. A whole cache folder made with another user's secret gives no answers at all."""
    import hashlib
    root = small_project(tmp_path / "proj")
    out = tmp_path / "out"
    reference = _html_build(root, tmp_path / "ref", cache=False)
    build(root, out, pdf=False)
    entries = sorted((cache_folder(out) / "blocks").iterdir())
    assert len(entries) == 3
    forged = None
    for entry in entries:
        header, _, content = entry.read_bytes().partition(b"\n")
        if b'"U"' not in content:
            continue
        data = json.loads(content)
        pairs = data["results"]["v"]
        for pair in pairs:
            if pair[0] == "U":
                pair[1]["f"]["value"] *= 0.5  # a U-value halved
        content = json.dumps(data, sort_keys=True).encode()
        fields = json.loads(header)
        fields["sha256"] = hashlib.sha256(content).hexdigest()
        entry.write_bytes(json.dumps(fields).encode() + b"\n" + content)
        forged = entry.stem
        break
    assert forged is not None
    assert BuildCache(cache_folder(out)).load_json("blocks", forged) is None
    report = build(root, out, pdf=False)
    assert files_of(out) == reference
    assert len(report.computed) == 1 and len(report.restored) == 2
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "someone-else"))
    other = BuildCache(cache_folder(out))
    assert [other.load_json("blocks", p.stem) for p in entries] == [None, None, None]
    report = build(root, out, pdf=False)
    assert files_of(out) == reference and report.restored == []


def test_bad_input_writes_no_cache_and_no_secret(tmp_path, monkeypatch):
    """Bad input: exit 2 and nothing written (the brief's rule for every command), the cache
    beside the output and the user's secret included, though some blocks evaluated before the
    bad one was found."""
    from calcdoc.cache import secret_file
    monkeypatch.setenv("XDG_CACHE_HOME", str(tmp_path / "fresh-user"))
    root = small_project(tmp_path / "proj")
    path = root / "sheets" / "heat-gains.yaml"
    path.write_text(path.read_text(encoding="utf-8") + "  - [unclosed\n", encoding="utf-8")
    out = tmp_path / "out"
    assert main(["build", str(root), "--out", str(out), "--no-pdf"]) == 2
    assert not out.exists() and not cache_folder(out).exists()
    assert not secret_file().exists()
    shutil.copy(DEMO / "sheets" / "heat-gains.yaml", path)
    assert main(["build", str(root), "--out", str(out), "--no-pdf"]) == 0
    assert secret_file().is_file() and (cache_folder(out) / "blocks").is_dir()


def test_final_build_computes_every_block_whatever_the_cache_holds(tmp_path, monkeypatch):
    import calcdoc.build as building
    from calcdoc.errors import FinalRefused
    root = small_project(tmp_path / "proj")
    build(root, tmp_path / "out", pdf=False)
    stores = []
    real = building.evaluate_project

    def spy(*args, store=None, **kwargs):
        stores.append(store)
        return real(*args, store=store, **kwargs)
    monkeypatch.setattr(building, "evaluate_project", spy)
    with pytest.raises(FinalRefused):  # the demo's sheets are not ready to issue
        build(root, tmp_path / "out", pdf=False, final=True)
    assert stores == [None]


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


def test_a_sheet_page_is_written_again_when_its_sidebar_changes(tmp_path):
    """EW1's title changed: EW1's views are built again (its heading) and every page is
    written again, FW1's too (its sidebar names EW1), though FW1's views come back; the site is
    the bytes of a build without the cache."""
    root = small_project(tmp_path / "proj")
    out = tmp_path / "out"
    build(root, out, pdf=False)
    path = root / "sheets" / "ew1.yaml"
    text = path.read_text(encoding="utf-8")
    old = "title: External wall EW-1 of the packing hall"
    assert old in text
    path.write_text(text.replace(old, "title: External wall EW-1 of the dispatch hall", 1),
                    encoding="utf-8")
    report = build(root, out, pdf=False)
    assert "FW1" in report.views_kept and report.pages_kept == []
    assert files_of(out) == _html_build(root, tmp_path / "cold", cache=False)
    assert "EW-1 of the dispatch hall" in (out / "sheet-FW1.html").read_text(encoding="utf-8")
