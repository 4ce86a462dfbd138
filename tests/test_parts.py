"""The PDF typeset in parts on several processes reads as the one document would.

`calcdoc build --jobs N` typesets the cover and contents, each sheet and the appendices as parts
in parallel and joins them (calcdoc/render/parts.py). The reference is WeasyPrint's own
pagination of the whole package as one document (`--jobs 1`): the joined PDF must have the same
pages with the same text on each ("N of M" in the title block and the contents' page numbers
included), the same outline, the same named destinations on the same pages, links to the same
places, the same attachments and the same PDF/A catalog. These are the properties issue 15 asks
to keep; the comparison with a single-document build is the check (common practice for a
parallel path: it must agree with the serial one). The PDF/A structure of the joined PDF is
checked clause by clause in tests/test_pdfa.py, which builds both ways.

Sheets are copies of the demo's (EW1, FW1 and HG1, which refers to both), the invented scenario
of projects/cold-store.
"""

from __future__ import annotations

import json
import re
from pathlib import Path

import pytest
from pypdf import PdfReader
from test_cache import change_one_sheet, files_of, small_project

from calcdoc.build import build
from calcdoc.cache import BuildCache, cache_folder
from calcdoc.render.parts import PartLayout, plan_parts


@pytest.fixture(scope="module")
def builds(tmp_path_factory):
    """{"one": single-document build, "parts": cold build in parts, "warm": the same in parts
    after a warm rebuild with one sheet changed, "cold": a cold build of the changed project}."""
    base = tmp_path_factory.mktemp("parts")
    root = small_project(base / "proj")
    build(root, base / "one", pdf=True, cache=False, jobs=1)
    build(root, base / "parts", pdf=True, jobs=2)
    # the same folder again, one sheet changed: only that sheet's part (and those whose HTML
    # changed with it) is typeset again
    (base / "first-parts.pdf").write_bytes((base / "parts" / "package.pdf").read_bytes())
    change_one_sheet(root)
    build(root, base / "parts", pdf=True, jobs=2)
    build(root, base / "cold", pdf=True, cache=False, jobs=2)
    return {"one_first": base / "one", "parts_first": base / "first-parts.pdf",
            "warm": base / "parts", "cold": base / "cold", "root": root}


def reader(path: Path) -> PdfReader:
    return PdfReader(path if path.suffix == ".pdf" else path / "package.pdf")


def outline(r: PdfReader, items=None, depth=0) -> list[tuple[int, str, int]]:
    found = []
    for item in (r.outline if items is None else items):
        if isinstance(item, list):
            found += outline(r, item, depth + 1)
        else:
            found.append((depth, item.title, r.get_destination_page_number(item)))
    return found


def link_targets(r: PdfReader) -> list[set[str]]:
    """Per page, the named destinations its links go to, and the URIs of external links."""
    pages = []
    for page in r.pages:
        targets = set()
        for ref in page.get("/Annots") or []:
            annotation = ref.get_object()
            if annotation.get("/Subtype") == "/Link":
                action = annotation.get("/A")
                targets.add(str(annotation["/Dest"]) if "/Dest" in annotation
                            else str(action.get("/URI")))
        pages.append(targets)
    return pages


def number_positions(r: PdfReader) -> list[tuple[str, float, float]]:
    """Per page, where the running page number 'N of M' is drawn (text, x, y in points)."""
    found = []
    for number, page in enumerate(r.pages, start=1):
        wanted = f"{number} of {len(r.pages)}"
        hits = []

        def visit(text, cm, tm, font, size, hits=hits, wanted=wanted):
            if text.strip() == wanted:
                hits.append((round(cm[4] + tm[4] * cm[0], 1), round(cm[5] + tm[5] * cm[3], 1)))
        page.extract_text(visitor_text=visit)
        found.append((wanted, *(hits[0] if hits else (None, None))))
    return found


def test_same_pages_with_the_same_text_as_the_one_document(builds):
    one, parts = reader(builds["one_first"]), reader(builds["parts_first"])
    assert len(parts.pages) == len(one.pages) > 4
    for number, (a, b) in enumerate(zip(one.pages, parts.pages), start=1):
        # the page number is drawn last on a joined page: compare lines, not their order
        assert sorted(a.extract_text().splitlines()) == sorted(b.extract_text().splitlines()), \
            f"page {number}"


def test_page_numbers__n_of_m_on_every_page_where_the_one_document_draws_it(builds):
    one, parts = reader(builds["one_first"]), reader(builds["parts_first"])
    expected = number_positions(one)
    assert all(x is not None for _, x, _ in expected)
    got = number_positions(parts)
    for (text, x0, y0), (_, x1, y1) in zip(expected, got):
        assert x1 is not None, f"no '{text}'"
        assert abs(x1 - x0) < 0.5 and abs(y1 - y0) < 0.5, text


