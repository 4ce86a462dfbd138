"""Shared test helpers: evaluate sheets written inline, collect located errors."""

from __future__ import annotations

import textwrap
from pathlib import Path

import pytest

from calcdoc.errors import InputErrors
from calcdoc.evaluate import evaluate_project
from calcdoc.project import load_project

PROJECT_YAML = """\
project: {number: "T-001", title: Test project, client: Test, site: Test, organisation: Test}
package: {number: TP-001, title: Test package}
revisions:
  - {rev: P1, date: 2026-11-10, purpose: For review, by: AE, checked: BC, approved: ""}
"""


def write_project(root: Path, sheets: dict[str, str], project_yaml: str = PROJECT_YAML,
                  extra: dict[str, str] | None = None) -> Path:
    """Write a project folder with the given sheets (name → YAML text) and return it."""
    (root / "sheets").mkdir(parents=True, exist_ok=True)
    (root / "project.yaml").write_text(textwrap.dedent(project_yaml))
    for name, text in sheets.items():
        (root / "sheets" / f"{name}.yaml").write_text(textwrap.dedent(text))
    for name, text in (extra or {}).items():
        (root / name).write_text(textwrap.dedent(text))
    return root


@pytest.fixture(autouse=True, scope="session")
def _own_cache_secret(tmp_path_factory):
    """The build cache signs its entries with the user's secret (calcdoc/cache.py): the tests
    (and the commands they start) use a secret of their own, not the user's."""
    import os
    before = os.environ.get("XDG_CACHE_HOME")
    os.environ["XDG_CACHE_HOME"] = str(tmp_path_factory.mktemp("xdg-cache"))
    yield
    if before is None:
        os.environ.pop("XDG_CACHE_HOME", None)
    else:
        os.environ["XDG_CACHE_HOME"] = before


@pytest.fixture(autouse=True)
def _in_tmp_path(tmp_path, monkeypatch):
    """Run each test from its own folder, as a user runs calcdoc from beside the project:
    messages name files relative to where the user stands."""
    monkeypatch.chdir(tmp_path)


@pytest.fixture
def evaluate(tmp_path):
    """Return a function: sheets → evaluated Package (raises InputErrors on bad input)."""
    def run(sheets: dict[str, str], **kwargs):
        root = write_project(tmp_path / "proj", sheets, **kwargs)
        return evaluate_project(load_project(root))
    return run


@pytest.fixture
def errors_of(tmp_path):
    """Return a function: sheets → list of error message strings (expects bad input)."""
    def run(sheets: dict[str, str], **kwargs):
        root = write_project(tmp_path / "proj", sheets, **kwargs)
        with pytest.raises(InputErrors) as info:
            evaluate_project(load_project(root))
        return [str(e) for e in info.value.errors]
    return run
