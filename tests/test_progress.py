"""Progress of a build on a terminal: one line on stderr rewritten in place (a carriage return,
never a new line) naming the stage and the sheet, cleared before the result is printed; with
stderr not a terminal (a pipe, a log, CI) nothing at all is written to it."""

from __future__ import annotations

import os
import pty
import select
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent


@pytest.fixture(scope="module")
def starter(tmp_path_factory):
    root = tmp_path_factory.mktemp("progress")
    subprocess.run([sys.executable, "-m", "calcdoc", "new", str(root / "starter")], check=True,
                   capture_output=True, env=_env())
    return root / "starter"


def _env() -> dict[str, str]:
    env = dict(os.environ)
    env["PYTHONPATH"] = str(ROOT) + os.pathsep + env.get("PYTHONPATH", "")
    env.pop("CALCDOC_DEBUG", None)
    return env


def _build_on_a_terminal(project: Path, out: Path) -> tuple[int, str, str]:
    """Run a full build with stderr on a pseudo-terminal; return (status, stdout, what the
    terminal received)."""
    leader, follower = pty.openpty()
    process = subprocess.Popen([sys.executable, "-m", "calcdoc", "build", str(project),
                                "--out", str(out)], stdin=subprocess.DEVNULL,
                               stdout=subprocess.PIPE, stderr=follower, env=_env())
    os.close(follower)
    received = b""
    try:
        # read as it comes: a terminal whose buffer is never read would stall the build
        while True:
            ready, _, _ = select.select([leader], [], [], 120)
            if not ready:
                raise AssertionError("no progress for 120 s")
            try:
                chunk = os.read(leader, 4096)
            except OSError:  # EIO: the build ended and closed its end of the terminal
                break
            if not chunk:
                break
            received += chunk
        stdout = process.stdout.read().decode()
        status = process.wait(timeout=120)
    finally:
        os.close(leader)
        if process.poll() is None:
            process.kill()
    return status, stdout, received.decode("utf-8", "replace")


def test_build_on_a_terminal__stage_and_sheet_on_one_rewritten_line(starter, tmp_path):
    status, stdout, terminal = _build_on_a_terminal(starter, tmp_path / "out")
    assert status == 0
    assert stdout.startswith(f"built {tmp_path / 'out'} ")
    assert "\r" in terminal
    assert "\n" not in terminal, "one line rewritten in place, never a new line per update"
    shown = [part.strip() for part in terminal.split("\r") if part.strip()]
    assert any(s.startswith("load: reading") for s in shown)
    assert any(s.startswith("evaluate: block 1 of 2") for s in shown)
    assert "site: sheet W1 (1 of 2), typesetting its blocks" in shown
    assert "site: sheet L1 (2 of 2), typesetting its blocks" in shown
    assert any(s.startswith("PDF: ") for s in shown)
    # cleared before the result: the last thing the terminal got is a blank line, cursor home
    assert terminal.rstrip(" ").endswith("\r") and terminal.split("\r")[-2].strip() == ""


def test_build_not_on_a_terminal__stderr_empty(starter, tmp_path):
    done = subprocess.run([sys.executable, "-m", "calcdoc", "build", str(starter), "--out",
                           str(tmp_path / "out")], capture_output=True, text=True,
                          env=_env(), timeout=300)
    assert done.returncode == 0
    assert done.stderr == ""
    assert done.stdout.startswith(f"built {tmp_path / 'out'} ")