def test_contents_page_numbers_are_those_of_the_sheets(builds):
    parts = reader(builds["parts_first"])
    contents = parts.pages[1].extract_text() + "\n" + parts.pages[0].extract_text()
    for sheet_id in ("EW1", "FW1", "HG1"):
        page = parts.get_destination_page_number(parts.named_destinations[sheet_id]) + 1
        # a contents row: the id, its title (may wrap), checks, sign-off, open comments, page
        row = re.search(rf"^{sheet_id} .*?\n?.*?\n?.*? (\d+)\n(?:[A-Z]+\d |Materials)",
                        contents, flags=re.M)
        assert row and int(row.group(1)) == page, (sheet_id, page, row and row.group(0))


def test_outline_destinations_and_links_as_the_one_document(builds):
    one, parts = reader(builds["one_first"]), reader(builds["parts_first"])
    assert outline(parts) == outline(one)
    assert len(outline(one)) >= 3 + 5
    dests_one, dests_parts = one.named_destinations, parts.named_destinations
    assert sorted(dests_parts) == sorted(dests_one)
    for name in dests_one:
        assert (parts.get_destination_page_number(dests_parts[name])
                == one.get_destination_page_number(dests_one[name])), name
    assert link_targets(parts) == link_targets(one)
    # a link from the contents (the cover part) into a sheet (another part) is there
    assert {"EW1", "FW1", "HG1"} <= link_targets(parts)[1] | link_targets(parts)[0]


def test_attachments_metadata_and_catalog_as_the_one_document(builds):
    one, parts = reader(builds["one_first"]), reader(builds["parts_first"])
    assert parts.attachments == one.attachments
    assert "results.json" in parts.attachments
    assert parts.metadata == one.metadata
    root_one, root_parts = one.trailer["/Root"], parts.trailer["/Root"]
    assert sorted(root_parts.keys()) == sorted(root_one.keys())
    assert len(root_parts["/AF"]) == len(root_one["/AF"])
    assert root_parts["/Metadata"].get_data() == root_one["/Metadata"].get_data()
    # the file's permanent identifier (the first of /ID, ISO 32000-1 14.4) is the package's;
    # the second names this version of the file, which is other bytes
    assert parts.trailer["/ID"][0] == one.trailer["/ID"][0]


def test_site_results_and_print_document_the_same_bytes_with_figures_drawn_on_two_processes(
        builds, tmp_path):
    """With --jobs 2 the figures are drawn on a pool before the views ask for them: every file
    but the PDF (and the manifest, which lists the PDF's digest) is the one-process build's."""
    build(builds["root"], tmp_path / "one", pdf=True, cache=False, jobs=1)
    one, parts = files_of(tmp_path / "one"), files_of(builds["cold"])
    assert sorted(one) == sorted(parts)
    assert any(name.endswith(".html") and "image/svg+xml" in one[name].decode()
               for name in one)  # figures are there to compare
    different = [name for name in one if one[name] != parts[name]]
    assert sorted(different) == ["manifest.json", "package.pdf"]


def test_warm_rebuild_in_parts_is_byte_identical_to_a_cold_one(builds):
    assert (builds["warm"] / "package.pdf").read_bytes() == \
        (builds["cold"] / "package.pdf").read_bytes()


def test_parts_kept_in_the_cache_are_those_of_the_last_build(builds):
    store = BuildCache(cache_folder(builds["warm"]))
    entries = sorted(p for p in (store.folder / "parts").glob("*.json")
                     if p.stem != store._GUESS)
    # three sheets, the appendices and the page numbers; the cover and contents was typeset
    # with the attachments (and the page numbers of the last build, which held): not kept
    parts = plan_parts({"sheets": [{"id": s} for s in ("EW1", "FW1", "HG1")]})
    assert len(entries) == len(parts) - 1 + 1
    # the pages of the last build's anchors, to try first next time
    assert store.page_guess()["HG1"] > store.page_guess()["EW1"] > 1


def test_a_guess_of_the_wrong_shape_is_no_guess(tmp_path):
    store = BuildCache(tmp_path / "cache")
    store.store_page_guess({"EW1": 3})
    assert store.page_guess() == {"EW1": 3}
    for forged in ({"EW1": "3"}, {"EW1": 0}, ["EW1", 3], {"EW1": 3.5}):
        store.store_page_guess(forged)
        assert store.page_guess() is None


