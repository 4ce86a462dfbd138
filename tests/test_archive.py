"""results.json, manifest.json, verify and diff on a small formula project."""

import hashlib
import json

import pytest

from calcdoc.cli import main
from conftest import write_project

SHEET = """\
id: F1
title: Fabric loss
blocks:
  - id: loss
    kind: formula
    given:
      U: 0.25 W/(m^2*K)
      A: {value: 100 m^2, source: Drawing A-101 (example)}
      dT: 20 K
    steps:
      - {name: Q, expr: "U * A * dT", unit: kW, label: Fabric loss}
    checks:
      - {result: Q, at_most: 0.4 kW, source: Heater capacity (example)}
"""


@pytest.fixture
def built(tmp_path):
    root = write_project(tmp_path / "proj", {"f1": SHEET})
    out = tmp_path / "out"
    assert main(["build", str(root), "--out", str(out), "--no-pdf"]) == 0
    return root, out


def test_results_json_follows_the_contract(built):
    _, out = built
    doc = json.loads((out / "results.json").read_text())
    assert doc["format_version"] == 2
    assert doc["project"] == {"number": "T-001", "title": "Test project", "revision": "P1"}
    block = doc["sheets"][0]["blocks"][0]
    assert block["id"] == "loss" and block["kind"] == "formula"
    # 0.25 × 100 × 20 = 500 W (hand calculation), kept in coherent SI
    assert block["results"]["Q"] == {"si": 500.0, "si_unit": "W", "display": "0.500 kW"}
    check = block["checks"][0]
    assert check["relation"] == "at_most" and check["passed"] is False
    assert check["limit_si"] == 400.0 and check["margin_si"] == -100.0
    assert check["utilisation"] == pytest.approx(1.25)
    # format 2: the step as printed, re-doable from its printed numbers
    assert block["steps"] == [{"name": "Q", "label": "Fabric loss", "expr": "U * A * dT",
                               "values": {"U": "0.25 W/(m^2*K)", "A": "100 m^2", "dT": "20 K"},
                               "result": "0.500 kW", "source": ""}]


def test_manifest_hashes_every_input_and_output(built):
    root, out = built
    manifest = json.loads((out / "manifest.json").read_text())
    assert manifest["inputs"]["sheets/f1.yaml"] == hashlib.sha256(
        (root / "sheets" / "f1.yaml").read_bytes()).hexdigest()
    assert manifest["outputs"]["results.json"] == hashlib.sha256(
        (out / "results.json").read_bytes()).hexdigest()
    assert manifest["outputs"]["index.html"]
    assert len(manifest["package_digest"]) == 64
    assert manifest["libraries"]["pint"] != "not installed"


def test_rebuild_is_byte_identical(built, tmp_path):
    root, out = built
    first = {p.name: p.read_bytes() for p in out.iterdir() if p.is_file()}
    assert main(["build", str(root), "--out", str(out), "--no-pdf"]) == 0
    second = {p.name: p.read_bytes() for p in out.iterdir() if p.is_file()}
    assert first == second


def test_verify_passes_and_detects_tampering(built, capsys):
    _, out = built
    assert main(["verify", str(out)]) == 0
    doc = json.loads((out / "results.json").read_text())
    doc["sheets"][0]["blocks"][0]["results"]["Q"]["si"] = 501.0
    (out / "results.json").write_text(json.dumps(doc))
    capsys.readouterr()
    assert main(["verify", str(out)]) == 1
    assert "~ F1.loss.Q: 501.0 → 500.0" in capsys.readouterr().out


def test_diff_names_changed_inputs_and_results(built, tmp_path, capsys):
    root, out = built
    (root / "sheets" / "f1.yaml").write_text(SHEET.replace("dT: 20 K", "dT: 10 K"))
    out2 = tmp_path / "out2"
    assert main(["build", str(root), "--out", str(out2), "--no-pdf"]) == 0
    capsys.readouterr()
    assert main(["diff", str(out), str(out2)]) == 1
    text = capsys.readouterr().out.splitlines()
    # the revision note as an engineer writes it: inputs as written, results as printed with
    # the change in per cent (0.25 × 100 × 10 = 250 W, half of 500 W: −50 %), checks that flip
    assert text == ["Inputs", "  F1.loss dT: 20 K → 10 K",
                    "Results", "  F1.loss.Q: 0.500 kW → 0.250 kW (−50 %)",
                    "Checks", "  check F1.loss.Q at most 0.400 kW: FAILED → passes"]
    assert main(["diff", str(out), str(out2), "--json"]) == 1
    doc = json.loads(capsys.readouterr().out)
    assert doc["inputs"] == [{"key": "F1.loss.given.dT", "what": "F1.loss dT", "old": "20 K",
                              "new": "10 K"}]
    assert doc["results"][0]["percent"] == pytest.approx(-50.0)
    assert doc["checks"][0]["new"] == "passes"
    assert main(["diff", str(out), str(out)]) == 0


def test_check_strict_exits_1_on_a_failed_check(tmp_path, capsys):
    root = write_project(tmp_path / "proj", {"f1": SHEET})
    assert main(["check", str(root)]) == 0
    assert main(["check", str(root), "--strict"]) == 1
    out = capsys.readouterr().out
    assert "check Q: 0.500 kW <= 0.400 kW  FAIL" in out
    assert not (tmp_path / "build").exists()
