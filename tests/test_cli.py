"""The command line: new, kinds, check; exit codes as docs/format.md states them."""

import json
from pathlib import Path

from calcdoc.cli import main
from calcdoc.kinds import registry


def test_new_writes_a_starter_that_builds(tmp_path, capsys):
    folder = tmp_path / "starter"
    assert main(["new", str(folder)]) == 0
    assert (folder / "project.yaml").is_file()
    out = tmp_path / "out"
    assert main(["build", str(folder), "--out", str(out), "--no-pdf"]) == 0
    doc = json.loads((out / "results.json").read_text())
    assert [s["id"] for s in doc["sheets"]] == ["W1", "L1"]


def test_new_refuses_a_folder_with_files(tmp_path, capsys):
    folder = tmp_path / "busy"
    folder.mkdir()
    (folder / "notes.txt").write_text("keep")
    assert main(["new", str(folder)]) == 2
    assert "refusing to write into a folder that is not empty" in capsys.readouterr().err
    assert sorted(p.name for p in folder.iterdir()) == ["notes.txt"]


def test_kinds_lists_every_kind_and_the_named_values(capsys):
    assert main(["kinds"]) == 0
    out = capsys.readouterr().out
    for name in registry():
        assert name in out
    # 12.5 kW/m² piloted ignition of wood (common practice)
    assert "wood_piloted_ignition_flux" in out and "12.5 kW/m^2" in out


def test_kinds_explains_every_input_of_a_kind(capsys):
    assert main(["kinds", "radiant_exposure"]) == 0
    out = capsys.readouterr().out
    for field in registry()["radiant_exposure"].inputs:
        assert f"  {field.name}:" in out


def test_unknown_kind_is_a_usage_error(capsys):
    assert main(["kinds", "layered_wal"]) == 2
    assert "did you mean 'layered_wall'?" in capsys.readouterr().err


def test_check_json_prints_results_json(tmp_path, capsys):
    folder = tmp_path / "starter"
    main(["new", str(folder)])
    capsys.readouterr()
    assert main(["check", str(folder), "--json"]) == 0
    doc = json.loads(capsys.readouterr().out)
    assert doc["format_version"] == 2
    assert not (folder / "build").exists()


def test_sheet_schema_accepts_every_demo_sheet_and_refuses_a_typo(capsys):
    # JSON Schema draft 2020-12 (an open standard), checked with the jsonschema library.
    import jsonschema
    import yaml
    from pathlib import Path
    assert main(["schema"]) == 0
    schema = json.loads(capsys.readouterr().out)
    jsonschema.Draft202012Validator.check_schema(schema)
    validator = jsonschema.Draft202012Validator(schema)
    sheets = sorted((Path(__file__).parent.parent / "projects/cold-store/sheets").glob("*.yaml"))
    assert sheets
    for path in sheets:
        doc = json.loads(json.dumps(yaml.safe_load(path.read_text()), default=str))
        assert list(validator.iter_errors(doc)) == [], path.name
    bad = json.loads(json.dumps(yaml.safe_load(sheets[0].read_text()), default=str))
    bad["blocks"][0]["titel"] = bad["blocks"][0].pop("title")
    assert list(validator.iter_errors(bad))


def test_format_reference_in_docs_is_current():
    # docs/format.md is generated from the declarations; regenerate with `make docs`.
    from pathlib import Path
    from calcdoc.reference import format_reference
    committed = (Path(__file__).resolve().parent.parent / "docs" / "format.md").read_text()
    assert committed == format_reference(), "docs/format.md is out of date: run make docs"


def test_starter_lists_layers_inside_outward_and_names_its_schemas(tmp_path):
    # The starter's wall reads from the heated room outward, as layered_wall declares, so
    # the first interface temperature is the warm side's (ISO 6946 convention, common practice).
    import yaml
    from calcdoc.starter import write_starter
    write_starter(tmp_path / "p")
    wall = (tmp_path / "p" / "sheets" / "wall.yaml").read_text()
    assert wall.startswith("# yaml-language-server: $schema=../schemas/sheet.json")
    layers = yaml.safe_load(wall)["blocks"][0]["inputs"]["layers"]
    assert [l["name"] for l in layers][0] == "Plasterboard" and layers[-1]["name"] == \
        "Brick outer leaf"
    schema = json.loads((tmp_path / "p" / "schemas" / "sheet.json").read_text())
    assert schema["$schema"].endswith("2020-12/schema")


def test_build_sheet_builds_one_sheet_with_what_it_refers_to(tmp_path, capsys):
    # HG1 takes EW1's and FW1's U-values: they are evaluated, not printed
    demo = Path(__file__).resolve().parents[1] / "projects" / "cold-store"
    out = tmp_path / "hg1"
    assert main(["build", str(demo), "--sheet", "HG1", "--out", str(out), "--no-pdf"]) == 0
    doc = json.loads((out / "results.json").read_text())
    assert [s["id"] for s in doc["sheets"]] == ["HG1"] and doc["partial"] is True
    assert sorted(p.name for p in out.glob("sheet-*.html")) == ["sheet-HG1.html"]
    page = (out / "sheet-HG1.html").read_text()
    assert "part of the package only: HG1" in page
    assert "EW1.wall.U (another sheet)" in page and 'href="None' not in page
    whole = tmp_path / "whole"
    assert main(["build", str(demo), "--out", str(whole), "--no-pdf"]) == 0
    full = json.loads((whole / "results.json").read_text())
    assert "partial" not in full
    hg1 = next(s for s in full["sheets"] if s["id"] == "HG1")
    assert hg1 == doc["sheets"][0]  # the same numbers as in the whole package


def test_build_sheet_refuses_an_unknown_sheet_and_final(tmp_path, capsys):
    demo = Path(__file__).resolve().parents[1] / "projects" / "cold-store"
    out = tmp_path / "out"
    assert main(["build", str(demo), "--sheet", "HG2", "--out", str(out)]) == 2
    err = capsys.readouterr().err
    assert "unknown sheet 'HG2'" in err and "did you mean 'HG1'?" in err
    assert main(["build", str(demo), "--sheet", "HG1", "--final", "--out", str(out)]) == 2
    assert "cannot be used with --sheet" in capsys.readouterr().err
    assert not out.exists()