def test_a_part_entry_of_the_wrong_shape_is_ignored__the_build_is_the_same(builds, tmp_path):
    """A cache entry is read as a stranger's file: an entry whose digest holds but whose layout
    is of another shape (a page index past the part's pages) is a miss, typeset again."""
    store = BuildCache(cache_folder(builds["warm"]))
    for path in (store.folder / "parts").glob("*.json"):
        if path.stem == store._GUESS:
            continue
        content = path.read_bytes().partition(b"\n")[2]
        data = json.loads(content)
        assert PartLayout.from_data(data, "x.pdf") is not None
        bad = dict(data, bookmarks=[["Forged", [data["pages"] + 5, 0, 0], [], "open"]])
        assert PartLayout.from_data(bad, "x.pdf") is None
        for key, value in (("pages", -1), ("pages", "3"), ("anchors", None),
                           ("page_numbers", [{"font_style": "x"}] * data["pages"])):
            assert PartLayout.from_data(dict(data, **{key: value}), "x.pdf") is None
        lines = [line for line in data["page_numbers"] if line]
        for family in ("x'; background: url(http://example.com/)", "", "a" * 200):
            if lines:  # a font family is a name, never CSS of its own
                forged = [dict(lines[0], font_family=[family])] * data["pages"]
                assert PartLayout.from_data(dict(data, page_numbers=forged), "x.pdf") is None
        store._write("parts", path.stem, ".json", json.dumps(bad).encode())
    for path in (store.folder / "pdf").glob("*.pdf"):  # not the whole PDF from the cache
        path.unlink()
    build(builds["root"], builds["warm"], pdf=True, jobs=2)
    for path in (store.folder / "parts").glob("*.json"):  # replaced by what was typeset
        if path.stem == store._GUESS:
            continue
        data = json.loads(path.read_bytes().partition(b"\n")[2])
        assert PartLayout.from_data(data, "x.pdf") is not None
    assert (builds["warm"] / "package.pdf").read_bytes() == \
        (builds["cold"] / "package.pdf").read_bytes()


def test_a_part_that_asks_for_a_remote_image_fails_the_pdf_as_the_one_document_does(tmp_path):
    """The confined resource loading holds in the worker processes too: a part asking for
    anything outside the build folder fails the PDF (ResourceRefused, as tests/test_render.py
    checks for the one document), and nothing is left behind."""
    from calcdoc.render.pdf import ResourceRefused, write_pdf

    def render_part(part, page_of):
        if part["sheets"] == ("B",):
            return '<html><body><p>B</p><img src="http://example.com/seal.png"></body></html>'
        return f"<html><body><p>{part}</p></body></html>"

    parts = plan_parts({"sheets": [{"id": "A"}, {"id": "B"}]})
    with pytest.raises(ResourceRefused):
        write_pdf("<html></html>", tmp_path, tmp_path / "x.pdf", [], "2026-11-10", "seed",
                  jobs=2, render_part=render_part, parts=parts)
    assert sorted(p.name for p in tmp_path.iterdir()) == []


def test_a_build_without_the_pdf_leaves_the_pdf_and_its_parts_in_the_cache(builds):
    store = BuildCache(cache_folder(builds["warm"]))
    before = sorted(p.name for kind in ("pdf", "parts") for p in (store.folder / kind).iterdir())
    assert before
    build(builds["root"], builds["warm"], pdf=False, jobs=2)
    after = sorted(p.name for kind in ("pdf", "parts") for p in (store.folder / kind).iterdir())
    assert after == before


def test_parts_typeset_in_spawned_workers_when_this_process_runs_threads(tmp_path, monkeypatch):
    """Fork is used only while the process runs one thread (a server's threads could hold a
    lock across the fork); otherwise the workers are spawned, and the PDF is the same."""
    import threading

    from calcdoc.render import workers
    from calcdoc.render.pdf import write_pdf

    def render_part(part, page_of):
        name = part["sheets"][0] if part["sheets"] else ("front" if part["front"] else "back")
        return (f'<html><body><h1 id="{name}">{name}</h1>'
                f'<p><a href="#A">to A</a></p></body></html>')

    parts = plan_parts({"sheets": [{"id": "A"}, {"id": "B"}]})
    methods = []
    real_pool = workers.pool

    def pool(jobs):
        executor = real_pool(jobs)
        methods.append(executor._mp_context.get_start_method())
        return executor
    monkeypatch.setattr("calcdoc.render.parts.pool", pool)
    for threads, name in ((1, "forked.pdf"), (2, "spawned.pdf")):
        monkeypatch.setattr(threading, "active_count", lambda threads=threads: threads)
        write_pdf("<html></html>", tmp_path, tmp_path / name, [("a.txt", b"a")], "2026-11-10",
                  "seed", jobs=2, render_part=render_part, parts=parts)
    assert methods == ["fork", "spawn"]
    forked, spawned = reader(tmp_path / "forked.pdf"), reader(tmp_path / "spawned.pdf")
    assert len(spawned.pages) == len(forked.pages) == 4
    assert [p.extract_text() for p in spawned.pages] == [p.extract_text() for p in forked.pages]
    assert link_targets(spawned) == link_targets(forked) and "A" in link_targets(spawned)[0]
