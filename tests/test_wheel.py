"""The wheel alone carries what calcdoc reads at run time (templates, stylesheet, materials).

The wheel is built from a copy of the source tree (a build writes build/ and *.egg-info beside
the sources), installed without dependencies into a fresh virtual environment, and run from a
folder outside the repository with no PYTHONPATH: the checkout's templates/ cannot be found
from there, so a site written proves the installed package carries its own. The dependencies
come from the interpreter running the tests (a .pth line in the new environment), since the
tests run without network access to an index.

Slow but bounded: each step has a timeout, about 20 s in all on a 2-core machine.
"""

from __future__ import annotations

import os
import shutil
import subprocess
import sys
import sysconfig
import zipfile
from pathlib import Path

import pytest

REPOSITORY = Path(__file__).resolve().parent.parent

pytestmark = pytest.mark.slow


def _run(command: list, cwd: Path, env: dict | None = None, timeout: float = 60):
    done = subprocess.run([str(c) for c in command], cwd=cwd, env=env, capture_output=True,
                          text=True, timeout=timeout)
    assert done.returncode == 0, f"{command}: {done.stdout}\n{done.stderr}"
    return done


def _tree_files() -> set[str]:
    """Every file of the package tree and of templates/ as it must appear in the wheel."""
    names = {p.relative_to(REPOSITORY).as_posix()
             for p in (REPOSITORY / "calcdoc").rglob("*")
             if p.is_file() and "__pycache__" not in p.parts and p.suffix != ".pyc"}
    names |= {"calcdoc/templates/" + p.name for p in (REPOSITORY / "templates").iterdir()
              if p.is_file()}
    return names


@pytest.fixture(scope="module")
def wheel(tmp_path_factory) -> Path:
    work = tmp_path_factory.mktemp("wheel")
    source = work / "source"
    source.mkdir()
    for name in ("pyproject.toml", "README.md"):
        shutil.copy2(REPOSITORY / name, source / name)
    for folder in ("calcdoc", "templates"):
        shutil.copytree(REPOSITORY / folder, source / folder,
                        ignore=shutil.ignore_patterns("__pycache__", "*.pyc"))
    _run([sys.executable, "-m", "pip", "wheel", "--no-deps", "-q", "-w", work / "dist",
          source], work, timeout=120)
    (built,) = (work / "dist").glob("calcdoc-*.whl")
    return built


def test_wheel__carries_every_module_template_stylesheet_and_material(wheel):
    with zipfile.ZipFile(wheel) as archive:
        shipped = set(archive.namelist())
    missing = sorted(_tree_files() - shipped)
    assert not missing, f"not in the wheel: {missing}"
    assert "calcdoc/templates/style.css" in shipped
    assert not any(n.startswith(("templates/", "tests/", "projects/")) for n in shipped)


def test_wheel__installed_alone_writes_the_starter_and_builds_its_site(wheel, tmp_path):
    venv = tmp_path / "venv"
    _run([sys.executable, "-m", "venv", "--without-pip", venv], tmp_path)
    python = venv / "bin" / "python"
    _run([sys.executable, "-m", "pip", "--python", python, "install", "--no-deps",
          "--no-index", "-q", wheel], tmp_path, timeout=120)
    # The dependencies of the running interpreter, after the new environment's own packages
    # (a plain path line: the .pth files there, such as a development install of calcdoc, are
    # not run, so calcdoc can only come from the wheel).
    new_site = _run([python, "-c", "import sysconfig; print(sysconfig.get_paths()['purelib'])"],
                    tmp_path).stdout.strip()
    Path(new_site, "dependencies.pth").write_text(sysconfig.get_paths()["purelib"] + "\n")

    outside = tmp_path / "elsewhere"
    outside.mkdir()
    env = {k: v for k, v in os.environ.items() if k not in ("PYTHONPATH", "PYTHONHOME")}
    where = _run([python, "-c", "import calcdoc, calcdoc.render.html as h; "
                  "print(calcdoc.__file__); print(h.TEMPLATES)"], outside, env).stdout.split()
    assert all(Path(p).is_relative_to(venv) for p in where), where

    calcdoc = venv / "bin" / "calcdoc"
    _run([calcdoc, "new", "proj"], outside, env)
    done = _run([calcdoc, "build", "proj", "--no-pdf", "--out", "site"], outside, env,
                timeout=120)
    assert "built site" in done.stdout
    site = outside / "site"
    assert "Example calculation package" in (site / "index.html").read_text("utf-8")
    assert (site / "assets" / "style.css").read_bytes() == \
        (REPOSITORY / "templates" / "style.css").read_bytes()
    assert (site / "sheet-W1.html").is_file() and (site / "results.json").is_file()
